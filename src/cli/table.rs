//! `portwright table`: firmware allocation tables for one flight state.

use super::allocate::pick_state;
use super::TableFormat;
use anyhow::{anyhow, Result};
use portwright::allocation::onoff::OnOffOptions;
use portwright::allocation::Tolerances;
use portwright::analysis::{self, Analysis};
use portwright::export::firmware::{
    build_tables, render_c_header, render_csv, render_json, TableNames,
};
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
    let e = analysis::effectiveness(design, &st.mass, &st.ports).map_err(|e| anyhow!(e))?;
    let options = OnOffOptions {
        fraction,
        tolerance,
        coil_current_a: design.feed.valve.coil_current_a,
        ..OnOffOptions::default()
    };
    // Supply droop: thrust of each port with k valves open relative to one valve open.
    let droop: Vec<f64> = st
        .droop
        .iter()
        .map(|d| 1.0 - d.thrust_drop_fraction)
        .collect();
    let factor = move |k: usize| {
        if k == 0 {
            1.0
        } else {
            droop.get(k - 1).copied().unwrap_or(1.0)
        }
    };
    let names = TableNames {
        layout: design.name.clone(),
        flight_state: st.name.clone(),
    };
    let tables = build_tables(&e, &names, &options, &factor, &Tolerances::default(), grid)
        .map_err(|e| anyhow!("{e}"))?;
    Ok(match format {
        TableFormat::C => render_c_header(&tables).map_err(|e| anyhow!("{e}"))?,
        TableFormat::Csv => render_csv(&tables),
        TableFormat::Json => render_json(&tables).map_err(|e| anyhow!("{e}"))?,
    })
}
