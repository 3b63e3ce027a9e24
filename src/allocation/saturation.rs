//! Why a torque command was not met in full: the envelope, or the side-force limit.
//!
//! The least-gas allocator scales a command that is out of reach down along its
//! own direction. Two different things can set that scale: the attainable torque
//! set itself (the zonotope of the ports' torque columns), or, when the lateral
//! force is limited, the extra rule |F_y|, |F_z| ≤ L (or F_y = F_z = 0), which
//! shrinks the set further. A builder needs to know which, because the remedies
//! differ (more thrust or lever arm, against a looser side-force limit or ports
//! that pair into couples). The envelope's own limit along the command is an
//! exact ray intersection of the zonotope, so the comparison needs no second LP.

use super::{Allocation, AllocationStatus, Effectiveness, SideForceLimit, Tolerances, Zonotope};
use nalgebra::Vector3;

/// Relative difference between the allocator's scale and the envelope's ray
/// limit below which both are taken as the same limit (the two come from
/// different arithmetic, a simplex and facet offsets, and agree to about 1e-12;
/// 1e-7 is far above that and far below any difference a builder would act on).
pub const SAME_LIMIT_RELATIVE: f64 = 1e-7;

/// What stopped a command.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Limiter {
    /// The command was met in full.
    Met,
    /// The command is outside the attainable torque set; `scale` of it is produced.
    Envelope {
        /// Fraction of the command produced.
        scale: f64,
    },
    /// The side-force limit, not the envelope, stopped the command.
    SideForce {
        /// Fraction of the command produced under the limit.
        scale: f64,
        /// Fraction the envelope alone would allow (1 when the command is inside it).
        envelope_scale: f64,
        /// The limit in force.
        limit: SideForceLimit,
    },
}

/// Decide what stopped `a`, the allocation of `command` under `side`.
pub fn limiter(
    e: &Effectiveness,
    side: SideForceLimit,
    command: &Vector3<f64>,
    a: &Allocation,
    tol: &Tolerances,
) -> Limiter {
    if a.status == AllocationStatus::Exact {
        return Limiter::Met;
    }
    if side == SideForceLimit::Free {
        return Limiter::Envelope { scale: a.scale };
    }
    let Ok(z) = Zonotope::torque(e, tol) else {
        return Limiter::Envelope { scale: a.scale };
    };
    let envelope_scale = z.max_along(command).min(1.0);
    if a.scale < envelope_scale * (1.0 - SAME_LIMIT_RELATIVE) {
        Limiter::SideForce {
            scale: a.scale,
            envelope_scale,
            limit: side,
        }
    } else {
        Limiter::Envelope { scale: a.scale }
    }
}

impl Limiter {
    /// The sentence a report prints, or `None` when the command was met.
    pub fn sentence(&self) -> Option<String> {
        match *self {
            Limiter::Met => None,
            Limiter::Envelope { scale } => Some(format!(
                "SATURATED: the command is outside the torque envelope; {:.1} % of it is produced, in the same direction",
                scale * 100.0
            )),
            Limiter::SideForce {
                scale,
                envelope_scale,
                limit,
            } => {
                let rule = match limit {
                    SideForceLimit::Bounded { limit_n } => format!(
                        "keeping the side force within {limit_n:.3} N (|Fy| and |Fz| each)"
                    ),
                    _ => "making pure couples (no side force)".to_string(),
                };
                let envelope = if envelope_scale >= 1.0 {
                    "the command is inside the torque envelope".to_string()
                } else {
                    format!(
                        "the envelope alone would allow {:.1} % of it",
                        envelope_scale * 100.0
                    )
                };
                Some(format!(
                    "SATURATED by the side-force limit, not the envelope: {rule} allows only {:.1} % of the command, in the same direction; {envelope}",
                    scale * 100.0
                ))
            }
        }
    }

    /// A short machine-readable name: `met`, `envelope` or `side_force`.
    pub fn code(&self) -> &'static str {
        match self {
            Limiter::Met => "met",
            Limiter::Envelope { .. } => "envelope",
            Limiter::SideForce { .. } => "side_force",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::allocation::{MinGasAllocator, PortGeometry};

    /// Two roll ports that both push toward +z (so roll always costs side force),
    /// and pitch and yaw pairs whose members cancel each other's force only when
    /// they also cancel each other's torque; all 1 N. Closed forms in the tests.
    fn ports() -> Effectiveness {
        let port = |name: &str, p: Vector3<f64>, d: Vector3<f64>| PortGeometry {
            name: name.into(),
            position_m: p,
            direction: d,
            thrust_n: 1.0,
            mass_flow_kg_s: 1e-3,
        };
        Effectiveness::from_ports(&[
            // +roll 27 mN m with +1 N of Fz.
            port("roll+", Vector3::new(0.0, 0.027, 0.0), Vector3::z()),
            // −roll 27 mN m with +1 N of Fz.
            port("roll-", Vector3::new(0.0, -0.027, 0.0), Vector3::z()),
            // Pitch and yaw pushers 0.3 m from the CG, to make the set full.
            port("p+", Vector3::new(0.3, 0.0, 0.0), -Vector3::z()),
            port("p-", Vector3::new(0.3, 0.0, 0.0), Vector3::z()),
            port("y+", Vector3::new(0.3, 0.0, 0.0), Vector3::y()),
            port("y-", Vector3::new(0.3, 0.0, 0.0), -Vector3::y()),
        ])
        .unwrap()
    }

    #[test]
    fn side_force_limit_is_named_when_it_is_what_stops_a_roll_command() {
        let e = ports();
        let tol = Tolerances::default();
        // 20 mN m of roll: inside the envelope (roll+ alone gives 27 mN m).
        let cmd = Vector3::new(0.020, 0.0, 0.0);
        // Limit 0.5 N. Roll from roll+ at duty u costs u N of Fz; the pitch pair
        // can cancel it only by adding pitch torque, which the command forbids, so
        // by hand u ≤ 0.5 and roll ≤ 13.5 mN m: scale 13.5/20 = 0.675.
        let side = SideForceLimit::Bounded { limit_n: 0.5 };
        let mut alloc = MinGasAllocator::new(&e, side, &tol).unwrap();
        let a = alloc.allocate(&cmd).unwrap();
        let l = limiter(&e, side, &cmd, &a, &tol);
        match l {
            Limiter::SideForce {
                scale,
                envelope_scale,
                ..
            } => {
                // 1e-9: the simplex solves this to rounding.
                assert!((scale - 0.675).abs() < 1e-9, "{scale}");
                assert_eq!(envelope_scale, 1.0);
            }
            other => panic!("{other:?}"),
        }
        let text = l.sentence().unwrap();
        assert!(
            text.contains("side-force limit, not the envelope"),
            "{text}"
        );
        assert!(
            text.contains("67.5 %") && text.contains("inside the torque envelope"),
            "{text}"
        );
        // Without the limit the same command is met.
        let mut free = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).unwrap();
        let a = free.allocate(&cmd).unwrap();
        assert_eq!(
            limiter(&e, SideForceLimit::Free, &cmd, &a, &tol),
            Limiter::Met
        );
    }

    #[test]
    fn the_envelope_is_named_when_it_is_what_stops_a_command() {
        let e = ports();
        let tol = Tolerances::default();
        // 54 mN m of roll: twice what roll+ gives, outside the envelope; with no
        // limit the scale is 27/54 = 0.5 and the envelope is the cause.
        let cmd = Vector3::new(0.054, 0.0, 0.0);
        let mut alloc = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).unwrap();
        let a = alloc.allocate(&cmd).unwrap();
        let l = limiter(&e, SideForceLimit::Free, &cmd, &a, &tol);
        assert!(
            matches!(l, Limiter::Envelope { scale } if (scale - 0.5).abs() < 1e-9),
            "{l:?}"
        );
        assert!(l
            .sentence()
            .unwrap()
            .contains("outside the torque envelope"));
        // A limit loose enough not to bind (2 N > the 1 N roll+ makes) leaves the
        // envelope as the cause.
        let side = SideForceLimit::Bounded { limit_n: 2.0 };
        let mut alloc = MinGasAllocator::new(&e, side, &tol).unwrap();
        let a = alloc.allocate(&cmd).unwrap();
        assert!(matches!(
            limiter(&e, side, &cmd, &a, &tol),
            Limiter::Envelope { .. }
        ));
        // A tight limit below the envelope's own 50 % is named, with both numbers.
        let side = SideForceLimit::Bounded { limit_n: 0.25 };
        let mut alloc = MinGasAllocator::new(&e, side, &tol).unwrap();
        let a = alloc.allocate(&cmd).unwrap();
        let l = limiter(&e, side, &cmd, &a, &tol);
        // By hand: u ≤ 0.25, roll 6.75 mN m of 54: 12.5 %; the envelope allows 50 %.
        let text = l.sentence().unwrap();
        assert!(
            text.contains("12.5 %") && text.contains("would allow 50.0 %"),
            "{text}"
        );
    }
}
