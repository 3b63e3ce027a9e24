//! `portwright optimize`: move ports within their freedoms for the best worst-case margin.

use anyhow::{anyhow, bail, Result};
use indicatif::{ProgressBar, ProgressStyle};
use portwright::analysis::score::{MarginScore, Objective};
use portwright::analysis::{self, Analysis};
use portwright::export::plots::{best_so_far, convergence_svg, Convergence, PlotSettings, Sense};
use portwright::layout;
use portwright::model::Design;
use portwright::optimize::constraints::{Constraints, Limits};
use portwright::optimize::search::SearchSettings;
use portwright::optimize::{optimize, sections_from_str};
use std::fmt::Write;
use std::sync::atomic::AtomicBool;
use std::time::Duration;

/// What the command produced.
pub struct Optimised {
    /// The new layout text.
    pub layout_text: String,
    /// The report to print.
    pub report: String,
    /// Convergence plot.
    pub plot_svg: Option<String>,
}

fn worst(a: &Analysis) -> f64 {
    a.states
        .iter()
        .flat_map(|s| s.authority.iter().map(|x| x.margin))
        .fold(f64::INFINITY, f64::min)
}

/// Run the search and build the before/after report.
#[allow(clippy::too_many_arguments)]
pub fn run(
    text: &str,
    source: &str,
    seed: u64,
    max_evals: usize,
    time_limit: Option<f64>,
    objective: &str,
    json: bool,
    stop: &AtomicBool,
) -> Result<Optimised> {
    let objective = Objective::parse(objective).map_err(|e| anyhow!("--objective: {e}"))?;
    let design = layout::parse_str(text, source)?;
    let (freedoms, limits) = sections_from_str(text).map_err(|e| anyhow!("{source}: {e}"))?;
    let rules = limits;
    if freedoms.is_empty() {
        bail!("{source}: no [[freedom]] sections: say which ports may move and how far (see the README)");
    }
    let before = analysis::analyze(&design)?;
    let mut sizes: Vec<f64> = freedoms
        .iter()
        .filter_map(|f| f.hole_sizes_m.clone())
        .flatten()
        .collect();
    sizes.sort_by(f64::total_cmp);
    sizes.dedup();
    let scorer = MarginScore::new(&design, &before, &sizes)?.with_objective(objective);
    let settings = SearchSettings {
        seed,
        max_evaluations: max_evals,
        time_limit: time_limit.map(Duration::from_secs_f64),
        ..SearchSettings::default()
    };
    let bar = ProgressBar::new(max_evals as u64);
    bar.set_style(
        ProgressStyle::with_template("{bar:40} {pos}/{len} evaluations  {msg}")
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
    );
    let mut progress = |p: &portwright::optimize::search::Progress| {
        bar.set_position(p.evaluations as u64);
        let best = if p.best.is_feasible() {
            format!("worst margin {:.3}", p.best.merit)
        } else {
            "no feasible layout yet".to_string()
        };
        bar.set_message(format!(
            "{best}, {:.0} evaluations/s",
            p.evaluations_per_second
        ));
    };
    let result = optimize(
        &design,
        &freedoms,
        limits,
        scorer,
        &settings,
        stop,
        &mut progress,
    )?;
    bar.finish_and_clear();
    let new_text = layout::write::with_ports(text, &result.design.ports)?;
    // The written layout must read back and analyse like any other.
    let reread = layout::parse_str(&new_text, source)?;
    let after = analysis::analyze(&reread)?;
    let history: Vec<(f64, f64)> = result
        .outcome
        .history
        .iter()
        .map(|h| (h.evaluations as f64, h.best.merit))
        .collect();
    let plot_svg = if history.len() >= 2 {
        let scores: Vec<f64> = history.iter().map(|h| h.1).collect();
        let mut best = best_so_far(&scores, Sense::Maximise);
        for (b, h) in best.iter_mut().zip(&history) {
            b.0 = h.0;
        }
        convergence_svg(
            &Convergence {
                layout: design.name.clone(),
                score_label: "objective".to_string(),
                best,
            },
            &PlotSettings::default(),
        )
        .ok()
        .map(|p| p.svg)
    } else {
        None
    };
    let active = active_constraints(&reread, rules);
    let report = report(
        &design,
        &reread,
        &before,
        &after,
        &result.outcome,
        &active,
        json,
    )?;
    Ok(Optimised {
        layout_text: new_text,
        report,
        plot_svg,
    })
}

/// Rules that hold the optimum in place: those the layout would break if each
/// limit were tightened slightly (0.5 mm more margin, 1 % more spacing and edge
/// distance, 0.2° less cant, 0.2° wider plume). Freedom ranges are not listed.
fn active_constraints(design: &Design, limits: Limits) -> Vec<String> {
    let tight = Limits {
        margin_m: limits.margin_m + 0.5e-3,
        spacing_diameters: limits.spacing_diameters * 1.01,
        edge_distance_diameters: limits.edge_distance_diameters * 1.01,
        max_total_cant_rad: limits.max_total_cant_rad - 0.2f64.to_radians(),
        plume_half_angle_rad: limits.plume_half_angle_rad + 0.2f64.to_radians(),
        ..limits
    };
    match Constraints::new(&design.airframe, tight) {
        Ok(c) => c
            .violations(&design.ports)
            .iter()
            .map(|v| v.to_string())
            .collect(),
        Err(_) => Vec::new(),
    }
}

#[allow(clippy::too_many_arguments)]
fn report(
    design: &Design,
    new: &Design,
    before: &Analysis,
    after: &Analysis,
    outcome: &portwright::optimize::search::Outcome,
    active: &[String],
    json: bool,
) -> Result<String> {
    let moved: Vec<serde_json::Value> = design
        .ports
        .iter()
        .zip(&new.ports)
        .filter(|(a, b)| a.station_m != b.station_m || a.clock_rad != b.clock_rad || a.tangential_cant_rad != b.tangential_cant_rad || a.axial_cant_rad != b.axial_cant_rad || a.nozzle != b.nozzle)
        .map(|(a, b)| {
            serde_json::json!({
                "port": a.name,
                "station_change_m": b.station_m - a.station_m,
                "clock_change_rad": portwright::airframe::placement::wrap_angle(b.clock_rad - a.clock_rad),
                "tangential_cant_change_rad": b.tangential_cant_rad - a.tangential_cant_rad,
                "axial_cant_change_rad": b.axial_cant_rad - a.axial_cant_rad,
                "hole_before_m": a.nozzle.hole_diameter_m(),
                "hole_after_m": b.nozzle.hole_diameter_m(),
            })
        })
        .collect();
    let margins = |a: &Analysis| -> Vec<serde_json::Value> {
        a.states
            .iter()
            .map(|s| {
                serde_json::json!({
                    "state": s.name,
                    "margin": s.authority.iter().map(|x| x.margin).collect::<Vec<_>>(),
                    "angular_accel_rad_s2": s.authority.iter().map(|x| x.angular_accel_rad_s2).collect::<Vec<_>>(),
                    "gas_all_open_kg_s": s.ports.iter().map(|p| p.mass_flow_kg_s).sum::<f64>(),
                })
            })
            .collect()
    };
    if json {
        let v = serde_json::json!({
            "layout": design.name,
            "worst_margin_before": worst(before),
            "worst_margin_after": worst(after),
            "evaluations": outcome.evaluations,
            "stop": format!("{:?}", outcome.stop),
            "elapsed_s": outcome.elapsed.as_secs_f64(),
            "before": margins(before),
            "after": margins(after),
            "moved": moved,
            "active_constraints": active,
        });
        return Ok(serde_json::to_string_pretty(&v)? + "\n");
    }
    let mut s = String::new();
    let _ = writeln!(
        s,
        "optimised {}: worst margin {:.3} -> {:.3} ({} evaluations, {:.1} s, stopped: {:?})",
        design.name,
        worst(before),
        worst(after),
        outcome.evaluations,
        outcome.elapsed.as_secs_f64(),
        outcome.stop
    );
    let _ = writeln!(s, "margin per axis (roll, pitch, yaw), before -> after:");
    for (b, a) in before.states.iter().zip(&after.states) {
        let f = |st: &analysis::StateReport| {
            st.authority
                .iter()
                .map(|x| format!("{:.2}", x.margin))
                .collect::<Vec<_>>()
                .join(" ")
        };
        let _ = writeln!(s, "  {:<10} {}  ->  {}", b.name, f(b), f(a));
    }
    let _ = writeln!(s, "ports moved:");
    for (a, b) in design.ports.iter().zip(&new.ports) {
        if a.station_m == b.station_m
            && a.clock_rad == b.clock_rad
            && a.tangential_cant_rad == b.tangential_cant_rad
            && a.axial_cant_rad == b.axial_cant_rad
            && a.nozzle == b.nozzle
        {
            continue;
        }
        let _ = writeln!(
            s,
            "  {:<14} station {:+.1} mm, clock {:+.1} deg, tangential cant {:+.1} deg, axial cant {:+.1} deg, hole {:.2} -> {:.2} mm",
            a.name,
            (b.station_m - a.station_m) * 1e3,
            portwright::airframe::placement::wrap_angle(b.clock_rad - a.clock_rad).to_degrees(),
            (b.tangential_cant_rad - a.tangential_cant_rad).to_degrees(),
            (b.axial_cant_rad - a.axial_cant_rad).to_degrees(),
            a.nozzle.hole_diameter_m() * 1e3,
            b.nozzle.hole_diameter_m() * 1e3
        );
    }
    let _ = writeln!(
        s,
        "rules holding the optimum in place (would break if tightened slightly):"
    );
    if active.is_empty() {
        let _ = writeln!(
            s,
            "  none: the result sits inside every rule (only the freedom ranges bind)"
        );
    }
    for a in active {
        let _ = writeln!(s, "  {a}");
    }
    Ok(s)
}
