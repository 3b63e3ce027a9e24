//! Can a port's hole be drilled through the body-tube wall as specified?
//!
//! A hole is a straight cylinder of diameter d along the drill axis, which runs
//! from the hole centre on the outer surface (radius Ro) into the tube along −e,
//! e being the exhaust direction of the README's Conventions:
//! e = n·cos t·cos a − r̂·sin t·cos a − x̂·sin a.
//!
//! Seen along the body axis, the drill axis leaves the point Ro·n in the
//! direction (cos t, −sin t) of the (n, r̂) plane (scaled by cos a): the axial cant
//! only stretches the path along the tube and does not change this picture, as
//! long as |a| < 90°. The line's closest approach to the tube axis is Ro·|sin t|,
//! so the drill axis reaches the bore (radius Ri) only if Ro·|sin t| < Ri. The
//! hole's own surface lines are the axis shifted by up to d/2 along
//! w = n·sin t + r̂·cos t (perpendicular to the drill axis), and their closest
//! approach is |Ro·sin t ± d/2|. The whole hole opens into the bore when
//!
//!   Ro·|sin t| + d/2 < Ri,  i.e.  |t| < asin((Ri − d/2) / Ro),
//!
//! which also says the hole must be narrower than the bore (t = 0: d < 2·Ri).
//! This is the through-wall limit; it depends on the tube and the hole, not on
//! the axial cant, which needs only |a| < 90°.

use crate::model::{Airframe, Port};

/// Why a hole cannot be drilled as specified.
#[derive(Debug, Clone, PartialEq)]
pub enum DrillProblem {
    /// The hole is at least as wide as the bore.
    WiderThanBore {
        /// Hole diameter, m.
        hole_m: f64,
        /// Inner diameter of the tube, m.
        inner_diameter_m: f64,
    },
    /// The tangential cant is past the through-wall limit.
    MissesBore {
        /// The cant asked for, rad.
        tangential_cant_rad: f64,
        /// The largest |tangential cant| that still opens the whole hole into the bore, rad.
        limit_rad: f64,
    },
    /// The axial cant is ±90° or beyond: the drill axis never enters the wall.
    AxialTooSteep {
        /// The cant asked for, rad.
        axial_cant_rad: f64,
    },
}

impl std::fmt::Display for DrillProblem {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match *self {
            DrillProblem::WiderThanBore {
                hole_m,
                inner_diameter_m,
            } => write!(
                f,
                "a {:.2} mm hole cannot be drilled into a {:.2} mm bore: the hole must be narrower than the tube's inner diameter",
                hole_m * 1e3,
                inner_diameter_m * 1e3
            ),
            DrillProblem::MissesBore {
                tangential_cant_rad,
                limit_rad,
            } => write!(
                f,
                "at {:.1} deg the hole does not pass through the wall into the bore; the through-wall limit for this tube and hole is ±{:.1} deg (|t| < asin((Ri − d/2)/Ro))",
                tangential_cant_rad.to_degrees(),
                limit_rad.to_degrees()
            ),
            DrillProblem::AxialTooSteep { axial_cant_rad } => write!(
                f,
                "at {:.1} deg the drill axis runs along the tube and never enters the wall: expected an axial cant between -90 deg and 90 deg, not including either",
                axial_cant_rad.to_degrees()
            ),
        }
    }
}

/// The largest |tangential cant| at which a hole of `hole_m` still opens fully
/// into the bore: asin((Ri − d/2)/Ro), rad. `None` when the hole is not narrower
/// than the bore.
pub fn through_wall_limit_rad(
    outer_radius_m: f64,
    inner_radius_m: f64,
    hole_m: f64,
) -> Option<f64> {
    let reach = inner_radius_m - hole_m / 2.0;
    if reach > 0.0 && outer_radius_m > 0.0 {
        Some((reach / outer_radius_m).min(1.0).asin())
    } else {
        None
    }
}

/// Check one port's hole against the tube wall.
pub fn check(airframe: &Airframe, port: &Port) -> Result<(), DrillProblem> {
    let d = port.nozzle.hole_diameter_m();
    if port.axial_cant_rad.abs() >= std::f64::consts::FRAC_PI_2 {
        return Err(DrillProblem::AxialTooSteep {
            axial_cant_rad: port.axial_cant_rad,
        });
    }
    let Some(limit) = through_wall_limit_rad(
        airframe.outer_radius_m(),
        airframe.inner_diameter_m / 2.0,
        d,
    ) else {
        return Err(DrillProblem::WiderThanBore {
            hole_m: d,
            inner_diameter_m: airframe.inner_diameter_m,
        });
    };
    if port.tangential_cant_rad.abs() >= limit {
        return Err(DrillProblem::MissesBore {
            tangential_cant_rad: port.tangential_cant_rad,
            limit_rad: limit,
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::Vector3;

    /// Closest approach to the body axis (x) of the line p + s·u, by brute force
    /// over s: an independent check of Ro·|sin t| + d/2 that does not use the
    /// closed form.
    fn closest_to_axis(p: Vector3<f64>, u: Vector3<f64>) -> f64 {
        (0..=400_000)
            .map(|k| {
                let q = p + u * (k as f64 * 1e-7);
                q.y.hypot(q.z)
            })
            .fold(f64::INFINITY, f64::min)
    }

    fn port(clock_deg: f64, tang_deg: f64, axial_deg: f64, hole_m: f64) -> Port {
        Port {
            name: "p".into(),
            station_m: 0.5,
            clock_rad: clock_deg.to_radians(),
            tangential_cant_rad: tang_deg.to_radians(),
            axial_cant_rad: axial_deg.to_radians(),
            nozzle: crate::model::NozzleSpec::Hole {
                diameter_m: hole_m,
                discharge_coefficient: 0.85,
            },
        }
    }

    // The closed form against a brute-force walk down the drill axis and the
    // hole's extreme surface line, for several clocks and axial cants: the hole's
    // farthest line from the tube axis comes within Ri exactly at the limit.
    #[test]
    fn limit_matches_a_walk_down_the_hole() {
        let (ro, ri, d) = (0.027, 0.0255, 0.0016);
        let limit = through_wall_limit_rad(ro, ri, d).unwrap();
        // Hand value: asin((25.5 − 0.8)/27) = asin(0.914815) = 66.18° (computed
        // with a pocket calculator; 0.01° covers its display).
        assert!(
            (limit.to_degrees() - 66.18).abs() < 0.01,
            "{}",
            limit.to_degrees()
        );
        for clock in [0.0, 37.0, 200.0] {
            for axial in [0.0, 25.0, -40.0] {
                let p = port(clock, limit.to_degrees(), axial, d);
                let centre = p.position(ro);
                let u = -p.exhaust_direction();
                // w = n sin t + r̂ cos t is perpendicular to the drill axis; the
                // line shifted by +d/2 along w is the one farthest from the axis.
                let t = p.tangential_cant_rad;
                let w = p.normal() * t.sin() + p.roll_tangent() * t.cos();
                assert!(w.dot(&u).abs() < 1e-12);
                let far = closest_to_axis(centre + w * (d / 2.0), u);
                // Sampling every 0.1 µm along the line: 1e-7 m covers the step.
                assert!(
                    (far - ri).abs() < 1e-7,
                    "clock {clock} axial {axial}: {far}"
                );
                let axis_line = closest_to_axis(centre, u);
                assert!((axis_line - ro * t.sin()).abs() < 1e-7);
            }
        }
    }

    #[test]
    fn holes_are_judged_by_the_limit() {
        let a = Airframe {
            outer_diameter_m: 0.054,
            inner_diameter_m: 0.050,
            tube_length_m: 1.0,
            tube_mass_kg: 0.0,
            nose: crate::model::Nose {
                length_m: 0.2,
                shape: crate::model::NoseShape::Ogive,
                mass_kg: 0.0,
            },
            fins: None,
            keep_outs: Vec::new(),
        };
        let ro = a.outer_radius_m();
        let ri = a.inner_diameter_m / 2.0;
        let d = 0.0012;
        let limit = through_wall_limit_rad(ro, ri, d).unwrap().to_degrees();
        assert!(check(&a, &port(45.0, limit - 0.1, 30.0, d)).is_ok());
        assert!(check(&a, &port(45.0, -(limit - 0.1), -30.0, d)).is_ok());
        assert!(matches!(
            check(&a, &port(45.0, limit + 0.1, 0.0, d)),
            Err(DrillProblem::MissesBore { .. })
        ));
        assert!(matches!(
            check(&a, &port(45.0, 0.0, 0.0, a.inner_diameter_m)),
            Err(DrillProblem::WiderThanBore { .. })
        ));
        assert!(matches!(
            check(&a, &port(45.0, 0.0, 90.0, d)),
            Err(DrillProblem::AxialTooSteep { .. })
        ));
    }
}
