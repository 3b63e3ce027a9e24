//! As built, not as drawn: what hand-drilling and part-to-part scatter do to a
//! design, which tolerance matters, a robust objective for the optimiser, and
//! measured ports fed back into every command.
//!
//! - [`spec`] holds tolerances as spreads (uniform ± or normal σ) on the inputs;
//! - [`vehicle`] holds the design reduced for sampling, and one as-built vehicle;
//! - [`sampling`] holds seeded, parallel Monte Carlo over as-built vehicles;
//! - [`onoff`] holds whether the firmware's on/off sets still meet their thresholds;
//! - [`sensitivity`] holds first-order sensitivities and variance shares;
//! - [`stats`] holds percentiles;
//! - [`report`] holds the `tolerance` report as plain data and as text;
//! - [`robust`] holds the `margin@pN` objective (common random numbers);
//! - [`measured`] holds measured ports replacing the drawn ones;
//! - [`plots`] holds variance-share bars and margin histograms.
//!
//! The layout reader hands a [`spec::ToleranceSpec`] and the measurements down;
//! nothing here reads files or prints.

pub mod measured;
pub mod onoff;
pub mod plots;

pub mod report;
pub mod robust;

pub mod sampling;
pub mod sensitivity;
pub mod spec;
pub mod stats;
pub mod vehicle;

use thiserror::Error;

/// Why an as-built analysis could not be made.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum AsBuiltError {
    /// The flow or allocation model failed on the nominal design.
    #[error("{0}")]
    Model(String),
    /// A setting is out of range.
    #[error("{0}")]
    Setting(String),
}

#[cfg(test)]
mod tests;
