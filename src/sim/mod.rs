//! Closed-loop attitude simulation: rigid body, valves, tank in time, controllers
//! firing the same tables the firmware gets, cases from the layout, Monte Carlo.
//!
//! A run is reproducible from its design, case, settings and seed alone: the
//! gyro noise and every Monte Carlo draw come from a ChaCha8 stream seeded per
//! run (run i of seed S uses stream i of seed S), so results do not depend on the
//! number of threads.

pub mod body;
pub mod case;
pub mod feed;
pub mod metrics;
pub mod montecarlo;
pub mod plots;
pub mod report;
pub mod run;
pub mod tank;

pub use case::Case;
pub use run::{Plant, RunResult, Settings, SimError};

use crate::analysis::{analyze, Analysis};
use crate::model::Design;

/// Seed of the gyro noise of the nominal run.
pub const NOMINAL_NOISE_SEED: u64 = 1;

/// Simulate one case with its nominal values.
pub fn simulate(
    design: &Design,
    analysis: &Analysis,
    case: &Case,
    settings: &Settings,
) -> Result<RunResult, SimError> {
    let plant = Plant::new(design, analysis, case)?;
    Ok(run::run(
        &plant,
        &run::Draw::nominal(plant.port_names().len(), NOMINAL_NOISE_SEED),
        settings,
    ))
}

/// Hold time of a case, s: how long the vehicle holds within the case's pointing
/// requirement before the gas runs out or the requirement can no longer be met.
/// For ranking designs (the nominal run, no time series kept).
pub fn hold_time(design: &Design, case: &Case) -> Result<f64, SimError> {
    let analysis = analyze(design).map_err(|e| SimError::Setup {
        case: case.name.clone(),
        reason: e.to_string(),
    })?;
    let settings = Settings {
        record_series: false,
        ..Settings::default()
    };
    Ok(simulate(design, &analysis, case, &settings)?.hold_time_s)
}

#[cfg(test)]
mod tests;
