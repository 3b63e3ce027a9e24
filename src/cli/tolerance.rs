//! `portwright tolerance`: sample as-built vehicles and report the spreads, the
//! sensitivities and (with `[[measured]]` ports) measured against designed.

use anyhow::{anyhow, bail, Context, Result};
use portwright::asbuilt::measured;
use portwright::asbuilt::report::{render_text, tolerance_report, SpreadSettings, ToleranceReport};
use portwright::layout;
use std::path::Path;

/// The report and the run behind it.
pub struct Outcome {
    /// The report.
    pub report: ToleranceReport,
    /// Everything sampled.
    pub run: portwright::asbuilt::report::SpreadRun,
    /// The design used (as built when ports are measured).
    pub design: portwright::model::Design,
}

/// Read the layout, sample, compare measured ports.
pub fn run(path: &Path, samples: usize, seed: u64) -> Result<Outcome> {
    let name = path.display().to_string();
    // The same bounded, UTF-8-checked read as every other command.
    let text = layout::read_text(path)?;
    let design = layout::parse_str(&text, &name)?;
    let sections = layout::asbuilt_sections(&text, &name, &design)?;
    let Some(spec) = sections.tolerances else {
        bail!("{name}: the layout has no [tolerances] section; add one (see the README) to say how far the build may stray from the drawing");
    };
    let analysis = portwright::analysis::analyze(&design)
        .with_context(|| format!("{name}: analysis failed"))?;
    let settings = SpreadSettings {
        samples,
        seed,
        ..SpreadSettings::default()
    };
    let (mut report, run) = tolerance_report(&design, &analysis, &spec, &settings)
        .map_err(|e| anyhow!("{name}: {e}"))?;
    if !sections.measured.is_empty() {
        let drawn = layout::parse_str_as_drawn(&text, &name)?;
        let drawn_analysis = portwright::analysis::analyze(&drawn)
            .with_context(|| format!("{name}: analysis of the drawn layout failed"))?;
        let (_, ports) =
            measured::apply(&drawn, &sections.measured).map_err(|e| anyhow!("{name}: {e}"))?;
        report.measured = Some(measured::compare(&drawn_analysis, &analysis, ports));
    }
    Ok(Outcome {
        report,
        run,
        design,
    })
}

/// Samples `run` draws from a layout's tolerances, and its seed.
pub const RUN_SAMPLES: usize = 2000;

/// For `run`: the spread when the layout has a `[tolerances]` section.
pub fn for_run(path: &Path) -> Result<Option<Outcome>> {
    let name = path.display().to_string();
    // The same bounded, UTF-8-checked read as every other command.
    let text = layout::read_text(path)?;
    let design = layout::parse_str(&text, &name)?;
    if layout::asbuilt_sections(&text, &name, &design)?
        .tolerances
        .is_none()
    {
        return Ok(None);
    }
    run(path, RUN_SAMPLES, 1).map(Some)
}

/// The text or JSON a run prints.
pub fn render(o: &Outcome, json: bool) -> Result<String> {
    Ok(if json {
        serde_json::to_string_pretty(&o.report)? + "\n"
    } else {
        render_text(&o.report)
    })
}

/// For `optimize`: the sampled as-built vehicles behind `margin@pN`, when the
/// objective asks for them (the layout must then have a `[tolerances]` section).
/// The draws use the search's seed and stay fixed for the whole search.
pub fn robust_margins(
    score: &portwright::analysis::score::MarginScore,
    text: &str,
    source: &str,
    design: &portwright::model::Design,
    analysis: &portwright::analysis::Analysis,
    seed: u64,
) -> Result<Option<std::sync::Arc<dyn portwright::analysis::score::SampledMargins>>> {
    if !score.needs_spread() {
        return Ok(None);
    }
    let sections = layout::asbuilt_sections(text, source, design)?;
    let Some(spec) = sections.tolerances else {
        bail!("{source}: the objective margin@pN samples as-built vehicles from a [tolerances] section, and this layout has none (see the README)");
    };
    let r = portwright::asbuilt::robust::RobustMargins::new(
        design,
        analysis,
        &spec,
        portwright::asbuilt::robust::DEFAULT_SAMPLES,
        seed,
    )
    .map_err(|e| anyhow!("{source}: {e}"))?;
    Ok(Some(std::sync::Arc::new(r)))
}
