//! Exports: STL meshes for CAD, a 1:1 SVG drilling template, plots and the HTML report.
//!
//! Every export is a pure function of its input (the [`Design`](crate::model::Design),
//! or for plots and the report plain numbers and text) and a
//! settings struct, returning bytes or strings; writing files is the caller's job.
//! Output is deterministic (fixed vertex order, fixed number formatting) so it can
//! be compared against committed files.
//!
//! - [`stl`]: airframe, drill axes and exhaust markers as binary STL in millimetres,
//!   body frame (origin at the nose tip, +x toward the nose, +y through clock 0°).
//! - [`template`]: the tube's outer surface unrolled at 1:1, paged onto A4 or Letter.
//! - [`firmware`]: allocation tables for flight firmware (C header, CSV, JSON).
//! - [`mesh`]: the indexed triangle mesh both STL and tests use, with the check that
//!   every shell is closed, consistently oriented and facing outward.
//! - [`plots`]: torque envelopes, authority, port thrust, gas remaining and search
//!   progress as SVG (and PNG), from plain numbers.
//! - [`html`]: one self-contained HTML report with inline CSS and inline SVG plots.

pub mod bundle;
pub mod firmware;
pub mod html;
pub mod mesh;
pub mod pdf;
pub mod plots;
pub mod stl;
pub mod template;

use mesh::{MeshDefect, PlateError, ProfileError};
use thiserror::Error;

/// Why an export could not be made.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum ExportError {
    /// A settings value is out of range.
    #[error("setting `{name}` = {value} is out of range: {reason}")]
    Setting {
        /// Setting name.
        name: &'static str,
        /// Value given.
        value: f64,
        /// What it must be.
        reason: &'static str,
    },
    /// An airframe dimension cannot be drawn (the model normally rules this out).
    #[error("airframe `{field}` = {value} m cannot be drawn: {reason}")]
    Airframe {
        /// Field name.
        field: &'static str,
        /// Value, m.
        value: f64,
        /// Why.
        reason: &'static str,
    },
    /// A tangent ogive needs a length at least equal to its base radius.
    #[error("a tangent ogive of length {length_m} m cannot meet a base radius of {radius_m} m")]
    OgiveTooShort {
        /// Nose length, m.
        length_m: f64,
        /// Base radius, m.
        radius_m: f64,
    },
    /// The design has no ports, so there is nothing to drill or mark.
    #[error("the design has no ports")]
    NoPorts,
    /// A port's drill axis is canted 90° or more from the surface normal.
    #[error(
        "port `{port}`: drill axis is {cant_deg:.1}° from the surface normal; it must be under 90°"
    )]
    CantTooSteep {
        /// Port name.
        port: String,
        /// Total cant, degrees.
        cant_deg: f64,
    },
    /// A port's drill axis is canted so far tangentially that it never reaches the bore.
    #[error(
        "port `{port}`: the drill axis misses the bore; the hole would not break through the wall"
    )]
    HoleMissesBore {
        /// Port name.
        port: String,
    },
    /// A port's hole diameter is not a positive number.
    #[error("port `{port}`: hole diameter {diameter_m} m is not positive")]
    HoleDiameter {
        /// Port name.
        port: String,
        /// Diameter, m.
        diameter_m: f64,
    },
    /// The caller gave a different number of per-port values than there are ports.
    #[error("expected one value per port ({expected}), found {found}")]
    ValueCount {
        /// Number of ports.
        expected: usize,
        /// Number of values.
        found: usize,
    },
    /// A per-port value is negative or not finite.
    #[error("port `{port}`: value {value} must be finite and ≥ 0")]
    PortValue {
        /// Port name.
        port: String,
        /// Value given.
        value: f64,
    },
    /// Every per-port value is zero, so no marker has a length.
    #[error("every port value is zero; no marker can be scaled")]
    NothingToMark,
    /// A solid of revolution could not be built.
    #[error("{what}: {source}")]
    Profile {
        /// Which part.
        what: String,
        /// Why.
        source: ProfileError,
    },
    /// A plate could not be built.
    #[error("{what}: {source}")]
    Plate {
        /// Which part.
        what: String,
        /// Why.
        source: PlateError,
    },
    /// A finished mesh failed its closedness check.
    #[error("{what}: mesh check failed: {source}")]
    Mesh {
        /// Which part.
        what: String,
        /// The defect.
        source: MeshDefect,
    },
    /// The STL encoder failed.
    #[error("writing STL: {0}")]
    Encode(String),
    /// An SVG page could not be read for the PDF (a bug if it ever happens: the pages are our own).
    #[error("drill template page {page} for PDF: {reason}")]
    Pdf {
        /// 1-based page.
        page: usize,
        /// What the SVG reader said.
        reason: String,
    },
}

pub use crate::airframe::profile_radius;

/// Format a number with three decimals, writing `0.000` for negative zero, so every
/// export prints the same text for the same geometry.
pub(crate) fn fmt3(v: f64) -> String {
    let s = format!("{v:.3}");
    if s == "-0.000" {
        "0.000".to_string()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::NoseShape;
    use approx::assert_relative_eq;

    #[test]
    fn profiles_start_at_the_tip_and_meet_the_tube() {
        for shape in [
            NoseShape::Conical,
            NoseShape::Ogive,
            NoseShape::Elliptical,
            NoseShape::Parabolic,
        ] {
            assert_eq!(profile_radius(shape, 0.2, 0.03, 0.0), 0.0, "{shape:?}");
            assert_relative_eq!(profile_radius(shape, 0.2, 0.03, 0.2), 0.03, epsilon = 1e-15);
            // Every profile here is concave and rising: the midpoint lies on or above the chord.
            assert!(
                profile_radius(shape, 0.2, 0.03, 0.1) >= 0.015 - 1e-15,
                "{shape:?}"
            );
        }
    }

    #[test]
    fn profiles_match_hand_values() {
        // Parabolic K=1 at x = L/2: R(1 − 1/4) = 0.75 R.
        assert_relative_eq!(
            profile_radius(NoseShape::Parabolic, 1.0, 1.0, 0.5),
            0.75,
            epsilon = 1e-15
        );
        // Ellipse at x = L/2: R√(1 − 1/4).
        assert_relative_eq!(
            profile_radius(NoseShape::Elliptical, 1.0, 1.0, 0.5),
            0.75f64.sqrt(),
            epsilon = 1e-15
        );
        // Ogive with L = R is a quarter circle of radius R centred at (L, 0).
        assert_relative_eq!(
            profile_radius(NoseShape::Ogive, 1.0, 1.0, 0.5),
            0.75f64.sqrt(),
            epsilon = 1e-15
        );
        // Ogive slope at the shoulder is zero (tangent to the tube).
        let h = 1e-6;
        let slope = (profile_radius(NoseShape::Ogive, 0.3, 0.05, 0.3)
            - profile_radius(NoseShape::Ogive, 0.3, 0.05, 0.3 - h))
            / h;
        assert!(slope.abs() < 1e-4, "slope {slope}");
    }

    #[test]
    fn fmt3_is_fixed_and_has_no_negative_zero() {
        assert_eq!(fmt3(-0.0001), "0.000");
        assert_eq!(fmt3(1.23456), "1.235");
        assert_eq!(fmt3(-2.0), "-2.000");
    }
}

/// A small but complete design for the export tests, built directly in Rust.
#[cfg(test)]
pub(crate) mod fixture {
    use crate::gas::Gas;
    use crate::model::*;

    /// A port with a plain hole.
    pub fn port(name: &str, station_m: f64, clock_deg: f64, tan_deg: f64, ax_deg: f64) -> Port {
        Port {
            name: name.to_string(),
            station_m,
            clock_rad: clock_deg.to_radians(),
            tangential_cant_rad: tan_deg.to_radians(),
            axial_cant_rad: ax_deg.to_radians(),
            nozzle: NozzleSpec::Hole {
                diameter_m: 0.0015,
                discharge_coefficient: 0.8,
            },
        }
    }

    /// A 54 mm airframe with an ogive nose, three fins and two keep-outs.
    pub fn airframe() -> Airframe {
        Airframe {
            outer_diameter_m: 0.054,
            inner_diameter_m: 0.050,
            tube_length_m: 0.8,
            tube_mass_kg: 0.3,
            nose: Nose {
                length_m: 0.2,
                shape: NoseShape::Ogive,
                mass_kg: 0.1,
            },
            fins: Some(Fins {
                count: 3,
                root_chord_m: 0.12,
                tip_chord_m: 0.05,
                span_m: 0.06,
                sweep_m: 0.05,
                station_m: 0.86,
                first_clock_rad: 60f64.to_radians(),
                thickness_m: 0.003,
                mass_kg: 0.05,
            }),
            keep_outs: vec![
                KeepOut {
                    name: "coupler".to_string(),
                    zone: Zone::Band {
                        from_station_m: 0.48,
                        to_station_m: 0.52,
                    },
                },
                KeepOut {
                    name: "rail button".to_string(),
                    zone: Zone::Patch {
                        station_m: 0.45,
                        clock_rad: 0.0,
                        length_m: 0.02,
                        width_m: 0.012,
                    },
                },
            ],
        }
    }

    /// Four roll/pitch ports at two stations with assorted cants.
    pub fn ports() -> Vec<Port> {
        vec![
            port("fore-1", 0.42, 90.0, 10.0, 0.0),
            port("fore-2", 0.42, 270.0, -10.0, 5.0),
            port("aft-1", 0.60, 30.0, 0.0, -8.0),
            port("aft-2", 0.60, 210.0, 0.0, 0.0),
        ]
    }

    /// The whole design.
    pub fn design() -> Design {
        Design {
            name: "test-54mm".to_string(),
            airframe: airframe(),
            components: vec![],
            motor: Motor {
                loaded_mass_kg: 0.4,
                burnout_mass_kg: 0.2,
                fore_station_m: 0.7,
                length_m: 0.3,
                diameter_m: 0.038,
            },
            feed: Feed {
                gas: Gas::Nitrogen,
                tank: Tank {
                    volume_m3: 2e-4,
                    fill: FillSpec::Pressure { pressure_pa: 2e7 },
                    fill_temperature_k: 293.15,
                    empty_mass_kg: 0.2,
                    fore_station_m: 0.3,
                    length_m: 0.1,
                    diameter_m: 0.048,
                    outlet: TankOutlet::Aft,
                },
                regulator: Regulator {
                    set_pressure_gauge_pa: 7e5,
                    dropout_margin_pa: 3e5,
                    supply: SupplyCapacity::Unlimited,
                },
                first_stage: None,
                valve: Valve {
                    flow: ValveFlow::Orifice {
                        diameter_m: 0.0012,
                        discharge_coefficient: 0.7,
                    },
                    opening_delay_s: 0.005,
                    closing_delay_s: 0.005,
                    coil_current_a: 0.5,
                },
            },
            ports: ports(),
            requirements: Requirements {
                roll_accel_rad_s2: 1.0,
                pitch_accel_rad_s2: 1.0,
                yaw_accel_rad_s2: 1.0,
                motor_thrust_n: 50.0,
                thrust_misalignment_rad: 0.0,
                roll_disturbance_n_m: 0.0,
                hold_time_s: 1.0,
                gas_reserve: 0.2,
            },
            states: vec![
                FlightState {
                    name: "liftoff".to_string(),
                    altitude_m: 0.0,
                    motor: MotorCondition::Burning,
                    gas_remaining: 1.0,
                    mass_override: MassOverride {
                        mass_kg: None,
                        cg_station_m: None,
                        ixx_kg_m2: None,
                        iyy_kg_m2: None,
                    },
                },
                FlightState {
                    name: "coast".to_string(),
                    altitude_m: 300.0,
                    motor: MotorCondition::Burnout,
                    gas_remaining: 0.5,
                    mass_override: MassOverride {
                        mass_kg: None,
                        cg_station_m: None,
                        ixx_kg_m2: None,
                        iyy_kg_m2: None,
                    },
                },
            ],
            manoeuvres: vec![],
            readings: vec![],
            max_cant_rad: 60f64.to_radians(),
            ground: None,
        }
    }
}
