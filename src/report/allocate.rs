//! What `allocate` prints: the command, what was produced, why a command was not
//! met, the side force (lateral y, z) and the axial force apart, gas use and the
//! duty cycles. Assembled here so the binary only prints it.

use super::signed;
use crate::allocation::saturation::Limiter;
use crate::allocation::Allocation;
use nalgebra::Vector3;
use std::fmt::Write;

/// The text of one allocation.
pub fn allocation_text(
    layout: &str,
    state: &str,
    command: &Vector3<f64>,
    a: &Allocation,
    why: &Limiter,
    port_names: &[String],
) -> String {
    let mn = |v: f64| signed(v * 1e3, 2).unwrap_or_else(|| "not finite".to_string());
    let n = |v: f64| signed(v, 3).unwrap_or_else(|| "not finite".to_string());
    let mut s = String::new();
    let _ = writeln!(
        s,
        "least-gas firing for {layout} at `{state}` (torques about the CG, body axes)"
    );
    let _ = writeln!(
        s,
        "command   roll {}  pitch {}  yaw {} mN m",
        mn(command.x),
        mn(command.y),
        mn(command.z)
    );
    let _ = writeln!(
        s,
        "achieved  roll {}  pitch {}  yaw {} mN m",
        mn(a.torque.x),
        mn(a.torque.y),
        mn(a.torque.z)
    );
    if let Some(line) = why.sentence() {
        let _ = writeln!(s, "{line}");
    }
    let _ = writeln!(
        s,
        "side force Fy {} N, Fz {} N; axial force Fx {} N; gas {:.3} g/s",
        n(a.force.y),
        n(a.force.z),
        n(a.force.x),
        a.gas_rate_kg_s * 1e3
    );
    for (p, d) in port_names.iter().zip(&a.duty) {
        let _ = writeln!(s, "  {:<14} duty {:>6.3}", p, d.max(0.0));
    }
    s
}
