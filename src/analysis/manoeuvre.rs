//! Manoeuvre gas budget: the angular impulse each listed manoeuvre needs, the
//! least gas it takes with the allocator, and whether the usable gas covers the
//! list with the stated reserve.
//!
//! Impulse about the manoeuvre's axis: a spin-up or despin to rate ω needs I·ω;
//! holding a spin rate or an attitude against a steady torque T for a time t needs
//! T·t; a turn that starts and ends at rest at peak rate ω needs 2·I·ω (the angle
//! sets only the coast time). When a turn gives no rate, the fastest bang–bang turn
//! through the angle θ at full authority α peaks at ω = √(θ·α).
//! Least gas: inside the envelope the least-gas firing is positively homogeneous
//! in the torque (the LP scales with its right-hand side), so the gas per unit of
//! angular impulse along a direction is the least gas rate for a small torque
//! along that direction divided by the torque.

use super::{GasBudget, StateReport};
use crate::allocation::mingas::{MinGasAllocator, SideForceLimit};
use crate::allocation::Tolerances;
use crate::model::{Design, Manoeuvre, ManoeuvreKind};
use nalgebra::Vector3;
use serde::Serialize;

/// Fraction of the axis authority used to price a direction (well inside the envelope).
const PRICING_FRACTION: f64 = 0.1;

/// One manoeuvre's budget.
#[derive(Debug, Clone, Serialize)]
pub struct ManoeuvreBudget {
    /// Name.
    pub name: String,
    /// Flight state whose inertia and ports are used.
    pub state: String,
    /// Axis, "roll", "pitch" or "yaw".
    pub axis: &'static str,
    /// Angular impulse, N·m·s.
    pub impulse_n_m_s: f64,
    /// Least gas, kg.
    pub gas_kg: f64,
}

/// The whole list.
#[derive(Debug, Clone, Serialize)]
pub struct ManoeuvrePlan {
    /// Each manoeuvre.
    pub items: Vec<ManoeuvreBudget>,
    /// Sum of the gas, kg.
    pub total_gas_kg: f64,
    /// Usable gas after the reserve (adiabatic bound), kg.
    pub available_kg: f64,
    /// Reserve kept back, as a fraction of the usable gas.
    pub reserve_fraction: f64,
    /// Whether the list fits.
    pub fits: bool,
}

fn state_for<'a>(states: &'a [StateReport], name: &Option<String>) -> Option<&'a StateReport> {
    match name {
        Some(n) => states.iter().find(|s| &s.name == n),
        None => states.last(),
    }
}

/// Gas per angular impulse along `dir` (unit), kg per N·m·s.
fn gas_per_impulse(design: &Design, st: &StateReport, dir: &Vector3<f64>) -> Result<f64, String> {
    let e = super::effectiveness(design, &st.mass, &st.ports)?;
    let mut alloc = MinGasAllocator::new(&e, SideForceLimit::Free, &Tolerances::default())
        .map_err(|e| e.to_string())?;
    let k = dir.iamax();
    let reach = if dir[k] > 0.0 {
        st.authority[k].positive_n_m
    } else {
        st.authority[k].negative_n_m
    };
    if reach <= 0.0 {
        return Err(format!(
            "no port can make torque along {}{} at state `{}`, so no amount of gas performs it; remove the manoeuvre or add ports that can",
            if dir[k] > 0.0 { "+" } else { "-" },
            super::authority::AXES[k],
            st.name
        ));
    }
    let torque = PRICING_FRACTION * reach;
    let a = alloc.allocate(&(dir * torque)).map_err(|e| e.to_string())?;
    Ok(a.gas_rate_kg_s / torque)
}

/// Budget the design's manoeuvre list.
pub fn plan(
    design: &Design,
    gas: &GasBudget,
    states: &[StateReport],
) -> Result<Option<ManoeuvrePlan>, super::AnalysisError> {
    if design.manoeuvres.is_empty() {
        return Ok(None);
    }
    let mut items = Vec::new();
    for m in &design.manoeuvres {
        let fail = |reason: String| super::AnalysisError::Manoeuvre {
            name: m.name.clone(),
            reason,
        };
        let st = state_for(states, &m.state).ok_or_else(|| {
            fail(format!(
                "no flight state `{}`",
                m.state.as_deref().unwrap_or("(none)")
            ))
        })?;
        let inertia = st.mass.inertia_diagonal();
        let (axis, sign, impulse) = impulse(m, st, inertia);
        let mut dir = Vector3::zeros();
        dir[axis] = sign;
        let price = |d: &Vector3<f64>| gas_per_impulse(design, st, d).map_err(fail);
        // A turn accelerates one way and brakes the other: half its impulse in each sense.
        let gas = if matches!(m.kind, ManoeuvreKind::Turn { .. }) {
            0.5 * impulse * (price(&dir)? + price(&(-dir))?)
        } else {
            impulse * price(&dir)?
        };
        items.push(ManoeuvreBudget {
            name: m.name.clone(),
            state: st.name.clone(),
            axis: super::authority::AXES[axis],
            impulse_n_m_s: impulse,
            gas_kg: gas,
        });
    }
    let total: f64 = items.iter().map(|i| i.gas_kg).sum();
    let reserve = design.requirements.gas_reserve;
    let available = gas.usable_adiabatic_kg * (1.0 - reserve);
    Ok(Some(ManoeuvrePlan {
        items,
        total_gas_kg: total,
        available_kg: available,
        reserve_fraction: reserve,
        fits: total <= available,
    }))
}

/// Axis index, sense (±1) and angular impulse of one manoeuvre.
fn impulse(m: &Manoeuvre, st: &StateReport, inertia: Vector3<f64>) -> (usize, f64, f64) {
    match m.kind {
        ManoeuvreKind::Spin { rate_rad_s, hold_s } => {
            let hold = st.required.from_disturbance_n_m[0] * hold_s;
            (0, rate_rad_s.signum(), inertia[0] * rate_rad_s.abs() + hold)
        }
        ManoeuvreKind::Despin { rate_rad_s } => {
            (0, -rate_rad_s.signum(), inertia[0] * rate_rad_s.abs())
        }
        ManoeuvreKind::Hold {
            axis,
            torque_n_m,
            time_s,
        } => (
            axis,
            if torque_n_m >= 0.0 { 1.0 } else { -1.0 },
            torque_n_m.abs() * time_s,
        ),
        ManoeuvreKind::Turn {
            axis,
            angle_rad,
            rate_rad_s,
            count,
        } => {
            let alpha = st.authority[axis].angular_accel_rad_s2;
            let peak = rate_rad_s.unwrap_or_else(|| (angle_rad.abs() * alpha).sqrt());
            (axis, 1.0, count as f64 * 2.0 * inertia[axis] * peak)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Angular impulse of a spin-up, worked by hand: L = I·ω (Meriam & Kraige,
    // Dynamics, angular impulse–momentum): I = 0.002 kg m², ω = 2π rad/s gives
    // 0.012566 N·m·s; holding it 3 s against 0.01 N·m adds 0.03 N·m·s.
    #[test]
    fn spin_impulse_is_inertia_times_rate_plus_hold() {
        let text = include_str!("../../layouts/heron-54.toml");
        let design = crate::layout::parse_str(text, "heron-54.toml").unwrap();
        let a = super::super::analyze(&design).unwrap();
        let mut st = a.states[0].clone();
        st.mass.ixx_kg_m2 = 0.002;
        st.required.from_disturbance_n_m = [0.01, 0.0, 0.0];
        let m = Manoeuvre {
            name: "spin".into(),
            state: None,
            kind: ManoeuvreKind::Spin {
                rate_rad_s: std::f64::consts::TAU,
                hold_s: 3.0,
            },
        };
        let (axis, sign, j) = impulse(&m, &st, st.mass.inertia_diagonal());
        assert_eq!((axis, sign), (0, 1.0));
        assert!((j - (0.002 * std::f64::consts::TAU + 0.03)).abs() < 1e-12);
    }

    // Gas per impulse is linear: the least-gas LP scales with its right-hand side
    // inside the envelope, so pricing at 10 % or 20 % of the authority agrees.
    #[test]
    fn gas_per_impulse_does_not_depend_on_the_pricing_torque() {
        let text = include_str!("../../layouts/heron-54.toml");
        let design = crate::layout::parse_str(text, "heron-54.toml").unwrap();
        let a = super::super::analyze(&design).unwrap();
        let st = &a.states[1];
        let e = super::super::effectiveness(&design, &st.mass, &st.ports).unwrap();
        let mut alloc =
            MinGasAllocator::new(&e, SideForceLimit::Free, &Tolerances::default()).unwrap();
        let d = Vector3::new(0.0, 1.0, 0.0);
        let t1 = 0.1 * st.authority[1].positive_n_m;
        let g1 = alloc.allocate(&(d * t1)).unwrap().gas_rate_kg_s / t1;
        let g2 = alloc.allocate(&(d * 2.0 * t1)).unwrap().gas_rate_kg_s / (2.0 * t1);
        assert!((g1 - g2).abs() <= 1e-9 * g1, "{g1} vs {g2}");
        assert!((gas_per_impulse(&design, st, &d).unwrap() - g1).abs() <= 1e-9 * g1);
    }
}
