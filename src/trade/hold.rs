//! Hold time from the closed-loop simulation: the trade study's hold-time slot
//! filled by flying one of the layout's `[[case]]` sections with each candidate.
//!
//! Each accepted combination is simulated once, nominally (no Monte Carlo, gyro
//! noise from the nominal seed), with the candidate's own mass properties, thrust,
//! valve delays and tank. The hold time is the case's: from settling until the gas
//! runs out or the pointing requirement is lost, and never longer than the case
//! lasts, so a case meant for ranking should last as long as the longest hold of
//! interest.

use super::evaluate::HoldTime;
use crate::analysis::Analysis;
use crate::model::Design;
use crate::sim::{simulate, Case, Settings};

/// Hold time of one named simulation case, per candidate design.
#[derive(Debug, Clone)]
pub struct SimulatedHold {
    /// The case flown with every candidate.
    pub case: Case,
}

impl HoldTime for SimulatedHold {
    fn hold_time_s(&self, design: &Design, analysis: &Analysis) -> Option<f64> {
        let settings = Settings {
            record_series: false,
            ..Settings::default()
        };
        simulate(design, analysis, &self.case, &settings)
            .ok()
            .map(|r| r.hold_time_s)
            .filter(|h| h.is_finite())
    }
}
