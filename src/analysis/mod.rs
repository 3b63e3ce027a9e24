//! The `analyze` report as plain data: everything the terminal table and the
//! JSON output show, computed from a [`Design`].
//!
//! For each flight state: the atmosphere at its altitude, the mass properties
//! with the gas then in the tank, each port's operating point through
//! regulator → valve → nozzle, its force and torque about that state's CG, the
//! per-axis authority against the requirements, and the supply droop when
//! several valves fire together. Once for the design: the gas inventory and
//! usable gas with isothermal and adiabatic bounds, impulse and firing time.

pub mod authority;
pub mod feed;
pub mod findings;
pub mod manoeuvre;
pub mod score;

use crate::allocation::controllability::Controllability;
use crate::allocation::effectiveness::{Effectiveness, PortGeometry};
use crate::allocation::zonotope::Zonotope;
use crate::allocation::Tolerances;
use crate::mass::MassSummary;
use crate::model::{Design, MotorCondition};
use authority::{axis_authority, AxisAuthority, Required};
use nalgebra::Vector3;
use serde::Serialize;
use thiserror::Error;

pub use feed::{GasBudget, PortReport};

/// Why a design could not be analysed.
#[derive(Debug, Error)]
pub enum AnalysisError {
    /// The gas model failed (out of range, no convergence).
    #[error("gas model: {0}")]
    Gas(String),
    /// The `[ground]` section's filling or pad figures could not be computed.
    #[error("[ground]: {0}")]
    Ground(String),
    /// A flow solution failed for a port.
    #[error("port `{port}` at state `{state}`: {reason}")]
    Flow {
        /// Port name.
        port: String,
        /// Flight state.
        state: String,
        /// What went wrong.
        reason: String,
    },
    /// The allocation engine failed.
    #[error("state `{state}`: {reason}")]
    Allocation {
        /// Flight state.
        state: String,
        /// What went wrong.
        reason: String,
    },
    /// The standard atmosphere is not defined at the altitude.
    #[error("state `{state}`: {reason}")]
    Atmosphere {
        /// Flight state.
        state: String,
        /// What went wrong.
        reason: String,
    },
    /// The regulator and its line cannot supply the manifold.
    #[error("the regulator and its line at state `{state}`: {reason}")]
    Supply {
        /// Flight state.
        state: String,
        /// What went wrong.
        reason: String,
    },
    /// The valve or a port's nozzle cannot be modelled.
    #[error("the valve or a port's nozzle: {reason}")]
    Chain {
        /// What went wrong.
        reason: String,
    },
    /// A manoeuvre cannot be priced: no port can make the torque it needs.
    #[error("manoeuvre `{name}`: {reason}")]
    Manoeuvre {
        /// Manoeuvre name.
        name: String,
        /// What went wrong.
        reason: String,
    },
}

impl AnalysisError {
    /// The layout field behind the problem, in the dotted form the layout
    /// reader uses (``state `burnout`.altitude``), for the caller to locate.
    pub fn field(&self) -> String {
        match self {
            AnalysisError::Gas(_) => "feed.tank".to_string(),
            AnalysisError::Ground(_) => "ground".to_string(),
            AnalysisError::Flow { port, .. } => format!("port `{port}`"),
            AnalysisError::Allocation { .. } => "port".to_string(),
            AnalysisError::Atmosphere { state, .. } => format!("state `{state}`.altitude"),
            AnalysisError::Supply { .. } => "feed.regulator".to_string(),
            AnalysisError::Chain { .. } => "feed.valve".to_string(),
            AnalysisError::Manoeuvre { name, .. } => format!("manoeuvre `{name}`"),
        }
    }
}

/// The usual cautions for high-pressure gas work, shown in every report.
pub const CAUTIONS: [&str; 5] = [
    "Use only tanks, regulators, valves and fittings rated for the pressures involved, with relief and burst protection on every pressurised volume.",
    "Wear eye protection when filling, testing or handling a charged system; keep people clear of charged tanks.",
    "Leak-check every joint before flight and after any change.",
    "Follow your range's and launch site's safety code and your local pressure-equipment codes; they and licensed practice override these estimates.",
    "These figures are design estimates: confirm thrust and gas use on a test stand before relying on them.",
];

/// Model choices the numbers depend on, listed in every report (the README
/// states each one in full).
pub const MODEL_NOTES: [&str; 5] = [
    "torques are taken about each state's CG, its off-axis offset included; angular accelerations use the full inertia tensor about that CG",
    "masses: motor case a 1 mm-wall tube of the burnout mass, propellant a solid cylinder in it while burning and none after; tank shell a 2 mm-wall tube; the gas a uniform cylinder filling the tank",
    "a state's gas_remaining is a fraction of the isothermal usable gas; the regulator's dropout pressure is taken above the first state's ambient",
    "plain holes: the discharge coefficient scales both the flow area and the area the pressure thrust acts on (Cd·A); nozzle stagnation density from the real-gas equation of state",
    "total impulse = usable gas × the ports' flow-weighted mean Isp × g0; firing time with all ports open = usable gas / total flow with every valve open, at the first state",
];

/// The supply droop when k equal ports fire together.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct DroopRow {
    /// Number of valves open.
    pub open_ports: usize,
    /// Manifold pressure, Pa absolute.
    pub manifold_pressure_pa: f64,
    /// Thrust of each port, N.
    pub thrust_per_port_n: f64,
    /// 1 − thrust(k)/thrust(1).
    pub thrust_drop_fraction: f64,
}

/// One flight state's results.
#[derive(Debug, Clone, Serialize)]
pub struct StateReport {
    /// Name.
    pub name: String,
    /// Altitude, m.
    pub altitude_m: f64,
    /// Ambient pressure (US Standard Atmosphere 1976), Pa.
    pub ambient_pressure_pa: f64,
    /// Motor condition.
    pub motor: MotorCondition,
    /// Regulated pressure at the manifold with one valve open, Pa absolute.
    pub regulated_pressure_pa: f64,
    /// Gas in the tank, kg.
    pub gas_in_tank_kg: f64,
    /// Mass properties.
    pub mass: MassSummary,
    /// Each port alone at full thrust.
    pub ports: Vec<PortReport>,
    /// Torque needed per axis.
    pub required: Required,
    /// The exact attainable torque set (zonotope of duty cycles).
    pub envelope: EnvelopeSummary,
    /// Per-axis authority: the largest torque along ±roll, ±pitch, ±yaw inside the envelope.
    pub authority: [AxisAuthority; 3],
    /// Roll authority over pitch authority (angular acceleration, weaker senses).
    pub roll_to_pitch_ratio: f64,
    /// Per-port thrust with k equal ports open (the port with the largest flow).
    pub droop: Vec<DroopRow>,
    /// The port the droop table is computed for: the largest flow, the first in
    /// the layout among equals (within a relative 1e-9).
    pub droop_port: String,
    /// How many ports can fire together before each one's thrust falls by more than 5 %.
    pub ports_within_5_percent: usize,
}

/// The attainable torque set at a flight state, summarised.
#[derive(Debug, Clone, Serialize)]
pub struct EnvelopeSummary {
    /// Number of facets of the zonotope.
    pub facets: usize,
    /// Number of vertices.
    pub vertices: usize,
    /// Volume, (N·m)³.
    pub volume_n3_m3: f64,
    /// Radius of the largest origin-centred ball inside: torque available in every direction, N·m.
    pub guaranteed_torque_n_m: f64,
    /// The same as angular acceleration about the weakest inertia axis, rad/s².
    pub guaranteed_accel_rad_s2: f64,
    /// Rank of the torque columns.
    pub rank: usize,
    /// Whether every torque direction can be produced.
    pub full_control: bool,
    /// Controllability in plain words (missing directions, idle ports).
    pub controllability: Vec<String>,
}

/// The whole report.
#[derive(Debug, Clone, Serialize)]
pub struct Analysis {
    /// Design name.
    pub layout: String,
    /// How the file was read and what the models assume.
    pub assumptions: Vec<String>,
    /// Gas inventory and budget.
    pub gas: GasBudget,
    /// Per flight state.
    pub states: Vec<StateReport>,
    /// Gas budget of the manoeuvre list, when the layout has one.
    pub manoeuvres: Option<manoeuvre::ManoeuvrePlan>,
    /// Plain-words findings.
    pub findings: Vec<String>,
    /// Safety cautions.
    pub cautions: Vec<&'static str>,
    /// Filling, pad hold and pad temperatures, when the layout has a `[ground]` section.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub ground: Option<crate::ground::report::GroundReport>,
}

/// Torque needed per axis at a state: inertia × wanted acceleration, plus the roll
/// disturbance, plus (while burning) the worst case of the motor thrust about the
/// CG, all three coordinates of it.
///
/// The motor thrust T acts at the nozzle, on the axis at station s_n, and leans
/// from the axis by the misalignment δ in a direction φ nobody knows. With
/// d = (nozzle − CG) = (−L, −c_y, −c_z), L = s_n − s_cg, and
/// F = T(cos δ, sin δ cos φ, sin δ sin φ), τ = d × F gives, each at its worst φ,
///
///   |τ_roll|  ≤ T sin δ √(c_y² + c_z²)
///   |τ_pitch| ≤ T (|c_z| cos δ + |L| sin δ)
///   |τ_yaw|   ≤ T (|c_y| cos δ + |L| sin δ)
///
/// so an off-axis CG adds the axial thrust's lever arm to pitch and yaw and a
/// roll term; with the CG on the axis this is the familiar T sin δ |L|.
pub fn required_torques(design: &Design, mass: &MassSummary, motor: MotorCondition) -> Required {
    let r = &design.requirements;
    let i = mass.inertia_diagonal();
    let motor_torque = if motor == MotorCondition::Burning {
        let nozzle_station = design.motor.fore_station_m + design.motor.length_m;
        let lever = (nozzle_station - mass.cg_station_m).abs();
        let (sd, cd) = r.thrust_misalignment_rad.sin_cos();
        let t = r.motor_thrust_n;
        [
            t * sd * mass.cg_offset_m(),
            t * (mass.cg_z_m.abs() * cd + lever * sd),
            t * (mass.cg_y_m.abs() * cd + lever * sd),
        ]
    } else {
        [0.0; 3]
    };
    Required {
        from_acceleration_n_m: [
            i[0] * r.roll_accel_rad_s2,
            i[1] * r.pitch_accel_rad_s2,
            i[2] * r.yaw_accel_rad_s2,
        ],
        from_disturbance_n_m: [
            r.roll_disturbance_n_m + motor_torque[0],
            motor_torque[1],
            motor_torque[2],
        ],
    }
}

/// Angular acceleration attainable about each body axis alone, weaker sense, rad/s².
///
/// Spinning up about axis k alone at rate α needs the torque α·I·e_k, with I the
/// full inertia tensor about the CG; when products of inertia are present that
/// torque leans off the axis. The answer is the largest α for which both ±α·I·e_k
/// lie inside the attainable set (an exact ray limit). With a diagonal tensor it
/// is the axis torque over the diagonal element.
///
/// When the ports span fewer than three axes, the torque α·I·e_k generally has a
/// component no port can give, and the exact answer would be zero for an axis
/// that does have torque; there the acceleration is the axis torque over the
/// diagonal element instead (the missing directions are reported on their own).
pub fn axis_accelerations(z: &Zonotope, mass: &MassSummary) -> [f64; 3] {
    let i = mass.inertia_tensor();
    [0, 1, 2].map(|k| {
        if z.rank() < 3 {
            let mut e = Vector3::zeros();
            e[k] = 1.0;
            return z.max_along(&e).min(z.max_along(&-e)) / i[(k, k)];
        }
        let need = i.column(k).into_owned();
        z.max_along(&need).min(z.max_along(&-need))
    })
}

/// Force and torque about `cg` of each port at the given thrusts.
pub fn port_wrenches(
    design: &Design,
    cg: Vector3<f64>,
    thrusts_n: &[f64],
) -> Vec<(Vector3<f64>, Vector3<f64>)> {
    let radius = design.airframe.outer_radius_m();
    design
        .ports
        .iter()
        .zip(thrusts_n)
        .map(|(p, &t)| {
            let f = p.thrust_direction() * t;
            (f, (p.position(radius) - cg).cross(&f))
        })
        .collect()
}

/// The effectiveness matrix at a state from the ports' operating points there.
pub fn effectiveness(
    design: &Design,
    mass: &MassSummary,
    ports: &[PortReport],
) -> Result<Effectiveness, String> {
    let radius = design.airframe.outer_radius_m();
    let geometry: Vec<PortGeometry> = design
        .ports
        .iter()
        .zip(ports)
        .map(|(p, r)| PortGeometry {
            name: p.name.clone(),
            position_m: p.position(radius) - mass.cg(),
            direction: p.thrust_direction(),
            thrust_n: r.thrust_n,
            mass_flow_kg_s: r.mass_flow_kg_s,
        })
        .collect();
    Effectiveness::from_ports(&geometry).map_err(|e| e.to_string())
}

/// Largest torques along +roll, +pitch, +yaw and along −roll, −pitch, −yaw (as positive numbers).
type AxisPair = (Vector3<f64>, Vector3<f64>);

/// Summarise the exact envelope and return the ± axis limits and the angular
/// accelerations about each axis alone.
fn envelope(
    e: &Effectiveness,
    mass: &MassSummary,
) -> Result<(EnvelopeSummary, AxisPair, [f64; 3]), String> {
    let tol = Tolerances::default();
    let z = Zonotope::torque(e, &tol).map_err(|e| e.to_string())?;
    let c = Controllability::from_zonotope(e, &z, &tol);
    let limits = z.axis_limits();
    let ball = z.inscribed_radius();
    let i_max = mass.inertia_diagonal().max();
    Ok((
        EnvelopeSummary {
            facets: z.facets().len(),
            vertices: z.vertices().len(),
            volume_n3_m3: z.volume(),
            guaranteed_torque_n_m: ball,
            guaranteed_accel_rad_s2: ball / i_max,
            rank: c.rank,
            full_control: c.positive_span,
            controllability: c.findings(e),
        },
        (limits.positive, limits.negative),
        axis_accelerations(&z, mass),
    ))
}

/// Analyse a design.
pub fn analyze(design: &Design) -> Result<Analysis, AnalysisError> {
    let budget = feed::gas_budget(design)?;
    let mut states = Vec::with_capacity(design.states.len());
    for state in &design.states {
        let ambient = crate::atmosphere::at_geometric_altitude(state.altitude_m).map_err(|e| {
            AnalysisError::Atmosphere {
                state: state.name.clone(),
                reason: e.to_string(),
            }
        })?;
        let gas_in_tank = budget.residual_kg + state.gas_remaining * budget.usable_isothermal_kg;
        let mass = crate::mass::vehicle::state_summary(design, state, gas_in_tank);
        let at = feed::ports_at(design, &state.name, ambient.pressure_pa)?;
        let thrusts: Vec<f64> = at.ports.iter().map(|p| p.thrust_n).collect();
        let wrenches = port_wrenches(design, mass.cg(), &thrusts);
        let mut ports = at.ports;
        for (p, (f, t)) in ports.iter_mut().zip(&wrenches) {
            // `+ 0.0` turns an exact −0 (a zero cosine times a negative thrust) into
            // +0, so no report or JSON shows a negative zero.
            let z = |v: f64| v + 0.0;
            p.force_n = [z(f.x), z(f.y), z(f.z)];
            p.axial_force_n = z(f.x);
            p.side_force_n = [z(f.y), z(f.z)];
            p.torque_n_m = [z(t.x), z(t.y), z(t.z)];
        }
        let e = effectiveness(design, &mass, &ports).map_err(|e| AnalysisError::Allocation {
            state: state.name.clone(),
            reason: e,
        })?;
        let (envelope, limits, accel) =
            envelope(&e, &mass).map_err(|e| AnalysisError::Allocation {
                state: state.name.clone(),
                reason: e,
            })?;
        let required = required_torques(design, &mass, state.motor);
        let authority = axis_authority(limits.0, limits.1, accel, &required);
        let roll_to_pitch_ratio =
            authority[0].angular_accel_rad_s2 / authority[1].angular_accel_rad_s2;
        states.push(StateReport {
            name: state.name.clone(),
            altitude_m: state.altitude_m,
            ambient_pressure_pa: ambient.pressure_pa,
            motor: state.motor,
            regulated_pressure_pa: at.regulated_pressure_pa,
            gas_in_tank_kg: gas_in_tank,
            mass,
            ports,
            required,
            envelope,
            authority,
            roll_to_pitch_ratio,
            droop: at.droop,
            droop_port: design
                .ports
                .get(at.droop_port)
                .map_or_else(String::new, |p| p.name.clone()),
            ports_within_5_percent: at.ports_within_5_percent,
        });
    }
    let mut assumptions = design.readings.clone();
    assumptions.extend(feed::assumptions(design, &budget));
    assumptions.extend(MODEL_NOTES.iter().map(|n| n.to_string()));
    let mut findings = findings::findings(design, &budget, &states);
    let manoeuvres = manoeuvre::plan(design, &budget, &states)?;
    if let Some(p) = &manoeuvres {
        findings.push(if p.fits {
            format!(
                "the manoeuvre list needs {:.1} g of gas; {:.1} g is usable after a {:.0} % reserve (adiabatic bound): it fits",
                p.total_gas_kg * 1e3,
                p.available_kg * 1e3,
                p.reserve_fraction * 100.0
            )
        } else {
            format!(
                "the manoeuvre list needs {:.1} g of gas but only {:.1} g is usable after a {:.0} % reserve (adiabatic bound): shorten the list or carry more gas",
                p.total_gas_kg * 1e3,
                p.available_kg * 1e3,
                p.reserve_fraction * 100.0
            )
        });
    }
    let ground = match &design.ground {
        Some(spec) => {
            let tank = crate::ground::report::TankAtFill {
                gas: design.feed.gas,
                volume_m3: design.feed.tank.volume_m3,
                fill_temperature_k: design.feed.tank.fill_temperature_k,
                fill_pressure_pa: budget.supply_pressure_pa,
                fill_mass_kg: budget.inventory_kg,
                end_pressure_pa: budget.end_pressure_pa,
                needed_kg: manoeuvres.as_ref().map(|p| p.total_gas_kg),
                reserve_fraction: design.requirements.gas_reserve,
            };
            let g = crate::ground::report::compute(&tank, spec)
                .map_err(|e| AnalysisError::Ground(e.to_string()))?;
            findings.extend(g.findings.iter().cloned());
            Some(g)
        }
        None => None,
    };
    Ok(Analysis {
        ground,
        manoeuvres,
        layout: design.name.clone(),
        assumptions,
        gas: budget,
        states,
        findings,
        cautions: CAUTIONS.to_vec(),
    })
}
