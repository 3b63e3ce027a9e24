//! Decision variables: which port quantities the optimiser may move, and the map
//! between a point of the unit cube and the ports of a design.
//!
//! The search works on x ∈ [0, 1]^d so it needs to know nothing about stations or
//! angles. Each [`Freedom`] names some ports, how they move together
//! ([`Together`]) and the ranges of the quantities that are free; quantities
//! without a range stay as the design has them. Every free quantity of a group is
//! one coordinate, mapped linearly onto its range; a hole size is one coordinate
//! split into equal cells, one per drill in the list.
//!
//! [`Variables::write`] writes a point into a preallocated slice of ports and
//! touches only the moving fields, so scoring a point allocates nothing.
//!
//! In a layout file a freedom is a `[[freedom]]` table:
//!
//! ```toml
//! [[freedom]]
//! ports = ["roll-pos-a", "roll-pos-b"]
//! together = "mirror"                # "each" (default), "mirror" or "ring"
//! station = ["600 mm", "900 mm"]     # from, to
//! clock = ["0 deg", "90 deg"]
//! tangential_cant = ["30 deg", "60 deg"]
//! axial_cant = ["-10 deg", "10 deg"]
//! drills = "metric"                  # or "fractional", "number", or a list ["1.2 mm", "1.6 mm"]
//! hole_range = ["1 mm", "2 mm"]      # keep only the drills in this range
//! ```

use super::SectionError;
use crate::layout::precision::{snap_angle, snap_clock, snap_station};
use crate::model::{Design, NozzleSpec, Port};
use crate::units::{self, Kind};
use serde::Deserialize;
use std::f64::consts::{PI, TAU};
use thiserror::Error;

const INCH_M: f64 = 0.0254;

/// A closed range of a quantity in SI units. `from == to` pins the quantity.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Span {
    /// Low end.
    pub from: f64,
    /// High end (not below `from`).
    pub to: f64,
}

impl Span {
    /// A range from `from` to `to`.
    pub fn new(from: f64, to: f64) -> Self {
        Span { from, to }
    }

    fn at(&self, u: f64) -> f64 {
        self.from + (self.to - self.from) * u.clamp(0.0, 1.0)
    }

    fn unit_of(&self, v: f64) -> f64 {
        let width = self.to - self.from;
        if width > 0.0 {
            ((v - self.from) / width).clamp(0.0, 1.0)
        } else {
            0.5
        }
    }
}

/// How the ports of a freedom move together.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Together {
    /// Every port has its own variables, all with the freedom's ranges.
    Each,
    /// Exactly two ports. The second sits at the first one's clock + 180°, at the same
    /// station, with the same tangential cant, axial cant and hole. With no
    /// tangential cant the pair stays diametrically opposite (a pitch or yaw pair);
    /// with equal tangential cant the two side forces cancel and the roll torques
    /// add (a balanced roll pair).
    Mirror,
    /// n ≥ 2 ports equally spaced in clock: port k sits at the first one's clock
    /// + k·360°/n, all at the same station, cants and hole.
    Ring,
}

/// A named series of twist-drill sizes between 0.5 mm and 3.0 mm.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DrillSeries {
    /// Metric jobber drills, 0.5 mm to 3.0 mm in 0.1 mm steps.
    Metric,
    /// Fractional-inch drills, 1/32 in to 7/64 in in 1/64 in steps.
    FractionalInch,
    /// Number (wire-gauge) drills, #76 (0.020 in) to #32 (0.116 in).
    NumberDrill,
}

/// Number drills #76 down to #32, inches (the US number gauge).
const NUMBER_DRILLS_IN: [f64; 45] = [
    0.0200, 0.0210, 0.0225, 0.0240, 0.0250, 0.0260, 0.0280, 0.0292, 0.0310, 0.0320, 0.0330, 0.0350,
    0.0360, 0.0370, 0.0380, 0.0390, 0.0400, 0.0410, 0.0420, 0.0430, 0.0465, 0.0520, 0.0550, 0.0595,
    0.0635, 0.0670, 0.0700, 0.0730, 0.0760, 0.0785, 0.0810, 0.0820, 0.0860, 0.0890, 0.0935, 0.0960,
    0.0980, 0.0995, 0.1015, 0.1040, 0.1065, 0.1100, 0.1110, 0.1130, 0.1160,
];

impl DrillSeries {
    /// Drill diameters of the series in increasing order, m.
    pub fn sizes_m(self) -> Vec<f64> {
        match self {
            // k / 10 mm, computed as the layout reader reads "1.2 mm", so a written
            // metric drill reads back as the same drill.
            DrillSeries::Metric => (5..=30).map(|k| k as f64 / 10.0 * 1e-3).collect(),
            DrillSeries::FractionalInch => (2..=7).map(|k| k as f64 / 64.0 * INCH_M).collect(),
            DrillSeries::NumberDrill => NUMBER_DRILLS_IN.iter().map(|d| d * INCH_M).collect(),
        }
    }

    /// The trade name of a drill of any series whose diameter is exactly `d_m`
    /// (`"number drill #52"`, `"1/16 in drill"`, `"1.2 mm drill"`), or `None`.
    pub fn drill_name(d_m: f64) -> Option<String> {
        if let Some(i) = DrillSeries::NumberDrill
            .sizes_m()
            .iter()
            .position(|&s| s == d_m)
        {
            return Some(format!("number drill #{}", 76 - i));
        }
        if let Some(i) = DrillSeries::FractionalInch
            .sizes_m()
            .iter()
            .position(|&s| s == d_m)
        {
            let (mut n, mut d) = (i + 2, 64);
            while n % 2 == 0 {
                n /= 2;
                d /= 2;
            }
            return Some(format!("{n}/{d} in drill"));
        }
        DrillSeries::Metric
            .sizes_m()
            .iter()
            .position(|&s| s == d_m)
            .map(|i| format!("{:.1} mm drill", (i + 5) as f64 / 10.0))
    }

    /// Plain name used in layout files.
    pub fn name(self) -> &'static str {
        match self {
            DrillSeries::Metric => "metric",
            DrillSeries::FractionalInch => "fractional",
            DrillSeries::NumberDrill => "number",
        }
    }
}

/// What the optimiser may change about a group of ports.
#[derive(Debug, Clone, PartialEq)]
pub struct Freedom {
    /// Names of the ports. For `Mirror` and `Ring` the first port leads and the
    /// others follow it.
    pub ports: Vec<String>,
    /// How the ports move together.
    pub together: Together,
    /// Station range, m; `None` keeps the lead port's station.
    pub station_m: Option<Span>,
    /// Clock range, rad (may extend past 360°); `None` keeps the lead port's clock.
    pub clock_rad: Option<Span>,
    /// Tangential cant range, rad; `None` keeps the lead port's.
    pub tangential_cant_rad: Option<Span>,
    /// Axial cant range, rad; `None` keeps the lead port's.
    pub axial_cant_rad: Option<Span>,
    /// Hole diameters to choose from, m, increasing; `None` keeps the hole.
    /// Only plain-hole ports may change size.
    pub hole_sizes_m: Option<Vec<f64>>,
}

impl Freedom {
    /// A freedom for the given ports with nothing free yet.
    pub fn new(ports: &[&str], together: Together) -> Self {
        Freedom {
            ports: ports.iter().map(|s| s.to_string()).collect(),
            together,
            station_m: None,
            clock_rad: None,
            tangential_cant_rad: None,
            axial_cant_rad: None,
            hole_sizes_m: None,
        }
    }
}

/// Why a set of freedoms does not fit a design.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum VariableError {
    /// A named port is not in the design.
    #[error("freedom {freedom}: no port named `{port}`")]
    UnknownPort {
        /// Index of the freedom.
        freedom: usize,
        /// The name given.
        port: String,
    },
    /// A port appears in more than one freedom, or twice in one.
    #[error("freedom {freedom}: port `{port}` is already moved by freedom {first}")]
    PortTwice {
        /// Index of the freedom.
        freedom: usize,
        /// The port.
        port: String,
        /// Freedom that named it first.
        first: usize,
    },
    /// Wrong number of ports for the way they move together.
    #[error("freedom {freedom}: {together:?} needs {needed}, found {found} port(s)")]
    PortCount {
        /// Index of the freedom.
        freedom: usize,
        /// How the ports move.
        together: Together,
        /// What is needed, in words.
        needed: &'static str,
        /// How many were given.
        found: usize,
    },
    /// A range is reversed or not finite.
    #[error(
        "freedom {freedom}: `{field}`: range must be finite with from ≤ to, found {from} to {to}"
    )]
    BadRange {
        /// Index of the freedom.
        freedom: usize,
        /// Field name.
        field: &'static str,
        /// Low end as given (SI).
        from: f64,
        /// High end as given (SI).
        to: f64,
    },
    /// The drill list is empty or holds a size that is not positive.
    #[error("freedom {freedom}: `drills`: {reason}")]
    BadDrills {
        /// Index of the freedom.
        freedom: usize,
        /// What is wrong.
        reason: String,
    },
    /// A hole size is free for a port whose nozzle is not a plain hole.
    #[error("freedom {freedom}: port `{port}` is a converging-diverging nozzle; only plain holes may change size")]
    NotAHole {
        /// Index of the freedom.
        freedom: usize,
        /// The port.
        port: String,
    },
}

/// One moving unit: a lead port and the ports that follow it.
#[derive(Debug, Clone)]
struct Group {
    /// Port indices; `members[0]` leads.
    members: Vec<usize>,
    /// Clock offset of each member from the lead, rad.
    offsets_rad: Vec<f64>,
    station_m: Option<Span>,
    clock_rad: Option<Span>,
    tangential_cant_rad: Option<Span>,
    axial_cant_rad: Option<Span>,
    hole_sizes_m: Option<Vec<f64>>,
    /// First coordinate of this group in x.
    first: usize,
}

impl Group {
    fn width(&self) -> usize {
        [
            self.station_m.is_some(),
            self.clock_rad.is_some(),
            self.tangential_cant_rad.is_some(),
            self.axial_cant_rad.is_some(),
            self.hole_sizes_m.is_some(),
        ]
        .iter()
        .filter(|b| **b)
        .count()
    }
}

/// Resolved decision variables for one design: the map x ∈ [0,1]^d ↔ ports.
#[derive(Debug, Clone)]
pub struct Variables {
    groups: Vec<Group>,
    dimension: usize,
    port_count: usize,
}

/// Index of the drill for a unit coordinate: equal cells, the last one closed.
fn drill_index(u: f64, count: usize) -> usize {
    ((u.clamp(0.0, 1.0) * count as f64) as usize).min(count - 1)
}

/// The angle equal to `clock` modulo 360° that lies in the span, or the nearest end.
fn clock_in_span(span: &Span, clock: f64) -> f64 {
    let lifted = span.from + (clock - span.from).rem_euclid(TAU);
    if lifted <= span.to {
        return lifted;
    }
    // Outside the span: take the nearer end, measured around the circle.
    let past_to = lifted - span.to;
    let before_from = span.from + TAU - lifted;
    if past_to <= before_from {
        span.to
    } else {
        span.from
    }
}

impl Variables {
    /// Check the freedoms against the design and lay out the coordinates.
    pub fn new(design: &Design, freedoms: &[Freedom]) -> Result<Self, VariableError> {
        let mut owner: Vec<Option<usize>> = vec![None; design.ports.len()];
        let mut groups = Vec::new();
        let mut first = 0;
        for (fi, fr) in freedoms.iter().enumerate() {
            let mut idx = Vec::with_capacity(fr.ports.len());
            for name in &fr.ports {
                let Some(k) = design.ports.iter().position(|p| &p.name == name) else {
                    return Err(VariableError::UnknownPort {
                        freedom: fi,
                        port: name.clone(),
                    });
                };
                if let Some(prev) = owner[k] {
                    return Err(VariableError::PortTwice {
                        freedom: fi,
                        port: name.clone(),
                        first: prev,
                    });
                }
                owner[k] = Some(fi);
                idx.push(k);
            }
            let (needed, ok) = match fr.together {
                Together::Each => ("at least 1", !idx.is_empty()),
                Together::Mirror => ("exactly 2", idx.len() == 2),
                Together::Ring => ("at least 2", idx.len() >= 2),
            };
            if !ok {
                return Err(VariableError::PortCount {
                    freedom: fi,
                    together: fr.together,
                    needed,
                    found: idx.len(),
                });
            }
            for (field, span) in [
                ("station", fr.station_m),
                ("clock", fr.clock_rad),
                ("tangential_cant", fr.tangential_cant_rad),
                ("axial_cant", fr.axial_cant_rad),
            ] {
                if let Some(s) = span {
                    if !(s.from.is_finite() && s.to.is_finite() && s.from <= s.to) {
                        return Err(VariableError::BadRange {
                            freedom: fi,
                            field,
                            from: s.from,
                            to: s.to,
                        });
                    }
                }
            }
            if let Some(sizes) = &fr.hole_sizes_m {
                if sizes.is_empty() {
                    return Err(VariableError::BadDrills {
                        freedom: fi,
                        reason: "no drill sizes to choose from".into(),
                    });
                }
                if sizes.iter().any(|d| !(d.is_finite() && *d > 0.0))
                    || sizes.windows(2).any(|w| w[0] >= w[1])
                {
                    return Err(VariableError::BadDrills {
                        freedom: fi,
                        reason: "sizes must be above zero and strictly increasing".into(),
                    });
                }
                for &k in &idx {
                    if !matches!(design.ports[k].nozzle, NozzleSpec::Hole { .. }) {
                        return Err(VariableError::NotAHole {
                            freedom: fi,
                            port: design.ports[k].name.clone(),
                        });
                    }
                }
            }
            let units: Vec<Vec<usize>> = match fr.together {
                Together::Each => idx.iter().map(|&k| vec![k]).collect(),
                Together::Mirror | Together::Ring => vec![idx.clone()],
            };
            for members in units {
                let n = members.len();
                let offsets_rad = (0..n).map(|k| TAU * k as f64 / n as f64).collect();
                let mut g = Group {
                    members,
                    offsets_rad,
                    station_m: fr.station_m,
                    clock_rad: fr.clock_rad,
                    tangential_cant_rad: fr.tangential_cant_rad,
                    axial_cant_rad: fr.axial_cant_rad,
                    hole_sizes_m: fr.hole_sizes_m.clone(),
                    first,
                };
                if fr.together == Together::Mirror {
                    g.offsets_rad = vec![0.0, PI];
                }
                first += g.width();
                groups.push(g);
            }
        }
        Ok(Variables {
            groups,
            dimension: first,
            port_count: design.ports.len(),
        })
    }

    /// Number of coordinates d.
    pub fn dimension(&self) -> usize {
        self.dimension
    }

    /// Number of ports of the design these variables were built for.
    pub fn port_count(&self) -> usize {
        self.port_count
    }

    /// Write the point `x` into `ports` (the design's ports, or a copy of them).
    /// Only the fields a freedom moves are written; everything else is left as it is.
    /// Coordinates outside [0, 1] are clamped. Allocates nothing.
    /// `x` must have [`Variables::dimension`] entries and `ports` the design's
    /// [`Variables::port_count`] ports ([`Variables::check_lengths`] says so);
    /// shorter slices are a caller bug and stop at an index check.
    pub fn write(&self, x: &[f64], ports: &mut [Port]) {
        for g in &self.groups {
            let lead = &ports[g.members[0]];
            let mut c = g.first;
            let mut take = |span: &Option<Span>, keep: f64| match span {
                Some(s) => {
                    let v = s.at(x[c]);
                    c += 1;
                    v
                }
                None => keep,
            };
            // Moved values are snapped to the precision the layout is written with,
            // so the point the search scores is the layout that will be written.
            let clock_free = g.clock_rad.is_some();
            let station = take(&g.station_m, lead.station_m);
            let station = if g.station_m.is_some() {
                snap_station(station)
            } else {
                station
            };
            let clock = take(&g.clock_rad, lead.clock_rad);
            let tangential = take(&g.tangential_cant_rad, lead.tangential_cant_rad);
            let tangential = if g.tangential_cant_rad.is_some() {
                snap_angle(tangential)
            } else {
                tangential
            };
            let axial = take(&g.axial_cant_rad, lead.axial_cant_rad);
            let axial = if g.axial_cant_rad.is_some() {
                snap_angle(axial)
            } else {
                axial
            };
            let hole = g
                .hole_sizes_m
                .as_ref()
                .map(|sizes| sizes[drill_index(x[c], sizes.len())]);
            for (&k, &offset) in g.members.iter().zip(&g.offsets_rad) {
                let p = &mut ports[k];
                p.station_m = station;
                // Kept in [0°, 360°) so reports and templates read naturally.
                p.clock_rad = if clock_free || offset != 0.0 {
                    snap_clock(clock + offset)
                } else {
                    (clock + offset).rem_euclid(TAU)
                };
                p.tangential_cant_rad = tangential;
                p.axial_cant_rad = axial;
                if let (Some(d), NozzleSpec::Hole { diameter_m, .. }) = (hole, &mut p.nozzle) {
                    *diameter_m = d;
                }
            }
        }
    }

    /// Whether `x` and `ports` have the lengths these variables expect.
    pub fn check_lengths(&self, x: &[f64], ports: &[Port]) -> bool {
        x.len() == self.dimension && ports.len() == self.port_count
    }

    /// A copy of the design with the point `x` applied (allocates; for results).
    pub fn apply(&self, x: &[f64], design: &Design) -> Design {
        let mut out = design.clone();
        self.write(x, &mut out.ports);
        out
    }

    /// The point nearest to the lead ports of `ports`: each quantity clamped into
    /// its range (clocks first moved by whole turns into it), each hole taken as the
    /// nearest drill. Followers are not read, so a design whose followers do not sit
    /// where the symmetry puts them maps to the symmetric layout of its lead ports.
    pub fn encode(&self, ports: &[Port]) -> Vec<f64> {
        let mut x = vec![0.0; self.dimension];
        for g in &self.groups {
            let lead = &ports[g.members[0]];
            let mut c = g.first;
            if let Some(s) = &g.station_m {
                x[c] = s.unit_of(lead.station_m);
                c += 1;
            }
            if let Some(s) = &g.clock_rad {
                x[c] = s.unit_of(clock_in_span(s, lead.clock_rad));
                c += 1;
            }
            if let Some(s) = &g.tangential_cant_rad {
                x[c] = s.unit_of(lead.tangential_cant_rad);
                c += 1;
            }
            if let Some(s) = &g.axial_cant_rad {
                x[c] = s.unit_of(lead.axial_cant_rad);
                c += 1;
            }
            if let Some(sizes) = &g.hole_sizes_m {
                let d = lead.nozzle.hole_diameter_m();
                let best = (0..sizes.len())
                    .min_by(|&a, &b| (sizes[a] - d).abs().total_cmp(&(sizes[b] - d).abs()))
                    .unwrap_or(0);
                // Centre of the drill's cell, so small moves keep the same drill.
                x[c] = (best as f64 + 0.5) / sizes.len() as f64;
            }
        }
        x
    }

    /// Whether port `k` is moved by some freedom.
    pub fn moves(&self, k: usize) -> bool {
        self.groups.iter().any(|g| g.members.contains(&k))
    }
}

/// A `[[freedom]]` table as written in a layout file.
#[derive(Debug, Clone, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct FreedomFile {
    /// Port names.
    pub ports: Vec<String>,
    /// "each" (default), "mirror" or "ring".
    pub together: Option<String>,
    /// Station range: two lengths, from and to.
    pub station: Option<Vec<String>>,
    /// Clock range: two angles.
    pub clock: Option<Vec<String>>,
    /// Tangential cant range: two angles.
    pub tangential_cant: Option<Vec<String>>,
    /// Axial cant range: two angles.
    pub axial_cant: Option<Vec<String>>,
    /// A series name ("metric", "fractional", "number") or a list of lengths.
    pub drills: Option<DrillsFile>,
    /// Keep only drills inside this range: two lengths.
    pub hole_range: Option<Vec<String>>,
}

/// The `drills` field: a named series or a list of sizes.
#[derive(Debug, Clone, Deserialize, PartialEq)]
#[serde(untagged)]
pub enum DrillsFile {
    /// A named series.
    Series(String),
    /// Sizes with units.
    Sizes(Vec<String>),
}

fn parse_span(
    section: &str,
    field: &str,
    v: &Option<Vec<String>>,
    kind: Kind,
) -> Result<Option<Span>, SectionError> {
    let Some(v) = v else { return Ok(None) };
    if v.len() != 2 {
        return Err(SectionError::new(
            section,
            field,
            format!("expected two values [from, to], found {}", v.len()),
        ));
    }
    let a =
        units::parse(&v[0], kind).map_err(|e| SectionError::new(section, field, e.to_string()))?;
    let b =
        units::parse(&v[1], kind).map_err(|e| SectionError::new(section, field, e.to_string()))?;
    if a > b {
        return Err(SectionError::new(
            section,
            field,
            format!(
                "\"{}\" is above \"{}\"; give the range low end first",
                v[0], v[1]
            ),
        ));
    }
    Ok(Some(Span::new(a, b)))
}

impl FreedomFile {
    /// Turn the table into a [`Freedom`]; `section` names it in errors ("freedom[0]").
    pub fn to_freedom(&self, section: &str) -> Result<Freedom, SectionError> {
        let together = match self.together.as_deref() {
            None | Some("each") => Together::Each,
            Some("mirror") => Together::Mirror,
            Some("ring") => Together::Ring,
            Some(other) => {
                return Err(SectionError::new(
                    section,
                    "together",
                    format!("expected \"each\", \"mirror\" or \"ring\", found \"{other}\""),
                ))
            }
        };
        if self.ports.is_empty() {
            return Err(SectionError::new(
                section,
                "ports",
                "name at least one port",
            ));
        }
        let mut sizes = match &self.drills {
            None => None,
            Some(DrillsFile::Series(name)) => Some(match name.as_str() {
                "metric" => DrillSeries::Metric.sizes_m(),
                "fractional" => DrillSeries::FractionalInch.sizes_m(),
                "number" => DrillSeries::NumberDrill.sizes_m(),
                other => {
                    return Err(SectionError::new(
                        section,
                        "drills",
                        format!("expected \"metric\", \"fractional\", \"number\" or a list of sizes, found \"{other}\""),
                    ))
                }
            }),
            Some(DrillsFile::Sizes(list)) => {
                let mut out = Vec::with_capacity(list.len());
                for t in list {
                    let d = units::parse(t, Kind::Length).map_err(|e| SectionError::new(section, "drills", e.to_string()))?;
                    if d <= 0.0 {
                        return Err(SectionError::new(section, "drills", format!("\"{t}\" is not above zero")));
                    }
                    out.push(d);
                }
                out.sort_by(f64::total_cmp);
                out.dedup();
                Some(out)
            }
        };
        if let Some(range) = parse_span(section, "hole_range", &self.hole_range, Kind::Length)? {
            let Some(list) = sizes.as_mut() else {
                return Err(SectionError::new(
                    section,
                    "hole_range",
                    "give `drills` to choose from",
                ));
            };
            // A small allowance so "1 mm" keeps a 1.0 mm drill despite rounding.
            let slack = 1e-9;
            list.retain(|d| *d >= range.from - slack && *d <= range.to + slack);
        }
        if sizes.as_ref().is_some_and(|s| s.is_empty()) {
            return Err(SectionError::new(
                section,
                "drills",
                "no drill size is left to choose from",
            ));
        }
        Ok(Freedom {
            ports: self.ports.clone(),
            together,
            station_m: parse_span(section, "station", &self.station, Kind::Length)?,
            clock_rad: parse_span(section, "clock", &self.clock, Kind::Angle)?,
            tangential_cant_rad: parse_span(
                section,
                "tangential_cant",
                &self.tangential_cant,
                Kind::Angle,
            )?,
            axial_cant_rad: parse_span(section, "axial_cant", &self.axial_cant, Kind::Angle)?,
            hole_sizes_m: sizes,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::layout::parse_str;
    use approx::assert_relative_eq;

    const DEMO: &str = include_str!("../../layouts/heron-54.toml");

    fn demo() -> Design {
        parse_str(DEMO, "heron-54.toml").expect("demo layout parses")
    }

    fn deg(d: f64) -> f64 {
        d.to_radians()
    }

    #[test]
    fn drill_series_have_the_stated_ends_and_are_increasing() {
        let m = DrillSeries::Metric.sizes_m();
        assert_eq!(m.len(), 26);
        // Exact to rounding of k·1e-4: 1e-15 m is far below any drill tolerance.
        assert_relative_eq!(m[0], 0.5e-3, epsilon = 1e-15);
        assert_relative_eq!(m[25], 3.0e-3, epsilon = 1e-15);
        let f = DrillSeries::FractionalInch.sizes_m();
        assert_relative_eq!(f[0], 0.79375e-3, epsilon = 1e-12);
        assert_relative_eq!(f[5], 2.778125e-3, epsilon = 1e-12);
        let n = DrillSeries::NumberDrill.sizes_m();
        assert_relative_eq!(n[0], 0.508e-3, epsilon = 1e-12);
        assert_relative_eq!(n[n.len() - 1], 2.9464e-3, epsilon = 1e-12);
        for s in [m, f, n] {
            assert!(s.windows(2).all(|w| w[0] < w[1]));
            assert!(s
                .iter()
                .all(|d| (0.5e-3..=3.0e-3).contains(d) || (*d - 0.508e-3).abs() < 1e-12));
        }
    }

    #[test]
    fn mirror_pair_stays_opposite_with_equal_cant() {
        let design = demo();
        let mut f = Freedom::new(&["roll-pos-a", "roll-pos-b"], Together::Mirror);
        f.station_m = Some(Span::new(0.65, 0.85));
        f.clock_rad = Some(Span::new(0.0, deg(90.0)));
        f.tangential_cant_rad = Some(Span::new(deg(20.0), deg(60.0)));
        let v = Variables::new(&design, &[f]).unwrap();
        assert_eq!(v.dimension(), 3);
        let mut ports = design.ports.clone();
        v.write(&[0.5, 0.25, 1.0], &mut ports);
        let a = &ports[4];
        let b = &ports[5];
        assert_relative_eq!(a.station_m, 0.75, epsilon = 1e-12);
        assert_relative_eq!(b.station_m, 0.75, epsilon = 1e-12);
        assert_relative_eq!(a.clock_rad, deg(22.5), epsilon = 1e-12);
        assert_relative_eq!(b.clock_rad, deg(202.5), epsilon = 1e-12);
        assert_relative_eq!(a.tangential_cant_rad, deg(60.0), epsilon = 1e-12);
        assert_relative_eq!(b.tangential_cant_rad, deg(60.0), epsilon = 1e-12);
        // Balanced roll pair: side forces cancel.
        let sum = a.thrust_direction() + b.thrust_direction();
        assert!(sum.norm() < 1e-12, "net direction {sum}");
        // Ports not named stay where they were.
        for k in [0, 1, 2, 3, 6, 7] {
            assert_eq!(ports[k].station_m, design.ports[k].station_m);
            assert_eq!(ports[k].clock_rad, design.ports[k].clock_rad);
        }
    }

    #[test]
    fn ring_spaces_ports_equally_and_round_trips() {
        let design = demo();
        let mut f = Freedom::new(
            &["yaw-neg", "pitch-pos", "yaw-pos", "pitch-neg"],
            Together::Ring,
        );
        f.station_m = Some(Span::new(0.25, 0.55));
        f.clock_rad = Some(Span::new(0.0, deg(90.0)));
        f.hole_sizes_m = Some(DrillSeries::Metric.sizes_m());
        let v = Variables::new(&design, &[f]).unwrap();
        assert_eq!(v.dimension(), 3);
        let x0 = v.encode(&design.ports);
        // Start: station 300 mm, clock 0, hole 1.6 mm (drill 11 of 26).
        assert_relative_eq!(x0[0], (0.30 - 0.25) / 0.30, epsilon = 1e-12);
        assert_relative_eq!(x0[1], 0.0, epsilon = 1e-12);
        assert_relative_eq!(x0[2], 11.5 / 26.0, epsilon = 1e-12);
        let mut ports = design.ports.clone();
        v.write(&x0, &mut ports);
        for (p, q) in ports.iter().zip(&design.ports).take(4) {
            assert_relative_eq!(p.station_m, q.station_m, epsilon = 1e-12);
            assert_relative_eq!(p.nozzle.hole_diameter_m(), 1.6e-3, epsilon = 1e-12);
        }
        v.write(&[1.0, 0.5, 1.0], &mut ports);
        for (k, p) in ports.iter().enumerate().take(4) {
            assert_relative_eq!(p.clock_rad, deg(45.0 + 90.0 * k as f64), epsilon = 1e-12);
            assert_relative_eq!(p.station_m, 0.55, epsilon = 1e-12);
            assert_relative_eq!(p.nozzle.hole_diameter_m(), 3.0e-3, epsilon = 1e-12);
        }
        assert_eq!(v.encode(&ports), vec![1.0, 0.5, 25.5 / 26.0]);
    }

    #[test]
    fn each_gives_every_port_its_own_coordinates() {
        let design = demo();
        let mut f = Freedom::new(&["yaw-neg", "pitch-pos"], Together::Each);
        f.axial_cant_rad = Some(Span::new(deg(-10.0), deg(10.0)));
        let v = Variables::new(&design, &[f]).unwrap();
        let mut ports = design.ports.clone();
        v.write(&[0.0, 1.0], &mut ports);
        assert_relative_eq!(ports[0].axial_cant_rad, deg(-10.0), epsilon = 1e-12);
        assert_relative_eq!(ports[1].axial_cant_rad, deg(10.0), epsilon = 1e-12);
        assert!(v.moves(0) && v.moves(1) && !v.moves(2));
    }

    #[test]
    fn clock_outside_span_encodes_to_nearest_end_around_the_circle() {
        let s = Span::new(deg(10.0), deg(50.0));
        assert_relative_eq!(
            clock_in_span(&s, deg(370.0 + 20.0)),
            deg(30.0),
            epsilon = 1e-12
        );
        assert_relative_eq!(clock_in_span(&s, deg(60.0)), deg(50.0), epsilon = 1e-12);
        assert_relative_eq!(clock_in_span(&s, deg(-5.0)), deg(10.0), epsilon = 1e-12);
    }

    #[test]
    fn bad_freedoms_are_reported() {
        let design = demo();
        let unknown = Freedom::new(&["nope"], Together::Each);
        assert!(matches!(
            Variables::new(&design, &[unknown]),
            Err(VariableError::UnknownPort { .. })
        ));
        let a = Freedom::new(&["yaw-neg"], Together::Each);
        let b = Freedom::new(&["yaw-neg", "yaw-pos"], Together::Mirror);
        assert!(matches!(
            Variables::new(&design, &[a, b]),
            Err(VariableError::PortTwice { first: 0, .. })
        ));
        let three = Freedom::new(&["yaw-neg", "yaw-pos", "pitch-neg"], Together::Mirror);
        assert!(matches!(
            Variables::new(&design, &[three]),
            Err(VariableError::PortCount { found: 3, .. })
        ));
        let mut rev = Freedom::new(&["yaw-neg"], Together::Each);
        rev.station_m = Some(Span::new(0.5, 0.4));
        assert!(matches!(
            Variables::new(&design, &[rev]),
            Err(VariableError::BadRange {
                field: "station",
                ..
            })
        ));
    }

    #[test]
    fn freedom_tables_parse_with_units_and_name_bad_fields() {
        let text = r#"
            [[freedom]]
            ports = ["roll-pos-a", "roll-pos-b"]
            together = "mirror"
            station = ["600 mm", "900 mm"]
            tangential_cant = ["30 deg", "60 deg"]
            drills = "metric"
            hole_range = ["1 mm", "2 mm"]

            [[freedom]]
            ports = ["yaw-neg"]
            drills = ["1.2 mm", "0.0625 in", "0.9 mm"]
        "#;
        let f = crate::optimize::sections_from_str(text).unwrap().freedoms;
        assert_eq!(f[0].together, Together::Mirror);
        assert_eq!(f[0].station_m, Some(Span::new(0.6, 0.9)));
        let holes = f[0].hole_sizes_m.as_ref().unwrap();
        assert_eq!(holes.len(), 11);
        assert_relative_eq!(holes[0], 1.0e-3, epsilon = 1e-12);
        assert_relative_eq!(holes[10], 2.0e-3, epsilon = 1e-12);
        assert_eq!(f[1].together, Together::Each);

        let bad = |body: &str| {
            crate::optimize::sections_from_str(&format!("[[freedom]]\nports = [\"a\"]\n{body}"))
                .unwrap_err()
        };
        let e = bad(r#"station = ["600 mm", "2 kg"]"#);
        assert_eq!(
            (e.section.as_str(), e.field.as_str()),
            ("freedom[0]", "station")
        );
        let e = bad(r#"clock = ["90 deg", "10 deg"]"#);
        assert_eq!(e.field, "clock");
        let e = bad(r#"together = "pair""#);
        assert_eq!(e.field, "together");
        let e = bad(r#"drills = "imperial""#);
        assert_eq!(e.field, "drills");
        let e = bad(r#"axial_cant = ["1 deg"]"#);
        assert_eq!(e.field, "axial_cant");
        let e = bad(r#"drills = "metric"
hole_range = ["5 mm", "6 mm"]"#);
        assert_eq!(e.field, "drills");
        let e = bad(r#"stations = ["1 m", "2 m"]"#);
        assert!(e.message.contains("stations"), "{e}");
    }
}
