//! The optional `[ground]` section: supply bottles (`[[ground.bottle]]`), the flight tank's
//! rated and relief pressures, pad temperatures, the leak behind the arming valve
//! (`[ground.leak]`), pad time and arming delay. Read typed from the layout text (a wrong
//! type or unknown field comes back with its place) and handed to [`crate::ground`] as SI data.
//!
//! Gauge pressures are referred to the sea-level standard atmosphere (the ground).

use super::{line_column, Diagnostic};
use crate::ground::fill::Bottle;
use crate::ground::pad::LeakRate;
use crate::ground::spec::GroundSpec;
use crate::units::{self, Kind, STANDARD_ATMOSPHERE_PA};
use serde::Deserialize;
use std::ops::Range;
use toml::Spanned;

type Q = Spanned<String>;

#[derive(Debug, Deserialize)]
struct Raw {
    ground: Option<Spanned<GroundFile>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct GroundFile {
    #[serde(default)]
    bottle: Vec<Spanned<BottleFile>>,
    start_pressure: Option<Q>,
    rated_pressure: Option<Q>,
    relief_pressure: Option<Q>,
    pad_temperatures: Option<Spanned<Vec<Q>>>,
    leak: Option<Spanned<LeakFile>>,
    pad_time: Option<Q>,
    arming_delay: Option<Q>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct BottleFile {
    volume: Q,
    pressure: Q,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct LeakFile {
    standard_volume: Option<Q>,
    pressure_drop: Option<Q>,
    over: Q,
}

struct Reader<'a> {
    text: &'a str,
    problems: Vec<Diagnostic>,
}

impl Reader<'_> {
    fn problem(&mut self, span: Range<usize>, field: &str, message: impl Into<String>) {
        let (line, column) = line_column(self.text, span.start);
        self.problems.push(Diagnostic {
            line,
            column,
            field: field.to_string(),
            message: message.into(),
        });
    }

    /// A quantity of `kind`, above zero when `strict`, else zero or more.
    fn qty(&mut self, q: &Q, field: &str, kind: Kind, strict: bool) -> Option<f64> {
        match units::parse(q.get_ref(), kind) {
            Ok(v) if v.is_finite() && (v > 0.0 || (!strict && v == 0.0)) => Some(v),
            Ok(_) => {
                let what = if strict { "above zero" } else { "zero or more" };
                self.problem(
                    q.span(),
                    field,
                    format!("expected a value {what}, found \"{}\"", q.get_ref()),
                );
                None
            }
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                None
            }
        }
    }

    /// An absolute pressure above zero (gauge readings referred to 1 atm).
    fn pressure(&mut self, q: &Q, field: &str) -> Option<f64> {
        match units::parse_pressure(q.get_ref()) {
            Ok(p) => {
                let abs = p.absolute_pa(STANDARD_ATMOSPHERE_PA);
                if abs.is_finite() && abs > 0.0 {
                    Some(abs)
                } else {
                    self.problem(
                        q.span(),
                        field,
                        format!(
                            "expected a pressure above vacuum, found \"{}\" (gauge values are above 1 atm)",
                            q.get_ref()
                        ),
                    );
                    None
                }
            }
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                None
            }
        }
    }

    /// A pressure difference above zero: gauge and absolute mean the same.
    fn difference(&mut self, q: &Q, field: &str) -> Option<f64> {
        match units::parse_pressure(q.get_ref()) {
            Ok(p) if p.pa.is_finite() && p.pa > 0.0 => Some(p.pa),
            Ok(_) => {
                self.problem(
                    q.span(),
                    field,
                    format!(
                        "expected a pressure drop above zero, found \"{}\"",
                        q.get_ref()
                    ),
                );
                None
            }
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                None
            }
        }
    }

    fn temperature(&mut self, q: &Q, field: &str) -> Option<f64> {
        match units::parse(q.get_ref(), Kind::Temperature) {
            Ok(v) if v.is_finite() && v > 0.0 => Some(v),
            Ok(_) => {
                self.problem(
                    q.span(),
                    field,
                    format!("\"{}\" is at or below absolute zero", q.get_ref()),
                );
                None
            }
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                None
            }
        }
    }
}

/// The `[ground]` section of `text`, if any. `tank_fill_pressure_pa` (absolute) is the
/// flight tank's fill pressure, against which the rated and relief pressures are checked.
pub fn read(text: &str, tank_fill_pressure_pa: f64) -> Result<Option<GroundSpec>, Vec<Diagnostic>> {
    let raw: Raw = match toml::from_str(text) {
        Ok(r) => r,
        Err(e) => {
            let (line, column) = e
                .span()
                .map(|s| line_column(text, s.start))
                .unwrap_or((1, 1));
            return Err(vec![Diagnostic {
                line,
                column,
                field: "ground".to_string(),
                message: e.message().to_string(),
            }]);
        }
    };
    let Some(g) = raw.ground else {
        return Ok(None);
    };
    let g_span = g.span();
    let g = g.into_inner();
    let mut r = Reader {
        text,
        problems: Vec::new(),
    };
    let mut bottles = Vec::new();
    for (i, b) in g.bottle.iter().enumerate() {
        let b = b.get_ref();
        let field = format!("ground.bottle[{}]", i + 1);
        let v = r.qty(&b.volume, &format!("{field}.volume"), Kind::Volume, true);
        let p = r.pressure(&b.pressure, &format!("{field}.pressure"));
        if let (Some(volume_m3), Some(pressure_pa)) = (v, p) {
            bottles.push(Bottle {
                volume_m3,
                pressure_pa,
            });
        }
    }
    let start_pressure_pa = match &g.start_pressure {
        Some(q) => r.pressure(q, "ground.start_pressure"),
        None => Some(STANDARD_ATMOSPHERE_PA),
    };
    if let (Some(p0), Some(q)) = (start_pressure_pa, &g.start_pressure) {
        if p0 >= tank_fill_pressure_pa {
            r.problem(
                q.span(),
                "ground.start_pressure",
                format!(
                    "the tank before the fill must be below its fill pressure ({:.2} bara), found \"{}\"",
                    tank_fill_pressure_pa / 1e5,
                    q.get_ref()
                ),
            );
        }
    }
    let rated = g
        .rated_pressure
        .as_ref()
        .and_then(|q| r.pressure(q, "ground.rated_pressure").map(|p| (p, q)));
    let relief = g
        .relief_pressure
        .as_ref()
        .and_then(|q| r.pressure(q, "ground.relief_pressure").map(|p| (p, q)));
    if let (Some((rp, _)), Some((xp, q))) = (rated, relief) {
        if xp < rp {
            r.problem(
                q.span(),
                "ground.relief_pressure",
                format!(
                    "a relief setting below the rated working pressure ({:.2} bara) is not a relief setting, found \"{}\"",
                    rp / 1e5,
                    q.get_ref()
                ),
            );
        }
    }
    let mut pad_temperatures_k = Vec::new();
    if let Some(list) = &g.pad_temperatures {
        if list.get_ref().is_empty() {
            r.problem(
                list.span(),
                "ground.pad_temperatures",
                "expected at least one temperature such as \"45 C\"",
            );
        }
        for q in list.get_ref() {
            if let Some(t) = r.temperature(q, "ground.pad_temperatures") {
                pad_temperatures_k.push(t);
            }
        }
        if rated.is_none() && g.rated_pressure.is_none() {
            r.problem(
                list.span(),
                "ground.pad_temperatures",
                "pad temperatures are checked against the tank's rated working pressure: give ground.rated_pressure",
            );
        }
    }
    let leak = g.leak.as_ref().and_then(|l| {
        let span = l.span();
        let l = l.get_ref();
        let over = r.qty(&l.over, "ground.leak.over", Kind::Time, true);
        match (&l.standard_volume, &l.pressure_drop) {
            (Some(v), None) => {
                let v = r.qty(v, "ground.leak.standard_volume", Kind::Volume, false)?;
                Some(LeakRate::StandardFlow {
                    standard_m3_s: v / over?,
                })
            }
            (None, Some(d)) => {
                let drop_pa = r.difference(d, "ground.leak.pressure_drop")?;
                if drop_pa >= tank_fill_pressure_pa {
                    r.problem(
                        d.span(),
                        "ground.leak.pressure_drop",
                        format!(
                            "the drop must be less than the fill pressure ({:.2} bara), found \"{}\"",
                            tank_fill_pressure_pa / 1e5,
                            d.get_ref()
                        ),
                    );
                    return None;
                }
                Some(LeakRate::PressureDrop {
                    drop_pa,
                    over_s: over?,
                })
            }
            _ => {
                r.problem(
                    span,
                    "ground.leak",
                    "give exactly one of standard_volume (gas at 0 °C and 101.325 kPa, e.g. \"20 mL\") or pressure_drop (e.g. \"2 bar\"), with over (the time it took)",
                );
                None
            }
        }
    });
    let pad_time_s = match &g.pad_time {
        Some(q) => r.qty(q, "ground.pad_time", Kind::Time, false),
        None => Some(0.0),
    };
    let arming_delay_s = match &g.arming_delay {
        Some(q) => r.qty(q, "ground.arming_delay", Kind::Time, false),
        None => Some(0.0),
    };
    if g.bottle.is_empty()
        && g.pad_temperatures.is_none()
        && g.leak.is_none()
        && g.pad_time.is_none()
    {
        r.problem(
            g_span,
            "ground",
            "an empty [ground] section: give [[ground.bottle]] entries, pad_temperatures, a [ground.leak] or a pad_time",
        );
    }
    if !r.problems.is_empty() {
        return Err(r.problems);
    }
    Ok(Some(GroundSpec {
        bottles,
        start_pressure_pa: start_pressure_pa.unwrap_or(STANDARD_ATMOSPHERE_PA),
        rated_pressure_pa: rated.map(|x| x.0),
        relief_pressure_pa: relief.map(|x| x.0),
        pad_temperatures_k,
        leak,
        pad_time_s: pad_time_s.unwrap_or(0.0),
        arming_delay_s: arming_delay_s.unwrap_or(0.0),
    }))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::layout::parse_layout;

    /// A CO2 demo layout with no `[ground]` section of its own.
    const DEMO: &str = include_str!("../../layouts/osprey-98.toml");

    fn with(section: &str) -> String {
        format!("{DEMO}\n{section}\n")
    }

    /// The line of `needle` in the layout with `section` added, from 1.
    fn line_of(text: &str, needle: &str) -> usize {
        let at = text.find(needle).expect("needle in text");
        text[..at].lines().count() + usize::from(text[..at].ends_with('\n'))
    }

    fn problems(section: &str) -> (String, Vec<Diagnostic>) {
        let text = with(section);
        let e = parse_layout(&text, "t.toml").expect_err("the layout must be refused");
        (text, e.problems().to_vec())
    }

    #[test]
    fn section_is_read_in_si() {
        let text = with(
            "[ground]\nrated_pressure = \"100 barg\"\nrelief_pressure = \"120 bara\"\npad_temperatures = [\"-5 C\", \"45 C\"]\npad_time = \"2 h\"\narming_delay = \"40 ms\"\n[ground.leak]\nstandard_volume = \"30 mL\"\nover = \"1 h\"\n[[ground.bottle]]\nvolume = \"2 L\"\npressure = \"200 barg\"\n",
        );
        let d = parse_layout(&text, "t.toml").unwrap().design;
        let g = d.ground.expect("a [ground] section");
        // Gauge pressures are above the 101 325 Pa standard atmosphere.
        assert_eq!(g.rated_pressure_pa, Some(100e5 + 101_325.0));
        assert_eq!(g.relief_pressure_pa, Some(120e5));
        assert_eq!(g.pad_temperatures_k, vec![268.15, 318.15]);
        assert_eq!(g.pad_time_s, 7200.0);
        assert!((g.arming_delay_s - 0.04).abs() < 1e-15);
        assert_eq!(g.start_pressure_pa, 101_325.0);
        match g.leak {
            Some(LeakRate::StandardFlow { standard_m3_s }) => {
                assert!((standard_m3_s - 30e-6 / 3600.0).abs() < 1e-18)
            }
            other => panic!("{other:?}"),
        }
        assert_eq!(g.bottles.len(), 1);
        assert!((g.bottles[0].volume_m3 - 2e-3).abs() < 1e-15);
        assert_eq!(g.bottles[0].pressure_pa, 200e5 + 101_325.0);
        // No section: none.
        assert!(parse_layout(DEMO, "t.toml")
            .unwrap()
            .design
            .ground
            .is_none());
    }

    #[test]
    fn a_bad_quantity_is_located_with_its_field() {
        let (text, p) = problems("[ground]\npad_time = \"2 kg\"\n");
        assert_eq!(p.len(), 1, "{p:?}");
        assert_eq!(p[0].field, "ground.pad_time");
        assert_eq!(p[0].line, line_of(&text, "pad_time = \"2 kg\""));
        assert_eq!(p[0].column, 12);
    }

    #[test]
    fn a_zero_bottle_volume_is_refused_at_the_bottle() {
        let (text, p) =
            problems("[ground]\n[[ground.bottle]]\nvolume = \"0 L\"\npressure = \"200 barg\"\n");
        assert_eq!(p.len(), 1, "{p:?}");
        assert_eq!(p[0].field, "ground.bottle[1].volume");
        assert_eq!(p[0].line, line_of(&text, "volume = \"0 L\""));
        assert!(p[0].message.contains("above zero"), "{}", p[0].message);
    }

    #[test]
    fn relief_below_rating_is_refused() {
        let (text, p) = problems(
            "[ground]\nrated_pressure = \"100 barg\"\nrelief_pressure = \"90 barg\"\npad_temperatures = [\"45 C\"]\n",
        );
        assert_eq!(p.len(), 1, "{p:?}");
        assert_eq!(p[0].field, "ground.relief_pressure");
        assert_eq!(p[0].line, line_of(&text, "relief_pressure"));
    }

    #[test]
    fn pad_temperatures_need_a_rating() {
        let (_, p) = problems("[ground]\npad_temperatures = [\"45 C\"]\n");
        assert_eq!(p.len(), 1, "{p:?}");
        assert_eq!(p[0].field, "ground.pad_temperatures");
        assert!(p[0].message.contains("rated_pressure"));
    }

    #[test]
    fn a_leak_needs_exactly_one_measure() {
        let (_, p) = problems(
            "[ground]\n[ground.leak]\nstandard_volume = \"30 mL\"\npressure_drop = \"1 bar\"\nover = \"1 h\"\n",
        );
        assert_eq!(p.len(), 1, "{p:?}");
        assert_eq!(p[0].field, "ground.leak");
        let (_, p) =
            problems("[ground]\n[ground.leak]\npressure_drop = \"0 bar\"\nover = \"1 h\"\n");
        assert_eq!(p[0].field, "ground.leak.pressure_drop");
    }

    #[test]
    fn an_unknown_field_is_located() {
        let (text, p) = problems("[ground]\npad_time = \"1 h\"\nrating = \"100 barg\"\n");
        assert_eq!(p.len(), 1, "{p:?}");
        assert_eq!(p[0].line, line_of(&text, "rating = "));
        assert!(p[0].message.contains("rating"), "{}", p[0].message);
    }

    #[test]
    fn an_empty_section_is_refused() {
        let (_, p) = problems("[ground]\narming_delay = \"40 ms\"\n");
        assert_eq!(p.len(), 1, "{p:?}");
        assert_eq!(p[0].field, "ground");
    }
}
