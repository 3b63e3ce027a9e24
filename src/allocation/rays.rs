//! Ray limits of the torque set under a side-force limit, for scoring many layouts.
//!
//! Without a side-force rule the attainable torques form a zonotope and the ray
//! limit has a closed form (`analysis::score::ray_limit`). With the rule
//! |F_y| ≤ L, |F_z| ≤ L the set is the image of the box cut by four half-spaces,
//! no longer a zonotope, so each ray limit is a small LP:
//!
//! ```text
//! maximise t   subject to   Σ bᵢ uᵢ − t e = 0,   Σ f⊥ᵢ uᵢ − w = 0,
//!                           0 ≤ uᵢ ≤ 1,  0 ≤ t ≤ t_max,  −L ≤ w ≤ L
//! ```
//!
//! with bᵢ the torque and f⊥ᵢ = (F_y, F_z) the lateral force of port i at full
//! duty. t_max = Σ|bᵢ| can never bind (|B u| ≤ Σ|bᵢ|), so the program is bounded,
//! and u = 0, t = 0, w = 0 is always feasible.
//!
//! [`LimitedRays`] keeps one [`BoundedSimplex`] for a fixed port count; loading a
//! new layout overwrites its columns, and each ray solve starts from the previous
//! basis, so scoring a layout allocates nothing. Rows are scaled to order one as
//! in [`super::mingas`].

use super::mingas::positive_or_one;
use super::simplex::{BoundedSimplex, SimplexError, Start};
use super::{SideForceLimit, Tolerances};
use nalgebra::Vector3;

/// Reusable LP for side-force-limited ray limits of one layout at a time.
#[derive(Debug, Clone)]
pub struct LimitedRays {
    lp: BoundedSimplex,
    n: usize,
    limit_n: f64,
    torque_scale: f64,
    loaded: bool,
}

impl LimitedRays {
    /// Workspace for `ports` ports under `side` (`Free` is accepted and behaves as
    /// an unreachable limit, which is slower than the closed form but equal to it).
    pub fn new(ports: usize, side: SideForceLimit) -> Result<Self, SimplexError> {
        let limit_n = match side {
            SideForceLimit::Free => f64::INFINITY,
            SideForceLimit::PureCouple => 0.0,
            SideForceLimit::Bounded { limit_n } => limit_n,
        };
        if limit_n.is_nan() || limit_n < 0.0 {
            return Err(SimplexError::BadBounds {
                index: ports + 1,
                lower: -limit_n,
                upper: limit_n,
            });
        }
        let mut lp = BoundedSimplex::new(5, ports + 3, Tolerances::default());
        lp.set_cost(ports, -1.0);
        lp.set_entry(3, ports + 1, -1.0);
        lp.set_entry(4, ports + 2, -1.0);
        Ok(Self {
            lp,
            n: ports,
            limit_n,
            torque_scale: 1.0,
            loaded: false,
        })
    }

    /// Number of ports this workspace was built for.
    pub fn ports(&self) -> usize {
        self.n
    }

    /// Load a layout: torque columns (N·m) and lateral forces (F_y, F_z) in N at
    /// full duty, one per port. Extra entries beyond the port count are ignored.
    pub fn load(
        &mut self,
        torques: &[Vector3<f64>],
        lateral: &[(f64, f64)],
    ) -> Result<(), SimplexError> {
        let n = self.n;
        let torque_scale = positive_or_one(
            torques
                .iter()
                .take(n)
                .flat_map(|b| b.iter().map(|v| v.abs()))
                .fold(0.0, f64::max),
        );
        let force_scale = positive_or_one(
            lateral
                .iter()
                .take(n)
                .map(|f| f.0.abs().max(f.1.abs()))
                .fold(0.0, f64::max),
        );
        let mut reach = 0.0;
        for i in 0..n {
            let b = torques.get(i).copied().unwrap_or_else(Vector3::zeros) / torque_scale;
            let f = lateral.get(i).copied().unwrap_or((0.0, 0.0));
            self.lp
                .set_column(i, &[b.x, b.y, b.z, f.0 / force_scale, f.1 / force_scale]);
            reach += b.norm();
        }
        self.lp.set_bounds(n, 0.0, reach + 1.0)?;
        let w = if self.limit_n.is_finite() {
            self.limit_n / force_scale
        } else {
            // Σ|f⊥ᵢ|/scale ≤ n·√2: a bound the lateral force can never reach.
            2.0 * n as f64 + 1.0
        };
        self.lp.set_bounds(n + 1, -w, w)?;
        self.lp.set_bounds(n + 2, -w, w)?;
        self.torque_scale = torque_scale;
        self.loaded = true;
        Ok(())
    }

    /// Largest t ≥ 0 with t·`dir` attainable under the side-force rule, N·m per unit
    /// of |dir|. 0 before a layout is loaded.
    pub fn ray_limit(&mut self, dir: &Vector3<f64>) -> Result<f64, SimplexError> {
        if !self.loaded {
            return Ok(0.0);
        }
        let t = self.n;
        for r in 0..3 {
            self.lp.set_entry(r, t, -dir[r]);
        }
        match self.lp.solve(Start::Warm) {
            Ok(_) => Ok(()),
            // A warm basis that went numerically bad gets one cold retry.
            Err(SimplexError::SingularBasis) | Err(SimplexError::IterationLimit(_)) => {
                self.lp.solve(Start::Cold).map(|_| ())
            }
            Err(e) => Err(e),
        }?;
        Ok(self.lp.value(t).max(0.0) * self.torque_scale)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::allocation::lp;
    use crate::allocation::testkit::{port_at, random_layout, Rng};
    use crate::allocation::{Effectiveness, Zonotope};
    use approx::assert_relative_eq;

    fn columns(e: &Effectiveness) -> (Vec<Vector3<f64>>, Vec<(f64, f64)>) {
        let t = (0..e.len())
            .map(|i| e.torque().column(i).into_owned())
            .collect();
        let f = (0..e.len())
            .map(|i| (e.force()[(1, i)], e.force()[(2, i)]))
            .collect();
        (t, f)
    }

    #[test]
    fn matches_microlp_on_random_layouts() {
        // Reference: the same LP through good_lp/microlp (an independent solver),
        // `lp::max_along`. microlp is accurate to about 1e-9 on these programs.
        let mut rng = Rng(77);
        let mut rays = LimitedRays::new(7, SideForceLimit::PureCouple).unwrap();
        for case in 0..12 {
            let e = random_layout(&mut rng, 7);
            for side in [
                SideForceLimit::Bounded {
                    limit_n: 0.1 + 0.1 * case as f64,
                },
                SideForceLimit::PureCouple,
            ] {
                let mut r = LimitedRays::new(7, side).unwrap();
                let (t, f) = columns(&e);
                r.load(&t, &f).unwrap();
                if side == SideForceLimit::PureCouple {
                    rays.load(&t, &f).unwrap();
                }
                for _ in 0..6 {
                    let d = rng.unit();
                    let want = lp::max_along(&e, &d, side).expect("solves");
                    let got = r.ray_limit(&d).unwrap();
                    assert_relative_eq!(got, want, max_relative = 1e-8, epsilon = 1e-10);
                    if side == SideForceLimit::PureCouple {
                        // The same workspace reused across layouts gives the same answer.
                        let again = rays.ray_limit(&d).unwrap();
                        assert_relative_eq!(again, want, max_relative = 1e-8, epsilon = 1e-10);
                    }
                }
            }
        }
    }

    #[test]
    fn free_rule_equals_the_zonotope() {
        // With no side-force rule the LP ray limit is the zonotope's (facet list of
        // `allocation::zonotope`), to solver rounding.
        let mut rng = Rng(5);
        let e = random_layout(&mut rng, 8);
        let z = Zonotope::torque(&e, &Tolerances::default()).unwrap();
        let mut r = LimitedRays::new(8, SideForceLimit::Free).unwrap();
        let (t, f) = columns(&e);
        r.load(&t, &f).unwrap();
        for _ in 0..20 {
            let d = rng.unit();
            assert_relative_eq!(
                r.ray_limit(&d).unwrap(),
                z.max_along(&d),
                max_relative = 1e-9,
                epsilon = 1e-12
            );
        }
    }

    #[test]
    fn radial_pair_at_one_station_by_hand() {
        // Worked by hand: two radial ports at the same station 0.4 m aft of the CG,
        // clocks 90° and 270°, thrust 1 N each. Firing one at duty u gives a side
        // force u N and a pitch torque 0.4·u N·m, so under |F| ≤ L the pitch limit
        // is 0.4·min(1, L); a pure couple is impossible (limit 0).
        let ports = [
            port_at("a", -0.4, 0.027, 90f64.to_radians(), -Vector3::z(), 1.0),
            port_at("b", -0.4, 0.027, 270f64.to_radians(), Vector3::z(), 1.0),
        ];
        let e = Effectiveness::from_ports(&ports).unwrap();
        let (t, f) = columns(&e);
        for (side, want) in [
            (SideForceLimit::Free, 0.4),
            (SideForceLimit::Bounded { limit_n: 0.25 }, 0.1),
            (SideForceLimit::Bounded { limit_n: 3.0 }, 0.4),
            (SideForceLimit::PureCouple, 0.0),
        ] {
            let mut r = LimitedRays::new(2, side).unwrap();
            r.load(&t, &f).unwrap();
            for sense in [1.0, -1.0] {
                let got = r.ray_limit(&(Vector3::y() * sense)).unwrap();
                assert_relative_eq!(got, want, epsilon = 1e-12);
            }
        }
        assert!(LimitedRays::new(2, SideForceLimit::Bounded { limit_n: -1.0 }).is_err());
    }
}
