//! The optimiser's merit: the worst authority margin over axes, senses and flight
//! states, computed without allocating.
//!
//! The largest torque along a unit axis e inside the zonotope Z = Σ[0, bᵢ] is
//! t = min over facet normals n with n·e > 0 of h(n)/(n·e), where h is the support
//! function h(n) = Σ max(0, n·bᵢ). For a full-rank zonotope the facet normals are
//! exactly the cross products bᵢ × bⱼ of generator pairs (and their negatives), so
//! the loop over pairs gives the exact ray limit; `allocation::zonotope` computes
//! the same limit from its facet list, and the tests compare the two.

use crate::model::{Design, Port};
use nalgebra::Vector3;

/// What the merit needs of one flight state, fixed while ports move.
#[derive(Debug, Clone)]
pub struct StateInputs {
    /// CG in the body frame, m.
    pub cg: Vector3<f64>,
    /// Torque required about roll, pitch, yaw, N·m.
    pub required_n_m: [f64; 3],
    /// Thrust of each port at this state, N.
    pub thrust_n: Vec<f64>,
}

/// Largest t with t·e in the zonotope of `columns`; 0 when the columns do not span
/// three dimensions (the optimiser treats lost control as the worst case).
pub fn ray_limit(columns: &[Vector3<f64>], e: &Vector3<f64>) -> f64 {
    let mut best = f64::INFINITY;
    let scale: f64 = columns.iter().map(|b| b.norm()).fold(0.0, f64::max);
    if scale == 0.0 {
        return 0.0;
    }
    // Cross products smaller than this are parallel generators (no facet of their own).
    let eps = 1e-12 * scale * scale;
    for i in 0..columns.len() {
        for j in (i + 1)..columns.len() {
            let n = columns[i].cross(&columns[j]);
            if n.norm() <= eps {
                continue;
            }
            let ne = n.dot(e);
            if ne.abs() <= eps * 1e-3 {
                continue;
            }
            let (mut hp, mut hn) = (0.0, 0.0);
            for b in columns {
                let d = n.dot(b);
                if d > 0.0 {
                    hp += d;
                } else {
                    hn -= d;
                }
            }
            let t = if ne > 0.0 { hp / ne } else { hn / -ne };
            best = best.min(t);
        }
    }
    if best.is_finite() {
        best
    } else {
        0.0
    }
}

/// Worst margin of `ports` over the states: min over states, axes and senses of
/// (largest torque along that axis sense) / (required torque). `columns` is scratch.
pub fn worst_margin(design: &Design, ports: &[Port], states: &[StateInputs], columns: &mut Vec<Vector3<f64>>) -> f64 {
    let radius = design.airframe.outer_radius_m();
    let mut worst = f64::INFINITY;
    for s in states {
        columns.clear();
        for (p, &t) in ports.iter().zip(&s.thrust_n) {
            let f = p.thrust_direction() * t;
            columns.push((p.position(radius) - s.cg).cross(&f));
        }
        for k in 0..3 {
            if s.required_n_m[k] <= 0.0 {
                continue;
            }
            let mut e = Vector3::zeros();
            e[k] = 1.0;
            let up = ray_limit(columns, &e);
            let down = ray_limit(columns, &(-e));
            worst = worst.min(up.min(down) / s.required_n_m[k]);
        }
    }
    worst
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::allocation::zonotope::Zonotope;
    use crate::allocation::Tolerances;
    use nalgebra::Matrix3xX;
    use proptest::prelude::*;

    proptest! {
        // The pair loop and the facet list of `allocation::zonotope` are two separate
        // computations of the same ray limit; 1e-9 relative is rounding of a few
        // hundred products of O(1) generators, so the floor is 1e-9 absolute.
        #[test]
        fn ray_limit_matches_the_zonotope_facets(cols in proptest::collection::vec((-1.0f64..1.0, -1.0f64..1.0, -1.0f64..1.0), 4..9), k in 0usize..6) {
            let columns: Vec<Vector3<f64>> = cols.iter().map(|&(a, b, c)| Vector3::new(a, b, c)).collect();
            let z = Zonotope::new(Matrix3xX::from_columns(&columns), &Tolerances::default()).unwrap();
            prop_assume!(z.rank() == 3);
            let mut e = Vector3::zeros();
            e[k % 3] = if k < 3 { 1.0 } else { -1.0 };
            let fast = ray_limit(&columns, &e);
            let exact = z.max_along(&e);
            prop_assert!((fast - exact).abs() <= 1e-9 * (exact.abs() + 1.0), "fast {fast} exact {exact}");
        }
    }

    #[test]
    fn four_radial_ports_give_a_box() {
        // Worked by hand: four ports at clocks 0/90/180/270 with arm L give torques
        // ±T·L about z and y only; with a roll couple pair added, the envelope is a
        // box and the ray limit along each axis is the single-port torque.
        let cols = vec![
            Vector3::new(0.0, 0.0, -0.5),
            Vector3::new(0.0, 0.5, 0.0),
            Vector3::new(0.0, 0.0, 0.5),
            Vector3::new(0.0, -0.5, 0.0),
            Vector3::new(0.02, 0.0, 0.0),
            Vector3::new(-0.02, 0.0, 0.0),
        ];
        assert!((ray_limit(&cols, &Vector3::new(0.0, 1.0, 0.0)) - 0.5).abs() < 1e-12);
        assert!((ray_limit(&cols, &Vector3::new(-1.0, 0.0, 0.0)) - 0.02).abs() < 1e-12);
    }
}
