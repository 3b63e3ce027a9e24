//! The Pareto set of accepted combinations and the ranking rules.
//!
//! Counts compared, each in its better direction: worst margin (higher; "no
//! requirement" counts as unbounded), gas for the manoeuvre list (lower), hold
//! time (higher, only when every combination has one), system mass, price and
//! peak coil current (lower). Each figure is first rounded to a stated
//! resolution ([`Resolution`]) so that figures equal to within the model's
//! rounding count as equal, and dominance stays a strict partial order.
//!
//! Dominance: A dominates B when A is no worse than B on every count and
//! better on at least one. The Pareto set holds every accepted combination no
//! other accepted combination dominates; two combinations equal on every count
//! are both kept. The set is listed by system mass, then price, then peak coil
//! current, then worst margin (highest first), then manoeuvre gas, then
//! catalogue order.
//!
//! [`pareto_set`] sorts first so that any dominator comes before the ones it
//! dominates and compares each candidate only with the set found so far;
//! [`pareto_brute_force`] compares every pair and is kept for the tests.

use super::evaluate::Metrics;
use serde::Serialize;

/// Rounding applied to each count before comparing.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Resolution {
    /// Margin (dimensionless).
    pub margin: f64,
    /// Gas, kg.
    pub gas_kg: f64,
    /// Hold time, s.
    pub hold_time_s: f64,
    /// Mass, kg.
    pub mass_kg: f64,
    /// Price (currency units).
    pub price: f64,
    /// Current, A.
    pub current_a: f64,
}

impl Default for Resolution {
    /// 1e-6 in margin, 1 µg of gas, 1 µs of hold time, 1 mg of mass, 0.0001 in
    /// price, 1 µA: far below anything a builder reads, far above f64 rounding
    /// of the models (relative ~1e-12).
    fn default() -> Self {
        Resolution {
            margin: 1e-6,
            gas_kg: 1e-9,
            hold_time_s: 1e-6,
            mass_kg: 1e-6,
            price: 1e-4,
            current_a: 1e-6,
        }
    }
}

/// The counts of one combination, rounded and turned so that lower is better.
pub type Key = [i64; 6];

fn q(v: f64, step: f64) -> i64 {
    // Saturating cast: unbounded values land on the end of the range.
    (v / step).round() as i64
}

/// The comparison key of a combination's figures: every entry lower-is-better.
/// `with_hold` says whether hold time takes part (every candidate has one).
pub fn key(m: &Metrics, r: &Resolution, with_hold: bool) -> Key {
    let margin = m.worst_margin.map_or(i64::MIN, |v| -q(v, r.margin));
    let gas = m.manoeuvre_gas_kg.map_or(0, |v| q(v, r.gas_kg));
    let hold = if with_hold {
        m.hold_time_s.map_or(0, |v| -q(v, r.hold_time_s))
    } else {
        0
    };
    [
        q(m.system_mass_kg, r.mass_kg),
        q(m.price, r.price),
        q(m.peak_coil_current_a, r.current_a),
        margin,
        gas,
        hold,
    ]
}

/// Whether `a` dominates `b`.
pub fn dominates(a: &Key, b: &Key) -> bool {
    a.iter().zip(b).all(|(x, y)| x <= y) && a != b
}

/// Positions (into `keys`) of the Pareto set, in the listing order: by key
/// (mass, price, current, then the rest), then by position.
pub fn pareto_set(keys: &[Key]) -> Vec<usize> {
    let mut order: Vec<usize> = (0..keys.len()).collect();
    // Lexicographic order is a linear extension of dominance: a dominator is
    // never later than what it dominates.
    order.sort_by(|&a, &b| keys[a].cmp(&keys[b]).then(a.cmp(&b)));
    let mut front: Vec<usize> = Vec::new();
    for i in order {
        if !front.iter().any(|&f| dominates(&keys[f], &keys[i])) {
            front.push(i);
        }
    }
    front
}

/// The same set by comparing every pair, in position order (for tests).
pub fn pareto_brute_force(keys: &[Key]) -> Vec<usize> {
    (0..keys.len())
        .filter(|&i| !(0..keys.len()).any(|j| dominates(&keys[j], &keys[i])))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::{Rng, SeedableRng};

    #[test]
    fn fast_set_equals_brute_force_on_random_keys() {
        // Small integer ranges make ties and duplicates common.
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(7);
        for n in [0, 1, 2, 5, 40, 300] {
            let keys: Vec<Key> = (0..n)
                .map(|_| std::array::from_fn(|_| rng.gen_range(0..4)))
                .collect();
            let mut fast = pareto_set(&keys);
            fast.sort_unstable();
            assert_eq!(fast, pareto_brute_force(&keys), "n = {n}");
        }
    }

    #[test]
    fn equal_keys_are_both_kept_and_a_better_one_removes_them() {
        let a = [1, 1, 1, 1, 1, 1];
        assert_eq!(pareto_set(&[a, a]), vec![0, 1]);
        let b = [1, 1, 1, 0, 1, 1];
        assert_eq!(pareto_set(&[a, a, b]), vec![2]);
    }
}
