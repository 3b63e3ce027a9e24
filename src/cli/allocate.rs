//! `portwright allocate`: least-gas duty cycles for one torque command.

use anyhow::{anyhow, Context, Result};
use nalgebra::Vector3;
use portwright::allocation::mingas::{AllocationStatus, MinGasAllocator, SideForceLimit};
use portwright::allocation::Tolerances;
use portwright::analysis::{self, Analysis};
use portwright::model::Design;
use portwright::units::signed;
use std::fmt::Write;

/// Pick a state report by name (or the first).
pub fn pick_state<'a>(
    analysis: &'a Analysis,
    name: Option<&str>,
) -> Result<&'a analysis::StateReport> {
    match name {
        None => analysis
            .states
            .first()
            .ok_or_else(|| anyhow!("the layout has no flight states")),
        Some(n) => analysis.states.iter().find(|s| s.name == n).ok_or_else(|| {
            let names: Vec<_> = analysis
                .states
                .iter()
                .map(|s| format!("`{}`", s.name))
                .collect();
            anyhow::Error::new(super::values::UsageError(format!(
                "--state: no flight state `{}`; the layout has {}",
                portwright::units::shown(n),
                names.join(", ")
            )))
        }),
    }
}

/// Run the command and return what to print.
pub fn run(
    design: &Design,
    analysis: &Analysis,
    tau: Vector3<f64>,
    state: Option<&str>,
    side: Option<SideForceLimit>,
    json: bool,
) -> Result<String> {
    let st = pick_state(analysis, state)?;
    let e = analysis::effectiveness(design, &st.mass, &st.ports).map_err(|e| anyhow!(e))?;
    let mut alloc = MinGasAllocator::new(
        &e,
        side.unwrap_or(SideForceLimit::Free),
        &Tolerances::default(),
    )
    .map_err(|e| anyhow!("{e}"))?;
    let a = alloc.allocate(&tau).context("allocation failed")?;
    let saturated = a.status == AllocationStatus::Saturated;
    if json {
        let v = serde_json::json!({
            "layout": design.name,
            "state": st.name,
            "frame": "body axes: +x toward the nose; torques about the state's CG",
            "command_n_m": [tau.x, tau.y, tau.z],
            "achieved_torque_n_m": [a.torque.x, a.torque.y, a.torque.z],
            "side_force_n": [a.force.x, a.force.y, a.force.z],
            "gas_rate_kg_s": a.gas_rate_kg_s,
            "scale": a.scale,
            "saturated": saturated,
            "duty": design.ports.iter().zip(&a.duty).map(|(p, d)| serde_json::json!({"port": p.name, "duty": d})).collect::<Vec<_>>(),
        });
        return Ok(serde_json::to_string_pretty(&v)? + "\n");
    }
    let mut s = String::new();
    let _ = writeln!(
        s,
        "least-gas firing for {} at `{}` (torques about the CG, body axes)",
        design.name, st.name
    );
    let _ = writeln!(
        s,
        "command   roll {}  pitch {}  yaw {} mN m",
        signed(tau.x * 1e3, 2),
        signed(tau.y * 1e3, 2),
        signed(tau.z * 1e3, 2)
    );
    let _ = writeln!(
        s,
        "achieved  roll {}  pitch {}  yaw {} mN m",
        signed(a.torque.x * 1e3, 2),
        signed(a.torque.y * 1e3, 2),
        signed(a.torque.z * 1e3, 2)
    );
    if saturated {
        let _ = writeln!(s, "SATURATED: the command is outside the envelope; {:.1} % of it is produced, in the same direction", a.scale * 100.0);
    }
    let _ = writeln!(
        s,
        "side force {} {} {} N, gas {:.3} g/s",
        signed(a.force.x, 3),
        signed(a.force.y, 3),
        signed(a.force.z, 3),
        a.gas_rate_kg_s * 1e3
    );
    for (p, d) in design.ports.iter().zip(&a.duty) {
        let _ = writeln!(s, "  {:<14} duty {:>6.3}", p.name, d);
    }
    Ok(s)
}
