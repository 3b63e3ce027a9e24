//! A layout problem: a design, what may move, the rules and a merit, put together
//! as an [`Objective`] for the search.
//!
//! The merit comes from the caller through [`LayoutScore`]; the analysis layer
//! plugs in the real one (worst authority margin over axes and flight states).
//! A point that breaks a rule is scored by its penalty alone and the merit is not
//! computed, which saves the expensive part of the work for layouts that could be
//! built. [`optimize`] starts from the design as it is, runs the search and checks
//! the answer once more with the full list of violations before handing it back.

use super::constraints::{Constraints, Limits, Violation};
use super::search::{search, Objective, Outcome, Progress, Score, SearchError, SearchSettings};
use super::variables::{Freedom, VariableError, Variables};
use super::SectionError;
use crate::model::{Design, Port};
use std::sync::atomic::AtomicBool;
use thiserror::Error;

/// The caller's merit of a layout that meets every rule; higher is better.
pub trait LayoutScore: Sync {
    /// Per-worker working storage (effectiveness matrices, envelopes, ...).
    type Scratch: Send;
    /// Fresh working storage for one worker.
    fn scratch(&self) -> Self::Scratch;
    /// Merit of the ports (all of the design's ports, in the design's order).
    fn score(&self, ports: &[Port], scratch: &mut Self::Scratch) -> f64;
}

/// Working storage of one worker: a copy of the ports to write points into, and
/// the merit's own storage.
#[derive(Debug, Clone)]
pub struct LayoutScratch<T> {
    /// The design's ports with the current point written in.
    pub ports: Vec<Port>,
    /// The merit's storage.
    pub inner: T,
}

/// Why an optimisation gave no layout.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum OptimizeError {
    /// The freedoms do not fit the design.
    #[error(transparent)]
    Variables(#[from] VariableError),
    /// The limits are out of range.
    #[error(transparent)]
    Limits(#[from] SectionError),
    /// The search gave no answer.
    #[error(transparent)]
    Search(#[from] SearchError),
    /// The answer broke a rule on the final check (a bug if it ever happens).
    #[error("the optimised layout breaks {} rule(s): {}", .0.len(), .0.iter().map(|v| v.to_string()).collect::<Vec<_>>().join("; "))]
    Infeasible(Vec<Violation>),
}

/// Design, variables, rules and merit as one objective over the unit cube.
#[derive(Debug, Clone)]
pub struct LayoutProblem<S> {
    ports: Vec<Port>,
    variables: Variables,
    constraints: Constraints,
    scorer: S,
}

impl<S: LayoutScore> LayoutProblem<S> {
    /// Check the freedoms and limits against the design.
    pub fn new(
        design: &Design,
        freedoms: &[Freedom],
        limits: Limits,
        scorer: S,
    ) -> Result<Self, OptimizeError> {
        Ok(LayoutProblem {
            ports: design.ports.clone(),
            variables: Variables::new(design, freedoms)?,
            constraints: Constraints::new(&design.airframe, limits)?,
            scorer,
        })
    }

    /// The decision variables.
    pub fn variables(&self) -> &Variables {
        &self.variables
    }

    /// The rules.
    pub fn constraints(&self) -> &Constraints {
        &self.constraints
    }

    /// The merit.
    pub fn scorer(&self) -> &S {
        &self.scorer
    }

    /// The point of the design as given (see [`Variables::encode`]).
    pub fn start(&self) -> Vec<f64> {
        self.variables.encode(&self.ports)
    }

    /// The ports at point `x`.
    pub fn ports_at(&self, x: &[f64]) -> Vec<Port> {
        let mut ports = self.ports.clone();
        self.variables.write(x, &mut ports);
        ports
    }

    /// Every rule the ports at `x` break.
    pub fn violations_at(&self, x: &[f64]) -> Vec<Violation> {
        self.constraints.violations(&self.ports_at(x))
    }
}

impl<S: LayoutScore> Objective for LayoutProblem<S> {
    type Scratch = LayoutScratch<S::Scratch>;

    fn dimension(&self) -> usize {
        self.variables.dimension()
    }

    fn scratch(&self) -> Self::Scratch {
        LayoutScratch {
            ports: self.ports.clone(),
            inner: self.scorer.scratch(),
        }
    }

    fn evaluate(&self, x: &[f64], scratch: &mut Self::Scratch) -> Score {
        self.variables.write(x, &mut scratch.ports);
        let penalty = self.constraints.penalty(&scratch.ports);
        if penalty > 0.0 {
            Score::infeasible(penalty)
        } else {
            Score::feasible(self.scorer.score(&scratch.ports, &mut scratch.inner))
        }
    }
}

/// An optimised layout.
#[derive(Debug, Clone)]
pub struct LayoutResult {
    /// The design with the ports moved.
    pub design: Design,
    /// What the search did (best point, scores, history).
    pub outcome: Outcome,
}

impl LayoutResult {
    /// Score of the design as it was given.
    pub fn start_score(&self) -> Score {
        self.outcome.start_scores[0]
    }
}

/// Move the design's ports within the freedoms to maximise `scorer`, never breaking
/// the limits. The design as given is the first point tried, so the answer scores
/// at least as well as it (when it is feasible). `stop` is polled between batches;
/// `progress` is called on this thread after each one.
pub fn optimize<S: LayoutScore>(
    design: &Design,
    freedoms: &[Freedom],
    limits: Limits,
    scorer: S,
    settings: &SearchSettings,
    stop: &AtomicBool,
    progress: &mut dyn FnMut(&Progress),
) -> Result<LayoutResult, OptimizeError> {
    let problem = LayoutProblem::new(design, freedoms, limits, scorer)?;
    let start = problem.start();
    let outcome = search(&problem, &[start], settings, stop, progress)?;
    let ports = problem.ports_at(&outcome.x);
    let violations = problem.constraints.violations(&ports);
    if !violations.is_empty() {
        return Err(OptimizeError::Infeasible(violations));
    }
    let mut out = design.clone();
    out.ports = ports;
    Ok(LayoutResult {
        design: out,
        outcome,
    })
}
