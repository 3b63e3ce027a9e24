//! One run of a case: the plant (body, valves, feed, tank) and the controller in
//! one loop, with steps that end at every switching instant.
//!
//! Step boundaries: every control sample, every valve command taking effect,
//! every end of a thrust ramp, the start and end of each disturbance and the end
//! of the burn, and otherwise at most [`Settings::max_step_s`]. Inside a step each
//! valve's thrust is constant or a linear ramp, so RK4 keeps its order and the gas
//! used in the step is integrated exactly (trapezoid of a linear ramp).
//!
//! Valves: a command to open starts the thrust rising linearly to full over the
//! opening delay, a command to close starts it falling over the closing delay (the
//! valve model of `analysis::feed::minimum_impulse_bit`, so a pulse of the opening
//! delay gives the minimum impulse bit). The controller never commands a pulse
//! shorter than the case's minimum on-time.

use super::body::{Body, BodyState};
use super::case::{Case, Controller, Gains, Mount, Phase};
use super::feed::FeedMap;
use super::tank::{
    TankInTime, WallHeat, ALUMINIUM_SPECIFIC_HEAT_J_KG_K, INSIDE_HEAT_TRANSFER_W_M2_K,
};
use crate::allocation::mingas::Allocation;
use crate::allocation::region_map::RegionMap;
use crate::allocation::Tolerances;
use crate::analysis::{effectiveness, Analysis};
use crate::asbuilt::spec::Spread;
use crate::mass::vehicle::vehicle_properties;
use crate::mass::MassProperties;
use crate::model::{Design, FlightState, MotorCondition};
use nalgebra::{Matrix3, UnitQuaternion, Vector3};
use rand::Rng;
use rand_chacha::rand_core::SeedableRng;
use rand_chacha::ChaCha8Rng;
use serde::Serialize;
use std::collections::VecDeque;

/// Knobs of the integration and recording; every one has a documented default.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Settings {
    /// Longest integration step, s (1 ms).
    pub max_step_s: f64,
    /// Longest time between tank updates, s (20 ms).
    pub tank_update_s: f64,
    /// Tank update also when this fraction of its mass has left since the last one (1e-4).
    pub tank_update_mass_fraction: f64,
    /// Time between recorded points of the time series, s (10 ms).
    pub record_period_s: f64,
    /// Keep the time series (off for Monte Carlo runs).
    pub record_series: bool,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            max_step_s: 1e-3,
            tank_update_s: 0.02,
            tank_update_mass_fraction: 1e-4,
            record_period_s: 0.01,
            record_series: true,
        }
    }
}

/// Why a case cannot be run.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SimError {
    /// The case names a flight state the layout does not have.
    #[error("case `{case}`: no flight state named `{state}`")]
    NoState {
        /// Case.
        case: String,
        /// State asked for.
        state: String,
    },
    /// The plant could not be set up.
    #[error("case `{case}`: {reason}")]
    Setup {
        /// Case.
        case: String,
        /// What failed.
        reason: String,
    },
}

/// Everything fixed for a case, shared by all its runs.
#[derive(Debug, Clone)]
pub struct Plant {
    case: Case,
    port_names: Vec<String>,
    positions: Vec<Vector3<f64>>,
    directions: Vec<Vector3<f64>>,
    feed: FeedMap,
    onoff_masks: Vec<u64>,
    map: RegionMap,
    dry: MassProperties,
    propellant: MassProperties,
    gas_per_kg: MassProperties,
    stand_inertia: Matrix3<f64>,
    gas: crate::gas::Gas,
    tank_volume_m3: f64,
    start_gas_kg: f64,
    fill_temperature_k: f64,
    wall: WallHeat,
    opening_delay_s: f64,
    closing_delay_s: f64,
    motor_thrust_n: f64,
    misalignment_rad: f64,
    motor_aft_station_m: f64,
    axis_inertia: [f64; 3],
}

fn scaled(p: &MassProperties, f: f64) -> MassProperties {
    if p.mass_kg() <= 0.0 {
        return MassProperties::zero();
    }
    MassProperties::from_centroid(p.mass_kg() * f, p.cg(), p.inertia_about_cg() * f)
}

impl Plant {
    /// Set up the plant for `case` from the design and its analysis (the same
    /// effectiveness, on/off table and duty-cycle map the firmware tables hold,
    /// at the case's flight state).
    pub fn new(design: &Design, analysis: &Analysis, case: &Case) -> Result<Plant, SimError> {
        let setup = |reason: String| SimError::Setup {
            case: case.name.clone(),
            reason,
        };
        let st = analysis
            .states
            .iter()
            .find(|s| s.name == case.state)
            .ok_or_else(|| SimError::NoState {
                case: case.name.clone(),
                state: case.state.clone(),
            })?;
        let state = design
            .states
            .iter()
            .find(|s| s.name == case.state)
            .ok_or_else(|| SimError::NoState {
                case: case.name.clone(),
                state: case.state.clone(),
            })?;
        let feed =
            FeedMap::new(design, st.ambient_pressure_pa).map_err(|e| setup(e.to_string()))?;
        let tables = crate::export::bundle::state_tables(
            design,
            st,
            &crate::allocation::onoff::OnOffOptions::default(),
            None,
        )
        .map_err(setup)?;
        let onoff_masks = tables.onoff.iter().map(|r| r.mask).collect();
        let e = effectiveness(design, &st.mass, &st.ports).map_err(setup)?;
        let map = RegionMap::new(&e, &Tolerances::default()).map_err(|e| setup(e.to_string()))?;
        let burnt = FlightState {
            motor: MotorCondition::Burnout,
            ..state.clone()
        };
        let burning = FlightState {
            motor: MotorCondition::Burning,
            ..state.clone()
        };
        let dry = vehicle_properties(design, &burnt, 0.0);
        let propellant = vehicle_properties(design, &burning, 0.0) - dry;
        let gas_per_kg = vehicle_properties(design, &burnt, 1.0) - dry;
        let gb = &analysis.gas;
        let start_gas_kg =
            (gb.inventory_kg - (1.0 - state.gas_remaining) * gb.usable_isothermal_kg).max(0.0);
        let t = &design.feed.tank;
        let inner_area = std::f64::consts::PI * t.diameter_m * t.length_m
            + 0.5 * std::f64::consts::PI * t.diameter_m * t.diameter_m;
        let wall = WallHeat {
            mass_kg: t.empty_mass_kg.max(1e-3),
            specific_heat_j_kg_k: ALUMINIUM_SPECIFIC_HEAT_J_KG_K,
            coefficient_area_w_k: case
                .wall_coefficient_area_w_k
                .unwrap_or(INSIDE_HEAT_TRANSFER_W_M2_K * inner_area),
        };
        let stand_inertia = match case.mount {
            Mount::Gimbal { inertia_kg_m2, .. } => {
                Matrix3::from_diagonal(&Vector3::new(0.0, inertia_kg_m2, inertia_kg_m2))
            }
            _ => Matrix3::zeros(),
        };
        let radius = design.airframe.outer_radius_m();
        let i0 = st.mass.inertia_diagonal();
        let mut plant = Plant {
            case: case.clone(),
            port_names: design.ports.iter().map(|p| p.name.clone()).collect(),
            positions: design.ports.iter().map(|p| p.position(radius)).collect(),
            directions: design.ports.iter().map(|p| p.thrust_direction()).collect(),
            feed,
            onoff_masks,
            map,
            dry,
            propellant,
            gas_per_kg,
            stand_inertia,
            gas: design.feed.gas,
            tank_volume_m3: gb.tank_volume_m3,
            start_gas_kg,
            fill_temperature_k: design.feed.tank.fill_temperature_k,
            wall,
            opening_delay_s: design.feed.valve.opening_delay_s,
            closing_delay_s: design.feed.valve.closing_delay_s,
            motor_thrust_n: design.requirements.motor_thrust_n,
            misalignment_rad: design.requirements.thrust_misalignment_rad,
            motor_aft_station_m: design.motor.fore_station_m + design.motor.length_m,
            axis_inertia: [
                i0.x + stand_inertia[(0, 0)],
                i0.y + stand_inertia[(1, 1)],
                i0.z + stand_inertia[(2, 2)],
            ],
        };
        if plant.start_gas_kg <= 0.0 {
            return Err(setup(
                "the tank holds no gas at this flight state".to_string(),
            ));
        }
        if plant.port_names.len() > 64 {
            return Err(setup("more than 64 ports".to_string()));
        }
        plant.case.minimum_on_time_s = case.minimum_on_time_s.max(0.0);
        Ok(plant)
    }

    /// Valve opening delay, ms.
    pub fn opening_delay_ms(&self) -> f64 {
        self.opening_delay_s * 1e3
    }

    /// The case.
    pub fn case(&self) -> &Case {
        &self.case
    }

    /// Port names in layout order.
    pub fn port_names(&self) -> &[String] {
        &self.port_names
    }

    /// The gains of each axis the controller uses (direct, or from bandwidth and
    /// damping with the axis inertia at the start, stand included).
    pub fn gains(&self) -> Option<[super::case::AxisGains; 3]> {
        match self.case.controller {
            Controller::Pid {
                gains: Gains::Direct(g),
            } => Some(g),
            Controller::Pid {
                gains:
                    Gains::Bandwidth {
                        natural_frequency_rad_s: w,
                        damping: z,
                        integral,
                    },
            } => Some(self.axis_inertia.map(|i| super::case::AxisGains {
                kp: i * w * w,
                kd: 2.0 * z * i * w,
                ki: if integral { i * w * w * w / 10.0 } else { 0.0 },
            })),
            Controller::OnOff { .. } => None,
        }
    }

    /// Mass properties with `gas_kg` in the tank and `propellant_fraction` of the propellant left.
    fn mass(&self, gas_kg: f64, propellant_fraction: f64) -> MassProperties {
        self.dry + scaled(&self.propellant, propellant_fraction) + scaled(&self.gas_per_kg, gas_kg)
    }

    /// Single-axis limit-cycle inputs for the textbook comparison: thrust (N) and
    /// flow (kg/s) of one port alone at the start.
    pub fn port_full(&self, port: usize) -> (f64, f64) {
        let p = crate::gas::eos::state_td(
            self.gas,
            self.start_gas_kg / self.tank_volume_m3,
            self.fill_temperature_k,
        )
        .map(|s| s.pressure_pa)
        .unwrap_or(self.feed.set_pressure_pa * 10.0);
        self.feed.port_at(port, 1, p, self.fill_temperature_k)
    }
}

/// What one Monte Carlo run draws (all zero/nominal for the nominal run).
#[derive(Debug, Clone, PartialEq)]
pub struct Draw {
    /// Added to the start rates, rad/s.
    pub tip_off_rad_s: [f64; 3],
    /// Added to the start error, rad.
    pub start_error_rad: [f64; 3],
    /// Added to each valve's opening delay, s.
    pub opening_delay_s: Vec<f64>,
    /// Added to each valve's closing delay, s.
    pub closing_delay_s: Vec<f64>,
    /// Relative change of every disturbance.
    pub disturbance_scale: f64,
    /// Added to the gyro bias, rad/s.
    pub gyro_bias_rad_s: [f64; 3],
    /// Seed of the gyro noise.
    pub noise_seed: u64,
}

impl Draw {
    /// The nominal run (gyro noise still drawn, from `seed`).
    pub fn nominal(ports: usize, seed: u64) -> Self {
        Draw {
            tip_off_rad_s: [0.0; 3],
            start_error_rad: [0.0; 3],
            opening_delay_s: vec![0.0; ports],
            closing_delay_s: vec![0.0; ports],
            disturbance_scale: 0.0,
            gyro_bias_rad_s: [0.0; 3],
            noise_seed: seed,
        }
    }

    /// A draw from the case's spreads.
    pub fn sample<R: Rng + ?Sized>(plant: &Plant, rng: &mut R) -> Self {
        let s = &plant.case.spreads;
        let n = plant.port_names.len();
        let d = |sp: &Option<Spread>, r: &mut R| sp.map(|x| x.draw(r)).unwrap_or(0.0);
        let mut out = Draw::nominal(n, 0);
        for k in 0..3 {
            out.tip_off_rad_s[k] = d(&s.tip_off_rate, rng);
            out.start_error_rad[k] = d(&s.start_error, rng);
            out.gyro_bias_rad_s[k] = d(&s.gyro_bias, rng);
        }
        for i in 0..n {
            out.opening_delay_s[i] = d(&s.opening_delay, rng);
            out.closing_delay_s[i] = d(&s.closing_delay, rng);
        }
        out.disturbance_scale = d(&s.disturbance, rng);
        out.noise_seed = rng.gen();
        out
    }
}

/// Figures of one axis.
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct AxisResult {
    /// Axis name.
    pub axis: &'static str,
    /// Whether the mount lets it turn.
    pub free: bool,
    /// Half the peak-to-peak attitude error over the second half of the hold, rad.
    pub limit_cycle_amplitude_rad: Option<f64>,
    /// Mean time between upward crossings of the mean error in that half, s.
    pub limit_cycle_period_s: Option<f64>,
    /// Time after which the error stays within the pointing requirement to the end of the hold, s.
    pub settling_time_s: Option<f64>,
    /// Largest body rate magnitude about the axis, rad/s.
    pub peak_rate_rad_s: f64,
    /// Largest attitude error magnitude after settling, rad.
    pub peak_error_after_settling_rad: Option<f64>,
}

/// Figures of one port.
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct PortResult {
    /// Port name.
    pub port: String,
    /// Commanded pulses.
    pub pulses: usize,
    /// Total commanded on time, s.
    pub on_time_s: f64,
    /// Shortest commanded pulse, s (`None` when the port never fired).
    pub shortest_pulse_s: Option<f64>,
    /// Gas through the port, kg.
    pub gas_kg: f64,
}

/// The time series, one row per recorded instant.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Series {
    /// Time, s.
    pub time_s: Vec<f64>,
    /// Attitude error (roll, pitch, yaw), rad.
    pub error_rad: Vec<[f64; 3]>,
    /// Body rate, rad/s.
    pub rate_rad_s: Vec<[f64; 3]>,
    /// Tank pressure, Pa absolute.
    pub tank_pressure_pa: Vec<f64>,
    /// Tank temperature, K.
    pub tank_temperature_k: Vec<f64>,
    /// Gas in the tank, kg.
    pub gas_kg: Vec<f64>,
    /// Valves commanded open (bit i = port i).
    pub valve_mask: Vec<u64>,
    /// Thrust of each port, N.
    pub thrust_n: Vec<Vec<f64>>,
}

/// Result of one run.
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct RunResult {
    /// Case name.
    pub case: String,
    /// Length simulated, s.
    pub duration_s: f64,
    /// Until the gas ran out or the pointing requirement could no longer be met, s.
    pub hold_time_s: f64,
    /// Why the hold ended, in words.
    pub hold_end: String,
    /// Gas used, kg.
    pub gas_used_kg: f64,
    /// Gas in the tank at the start, kg.
    pub gas_start_kg: f64,
    /// When the regulator dropped out, s.
    pub regulator_dropout_s: Option<f64>,
    /// When the gas ran out (no pressure left to drive a port), s.
    pub gas_out_s: Option<f64>,
    /// Tank pressure at the end, Pa absolute.
    pub end_tank_pressure_pa: f64,
    /// Lowest tank temperature, K.
    pub lowest_tank_temperature_k: f64,
    /// Per axis.
    pub axes: Vec<AxisResult>,
    /// Per port.
    pub ports: Vec<PortResult>,
    /// Pointing requirement, rad.
    pub pointing_rad: f64,
    /// Half-amplitude of the error over the steady part before and after regulator dropout, rad (largest axis).
    pub amplitude_before_after_dropout_rad: Option<(f64, f64)>,
    /// Why the run stopped early, if it did.
    pub stopped: Option<String>,
    /// Findings in words.
    pub findings: Vec<String>,
    /// Time series (not in the JSON summary).
    #[serde(skip)]
    pub series: Option<Series>,
    /// Control-rate truth error per axis (for metrics and tests), not serialised.
    #[serde(skip)]
    pub samples: Vec<(f64, [f64; 3], [f64; 3])>,
    /// Controller commands at every control step: on/off row, or duties.
    #[serde(skip)]
    pub commands: Vec<Command>,
}

/// What the controller asked for at one control step.
#[derive(Debug, Clone, PartialEq)]
pub enum Command {
    /// On/off: the per-axis command and the table's mask.
    OnOff {
        /// Sensed attitude error, rad.
        error_rad: [f64; 3],
        /// Sensed rate, rad/s.
        rate_rad_s: [f64; 3],
        /// Command signs.
        command: [i8; 3],
        /// Valve mask.
        mask: u64,
    },
    /// PID: torque command and duties.
    Duty {
        /// Sensed attitude error, rad.
        error_rad: [f64; 3],
        /// Sensed rate, rad/s.
        rate_rad_s: [f64; 3],
        /// Torque command, N·m.
        torque_n_m: [f64; 3],
        /// Duty per port.
        duty: Vec<f64>,
    },
}

struct Valve {
    level: f64,
    slope: f64,
    queue: VecDeque<(f64, bool)>,
    queued_on: bool,
    last_on_cmd: f64,
    on_since: Option<f64>,
    pulses: usize,
    on_time: f64,
    shortest: Option<f64>,
    gas: f64,
    t_open: f64,
    t_close: f64,
}

const AXES: [&str; 3] = ["roll", "pitch", "yaw"];

/// Run one case with one draw.
pub fn run(plant: &Plant, draw: &Draw, settings: &Settings) -> RunResult {
    let case = &plant.case;
    let n = plant.port_names.len();
    let free = case.mount.free_axes();
    let mut rng = ChaCha8Rng::seed_from_u64(draw.noise_seed);
    let noise = Spread::Normal {
        sigma: case.sensing.gyro_noise_rad_s,
    };
    let bias = Vector3::from_fn(|k, _| case.sensing.gyro_bias_rad_s[k] + draw.gyro_bias_rad_s[k]);
    let dist_scale = 1.0 + draw.disturbance_scale;
    let burn_time = match case.phase {
        Phase::Burn { burn_time_s } => burn_time_s,
        Phase::Coast => 0.0,
    };
    let friction = match case.mount {
        Mount::Free => 0.0,
        Mount::Gimbal { friction_n_m, .. } | Mount::Line { friction_n_m } => friction_n_m,
    };
    // Friction is smoothed over this rate so the torque stays smooth (1 mrad/s).
    const FRICTION_SMOOTHING_RAD_S: f64 = 1e-3;

    let mut tank = match TankInTime::new(
        plant.gas,
        plant.tank_volume_m3,
        plant.start_gas_kg,
        plant.fill_temperature_k,
        plant.wall,
    ) {
        Ok(t) => t,
        Err(e) => return failed(plant, e.to_string()),
    };
    let mut valves: Vec<Valve> = (0..n)
        .map(|i| Valve {
            level: 0.0,
            slope: 0.0,
            queue: VecDeque::new(),
            queued_on: false,
            last_on_cmd: f64::NEG_INFINITY,
            on_since: None,
            pulses: 0,
            on_time: 0.0,
            shortest: None,
            gas: 0.0,
            t_open: (plant.opening_delay_s + draw.opening_delay_s[i]).max(0.0),
            t_close: (plant.closing_delay_s + draw.closing_delay_s[i]).max(0.0),
        })
        .collect();

    let e0 = Vector3::from_fn(|k, _| {
        if free[k] {
            case.start_error_rad[k] + draw.start_error_rad[k]
        } else {
            0.0
        }
    });
    let w0 = Vector3::from_fn(|k, _| {
        if free[k] {
            case.start_rate_rad_s[k] + draw.tip_off_rad_s[k]
        } else {
            0.0
        }
    });
    let mut state = BodyState {
        attitude: UnitQuaternion::from_scaled_axis(e0),
        rate_rad_s: w0,
    };
    let mut q_est = state.attitude;
    let mut integral: Vector3<f64> = Vector3::zeros();
    let mut firing = [0i8; 3];
    let mut last_sensed: Option<Vector3<f64>> = None;
    let gains = plant.gains();

    let prop_fraction = |t: f64| {
        if burn_time > 0.0 {
            (1.0 - t / burn_time).clamp(0.0, 1.0)
        } else {
            0.0
        }
    };
    let mut mp = plant.mass(tank.contents().mass_kg, prop_fraction(0.0));
    let build_body =
        |mp: &MassProperties| Body::new(mp.inertia_about_cg() + plant.stand_inertia, free);
    let mut body = match build_body(&mp) {
        Ok(b) => b,
        Err(e) => return failed(plant, e.to_string()),
    };
    let mut arms: Vec<Vector3<f64>> = (0..n)
        .map(|i| (plant.positions[i] - mp.cg()).cross(&plant.directions[i]))
        .collect();

    let t_end = case.duration_s;
    let dt_c = case.sensing.control_period_s;
    let delay = case.sensing.computation_delay_s.max(0.0);
    let min_on = case.minimum_on_time_s;
    let mut t = 0.0f64;
    let mut k_sample: u64 = 0;
    let mut next_sample = 0.0f64;
    let mut pending_dm = 0.0;
    let mut last_tank_t = 0.0;
    let mut gas_used = 0.0;
    let mut dropout: Option<f64> = None;
    let mut gas_out: Option<f64> = None;
    let mut lowest_t = tank.contents().temperature_k;
    let mut stopped = None;
    let mut samples = Vec::with_capacity((t_end / dt_c) as usize + 2);
    let mut commands = Vec::new();
    let keep_commands = settings.record_series;
    let mut series = settings.record_series.then(|| Series {
        thrust_n: vec![Vec::new(); n],
        ..Series::default()
    });
    let mut next_record = 0.0f64;
    let mut full: Vec<(f64, f64)> = vec![(0.0, 0.0); n];
    let mut alloc = Allocation::with_ports(n);
    let eps = 1e-12;

    let disturbance_at = |s: f64| -> Vector3<f64> {
        let mut d = Vector3::zeros();
        for x in &case.disturbances {
            let on = s >= x.from_s - eps && x.lasting_s.is_none_or(|l| s < x.from_s + l - eps);
            if on {
                d += Vector3::from(x.torque_n_m) * dist_scale;
            }
        }
        d
    };

    loop {
        // 1. Valve commands due now.
        continue_valves(&mut valves, t, eps);
        for v in valves.iter_mut() {
            if v.level >= 1.0 - 1e-12 && v.slope > 0.0 {
                v.level = 1.0;
                v.slope = 0.0;
            }
            if v.level <= 1e-12 && v.slope < 0.0 {
                v.level = 0.0;
                v.slope = 0.0;
            }
        }

        // 2. Tank and mass properties.
        if pending_dm > 0.0
            && (pending_dm >= settings.tank_update_mass_fraction * tank.contents().mass_kg
                || t - last_tank_t >= settings.tank_update_s)
            || (t - last_tank_t >= 10.0 * settings.tank_update_s)
            || (t < burn_time + settings.tank_update_s && t - last_tank_t >= settings.tank_update_s)
        {
            match tank.advance(pending_dm, t - last_tank_t) {
                Ok(_) => {}
                Err(e) => {
                    stopped = Some(format!("at {t:.3} s: {e}"));
                    break;
                }
            }
            pending_dm = 0.0;
            last_tank_t = t;
            let c = tank.contents();
            lowest_t = lowest_t.min(c.temperature_k);
            mp = plant.mass(c.mass_kg, prop_fraction(t));
            if let Ok(b) = build_body(&mp) {
                body = b;
            }
            for (i, a) in arms.iter_mut().enumerate() {
                *a = (plant.positions[i] - mp.cg()).cross(&plant.directions[i]);
            }
        }
        let c = *tank.contents();
        if dropout.is_none() && c.pressure_pa < plant.feed.dropout_pressure_pa {
            dropout = Some(t);
        }
        if gas_out.is_none()
            && plant.feed.regulator_outlet_pa(c.pressure_pa) <= plant.feed.ambient_pa * (1.0 + 1e-6)
        {
            gas_out = Some(t);
        }

        // 3. Control sample.
        if t >= next_sample - eps && t < t_end - eps {
            let truth_e = state.attitude_error_rad();
            samples.push((t, truth_e.into(), state.rate_rad_s.into()));
            let sensed = Vector3::from_fn(|k, _| {
                if free[k] {
                    state.rate_rad_s[k] + bias[k] + noise.draw(&mut rng)
                } else {
                    0.0
                }
            });
            if let Some(prev) = last_sensed {
                q_est *= UnitQuaternion::from_scaled_axis(prev * dt_c);
            }
            last_sensed = Some(sensed);
            let est = BodyState {
                attitude: q_est,
                rate_rad_s: sensed,
            }
            .attitude_error_rad();
            let at = t + delay;
            let mut want = vec![false; n];
            let mut on_for = vec![0.0; n];
            match case.controller {
                Controller::OnOff {
                    deadband_rad,
                    hysteresis_rad,
                    rate_weight_s,
                } => {
                    for k in 0..3 {
                        if !free[k] {
                            firing[k] = 0;
                            continue;
                        }
                        let s = est[k] + rate_weight_s * sensed[k];
                        let stop = (deadband_rad - hysteresis_rad).max(0.0);
                        firing[k] = match firing[k] {
                            0 if s > deadband_rad => -1,
                            0 if s < -deadband_rad => 1,
                            -1 if s < stop => 0,
                            1 if s > -stop => 0,
                            f => f,
                        };
                    }
                    let mask = plant.onoff_masks[crate::export::firmware::onoff_row(firing)];
                    for (i, w) in want.iter_mut().enumerate() {
                        *w = mask & (1u64 << i) != 0;
                    }
                    if keep_commands {
                        commands.push(Command::OnOff {
                            error_rad: est.into(),
                            rate_rad_s: sensed.into(),
                            command: firing,
                            mask,
                        });
                    }
                }
                Controller::Pid { .. } => {
                    let g = gains.unwrap_or(
                        [super::case::AxisGains {
                            kp: 0.0,
                            ki: 0.0,
                            kd: 0.0,
                        }; 3],
                    );
                    let mut tau: Vector3<f64> = Vector3::zeros();
                    for k in 0..3 {
                        if !free[k] {
                            continue;
                        }
                        integral[k] += est[k] * dt_c;
                        tau[k] = -(g[k].kp * est[k] + g[k].ki * integral[k] + g[k].kd * sensed[k]);
                    }
                    if plant.map.evaluate_into(&tau, &mut alloc).is_err() {
                        alloc.duty.iter_mut().for_each(|d| *d = 0.0);
                    }
                    for i in 0..n {
                        let w = alloc.duty[i].clamp(0.0, 1.0) * dt_c;
                        if w >= min_on.max(1e-9) {
                            want[i] = true;
                            on_for[i] = w;
                        }
                    }
                    if keep_commands {
                        commands.push(Command::Duty {
                            error_rad: est.into(),
                            rate_rad_s: sensed.into(),
                            torque_n_m: tau.into(),
                            duty: alloc.duty.clone(),
                        });
                    }
                }
            }
            let pwm = matches!(case.controller, Controller::Pid { .. });
            for (i, v) in valves.iter_mut().enumerate() {
                if want[i] {
                    if !v.queued_on {
                        // Cancel a pending close that has not happened yet.
                        if let Some(&(tb, false)) = v.queue.back() {
                            if tb >= at - eps {
                                v.queue.pop_back();
                                v.queued_on = true;
                            }
                        }
                    }
                    if !v.queued_on {
                        v.queue.push_back((at, true));
                        v.queued_on = true;
                        v.last_on_cmd = at;
                    }
                    if pwm && on_for[i] < dt_c * (1.0 - 1e-9) {
                        let off = (at + on_for[i]).max(v.last_on_cmd + min_on);
                        v.queue.push_back((off, false));
                        v.queued_on = false;
                    }
                } else if v.queued_on {
                    let off = at.max(v.last_on_cmd + min_on);
                    v.queue.push_back((off, false));
                    v.queued_on = false;
                }
            }
            // Commands due at once (no computation delay).
            if delay <= 0.0 {
                continue_valves(&mut valves, t, eps);
            }
            k_sample += 1;
            next_sample = k_sample as f64 * dt_c;
        }

        // 4. Record.
        if let Some(s) = series.as_mut() {
            if t >= next_record - eps {
                let open = valves
                    .iter()
                    .filter(|v| v.level > 0.0 || v.slope > 0.0)
                    .count();
                s.time_s.push(t);
                s.error_rad.push(state.attitude_error_rad().into());
                s.rate_rad_s.push(state.rate_rad_s.into());
                s.tank_pressure_pa.push(c.pressure_pa);
                s.tank_temperature_k.push(c.temperature_k);
                s.gas_kg.push(c.mass_kg - pending_dm);
                let mut mask = 0u64;
                for (i, v) in valves.iter().enumerate() {
                    if v.on_since.is_some() {
                        mask |= 1 << i;
                    }
                    let (f, _) = plant.feed.port_at(i, open, c.pressure_pa, c.temperature_k);
                    s.thrust_n[i].push(f * v.level);
                }
                s.valve_mask.push(mask);
                next_record += settings.record_period_s;
            }
        }
        if t >= t_end - eps {
            break;
        }

        // 5. Next breakpoint.
        let mut next = (t + settings.max_step_s).min(t_end).min(next_sample);
        for v in &valves {
            if let Some(&(at, _)) = v.queue.front() {
                if at > t + eps {
                    next = next.min(at);
                }
            }
            if v.slope > 0.0 {
                next = next.min(t + (1.0 - v.level) / v.slope);
            } else if v.slope < 0.0 {
                next = next.min(t + v.level / -v.slope);
            }
        }
        for x in &case.disturbances {
            if x.from_s > t + eps {
                next = next.min(x.from_s);
            }
            if let Some(l) = x.lasting_s {
                if x.from_s + l > t + eps {
                    next = next.min(x.from_s + l);
                }
            }
        }
        if burn_time > t + eps {
            next = next.min(burn_time);
        }
        if series.is_some() && next_record > t + eps {
            next = next.min(next_record);
        }
        let h = (next - t).max(1e-12);

        // 6. Integrate the segment.
        let open = valves
            .iter()
            .filter(|v| v.level > 0.0 || v.slope > 0.0)
            .count();
        let mut a0 = Vector3::zeros();
        let mut a1 = Vector3::zeros();
        for (i, v) in valves.iter_mut().enumerate() {
            if v.level == 0.0 && v.slope == 0.0 {
                continue;
            }
            full[i] = plant.feed.port_at(i, open, c.pressure_pa, c.temperature_k);
            a0 += arms[i] * (full[i].0 * v.level);
            a1 += arms[i] * (full[i].0 * v.slope);
            let dm = full[i].1 * (v.level + 0.5 * v.slope * h) * h;
            v.gas += dm;
            pending_dm += dm;
            gas_used += dm;
        }
        let mut steady = disturbance_at(t + 0.5 * h);
        if t + 0.5 * h < burn_time {
            let arm = plant.motor_aft_station_m - mp.cg_station_m();
            steady.y += plant.motor_thrust_n * plant.misalignment_rad.sin() * arm;
        }
        let t0 = t;
        state = body.step(&state, t, h, |s, w| {
            let mut tau = a0 + a1 * (s - t0) + steady;
            if friction > 0.0 {
                for k in 0..3 {
                    if free[k] {
                        tau[k] -= friction * (w[k] / FRICTION_SMOOTHING_RAD_S).tanh();
                    }
                }
            }
            tau
        });
        for v in valves.iter_mut() {
            v.level = (v.level + v.slope * h).clamp(0.0, 1.0);
        }
        t = next;
    }
    // Valves still open at the end: their on time counts, but a pulse cut by the
    // end of the case is not a pulse length.
    for v in valves.iter_mut() {
        if let Some(s) = v.on_since.take() {
            v.on_time += t - s;
        }
    }
    if pending_dm > 0.0 {
        let _ = tank.advance(pending_dm, t - last_tank_t);
    }
    let c = *tank.contents();
    lowest_t = lowest_t.min(c.temperature_k);
    let ports = valves
        .iter()
        .enumerate()
        .map(|(i, v)| PortResult {
            port: plant.port_names[i].clone(),
            pulses: v.pulses,
            on_time_s: v.on_time,
            shortest_pulse_s: v.shortest,
            gas_kg: v.gas,
        })
        .collect();
    let mut r = RunResult {
        case: case.name.clone(),
        duration_s: t,
        hold_time_s: 0.0,
        hold_end: String::new(),
        gas_used_kg: gas_used,
        gas_start_kg: plant.start_gas_kg,
        regulator_dropout_s: dropout,
        gas_out_s: gas_out,
        end_tank_pressure_pa: c.pressure_pa,
        lowest_tank_temperature_k: lowest_t,
        axes: Vec::new(),
        ports,
        pointing_rad: case.pointing_rad,
        amplitude_before_after_dropout_rad: None,
        stopped,
        findings: Vec::new(),
        series,
        samples,
        commands,
    };
    super::metrics::fill(&mut r, plant);
    r
}

fn continue_valves(valves: &mut [Valve], t: f64, eps: f64) {
    for v in valves.iter_mut() {
        while let Some(&(at, on)) = v.queue.front() {
            if at > t + eps {
                break;
            }
            v.queue.pop_front();
            if on {
                if v.on_since.is_none() {
                    v.on_since = Some(t);
                    v.pulses += 1;
                }
                v.slope = if v.t_open > 0.0 { 1.0 / v.t_open } else { 0.0 };
                if v.t_open <= 0.0 {
                    v.level = 1.0;
                }
            } else {
                if let Some(s) = v.on_since.take() {
                    let w = t - s;
                    v.on_time += w;
                    v.shortest = Some(v.shortest.map_or(w, |m: f64| m.min(w)));
                }
                v.slope = if v.t_close > 0.0 {
                    -1.0 / v.t_close
                } else {
                    0.0
                };
                if v.t_close <= 0.0 {
                    v.level = 0.0;
                }
            }
        }
    }
}

fn failed(plant: &Plant, why: String) -> RunResult {
    RunResult {
        case: plant.case.name.clone(),
        duration_s: 0.0,
        hold_time_s: 0.0,
        hold_end: format!("the run could not start: {why}"),
        gas_used_kg: 0.0,
        gas_start_kg: plant.start_gas_kg,
        regulator_dropout_s: None,
        gas_out_s: None,
        end_tank_pressure_pa: 0.0,
        lowest_tank_temperature_k: plant.fill_temperature_k,
        axes: Vec::new(),
        ports: Vec::new(),
        pointing_rad: plant.case.pointing_rad,
        amplitude_before_after_dropout_rad: None,
        stopped: Some(why),
        findings: Vec::new(),
        series: None,
        samples: Vec::new(),
        commands: Vec::new(),
    }
}

/// Axis names.
pub fn axis_names() -> [&'static str; 3] {
    AXES
}
