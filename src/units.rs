//! Quantities with units, as written in layout files, turned into SI numbers.
//!
//! Every dimensional value in a layout is a string such as `"54 mm"` or `"150 psig"`.
//! The number and the unit are split, the unit is looked up in a table for the
//! expected [`Kind`], and the value is scaled to SI. Pressures keep whether they
//! were gauge or absolute, because only the caller knows which ambient a gauge
//! reading refers to. Unit spellings are case-sensitive where SI prefixes make
//! case matter (`mPa` is not `MPa`).

use std::fmt;
use thiserror::Error;

/// Standard atmosphere at sea level, Pa (ISO 2533 / US Standard Atmosphere 1976).
pub const STANDARD_ATMOSPHERE_PA: f64 = 101_325.0;

const INCH_M: f64 = 0.0254;
const FOOT_M: f64 = 0.3048;
const POUND_KG: f64 = 0.453_592_37;
const OUNCE_KG: f64 = POUND_KG / 16.0;
const POUND_FORCE_N: f64 = POUND_KG * 9.806_65;
const OUNCE_FORCE_N: f64 = POUND_FORCE_N / 16.0;
const PSI_PA: f64 = POUND_FORCE_N / (INCH_M * INCH_M);

/// What physical dimension a field expects.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// Length, m.
    Length,
    /// Area, m².
    Area,
    /// Volume, m³.
    Volume,
    /// Pressure, Pa (gauge or absolute).
    Pressure,
    /// Mass, kg.
    Mass,
    /// Force, N.
    Force,
    /// Torque, N·m.
    Torque,
    /// Temperature, K.
    Temperature,
    /// Angle, rad.
    Angle,
    /// Time, s.
    Time,
    /// Angular rate, rad/s.
    AngularRate,
    /// Angular acceleration, rad/s².
    AngularAcceleration,
    /// Mass flow, kg/s.
    MassFlow,
    /// Electric current, A.
    Current,
    /// Moment of inertia, kg·m².
    Inertia,
}

impl Kind {
    /// A plain name and an example, for error messages.
    pub fn describe(self) -> (&'static str, &'static str) {
        match self {
            Kind::Length => ("a length", "54 mm"),
            Kind::Area => ("an area", "12 mm2"),
            Kind::Volume => ("a volume", "0.5 L"),
            Kind::Pressure => ("a pressure", "150 psig"),
            Kind::Mass => ("a mass", "180 g"),
            Kind::Force => ("a force", "4.5 N"),
            Kind::Torque => ("a torque", "0.3 N m"),
            Kind::Temperature => ("a temperature", "20 C"),
            Kind::Angle => ("an angle", "12 deg"),
            Kind::Time => ("a time", "15 ms"),
            Kind::AngularRate => ("an angular rate", "90 deg/s"),
            Kind::AngularAcceleration => ("an angular acceleration", "30 deg/s^2"),
            Kind::MassFlow => ("a mass flow", "2 g/s"),
            Kind::Current => ("a current", "0.8 A"),
            Kind::Inertia => ("a moment of inertia", "0.02 kg m2"),
        }
    }
}

impl Kind {
    /// The largest magnitude accepted for this kind, SI, and the same in words.
    ///
    /// Far beyond any cold-gas system on a small vehicle, yet small enough that
    /// products and squares of accepted values (inertias, torques, flows) stay
    /// finite in `f64`. A value beyond it is a typo, not a design.
    pub fn largest(self) -> (f64, &'static str) {
        match self {
            Kind::Length => (100e3, "100 km"),
            Kind::Area => (10.0, "10 m2"),
            Kind::Volume => (1.0, "1 m3"),
            Kind::Pressure => (100e6, "100 MPa"),
            Kind::Mass => (10_000.0, "10000 kg"),
            Kind::Force => (1e6, "1000 kN"),
            Kind::Torque => (1e5, "100000 N m"),
            Kind::Temperature => (1_000.0, "1000 K"),
            Kind::Angle => (4.0 * std::f64::consts::PI, "720 deg"),
            Kind::Time => (86_400.0, "86400 s (one day)"),
            Kind::AngularRate => (1_000.0, "1000 rad/s"),
            Kind::AngularAcceleration => (1e5, "100000 rad/s^2"),
            Kind::MassFlow => (100.0, "100 kg/s"),
            Kind::Current => (1_000.0, "1000 A"),
            Kind::Inertia => (1e5, "100000 kg m2"),
        }
    }
}

/// The longest quantity text read, in bytes. A quantity is a number and a unit;
/// anything longer is a mistake, and the bound keeps reading it cheap.
pub const MAX_QUANTITY_LEN: usize = 64;

/// `text` as shown in a message: whole when short, else its first 40
/// characters and the length, so a huge value cannot flood the terminal.
pub fn shown(text: &str) -> String {
    let n = text.chars().count();
    if n <= 60 {
        text.to_string()
    } else {
        let head: String = text.chars().take(40).collect();
        format!("{head}… ({n} characters)")
    }
}

/// A plain number as shown in a message: six significant digits at most, and
/// words instead of NaN or infinity.
pub fn shown_number(x: f64) -> String {
    if x.is_nan() {
        "a value that is not a number".to_string()
    } else if x.is_infinite() {
        "an infinite value".to_string()
    } else if x == 0.0 {
        "0".to_string()
    } else if (1e-4..1e9).contains(&x.abs()) {
        let digits = (5 - x.abs().log10().floor() as i32).clamp(0, 9) as usize;
        let t = format!("{x:.digits$}");
        if t.contains('.') {
            t.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            t
        }
    } else {
        format!("{x:.5e}")
    }
}

/// `v` with its sign and `decimals` decimals, for columns of signed values; a
/// value that rounds to zero is written "0.00" (no sign), never "-0.00".
pub fn signed(v: f64, decimals: usize) -> String {
    let t = format!("{v:+.decimals$}");
    if t[1..].chars().all(|c| c == '0' || c == '.') {
        format!("{:.decimals$}", 0.0)
    } else {
        t
    }
}

impl fmt::Display for Kind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let (name, example) = self.describe();
        write!(f, "{name} such as \"{example}\"")
    }
}

/// How a pressure was written.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum PressureReference {
    /// Explicitly absolute (`psia`, `bara`, `kPa`, `MPa`, `Pa`).
    Absolute,
    /// Explicitly gauge (`psig`, `barg`, `kPag`).
    Gauge,
    /// A bare `psi` or `bar`, read as gauge.
    BareGauge,
}

/// A pressure value, scaled to pascals but not yet referred to an ambient.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PressureValue {
    /// Value in Pa, above vacuum if absolute, above ambient if gauge.
    pub pa: f64,
    /// How it was written.
    pub reference: PressureReference,
}

impl PressureValue {
    /// Absolute pressure, using `ambient_pa` for a gauge reading.
    pub fn absolute_pa(&self, ambient_pa: f64) -> f64 {
        match self.reference {
            PressureReference::Absolute => self.pa,
            PressureReference::Gauge | PressureReference::BareGauge => self.pa + ambient_pa,
        }
    }

    /// Pressure above the given ambient.
    pub fn gauge_pa(&self, ambient_pa: f64) -> f64 {
        match self.reference {
            PressureReference::Absolute => self.pa - ambient_pa,
            PressureReference::Gauge | PressureReference::BareGauge => self.pa,
        }
    }
}

/// Why a quantity could not be read.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum UnitError {
    /// No number at the start of the text.
    #[error("expected {expected}, found \"{text}\" (no number)")]
    NoNumber {
        /// What was expected.
        expected: Kind,
        /// The text given.
        text: String,
    },
    /// A number without a unit.
    #[error("expected {expected}, found \"{text}\" (no unit)")]
    NoUnit {
        /// What was expected.
        expected: Kind,
        /// The text given.
        text: String,
    },
    /// A unit that is known but of another kind.
    #[error("expected {expected}, found \"{text}\" (`{unit}` is a unit of {found_kind})")]
    WrongKind {
        /// What was expected.
        expected: Kind,
        /// The text given.
        text: String,
        /// The unit found.
        unit: String,
        /// What that unit measures.
        found_kind: &'static str,
    },
    /// A unit nobody knows.
    #[error("expected {expected}, found \"{text}\" (unknown unit `{unit}`)")]
    UnknownUnit {
        /// What was expected.
        expected: Kind,
        /// The text given.
        text: String,
        /// The unit found.
        unit: String,
    },
    /// Longer than any quantity.
    #[error("expected {expected}, found a text of {length} characters (a quantity is a number and a unit)")]
    TooLong {
        /// What was expected.
        expected: Kind,
        /// Its length in characters.
        length: usize,
    },
    /// Beyond [`Kind::largest`].
    #[error("expected {expected} of at most {largest} in size, found \"{text}\"")]
    OutOfRange {
        /// What was expected.
        expected: Kind,
        /// The text given.
        text: String,
        /// The bound, in words.
        largest: &'static str,
    },
    /// NaN or infinite.
    #[error("expected {expected}, found \"{text}\" (not a finite number)")]
    NotFinite {
        /// What was expected.
        expected: Kind,
        /// The text given.
        text: String,
    },
}

/// Split `"54 mm"` into `(54.0, "mm")`. The unit keeps its inner spaces normalised to one.
fn split_number(text: &str) -> Option<(f64, String, bool)> {
    let t = text.trim();
    let bytes = t.as_bytes();
    let mut end = 0;
    let mut best: Option<(f64, usize)> = None;
    // Longest prefix that parses as a float: handles "1e5 Pa" and "2.5e-3 m".
    while end < bytes.len() {
        end += 1;
        if !t.is_char_boundary(end) {
            continue;
        }
        let c = bytes[end - 1] as char;
        if !(c.is_ascii_digit() || matches!(c, '+' | '-' | '.' | 'e' | 'E')) {
            break;
        }
        if let Ok(v) = t[..end].parse::<f64>() {
            best = Some((v, end));
        }
    }
    // Words such as "nan" and "inf" parse as floats too; catch them explicitly.
    let lower = t.to_ascii_lowercase();
    for word in [
        "nan",
        "+nan",
        "-nan",
        "inf",
        "+inf",
        "-inf",
        "infinity",
        "-infinity",
    ] {
        if lower.starts_with(word) {
            let rest = &t[word.len()..];
            return Some((f64::NAN, normalise_unit(rest), false));
        }
    }
    let (value, used) = best?;
    Some((value, normalise_unit(&t[used..]), true))
}

fn normalise_unit(unit: &str) -> String {
    unit.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// One row of the unit table: spelling, kind, scale to SI, offset (temperature only).
struct UnitRow {
    names: &'static [&'static str],
    kind: Kind,
    scale: f64,
    offset: f64,
    reference: Option<PressureReference>,
}

const fn row(names: &'static [&'static str], kind: Kind, scale: f64) -> UnitRow {
    UnitRow {
        names,
        kind,
        scale,
        offset: 0.0,
        reference: None,
    }
}

const fn pressure(
    names: &'static [&'static str],
    scale: f64,
    reference: PressureReference,
) -> UnitRow {
    UnitRow {
        names,
        kind: Kind::Pressure,
        scale,
        offset: 0.0,
        reference: Some(reference),
    }
}

const DEG: f64 = std::f64::consts::PI / 180.0;
const RPM: f64 = std::f64::consts::TAU / 60.0;

static UNITS: &[UnitRow] = &[
    row(&["m"], Kind::Length, 1.0),
    row(&["mm"], Kind::Length, 1e-3),
    row(&["cm"], Kind::Length, 1e-2),
    row(&["um", "µm"], Kind::Length, 1e-6),
    row(&["in", "inch", "inches", "\""], Kind::Length, INCH_M),
    row(&["ft", "foot", "feet", "'"], Kind::Length, FOOT_M),
    row(&["m2", "m^2"], Kind::Area, 1.0),
    row(&["mm2", "mm^2"], Kind::Area, 1e-6),
    row(&["cm2", "cm^2"], Kind::Area, 1e-4),
    row(&["in2", "in^2", "sq in"], Kind::Area, INCH_M * INCH_M),
    row(&["m3", "m^3"], Kind::Volume, 1.0),
    row(&["mm3", "mm^3"], Kind::Volume, 1e-9),
    row(&["cm3", "cm^3", "cc", "mL", "ml"], Kind::Volume, 1e-6),
    row(&["L", "l"], Kind::Volume, 1e-3),
    row(
        &["in3", "in^3", "cu in"],
        Kind::Volume,
        INCH_M * INCH_M * INCH_M,
    ),
    row(&["ft3", "ft^3"], Kind::Volume, FOOT_M * FOOT_M * FOOT_M),
    pressure(&["Pa", "Pa abs", "Paa"], 1.0, PressureReference::Absolute),
    pressure(
        &["kPa", "kPa abs", "kPaa"],
        1e3,
        PressureReference::Absolute,
    ),
    pressure(
        &["MPa", "MPa abs", "MPaa"],
        1e6,
        PressureReference::Absolute,
    ),
    pressure(&["Pag", "Pa g"], 1.0, PressureReference::Gauge),
    pressure(&["kPag", "kPa g", "kPa(g)"], 1e3, PressureReference::Gauge),
    pressure(&["MPag", "MPa g", "MPa(g)"], 1e6, PressureReference::Gauge),
    pressure(
        &["psia", "psi a", "psi(a)"],
        PSI_PA,
        PressureReference::Absolute,
    ),
    pressure(
        &["psig", "psi g", "psi(g)"],
        PSI_PA,
        PressureReference::Gauge,
    ),
    pressure(&["psi"], PSI_PA, PressureReference::BareGauge),
    pressure(
        &["bara", "bar a", "bar(a)"],
        1e5,
        PressureReference::Absolute,
    ),
    pressure(&["barg", "bar g", "bar(g)"], 1e5, PressureReference::Gauge),
    pressure(&["bar"], 1e5, PressureReference::BareGauge),
    pressure(
        &["atm"],
        STANDARD_ATMOSPHERE_PA,
        PressureReference::Absolute,
    ),
    row(&["kg"], Kind::Mass, 1.0),
    row(&["g"], Kind::Mass, 1e-3),
    row(&["mg"], Kind::Mass, 1e-6),
    row(&["lb", "lbm", "lbs"], Kind::Mass, POUND_KG),
    row(&["oz"], Kind::Mass, OUNCE_KG),
    row(&["N"], Kind::Force, 1.0),
    row(&["mN"], Kind::Force, 1e-3),
    row(&["kN"], Kind::Force, 1e3),
    row(&["lbf"], Kind::Force, POUND_FORCE_N),
    row(&["ozf"], Kind::Force, OUNCE_FORCE_N),
    row(&["N m", "Nm", "N·m", "N*m", "N-m"], Kind::Torque, 1.0),
    row(&["mN m", "mNm", "mN·m", "mN*m"], Kind::Torque, 1e-3),
    row(&["N mm", "Nmm", "N·mm", "N*mm"], Kind::Torque, 1e-3),
    row(
        &["lbf in", "lbf·in", "lbf*in", "in lbf", "in·lbf", "lbf-in"],
        Kind::Torque,
        POUND_FORCE_N * INCH_M,
    ),
    row(
        &["lbf ft", "lbf·ft", "lbf*ft", "ft lbf", "ft·lbf", "lbf-ft"],
        Kind::Torque,
        POUND_FORCE_N * FOOT_M,
    ),
    row(
        &[
            "ozf in", "ozf·in", "ozf*in", "in ozf", "in·ozf", "ozf-in", "oz in", "oz·in",
        ],
        Kind::Torque,
        OUNCE_FORCE_N * INCH_M,
    ),
    UnitRow {
        names: &["K"],
        kind: Kind::Temperature,
        scale: 1.0,
        offset: 0.0,
        reference: None,
    },
    UnitRow {
        names: &["C", "°C", "degC", "deg C"],
        kind: Kind::Temperature,
        scale: 1.0,
        offset: 273.15,
        reference: None,
    },
    UnitRow {
        names: &["F", "°F", "degF", "deg F"],
        kind: Kind::Temperature,
        scale: 5.0 / 9.0,
        offset: 459.67 * 5.0 / 9.0,
        reference: None,
    },
    UnitRow {
        names: &["R", "degR"],
        kind: Kind::Temperature,
        scale: 5.0 / 9.0,
        offset: 0.0,
        reference: None,
    },
    row(&["deg", "°", "degree", "degrees"], Kind::Angle, DEG),
    row(&["rad", "radian", "radians"], Kind::Angle, 1.0),
    row(&["s", "sec"], Kind::Time, 1.0),
    row(&["ms"], Kind::Time, 1e-3),
    row(&["us", "µs"], Kind::Time, 1e-6),
    row(&["min"], Kind::Time, 60.0),
    row(&["h", "hour", "hours"], Kind::Time, 3600.0),
    row(&["rad/s"], Kind::AngularRate, 1.0),
    row(&["deg/s", "°/s"], Kind::AngularRate, DEG),
    row(&["rpm", "rev/min"], Kind::AngularRate, RPM),
    row(
        &["rps", "rev/s", "Hz"],
        Kind::AngularRate,
        std::f64::consts::TAU,
    ),
    row(
        &["rad/s^2", "rad/s2", "rad/s²"],
        Kind::AngularAcceleration,
        1.0,
    ),
    row(
        &["deg/s^2", "deg/s2", "deg/s²", "°/s^2", "°/s2", "°/s²"],
        Kind::AngularAcceleration,
        DEG,
    ),
    row(&["rpm/s"], Kind::AngularAcceleration, RPM),
    row(&["kg/s"], Kind::MassFlow, 1.0),
    row(&["g/s"], Kind::MassFlow, 1e-3),
    row(&["kg/h"], Kind::MassFlow, 1.0 / 3600.0),
    row(&["lb/s", "lbm/s"], Kind::MassFlow, POUND_KG),
    row(&["A"], Kind::Current, 1.0),
    row(&["mA"], Kind::Current, 1e-3),
    row(
        &["kg m2", "kg m^2", "kg·m²", "kg·m2", "kg*m^2"],
        Kind::Inertia,
        1.0,
    ),
    row(&["g cm2", "g cm^2", "g·cm²", "g*cm^2"], Kind::Inertia, 1e-7),
    row(
        &["lb in2", "lb in^2", "lb·in²", "lbm in^2"],
        Kind::Inertia,
        POUND_KG * INCH_M * INCH_M,
    ),
    row(
        &["oz in2", "oz in^2", "oz·in²"],
        Kind::Inertia,
        OUNCE_KG * INCH_M * INCH_M,
    ),
];

fn kind_name(kind: Kind) -> &'static str {
    match kind {
        Kind::Length => "length",
        Kind::Area => "area",
        Kind::Volume => "volume",
        Kind::Pressure => "pressure",
        Kind::Mass => "mass",
        Kind::Force => "force",
        Kind::Torque => "torque",
        Kind::Temperature => "temperature",
        Kind::Angle => "angle",
        Kind::Time => "time",
        Kind::AngularRate => "angular rate",
        Kind::AngularAcceleration => "angular acceleration",
        Kind::MassFlow => "mass flow",
        Kind::Current => "current",
        Kind::Inertia => "moment of inertia",
    }
}

fn lookup(unit: &str) -> Option<&'static UnitRow> {
    UNITS.iter().find(|r| r.names.contains(&unit))
}

fn parse_row(text: &str, expected: Kind) -> Result<(f64, &'static UnitRow), UnitError> {
    if text.len() > MAX_QUANTITY_LEN {
        return Err(UnitError::TooLong {
            expected,
            length: text.chars().count(),
        });
    }
    let (value, unit, _) = split_number(text).ok_or_else(|| UnitError::NoNumber {
        expected,
        text: text.to_string(),
    })?;
    if !value.is_finite() {
        return Err(UnitError::NotFinite {
            expected,
            text: text.to_string(),
        });
    }
    if unit.is_empty() {
        return Err(UnitError::NoUnit {
            expected,
            text: text.to_string(),
        });
    }
    let row = lookup(&unit).ok_or_else(|| UnitError::UnknownUnit {
        expected,
        text: text.to_string(),
        unit: unit.clone(),
    })?;
    if row.kind != expected {
        return Err(UnitError::WrongKind {
            expected,
            text: text.to_string(),
            unit,
            found_kind: kind_name(row.kind),
        });
    }
    Ok((value, row))
}

/// Parse a quantity of the given kind into SI. For pressures use [`parse_pressure`].
pub fn parse(text: &str, expected: Kind) -> Result<f64, UnitError> {
    let (value, row) = parse_row(text, expected)?;
    within_range(value * row.scale + row.offset, text, expected)
}

fn within_range(v: f64, text: &str, expected: Kind) -> Result<f64, UnitError> {
    let (largest, words) = expected.largest();
    if v.is_finite() && v.abs() <= largest {
        Ok(v)
    } else {
        Err(UnitError::OutOfRange {
            expected,
            text: text.to_string(),
            largest: words,
        })
    }
}

/// Parse a pressure, keeping whether it was gauge or absolute.
pub fn parse_pressure(text: &str) -> Result<PressureValue, UnitError> {
    let (value, row) = parse_row(text, Kind::Pressure)?;
    Ok(PressureValue {
        pa: within_range(value * row.scale, text, Kind::Pressure)?,
        reference: row.reference.unwrap_or(PressureReference::Absolute),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    // Conversion factors: NIST Special Publication 811 (2008), Appendix B.8/B.9:
    // 1 in = 0.0254 m (exact), 1 lb = 0.45359237 kg (exact), 1 lbf = 4.448222 N,
    // 1 psi = 6894.757 Pa, 1 in3 = 1.6387064e-5 m3 (exact), 1 ozf·in = 7.061552e-3 N·m,
    // 1 lbf·in = 0.1129848 N·m. Relative tolerance 1e-6 matches the 7 figures quoted there.
    #[test]
    fn conversions_match_nist_sp811() {
        let tol = 1e-6;
        assert_relative_eq!(
            parse("2.1 in", Kind::Length).unwrap(),
            0.05334,
            max_relative = tol
        );
        assert_relative_eq!(
            parse("54 mm", Kind::Length).unwrap(),
            0.054,
            max_relative = tol
        );
        assert_relative_eq!(
            parse("13 in3", Kind::Volume).unwrap(),
            13.0 * 1.638_706_4e-5,
            max_relative = tol
        );
        assert_relative_eq!(
            parse("0.25 L", Kind::Volume).unwrap(),
            2.5e-4,
            max_relative = tol
        );
        assert_relative_eq!(
            parse("1 lbf", Kind::Force).unwrap(),
            4.448_222,
            max_relative = tol
        );
        assert_relative_eq!(
            parse("1 lbf in", Kind::Torque).unwrap(),
            0.112_984_8,
            max_relative = tol
        );
        assert_relative_eq!(
            parse("1 ozf in", Kind::Torque).unwrap(),
            7.061_552e-3,
            max_relative = tol
        );
        assert_relative_eq!(
            parse("180 g", Kind::Mass).unwrap(),
            0.18,
            max_relative = tol
        );
        assert_relative_eq!(
            parse("1 oz", Kind::Mass).unwrap(),
            0.028_349_52,
            max_relative = tol
        );
        let p = parse_pressure("150 psig").unwrap();
        assert_relative_eq!(p.pa, 150.0 * 6_894.757, max_relative = tol);
        assert_eq!(p.reference, PressureReference::Gauge);
    }

    #[test]
    fn temperatures_and_angles() {
        assert_relative_eq!(
            parse("20 C", Kind::Temperature).unwrap(),
            293.15,
            epsilon = 1e-9
        );
        assert_relative_eq!(
            parse("68 F", Kind::Temperature).unwrap(),
            293.15,
            epsilon = 1e-9
        );
        assert_relative_eq!(
            parse("-40 C", Kind::Temperature).unwrap(),
            parse("-40 F", Kind::Temperature).unwrap(),
            epsilon = 1e-9
        );
        assert_relative_eq!(
            parse("12 deg", Kind::Angle).unwrap(),
            12f64.to_radians(),
            epsilon = 1e-15
        );
        assert_relative_eq!(
            parse("30 deg/s^2", Kind::AngularAcceleration).unwrap(),
            30f64.to_radians(),
            epsilon = 1e-15
        );
    }

    #[test]
    fn gauge_and_absolute_are_kept_apart() {
        assert_eq!(
            parse_pressure("10 bar").unwrap().reference,
            PressureReference::BareGauge
        );
        assert_eq!(
            parse_pressure("10 bara").unwrap().reference,
            PressureReference::Absolute
        );
        assert_eq!(
            parse_pressure("1.2 MPa").unwrap().reference,
            PressureReference::Absolute
        );
        let g = parse_pressure("1 barg").unwrap();
        assert_relative_eq!(
            g.absolute_pa(STANDARD_ATMOSPHERE_PA),
            201_325.0,
            epsilon = 1e-9
        );
        // "mPa" is a millipascal, not a megapascal: not in the table, so it is refused.
        assert!(parse_pressure("3 mPa").is_err());
    }

    #[test]
    fn bad_text_is_refused_with_reason() {
        assert!(matches!(
            parse("12 kg", Kind::Length),
            Err(UnitError::WrongKind { .. })
        ));
        assert!(matches!(
            parse("12", Kind::Length),
            Err(UnitError::NoUnit { .. })
        ));
        assert!(matches!(
            parse("mm", Kind::Length),
            Err(UnitError::NoNumber { .. })
        ));
        assert!(matches!(
            parse("12 furlong", Kind::Length),
            Err(UnitError::UnknownUnit { .. })
        ));
        assert!(matches!(
            parse("NaN mm", Kind::Length),
            Err(UnitError::NotFinite { .. })
        ));
        assert!(matches!(
            parse("inf mm", Kind::Length),
            Err(UnitError::NotFinite { .. })
        ));
        assert!(matches!(
            parse("1e400 mm", Kind::Length),
            Err(UnitError::NotFinite { .. })
        ));
        let msg = parse("2 kg", Kind::Length).unwrap_err().to_string();
        assert!(msg.contains("expected a length such as \"54 mm\""), "{msg}");
        assert!(msg.contains("\"2 kg\""), "{msg}");
    }

    proptest::proptest! {
        #[test]
        fn parsing_never_panics(s in "\\PC{0,24}") {
            let _ = parse(&s, Kind::Length);
            let _ = parse_pressure(&s);
        }

        #[test]
        fn round_trip_lengths(v in -1e6f64..1e6) {
            let text = format!("{v} mm");
            let got = parse(&text, Kind::Length).unwrap();
            proptest::prop_assert!((got - v * 1e-3).abs() <= 1e-12 * v.abs().max(1.0));
        }
    }

    #[test]
    fn messages_never_show_nan_infinity_or_negative_zero() {
        assert_eq!(shown_number(1.5), "1.5");
        assert_eq!(shown_number(0.1 + 0.2), "0.3");
        assert_eq!(shown_number(-0.0), "0");
        assert_eq!(shown_number(1e300), "1.00000e300");
        assert_eq!(shown_number(f64::NAN), "a value that is not a number");
        assert_eq!(shown_number(f64::NEG_INFINITY), "an infinite value");
        assert_eq!(signed(-0.0001, 2), "0.00");
        assert_eq!(signed(-0.006, 2), "-0.01");
        assert_eq!(signed(2.0, 1), "+2.0");
        assert_eq!(shown("54 mm"), "54 mm");
        let long = "x".repeat(1000);
        assert!(shown(&long).ends_with("(1000 characters)"));
        assert!(shown(&long).len() < 80);
    }

    #[test]
    fn quantities_are_bounded_in_size_and_length() {
        assert!(matches!(
            parse("1e200 mm", Kind::Length),
            Err(UnitError::OutOfRange {
                largest: "100 km",
                ..
            })
        ));
        assert!(matches!(
            parse("1e300 s", Kind::Time),
            Err(UnitError::OutOfRange { .. })
        ));
        assert!(matches!(
            parse_pressure("1e9 psig"),
            Err(UnitError::OutOfRange { .. })
        ));
        assert_eq!(parse("86400 s", Kind::Time), Ok(86_400.0));
        let long = format!("{} mm", "1".repeat(200));
        assert_eq!(
            parse(&long, Kind::Length),
            Err(UnitError::TooLong {
                expected: Kind::Length,
                length: 203
            })
        );
    }
}
