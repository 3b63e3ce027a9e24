//! Global search over the unit cube: differential evolution, then pattern search
//! from the best few points.
//!
//! The search knows nothing about rockets. An [`Objective`] scores a point
//! x ∈ [0, 1]^d with a [`Score`]: a merit to maximise and a violation that is zero
//! when every constraint holds. Points are ranked by Deb's feasibility rules: a
//! feasible point beats an infeasible one, two feasible points compare by merit,
//! two infeasible ones by violation. So the search reaches the feasible region
//! first and then climbs inside it, and a feasible point, once found, is never
//! given up for an infeasible one.
//!
//! Global stage: DE/rand/1/bin (or DE/current-to-best/1/bin) with F = 0.7, CR = 0.9
//! and a population of 10·d (at least 30, at most 200), started from the given
//! points plus a Latin hypercube sample. A mutant coordinate that leaves [0, 1] is
//! put halfway between its base vector's coordinate and the bound it crossed, so
//! bound-hugging optima stay reachable without piling points on the bound.
//!
//! Local stage: a compass (pattern) search from the best few distinct points of
//! the population, with a Hooke–Jeeves pattern move after each success; the step
//! halves when no poll point improves, and a start ends when its step falls below
//! a floor. All polls of all starts in one round are evaluated as one batch.
//!
//! Determinism: every random number is drawn on the calling thread before a
//! batch is evaluated; the batch is then scored in parallel (rayon) into fixed
//! slots, and results are taken in index order. The answer therefore depends on
//! the seed only, not on the number of threads. Time limits and the stop flag are
//! checked between batches and do make the stopping point depend on the clock.

use rand::Rng;
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::{Duration, Instant};
use thiserror::Error;

/// How good a point is.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Score {
    /// Value to maximise; only meaningful when `violation` is zero.
    pub merit: f64,
    /// Sum of scaled constraint violations, zero when the point is feasible.
    pub violation: f64,
}

impl Score {
    /// A feasible point with this merit.
    pub fn feasible(merit: f64) -> Self {
        Score {
            merit,
            violation: 0.0,
        }
    }

    /// An infeasible point with this much violation (its merit is not looked at).
    pub fn infeasible(violation: f64) -> Self {
        Score {
            merit: f64::NEG_INFINITY,
            violation,
        }
    }

    /// Whether every constraint holds.
    pub fn is_feasible(&self) -> bool {
        self.violation <= 0.0
    }

    /// Strictly better than `other` by Deb's feasibility rules.
    pub fn beats(&self, other: &Score) -> bool {
        match (self.is_feasible(), other.is_feasible()) {
            (true, true) => self.merit > other.merit,
            (true, false) => true,
            (false, true) => false,
            (false, false) => self.violation < other.violation,
        }
    }

    /// NaN merit counts as the worst merit, NaN violation as infinite violation,
    /// so a bad evaluation can never win a comparison.
    fn sanitized(self) -> Self {
        let violation = if self.violation.is_nan() {
            f64::INFINITY
        } else {
            self.violation.max(0.0)
        };
        let merit = if self.merit.is_nan() {
            f64::NEG_INFINITY
        } else {
            self.merit
        };
        Score { merit, violation }
    }
}

/// A function to maximise over [0, 1]^d, safe to call from several threads.
///
/// Each worker gets its own `Scratch`, made once per search, so an evaluation
/// need not allocate.
pub trait Objective: Sync {
    /// Per-worker working storage.
    type Scratch: Send;
    /// Number of coordinates d.
    fn dimension(&self) -> usize;
    /// Fresh working storage for one worker.
    fn scratch(&self) -> Self::Scratch;
    /// Score the point `x` (length d, every coordinate in [0, 1]).
    fn evaluate(&self, x: &[f64], scratch: &mut Self::Scratch) -> Score;
}

/// How DE builds a mutant vector.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Strategy {
    /// v = x_r1 + F·(x_r2 − x_r3): explores widely; the default.
    RandOneBin,
    /// v = x_i + F·(x_best − x_i) + F·(x_r1 − x_r2): converges faster, explores less.
    CurrentToBestOneBin,
}

/// Settings of the search. `Default` gives the stated parameter set.
#[derive(Debug, Clone, PartialEq)]
pub struct SearchSettings {
    /// Seed of the ChaCha8 random stream.
    pub seed: u64,
    /// Population size; 0 picks 10·d, kept within 30..=200.
    pub population: usize,
    /// Mutation strategy.
    pub strategy: Strategy,
    /// Differential weight F, in (0, 2]. Default 0.7: with F = 0.5 and 20 members
    /// the population was seen to stall on the 2-D Rosenbrock valley.
    pub weight: f64,
    /// Crossover rate CR, in [0, 1]. Default 0.9.
    pub crossover: f64,
    /// Most evaluations in all, both stages and the final re-check included.
    pub max_evaluations: usize,
    /// Wall-clock limit, if any.
    pub time_limit: Option<Duration>,
    /// Share of `max_evaluations` kept for the local stage, in [0, 1). Default 0.2.
    pub refine_share: f64,
    /// Number of distinct best points the local stage starts from. Default 3.
    pub refine_starts: usize,
    /// First pattern-search step, as a fraction of the cube's side. Default 0.05.
    pub refine_first_step: f64,
    /// A start ends when its step falls below this. Default 1e-7.
    pub refine_last_step: f64,
    /// The global stage ends early when every coordinate of the population lies
    /// within this spread. Default 1e-9.
    pub collapse_spread: f64,
}

impl Default for SearchSettings {
    fn default() -> Self {
        SearchSettings {
            seed: 1,
            population: 0,
            strategy: Strategy::RandOneBin,
            weight: 0.7,
            crossover: 0.9,
            max_evaluations: 20_000,
            time_limit: None,
            refine_share: 0.2,
            refine_starts: 3,
            refine_first_step: 0.05,
            refine_last_step: 1e-7,
            collapse_spread: 1e-9,
        }
    }
}

/// Which stage the search is in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Stage {
    /// Differential evolution.
    Global,
    /// Pattern search from the best points.
    Local,
}

/// What the progress callback is told after every batch.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Progress {
    /// Current stage.
    pub stage: Stage,
    /// Batches (generations or poll rounds) done so far.
    pub batch: usize,
    /// Evaluations done so far.
    pub evaluations: usize,
    /// Best score so far.
    pub best: Score,
    /// Evaluations per second since the search began.
    pub evaluations_per_second: f64,
}

/// One point of the convergence history.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HistoryPoint {
    /// Evaluations done.
    pub evaluations: usize,
    /// Best score at that moment.
    pub best: Score,
}

/// Why the search stopped.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StopReason {
    /// Every local start reached its smallest step.
    Converged,
    /// The evaluation budget was spent.
    EvaluationLimit,
    /// The time limit passed.
    TimeLimit,
    /// The stop flag was raised.
    Stopped,
}

impl StopReason {
    /// Plain words for reports.
    pub fn describe(self) -> &'static str {
        match self {
            StopReason::Converged => "converged",
            StopReason::EvaluationLimit => "evaluation budget spent",
            StopReason::TimeLimit => "time limit reached",
            StopReason::Stopped => "stopped on request",
        }
    }
}

/// The result of a search.
#[derive(Debug, Clone, PartialEq)]
pub struct Outcome {
    /// Best point found (feasible).
    pub x: Vec<f64>,
    /// Its score, as re-checked after the search.
    pub score: Score,
    /// Scores of the start points, in the order given.
    pub start_scores: Vec<Score>,
    /// Evaluations done, the re-check included.
    pub evaluations: usize,
    /// Why the search stopped.
    pub stop: StopReason,
    /// Best score after every batch.
    pub history: Vec<HistoryPoint>,
    /// Wall-clock time taken.
    pub elapsed: Duration,
}

/// Why a search gave no answer.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum SearchError {
    /// A setting is out of range.
    #[error("search setting `{field}`: {reason}")]
    BadSettings {
        /// The setting.
        field: &'static str,
        /// What is wrong.
        reason: String,
    },
    /// A start point has the wrong length.
    #[error("start point {index} has {found} coordinates, the problem has {expected}")]
    StartLength {
        /// Index of the start point.
        index: usize,
        /// Problem dimension.
        expected: usize,
        /// Length given.
        found: usize,
    },
    /// No point that meets every constraint was found.
    #[error("no layout meeting every constraint was found in {evaluations} evaluations (least violation {least_violation:.3e})")]
    NoFeasiblePoint {
        /// Evaluations done.
        evaluations: usize,
        /// Smallest violation seen.
        least_violation: f64,
    },
    /// The best point scored differently when checked again: the objective is not
    /// a pure function of x.
    #[error(
        "the best point scored {recorded:?} in the search but {rechecked:?} when checked again"
    )]
    Inconsistent {
        /// Score during the search.
        recorded: Score,
        /// Score on the re-check.
        rechecked: Score,
    },
}

/// Scores batches of points in parallel, one scratch per worker slot.
struct Evaluator<'a, O: Objective> {
    objective: &'a O,
    scratches: Vec<O::Scratch>,
    dimension: usize,
    evaluations: usize,
}

impl<'a, O: Objective> Evaluator<'a, O> {
    fn new(objective: &'a O) -> Self {
        let workers = rayon::current_num_threads().max(1);
        Evaluator {
            objective,
            scratches: (0..workers).map(|_| objective.scratch()).collect(),
            dimension: objective.dimension(),
            evaluations: 0,
        }
    }

    /// Score `points` (rows of length d, flat) into `out`.
    fn run(&mut self, points: &[f64], out: &mut [Score]) {
        let d = self.dimension.max(1);
        let n = out.len();
        debug_assert_eq!(points.len(), n * self.dimension);
        if n == 0 {
            return;
        }
        let chunk = n.div_ceil(self.scratches.len());
        let objective = self.objective;
        let dim = self.dimension;
        out.par_chunks_mut(chunk)
            .zip(self.scratches.par_iter_mut())
            .enumerate()
            .for_each(|(c, (scores, scratch))| {
                for (k, s) in scores.iter_mut().enumerate() {
                    let row = c * chunk + k;
                    let x = if dim == 0 {
                        &[][..]
                    } else {
                        &points[row * d..row * d + d]
                    };
                    *s = objective.evaluate(x, scratch).sanitized();
                }
            });
        self.evaluations += n;
    }
}

/// Index of the best score (lowest index on ties).
fn best_index(scores: &[Score]) -> usize {
    let mut b = 0;
    for (i, s) in scores.iter().enumerate() {
        if s.beats(&scores[b]) {
            b = i;
        }
    }
    b
}

/// The population the search picks for `dimension` coordinates when
/// [`SearchSettings::population`] is 0: 10·d, kept within 30..=200. A search
/// needs one more evaluation than this to run one generation.
pub fn population_for(dimension: usize) -> usize {
    (10 * dimension).clamp(30, 200)
}

fn check_settings(s: &SearchSettings, d: usize, starts: usize) -> Result<usize, SearchError> {
    let bad = |field: &'static str, reason: &str| {
        Err(SearchError::BadSettings {
            field,
            reason: reason.to_string(),
        })
    };
    if !(s.weight > 0.0 && s.weight <= 2.0) {
        return bad("weight", "the differential weight must be in (0, 2]");
    }
    if !(0.0..=1.0).contains(&s.crossover) {
        return bad("crossover", "the crossover rate must be in [0, 1]");
    }
    if !(0.0..1.0).contains(&s.refine_share) {
        return bad("refine_share", "must be in [0, 1)");
    }
    if !(s.refine_first_step > 0.0 && s.refine_first_step <= 1.0) {
        return bad("refine_first_step", "must be in (0, 1]");
    }
    if !(s.refine_last_step > 0.0 && s.refine_last_step <= s.refine_first_step) {
        return bad(
            "refine_last_step",
            "must be above zero and not above refine_first_step",
        );
    }
    if s.collapse_spread.is_nan() || s.collapse_spread < 0.0 {
        return bad("collapse_spread", "must be zero or more");
    }
    let population = if s.population == 0 {
        population_for(d)
    } else {
        s.population
    };
    if population < 5 {
        return bad("population", "DE needs at least 5 members");
    }
    let population = population.max(starts);
    if s.max_evaluations < population + 1 {
        return bad(
            "max_evaluations",
            &format!("must be above the population size ({population}) to run one generation"),
        );
    }
    Ok(population)
}

/// Shared bookkeeping: best point, history, stop rules, progress.
struct Run<'p> {
    started: Instant,
    best_x: Vec<f64>,
    best: Score,
    least_violation: f64,
    history: Vec<HistoryPoint>,
    batch: usize,
    progress: &'p mut dyn FnMut(&Progress),
}

impl Run<'_> {
    fn offer(&mut self, x: &[f64], s: Score) {
        self.least_violation = self.least_violation.min(s.violation);
        if s.beats(&self.best) {
            self.best = s;
            self.best_x.clear();
            self.best_x.extend_from_slice(x);
        }
    }

    fn after_batch(&mut self, stage: Stage, evaluations: usize) {
        self.batch += 1;
        self.history.push(HistoryPoint {
            evaluations,
            best: self.best,
        });
        let secs = self.started.elapsed().as_secs_f64();
        (self.progress)(&Progress {
            stage,
            batch: self.batch,
            evaluations,
            best: self.best,
            evaluations_per_second: if secs > 0.0 {
                evaluations as f64 / secs
            } else {
                0.0
            },
        });
    }
}

fn halted(settings: &SearchSettings, stop: &AtomicBool, started: Instant) -> Option<StopReason> {
    if stop.load(Ordering::Relaxed) {
        return Some(StopReason::Stopped);
    }
    match settings.time_limit {
        Some(limit) if started.elapsed() >= limit => Some(StopReason::TimeLimit),
        _ => None,
    }
}

/// Maximise `objective` from the given start points (each of length d; they are
/// always evaluated, and the answer scores at least as well as the best of them).
///
/// `stop` is polled between batches; when raised, the best point so far is
/// returned. `progress` is called on this thread after every batch.
pub fn search<O: Objective>(
    objective: &O,
    starts: &[Vec<f64>],
    settings: &SearchSettings,
    stop: &AtomicBool,
    progress: &mut dyn FnMut(&Progress),
) -> Result<Outcome, SearchError> {
    let d = objective.dimension();
    for (index, s) in starts.iter().enumerate() {
        if s.len() != d {
            return Err(SearchError::StartLength {
                index,
                expected: d,
                found: s.len(),
            });
        }
    }
    let np = check_settings(settings, d, starts.len())?;
    let mut rng = ChaCha8Rng::seed_from_u64(settings.seed);
    let mut eval = Evaluator::new(objective);
    let mut run = Run {
        started: Instant::now(),
        best_x: vec![0.5; d],
        best: Score::infeasible(f64::INFINITY),
        least_violation: f64::INFINITY,
        history: Vec::new(),
        batch: 0,
        progress,
    };
    // Keep one evaluation for the re-check at the end.
    let budget = settings.max_evaluations - 1;
    let global_budget = ((budget as f64) * (1.0 - settings.refine_share)).round() as usize;
    let global_budget = global_budget.clamp(np, budget);

    // Initial population: the starts, then a Latin hypercube sample.
    let mut pop = vec![0.0; np * d];
    for j in 0..d {
        let mut cells: Vec<usize> = (0..np).collect();
        for i in (1..np).rev() {
            cells.swap(i, rng.gen_range(0..=i));
        }
        for i in 0..np {
            pop[i * d + j] = (cells[i] as f64 + rng.gen::<f64>()) / np as f64;
        }
    }
    for (i, s) in starts.iter().enumerate() {
        for j in 0..d {
            pop[i * d + j] = if s[j].is_nan() {
                0.5
            } else {
                s[j].clamp(0.0, 1.0)
            };
        }
    }
    let mut scores = vec![Score::infeasible(f64::INFINITY); np];
    eval.run(&pop, &mut scores);
    for i in 0..np {
        run.offer(&pop[i * d..(i + 1) * d], scores[i]);
    }
    let start_scores = scores[..starts.len()].to_vec();
    run.after_batch(Stage::Global, eval.evaluations);

    let mut reason = halted(settings, stop, run.started);
    let mut trials = vec![0.0; np * d];
    let mut trial_scores = vec![Score::infeasible(f64::INFINITY); np];
    while reason.is_none() && eval.evaluations < global_budget && d > 0 {
        let count = np.min(global_budget - eval.evaluations);
        let b = best_index(&scores);
        for i in 0..count {
            let pick = |rng: &mut ChaCha8Rng, avoid: &[usize]| loop {
                let r = rng.gen_range(0..np);
                if !avoid.contains(&r) {
                    break r;
                }
            };
            let r1 = pick(&mut rng, &[i]);
            let r2 = pick(&mut rng, &[i, r1]);
            let r3 = pick(&mut rng, &[i, r1, r2]);
            let forced = rng.gen_range(0..d);
            let f = settings.weight;
            for j in 0..d {
                let target = pop[i * d + j];
                let cross = rng.gen::<f64>() < settings.crossover || j == forced;
                trials[i * d + j] = if cross {
                    let (base, v) = match settings.strategy {
                        Strategy::RandOneBin => {
                            let base = pop[r1 * d + j];
                            (base, base + f * (pop[r2 * d + j] - pop[r3 * d + j]))
                        }
                        Strategy::CurrentToBestOneBin => (
                            target,
                            target
                                + f * (pop[b * d + j] - target)
                                + f * (pop[r1 * d + j] - pop[r2 * d + j]),
                        ),
                    };
                    if v < 0.0 {
                        0.5 * base
                    } else if v > 1.0 {
                        0.5 * (base + 1.0)
                    } else {
                        v
                    }
                } else {
                    target
                };
            }
        }
        eval.run(&trials[..count * d], &mut trial_scores[..count]);
        for i in 0..count {
            let t = trial_scores[i];
            run.offer(&trials[i * d..(i + 1) * d], t);
            if !scores[i].beats(&t) {
                scores[i] = t;
                pop[i * d..(i + 1) * d].copy_from_slice(&trials[i * d..(i + 1) * d]);
            }
        }
        run.after_batch(Stage::Global, eval.evaluations);
        reason = halted(settings, stop, run.started);
        let collapsed = (0..d).all(|j| {
            let (lo, hi) = (0..np).fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), i| {
                (lo.min(pop[i * d + j]), hi.max(pop[i * d + j]))
            });
            hi - lo <= settings.collapse_spread
        });
        if collapsed {
            break;
        }
    }

    if reason.is_none() && d > 0 {
        reason = refine(&mut eval, &mut run, &pop, &scores, settings, stop, budget);
    }
    let stop_reason = reason.unwrap_or(if eval.evaluations >= budget {
        StopReason::EvaluationLimit
    } else {
        StopReason::Converged
    });

    // Re-check the answer with a fresh evaluation.
    let recorded = run.best;
    let mut again = [Score::infeasible(f64::INFINITY)];
    eval.run(&run.best_x, &mut again);
    let rechecked = again[0];
    if !recorded.is_feasible() || !rechecked.is_feasible() {
        if recorded.is_feasible() {
            return Err(SearchError::Inconsistent {
                recorded,
                rechecked,
            });
        }
        return Err(SearchError::NoFeasiblePoint {
            evaluations: eval.evaluations,
            least_violation: run.least_violation.min(rechecked.violation),
        });
    }
    Ok(Outcome {
        x: run.best_x,
        score: rechecked,
        start_scores,
        evaluations: eval.evaluations,
        stop: stop_reason,
        history: run.history,
        elapsed: run.started.elapsed(),
    })
}

/// One pattern-search start.
struct Climber {
    x: Vec<f64>,
    score: Score,
    step: f64,
    /// Last successful move, for the pattern point.
    moved: Option<Vec<f64>>,
    active: bool,
}

/// The local stage: compass search with pattern moves from the best distinct
/// population members, until every start converges, the budget ends or a stop rule fires.
fn refine<O: Objective>(
    eval: &mut Evaluator<'_, O>,
    run: &mut Run<'_>,
    pop: &[f64],
    scores: &[Score],
    settings: &SearchSettings,
    stop: &AtomicBool,
    budget: usize,
) -> Option<StopReason> {
    let d = eval.dimension;
    let mut order: Vec<usize> = (0..scores.len()).collect();
    // Stable sort by Deb's rules keeps the lowest index first among equals.
    order.sort_by(|&a, &b| {
        if scores[a].beats(&scores[b]) {
            std::cmp::Ordering::Less
        } else if scores[b].beats(&scores[a]) {
            std::cmp::Ordering::Greater
        } else {
            std::cmp::Ordering::Equal
        }
    });
    let mut climbers: Vec<Climber> = Vec::new();
    for &i in &order {
        if climbers.len() >= settings.refine_starts {
            break;
        }
        let x = &pop[i * d..(i + 1) * d];
        if climbers.iter().any(|c| c.x == x) {
            continue;
        }
        climbers.push(Climber {
            x: x.to_vec(),
            score: scores[i],
            step: settings.refine_first_step,
            moved: None,
            active: true,
        });
    }
    let mut points: Vec<f64> = Vec::new();
    let mut owners: Vec<usize> = Vec::new();
    let mut out: Vec<Score> = Vec::new();
    loop {
        if climbers.iter().all(|c| !c.active) {
            return None;
        }
        if eval.evaluations >= budget {
            return Some(StopReason::EvaluationLimit);
        }
        points.clear();
        owners.clear();
        for (ci, c) in climbers.iter().enumerate().filter(|(_, c)| c.active) {
            if let Some(m) = &c.moved {
                points.extend(c.x.iter().zip(m).map(|(x, m)| (x + m).clamp(0.0, 1.0)));
                owners.push(ci);
            }
            for j in 0..d {
                for sign in [1.0, -1.0] {
                    let start = points.len();
                    points.extend_from_slice(&c.x);
                    points[start + j] = (c.x[j] + sign * c.step).clamp(0.0, 1.0);
                    owners.push(ci);
                }
            }
        }
        let n = owners.len().min(budget - eval.evaluations);
        out.clear();
        out.resize(n, Score::infeasible(f64::INFINITY));
        eval.run(&points[..n * d], &mut out);
        let mut best_of: Vec<Option<usize>> = vec![None; climbers.len()];
        for k in 0..n {
            run.offer(&points[k * d..(k + 1) * d], out[k]);
            let c = owners[k];
            let current = best_of[c].map_or(climbers[c].score, |b| out[b]);
            if out[k].beats(&current) {
                best_of[c] = Some(k);
            }
        }
        let polled_all = n == owners.len();
        for (ci, c) in climbers.iter_mut().enumerate().filter(|(_, c)| c.active) {
            match best_of[ci] {
                Some(k) => {
                    let next = &points[k * d..(k + 1) * d];
                    c.moved = Some(next.iter().zip(&c.x).map(|(a, b)| a - b).collect());
                    c.x.copy_from_slice(next);
                    c.score = out[k];
                }
                None if polled_all => {
                    c.moved = None;
                    c.step *= 0.5;
                    if c.step < settings.refine_last_step {
                        c.active = false;
                    }
                }
                None => {}
            }
        }
        run.after_batch(Stage::Local, eval.evaluations);
        if let Some(r) = halted(settings, stop, run.started) {
            return Some(r);
        }
        if !polled_all {
            return Some(StopReason::EvaluationLimit);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::{PI, TAU};

    /// A standard test function on a box, mapped from the unit cube; minimised,
    /// so the merit is its negative.
    struct Bench {
        d: usize,
        lo: f64,
        hi: f64,
        f: fn(&[f64]) -> f64,
    }

    impl Objective for Bench {
        type Scratch = Vec<f64>;
        fn dimension(&self) -> usize {
            self.d
        }
        fn scratch(&self) -> Vec<f64> {
            vec![0.0; self.d]
        }
        fn evaluate(&self, x: &[f64], buf: &mut Vec<f64>) -> Score {
            for (b, u) in buf.iter_mut().zip(x) {
                *b = self.lo + (self.hi - self.lo) * u;
            }
            Score::feasible(-(self.f)(buf))
        }
    }

    impl Bench {
        fn point(&self, x: &[f64]) -> Vec<f64> {
            x.iter()
                .map(|u| self.lo + (self.hi - self.lo) * u)
                .collect()
        }
    }

    /// Sphere: Σ xᵢ², minimum 0 at the origin.
    fn sphere(x: &[f64]) -> f64 {
        x.iter().map(|v| v * v).sum()
    }

    /// Rosenbrock: Σ 100(xᵢ₊₁ − xᵢ²)² + (1 − xᵢ)², minimum 0 at (1, …, 1).
    fn rosenbrock(x: &[f64]) -> f64 {
        x.windows(2)
            .map(|w| 100.0 * (w[1] - w[0] * w[0]).powi(2) + (1.0 - w[0]).powi(2))
            .sum()
    }

    /// Rastrigin: 10n + Σ (xᵢ² − 10 cos 2πxᵢ), minimum 0 at the origin, many local minima.
    fn rastrigin(x: &[f64]) -> f64 {
        10.0 * x.len() as f64
            + x.iter()
                .map(|v| v * v - 10.0 * (TAU * v).cos())
                .sum::<f64>()
    }

    /// Ackley: minimum 0 at the origin.
    fn ackley(x: &[f64]) -> f64 {
        let n = x.len() as f64;
        let s1 = x.iter().map(|v| v * v).sum::<f64>() / n;
        let s2 = x.iter().map(|v| (TAU * v).cos()).sum::<f64>() / n;
        -20.0 * (-0.2 * s1.sqrt()).exp() - s2.exp() + 20.0 + std::f64::consts::E
    }

    fn quiet() -> impl FnMut(&Progress) {
        |_| {}
    }

    fn run(b: &Bench, settings: &SearchSettings) -> Outcome {
        search(b, &[], settings, &AtomicBool::new(false), &mut quiet()).expect("search succeeds")
    }

    #[test]
    fn sphere_in_five_dimensions_reaches_the_origin() {
        let b = Bench {
            d: 5,
            lo: -5.12,
            hi: 5.12,
            f: sphere,
        };
        let o = run(&b, &SearchSettings::default());
        // Pattern search ends at steps of 1e-7 of a 10.24 side: ~1e-6 per coordinate.
        for v in b.point(&o.x) {
            assert!(v.abs() < 1e-5, "coordinate {v}");
        }
        assert!(-o.score.merit < 1e-10, "f = {}", -o.score.merit);
    }

    #[test]
    fn rosenbrock_in_two_and_four_dimensions_reaches_one() {
        for d in [2, 4] {
            let b = Bench {
                d,
                lo: -2.048,
                hi: 2.048,
                f: rosenbrock,
            };
            let settings = SearchSettings {
                max_evaluations: 40_000,
                ..SearchSettings::default()
            };
            let o = run(&b, &settings);
            // The valley is flat along its floor: f < 1e-8 puts x within ~1e-3 of 1.
            assert!(-o.score.merit < 1e-8, "d = {d}: f = {}", -o.score.merit);
            for v in b.point(&o.x) {
                assert!((v - 1.0).abs() < 1e-3, "d = {d}: coordinate {v}");
            }
        }
    }

    #[test]
    fn rastrigin_in_three_dimensions_finds_the_global_minimum() {
        let b = Bench {
            d: 3,
            lo: -5.12,
            hi: 5.12,
            f: rastrigin,
        };
        let o = run(&b, &SearchSettings::default());
        // The nearest local minimum has f ≈ 0.995: below 1e-8 means the global basin.
        assert!(-o.score.merit < 1e-8, "f = {}", -o.score.merit);
    }

    #[test]
    fn ackley_in_two_dimensions_with_current_to_best() {
        let b = Bench {
            d: 2,
            lo: -32.768,
            hi: 32.768,
            f: ackley,
        };
        let settings = SearchSettings {
            strategy: Strategy::CurrentToBestOneBin,
            ..SearchSettings::default()
        };
        let o = run(&b, &settings);
        // Ackley grows like 20·0.2·√2·|x|/√2 near 0: f < 1e-4 means |x| < ~3e-5.
        assert!(-o.score.merit < 1e-4, "f = {}", -o.score.merit);
    }

    /// Sphere minimum placed at a corner of the box, to exercise the bound rule.
    #[test]
    fn optimum_on_a_bound_is_reached() {
        struct Corner;
        impl Objective for Corner {
            type Scratch = ();
            fn dimension(&self) -> usize {
                3
            }
            fn scratch(&self) {}
            fn evaluate(&self, x: &[f64], _: &mut ()) -> Score {
                Score::feasible(x[0] + x[1] - x[2])
            }
        }
        let o = search(
            &Corner,
            &[],
            &SearchSettings::default(),
            &AtomicBool::new(false),
            &mut quiet(),
        )
        .unwrap();
        assert_eq!(o.x, vec![1.0, 1.0, 0.0]);
    }

    /// Minimise a sphere centred at 0.8 subject to x₀ + x₁ ≤ 1: the answer is (0.5, 0.5)
    /// (projection of the centre onto the constraint line).
    struct Disc;
    impl Objective for Disc {
        type Scratch = ();
        fn dimension(&self) -> usize {
            2
        }
        fn scratch(&self) {}
        fn evaluate(&self, x: &[f64], _: &mut ()) -> Score {
            let over = x[0] + x[1] - 1.0;
            if over > 0.0 {
                Score::infeasible(over)
            } else {
                Score::feasible(-((x[0] - 0.8).powi(2) + (x[1] - 0.8).powi(2)))
            }
        }
    }

    #[test]
    fn constrained_optimum_on_the_boundary_is_found_and_feasible() {
        let o = search(
            &Disc,
            &[],
            &SearchSettings::default(),
            &AtomicBool::new(false),
            &mut quiet(),
        )
        .unwrap();
        assert!(o.score.is_feasible());
        assert!(o.x[0] + o.x[1] <= 1.0);
        // Along the line the merit is flat to second order: 1e-3 in x is 2e-6 in merit.
        assert!(
            (o.x[0] - 0.5).abs() < 1e-3 && (o.x[1] - 0.5).abs() < 1e-3,
            "{:?}",
            o.x
        );
    }

    #[test]
    fn no_feasible_point_is_an_error_value() {
        struct Never;
        impl Objective for Never {
            type Scratch = ();
            fn dimension(&self) -> usize {
                2
            }
            fn scratch(&self) {}
            fn evaluate(&self, x: &[f64], _: &mut ()) -> Score {
                Score::infeasible(1.0 + x[0])
            }
        }
        let settings = SearchSettings {
            max_evaluations: 500,
            ..SearchSettings::default()
        };
        let e = search(
            &Never,
            &[],
            &settings,
            &AtomicBool::new(false),
            &mut quiet(),
        )
        .unwrap_err();
        match e {
            SearchError::NoFeasiblePoint {
                evaluations,
                least_violation,
            } => {
                assert!(evaluations <= 500);
                assert!((least_violation - 1.0).abs() < 1e-3, "{least_violation}");
            }
            other => panic!("unexpected {other:?}"),
        }
    }

    #[test]
    fn same_seed_same_answer_with_one_or_two_threads() {
        let b = Bench {
            d: 4,
            lo: -5.12,
            hi: 5.12,
            f: rastrigin,
        };
        let settings = SearchSettings {
            seed: 42,
            max_evaluations: 3_000,
            ..SearchSettings::default()
        };
        let in_pool = |threads: usize| {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap();
            pool.install(|| run(&b, &settings))
        };
        let one = in_pool(1);
        let two = in_pool(2);
        assert_eq!(one.x, two.x);
        assert_eq!(one.score, two.score);
        assert_eq!(one.history, two.history);
        assert_eq!(one.evaluations, two.evaluations);
        let other_seed = SearchSettings {
            seed: 43,
            ..settings
        };
        assert_ne!(
            run(&b, &other_seed).history,
            one.history,
            "the seed must matter"
        );
    }

    #[test]
    fn budget_is_respected_and_start_is_never_beaten_by_the_answer() {
        let b = Bench {
            d: 3,
            lo: -5.12,
            hi: 5.12,
            f: rastrigin,
        };
        let start = vec![0.5, 0.5, 0.5]; // the global minimum itself
        let settings = SearchSettings {
            max_evaluations: 777,
            ..SearchSettings::default()
        };
        let o = search(
            &b,
            std::slice::from_ref(&start),
            &settings,
            &AtomicBool::new(false),
            &mut quiet(),
        )
        .unwrap();
        assert!(o.evaluations <= 777);
        assert_eq!(o.start_scores.len(), 1);
        assert!(!o.start_scores[0].beats(&o.score));
        assert_eq!(o.score.merit, 0.0);
        // History is monotone under Deb's rules.
        for w in o.history.windows(2) {
            assert!(!w[0].best.beats(&w[1].best));
            assert!(w[0].evaluations < w[1].evaluations);
        }
    }

    #[test]
    fn raised_stop_flag_returns_the_best_so_far() {
        let b = Bench {
            d: 2,
            lo: -5.12,
            hi: 5.12,
            f: sphere,
        };
        let stop = AtomicBool::new(false);
        let mut calls = 0;
        let mut progress = |p: &Progress| {
            calls += 1;
            assert!(p.evaluations > 0);
            if p.batch == 3 {
                stop.store(true, Ordering::Relaxed);
            }
        };
        let o = search(&b, &[], &SearchSettings::default(), &stop, &mut progress).unwrap();
        assert_eq!(o.stop, StopReason::Stopped);
        assert_eq!(calls, 3);
        assert_eq!(o.history.len(), 3);
        // Three batches of 30 plus the re-check.
        assert_eq!(o.evaluations, 91);
    }

    #[test]
    fn time_limit_stops_the_search() {
        let b = Bench {
            d: 2,
            lo: -5.12,
            hi: 5.12,
            f: sphere,
        };
        let settings = SearchSettings {
            time_limit: Some(Duration::ZERO),
            ..SearchSettings::default()
        };
        let o = run(&b, &settings);
        assert_eq!(o.stop, StopReason::TimeLimit);
        assert_eq!(o.history.len(), 1);
    }

    #[test]
    fn nan_scores_never_win() {
        struct Holes;
        impl Objective for Holes {
            type Scratch = ();
            fn dimension(&self) -> usize {
                1
            }
            fn scratch(&self) {}
            fn evaluate(&self, x: &[f64], _: &mut ()) -> Score {
                // NaN above 0.9, a peak at 0.9 otherwise.
                if x[0] > 0.9 {
                    Score::feasible(f64::NAN)
                } else {
                    Score::feasible((PI * x[0]).sin() - (x[0] - 0.9).abs())
                }
            }
        }
        let o = search(
            &Holes,
            &[],
            &SearchSettings::default(),
            &AtomicBool::new(false),
            &mut quiet(),
        )
        .unwrap();
        assert!(o.score.merit.is_finite());
        assert!(o.x[0] <= 0.9);
    }

    #[test]
    fn bad_settings_and_start_lengths_are_reported() {
        let b = Bench {
            d: 2,
            lo: 0.0,
            hi: 1.0,
            f: sphere,
        };
        let never = AtomicBool::new(false);
        let e = search(
            &b,
            &[vec![0.1]],
            &SearchSettings::default(),
            &never,
            &mut quiet(),
        )
        .unwrap_err();
        assert!(matches!(
            e,
            SearchError::StartLength {
                index: 0,
                expected: 2,
                found: 1
            }
        ));
        for s in [
            SearchSettings {
                weight: 0.0,
                ..SearchSettings::default()
            },
            SearchSettings {
                crossover: 1.5,
                ..SearchSettings::default()
            },
            SearchSettings {
                max_evaluations: 10,
                ..SearchSettings::default()
            },
            SearchSettings {
                population: 3,
                ..SearchSettings::default()
            },
        ] {
            assert!(matches!(
                search(&b, &[], &s, &never, &mut quiet()),
                Err(SearchError::BadSettings { .. })
            ));
        }
    }
}
