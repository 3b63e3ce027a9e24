//! Evaluate one combination: build its design, check the rules, run the real
//! analysis (`analysis::analyze`: every flight state's margins, the gas budget
//! and the manoeuvre list) and reduce it to the figures the study ranks.
//!
//! Hold time belongs to the closed-loop simulation; [`HoldTime`] is the slot a
//! simulation plugs into. Without one the figure is "not computed" and takes no
//! part in the ranking or the requirements.

use super::catalogue::Catalogue;
use super::combine::{self, Choice};
use super::rules::{self, Breach, Pressures, Rule};
use crate::analysis::{self, Analysis};
use crate::gas::tank;
use crate::model::{Design, FillSpec};
use serde::Serialize;

/// A source of hold time for a candidate design (the closed-loop simulation).
pub trait HoldTime: Send + Sync {
    /// How long the design holds attitude against the layout's disturbances, s,
    /// or `None` when it cannot be found for this design.
    fn hold_time_s(&self, design: &Design, analysis: &Analysis) -> Option<f64>;
}

/// What the report says when no hold-time source is given.
pub const HOLD_TIME_NOT_COMPUTED: &str =
    "not computed: `trade --hold-case NAME` flies one of the layout's [[case]] sections with each combination for its hold time";

/// The figures of an accepted combination.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Metrics {
    /// Smallest margin (available over required torque) over every flight state,
    /// axis and sense; `None` when nothing is required about any axis.
    pub worst_margin: Option<f64>,
    /// Where the worst margin is, e.g. "pitch at liftoff".
    pub worst_margin_at: String,
    /// Least gas for the layout's manoeuvre list, kg; `None` without a list.
    pub manoeuvre_gas_kg: Option<f64>,
    /// Usable gas after the reserve (adiabatic bound), kg; `None` without a list.
    pub available_gas_kg: Option<f64>,
    /// Hold time, s; `None` when not computed (see `hold_time_note`).
    pub hold_time_s: Option<f64>,
    /// Why the hold time is missing, when it is.
    pub hold_time_note: Option<String>,
    /// Mass of the parts plus the gas at fill: valves, regulator, empty tank, gas, kg.
    pub system_mass_kg: f64,
    /// Price of the parts: one valve per port, the regulator, the tank.
    pub price: f64,
    /// Coil current with every valve open at once, A.
    pub peak_coil_current_a: f64,
    /// Tank pressure at fill, Pa absolute.
    pub tank_pressure_pa: f64,
    /// Whether every requirement is met: every margin at least 1, the manoeuvre
    /// list fits the usable gas, and (when computed) the hold time reaches the
    /// layout's `hold_time`.
    pub meets_requirements: bool,
    /// The smallest relative slack over the requirements (≥ 0 when all are met):
    /// worst margin − 1, (usable − needed) / usable gas, (hold − wanted) / wanted.
    pub slack: f64,
}

/// Accepted with figures, or rejected with the rules it breaks.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "status", rename_all = "snake_case")]
pub enum Outcome {
    /// No rule broken; the figures.
    Accepted(Metrics),
    /// The rules broken.
    Rejected {
        /// Each broken rule.
        breaches: Vec<Breach>,
    },
}

/// One evaluated combination.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Evaluated {
    /// Number in catalogue order.
    pub index: u64,
    /// The parts.
    pub choice: Choice,
    /// The parts in words.
    pub parts: String,
    /// Figures or broken rules.
    pub outcome: Outcome,
}

impl Evaluated {
    /// The figures, when accepted.
    pub fn metrics(&self) -> Option<&Metrics> {
        match &self.outcome {
            Outcome::Accepted(m) => Some(m),
            Outcome::Rejected { .. } => None,
        }
    }
}

/// The pressures the rules compare for a design: tank pressure at fill and the
/// highest ambient of its flight states.
pub fn pressures(design: &Design) -> Result<Pressures, String> {
    let t = &design.feed.tank;
    let tank_pa = match t.fill {
        FillSpec::Pressure { pressure_pa } => pressure_pa,
        FillSpec::Mass { mass_kg } => {
            let fill = tank::TankFill::by_mass(
                design.feed.gas,
                t.volume_m3,
                mass_kg,
                t.fill_temperature_k,
            );
            tank::inventory(&fill)
                .map_err(|e| e.to_string())?
                .supply_pressure_pa
        }
    };
    let mut ground = 0.0f64;
    for s in &design.states {
        let a = crate::atmosphere::at_geometric_altitude(s.altitude_m)
            .map_err(|e| format!("state `{}`: {e}", s.name))?;
        ground = ground.max(a.pressure_pa);
    }
    Ok(Pressures {
        tank_pa,
        ground_ambient_pa: ground,
    })
}

/// The figures of a design that passed the rules, from its analysis.
pub fn metrics(
    design: &Design,
    analysis: &Analysis,
    parts_mass_kg: f64,
    price: f64,
    peak_coil_current_a: f64,
    tank_pressure_pa: f64,
    hold: Option<&dyn HoldTime>,
) -> Metrics {
    let hold_time = hold.map(|h| h.hold_time_s(design, analysis));
    figures(
        design,
        &analysis.states,
        analysis.manoeuvres.as_ref(),
        analysis.gas.inventory_kg,
        Figures {
            parts_mass_kg,
            price,
            peak_coil_current_a,
            tank_pressure_pa,
        },
        hold_time,
    )
}

/// The figures that do not come from the analysis.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Figures {
    /// Mass of the parts (no gas), kg.
    pub parts_mass_kg: f64,
    /// Price of the parts.
    pub price: f64,
    /// Coil current with every valve open, A.
    pub peak_coil_current_a: f64,
    /// Tank pressure at fill, Pa absolute.
    pub tank_pressure_pa: f64,
}

/// The figures from per-state results and the manoeuvre plan. `hold_time` is
/// `None` without a hold-time source, `Some(None)` when the source found none.
pub fn figures(
    design: &Design,
    states: &[analysis::StateReport],
    plan: Option<&analysis::manoeuvre::ManoeuvrePlan>,
    inventory_kg: f64,
    f: Figures,
    hold_time: Option<Option<f64>>,
) -> Metrics {
    // Where the worst margin is: the first flight state, then roll, pitch, yaw,
    // among margins equal to within a relative 1e-9 (mirror-image axes differ
    // only by rounding, which must not pick the label).
    let mut worst: Option<(f64, String)> = None;
    for s in states {
        for a in &s.authority {
            if a.margin.is_finite()
                && worst
                    .as_ref()
                    .is_none_or(|(m, _)| a.margin < *m - 1e-9 * m.abs())
            {
                worst = Some((a.margin, format!("{} at {}", a.axis, s.name)));
            }
        }
    }
    // The value itself is the true minimum.
    if let Some((m, _)) = &mut worst {
        for s in states {
            for a in &s.authority {
                if a.margin.is_finite() {
                    *m = m.min(a.margin);
                }
            }
        }
    }
    let mut slack = f64::INFINITY;
    if let Some((m, _)) = &worst {
        slack = slack.min(m - 1.0);
    }
    let (gas, available) = match plan {
        Some(p) => {
            let rel = if p.available_kg > 0.0 {
                (p.available_kg - p.total_gas_kg) / p.available_kg
            } else {
                -1.0
            };
            slack = slack.min(rel);
            (Some(p.total_gas_kg), Some(p.available_kg))
        }
        None => (None, None),
    };
    let hold_time_s = hold_time.flatten();
    let want = design.requirements.hold_time_s;
    if let Some(h) = hold_time_s {
        if want > 0.0 {
            slack = slack.min((h - want) / want);
        }
    }
    let hold_time_note = match hold_time {
        Some(Some(_)) => None,
        None => Some(HOLD_TIME_NOT_COMPUTED.to_string()),
        Some(None) => Some("the simulation could not find a hold time for this design".to_string()),
    };
    // With no requirement of any kind the slack is unbounded; 1 stands for "met".
    let slack = if slack.is_finite() { slack } else { 1.0 };
    let (worst_margin, worst_margin_at) = match worst {
        Some((m, at)) => (Some(m), at),
        None => (None, "no requirement about any axis".to_string()),
    };
    Metrics {
        worst_margin,
        worst_margin_at,
        manoeuvre_gas_kg: gas,
        available_gas_kg: available,
        hold_time_s,
        hold_time_note,
        system_mass_kg: f.parts_mass_kg + inventory_kg,
        price: f.price,
        peak_coil_current_a: f.peak_coil_current_a,
        tank_pressure_pa: f.tank_pressure_pa,
        meets_requirements: slack >= 0.0,
        slack,
    }
}

/// Evaluate one combination with the full analysis.
pub fn evaluate(
    base: &Design,
    cat: &Catalogue,
    choice: &Choice,
    hold: Option<&dyn HoldTime>,
) -> Evaluated {
    let design = combine::apply(base, cat, choice);
    let outcome = evaluate_design(&design, cat, choice, hold).map_or_else(
        |breaches| Outcome::Rejected { breaches },
        |(_, m)| Outcome::Accepted(m),
    );
    Evaluated {
        index: choice.index(cat),
        choice: choice.clone(),
        parts: choice.describe(cat),
        outcome,
    }
}

/// Rules, analysis and figures of a design already built from `choice`; the
/// analysis comes back with the figures.
pub fn evaluate_design(
    design: &Design,
    cat: &Catalogue,
    choice: &Choice,
    hold: Option<&dyn HoldTime>,
) -> Result<(Analysis, Metrics), Vec<Breach>> {
    let pressures = pressures(design).map_err(|e| {
        vec![Breach {
            rule: Rule::Analysis,
            detail: e,
        }]
    })?;
    let breaches = rules::check(design, cat, choice, &pressures);
    if !breaches.is_empty() {
        return Err(breaches);
    }
    let analysis = analysis::analyze(design).map_err(|e| {
        vec![Breach {
            rule: Rule::Analysis,
            detail: e.to_string(),
        }]
    })?;
    let n = design.ports.len();
    let m = metrics(
        design,
        &analysis,
        combine::parts_mass_kg(cat, choice, n),
        combine::price(cat, choice, n),
        cat.valves[choice.valve].coil_current_a * n as f64,
        pressures.tank_pa,
        hold,
    );
    Ok((analysis, m))
}
