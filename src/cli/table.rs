//! `portwright table`: firmware allocation tables for one flight state.

use super::allocate::pick_state;
use super::TableFormat;
use anyhow::{anyhow, Result};
use portwright::allocation::onoff::OnOffOptions;
use portwright::analysis::Analysis;
use portwright::export::firmware::{render_c_header, render_csv, render_json};
use portwright::model::Design;

/// Build the tables and render them in the chosen format.
pub fn render(
    design: &Design,
    analysis: &Analysis,
    state: Option<&str>,
    format: TableFormat,
    grid: Option<usize>,
    fraction: f64,
    tolerance: f64,
) -> Result<String> {
    let st = pick_state(analysis, state)?;
    let options = OnOffOptions {
        fraction,
        tolerance,
        ..OnOffOptions::default()
    };
    let tables = portwright::export::bundle::state_tables(design, st, &options, grid)
        .map_err(|e| anyhow!(e))?;
    Ok(match format {
        TableFormat::C => render_c_header(&tables).map_err(|e| anyhow!("{e}"))?,
        TableFormat::Csv => render_csv(&tables),
        TableFormat::Json => render_json(&tables).map_err(|e| anyhow!("{e}"))?,
    })
}
