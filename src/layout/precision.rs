//! The precision a layout file is written with, and the values that precision can hold.
//!
//! The optimiser's answer is written back into the layout text, and the text is what a
//! builder drills from and what the next run reads. So the optimiser searches only
//! values that the writer can write exactly: stations on a 1 µm grid (three decimals of
//! a millimetre) and angles on a 0.001° grid (three decimals of a degree). [`snap_station`]
//! and [`snap_angle`] return, bit for bit, what reading the written text gives back, so
//! the rule check done before writing is the rule check of the file.
//!
//! [`exact_text`] writes any value with the fewest decimals that read back to the same
//! `f64`, so a value that is not on the grid (a fixed port, a hole from a drill list)
//! is never changed by writing it.

use crate::units::{self, Kind};

/// Decimals of a millimetre a written station keeps.
pub const STATION_DECIMALS: i32 = 3;
/// Decimals of a degree a written angle keeps.
pub const ANGLE_DECIMALS: i32 = 3;

/// The SI value of one `unit` of `kind`, read by the same table that reads layouts.
fn scale(unit: &str, kind: Kind) -> f64 {
    // The unit tables always know "mm" and "deg"; a miss would be a bug in the table.
    units::parse(&format!("1 {unit}"), kind).unwrap_or(f64::NAN)
}

/// SI value of 1 mm and of 1°, read once (the optimiser snaps in its inner loop).
fn mm_and_deg() -> (f64, f64) {
    static SCALES: std::sync::OnceLock<(f64, f64)> = std::sync::OnceLock::new();
    *SCALES.get_or_init(|| (scale("mm", Kind::Length), scale("deg", Kind::Angle)))
}

/// `value_si` rounded to `decimals` of a unit of SI value `s`, as reading
/// `"{:.decimals$} unit"` gives it.
fn snap(value_si: f64, s: f64, decimals: i32) -> f64 {
    let steps = 10f64.powi(decimals);
    // q / steps with both integers exact is correctly rounded, as the text reader is,
    // and the reader multiplies by the same scale: the two agree bit for bit.
    let q = (value_si / s * steps).round();
    let v = q / steps * s;
    if v == 0.0 {
        0.0
    } else {
        v
    }
}

/// A station as the writer writes it (1 µm grid), m.
pub fn snap_station(station_m: f64) -> f64 {
    snap(station_m, mm_and_deg().0, STATION_DECIMALS)
}

/// An angle as the writer writes it (0.001° grid), rad.
pub fn snap_angle(angle_rad: f64) -> f64 {
    snap(angle_rad, mm_and_deg().1, ANGLE_DECIMALS)
}

/// A clock angle brought into [0°, 360°) and snapped as written, rad.
pub fn snap_clock(clock_rad: f64) -> f64 {
    snap_angle(clock_rad.rem_euclid(std::f64::consts::TAU))
}

/// `value_si` in `unit` with the fewest decimals (at least `min_decimals`) that read
/// back to exactly the same value, e.g. `"596.8 mm"`.
pub fn exact_text(value_si: f64, unit: &str, kind: Kind, min_decimals: usize) -> String {
    let s = scale(unit, kind);
    let v = value_si / s;
    for decimals in min_decimals..=20 {
        let text = format!("{v:.decimals$} {unit}");
        if units::parse(&text, kind).ok() == Some(value_si) {
            return text;
        }
    }
    // Some values have no decimal in `unit` that reads back exactly; the SI unit
    // (scale 1) always has one: Rust's shortest round-trip form.
    let si = if kind == Kind::Angle { "rad" } else { "m" };
    format!("{value_si} {si}")
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn read(text: &str, kind: Kind) -> f64 {
        units::parse(text, kind).unwrap()
    }

    #[test]
    fn snapped_values_read_back_bit_for_bit() {
        for v in [0.5968, 0.596_800_000_000_1, 0.25, 1e-6, 0.123_456_7] {
            let s = snap_station(v);
            assert_eq!(read(&format!("{:.3} mm", s * 1e3), Kind::Length), s, "{v}");
            assert!((s - v).abs() <= 0.5e-6 + 1e-15, "{v}");
        }
        for d in [0.0f64, 45.0, 359.9996, 12.3456, -20.0004] {
            let s = snap_angle(d.to_radians());
            assert_eq!(read(&format!("{:.3} deg", s.to_degrees()), Kind::Angle), s);
        }
        // −0.0004° snaps to zero, never to negative zero.
        assert!(snap_angle(-0.0004f64.to_radians()).is_sign_positive());
        assert_eq!(
            snap_clock(-90f64.to_radians()),
            snap_angle(270f64.to_radians())
        );
    }

    #[test]
    fn exact_text_is_short_and_exact() {
        assert_eq!(exact_text(0.5968, "mm", Kind::Length, 0), "596.8 mm");
        // Number drill #52 is 0.0635 in (ASME B94.11M); 1/16 in is 0.0625 in.
        assert_eq!(
            exact_text(0.0635 * 0.0254, "in", Kind::Length, 0),
            "0.0635 in"
        );
        assert_eq!(
            exact_text(0.0625 * 0.0254, "in", Kind::Length, 0),
            "0.0625 in"
        );
        assert_eq!(exact_text(1.2e-3, "mm", Kind::Length, 2), "1.20 mm");
    }

    proptest! {
        #[test]
        fn any_value_is_written_exactly(v in -10.0f64..10.0) {
            for (unit, kind) in [("mm", Kind::Length), ("in", Kind::Length), ("deg", Kind::Angle)] {
                let t = exact_text(v, unit, kind, 2);
                prop_assert_eq!(read(&t, kind), v, "{}", t);
            }
            let s = snap_station(v);
            prop_assert_eq!(read(&exact_text(s, "mm", Kind::Length, 0), Kind::Length), s);
            prop_assert!(exact_text(s, "mm", Kind::Length, 0).split(' ').next().unwrap()
                .split('.').nth(1).map_or(0, str::len) <= 3);
        }
    }
}
