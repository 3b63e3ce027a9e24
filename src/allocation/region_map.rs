//! The exact minimum-gas map as a piecewise-linear function of the command.
//!
//! In the minimum-gas LP (no side-force rows) a basis is three ports whose
//! torque columns B_β are independent. Its reduced costs dⱼ = ṁⱼ − yᵀbⱼ, with
//! yᵀ = ṁ_βᵀ B_β⁻¹, do not depend on the command, so each basis fixes which other
//! ports sit at 1 (dⱼ < 0) and which at 0 (dⱼ > 0), and then
//!
//! ```text
//! u_β = B_β⁻¹ (τ − Σ_{j at 1} bⱼ) = M τ + m,   region: 0 ≤ M τ + m ≤ 1  (six inequalities)
//! ```
//!
//! Every independent triple therefore gives exactly one optimal region, a
//! parallelepiped, and the regions of all triples tile the attainable set: this
//! is the regular tiling of the zonotope lifted by the gas costs. The map below
//! enumerates every triple instead of sampling, so it is complete by
//! construction. Ties (dⱼ = 0, common with symmetric layouts and equal flows) are
//! broken by a fixed small perturbation of the costs, which keeps the tiles from
//! overlapping without changing the optimal gas. Completeness is checked in the
//! tests two ways: the region volumes |det B_β| add up to the zonotope volume,
//! and random commands fall in exactly one region whose evaluation matches the
//! simplex's least gas.
//!
//! Outside the envelope the command is scaled down along its direction to the
//! zonotope boundary (ray intersection with the facets), as the allocator does.
//!
//! Fewer than three axes. A vehicle without roll jets (or with roll jets only)
//! has torque columns that span only some of the body axes. The map is then built
//! on the axes the ports span ([`RegionMap::axes`]): a basis is as many ports as
//! there are spanned axes, each region a parallelogram (or a segment) in those
//! axes, and the components of a command on the other axes are dropped before the
//! map is evaluated, since no port can produce them. To keep one shape for every
//! case, a basis of r < 3 ports is padded with the unit vectors of the unspanned
//! axes; the rows of M that belong to the padding are set to zero. The spanned
//! axes are those whose torque row is not zero to the rank threshold; rows below
//! that threshold are set to exactly zero. When the columns span a plane or line
//! that is not made of body axes (a tilted span), the map is refused.

use super::zonotope::{Zonotope, ZonotopeError};
use super::{Allocation, AllocationStatus, Effectiveness, Tolerances};
use nalgebra::{Matrix3, Vector3};
use thiserror::Error;

/// Problems building or using the region map.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum RegionMapError {
    /// No port makes any torque.
    #[error("no port makes any torque, so there is no duty-cycle map")]
    NoTorque,
    /// The torque columns span directions that are not body axes.
    #[error(
        "the port torques span {rank} directions that are not body axes (the {axes} rows \
         are not zero); the duty-cycle map needs ports that span whole body axes"
    )]
    TiltedSpan {
        /// Rank of the torque columns.
        rank: usize,
        /// The axes with a non-zero torque row, in words.
        axes: String,
    },
    /// The zonotope could not be built.
    #[error(transparent)]
    Zonotope(#[from] ZonotopeError),
    /// A command (after scaling) fell in no region; only rounding at region
    /// boundaries can cause this, and it means the slack is too tight.
    #[error("command ({0}, {1}, {2}) N·m fell in no region")]
    NotCovered(f64, f64, f64),
    /// The command has a NaN or infinite component.
    #[error("the torque command is not finite")]
    BadCommand,
}

/// One region of constant optimal basis.
#[derive(Debug, Clone, PartialEq)]
pub struct Region {
    /// The basic (fractional) ports, one per spanned axis.
    pub ports: Vec<usize>,
    /// M = B_β⁻¹: duty of basic port k is row k of M times τ plus `offset`[k];
    /// rows beyond the basic ports, and columns of unspanned axes, are zero.
    pub map: Matrix3<f64>,
    /// m = −M Σ_{j at 1} bⱼ.
    pub offset: Vector3<f64>,
    /// Non-basic ports held at duty 1.
    pub full_on: Vec<usize>,
    /// Reduced cost of every port (zero for the basic ones), kg/s per unit duty:
    /// the optimality certificate. Negative for `full_on`, otherwise ≥ 0.
    pub reduced_costs: Vec<f64>,
    /// |det B_β| over the spanned axes.
    volume: f64,
}

impl Region {
    /// Duty cycles of the basic ports for command `tau` (zero beyond them).
    pub fn basic_duty(&self, tau: &Vector3<f64>) -> Vector3<f64> {
        self.map * tau + self.offset
    }

    /// The region as A τ ≤ c (six rows: −Mτ ≤ m and Mτ ≤ 1 − m).
    pub fn inequalities(&self) -> ([Vector3<f64>; 6], [f64; 6]) {
        let r = |k: usize| -> Vector3<f64> { self.map.row(k).transpose() };
        (
            [-r(0), -r(1), -r(2), r(0), r(1), r(2)],
            [
                self.offset[0],
                self.offset[1],
                self.offset[2],
                1.0 - self.offset[0],
                1.0 - self.offset[1],
                1.0 - self.offset[2],
            ],
        )
    }

    /// Volume of the region in the spanned axes, |det B_β| ((N·m)³, or area
    /// (N·m)² and length N·m with fewer axes).
    pub fn volume(&self) -> f64 {
        self.volume
    }

    fn contains(&self, tau: &Vector3<f64>, slack: f64) -> bool {
        let u = self.basic_duty(tau);
        u.iter().all(|v| *v >= -slack && *v <= 1.0 + slack)
    }
}

/// The complete piecewise-linear minimum-gas map of one effectiveness matrix.
#[derive(Debug, Clone)]
pub struct RegionMap {
    e: Effectiveness,
    axes: Vec<usize>,
    zonotope: Zonotope,
    regions: Vec<Region>,
    tol: Tolerances,
}

/// Axis indices in words ("pitch and yaw").
pub fn axis_words(axes: &[usize]) -> String {
    let names: Vec<&str> = axes.iter().map(|&a| ["roll", "pitch", "yaw"][a]).collect();
    match names.len() {
        0 => "no".to_string(),
        1 => names[0].to_string(),
        k => format!("{} and {}", names[..k - 1].join(", "), names[k - 1]),
    }
}

/// Every ascending choice of `k` of `0..n`, in lexicographic order.
fn combinations(n: usize, k: usize) -> Vec<Vec<usize>> {
    let mut out = Vec::new();
    let mut pick: Vec<usize> = (0..k).collect();
    if k == 0 || k > n {
        return out;
    }
    loop {
        out.push(pick.clone());
        let Some(i) = (0..k).rev().find(|&i| pick[i] < n - k + i) else {
            return out;
        };
        pick[i] += 1;
        for j in i + 1..k {
            pick[j] = pick[j - 1] + 1;
        }
    }
}

/// Deterministic tie-break weights: fractional parts of multiples of the golden
/// ratio, all distinct, used only when a reduced cost is zero to rounding.
fn tie_weight(j: usize) -> f64 {
    ((j as f64 + 1.0) * 0.618_033_988_749_894_9).fract() + 0.5
}

impl RegionMap {
    /// Enumerates every basis (one port per spanned axis) and its optimal region.
    pub fn new(e: &Effectiveness, tol: &Tolerances) -> Result<Self, RegionMapError> {
        let full = Zonotope::torque(e, tol)?;
        let rank = full.rank();
        if rank == 0 {
            return Err(RegionMapError::NoTorque);
        }
        let floor = tol.rank * full.scale();
        let axes: Vec<usize> = (0..3)
            .filter(|&a| e.torque().row(a).amax() > floor)
            .collect();
        if axes.len() != rank {
            return Err(RegionMapError::TiltedSpan {
                rank,
                axes: axis_words(&axes),
            });
        }
        let mut b = e.torque().clone();
        for a in (0..3).filter(|a| !axes.contains(a)) {
            b.row_mut(a).fill(0.0);
        }
        let zonotope = Zonotope::new(b.clone(), tol)?;
        let padding: Vec<Vector3<f64>> = (0..3)
            .filter(|a| !axes.contains(a))
            .map(|a| {
                let mut v = Vector3::zeros();
                v[a] = 1.0;
                v
            })
            .collect();
        let n = e.len();
        let c = e.mass_flow_kg_s();
        let det_floor = tol.rank * zonotope.scale().powi(rank as i32);
        let cost_floor = tol.optimality * c.max().max(f64::MIN_POSITIVE);
        let mut regions = Vec::new();
        for ports in combinations(n, rank) {
            let mut cols: Vec<Vector3<f64>> = ports.iter().map(|&i| b.column(i).into()).collect();
            cols.extend(padding.iter().copied());
            let bb = Matrix3::from_columns(&cols);
            if bb.determinant().abs() <= det_floor {
                continue;
            }
            let Some(mut m) = bb.try_inverse() else {
                continue;
            };
            for k in rank..3 {
                m.row_mut(k).fill(0.0);
            }
            let basic_costs = Vector3::from_fn(|k, _| if k < rank { c[ports[k]] } else { 0.0 });
            let basic_ties =
                Vector3::from_fn(|k, _| if k < rank { tie_weight(ports[k]) } else { 0.0 });
            let y = m.transpose() * basic_costs;
            let yw = m.transpose() * basic_ties;
            let mut full_on = Vec::new();
            let mut reduced = vec![0.0; n];
            let mut sum_on = Vector3::zeros();
            for l in 0..n {
                if ports.contains(&l) {
                    continue;
                }
                let bl = b.column(l);
                let d = c[l] - y.dot(&bl);
                reduced[l] = d;
                let on = if d.abs() > cost_floor {
                    d < 0.0
                } else {
                    tie_weight(l) - yw.dot(&bl) < 0.0
                };
                if on {
                    full_on.push(l);
                    sum_on += bl;
                }
            }
            regions.push(Region {
                ports,
                map: m,
                offset: -(m * sum_on),
                full_on,
                reduced_costs: reduced,
                volume: bb.determinant().abs(),
            });
        }
        Ok(Self {
            e: e.clone(),
            axes,
            zonotope,
            regions,
            tol: tol.clone(),
        })
    }

    /// The body axes the map follows (0 roll, 1 pitch, 2 yaw), ascending; all three
    /// unless the ports span fewer. Command components on other axes are dropped.
    pub fn axes(&self) -> &[usize] {
        &self.axes
    }

    /// All regions.
    pub fn regions(&self) -> &[Region] {
        &self.regions
    }

    /// The torque zonotope used for scaling outside the envelope (of the port
    /// torques with the rows of unspanned axes set to zero).
    pub fn zonotope(&self) -> &Zonotope {
        &self.zonotope
    }

    /// Sum of region volumes; equals the zonotope volume when the map is complete.
    pub fn covered_volume(&self) -> f64 {
        self.regions.iter().map(Region::volume).sum()
    }

    /// Index of the region containing `tau` (within the region slack), if any.
    pub fn find(&self, tau: &Vector3<f64>) -> Option<usize> {
        self.regions
            .iter()
            .position(|r| r.contains(tau, self.tol.region_slack))
    }

    /// Indices of every region containing `tau` (more than one only on shared boundaries).
    pub fn find_all(&self, tau: &Vector3<f64>) -> Vec<usize> {
        (0..self.regions.len())
            .filter(|&i| self.regions[i].contains(tau, self.tol.region_slack))
            .collect()
    }

    /// `tau` with the components on unspanned axes set to zero.
    pub fn spanned(&self, tau: &Vector3<f64>) -> Vector3<f64> {
        Vector3::from_fn(|a, _| if self.axes.contains(&a) { tau[a] } else { 0.0 })
    }

    /// Least-gas duty cycles for `tau` from the map, scaling down along the
    /// command direction when it is out of reach. Components of `tau` on axes
    /// the ports do not span are dropped first (see [`Self::axes`]).
    pub fn evaluate(&self, tau: &Vector3<f64>) -> Result<Allocation, RegionMapError> {
        let mut out = Allocation::with_ports(self.e.len());
        self.evaluate_into(tau, &mut out)?;
        Ok(out)
    }

    /// As [`evaluate`](Self::evaluate), writing into `out`.
    pub fn evaluate_into(
        &self,
        tau: &Vector3<f64>,
        out: &mut Allocation,
    ) -> Result<(), RegionMapError> {
        if tau.iter().any(|v| !v.is_finite()) {
            return Err(RegionMapError::BadCommand);
        }
        let tau = &self.spanned(tau);
        let (target, scale, status) = if self.zonotope.contains(tau) {
            (*tau, 1.0, AllocationStatus::Exact)
        } else {
            let s = self.zonotope.max_along(tau).min(1.0);
            (tau * s, s, AllocationStatus::Saturated)
        };
        let k = self
            .find(&target)
            .ok_or(RegionMapError::NotCovered(tau.x, tau.y, tau.z))?;
        let r = &self.regions[k];
        for d in out.duty.iter_mut() {
            *d = 0.0;
        }
        for &j in &r.full_on {
            out.duty[j] = 1.0;
        }
        let ub = r.basic_duty(&target);
        for (p, v) in r.ports.iter().zip(ub.iter()) {
            out.duty[*p] = v.clamp(0.0, 1.0);
        }
        out.gas_rate_kg_s = self.e.gas_for(&out.duty);
        out.torque = self.e.torque_for(&out.duty);
        out.force = self.e.force_for(&out.duty);
        out.scale = scale;
        out.status = status;
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::allocation::testkit::{inside_command, port_at, random_layout, Rng};
    use crate::allocation::{MinGasAllocator, SideForceLimit};
    use approx::assert_relative_eq;

    fn check_against_simplex(e: &Effectiveness, rng: &mut Rng, samples: usize) {
        let tol = Tolerances::default();
        let map = RegionMap::new(e, &tol).expect("builds");
        let z = map.zonotope();
        // Completeness by volume: the tiles add up to the whole zonotope (its volume
        // from the triple formula; the facet-based check in zonotope.rs ties that
        // formula to the geometry). Summing a few hundred positive terms: 1e-9.
        assert_relative_eq!(map.covered_volume(), z.volume(), max_relative = 1e-9);
        let mut alloc = MinGasAllocator::new(e, SideForceLimit::Free, &tol).expect("setup");
        for _ in 0..samples {
            let tau = inside_command(rng, e) * rng.range(0.0, 1.3);
            let from_map = map.evaluate(&tau).expect("covered");
            let from_lp = alloc.allocate(&tau).expect("solves");
            assert_eq!(from_map.status, from_lp.status);
            // The same LP optimum through two routes: 1e-9 relative on gas and scale.
            assert_relative_eq!(
                from_map.gas_rate_kg_s,
                from_lp.gas_rate_kg_s,
                max_relative = 1e-9,
                epsilon = 1e-15
            );
            assert_relative_eq!(from_map.scale, from_lp.scale, max_relative = 1e-9);
            assert!((from_map.torque - tau * from_map.scale).norm() <= 1e-9 * z.scale());
            if from_map.status == AllocationStatus::Exact {
                // No overlaps: a random interior command lies in exactly one tile.
                assert_eq!(map.find_all(&tau).len(), 1, "tau {tau:?}");
            }
        }
    }

    #[test]
    fn random_maps_are_complete_and_optimal() {
        let mut rng = Rng(77);
        for case in 0..12 {
            let e = random_layout(&mut rng, 4 + case % 9);
            if Zonotope::torque(&e, &Tolerances::default())
                .expect("builds")
                .rank()
                == 3
            {
                check_against_simplex(&e, &mut rng, 60);
            }
        }
    }

    #[test]
    fn symmetric_ring_ties_are_broken() {
        // Eight tangential ports with equal flows at clock k·45°: many zero reduced
        // costs, which the tie-break must resolve into non-overlapping tiles.
        let ports: Vec<_> = (0..8)
            .map(|k| {
                let a = k as f64 * std::f64::consts::FRAC_PI_4;
                let travel = Vector3::new(0.0, -a.sin(), a.cos());
                let sign = if k % 2 == 0 { 1.0 } else { -1.0 };
                port_at(&format!("k{k}"), -0.5, 0.027, a, travel * sign, 1.0)
            })
            .collect();
        let e = Effectiveness::from_ports(&ports).expect("valid");
        let map = RegionMap::new(&e, &Tolerances::default()).expect("builds");
        assert!(map.regions().len() <= 56);
        check_against_simplex(&e, &mut Rng(1), 200);
    }

    #[test]
    fn region_inequalities_describe_the_region() {
        let mut rng = Rng(8);
        let e = random_layout(&mut rng, 7);
        let map = RegionMap::new(&e, &Tolerances::default()).expect("builds");
        for _ in 0..50 {
            let tau = inside_command(&mut rng, &e);
            let k = map.find(&tau).expect("covered");
            let r = &map.regions()[k];
            let (a, c) = r.inequalities();
            for (row, rhs) in a.iter().zip(c) {
                assert!(row.dot(&tau) <= rhs + 1e-9);
            }
            for (l, d) in r.reduced_costs.iter().enumerate() {
                if r.full_on.contains(&l) {
                    assert!(*d <= 0.0);
                } else {
                    assert!(*d >= -1e-15);
                }
            }
        }
    }

    /// Four radial ports 0.5 m aft of the CG (pitch and yaw only, see zonotope.rs)
    /// and, when `skew` is set, a fifth port 0.3 m aft with a different thrust so
    /// the map has regions of unequal shape.
    fn pitch_yaw_ports(skew: bool) -> Effectiveness {
        let mut ports: Vec<_> = (0..4)
            .map(|k| {
                let a = k as f64 * std::f64::consts::FRAC_PI_2 + 0.3;
                let radial = Vector3::new(0.0, a.cos(), a.sin());
                port_at(
                    &format!("r{k}"),
                    -0.5,
                    0.027,
                    a,
                    -radial,
                    1.0 + 0.2 * k as f64,
                )
            })
            .collect();
        if skew {
            let a = 2.0_f64;
            let radial = Vector3::new(0.0, a.cos(), a.sin());
            ports.push(port_at("r4", -0.3, 0.027, a, -radial, 0.7));
        }
        Effectiveness::from_ports(&ports).expect("valid")
    }

    #[test]
    fn pitch_yaw_layout_gets_a_map_on_its_two_axes() {
        // Radial ports make no roll: the map follows pitch and yaw. Completeness by
        // area: the tiles |det B_β| (2×2) add up to the zonogon's area, Σ over pairs
        // |det(bᵢ, bⱼ)| (the planar zonotope area formula), to 1e-12. Optimality
        // against the simplex on the same commands without their roll part, which the
        // map drops: gas and scale to 1e-9 as in the three-axis case.
        for skew in [false, true] {
            let e = pitch_yaw_ports(skew);
            let tol = Tolerances::default();
            let map = RegionMap::new(&e, &tol).expect("builds");
            assert_eq!(map.axes(), &[1, 2]);
            let b = e.torque();
            let mut area = 0.0;
            for i in 0..e.len() {
                for j in i + 1..e.len() {
                    area += (b[(1, i)] * b[(2, j)] - b[(2, i)] * b[(1, j)]).abs();
                }
            }
            assert_relative_eq!(map.covered_volume(), area, max_relative = 1e-12);
            assert!(map.regions().iter().all(|r| r.ports.len() == 2));
            let mut alloc = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).expect("setup");
            let mut rng = Rng(40);
            for _ in 0..200 {
                let roll = rng.range(-1.0, 1.0);
                let tau = inside_command(&mut rng, &e) * rng.range(0.0, 1.4)
                    + Vector3::new(roll, 0.0, 0.0);
                let got = map.evaluate(&tau).expect("covered");
                let want = alloc.allocate(&map.spanned(&tau)).expect("solves");
                assert_eq!(got.status, want.status);
                assert_relative_eq!(got.scale, want.scale, max_relative = 1e-9);
                assert_relative_eq!(
                    got.gas_rate_kg_s,
                    want.gas_rate_kg_s,
                    max_relative = 1e-9,
                    epsilon = 1e-15
                );
                let reach = map.spanned(&tau) * got.scale;
                assert!((got.torque - reach).norm() <= 1e-9 * map.zonotope().scale());
            }
        }
    }

    #[test]
    fn roll_only_layout_gets_a_map_on_roll() {
        // Tangential ports at the CG station make pure roll (r × F = (R T, 0, 0) by
        // hand, see mingas.rs): a one-axis map. By hand, with +roll ports of 1 N and
        // 0.8 N and −roll ports of 1.2 N on R = 27 mm and equal specific impulse, a
        // roll command a ≤ 1.8 R is met by the +roll ports alone at least gas.
        let r = 0.027;
        let ports: Vec<_> = [(0.0, 1.0, 1.0), (1.0, 1.0, 0.8), (2.0, -1.0, 1.2)]
            .iter()
            .map(|&(k, sense, thrust)| {
                let a = k * 2.1;
                let travel = Vector3::new(0.0, -f64::sin(a), a.cos());
                port_at("t", 0.0, r, a, travel * sense, thrust)
            })
            .collect();
        let e = Effectiveness::from_ports(&ports).expect("valid");
        let map = RegionMap::new(&e, &Tolerances::default()).expect("builds");
        assert_eq!(map.axes(), &[0]);
        // Tiles add up to the segment's length Σ|bᵢ| = (1 + 0.8 + 1.2) R.
        assert_relative_eq!(map.covered_volume(), 3.0 * r, max_relative = 1e-12);
        let got = map
            .evaluate(&Vector3::new(1.5 * r, 0.3, -0.2))
            .expect("covered");
        assert_eq!(got.status, AllocationStatus::Exact);
        assert_relative_eq!(got.torque.x, 1.5 * r, max_relative = 1e-12);
        assert_eq!(got.duty[2], 0.0);
        // Beyond 1.8 R the command is scaled to the segment's end.
        let far = map
            .evaluate(&Vector3::new(3.6 * r, 0.0, 0.0))
            .expect("covered");
        assert_relative_eq!(far.scale, 0.5, max_relative = 1e-12);
    }

    #[test]
    fn tilted_span_is_refused() {
        // Four radial ports at one station span pitch and yaw. Rotating every
        // position and exhaust rigidly by 0.2 rad about +y rotates their torques the
        // same way, so they span a plane tilted out of pitch–yaw: all three rows are
        // non-zero but the rank is 2, and no pair of body axes describes the span.
        let ports: Vec<_> = (0..4)
            .map(|k| {
                let a = k as f64 * std::f64::consts::FRAC_PI_2;
                let dir = -Vector3::new(0.0, a.cos(), a.sin());
                let mut p = port_at("r", -0.5, 0.027, a, dir, 1.0);
                let rot = nalgebra::Rotation3::from_axis_angle(&Vector3::y_axis(), 0.2);
                p.position_m = rot * p.position_m;
                p.direction = rot * p.direction;
                p
            })
            .collect();
        let e = Effectiveness::from_ports(&ports).expect("valid");
        assert!(matches!(
            RegionMap::new(&e, &Tolerances::default()).err(),
            Some(RegionMapError::TiltedSpan { rank: 2, .. })
        ));
        assert_eq!(axis_words(&[1, 2]), "pitch and yaw");
        assert_eq!(combinations(4, 2).len(), 6);
        assert_eq!(combinations(5, 3).len(), 10);
    }
}
