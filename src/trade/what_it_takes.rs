//! "What would it take": for one part property at a time, the least value that
//! meets every requirement with every other part fixed, found on the real model.
//!
//! The property is swept over a range around its value in the chosen
//! combination (geometric steps, [`WhatSettings::scan_points`] of them): the
//! sweep gives the curve of worst margin against the property, and the first
//! step where the requirement slack (see `evaluate::Metrics::slack`) turns
//! from negative to non-negative brackets the answer, which bisection then
//! narrows to a relative [`WhatSettings::relative_tolerance`]. A value where the
//! model cannot be solved counts as not meeting the requirements. The answer is
//! the least value on the sweep's first crossing: when the slack is not
//! monotone in the property, a later crossing is not looked for.
//!
//! The fixed combination is the lightest one meeting every requirement, else the
//! accepted one with the largest slack. The rules are not part of the
//! requirement: the answer says which rules the value would break (a higher set
//! pressure than the valve is rated for, say).

use super::catalogue::Catalogue;
use super::combine::{self, Choice};
use super::evaluate::{self, HoldTime};
use super::rules::{self, Breach};
use crate::model::Design;
use serde::Serialize;

/// A property of the fixed combination that can be varied.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(tag = "kind", content = "group", rename_all = "snake_case")]
pub enum Property {
    /// The valve's flow coefficient Cv.
    ValveCv,
    /// The working stage's set pressure (gauge).
    SetPressure,
    /// The tank's internal volume.
    TankVolume,
    /// The hole (or throat) diameter of a hole group, by index.
    Hole(usize),
}

/// How the sweeps and the root finding run.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct WhatSettings {
    /// Points of the sweep (geometric steps over the range).
    pub scan_points: usize,
    /// Bisection stops when the bracket is narrower than this fraction of its upper end.
    pub relative_tolerance: f64,
    /// Range of the sweep: from the value over this factor to the value times it.
    pub range_factor: f64,
}

impl Default for WhatSettings {
    /// 17 points over a factor of 4 either side, bisected to 1e-4: finer than
    /// any catalogue step and than the tolerance a part is made to.
    fn default() -> Self {
        WhatSettings {
            scan_points: 17,
            relative_tolerance: 1e-4,
            range_factor: 4.0,
        }
    }
}

/// One point of a sweep.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SweepPoint {
    /// Property value, SI (Cv is plain; set pressure Pa gauge; volume m³; diameter m).
    pub value: f64,
    /// Worst margin there; `None` when the model could not be solved or nothing is required.
    pub worst_margin: Option<f64>,
    /// Requirement slack there; `None` when the model could not be solved.
    pub slack: Option<f64>,
}

/// The answer for one property.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "status", rename_all = "snake_case")]
pub enum Least {
    /// The least value meeting every requirement, and the rules it would break.
    Found {
        /// Value, SI.
        value: f64,
        /// The rules broken at that value (with the other parts fixed).
        breaks: Vec<Breach>,
    },
    /// Every requirement is met already at the low end of the sweep.
    BelowRange {
        /// The low end, SI.
        low: f64,
    },
    /// No value of the sweep meets every requirement.
    AboveRange {
        /// The high end, SI.
        high: f64,
    },
}

/// One property's sweep and answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WhatItTakes {
    /// Which property.
    pub property: Property,
    /// The property in words, e.g. "valve Cv" or "hole size of `pitch-yaw`".
    pub label: String,
    /// Unit the report shows it in ("", "psig", "in3", "mm").
    pub unit: &'static str,
    /// Factor from SI to that unit.
    pub unit_scale: f64,
    /// The value in the fixed combination, SI.
    pub current: f64,
    /// The sweep, ascending.
    pub sweep: Vec<SweepPoint>,
    /// The answer.
    pub least: Least,
    /// Model evaluations spent.
    pub evaluations: usize,
}

/// The properties that can be varied for a catalogue.
pub fn properties(cat: &Catalogue) -> Vec<Property> {
    let mut p = vec![
        Property::ValveCv,
        Property::SetPressure,
        Property::TankVolume,
    ];
    p.extend((0..cat.holes.len()).map(Property::Hole));
    p
}

fn label(cat: &Catalogue, p: Property) -> (String, &'static str, f64) {
    match p {
        Property::ValveCv => ("valve Cv".to_string(), "", 1.0),
        Property::SetPressure => ("set pressure".to_string(), "psig", 1.0 / 6_894.757_293_168),
        Property::TankVolume => ("tank volume".to_string(), "in3", 1.0 / 16.387_064e-6),
        Property::Hole(g) => (format!("hole size of `{}`", cat.holes[g].name), "mm", 1e3),
    }
}

/// The property's value in a combination, SI.
pub fn value(cat: &Catalogue, choice: &Choice, p: Property) -> f64 {
    match p {
        Property::ValveCv => cat.valves[choice.valve].cv,
        Property::SetPressure => cat.set_pressures_gauge_pa[choice.set_pressure],
        Property::TankVolume => cat.tanks[choice.tank].volume_m3,
        Property::Hole(g) => cat.holes[g].diameters_m[choice.holes[g]],
    }
}

/// A copy of the catalogue with the chosen part's property set to `x`.
pub fn with_value(cat: &Catalogue, choice: &Choice, p: Property, x: f64) -> Catalogue {
    let mut c = cat.clone();
    match p {
        Property::ValveCv => c.valves[choice.valve].cv = x,
        Property::SetPressure => c.set_pressures_gauge_pa[choice.set_pressure] = x,
        Property::TankVolume => c.tanks[choice.tank].volume_m3 = x,
        Property::Hole(g) => c.holes[g].diameters_m[choice.holes[g]] = x,
    }
    c
}

/// Range swept for a property: a factor either side of the current value, kept
/// inside what the layout reader accepts, and for the set pressure below what
/// the tank can feed (fill pressure less the dropout margin).
fn range(base: &Design, cat: &Catalogue, choice: &Choice, p: Property, f: f64) -> (f64, f64) {
    let x = value(cat, choice, p);
    let (lo, hi) = (x / f, x * f);
    match p {
        Property::ValveCv => (lo.max(cat.bounds.min_cv), hi.min(cat.bounds.max_cv)),
        Property::SetPressure => {
            let d = combine::apply(base, cat, choice);
            let top = evaluate::pressures(&d).map_or(hi, |pr| {
                let r = &cat.regulators[choice.regulator];
                0.999 * (pr.tank_pa - pr.ground_ambient_pa - r.dropout_margin_pa)
            });
            (lo, hi.min(top).max(lo))
        }
        Property::TankVolume => (lo, hi),
        Property::Hole(_) => (lo.max(cat.bounds.min_diameter_m), hi),
    }
}

/// Requirement slack and worst margin with the property at `x` (rules ignored).
pub fn slack_at(
    base: &Design,
    cat: &Catalogue,
    choice: &Choice,
    p: Property,
    x: f64,
    hold: Option<&dyn HoldTime>,
) -> Option<(f64, Option<f64>)> {
    let c = with_value(cat, choice, p, x);
    let d = combine::apply(base, &c, choice);
    let pressures = evaluate::pressures(&d).ok()?;
    let a = crate::analysis::analyze(&d).ok()?;
    let m = evaluate::metrics(&d, &a, 0.0, 0.0, 0.0, pressures.tank_pa, hold);
    Some((m.slack, m.worst_margin))
}

/// Sweep one property and find its least value.
pub fn what_it_takes(
    base: &Design,
    cat: &Catalogue,
    choice: &Choice,
    p: Property,
    settings: &WhatSettings,
    hold: Option<&dyn HoldTime>,
) -> WhatItTakes {
    let (name, unit, unit_scale) = label(cat, p);
    let (lo, hi) = range(base, cat, choice, p, settings.range_factor.max(1.0 + 1e-6));
    let n = settings.scan_points.max(2);
    let values: Vec<f64> = (0..n)
        .map(|k| lo * (hi / lo).powf(k as f64 / (n - 1) as f64))
        .collect();
    let sweep: Vec<SweepPoint> = {
        use rayon::prelude::*;
        values
            .par_iter()
            .map(|&x| {
                let r = slack_at(base, cat, choice, p, x, hold);
                SweepPoint {
                    value: x,
                    worst_margin: r.and_then(|r| r.1),
                    slack: r.map(|r| r.0),
                }
            })
            .collect()
    };
    let mut evaluations = sweep.len();
    let meets = |s: &SweepPoint| s.slack.is_some_and(|v| v >= 0.0);
    let least = match sweep.iter().position(meets) {
        Some(0) => Least::BelowRange { low: lo },
        None => Least::AboveRange { high: hi },
        Some(k) => {
            let (mut a, mut b) = (sweep[k - 1].value, sweep[k].value);
            while b - a > settings.relative_tolerance * b {
                let m = 0.5 * (a + b);
                evaluations += 1;
                if slack_at(base, cat, choice, p, m, hold).is_some_and(|r| r.0 >= 0.0) {
                    b = m;
                } else {
                    a = m;
                }
            }
            let c = with_value(cat, choice, p, b);
            let d = combine::apply(base, &c, choice);
            let breaks = evaluate::pressures(&d)
                .map(|pr| rules::check(&d, &c, choice, &pr))
                .unwrap_or_default();
            Least::Found { value: b, breaks }
        }
    };
    WhatItTakes {
        property: p,
        label: name,
        unit,
        unit_scale,
        current: value(cat, choice, p),
        sweep,
        least,
        evaluations,
    }
}
