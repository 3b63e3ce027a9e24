//! A dense bounded-variable primal simplex for small linear programs:
//!
//! ```text
//! minimise cᵀx  subject to  A x = b,  lᵢ ≤ xᵢ ≤ uᵢ
//! ```
//!
//! with a handful of equality rows (three torque rows, maybe two side-force rows)
//! and a few dozen variables. At that size a dense explicit basis inverse is both
//! the simplest and the fastest representation: a pivot is a rank-one update of an
//! m×m matrix, and a fresh factorization is an m×m Gauss–Jordan elimination.
//!
//! Why it is built this way:
//! - Box bounds are handled by the solver (non-basic variables sit at either
//!   bound, and the ratio test includes the entering variable's own bound flip),
//!   so a duty cycle u ∈ [0, 1] costs no extra row.
//! - Phase I uses one artificial per row, signed so that it starts non-negative.
//!   After Phase I the artificials are fixed to [0, 0]; any that stay basic at zero
//!   are harmless and leave at the first pivot that moves them.
//! - A warm start reuses the previous basis. When only the command changed the
//!   old optimum is still dual feasible, so a bounded dual simplex restores
//!   primal feasibility in a few pivots (or proves the program infeasible); a
//!   basis that is neither primal nor dual feasible falls back to a cold start.
//! - Pricing is Dantzig's largest reduced cost; after a run of degenerate pivots
//!   the solver switches to Bland's smallest-index rule until it makes progress,
//!   which rules out cycling.
//! - All storage is allocated once in [`BoundedSimplex::new`]; solving, including a
//!   warm start from the previous basis, allocates nothing.
//! - Every outcome is a value: [`SimplexError`] for infeasible, unbounded,
//!   iteration limit and a singular basis.

use super::Tolerances;
use thiserror::Error;

/// Why a solve did not produce an optimum.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum SimplexError {
    /// No point satisfies the rows and bounds; carries the Phase I residual.
    #[error("the linear program is infeasible (residual {residual:e})")]
    Infeasible {
        /// Sum of the artificial variables at the end of Phase I.
        residual: f64,
    },
    /// The objective decreases without limit.
    #[error("the linear program is unbounded")]
    Unbounded,
    /// The iteration limit in [`Tolerances::max_iterations`] was reached.
    #[error("the simplex stopped after {0} iterations")]
    IterationLimit(usize),
    /// The basis matrix became singular on refactorization.
    #[error("numerical trouble: singular basis")]
    SingularBasis,
    /// A variable was given a lower bound above its upper bound, or a non-finite lower bound.
    #[error("variable {index}: bounds [{lower}, {upper}] are not usable")]
    BadBounds {
        /// Variable index.
        index: usize,
        /// Given lower bound.
        lower: f64,
        /// Given upper bound.
        upper: f64,
    },
}

/// Summary of a successful solve.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SimplexSolution {
    /// Optimal objective value cᵀx.
    pub objective: f64,
    /// Pivots and bound flips taken, both phases.
    pub iterations: usize,
    /// True when the solve started from the previous basis and skipped Phase I.
    pub warm: bool,
}

/// Where to start a solve.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Start {
    /// Phase I from all variables at their lower bounds.
    Cold,
    /// Try the basis left by the previous solve; fall back to a cold start if it is
    /// not primal feasible for the current data.
    Warm,
}

const NOT_BASIC: usize = usize::MAX;

/// Reusable workspace for one LP shape (m rows, n structural variables).
#[derive(Debug, Clone)]
pub struct BoundedSimplex {
    m: usize,
    n: usize,
    /// Column-major m × (n + m): structural columns, then one artificial per row.
    a: Vec<f64>,
    b: Vec<f64>,
    cost: Vec<f64>,
    lower: Vec<f64>,
    upper: Vec<f64>,
    x: Vec<f64>,
    at_upper: Vec<bool>,
    basis: Vec<usize>,
    position: Vec<usize>,
    /// Row-major m × m basis inverse.
    binv: Vec<f64>,
    phase_cost: Vec<f64>,
    y: Vec<f64>,
    alpha: Vec<f64>,
    rhs: Vec<f64>,
    lu: Vec<f64>,
    has_basis: bool,
    tol: Tolerances,
}

impl BoundedSimplex {
    /// A workspace for `m` equality rows and `n` variables, all columns zero,
    /// costs zero and bounds [0, 1].
    pub fn new(m: usize, n: usize, tol: Tolerances) -> Self {
        let total = n + m;
        let mut a = vec![0.0; m * total];
        for i in 0..m {
            a[(n + i) * m + i] = 1.0;
        }
        Self {
            m,
            n,
            a,
            b: vec![0.0; m],
            cost: vec![0.0; total],
            lower: vec![0.0; total],
            upper: vec![1.0; total],
            x: vec![0.0; total],
            at_upper: vec![false; total],
            basis: vec![NOT_BASIC; m],
            position: vec![NOT_BASIC; total],
            binv: vec![0.0; m * m],
            phase_cost: vec![0.0; total],
            y: vec![0.0; m],
            alpha: vec![0.0; m],
            rhs: vec![0.0; m],
            lu: vec![0.0; m * m],
            has_basis: false,
            tol,
        }
    }

    /// Number of rows.
    pub fn rows(&self) -> usize {
        self.m
    }

    /// Number of structural variables.
    pub fn variables(&self) -> usize {
        self.n
    }

    /// Sets column `j` (length m).
    pub fn set_column(&mut self, j: usize, column: &[f64]) {
        let m = self.m;
        self.a[j * m..(j + 1) * m].copy_from_slice(&column[..m]);
    }

    /// Sets one entry of the constraint matrix.
    pub fn set_entry(&mut self, row: usize, j: usize, value: f64) {
        self.a[j * self.m + row] = value;
    }

    /// Sets the right-hand side (length m).
    pub fn set_rhs(&mut self, b: &[f64]) {
        self.b.copy_from_slice(&b[..self.m]);
    }

    /// Sets the cost of variable `j`.
    pub fn set_cost(&mut self, j: usize, c: f64) {
        self.cost[j] = c;
    }

    /// Sets the bounds of variable `j`; the lower bound must be finite, the upper
    /// may be `f64::INFINITY`.
    pub fn set_bounds(&mut self, j: usize, lower: f64, upper: f64) -> Result<(), SimplexError> {
        if !lower.is_finite() || upper.is_nan() || lower > upper {
            return Err(SimplexError::BadBounds {
                index: j,
                lower,
                upper,
            });
        }
        self.lower[j] = lower;
        self.upper[j] = upper;
        Ok(())
    }

    /// Value of variable `j` after a solve.
    pub fn value(&self, j: usize) -> f64 {
        self.x[j]
    }

    /// Values of the structural variables after a solve.
    pub fn values(&self) -> &[f64] {
        &self.x[..self.n]
    }

    /// Indices of the basic variables (artificials are numbered from n).
    pub fn basis(&self) -> &[usize] {
        &self.basis
    }

    /// True when non-basic variable `j` sits at its upper bound.
    pub fn is_at_upper(&self, j: usize) -> bool {
        self.position[j] == NOT_BASIC && self.at_upper[j]
    }

    /// True when variable `j` is basic.
    pub fn is_basic(&self, j: usize) -> bool {
        self.position[j] != NOT_BASIC
    }

    /// Row duals y (yᵀ = c_Bᵀ B⁻¹) of the last solve.
    pub fn duals(&self) -> &[f64] {
        &self.y
    }

    /// Solves the current program.
    pub fn solve(&mut self, start: Start) -> Result<SimplexSolution, SimplexError> {
        let mut iterations = 0;
        if start == Start::Warm && self.has_basis {
            let primal_ok = self.try_warm();
            if self.has_basis {
                self.load_phase_two();
                let ready = if primal_ok {
                    true
                } else if self.dual_feasible() {
                    // The previous optimum stays dual feasible when only the data
                    // on the right changed (a new command): the dual simplex walks
                    // back to primal feasibility in a few pivots, or proves there is
                    // none.
                    match self.dual_iterate() {
                        Ok(k) => {
                            iterations += k;
                            true
                        }
                        Err(SimplexError::Infeasible { residual }) => {
                            return Err(SimplexError::Infeasible { residual });
                        }
                        Err(_) => false,
                    }
                } else {
                    false
                };
                if ready {
                    iterations += self.iterate()?;
                    let objective = self.finish()?;
                    return Ok(SimplexSolution {
                        objective,
                        iterations,
                        warm: true,
                    });
                }
            }
        }
        self.cold_phase_one();
        iterations += self.iterate()?;
        let residual: f64 = (self.n..self.n + self.m).map(|j| self.x[j]).sum();
        let scale = 1.0 + self.b.iter().fold(0.0_f64, |s, v| s.max(v.abs()));
        if residual > self.tol.primal_feasibility * scale {
            self.has_basis = false;
            return Err(SimplexError::Infeasible { residual });
        }
        for j in self.n..self.n + self.m {
            self.upper[j] = 0.0;
        }
        self.load_phase_two();
        iterations += self.iterate()?;
        let objective = self.finish()?;
        Ok(SimplexSolution {
            objective,
            iterations,
            warm: false,
        })
    }

    /// Continues Phase II from the current basis after costs or bounds changed, as
    /// long as the basis stays primal feasible (it falls back to a cold start if not).
    pub fn resolve(&mut self) -> Result<SimplexSolution, SimplexError> {
        self.solve(Start::Warm)
    }

    fn load_phase_two(&mut self) {
        let total = self.n + self.m;
        self.phase_cost[..total].copy_from_slice(&self.cost[..total]);
        for j in self.n..total {
            self.phase_cost[j] = 0.0;
        }
    }

    fn cold_phase_one(&mut self) {
        let (m, n) = (self.m, self.n);
        for j in 0..n {
            self.x[j] = self.lower[j];
            self.at_upper[j] = false;
            self.position[j] = NOT_BASIC;
        }
        for i in 0..m {
            let mut r = self.b[i];
            for j in 0..n {
                r -= self.a[j * m + i] * self.x[j];
            }
            let sign = if r < 0.0 { -1.0 } else { 1.0 };
            let col = (n + i) * m;
            for k in 0..m {
                self.a[col + k] = 0.0;
            }
            self.a[col + i] = sign;
            let j = n + i;
            self.lower[j] = 0.0;
            self.upper[j] = f64::INFINITY;
            self.x[j] = r.abs();
            self.at_upper[j] = false;
            self.basis[i] = j;
            self.position[j] = i;
            for k in 0..m {
                self.binv[i * m + k] = if k == i { sign } else { 0.0 };
            }
        }
        for j in 0..n + m {
            self.phase_cost[j] = if j >= n { 1.0 } else { 0.0 };
        }
        self.has_basis = true;
    }

    /// Refactors the stored basis with the current data and accepts it when the
    /// basic values lie within bounds.
    fn try_warm(&mut self) -> bool {
        for j in 0..self.n + self.m {
            if self.position[j] == NOT_BASIC {
                self.x[j] = if self.at_upper[j] && self.upper[j].is_finite() {
                    self.upper[j]
                } else {
                    self.at_upper[j] = false;
                    self.lower[j]
                };
            }
        }
        if !self.refactor() {
            self.has_basis = false;
            return false;
        }
        self.recompute_basic();
        let tol = self.tol.primal_feasibility;
        self.basis
            .iter()
            .all(|&j| self.x[j] >= self.lower[j] - tol && self.x[j] <= self.upper[j] + tol)
    }

    /// True when every movable non-basic variable has a reduced cost of the right
    /// sign for its bound (computes the duals as a side effect).
    fn dual_feasible(&mut self) -> bool {
        self.compute_duals();
        let m = self.m;
        (0..self.n + m).all(|j| {
            if self.position[j] != NOT_BASIC || self.upper[j] - self.lower[j] <= 0.0 {
                return true;
            }
            let d = self.reduced_cost(j);
            if self.at_upper[j] {
                d <= self.tol.optimality
            } else {
                d >= -self.tol.optimality
            }
        })
    }

    fn compute_duals(&mut self) {
        let m = self.m;
        for k in 0..m {
            let mut s = 0.0;
            for i in 0..m {
                s += self.phase_cost[self.basis[i]] * self.binv[i * m + k];
            }
            self.y[k] = s;
        }
    }

    fn reduced_cost(&self, j: usize) -> f64 {
        let m = self.m;
        let col = &self.a[j * m..(j + 1) * m];
        self.phase_cost[j] - self.y.iter().zip(col).map(|(y, a)| y * a).sum::<f64>()
    }

    /// Dual simplex from a dual-feasible basis: the most violated basic variable
    /// leaves at its violated bound; the entering variable is the one whose
    /// reduced cost reaches zero first, which keeps the basis dual feasible.
    fn dual_iterate(&mut self) -> Result<usize, SimplexError> {
        let (m, n) = (self.m, self.n);
        let mut iterations = 0;
        let mut since_refactor = 0;
        loop {
            if iterations >= self.tol.max_iterations {
                return Err(SimplexError::IterationLimit(iterations));
            }
            let mut r = NOT_BASIC;
            let mut worst = self.tol.primal_feasibility;
            for i in 0..m {
                let j = self.basis[i];
                let v = (self.lower[j] - self.x[j]).max(self.x[j] - self.upper[j]);
                if v > worst {
                    worst = v;
                    r = i;
                }
            }
            if r == NOT_BASIC {
                return Ok(iterations);
            }
            let out = self.basis[r];
            let to_upper = self.x[out] > self.upper[out];
            let target = if to_upper {
                self.upper[out]
            } else {
                self.lower[out]
            };
            self.compute_duals();
            let mut q = NOT_BASIC;
            let mut best_ratio = f64::INFINITY;
            let mut best_alpha = 0.0;
            for j in 0..n + m {
                if self.position[j] != NOT_BASIC || self.upper[j] - self.lower[j] <= 0.0 {
                    continue;
                }
                let mut alpha_rj = 0.0;
                for k in 0..m {
                    alpha_rj += self.binv[r * m + k] * self.a[j * m + k];
                }
                // x_r moves by −alpha_rj per unit increase of x_j.
                let wants = if to_upper { alpha_rj } else { -alpha_rj };
                let eligible = if self.at_upper[j] {
                    wants < -self.tol.pivot
                } else {
                    wants > self.tol.pivot
                };
                if !eligible {
                    continue;
                }
                let ratio = self.reduced_cost(j).abs() / alpha_rj.abs();
                let tie = self.tol.ratio_tie * (1.0 + ratio);
                if ratio < best_ratio - tie
                    || (ratio <= best_ratio + tie && alpha_rj.abs() > best_alpha)
                {
                    best_ratio = best_ratio.min(ratio);
                    best_alpha = alpha_rj.abs();
                    q = j;
                }
            }
            if q == NOT_BASIC {
                return Err(SimplexError::Infeasible { residual: worst });
            }
            for i in 0..m {
                let mut s = 0.0;
                for k in 0..m {
                    s += self.binv[i * m + k] * self.a[q * m + k];
                }
                self.alpha[i] = s;
            }
            let t = (self.x[out] - target) / self.alpha[r];
            self.x[q] += t;
            for i in 0..m {
                let j = self.basis[i];
                self.x[j] -= t * self.alpha[i];
            }
            self.x[out] = target;
            self.at_upper[out] = to_upper;
            self.position[out] = NOT_BASIC;
            self.basis[r] = q;
            self.position[q] = r;
            self.at_upper[q] = false;
            self.pivot_inverse(r);
            iterations += 1;
            since_refactor += 1;
            if since_refactor >= self.tol.refactor_interval {
                since_refactor = 0;
                if !self.refactor() {
                    self.has_basis = false;
                    return Err(SimplexError::SingularBasis);
                }
                self.recompute_basic();
            }
        }
    }

    /// Replaces basis column r in the explicit inverse, using `alpha` = B⁻¹a_q.
    fn pivot_inverse(&mut self, r: usize) {
        let m = self.m;
        let piv = self.alpha[r];
        for k in 0..m {
            self.binv[r * m + k] /= piv;
        }
        for i in 0..m {
            if i != r {
                let f = self.alpha[i];
                if f != 0.0 {
                    for k in 0..m {
                        self.binv[i * m + k] -= f * self.binv[r * m + k];
                    }
                }
            }
        }
    }

    /// Main loop shared by both phases; returns the number of iterations.
    fn iterate(&mut self) -> Result<usize, SimplexError> {
        let (m, n) = (self.m, self.n);
        let total = n + m;
        let mut iterations = 0;
        let mut since_refactor = 0;
        let mut degenerate_run = 0;
        loop {
            if iterations >= self.tol.max_iterations {
                self.has_basis = false;
                return Err(SimplexError::IterationLimit(iterations));
            }
            self.compute_duals();
            let bland = degenerate_run >= self.tol.degenerate_run_limit;
            let mut entering = NOT_BASIC;
            let mut best = 0.0;
            for j in 0..total {
                if self.position[j] != NOT_BASIC || self.upper[j] - self.lower[j] <= 0.0 {
                    continue;
                }
                let d = self.reduced_cost(j);
                let gain = if self.at_upper[j] { d } else { -d };
                if gain > self.tol.optimality {
                    if bland {
                        entering = j;
                        break;
                    }
                    if gain > best {
                        best = gain;
                        entering = j;
                    }
                }
            }
            if entering == NOT_BASIC {
                return Ok(iterations);
            }
            let q = entering;
            // alpha = B⁻¹ a_q.
            for i in 0..m {
                let mut s = 0.0;
                for k in 0..m {
                    s += self.binv[i * m + k] * self.a[q * m + k];
                }
                self.alpha[i] = s;
            }
            let dir = if self.at_upper[q] { -1.0 } else { 1.0 };
            let mut step = self.upper[q] - self.lower[q];
            let mut leave = NOT_BASIC;
            let mut leave_to_upper = false;
            let mut leave_pivot = 0.0;
            for i in 0..m {
                let delta = -dir * self.alpha[i];
                let j = self.basis[i];
                let (ratio, to_upper) = if delta < -self.tol.pivot {
                    (((self.x[j] - self.lower[j]) / -delta).max(0.0), false)
                } else if delta > self.tol.pivot && self.upper[j].is_finite() {
                    (((self.upper[j] - self.x[j]) / delta).max(0.0), true)
                } else {
                    continue;
                };
                let tie = self.tol.ratio_tie * (1.0 + ratio);
                let better = if leave == NOT_BASIC {
                    ratio < step
                } else if ratio < step - tie {
                    true
                } else if ratio <= step + tie {
                    // Equal ratios up to rounding: the larger pivot keeps the basis
                    // well conditioned; under Bland's rule the smaller index leaves.
                    if bland {
                        j < self.basis[leave]
                    } else {
                        delta.abs() > leave_pivot
                    }
                } else {
                    false
                };
                if better {
                    step = step.min(ratio);
                    leave = i;
                    leave_to_upper = to_upper;
                    leave_pivot = delta.abs();
                }
            }
            if !step.is_finite() {
                self.has_basis = false;
                return Err(SimplexError::Unbounded);
            }
            iterations += 1;
            if step <= self.tol.degenerate_step {
                degenerate_run += 1;
            } else {
                degenerate_run = 0;
            }
            // Move along the edge.
            self.x[q] += dir * step;
            for i in 0..m {
                let j = self.basis[i];
                self.x[j] -= dir * step * self.alpha[i];
            }
            if leave == NOT_BASIC {
                // Bound flip: the entering variable crossed its own box.
                self.at_upper[q] = !self.at_upper[q];
                self.x[q] = if self.at_upper[q] {
                    self.upper[q]
                } else {
                    self.lower[q]
                };
                continue;
            }
            let r = leave;
            let out = self.basis[r];
            self.x[out] = if leave_to_upper {
                self.upper[out]
            } else {
                self.lower[out]
            };
            self.at_upper[out] = leave_to_upper;
            self.position[out] = NOT_BASIC;
            self.basis[r] = q;
            self.position[q] = r;
            self.at_upper[q] = false;
            self.pivot_inverse(r);
            since_refactor += 1;
            if since_refactor >= self.tol.refactor_interval {
                since_refactor = 0;
                if !self.refactor() {
                    self.has_basis = false;
                    return Err(SimplexError::SingularBasis);
                }
                self.recompute_basic();
            }
        }
    }

    /// Fresh factorization and basic values; clamps rounding-level bound
    /// violations and returns the objective.
    fn finish(&mut self) -> Result<f64, SimplexError> {
        if !self.refactor() {
            self.has_basis = false;
            return Err(SimplexError::SingularBasis);
        }
        self.recompute_basic();
        let m = self.m;
        for k in 0..m {
            let mut s = 0.0;
            for i in 0..m {
                s += self.phase_cost[self.basis[i]] * self.binv[i * m + k];
            }
            self.y[k] = s;
        }
        let tol = self.tol.final_feasibility;
        for i in 0..m {
            let j = self.basis[i];
            if self.x[j] < self.lower[j] - tol || self.x[j] > self.upper[j] + tol {
                self.has_basis = false;
                return Err(SimplexError::SingularBasis);
            }
            self.x[j] = self.x[j].clamp(self.lower[j], self.upper[j]);
        }
        Ok((0..self.n).map(|j| self.cost[j] * self.x[j]).sum())
    }

    /// Gauss–Jordan inverse of the basis columns with partial pivoting.
    fn refactor(&mut self) -> bool {
        let m = self.m;
        for i in 0..m {
            let j = self.basis[i];
            if j == NOT_BASIC {
                return false;
            }
            for k in 0..m {
                // lu is row-major: row k, column i holds a[k, basis[i]].
                self.lu[k * m + i] = self.a[j * m + k];
            }
        }
        for v in self.binv.iter_mut() {
            *v = 0.0;
        }
        for i in 0..m {
            self.binv[i * m + i] = 1.0;
        }
        let mut largest = 0.0_f64;
        for v in &self.lu {
            largest = largest.max(v.abs());
        }
        for c in 0..m {
            let mut p = c;
            for r in c + 1..m {
                if self.lu[r * m + c].abs() > self.lu[p * m + c].abs() {
                    p = r;
                }
            }
            let piv = self.lu[p * m + c];
            if piv.abs() <= self.tol.pivot * largest.max(1e-300) {
                return false;
            }
            if p != c {
                for k in 0..m {
                    self.lu.swap(p * m + k, c * m + k);
                    self.binv.swap(p * m + k, c * m + k);
                }
            }
            for k in 0..m {
                self.lu[c * m + k] /= piv;
                self.binv[c * m + k] /= piv;
            }
            for r in 0..m {
                if r != c {
                    let f = self.lu[r * m + c];
                    if f != 0.0 {
                        for k in 0..m {
                            self.lu[r * m + k] -= f * self.lu[c * m + k];
                            self.binv[r * m + k] -= f * self.binv[c * m + k];
                        }
                    }
                }
            }
        }
        // binv now inverts the matrix whose column i is basis[i]'s column, so its
        // row i gives basis[i]'s value: x_B = binv · (b − N x_N).
        true
    }

    fn recompute_basic(&mut self) {
        let m = self.m;
        self.rhs.copy_from_slice(&self.b);
        for j in 0..self.n + m {
            if self.position[j] == NOT_BASIC && self.x[j] != 0.0 {
                for k in 0..m {
                    self.rhs[k] -= self.a[j * m + k] * self.x[j];
                }
            }
        }
        for i in 0..m {
            let mut s = 0.0;
            for k in 0..m {
                s += self.binv[i * m + k] * self.rhs[k];
            }
            self.x[self.basis[i]] = s;
        }
    }
}
