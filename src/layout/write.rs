//! Write moved ports back into the user's layout text, keeping comments and order.
//!
//! `toml_edit` edits the document in place: only the values of fields whose value
//! changed are rewritten; every comment, blank line and the order of sections stay as
//! written. Each value is written with the fewest decimals that read back to exactly
//! the value in the model ([`precision::exact_text`](super::precision::exact_text)), so
//! the file that is written reads back as the layout that was checked. A hole is
//! written in inches when that is shorter and exact (number and fractional drills),
//! else in millimetres, with an optional note naming the drill.

use super::precision::exact_text;
use crate::model::{NozzleSpec, Port};
use crate::units::{self, Kind};
use toml_edit::{value, DocumentMut, Item, Table};

/// Why the text could not be updated.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    /// The original text does not parse as TOML (it did when it was read).
    #[error("the layout text does not parse: {0}")]
    Parse(String),
    /// A port in the model has no `[[port]]` table of that name.
    #[error("no [[port]] named `{0}` in the layout text")]
    MissingPort(String),
}

/// Whether the field's present text already reads as `v` (so it is left as written).
fn reads_as(t: &Table, key: &str, kind: Kind, v: f64, wrap: bool) -> bool {
    let Some(old) = t
        .get(key)
        .and_then(Item::as_str)
        .and_then(|s| units::parse(s, kind).ok())
    else {
        return false;
    };
    if wrap {
        old.rem_euclid(std::f64::consts::TAU) == v || old == v
    } else {
        old == v
    }
}

fn set(t: &mut Table, key: &str, kind: Kind, v: f64, wrap: bool, unit: &str) {
    if !reads_as(t, key, kind, v, wrap) {
        t[key] = value(exact_text(v, unit, kind, 0));
    }
}

/// The shorter of the exact millimetre and inch texts of a diameter (inches on a tie).
fn hole_text(d_m: f64) -> String {
    let mm = exact_text(d_m, "mm", Kind::Length, 1);
    let inch = exact_text(d_m, "in", Kind::Length, 1);
    // Ties go to inches: drills of equal digit count in both are inch drills.
    if inch.len() <= mm.len() {
        inch
    } else {
        mm
    }
}

/// Return `text` with each port's station, clock, cants and hole set from `ports`.
pub fn with_ports(text: &str, ports: &[Port]) -> Result<String, WriteError> {
    with_ports_noted(text, ports, |_| None)
}

/// As [`with_ports`]; `hole_note` may name a rewritten hole's drill (for example
/// `"number drill #52"`), written as a comment after the value.
pub fn with_ports_noted(
    text: &str,
    ports: &[Port],
    hole_note: impl Fn(f64) -> Option<String>,
) -> Result<String, WriteError> {
    let mut doc: DocumentMut = text
        .parse()
        .map_err(|e: toml_edit::TomlError| WriteError::Parse(e.to_string()))?;
    let tables = doc
        .get_mut("port")
        .and_then(|p| p.as_array_of_tables_mut())
        .ok_or_else(|| WriteError::MissingPort("(any)".to_string()))?;
    for port in ports {
        let t = tables
            .iter_mut()
            .find(|t| {
                t.get("name").and_then(|n| n.as_str()).map(str::trim) == Some(port.name.as_str())
            })
            .ok_or_else(|| WriteError::MissingPort(port.name.clone()))?;
        set(t, "station", Kind::Length, port.station_m, false, "mm");
        set(t, "clock", Kind::Angle, port.clock_rad, true, "deg");
        if port.tangential_cant_rad != 0.0 || t.contains_key("tangential_cant") {
            set(
                t,
                "tangential_cant",
                Kind::Angle,
                port.tangential_cant_rad,
                false,
                "deg",
            );
        }
        if port.axial_cant_rad != 0.0 || t.contains_key("axial_cant") {
            set(
                t,
                "axial_cant",
                Kind::Angle,
                port.axial_cant_rad,
                false,
                "deg",
            );
        }
        if let NozzleSpec::Hole { diameter_m, .. } = port.nozzle {
            if t.contains_key("hole") && !reads_as(t, "hole", Kind::Length, diameter_m, false) {
                let mut v = toml_edit::Value::from(hole_text(diameter_m));
                if let Some(note) = hole_note(diameter_m) {
                    v.decor_mut().set_suffix(format!("  # {note}"));
                }
                t["hole"] = Item::Value(v);
            }
        }
    }
    Ok(doc.to_string())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::layout::parse_str;

    const DEMO: &str = include_str!("../../layouts/heron-54.toml");

    #[test]
    fn written_values_read_back_exactly_and_unmoved_fields_keep_their_text() {
        let d = parse_str(DEMO, "heron-54.toml").unwrap();
        let mut ports = d.ports.clone();
        ports[0].station_m = 0.596_800_000_000_1;
        ports[0].clock_rad = 1.234_567_890_123;
        // Number drill #52, 0.0635 in (ASME B94.11M).
        if let NozzleSpec::Hole { diameter_m, .. } = &mut ports[0].nozzle {
            *diameter_m = 0.0635 * 0.0254;
        }
        let text = with_ports_noted(DEMO, &ports, |_| Some("number drill #52".into())).unwrap();
        let back = parse_str(&text, "x.toml").unwrap();
        assert_eq!(back.ports[0].station_m, ports[0].station_m);
        assert_eq!(back.ports[0].clock_rad, ports[0].clock_rad);
        assert_eq!(back.ports[0].nozzle, ports[0].nozzle);
        assert!(
            text.contains("hole = \"0.0635 in\"  # number drill #52"),
            "{text}"
        );
        // Ports that did not move keep their original text.
        let unchanged = with_ports(DEMO, &d.ports).unwrap();
        assert_eq!(unchanged, DEMO);
    }
}
