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
//! let mut f = Freedom::new(&["pitch-up", "pitch-down"], Together::Mirror);
//! f.station_m = Some(Span::new(0.25, 0.45));
//! let settings = SearchSettings { max_evaluations: 600, ..SearchSettings::default() };
//! let done = optimize(&design, &[f], Limits::default(), Aft, &settings,
//!                     &AtomicBool::new(false), &mut |_| {}).unwrap();
//! assert!((done.design.ports[0].station_m - 0.45).abs() < 1e-6);
//! ```

pub mod constraints;
pub mod problem;
pub mod search;
pub mod variables;

pub use constraints::{
    parse_limits, Breach, Constraints, Limits, LimitsFile, Tolerances, Violation,
};
pub use problem::{
    optimize, LayoutProblem, LayoutResult, LayoutScore, LayoutScratch, OptimizeError,
};
pub use search::{
    search, HistoryPoint, Objective, Outcome, Progress, Score, SearchError, SearchSettings, Stage,
    StopReason, Strategy,
};
pub use variables::{
    parse_freedoms, DrillSeries, Freedom, FreedomFile, Span, Together, VariableError, Variables,
};

use thiserror::Error;

/// A problem in a `[[freedom]]` or `[limits]` section, naming the field.
#[derive(Debug, Clone, PartialEq, Error)]
#[error("{section}.{field}: {message}")]
pub struct SectionError {
    /// Section, e.g. "freedom[1]" or "limits".
    pub section: String,
    /// Field name (empty when the section as a whole is wrong).
    pub field: String,
    /// What is wrong and what was expected.
    pub message: String,
}

impl SectionError {
    pub(crate) fn new(section: &str, field: &str, message: impl Into<String>) -> Self {
        SectionError {
            section: section.to_string(),
            field: field.to_string(),
            message: message.into(),
        }
    }
}
