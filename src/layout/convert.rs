//! Check a parsed layout and build the model.
//!
//! Every value is converted once, here. Problems are collected rather than
//! stopping at the first, so a user fixes a file in one pass. A field that fails
//! to convert is replaced by a harmless stand-in so later checks can still run;
//! the stand-in never escapes because any problem makes the whole conversion fail.

use super::file::*;
use super::{line_column, Diagnostic};
use crate::airframe::placement::{first_conflict, Conflict};
use crate::gas::Gas;
use crate::model::*;
use crate::units::{self, Kind, PressureReference, STANDARD_ATMOSPHERE_PA};
use std::collections::HashMap;
use std::ops::Range;
use toml::Spanned;

/// Margin kept between a hole edge and a fin root or keep-out zone by the validator, m.
/// The optimiser uses its own, usually larger, margin.
const PLACEMENT_MARGIN_M: f64 = 0.0;

/// Largest station, length or diameter accepted, m. Altitudes have their own
/// range (the standard atmosphere's).
pub const MAX_BODY_LENGTH_M: f64 = 100.0;

/// Largest thrust misalignment accepted, degrees. Motor misalignments are
/// fractions of a degree; the bound keeps sin(angle) growing with the angle.
pub const MAX_MISALIGNMENT_DEG: f64 = 10.0;

/// Smallest hole, throat, exit or orifice diameter accepted, m (0.05 mm: finer
/// than any twist drill; a smaller one gives flows too small to be numbers).
pub const MIN_FLOW_DIAMETER_M: f64 = 0.05e-3;

/// Range of flow coefficients accepted: far below the smallest solenoid valve
/// and far above a large hand valve.
pub const MIN_CV: f64 = 1e-4;
/// See [`MIN_CV`].
pub const MAX_CV: f64 = 100.0;

struct Reader<'a> {
    text: &'a str,
    problems: Vec<Diagnostic>,
    readings: Vec<String>,
}

impl<'a> Reader<'a> {
    fn problem(&mut self, span: Range<usize>, field: &str, message: impl Into<String>) {
        let (line, column) = line_column(self.text, span.start);
        self.problems.push(Diagnostic {
            line,
            column,
            field: field.to_string(),
            message: message.into(),
        });
    }

    fn qty(&mut self, q: &Q, field: &str, kind: Kind) -> f64 {
        // Stations, lengths and diameters have a tighter range than altitudes.
        let body_length = kind == Kind::Length && !field.ends_with(".altitude");
        let out_of_body = |v: f64| body_length && v.abs() > MAX_BODY_LENGTH_M;
        match units::parse(q.get_ref(), kind) {
            Ok(v) if !out_of_body(v) => v,
            Err(e) if !(body_length && matches!(e, units::UnitError::OutOfRange { .. })) => {
                self.problem(q.span(), field, e.to_string());
                f64::NAN
            }
            _ => {
                self.problem(
                    q.span(),
                    field,
                    format!(
                        "expected a length within 100 m of the nose tip (no vehicle is longer), found \"{}\"",
                        units::shown(q.get_ref())
                    ),
                );
                f64::NAN
            }
        }
    }

    fn positive(&mut self, q: &Q, field: &str, kind: Kind) -> f64 {
        let v = self.qty(q, field, kind);
        if v.is_finite() && v <= 0.0 {
            self.problem(
                q.span(),
                field,
                format!("expected a value above zero, found \"{}\"", q.get_ref()),
            );
        }
        v
    }

    fn non_negative(&mut self, q: &Q, field: &str, kind: Kind) -> f64 {
        let v = self.qty(q, field, kind);
        if v.is_finite() && v < 0.0 {
            self.problem(
                q.span(),
                field,
                format!("expected zero or more, found \"{}\"", q.get_ref()),
            );
        }
        v
    }

    fn opt(&mut self, q: Option<&Q>, field: &str, kind: Kind, default: f64) -> f64 {
        q.map_or(default, |q| self.qty(q, field, kind))
    }

    fn opt_non_negative(&mut self, q: Option<&Q>, field: &str, kind: Kind, default: f64) -> f64 {
        q.map_or(default, |q| self.non_negative(q, field, kind))
    }

    fn temperature(&mut self, q: &Q, field: &str) -> f64 {
        let v = self.qty(q, field, Kind::Temperature);
        if v.is_finite() && v <= 0.0 {
            self.problem(
                q.span(),
                field,
                format!("\"{}\" is at or below absolute zero", q.get_ref()),
            );
        }
        v
    }

    /// A pressure; gauge readings are referred to `ambient_pa`. Returns absolute Pa.
    fn pressure_abs(&mut self, q: &Q, field: &str, ambient_pa: f64) -> f64 {
        match units::parse_pressure(q.get_ref()) {
            Ok(p) => {
                self.note_bare(q, field, p.reference);
                p.absolute_pa(ambient_pa)
            }
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                f64::NAN
            }
        }
    }

    /// A pressure difference: gauge and absolute mean the same thing.
    fn pressure_difference(&mut self, q: &Q, field: &str) -> f64 {
        match units::parse_pressure(q.get_ref()) {
            Ok(p) => {
                if p.pa < 0.0 {
                    self.problem(
                        q.span(),
                        field,
                        format!("expected zero or more, found \"{}\"", q.get_ref()),
                    );
                }
                p.pa
            }
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                f64::NAN
            }
        }
    }

    fn note_bare(&mut self, q: &Q, field: &str, reference: PressureReference) {
        if reference == PressureReference::BareGauge {
            self.readings.push(format!(
                "{field} = \"{}\" has no g/a suffix and is read as gauge",
                q.get_ref()
            ));
        }
    }

    fn fraction(
        &mut self,
        v: Option<&Spanned<f64>>,
        field: &str,
        default: f64,
        low: f64,
        high: f64,
    ) -> f64 {
        match v {
            None => default,
            Some(s) => {
                let x = *s.get_ref();
                if !x.is_finite() || x < low || x > high {
                    self.problem(
                        s.span(),
                        field,
                        format!(
                            "expected a number from {low} to {high}, found {}",
                            units::shown_number(x)
                        ),
                    );
                }
                x
            }
        }
    }

    /// A hole, throat, exit or orifice diameter: at least [`MIN_FLOW_DIAMETER_M`],
    /// so that every flow, and every time computed from a flow, is a number.
    fn flow_diameter(&mut self, q: &Q, field: &str) -> f64 {
        let v = self.qty(q, field, Kind::Length);
        if v.is_finite() && v < MIN_FLOW_DIAMETER_M {
            self.problem(
                q.span(),
                field,
                format!(
                    "expected a diameter of at least 0.05 mm (finer than any drill), found \"{}\"",
                    units::shown(q.get_ref())
                ),
            );
        }
        v
    }

    /// A flow coefficient Cv: at least [`MIN_CV`].
    fn flow_coefficient(&mut self, v: &Spanned<f64>, field: &str) -> f64 {
        let x = self.positive_number(v, field);
        if x.is_finite() && x > 0.0 && !(MIN_CV..=MAX_CV).contains(&x) {
            self.problem(
                v.span(),
                field,
                format!(
                    "expected a flow coefficient from {MIN_CV} to {MAX_CV}, found {}",
                    units::shown_number(x)
                ),
            );
        }
        x
    }

    fn positive_number(&mut self, v: &Spanned<f64>, field: &str) -> f64 {
        let x = *v.get_ref();
        if !x.is_finite() || x <= 0.0 {
            self.problem(
                v.span(),
                field,
                format!(
                    "expected a number above zero, found {}",
                    units::shown_number(x)
                ),
            );
        }
        x
    }

    fn choice<T: Copy>(
        &mut self,
        s: Option<&Spanned<String>>,
        field: &str,
        options: &[(&str, T)],
        default: T,
    ) -> T {
        let Some(s) = s else { return default };
        let want = s.get_ref().trim().to_ascii_lowercase();
        if let Some((_, v)) = options.iter().find(|(n, _)| *n == want) {
            return *v;
        }
        let names: Vec<_> = options.iter().map(|(n, _)| format!("\"{n}\"")).collect();
        self.problem(
            s.span(),
            field,
            format!(
                "expected one of {}, found \"{}\"",
                names.join(", "),
                s.get_ref()
            ),
        );
        default
    }
}

/// Build the model, or list every problem found.
pub fn to_design(raw: &LayoutFile, text: &str) -> Result<Design, Vec<Diagnostic>> {
    let mut r = Reader {
        text,
        problems: Vec::new(),
        readings: Vec::new(),
    };
    let airframe = read_airframe(&mut r, &raw.airframe);
    let components = raw.mass.iter().map(|m| read_mass(&mut r, m)).collect();
    let motor = read_motor(&mut r, raw.motor.get_ref());
    let feed = read_feed(&mut r, &raw.feed);
    let ports = read_ports(&mut r, raw, &airframe);
    let requirements = read_requirements(&mut r, raw.requirements.get_ref());
    let states = read_states(&mut r, raw);
    let manoeuvres = raw
        .manoeuvre
        .iter()
        .map(|m| read_manoeuvre(&mut r, m, &states))
        .collect();
    if r.problems.is_empty() {
        Ok(Design {
            name: raw.name.get_ref().clone(),
            airframe,
            components,
            motor,
            feed,
            ports,
            requirements,
            states,
            manoeuvres,
            readings: r.readings,
            // `layout::parse_str` puts the `[limits]` value here once that section is read.
            max_cant_rad: crate::optimize::constraints::Limits::default().max_total_cant_rad,
            // `layout::parse_layout` reads `[ground]` into this.
            ground: None,
        })
    } else {
        r.problems.sort_by_key(|p| (p.line, p.column));
        Err(r.problems)
    }
}

fn read_airframe(r: &mut Reader, a: &Spanned<AirframeFile>) -> Airframe {
    let span = a.span();
    let a = a.get_ref();
    let od = r.positive(&a.outer_diameter, "airframe.outer_diameter", Kind::Length);
    let id = r.positive(&a.inner_diameter, "airframe.inner_diameter", Kind::Length);
    if od.is_finite() && id.is_finite() && id >= od {
        r.problem(
            a.inner_diameter.span(),
            "airframe.inner_diameter",
            format!(
                "inner diameter \"{}\" must be less than the outer diameter \"{}\"",
                a.inner_diameter.get_ref(),
                a.outer_diameter.get_ref()
            ),
        );
    }
    let tube_length_m = r.positive(&a.length, "airframe.length", Kind::Length);
    let tube_mass_kg = r.opt_non_negative(a.mass.as_ref(), "airframe.mass", Kind::Mass, 0.0);
    let n = a.nose.get_ref();
    let nose = Nose {
        length_m: r.positive(&n.length, "airframe.nose.length", Kind::Length),
        shape: r.choice(
            n.shape.as_ref(),
            "airframe.nose.shape",
            &[
                ("conical", NoseShape::Conical),
                ("ogive", NoseShape::Ogive),
                ("elliptical", NoseShape::Elliptical),
                ("parabolic", NoseShape::Parabolic),
            ],
            NoseShape::Ogive,
        ),
        mass_kg: r.opt_non_negative(n.mass.as_ref(), "airframe.nose.mass", Kind::Mass, 0.0),
    };
    let fins = a.fins.as_ref().map(|f| {
        let fs = f.get_ref();
        let count = *fs.count.get_ref();
        if !(1..=16).contains(&count) {
            r.problem(
                fs.count.span(),
                "airframe.fins.count",
                format!("expected 1 to 16 fins, found {count}"),
            );
        }
        let fins = Fins {
            count: count.clamp(1, 16) as usize,
            root_chord_m: r.positive(&fs.root_chord, "airframe.fins.root_chord", Kind::Length),
            tip_chord_m: r.non_negative(&fs.tip_chord, "airframe.fins.tip_chord", Kind::Length),
            span_m: r.positive(&fs.span, "airframe.fins.span", Kind::Length),
            sweep_m: r.opt(fs.sweep.as_ref(), "airframe.fins.sweep", Kind::Length, 0.0),
            station_m: r.non_negative(&fs.station, "airframe.fins.station", Kind::Length),
            first_clock_rad: r.opt(
                fs.first_clock.as_ref(),
                "airframe.fins.first_clock",
                Kind::Angle,
                0.0,
            ),
            thickness_m: r.positive(&fs.thickness, "airframe.fins.thickness", Kind::Length),
            mass_kg: r.opt_non_negative(fs.mass.as_ref(), "airframe.fins.mass", Kind::Mass, 0.0),
        };
        let aft = nose.length_m + tube_length_m;
        if fins.station_m + fins.root_chord_m > aft + 1e-9 {
            r.problem(
                fs.station.span(),
                "airframe.fins.station",
                format!(
                    "the fin root runs past the aft end of the tube (station {:.1} mm)",
                    aft * 1e3
                ),
            );
        }
        fins
    });
    let keep_outs = a.keep_out.iter().map(|k| read_keep_out(r, k)).collect();
    let _ = span;
    Airframe {
        outer_diameter_m: od,
        inner_diameter_m: id,
        tube_length_m,
        tube_mass_kg,
        nose,
        fins,
        keep_outs,
    }
}

fn read_keep_out(r: &mut Reader, k: &Spanned<KeepOutFile>) -> KeepOut {
    let span = k.span();
    let k = k.get_ref();
    let field = format!("airframe.keep_out `{}`", k.name.get_ref());
    let zone = match (&k.from, &k.to, &k.station) {
        (Some(from), Some(to), None) => {
            let a = r.non_negative(from, &format!("{field}.from"), Kind::Length);
            let b = r.non_negative(to, &format!("{field}.to"), Kind::Length);
            if a.is_finite() && b.is_finite() && b <= a {
                r.problem(
                    to.span(),
                    &format!("{field}.to"),
                    "expected a station aft of `from`",
                );
            }
            Zone::Band {
                from_station_m: a,
                to_station_m: b,
            }
        }
        (None, None, Some(station)) => {
            let need = |q: &Option<Q>, name: &str, kind: Kind, r: &mut Reader| match q {
                Some(q) => r.qty(q, &format!("{field}.{name}"), kind),
                None => {
                    r.problem(span.clone(), &field, format!("a patch needs `{name}`"));
                    f64::NAN
                }
            };
            let clock_rad = need(&k.clock, "clock", Kind::Angle, r);
            let length_m = need(&k.length, "length", Kind::Length, r);
            let width_m = need(&k.width, "width", Kind::Length, r);
            Zone::Patch {
                station_m: r.non_negative(station, &format!("{field}.station"), Kind::Length),
                clock_rad,
                length_m,
                width_m,
            }
        }
        _ => {
            r.problem(span, &field, "expected either a band (`from` and `to`) or a patch (`station`, `clock`, `length`, `width`)");
            Zone::Band {
                from_station_m: 0.0,
                to_station_m: 0.0,
            }
        }
    };
    KeepOut {
        name: k.name.get_ref().clone(),
        zone,
    }
}

fn read_mass(r: &mut Reader, m: &Spanned<MassFile>) -> MassComponent {
    let span = m.span();
    let m = m.get_ref();
    let field = format!("mass `{}`", m.name.get_ref());
    let mass_kg = r.non_negative(&m.mass, &format!("{field}.mass"), Kind::Mass);
    let station = r.non_negative(&m.station, &format!("{field}.station"), Kind::Length);
    let need = |q: &Option<Q>, name: &str, r: &mut Reader| -> f64 {
        match q {
            Some(q) => r.positive(q, &format!("{field}.{name}"), Kind::Length),
            None => {
                r.problem(span.clone(), &field, format!("this shape needs `{name}`"));
                f64::NAN
            }
        }
    };
    #[derive(Clone, Copy)]
    enum K {
        Point,
        Tube,
        Cylinder,
        Cone,
    }
    let kind = r.choice(
        m.shape.as_ref(),
        &format!("{field}.shape"),
        &[
            ("point", K::Point),
            ("tube", K::Tube),
            ("cylinder", K::Cylinder),
            ("cone", K::Cone),
        ],
        K::Point,
    );
    let shape = match kind {
        K::Point => Shape::Point {
            station_m: station,
            radial_m: r.opt_non_negative(
                m.offset.as_ref(),
                &format!("{field}.offset"),
                Kind::Length,
                0.0,
            ),
            clock_rad: r.opt(
                m.clock.as_ref(),
                &format!("{field}.clock"),
                Kind::Angle,
                0.0,
            ),
        },
        K::Tube => {
            let length_m = need(&m.length, "length", r);
            let outer = need(&m.outer_diameter, "outer_diameter", r);
            let inner = match &m.inner_diameter {
                Some(q) => r.non_negative(q, &format!("{field}.inner_diameter"), Kind::Length),
                None => 0.0,
            };
            if inner >= outer {
                r.problem(
                    span.clone(),
                    &format!("{field}.inner_diameter"),
                    "inner diameter must be less than the outer diameter",
                );
            }
            Shape::Tube {
                fore_station_m: station,
                length_m,
                outer_diameter_m: outer,
                inner_diameter_m: inner,
            }
        }
        K::Cylinder => Shape::Cylinder {
            fore_station_m: station,
            length_m: need(&m.length, "length", r),
            diameter_m: need(&m.diameter, "diameter", r),
        },
        K::Cone => Shape::Cone {
            fore_station_m: station,
            length_m: need(&m.length, "length", r),
            diameter_m: need(&m.diameter, "diameter", r),
        },
    };
    MassComponent {
        name: m.name.get_ref().clone(),
        mass_kg,
        shape,
    }
}

fn read_motor(r: &mut Reader, m: &MotorFile) -> Motor {
    let loaded = r.positive(&m.loaded_mass, "motor.loaded_mass", Kind::Mass);
    let burnout = r.positive(&m.burnout_mass, "motor.burnout_mass", Kind::Mass);
    if loaded.is_finite() && burnout.is_finite() && burnout > loaded {
        r.problem(
            m.burnout_mass.span(),
            "motor.burnout_mass",
            "burnout mass must not exceed the loaded mass",
        );
    }
    Motor {
        loaded_mass_kg: loaded,
        burnout_mass_kg: burnout,
        fore_station_m: r.non_negative(&m.station, "motor.station", Kind::Length),
        length_m: r.positive(&m.length, "motor.length", Kind::Length),
        diameter_m: r.positive(&m.diameter, "motor.diameter", Kind::Length),
    }
}

fn read_feed(r: &mut Reader, f: &Spanned<FeedFile>) -> Feed {
    let f = f.get_ref();
    let gas = match Gas::from_name(f.gas.get_ref()) {
        Some(g) => g,
        None => {
            r.problem(
                f.gas.span(),
                "feed.gas",
                format!("unknown gas \"{}\": expected one of \"air\", \"nitrogen\", \"co2\", \"helium\", \"argon\"", f.gas.get_ref()),
            );
            Gas::Nitrogen
        }
    };
    let t = f.tank.get_ref();
    let tank_span = f.tank.span();
    let fill = match (&t.fill_pressure, &t.fill_mass) {
        (Some(p), None) => {
            // Tanks are filled on the ground: a gauge fill pressure refers to sea-level standard atmosphere.
            let pa = r.pressure_abs(p, "feed.tank.fill_pressure", STANDARD_ATMOSPHERE_PA);
            if pa.is_finite() && pa <= 0.0 {
                r.problem(
                    p.span(),
                    "feed.tank.fill_pressure",
                    "expected a pressure above vacuum",
                );
            }
            FillSpec::Pressure { pressure_pa: pa }
        }
        (None, Some(m)) => FillSpec::Mass {
            mass_kg: r.positive(m, "feed.tank.fill_mass", Kind::Mass),
        },
        _ => {
            r.problem(
                tank_span,
                "feed.tank",
                "give exactly one of `fill_pressure` or `fill_mass`",
            );
            FillSpec::Mass { mass_kg: f64::NAN }
        }
    };
    let tank = Tank {
        volume_m3: r.positive(&t.volume, "feed.tank.volume", Kind::Volume),
        fill,
        fill_temperature_k: r.temperature(&t.temperature, "feed.tank.temperature"),
        empty_mass_kg: r.non_negative(&t.empty_mass, "feed.tank.empty_mass", Kind::Mass),
        fore_station_m: r.non_negative(&t.station, "feed.tank.station", Kind::Length),
        length_m: r.positive(&t.length, "feed.tank.length", Kind::Length),
        diameter_m: r.positive(&t.diameter, "feed.tank.diameter", Kind::Length),
        outlet: r.choice(
            t.outlet.as_ref(),
            "feed.tank.outlet",
            &[("fore", TankOutlet::Fore), ("aft", TankOutlet::Aft)],
            TankOutlet::Fore,
        ),
    };

    let g = f.regulator.get_ref();
    let set_field = "feed.regulator.set_pressure";
    let set_gauge = match units::parse_pressure(g.set_pressure.get_ref()) {
        Ok(p) => {
            r.note_bare(&g.set_pressure, set_field, p.reference);
            if p.reference == PressureReference::Absolute {
                r.readings.push(format!(
                    "{set_field} is absolute; it is taken as {:.1} kPa above sea-level standard atmosphere and the regulator is assumed to hold that above local ambient",
                    (p.pa - STANDARD_ATMOSPHERE_PA) / 1e3
                ));
            }
            let gauge = p.gauge_pa(STANDARD_ATMOSPHERE_PA);
            if gauge <= 0.0 {
                r.problem(
                    g.set_pressure.span(),
                    set_field,
                    "expected a set pressure above ambient",
                );
            }
            gauge
        }
        Err(e) => {
            r.problem(g.set_pressure.span(), set_field, e.to_string());
            f64::NAN
        }
    };
    let dropout = g.dropout_margin.as_ref().map_or(0.0, |q| {
        r.pressure_difference(q, "feed.regulator.dropout_margin")
    });
    if let FillSpec::Pressure { pressure_pa } = tank.fill {
        let end = set_gauge + dropout + STANDARD_ATMOSPHERE_PA;
        if pressure_pa.is_finite() && end.is_finite() && end >= pressure_pa {
            let q = t
                .fill_pressure
                .as_ref()
                .map_or(g.set_pressure.span(), |q| q.span());
            r.problem(
                q,
                "feed.tank.fill_pressure",
                format!(
                    "the fill pressure must exceed the regulator set pressure plus its dropout margin ({:.0} kPa absolute)",
                    end / 1e3
                ),
            );
        }
    }
    let supply = match (&g.supply_cv, &g.droop, &g.droop_at) {
        (None, None, None) => SupplyCapacity::Unlimited,
        (Some(cv), None, None) => SupplyCapacity::Cv {
            cv: r.flow_coefficient(cv, "feed.regulator.supply_cv"),
            xt: r.fraction(
                g.supply_xt.as_ref(),
                "feed.regulator.supply_xt",
                0.7,
                0.05,
                1.0,
            ),
        },
        (None, Some(d), Some(at)) => {
            let droop_pa = r.pressure_difference(d, "feed.regulator.droop");
            let at_flow_kg_s = r.positive(at, "feed.regulator.droop_at", Kind::MassFlow);
            if droop_pa == 0.0 {
                // No droop at all: the regulator holds its set pressure at any flow.
                r.readings.push(format!(
                    "feed.regulator.droop = \"{}\" means no droop: the regulator holds its set pressure at any flow",
                    units::shown(d.get_ref())
                ));
                SupplyCapacity::Unlimited
            } else {
                SupplyCapacity::Droop {
                    droop_pa,
                    at_flow_kg_s,
                }
            }
        }
        _ => {
            r.problem(
                f.regulator.span(),
                "feed.regulator",
                "give either `supply_cv` or both `droop` and `droop_at`, not a mix",
            );
            SupplyCapacity::Unlimited
        }
    };
    let regulator = Regulator {
        set_pressure_gauge_pa: set_gauge,
        dropout_margin_pa: dropout,
        supply,
    };

    let v = f.valve.get_ref();
    let flow = match (&v.cv, &v.orifice) {
        (Some(cv), None) => ValveFlow::Cv {
            cv: r.flow_coefficient(cv, "feed.valve.cv"),
            xt: r.fraction(v.xt.as_ref(), "feed.valve.xt", 0.7, 0.05, 1.0),
        },
        (None, Some(d)) => ValveFlow::Orifice {
            diameter_m: r.flow_diameter(d, "feed.valve.orifice"),
            discharge_coefficient: r.fraction(
                v.discharge_coefficient.as_ref(),
                "feed.valve.discharge_coefficient",
                0.8,
                0.05,
                1.0,
            ),
        },
        _ => {
            r.problem(
                f.valve.span(),
                "feed.valve",
                "give exactly one of `cv` or `orifice`",
            );
            ValveFlow::Cv { cv: 1.0, xt: 0.7 }
        }
    };
    let valve = Valve {
        flow,
        opening_delay_s: r.non_negative(&v.opening_delay, "feed.valve.opening_delay", Kind::Time),
        closing_delay_s: r.non_negative(&v.closing_delay, "feed.valve.closing_delay", Kind::Time),
        coil_current_a: r.non_negative(&v.coil_current, "feed.valve.coil_current", Kind::Current),
    };
    let first_stage = read_first_stage(r, f, &regulator, &tank);
    Feed {
        gas,
        tank,
        regulator,
        first_stage,
        valve,
    }
}

/// `[feed.first_stage]`: a high-pressure regulator stage between the tank and
/// `[feed.regulator]`, with the same fields. Its set pressure must be at least the working set
/// pressure plus the working stage's dropout margin, and the fill pressure must exceed the
/// chain's dropout tank pressure (working set + both margins).
fn read_first_stage(
    r: &mut Reader,
    f: &FeedFile,
    working: &Regulator,
    tank: &Tank,
) -> Option<Regulator> {
    let s = f.first_stage.as_ref()?;
    let g = s.get_ref();
    let set_field = "feed.first_stage.set_pressure";
    let set_gauge = match units::parse_pressure(g.set_pressure.get_ref()) {
        Ok(p) => {
            r.note_bare(&g.set_pressure, set_field, p.reference);
            let gauge = p.gauge_pa(STANDARD_ATMOSPHERE_PA);
            let need = working.set_pressure_gauge_pa + working.dropout_margin_pa;
            if need.is_finite() && gauge < need {
                r.problem(
                    g.set_pressure.span(),
                    set_field,
                    format!(
                        "expected a first-stage set pressure of at least the regulator's set pressure plus its dropout margin ({:.0} kPa gauge), so the second stage can regulate",
                        need / 1e3
                    ),
                );
            }
            gauge
        }
        Err(e) => {
            r.problem(g.set_pressure.span(), set_field, e.to_string());
            f64::NAN
        }
    };
    let dropout = g.dropout_margin.as_ref().map_or(0.0, |q| {
        r.pressure_difference(q, "feed.first_stage.dropout_margin")
    });
    if let FillSpec::Pressure { pressure_pa } = tank.fill {
        let end = working.set_pressure_gauge_pa
            + working.dropout_margin_pa
            + dropout
            + STANDARD_ATMOSPHERE_PA;
        if pressure_pa.is_finite() && end.is_finite() && end >= pressure_pa {
            r.problem(
                g.set_pressure.span(),
                "feed.tank.fill_pressure",
                format!(
                    "the fill pressure must exceed the two-stage chain's dropout pressure (regulator set pressure plus both dropout margins, {:.0} kPa absolute)",
                    end / 1e3
                ),
            );
        }
    }
    let supply = match (&g.supply_cv, &g.droop, &g.droop_at) {
        (None, None, None) => SupplyCapacity::Unlimited,
        (Some(cv), None, None) => SupplyCapacity::Cv {
            cv: r.flow_coefficient(cv, "feed.first_stage.supply_cv"),
            xt: r.fraction(
                g.supply_xt.as_ref(),
                "feed.first_stage.supply_xt",
                0.7,
                0.05,
                1.0,
            ),
        },
        (None, Some(d), Some(at)) => {
            let droop_pa = r.pressure_difference(d, "feed.first_stage.droop");
            let at_flow_kg_s = r.positive(at, "feed.first_stage.droop_at", Kind::MassFlow);
            if droop_pa == 0.0 {
                SupplyCapacity::Unlimited
            } else {
                SupplyCapacity::Droop {
                    droop_pa,
                    at_flow_kg_s,
                }
            }
        }
        _ => {
            r.problem(
                s.span(),
                "feed.first_stage",
                "give either `supply_cv` or both `droop` and `droop_at`, not a mix",
            );
            SupplyCapacity::Unlimited
        }
    };
    Some(Regulator {
        set_pressure_gauge_pa: set_gauge,
        dropout_margin_pa: dropout,
        supply,
    })
}

fn read_ports(r: &mut Reader, raw: &LayoutFile, airframe: &Airframe) -> Vec<Port> {
    if raw.port.is_empty() {
        r.problem(
            0..0,
            "port",
            "the layout has no ports: add at least one [[port]] section",
        );
        return Vec::new();
    }
    let mut seen: HashMap<String, usize> = HashMap::new();
    let mut ports = Vec::new();
    for p in &raw.port {
        let span = p.span();
        let p = p.get_ref();
        let name = p.name.get_ref().trim().to_string();
        let field = format!("port `{name}`");
        if name.is_empty() {
            r.problem(p.name.span(), "port.name", "expected a non-empty name");
        }
        if let Some(first_line) = seen.get(&name) {
            r.problem(
                p.name.span(),
                &format!("{field}.name"),
                format!("duplicate port name (first used on line {first_line})"),
            );
        } else {
            seen.insert(name.clone(), line_column(r.text, p.name.span().start).0);
        }
        let cd = r.fraction(
            p.discharge_coefficient.as_ref(),
            &format!("{field}.discharge_coefficient"),
            0.85,
            0.05,
            1.0,
        );
        let nozzle = match (&p.hole, &p.throat, &p.exit) {
            (Some(h), None, None) => NozzleSpec::Hole {
                diameter_m: r.flow_diameter(h, &format!("{field}.hole")),
                discharge_coefficient: cd,
            },
            (None, Some(t), Some(e)) => {
                let throat = r.flow_diameter(t, &format!("{field}.throat"));
                let exit = r.flow_diameter(e, &format!("{field}.exit"));
                if throat.is_finite() && exit.is_finite() && exit < throat {
                    r.problem(
                        e.span(),
                        &format!("{field}.exit"),
                        "the exit diameter must be at least the throat diameter",
                    );
                }
                NozzleSpec::ConvergingDiverging {
                    throat_diameter_m: throat,
                    exit_diameter_m: exit,
                    discharge_coefficient: cd,
                }
            }
            _ => {
                r.problem(
                    span.clone(),
                    &field,
                    "give either `hole`, or both `throat` and `exit`",
                );
                NozzleSpec::Hole {
                    diameter_m: f64::NAN,
                    discharge_coefficient: cd,
                }
            }
        };
        let tang = r.opt(
            p.tangential_cant.as_ref(),
            &format!("{field}.tangential_cant"),
            Kind::Angle,
            0.0,
        );
        let axial = r.opt(
            p.axial_cant.as_ref(),
            &format!("{field}.axial_cant"),
            Kind::Angle,
            0.0,
        );
        for (v, q, n) in [
            (tang, &p.tangential_cant, "tangential_cant"),
            (axial, &p.axial_cant, "axial_cant"),
        ] {
            if v.abs() > std::f64::consts::FRAC_PI_2 + 1e-9 {
                if let Some(q) = q {
                    r.problem(
                        q.span(),
                        &format!("{field}.{n}"),
                        "expected a cant from -90 deg to 90 deg",
                    );
                }
            }
        }
        let port = Port {
            name,
            station_m: r.qty(&p.station, &format!("{field}.station"), Kind::Length),
            clock_rad: r.qty(&p.clock, &format!("{field}.clock"), Kind::Angle),
            tangential_cant_rad: tang,
            axial_cant_rad: axial,
            nozzle,
        };
        let all_finite = [
            port.station_m,
            port.clock_rad,
            port.nozzle.hole_diameter_m(),
        ]
        .iter()
        .all(|v| v.is_finite());
        let cants_in_range = tang.abs() <= std::f64::consts::FRAC_PI_2 + 1e-9
            && axial.abs() <= std::f64::consts::FRAC_PI_2 + 1e-9;
        if all_finite
            && cants_in_range
            && airframe.outer_diameter_m.is_finite()
            && airframe.inner_diameter_m.is_finite()
        {
            check_drilling(r, airframe, &port, p, &field);
        }
        if all_finite && airframe.outer_diameter_m.is_finite() && airframe.tube_length_m.is_finite()
        {
            match first_conflict(airframe, &port, PLACEMENT_MARGIN_M) {
                None => {}
                Some(Conflict::OutsideTube {
                    fore_station_m,
                    aft_station_m,
                }) => r.problem(
                    p.station.span(),
                    &format!("{field}.station"),
                    format!(
                        "the hole is not on the body tube, which runs from station {:.1} mm to {:.1} mm",
                        fore_station_m * 1e3,
                        aft_station_m * 1e3
                    ),
                ),
                Some(Conflict::Fin { fin }) => r.problem(
                    p.clock.span(),
                    &format!("{field}.clock"),
                    format!("the hole overlaps the root of fin {}", fin + 1),
                ),
                Some(Conflict::KeepOut { name }) => r.problem(
                    p.station.span(),
                    &format!("{field}.station"),
                    format!("the hole lies in the keep-out zone `{name}`"),
                ),
            }
        }
        ports.push(port);
    }
    ports
}

/// The hole must pass through the wall into the bore (see `airframe::drilling`);
/// the problem is put on the field that sets it.
fn check_drilling(
    r: &mut Reader,
    airframe: &Airframe,
    port: &Port,
    p: &crate::layout::file::PortFile,
    field: &str,
) {
    use crate::airframe::drilling::{check, DrillProblem};
    let Err(problem) = check(airframe, port) else {
        return;
    };
    let (span, name) = match problem {
        DrillProblem::WiderThanBore { .. } => match (&p.hole, &p.exit) {
            (Some(h), _) => (h.span(), "hole"),
            (None, Some(e)) => (e.span(), "exit"),
            (None, None) => (p.station.span(), "station"),
        },
        DrillProblem::MissesBore { .. } => match &p.tangential_cant {
            Some(q) => (q.span(), "tangential_cant"),
            None => (p.station.span(), "station"),
        },
        DrillProblem::AxialTooSteep { .. } => match &p.axial_cant {
            Some(q) => (q.span(), "axial_cant"),
            None => (p.station.span(), "station"),
        },
    };
    r.problem(span, &format!("{field}.{name}"), problem.to_string());
}

fn read_requirements(r: &mut Reader, q: &RequirementsFile) -> Requirements {
    let roll = r.non_negative(
        &q.roll_accel,
        "requirements.roll_accel",
        Kind::AngularAcceleration,
    );
    let pitch = r.non_negative(
        &q.pitch_accel,
        "requirements.pitch_accel",
        Kind::AngularAcceleration,
    );
    Requirements {
        roll_accel_rad_s2: roll,
        pitch_accel_rad_s2: pitch,
        yaw_accel_rad_s2: r.opt_non_negative(
            q.yaw_accel.as_ref(),
            "requirements.yaw_accel",
            Kind::AngularAcceleration,
            pitch,
        ),
        motor_thrust_n: r.opt_non_negative(
            q.motor_thrust.as_ref(),
            "requirements.motor_thrust",
            Kind::Force,
            0.0,
        ),
        thrust_misalignment_rad: {
            let v = r.opt_non_negative(
                q.thrust_misalignment.as_ref(),
                "requirements.thrust_misalignment",
                Kind::Angle,
                0.0,
            );
            match &q.thrust_misalignment {
                Some(t) if v.is_finite() && v > MAX_MISALIGNMENT_DEG.to_radians() => {
                    r.problem(
                        t.span(),
                        "requirements.thrust_misalignment",
                        format!(
                            "expected an angle from 0 deg to {MAX_MISALIGNMENT_DEG:.0} deg (a motor further off the axis is not a misalignment), found \"{}\"",
                            units::shown(t.get_ref())
                        ),
                    );
                    f64::NAN
                }
                _ => v,
            }
        },
        roll_disturbance_n_m: r.opt_non_negative(
            q.roll_disturbance.as_ref(),
            "requirements.roll_disturbance",
            Kind::Torque,
            0.0,
        ),
        hold_time_s: r.opt_non_negative(
            q.hold_time.as_ref(),
            "requirements.hold_time",
            Kind::Time,
            0.0,
        ),
        gas_reserve: r.fraction(
            q.gas_reserve.as_ref(),
            "requirements.gas_reserve",
            0.2,
            0.0,
            0.95,
        ),
    }
}

fn read_states(r: &mut Reader, raw: &LayoutFile) -> Vec<FlightState> {
    if raw.state.is_empty() {
        r.problem(0..0, "state", "the layout has no flight states: add [[state]] sections (at least liftoff and burnout)");
        return Vec::new();
    }
    let mut names: HashMap<String, ()> = HashMap::new();
    let mut states = Vec::new();
    for s in &raw.state {
        let s = s.get_ref();
        let name = s.name.get_ref().trim().to_string();
        let field = format!("state `{name}`");
        if names.insert(name.clone(), ()).is_some() {
            r.problem(
                s.name.span(),
                &format!("{field}.name"),
                "duplicate flight-state name",
            );
        }
        let altitude_m = r.opt(
            s.altitude.as_ref(),
            &format!("{field}.altitude"),
            Kind::Length,
            0.0,
        );
        if !(-500.0..=86_000.0).contains(&altitude_m) {
            if let Some(q) = &s.altitude {
                r.problem(
                    q.span(),
                    &format!("{field}.altitude"),
                    "expected an altitude from -500 m to 86 km (the standard atmosphere's range)",
                );
            }
        }
        let motor = r.choice(
            Some(&s.motor),
            &format!("{field}.motor"),
            &[
                ("burning", MotorCondition::Burning),
                ("burnout", MotorCondition::Burnout),
            ],
            MotorCondition::Burning,
        );
        let gas_remaining = r.fraction(
            s.gas_remaining.as_ref(),
            &format!("{field}.gas_remaining"),
            1.0,
            0.0,
            1.0,
        );
        let pos = |q: &Option<Q>, n: &str, kind: Kind, r: &mut Reader| {
            q.as_ref()
                .map(|q| r.positive(q, &format!("{field}.{n}"), kind))
        };
        let mass_override = MassOverride {
            mass_kg: pos(&s.mass, "mass", Kind::Mass, r),
            cg_station_m: pos(&s.cg, "cg", Kind::Length, r),
            ixx_kg_m2: pos(&s.ixx, "ixx", Kind::Inertia, r),
            iyy_kg_m2: pos(&s.iyy, "iyy", Kind::Inertia, r),
        };
        states.push(FlightState {
            name,
            altitude_m,
            motor,
            gas_remaining,
            mass_override,
        });
    }
    states
}

fn read_manoeuvre(r: &mut Reader, m: &Spanned<ManoeuvreFile>, states: &[FlightState]) -> Manoeuvre {
    let span = m.span();
    let m = m.get_ref();
    let field = format!("manoeuvre `{}`", m.name.get_ref());
    let need = |q: &Option<Q>, name: &str, kind: Kind, r: &mut Reader| -> f64 {
        match q {
            Some(q) => r.qty(q, &format!("{field}.{name}"), kind),
            None => {
                r.problem(
                    span.clone(),
                    &field,
                    format!("this kind of manoeuvre needs `{name}`"),
                );
                0.0
            }
        }
    };
    let axis = |r: &mut Reader, allowed: &[(&str, usize)]| -> usize {
        match &m.axis {
            Some(a) => r.choice(Some(a), &format!("{field}.axis"), allowed, allowed[0].1),
            None => {
                r.problem(span.clone(), &field, "this kind of manoeuvre needs `axis`");
                allowed[0].1
            }
        }
    };
    #[derive(Clone, Copy)]
    enum K {
        Spin,
        Despin,
        Hold,
        Turn,
    }
    let kind = r.choice(
        Some(&m.kind),
        &format!("{field}.kind"),
        &[
            ("spin", K::Spin),
            ("despin", K::Despin),
            ("hold", K::Hold),
            ("turn", K::Turn),
        ],
        K::Hold,
    );
    let kind = match kind {
        K::Spin => ManoeuvreKind::Spin {
            rate_rad_s: need(&m.rate, "rate", Kind::AngularRate, r),
            hold_s: m.hold.as_ref().map_or(0.0, |q| {
                r.non_negative(q, &format!("{field}.hold"), Kind::Time)
            }),
        },
        K::Despin => ManoeuvreKind::Despin {
            rate_rad_s: need(&m.rate, "rate", Kind::AngularRate, r),
        },
        K::Hold => ManoeuvreKind::Hold {
            axis: axis(r, &[("roll", 0), ("pitch", 1), ("yaw", 2)]),
            torque_n_m: need(&m.torque, "torque", Kind::Torque, r),
            time_s: need(&m.time, "time", Kind::Time, r).max(0.0),
        },
        K::Turn => {
            let count = m.count.as_ref().map_or(1, |c| {
                let v = *c.get_ref();
                if !(1..=10_000).contains(&v) {
                    r.problem(
                        c.span(),
                        &format!("{field}.count"),
                        format!("expected 1 to 10000 turns, found {v}"),
                    );
                }
                v.clamp(1, 10_000) as u32
            });
            ManoeuvreKind::Turn {
                axis: axis(r, &[("pitch", 1), ("yaw", 2)]),
                angle_rad: need(&m.angle, "angle", Kind::Angle, r),
                rate_rad_s: m
                    .rate
                    .as_ref()
                    .map(|q| r.positive(q, &format!("{field}.rate"), Kind::AngularRate)),
                count,
            }
        }
    };
    let state = m.state.as_ref().map(|s| {
        let name = s.get_ref().trim().to_string();
        if !states.iter().any(|st| st.name == name) {
            r.problem(
                s.span(),
                &format!("{field}.state"),
                format!("no flight state named `{name}`"),
            );
        }
        name
    });
    Manoeuvre {
        name: m.name.get_ref().clone(),
        state,
        kind,
    }
}
