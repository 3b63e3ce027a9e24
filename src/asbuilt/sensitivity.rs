//! Which tolerance matters: first-order sensitivities of each margin to each
//! input, by central differences, and the share of the margin's variance each
//! input explains under first-order propagation.
//!
//! For margin m and independent inputs xⱼ with standard deviations σⱼ,
//! Var m ≈ Σⱼ (∂m/∂xⱼ)² σⱼ², and input j's share is its term over the sum.
//! The derivative is (m(+h) − m(−h)) / 2h with h = 1 % of σⱼ. A margin here
//! is one axis in one sense (the smooth quantity; the weaker of two senses has
//! a corner where they cross). Where the forward and backward differences
//! disagree by more than 10 % the envelope's limiting facet changes at the
//! nominal point and the entry is flagged: first order is not reliable there.

// Index loops here follow the formulas (axis k, input j, port i, pairs j < k).
#![allow(clippy::needless_range_loop)]

use super::sampling::evaluate;
use super::vehicle::{Applied, Basis};
use serde::Serialize;

/// Step of the differences as a fraction of each input's standard deviation.
const STEP_OF_SIGMA: f64 = 0.01;
/// Forward and backward differences further apart than this (relative) flag a corner.
const CORNER: f64 = 0.1;

/// One input's effect on one margin.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SensitivityEntry {
    /// Index into the basis's input list.
    pub input: usize,
    /// What varies, in words (with the port).
    pub label: String,
    /// ∂margin/∂input per SI unit of the input (per unit fraction for mass and inertias).
    pub derivative_per_unit: f64,
    /// |∂m/∂x|·σ: the margin's standard deviation from this input alone.
    pub margin_sigma: f64,
    /// Share of the first-order variance, 0–1.
    pub variance_share: f64,
    /// The limiting facet changes here; forward and backward differences disagree.
    pub corner: bool,
}

/// Sensitivities of one margin (state, axis, sense).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MarginSensitivity {
    /// Flight state.
    pub state: String,
    /// Axis name.
    pub axis: &'static str,
    /// "+" or "−": the sense whose margin this is (the weaker as drawn; "+" on a tie).
    pub sense: &'static str,
    /// Margin as drawn.
    pub nominal_margin: f64,
    /// First-order standard deviation of the margin, √Σ.
    pub first_order_sigma: f64,
    /// Entries, largest share first (ties in input order).
    pub entries: Vec<SensitivityEntry>,
}

/// Per-sense margin of every state and axis for deviations `dev`:
/// `[state][axis][sense]` with sense 0 = +, 1 = −; `None` where nothing is required.
pub fn sense_margins(basis: &Basis, dev: &[f64], a: &mut Applied) -> Vec<[[Option<f64>; 2]; 3]> {
    evaluate(basis, &[], dev, a)
        .states
        .iter()
        .map(|s| {
            [0, 1, 2].map(|k| {
                let r = s.required_n_m[k];
                if r > 0.0 {
                    [Some(s.positive_n_m[k] / r), Some(s.negative_n_m[k] / r)]
                } else {
                    [None, None]
                }
            })
        })
        .collect()
}

/// Sensitivities of the weaker-sense margin of every state and axis.
pub fn sensitivities(basis: &Basis) -> Vec<MarginSensitivity> {
    let n = basis.inputs.len();
    let mut a = Applied::default();
    let zero = vec![0.0; n];
    let base = sense_margins(basis, &zero, &mut a);
    // Per input: margins at +h and −h.
    let mut plus = Vec::with_capacity(n);
    let mut minus = Vec::with_capacity(n);
    let mut steps = Vec::with_capacity(n);
    for (j, (_, spread)) in basis.inputs.iter().enumerate() {
        let h = STEP_OF_SIGMA * spread.std_dev();
        let mut dev = zero.clone();
        dev[j] = h;
        plus.push(sense_margins(basis, &dev, &mut a));
        dev[j] = -h;
        minus.push(sense_margins(basis, &dev, &mut a));
        steps.push(h);
    }
    let names = basis.port_names();
    let mut out = Vec::new();
    for (k, state) in basis.states.iter().enumerate() {
        for axis in 0..3 {
            let (Some(mp), Some(mn)) = (base[k][axis][0], base[k][axis][1]) else {
                continue;
            };
            let sense = if mn < mp { 1 } else { 0 };
            let m0 = base[k][axis][sense].unwrap_or(0.0);
            let mut entries: Vec<SensitivityEntry> = (0..n)
                .map(|j| {
                    let up = plus[j][k][axis][sense].unwrap_or(m0);
                    let down = minus[j][k][axis][sense].unwrap_or(m0);
                    let h = steps[j];
                    let d = (up - down) / (2.0 * h);
                    let fwd = (up - m0) / h;
                    let bwd = (m0 - down) / h;
                    let big = fwd.abs().max(bwd.abs());
                    // Changes below 1e-12 of the margin are rounding, not a corner.
                    let corner = big * h > 1e-12 * m0.abs() && (fwd - bwd).abs() > CORNER * big;
                    SensitivityEntry {
                        input: j,
                        label: basis.inputs[j].0.label(&names),
                        derivative_per_unit: d,
                        margin_sigma: d.abs() * basis.inputs[j].1.std_dev(),
                        variance_share: 0.0,
                        corner,
                    }
                })
                .collect();
            let total: f64 = entries.iter().map(|e| e.margin_sigma.powi(2)).sum();
            for e in &mut entries {
                e.variance_share = if total > 0.0 {
                    e.margin_sigma.powi(2) / total
                } else {
                    0.0
                };
            }
            entries.sort_by(|x, y| {
                y.variance_share
                    .total_cmp(&x.variance_share)
                    .then(x.input.cmp(&y.input))
            });
            out.push(MarginSensitivity {
                state: state.name.clone(),
                axis: crate::analysis::authority::AXES[axis],
                sense: if sense == 0 { "+" } else { "−" },
                nominal_margin: m0,
                first_order_sigma: total.sqrt(),
                entries,
            });
        }
    }
    out
}
