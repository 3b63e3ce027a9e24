//! The `[tolerances]` and `[[measured]]` sections: read typed from the layout
//! text (so a wrong type or unknown field comes back with its place), checked
//! against the design, and handed to [`crate::asbuilt`] as SI data.
//!
//! A tolerance is written `"±0.5 mm"` (also `"+-0.5 mm"`): uniform between the
//! two limits; or `"sigma 0.3 mm"` (also `"σ 0.3 mm"`): normal with that
//! standard deviation. Where a relative value is allowed it is written with
//! `%` (`"±5 %"`).

use super::{line_column, Diagnostic};
use crate::asbuilt::measured::{Measurement, StandTest};
use crate::asbuilt::spec::{PortTolerances, Spread, ToleranceSpec};
use crate::model::{Design, NozzleSpec, ValveFlow};
use crate::units::{self, Kind, STANDARD_ATMOSPHERE_PA};
use serde::Deserialize;
use std::ops::Range;
use toml::Spanned;

type Q = Spanned<String>;

/// The typed data of both sections.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct AsBuiltSections {
    /// `[tolerances]`, when present.
    pub tolerances: Option<ToleranceSpec>,
    /// `[[measured]]` entries.
    pub measured: Vec<Measurement>,
}

#[derive(Debug, Deserialize)]
struct Raw {
    tolerances: Option<Spanned<TolerancesFile>>,
    #[serde(default)]
    measured: Vec<Spanned<MeasuredFile>>,
}

#[derive(Debug, Default)]
struct PortFields {
    station: Option<Q>,
    clock: Option<Q>,
    tangential_cant: Option<Q>,
    axial_cant: Option<Q>,
    hole: Option<Q>,
    discharge_coefficient: Option<Q>,
    valve_cv: Option<Q>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct TolerancesFile {
    station: Option<Q>,
    clock: Option<Q>,
    tangential_cant: Option<Q>,
    axial_cant: Option<Q>,
    hole: Option<Q>,
    discharge_coefficient: Option<Q>,
    valve_cv: Option<Q>,
    set_pressure: Option<Q>,
    opening_delay: Option<Q>,
    closing_delay: Option<Q>,
    mass: Option<Q>,
    cg_station: Option<Q>,
    ixx: Option<Q>,
    iyy: Option<Q>,
    motor_misalignment: Option<Q>,
    #[serde(default)]
    port: Vec<Spanned<TolerancePortFile>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct TolerancePortFile {
    ports: Spanned<Vec<Spanned<String>>>,
    station: Option<Q>,
    clock: Option<Q>,
    tangential_cant: Option<Q>,
    axial_cant: Option<Q>,
    hole: Option<Q>,
    discharge_coefficient: Option<Q>,
    valve_cv: Option<Q>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct MeasuredFile {
    port: Spanned<String>,
    station: Option<Q>,
    clock: Option<Q>,
    tangential_cant: Option<Q>,
    axial_cant: Option<Q>,
    hole: Option<Q>,
    throat: Option<Q>,
    thrust: Option<Q>,
    mass_flow: Option<Q>,
    supply_pressure: Option<Q>,
    ambient: Option<Q>,
}

/// What a tolerance value may be written in.
#[derive(Clone, Copy)]
enum Allowed {
    /// A quantity of this kind only.
    Quantity(Kind),
    /// A plain number, or a percentage of the nominal.
    NumberOrPercent,
    /// A percentage only.
    Percent,
    /// A pressure difference, or a percentage of the nominal.
    PressureOrPercent,
}

/// A spread as written: its shape and amount (SI, or a fraction when `relative`).
#[derive(Clone, Copy)]
struct Written {
    spread: Spread,
    relative: bool,
}

struct Reader<'a> {
    text: &'a str,
    problems: Vec<Diagnostic>,
}

impl Reader<'_> {
    fn problem(&mut self, span: Range<usize>, field: &str, message: impl Into<String>) {
        let (line, column) = line_column(self.text, span.start);
        self.problems.push(Diagnostic {
            line,
            column,
            field: field.to_string(),
            message: message.into(),
        });
    }

    fn spread(&mut self, q: &Option<Q>, field: &str, allowed: Allowed) -> Option<Written> {
        let q = q.as_ref()?;
        let text = q.get_ref().trim();
        let expected = match allowed {
            Allowed::Quantity(k) => {
                let (name, example) = k.describe();
                format!("{name} such as \"±{example}\"")
            }
            Allowed::NumberOrPercent => {
                "a number or a percentage such as \"±0.02\" or \"±3 %\"".to_string()
            }
            Allowed::Percent => "a percentage such as \"±2 %\"".to_string(),
            Allowed::PressureOrPercent => {
                "a pressure difference or a percentage such as \"±3 psi\" or \"±2 %\"".to_string()
            }
        };
        let bad = |r: &mut Self, why: &str| {
            r.problem(
                q.span(),
                field,
                format!(
                    "{why}: expected a tolerance: \"±\" (uniform) or \"sigma\" (normal) and {expected}, found \"{text}\""
                ),
            );
            None
        };
        let (normal, rest) = if let Some(r) = text.strip_prefix('±') {
            (false, r)
        } else if let Some(r) = text.strip_prefix("+/-").or_else(|| text.strip_prefix("+-")) {
            (false, r)
        } else if let Some(r) = text
            .strip_prefix("sigma")
            .or_else(|| text.strip_prefix('σ'))
        {
            (true, r)
        } else {
            return bad(self, "no spread given");
        };
        let rest = rest.trim();
        let (value, relative) = if let Some(num) = rest.strip_suffix('%') {
            if matches!(allowed, Allowed::Quantity(_)) {
                return bad(self, "a percentage is not accepted here");
            }
            match num.trim().parse::<f64>() {
                Ok(v) => (v / 100.0, true),
                Err(_) => return bad(self, "not a number before `%`"),
            }
        } else {
            match allowed {
                Allowed::Quantity(k) => match units::parse(rest, k) {
                    Ok(v) => (v, false),
                    Err(e) => {
                        self.problem(q.span(), field, e.to_string());
                        return None;
                    }
                },
                Allowed::NumberOrPercent => match rest.parse::<f64>() {
                    Ok(v) => (v, false),
                    Err(_) => return bad(self, "not a number"),
                },
                Allowed::Percent => return bad(self, "only a percentage is accepted here"),
                Allowed::PressureOrPercent => match units::parse_pressure(rest) {
                    // A tolerance is a difference: gauge or absolute does not matter.
                    Ok(p) => (p.pa, false),
                    Err(e) => {
                        self.problem(q.span(), field, e.to_string());
                        return None;
                    }
                },
            }
        };
        if !(value.is_finite() && value >= 0.0) {
            return bad(self, "the amount must be zero or more");
        }
        Some(Written {
            spread: if normal {
                Spread::Normal { sigma: value }
            } else {
                Spread::Uniform { half_width: value }
            },
            relative,
        })
    }

    fn port_fields(&mut self, f: &PortFields, section: &str) -> [Option<Written>; 7] {
        let field = |n: &str| format!("{section}.{n}");
        [
            self.spread(
                &f.station,
                &field("station"),
                Allowed::Quantity(Kind::Length),
            ),
            self.spread(&f.clock, &field("clock"), Allowed::Quantity(Kind::Angle)),
            self.spread(
                &f.tangential_cant,
                &field("tangential_cant"),
                Allowed::Quantity(Kind::Angle),
            ),
            self.spread(
                &f.axial_cant,
                &field("axial_cant"),
                Allowed::Quantity(Kind::Angle),
            ),
            self.spread(&f.hole, &field("hole"), Allowed::Quantity(Kind::Length)),
            self.spread(
                &f.discharge_coefficient,
                &field("discharge_coefficient"),
                Allowed::NumberOrPercent,
            ),
            self.spread(&f.valve_cv, &field("valve_cv"), Allowed::NumberOrPercent),
        ]
    }

    fn qty(&mut self, q: &Option<Q>, field: &str, kind: Kind) -> Option<f64> {
        let q = q.as_ref()?;
        match units::parse(q.get_ref(), kind) {
            Ok(v) if v.is_finite() => Some(v),
            Ok(_) => None,
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                None
            }
        }
    }

    fn positive(&mut self, q: &Option<Q>, field: &str, kind: Kind) -> Option<f64> {
        let v = self.qty(q, field, kind)?;
        if v <= 0.0 {
            let q = q.as_ref()?;
            self.problem(
                q.span(),
                field,
                format!("expected a value above zero, found \"{}\"", q.get_ref()),
            );
            return None;
        }
        Some(v)
    }
}

fn discharge(n: &NozzleSpec) -> f64 {
    match *n {
        NozzleSpec::Hole {
            discharge_coefficient,
            ..
        }
        | NozzleSpec::ConvergingDiverging {
            discharge_coefficient,
            ..
        } => discharge_coefficient,
    }
}

/// Put the written spreads into port i's tolerances, turning relative ones absolute.
fn set_port(t: &mut PortTolerances, w: &[Option<Written>; 7], design: &Design, i: usize) {
    let nominal_cd = discharge(&design.ports[i].nozzle);
    let nominal_cv = match design.feed.valve.flow {
        ValveFlow::Cv { cv, .. } => Some(cv),
        ValveFlow::Orifice { .. } => None,
    };
    let abs = |w: Option<Written>| w.map(|w| w.spread);
    if w[0].is_some() {
        t.station = abs(w[0]);
    }
    if w[1].is_some() {
        t.clock = abs(w[1]);
    }
    if w[2].is_some() {
        t.tangential_cant = abs(w[2]);
    }
    if w[3].is_some() {
        t.axial_cant = abs(w[3]);
    }
    if w[4].is_some() {
        t.hole = abs(w[4]);
    }
    if let Some(x) = w[5] {
        t.discharge_coefficient = Some(if x.relative {
            x.spread.scaled(nominal_cd)
        } else {
            x.spread
        });
    }
    if let Some(x) = w[6] {
        // Kept as a fraction of the nominal Cv (the valve model may be an orifice).
        t.valve_cv = Some(match (x.relative, nominal_cv) {
            (true, _) => x.spread,
            (false, Some(cv)) => x.spread.scaled(1.0 / cv),
            (false, None) => x.spread,
        });
    }
}

/// Read both sections of `text` for `design` (its ports by name). Problems
/// carry line, column and the dotted field.
pub fn read(text: &str, design: &Design) -> Result<AsBuiltSections, Vec<Diagnostic>> {
    let raw: Raw = toml::from_str(text).map_err(|e| {
        let (line, column) = e.span().map_or((1, 1), |s| line_column(text, s.start));
        vec![Diagnostic {
            line,
            column,
            field: "tolerances or measured".to_string(),
            message: e.message().trim().to_string(),
        }]
    })?;
    let mut r = Reader {
        text,
        problems: Vec::new(),
    };
    let find = |name: &str| design.ports.iter().position(|p| p.name == name);
    let tolerances = raw.tolerances.as_ref().map(|t| {
        let t = t.get_ref();
        let all = r.port_fields(
            &PortFields {
                station: t.station.clone(),
                clock: t.clock.clone(),
                tangential_cant: t.tangential_cant.clone(),
                axial_cant: t.axial_cant.clone(),
                hole: t.hole.clone(),
                discharge_coefficient: t.discharge_coefficient.clone(),
                valve_cv: t.valve_cv.clone(),
            },
            "tolerances",
        );
        if let (Some(w), ValveFlow::Orifice { .. }) = (all[6], design.feed.valve.flow) {
            if !w.relative {
                if let Some(q) = &t.valve_cv {
                    r.problem(q.span(), "tolerances.valve_cv", "the valve is an orifice: give its tolerance as a percentage such as \"±10 %\"");
                }
            }
        }
        let mut ports = vec![PortTolerances::default(); design.ports.len()];
        for (i, p) in ports.iter_mut().enumerate() {
            set_port(p, &all, design, i);
        }
        for (k, entry) in t.port.iter().enumerate() {
            let section = format!("tolerances.port[{k}]");
            let e = entry.get_ref();
            let fields = PortFields {
                station: e.station.clone(),
                clock: e.clock.clone(),
                tangential_cant: e.tangential_cant.clone(),
                axial_cant: e.axial_cant.clone(),
                hole: e.hole.clone(),
                discharge_coefficient: e.discharge_coefficient.clone(),
                valve_cv: e.valve_cv.clone(),
            };
            let w = r.port_fields(&fields, &section);
            if e.ports.get_ref().is_empty() {
                r.problem(e.ports.span(), &format!("{section}.ports"), "expected a list of port names");
            }
            for name in e.ports.get_ref() {
                match find(name.get_ref()) {
                    Some(i) => set_port(&mut ports[i], &w, design, i),
                    None => r.problem(
                        name.span(),
                        &format!("{section}.ports"),
                        format!("no port named `{}` in this layout", name.get_ref()),
                    ),
                }
            }
        }
        let set_nominal = design.feed.regulator.set_pressure_gauge_pa;
        let set_pressure = r
            .spread(&t.set_pressure, "tolerances.set_pressure", Allowed::PressureOrPercent)
            .map(|w| if w.relative { w.spread.scaled(set_nominal) } else { w.spread });
        let time = |r: &mut Reader, q: &Option<Q>, f: &str| {
            r.spread(q, f, Allowed::Quantity(Kind::Time)).map(|w| w.spread)
        };
        let frac = |r: &mut Reader, q: &Option<Q>, f: &str| {
            r.spread(q, f, Allowed::Percent).map(|w| w.spread)
        };
        ToleranceSpec {
            ports,
            set_pressure,
            opening_delay: time(&mut r, &t.opening_delay, "tolerances.opening_delay"),
            closing_delay: time(&mut r, &t.closing_delay, "tolerances.closing_delay"),
            mass: frac(&mut r, &t.mass, "tolerances.mass"),
            cg_station: r
                .spread(&t.cg_station, "tolerances.cg_station", Allowed::Quantity(Kind::Length))
                .map(|w| w.spread),
            ixx: frac(&mut r, &t.ixx, "tolerances.ixx"),
            iyy: frac(&mut r, &t.iyy, "tolerances.iyy"),
            motor_misalignment: r
                .spread(
                    &t.motor_misalignment,
                    "tolerances.motor_misalignment",
                    Allowed::Quantity(Kind::Angle),
                )
                .map(|w| w.spread),
        }
    });
    let mut measured = Vec::new();
    let mut seen = vec![false; design.ports.len()];
    for (k, m) in raw.measured.iter().enumerate() {
        let section = format!("measured[{k}]");
        let f = |n: &str| format!("{section}.{n}");
        let m = m.get_ref();
        let Some(i) = find(m.port.get_ref()) else {
            r.problem(
                m.port.span(),
                &f("port"),
                format!("no port named `{}` in this layout", m.port.get_ref()),
            );
            continue;
        };
        if seen[i] {
            r.problem(
                m.port.span(),
                &f("port"),
                format!("port `{}` is measured twice", m.port.get_ref()),
            );
        }
        seen[i] = true;
        let cd_nozzle = matches!(
            design.ports[i].nozzle,
            NozzleSpec::ConvergingDiverging { .. }
        );
        if let (true, Some(q)) = (cd_nozzle, &m.hole) {
            r.problem(
                q.span(),
                &f("hole"),
                "this port has a converging–diverging nozzle: give the measured `throat` instead",
            );
        }
        if let (false, Some(q)) = (cd_nozzle, &m.throat) {
            r.problem(
                q.span(),
                &f("throat"),
                "this port is a plain hole: give the measured `hole` instead",
            );
        }
        let hole_m = if cd_nozzle {
            r.positive(&m.throat, &f("throat"), Kind::Length)
        } else {
            r.positive(&m.hole, &f("hole"), Kind::Length)
        };
        let thrust_n = r.positive(&m.thrust, &f("thrust"), Kind::Force);
        let mass_flow_kg_s = r.positive(&m.mass_flow, &f("mass_flow"), Kind::MassFlow);
        let ambient_pa = match &m.ambient {
            Some(q) => match units::parse_pressure(q.get_ref()) {
                Ok(p) if p.reference == units::PressureReference::Absolute && p.pa > 0.0 => p.pa,
                Ok(_) => {
                    r.problem(
                        q.span(),
                        &f("ambient"),
                        "expected an absolute pressure above zero, such as \"101.3 kPa\"",
                    );
                    STANDARD_ATMOSPHERE_PA
                }
                Err(e) => {
                    r.problem(q.span(), &f("ambient"), e.to_string());
                    STANDARD_ATMOSPHERE_PA
                }
            },
            None => STANDARD_ATMOSPHERE_PA,
        };
        let supply = match &m.supply_pressure {
            Some(q) => match units::parse_pressure(q.get_ref()) {
                Ok(p) => {
                    let abs = p.absolute_pa(ambient_pa);
                    if abs <= ambient_pa {
                        r.problem(
                            q.span(),
                            &f("supply_pressure"),
                            "expected a supply pressure above the stand's ambient",
                        );
                    }
                    Some(abs)
                }
                Err(e) => {
                    r.problem(q.span(), &f("supply_pressure"), e.to_string());
                    None
                }
            },
            None => None,
        };
        let test = match (thrust_n.is_some() || mass_flow_kg_s.is_some(), supply) {
            (true, Some(supply_pressure_pa)) => Some(StandTest {
                thrust_n,
                mass_flow_kg_s,
                supply_pressure_pa,
                ambient_pa,
            }),
            (true, None) => {
                let q = m.thrust.as_ref().or(m.mass_flow.as_ref());
                let span = q.map_or(m.port.span(), |q| q.span());
                r.problem(span, &f("supply_pressure"), "a measured thrust or flow needs the `supply_pressure` at the valve inlet it was measured at, such as \"150 psig\"");
                None
            }
            (false, Some(_)) => {
                if let Some(q) = &m.supply_pressure {
                    r.problem(
                        q.span(),
                        &f("supply_pressure"),
                        "a supply pressure without a measured `thrust` or `mass_flow` says nothing",
                    );
                }
                None
            }
            (false, None) => None,
        };
        measured.push(Measurement {
            port: i,
            station_m: r.qty(&m.station, &f("station"), Kind::Length),
            clock_rad: r.qty(&m.clock, &f("clock"), Kind::Angle),
            tangential_cant_rad: r.qty(&m.tangential_cant, &f("tangential_cant"), Kind::Angle),
            axial_cant_rad: r.qty(&m.axial_cant, &f("axial_cant"), Kind::Angle),
            hole_m,
            test,
        });
    }
    if r.problems.is_empty() {
        Ok(AsBuiltSections {
            tolerances,
            measured,
        })
    } else {
        Err(r.problems)
    }
}
