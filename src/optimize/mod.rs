//! The port-layout optimiser: where to drill.
//!
//! Four parts, each usable alone:
//! - [`variables`]: what may move ([`Freedom`]) and the map between the unit cube and the ports;
//! - [`constraints`]: the geometric rules a result never breaks ([`Limits`], [`Constraints`]);
//! - [`search`]: differential evolution and pattern search over any [`Objective`];
//! - [`problem`]: the glue — a [`LayoutProblem`] turns a design, freedoms, limits and a
//!   [`LayoutScore`] (the caller's merit of a layout, for example the worst authority
//!   margin over axes and flight states) into an [`Objective`], and [`optimize`] runs
//!   the whole thing and hands back a checked design.
//!
//! The search is generic because the merit (allocation envelopes, gas flow) lives
//! in other modules; the optimiser only needs "how good is this set of ports".
//!
//! ```
//! use portwright::model::Port;
//! use portwright::optimize::{optimize, Freedom, Limits, LayoutScore, SearchSettings, Span, Together};
//! use std::sync::atomic::AtomicBool;
//!
//! /// Stand-in merit: push the first port as far aft as the rules allow.
//! struct Aft;
//! impl LayoutScore for Aft {
//!     type Scratch = ();
//!     fn scratch(&self) {}
//!     fn score(&self, ports: &[Port], _: &mut ()) -> f64 {
//!         ports[0].station_m
//!     }
//! }
//!
//! let design = portwright::layout::parse_str(
//!     include_str!("../../layouts/heron-54.toml"), "heron-54.toml").unwrap();
//! let mut f = Freedom::new(&["yaw-neg", "yaw-pos"], Together::Mirror);
//! f.station_m = Some(Span::new(0.25, 0.45));
//! let settings = SearchSettings { max_evaluations: 600, ..SearchSettings::default() };
//! let done = optimize(&design, &[f], Limits::default(), Aft, &settings,
//!                     &AtomicBool::new(false), &mut |_| {}).unwrap();
//! assert!((done.design.ports[0].station_m - 0.45).abs() < 1e-6);
//! ```

pub mod constraints;
pub mod problem;
pub mod search;
pub mod stages;
pub mod variables;

pub use constraints::{Breach, Constraints, Limits, LimitsFile, Tolerances, Violation};
pub use problem::{
    optimize, LayoutProblem, LayoutResult, LayoutScore, LayoutScratch, OptimizeError,
};
pub use search::{
    search, HistoryPoint, Objective, Outcome, Progress, Score, SearchError, SearchSettings, Stage,
    StopReason, Strategy,
};
pub use stages::{optimize_stages, StageOutcome, StagedResult, StagedScore, StagedSettings};
pub use variables::{DrillSeries, Freedom, FreedomFile, Span, Together, VariableError, Variables};

use crate::units::{self, Kind};
use serde::Deserialize;
use thiserror::Error;

/// A problem in a `[[freedom]]`, `[limits]` or `[optimize]` section, naming the
/// field and, once [`located`](SectionError::located) in the text, its line and column.
#[derive(Debug, Clone, PartialEq, Error)]
#[error("{}{section}{}{field}: {message}", place(*.line, *.column), if .field.is_empty() { "" } else { "." })]
pub struct SectionError {
    /// Section, e.g. "freedom[1]" or "limits".
    pub section: String,
    /// Field name (empty when the section as a whole is wrong).
    pub field: String,
    /// What is wrong and what was expected.
    pub message: String,
    /// 1-based line of the value in the layout text, 0 when not located.
    pub line: usize,
    /// 1-based column, 0 when not located.
    pub column: usize,
}

fn place(line: usize, column: usize) -> String {
    if line == 0 {
        String::new()
    } else {
        format!("{line}:{column}: ")
    }
}

impl SectionError {
    /// A problem with `field` of `section`, not yet located in the text.
    pub fn new(section: &str, field: &str, message: impl Into<String>) -> Self {
        SectionError {
            section: section.to_string(),
            field: field.to_string(),
            message: message.into(),
            line: 0,
            column: 0,
        }
    }

    /// Find the value (or, failing that, the section) in the layout text and
    /// record its line and column.
    pub fn located(mut self, text: &str) -> Self {
        if let Some(offset) = locate(text, &self.section, &self.field) {
            (self.line, self.column) = crate::layout::line_column(text, offset);
        }
        self
    }
}

/// Byte offset of `section.field` in `text`: the value when the field is
/// present, else the section's header, else nothing.
fn locate(text: &str, section: &str, field: &str) -> Option<usize> {
    let doc = toml_edit::Document::parse(text).ok()?;
    let (name, index) = match section.split_once('[') {
        Some((n, rest)) => (n, rest.trim_end_matches(']').parse::<usize>().ok()),
        None => (section, None),
    };
    let item = doc.as_table().get(name)?;
    let table = match index {
        Some(i) => item.as_array_of_tables()?.get(i)?,
        None => item.as_table()?,
    };
    // A field named like `station[1]` points into an array: its first part is the key.
    let key = field.split('[').next().unwrap_or(field);
    table
        .get(key)
        .and_then(|v| v.span())
        .or_else(|| table.span())
        .map(|r| r.start)
}

/// An `[optimize]` section: how to search. The command line overrides each field.
#[derive(Debug, Clone, Default, Deserialize, PartialEq)]
#[serde(deny_unknown_fields)]
pub struct SearchFile {
    /// What to maximise, in the syntax of `--objective`.
    pub objective: Option<String>,
    /// For `A then B`: how much of A's best B may give up, a fraction.
    pub then_within: Option<f64>,
    /// Random seed.
    pub seed: Option<u64>,
    /// Largest number of layout evaluations.
    pub max_evals: Option<u64>,
    /// Wall-clock limit, a time such as "30 s".
    pub time_limit: Option<String>,
}

/// A checked `[optimize]` section; `None` where the file says nothing.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct SearchPlan {
    /// Objective text (checked by the caller, who knows the objectives).
    pub objective: Option<String>,
    /// Lexicographic tolerance, a fraction in [0, 1).
    pub then_within: Option<f64>,
    /// Random seed.
    pub seed: Option<u64>,
    /// Largest number of evaluations, at least 2.
    pub max_evaluations: Option<usize>,
    /// Wall-clock limit, s.
    pub time_limit_s: Option<f64>,
}

impl SearchFile {
    /// Check the values; the error names the field.
    pub fn to_plan(&self) -> Result<SearchPlan, SectionError> {
        let bad = |field: &str, msg: &str| SectionError::new("optimize", field, msg);
        if let Some(f) = self.then_within {
            if !(f.is_finite() && (0.0..1.0).contains(&f)) {
                return Err(bad(
                    "then_within",
                    "expected a fraction from 0 up to, not including, 1 (0.01 gives up at most 1 %)",
                ));
            }
        }
        let max_evaluations = match self.max_evals {
            Some(n) if n < 2 => {
                return Err(bad("max_evals", "expected a whole number of at least 2"))
            }
            Some(n) => Some(usize::try_from(n).map_err(|_| bad("max_evals", "too large"))?),
            None => None,
        };
        let time_limit_s = match &self.time_limit {
            Some(t) => {
                let v = units::parse(t, Kind::Time)
                    .map_err(|e| SectionError::new("optimize", "time_limit", e.to_string()))?;
                if !(v.is_finite() && v > 0.0) {
                    return Err(bad(
                        "time_limit",
                        "expected a time above zero, such as \"30 s\"",
                    ));
                }
                Some(v)
            }
            None => None,
        };
        Ok(SearchPlan {
            objective: self.objective.clone(),
            then_within: self.then_within,
            seed: self.seed,
            max_evaluations,
            time_limit_s,
        })
    }
}

/// The optimiser's sections of a layout.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Sections {
    /// `[[freedom]]`: what may move.
    pub freedoms: Vec<Freedom>,
    /// `[limits]`: the rules (defaults when absent).
    pub limits: Limits,
    /// `[optimize]`: how to search.
    pub plan: SearchPlan,
}

/// Read the `[[freedom]]`, `[limits]` and `[optimize]` sections of a layout's text.
///
/// The layout reader checks the rest of the file and keeps these sections as raw
/// TOML; this reads the same text again and turns them into [`Freedom`]s, checked
/// [`Limits`] (defaults when `[limits]` is absent) and a [`SearchPlan`]. Errors
/// carry the line and column of the offending value.
pub fn sections_from_str(text: &str) -> Result<Sections, SectionError> {
    let raw: RawSections = toml::from_str(text).map_err(|e| type_error(text, &e))?;
    let read = || -> Result<Sections, SectionError> {
        let freedoms = raw
            .freedom
            .iter()
            .enumerate()
            .map(|(k, f)| f.to_freedom(&format!("freedom[{k}]")))
            .collect::<Result<Vec<_>, _>>()?;
        let limits = match &raw.limits {
            Some(l) => l.to_limits()?,
            None => Limits::default(),
        };
        let plan = match &raw.optimize {
            Some(o) => o.to_plan()?,
            None => SearchPlan::default(),
        };
        Ok(Sections {
            freedoms,
            limits,
            plan,
        })
    };
    read().map_err(|e| e.located(text))
}

/// The optimiser's sections, typed, read straight from the text so that a wrong
/// type or an unknown field comes back with its place. Other sections are left
/// to the layout reader.
#[derive(Debug, Deserialize)]
struct RawSections {
    #[serde(default)]
    freedom: Vec<FreedomFile>,
    limits: Option<LimitsFile>,
    optimize: Option<SearchFile>,
}

/// A TOML or type error in one of the optimiser's sections, with the section
/// (the nearest table header above the place) and the field (the key on that
/// line) read back from the text.
fn type_error(text: &str, e: &toml::de::Error) -> SectionError {
    let message = e.message().trim().to_string();
    let Some(span) = e.span() else {
        return SectionError::new("layout", "", message);
    };
    let before = &text[..span.start.min(text.len())];
    let line_text = before.rsplit('\n').next().unwrap_or("");
    let rest_of_line = text[before.len()..].split('\n').next().unwrap_or("");
    let whole_line = format!("{line_text}{rest_of_line}");
    let field = whole_line
        .split_once('=')
        .map(|(k, _)| k.trim())
        .filter(|k| {
            !k.is_empty()
                && k.chars()
                    .all(|c| c.is_alphanumeric() || c == '_' || c == '-')
        })
        .unwrap_or("");
    let mut count = 0usize;
    let mut section = "layout".to_string();
    for l in before.lines() {
        let l = l.trim();
        if let Some(name) = l.strip_prefix("[[").and_then(|r| r.split("]]").next()) {
            let name = name.trim();
            if name == "freedom" {
                section = format!("freedom[{count}]");
                count += 1;
            } else {
                section = name.to_string();
            }
        } else if let Some(name) = l.strip_prefix('[').and_then(|r| r.split(']').next()) {
            section = name.trim().to_string();
        }
    }
    let (line, column) = crate::layout::line_column(text, span.start);
    SectionError {
        section,
        field: field.to_string(),
        message,
        line,
        column,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::Port;
    use std::sync::atomic::AtomicBool;

    const DEMO: &str = include_str!("../../layouts/heron-54.toml");

    /// The demo without its own `[[freedom]]` and `[limits]` sections, so a test can add its own.
    fn without_sections(text: &str) -> &str {
        text.find("\n# What the optimiser")
            .map_or(text, |k| &text[..k])
    }

    const SECTIONS: &str = r#"
[[freedom]]
ports = ["roll-pos-a", "roll-pos-b"]
together = "mirror"
station = ["650 mm", "900 mm"]
tangential_cant = ["20 deg", "60 deg"]

[[freedom]]
ports = ["roll-neg-a", "roll-neg-b"]
together = "mirror"
station = ["650 mm", "900 mm"]
tangential_cant = ["-60 deg", "-20 deg"]

[limits]
margin = "3 mm"
max_cant = "50 deg"
"#;

    /// Stand-in merit (not the authority model): roll arm of the positive pair
    /// minus that of the negative pair, so each pair's cant is pushed to the limit.
    struct RollArm;
    impl LayoutScore for RollArm {
        type Scratch = ();
        fn scratch(&self) {}
        fn score(&self, p: &[Port], _: &mut ()) -> f64 {
            p[4].tangential_cant_rad.sin() - p[6].tangential_cant_rad.sin() + p[4].station_m
                - p[6].station_m
        }
    }

    #[test]
    fn layout_with_freedom_and_limits_runs_end_to_end() {
        let text = format!("{}\n{SECTIONS}", without_sections(DEMO));
        let design = crate::layout::parse_str(&text, "heron-54.toml")
            .expect("the reader keeps the sections");
        let Sections {
            freedoms, limits, ..
        } = sections_from_str(&text).unwrap();
        assert_eq!(freedoms.len(), 2);
        assert!((limits.max_total_cant_rad - 50f64.to_radians()).abs() < 1e-12);
        let settings = SearchSettings {
            max_evaluations: 4_000,
            ..SearchSettings::default()
        };
        // The start has 60° cants, over the 50° limit: the search must still find
        // feasible layouts and push both pairs to the limit.
        let r = optimize(
            &design,
            &freedoms,
            limits,
            RollArm,
            &settings,
            &AtomicBool::new(false),
            &mut |_| {},
        )
        .unwrap();
        let p = &r.design.ports;
        assert!(!r.start_score().is_feasible());
        assert!((p[4].tangential_cant_rad - 50f64.to_radians()).abs() < 1e-6);
        assert!((p[6].tangential_cant_rad + 50f64.to_radians()).abs() < 1e-6);
        // Positive pair aft (900 mm), negative pair fore (650 mm): 1e-6 m as in the
        // other station cases.
        assert!((p[4].station_m - 0.90).abs() < 1e-6, "{}", p[4].station_m);
        assert!((p[6].station_m - 0.65).abs() < 1e-6, "{}", p[6].station_m);
        assert!(Constraints::new(&design.airframe, limits)
            .unwrap()
            .is_feasible(p));
    }

    #[test]
    fn layout_search_is_the_same_with_one_or_two_threads() {
        let text = format!("{}\n{SECTIONS}", without_sections(DEMO));
        let design = crate::layout::parse_str(&text, "heron-54.toml").unwrap();
        let Sections {
            freedoms, limits, ..
        } = sections_from_str(&text).unwrap();
        let settings = SearchSettings {
            seed: 9,
            max_evaluations: 1_500,
            ..SearchSettings::default()
        };
        let go = |threads: usize| {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap();
            pool.install(|| {
                optimize(
                    &design,
                    &freedoms,
                    limits,
                    RollArm,
                    &settings,
                    &AtomicBool::new(false),
                    &mut |_| {},
                )
                .unwrap()
                .outcome
            })
        };
        let (one, two) = (go(1), go(2));
        // Everything but the wall-clock time must match.
        assert_eq!(
            (&one.x, one.score, &one.history, one.evaluations),
            (&two.x, two.score, &two.history, two.evaluations)
        );
    }

    #[test]
    fn bad_sections_name_the_field() {
        let e = sections_from_str("[limits]\nmax_cant = \"2 m\"").unwrap_err();
        assert_eq!(
            (e.section.as_str(), e.field.as_str()),
            ("limits", "max_cant")
        );
        let e = sections_from_str("[[freedom]]\nports = [\"a\"]\nclock = [\"1 deg\", \"x\"]")
            .unwrap_err();
        assert_eq!(
            (e.section.as_str(), e.field.as_str()),
            ("freedom[0]", "clock")
        );
        // Located: line 3, the value's first character.
        let e = sections_from_str("name = \"x\"\n[limits]\nmax_cant = \"2 m\"").unwrap_err();
        assert_eq!((e.line, e.column), (3, 12));
        assert!(e.to_string().starts_with("3:12: limits.max_cant: "), "{e}");
        let e = sections_from_str("[optimize]\nthen_within = 1.5").unwrap_err();
        assert_eq!((e.field.as_str(), e.line), ("then_within", 2));
        let e = sections_from_str("[optimize]\nspeed = 1").unwrap_err();
        // An unknown key is placed on its own line.
        assert_eq!((e.section.as_str(), e.line), ("optimize", 2));
        let e = sections_from_str("[limits]\nside_force = \"-1 N\"").unwrap_err();
        assert_eq!(e.field, "side_force");
        assert_eq!(
            sections_from_str("name = \"x\"").unwrap(),
            Sections::default()
        );
        let s = sections_from_str(
            "[optimize]\nobjective = \"gas\"\nseed = 4\nmax_evals = 900\ntime_limit = \"2 min\"\n[limits]\nside_force = \"0.5 N\"",
        )
        .unwrap();
        assert_eq!(s.plan.objective.as_deref(), Some("gas"));
        assert_eq!((s.plan.seed, s.plan.max_evaluations), (Some(4), Some(900)));
        assert_eq!(s.plan.time_limit_s, Some(120.0));
        assert_eq!(s.limits.side_force_n, Some(0.5));
    }
}
