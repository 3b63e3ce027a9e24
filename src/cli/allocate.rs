//! `portwright allocate`: least-gas duty cycles for one torque command.

use anyhow::{anyhow, bail, Context, Result};
use nalgebra::Vector3;
use portwright::allocation::mingas::{AllocationStatus, MinGasAllocator, SideForceLimit};
use portwright::allocation::Tolerances;
use portwright::analysis::{self, Analysis};
use portwright::model::Design;
use portwright::units::{self, Kind};

/// Parse "ROLL,PITCH,YAW", each a torque with a unit (a bare 0 is accepted).
pub fn parse_torque(text: &str) -> Result<Vector3<f64>> {
    let parts: Vec<&str> = text.split(',').map(str::trim).collect();
    if parts.len() != 3 {
        bail!("--torque: expected three torques ROLL,PITCH,YAW such as \"20 mN m,0,-5 mN m\", found \"{text}\"");
    }
    let mut v = Vector3::zeros();
    for (k, p) in parts.iter().enumerate() {
        v[k] = if p.parse::<f64>() == Ok(0.0) {
            0.0
        } else {
            units::parse(p, Kind::Torque)
                .map_err(|e| anyhow!("--torque: {}: {e}", ["roll", "pitch", "yaw"][k]))?
        };
    }
    Ok(v)
}

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
            anyhow!(
                "--state: no flight state `{n}`; the layout has {}",
                names.join(", ")
            )
        }),
    }
}

/// Parse the side-force option.
pub fn side_force(text: Option<&str>) -> Result<SideForceLimit> {
    Ok(match text {
        None => SideForceLimit::Free,
        Some(t) => {
            let v = units::parse(t, Kind::Force).map_err(|e| anyhow!("--side-force: {e}"))?;
            if v < 0.0 {
                bail!("--side-force: expected zero or more");
            }
            SideForceLimit::from_newtons(Some(v))
        }
    })
}

/// Run the command and return what to print.
pub fn run(
    design: &Design,
    analysis: &Analysis,
    torque: &str,
    state: Option<&str>,
    side: Option<&str>,
    json: bool,
) -> Result<String> {
    let tau = parse_torque(torque)?;
    let st = pick_state(analysis, state)?;
    let e = analysis::effectiveness(design, &st.mass, &st.ports).map_err(|e| anyhow!(e))?;
    let rule = side_force(side)?;
    let tol = Tolerances::default();
    let mut alloc = MinGasAllocator::new(&e, rule, &tol).map_err(|e| anyhow!("{e}"))?;
    let a = alloc.allocate(&tau).context("allocation failed")?;
    let saturated = a.status == AllocationStatus::Saturated;
    let why = portwright::allocation::saturation::limiter(&e, rule, &tau, &a, &tol);
    if json {
        let v = serde_json::json!({
            "layout": design.name,
            "state": st.name,
            "frame": "body axes: +x toward the nose; torques about the state's CG",
            "command_n_m": [tau.x, tau.y, tau.z],
            "achieved_torque_n_m": [a.torque.x, a.torque.y, a.torque.z],
            "side_force_n": [a.force.y, a.force.z],
            "axial_force_n": a.force.x,
            "gas_rate_kg_s": a.gas_rate_kg_s,
            "scale": a.scale,
            "saturated": saturated,
            "limited_by": why.code(),
            "duty": design.ports.iter().zip(&a.duty).map(|(p, d)| serde_json::json!({"port": p.name, "duty": d})).collect::<Vec<_>>(),
        });
        return Ok(serde_json::to_string_pretty(&v)? + "\n");
    }
    let names: Vec<String> = design.ports.iter().map(|p| p.name.clone()).collect();
    Ok(portwright::report::allocate::allocation_text(
        &design.name,
        &st.name,
        &tau,
        &a,
        &why,
        &names,
    ))
}
