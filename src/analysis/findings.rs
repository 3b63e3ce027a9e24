//! Findings in plain words: what a builder should notice in the numbers.
//!
//! Thresholds for "only just enough" (margin below 1.5) and "far more than
//! needed" (margin above 8) are common practice, no source: they flag layouts
//! worth a second look, not failures.

use super::{GasBudget, StateReport};
use crate::model::Design;

/// Margin below which an axis is called tight.
const TIGHT_MARGIN: f64 = 1.5;
/// Margin above which an axis is called oversized.
const GENEROUS_MARGIN: f64 = 8.0;

/// How far past `[limits] max_cant` a port must be before it is reported (0.001°).
const MAX_CANT_SLACK_RAD: f64 = 0.001 * std::f64::consts::PI / 180.0;

/// Plain-words findings for the report.
pub fn findings(design: &Design, gas: &GasBudget, states: &[StateReport]) -> Vec<String> {
    let mut out = Vec::new();
    for s in states {
        for c in &s.envelope.controllability {
            out.push(format!("at {}: {c}", s.name));
        }
        for a in &s.authority {
            if !a.margin.is_finite() {
                continue;
            }
            if a.margin < 1.0 {
                out.push(format!(
                    "{} authority at {} is only {:.2} of what is required: more thrust or a longer lever arm is needed",
                    a.axis, s.name, a.margin
                ));
            } else if a.margin < TIGHT_MARGIN {
                out.push(format!(
                    "{} margin at {} is only {:.2}",
                    a.axis, s.name, a.margin
                ));
            } else if a.margin > GENEROUS_MARGIN {
                out.push(format!(
                    "{} authority at {} is {:.0} times the requirement: smaller {} holes would save gas",
                    a.axis, s.name, a.margin, a.axis
                ));
            }
        }
        if s.ports_within_5_percent < design.ports.len() {
            out.push(format!(
                "at {}, only {} of {} valves can fire together before each port's thrust falls by more than 5 % (supply droop): a larger regulator or line would help",
                s.name, s.ports_within_5_percent, design.ports.len()
            ));
        }
        for p in &s.ports {
            if p.strongly_overexpanded {
                out.push(format!(
                    "port `{}` is strongly over-expanded at {} (exit pressure below 0.4 of ambient): the flow may separate; a smaller exit would do better",
                    p.name, s.name
                ));
            }
        }
    }
    if let (Some(first), Some(last)) = (states.first(), states.last()) {
        let ratio = |s: &StateReport| {
            if s.authority[1].angular_accel_rad_s2 > 0.0 && s.roll_to_pitch_ratio.is_finite() {
                format!("{:.1} at {}", s.roll_to_pitch_ratio, s.name)
            } else {
                format!("not defined at {} (no pitch authority)", s.name)
            }
        };
        out.push(format!(
            "roll-to-pitch authority ratio is {} and {}",
            ratio(first),
            ratio(last)
        ));
    }
    let hold = design.requirements.hold_time_s;
    if hold > 0.0 && gas.firing_time_all_ports_s.is_finite() {
        let need = gas_for_hold(design, states);
        if need > gas.usable_adiabatic_kg {
            out.push(format!(
                "holding against the roll disturbance for {hold:.0} s needs about {:.1} g of gas, more than the {:.1} g usable (adiabatic bound)",
                need * 1e3,
                gas.usable_adiabatic_kg * 1e3
            ));
        }
    }
    for p in &design.ports {
        let jig = p.total_cant_rad();
        // Equal within 0.001° counts as within the limit, so a port cut at exactly
        // the limit is not judged by round-off (far finer than any drill jig).
        if jig > design.max_cant_rad + MAX_CANT_SLACK_RAD {
            out.push(format!(
                "port `{}`: the drill is set {:.1}° from the surface normal, steeper than the {:.1}° of `[limits] max_cant`: a hole this steep is hard to start and to place; use a drill guide or reduce the cant",
                p.name,
                jig.to_degrees(),
                design.max_cant_rad.to_degrees()
            ));
        }
    }
    out.extend(gas.warnings.iter().cloned());
    out
}

/// Gas to hold the worst state's roll disturbance for the hold time, firing the
/// most efficient port about roll (a first estimate; the allocator's manoeuvre
/// budget is exact). The motor's misalignment lasts only the burn, so the
/// authority margin covers it rather than the hold budget.
fn gas_for_hold(design: &Design, states: &[StateReport]) -> f64 {
    let mut worst = 0.0f64;
    for s in states {
        // The steady roll disturbance only: the motor's share lasts the burn alone.
        let need = design.requirements.roll_disturbance_n_m;
        // Roll torque per kg/s of the best port (either sense).
        let best = s
            .ports
            .iter()
            .map(|p| p.torque_n_m[0].abs() / p.mass_flow_kg_s.max(f64::MIN_POSITIVE))
            .fold(0.0, f64::max);
        if need > 0.0 && best > 0.0 {
            worst = worst.max(need / best);
        }
    }
    worst * design.requirements.hold_time_s
}
