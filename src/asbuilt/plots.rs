//! Pictures of the as-built spread: which tolerance matters (bars of variance
//! shares) and how the margins scatter (histograms per state and axis), plus the
//! files and report sections `tolerance --out` and `run` write.
//!
//! The SVG is written directly (rectangles, lines and text), which keeps these
//! plots small, exact and independent of any font metrics; PNG copies go
//! through the same renderer as the other plots.

// Index loops here follow the formulas (axis k, input j, port i, pairs j < k).
#![allow(clippy::needless_range_loop)]

use super::report::{render_text, SpreadRun, ToleranceReport};
use crate::analysis::authority::AXES;
use crate::export::bundle::OutputFile;
use crate::export::html::{Block, Figure, Section, Table};
use crate::export::plots::svg_to_png;
use crate::model::Design;
use std::fmt::Write;

/// Bars shown in the variance-share plot.
const BARS: usize = 12;
/// Histogram bins.
const BINS: usize = 30;

const INK: &str = "#212529";
const MUTED: &str = "#787e85";
const BAR: &str = "#3d6f9e";
const LIMIT: &str = "#a6342e";

fn esc(t: &str) -> String {
    crate::export::html::escape(t)
}

/// The margin shown in the variance-share plot: the lowest margin as drawn
/// (the first in report order on a tie).
pub fn limiting(report: &ToleranceReport) -> Option<&super::sensitivity::MarginSensitivity> {
    report.sensitivities.iter().reduce(|a, b| {
        if b.nominal_margin < a.nominal_margin {
            b
        } else {
            a
        }
    })
}

/// Horizontal bars of each input's share of the limiting margin's first-order variance.
pub fn variance_shares_svg(report: &ToleranceReport) -> Option<String> {
    let m = limiting(report)?;
    let rows: Vec<_> = m
        .entries
        .iter()
        .filter(|e| e.variance_share > 0.0)
        .take(BARS)
        .collect();
    if rows.is_empty() {
        return None;
    }
    let (w, left, top, row_h) = (760.0, 300.0, 70.0, 26.0);
    let h = top + row_h * rows.len() as f64 + 50.0;
    let plot_w = w - left - 70.0;
    let top_share = rows[0].variance_share.max(1e-12);
    let mut s = String::new();
    let _ = write!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}" font-family="DejaVu Sans, sans-serif"><rect width="{w}" height="{h}" fill="white"/>"#
    );
    let _ = write!(
        s,
        r#"<text x="16" y="26" font-size="16" fill="{INK}">Which tolerance matters: {}</text><text x="16" y="48" font-size="13" fill="{MUTED}">share of the first-order variance of the {} margin ({} sense) at {}, as drawn {:.2}</text>"#,
        esc(&report.layout),
        m.axis,
        m.sense,
        esc(&m.state),
        m.nominal_margin
    );
    for (k, e) in rows.iter().enumerate() {
        let y = top + row_h * k as f64;
        let bw = plot_w * e.variance_share / top_share;
        let _ = write!(
            s,
            r#"<text x="{}" y="{}" font-size="13" text-anchor="end" fill="{INK}">{}</text><rect x="{left}" y="{}" width="{bw:.1}" height="{}" fill="{BAR}"/><text x="{:.1}" y="{}" font-size="13" fill="{INK}">{:.1} %</text>"#,
            left - 8.0,
            y + 17.0,
            esc(&e.label),
            y + 4.0,
            row_h - 8.0,
            left + bw + 6.0,
            y + 17.0,
            e.variance_share * 100.0
        );
    }
    let _ = write!(
        s,
        r#"<line x1="{left}" y1="{}" x2="{left}" y2="{}" stroke="{INK}"/><text x="{left}" y="{}" font-size="13" fill="{MUTED}">bar length: share of the variance (longest bar {:.1} %)</text></svg>"#,
        top - 4.0,
        top + row_h * rows.len() as f64,
        top + row_h * rows.len() as f64 + 28.0,
        top_share * 100.0
    );
    Some(s)
}

/// Histograms of the three axes' margins at flight state `k`, with margin 1 and
/// the margin as drawn marked. `None` when nothing is required at that state.
pub fn margin_histograms_svg(
    report: &ToleranceReport,
    run: &SpreadRun,
    k: usize,
) -> Option<String> {
    let state = &report.states.get(k)?.name;
    let axes: Vec<(usize, Vec<f64>)> = (0..3)
        .map(|a| {
            (
                a,
                run.samples
                    .iter()
                    .filter_map(|s| s.states[k].margin(a))
                    .filter(|v| v.is_finite())
                    .collect::<Vec<f64>>(),
            )
        })
        .filter(|(_, v)| !v.is_empty())
        .collect();
    if axes.is_empty() {
        return None;
    }
    let (w, h, top, bottom) = (900.0, 340.0, 64.0, 56.0);
    let panel_w = w / axes.len() as f64;
    let mut s = String::new();
    let _ = write!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}" font-family="DejaVu Sans, sans-serif"><rect width="{w}" height="{h}" fill="white"/><text x="16" y="26" font-size="16" fill="{INK}">Margins of {} as-built vehicles at {}: {}</text><text x="16" y="48" font-size="13" fill="{MUTED}">red line: margin 1; dark line: as drawn</text>"#,
        run.samples.len(),
        esc(state),
        esc(&report.layout)
    );
    for (p, (a, values)) in axes.iter().enumerate() {
        let nominal = run.nominal.states[k].margin(*a).unwrap_or(1.0);
        let lo = values
            .iter()
            .copied()
            .fold(f64::INFINITY, f64::min)
            .min(nominal);
        let hi = values
            .iter()
            .copied()
            .fold(f64::NEG_INFINITY, f64::max)
            .max(nominal);
        let (lo, hi) = if hi > lo {
            (lo, hi)
        } else {
            (lo - 0.05, hi + 0.05)
        };
        let mut counts = [0usize; BINS];
        for v in values {
            let b = (((v - lo) / (hi - lo)) * BINS as f64).floor() as usize;
            counts[b.min(BINS - 1)] += 1;
        }
        let most = counts.iter().copied().max().unwrap_or(1).max(1) as f64;
        let x0 = panel_w * p as f64 + 30.0;
        let pw = panel_w - 50.0;
        let ph = h - top - bottom;
        let x_of = |v: f64| x0 + pw * (v - lo) / (hi - lo);
        for (b, &c) in counts.iter().enumerate() {
            let bh = ph * c as f64 / most;
            let _ = write!(
                s,
                r#"<rect x="{:.1}" y="{:.1}" width="{:.1}" height="{bh:.1}" fill="{BAR}"/>"#,
                x0 + pw * b as f64 / BINS as f64,
                top + ph - bh,
                pw / BINS as f64 - 1.0
            );
        }
        let _ = write!(
            s,
            r#"<line x1="{x0}" y1="{:.1}" x2="{:.1}" y2="{:.1}" stroke="{INK}"/>"#,
            top + ph,
            x0 + pw,
            top + ph
        );
        for (v, colour) in [(1.0, LIMIT), (nominal, INK)] {
            if (lo..=hi).contains(&v) {
                let _ = write!(
                    s,
                    r#"<line x1="{x:.1}" y1="{top}" x2="{x:.1}" y2="{:.1}" stroke="{colour}" stroke-width="2"/>"#,
                    top + ph,
                    x = x_of(v)
                );
            }
        }
        let _ = write!(
            s,
            r#"<text x="{x0}" y="{:.1}" font-size="12" fill="{INK}">{lo:.2}</text><text x="{:.1}" y="{:.1}" font-size="12" text-anchor="end" fill="{INK}">{hi:.2}</text><text x="{:.1}" y="{:.1}" font-size="13" text-anchor="middle" fill="{INK}">{} margin (available / required)</text>"#,
            top + ph + 16.0,
            x0 + pw,
            top + ph + 16.0,
            x0 + pw / 2.0,
            top + ph + 38.0,
            AXES[*a]
        );
    }
    s.push_str("</svg>");
    Some(s)
}

/// The plots as (file stem, caption, SVG).
pub fn plots(report: &ToleranceReport, run: &SpreadRun) -> Vec<(String, String, String)> {
    let mut out = Vec::new();
    if let Some(svg) = variance_shares_svg(report) {
        out.push((
            "tolerance-shares".to_string(),
            "Which tolerance matters: shares of the limiting margin's first-order variance"
                .to_string(),
            svg,
        ));
    }
    for (k, st) in report.states.iter().enumerate() {
        if let Some(svg) = margin_histograms_svg(report, run, k) {
            out.push((
                format!("tolerance-margins-{}", st.name),
                format!("Margins of the sampled as-built vehicles at {}", st.name),
                svg,
            ));
        }
    }
    out
}

/// Files of `tolerance --out`: the report as text and JSON, the plots as SVG and PNG.
pub fn files(
    _design: &Design,
    report: &ToleranceReport,
    run: &SpreadRun,
) -> Result<Vec<OutputFile>, String> {
    let mut files = vec![
        OutputFile {
            name: "tolerance.txt".to_string(),
            bytes: render_text(report).into_bytes(),
        },
        OutputFile {
            name: "tolerance.json".to_string(),
            bytes: (serde_json::to_string_pretty(report).map_err(|e| e.to_string())? + "\n")
                .into_bytes(),
        },
    ];
    for (stem, _, svg) in plots(report, run) {
        files.push(OutputFile {
            name: format!("{stem}.png"),
            bytes: svg_to_png(&svg, 1.0).map_err(|e| e.to_string())?,
        });
        files.push(OutputFile {
            name: format!("{stem}.svg"),
            bytes: svg.into_bytes(),
        });
    }
    Ok(files)
}

fn pct(v: f64) -> String {
    let v = v * 100.0;
    format!("{:.1} %", if v == 0.0 { 0.0 } else { v })
}

/// Sections for the HTML report of `run`.
pub fn html_sections(report: &ToleranceReport, run: &SpreadRun) -> Vec<Section> {
    let mut blocks = vec![Block::Paragraph(format!(
        "{} as-built vehicles sampled from the layout's tolerances (seed {}). Chance that any margin at any flight state falls below 1: {}.",
        report.samples,
        report.seed,
        pct(report.probability_any_margin_below_one)
    ))];
    blocks.push(Block::Table(Table {
        caption: "tolerances".to_string(),
        headers: vec!["input".into(), "spread".into()],
        rows: report
            .inputs
            .iter()
            .map(|i| vec![i.input.clone(), i.spread.clone()])
            .collect(),
    }));
    let mut rows = Vec::new();
    for s in &report.states {
        for a in &s.axes {
            let (m, p) = match (&a.margin, a.probability_margin_below_one) {
                (Some(m), Some(p)) => (
                    format!(
                        "{:.2} / {:.2} / {:.2} / {:.2} / {:.2}",
                        m.p1, m.p5, m.p50, m.p95, m.p99
                    ),
                    pct(p),
                ),
                _ => ("no requirement".to_string(), "—".to_string()),
            };
            rows.push(vec![
                s.name.clone(),
                a.axis.to_string(),
                format!("{:.1}", a.nominal_authority_n_m * 1e3),
                format!(
                    "{:.1} / {:.1} / {:.1}",
                    a.authority_n_m.p5 * 1e3,
                    a.authority_n_m.p50 * 1e3,
                    a.authority_n_m.p95 * 1e3
                ),
                m,
                p,
            ]);
        }
        rows.push(vec![
            s.name.clone(),
            "on/off table".to_string(),
            format!("{} rows checked", s.onoff.rows_checked),
            format!("{} fail on average", pct(s.onoff.mean_share_failing)),
            format!(
                "any fails on {} of vehicles",
                pct(s.onoff.probability_any_failing)
            ),
            String::new(),
        ]);
    }
    blocks.push(Block::Table(Table {
        caption: "authority and margin of the as-built vehicles".to_string(),
        headers: [
            "state",
            "axis",
            "authority as drawn (mN m)",
            "authority p5 / p50 / p95 (mN m)",
            "margin p1 / p5 / p50 / p95 / p99",
            "P(margin < 1)",
        ]
        .map(String::from)
        .to_vec(),
        rows,
    }));
    if let Some(m) = limiting(report) {
        blocks.push(Block::Table(Table {
            caption: format!(
                "which tolerance matters for the {} margin ({} sense) at {} (first order, central differences)",
                m.axis, m.sense, m.state
            ),
            headers: vec!["input".into(), "share of variance".into(), "σ of margin".into()],
            rows: m
                .entries
                .iter()
                .filter(|e| e.variance_share > 0.0)
                .take(BARS)
                .map(|e| {
                    vec![
                        format!("{}{}", e.label, if e.corner { " (facet changes here)" } else { "" }),
                        pct(e.variance_share),
                        format!("{:.4}", e.margin_sigma),
                    ]
                })
                .collect(),
        }));
    }
    for (_, caption, svg) in plots(report, run) {
        blocks.push(Block::Figure(Figure { caption, svg }));
    }
    let mut sections = vec![Section {
        heading: "As built: tolerances".to_string(),
        blocks,
    }];
    if let Some(m) = &report.measured {
        sections.push(Section {
            heading: "As built: measured ports".to_string(),
            blocks: vec![Block::Table(Table {
                caption: "authority and margin, drawn → built".to_string(),
                headers: vec![
                    "state".into(),
                    "axis".into(),
                    "authority (mN m)".into(),
                    "margin".into(),
                ],
                rows: m
                    .axes
                    .iter()
                    .map(|a| {
                        vec![
                            a.state.clone(),
                            a.axis.to_string(),
                            format!(
                                "{:.2} → {:.2}",
                                a.authority_n_m[0] * 1e3,
                                a.authority_n_m[1] * 1e3
                            ),
                            a.margin.map_or("no requirement".to_string(), |[d, b]| {
                                format!("{d:.2} → {b:.2}")
                            }),
                        ]
                    })
                    .collect(),
            })],
        });
    }
    sections
}
