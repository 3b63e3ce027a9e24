//! Percentiles and small statistics of sampled values.
//!
//! Percentiles interpolate linearly between order statistics at rank
//! (n − 1)·p (Hyndman and Fan's definition 7, the default of numpy and R), so
//! results are reproducible by any of those tools from the same samples.

use serde::Serialize;

/// The percentiles every spread reports.
pub const LEVELS: [f64; 5] = [1.0, 5.0, 50.0, 95.0, 99.0];

/// Percentile p (0–100) of already sorted values; `None` when there are none.
pub fn percentile_sorted(sorted: &[f64], p: f64) -> Option<f64> {
    if sorted.is_empty() {
        return None;
    }
    let h = (sorted.len() - 1) as f64 * (p / 100.0).clamp(0.0, 1.0);
    let lo = h.floor() as usize;
    let hi = (lo + 1).min(sorted.len() - 1);
    Some(sorted[lo] + (h - lo as f64) * (sorted[hi] - sorted[lo]))
}

/// Percentile p of unsorted values (sorts a copy in place of `values`).
pub fn percentile(values: &mut [f64], p: f64) -> Option<f64> {
    values.sort_by(f64::total_cmp);
    percentile_sorted(values, p)
}

/// The 1st, 5th, 50th, 95th and 99th percentiles of one sampled quantity.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Percentiles {
    /// 1st percentile.
    pub p1: f64,
    /// 5th percentile.
    pub p5: f64,
    /// Median.
    pub p50: f64,
    /// 95th percentile.
    pub p95: f64,
    /// 99th percentile.
    pub p99: f64,
}

impl Percentiles {
    /// From samples (any order; non-finite values are dropped first). `None` when
    /// no finite value is left.
    pub fn of(values: &[f64]) -> Option<Percentiles> {
        let mut v: Vec<f64> = values.iter().copied().filter(|x| x.is_finite()).collect();
        if v.is_empty() {
            return None;
        }
        v.sort_by(f64::total_cmp);
        let q = |p| percentile_sorted(&v, p).unwrap_or(0.0);
        Some(Percentiles {
            p1: q(1.0),
            p5: q(5.0),
            p50: q(50.0),
            p95: q(95.0),
            p99: q(99.0),
        })
    }

    /// The five values in [`LEVELS`] order.
    pub fn values(&self) -> [f64; 5] {
        [self.p1, self.p5, self.p50, self.p95, self.p99]
    }

    /// Each value times `k`.
    pub fn scaled(&self, k: f64) -> Percentiles {
        let v = self.values().map(|x| x * k);
        Percentiles {
            p1: v[0],
            p5: v[1],
            p50: v[2],
            p95: v[3],
            p99: v[4],
        }
    }
}

/// Sample mean and unbiased variance.
pub fn mean_variance(values: &[f64]) -> (f64, f64) {
    let n = values.len() as f64;
    if values.len() < 2 {
        return (values.first().copied().unwrap_or(0.0), 0.0);
    }
    let mean = values.iter().sum::<f64>() / n;
    let var = values.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0);
    (mean, var)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn percentiles_follow_definition_7() {
        // Reference: numpy 2.1 `np.percentile([3, 1, 4, 1, 5, 9, 2, 6], q)` with the
        // default linear method gives q=5 → 1.0, q=50 → 3.5, q=95 → 7.95, q=99 → 8.79
        // (rank (n − 1)·p by hand: 7·0.95 = 6.65 → 6 + 0.65·(9 − 6)). Exact up to rounding.
        let mut v = vec![3.0, 1.0, 4.0, 1.0, 5.0, 9.0, 2.0, 6.0];
        for (p, want) in [(5.0, 1.0), (50.0, 3.5), (95.0, 7.95), (99.0, 8.79)] {
            let got = percentile(&mut v, p).unwrap();
            assert!((got - want).abs() < 1e-12, "p{p}: {got} vs {want}");
        }
        assert_eq!(percentile(&mut [], 50.0), None);
        assert!(Percentiles::of(&[f64::NAN]).is_none());
    }
}

/// Rewrite every printed negative zero ("-0", "-0.00", "+0.0 %") in `text` as
/// unsigned: such a number is a value that rounded to zero, and a sign on it
/// means nothing to a reader.
pub fn without_signed_zeros(text: &str) -> String {
    let b = text.as_bytes();
    let mut out = String::with_capacity(text.len());
    let mut i = 0;
    while i < b.len() {
        let c = b[i];
        let starts_number = i == 0 || !(b[i - 1].is_ascii_alphanumeric() || b[i - 1] == b'.');
        if (c == b'-' || c == b'+') && starts_number && i + 1 < b.len() && b[i + 1] == b'0' {
            let mut j = i + 1;
            while j < b.len() && (b[j] == b'0' || b[j] == b'.') {
                j += 1;
            }
            let all_zero = !(j < b.len() && b[j].is_ascii_digit());
            if all_zero {
                out.push_str(&text[i + 1..j]);
                i = j;
                continue;
            }
        }
        let ch = text[i..].chars().next().unwrap_or(' ');
        out.push(ch);
        i += ch.len_utf8();
    }
    out
}

#[cfg(test)]
mod zero_tests {
    use super::without_signed_zeros;

    #[test]
    fn signed_zeros_lose_their_sign() {
        assert_eq!(
            without_signed_zeros("yaw -0.000 as drawn, +0.0 %, -0.25, x-0.0, -0, -10.0"),
            "yaw 0.000 as drawn, 0.0 %, -0.25, x-0.0, 0, -10.0"
        );
    }
}
