//! Test fixtures: layouts worked by hand, seeded random layouts, and an
//! independent interior-point reference (Clarabel) for the allocation LP.

use super::{Effectiveness, PortGeometry, SideForceLimit};
use nalgebra::Vector3;

/// Small deterministic generator (SplitMix64), so failures replay exactly.
pub struct Rng(pub u64);

impl Rng {
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    /// Uniform in [lo, hi).
    pub fn range(&mut self, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }
    pub fn unit(&mut self) -> Vector3<f64> {
        loop {
            let v = Vector3::new(
                self.range(-1.0, 1.0),
                self.range(-1.0, 1.0),
                self.range(-1.0, 1.0),
            );
            let n = v.norm();
            if n > 0.1 && n <= 1.0 {
                return v / n;
            }
        }
    }
}

/// Standard gravity, m/s², for turning a specific impulse into a mass flow.
const G0: f64 = 9.806_65;

/// A port on a 54 mm tube at station offset `x` from the CG and clock angle
/// `clock_rad`, pushing along `dir` with `thrust` N and a 50 s specific impulse.
pub fn port_at(
    name: &str,
    x: f64,
    radius: f64,
    clock_rad: f64,
    dir: Vector3<f64>,
    thrust: f64,
) -> PortGeometry {
    PortGeometry {
        name: name.into(),
        position_m: Vector3::new(x, radius * clock_rad.cos(), radius * clock_rad.sin()),
        direction: dir,
        thrust_n: thrust,
        mass_flow_kg_s: thrust / (50.0 * G0),
    }
}

/// Random layout: ports on a tube of radius 27 mm, between 0.6 m aft and 0.4 m
/// forward of the CG, random directions, thrusts and specific impulses.
pub fn random_layout(rng: &mut Rng, n: usize) -> Effectiveness {
    let ports: Vec<PortGeometry> = (0..n)
        .map(|i| {
            let thrust = rng.range(0.5, 3.0);
            let isp = rng.range(40.0, 70.0);
            PortGeometry {
                name: format!("p{i}"),
                position_m: Vector3::new(
                    rng.range(-0.6, 0.4),
                    0.027 * rng.range(-1.0, 1.0),
                    0.027 * rng.range(-1.0, 1.0),
                ),
                direction: rng.unit(),
                thrust_n: thrust,
                mass_flow_kg_s: thrust / (isp * G0),
            }
        })
        .collect();
    Effectiveness::from_ports(&ports).expect("random ports are valid")
}

/// A random command inside the envelope: B·u for random u in the unit cube.
pub fn inside_command(rng: &mut Rng, e: &Effectiveness) -> Vector3<f64> {
    let u: Vec<f64> = (0..e.len()).map(|_| rng.range(0.0, 1.0)).collect();
    e.torque_for(&u)
}

/// Least gas by Clarabel (interior point) for B u = s·τ with s in `[s_lo, s_hi]`,
/// u in [0, 1], and the side-force rule; `None` unless Clarabel reports solved.
/// Returns (gas, s).
pub fn clarabel_min_gas(
    e: &Effectiveness,
    tau: &Vector3<f64>,
    side: SideForceLimit,
    s_lo: f64,
    s_hi: f64,
    maximise_scale: bool,
) -> Option<(f64, f64)> {
    use clarabel::algebra::CscMatrix;
    use clarabel::solver::{
        DefaultSettingsBuilder, DefaultSolver, IPSolver, SolverStatus, SupportedConeT,
    };
    let n = e.len();
    let nv = n + 1;
    // Dense rows, converted to CSC below: equalities first, then inequalities.
    let mut eq: Vec<(Vec<f64>, f64)> = Vec::new();
    for r in 0..3 {
        let mut row = vec![0.0; nv];
        for (i, v) in row.iter_mut().take(n).enumerate() {
            *v = e.torque()[(r, i)];
        }
        row[n] = -tau[r];
        eq.push((row, 0.0));
    }
    let mut ineq: Vec<(Vec<f64>, f64)> = Vec::new();
    match side {
        SideForceLimit::Free => {}
        SideForceLimit::PureCouple | SideForceLimit::Bounded { .. } => {
            let limit = match side {
                SideForceLimit::Bounded { limit_n } => limit_n,
                _ => 0.0,
            };
            for r in 1..3 {
                let row: Vec<f64> = (0..nv)
                    .map(|i| if i < n { e.force()[(r, i)] } else { 0.0 })
                    .collect();
                if limit == 0.0 {
                    eq.push((row, 0.0));
                } else {
                    ineq.push((row.clone(), limit));
                    ineq.push((row.iter().map(|v| -v).collect(), limit));
                }
            }
        }
    }
    for i in 0..nv {
        let (lo, hi) = if i < n { (0.0, 1.0) } else { (s_lo, s_hi) };
        let mut row = vec![0.0; nv];
        row[i] = 1.0;
        ineq.push((row.clone(), hi));
        row[i] = -1.0;
        ineq.push((row, -lo));
    }
    let rows: Vec<&(Vec<f64>, f64)> = eq.iter().chain(ineq.iter()).collect();
    let dense: Vec<Vec<f64>> = rows.iter().map(|(r, _)| r.clone()).collect();
    let a = CscMatrix::from(&dense);
    let b: Vec<f64> = rows.iter().map(|(_, v)| *v).collect();
    let p = CscMatrix::<f64>::zeros((nv, nv));
    let mut q: Vec<f64> = if maximise_scale {
        vec![0.0; nv]
    } else {
        e.mass_flow_kg_s().iter().copied().chain([0.0]).collect()
    };
    if maximise_scale {
        q[n] = -1.0;
    }
    let cones = [
        SupportedConeT::ZeroConeT(eq.len()),
        SupportedConeT::NonnegativeConeT(ineq.len()),
    ];
    let settings = DefaultSettingsBuilder::default()
        .verbose(false)
        .tol_gap_abs(1e-12)
        .tol_gap_rel(1e-12)
        .tol_feas(1e-12)
        .max_iter(200)
        .build()
        .ok()?;
    let mut solver = DefaultSolver::new(&p, &q, &a, &b, &cones, settings).ok()?;
    solver.solve();
    match solver.solution.status {
        SolverStatus::Solved | SolverStatus::AlmostSolved => {}
        _ => return None,
    }
    let x = &solver.solution.x;
    let gas: f64 = (0..n).map(|i| e.mass_flow_kg_s()[i] * x[i]).sum();
    Some((gas, x[n]))
}
