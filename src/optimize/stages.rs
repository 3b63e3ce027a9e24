//! Lexicographic optimisation, `A then B`: one search per stage, each later stage
//! starting from the answer before it and keeping every earlier stage at or above
//! its floor (its best less the allowed share).
//!
//! A later stage replaces the answer before it only when it improves its own value
//! by more than [`IMPROVEMENT_REL`] of that value's magnitude. Otherwise the earlier
//! answer is kept whole: giving up part of A for a B that is no better (equal, or
//! better only by round-off) would spend A's allowance for nothing.

use super::constraints::Limits;
use super::problem::{optimize, LayoutScore, OptimizeError};
use super::search::{Outcome, Progress, SearchSettings};
use super::variables::Freedom;
use crate::model::{Design, Port};
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::Duration;

/// Smallest relative gain of a later stage's value that replaces the earlier
/// answer: a millionth of a millionth above round-off of sums of a few thousand
/// terms (1e-9, common practice, no source).
pub const IMPROVEMENT_REL: f64 = 1e-9;

/// A merit made of ordered stages.
pub trait StagedScore {
    /// The merit of one stage, with floors on the earlier ones.
    type Stage: LayoutScore;
    /// Number of stages (at least 1).
    fn stage_count(&self) -> usize;
    /// Merit of stage `k`, each earlier stage j held at or above `floors[j]`.
    fn stage(&self, k: usize, floors: &[f64]) -> Self::Stage;
    /// Value of every stage for `ports`.
    fn stage_values(&self, ports: &[Port]) -> Vec<f64>;
    /// The floor a stage keeps in later stages, given the best it reached.
    fn floor(&self, best: f64) -> f64;
}

/// How the whole staged search may spend its effort.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StagedSettings {
    /// Seed of the first stage; stage k uses `seed + k`.
    pub seed: u64,
    /// Evaluations in all: each stage but the last gets an equal share, the last the rest.
    pub max_evaluations: usize,
    /// Wall-clock limit in all, shared equally between stages, s.
    pub time_limit_s: Option<f64>,
}

/// What one stage did.
#[derive(Debug, Clone)]
pub struct StageOutcome {
    /// The search.
    pub outcome: Outcome,
    /// Whether its answer was kept (false: it could not improve its value, so the
    /// answer before it stands).
    pub kept: bool,
}

/// The answer of a staged optimisation.
#[derive(Debug, Clone)]
pub struct StagedResult {
    /// The design with the ports moved.
    pub design: Design,
    /// One entry per stage run.
    pub stages: Vec<StageOutcome>,
}

/// Whether a later stage's value `new` improves on `old` by more than round-off.
pub fn improves(new: f64, old: f64) -> bool {
    new > old + IMPROVEMENT_REL * old.abs()
}

/// Run every stage of `scorer` in order. `progress(k, done, p)` is called after each
/// batch of stage k, with `done` the evaluations of the stages before it.
pub fn optimize_stages<S: StagedScore>(
    design: &Design,
    freedoms: &[Freedom],
    limits: Limits,
    scorer: &S,
    settings: StagedSettings,
    stop: &AtomicBool,
    progress: &mut dyn FnMut(usize, usize, &Progress),
) -> Result<StagedResult, OptimizeError> {
    let stages = scorer.stage_count().max(1);
    let mut current = design.clone();
    let mut floors = Vec::new();
    let mut out = Vec::new();
    let mut done = 0usize;
    for k in 0..stages {
        let budget = if k + 1 == stages {
            settings.max_evaluations.saturating_sub(done)
        } else {
            settings.max_evaluations / stages
        };
        let search = SearchSettings {
            seed: settings.seed.wrapping_add(k as u64),
            max_evaluations: budget.max(2),
            time_limit: settings
                .time_limit_s
                .map(|t| Duration::from_secs_f64(t / stages as f64)),
            ..SearchSettings::default()
        };
        let result = optimize(
            &current,
            freedoms,
            limits,
            scorer.stage(k, &floors),
            &search,
            stop,
            &mut |p| progress(k, done, p),
        )?;
        done += result.outcome.evaluations;
        let new = scorer.stage_values(&result.design.ports)[k];
        let kept = k == 0 || improves(new, scorer.stage_values(&current.ports)[k]);
        if kept {
            current = result.design;
        }
        floors.push(scorer.floor(scorer.stage_values(&current.ports)[k]));
        out.push(StageOutcome {
            outcome: result.outcome,
            kept,
        });
        if stop.load(Ordering::SeqCst) {
            break;
        }
    }
    Ok(StagedResult {
        design: current,
        stages: out,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::layout::parse_str;
    use crate::optimize::search::Score;
    use crate::optimize::variables::{Span, Together};

    const DEMO: &str = include_str!("../../layouts/heron-54.toml");

    /// Stand-in merit (not the authority model). Stage 0: the yaw pair's station,
    /// as far aft as allowed. Stage 1: the fixed pitch port's station, which the
    /// freedom cannot change, plus a round-off-sized reward (1e-14 m per metre) for
    /// moving the yaw pair fore: giving up stage 0 buys stage 1 nothing real.
    #[derive(Clone)]
    struct AftThenFixed {
        stage: usize,
        floors: Vec<f64>,
    }
    impl LayoutScore for AftThenFixed {
        type Scratch = ();
        fn scratch(&self) {}
        fn score(&self, p: &[Port], _: &mut ()) -> f64 {
            self.stage_values(p)[self.stage]
        }
        fn rate(&self, p: &[Port], _: &mut ()) -> Score {
            if self.floors.first().is_some_and(|&f| p[0].station_m < f) {
                return Score::infeasible(self.floors[0] - p[0].station_m);
            }
            Score::feasible(self.score(p, &mut ()))
        }
    }
    impl StagedScore for AftThenFixed {
        type Stage = Self;
        fn stage_count(&self) -> usize {
            2
        }
        fn stage(&self, k: usize, floors: &[f64]) -> Self {
            AftThenFixed {
                stage: k,
                floors: floors.to_vec(),
            }
        }
        fn stage_values(&self, p: &[Port]) -> Vec<f64> {
            vec![
                p[0].station_m,
                p[1].station_m + 1e-14 * (0.45 - p[0].station_m),
            ]
        }
        fn floor(&self, best: f64) -> f64 {
            best - 0.05 * best.abs()
        }
    }

    #[test]
    fn a_stage_that_cannot_improve_keeps_the_answer_before_it() {
        let d = parse_str(DEMO, "heron-54.toml").unwrap();
        let mut f = Freedom::new(&["yaw-neg", "yaw-pos"], Together::Mirror);
        f.station_m = Some(Span::new(0.25, 0.45));
        f.clock_rad = Some(Span::new(0.0, 0.3));
        let s = AftThenFixed {
            stage: 0,
            floors: vec![],
        };
        let settings = StagedSettings {
            seed: 4,
            max_evaluations: 2_000,
            time_limit_s: None,
        };
        let r = optimize_stages(
            &d,
            &[f.clone()],
            Limits::default(),
            &s,
            settings,
            &AtomicBool::new(false),
            &mut |_, _, _| {},
        )
        .unwrap();
        // Stage 0 alone, with its share of the evaluations.
        let one = optimize(
            &d,
            &[f],
            Limits::default(),
            s.stage(0, &[]),
            &SearchSettings {
                seed: 4,
                max_evaluations: 1_000,
                ..SearchSettings::default()
            },
            &AtomicBool::new(false),
            &mut |_| {},
        )
        .unwrap();
        assert_eq!(r.stages.len(), 2);
        assert!(!r.stages[1].kept);
        let key = |p: &[Port]| -> Vec<(f64, f64)> {
            p.iter().map(|q| (q.station_m, q.clock_rad)).collect()
        };
        assert_eq!(key(&r.design.ports), key(&one.design.ports));
    }

    #[test]
    fn improvement_needs_more_than_round_off() {
        assert!(!improves(1.0 + 1e-12, 1.0));
        assert!(improves(1.0 + 1e-6, 1.0));
        assert!(!improves(-1.0 - 1e-12, -1.0));
        assert!(improves(1e-300, 0.0));
    }
}
