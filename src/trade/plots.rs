//! The study's pictures: the Pareto set (worst margin against system mass,
//! coloured by price) and, per property, worst margin against that property.
//!
//! Drawn with the shared chart code in `export::plots` ([`marker_chart_svg`]).
//! Price colours run from a sea green (cheapest) through ochre to a wine red
//! (dearest), a ramp of our own that stays apart in greyscale print.

use super::evaluate::Evaluated;
use super::study::Study;
use super::what_it_takes::{Least, WhatItTakes};
use crate::export::plots::{
    marker_chart_svg, MarkerChart, MarkerSet, Plot, PlotError, PlotSettings, Polyline,
};

const CHEAP: (u8, u8, u8) = (38, 122, 104);
const MIDDLE: (u8, u8, u8) = (212, 160, 52);
const DEAR: (u8, u8, u8) = (138, 36, 64);
const OTHERS: (u8, u8, u8) = (190, 195, 201);
const CURVE: (u8, u8, u8) = (44, 90, 135);

/// The ramp colour at `t` in [0, 1] (cheapest 0, dearest 1).
pub fn price_colour(t: f64) -> (u8, u8, u8) {
    let t = if t.is_finite() {
        t.clamp(0.0, 1.0)
    } else {
        0.0
    };
    let (a, b, u) = if t < 0.5 {
        (CHEAP, MIDDLE, t * 2.0)
    } else {
        (MIDDLE, DEAR, t * 2.0 - 1.0)
    };
    let mix = |x: u8, y: u8| (f64::from(x) + (f64::from(y) - f64::from(x)) * u).round() as u8;
    (mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

fn margin_point(e: &Evaluated) -> Option<(f64, f64, f64)> {
    let m = e.metrics()?;
    Some((m.system_mass_kg * 1e3, m.worst_margin?, m.price))
}

/// Worst margin against system mass: every accepted combination in light grey,
/// the Pareto set coloured by price, the lightest combination that meets every
/// requirement ringed. `None` when no accepted combination has a margin.
pub fn pareto_svg(
    study: &Study,
    currency: &str,
    s: &PlotSettings,
) -> Option<Result<Plot, PlotError>> {
    let all: Vec<(f64, f64, f64)> = study.evaluated.iter().filter_map(margin_point).collect();
    if all.is_empty() {
        return None;
    }
    let front: Vec<(f64, f64, f64)> = study
        .pareto
        .iter()
        .filter_map(|&i| margin_point(&study.evaluated[i]))
        .collect();
    let (p0, p1) = front
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| {
            (a.min(p.2), b.max(p.2))
        });
    let t = |p: f64| if p1 > p0 { (p - p0) / (p1 - p0) } else { 0.0 };
    let cur = if currency.is_empty() {
        String::new()
    } else {
        format!(" {currency}")
    };
    let mut markers = vec![MarkerSet {
        name: "accepted".to_string(),
        points: all.iter().map(|p| (p.0, p.1)).collect(),
        colours: vec![OTHERS; all.len()],
        radius: 3,
        filled: true,
    }];
    if !front.is_empty() {
        markers.push(MarkerSet {
            name: if p1 > p0 {
                format!("Pareto, from {p0:.0}{cur}")
            } else {
                "Pareto set".to_string()
            },
            points: front.iter().map(|p| (p.0, p.1)).collect(),
            colours: front.iter().map(|p| price_colour(t(p.2))).collect(),
            radius: 5,
            filled: true,
        });
        if p1 > p0 {
            markers.push(MarkerSet {
                name: format!("to {p1:.0}{cur}"),
                points: Vec::new(),
                colours: vec![DEAR],
                radius: 5,
                filled: true,
            });
        }
    }
    if let Some(p) = study
        .lightest
        .and_then(|i| margin_point(&study.evaluated[i]))
    {
        markers.push(MarkerSet {
            name: "lightest meeting all".to_string(),
            points: vec![(p.0, p.1)],
            colours: vec![(33, 37, 41)],
            radius: 9,
            filled: false,
        });
    }
    let chart = MarkerChart {
        title: "Parts: worst margin against system mass, Pareto set coloured by price".to_string(),
        x_desc: "system mass (valves, regulator, empty tank, gas), g".to_string(),
        y_desc: "worst margin (available / required torque)".to_string(),
        markers,
        lines: Vec::new(),
        // Unlabelled: the legend row is full, and the axis reads 1 at the line.
        horizontal: vec![(1.0, String::new())],
        vertical: Vec::new(),
    };
    Some(marker_chart_svg(&chart, s))
}

/// Worst margin against one property, with margin 1, the current value and the
/// least value that meets every requirement marked. `None` when no point of the
/// sweep has a margin.
pub fn sweep_svg(w: &WhatItTakes, s: &PlotSettings) -> Option<Result<Plot, PlotError>> {
    let pts: Vec<(f64, f64)> = w
        .sweep
        .iter()
        .filter_map(|p| Some((p.value * w.unit_scale, p.worst_margin?)))
        .collect();
    if pts.is_empty() {
        return None;
    }
    let unit = if w.unit.is_empty() {
        String::new()
    } else {
        format!(", {}", w.unit)
    };
    let mut vertical = vec![(
        w.current * w.unit_scale,
        "value in the combination".to_string(),
    )];
    if let Least::Found { value, .. } = w.least {
        vertical.push((
            value * w.unit_scale,
            "least value meeting every requirement".to_string(),
        ));
    }
    let chart = MarkerChart {
        title: format!("What would it take: worst margin against {}", w.label),
        x_desc: format!("{}{unit}", w.label),
        y_desc: "worst margin (available / required torque)".to_string(),
        markers: vec![MarkerSet {
            name: String::new(),
            points: pts.clone(),
            colours: vec![CURVE; pts.len()],
            radius: 3,
            filled: true,
        }],
        lines: vec![Polyline {
            name: "worst margin".to_string(),
            points: pts,
            colour: CURVE,
            dashed: false,
        }],
        horizontal: vec![(1.0, "margin 1".to_string())],
        vertical,
    };
    Some(marker_chart_svg(&chart, s))
}
