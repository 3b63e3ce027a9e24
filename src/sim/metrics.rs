//! Figures of a run from its control-rate samples: hold time, settling, limit
//! cycle, peak rates, and findings in words.
//!
//! * Hold: starts when every free axis is within the pointing requirement and stays
//!   so for at least [`SETTLED_FOR_S`],
//!   ends at the first later sample where one is outside it, or when the gas runs
//!   out; a run that never gets within the requirement holds for 0 s.
//! * Settling time of an axis: the first time after which its error stays within
//!   the requirement until the hold ends.
//! * Limit cycle, over the second half of the hold: amplitude is half the
//!   peak-to-peak error; period the mean time between upward crossings of the mean
//!   error (a crossing counts only after the error has been below the mean by a
//!   tenth of the amplitude, so gyro noise does not add crossings).

use super::case::Controller;
use super::run::{axis_names, AxisResult, Plant, RunResult};

/// How long the error must stay within the requirement for the hold to start, s.
pub const SETTLED_FOR_S: f64 = 1.0;

fn deg(r: f64) -> f64 {
    r.to_degrees()
}

/// Amplitude and period of `x(t)` over the samples given.
pub fn limit_cycle(t: &[f64], x: &[f64]) -> (Option<f64>, Option<f64>) {
    if x.len() < 4 {
        return (None, None);
    }
    let (lo, hi) = x
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
            (a.min(v), b.max(v))
        });
    let amp = 0.5 * (hi - lo);
    let mean = 0.5 * (hi + lo);
    let guard = 0.1 * amp;
    let mut armed = false;
    let mut ups = Vec::new();
    for i in 1..x.len() {
        if x[i] < mean - guard {
            armed = true;
        }
        if armed && x[i - 1] < mean && x[i] >= mean {
            // Linear interpolation of the crossing instant.
            let f = (mean - x[i - 1]) / (x[i] - x[i - 1]);
            ups.push(t[i - 1] + f * (t[i] - t[i - 1]));
            armed = false;
        }
    }
    let period = if ups.len() >= 2 {
        Some((ups[ups.len() - 1] - ups[0]) / (ups.len() - 1) as f64)
    } else {
        None
    };
    (Some(amp), period)
}

/// Fill the figures and findings of `r`.
pub fn fill(r: &mut RunResult, plant: &Plant) {
    let case = plant.case();
    let free = case.mount.free_axes();
    let req = case.pointing_rad;
    let s = &r.samples;
    let within = |e: &[f64; 3]| (0..3).all(|k| !free[k] || e[k].abs() <= req);
    // The hold starts at the first entry into the requirement that then lasts
    // at least SETTLED_FOR_S (or to the end of the case).
    let mut start = None;
    let mut i = 0;
    while i < s.len() {
        if within(&s[i].1) {
            let until = s[i].0 + SETTLED_FOR_S;
            match s[i..].iter().position(|x| !within(&x.1)) {
                None => {
                    start = Some(i);
                    break;
                }
                Some(j) if s[i + j].0 >= until => {
                    start = Some(i);
                    break;
                }
                Some(j) => i += j.max(1),
            }
        } else {
            i += 1;
        }
    }
    let gas_out = r.gas_out_s.unwrap_or(f64::INFINITY);
    let (hold_start, hold_end_t, end_words) = match start {
        None => (
            None,
            0.0,
            "the attitude error never came within the pointing requirement".to_string(),
        ),
        Some(i0) => {
            let t0 = s[i0].0;
            let lost = s[i0..]
                .iter()
                .find(|(t, e, _)| !within(e) || *t >= gas_out)
                .map(|x| x.0);
            match lost {
                Some(t) if t >= gas_out => (Some(i0), t, format!("the gas ran out at {t:.2} s")),
                Some(t) => (
                    Some(i0),
                    t,
                    format!("the attitude error left the pointing requirement at {t:.2} s"),
                ),
                None => (
                    Some(i0),
                    r.duration_s,
                    format!(
                        "held to the end of the case ({:.1} s) after settling at {t0:.2} s",
                        r.duration_s
                    ),
                ),
            }
        }
    };
    r.hold_time_s = match hold_start {
        Some(i0) => (hold_end_t - s[i0].0).max(0.0),
        None => 0.0,
    };
    r.hold_end = end_words;
    let names = axis_names();
    let in_hold: Vec<usize> = match hold_start {
        Some(i0) => (i0..s.len()).filter(|&i| s[i].0 <= hold_end_t).collect(),
        None => Vec::new(),
    };
    let mut axes = Vec::new();
    for k in 0..3 {
        let peak_rate = s.iter().map(|x| x.2[k].abs()).fold(0.0, f64::max);
        let settle = hold_start.map(|_| {
            let upto = s.iter().take_while(|x| x.0 <= hold_end_t).count();
            let last_out = s[..upto].iter().rposition(|x| x.1[k].abs() > req);
            match last_out {
                Some(i) if i + 1 < s.len() => s[i + 1].0,
                Some(_) => hold_end_t,
                None => 0.0,
            }
        });
        let half: Vec<usize> = in_hold[in_hold.len() / 2..].to_vec();
        let (amp, period) = if free[k] && half.len() >= 4 {
            let t: Vec<f64> = half.iter().map(|&i| s[i].0).collect();
            let x: Vec<f64> = half.iter().map(|&i| s[i].1[k]).collect();
            limit_cycle(&t, &x)
        } else {
            (None, None)
        };
        let peak_err = if in_hold.is_empty() {
            None
        } else {
            Some(in_hold.iter().map(|&i| s[i].1[k].abs()).fold(0.0, f64::max))
        };
        axes.push(AxisResult {
            axis: names[k],
            free: free[k],
            limit_cycle_amplitude_rad: amp,
            limit_cycle_period_s: period,
            settling_time_s: settle,
            peak_rate_rad_s: peak_rate,
            peak_error_after_settling_rad: peak_err,
        });
    }
    r.axes = axes;

    // Hold before and after regulator dropout (largest free axis).
    if let (Some(td), Some(_)) = (r.regulator_dropout_s, hold_start) {
        let amp_in = |a: f64, b: f64| {
            let mut worst: Option<f64> = None;
            for (k, _) in free.iter().enumerate().filter(|(_, f)| **f) {
                let pts: Vec<(f64, f64)> = s
                    .iter()
                    .filter(|x| x.0 >= a && x.0 < b)
                    .map(|x| (x.0, x.1[k]))
                    .collect();
                if pts.len() < 4 {
                    continue;
                }
                let (t, x): (Vec<f64>, Vec<f64>) = pts.into_iter().unzip();
                if let (Some(amp), _) = limit_cycle(&t, &x) {
                    worst = Some(worst.map_or(amp, |w: f64| w.max(amp)));
                }
            }
            worst
        };
        let t0 = s[hold_start.unwrap_or(0)].0;
        // Both windows must last at least SETTLED_FOR_S to say anything.
        let long_enough = hold_end_t - td >= SETTLED_FOR_S && td - t0 >= SETTLED_FOR_S;
        if let (true, Some(before), Some(after)) = (
            long_enough,
            amp_in(t0.max(0.5 * td), td),
            amp_in(td, hold_end_t),
        ) {
            r.amplitude_before_after_dropout_rad = Some((before, after));
        }
    }
    r.findings = findings(r, plant);
}

fn findings(r: &RunResult, plant: &Plant) -> Vec<String> {
    let case = plant.case();
    let mut out = Vec::new();
    out.push(format!("Hold: {:.2} s; {}.", r.hold_time_s, r.hold_end));
    let share = if r.gas_start_kg > 0.0 {
        100.0 * r.gas_used_kg / r.gas_start_kg
    } else {
        0.0
    };
    out.push(format!(
        "Gas used: {:.2} g of the {:.2} g in the tank at the start ({share:.1} %).",
        r.gas_used_kg * 1e3,
        r.gas_start_kg * 1e3
    ));
    if let Some(td) = r.regulator_dropout_s {
        match r.amplitude_before_after_dropout_rad {
            Some((b, a)) => out.push(format!(
                "The regulator drops out after {td:.1} s; the hold degrades from {:.2}° to {:.2}° (half peak-to-peak, worst axis).",
                deg(b),
                deg(a)
            )),
            None => out.push(format!(
                "The regulator drops out after {td:.1} s: from then on the thrust falls with the tank pressure."
            )),
        }
    }
    if let Some(tg) = r.gas_out_s {
        out.push(format!(
            "The gas runs out at {tg:.1} s: no port can make thrust after that."
        ));
    }
    if let Controller::OnOff { deadband_rad, .. } = case.controller {
        for a in &r.axes {
            if let Some(amp) = a.limit_cycle_amplitude_rad {
                if amp > 1.5 * deadband_rad {
                    out.push(format!(
                        "The minimum impulse bit, not the deadband, sets the {} limit cycle: {:.2}° against a {:.2}° deadband.",
                        a.axis,
                        deg(amp),
                        deg(deadband_rad)
                    ));
                } else {
                    out.push(format!(
                        "The deadband sets the {} limit cycle: {:.2}° within a {:.2}° deadband.",
                        a.axis,
                        deg(amp),
                        deg(deadband_rad)
                    ));
                }
            }
        }
    }
    let shortest = r
        .ports
        .iter()
        .filter_map(|p| p.shortest_pulse_s.map(|s| (s, &p.port)))
        .fold(None, |m: Option<(f64, &String)>, x| match m {
            Some(y) if y.0 <= x.0 => Some(y),
            _ => Some(x),
        });
    if let Some((s, p)) = shortest {
        out.push(format!(
            "Shortest pulse: {:.1} ms on port `{p}` (valve opening delay {:.1} ms).",
            s * 1e3,
            plant.opening_delay_ms()
        ));
    }
    out.push(format!(
        "Tank: lowest temperature {:.1} K ({:.1} °C); pressure at the end {:.2} bara.",
        r.lowest_tank_temperature_k,
        r.lowest_tank_temperature_k - 273.15,
        r.end_tank_pressure_pa / 1e5
    ));
    if let Some(why) = &r.stopped {
        out.push(format!("The run stopped early {why}."));
    }
    out
}
