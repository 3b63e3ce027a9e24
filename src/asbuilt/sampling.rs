//! Monte Carlo over as-built vehicles: draw deviations, evaluate each vehicle,
//! keep what the report summarises.
//!
//! Sample i draws its deviations from its own ChaCha8 stream (seed, stream i),
//! and rayon collects the results in sample order, so the same seed gives the
//! same numbers on any number of threads.

use super::onoff::OnOffCheck;
use super::vehicle::{Applied, Basis};
use nalgebra::Vector3;
use rayon::prelude::*;

/// One flight state of one as-built vehicle.
#[derive(Debug, Clone, PartialEq)]
pub struct SampleState {
    /// Largest torque along +roll, +pitch, +yaw, N·m.
    pub positive_n_m: [f64; 3],
    /// Largest torque along −roll, −pitch, −yaw (magnitudes), N·m.
    pub negative_n_m: [f64; 3],
    /// Required torque per axis, N·m.
    pub required_n_m: [f64; 3],
    /// Torque of each port alone, N·m.
    pub port_torque_n_m: Vec<[f64; 3]>,
    /// Lateral force (|(F_y, F_z)|) of each port alone, N.
    pub port_side_force_n: Vec<f64>,
    /// Bit r set when checked on/off row r fails on this vehicle.
    pub failed_rows: u32,
    /// Lateral force of each checked on/off row, N.
    pub row_side_force_n: Vec<f64>,
}

impl SampleState {
    /// Margin of axis k in the weaker sense; `None` when nothing is required.
    pub fn margin(&self, k: usize) -> Option<f64> {
        let r = self.required_n_m[k];
        (r > 0.0).then(|| self.positive_n_m[k].min(self.negative_n_m[k]) / r)
    }
}

/// One as-built vehicle.
#[derive(Debug, Clone, PartialEq)]
pub struct Sample {
    /// Per flight state.
    pub states: Vec<SampleState>,
    /// Minimum impulse bit of each port at the first state, N·s.
    pub minimum_impulse_bit_n_s: Vec<f64>,
}

/// Evaluate the vehicle with deviations `dev` (all zero: the vehicle as drawn).
pub fn evaluate(basis: &Basis, checks: &[OnOffCheck], dev: &[f64], a: &mut Applied) -> Sample {
    basis.apply(&basis.ports, dev, a);
    let mut states = Vec::with_capacity(basis.states.len());
    let mut mib = Vec::new();
    for k in 0..basis.states.len() {
        basis.wrenches(k, &basis.states[k].thrust_n, a);
        let (positive_n_m, negative_n_m) = Basis::limits(a);
        let required_n_m = basis.required(k, a);
        let mut failed_rows = 0u32;
        let mut row_side_force_n = Vec::new();
        if let Some(check) = checks.get(k) {
            for r in 0..check.rows.len() {
                let (t, s) = check.row_wrench(r, &a.torque, &a.force);
                if !check.meets(r, &t) {
                    failed_rows |= 1 << r;
                }
                row_side_force_n.push(s[0].hypot(s[1]));
            }
        }
        if k == 0 {
            let open = (basis.delays_s[0] + a.delays_s[0]).max(0.0);
            let close = (basis.delays_s[1] + a.delays_s[1]).max(0.0);
            mib = a
                .force
                .iter()
                .map(|f| crate::analysis::feed::minimum_impulse_bit(f.norm(), open, close))
                .collect();
        }
        states.push(SampleState {
            positive_n_m,
            negative_n_m,
            required_n_m,
            port_torque_n_m: a.torque.iter().map(|t| [t.x, t.y, t.z]).collect(),
            port_side_force_n: a.force.iter().map(|f| f.y.hypot(f.z)).collect(),
            failed_rows,
            row_side_force_n,
        });
    }
    Sample {
        states,
        minimum_impulse_bit_n_s: mib,
    }
}

/// `samples` as-built vehicles under `seed`, in parallel, in sample order.
pub fn run(basis: &Basis, checks: &[OnOffCheck], samples: usize, seed: u64) -> Vec<Sample> {
    (0..samples as u64)
        .into_par_iter()
        .map_init(Applied::default, |a, i| {
            let dev = basis.draw(seed, i);
            evaluate(basis, checks, &dev, a)
        })
        .collect()
}

/// Nominal torque columns at each state (for the on/off thresholds).
pub fn nominal_columns(basis: &Basis) -> Vec<Vec<Vector3<f64>>> {
    let mut a = Applied::default();
    let zero = vec![0.0; basis.inputs.len()];
    basis.apply(&basis.ports, &zero, &mut a);
    (0..basis.states.len())
        .map(|k| {
            basis.wrenches(k, &basis.states[k].thrust_n, &mut a);
            a.torque.clone()
        })
        .collect()
}
