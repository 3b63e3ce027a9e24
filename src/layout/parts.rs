//! The parts file (the builder's candidate valves, regulators, tanks and hole
//! sizes) and the layout's `[parts]` section (which parts file, and the stations
//! where the valve block, the regulator and the tank sit), read into a
//! [`Catalogue`].
//!
//! Same habits as the layout reader: quantities are strings with units, every
//! problem is collected with its line, column and dotted field
//! (``valve `V-2`.rated_pressure``), values are bounded by [`units`]. Rated and
//! set pressures written gauge refer to sea-level standard atmosphere (bench
//! figures). Read [`parse_str`] for text, [`load`] for a file.

use super::{line_column, Diagnostic, LayoutError};
use crate::layout::convert::{MAX_BODY_LENGTH_M, MAX_CV, MIN_CV, MIN_FLOW_DIAMETER_M};
use crate::model::{Design, SupplyCapacity};
use crate::trade::catalogue::*;
use crate::units::{self, Kind, STANDARD_ATMOSPHERE_PA};
use serde::Deserialize;
use std::ops::Range;
use std::path::{Path, PathBuf};
use toml::Spanned;

type Q = Spanned<String>;

/// Most entries accepted in one list of the parts file (valves, regulators,
/// tanks, hole sizes, set pressures); a real list has a handful.
pub const MAX_LIST: usize = 1000;

/// Most combinations a parts file may make (10¹⁵): far more than any search
/// visits, and small enough that every combination number fits in 64 bits.
pub const MAX_COMBINATIONS: u64 = 1_000_000_000_000_000;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct PartsFile {
    name: Option<Spanned<String>>,
    currency: Option<Spanned<String>>,
    coil_supply_limit: Option<Q>,
    set_pressures: Option<Spanned<Vec<Q>>>,
    #[serde(default)]
    valve: Vec<Spanned<ValveEntry>>,
    #[serde(default)]
    regulator: Vec<Spanned<RegulatorEntry>>,
    #[serde(default)]
    tank: Vec<Spanned<TankEntry>>,
    #[serde(default)]
    holes: Vec<Spanned<HolesEntry>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct ValveEntry {
    name: Spanned<String>,
    cv: Spanned<f64>,
    xt: Option<Spanned<f64>>,
    rated_pressure: Q,
    opening_delay: Q,
    closing_delay: Q,
    coil_current: Q,
    mass: Q,
    price: Option<Spanned<f64>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct StageEntry {
    set_pressure: Q,
    dropout_margin: Option<Q>,
    supply_cv: Option<Spanned<f64>>,
    supply_xt: Option<Spanned<f64>>,
    droop: Option<Q>,
    droop_at: Option<Q>,
    rated_inlet: Q,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RegulatorEntry {
    name: Spanned<String>,
    set_range: Spanned<Vec<Q>>,
    dropout_margin: Option<Q>,
    supply_cv: Option<Spanned<f64>>,
    supply_xt: Option<Spanned<f64>>,
    droop: Option<Q>,
    droop_at: Option<Q>,
    rated_inlet: Q,
    mass: Q,
    price: Option<Spanned<f64>>,
    first_stage: Option<Spanned<StageEntry>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct TankEntry {
    name: Spanned<String>,
    volume: Q,
    rated_pressure: Q,
    empty_mass: Q,
    length: Q,
    diameter: Q,
    price: Option<Spanned<f64>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct HolesEntry {
    name: Spanned<String>,
    ports: Spanned<Vec<Spanned<String>>>,
    sizes: Spanned<Vec<Q>>,
}

#[derive(Debug, Deserialize)]
struct LayoutRaw {
    parts: Option<Spanned<PartsSection>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct PartsSection {
    file: Option<Spanned<String>>,
    valve_block: Q,
    regulator: Q,
    tank: Option<Q>,
}

/// The layout's `[parts]` section, checked.
#[derive(Debug, Clone, PartialEq)]
pub struct PartsSectionData {
    /// The parts file as written (relative to the layout's folder), if named.
    pub file: Option<String>,
    /// Where the parts sit.
    pub placement: Placement,
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

    fn qty(&mut self, q: &Q, field: &str, kind: Kind) -> f64 {
        match units::parse(q.get_ref(), kind) {
            Ok(v) if kind == Kind::Length && v.abs() > MAX_BODY_LENGTH_M => {
                self.problem(
                    q.span(),
                    field,
                    format!(
                        "expected a length within 100 m, found \"{}\"",
                        units::shown(q.get_ref())
                    ),
                );
                f64::NAN
            }
            Ok(v) => v,
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
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
                format!(
                    "expected a value above zero, found \"{}\"",
                    units::shown(q.get_ref())
                ),
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
                format!(
                    "expected zero or more, found \"{}\"",
                    units::shown(q.get_ref())
                ),
            );
        }
        v
    }

    /// A rating: absolute Pa, gauge referred to sea-level standard atmosphere.
    fn rating(&mut self, q: &Q, field: &str) -> f64 {
        match units::parse_pressure(q.get_ref()) {
            Ok(p) => {
                let v = p.absolute_pa(STANDARD_ATMOSPHERE_PA);
                if v <= STANDARD_ATMOSPHERE_PA {
                    self.problem(q.span(), field, "expected a rated pressure above ambient");
                }
                v
            }
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                f64::NAN
            }
        }
    }

    /// A set pressure above ambient, Pa gauge (absolute readings referred to sea level).
    fn set_gauge(&mut self, q: &Q, field: &str) -> f64 {
        match units::parse_pressure(q.get_ref()) {
            Ok(p) => {
                let v = p.gauge_pa(STANDARD_ATMOSPHERE_PA);
                if v <= 0.0 {
                    self.problem(q.span(), field, "expected a set pressure above ambient");
                }
                v
            }
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                f64::NAN
            }
        }
    }

    fn difference(&mut self, q: Option<&Q>, field: &str) -> f64 {
        let Some(q) = q else { return 0.0 };
        match units::parse_pressure(q.get_ref()) {
            Ok(p) if p.pa >= 0.0 => p.pa,
            Ok(_) => {
                self.problem(
                    q.span(),
                    field,
                    format!(
                        "expected zero or more, found \"{}\"",
                        units::shown(q.get_ref())
                    ),
                );
                f64::NAN
            }
            Err(e) => {
                self.problem(q.span(), field, e.to_string());
                f64::NAN
            }
        }
    }

    fn number(&mut self, v: &Spanned<f64>, field: &str, low: f64, high: f64) -> f64 {
        let x = *v.get_ref();
        if !x.is_finite() || x < low || x > high {
            self.problem(
                v.span(),
                field,
                format!(
                    "expected a number from {} to {}, found {}",
                    units::shown_number(low),
                    units::shown_number(high),
                    units::shown_number(x)
                ),
            );
        }
        x
    }

    fn price(&mut self, v: Option<&Spanned<f64>>, field: &str) -> f64 {
        v.map_or(0.0, |v| self.number(v, field, 0.0, 1e9))
    }

    fn name(&mut self, s: &Spanned<String>, field: &str, seen: &mut Vec<String>) -> String {
        let n = s.get_ref().trim().to_string();
        if n.is_empty() {
            self.problem(s.span(), field, "expected a name, found an empty text");
        } else if n.chars().count() > super::MAX_TEXT_LEN {
            self.problem(
                s.span(),
                field,
                format!("a name may hold at most {} characters", super::MAX_TEXT_LEN),
            );
        } else if seen.contains(&n) {
            self.problem(
                s.span(),
                field,
                format!("`{n}` is listed twice: names must differ"),
            );
        }
        seen.push(n.clone());
        n
    }

    fn list_len<T>(&mut self, list: &[T], span: Range<usize>, field: &str) {
        if list.len() > MAX_LIST {
            self.problem(
                span,
                field,
                format!("at most {MAX_LIST} entries, found {}", list.len()),
            );
        }
    }

    #[allow(clippy::too_many_arguments)]
    fn supply(
        &mut self,
        cv: Option<&Spanned<f64>>,
        xt: Option<&Spanned<f64>>,
        droop: Option<&Q>,
        droop_at: Option<&Q>,
        span: Range<usize>,
        field: &str,
    ) -> SupplyCapacity {
        match (cv, droop, droop_at) {
            (None, None, None) => SupplyCapacity::Unlimited,
            (Some(cv), None, None) => SupplyCapacity::Cv {
                cv: self.number(cv, &format!("{field}.supply_cv"), MIN_CV, MAX_CV),
                xt: xt.map_or(0.7, |x| {
                    self.number(x, &format!("{field}.supply_xt"), 0.05, 1.0)
                }),
            },
            (None, Some(d), Some(at)) => {
                let droop_pa = self.difference(Some(d), &format!("{field}.droop"));
                let at_flow_kg_s = self.positive(at, &format!("{field}.droop_at"), Kind::MassFlow);
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
                self.problem(
                    span,
                    field,
                    "give either `supply_cv` or both `droop` and `droop_at`, not a mix",
                );
                SupplyCapacity::Unlimited
            }
        }
    }
}

fn invalid(source_name: &str, mut problems: Vec<Diagnostic>) -> LayoutError {
    problems.sort_by_key(|p| (p.line, p.column));
    LayoutError::Invalid {
        source_name: source_name.to_string(),
        problems,
    }
}

/// The layout's `[parts]` section, checked against the design; `Ok(None)` when
/// the layout has none.
pub fn section(
    layout_text: &str,
    design: &Design,
) -> Result<Option<PartsSectionData>, Vec<Diagnostic>> {
    let raw: LayoutRaw =
        toml::from_str(layout_text).map_err(|e| vec![super::syntax::problem(layout_text, &e)])?;
    let Some(p) = raw.parts else { return Ok(None) };
    let mut r = Reader {
        text: layout_text,
        problems: Vec::new(),
    };
    let s = p.get_ref();
    let station = |r: &mut Reader, q: &Q, field: &str| r.non_negative(q, field, Kind::Length);
    let valve_block = station(&mut r, &s.valve_block, "parts.valve_block");
    let regulator = station(&mut r, &s.regulator, "parts.regulator");
    let tank = s
        .tank
        .as_ref()
        .map_or(design.feed.tank.fore_station_m, |q| {
            station(&mut r, q, "parts.tank")
        });
    let file = s.file.as_ref().map(|f| {
        let t = f.get_ref().trim().to_string();
        if t.is_empty() {
            r.problem(
                f.span(),
                "parts.file",
                "expected the path of a parts file, found an empty text",
            );
        }
        t
    });
    if r.problems.is_empty() {
        Ok(Some(PartsSectionData {
            file,
            placement: Placement {
                valve_block_station_m: valve_block,
                regulator_station_m: regulator,
                tank_station_m: tank,
            },
        }))
    } else {
        Err(r.problems)
    }
}

/// Read a parts file's text into a catalogue for `design`, placed by `placement`.
/// `source_name` names the parts file in messages.
pub fn parse_str(
    text: &str,
    source_name: &str,
    design: &Design,
    placement: Placement,
) -> Result<Catalogue, LayoutError> {
    let long = super::text_bounds::too_long(text, super::MAX_TEXT_LEN);
    if !long.is_empty() {
        return Err(invalid(source_name, long));
    }
    let raw: PartsFile = toml::from_str(text)
        .map_err(|e| invalid(source_name, vec![super::syntax::problem(text, &e)]))?;
    let mut r = Reader {
        text,
        problems: Vec::new(),
    };
    let whole = 0..text.len().min(1);
    let name = raw
        .name
        .as_ref()
        .map_or_else(|| "parts".to_string(), |n| n.get_ref().trim().to_string());
    let currency = raw
        .currency
        .as_ref()
        .map_or_else(String::new, |c| c.get_ref().trim().to_string());
    let coil_supply_limit_a = raw
        .coil_supply_limit
        .as_ref()
        .map(|q| r.positive(q, "coil_supply_limit", Kind::Current));

    let mut seen = Vec::new();
    r.list_len(&raw.valve, whole.clone(), "valve");
    let valves: Vec<ValvePart> = raw
        .valve
        .iter()
        .map(|v| {
            let e = v.get_ref();
            let n = r.name(&e.name, "valve.name", &mut seen);
            let f = |k: &str| format!("valve `{n}`.{k}");
            ValvePart {
                cv: r.number(&e.cv, &f("cv"), MIN_CV, MAX_CV),
                xt: e
                    .xt
                    .as_ref()
                    .map_or(0.7, |x| r.number(x, &f("xt"), 0.05, 1.0)),
                rated_pressure_pa: r.rating(&e.rated_pressure, &f("rated_pressure")),
                opening_delay_s: r.non_negative(&e.opening_delay, &f("opening_delay"), Kind::Time),
                closing_delay_s: r.non_negative(&e.closing_delay, &f("closing_delay"), Kind::Time),
                coil_current_a: r.non_negative(&e.coil_current, &f("coil_current"), Kind::Current),
                mass_kg: r.non_negative(&e.mass, &f("mass"), Kind::Mass),
                price: r.price(e.price.as_ref(), &f("price")),
                name: n,
            }
        })
        .collect();

    let mut seen = Vec::new();
    r.list_len(&raw.regulator, whole.clone(), "regulator");
    let regulators: Vec<RegulatorPart> = raw
        .regulator
        .iter()
        .map(|g| {
            let e = g.get_ref();
            let n = r.name(&e.name, "regulator.name", &mut seen);
            let f = |k: &str| format!("regulator `{n}`.{k}");
            let range = e.set_range.get_ref();
            let (lo, hi) = if range.len() == 2 {
                let lo = r.set_gauge(&range[0], &f("set_range"));
                let hi = r.set_gauge(&range[1], &f("set_range"));
                if lo.is_finite() && hi.is_finite() && lo > hi {
                    r.problem(e.set_range.span(), &f("set_range"), "expected [lowest, highest]: the first is above the second");
                }
                (lo, hi)
            } else {
                r.problem(
                    e.set_range.span(),
                    &f("set_range"),
                    format!("expected two pressures [lowest, highest] such as [\"50 psig\", \"250 psig\"], found {} entries", range.len()),
                );
                (f64::NAN, f64::NAN)
            };
            let first_stage = e.first_stage.as_ref().map(|s| {
                let st = s.get_ref();
                let ff = |k: &str| format!("regulator `{n}`.first_stage.{k}");
                FirstStagePart {
                    set_pressure_gauge_pa: r.set_gauge(&st.set_pressure, &ff("set_pressure")),
                    dropout_margin_pa: r.difference(st.dropout_margin.as_ref(), &ff("dropout_margin")),
                    supply: r.supply(
                        st.supply_cv.as_ref(),
                        st.supply_xt.as_ref(),
                        st.droop.as_ref(),
                        st.droop_at.as_ref(),
                        s.span(),
                        &format!("regulator `{n}`.first_stage"),
                    ),
                    rated_inlet_pa: r.rating(&st.rated_inlet, &ff("rated_inlet")),
                }
            });
            RegulatorPart {
                set_min_gauge_pa: lo,
                set_max_gauge_pa: hi,
                dropout_margin_pa: r.difference(e.dropout_margin.as_ref(), &f("dropout_margin")),
                supply: r.supply(
                    e.supply_cv.as_ref(),
                    e.supply_xt.as_ref(),
                    e.droop.as_ref(),
                    e.droop_at.as_ref(),
                    g.span(),
                    &format!("regulator `{n}`"),
                ),
                rated_inlet_pa: r.rating(&e.rated_inlet, &f("rated_inlet")),
                first_stage,
                mass_kg: r.non_negative(&e.mass, &f("mass"), Kind::Mass),
                price: r.price(e.price.as_ref(), &f("price")),
                name: n,
            }
        })
        .collect();

    let mut seen = Vec::new();
    r.list_len(&raw.tank, whole.clone(), "tank");
    let tanks: Vec<TankPart> = raw
        .tank
        .iter()
        .map(|t| {
            let e = t.get_ref();
            let n = r.name(&e.name, "tank.name", &mut seen);
            let f = |k: &str| format!("tank `{n}`.{k}");
            TankPart {
                volume_m3: r.positive(&e.volume, &f("volume"), Kind::Volume),
                rated_pressure_pa: r.rating(&e.rated_pressure, &f("rated_pressure")),
                empty_mass_kg: r.non_negative(&e.empty_mass, &f("empty_mass"), Kind::Mass),
                length_m: r.positive(&e.length, &f("length"), Kind::Length),
                diameter_m: r.positive(&e.diameter, &f("diameter"), Kind::Length),
                price: r.price(e.price.as_ref(), &f("price")),
                name: n,
            }
        })
        .collect();

    let mut seen = Vec::new();
    let mut taken: Vec<usize> = Vec::new();
    r.list_len(&raw.holes, whole.clone(), "holes");
    let holes: Vec<HoleGroup> = raw
        .holes
        .iter()
        .map(|h| {
            let e = h.get_ref();
            let n = r.name(&e.name, "holes.name", &mut seen);
            let f = |k: &str| format!("holes `{n}`.{k}");
            let mut ports = Vec::new();
            let mut port_names = Vec::new();
            if e.ports.get_ref().is_empty() {
                r.problem(
                    e.ports.span(),
                    &f("ports"),
                    "expected at least one port name",
                );
            }
            for p in e.ports.get_ref() {
                let pn = p.get_ref().trim();
                match design.ports.iter().position(|x| x.name == pn) {
                    Some(k) if taken.contains(&k) => r.problem(
                        p.span(),
                        &f("ports"),
                        format!("port `{pn}` is already in another hole group"),
                    ),
                    Some(k) => {
                        taken.push(k);
                        ports.push(k);
                        port_names.push(pn.to_string());
                    }
                    None => r.problem(
                        p.span(),
                        &f("ports"),
                        format!("the layout has no port `{}`", units::shown(pn)),
                    ),
                }
            }
            let sizes = e.sizes.get_ref();
            r.list_len(sizes, e.sizes.span(), &f("sizes"));
            if sizes.is_empty() {
                r.problem(
                    e.sizes.span(),
                    &f("sizes"),
                    "expected at least one size such as \"1.6 mm\"",
                );
            }
            let mut diameters_m: Vec<f64> = sizes
                .iter()
                .map(|q| {
                    let d = r.qty(q, &f("sizes"), Kind::Length);
                    if d.is_finite() && d < MIN_FLOW_DIAMETER_M {
                        r.problem(
                            q.span(),
                            &f("sizes"),
                            format!(
                                "expected a diameter of at least 0.05 mm, found \"{}\"",
                                units::shown(q.get_ref())
                            ),
                        );
                    }
                    d
                })
                .collect();
            diameters_m.sort_by(f64::total_cmp);
            diameters_m.dedup();
            HoleGroup {
                name: n,
                ports,
                port_names,
                diameters_m,
            }
        })
        .collect();

    let mut set_pressures_gauge_pa: Vec<f64> = match &raw.set_pressures {
        Some(list) => {
            r.list_len(list.get_ref(), list.span(), "set_pressures");
            if list.get_ref().is_empty() {
                r.problem(
                    list.span(),
                    "set_pressures",
                    "expected at least one set pressure such as \"150 psig\"",
                );
            }
            list.get_ref()
                .iter()
                .map(|q| r.set_gauge(q, "set_pressures"))
                .collect()
        }
        None => vec![design.feed.regulator.set_pressure_gauge_pa],
    };
    set_pressures_gauge_pa.sort_by(f64::total_cmp);
    set_pressures_gauge_pa.dedup();

    for (list, what, example) in [
        (valves.is_empty(), "valve", "[[valve]]"),
        (regulators.is_empty(), "regulator", "[[regulator]]"),
        (tanks.is_empty(), "tank", "[[tank]]"),
    ] {
        if list {
            r.problem(
                whole.clone(),
                what,
                format!("the parts file lists no {what}: add at least one `{example}` entry"),
            );
        }
    }
    let mut combinations: u64 = 1;
    for k in [
        valves.len(),
        regulators.len(),
        set_pressures_gauge_pa.len(),
        tanks.len(),
    ]
    .into_iter()
    .chain(holes.iter().map(|h| h.diameters_m.len()))
    {
        combinations = combinations.saturating_mul(k.max(1) as u64);
    }
    if combinations > MAX_COMBINATIONS {
        r.problem(
            whole.clone(),
            "",
            format!("the lists make {combinations} combinations; at most {MAX_COMBINATIONS} are accepted (the study searches large catalogues, but their numbering must fit)"),
        );
    }
    if !r.problems.is_empty() {
        return Err(invalid(source_name, r.problems));
    }
    Ok(Catalogue {
        name,
        currency,
        coil_supply_limit_a,
        valves,
        regulators,
        set_pressures_gauge_pa,
        tanks,
        holes,
        placement,
        bounds: Bounds {
            min_cv: MIN_CV,
            max_cv: MAX_CV,
            min_diameter_m: MIN_FLOW_DIAMETER_M,
        },
    })
}

/// Where a parts file named in a layout's `[parts]` section is, relative to the layout's folder.
pub fn resolve(layout_path: &Path, file: &str) -> PathBuf {
    let p = Path::new(file);
    if p.is_absolute() {
        p.to_path_buf()
    } else {
        layout_path.parent().unwrap_or(Path::new("")).join(p)
    }
}

/// Read a parts file (bounded and UTF-8-checked like a layout) and parse it.
pub fn load(path: &Path, design: &Design, placement: Placement) -> Result<Catalogue, LayoutError> {
    let text = super::read_text(path)?;
    parse_str(&text, &path.display().to_string(), design, placement)
}
