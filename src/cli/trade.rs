//! `portwright trade`: read the layout and the parts file, run the study, and
//! hand back the report and its files (assembled by `portwright::trade::report`).

use super::values::UsageError;
use anyhow::Result;
use portwright::export::bundle::OutputFile;
use portwright::export::html::Section;
use portwright::layout::{self, parts};
use portwright::trade::report::{self, TradeReport};
use portwright::trade::what_it_takes::WhatSettings;
use portwright::trade::{self, StudySettings};
use std::path::{Path, PathBuf};

/// The report, its plots and the files they make.
pub struct Outcome {
    /// The report.
    pub report: TradeReport,
    /// Plots as (stem, caption, SVG).
    pub plots: Vec<(String, String, String)>,
    /// The parts file read.
    pub parts_path: PathBuf,
}

impl Outcome {
    /// Text or JSON, as printed.
    pub fn render(&self, json: bool) -> Result<String> {
        Ok(if json {
            serde_json::to_string_pretty(&self.report)? + "\n"
        } else {
            report::render_text(&self.report)
        })
    }

    /// Files for `--out` and for `run`.
    pub fn files(&self) -> Result<Vec<OutputFile>> {
        report::files(&self.report, &self.plots).map_err(|e| anyhow::anyhow!(e))
    }

    /// Sections for the HTML report of `run`.
    pub fn sections(&self) -> Vec<Section> {
        report::html_sections(&self.report, &self.plots)
    }
}

/// Read both files and run the study. `parts_arg` is `--parts`; without it the
/// layout's `[parts] file` is used.
/// `hold_case` is `--hold-case`: the `[[case]]` flown with each combination for its hold time.
pub fn run(
    path: &Path,
    parts_arg: Option<&Path>,
    settings: &StudySettings,
    hold_case: Option<&str>,
) -> Result<Outcome> {
    let name = path.display().to_string();
    let text = layout::read_text(path)?;
    let design = layout::parse_str(&text, &name)?;
    let section =
        parts::section(&text, &design).map_err(|problems| layout::LayoutError::Invalid {
            source_name: name.clone(),
            problems,
        })?;
    let Some(section) = section else {
        return Err(layout::locate::problem_at(
            &text,
            &name,
            "parts",
            "the layout has no [parts] section: add one saying where the valve block and the regulator sit (`valve_block = \"330 mm\"`, `regulator = \"370 mm\"`; see the README)".to_string(),
        )
        .into());
    };
    let parts_path = match (parts_arg, &section.file) {
        (Some(p), _) => p.to_path_buf(),
        (None, Some(f)) => parts::resolve(path, f),
        (None, None) => {
            return Err(UsageError(format!(
                "{name}: give the parts file with --parts, or name it in the layout's [parts] section (`file = \"parts.toml\"`)"
            ))
            .into())
        }
    };
    let hold = match hold_case {
        None => None,
        Some(c) => {
            let cases = layout::case_sections(&text, &name, &design)?;
            match cases.iter().find(|x| x.name.eq_ignore_ascii_case(c)) {
                Some(case) => Some(trade::hold::SimulatedHold { case: case.clone() }),
                None => {
                    let names: Vec<String> =
                        cases.iter().map(|x| format!("`{}`", x.name)).collect();
                    return Err(UsageError(format!(
                        "--hold-case \"{c}\": the layout has no such [[case]]; it has {}",
                        if names.is_empty() {
                            "none".to_string()
                        } else {
                            names.join(", ")
                        }
                    ))
                    .into());
                }
            }
        }
    };
    let cat = parts::load(&parts_path, &design, section.placement)?;
    let hold_source = hold.as_ref().map(|h| h as &dyn trade::evaluate::HoldTime);
    let (study, whats) = trade::run(
        &design,
        &cat,
        settings,
        &WhatSettings::default(),
        hold_source,
    );
    let basis = trade::basis(&study);
    let report = report::trade_report(&design, &cat, &study, &whats, basis);
    let plots = report::plots(&study, &whats, &cat.currency);
    Ok(Outcome {
        report,
        plots,
        parts_path,
    })
}

/// For `run`: the study when the layout has a `[parts]` section naming a parts file.
pub fn for_run(path: &Path) -> Result<Option<Outcome>> {
    let name = path.display().to_string();
    let text = layout::read_text(path)?;
    let design = layout::parse_str(&text, &name)?;
    match parts::section(&text, &design) {
        Ok(Some(s)) if s.file.is_some() => {
            run(path, None, &StudySettings::default(), None).map(Some)
        }
        _ => Ok(None),
    }
}
