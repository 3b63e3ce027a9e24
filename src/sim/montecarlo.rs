//! Monte Carlo over the case's spreads: N runs, each with its own seeded stream,
//! in parallel; percentiles of every figure.

use super::run::{run, Draw, Plant, RunResult, Settings};
use rand_chacha::rand_core::SeedableRng;
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;
use serde::Serialize;

/// Percentiles of one figure over the runs.
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct Percentiles {
    /// Figure name with its unit.
    pub figure: String,
    /// Runs that had the figure.
    pub runs: usize,
    /// 5th percentile.
    pub p5: f64,
    /// Median.
    pub p50: f64,
    /// 95th percentile.
    pub p95: f64,
    /// Smallest.
    pub min: f64,
    /// Largest.
    pub max: f64,
}

/// The Monte Carlo summary.
#[derive(Debug, Clone, Serialize, PartialEq)]
pub struct MonteCarlo {
    /// Case.
    pub case: String,
    /// Runs.
    pub runs: usize,
    /// Seed.
    pub seed: u64,
    /// Percentiles of each figure.
    pub figures: Vec<Percentiles>,
    /// Share of runs that held to the end of the case.
    pub held_to_end_share: f64,
}

/// Percentile by linear interpolation between order statistics (the "type 7"
/// definition, the default of R and NumPy).
pub fn percentile(sorted: &[f64], p: f64) -> f64 {
    if sorted.is_empty() {
        return 0.0;
    }
    let h = (sorted.len() - 1) as f64 * p;
    let i = h.floor() as usize;
    let j = (i + 1).min(sorted.len() - 1);
    sorted[i] + (h - i as f64) * (sorted[j] - sorted[i])
}

fn stats(name: &str, mut v: Vec<f64>) -> Option<Percentiles> {
    v.retain(|x| x.is_finite());
    if v.is_empty() {
        return None;
    }
    v.sort_by(|a, b| a.total_cmp(b));
    Some(Percentiles {
        figure: name.to_string(),
        runs: v.len(),
        p5: percentile(&v, 0.05),
        p50: percentile(&v, 0.5),
        p95: percentile(&v, 0.95),
        min: v[0],
        max: v[v.len() - 1],
    })
}

/// The draw of run `i` of seed `seed`.
pub fn draw_of(plant: &Plant, seed: u64, i: u64) -> Draw {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    rng.set_stream(i);
    Draw::sample(plant, &mut rng)
}

/// Run `runs` draws of the plant's case.
pub fn monte_carlo(plant: &Plant, runs: usize, seed: u64) -> (MonteCarlo, Vec<RunResult>) {
    let settings = Settings {
        record_series: false,
        ..Settings::default()
    };
    let results: Vec<RunResult> = (0..runs as u64)
        .into_par_iter()
        .map(|i| {
            let mut r = run(plant, &draw_of(plant, seed, i), &settings);
            r.samples = Vec::new();
            r
        })
        .collect();
    let mut figures = Vec::new();
    let mut push = |name: &str, v: Vec<f64>| {
        if let Some(p) = stats(name, v) {
            figures.push(p);
        }
    };
    push(
        "hold_time_s",
        results.iter().map(|r| r.hold_time_s).collect(),
    );
    push(
        "gas_used_kg",
        results.iter().map(|r| r.gas_used_kg).collect(),
    );
    for k in 0..3 {
        let axis = super::run::axis_names()[k];
        if !plant.case().mount.free_axes()[k] {
            continue;
        }
        let pick = |f: &dyn Fn(&super::run::AxisResult) -> Option<f64>| -> Vec<f64> {
            results
                .iter()
                .filter_map(|r| r.axes.get(k).and_then(f))
                .collect()
        };
        push(
            &format!("{axis}.limit_cycle_amplitude_rad"),
            pick(&|a| a.limit_cycle_amplitude_rad),
        );
        push(
            &format!("{axis}.limit_cycle_period_s"),
            pick(&|a| a.limit_cycle_period_s),
        );
        push(
            &format!("{axis}.settling_time_s"),
            pick(&|a| a.settling_time_s),
        );
        push(
            &format!("{axis}.peak_rate_rad_s"),
            pick(&|a| Some(a.peak_rate_rad_s)),
        );
    }
    let held = results
        .iter()
        .filter(|r| r.hold_end.starts_with("held to the end"))
        .count();
    (
        MonteCarlo {
            case: plant.case().name.clone(),
            runs,
            seed,
            figures,
            held_to_end_share: if runs > 0 {
                held as f64 / runs as f64
            } else {
                0.0
            },
        },
        results,
    )
}
