//! A simulation case as checked SI data: what the layout's `[[case]]` says.

use crate::asbuilt::spec::Spread;

/// What the motor does during the case.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Phase {
    /// Motor burnt out (or not lit): mass properties change only with gas used.
    Coast,
    /// Motor burning from the start for `burn_time_s`, propellant used at an even
    /// rate; its misalignment torque acts while it burns.
    Burn {
        /// Burn time, s.
        burn_time_s: f64,
    },
}

/// How the vehicle is held.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Mount {
    /// Free flight: all three axes turn.
    Free,
    /// Two-axis gimbal test stand: pitch and yaw free about the CG, roll locked; the
    /// stand adds its own inertia about pitch and yaw and a friction torque.
    Gimbal {
        /// Inertia the stand adds about pitch and about yaw, kg·m².
        inertia_kg_m2: f64,
        /// Dry (Coulomb) friction torque of each bearing, N·m.
        friction_n_m: f64,
    },
    /// Hanging on a line for roll tests: roll free only.
    Line {
        /// Dry friction of the swivel, N·m.
        friction_n_m: f64,
    },
}

impl Mount {
    /// Which body axes (roll, pitch, yaw) may turn.
    pub fn free_axes(&self) -> [bool; 3] {
        match self {
            Mount::Free => [true; 3],
            Mount::Gimbal { .. } => [false, true, true],
            Mount::Line { .. } => [true, false, false],
        }
    }

    /// Plain name.
    pub fn words(&self) -> &'static str {
        match self {
            Mount::Free => "free flight",
            Mount::Gimbal { .. } => "two-axis gimbal stand (roll locked)",
            Mount::Line { .. } => "hanging on a line (roll only)",
        }
    }
}

/// A torque acting from a time, for a while or to the end.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Disturbance {
    /// Torque (roll, pitch, yaw), body frame, N·m.
    pub torque_n_m: [f64; 3],
    /// When it starts, s.
    pub from_s: f64,
    /// How long it lasts, s (`None`: to the end; a short one is an impulse).
    pub lasting_s: Option<f64>,
}

/// Gains of one axis.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AxisGains {
    /// Proportional gain, N·m per rad.
    pub kp: f64,
    /// Integral gain, N·m per (rad·s).
    pub ki: f64,
    /// Derivative gain, N·m·s per rad.
    pub kd: f64,
}

/// Where the gains come from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Gains {
    /// Given per axis.
    Direct([AxisGains; 3]),
    /// From a closed-loop natural frequency ω (rad/s) and damping ζ, per axis with
    /// that axis's inertia I: kp = I·ω², kd = 2·ζ·I·ω; with integral action
    /// ki = kp·ω/10 (pole placement of the double integrator; the integral pole a
    /// decade below, common practice, no source).
    Bandwidth {
        /// Natural frequency, rad/s.
        natural_frequency_rad_s: f64,
        /// Damping ratio.
        damping: f64,
        /// Whether to add integral action.
        integral: bool,
    },
}

/// The controller and its settings.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Controller {
    /// Per-axis on/off with deadband and hysteresis on s = error + rate_weight·rate,
    /// firing the 27-row on/off table.
    OnOff {
        /// Deadband half width on s, rad.
        deadband_rad: f64,
        /// Hysteresis: firing stops once |s| falls below deadband − hysteresis, rad.
        hysteresis_rad: f64,
        /// Weight of the rate in s, s.
        rate_weight_s: f64,
    },
    /// PD or PID on attitude error giving a torque, least-gas duty cycles from the
    /// exact duty-cycle map, then pulse-width modulation at the control rate.
    Pid {
        /// Gains.
        gains: Gains,
    },
}

/// Gyro and computer.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sensing {
    /// White rate noise, standard deviation per sample, rad/s.
    pub gyro_noise_rad_s: f64,
    /// Constant rate bias per axis, rad/s.
    pub gyro_bias_rad_s: [f64; 3],
    /// Control (and gyro sample) period, s.
    pub control_period_s: f64,
    /// Delay from sample to valve command, s.
    pub computation_delay_s: f64,
}

/// What Monte Carlo varies, run to run.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Spreads {
    /// Tip-off rate, each axis, rad/s.
    pub tip_off_rate: Option<Spread>,
    /// Start attitude error, each axis, rad.
    pub start_error: Option<Spread>,
    /// Valve opening delay, s (each valve drawn apart).
    pub opening_delay: Option<Spread>,
    /// Valve closing delay, s (each valve drawn apart).
    pub closing_delay: Option<Spread>,
    /// Disturbance torques, as a fraction of each.
    pub disturbance: Option<Spread>,
    /// Gyro bias, each axis, rad/s.
    pub gyro_bias: Option<Spread>,
}

/// One case.
#[derive(Debug, Clone, PartialEq)]
pub struct Case {
    /// Name.
    pub name: String,
    /// Flight state it starts from (altitude, gas remaining, motor).
    pub state: String,
    /// Burn or coast.
    pub phase: Phase,
    /// Length of the case, s.
    pub duration_s: f64,
    /// Start attitude error (roll, pitch, yaw), rad.
    pub start_error_rad: [f64; 3],
    /// Start body rates (tip-off), rad/s.
    pub start_rate_rad_s: [f64; 3],
    /// Pointing requirement: largest attitude error accepted per axis, rad.
    pub pointing_rad: f64,
    /// Disturbance torques.
    pub disturbances: Vec<Disturbance>,
    /// Gyro and computer.
    pub sensing: Sensing,
    /// Controller.
    pub controller: Controller,
    /// Shortest valve pulse the controller commands, s.
    pub minimum_on_time_s: f64,
    /// Mount.
    pub mount: Mount,
    /// Monte Carlo spreads.
    pub spreads: Spreads,
    /// Tank wall heat-transfer coefficient × area, W/K (`None`: the stated default).
    pub wall_coefficient_area_w_k: Option<f64>,
}
