//! The optimiser's sections of a layout — `[[freedom]]`, `[limits]` and
//! `[optimize]` — checked where they are read and handed down as typed data.
//!
//! The optimiser itself never sees the file: it receives [`Freedom`]s, checked
//! [`Limits`] and a [`SearchPlan`]. Reading them here, beside the rest of the
//! file, means every command (not only `optimize`) rejects a freedom that names
//! a missing port or an unknown objective, and each message carries the line,
//! column and field of the value at fault. Checks that need the design (port
//! names, group sizes, hole-only sizing) run once the design has been built.

use super::file::{FreedomFile, LimitsFile, SearchFile, Q};
use super::{line_column, Diagnostic};
use crate::analysis::score::Objective;
use crate::model::{Design, NozzleSpec};
use crate::optimize::search::population_for;
use crate::optimize::{DrillSeries, Freedom, Limits, Span, Together};
use crate::units::{self, Kind};
use std::ops::Range;
use toml::Spanned;

/// The longest `time_limit` accepted, s: one day. A search that needs longer
/// should be split; the bound keeps the conversion to a duration exact.
pub const MAX_TIME_LIMIT_S: f64 = 86_400.0;

/// The most layout evaluations accepted: far above any useful search, low enough
/// that counters and budgets stay exact.
pub const MAX_EVALUATIONS: u64 = 1_000_000_000;

/// A checked `[optimize]` section; `None` where the file says nothing (the
/// command line or the defaults decide).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct SearchPlan {
    /// What to maximise, with `then_within` applied when given.
    pub objective: Option<Objective>,
    /// Lexicographic tolerance, a fraction in [0, 1).
    pub then_within: Option<f64>,
    /// Random seed.
    pub seed: Option<u64>,
    /// Largest number of evaluations, at least what the search needs to run one
    /// generation for these freedoms.
    pub max_evaluations: Option<usize>,
    /// Wall-clock limit, s, above zero and at most [`MAX_TIME_LIMIT_S`].
    pub time_limit_s: Option<f64>,
}

/// The optimiser's sections, typed and checked against the design.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct OptimizerSections {
    /// `[[freedom]]`: what may move (empty when the file has none).
    pub freedoms: Vec<Freedom>,
    /// `[limits]`: the rules (defaults when absent).
    pub limits: Limits,
    /// `[optimize]`: how to search.
    pub plan: SearchPlan,
}

/// The least evaluation budget the search accepts for these freedoms: one more
/// than the population of differential evolution, for each stage of the
/// objective.
pub fn least_evaluations(design: &Design, freedoms: &[Freedom], stages: usize) -> usize {
    let dimension = crate::optimize::Variables::new(design, freedoms).map_or(0, |v| v.dimension());
    (population_for(dimension) + 1) * stages.max(1)
}

struct Collect<'a> {
    text: &'a str,
    problems: Vec<Diagnostic>,
}

impl Collect<'_> {
    fn problem(&mut self, span: Range<usize>, field: &str, message: impl Into<String>) {
        let (line, column) = line_column(self.text, span.start);
        self.problems.push(Diagnostic {
            line,
            column,
            field: field.to_string(),
            message: message.into(),
        });
    }

    fn qty(&mut self, q: &Q, field: &str, kind: Kind) -> Option<f64> {
        match units::parse(q.get_ref(), kind).map_err(|e| e.to_string()) {
            Ok(v) => Some(v),
            Err(e) => {
                self.problem(q.span(), field, e);
                None
            }
        }
    }

    fn span(&mut self, v: &Option<Spanned<Vec<Q>>>, field: &str, kind: Kind) -> Option<Span> {
        let v = v.as_ref()?;
        let list = v.get_ref();
        if list.len() != 2 {
            self.problem(
                v.span(),
                field,
                format!(
                    "expected two values [from, to], found {} value(s)",
                    list.len()
                ),
            );
            return None;
        }
        let a = self.qty(&list[0], field, kind)?;
        let b = self.qty(&list[1], field, kind)?;
        if a > b {
            self.problem(
                list[1].span(),
                field,
                format!(
                    "\"{}\" is above \"{}\"; give the low end first",
                    list[0].get_ref(),
                    list[1].get_ref()
                ),
            );
            return None;
        }
        Some(Span::new(a, b))
    }
}

/// Read the three sections. `design` is the built model when the rest of the
/// file was good; the checks that need it are skipped otherwise (the file
/// already fails). Problems are appended to `problems`.
pub fn read(
    freedom: &[Spanned<FreedomFile>],
    limits: Option<&Spanned<LimitsFile>>,
    optimize: Option<&Spanned<SearchFile>>,
    design: Option<&Design>,
    text: &str,
    problems: &mut Vec<Diagnostic>,
) -> OptimizerSections {
    let mut c = Collect {
        text,
        problems: Vec::new(),
    };
    let freedoms: Vec<Option<Freedom>> = freedom
        .iter()
        .enumerate()
        .map(|(k, f)| read_freedom(&mut c, f.get_ref(), &format!("freedom {}", k + 1)))
        .collect();
    if let (Some(design), true) = (design, freedoms.iter().all(Option::is_some)) {
        check_against_design(&mut c, freedom, &freedoms, design);
    }
    let limits = limits.map_or_else(Limits::default, |l| read_limits(&mut c, l));
    let freedoms: Vec<Freedom> = freedoms.into_iter().flatten().collect();
    let plan = optimize.map_or_else(SearchPlan::default, |o| {
        read_plan(&mut c, o, design.map(|d| (d, freedoms.as_slice())))
    });
    problems.append(&mut c.problems);
    OptimizerSections {
        freedoms,
        limits,
        plan,
    }
}

fn read_freedom(c: &mut Collect, f: &FreedomFile, section: &str) -> Option<Freedom> {
    let before = c.problems.len();
    let field = |name: &str| format!("{section}.{name}");
    let together = match &f.together {
        None => Together::Each,
        Some(t) => match t.get_ref().trim().to_ascii_lowercase().as_str() {
            "each" => Together::Each,
            "mirror" => Together::Mirror,
            "ring" => Together::Ring,
            _ => {
                c.problem(
                    t.span(),
                    &field("together"),
                    format!(
                        "expected \"each\", \"mirror\" or \"ring\", found \"{}\"",
                        units::shown(t.get_ref())
                    ),
                );
                Together::Each
            }
        },
    };
    if f.ports.get_ref().is_empty() {
        c.problem(f.ports.span(), &field("ports"), "name at least one port");
    }
    let mut sizes = f
        .drills
        .as_ref()
        .and_then(|d| read_drills(c, d, &field("drills")));
    let hole_range = c.span(&f.hole_range, &field("hole_range"), Kind::Length);
    if let (Some(range), Some(h)) = (hole_range, &f.hole_range) {
        match sizes.as_mut() {
            None if f.drills.is_none() => {
                c.problem(
                    h.span(),
                    &field("hole_range"),
                    "give `drills` to choose from",
                );
            }
            None => {}
            Some(list) => {
                // A small allowance so "1 mm" keeps a 1.0 mm drill despite rounding.
                let slack = 1e-9;
                list.retain(|d| *d >= range.from - slack && *d <= range.to + slack);
                if list.is_empty() {
                    c.problem(
                        h.span(),
                        &field("hole_range"),
                        "no drill size of the list lies in this range",
                    );
                }
            }
        }
    }
    let freedom = Freedom {
        ports: f
            .ports
            .get_ref()
            .iter()
            .map(|p| p.get_ref().trim().to_string())
            .collect(),
        together,
        station_m: c.span(&f.station, &field("station"), Kind::Length),
        clock_rad: c.span(&f.clock, &field("clock"), Kind::Angle),
        tangential_cant_rad: c.span(&f.tangential_cant, &field("tangential_cant"), Kind::Angle),
        axial_cant_rad: c.span(&f.axial_cant, &field("axial_cant"), Kind::Angle),
        hole_sizes_m: sizes,
    };
    for (name, span, value) in [
        (
            "tangential_cant",
            &f.tangential_cant,
            freedom.tangential_cant_rad,
        ),
        ("axial_cant", &f.axial_cant, freedom.axial_cant_rad),
    ] {
        if let (Some(s), Some(q)) = (value, span) {
            if s.from < -std::f64::consts::FRAC_PI_2 - 1e-9
                || s.to > std::f64::consts::FRAC_PI_2 + 1e-9
            {
                c.problem(
                    q.span(),
                    &field(name),
                    "expected cants from -90 deg to 90 deg",
                );
            }
        }
    }
    (c.problems.len() == before).then_some(freedom)
}

fn read_drills(c: &mut Collect, d: &Spanned<toml::Value>, field: &str) -> Option<Vec<f64>> {
    let expected = "expected \"metric\", \"fractional\", \"number\" or a list of sizes such as [\"1.0 mm\", \"1.5 mm\"]";
    match d.get_ref() {
        toml::Value::String(name) => match name.trim().to_ascii_lowercase().as_str() {
            "metric" => Some(DrillSeries::Metric.sizes_m()),
            "fractional" => Some(DrillSeries::FractionalInch.sizes_m()),
            "number" => Some(DrillSeries::NumberDrill.sizes_m()),
            _ => {
                c.problem(
                    d.span(),
                    field,
                    format!("{expected}, found \"{}\"", units::shown(name)),
                );
                None
            }
        },
        toml::Value::Array(list) => {
            let mut out = Vec::with_capacity(list.len());
            for v in list {
                let Some(t) = v.as_str() else {
                    c.problem(
                        d.span(),
                        field,
                        format!("{expected}; every size is a string with a unit"),
                    );
                    return None;
                };
                match units::parse(t, Kind::Length).map_err(|e| e.to_string()) {
                    Ok(x) if x > 0.0 => out.push(x),
                    Ok(_) => {
                        c.problem(
                            d.span(),
                            field,
                            format!("drill size \"{}\" is not above zero", units::shown(t)),
                        );
                        return None;
                    }
                    Err(e) => {
                        c.problem(d.span(), field, e);
                        return None;
                    }
                }
            }
            if out.is_empty() {
                c.problem(d.span(), field, "the list of drill sizes is empty");
                return None;
            }
            out.sort_by(f64::total_cmp);
            out.dedup();
            Some(out)
        }
        _ => {
            c.problem(d.span(), field, expected);
            None
        }
    }
}

/// Port names, group sizes and hole-only sizing against the built design.
fn check_against_design(
    c: &mut Collect,
    raw: &[Spanned<FreedomFile>],
    freedoms: &[Option<Freedom>],
    design: &Design,
) {
    let mut owner: Vec<Option<usize>> = vec![None; design.ports.len()];
    for (fi, (f, raw)) in freedoms.iter().zip(raw).enumerate() {
        let Some(f) = f else { continue };
        let raw = raw.get_ref();
        let section = format!("freedom {}", fi + 1);
        let mut found = 0usize;
        for (name, written) in f.ports.iter().zip(raw.ports.get_ref()) {
            let Some(k) = design.ports.iter().position(|p| &p.name == name) else {
                c.problem(
                    written.span(),
                    &format!("{section}.ports"),
                    format!("no port named `{}`", units::shown(written.get_ref())),
                );
                continue;
            };
            found += 1;
            if let Some(first) = owner[k] {
                let whose = if first == fi {
                    "is named twice in this freedom".to_string()
                } else {
                    format!("is already moved by freedom {}", first + 1)
                };
                c.problem(
                    written.span(),
                    &format!("{section}.ports"),
                    format!("port `{name}` {whose}; a port may move in one freedom only"),
                );
                continue;
            }
            owner[k] = Some(fi);
            if f.hole_sizes_m.is_some()
                && !matches!(design.ports[k].nozzle, NozzleSpec::Hole { .. })
            {
                let at = raw.drills.as_ref().map_or(written.span(), |d| d.span());
                c.problem(
                    at,
                    &format!("{section}.drills"),
                    format!("port `{name}` is a converging-diverging nozzle; only plain holes may change size"),
                );
            }
        }
        if found != f.ports.len() {
            continue;
        }
        let (needed, ok) = match f.together {
            Together::Each => ("at least one port", !f.ports.is_empty()),
            Together::Mirror => ("exactly two ports", f.ports.len() == 2),
            Together::Ring => ("at least two ports", f.ports.len() >= 2),
        };
        if !ok {
            let word = match f.together {
                Together::Each => "each",
                Together::Mirror => "mirror",
                Together::Ring => "ring",
            };
            c.problem(
                raw.ports.span(),
                &format!("{section}.ports"),
                format!(
                    "together = \"{word}\" needs {needed}, found {}",
                    f.ports.len()
                ),
            );
        }
    }
}

fn read_limits(c: &mut Collect, l: &Spanned<LimitsFile>) -> Limits {
    let d = Limits::default();
    let l = l.get_ref();
    let mut out = d;
    let angle_below_right = |c: &mut Collect, q: &Option<Q>, name: &str, default: f64| match q {
        None => default,
        Some(q) => match c.qty(q, &format!("limits.{name}"), Kind::Angle) {
            Some(v) if (0.0..std::f64::consts::FRAC_PI_2).contains(&v) => v,
            Some(_) => {
                c.problem(
                    q.span(),
                    &format!("limits.{name}"),
                    format!(
                        "expected an angle from 0 deg up to, not including, 90 deg, found \"{}\"",
                        units::shown(q.get_ref())
                    ),
                );
                default
            }
            None => default,
        },
    };
    if let Some(q) = &l.margin {
        match c.qty(q, "limits.margin", Kind::Length) {
            Some(v) if v >= 0.0 => out.margin_m = v,
            Some(_) => c.problem(
                q.span(),
                "limits.margin",
                format!(
                    "expected a length of zero or more, found \"{}\"",
                    units::shown(q.get_ref())
                ),
            ),
            None => {}
        }
    }
    let count = |c: &mut Collect, v: &Option<Spanned<f64>>, name: &str, low: f64, default: f64| {
        let Some(v) = v else { return default };
        let x = *v.get_ref();
        if x.is_finite() && (low..=100.0).contains(&x) {
            x
        } else {
            c.problem(
                v.span(),
                &format!("limits.{name}"),
                format!(
                    "expected a number of hole diameters from {low} to 100, found {}",
                    units::shown_number(x)
                ),
            );
            default
        }
    };
    out.spacing_diameters = count(c, &l.spacing, "spacing", 0.0, d.spacing_diameters);
    out.edge_distance_diameters = count(
        c,
        &l.edge_distance,
        "edge_distance",
        0.5,
        d.edge_distance_diameters,
    );
    out.max_total_cant_rad = angle_below_right(c, &l.max_cant, "max_cant", d.max_total_cant_rad);
    out.plume_half_angle_rad = angle_below_right(
        c,
        &l.plume_half_angle,
        "plume_half_angle",
        d.plume_half_angle_rad,
    );
    if let Some(q) = &l.side_force {
        match c.qty(q, "limits.side_force", Kind::Force) {
            Some(v) if v >= 0.0 => out.side_force_n = Some(v),
            Some(_) => c.problem(
                q.span(),
                "limits.side_force",
                format!(
                    "expected a force of zero (pure couples) or more, found \"{}\"",
                    units::shown(q.get_ref())
                ),
            ),
            None => {}
        }
    }
    out
}

fn read_plan(
    c: &mut Collect,
    o: &Spanned<SearchFile>,
    design: Option<(&Design, &[Freedom])>,
) -> SearchPlan {
    let o = o.get_ref();
    let mut plan = SearchPlan::default();
    if let Some(t) = &o.objective {
        match Objective::parse(t.get_ref()) {
            Ok(obj) => plan.objective = Some(obj),
            Err(e) => c.problem(t.span(), "optimize.objective", e),
        }
    }
    if let Some(f) = &o.then_within {
        let x = *f.get_ref();
        if x.is_finite() && (0.0..1.0).contains(&x) {
            plan.then_within = Some(x);
            plan.objective = plan
                .objective
                .take()
                .and_then(|obj| obj.with_then_within(x).ok());
        } else {
            c.problem(
                f.span(),
                "optimize.then_within",
                format!(
                    "expected a fraction from 0 up to, not including, 1 (0.01 gives up at most 1 %), found {}",
                    units::shown_number(x)
                ),
            );
        }
    }
    if let Some(s) = &o.seed {
        match u64::try_from(*s.get_ref()) {
            Ok(v) => plan.seed = Some(v),
            Err(_) => c.problem(
                s.span(),
                "optimize.seed",
                format!(
                    "expected a whole number of zero or more, found {}",
                    s.get_ref()
                ),
            ),
        }
    }
    if let Some(n) = &o.max_evals {
        let v = *n.get_ref();
        let stages = plan.objective.as_ref().map_or(1, |o| o.stages.len());
        let least = design.map_or(2, |(d, f)| least_evaluations(d, f, stages)) as i64;
        if v < least || v as u64 > MAX_EVALUATIONS {
            c.problem(
                n.span(),
                "optimize.max_evals",
                format!(
                    "expected a whole number from {least} (one generation of the search for these freedoms{}) to {MAX_EVALUATIONS}, found {v}",
                    if stages > 1 { ", for each stage" } else { "" }
                ),
            );
        } else {
            plan.max_evaluations = Some(v as usize);
        }
    }
    if let Some(q) = &o.time_limit {
        match time_limit(q.get_ref()) {
            Ok(v) => plan.time_limit_s = Some(v),
            Err(e) => c.problem(q.span(), "optimize.time_limit", e),
        }
    }
    plan
}

/// A search time limit such as "30 s" or "2 min": above zero and at most
/// [`MAX_TIME_LIMIT_S`]. The command line's `--time-limit` uses the same rule.
pub fn time_limit(text: &str) -> Result<f64, String> {
    let v = units::parse(text, Kind::Time).map_err(|e| e.to_string())?;
    if v.is_finite() && v > 0.0 && v <= MAX_TIME_LIMIT_S {
        Ok(v)
    } else {
        Err(format!(
            "expected a time above zero and at most 24 h (\"86400 s\"), such as \"30 s\", found \"{}\"",
            units::shown(text)
        ))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::layout::{parse_layout, Diagnostic};
    use approx::assert_relative_eq;

    const DEMO: &str = include_str!("../../layouts/heron-54.toml");

    /// The demo without its optimiser sections, so a test can add its own.
    fn base() -> &'static str {
        DEMO.find("\n# What the optimiser")
            .map_or(DEMO, |k| &DEMO[..k])
    }

    fn with(sections: &str) -> String {
        format!("{}\n{sections}\n", base())
    }

    /// The single problem of a layout, with its line counted from the added text.
    fn problem(sections: &str) -> Diagnostic {
        let text = with(sections);
        let e = parse_layout(&text, "t.toml").expect_err("the layout must be refused");
        let p = e.problems();
        assert_eq!(p.len(), 1, "{e}");
        p[0].clone()
    }

    #[test]
    fn demo_sections_are_read_typed() {
        let l = parse_layout(DEMO, "heron-54.toml").unwrap().optimizer;
        assert_eq!(l.freedoms.len(), 3);
        assert_eq!(l.freedoms[0].together, Together::Ring);
        assert_eq!(l.freedoms[1].together, Together::Mirror);
        assert_relative_eq!(l.limits.margin_m, 3e-3, epsilon = 1e-15);
        assert_eq!(l.plan.seed, Some(1));
        assert_eq!(l.plan.max_evaluations, Some(20_000));
        assert_eq!(l.plan.objective, Some(Objective::default()));
        // No sections: defaults, no freedoms.
        let none = parse_layout(base(), "t.toml").unwrap().optimizer;
        assert_eq!(none, OptimizerSections::default());
    }

    #[test]
    fn freedom_units_drills_and_ranges() {
        let text = with(
            r#"
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
"#,
        );
        let f = parse_layout(&text, "t.toml").unwrap().optimizer.freedoms;
        assert_eq!(f[0].station_m, Some(Span::new(0.6, 0.9)));
        let holes = f[0].hole_sizes_m.as_ref().unwrap();
        // Metric drills 1.0 to 2.0 mm in 0.1 mm steps: 11 sizes.
        assert_eq!(holes.len(), 11);
        assert_relative_eq!(holes[0], 1.0e-3, epsilon = 1e-12);
        let list = f[1].hole_sizes_m.as_ref().unwrap();
        assert_relative_eq!(list[0], 0.9e-3, epsilon = 1e-12);
        assert_relative_eq!(list[2], 1.5875e-3, epsilon = 1e-12);
    }

    #[test]
    fn every_section_problem_names_line_column_and_field() {
        let cases: &[(&str, &str, &str, &str)] = &[
            // (sections, text the place starts at, field, part of the message)
            (
                "[[freedom]]\nports = [\"roll-pos-a\", \"nowhere\"]",
                "\"nowhere\"",
                "freedom 1.ports",
                "no port named `nowhere`",
            ),
            (
                "[[freedom]]\nports = [\"roll-pos-a\", \"roll-pos-b\", \"roll-neg-a\"]\ntogether = \"mirror\"",
                "[\"roll-pos-a\", \"roll-pos-b\", \"roll-neg-a\"]",
                "freedom 1.ports",
                "needs exactly two ports, found 3",
            ),
            (
                "[[freedom]]\nports = [\"yaw-neg\"]\n[[freedom]]\nports = [\"yaw-neg\"]",
                "\"yaw-neg\"]\n",
                "freedom 2.ports",
                "already moved by freedom 1",
            ),
            (
                "[[freedom]]\nports = [\"yaw-neg\"]\nstation = [\"600 mm\", \"2 kg\"]",
                "\"2 kg\"",
                "freedom 1.station",
                "expected a length",
            ),
            (
                "[[freedom]]\nports = [\"yaw-neg\"]\nclock = [\"90 deg\", \"10 deg\"]",
                "\"10 deg\"",
                "freedom 1.clock",
                "low end first",
            ),
            (
                "[[freedom]]\nports = [\"yaw-neg\"]\ntogether = \"pair\"",
                "\"pair\"",
                "freedom 1.together",
                "expected \"each\"",
            ),
            (
                "[[freedom]]\nports = [\"yaw-neg\"]\ndrills = \"imperial\"",
                "\"imperial\"",
                "freedom 1.drills",
                "found \"imperial\"",
            ),
            (
                "[[freedom]]\nports = [\"yaw-neg\"]\ndrills = \"metric\"\nhole_range = [\"5 mm\", \"6 mm\"]",
                "[\"5 mm\"",
                "freedom 1.hole_range",
                "no drill size",
            ),
            (
                "[limits]\nmax_cant = \"95 deg\"",
                "\"95 deg\"",
                "limits.max_cant",
                "up to, not including, 90 deg",
            ),
            (
                "[limits]\nspacing = -1.0",
                "-1.0",
                "limits.spacing",
                "from 0 to 100",
            ),
            (
                "[limits]\nside_force = \"-1 N\"",
                "\"-1 N\"",
                "limits.side_force",
                "zero (pure couples) or more",
            ),
            (
                "[optimize]\nobjective = \"fastest\"",
                "\"fastest\"",
                "optimize.objective",
                "expected margin",
            ),
            (
                "[optimize]\nthen_within = 1.5",
                "1.5",
                "optimize.then_within",
                "found 1.5",
            ),
            (
                "[optimize]\nmax_evals = 0",
                "0\n",
                "optimize.max_evals",
                "from 31 (one generation",
            ),
            (
                "[optimize]\ntime_limit = \"1e300 s\"",
                "\"1e300 s\"",
                "optimize.time_limit",
                "at most",
            ),
            (
                "[optimize]\ntime_limit = \"-3 s\"",
                "\"-3 s\"",
                "optimize.time_limit",
                "above zero",
            ),
            (
                "[optimize]\nseed = -4",
                "-4",
                "optimize.seed",
                "zero or more",
            ),
        ];
        for (sections, at, field, message) in cases {
            let p = problem(sections);
            let text = with(sections);
            let offset = text.rfind(at).unwrap_or_else(|| panic!("{at} in {text}"));
            let (line, column) = crate::layout::line_column(&text, offset);
            assert_eq!(
                (p.line, p.column, p.field.as_str()),
                (line, column, *field),
                "{sections}: {p}"
            );
            assert!(p.message.contains(message), "{sections}: {p}");
            // Readable: no internal names or raw floating-point noise.
            assert!(
                !p.message.contains("NaN") && !p.message.contains("inf"),
                "{p}"
            );
        }
    }

    #[test]
    fn the_least_budget_follows_the_population() {
        let l = parse_layout(DEMO, "heron-54.toml").unwrap();
        // Demo: ring (station, clock) + two mirrors (station, clock, cant): 8
        // coordinates, population clamp(80, 30, 200) = 80, so 81 per stage.
        assert_eq!(least_evaluations(&l.design, &l.optimizer.freedoms, 1), 81);
        assert_eq!(least_evaluations(&l.design, &l.optimizer.freedoms, 2), 162);
        let text = DEMO.replace("max_evals = 20000", "max_evals = 80");
        let e = parse_layout(&text, "t.toml").unwrap_err();
        let p = &e.problems()[0];
        assert_eq!(p.field, "optimize.max_evals");
        assert!(p.message.contains("from 81"), "{p}");
    }

    #[test]
    fn time_limit_has_a_unit_and_a_range() {
        assert_eq!(time_limit("2 min"), Ok(120.0));
        assert_eq!(time_limit("86400 s"), Ok(86_400.0));
        for bad in ["0 s", "-1 s", "nan s", "inf s", "86401 s", "2", "1e200 s"] {
            assert!(time_limit(bad).is_err(), "{bad}");
        }
    }
}
