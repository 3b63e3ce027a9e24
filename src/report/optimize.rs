//! What `optimize` prints: the objective and its change, per flight state and axis
//! the authority, margin, gas and side force before and after, the ports moved and
//! the rules holding the optimum in place. Assembled here so the binary only prints it.

use crate::allocation::{AllocationStatus, MinGasAllocator, SideForceLimit, Tolerances};
use crate::analysis::score::{MarginScore, Objective, SampledMargins, Term};
use crate::analysis::{self, Analysis};
use crate::model::{Design, Port};
use crate::optimize::constraints::{Constraints, Limits};
use crate::optimize::search::Outcome;
use crate::units::signed;
use std::fmt::Write;
use std::sync::Arc;

/// What one layout achieves, as the report shows it.
pub struct Summary {
    states: Vec<StateSummary>,
    /// Value of each stage of the objective.
    objective: Vec<f64>,
    /// Σ|F⊥| / Σ|τ| over the ports at the first state, 1/m.
    side_per_torque: f64,
}

struct StateSummary {
    name: String,
    /// Worst-sense authority under the side-force rule, N·m.
    authority: [f64; 3],
    required: [f64; 3],
    /// Authority over requirement (infinite when nothing is required).
    margin: [f64; 3],
    /// Least gas for the required torque about each axis, the dearer sense, kg/s.
    gas_kg_s: [Option<f64>; 3],
    /// Largest side force of those allocations, N.
    side_n: [Option<f64>; 3],
    /// Whether the required torque is out of reach in some sense.
    saturated: [bool; 3],
    /// Guaranteed torque, N·m.
    guaranteed_n_m: f64,
    /// All ports open, kg/s.
    gas_all_open_kg_s: f64,
}

impl Summary {
    fn worst_margin(&self) -> f64 {
        self.states
            .iter()
            .flat_map(|s| s.margin)
            .fold(f64::INFINITY, f64::min)
    }
}

/// What one layout achieves under the objective and side-force rule: authority,
/// margin, least gas and side force at the required torques, per flight state.
pub fn summarize(
    design: &Design,
    a: &Analysis,
    objective: &Objective,
    side: SideForceLimit,
    spread: Option<Arc<dyn SampledMargins>>,
) -> anyhow::Result<Summary> {
    let score = MarginScore::new(design, a, &[])?
        .with_objective(objective.clone())
        .with_side_force(side);
    let score = match spread {
        Some(s) => score.with_spread(s),
        None => score,
    };
    let authority = score.authority(&design.ports);
    let guaranteed = score.guaranteed(&design.ports);
    let mut states = Vec::new();
    for ((s, auth), g) in a.states.iter().zip(authority).zip(guaranteed) {
        let required = s.required.total_n_m();
        let e = analysis::effectiveness(design, &s.mass, &s.ports)
            .map_err(|m| anyhow::anyhow!("state `{}`: {m}", s.name))?;
        let mut alloc = MinGasAllocator::new(&e, side, &Tolerances::default())?;
        let mut gas = [None; 3];
        let mut side_n = [None; 3];
        let mut saturated = [false; 3];
        let mut margin = [f64::INFINITY; 3];
        for k in 0..3 {
            if required[k] <= 0.0 {
                continue;
            }
            margin[k] = auth[k] / required[k];
            for sense in [1.0, -1.0] {
                let mut tau = nalgebra::Vector3::zeros();
                tau[k] = sense * required[k];
                let r = alloc.allocate(&tau)?;
                gas[k] = Some(gas[k].unwrap_or(0.0f64).max(r.gas_rate_kg_s));
                side_n[k] = Some(side_n[k].unwrap_or(0.0f64).max(r.force.y.hypot(r.force.z)));
                saturated[k] |= r.status == AllocationStatus::Saturated;
            }
        }
        states.push(StateSummary {
            name: s.name.clone(),
            authority: auth,
            required,
            margin,
            gas_kg_s: gas,
            side_n,
            saturated,
            guaranteed_n_m: g,
            gas_all_open_kg_s: s.ports.iter().map(|p| p.mass_flow_kg_s).sum(),
        });
    }
    Ok(Summary {
        states,
        objective: score.stage_values(&design.ports),
        side_per_torque: -score.term_value(Term::SideForcePerTorque, &design.ports),
    })
}

/// What the report says besides the numbers.
pub struct Notes {
    /// Rules holding the optimum in place.
    pub active: Vec<String>,
    /// Rules the starting layout breaks (which rule, which port, by how much).
    pub start_breaks: Vec<String>,
    /// Per stage: whether its answer was kept.
    pub kept: Vec<bool>,
}

/// Rules that hold the optimum in place: those the layout would break if each
/// limit were tightened slightly (0.5 mm more margin, 1 % more spacing and edge
/// distance, 0.2° less cant, 0.2° wider plume). Freedom ranges are not listed.
pub fn active_constraints(design: &Design, limits: Limits) -> Vec<String> {
    let tight = Limits {
        margin_m: limits.margin_m + 0.5e-3,
        spacing_diameters: limits.spacing_diameters * 1.01,
        edge_distance_diameters: limits.edge_distance_diameters * 1.01,
        max_total_cant_rad: limits.max_total_cant_rad - 0.2f64.to_radians(),
        plume_half_angle_rad: limits.plume_half_angle_rad + 0.2f64.to_radians(),
        ..limits
    };
    match Constraints::new(&design.airframe, tight) {
        Ok(c) => c
            .violations(&design.ports)
            .iter()
            .map(|v| v.to_string())
            .collect(),
        Err(_) => Vec::new(),
    }
}

fn side_text(side: SideForceLimit) -> String {
    match side {
        SideForceLimit::Free => "none".to_string(),
        SideForceLimit::PureCouple => "pure couples only (0 N)".to_string(),
        SideForceLimit::Bounded { limit_n } => format!("{limit_n} N on each lateral axis"),
    }
}

fn summary_json(s: &Summary) -> serde_json::Value {
    let finite = |v: f64| if v.is_finite() { Some(v) } else { None };
    serde_json::json!({
        "objective": s.objective,
        "worst_margin": finite(s.worst_margin()),
        "side_force_per_torque_per_m": s.side_per_torque,
        "states": s.states.iter().map(|st| serde_json::json!({
            "state": st.name,
            "authority_n_m": st.authority,
            "required_n_m": st.required,
            "margin": st.margin.map(finite),
            "margin_note": st.required.map(|r| (r <= 0.0).then_some(crate::analysis::authority::NO_REQUIREMENT)),
            "gas_at_required_kg_s": st.gas_kg_s,
            "side_force_at_required_n": st.side_n,
            "required_out_of_reach": st.saturated,
            "guaranteed_torque_n_m": st.guaranteed_n_m,
            "gas_all_open_kg_s": st.gas_all_open_kg_s,
            "gas_per_guaranteed_torque_kg_s_per_n_m": if st.guaranteed_n_m > 0.0 { Some(st.gas_all_open_kg_s / st.guaranteed_n_m) } else { None },
        })).collect::<Vec<_>>(),
    })
}

fn moved(a: &Port, b: &Port) -> bool {
    a.station_m != b.station_m
        || a.clock_rad != b.clock_rad
        || a.tangential_cant_rad != b.tangential_cant_rad
        || a.axial_cant_rad != b.axial_cant_rad
        || a.nozzle != b.nozzle
}

/// The report of one optimisation, as text or as JSON (`json`).
pub fn report(
    design: &Design,
    new: &Design,
    (before, after): (&Summary, &Summary),
    (objective, side): (&Objective, SideForceLimit),
    outcomes: &[Outcome],
    notes: &Notes,
    json: bool,
) -> anyhow::Result<String> {
    let active = &notes.active;
    let wrap = crate::airframe::placement::wrap_angle;
    let evaluations: usize = outcomes.iter().map(|o| o.evaluations).sum();
    let elapsed: f64 = outcomes.iter().map(|o| o.elapsed.as_secs_f64()).sum();
    if json {
        let moved: Vec<serde_json::Value> = design
            .ports
            .iter()
            .zip(&new.ports)
            .filter(|(a, b)| moved(a, b))
            .map(|(a, b)| {
                serde_json::json!({
                    "port": a.name,
                    "station_change_m": b.station_m - a.station_m,
                    "clock_change_rad": wrap(b.clock_rad - a.clock_rad),
                    "tangential_cant_change_rad": b.tangential_cant_rad - a.tangential_cant_rad,
                    "axial_cant_change_rad": b.axial_cant_rad - a.axial_cant_rad,
                    "hole_before_m": a.nozzle.hole_diameter_m(),
                    "hole_after_m": b.nozzle.hole_diameter_m(),
                })
            })
            .collect();
        let side_json = match side {
            SideForceLimit::Free => serde_json::Value::Null,
            SideForceLimit::PureCouple => serde_json::json!(0.0),
            SideForceLimit::Bounded { limit_n } => serde_json::json!(limit_n),
        };
        let v = serde_json::json!({
            "layout": design.name,
            "objective": objective.to_string(),
            "side_force_limit_n": side_json,
            "worst_margin_before": before.worst_margin(),
            "worst_margin_after": after.worst_margin(),
            "evaluations": evaluations,
            "stages": outcomes.iter().map(|o| serde_json::json!({
                "evaluations": o.evaluations,
                "stop": o.stop.describe(),
                "elapsed_s": o.elapsed.as_secs_f64(),
                "best": o.score.merit,
            })).collect::<Vec<_>>(),
            "stages_kept": notes.kept,
            "start_breaks_rules": notes.start_breaks,
            "elapsed_s": elapsed,
            "before": summary_json(before),
            "after": summary_json(after),
            "moved": moved,
            "active_constraints": active,
        });
        return Ok(serde_json::to_string_pretty(&v)? + "\n");
    }
    let mut s = String::new();
    let stops: Vec<&str> = outcomes.iter().map(|o| o.stop.describe()).collect();
    let _ = writeln!(
        s,
        "optimised {} for `{objective}`: worst margin {:.3} -> {:.3}",
        design.name,
        before.worst_margin(),
        after.worst_margin(),
    );
    let values = |v: &[f64]| {
        v.iter()
            .map(|x| format!("{x:.4}"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let _ = writeln!(
        s,
        "  objective {} -> {}; {evaluations} evaluations, {elapsed:.1} s, stopped: {}",
        values(&before.objective),
        values(&after.objective),
        stops.join(", ")
    );
    let _ = writeln!(
        s,
        "  side-force limit on the allocations: {}",
        side_text(side)
    );
    for (k, kept) in notes.kept.iter().enumerate().skip(1) {
        if !kept {
            let _ = writeln!(
                s,
                "  stage {} could not improve its value by more than round-off: the answer of stage {k} is kept",
                k + 1
            );
        }
    }
    if !notes.start_breaks.is_empty() {
        let _ = writeln!(
            s,
            "  the starting layout breaks {} rule(s); the search started from an infeasible layout:",
            notes.start_breaks.len()
        );
        for b in &notes.start_breaks {
            let _ = writeln!(s, "    {b}");
        }
    }
    let _ = writeln!(
        s,
        "per flight state and axis, before -> after (weaker sense):"
    );
    let _ = writeln!(
        s,
        "  {:<10} {:<5} {:>21}  {:>14}  {:>23}  {:>16}",
        "state", "axis", "authority N·m", "margin", "gas at required g/s", "side force N"
    );
    let mut any_saturated = false;
    for (b, a) in before.states.iter().zip(&after.states) {
        for (k, axis) in ["roll", "pitch", "yaw"].iter().enumerate() {
            let margin = |st: &StateSummary| {
                if st.margin[k].is_finite() {
                    format!("{:.2}", st.margin[k])
                } else {
                    "none required".to_string()
                }
            };
            let gas = |st: &StateSummary| match st.gas_kg_s[k] {
                Some(g) => format!("{:.3}{}", g * 1e3, if st.saturated[k] { "*" } else { "" }),
                None => "-".to_string(),
            };
            let side = |st: &StateSummary| match st.side_n[k] {
                Some(f) => format!("{f:.3}"),
                None => "-".to_string(),
            };
            any_saturated |= b.saturated[k] || a.saturated[k];
            let _ = writeln!(
                s,
                "  {:<10} {:<5} {:>21}  {:>14}  {:>23}  {:>16}",
                b.name,
                axis,
                format!("{:.4} -> {:.4}", b.authority[k], a.authority[k]),
                format!("{} -> {}", margin(b), margin(a)),
                format!("{} -> {}", gas(b), gas(a)),
                format!("{} -> {}", side(b), side(a)),
            );
        }
    }
    if any_saturated {
        let _ = writeln!(
            s,
            "  * the required torque is out of reach in some sense: gas shown for the largest part attainable"
        );
    }
    let _ = writeln!(
        s,
        "guaranteed torque (any direction) and gas per guaranteed torque, all ports open:"
    );
    for (b, a) in before.states.iter().zip(&after.states) {
        let per = |st: &StateSummary| {
            if st.guaranteed_n_m > 0.0 {
                format!("{:.1}", st.gas_all_open_kg_s * 1e3 / st.guaranteed_n_m)
            } else {
                "-".to_string()
            }
        };
        let _ = writeln!(
            s,
            "  {:<10} {:.4} -> {:.4} N·m    {} -> {} g/s per N·m",
            b.name,
            b.guaranteed_n_m,
            a.guaranteed_n_m,
            per(b),
            per(a)
        );
    }
    if !matches!(side, SideForceLimit::Free) {
        let _ = writeln!(
            s,
            "  (under the side-force limit the guaranteed torque is the least ray limit over 32 directions, an upper bound)"
        );
    }
    let _ = writeln!(
        s,
        "side force per torque over the ports at {} (sum |F lateral| / sum |torque|): {:.2} -> {:.2} per m",
        before.states.first().map_or("-", |s| s.name.as_str()),
        before.side_per_torque,
        after.side_per_torque
    );
    let _ = writeln!(s, "ports moved:");
    let mut any = false;
    for (a, b) in design.ports.iter().zip(&new.ports) {
        if !moved(a, b) {
            continue;
        }
        any = true;
        let _ = writeln!(
            s,
            "  {:<14} station {} mm, clock {} deg, tangential cant {} deg, axial cant {} deg, hole {:.2} -> {:.2} mm",
            a.name,
            signed((b.station_m - a.station_m) * 1e3, 1),
            signed(wrap(b.clock_rad - a.clock_rad).to_degrees(), 1),
            signed((b.tangential_cant_rad - a.tangential_cant_rad).to_degrees(), 1),
            signed((b.axial_cant_rad - a.axial_cant_rad).to_degrees(), 1),
            a.nozzle.hole_diameter_m() * 1e3,
            b.nozzle.hole_diameter_m() * 1e3
        );
    }
    if !any {
        let _ = writeln!(s, "  none: the start is already the best found");
    }
    let _ = writeln!(
        s,
        "rules holding the optimum in place (would break if tightened slightly):"
    );
    if active.is_empty() {
        let _ = writeln!(
            s,
            "  none: the result sits inside every rule (only the freedom ranges bind)"
        );
    }
    for a in active {
        let _ = writeln!(s, "  {a}");
    }
    Ok(s)
}
