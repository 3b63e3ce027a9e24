//! The study: every combination when the catalogue is small, a search when it is
//! large; in parallel, with results that do not depend on the thread count.
//!
//! Exhaustive up to [`StudySettings::exhaustive_limit`] combinations. Beyond it,
//! a seeded search over the catalogue's grid: a random sample of distinct
//! combinations, then, round after round, every untried neighbour (one part
//! changed to the next or previous entry of its list) of the Pareto set and of
//! the lightest combination meeting every requirement, until no neighbour is
//! left untried or the evaluation budget is spent. Every batch is a sorted list
//! of combination numbers evaluated with rayon and collected in order, so the
//! same seed gives the same study on any number of threads. (The layout
//! optimiser in `optimize` moves continuous port coordinates; a catalogue is a
//! grid of discrete choices, so it gets its own neighbourhood search.)

use super::catalogue::Catalogue;
use super::combine::Choice;
use super::evaluate::{evaluate, Evaluated, HoldTime};
use super::fast::FastEvaluator;
use super::pareto::{self, Key, Resolution};
use super::rules::Rule;
use crate::model::Design;
use rand::{Rng, SeedableRng};
use rayon::prelude::*;
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet};

/// How the study runs.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StudySettings {
    /// Largest catalogue evaluated combination by combination.
    pub exhaustive_limit: u64,
    /// Evaluations a search may spend.
    pub search_budget: usize,
    /// Seed of the search's sample.
    pub seed: u64,
    /// Rounding before figures are compared.
    pub resolution: Resolution,
    /// Use the faster evaluation (`trade::fast`) when no hold-time source is given.
    pub fast: bool,
}

impl Default for StudySettings {
    /// Exhaustive up to 20 000 combinations (about a second per thousand on
    /// the demo layouts, see the README's performance table); a search of 4 000
    /// evaluations beyond; seed 1.
    fn default() -> Self {
        StudySettings {
            exhaustive_limit: 20_000,
            search_budget: 4_000,
            seed: 1,
            resolution: Resolution::default(),
            fast: true,
        }
    }
}

/// How the combinations were chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Method {
    /// Every combination.
    Exhaustive,
    /// A seeded neighbourhood search (the catalogue was too large).
    Search,
}

/// What the study found.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Study {
    /// Combinations the catalogue holds.
    pub combinations: u64,
    /// How they were chosen.
    pub method: Method,
    /// Every combination evaluated, in catalogue order.
    pub evaluated: Vec<Evaluated>,
    /// Positions in `evaluated` of the Pareto set, in listing order.
    pub pareto: Vec<usize>,
    /// Position in `evaluated` of the lightest combination meeting every
    /// requirement (ties: price, then catalogue order).
    pub lightest: Option<usize>,
    /// Whether hold time took part in the ranking (every accepted combination had one).
    pub with_hold_time: bool,
    /// How many combinations broke each rule (a combination may break several).
    pub rejections: BTreeMap<Rule, usize>,
}

fn evaluate_batch(
    base: &Design,
    cat: &Catalogue,
    indices: &[u64],
    hold: Option<&dyn HoldTime>,
    fast: Option<&FastEvaluator<'_>>,
) -> Vec<Evaluated> {
    indices
        .par_iter()
        .map(|&i| {
            let c = Choice::from_index(cat, i);
            match fast {
                Some(f) => f.evaluate(&c),
                None => evaluate(base, cat, &c, hold),
            }
        })
        .collect()
}

/// Pareto set and lightest over evaluated combinations (any order).
fn rank(evaluated: &[Evaluated], r: &Resolution) -> (Vec<usize>, Option<usize>, bool) {
    let accepted: Vec<usize> = (0..evaluated.len())
        .filter(|&i| evaluated[i].metrics().is_some())
        .collect();
    let with_hold = !accepted.is_empty()
        && accepted.iter().all(|&i| {
            evaluated[i]
                .metrics()
                .is_some_and(|m| m.hold_time_s.is_some())
        });
    let keys: Vec<(usize, Key)> = accepted
        .iter()
        .filter_map(|&i| {
            evaluated[i]
                .metrics()
                .map(|m| (i, pareto::key(m, r, with_hold)))
        })
        .collect();
    let plain: Vec<Key> = keys.iter().map(|k| k.1).collect();
    let front = pareto::pareto_set(&plain)
        .into_iter()
        .map(|p| keys[p].0)
        .collect();
    let lightest = keys
        .iter()
        .filter(|(i, _)| {
            evaluated[*i]
                .metrics()
                .is_some_and(|m| m.meets_requirements)
        })
        .min_by(|a, b| {
            (a.1[0], a.1[1], evaluated[a.0].index).cmp(&(b.1[0], b.1[1], evaluated[b.0].index))
        })
        .map(|k| k.0);
    (front, lightest, with_hold)
}

fn neighbours(cat: &Catalogue, index: u64) -> Vec<u64> {
    let radices = cat.radices();
    let digits = Choice::from_index(cat, index).digits();
    let mut out = Vec::new();
    for k in 0..digits.len() {
        for step in [-1i64, 1] {
            let v = digits[k] as i64 + step;
            if v >= 0 && (v as usize) < radices[k] {
                let mut d = digits.clone();
                d[k] = v as usize;
                out.push(Choice::from_digits(&d).index(cat));
            }
        }
    }
    out
}

/// Run the study of `cat` on the layout's design `base`.
pub fn run(
    base: &Design,
    cat: &Catalogue,
    settings: &StudySettings,
    hold: Option<&dyn HoldTime>,
) -> Study {
    let total = cat.combinations();
    let fast_evaluator = (settings.fast && hold.is_none()).then(|| FastEvaluator::new(base, cat));
    let fast = fast_evaluator.as_ref();
    let (method, mut evaluated) = if total <= settings.exhaustive_limit {
        let all: Vec<u64> = (0..total).collect();
        (
            Method::Exhaustive,
            evaluate_batch(base, cat, &all, hold, fast),
        )
    } else {
        let budget = settings.search_budget.max(1);
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(settings.seed);
        let mut tried = BTreeSet::new();
        let sample = (budget as u64 / 2).clamp(1, total) as usize;
        while tried.len() < sample {
            tried.insert(rng.gen_range(0..total));
        }
        let first: Vec<u64> = tried.iter().copied().collect();
        let mut evaluated = evaluate_batch(base, cat, &first, hold, fast);
        loop {
            let left = budget.saturating_sub(tried.len());
            if left == 0 {
                break;
            }
            let (front, lightest, _) = rank(&evaluated, &settings.resolution);
            let next: BTreeSet<u64> = front
                .iter()
                .chain(lightest.iter())
                .flat_map(|&p| neighbours(cat, evaluated[p].index))
                .filter(|i| !tried.contains(i))
                .collect();
            if next.is_empty() {
                break;
            }
            let batch: Vec<u64> = next.into_iter().take(left).collect();
            tried.extend(batch.iter().copied());
            evaluated.extend(evaluate_batch(base, cat, &batch, hold, fast));
        }
        evaluated.sort_by_key(|e| e.index);
        (Method::Search, evaluated)
    };
    evaluated.sort_by_key(|e| e.index);
    let (pareto, lightest, with_hold_time) = rank(&evaluated, &settings.resolution);
    let mut rejections = BTreeMap::new();
    for e in &evaluated {
        if let super::evaluate::Outcome::Rejected { breaches } = &e.outcome {
            for b in breaches {
                *rejections.entry(b.rule).or_insert(0) += 1;
            }
        }
    }
    Study {
        combinations: total,
        method,
        evaluated,
        pareto,
        lightest,
        with_hold_time,
        rejections,
    }
}
