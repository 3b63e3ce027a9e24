//! Plots of a run: attitude error and rate per axis, valve timeline, tank
//! pressure and temperature, gas remaining, thrust per port.

use super::run::{axis_names, Plant, RunResult};
use crate::export::plots::{time_series_svg, PlotSettings, SeriesLine};

/// Most points drawn per line; longer series are thinned evenly.
pub const MAX_POINTS: usize = 2000;

fn thin<T: Copy>(v: &[T]) -> Vec<T> {
    let step = v.len().div_ceil(MAX_POINTS).max(1);
    v.iter().step_by(step).copied().collect()
}

/// (file stem, SVG text) of each plot; empty when the run kept no series.
pub fn plots(r: &RunResult, plant: &Plant) -> Result<Vec<(String, String)>, String> {
    let Some(s) = &r.series else {
        return Ok(Vec::new());
    };
    if s.time_s.len() < 2 {
        return Ok(Vec::new());
    }
    let set = PlotSettings::default();
    let t = thin(&s.time_s);
    let free = plant.case().mount.free_axes();
    let names = axis_names();
    let mut out = Vec::new();
    let mut push = |stem: &str,
                    p: Result<crate::export::plots::Plot, crate::export::plots::PlotError>|
     -> Result<(), String> {
        out.push((stem.to_string(), p.map_err(|e| e.to_string())?.svg));
        Ok(())
    };
    let per_axis = |f: &dyn Fn(usize, usize) -> f64| -> Vec<SeriesLine> {
        (0..3)
            .filter(|&k| free[k])
            .map(|k| SeriesLine {
                name: names[k].to_string(),
                points: t.iter().enumerate().map(|(j, &x)| (x, f(j, k))).collect(),
                dashed: false,
            })
            .collect()
    };
    let idx: Vec<usize> = {
        let step = s.time_s.len().div_ceil(MAX_POINTS).max(1);
        (0..s.time_s.len()).step_by(step).collect()
    };
    let err = per_axis(&|j, k| s.error_rad[idx[j]][k].to_degrees());
    push(
        "error",
        time_series_svg(
            &set,
            &format!("Attitude error: {}", r.case),
            "Time (s)",
            "Attitude error (deg)",
            &err,
        ),
    )?;
    let rate = per_axis(&|j, k| s.rate_rad_s[idx[j]][k].to_degrees());
    push(
        "rate",
        time_series_svg(
            &set,
            &format!("Body rate: {}", r.case),
            "Time (s)",
            "Body rate (deg/s)",
            &rate,
        ),
    )?;
    let p = vec![SeriesLine {
        name: "tank pressure".into(),
        points: idx
            .iter()
            .map(|&i| (s.time_s[i], s.tank_pressure_pa[i] / 1e5))
            .collect(),
        dashed: false,
    }];
    push(
        "tank-pressure",
        time_series_svg(
            &set,
            &format!("Tank pressure: {}", r.case),
            "Time (s)",
            "Tank pressure (bar absolute)",
            &p,
        ),
    )?;
    let tk = vec![SeriesLine {
        name: "tank temperature".into(),
        points: idx
            .iter()
            .map(|&i| (s.time_s[i], s.tank_temperature_k[i] - 273.15))
            .collect(),
        dashed: false,
    }];
    push(
        "tank-temperature",
        time_series_svg(
            &set,
            &format!("Tank temperature: {}", r.case),
            "Time (s)",
            "Tank temperature (°C)",
            &tk,
        ),
    )?;
    let g = vec![SeriesLine {
        name: "gas in the tank".into(),
        points: idx
            .iter()
            .map(|&i| (s.time_s[i], s.gas_kg[i] * 1e3))
            .collect(),
        dashed: false,
    }];
    push(
        "gas",
        time_series_svg(
            &set,
            &format!("Gas remaining: {}", r.case),
            "Time (s)",
            "Gas in the tank (g)",
            &g,
        ),
    )?;
    // Valve timeline: port i drawn at height i + 0.8 when commanded open, i when shut
    // (every sample kept, so no pulse is thinned away beyond the record period).
    let n = plant.port_names().len();
    for (chunk, ports) in (0..n).collect::<Vec<_>>().chunks(6).enumerate() {
        let lines: Vec<SeriesLine> = ports
            .iter()
            .map(|&i| SeriesLine {
                name: plant.port_names()[i].clone(),
                points: s
                    .time_s
                    .iter()
                    .zip(&s.valve_mask)
                    .map(|(&x, &m)| (x, i as f64 + if m & (1 << i) != 0 { 0.8 } else { 0.0 }))
                    .collect(),
                dashed: false,
            })
            .collect();
        push(
            &format!("valves-{}", chunk + 1),
            time_series_svg(
                &set,
                &format!("Valves commanded open: {}", r.case),
                "Time (s)",
                "Port number (raised = open)",
                &lines,
            ),
        )?;
        let thrust: Vec<SeriesLine> = ports
            .iter()
            .map(|&i| SeriesLine {
                name: plant.port_names()[i].clone(),
                points: idx
                    .iter()
                    .map(|&j| (s.time_s[j], s.thrust_n[i][j]))
                    .collect(),
                dashed: false,
            })
            .collect();
        push(
            &format!("thrust-{}", chunk + 1),
            time_series_svg(
                &set,
                &format!("Thrust per port: {}", r.case),
                "Time (s)",
                "Thrust (N)",
                &thrust,
            ),
        )?;
    }
    Ok(out)
}
