//! The robust objective `margin@pN`: a low percentile of the worst margin over
//! sampled as-built vehicles.
//!
//! The deviations are drawn once, when the objective is built, and every
//! candidate layout is scored on the same draws (common random numbers): the
//! difference between two candidates is then the difference their geometry
//! makes, not sampling noise, and the search sees a function of the layout
//! alone. The deviations apply to whatever ports the candidate has (a moved
//! hole keeps its station error), and thrusts scale from the candidate's own
//! nominal thrust (a different drill size included) by the same response
//! surface as the `tolerance` command. Ray limits are the free ones (no
//! side-force limit) whatever the optimiser's side-force rule.

use super::spec::ToleranceSpec;
use super::stats::percentile;
use super::vehicle::{Applied, Basis};
use super::AsBuiltError;
use crate::analysis::score::{SampledMargins, StateInputs};
use crate::analysis::Analysis;
use crate::model::{Design, Port};

/// Samples per candidate unless the caller says otherwise.
pub const DEFAULT_SAMPLES: usize = 64;

/// Fixed draws of as-built deviations for scoring candidate layouts.
#[derive(Debug, Clone)]
pub struct RobustMargins {
    basis: Basis,
    draws: Vec<Vec<f64>>,
}

impl RobustMargins {
    /// Draw `samples` as-built vehicles of `design` under `spec` with `seed`.
    pub fn new(
        design: &Design,
        analysis: &Analysis,
        spec: &ToleranceSpec,
        samples: usize,
        seed: u64,
    ) -> Result<Self, AsBuiltError> {
        if samples < 2 {
            return Err(AsBuiltError::Setting(
                "the robust objective needs at least 2 samples".to_string(),
            ));
        }
        let basis = Basis::new(design, analysis, spec)?;
        let draws = (0..samples as u64).map(|i| basis.draw(seed, i)).collect();
        Ok(Self { basis, draws })
    }

    /// Worst margin of `ports` on each sampled vehicle, in sample order.
    pub fn worst_margins(&self, ports: &[Port], thrust_n: &[Vec<f64>]) -> Vec<f64> {
        let mut a = Applied::default();
        self.draws
            .iter()
            .map(|d| self.basis.worst_margin(ports, thrust_n, d, &mut a))
            .collect()
    }
}

impl SampledMargins for RobustMargins {
    fn margin_percentile(&self, ports: &[Port], states: &[StateInputs], p: f64) -> f64 {
        let thrust: Vec<Vec<f64>> = states.iter().map(|s| s.thrust_n.clone()).collect();
        let mut m = self.worst_margins(ports, &thrust);
        // Nothing required anywhere gives infinite margins; score that as the
        // best possible finite value so the search can still compare.
        for v in &mut m {
            if !v.is_finite() {
                *v = f64::MAX;
            }
        }
        percentile(&mut m, p).unwrap_or(0.0)
    }
}
