//! The validated design: every number in SI, every invariant checked.
//!
//! `layout` turns a layout file into a [`Design`]; nothing else constructs one from
//! user text. The physics modules read only this model, so they never see units,
//! strings or optional fields.

use crate::gas::Gas;
use nalgebra::Vector3;
use serde::Serialize;

/// A whole vehicle: airframe, masses, motor, gas feed, ports, requirements, flight states.
#[derive(Debug, Clone, Serialize)]
pub struct Design {
    /// Name given in the layout file.
    pub name: String,
    /// Airframe geometry.
    pub airframe: Airframe,
    /// Mass components other than the airframe shells, motor and tank.
    pub components: Vec<MassComponent>,
    /// The rocket motor.
    pub motor: Motor,
    /// The gas feed.
    pub feed: Feed,
    /// The nozzle ports.
    pub ports: Vec<Port>,
    /// What the design must achieve.
    pub requirements: Requirements,
    /// Flight states to check (at least two).
    pub states: Vec<FlightState>,
    /// Manoeuvres to budget gas for.
    pub manoeuvres: Vec<Manoeuvre>,
    /// Plain notes about how the file was read (for example "`150 psi` read as gauge").
    pub readings: Vec<String>,
    /// Steepest drill angle from the surface normal the builder can drill, rad
    /// (`[limits] max_cant`, 60° when not given); steeper ports are reported.
    pub max_cant_rad: f64,
    /// The optional `[ground]` section: filling, pad hold and pad temperatures.
    pub ground: Option<crate::ground::spec::GroundSpec>,
}

/// Body tube, nose cone, fins and keep-out zones.
#[derive(Debug, Clone, Serialize)]
pub struct Airframe {
    /// Outer diameter of the body tube, m.
    pub outer_diameter_m: f64,
    /// Inner diameter of the body tube, m.
    pub inner_diameter_m: f64,
    /// Length of the body tube, m; it starts at the aft end of the nose cone.
    pub tube_length_m: f64,
    /// Mass of the body tube, kg (0 when not given).
    pub tube_mass_kg: f64,
    /// The nose cone.
    pub nose: Nose,
    /// The fin set, if any.
    pub fins: Option<Fins>,
    /// Places where no hole may be drilled.
    pub keep_outs: Vec<KeepOut>,
}

impl Airframe {
    /// Outer radius of the tube, m.
    pub fn outer_radius_m(&self) -> f64 {
        0.5 * self.outer_diameter_m
    }
    /// Wall thickness, m.
    pub fn wall_m(&self) -> f64 {
        0.5 * (self.outer_diameter_m - self.inner_diameter_m)
    }
    /// Station of the fore end of the body tube (the nose cone's shoulder), m.
    pub fn tube_fore_station_m(&self) -> f64 {
        self.nose.length_m
    }
    /// Station of the aft end of the body tube, m.
    pub fn tube_aft_station_m(&self) -> f64 {
        self.nose.length_m + self.tube_length_m
    }
}

/// Profile of the nose cone.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum NoseShape {
    /// Straight cone.
    Conical,
    /// Tangent ogive.
    Ogive,
    /// Half ellipse.
    Elliptical,
    /// Parabolic series, K = 1.
    Parabolic,
}

/// The nose cone, modelled as a thin shell of revolution.
#[derive(Debug, Clone, Serialize)]
pub struct Nose {
    /// Length from tip to shoulder, m.
    pub length_m: f64,
    /// Profile.
    pub shape: NoseShape,
    /// Mass, kg (0 when not given).
    pub mass_kg: f64,
}

/// A set of identical, evenly spaced trapezoidal fins.
#[derive(Debug, Clone, Serialize)]
pub struct Fins {
    /// Number of fins.
    pub count: usize,
    /// Root chord, m.
    pub root_chord_m: f64,
    /// Tip chord, m.
    pub tip_chord_m: f64,
    /// Span from the tube surface to the tip, m.
    pub span_m: f64,
    /// Axial distance from the root leading edge to the tip leading edge, m.
    pub sweep_m: f64,
    /// Station of the root leading edge, m.
    pub station_m: f64,
    /// Clock angle of the first fin, rad.
    pub first_clock_rad: f64,
    /// Fin thickness, m.
    pub thickness_m: f64,
    /// Mass of the whole fin set, kg (0 when not given).
    pub mass_kg: f64,
}

impl Fins {
    /// Clock angles of every fin, rad.
    pub fn clocks_rad(&self) -> Vec<f64> {
        (0..self.count)
            .map(|k| self.first_clock_rad + std::f64::consts::TAU * k as f64 / self.count as f64)
            .collect()
    }
}

/// A place on the tube where no port may sit.
#[derive(Debug, Clone, Serialize)]
pub struct KeepOut {
    /// Label, e.g. "coupler" or "rail button".
    pub name: String,
    /// Where it is.
    pub zone: Zone,
}

/// The shape of a keep-out zone on the tube surface.
#[derive(Debug, Clone, Serialize)]
#[serde(tag = "kind", rename_all = "lowercase")]
pub enum Zone {
    /// A full ring of the tube between two stations.
    Band {
        /// Fore station, m.
        from_station_m: f64,
        /// Aft station, m.
        to_station_m: f64,
    },
    /// A rectangle on the surface centred on a station and clock.
    Patch {
        /// Centre station, m.
        station_m: f64,
        /// Centre clock angle, rad.
        clock_rad: f64,
        /// Axial length, m.
        length_m: f64,
        /// Width along the circumference, m.
        width_m: f64,
    },
}

/// A mass component of the vehicle, placed by the station of its fore end.
#[derive(Debug, Clone, Serialize)]
pub struct MassComponent {
    /// Label.
    pub name: String,
    /// Mass, kg.
    pub mass_kg: f64,
    /// Shape used for its inertia.
    pub shape: Shape,
}

/// The shape of a mass component, on the body axis unless stated.
#[derive(Debug, Clone, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Shape {
    /// A point mass at a station, optionally off the axis.
    Point {
        /// Station, m.
        station_m: f64,
        /// Distance from the axis, m.
        radial_m: f64,
        /// Clock angle of the offset, rad.
        clock_rad: f64,
    },
    /// A tube (thick shell) from a fore station.
    Tube {
        /// Fore station, m.
        fore_station_m: f64,
        /// Length, m.
        length_m: f64,
        /// Outer diameter, m.
        outer_diameter_m: f64,
        /// Inner diameter, m.
        inner_diameter_m: f64,
    },
    /// A solid cylinder from a fore station.
    Cylinder {
        /// Fore station, m.
        fore_station_m: f64,
        /// Length, m.
        length_m: f64,
        /// Diameter, m.
        diameter_m: f64,
    },
    /// A thin conical shell with its apex forward.
    Cone {
        /// Station of the apex, m.
        fore_station_m: f64,
        /// Length, m.
        length_m: f64,
        /// Base diameter, m.
        diameter_m: f64,
    },
}

/// The rocket motor: a cylinder of propellant inside a case.
#[derive(Debug, Clone, Serialize)]
pub struct Motor {
    /// Mass with propellant, kg.
    pub loaded_mass_kg: f64,
    /// Mass of the empty case, kg.
    pub burnout_mass_kg: f64,
    /// Station of the fore end, m.
    pub fore_station_m: f64,
    /// Length, m.
    pub length_m: f64,
    /// Diameter, m.
    pub diameter_m: f64,
}

/// Which side of the tank the outlet is on.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum TankOutlet {
    /// Outlet toward the nose: liquid settles away from it under thrust.
    Fore,
    /// Outlet toward the tail: liquid settles onto it under thrust.
    Aft,
}

/// How the tank was filled.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum FillSpec {
    /// Filled to a pressure (absolute, Pa) at the fill temperature.
    Pressure {
        /// Absolute fill pressure, Pa.
        pressure_pa: f64,
    },
    /// Filled with a mass of gas (the usual way for CO2), kg.
    Mass {
        /// Mass of gas, kg.
        mass_kg: f64,
    },
}

/// The gas tank.
#[derive(Debug, Clone, Serialize)]
pub struct Tank {
    /// Internal volume, m³.
    pub volume_m3: f64,
    /// Fill.
    pub fill: FillSpec,
    /// Temperature of the gas at fill and at launch, K.
    pub fill_temperature_k: f64,
    /// Empty tank mass, kg.
    pub empty_mass_kg: f64,
    /// Station of the fore end, m.
    pub fore_station_m: f64,
    /// Length, m.
    pub length_m: f64,
    /// Outer diameter, m.
    pub diameter_m: f64,
    /// Outlet direction.
    pub outlet: TankOutlet,
}

/// Flow capacity of the regulator and the line to the valve manifold.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum SupplyCapacity {
    /// No limit: every valve sees the set pressure.
    Unlimited,
    /// A restriction with this flow coefficient between regulator outlet and manifold.
    Cv {
        /// Flow coefficient, US gal/min at 1 psi (IEC 60534 Cv).
        cv: f64,
        /// Pressure differential ratio factor xT.
        xt: f64,
    },
    /// Linear droop: manifold pressure falls by `droop_pa` at `at_flow_kg_s`.
    Droop {
        /// Pressure drop at the reference flow, Pa.
        droop_pa: f64,
        /// Reference flow, kg/s.
        at_flow_kg_s: f64,
    },
}

/// The pressure regulator.
#[derive(Debug, Clone, Serialize)]
pub struct Regulator {
    /// Set (outlet) pressure above local ambient, Pa (the bonnet is vented).
    pub set_pressure_gauge_pa: f64,
    /// Inlet pressure above the set pressure below which the regulator stops regulating, Pa.
    pub dropout_margin_pa: f64,
    /// Capacity of regulator and line.
    pub supply: SupplyCapacity,
}

/// How a valve passes flow.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum ValveFlow {
    /// Flow coefficient with the IEC 60534-2-1 gas equations.
    Cv {
        /// Flow coefficient Cv.
        cv: f64,
        /// Pressure differential ratio factor xT.
        xt: f64,
    },
    /// An orifice of given diameter and discharge coefficient.
    Orifice {
        /// Orifice diameter, m.
        diameter_m: f64,
        /// Discharge coefficient.
        discharge_coefficient: f64,
    },
}

/// The solenoid valve, one per port, all the same.
#[derive(Debug, Clone, Serialize)]
pub struct Valve {
    /// Flow model.
    pub flow: ValveFlow,
    /// Delay from command to full open, s.
    pub opening_delay_s: f64,
    /// Delay from command to closed, s.
    pub closing_delay_s: f64,
    /// Coil current when energised, A.
    pub coil_current_a: f64,
}

/// The gas feed: tank, regulator, valves.
#[derive(Debug, Clone, Serialize)]
pub struct Feed {
    /// The gas.
    pub gas: Gas,
    /// Tank.
    pub tank: Tank,
    /// Regulator (the stage that sets the working pressure at the valves).
    pub regulator: Regulator,
    /// Optional high-pressure stage between tank and `regulator`, reducing tank pressure to an
    /// intermediate pressure; `None` for a single-stage feed.
    pub first_stage: Option<Regulator>,
    /// Valve (one per port).
    pub valve: Valve,
}

/// The nozzle at a port.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum NozzleSpec {
    /// A plain drilled hole.
    Hole {
        /// Hole diameter, m.
        diameter_m: f64,
        /// Discharge coefficient.
        discharge_coefficient: f64,
    },
    /// A converging–diverging nozzle.
    ConvergingDiverging {
        /// Throat diameter, m.
        throat_diameter_m: f64,
        /// Exit diameter, m.
        exit_diameter_m: f64,
        /// Discharge coefficient.
        discharge_coefficient: f64,
    },
}

impl NozzleSpec {
    /// Diameter of the hole drilled through the wall (the exit diameter), m.
    pub fn hole_diameter_m(&self) -> f64 {
        match *self {
            NozzleSpec::Hole { diameter_m, .. } => diameter_m,
            NozzleSpec::ConvergingDiverging {
                exit_diameter_m, ..
            } => exit_diameter_m,
        }
    }
}

/// A nozzle port on the body tube.
///
/// Cant signs: a positive tangential cant tilts the exhaust against the direction a
/// surface point moves in positive roll, so the thrust gives positive roll torque;
/// a positive axial cant tilts the exhaust toward the tail, so the thrust has a
/// component toward the nose.
#[derive(Debug, Clone, Serialize)]
pub struct Port {
    /// Unique name.
    pub name: String,
    /// Station of the hole centre on the outer surface, m.
    pub station_m: f64,
    /// Clock angle, rad.
    pub clock_rad: f64,
    /// Tangential cant, rad.
    pub tangential_cant_rad: f64,
    /// Axial cant, rad.
    pub axial_cant_rad: f64,
    /// Nozzle.
    pub nozzle: NozzleSpec,
}

impl Port {
    /// Outward surface normal at the port's clock angle (body frame).
    pub fn normal(&self) -> Vector3<f64> {
        Vector3::new(0.0, self.clock_rad.cos(), self.clock_rad.sin())
    }

    /// Direction a surface point at the port moves in positive roll (body frame).
    pub fn roll_tangent(&self) -> Vector3<f64> {
        Vector3::new(0.0, -self.clock_rad.sin(), self.clock_rad.cos())
    }

    /// Unit vector along which the exhaust leaves the port (body frame).
    pub fn exhaust_direction(&self) -> Vector3<f64> {
        let (st, ct) = self.tangential_cant_rad.sin_cos();
        let (sa, ca) = self.axial_cant_rad.sin_cos();
        let e = self.normal() * (ct * ca) - self.roll_tangent() * (st * ca) - Vector3::x() * sa;
        e.normalize()
    }

    /// Unit vector of the thrust on the vehicle (opposite the exhaust).
    pub fn thrust_direction(&self) -> Vector3<f64> {
        -self.exhaust_direction()
    }

    /// Position of the hole centre on the outer surface, body frame, m.
    pub fn position(&self, outer_radius_m: f64) -> Vector3<f64> {
        Vector3::new(-self.station_m, 0.0, 0.0) + self.normal() * outer_radius_m
    }

    /// Angle between the drill axis and the surface normal, rad.
    pub fn total_cant_rad(&self) -> f64 {
        self.exhaust_direction()
            .dot(&self.normal())
            .clamp(-1.0, 1.0)
            .acos()
    }
}

/// What the design must achieve and what it must fight.
#[derive(Debug, Clone, Serialize)]
pub struct Requirements {
    /// Angular acceleration wanted about roll, rad/s².
    pub roll_accel_rad_s2: f64,
    /// Angular acceleration wanted about pitch, rad/s².
    pub pitch_accel_rad_s2: f64,
    /// Angular acceleration wanted about yaw, rad/s².
    pub yaw_accel_rad_s2: f64,
    /// Motor thrust, N.
    pub motor_thrust_n: f64,
    /// Angle between the motor thrust and the body axis, rad.
    pub thrust_misalignment_rad: f64,
    /// Steady roll disturbance torque, N·m.
    pub roll_disturbance_n_m: f64,
    /// How long the vehicle must hold attitude against the disturbances, s.
    pub hold_time_s: f64,
    /// Fraction of the usable gas kept in reserve by the manoeuvre budget.
    pub gas_reserve: f64,
}

/// A manoeuvre the gas budget must cover.
#[derive(Debug, Clone, Serialize)]
pub struct Manoeuvre {
    /// Label.
    pub name: String,
    /// Flight state whose inertia and ports it uses (default: the last state).
    pub state: Option<String>,
    /// What it does.
    pub kind: ManoeuvreKind,
}

/// The kinds of manoeuvre.
#[derive(Debug, Clone, Copy, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum ManoeuvreKind {
    /// Spin up about roll to a rate (sign gives the sense), then hold it against the roll disturbance.
    Spin {
        /// Target roll rate, rad/s.
        rate_rad_s: f64,
        /// Time the rate is held, s.
        hold_s: f64,
    },
    /// Bring a roll rate back to zero.
    Despin {
        /// Roll rate removed, rad/s.
        rate_rad_s: f64,
    },
    /// Hold attitude against a steady torque about one axis.
    Hold {
        /// Axis index: 0 roll, 1 pitch, 2 yaw.
        axis: usize,
        /// Disturbance torque to cancel, N·m.
        torque_n_m: f64,
        /// Duration, s.
        time_s: f64,
    },
    /// Turn about pitch or yaw through an angle, starting and ending at rest.
    Turn {
        /// Axis index: 1 pitch, 2 yaw.
        axis: usize,
        /// Angle, rad.
        angle_rad: f64,
        /// Peak rate, rad/s; the fastest turn at full authority when absent.
        rate_rad_s: Option<f64>,
        /// How many such turns.
        count: u32,
    },
}

/// Whether the motor is full or spent.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum MotorCondition {
    /// Loaded with propellant, thrusting.
    Burning,
    /// Empty case, coasting.
    Burnout,
}

/// Measured mass properties that replace the computed ones.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct MassOverride {
    /// Total mass, kg.
    pub mass_kg: Option<f64>,
    /// CG station, m.
    pub cg_station_m: Option<f64>,
    /// Roll inertia about the CG, kg·m².
    pub ixx_kg_m2: Option<f64>,
    /// Transverse inertia about the CG, kg·m².
    pub iyy_kg_m2: Option<f64>,
}

/// A moment of the flight at which the design is checked.
#[derive(Debug, Clone, Serialize)]
pub struct FlightState {
    /// Name, e.g. "liftoff".
    pub name: String,
    /// Geometric altitude above sea level, m.
    pub altitude_m: f64,
    /// Motor condition.
    pub motor: MotorCondition,
    /// Fraction of the usable gas still in the tank, 0–1.
    pub gas_remaining: f64,
    /// Measured values that replace computed ones.
    pub mass_override: MassOverride,
}
