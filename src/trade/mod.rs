//! Trade study over the builder's own candidate parts: which combination of
//! valve, regulator (or regulator chain) and set pressure, tank and hole sizes
//! meets the requirements best, and what one part would need to be for the
//! design to work.
//!
//! - [`catalogue`]: the parts, in SI (read by `layout::parts`);
//! - [`combine`]: a combination's number and the design it makes;
//! - [`rules`]: named rules that reject a combination;
//! - [`evaluate`]: the real analysis of one combination and its figures, with
//!   the hold-time slot for the simulation;
//! - [`hold`]: the slot filled by the closed-loop simulation of one case;
//! - [`pareto`]: the dominance rule, the Pareto set and its brute-force check;
//! - [`study`]: every combination or a seeded search, in parallel;
//! - [`what_it_takes`]: the least value of one property by bracketing and bisection;
//! - [`plots`]: the Pareto set and the sweeps as SVG.

pub mod catalogue;
pub mod combine;
pub mod evaluate;
pub mod fast;
pub mod hold;
pub mod pareto;
pub mod plots;
pub mod report;
pub mod rules;
pub mod study;
pub mod what_it_takes;

pub use catalogue::Catalogue;
pub use combine::Choice;
pub use study::{Study, StudySettings};

use crate::model::Design;
use evaluate::HoldTime;
use what_it_takes::{WhatItTakes, WhatSettings};

/// The combination "what would it take" holds fixed: the lightest one meeting
/// every requirement, else the accepted one with the largest requirement slack
/// (ties: catalogue order); `None` when every combination broke a rule.
pub fn basis(study: &Study) -> Option<usize> {
    study.lightest.or_else(|| {
        let mut best: Option<(usize, f64)> = None;
        for (i, e) in study.evaluated.iter().enumerate() {
            if let Some(m) = e.metrics() {
                if best.is_none_or(|(_, s)| m.slack > s) {
                    best = Some((i, m.slack));
                }
            }
        }
        best.map(|b| b.0)
    })
}

/// The whole trade study: the combinations, then "what would it take" for every
/// property around [`basis`].
pub fn run(
    base: &Design,
    cat: &Catalogue,
    settings: &StudySettings,
    what: &WhatSettings,
    hold: Option<&dyn HoldTime>,
) -> (Study, Vec<WhatItTakes>) {
    let study = study::run(base, cat, settings, hold);
    let whats = match basis(&study) {
        Some(i) => {
            let choice = study.evaluated[i].choice.clone();
            what_it_takes::properties(cat)
                .into_iter()
                .map(|p| what_it_takes::what_it_takes(base, cat, &choice, p, what, hold))
                .collect()
        }
        None => Vec::new(),
    };
    (study, whats)
}

#[cfg(test)]
mod tests;
