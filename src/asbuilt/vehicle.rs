//! The vehicle as drawn, reduced to what a sampled as-built vehicle changes,
//! and the evaluation of one as-built vehicle from a vector of deviations.
//!
//! Geometry is exact: each sampled port is re-placed (station, clock, cants)
//! and its force and torque about the shifted CG are recomputed. Thrust is not
//! re-solved through regulator, valve and nozzle for every sample (a nested
//! root search per port and state would cost far more than the ≤ 1 s budget
//! for 10 000 samples); instead ln T of each port at each flight state is a
//! quadratic in the logarithms of the ratios of hole diameter, discharge
//! coefficient, valve Cv and set pressure to their nominal values (a
//! second-order response surface, with the cross terms that carry the
//! valve–nozzle interaction), fitted exactly through 15 full solves of the
//! flow model: the nominal point, ±5 % in each input, and +5 % in each pair.
//! The tests check it against full solves of perturbed designs.
//!
//! Mass and inertias: a mass error is spread over the vehicle like its mass,
//! so it scales both inertias by the same factor; the inertia tolerances come
//! on top. The CG shift is the same at every flight state.

// Index loops here follow the formulas (axis k, input j, port i, pairs j < k).
#![allow(clippy::needless_range_loop)]

use super::spec::{Input, Spread, ToleranceSpec};
use super::AsBuiltError;
use crate::analysis::{feed, Analysis};
use crate::model::{Design, MotorCondition, NozzleSpec, Port, ValveFlow};
use nalgebra::Vector3;
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;

/// Relative step of the central differences behind the thrust exponents.
/// Secants over ±5 % fit the usual build scatter (up to ±10 % on a valve's Cv)
/// better than tangents would.
const FLOW_STEP: f64 = 0.05;

/// What one flight state contributes, fixed while the vehicle varies.
#[derive(Debug, Clone)]
pub struct StateBasis {
    /// Flight state name.
    pub name: String,
    /// Whether the motor burns (the misalignment torque acts).
    pub burning: bool,
    /// Nominal CG, body frame, m.
    pub cg: Vector3<f64>,
    /// Nominal diagonal inertia, kg·m².
    pub inertia: Vector3<f64>,
    /// Nominal required torque from the wanted accelerations, per axis, N·m.
    pub from_acceleration_n_m: [f64; 3],
    /// Nominal required torque from disturbances, per axis, N·m.
    pub from_disturbance_n_m: [f64; 3],
    /// Nominal thrust of each port fired alone, N.
    pub thrust_n: Vec<f64>,
    /// How each port's thrust responds to its hole diameter, discharge
    /// coefficient, valve Cv and the set pressure (gauge).
    pub response: Vec<Response>,
    /// Per-port thrust with k valves open relative to one (k = 1, 2, ...).
    pub droop_factor: Vec<f64>,
}

/// The design reduced for sampling.
#[derive(Debug, Clone)]
pub struct Basis {
    /// Ports as designed (or as measured, when the layout says so).
    pub ports: Vec<Port>,
    /// Tube outer radius, m.
    pub radius_m: f64,
    /// Per flight state.
    pub states: Vec<StateBasis>,
    /// Inputs that vary, in [`ToleranceSpec::inputs`] order.
    pub inputs: Vec<(Input, Spread)>,
    /// Nominal discharge coefficient of each port.
    pub discharge: Vec<f64>,
    /// Nominal gauge set pressure, Pa.
    pub set_pressure_gauge_pa: f64,
    /// Wanted angular acceleration per axis, rad/s².
    pub accel_rad_s2: [f64; 3],
    /// Roll disturbance, N·m.
    pub roll_disturbance_n_m: f64,
    /// Motor thrust, N.
    pub motor_thrust_n: f64,
    /// Nominal misalignment, rad.
    pub misalignment_rad: f64,
    /// Station of the motor nozzle, m.
    pub nozzle_station_m: f64,
    /// Valve delays (opening, closing), s.
    pub delays_s: [f64; 2],
}

fn discharge_of(p: &Port) -> f64 {
    match p.nozzle {
        NozzleSpec::Hole {
            discharge_coefficient,
            ..
        }
        | NozzleSpec::ConvergingDiverging {
            discharge_coefficient,
            ..
        } => discharge_coefficient,
    }
}

/// The diameter that sets the flow: the plain hole, or the throat.
fn flow_diameter(p: &Port) -> f64 {
    match p.nozzle {
        NozzleSpec::Hole { diameter_m, .. } => diameter_m,
        NozzleSpec::ConvergingDiverging {
            throat_diameter_m, ..
        } => throat_diameter_m,
    }
}

/// The design with one flow parameter of every port scaled by `factor`.
fn scaled(design: &Design, which: usize, factor: f64) -> Design {
    let mut d = design.clone();
    match which {
        0 => {
            for p in &mut d.ports {
                p.nozzle = match p.nozzle {
                    NozzleSpec::Hole {
                        diameter_m,
                        discharge_coefficient,
                    } => NozzleSpec::Hole {
                        diameter_m: diameter_m * factor,
                        discharge_coefficient,
                    },
                    NozzleSpec::ConvergingDiverging {
                        throat_diameter_m,
                        exit_diameter_m,
                        discharge_coefficient,
                    } => NozzleSpec::ConvergingDiverging {
                        throat_diameter_m: throat_diameter_m * factor,
                        exit_diameter_m: exit_diameter_m * factor,
                        discharge_coefficient,
                    },
                }
            }
        }
        1 => {
            for p in &mut d.ports {
                match &mut p.nozzle {
                    NozzleSpec::Hole {
                        discharge_coefficient,
                        ..
                    }
                    | NozzleSpec::ConvergingDiverging {
                        discharge_coefficient,
                        ..
                    } => *discharge_coefficient = (*discharge_coefficient * factor).min(1.0),
                }
            }
        }
        2 => {
            d.feed.valve.flow = match d.feed.valve.flow {
                ValveFlow::Cv { cv, xt } => ValveFlow::Cv {
                    cv: cv * factor,
                    xt,
                },
                // Same relative change of flow area.
                ValveFlow::Orifice {
                    diameter_m,
                    discharge_coefficient,
                } => ValveFlow::Orifice {
                    diameter_m: diameter_m * factor.sqrt(),
                    discharge_coefficient,
                },
            }
        }
        _ => d.feed.regulator.set_pressure_gauge_pa *= factor,
    }
    d
}

/// Thrust of every port alone at a flight state's ambient pressure, N.
fn thrusts(design: &Design, state: &str, ambient_pa: f64) -> Result<Vec<f64>, AsBuiltError> {
    Ok(feed::ports_at(design, state, ambient_pa)
        .map_err(|e| AsBuiltError::Model(e.to_string()))?
        .ports
        .iter()
        .map(|p| p.thrust_n)
        .collect())
}

impl Basis {
    /// Reduce a design and its analysis for sampling under `spec`.
    pub fn new(
        design: &Design,
        analysis: &Analysis,
        spec: &ToleranceSpec,
    ) -> Result<Basis, AsBuiltError> {
        if spec.ports.len() != design.ports.len() {
            return Err(AsBuiltError::Model(format!(
                "the tolerances list {} ports but the design has {}",
                spec.ports.len(),
                design.ports.len()
            )));
        }
        // A discharge coefficient of 1 cannot be scaled up; step down only there.
        let mut states = Vec::with_capacity(analysis.states.len());
        for s in &analysis.states {
            let at = |changes: &[(usize, f64)]| -> Result<Vec<f64>, AsBuiltError> {
                let mut d = design.clone();
                for &(which, factor) in changes {
                    d = scaled(&d, which, factor);
                }
                thrusts(&d, &s.name, s.ambient_pressure_pa)
            };
            let n = design.ports.len();
            let f0: Vec<f64> = at(&[])?
                .iter()
                .map(|t| t.max(f64::MIN_POSITIVE).ln())
                .collect();
            let ln = |v: &[f64]| -> Vec<f64> {
                v.iter().map(|t| t.max(f64::MIN_POSITIVE).ln()).collect()
            };
            let mut up = Vec::new();
            let mut down = Vec::new();
            for which in 0..4 {
                up.push(ln(&at(&[(which, 1.0 + FLOW_STEP)])?));
                down.push(ln(&at(&[(which, 1.0 - FLOW_STEP)])?));
            }
            let mut pair = vec![vec![Vec::new(); 4]; 4];
            for j in 0..4 {
                for k in (j + 1)..4 {
                    pair[j][k] = ln(&at(&[(j, 1.0 + FLOW_STEP), (k, 1.0 + FLOW_STEP)])?);
                }
            }
            let mut response = Vec::with_capacity(n);
            for i in 0..n {
                // Step sizes in ln(ratio); the discharge coefficient may be held at 1.
                let cd0 = discharge_of(&design.ports[i]);
                let a: [f64; 4] = [0, 1, 2, 3].map(|j| {
                    if j == 1 {
                        ((cd0 * (1.0 + FLOW_STEP)).min(1.0) / cd0).ln()
                    } else {
                        (1.0 + FLOW_STEP).ln()
                    }
                });
                let b = -(1.0 - FLOW_STEP).ln();
                let mut r = Response::default();
                for j in 0..4 {
                    let (fp, fm, c) = (up[j][i], down[j][i], f0[i]);
                    if a[j] > 0.0 {
                        let aj = a[j];
                        r.slope[j] = (fp * b * b - fm * aj * aj - c * (b * b - aj * aj))
                            / (aj * b * (aj + b));
                        r.curvature[j] =
                            2.0 * (fp * b + fm * aj - c * (aj + b)) / (aj * b * (aj + b));
                    } else {
                        r.slope[j] = (c - fm) / b;
                    }
                }
                let mut q = 0;
                for j in 0..4 {
                    for k in (j + 1)..4 {
                        if a[j] > 0.0 && a[k] > 0.0 {
                            r.cross[q] =
                                (pair[j][k][i] - up[j][i] - up[k][i] + f0[i]) / (a[j] * a[k]);
                        }
                        q += 1;
                    }
                }
                response.push(r);
            }
            states.push(StateBasis {
                name: s.name.clone(),
                burning: s.motor == MotorCondition::Burning,
                cg: s.mass.cg(),
                inertia: s.mass.inertia_diagonal(),
                from_acceleration_n_m: s.required.from_acceleration_n_m,
                from_disturbance_n_m: s.required.from_disturbance_n_m,
                thrust_n: s.ports.iter().map(|p| p.thrust_n).collect(),
                response,
                droop_factor: s
                    .droop
                    .iter()
                    .map(|d| 1.0 - d.thrust_drop_fraction)
                    .collect(),
            });
        }
        let r = &design.requirements;
        Ok(Basis {
            ports: design.ports.clone(),
            radius_m: design.airframe.outer_radius_m(),
            states,
            inputs: spec.inputs(),
            discharge: design.ports.iter().map(discharge_of).collect(),
            set_pressure_gauge_pa: design.feed.regulator.set_pressure_gauge_pa,
            accel_rad_s2: [
                r.roll_accel_rad_s2,
                r.pitch_accel_rad_s2,
                r.yaw_accel_rad_s2,
            ],
            roll_disturbance_n_m: r.roll_disturbance_n_m,
            motor_thrust_n: r.motor_thrust_n,
            misalignment_rad: r.thrust_misalignment_rad,
            nozzle_station_m: design.motor.fore_station_m + design.motor.length_m,
            delays_s: [
                design.feed.valve.opening_delay_s,
                design.feed.valve.closing_delay_s,
            ],
        })
    }

    /// Port names in layout order.
    pub fn port_names(&self) -> Vec<String> {
        self.ports.iter().map(|p| p.name.clone()).collect()
    }

    /// The deviations of sample `index` under `seed`: one ChaCha8 stream per
    /// sample, so a sample does not depend on how many threads drew the others.
    pub fn draw(&self, seed: u64, index: u64) -> Vec<f64> {
        let mut rng = ChaCha8Rng::seed_from_u64(seed);
        rng.set_stream(index);
        self.inputs.iter().map(|(_, s)| s.draw(&mut rng)).collect()
    }

    /// Apply deviations to `ports` (the design's, or an optimiser's candidate).
    pub fn apply(&self, ports: &[Port], dev: &[f64], out: &mut Applied) {
        if out.ports.len() == ports.len() {
            // Reuses the names' storage: no allocation per sample.
            out.ports.clone_from_slice(ports);
        } else {
            out.ports.clear();
            out.ports.extend_from_slice(ports);
        }
        out.ratio.clear();
        out.ratio.resize(ports.len(), [1.0; 3]);
        out.set_ratio = 1.0;
        out.cg_shift_m = 0.0;
        out.mass = 0.0;
        out.ixx = 0.0;
        out.iyy = 0.0;
        out.misalignment_rad = 0.0;
        out.delays_s = [0.0; 2];
        for (&(input, _), &d) in self.inputs.iter().zip(dev) {
            match input {
                Input::Station(i) => out.ports[i].station_m += d,
                Input::Clock(i) => out.ports[i].clock_rad += d,
                Input::TangentialCant(i) => out.ports[i].tangential_cant_rad += d,
                Input::AxialCant(i) => out.ports[i].axial_cant_rad += d,
                Input::Hole(i) => out.ratio[i][0] = 1.0 + d / flow_diameter(&ports[i]).max(1e-9),
                Input::DischargeCoefficient(i) => out.ratio[i][1] = 1.0 + d / self.discharge[i],
                Input::ValveCv(i) => out.ratio[i][2] = 1.0 + d,
                Input::SetPressure => out.set_ratio = 1.0 + d / self.set_pressure_gauge_pa,
                Input::OpeningDelay => out.delays_s[0] = d,
                Input::ClosingDelay => out.delays_s[1] = d,
                Input::Mass => out.mass = d,
                Input::CgStation => out.cg_shift_m = d,
                Input::Ixx => out.ixx = d,
                Input::Iyy => out.iyy = d,
                Input::Misalignment => out.misalignment_rad = d,
            }
        }
    }

    /// Thrust of port i at state k for the applied deviations, given its nominal thrust.
    pub fn thrust(&self, k: usize, i: usize, nominal_n: f64, a: &Applied) -> f64 {
        let r = &self.states[k].response[i];
        // A ratio at or below zero (far tail of a normal spread) means no hole:
        // floor it so the response gives practically zero thrust.
        let u =
            [a.ratio[i][0], a.ratio[i][1], a.ratio[i][2], a.set_ratio].map(|x| x.max(1e-6).ln());
        let mut g = 0.0;
        for j in 0..4 {
            g += r.slope[j] * u[j] + 0.5 * r.curvature[j] * u[j] * u[j];
        }
        let mut q = 0;
        for j in 0..4 {
            for k in (j + 1)..4 {
                g += r.cross[q] * u[j] * u[k];
                q += 1;
            }
        }
        nominal_n * g.exp()
    }

    /// Torque required about roll, pitch and yaw at state k, N·m: the
    /// analysis's own requirement as drawn, its acceleration part scaled by
    /// the sampled inertia, and (while the motor burns) its pitch and yaw
    /// disturbance changed by T·(sin|a₀ + δa|·ℓ' − sin|a₀|·ℓ), with a the
    /// misalignment and ℓ the distance from the CG to the motor nozzle.
    pub fn required(&self, k: usize, a: &Applied) -> [f64; 3] {
        let s = &self.states[k];
        let m = 1.0 + a.mass;
        let acc = s.from_acceleration_n_m;
        let dist = s.from_disturbance_n_m;
        let extra = if s.burning {
            let cg0 = -s.cg.x;
            let arm0 = (self.nozzle_station_m - cg0).abs();
            let arm = (self.nozzle_station_m - cg0 - a.cg_shift_m).abs();
            self.motor_thrust_n
                * ((self.misalignment_rad + a.misalignment_rad).abs().sin() * arm
                    - self.misalignment_rad.abs().sin() * arm0)
        } else {
            0.0
        };
        [
            acc[0] * m * (1.0 + a.ixx) + dist[0],
            acc[1] * m * (1.0 + a.iyy) + (dist[1] + extra).max(0.0),
            acc[2] * m * (1.0 + a.iyy) + (dist[2] + extra).max(0.0),
        ]
    }

    /// Forces and torques (about the shifted CG) of every port at state k,
    /// written into `a.force` and `a.torque`.
    pub fn wrenches(&self, k: usize, nominal_thrust_n: &[f64], a: &mut Applied) {
        let s = &self.states[k];
        let cg = s.cg - Vector3::x() * a.cg_shift_m;
        a.force.clear();
        a.torque.clear();
        for i in 0..a.ports.len() {
            let t = self.thrust(k, i, nominal_thrust_n[i], a);
            let p = &a.ports[i];
            let f = p.thrust_direction() * t;
            a.force.push(f);
            a.torque.push((p.position(self.radius_m) - cg).cross(&f));
        }
    }

    /// Ray limits along +roll, +pitch, +yaw and −roll, −pitch, −yaw of the
    /// torques in `a.torque`, N·m.
    pub fn limits(a: &Applied) -> ([f64; 3], [f64; 3]) {
        axis_limits(&a.torque)
    }

    /// Worst margin over states, axes and senses of `ports` with per-state nominal
    /// thrusts `thrust_n` under deviations `dev` (axes with no requirement skipped;
    /// infinite when nothing is required anywhere).
    pub fn worst_margin(
        &self,
        ports: &[Port],
        thrust_n: &[Vec<f64>],
        dev: &[f64],
        a: &mut Applied,
    ) -> f64 {
        self.apply(ports, dev, a);
        let mut worst = f64::INFINITY;
        for k in 0..self.states.len() {
            self.wrenches(k, &thrust_n[k], a);
            let req = self.required(k, a);
            let (pos, neg) = axis_limits(&a.torque);
            for (axis, &r) in req.iter().enumerate() {
                if r > 0.0 {
                    worst = worst.min(pos[axis].min(neg[axis]) / r);
                }
            }
        }
        worst
    }

    /// Nominal per-state thrusts.
    pub fn nominal_thrusts(&self) -> Vec<Vec<f64>> {
        self.states.iter().map(|s| s.thrust_n.clone()).collect()
    }
}

/// The six ray limits along ±roll, ±pitch, ±yaw of the zonotope of `columns`
/// in one pass over generator pairs: the same facets, thresholds and result as
/// six calls of `analysis::score::ray_limit`, which the tests compare, at a sixth of the cost.
pub fn axis_limits(columns: &[Vector3<f64>]) -> ([f64; 3], [f64; 3]) {
    let mut pos = [f64::INFINITY; 3];
    let mut neg = [f64::INFINITY; 3];
    let scale: f64 = columns.iter().map(|b| b.norm()).fold(0.0, f64::max);
    if scale == 0.0 {
        return ([0.0; 3], [0.0; 3]);
    }
    let eps = 1e-12 * scale * scale;
    for i in 0..columns.len() {
        for j in (i + 1)..columns.len() {
            let n = columns[i].cross(&columns[j]);
            if n.norm() <= eps {
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
            for k in 0..3 {
                let ne = n[k];
                if ne.abs() <= eps * 1e-3 {
                    continue;
                }
                // The facet pair ±n bounds +e_k by h(n)/(n·e) when n·e > 0 (else
                // h(−n)/(−n·e)), and −e_k by the other of the two.
                if ne > 0.0 {
                    pos[k] = pos[k].min(hp / ne);
                    neg[k] = neg[k].min(hn / ne);
                } else {
                    pos[k] = pos[k].min(hn / -ne);
                    neg[k] = neg[k].min(hp / -ne);
                }
            }
        }
    }
    let fin = |v: f64| if v.is_finite() { v } else { 0.0 };
    (pos.map(fin), neg.map(fin))
}

/// ln T − ln T₀ of one port as a quadratic in u = ln(ratio to nominal) of hole
/// diameter, discharge coefficient, valve Cv and set pressure, in that order.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Response {
    /// ∂ ln T / ∂uⱼ.
    pub slope: [f64; 4],
    /// ∂² ln T / ∂uⱼ².
    pub curvature: [f64; 4],
    /// ∂² ln T / ∂uⱼ∂uₖ for (j, k) = (0,1), (0,2), (0,3), (1,2), (1,3), (2,3).
    pub cross: [f64; 6],
}

/// Working storage for one as-built vehicle (reused between samples).
#[derive(Debug, Clone, Default)]
pub struct Applied {
    /// Ports as built.
    pub ports: Vec<Port>,
    /// Per port: ratios of hole diameter, discharge coefficient and valve Cv to nominal.
    pub ratio: Vec<[f64; 3]>,
    /// Set pressure over nominal (gauge).
    pub set_ratio: f64,
    /// CG moved aft by this much, m.
    pub cg_shift_m: f64,
    /// Relative mass error.
    pub mass: f64,
    /// Relative roll-inertia error.
    pub ixx: f64,
    /// Relative pitch/yaw-inertia error.
    pub iyy: f64,
    /// Misalignment added to the nominal, rad.
    pub misalignment_rad: f64,
    /// Valve delay errors (opening, closing), s.
    pub delays_s: [f64; 2],
    /// Force of each port at the state last evaluated, N.
    pub force: Vec<Vector3<f64>>,
    /// Torque of each port about the CG at that state, N·m.
    pub torque: Vec<Vector3<f64>>,
}
