//! Geometric rules a layout from the optimiser must never break.
//!
//! - every hole fully on the body tube, with its centre at least an edge distance
//!   (in hole diameters) from the tube ends and from the edges of band keep-outs;
//! - clear of fin roots and keep-out patches by a margin (the checks of
//!   [`crate::airframe::placement`], shared with the layout validator);
//! - hole centres at least a spacing (in hole diameters) apart;
//! - total cant no more than a drillable maximum;
//! - the exhaust cone (a half-angle around the exhaust direction) must neither
//!   turn back into the tube nor strike a fin.
//!
//! The same walk over the rules serves two callers: [`Constraints::violations`]
//! returns each broken rule with the names a person reads, and
//! [`Constraints::penalty`] adds up scaled amounts for the search without
//! allocating. Lengths are scaled by the hole diameter (so 1.0 is "one diameter
//! short"), angles are taken in radians.
//!
//! The plume test treats each fin as its planar trapezoid (thickness ignored) and
//! is exact for that plate: a cone of half-angle α < 90° from the port meets a
//! convex plate when its axis ray pierces the plate, or when some point of the
//! plate's edges lies within α of the axis. Along one edge the angle to the axis
//! has a single minimum, found in closed form, so the test costs four small
//! maximisations per fin instead of a sampling of rays. The re-entry rule looks at
//! the tangent plane of the tube at the port; the tube curves away from that plane,
//! so the rule errs on the safe side.

use super::SectionError;
use crate::airframe::placement::{describe, for_each_overlap, Clearance, Conflict, Obstacle};
use crate::model::{Airframe, Port};
use crate::units::{self, Kind};
use nalgebra::Vector3;
use serde::Deserialize;
use std::f64::consts::FRAC_PI_2;
use std::fmt;

/// Amounts at or below these are rounding, not violations.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tolerances {
    /// Lengths, m. 1 nm: far below any drilling accuracy, far above f64 rounding of
    /// stations of a metre.
    pub length_m: f64,
    /// Angles, rad. 1e-9 rad: lets a layout file's "60 deg" meet a 60° limit exactly.
    pub angle_rad: f64,
}

impl Default for Tolerances {
    fn default() -> Self {
        Tolerances {
            length_m: 1e-9,
            angle_rad: 1e-9,
        }
    }
}

/// The settings of the rules (a `[limits]` section sets them).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Limits {
    /// Clearance from a hole edge to fin roots and keep-out zones, m.
    /// Default 2 mm: common practice, no source.
    pub margin_m: f64,
    /// Least centre-to-centre distance of two holes, in mean hole diameters.
    /// Default 3: common practice, no source.
    pub spacing_diameters: f64,
    /// Least distance from a hole centre to a tube end or band edge, in hole
    /// diameters. Default 2: common practice, no source.
    pub edge_distance_diameters: f64,
    /// Largest total cant (angle between drill axis and surface normal) that can
    /// be drilled, rad. Default 60°.
    pub max_total_cant_rad: f64,
    /// Half-angle of the exhaust cone used for plume clearance, rad. Default 15°.
    pub plume_half_angle_rad: f64,
    /// Largest lateral force (|F_y| and |F_z| each) the allocations behind the
    /// optimiser's merit may produce, N; `None` (the default) for no limit, 0 for
    /// pure couples. Not a geometric rule: the merit applies it.
    pub side_force_n: Option<f64>,
    /// What counts as rounding.
    pub tolerances: Tolerances,
}

impl Default for Limits {
    fn default() -> Self {
        Limits {
            margin_m: 2e-3,
            spacing_diameters: 3.0,
            edge_distance_diameters: 2.0,
            max_total_cant_rad: 60f64.to_radians(),
            plume_half_angle_rad: 15f64.to_radians(),
            side_force_n: None,
            tolerances: Tolerances::default(),
        }
    }
}

impl Limits {
    /// Check the settings; the error names the `[limits]` field.
    pub fn validate(&self) -> Result<(), SectionError> {
        let bad = |field: &str, msg: &str| Err(SectionError::new("limits", field, msg));
        if !(self.margin_m.is_finite() && self.margin_m >= 0.0) {
            return bad("margin", "expected a length of zero or more");
        }
        if !(self.spacing_diameters.is_finite() && self.spacing_diameters >= 0.0) {
            return bad(
                "spacing",
                "expected a number of hole diameters, zero or more",
            );
        }
        if !(self.edge_distance_diameters.is_finite() && self.edge_distance_diameters >= 0.5) {
            return bad(
                "edge_distance",
                "expected a number of hole diameters of at least 0.5 (the hole's own radius)",
            );
        }
        if !(self.max_total_cant_rad >= 0.0 && self.max_total_cant_rad < FRAC_PI_2) {
            return bad(
                "max_cant",
                "expected an angle from 0 deg up to, not including, 90 deg",
            );
        }
        if !(self.plume_half_angle_rad >= 0.0 && self.plume_half_angle_rad < FRAC_PI_2) {
            return bad(
                "plume_half_angle",
                "expected an angle from 0 deg up to, not including, 90 deg",
            );
        }
        if let Some(f) = self.side_force_n {
            if !(f.is_finite() && f >= 0.0) {
                return bad(
                    "side_force",
                    "expected a force of zero (pure couples) or more",
                );
            }
        }
        Ok(())
    }
}

/// A `[limits]` section as written in a layout file.
#[derive(Debug, Clone, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct LimitsFile {
    /// Clearance to fin roots and keep-outs, a length.
    pub margin: Option<String>,
    /// Least hole spacing, in hole diameters.
    pub spacing: Option<f64>,
    /// Least edge distance, in hole diameters.
    pub edge_distance: Option<f64>,
    /// Largest total cant, an angle.
    pub max_cant: Option<String>,
    /// Exhaust cone half-angle, an angle.
    pub plume_half_angle: Option<String>,
    /// Side-force limit for the merit's allocations, a force.
    pub side_force: Option<String>,
}

impl LimitsFile {
    /// Turn the section into checked [`Limits`], defaults for fields not given.
    pub fn to_limits(&self) -> Result<Limits, SectionError> {
        let d = Limits::default();
        let q = |field: &str,
                 v: &Option<String>,
                 kind: Kind,
                 default: f64|
         -> Result<f64, SectionError> {
            v.as_ref().map_or(Ok(default), |t| {
                units::parse(t, kind).map_err(|e| SectionError::new("limits", field, e.to_string()))
            })
        };
        let limits = Limits {
            margin_m: q("margin", &self.margin, Kind::Length, d.margin_m)?,
            spacing_diameters: self.spacing.unwrap_or(d.spacing_diameters),
            edge_distance_diameters: self.edge_distance.unwrap_or(d.edge_distance_diameters),
            max_total_cant_rad: q(
                "max_cant",
                &self.max_cant,
                Kind::Angle,
                d.max_total_cant_rad,
            )?,
            plume_half_angle_rad: q(
                "plume_half_angle",
                &self.plume_half_angle,
                Kind::Angle,
                d.plume_half_angle_rad,
            )?,
            side_force_n: self
                .side_force
                .as_ref()
                .map(|t| {
                    units::parse(t, Kind::Force)
                        .map_err(|e| SectionError::new("limits", "side_force", e.to_string()))
                })
                .transpose()?,
            tolerances: d.tolerances,
        };
        limits.validate()?;
        Ok(limits)
    }
}

/// Which rule a port breaks, with the numbers that show it.
#[derive(Debug, Clone, PartialEq)]
pub enum Breach {
    /// Too close to a tube end, fin root or keep-out zone (or off the tube).
    Placement {
        /// What the hole runs into.
        conflict: Conflict,
        /// How far the hole, grown by its clearance, reaches into it, m.
        depth_m: f64,
    },
    /// Too close to another hole.
    Spacing {
        /// The other port.
        other: String,
        /// Centre-to-centre distance, m.
        distance_m: f64,
        /// Least allowed, m.
        required_m: f64,
    },
    /// Canted more than can be drilled.
    Cant {
        /// Total cant, rad.
        total_rad: f64,
        /// Limit, rad.
        max_rad: f64,
    },
    /// The hole does not pass through the wall into the bore (see
    /// `airframe::drilling`).
    ThroughWall {
        /// |Tangential cant|, rad.
        tangential_rad: f64,
        /// Through-wall limit for this tube and hole, rad (0 when the hole is
        /// not narrower than the bore).
        limit_rad: f64,
    },
    /// The exhaust cone turns back into the tube.
    PlumeIntoTube {
        /// Total cant plus cone half-angle, rad (must stay below 90°).
        edge_from_normal_rad: f64,
    },
    /// The exhaust cone strikes a fin.
    PlumeOnFin {
        /// Index of the fin, from 0 at the first fin's clock.
        fin: usize,
        /// Nearest angle from the exhaust axis to the fin plate's edge, rad; negative
        /// when the axis itself pierces the plate (then it is minus the angle from
        /// the axis out to the nearest edge).
        nearest_rad: f64,
    },
}

/// One broken rule.
#[derive(Debug, Clone, PartialEq)]
pub struct Violation {
    /// Port that breaks it.
    pub port: String,
    /// What is broken.
    pub breach: Breach,
    /// Scaled amount used in the penalty (hole diameters or radians).
    pub amount: f64,
}

impl fmt::Display for Violation {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mm = |m: f64| m * 1e3;
        let deg = |r: f64| r.to_degrees();
        write!(f, "port `{}`: ", self.port)?;
        match &self.breach {
            Breach::Placement { conflict, depth_m } => {
                let what = match conflict {
                    Conflict::OutsideTube { .. } => "too near a tube end".to_string(),
                    Conflict::Fin { fin } => format!("too near the root of fin {}", fin + 1),
                    Conflict::KeepOut { name } => format!("too near keep-out `{name}`"),
                };
                write!(f, "{what} (by {:.3} mm)", mm(*depth_m))
            }
            Breach::Spacing {
                other,
                distance_m,
                required_m,
            } => write!(
                f,
                "{:.2} mm from port `{other}`, at least {:.2} mm wanted",
                mm(*distance_m),
                mm(*required_m)
            ),
            Breach::Cant { total_rad, max_rad } => {
                write!(
                    f,
                    "total cant {:.1}° is above {:.1}°",
                    deg(*total_rad),
                    deg(*max_rad)
                )
            }
            Breach::ThroughWall {
                tangential_rad,
                limit_rad,
            } => write!(
                f,
                "tangential cant {:.1}° is past the through-wall limit {:.1}° for this tube and hole",
                deg(*tangential_rad),
                deg(*limit_rad)
            ),
            Breach::PlumeIntoTube {
                edge_from_normal_rad,
            } => write!(
                f,
                "exhaust cone edge {:.1}° from the surface normal turns back into the tube",
                deg(*edge_from_normal_rad)
            ),
            Breach::PlumeOnFin { fin, nearest_rad } => write!(
                f,
                "exhaust cone strikes fin {} ({:.1}° from the exhaust axis)",
                fin + 1,
                deg(*nearest_rad)
            ),
        }
    }
}

/// A broken rule by index, so the search's walk allocates nothing.
#[derive(Debug, Clone, Copy)]
enum Found {
    Placement {
        obstacle: Obstacle,
        depth_m: f64,
    },
    Spacing {
        other: usize,
        distance_m: f64,
        required_m: f64,
    },
    Cant {
        total_rad: f64,
    },
    ThroughWall {
        tangential_rad: f64,
        limit_rad: f64,
    },
    PlumeIntoTube {
        edge_rad: f64,
    },
    PlumeOnFin {
        fin: usize,
        nearest_rad: f64,
    },
}

/// A fin as a flat plate in the body frame.
#[derive(Debug, Clone)]
struct Plate {
    /// Unit vector out from the axis through the fin (in its plane).
    out: Vector3<f64>,
    /// Unit normal of the fin's plane.
    side: Vector3<f64>,
    /// Corners: root leading, root trailing, tip trailing, tip leading.
    corners: [Vector3<f64>; 4],
    /// Centre and radius of a sphere holding the plate, for a quick miss test.
    centre: Vector3<f64>,
    reach_m: f64,
}

/// The rules, made ready for one airframe.
#[derive(Debug, Clone)]
pub struct Constraints {
    airframe: Airframe,
    limits: Limits,
    plates: Vec<Plate>,
    cos_max_cant: f64,
}

impl Constraints {
    /// Prepare the rules for an airframe; the error names a bad `[limits]` field.
    pub fn new(airframe: &Airframe, limits: Limits) -> Result<Self, SectionError> {
        limits.validate()?;
        let r = airframe.outer_radius_m();
        let plates = airframe
            .fins
            .iter()
            .flat_map(|fins| {
                fins.clocks_rad().into_iter().map(move |clock| {
                    let out = Vector3::new(0.0, clock.cos(), clock.sin());
                    let side = Vector3::new(0.0, -clock.sin(), clock.cos());
                    let at =
                        |station: f64, radius: f64| Vector3::new(-station, 0.0, 0.0) + out * radius;
                    let s0 = fins.station_m;
                    let tip = r + fins.span_m;
                    let corners = [
                        at(s0, r),
                        at(s0 + fins.root_chord_m, r),
                        at(s0 + fins.sweep_m + fins.tip_chord_m, tip),
                        at(s0 + fins.sweep_m, tip),
                    ];
                    let centre = corners.iter().sum::<Vector3<f64>>() / 4.0;
                    let reach_m = corners
                        .iter()
                        .map(|c| (c - centre).norm())
                        .fold(0.0, f64::max);
                    Plate {
                        out,
                        side,
                        corners,
                        centre,
                        reach_m,
                    }
                })
            })
            .collect();
        Ok(Constraints {
            airframe: airframe.clone(),
            limits,
            plates,
            cos_max_cant: limits.max_total_cant_rad.cos(),
        })
    }

    /// The settings in force.
    pub fn limits(&self) -> &Limits {
        &self.limits
    }

    /// The airframe the rules were prepared for.
    pub fn airframe(&self) -> &Airframe {
        &self.airframe
    }

    /// Sum of scaled violation amounts; zero exactly when every rule holds.
    /// Allocates nothing.
    pub fn penalty(&self, ports: &[Port]) -> f64 {
        let mut sum = 0.0;
        self.walk(ports, |k, found| sum += self.scaled(ports, k, &found));
        sum
    }

    /// Whether every rule holds.
    pub fn is_feasible(&self, ports: &[Port]) -> bool {
        let mut ok = true;
        self.walk(ports, |_, _| ok = false);
        ok
    }

    /// Every broken rule, port by port, in a fixed order.
    pub fn violations(&self, ports: &[Port]) -> Vec<Violation> {
        let mut out = Vec::new();
        self.walk(ports, |k, found| {
            let amount = self.scaled(ports, k, &found);
            let breach = match found {
                Found::Placement { obstacle, depth_m } => Breach::Placement {
                    conflict: describe(&self.airframe, obstacle),
                    depth_m,
                },
                Found::Spacing {
                    other,
                    distance_m,
                    required_m,
                } => Breach::Spacing {
                    other: ports[other].name.clone(),
                    distance_m,
                    required_m,
                },
                Found::Cant { total_rad } => Breach::Cant {
                    total_rad,
                    max_rad: self.limits.max_total_cant_rad,
                },
                Found::ThroughWall {
                    tangential_rad,
                    limit_rad,
                } => Breach::ThroughWall {
                    tangential_rad,
                    limit_rad,
                },
                Found::PlumeIntoTube { edge_rad } => Breach::PlumeIntoTube {
                    edge_from_normal_rad: edge_rad,
                },
                Found::PlumeOnFin { fin, nearest_rad } => Breach::PlumeOnFin { fin, nearest_rad },
            };
            out.push(Violation {
                port: ports[k].name.clone(),
                breach,
                amount,
            });
        });
        out
    }

    fn scaled(&self, ports: &[Port], k: usize, found: &Found) -> f64 {
        let d = ports[k].nozzle.hole_diameter_m();
        let alpha = self.limits.plume_half_angle_rad;
        match *found {
            Found::Placement { depth_m, .. } => depth_m / d,
            Found::Spacing {
                distance_m,
                required_m,
                other,
            } => (required_m - distance_m) / (0.5 * (d + ports[other].nozzle.hole_diameter_m())),
            Found::Cant { total_rad } => total_rad - self.limits.max_total_cant_rad,
            Found::ThroughWall {
                tangential_rad,
                limit_rad,
            } => tangential_rad - limit_rad + self.limits.tolerances.angle_rad,
            Found::PlumeIntoTube { edge_rad } => edge_rad - FRAC_PI_2,
            // Inside the cone the amount grows with how far the axis is from the
            // plate's edge, so the search is drawn out of the plate, not only off it.
            Found::PlumeOnFin { nearest_rad, .. } => alpha - nearest_rad,
        }
    }

    fn walk(&self, ports: &[Port], mut f: impl FnMut(usize, Found)) {
        let lim = &self.limits;
        let tol = lim.tolerances;
        let radius = self.airframe.outer_radius_m();
        let alpha = lim.plume_half_angle_rad;
        let cone = Cone::new(alpha);
        for (k, port) in ports.iter().enumerate() {
            let d = port.nozzle.hole_diameter_m();
            let edge = (lim.edge_distance_diameters * d - 0.5 * d).max(0.0);
            let clearance = Clearance {
                tube_end_m: edge,
                fin_m: lim.margin_m,
                band_m: edge.max(lim.margin_m),
                patch_m: lim.margin_m,
            };
            for_each_overlap(&self.airframe, port, &clearance, |o| {
                if o.depth_m > tol.length_m {
                    f(
                        k,
                        Found::Placement {
                            obstacle: o.obstacle,
                            depth_m: o.depth_m,
                        },
                    );
                }
            });
            let pk = port.position(radius);
            for (j, other) in ports.iter().enumerate().skip(k + 1) {
                let required_m = lim.spacing_diameters * 0.5 * (d + other.nozzle.hole_diameter_m());
                if (other.station_m - port.station_m).abs() >= required_m {
                    continue;
                }
                let distance_m = (other.position(radius) - pk).norm();
                if required_m - distance_m > tol.length_m {
                    f(
                        k,
                        Found::Spacing {
                            other: j,
                            distance_m,
                            required_m,
                        },
                    );
                }
            }
            let e = port.exhaust_direction();
            let cos_total = e.dot(&port.normal()).clamp(-1.0, 1.0);
            if cos_total < self.cos_max_cant {
                let total_rad = cos_total.acos();
                if total_rad - lim.max_total_cant_rad > tol.angle_rad {
                    f(k, Found::Cant { total_rad });
                }
            }
            let limit_rad = crate::airframe::drilling::through_wall_limit_rad(
                radius,
                self.airframe.inner_diameter_m / 2.0,
                d,
            )
            .unwrap_or(0.0);
            let tangential_rad = port.tangential_cant_rad.abs();
            // Kept a tolerance inside the limit, so the written layout also passes
            // the reader's strict check |t| < limit.
            if tangential_rad - limit_rad > -tol.angle_rad {
                f(
                    k,
                    Found::ThroughWall {
                        tangential_rad,
                        limit_rad,
                    },
                );
            }
            let edge_rad = cos_total.acos() + alpha;
            if edge_rad - FRAC_PI_2 > tol.angle_rad {
                f(k, Found::PlumeIntoTube { edge_rad });
            }
            for (fin, plate) in self.plates.iter().enumerate() {
                if let Some(nearest_rad) = cone_meets_plate(&pk, &e, plate, &cone, tol.angle_rad) {
                    f(k, Found::PlumeOnFin { fin, nearest_rad });
                }
            }
        }
    }
}

/// Largest cosine of the angle between `e` and directions from the origin to the
/// segment a + s·b, s ∈ [0, 1] (a, b relative to the cone apex).
fn best_cos_on_segment(e: &Vector3<f64>, a: &Vector3<f64>, b: &Vector3<f64>) -> f64 {
    let cos_at = |s: f64| {
        let q = a + b * s;
        let n = q.norm();
        if n > 0.0 {
            e.dot(&q) / n
        } else {
            1.0
        }
    };
    let mut best = cos_at(0.0).max(cos_at(1.0));
    // Stationary point of (A + sB)/|a + s b|: s = (A·ab − B·aa)/(B·ab − A·bb).
    let (big_a, big_b) = (e.dot(a), e.dot(b));
    let (aa, ab, bb) = (a.dot(a), a.dot(b), b.dot(b));
    let den = big_b * ab - big_a * bb;
    if den != 0.0 {
        let s = (big_a * ab - big_b * aa) / den;
        if s > 0.0 && s < 1.0 {
            best = best.max(cos_at(s));
        }
    }
    best
}

/// An exhaust cone's half-angle with its sine and cosine.
#[derive(Debug, Clone, Copy)]
struct Cone {
    angle: f64,
    sin: f64,
    cos: f64,
}

impl Cone {
    fn new(angle: f64) -> Self {
        let (sin, cos) = angle.sin_cos();
        Cone { angle, sin, cos }
    }
}

/// `Some(nearest angle from the axis to the plate)` when the cone of half-angle
/// `alpha` from `apex` about `e` meets the plate by more than `tol`; the nearest
/// angle is returned as minus the depth of the axis inside the plate when it
/// pierces it (so a deeper strike scores worse).
fn cone_meets_plate(
    apex: &Vector3<f64>,
    e: &Vector3<f64>,
    plate: &Plate,
    cone: &Cone,
    tol: f64,
) -> Option<f64> {
    // Quick miss: the plate lies inside a cone of half-angle β about the direction
    // to its bounding sphere's centre; if that cone is more than α away from the
    // axis, nothing of the plate is inside the exhaust cone.
    let to_centre = plate.centre - apex;
    let dist = to_centre.norm();
    if dist > plate.reach_m {
        let sin_beta = plate.reach_m / dist;
        let cos_beta = (1.0 - sin_beta * sin_beta).sqrt();
        // α and β are both below 90°, so α + β is below 180° and cosine is monotone.
        let cos_sum = cone.cos * cos_beta - cone.sin * sin_beta;
        if e.dot(&to_centre) / dist < cos_sum {
            return None;
        }
    }
    let mut best_cos = f64::NEG_INFINITY;
    for i in 0..4 {
        let a = plate.corners[i] - apex;
        let b = plate.corners[(i + 1) % 4] - plate.corners[i];
        best_cos = best_cos.max(best_cos_on_segment(e, &a, &b));
    }
    let edge_angle = best_cos.clamp(-1.0, 1.0).acos();
    if pierces(apex, e, plate) {
        return Some(-edge_angle);
    }
    if best_cos >= cone.cos && cone.angle - edge_angle > tol {
        Some(edge_angle)
    } else {
        None
    }
}

/// Whether the ray from `apex` along `e` passes through the plate.
fn pierces(apex: &Vector3<f64>, e: &Vector3<f64>, plate: &Plate) -> bool {
    let den = e.dot(&plate.side);
    if den.abs() < 1e-12 {
        // Along the plane: the edge test sees it.
        return false;
    }
    let t = -apex.dot(&plate.side) / den;
    if t <= 0.0 {
        return false;
    }
    let q = apex + e * t;
    let radial = q.dot(&plate.out);
    let station = -q.x;
    let [rl, rt, tt, tl] = &plate.corners;
    let (r0, r1) = (rl.dot(&plate.out), tl.dot(&plate.out));
    if radial < r0 || radial > r1 {
        return false;
    }
    let h = (radial - r0) / (r1 - r0);
    let lead = -rl.x + (-tl.x + rl.x) * h;
    let trail = -rt.x + (-tt.x + rt.x) * h;
    station >= lead && station <= trail
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::layout::parse_str;
    use crate::model::{Design, NozzleSpec};
    use approx::assert_relative_eq;

    const DEMO: &str = include_str!("../../layouts/heron-54.toml");

    fn demo() -> Design {
        parse_str(DEMO, "heron-54.toml").expect("demo layout parses")
    }

    /// One 1.6 mm hole, normal to the surface, at a station and clock (degrees).
    fn hole(name: &str, station_m: f64, clock_deg: f64) -> Port {
        Port {
            name: name.into(),
            station_m,
            clock_rad: clock_deg.to_radians(),
            tangential_cant_rad: 0.0,
            axial_cant_rad: 0.0,
            nozzle: NozzleSpec::Hole {
                diameter_m: 1.6e-3,
                discharge_coefficient: 0.8,
            },
        }
    }

    fn rules(design: &Design) -> Constraints {
        Constraints::new(&design.airframe, Limits::default()).unwrap()
    }

    #[test]
    fn demo_layout_meets_the_default_rules() {
        // The demo's roll ports are canted exactly 60°, the default limit.
        let d = demo();
        let c = rules(&d);
        assert_eq!(c.violations(&d.ports), vec![]);
        assert_eq!(c.penalty(&d.ports), 0.0);
    }

    #[test]
    fn tangential_cant_past_the_through_wall_limit_breaks_a_rule() {
        // 54 × 51 mm tube, 1.6 mm hole: limit asin((25.5 − 0.8)/27) = 66.18°
        // (pocket calculator). Raise max_cant so only the wall rule can bite.
        let d = demo();
        let limits = Limits {
            max_total_cant_rad: 80f64.to_radians(),
            plume_half_angle_rad: 0.0,
            ..Limits::default()
        };
        let c = Constraints::new(&d.airframe, limits).unwrap();
        let mut p = hole("a", 0.40, 0.0);
        p.tangential_cant_rad = 66.0f64.to_radians();
        assert!(c.is_feasible(std::slice::from_ref(&p)));
        p.tangential_cant_rad = -66.4f64.to_radians();
        let v = c.violations(std::slice::from_ref(&p));
        assert_eq!(v.len(), 1, "{v:?}");
        match &v[0].breach {
            Breach::ThroughWall { limit_rad, .. } => {
                assert!((limit_rad.to_degrees() - 66.18).abs() < 0.01)
            }
            other => panic!("unexpected {other:?}"),
        }
    }

    #[test]
    fn spacing_is_three_diameters_measured_as_a_chord() {
        // Radius 27 mm, 1.6 mm holes: 4.8 mm needed; chord 2·27·sin(Δ/2).
        let d = demo();
        let c = rules(&d);
        let near = [hole("a", 0.40, 0.0), hole("b", 0.40, 10.0)];
        let v = c.violations(&near);
        assert_eq!(v.len(), 1);
        let chord = 2.0 * 0.027 * 5f64.to_radians().sin();
        match &v[0].breach {
            Breach::Spacing {
                other,
                distance_m,
                required_m,
            } => {
                assert_eq!(other, "b");
                assert_relative_eq!(*distance_m, chord, epsilon = 1e-12);
                assert_relative_eq!(*required_m, 4.8e-3, epsilon = 1e-12);
            }
            other => panic!("unexpected {other:?}"),
        }
        assert_relative_eq!(v[0].amount, (4.8e-3 - chord) / 1.6e-3, epsilon = 1e-9);
        assert!(c.is_feasible(&[hole("a", 0.40, 0.0), hole("b", 0.40, 10.5)]));
    }

    #[test]
    fn edge_distance_from_tube_end_and_band_edge() {
        let d = demo();
        let c = rules(&d);
        // Tube starts at 220 mm; centre must be 2 × 1.6 = 3.2 mm aft of it.
        let v = c.violations(&[hole("a", 0.2230, 180.0)]);
        assert_eq!(v.len(), 1);
        match &v[0].breach {
            Breach::Placement { conflict, depth_m } => {
                assert!(matches!(conflict, Conflict::OutsideTube { .. }));
                assert_relative_eq!(*depth_m, 0.2e-3, epsilon = 1e-9);
            }
            other => panic!("unexpected {other:?}"),
        }
        assert!(c.is_feasible(&[hole("a", 0.2233, 180.0)]));
        // Coupler band from 600 mm: edge distance 3.2 mm beats margin 2 mm + radius 0.8 mm.
        assert!(c.is_feasible(&[hole("a", 0.5967, 180.0)]));
        let v = c.violations(&[hole("a", 0.5969, 180.0)]);
        assert!(
            matches!(&v[0].breach, Breach::Placement { conflict: Conflict::KeepOut { name }, .. } if name == "coupler joint")
        );
    }

    #[test]
    fn margin_around_patches_and_fin_roots() {
        let d = demo();
        let c = rules(&d);
        // Fore rail button: 14 mm square at 520 mm, clock 90°; hole radius 0.8 + margin 2.
        assert!(!c.is_feasible(&[hole("a", 0.520 + 0.007 + 2.7e-3, 90.0)]));
        assert!(c.is_feasible(&[hole("a", 0.520 + 0.007 + 2.9e-3, 90.0)]));
        // Fin at 30°: 3 mm thick, so the hole centre must be 1.5 + 2 + 0.8 = 4.3 mm of arc away.
        let arc_deg = |mm: f64| (mm / 27.0).to_degrees();
        assert!(!c.is_feasible(&[hole("a", 1.15, 30.0 + arc_deg(4.2))]));
        let v = c.violations(&[hole("a", 1.15, 30.0 + arc_deg(4.2))]);
        assert!(matches!(
            v[0].breach,
            Breach::Placement {
                conflict: Conflict::Fin { fin: 0 },
                ..
            }
        ));
    }

    #[test]
    fn cant_and_plume_re_entry() {
        let d = demo();
        let mut p = hole("a", 0.40, 0.0);
        p.tangential_cant_rad = 61f64.to_radians();
        let v = rules(&d).violations(&[p.clone()]);
        assert_eq!(v.len(), 1);
        assert_relative_eq!(v[0].amount, 1f64.to_radians(), epsilon = 1e-9);
        // Allow 89° of cant: 80° + 15° half-angle = 95° turns into the tube. The
        // steep cant is axial (toward the nose), since a tangential cant this steep
        // could not pass through this tube's wall at all.
        let limits = Limits {
            max_total_cant_rad: 89f64.to_radians(),
            ..Limits::default()
        };
        p.tangential_cant_rad = 0.0;
        p.axial_cant_rad = -80f64.to_radians();
        let v = Constraints::new(&d.airframe, limits)
            .unwrap()
            .violations(&[p.clone()]);
        assert_eq!(v.len(), 1);
        assert!(matches!(v[0].breach, Breach::PlumeIntoTube { .. }));
        assert_relative_eq!(v[0].amount, 5f64.to_radians(), epsilon = 1e-9);
        p.axial_cant_rad = -74f64.to_radians();
        assert!(Constraints::new(&d.airframe, limits)
            .unwrap()
            .is_feasible(&[p]));
    }

    #[test]
    fn plume_grazing_a_fin_tip_has_the_hand_worked_angle() {
        // A radial hole at clock 0 beside the tip chord of the fin at clock 30°.
        // Nearest plate point seen from the hole is on the tip edge at the same station,
        // at (87 cos 30°, 87 sin 30°) mm against the hole at (27, 0) mm.
        let d = demo();
        let nearest = (87.0 * 0.5f64).atan2(87.0 * 30f64.to_radians().cos() - 27.0);
        let p = hole("a", 1.175, 0.0);
        let at = |half_angle_rad: f64| Limits {
            plume_half_angle_rad: half_angle_rad,
            max_total_cant_rad: 1.0,
            ..Limits::default()
        };
        let c = |a: f64| Constraints::new(&d.airframe, at(a)).unwrap();
        assert!(c(nearest - 1e-6).is_feasible(std::slice::from_ref(&p)));
        let v = c(nearest + 1e-6).violations(std::slice::from_ref(&p));
        assert_eq!(v.len(), 1, "{v:?}");
        match v[0].breach {
            Breach::PlumeOnFin { fin, nearest_rad } => {
                assert_eq!(fin, 0);
                assert_relative_eq!(nearest_rad, nearest, epsilon = 1e-9);
            }
            ref other => panic!("unexpected {other:?}"),
        }
    }

    #[test]
    fn plume_aimed_along_a_fin_strikes_it() {
        // In the plane of fin 0 (clock 30°), exhaust canted 60° toward the tail:
        // the axis meets the leading edge about 41 mm out.
        let d = demo();
        let mut p = hole("a", 1.06, 30.0);
        p.axial_cant_rad = 60f64.to_radians();
        let v = rules(&d).violations(&[p.clone()]);
        assert!(
            v.iter()
                .any(|v| matches!(v.breach, Breach::PlumeOnFin { fin: 0, .. })),
            "{v:?}"
        );
        // Turned 40° off the fin's clock the cone clears it.
        p.clock_rad = 350f64.to_radians();
        assert!(rules(&d).is_feasible(&[p]));
    }

    #[test]
    fn exact_plume_test_catches_every_sampled_ray_hit() {
        // Dense sampling of cone rays can only find hits the exact test also finds.
        let d = demo();
        let c = rules(&d);
        let alpha = c.limits.plume_half_angle_rad;
        let mut seed = 7u64;
        let mut next = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (seed >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut hits = 0;
        for _ in 0..400 {
            let mut p = hole("a", 0.95 + 0.27 * next(), 360.0 * next());
            p.tangential_cant_rad = (next() - 0.5) * 1.0;
            p.axial_cant_rad = next() * 1.0;
            let apex = p.position(d.airframe.outer_radius_m());
            let e = p.exhaust_direction();
            let a = if e.x.abs() < 0.9 {
                Vector3::x()
            } else {
                Vector3::y()
            };
            let u = e.cross(&a).normalize();
            let w = e.cross(&u);
            for plate in &c.plates {
                let mut sampled = false;
                for ring in 0..=4 {
                    let cone = alpha * ring as f64 / 4.0;
                    for j in 0..32 {
                        let phi = std::f64::consts::TAU * j as f64 / 32.0;
                        let dir = e * cone.cos() + (u * phi.cos() + w * phi.sin()) * cone.sin();
                        sampled |= pierces(&apex, &dir, plate);
                    }
                }
                let exact = cone_meets_plate(&apex, &e, plate, &Cone::new(alpha), 0.0).is_some();
                if sampled {
                    hits += 1;
                    assert!(exact, "sampled hit missed by the exact test: {p:?}");
                }
            }
        }
        assert!(
            hits > 10,
            "the sample should strike fins sometimes, got {hits}"
        );
    }

    #[test]
    fn limits_section_parses_and_names_bad_fields() {
        let read = crate::optimize::sections_from_str;
        let l = read(
            r#"[limits]
            margin = "3 mm"
            spacing = 4.0
            max_cant = "45 deg"
            plume_half_angle = "10 deg""#,
        )
        .unwrap()
        .limits;
        assert_relative_eq!(l.margin_m, 3e-3, epsilon = 1e-15);
        assert_eq!(l.spacing_diameters, 4.0);
        assert_eq!(l.edge_distance_diameters, 2.0);
        assert_relative_eq!(l.max_total_cant_rad, 45f64.to_radians(), epsilon = 1e-12);
        assert_eq!(read("").unwrap().limits, Limits::default());
        let field = |body: &str| read(&format!("[limits]\n{body}")).unwrap_err().field;
        assert_eq!(field(r#"margin = "3 kg""#), "margin");
        assert_eq!(field(r#"max_cant = "95 deg""#), "max_cant");
        assert_eq!(field("edge_distance = 0.2"), "edge_distance");
        assert_eq!(field(r#"plume_half_angle = "90 deg""#), "plume_half_angle");
        assert_eq!(field("spacing = -1.0"), "spacing");
    }
}
