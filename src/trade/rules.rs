//! Rules that reject a combination before anything is ranked, each with a name.
//!
//! Pressures are compared absolute. A rating written gauge in the parts file is
//! referred to sea-level standard atmosphere (ratings are bench figures); the
//! regulated pressure a valve sees is the working set pressure above the highest
//! ambient of the flight states (the regulator holds its set pressure above local
//! ambient, so the manifold is highest on the ground). The tank pressure is the
//! fill pressure at the layout's fill temperature (from the equation of state for
//! a fill by mass).

use super::catalogue::Catalogue;
use super::combine::Choice;
use crate::model::Design;
use serde::Serialize;

/// The rules, in the order they are checked and listed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Rule {
    /// The tank's outer diameter is larger than the body tube's inner diameter.
    TankFit,
    /// The tank is rated below its fill pressure.
    TankRating,
    /// The regulator (the first stage of a chain) is rated below the tank pressure at its inlet.
    RegulatorInletRating,
    /// A chain's working stage is rated below the first stage's outlet pressure.
    ChainInletRating,
    /// A chain's first stage delivers less than the working stage needs (set pressure plus dropout margin).
    ChainIntermediate,
    /// The working set pressure is outside the regulator's adjustable range.
    SetPressureRange,
    /// The fill pressure is not above what the regulator needs at its inlet: no gas is usable.
    FillBelowRegulator,
    /// The valve is rated below the regulated pressure it sees.
    ValveRating,
    /// Every valve open at once draws more coil current than the supply limit.
    CoilCurrent,
    /// The analysis itself could not be made (a flow or a supply that cannot be solved).
    Analysis,
}

impl Rule {
    /// Short name, as in the README and the JSON.
    pub fn name(self) -> &'static str {
        match self {
            Rule::TankFit => "tank-fit",
            Rule::TankRating => "tank-rating",
            Rule::RegulatorInletRating => "regulator-inlet-rating",
            Rule::ChainInletRating => "chain-inlet-rating",
            Rule::ChainIntermediate => "chain-intermediate",
            Rule::SetPressureRange => "set-pressure-range",
            Rule::FillBelowRegulator => "fill-below-regulator",
            Rule::ValveRating => "valve-rating",
            Rule::CoilCurrent => "coil-current",
            Rule::Analysis => "analysis",
        }
    }
}

/// One broken rule, with the numbers behind it in words.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Breach {
    /// Which rule.
    pub rule: Rule,
    /// What was compared, with units.
    pub detail: String,
}

/// The pressures the rules compare, worked out once per design.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Pressures {
    /// Tank pressure at fill, Pa absolute.
    pub tank_pa: f64,
    /// Highest ambient among the flight states, Pa.
    pub ground_ambient_pa: f64,
}

fn bara(pa: f64) -> String {
    format!("{:.1} bara", pa / 1e5 + 0.0)
}

/// Every rule the combination breaks, in [`Rule`] order (empty: accepted so far;
/// the analysis may still add [`Rule::Analysis`]).
pub fn check(
    design: &Design,
    cat: &Catalogue,
    choice: &Choice,
    pressures: &Pressures,
) -> Vec<Breach> {
    let mut out = Vec::new();
    let mut breach = |rule, detail: String| out.push(Breach { rule, detail });
    let v = &cat.valves[choice.valve];
    let r = &cat.regulators[choice.regulator];
    let t = &cat.tanks[choice.tank];
    let set = cat.set_pressures_gauge_pa[choice.set_pressure];
    let amb = pressures.ground_ambient_pa;
    let tank = pressures.tank_pa;
    if t.diameter_m > design.airframe.inner_diameter_m {
        breach(
            Rule::TankFit,
            format!(
                "tank `{}` is {:.1} mm across; the body tube is {:.1} mm inside",
                t.name,
                t.diameter_m * 1e3,
                design.airframe.inner_diameter_m * 1e3
            ),
        );
    }
    if t.rated_pressure_pa < tank {
        breach(
            Rule::TankRating,
            format!(
                "tank `{}` is rated {}; it is filled to {}",
                t.name,
                bara(t.rated_pressure_pa),
                bara(tank)
            ),
        );
    }
    let inlet_rating = r
        .first_stage
        .as_ref()
        .map_or(r.rated_inlet_pa, |f| f.rated_inlet_pa);
    if inlet_rating < tank {
        breach(
            Rule::RegulatorInletRating,
            format!(
                "regulator `{}` inlet is rated {}; the tank is at {}",
                r.name,
                bara(inlet_rating),
                bara(tank)
            ),
        );
    }
    let need_working = set + amb + r.dropout_margin_pa;
    if let Some(f) = &r.first_stage {
        let intermediate = f.set_pressure_gauge_pa + amb;
        if r.rated_inlet_pa < intermediate {
            breach(
                Rule::ChainInletRating,
                format!(
                    "the working stage of `{}` is rated {} at its inlet; the first stage delivers {}",
                    r.name,
                    bara(r.rated_inlet_pa),
                    bara(intermediate)
                ),
            );
        }
        if intermediate < need_working {
            breach(
                Rule::ChainIntermediate,
                format!(
                    "the first stage of `{}` delivers {}; the working stage needs {} (set pressure plus dropout margin)",
                    r.name,
                    bara(intermediate),
                    bara(need_working)
                ),
            );
        }
    }
    // A relative 1e-9 keeps a set pressure written exactly at a range end inside
    // it despite the unit conversion's rounding.
    let slack = 1e-9 * r.set_max_gauge_pa.abs();
    if set < r.set_min_gauge_pa - slack || set > r.set_max_gauge_pa + slack {
        breach(
            Rule::SetPressureRange,
            format!(
                "set pressure {} is outside `{}`'s range {} to {}",
                super::combine::psig(set),
                r.name,
                super::combine::psig(r.set_min_gauge_pa),
                super::combine::psig(r.set_max_gauge_pa)
            ),
        );
    }
    let need_inlet = match &r.first_stage {
        Some(f) => (f.set_pressure_gauge_pa + amb + f.dropout_margin_pa).max(need_working),
        None => need_working,
    };
    if tank <= need_inlet {
        breach(
            Rule::FillBelowRegulator,
            format!(
                "the tank is filled to {}; the regulator needs more than {} at its inlet",
                bara(tank),
                bara(need_inlet)
            ),
        );
    }
    if v.rated_pressure_pa < set + amb {
        breach(
            Rule::ValveRating,
            format!(
                "valve `{}` is rated {}; the regulated manifold is at {} on the ground",
                v.name,
                bara(v.rated_pressure_pa),
                bara(set + amb)
            ),
        );
    }
    if let Some(limit) = cat.coil_supply_limit_a {
        let peak = v.coil_current_a * design.ports.len() as f64;
        if peak > limit {
            breach(
                Rule::CoilCurrent,
                format!(
                    "{} valves of `{}` draw {:.2} A together; the supply gives {:.2} A",
                    design.ports.len(),
                    v.name,
                    peak,
                    limit
                ),
            );
        }
    }
    out
}
