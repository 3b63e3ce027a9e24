//! Do the on/off valve sets of the firmware table, chosen for the vehicle as
//! drawn, still do their job on an as-built vehicle?
//!
//! The thresholds are those of the table search (`allocation::onoff`) computed
//! once on the nominal torque columns and kept fixed, because they are what the
//! firmware was built to expect: on a commanded axis a with sense σ the set
//! must give σ·τₐ ≥ fraction × best(a, σ), on an uncommanded axis |τₐ| ≤
//! tolerance × scaleₐ, with best and scale from the nominal columns and the
//! nominal supply droop f(k). The as-built torque of a set is f(k)·Σ τᵢ over
//! its open ports. Only rows that met every threshold as drawn are checked.

// Index loops here follow the formulas (axis k, input j, port i, pairs j < k).
#![allow(clippy::needless_range_loop)]

use crate::allocation::{OnOffOptions, Tolerances};
use crate::export::firmware::{FirmwareTables, OnOffOutcome};
use nalgebra::Vector3;

/// A row the table chose and that met its thresholds as drawn.
#[derive(Debug, Clone, PartialEq)]
pub struct CheckedRow {
    /// Command (roll, pitch, yaw), each −1, 0 or 1.
    pub command: [i8; 3],
    /// Open ports, bit i = port i.
    pub mask: u64,
}

/// The fixed thresholds of one flight state's table.
#[derive(Debug, Clone, PartialEq)]
pub struct OnOffCheck {
    /// Rows checked.
    pub rows: Vec<CheckedRow>,
    factor: Vec<f64>,
    best_pos: Vector3<f64>,
    best_neg: Vector3<f64>,
    scale: Vector3<f64>,
    noise: f64,
    fraction: f64,
    tolerance: f64,
}

impl OnOffCheck {
    /// From the nominal table, the nominal torque columns and the nominal droop
    /// factors (f(k) for k = 1, 2, ...).
    pub fn new(
        tables: &FirmwareTables,
        columns: &[Vector3<f64>],
        droop: &[f64],
        options: &OnOffOptions,
    ) -> OnOffCheck {
        let n = columns.len();
        let mut factor = vec![1.0; n + 1];
        for (k, f) in factor.iter_mut().enumerate().skip(1) {
            *f = droop.get(k - 1).copied().unwrap_or(1.0);
        }
        let mut best_pos = Vector3::zeros();
        let mut best_neg = Vector3::zeros();
        for a in 0..3 {
            for (sign, out) in [(1.0, &mut best_pos[a]), (-1.0, &mut best_neg[a])] {
                let mut c: Vec<f64> = columns.iter().map(|t| sign * t[a]).collect();
                c.sort_by(|x, y| y.total_cmp(x));
                let (mut prefix, mut best) = (0.0, 0.0f64);
                for (k, v) in c.iter().enumerate() {
                    prefix += v;
                    best = best.max(factor[k + 1] * prefix);
                }
                *out = best;
            }
        }
        let scale = best_pos.sup(&best_neg);
        let rows = tables
            .onoff
            .iter()
            .filter(|r| r.outcome == OnOffOutcome::Meets)
            .map(|r| CheckedRow {
                command: r.command,
                mask: r.mask,
            })
            .collect();
        OnOffCheck {
            rows,
            factor,
            best_pos,
            best_neg,
            scale,
            noise: Tolerances::default().onoff_noise * scale.max(),
            fraction: options.fraction,
            tolerance: options.tolerance,
        }
    }

    /// Torque and side force (y, z) of row `r` with the given per-port torques and forces.
    pub fn row_wrench(
        &self,
        r: usize,
        torque: &[Vector3<f64>],
        force: &[Vector3<f64>],
    ) -> (Vector3<f64>, [f64; 2]) {
        let mask = self.rows[r].mask;
        let k = mask.count_ones() as usize;
        let f = self.factor.get(k).copied().unwrap_or(1.0);
        let mut t = Vector3::zeros();
        let mut s = Vector3::zeros();
        for i in 0..torque.len() {
            if mask & (1 << i) != 0 {
                t += torque[i];
                s += force[i];
            }
        }
        (t * f, [s.y * f, s.z * f])
    }

    /// Whether row `r` meets its thresholds with torque `t`. A value within the
    /// table search's noise floor (1e-9 of the largest axis scale) of its
    /// threshold counts as meeting it, so the nominal vehicle passes every row.
    pub fn meets(&self, r: usize, t: &Vector3<f64>) -> bool {
        let c = self.rows[r].command;
        (0..3).all(|a| match c[a] {
            0 => t[a].abs() <= self.tolerance * self.scale[a] + 2.0 * self.noise,
            s => {
                let best = if s > 0 {
                    self.best_pos[a]
                } else {
                    self.best_neg[a]
                };
                f64::from(s) * t[a] >= (self.fraction * best).max(self.noise) - self.noise
            }
        })
    }
}
