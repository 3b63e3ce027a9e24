//! Where a port may sit on the tube: inside the tube length, clear of fin roots
//! and of keep-out zones.
//!
//! Checks work on the outer surface unrolled: station along the axis and arc
//! length around it. A hole conflicts with a zone when its circle, grown by the
//! margin, overlaps the zone's rectangle. The layout validator and the optimiser
//! share these functions so a layout the optimiser writes is one the validator accepts.

use crate::model::{Airframe, Port, Zone};
use std::f64::consts::{PI, TAU};

/// What a port runs into.
#[derive(Debug, Clone, PartialEq)]
pub enum Conflict {
    /// The hole is not fully on the body tube.
    OutsideTube {
        /// Fore end of the tube, m.
        fore_station_m: f64,
        /// Aft end of the tube, m.
        aft_station_m: f64,
    },
    /// The hole overlaps the root of a fin.
    Fin {
        /// Index of the fin, from 0 at the first fin's clock.
        fin: usize,
    },
    /// The hole overlaps a keep-out zone.
    KeepOut {
        /// Name of the zone.
        name: String,
    },
}

/// Signed difference of two angles wrapped into [−π, π).
pub fn wrap_angle(a: f64) -> f64 {
    (a + PI).rem_euclid(TAU) - PI
}

/// The first conflict of a port with the airframe, if any.
/// `margin_m` is the clearance kept around the hole edge.
pub fn first_conflict(airframe: &Airframe, port: &Port, margin_m: f64) -> Option<Conflict> {
    let r_hole = 0.5 * port.nozzle.hole_diameter_m() + margin_m;
    let radius = airframe.outer_radius_m();
    let fore = airframe.tube_fore_station_m();
    let aft = airframe.tube_aft_station_m();
    if port.station_m - r_hole < fore || port.station_m + r_hole > aft {
        return Some(Conflict::OutsideTube {
            fore_station_m: fore,
            aft_station_m: aft,
        });
    }
    if let Some(fins) = &airframe.fins {
        for (k, clock) in fins.clocks_rad().into_iter().enumerate() {
            let arc = wrap_angle(port.clock_rad - clock).abs() * radius;
            let within_root = port.station_m + r_hole > fins.station_m
                && port.station_m - r_hole < fins.station_m + fins.root_chord_m;
            if within_root && arc < 0.5 * fins.thickness_m + r_hole {
                return Some(Conflict::Fin { fin: k });
            }
        }
    }
    for zone in &airframe.keep_outs {
        let hit = match zone.zone {
            Zone::Band {
                from_station_m,
                to_station_m,
            } => port.station_m + r_hole > from_station_m && port.station_m - r_hole < to_station_m,
            Zone::Patch {
                station_m,
                clock_rad,
                length_m,
                width_m,
            } => {
                let arc = wrap_angle(port.clock_rad - clock_rad).abs() * radius;
                (port.station_m - station_m).abs() < 0.5 * length_m + r_hole && arc < 0.5 * width_m + r_hole
            }
        };
        if hit {
            return Some(Conflict::KeepOut {
                name: zone.name.clone(),
            });
        }
    }
    None
}
