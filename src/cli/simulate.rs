//! `portwright simulate`: fly the layout's cases in closed loop and write what was seen.

use super::values::UsageError;
use anyhow::{anyhow, bail, Context, Result};
use portwright::export::bundle::OutputFile;
use portwright::export::html::Section;
use portwright::layout;
use portwright::sim::montecarlo::{monte_carlo, MonteCarlo};
use portwright::sim::{self, Plant, RunResult, Settings};
use std::path::Path;

/// One simulated case.
pub struct CaseOutcome {
    /// The plant.
    pub plant: Plant,
    /// The nominal run.
    pub nominal: RunResult,
    /// Monte Carlo, when asked for.
    pub monte_carlo: Option<MonteCarlo>,
}

/// Read the layout, and run the cases (all, or the one named).
pub fn run(path: &Path, case: Option<&str>, runs: usize, seed: u64) -> Result<Vec<CaseOutcome>> {
    let name = path.display().to_string();
    let text = layout::read_text(path)?;
    let design = layout::parse_str(&text, &name)?;
    let cases = layout::case_sections(&text, &name, &design)?;
    if cases.is_empty() {
        bail!("{name}: the layout has no [[case]] section; add one (see the README) to say what to simulate");
    }
    let chosen: Vec<_> = match case {
        Some(c) => {
            let found: Vec<_> = cases
                .iter()
                .filter(|x| x.name.eq_ignore_ascii_case(c))
                .cloned()
                .collect();
            if found.is_empty() {
                let names: Vec<String> = cases.iter().map(|x| format!("`{}`", x.name)).collect();
                return Err(UsageError(format!(
                    "--case \"{c}\": the layout has no such case; it has {}",
                    names.join(", ")
                ))
                .into());
            }
            found
        }
        None => cases,
    };
    let analysis = portwright::analysis::analyze(&design)
        .with_context(|| format!("{name}: analysis failed"))?;
    let mut out = Vec::new();
    for c in &chosen {
        let plant = Plant::new(&design, &analysis, c).map_err(|e| anyhow!("{name}: {e}"))?;
        let nominal = sim::run::run(
            &plant,
            &sim::run::Draw::nominal(plant.port_names().len(), sim::NOMINAL_NOISE_SEED),
            &Settings::default(),
        );
        let monte_carlo = (runs > 0).then(|| monte_carlo(&plant, runs, seed).0);
        out.push(CaseOutcome {
            plant,
            nominal,
            monte_carlo,
        });
    }
    Ok(out)
}

/// The text or JSON printed.
pub fn render(cases: &[CaseOutcome], json: bool) -> Result<String> {
    if json {
        let list: Vec<_> = cases
            .iter()
            .map(|c| sim::report::summary(&c.plant, &c.nominal, c.monte_carlo.as_ref()))
            .collect();
        Ok(serde_json::to_string_pretty(&list)? + "\n")
    } else {
        Ok(cases
            .iter()
            .map(|c| sim::report::render_text(&c.plant, &c.nominal, c.monte_carlo.as_ref()))
            .collect::<Vec<_>>()
            .join("\n"))
    }
}

/// File-name stem of a case: lower case, letters and digits, words joined by `-`.
pub fn slug(name: &str) -> String {
    let mut s = String::new();
    for ch in name.chars() {
        if ch.is_ascii_alphanumeric() {
            s.push(ch.to_ascii_lowercase());
        } else if !s.ends_with('-') && !s.is_empty() {
            s.push('-');
        }
    }
    let s = s.trim_end_matches('-').to_string();
    if s.is_empty() {
        "case".to_string()
    } else {
        s
    }
}

/// The files of each case: `sim-SLUG.csv`, `sim-SLUG.json`, `sim-SLUG.txt` and the plots
/// (`sim-SLUG-PLOT.svg`), and the report sections for `run`.
pub fn files(cases: &[CaseOutcome]) -> Result<(Vec<OutputFile>, Vec<Section>)> {
    let mut files = Vec::new();
    let mut sections = Vec::new();
    for c in cases {
        let stem = format!("sim-{}", slug(&c.nominal.case));
        files.push(OutputFile {
            name: format!("{stem}.csv"),
            bytes: sim::report::render_csv(&c.plant, &c.nominal).into_bytes(),
        });
        let summary = sim::report::summary(&c.plant, &c.nominal, c.monte_carlo.as_ref());
        files.push(OutputFile {
            name: format!("{stem}.json"),
            bytes: (serde_json::to_string_pretty(&summary)? + "\n").into_bytes(),
        });
        files.push(OutputFile {
            name: format!("{stem}.txt"),
            bytes: sim::report::render_text(&c.plant, &c.nominal, c.monte_carlo.as_ref())
                .into_bytes(),
        });
        let plots = sim::plots::plots(&c.nominal, &c.plant)
            .map_err(|e| anyhow!("{}: {e}", c.nominal.case))?;
        for (p, svg) in &plots {
            files.push(OutputFile {
                name: format!("{stem}-{p}.svg"),
                bytes: svg.clone().into_bytes(),
            });
        }
        sections.push(sim::report::html_section(&c.plant, &c.nominal, &plots));
    }
    Ok((files, sections))
}

/// For `run`: the files and report sections of every case (none when the layout has no `[[case]]`).
pub fn for_run(path: &Path) -> Result<(Vec<OutputFile>, Vec<Section>)> {
    let name = path.display().to_string();
    let text = layout::read_text(path)?;
    let design = layout::parse_str(&text, &name)?;
    if layout::case_sections(&text, &name, &design)?.is_empty() {
        return Ok((Vec::new(), Vec::new()));
    }
    let cases = run(path, None, 0, 1)?;
    files(&cases)
}
