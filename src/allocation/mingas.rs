//! Minimum-gas duty cycles for a commanded torque.
//!
//! ```text
//! minimise Σ ṁᵢ uᵢ   subject to   B u = s·τ,  0 ≤ uᵢ ≤ 1,  (side-force rows)
//! ```
//!
//! Inside the attainable set the scale s is fixed at 1. When that program is
//! infeasible the command is out of reach, and the allocator keeps its direction:
//! it first maximises s ∈ [0, 1] (same rows, objective −s), then fixes s at that
//! maximum and minimises gas from the basis it already has, so the second step
//! needs no Phase I. Scale 0 means no positive multiple of τ is attainable.
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
            for r in 0..3 {
                column[r] = e.torque()[(r, i)] / torque_scale;
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
        let mut a = Self {
            e: e.clone(),
            lp,
            n,
            torque_scale,
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
        let s = self.n;
        for r in 0..3 {
            self.lp.set_entry(r, s, -tau[r] / self.torque_scale);
        }
        if self.costs_changed {
            self.restore_costs();
        }
        self.lp.set_bounds(s, 1.0, 1.0)?;
        let (scale, status) = match self.lp.solve(Start::Warm) {
            Ok(_) => (1.0, AllocationStatus::Exact),
            Err(SimplexError::Infeasible { .. }) => {
                let reach = self.max_scale()?;
                (reach, AllocationStatus::Saturated)
            }
            Err(other) => return Err(other.into()),
        };
        let u = self.lp.values();
        for (d, x) in out.duty.iter_mut().zip(u) {
            *d = x.clamp(0.0, 1.0);
        }
        out.gas_rate_kg_s = self.e.gas_for(&out.duty);
        out.torque = self.e.torque_for(&out.duty);
        out.force = self.e.force_for(&out.duty);
        out.scale = scale;
        out.status = status;
        Ok(())
    }

    /// Out of reach: maximise s, then least gas at that s from the same basis.
    fn max_scale(&mut self) -> Result<f64, AllocationError> {
        let s = self.n;
        for i in 0..self.n {
            self.lp.set_cost(i, 0.0);
        }
        self.lp.set_cost(s, -1.0);
        self.costs_changed = true;
        self.lp.set_bounds(s, 0.0, 1.0)?;
        self.lp.solve(Start::Cold)?;
        let mut reach = self.lp.value(s);
        if reach <= self.tol.primal_feasibility {
            reach = 0.0;
        }
        self.lp.set_bounds(s, reach, reach)?;
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

fn positive_or_one(v: f64) -> f64 {
    if v > 0.0 && v.is_finite() {
        v
    } else {
        1.0
    }
}
