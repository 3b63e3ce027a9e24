//! `portwright optimize`: move ports within their freedoms for the best objective
//! (by default the worst authority margin over axes and flight states).

use anyhow::{anyhow, bail, Result};
use indicatif::{ProgressBar, ProgressStyle};
use portwright::allocation::SideForceLimit;
use portwright::analysis;
use portwright::analysis::score::{MarginScore, Objective};
use portwright::export::plots::{best_so_far, convergence_svg, Convergence, PlotSettings, Sense};
use portwright::layout;
use portwright::layout::{Layout, OptimizerSections};
use portwright::model::Design;
use portwright::optimize::constraints::Constraints;
use portwright::optimize::search::Outcome;
use portwright::optimize::variables::DrillSeries;
use portwright::optimize::{optimize_stages, StagedSettings};
use portwright::report::optimize::{active_constraints, report, summarize, Notes};
use std::sync::atomic::AtomicBool;

/// What the command produced.
pub struct Optimised {
    /// The new layout text.
    pub layout_text: String,
    /// The report to print.
    pub report: String,
    /// Convergence plot.
    pub plot_svg: Option<String>,
}

/// Command-line settings; each one given overrides the layout's `[optimize]` or
/// `[limits]` section.
#[derive(Debug, Clone, Default)]
pub struct Options {
    /// Random seed.
    pub seed: Option<u64>,
    /// Largest number of evaluations in all.
    pub max_evals: Option<usize>,
    /// Wall-clock limit, s.
    pub time_limit: Option<f64>,
    /// Objective.
    pub objective: Option<Objective>,
    /// Lexicographic tolerance.
    pub then_within: Option<f64>,
    /// Side-force limit.
    pub side_force: Option<SideForceLimit>,
    /// Print JSON instead of text.
    pub json: bool,
}

/// Run the search and build the before/after report.
pub fn run(text: &str, source: &str, opts: &Options, stop: &AtomicBool) -> Result<Optimised> {
    let Layout {
        design,
        optimizer:
            OptimizerSections {
                freedoms,
                limits,
                plan,
            },
    } = layout::parse_layout(text, source)?;
    if freedoms.is_empty() {
        bail!("{source}: no [[freedom]] sections: say which ports may move and how far (see the README)");
    }
    // The layout reader has checked the file's objective and `then_within`;
    // the options were checked when the command line was read.
    let objective = opts
        .objective
        .clone()
        .or(plan.objective)
        .unwrap_or_default();
    let objective = match opts.then_within.or(plan.then_within) {
        Some(f) => objective
            .with_then_within(f)
            .map_err(|e| anyhow!("--then-within: {e}"))?,
        None => objective,
    };
    let side = opts
        .side_force
        .unwrap_or_else(|| SideForceLimit::from_newtons(limits.side_force_n));
    let seed = opts.seed.or(plan.seed).unwrap_or(1);
    let least = layout::optimizer::least_evaluations(&design, &freedoms, objective.stages.len());
    let max_evals = match opts.max_evals {
        Some(n) if n < least => {
            return Err(anyhow::Error::new(super::values::UsageError(format!(
                "--max-evals: expected at least {least} for these freedoms and this objective (one generation of the search: its population plus one, for each stage), found {n}"
            ))))
        }
        Some(n) => n,
        // The layout's budget was checked for its own objective; an objective from
        // the command line with more stages may need more.
        None => match plan.max_evaluations {
            Some(n) if n < least => {
                return Err(anyhow::Error::new(super::values::UsageError(format!(
                    "--objective: `{objective}` needs at least {least} evaluations (its population plus one, for each stage), but the layout's [optimize] max_evals is {n}; give --max-evals"
                ))))
            }
            Some(n) => n,
            None => 20_000usize.max(least),
        },
    };
    let time_limit = opts.time_limit.or(plan.time_limit_s);

    let before = analysis::analyze(&design)?;
    let mut sizes: Vec<f64> = freedoms
        .iter()
        .filter_map(|f| f.hole_sizes_m.clone())
        .flatten()
        .collect();
    sizes.sort_by(f64::total_cmp);
    sizes.dedup();
    let base = MarginScore::new(&design, &before, &sizes)?
        .with_objective(objective.clone())
        .with_side_force(side);
    let spread = super::tolerance::robust_margins(&base, text, source, &design, &before, seed)?;
    let base = match &spread {
        Some(s) => base.with_spread(s.clone()),
        None => base,
    };

    // One search per stage of the objective; later stages start from the earlier
    // answer, keep the earlier stages within `then_within` of their best, and are
    // kept only when they improve their own value.
    let stages = objective.stages.len();
    let bar = ProgressBar::new(max_evals as u64);
    bar.set_style(
        ProgressStyle::with_template("{bar:40} {pos}/{len} evaluations  {msg}")
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
    );
    let mut progress = |k: usize, done: usize, p: &portwright::optimize::search::Progress| {
        let label = if stages > 1 {
            format!("stage {}/{stages} ", k + 1)
        } else {
            String::new()
        };
        bar.set_position((done + p.evaluations) as u64);
        let best = if p.best.is_feasible() {
            format!("{label}best objective {:.4}", p.best.merit)
        } else {
            format!("{label}no feasible layout yet")
        };
        bar.set_message(format!(
            "{best}, {:.0} evaluations/s",
            p.evaluations_per_second
        ));
    };
    let staged = optimize_stages(
        &design,
        &freedoms,
        limits,
        &base,
        StagedSettings {
            seed,
            max_evaluations: max_evals,
            time_limit_s: time_limit,
        },
        stop,
        &mut progress,
    )?;
    bar.finish_and_clear();
    let current = staged.design;
    let kept: Vec<bool> = staged.stages.iter().map(|s| s.kept).collect();
    let outcomes: Vec<Outcome> = staged.stages.into_iter().map(|s| s.outcome).collect();

    let new_text = layout::write::with_ports_noted(text, &current.ports, DrillSeries::drill_name)?;
    // The file that is written is the file that is checked: read the exact text
    // back and check every rule on what it says.
    let reread = layout::parse_str(&new_text, source)?;
    let broken = Constraints::new(&reread.airframe, limits)?.violations(&reread.ports);
    if !broken.is_empty() {
        bail!(
            "the layout as written breaks {} rule(s), so it was not written: {}",
            broken.len(),
            broken
                .iter()
                .map(|v| v.to_string())
                .collect::<Vec<_>>()
                .join("; ")
        );
    }
    let after = analysis::analyze(&reread)?;
    let plot_svg = plot(&design, &objective, &outcomes[0]);
    let notes = Notes {
        active: active_constraints(&reread, limits),
        start_breaks: Constraints::new(&design.airframe, limits)?
            .violations(&design.ports)
            .iter()
            .map(|v| v.to_string())
            .collect(),
        kept,
    };
    let b = summarize(&design, &before, &objective, side, spread.clone())?;
    let a = summarize(&reread, &after, &objective, side, spread)?;
    let report = report(
        &design,
        &reread,
        (&b, &a),
        (&objective, side),
        &outcomes,
        &notes,
        opts.json,
    )?;
    Ok(Optimised {
        layout_text: new_text,
        report,
        plot_svg,
    })
}

/// Best objective against evaluations for the first (most important) stage.
fn plot(design: &Design, objective: &Objective, outcome: &Outcome) -> Option<String> {
    let history: Vec<(f64, f64)> = outcome
        .history
        .iter()
        .map(|h| (h.evaluations as f64, h.best.merit))
        .collect();
    if history.len() < 2 {
        return None;
    }
    let scores: Vec<f64> = history.iter().map(|h| h.1).collect();
    let mut best = best_so_far(&scores, Sense::Maximise);
    for (b, h) in best.iter_mut().zip(&history) {
        b.0 = h.0;
    }
    let first = Objective {
        stages: objective.stages[..1].to_vec(),
        ..objective.clone()
    };
    convergence_svg(
        &Convergence {
            layout: design.name.clone(),
            score_label: format!("objective ({first})"),
            best,
        },
        &PlotSettings::default(),
    )
    .ok()
    .map(|p| p.svg)
}
