//! Per-axis torque authority against requirements and disturbances.
//!
//! The requirement about each axis is the torque that gives the wanted angular
//! acceleration plus the disturbance that must be cancelled at the same time:
//! the roll disturbance torque about roll, and during the burn the motor's
//! thrust misalignment acting at the motor nozzle's distance from the CG about
//! pitch and yaw. Margin = available torque / required torque, per axis and sign.

use nalgebra::Vector3;
use serde::Serialize;

/// Axis names in body-frame order.
pub const AXES: [&str; 3] = ["roll", "pitch", "yaw"];

/// Torque needed about each axis at one flight state, N·m.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Required {
    /// From the wanted angular accelerations, per axis, N·m.
    pub from_acceleration_n_m: [f64; 3],
    /// From disturbances, per axis, N·m.
    pub from_disturbance_n_m: [f64; 3],
}

impl Required {
    /// Total per axis, N·m.
    pub fn total_n_m(&self) -> [f64; 3] {
        [0, 1, 2].map(|k| self.from_acceleration_n_m[k] + self.from_disturbance_n_m[k])
    }
}

/// Authority about one axis.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct AxisAuthority {
    /// Axis name.
    pub axis: &'static str,
    /// Largest torque in the positive sense, N·m.
    pub positive_n_m: f64,
    /// Largest torque in the negative sense (a positive number), N·m.
    pub negative_n_m: f64,
    /// The weaker of the two senses divided by the inertia, rad/s².
    pub angular_accel_rad_s2: f64,
    /// Required torque, N·m.
    pub required_n_m: f64,
    /// Weaker sense over requirement (infinite when nothing is required).
    pub margin: f64,
}

/// Build per-axis authority from the available torques (weaker sense counts) and
/// the angular acceleration attainable about each axis alone (weaker sense, rad/s²;
/// see [`crate::analysis::axis_accelerations`] for how the full inertia tensor enters).
pub fn axis_authority(
    positive: Vector3<f64>,
    negative: Vector3<f64>,
    accel_rad_s2: [f64; 3],
    required: &Required,
) -> [AxisAuthority; 3] {
    let total = required.total_n_m();
    [0, 1, 2].map(|k| {
        let weak = positive[k].min(negative[k]);
        AxisAuthority {
            axis: AXES[k],
            positive_n_m: positive[k],
            negative_n_m: negative[k],
            angular_accel_rad_s2: accel_rad_s2[k],
            required_n_m: total[k],
            margin: if total[k] > 0.0 {
                weak / total[k]
            } else {
                f64::INFINITY
            },
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn weaker_sense_sets_the_margin() {
        let req = Required {
            from_acceleration_n_m: [0.1, 0.2, 0.0],
            from_disturbance_n_m: [0.1, 0.0, 0.0],
        };
        let a = axis_authority(
            Vector3::new(1.0, 0.4, 0.3),
            Vector3::new(0.6, 0.5, 0.3),
            [60.0, 0.4, 0.3],
            &req,
        );
        assert_eq!(a[0].margin, 0.6 / 0.2);
        assert_eq!(a[1].margin, 0.4 / 0.2);
        assert!(a[2].margin.is_infinite());
        assert_eq!(a[0].angular_accel_rad_s2, 60.0);
    }
}
