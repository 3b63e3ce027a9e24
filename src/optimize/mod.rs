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

pub use constraints::{Breach, Constraints, Limits, Tolerances, Violation};
pub use problem::{
    optimize, LayoutProblem, LayoutResult, LayoutScore, LayoutScratch, OptimizeError,
};
pub use search::{
    search, HistoryPoint, Objective, Outcome, Progress, Score, SearchError, SearchSettings, Stage,
    StopReason, Strategy,
};
pub use stages::{optimize_stages, StageOutcome, StagedResult, StagedScore, StagedSettings};
pub use variables::{DrillSeries, Freedom, Span, Together, VariableError, Variables};

use thiserror::Error;

/// A setting of the rules out of range, naming the `[limits]` field it comes
/// from. The layout reader checks the same ranges with the field's place in the
/// file; this is the optimiser's own guard for callers that build [`Limits`]
/// in code.
#[derive(Debug, Clone, PartialEq, Error)]
#[error("{section}{}{field}: {message}", if .field.is_empty() { "" } else { "." })]
pub struct SectionError {
    /// Section, e.g. "limits".
    pub section: String,
    /// Field name (empty when the section as a whole is wrong).
    pub field: String,
    /// What is wrong and what was expected.
    pub message: String,
}

impl SectionError {
    /// A problem with `field` of `section`.
    pub fn new(section: &str, field: &str, message: impl Into<String>) -> Self {
        SectionError {
            section: section.to_string(),
            field: field.to_string(),
            message: message.into(),
        }
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
        let layout = crate::layout::parse_layout(&text, "heron-54.toml")
            .expect("the reader keeps the sections");
        let design = layout.design;
        let crate::layout::OptimizerSections {
            freedoms, limits, ..
        } = layout.optimizer;
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
        let layout = crate::layout::parse_layout(&text, "heron-54.toml").unwrap();
        let design = layout.design;
        let crate::layout::OptimizerSections {
            freedoms, limits, ..
        } = layout.optimizer;
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
}
