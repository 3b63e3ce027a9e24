//! Where a port may sit on the tube: inside the tube length, clear of fin roots
//! and of keep-out zones.
//!
//! Checks work on the outer surface unrolled: station along the axis and arc
//! length around it. A hole conflicts with a zone when its circle, grown by the
//! margin, overlaps the zone's rectangle. The layout validator and the optimiser
//! share these functions so a layout the optimiser writes is one the validator accepts;
//! [`for_each_overlap`] also reports how deep each overlap is, which the optimiser
//! uses to rank layouts that are not yet feasible.

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

/// Clearance kept around a hole edge, per kind of obstacle, m.
///
/// The layout validator uses one margin for everything; the optimiser keeps a
/// larger distance from tube ends and band edges (an edge distance in hole
/// diameters) than from fin roots and patches.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Clearance {
    /// From the fore and aft ends of the body tube.
    pub tube_end_m: f64,
    /// From the roots of the fins.
    pub fin_m: f64,
    /// From the edges of band keep-outs.
    pub band_m: f64,
    /// From the edges of patch keep-outs.
    pub patch_m: f64,
}

impl Clearance {
    /// The same clearance from every obstacle.
    pub fn uniform(margin_m: f64) -> Self {
        Clearance {
            tube_end_m: margin_m,
            fin_m: margin_m,
            band_m: margin_m,
            patch_m: margin_m,
        }
    }
}

/// What a hole overlaps, by index so reporting it allocates nothing.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Obstacle {
    /// The hole reaches past the fore end of the body tube.
    TubeFore,
    /// The hole reaches past the aft end of the body tube.
    TubeAft,
    /// The root of fin `k` (from 0 at the first fin's clock).
    Fin(usize),
    /// Keep-out zone at this index of `Airframe::keep_outs`.
    KeepOut(usize),
}

/// One overlap of a hole (grown by its clearance) with an obstacle.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Overlap {
    /// What is overlapped.
    pub obstacle: Obstacle,
    /// How far the grown hole reaches into the obstacle, m: the shortest move
    /// along the station or around the tube that would clear it. Always above zero.
    pub depth_m: f64,
}

/// Every overlap of a port with the airframe, in a fixed order (tube ends, fins,
/// keep-outs). A hole exactly touching an obstacle does not overlap it.
pub fn for_each_overlap(
    airframe: &Airframe,
    port: &Port,
    clearance: &Clearance,
    mut f: impl FnMut(Overlap),
) {
    let r = 0.5 * port.nozzle.hole_diameter_m();
    let radius = airframe.outer_radius_m();
    let s = port.station_m;
    let mut report = |obstacle: Obstacle, depth_m: f64| {
        if depth_m > 0.0 {
            f(Overlap { obstacle, depth_m });
        }
    };
    let r_end = r + clearance.tube_end_m;
    report(
        Obstacle::TubeFore,
        airframe.tube_fore_station_m() - (s - r_end),
    );
    report(Obstacle::TubeAft, s + r_end - airframe.tube_aft_station_m());
    if let Some(fins) = &airframe.fins {
        let r_fin = r + clearance.fin_m;
        let axial =
            (s + r_fin - fins.station_m).min(fins.station_m + fins.root_chord_m - (s - r_fin));
        if axial > 0.0 {
            for k in 0..fins.count {
                let clock = fins.first_clock_rad + TAU * k as f64 / fins.count as f64;
                let arc = wrap_angle(port.clock_rad - clock).abs() * radius;
                let around = 0.5 * fins.thickness_m + r_fin - arc;
                report(Obstacle::Fin(k), axial.min(around));
            }
        }
    }
    for (k, zone) in airframe.keep_outs.iter().enumerate() {
        let depth = match zone.zone {
            Zone::Band {
                from_station_m,
                to_station_m,
            } => {
                let rb = r + clearance.band_m;
                (s + rb - from_station_m).min(to_station_m - (s - rb))
            }
            Zone::Patch {
                station_m,
                clock_rad,
                length_m,
                width_m,
            } => {
                let rp = r + clearance.patch_m;
                let arc = wrap_angle(port.clock_rad - clock_rad).abs() * radius;
                (0.5 * length_m + rp - (s - station_m).abs()).min(0.5 * width_m + rp - arc)
            }
        };
        report(Obstacle::KeepOut(k), depth);
    }
}

/// The first conflict of a port with the airframe, if any.
/// `margin_m` is the clearance kept around the hole edge.
pub fn first_conflict(airframe: &Airframe, port: &Port, margin_m: f64) -> Option<Conflict> {
    let mut first = None;
    for_each_overlap(airframe, port, &Clearance::uniform(margin_m), |o| {
        if first.is_none() {
            first = Some(o.obstacle);
        }
    });
    first.map(|o| describe(airframe, o))
}

/// The conflict an obstacle stands for, with the names a person reads.
pub fn describe(airframe: &Airframe, obstacle: Obstacle) -> Conflict {
    match obstacle {
        Obstacle::TubeFore | Obstacle::TubeAft => Conflict::OutsideTube {
            fore_station_m: airframe.tube_fore_station_m(),
            aft_station_m: airframe.tube_aft_station_m(),
        },
        Obstacle::Fin(fin) => Conflict::Fin { fin },
        Obstacle::KeepOut(k) => Conflict::KeepOut {
            name: airframe.keep_outs[k].name.clone(),
        },
    }
}
