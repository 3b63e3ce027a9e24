//! The allocation questions posed to a general LP solver (`good_lp` with the
//! `microlp` backend), one fresh model per call.
//!
//! Two uses:
//! - a reference for the dedicated simplex in [`super::mingas`]: same programs,
//!   written the plain way, solved by an unrelated implementation;
//! - the attainable torque set when the side force is limited. With rows on
//!   F_y and F_z the set is the projection of a polytope that is no longer a
//!   zonotope, so its support function h(d) = max d·B u and its ray maxima are
//!   linear programs, and its shape is approximated from a chosen number of
//!   directions (a Fibonacci sphere): the planes d_k·x ≤ h(d_k) bound it from
//!   outside, and the maximising torques are attainable points inside it.

use super::mingas::{positive_or_one, CommandRay};
use super::{Allocation, AllocationStatus, Effectiveness, SideForceLimit, Tolerances};
use good_lp::{
    microlp, variable, Expression, ProblemVariables, ResolutionError, Solution, SolverModel,
    Variable,
};
use nalgebra::Vector3;
use thiserror::Error;

/// Outcomes of a reference LP that are not an optimum.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum LpError {
    /// No point satisfies the constraints.
    #[error("the linear program is infeasible")]
    Infeasible,
    /// The objective is unbounded.
    #[error("the linear program is unbounded")]
    Unbounded,
    /// The side-force limit is negative or not finite.
    #[error("side-force limit {0} N is not a finite non-negative number")]
    BadLimit(f64),
    /// Any other solver failure, with its message.
    #[error("LP solver: {0}")]
    Solver(String),
}

impl From<ResolutionError> for LpError {
    fn from(e: ResolutionError) -> Self {
        match e {
            ResolutionError::Infeasible => LpError::Infeasible,
            ResolutionError::Unbounded => LpError::Unbounded,
            other => LpError::Solver(other.to_string()),
        }
    }
}

/// Duty-cycle variables and the torque and force expressions built from them.
struct Model {
    vars: ProblemVariables,
    u: Vec<Variable>,
    torque: [Expression; 3],
    force: [Expression; 3],
}

fn model(e: &Effectiveness) -> Model {
    model_in_units(e, 1.0)
}

/// As [`model`], with duty variables in units of `duty_unit` (bounds [0, 1/duty_unit]).
fn model_in_units(e: &Effectiveness, duty_unit: f64) -> Model {
    let mut vars = ProblemVariables::new();
    let u: Vec<Variable> = (0..e.len())
        .map(|_| vars.add(variable().min(0.0).max(1.0 / duty_unit)))
        .collect();
    let row = |m: &nalgebra::Matrix3xX<f64>, r: usize| -> Expression {
        u.iter().enumerate().map(|(i, v)| m[(r, i)] * *v).sum()
    };
    let torque = [row(e.torque(), 0), row(e.torque(), 1), row(e.torque(), 2)];
    let force = [row(e.force(), 0), row(e.force(), 1), row(e.force(), 2)];
    Model {
        vars,
        u,
        torque,
        force,
    }
}

fn side_rows<M: SolverModel>(
    mut p: M,
    force: &[Expression; 3],
    side: SideForceLimit,
) -> Result<M, LpError> {
    let limit = match side {
        SideForceLimit::Free => return Ok(p),
        SideForceLimit::PureCouple => 0.0,
        SideForceLimit::Bounded { limit_n } => {
            if !limit_n.is_finite() || limit_n < 0.0 {
                return Err(LpError::BadLimit(limit_n));
            }
            limit_n
        }
    };
    for f in &force[1..3] {
        if limit == 0.0 {
            p.add_constraint(f.clone().eq(0.0));
        } else {
            p.add_constraint(f.clone().leq(limit));
            p.add_constraint(f.clone().geq(-limit));
        }
    }
    Ok(p)
}

fn gas_expression(e: &Effectiveness, u: &[Variable]) -> Expression {
    u.iter()
        .zip(e.mass_flow_kg_s().iter())
        .map(|(v, m)| *m * *v)
        .sum()
}

/// The torque rows divided by `unit` minus t·d, for a unit direction d.
fn ray_rows<M: SolverModel>(
    mut p: M,
    torque: [Expression; 3],
    unit: f64,
    d: &Vector3<f64>,
    t: Variable,
) -> M {
    for (r, row) in torque.into_iter().enumerate() {
        p.add_constraint((row * (1.0 / unit) - d[r] * t).eq(0.0));
    }
    p
}

/// The side-force rule for duty variables in units of `duty_unit`.
fn side_in_units(side: SideForceLimit, duty_unit: f64) -> SideForceLimit {
    match side {
        SideForceLimit::Bounded { limit_n } => SideForceLimit::Bounded {
            limit_n: limit_n / duty_unit,
        },
        other => other,
    }
}

/// Least gas for B u = t·unit·d with t in `length`, or `Infeasible`; duty
/// variables in units of `du`, answer in plain duty cycles.
fn least_gas_at(
    e: &Effectiveness,
    ray: &CommandRay,
    (unit, du): (f64, f64),
    side: SideForceLimit,
    length: (f64, f64),
) -> Result<Vec<f64>, LpError> {
    let Model {
        mut vars,
        u,
        torque,
        force,
    } = model_in_units(e, du);
    let t = vars.add(variable().min(length.0 / du).max(length.1 / du));
    let p = vars.minimise(gas_expression(e, &u)).using(microlp);
    let p = ray_rows(p, torque, unit, &ray.direction, t);
    let p = side_rows(p, &force, side_in_units(side, du))?;
    let sol = p.solve()?;
    Ok(u.iter().map(|v| sol.value(*v) * du).collect())
}

/// Reference minimum-gas allocation: the same semantics as
/// [`super::MinGasAllocator::allocate`], through `good_lp`/`microlp`, posed on
/// the command's unit direction d and its length r (in units of the largest
/// torque entry) in the same way.
///
/// Outside the envelope the second step (least gas at the maximal length t*)
/// fixes t = t*; should `microlp` call that exact point infeasible by rounding, it
/// retries with t ∈ [t*(1 − δ), t*], δ = [`Tolerances::reference_scale_relax`].
pub fn reference_min_gas(
    e: &Effectiveness,
    tau: &Vector3<f64>,
    side: SideForceLimit,
    tol: &Tolerances,
) -> Result<Allocation, LpError> {
    let unit = positive_or_one(e.torque().abs().max());
    let Some(ray) = CommandRay::of(tau, unit) else {
        let duty = vec![0.0; e.len()];
        return Ok(Allocation {
            gas_rate_kg_s: 0.0,
            torque: Vector3::zeros(),
            force: Vector3::zeros(),
            duty,
            scale: 1.0,
            status: AllocationStatus::Exact,
        });
    };
    let longest: f64 = (0..e.len())
        .map(|i| e.torque().column(i).norm() / unit)
        .sum();
    // Short commands in duty units of their own length, as the allocator does.
    let du = if ray.length < tol.small_command {
        ray.length
    } else {
        1.0
    };
    let units = (unit, du);
    let first = if ray.length <= longest {
        least_gas_at(e, &ray, units, side, (ray.length, ray.length))
    } else {
        Err(LpError::Infeasible)
    };
    let (duty, scale, status) = match first {
        Ok(u) => (u, 1.0, AllocationStatus::Exact),
        Err(LpError::Infeasible) => {
            let cap = ray.length.min(longest);
            let mut t = ray_length(e, &ray, units, side, cap)?.clamp(0.0, cap);
            if t <= tol.primal_feasibility * du {
                t = 0.0;
            }
            let u = match least_gas_at(e, &ray, units, side, (t, t)) {
                Err(LpError::Infeasible) => {
                    let low = t * (1.0 - tol.reference_scale_relax);
                    least_gas_at(e, &ray, units, side, (low, t))?
                }
                other => other?,
            };
            (u, ray.fraction(t), AllocationStatus::Saturated)
        }
        Err(other) => return Err(other),
    };
    let duty: Vec<f64> = duty.into_iter().map(|x| x.clamp(0.0, 1.0)).collect();
    Ok(Allocation {
        gas_rate_kg_s: e.gas_for(&duty),
        torque: e.torque_for(&duty),
        force: e.force_for(&duty),
        duty,
        scale,
        status,
    })
}

/// Largest t ∈ [0, cap] with t·unit·d attainable under the side-force rule,
/// solved with duty variables in units of `du`.
fn ray_length(
    e: &Effectiveness,
    ray: &CommandRay,
    (unit, du): (f64, f64),
    side: SideForceLimit,
    cap: f64,
) -> Result<f64, LpError> {
    let Model {
        mut vars,
        torque,
        force,
        ..
    } = model_in_units(e, du);
    let t = vars.add(variable().min(0.0).max(cap / du));
    let p = vars.maximise(t).using(microlp);
    let p = ray_rows(p, torque, unit, &ray.direction, t);
    let p = side_rows(p, &force, side_in_units(side, du))?;
    let sol = p.solve()?;
    Ok(sol.value(t) * du)
}

/// Largest s ∈ [0, 1] with s·τ attainable under the side-force rule (1 for the
/// zero command), posed on τ's direction as [`reference_min_gas`] is.
pub fn max_scale(
    e: &Effectiveness,
    tau: &Vector3<f64>,
    side: SideForceLimit,
) -> Result<f64, LpError> {
    let unit = positive_or_one(e.torque().abs().max());
    let Some(ray) = CommandRay::of(tau, unit) else {
        return Ok(1.0);
    };
    let longest: f64 = (0..e.len())
        .map(|i| e.torque().column(i).norm() / unit)
        .sum();
    let t = ray_length(e, &ray, (unit, 1.0), side, ray.length.min(longest))?;
    Ok(ray.fraction(t))
}

/// Support value h(d) = max d·(B u) under the side-force rule, with the torque
/// that attains it.
pub fn support(
    e: &Effectiveness,
    d: &Vector3<f64>,
    side: SideForceLimit,
) -> Result<(f64, Vector3<f64>), LpError> {
    let Model {
        vars,
        u,
        torque,
        force,
    } = model(e);
    let objective: Expression = torque
        .iter()
        .enumerate()
        .map(|(r, t)| d[r] * t.clone())
        .sum();
    let p = vars.maximise(objective).using(microlp);
    let p = side_rows(p, &force, side)?;
    let sol = p.solve()?;
    let duty: Vec<f64> = u.iter().map(|v| sol.value(*v).clamp(0.0, 1.0)).collect();
    let t = e.torque_for(&duty);
    Ok((t.dot(d), t))
}

/// Largest t ≥ 0 with t·dir attainable under the side-force rule (a ray
/// intersection). `dir` must be non-zero.
pub fn max_along(
    e: &Effectiveness,
    dir: &Vector3<f64>,
    side: SideForceLimit,
) -> Result<f64, LpError> {
    let Model {
        mut vars,
        torque,
        force,
        ..
    } = model(e);
    let t = vars.add(variable().min(0.0));
    let mut p = vars.maximise(t).using(microlp);
    for (r, row) in torque.into_iter().enumerate() {
        p.add_constraint((row - dir[r] * t).eq(0.0));
    }
    let p = side_rows(p, &force, side)?;
    let sol = p.solve()?;
    Ok(sol.value(t))
}

/// `count` nearly uniform unit vectors on the sphere (a Fibonacci lattice).
pub fn fibonacci_directions(count: usize) -> Vec<Vector3<f64>> {
    let golden = std::f64::consts::PI * (3.0 - 5.0_f64.sqrt());
    (0..count)
        .map(|k| {
            let z = 1.0 - 2.0 * (k as f64 + 0.5) / count as f64;
            let r = (1.0 - z * z).max(0.0).sqrt();
            let phi = golden * k as f64;
            Vector3::new(r * phi.cos(), r * phi.sin(), z)
        })
        .collect()
}

/// Polytope approximation of the side-force-limited torque set from a fixed set
/// of directions.
#[derive(Debug, Clone, PartialEq)]
pub struct SideForceEnvelope {
    /// Supporting planes (unit normal d_k, offset h(d_k)); their intersection
    /// contains the true set.
    pub planes: Vec<(Vector3<f64>, f64)>,
    /// Attainable torques that achieve each h(d_k); their convex hull lies inside
    /// the true set.
    pub points: Vec<Vector3<f64>>,
}

impl SideForceEnvelope {
    /// Solves one support LP per direction of a `count`-point Fibonacci sphere.
    pub fn new(e: &Effectiveness, side: SideForceLimit, count: usize) -> Result<Self, LpError> {
        let mut planes = Vec::with_capacity(count);
        let mut points = Vec::with_capacity(count);
        for d in fibonacci_directions(count) {
            let (h, t) = support(e, &d, side)?;
            planes.push((d, h));
            points.push(t);
        }
        Ok(Self { planes, points })
    }

    /// Ray maximum of the outer approximation: an upper bound on the true one.
    pub fn outer_max_along(&self, dir: &Vector3<f64>) -> f64 {
        self.planes
            .iter()
            .filter(|(n, _)| n.dot(dir) > 0.0)
            .map(|(n, h)| h.max(0.0) / n.dot(dir))
            .fold(f64::INFINITY, f64::min)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::allocation::testkit::{inside_command, random_layout, Rng};
    use crate::allocation::{MinGasAllocator, Zonotope};
    use approx::assert_relative_eq;

    #[test]
    fn free_envelope_matches_the_zonotope() {
        // With no side-force rows the LP support value is the zonotope's closed form
        // Σ max(0, bᵢ·d); microlp is accurate to about 1e-9 here, hence 1e-8.
        let tol = Tolerances::default();
        let e = random_layout(&mut Rng(21), 9);
        let z = Zonotope::torque(&e, &tol).expect("builds");
        let env = SideForceEnvelope::new(&e, SideForceLimit::Free, 40).expect("solves");
        for ((d, h), p) in env.planes.iter().zip(&env.points) {
            assert_relative_eq!(*h, z.support(d), max_relative = 1e-8, epsilon = 1e-12);
            assert!(z.contains(p));
        }
        let dirs = fibonacci_directions(500);
        let mean: Vector3<f64> = dirs.iter().sum::<Vector3<f64>>() / 500.0;
        assert!(mean.norm() < 1e-2, "Fibonacci set is balanced");
    }

    #[test]
    fn reference_scale_over_the_whole_command_range() {
        // The reference is posed on the command's direction too: against the
        // zonotope's exact ray maximum, scale·k = 1 for k > 1 to 1e-8 (microlp's
        // tolerance) and the command met for k < 1, from 1e-12 to 1e15 times the
        // envelope, and the zero command is met with every valve shut.
        let tol = Tolerances::default();
        let mut rng = Rng(616);
        for case in 0..6 {
            let e = random_layout(&mut rng, 5 + case);
            let z = Zonotope::torque(&e, &tol).expect("builds");
            let d = inside_command(&mut rng, &e).normalize();
            let reach = z.max_along(&d);
            for k in [1e-12, 1e-6, 0.5, 2.0, 1e6, 1e10, 1e12, 1e15] {
                let tau = d * (reach * k);
                let r = reference_min_gas(&e, &tau, SideForceLimit::Free, &tol).expect("solves");
                if k < 1.0 {
                    assert_eq!(r.status, AllocationStatus::Exact, "k {k:e}");
                    assert!((r.torque - tau).norm() <= 1e-8 * tau.norm(), "k {k:e}");
                } else {
                    assert_eq!(r.status, AllocationStatus::Saturated, "k {k:e}");
                    assert_relative_eq!(r.scale * k, 1.0, max_relative = 1e-8);
                    let s = max_scale(&e, &tau, SideForceLimit::Free).expect("solves");
                    assert_relative_eq!(s * k, 1.0, max_relative = 1e-8);
                }
            }
            let zero = reference_min_gas(&e, &Vector3::zeros(), SideForceLimit::Free, &tol)
                .expect("solves");
            assert_eq!((zero.scale, zero.gas_rate_kg_s), (1.0, 0.0));
        }
    }

    #[test]
    fn side_limited_ray_maxima_match_the_simplex() {
        // The ray LP (microlp) against the dedicated simplex's saturation scale for
        // a command far outside: s·|τ| is the same ray maximum. 1e-8 relative for
        // microlp's tolerance. The outer plane approximation can only be larger.
        let tol = Tolerances::default();
        let mut rng = Rng(31);
        for case in 0..8 {
            let e = random_layout(&mut rng, 6 + case);
            for side in [
                SideForceLimit::Bounded { limit_n: 0.3 },
                SideForceLimit::PureCouple,
            ] {
                let env = SideForceEnvelope::new(&e, side, 60).expect("solves");
                let mut a = MinGasAllocator::new(&e, side, &tol).expect("setup");
                for _ in 0..3 {
                    let d = inside_command(&mut rng, &e).normalize();
                    let t = max_along(&e, &d, side).expect("solves");
                    let big = 10.0 * e.torque().abs().max() * e.len() as f64;
                    let got = a.allocate(&(d * big)).expect("solves");
                    assert_relative_eq!(got.scale * big, t, max_relative = 1e-8, epsilon = 1e-12);
                    assert!(env.outer_max_along(&d) >= t * (1.0 - 1e-9));
                    if let SideForceLimit::Bounded { limit_n } = side {
                        assert!(got.force.y.abs() <= limit_n * (1.0 + 1e-9));
                    }
                }
            }
        }
    }
}
