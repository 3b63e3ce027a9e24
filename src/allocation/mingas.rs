//! Minimum-gas duty cycles for a commanded torque.
//!
//! ```text
//! minimise Σ ṁᵢ uᵢ   subject to   B u = s·τ,  0 ≤ uᵢ ≤ 1,  (side-force rows)
//! ```
//!
//! The program is posed on the command's direction, never on its raw numbers:
//! τ = r·d with d the unit direction (found by dividing by the largest component
//! first, so that neither huge nor sub-normal components overflow or underflow)
//! and r its length in units of the largest torque entry. The rows read
//! B u − t·d = 0 with the magnitude t a variable of its own; every coefficient is
//! then of order one whatever the command's size, so a command 10⁻¹² or 10¹⁵ times
//! the envelope is as well conditioned as one on its boundary.
//!
//! Inside the attainable set t is fixed at r. When that program is infeasible,
//! or r exceeds Σ|bᵢ| (no attainable torque is that long, so no solve is needed to
//! know), the command is out of reach and the allocator keeps its direction: it
//! first maximises t ∈ [0, min(r, Σ|bᵢ|)] (same rows, objective −t), then fixes t
//! at that maximum t* and minimises gas from the basis it already has, so the
//! second step needs no Phase I. The scale reported is t*/r; scale 0 means no
//! positive multiple of τ is attainable. The zero command needs no program: every
//! valve stays shut and the command counts as met (scale 1).
//!
//! Side force: `Bounded` adds rows F_y·u − w_y = 0, F_z·u − w_z = 0 with
//! w ∈ [−limit, limit]; `PureCouple` is the same with limit 0. Axial force (x) is
//! left free: it only adds to or subtracts from the motor's thrust.
//!
//! Torque rows are divided by the largest torque entry and costs by the largest
//! mass flow, so the simplex works on order-one numbers whatever the units or size.
//! The LP lives in a [`BoundedSimplex`] built once; a call allocates nothing when
//! [`MinGasAllocator::allocate_into`] is given a reused [`Allocation`].

use super::simplex::{BoundedSimplex, SimplexError, Start};
use super::{Effectiveness, Tolerances};
use nalgebra::Vector3;
use rayon::prelude::*;
use thiserror::Error;

/// Limit on the lateral (y, z) force while producing torque.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum SideForceLimit {
    /// Any side force is accepted.
    Free,
    /// |F_y| ≤ limit and |F_z| ≤ limit, in N.
    Bounded {
        /// The bound in N (non-negative).
        limit_n: f64,
    },
    /// F_y = F_z = 0: pure couples only.
    PureCouple,
}

impl SideForceLimit {
    /// The rule for a limit of `limit_n` newtons: `None` is no limit, 0 pure
    /// couples, anything else a bound.
    pub fn from_newtons(limit_n: Option<f64>) -> Self {
        match limit_n {
            None => SideForceLimit::Free,
            Some(0.0) => SideForceLimit::PureCouple,
            Some(v) => SideForceLimit::Bounded { limit_n: v },
        }
    }
}

/// How the command was met.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum AllocationStatus {
    /// The torque equals the command.
    Exact,
    /// The command was out of reach; the torque is `scale`·command with the
    /// largest attainable scale below 1.
    Saturated,
}

/// Failures of the allocator.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum AllocationError {
    /// The command has a NaN or infinite component.
    #[error("the torque command is not finite")]
    BadCommand,
    /// The side-force limit is negative or not finite.
    #[error("side-force limit {0} N is not a finite non-negative number")]
    BadLimit(f64),
    /// The linear program failed in a way that is not "out of reach".
    #[error("allocation linear program: {0}")]
    Solver(#[from] SimplexError),
}

/// The result of one allocation.
#[derive(Debug, Clone, PartialEq)]
pub struct Allocation {
    /// Duty cycle per port, in [0, 1].
    pub duty: Vec<f64>,
    /// Gas used, kg/s.
    pub gas_rate_kg_s: f64,
    /// Torque produced, N·m (B·u).
    pub torque: Vector3<f64>,
    /// Total force on the vehicle, N (F·u); y and z are the side force.
    pub force: Vector3<f64>,
    /// Fraction of the command achieved along its own direction (1 when exact).
    pub scale: f64,
    /// Exact or saturated.
    pub status: AllocationStatus,
}

impl Allocation {
    /// An empty result sized for `ports` ports, to pass to
    /// [`MinGasAllocator::allocate_into`] repeatedly.
    pub fn with_ports(ports: usize) -> Self {
        Self {
            duty: vec![0.0; ports],
            gas_rate_kg_s: 0.0,
            torque: Vector3::zeros(),
            force: Vector3::zeros(),
            scale: 0.0,
            status: AllocationStatus::Exact,
        }
    }
}

/// Minimum-gas allocator with its own simplex workspace.
#[derive(Debug, Clone)]
pub struct MinGasAllocator {
    e: Effectiveness,
    lp: BoundedSimplex,
    n: usize,
    torque_scale: f64,
    /// Σ|bᵢ| / `torque_scale`: no attainable torque is longer (scaled units).
    longest_reach: f64,
    /// Side-force limit / force scale, when there are side-force rows.
    side_limit: Option<f64>,
    /// Largest |F_y| or |F_z| with every port at full duty, over the force scale.
    side_cap: f64,
    /// Unit of the duty variables in the program (see [`Self::set_unit`]).
    unit: f64,
    gas_scale: f64,
    costs_changed: bool,
    tol: Tolerances,
}

impl MinGasAllocator {
    /// Sets up the LP for `e` under the side-force rule `side`.
    pub fn new(
        e: &Effectiveness,
        side: SideForceLimit,
        tol: &Tolerances,
    ) -> Result<Self, AllocationError> {
        let n = e.len();
        let limit = match side {
            SideForceLimit::Free => None,
            SideForceLimit::PureCouple => Some(0.0),
            SideForceLimit::Bounded { limit_n } => {
                if !limit_n.is_finite() || limit_n < 0.0 {
                    return Err(AllocationError::BadLimit(limit_n));
                }
                Some(limit_n)
            }
        };
        let rows = if limit.is_some() { 5 } else { 3 };
        let vars = n + 1 + if limit.is_some() { 2 } else { 0 };
        let mut lp = BoundedSimplex::new(rows, vars, tol.clone());
        let torque_scale = positive_or_one(e.torque().abs().max());
        let force_scale = positive_or_one(e.force().rows(1, 2).abs().max());
        let gas_scale = positive_or_one(e.mass_flow_kg_s().max());
        let mut column = [0.0; 5];
        for i in 0..n {
            for (r, v) in column.iter_mut().take(3).enumerate() {
                *v = e.torque()[(r, i)] / torque_scale;
            }
            if rows == 5 {
                column[3] = e.force()[(1, i)] / force_scale;
                column[4] = e.force()[(2, i)] / force_scale;
            }
            lp.set_column(i, &column[..rows]);
            lp.set_bounds(i, 0.0, 1.0)?;
        }
        if let Some(l) = limit {
            for k in 0..2 {
                let j = n + 1 + k;
                lp.set_entry(3 + k, j, -1.0);
                lp.set_bounds(j, -l / force_scale, l / force_scale)?;
            }
        }
        let longest_reach = (0..n)
            .map(|i| e.torque().column(i).norm() / torque_scale)
            .sum();
        let side_cap = (1..3)
            .map(|r| (0..n).map(|i| e.force()[(r, i)].abs()).sum::<f64>() / force_scale)
            .fold(0.0, f64::max);
        let mut a = Self {
            e: e.clone(),
            lp,
            n,
            torque_scale,
            longest_reach,
            side_limit: limit.map(|l| l / force_scale),
            side_cap,
            unit: 1.0,
            gas_scale,
            costs_changed: true,
            tol: tol.clone(),
        };
        a.restore_costs();
        Ok(a)
    }

    fn restore_costs(&mut self) {
        for i in 0..self.n {
            self.lp
                .set_cost(i, self.e.mass_flow_kg_s()[i] / self.gas_scale);
        }
        self.lp.set_cost(self.n, 0.0);
        self.costs_changed = false;
    }

    /// The effectiveness matrix this allocator was built for.
    pub fn effectiveness(&self) -> &Effectiveness {
        &self.e
    }

    /// Least-gas duty cycles for the torque command `tau` (N·m).
    pub fn allocate(&mut self, tau: &Vector3<f64>) -> Result<Allocation, AllocationError> {
        let mut out = Allocation::with_ports(self.n);
        self.allocate_into(tau, &mut out)?;
        Ok(out)
    }

    /// As [`allocate`](Self::allocate), writing into `out` (whose `duty` must have
    /// one entry per port) so that repeated calls allocate nothing.
    pub fn allocate_into(
        &mut self,
        tau: &Vector3<f64>,
        out: &mut Allocation,
    ) -> Result<(), AllocationError> {
        if tau.iter().any(|v| !v.is_finite()) {
            return Err(AllocationError::BadCommand);
        }
        let Some(ray) = CommandRay::of(tau, self.torque_scale) else {
            // The zero command: nothing to produce, every valve shut.
            out.duty.iter_mut().for_each(|d| *d = 0.0);
            out.gas_rate_kg_s = 0.0;
            out.torque = Vector3::zeros();
            out.force = Vector3::zeros();
            out.scale = 1.0;
            out.status = AllocationStatus::Exact;
            return Ok(());
        };
        let t = self.n;
        for r in 0..3 {
            self.lp.set_entry(r, t, -ray.direction[r]);
        }
        if self.costs_changed {
            self.restore_costs();
        }
        // A command much shorter than one port's torque is solved in duty units
        // of its own length, so that the simplex's absolute thresholds stay
        // relative to the command; should a clipped side-force range bind there,
        // the program is solved again in plain duty units.
        let small = ray.length < self.tol.small_command;
        let (scale, status) = match self.solve_ray(&ray, if small { ray.length } else { 1.0 }) {
            Ok(Some(found)) => found,
            Ok(None) => self
                .solve_ray(&ray, 1.0)?
                .ok_or(AllocationError::Solver(SimplexError::SingularBasis))?,
            Err(e) => return Err(e),
        };
        let unit = self.unit;
        let u = self.lp.values();
        for (d, x) in out.duty.iter_mut().zip(u) {
            *d = (x * unit).clamp(0.0, 1.0);
        }
        out.gas_rate_kg_s = self.e.gas_for(&out.duty);
        out.torque = self.e.torque_for(&out.duty);
        out.force = self.e.force_for(&out.duty);
        out.scale = scale;
        out.status = status;
        Ok(())
    }

    /// Duty variables in units of `unit` (1: plain duty cycles). Their bounds
    /// become [0, 1/unit] and the side-force range ±limit/unit, clipped to the
    /// largest side force the ports can make at unit duty, which keeps the
    /// starting point of Phase I finite and of order one.
    fn set_unit(&mut self, unit: f64) -> Result<(), AllocationError> {
        if unit == self.unit {
            return Ok(());
        }
        for i in 0..self.n {
            self.lp.set_bounds(i, 0.0, 1.0 / unit)?;
        }
        if let Some(l) = self.side_limit {
            let w = self.side_range(l, unit);
            for k in 0..2 {
                self.lp.set_bounds(self.n + 1 + k, -w, w)?;
            }
        }
        self.unit = unit;
        Ok(())
    }

    /// Half-width of the side-force variables' range in duty units of `unit`:
    /// limit/unit, but at most 1000 times the larger of the limit and the side
    /// force of every port at full duty (all scaled), a range no answer of a
    /// command shorter than one port's torque comes near in practice.
    fn side_range(&self, limit: f64, unit: f64) -> f64 {
        if unit == 1.0 {
            limit
        } else {
            (limit / unit).min(1e3 * limit.max(self.side_cap))
        }
    }

    /// One solve of the ray program in duty units of `unit`: `None` when a
    /// clipped side-force range binds at the answer (the caller solves again in
    /// plain units).
    fn solve_ray(
        &mut self,
        ray: &CommandRay,
        unit: f64,
    ) -> Result<Option<(f64, AllocationStatus)>, AllocationError> {
        self.set_unit(unit)?;
        let t = self.n;
        let length = ray.length / unit;
        let first = if ray.length <= self.longest_reach {
            self.lp.set_bounds(t, length, length)?;
            self.lp.solve(Start::Warm)
        } else {
            Err(SimplexError::Infeasible { residual: f64::NAN })
        };
        let found = match first {
            Ok(_) => (1.0, AllocationStatus::Exact),
            Err(SimplexError::Infeasible { .. }) => {
                let reach = self.max_reach(length.min(self.longest_reach / unit))?;
                (ray.fraction(reach * unit), AllocationStatus::Saturated)
            }
            Err(other) => return Err(other.into()),
        };
        if let Some(l) = self.side_limit {
            let w = self.side_range(l, unit);
            let clipped = w < l / unit;
            let binds = (0..2).any(|k| self.lp.value(self.n + 1 + k).abs() >= w * (1.0 - 1e-12));
            if clipped && binds {
                return Ok(None);
            }
        }
        Ok(Some(found))
    }

    /// Out of reach: maximise the magnitude t ∈ [0, `cap`] along the direction
    /// already in the rows, then least gas at that t from the same basis. Returns
    /// t* in scaled units.
    fn max_reach(&mut self, cap: f64) -> Result<f64, AllocationError> {
        let t = self.n;
        for i in 0..self.n {
            self.lp.set_cost(i, 0.0);
        }
        self.lp.set_cost(t, -1.0);
        self.costs_changed = true;
        self.lp.set_bounds(t, 0.0, cap)?;
        self.lp.solve(Start::Cold)?;
        let mut reach = self.lp.value(t).clamp(0.0, cap);
        if reach <= self.tol.primal_feasibility {
            reach = 0.0;
        }
        self.lp.set_bounds(t, reach, reach)?;
        self.restore_costs();
        self.lp.resolve()?;
        Ok(reach)
    }

    /// Allocates every command in `commands`, in parallel over the available cores,
    /// each worker with its own copy of the workspace.
    pub fn allocate_many(
        &self,
        commands: &[Vector3<f64>],
    ) -> Vec<Result<Allocation, AllocationError>> {
        commands
            .par_iter()
            .map_init(|| self.clone(), |a, tau| a.allocate(tau))
            .collect()
    }
}

/// A non-zero command as a unit direction and a length in units of `unit`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct CommandRay {
    /// Unit vector along the command.
    pub direction: Vector3<f64>,
    /// |τ| / unit; may be infinite when the command is near `f64::MAX`.
    pub length: f64,
    /// Largest component magnitude of τ, N·m.
    largest: f64,
    /// |τ| / `largest`, between 1 and √3.
    spread: f64,
    unit: f64,
}

impl CommandRay {
    /// The ray of a finite command, or `None` for the zero command. Dividing by
    /// the largest component before taking the length keeps sub-normal and huge
    /// components exact.
    pub fn of(tau: &Vector3<f64>, unit: f64) -> Option<Self> {
        let largest = tau.amax();
        if largest == 0.0 || !largest.is_finite() {
            return None;
        }
        let d = tau / largest;
        let spread = d.norm();
        Some(Self {
            direction: d / spread,
            length: largest / unit * spread,
            largest,
            spread,
            unit,
        })
    }

    /// The fraction of the command that a length `reach` (same units) is,
    /// computed without forming |τ| when it would overflow.
    pub fn fraction(&self, reach: f64) -> f64 {
        let f = if self.length.is_finite() {
            reach / self.length
        } else {
            reach * self.unit / self.largest / self.spread
        };
        f.clamp(0.0, 1.0)
    }
}

/// `v` when it is a usable positive scale, else 1.
pub(crate) fn positive_or_one(v: f64) -> f64 {
    if v > 0.0 && v.is_finite() {
        v
    } else {
        1.0
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::allocation::simplex::BoundedSimplex;
    use crate::allocation::testkit::{
        clarabel_min_gas, inside_command, port_at, random_layout, Rng,
    };
    use crate::allocation::{lp, Zonotope};
    use approx::assert_relative_eq;
    use proptest::prelude::*;
    use std::f64::consts::{FRAC_PI_4, PI};

    #[test]
    fn simplex_small_programs_by_hand() {
        let tol = Tolerances::default();
        // min x₀ + 2x₁ s.t. x₀ + x₁ = 1.5, x ∈ [0, 1]²: the cheap one fills first,
        // x = (1, 0.5), objective 2.
        let mut lp = BoundedSimplex::new(1, 2, tol.clone());
        lp.set_column(0, &[1.0]);
        lp.set_column(1, &[1.0]);
        lp.set_cost(0, 1.0);
        lp.set_cost(1, 2.0);
        lp.set_rhs(&[1.5]);
        let s = lp.solve(Start::Cold).expect("feasible");
        assert_relative_eq!(s.objective, 2.0, max_relative = 1e-15);
        assert_eq!(lp.values(), &[1.0, 0.5]);
        // x₀ + x₁ = 3 cannot be met in the unit box.
        lp.set_rhs(&[3.0]);
        assert!(matches!(
            lp.solve(Start::Warm),
            Err(SimplexError::Infeasible { .. })
        ));
        // A warm start after a change of cost: max x₁ (cost −1) gives x = (0.5, 1).
        lp.set_rhs(&[1.5]);
        lp.solve(Start::Cold).expect("feasible");
        lp.set_cost(0, 0.0);
        lp.set_cost(1, -1.0);
        let s = lp.resolve().expect("feasible");
        assert!(s.warm);
        assert_eq!(lp.values(), &[0.5, 1.0]);
        // Unbounded: min −x₀ with x₀ ≥ 0 free above and no effect on the row.
        let mut lp = BoundedSimplex::new(1, 1, tol.clone());
        lp.set_bounds(0, 0.0, f64::INFINITY).expect("valid");
        lp.set_cost(0, -1.0);
        assert_eq!(lp.solve(Start::Cold), Err(SimplexError::Unbounded));
        assert!(matches!(
            lp.set_bounds(0, 1.0, 0.0),
            Err(SimplexError::BadBounds { .. })
        ));
    }

    #[test]
    fn degenerate_program_terminates() {
        // Many identical columns make every vertex highly degenerate, the classic
        // setting for cycling; Bland's fallback must still end at the optimum.
        // Optimum by hand: the cheapest column (cost 1) fills to 1, the rest of
        // the row (1.5 − 1 = 0.5) comes from the next cheapest (cost 1.1).
        let tol = Tolerances::default();
        let mut lp = BoundedSimplex::new(3, 12, tol);
        for j in 0..12 {
            lp.set_column(j, &[1.0, 1.0, 1.0]);
            lp.set_cost(j, 1.0 + 0.1 * (j % 4) as f64);
        }
        lp.set_rhs(&[1.5, 1.5, 1.5]);
        let s = lp.solve(Start::Cold).expect("feasible");
        assert_relative_eq!(s.objective, 1.5, max_relative = 1e-12);
    }

    fn sides() -> [SideForceLimit; 3] {
        [
            SideForceLimit::Free,
            SideForceLimit::Bounded { limit_n: 0.4 },
            SideForceLimit::PureCouple,
        ]
    }

    #[test]
    fn agrees_with_microlp_and_clarabel_inside() {
        // References: good_lp/microlp (a second simplex) to 1e-9 relative, and
        // Clarabel (interior point, stopped at 1e-12 gaps but accurate to about
        // 1e-8 on the objective of these unscaled problems) to 1e-7 relative.
        let tol = Tolerances::default();
        let mut rng = Rng(2024);
        let mut compared = 0;
        for case in 0..60 {
            let n = 4 + case % 13;
            let e = random_layout(&mut rng, n);
            for side in sides() {
                let mut a = MinGasAllocator::new(&e, side, &tol).expect("setup");
                for _ in 0..4 {
                    let tau = inside_command(&mut rng, &e);
                    let got = a.allocate(&tau).expect("solves");
                    let reference = lp::reference_min_gas(&e, &tau, side, &tol).expect("solves");
                    assert_eq!(got.status, reference.status, "case {case} {side:?}");
                    assert!(got.duty.iter().all(|u| (0.0..=1.0).contains(u)));
                    if got.status == AllocationStatus::Exact {
                        assert!((got.torque - tau).norm() <= 1e-9 * e.torque().abs().max());
                        assert_relative_eq!(
                            got.gas_rate_kg_s,
                            reference.gas_rate_kg_s,
                            max_relative = 1e-9
                        );
                        let (cg, _) = clarabel_min_gas(&e, &tau, side, 1.0, 1.0, false)
                            .expect("clarabel solves");
                        assert_relative_eq!(got.gas_rate_kg_s, cg, max_relative = 1e-7);
                        compared += 1;
                    } else {
                        // Side-force rows made the command unattainable: the scales agree.
                        assert_relative_eq!(got.scale, reference.scale, max_relative = 1e-8);
                    }
                    if let SideForceLimit::Bounded { limit_n } = side {
                        assert!(got.force.y.abs() <= limit_n * (1.0 + 1e-9));
                        assert!(got.force.z.abs() <= limit_n * (1.0 + 1e-9));
                    }
                    if side == SideForceLimit::PureCouple {
                        assert!(got.force.yz().norm() <= 1e-9 * e.force().abs().max());
                    }
                }
            }
        }
        assert!(compared > 400, "only {compared} exact cases");
    }

    #[test]
    fn saturates_along_the_command() {
        // Outside the envelope the achieved torque is s·τ with s·|τ| the zonotope's
        // ray maximum (exact facet computation, see zonotope.rs) to 1e-9, the least
        // gas at that scale matches microlp's two-step answer to 1e-9, and the scale
        // matches Clarabel's (interior point, about 1e-8 accurate here) to 1e-7.
        let tol = Tolerances::default();
        let mut rng = Rng(99);
        for case in 0..40 {
            let e = random_layout(&mut rng, 3 + case % 10);
            let z = Zonotope::torque(&e, &tol).expect("builds");
            let mut a = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).expect("setup");
            let d = inside_command(&mut rng, &e).normalize();
            let reach = z.max_along(&d);
            let tau = d * reach * 3.0;
            let got = a.allocate(&tau).expect("solves");
            assert_eq!(got.status, AllocationStatus::Saturated);
            assert_relative_eq!(got.scale * 3.0, 1.0, max_relative = 1e-9);
            assert!((got.torque - tau * got.scale).norm() <= 1e-9 * z.scale());
            let r = lp::reference_min_gas(&e, &tau, SideForceLimit::Free, &tol).expect("solves");
            assert_relative_eq!(got.gas_rate_kg_s, r.gas_rate_kg_s, max_relative = 1e-9);
            let (_, cs) = clarabel_min_gas(&e, &tau, SideForceLimit::Free, 0.0, 1.0, true)
                .expect("clarabel solves");
            assert_relative_eq!(got.scale, cs, max_relative = 1e-7);
        }
    }

    /// Multiples of the envelope from 1e-12 to 1e15, both sides of the boundary.
    const COMMAND_MULTIPLES: [f64; 16] = [
        1e-12, 1e-9, 1e-6, 1e-3, 0.25, 0.9, 1.1, 2.0, 10.0, 1e3, 1e6, 1e8, 1e10, 1e11, 1e12, 1e15,
    ];

    #[test]
    fn exact_scale_over_the_whole_command_range() {
        // Reference: the zonotope's ray maximum ρ(d) along the unit direction d (exact
        // facet computation, checked against brute force in zonotope.rs). For a command
        // k·ρ(d)·d the allocator must meet it exactly when k < 1 (torque equal to the
        // command to 1e-9 of its own length: a few roundings of order-one data) and
        // give scale 1/k when k > 1 (scale·k = 1 to 1e-9 relative, the simplex's
        // feasibility tolerance on order-one rows). Both warm and cold workspaces,
        // with and without side-force rows, in increasing and decreasing order.
        let tol = Tolerances::default();
        let mut rng = Rng(515);
        for case in 0..12 {
            let e = random_layout(&mut rng, 4 + case % 9);
            let z = Zonotope::torque(&e, &tol).expect("builds");
            for side in sides() {
                let mut warm = MinGasAllocator::new(&e, side, &tol).expect("setup");
                let d = inside_command(&mut rng, &e).normalize();
                let reach = match side {
                    SideForceLimit::Free => z.max_along(&d),
                    _ => lp::max_along(&e, &d, side).expect("solves"),
                };
                if reach <= 1e-6 * z.scale() {
                    continue;
                }
                let mut order = COMMAND_MULTIPLES.to_vec();
                if case % 2 == 1 {
                    order.reverse();
                }
                for k in order {
                    let tau = d * (reach * k);
                    let mut cold = MinGasAllocator::new(&e, side, &tol).expect("setup");
                    for (which, a) in [("warm", &mut warm), ("cold", &mut cold)] {
                        let got = a.allocate(&tau).expect("solves");
                        let what = format!("case {case} {side:?} k {k:e} {which}");
                        assert!(got.duty.iter().all(|u| (0.0..=1.0).contains(u)), "{what}");
                        if k < 1.0 {
                            assert_eq!(got.status, AllocationStatus::Exact, "{what}");
                            assert_eq!(got.scale, 1.0, "{what}");
                            assert!(
                                (got.torque - tau).norm() <= 1e-9 * tau.norm(),
                                "{what}: {:?} for {:?}",
                                got.torque,
                                tau
                            );
                        } else {
                            assert_eq!(got.status, AllocationStatus::Saturated, "{what}");
                            assert_relative_eq!(got.scale * k, 1.0, max_relative = 1e-9);
                            assert!(
                                (got.torque - d * reach).norm() <= 1e-9 * reach,
                                "{what}: {:?}",
                                got.torque
                            );
                        }
                    }
                }
            }
        }
    }

    #[test]
    fn zero_and_subnormal_commands() {
        // Zero: nothing to do, every valve shut, reported as met (scale 1). A command
        // whose components are sub-normal numbers is a real direction: it is met
        // exactly like any small command, with duties of the same tiny order.
        let tol = Tolerances::default();
        let mut rng = Rng(8);
        let e = random_layout(&mut rng, 7);
        let mut a = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).expect("setup");
        let got = a.allocate(&Vector3::zeros()).expect("solves");
        assert_eq!(got.status, AllocationStatus::Exact);
        assert_eq!(got.scale, 1.0);
        assert!(got.duty.iter().all(|u| *u == 0.0));
        assert_eq!(got.gas_rate_kg_s, 0.0);
        let d = inside_command(&mut rng, &e).normalize();
        for tiny in [1e-300, 4e-310, 5e-320] {
            let tau = d * tiny;
            let got = a.allocate(&tau).expect("solves");
            assert_eq!(got.status, AllocationStatus::Exact, "{tiny:e}");
            assert_eq!(got.scale, 1.0);
            assert!(got.duty.iter().all(|u| (0.0..=1.0).contains(u)));
            // Sub-normal arithmetic keeps only a few digits: the torque is right to
            // the spacing of sub-normal numbers times the column sizes.
            assert!(
                (got.torque - tau).norm() <= 1e-9 * tiny + 1e-318,
                "{tiny:e}"
            );
        }
    }

    #[test]
    fn warm_and_cold_starts_agree() {
        let tol = Tolerances::default();
        let mut rng = Rng(3);
        let e = random_layout(&mut rng, 10);
        let mut warm = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).expect("setup");
        let base = inside_command(&mut rng, &e);
        for k in 0..200 {
            // A slowly turning command, sometimes leaving the envelope.
            let tau = base * (0.5 + 2.0 * (k as f64 * 0.05).sin().abs())
                + Vector3::new(0.0, 0.01, -0.01) * (k as f64 * 0.1).cos();
            let w = warm.allocate(&tau).expect("solves");
            let mut cold = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).expect("setup");
            let c = cold.allocate(&tau).expect("solves");
            assert_eq!(w.status, c.status);
            // Two optimal vertices of the same LP: equal objective up to rounding.
            assert_relative_eq!(
                w.gas_rate_kg_s,
                c.gas_rate_kg_s,
                max_relative = 1e-10,
                epsilon = 1e-15
            );
            assert_relative_eq!(w.scale, c.scale, max_relative = 1e-10);
        }
    }

    #[test]
    fn tangential_roll_pair_by_hand() {
        // Ports at clock 0° and 180°, 0.3 m aft of the CG, pushing along +roll travel.
        // By hand, r_A = (x, R, 0), F_A = (0, 0, T): r × F = (R T, −x T, 0) = (RT, 0.3T, 0);
        // r_B = (x, −R, 0), F_B = (0, 0, −T): r × F = (R T, x T, 0) = (RT, −0.3T, 0).
        // Pure roll τ = (RT, 0, 0) needs u_A = u_B = ½, gas = ṁ; no pure pitch exists.
        let (t, r, x) = (1.5, 0.027, -0.3);
        let ports = [
            port_at("a", x, r, 0.0, Vector3::z(), t),
            port_at("b", x, r, PI, -Vector3::z(), t),
        ];
        let e = Effectiveness::from_ports(&ports).expect("valid");
        let tol = Tolerances::default();
        approx::assert_relative_eq!(e.torque()[(1, 0)], 0.3 * t, max_relative = 1e-12);
        let mut a = MinGasAllocator::new(&e, SideForceLimit::PureCouple, &tol).expect("setup");
        let got = a.allocate(&Vector3::new(r * t, 0.0, 0.0)).expect("solves");
        assert_eq!(got.status, AllocationStatus::Exact);
        // Two 2×2 solves of exact small numbers: 1e-12 relative.
        assert_relative_eq!(got.duty[0], 0.5, max_relative = 1e-12);
        assert_relative_eq!(got.duty[1], 0.5, max_relative = 1e-12);
        assert_relative_eq!(
            got.gas_rate_kg_s,
            e.mass_flow_kg_s()[0],
            max_relative = 1e-12
        );
        let z = Zonotope::torque(&e, &tol).expect("builds");
        assert_relative_eq!(
            z.max_along(&Vector3::x()),
            2.0 * r * t,
            max_relative = 1e-12
        );
        assert_eq!(z.max_along(&Vector3::y()), 0.0);
        let c = crate::allocation::Controllability::from_zonotope(&e, &z, &tol);
        let words = c.findings(&e);
        assert!(
            words.contains(
                &"positive pitch comes only together with torque on another axis".to_string()
            ),
            "{words:?}"
        );
        assert!(words.contains(&"no port gives negative roll".to_string()));
    }

    /// Eight tangential ports at clock k·45°, 0.5 m aft of the CG, even k pushing
    /// along +roll travel, odd k against it. With t̂ = eₓ × ĉ, by hand
    /// τ = (x eₓ + R ĉ) × (±T t̂) = ±T (R eₓ − x ĉ) = ±T (R eₓ + L ĉ).
    fn ring_eight(t: f64, r: f64, l: f64) -> Effectiveness {
        let ports: Vec<_> = (0..8)
            .map(|k| {
                let a = k as f64 * FRAC_PI_4;
                let travel = Vector3::new(0.0, -a.sin(), a.cos());
                let sign = if k % 2 == 0 { 1.0 } else { -1.0 };
                port_at(&format!("k{k}"), -l, r, a, travel * sign, t)
            })
            .collect();
        Effectiveness::from_ports(&ports).expect("valid")
    }

    #[test]
    fn eight_port_ring_by_hand() {
        let (t, r, l) = (1.0, 0.027, 0.5);
        let e = ring_eight(t, r, l);
        let tol = Tolerances::default();
        let z = Zonotope::torque(&e, &tol).expect("builds");
        let mdot = e.mass_flow_kg_s()[0];
        // Max +roll: only the four +roll ports have roll; all on gives (4RT, 0, 0)
        // since Σĉ over 0°, 90°, 180°, 270° is zero, and h(eₓ) = 4RT bounds it.
        let lim = z.axis_limits();
        assert_relative_eq!(lim.positive.x, 4.0 * r * t, max_relative = 1e-12);
        assert_relative_eq!(lim.negative.x, 4.0 * r * t, max_relative = 1e-12);
        // Max +pitch: the ports with a +y component at 1 (0° with TL, the −roll
        // ports at 135° and 225° with TL cos 45° each), which leaves roll −RT and
        // no yaw; the 90° and 270° ports at ½ each cancel that roll and each
        // other's yaw. τ_y = TL (1 + √2), equal to h(e_y); gas (3 + ½ + ½)ṁ = 4ṁ.
        let pitch = t * l * (1.0 + 2f64.sqrt());
        assert_relative_eq!(lim.positive.y, pitch, max_relative = 1e-12);
        assert_relative_eq!(z.support(&Vector3::y()), pitch, max_relative = 1e-12);
        let mut a = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).expect("setup");
        let got = a.allocate(&Vector3::new(0.0, pitch, 0.0)).expect("solves");
        assert_eq!(got.status, AllocationStatus::Exact);
        assert_relative_eq!(got.gas_rate_kg_s, 4.0 * mdot, max_relative = 1e-9);
        // Roll command a ≤ 4RT: roll per unit gas is RT/ṁ for every +roll port and
        // negative for the others, so gas ≥ a ṁ/(RT), met by equal duty on the four.
        let roll = 0.7 * 4.0 * r * t;
        let got = a.allocate(&Vector3::new(roll, 0.0, 0.0)).expect("solves");
        assert_relative_eq!(
            got.gas_rate_kg_s,
            roll * mdot / (r * t),
            max_relative = 1e-9
        );
        // Eight generators, but ±roll ports at opposite clocks are not parallel:
        // no merging, and the set is centrally symmetric about the origin.
        assert_eq!(z.generators().count(), 8);
        assert!(z.center().norm() < 1e-12);
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(64))]
        #[test]
        fn duty_in_bounds_and_command_met(seed in 0u64..1_000_000, n in 3usize..14, k in 0.0f64..1.5) {
            let tol = Tolerances::default();
            let mut rng = Rng(seed);
            let e = random_layout(&mut rng, n);
            let mut a = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).expect("setup");
            let tau = inside_command(&mut rng, &e) * k;
            let z = Zonotope::torque(&e, &tol).expect("builds");
            let got = a.allocate(&tau).expect("solves");
            prop_assert!(got.duty.iter().all(|u| (0.0..=1.0).contains(u)));
            if z.contains(&tau) && got.status == AllocationStatus::Exact {
                prop_assert!((got.torque - tau).norm() <= 1e-9 * z.scale());
            } else {
                prop_assert_eq!(got.status, AllocationStatus::Saturated);
                prop_assert!((got.torque - tau * got.scale).norm() <= 1e-9 * z.scale());
            }
            // A command inside by construction (k ≤ 1: B·(k u) with k u in the box) is met.
            if k <= 1.0 {
                prop_assert_eq!(got.status, AllocationStatus::Exact);
            }
        }
    }
}
