//! What `trade` prints and writes: the catalogue in brief, the rules broken and
//! how often, the Pareto set, the lightest combination meeting every
//! requirement, the ranking, and "what would it take" per property. Assembled
//! here so the binary only prints it; the same facts as JSON and as HTML
//! sections for the `run` report.

use super::evaluate::{Evaluated, Metrics, Outcome, HOLD_TIME_NOT_COMPUTED};
use super::rules::{Breach, Rule};
use super::study::{Method, Study};
use super::what_it_takes::{Least, WhatItTakes};
use super::{plots, Catalogue};
use crate::analysis::CAUTIONS;
use crate::export::bundle::OutputFile;
use crate::export::html::{Block, Figure, Section, Table};
use crate::export::plots::{svg_to_png, PlotSettings};
use crate::model::Design;
use serde::Serialize;
use std::fmt::Write;

/// Rows of the ranking shown.
pub const RANKED_SHOWN: usize = 15;
/// Rejected combinations shown as examples per rule.
pub const EXAMPLES_PER_RULE: usize = 2;

/// One combination as the report lists it.
#[derive(Debug, Clone, Serialize)]
pub struct Row {
    /// Number in catalogue order (from 0).
    pub index: u64,
    /// The parts in words.
    pub parts: String,
    /// Whether it is in the Pareto set.
    pub pareto: bool,
    /// Its figures.
    pub metrics: Metrics,
}

/// How often a rule rejected a combination, with an example.
#[derive(Debug, Clone, Serialize)]
pub struct RuleCount {
    /// The rule's name.
    pub rule: &'static str,
    /// Combinations that broke it.
    pub count: usize,
    /// Examples: the parts and what was compared.
    pub examples: Vec<(String, String)>,
}

/// The whole trade report.
#[derive(Debug, Clone, Serialize)]
pub struct TradeReport {
    /// Layout name.
    pub layout: String,
    /// Parts list name.
    pub parts: String,
    /// Currency of the prices.
    pub currency: String,
    /// Entries per list: valves, regulators, set pressures, tanks, then hole groups.
    pub list_sizes: Vec<(String, usize)>,
    /// Combinations in the catalogue.
    pub combinations: u64,
    /// How they were chosen.
    pub method: Method,
    /// Combinations evaluated.
    pub evaluated: usize,
    /// Combinations that broke no rule.
    pub accepted: usize,
    /// Of those, how many meet every requirement.
    pub meeting: usize,
    /// Rule counts, in rule order.
    pub rejections: Vec<RuleCount>,
    /// The Pareto set, in listing order.
    pub pareto: Vec<Row>,
    /// The lightest combination meeting every requirement.
    pub lightest: Option<Row>,
    /// The first rows of the ranking.
    pub ranked: Vec<Row>,
    /// Whether hold time took part; when not, why.
    pub hold_time: String,
    /// "What would it take", per property.
    pub what_it_takes: Vec<WhatItTakes>,
    /// The combination "what would it take" holds fixed.
    pub what_it_takes_basis: Option<String>,
    /// How the study ranks, in words.
    pub ranking_rules: Vec<&'static str>,
    /// Safety cautions.
    pub cautions: Vec<&'static str>,
}

/// How the study ranks, as every report states it.
pub const RANKING_RULES: [&str; 5] = [
    "combinations that break a rule are rejected and not ranked",
    "compared: worst margin (higher is better), gas for the manoeuvre list, system mass, price and peak coil current (lower is better), and hold time once the simulation gives it; each rounded first (margin 1e-6, gas 1 µg, mass 1 mg, price 0.0001, current 1 µA)",
    "Pareto set: no other accepted combination is at least as good on every count and better on one; equal combinations are all kept; listed by system mass, then price, then peak coil current, then worst margin (highest first), then manoeuvre gas, then catalogue order",
    "meeting every requirement: every margin at every flight state at least 1, and the manoeuvre list fits the usable gas after the reserve; lightest: least system mass, then price, then catalogue order",
    "ranking: combinations meeting every requirement first, lightest first (ties: price, then catalogue order); then the rest, highest worst margin first (ties: catalogue order)",
];

fn row(e: &Evaluated, pareto: bool) -> Option<Row> {
    Some(Row {
        index: e.index,
        parts: e.parts.clone(),
        pareto,
        metrics: e.metrics()?.clone(),
    })
}

/// Assemble the report.
pub fn trade_report(
    design: &Design,
    cat: &Catalogue,
    study: &Study,
    whats: &[WhatItTakes],
    basis: Option<usize>,
) -> TradeReport {
    let in_front = |i: usize| study.pareto.contains(&i);
    let accepted: Vec<usize> = (0..study.evaluated.len())
        .filter(|&i| study.evaluated[i].metrics().is_some())
        .collect();
    let meets = |i: usize| {
        study.evaluated[i]
            .metrics()
            .is_some_and(|m| m.meets_requirements)
    };
    let mut order = accepted.clone();
    order.sort_by(|&a, &b| {
        let (ma, mb) = (
            study.evaluated[a].metrics().expect("accepted"),
            study.evaluated[b].metrics().expect("accepted"),
        );
        meets(b)
            .cmp(&meets(a))
            .then_with(|| {
                if meets(a) {
                    ma.system_mass_kg
                        .total_cmp(&mb.system_mass_kg)
                        .then(ma.price.total_cmp(&mb.price))
                } else {
                    let w = |m: &Metrics| m.worst_margin.unwrap_or(f64::MAX);
                    w(mb).total_cmp(&w(ma))
                }
            })
            .then(study.evaluated[a].index.cmp(&study.evaluated[b].index))
    });
    let mut rejections = Vec::new();
    for (&rule, &count) in &study.rejections {
        let examples = study
            .evaluated
            .iter()
            .filter_map(|e| match &e.outcome {
                Outcome::Rejected { breaches } => breaches
                    .iter()
                    .find(|b| b.rule == rule)
                    .map(|b: &Breach| (e.parts.clone(), b.detail.clone())),
                Outcome::Accepted(_) => None,
            })
            .take(EXAMPLES_PER_RULE)
            .collect();
        rejections.push(RuleCount {
            rule: rule.name(),
            count,
            examples,
        });
    }
    let mut list_sizes = vec![
        ("valves".to_string(), cat.valves.len()),
        ("regulators".to_string(), cat.regulators.len()),
        (
            "set pressures".to_string(),
            cat.set_pressures_gauge_pa.len(),
        ),
        ("tanks".to_string(), cat.tanks.len()),
    ];
    list_sizes.extend(
        cat.holes
            .iter()
            .map(|h| (format!("hole sizes `{}`", h.name), h.diameters_m.len())),
    );
    TradeReport {
        layout: design.name.clone(),
        parts: cat.name.clone(),
        currency: cat.currency.clone(),
        list_sizes,
        combinations: study.combinations,
        method: study.method,
        evaluated: study.evaluated.len(),
        accepted: accepted.len(),
        meeting: accepted.iter().filter(|&&i| meets(i)).count(),
        rejections,
        pareto: study
            .pareto
            .iter()
            .filter_map(|&i| row(&study.evaluated[i], true))
            .collect(),
        lightest: study
            .lightest
            .and_then(|i| row(&study.evaluated[i], in_front(i))),
        ranked: order
            .iter()
            .take(RANKED_SHOWN)
            .filter_map(|&i| row(&study.evaluated[i], in_front(i)))
            .collect(),
        hold_time: if study.with_hold_time {
            "ranked (from the simulation)".to_string()
        } else {
            HOLD_TIME_NOT_COMPUTED.to_string()
        },
        what_it_takes: whats.to_vec(),
        what_it_takes_basis: basis.map(|i| study.evaluated[i].parts.clone()),
        ranking_rules: RANKING_RULES.to_vec(),
        cautions: CAUTIONS.to_vec(),
    }
}

fn grams(kg: Option<f64>) -> String {
    kg.map_or_else(
        || "no list".to_string(),
        |v| format!("{:.1} g", v * 1e3 + 0.0),
    )
}

fn margin(m: &Metrics) -> String {
    m.worst_margin
        .map_or_else(|| "none required".to_string(), |v| format!("{v:.2}"))
}

fn money(v: f64, currency: &str) -> String {
    if currency.is_empty() {
        format!("{:.2}", v + 0.0)
    } else {
        format!("{:.2} {currency}", v + 0.0)
    }
}

/// One line of figures for a combination.
pub fn figures(m: &Metrics, currency: &str) -> String {
    let gas = match (m.manoeuvre_gas_kg, m.available_gas_kg) {
        (Some(g), Some(a)) => format!(
            "manoeuvres {:.1} g of {:.1} g usable",
            g * 1e3 + 0.0,
            a * 1e3 + 0.0
        ),
        _ => "no manoeuvre list".to_string(),
    };
    format!(
        "worst margin {} ({}), {}, system mass {:.0} g, price {}, peak coil current {:.2} A{}",
        margin(m),
        m.worst_margin_at,
        gas,
        m.system_mass_kg * 1e3,
        money(m.price, currency),
        m.peak_coil_current_a,
        if m.meets_requirements {
            ", meets every requirement"
        } else {
            ""
        }
    )
}

/// A property value in the report's unit.
fn shown_value(w: &WhatItTakes, v: f64) -> String {
    let x = v * w.unit_scale + 0.0;
    let t = if x.abs() >= 100.0 {
        format!("{x:.0}")
    } else if x.abs() >= 1.0 {
        format!("{x:.3}")
    } else {
        format!("{x:.4}")
    };
    if w.unit.is_empty() {
        t
    } else {
        format!("{t} {}", w.unit)
    }
}

/// The answer for one property in words.
pub fn least_line(w: &WhatItTakes) -> String {
    let now = shown_value(w, w.current);
    match &w.least {
        Least::Found { value, breaks } => {
            let mut s = format!(
                "{}: at least {} meets every requirement (now {})",
                w.label,
                shown_value(w, *value),
                now
            );
            if !breaks.is_empty() {
                let names: Vec<&str> = breaks.iter().map(|b| b.rule.name()).collect();
                let _ = write!(s, "; with the other parts as they are that value breaks {}", names.join(", "));
            }
            s
        }
        Least::BelowRange { low } => format!(
            "{}: every requirement is met even at {}, the low end of the sweep (now {})",
            w.label,
            shown_value(w, *low),
            now
        ),
        Least::AboveRange { high } => format!(
            "{}: no value up to {} (the high end of the sweep) meets every requirement with the other parts as they are (now {})",
            w.label,
            shown_value(w, *high),
            now
        ),
    }
}

/// Plain-text report.
pub fn render_text(r: &TradeReport) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "Trade study: {} with the parts of \"{}\"",
        r.layout, r.parts
    );
    let sizes: Vec<String> = r
        .list_sizes
        .iter()
        .map(|(n, k)| format!("{k} {n}"))
        .collect();
    let _ = writeln!(s, "  lists: {}", sizes.join(", "));
    let _ = writeln!(
        s,
        "  {} combinations, {} evaluated ({}); {} broke no rule, {} meet every requirement",
        r.combinations,
        r.evaluated,
        match r.method {
            Method::Exhaustive => "every one",
            Method::Search => "seeded neighbourhood search",
        },
        r.accepted,
        r.meeting
    );
    let _ = writeln!(s, "  hold time: {}", r.hold_time);
    if !r.rejections.is_empty() {
        let _ = writeln!(s, "\nRules broken (a combination may break several)");
        for c in &r.rejections {
            let _ = writeln!(s, "  {:<24} {:>6} combination(s)", c.rule, c.count);
            for (parts, detail) in &c.examples {
                let _ = writeln!(s, "      e.g. {parts}: {detail}");
            }
        }
    }
    let _ = writeln!(s, "\nLightest combination meeting every requirement");
    match &r.lightest {
        Some(l) => {
            let _ = writeln!(s, "  #{} {}", l.index, l.parts);
            let _ = writeln!(s, "     {}", figures(&l.metrics, &r.currency));
        }
        None => {
            let _ = writeln!(s, "  none: no accepted combination meets every requirement; see \"what would it take\" below");
        }
    }
    let _ = writeln!(s, "\nPareto set ({} combination(s))", r.pareto.len());
    for p in &r.pareto {
        let _ = writeln!(s, "  #{} {}", p.index, p.parts);
        let _ = writeln!(s, "     {}", figures(&p.metrics, &r.currency));
    }
    let _ = writeln!(s, "\nRanking (first {})", r.ranked.len());
    for (k, p) in r.ranked.iter().enumerate() {
        let _ = writeln!(
            s,
            "  {:>2}. #{} {}{}",
            k + 1,
            p.index,
            p.parts,
            if p.pareto { "  [Pareto]" } else { "" }
        );
        let _ = writeln!(s, "      {}", figures(&p.metrics, &r.currency));
    }
    let _ = writeln!(
        s,
        "\nWhat would it take (one property at a time, the rest fixed)"
    );
    match &r.what_it_takes_basis {
        Some(b) => {
            let _ = writeln!(s, "  fixed: {b}");
            for w in &r.what_it_takes {
                let _ = writeln!(s, "  {}", least_line(w));
            }
        }
        None => {
            let _ = writeln!(s, "  nothing to vary: every combination broke a rule");
        }
    }
    let _ = writeln!(s, "\nHow the study ranks");
    for l in &r.ranking_rules {
        let _ = writeln!(s, "  - {l}");
    }
    let _ = writeln!(s, "\nCautions");
    for c in &r.cautions {
        let _ = writeln!(s, "  - {c}");
    }
    let _ = writeln!(s, "  - Part ratings here are the builder's own list; check every part's datasheet and certificate, and defer to pressure-vessel codes and the launch site's safety code.");
    s
}

/// The plots as (file stem, caption, SVG).
pub fn plots(
    study: &Study,
    whats: &[WhatItTakes],
    currency: &str,
) -> Vec<(String, String, String)> {
    let s = PlotSettings::default();
    let mut out = Vec::new();
    if let Some(Ok(p)) = plots::pareto_svg(study, currency, &s) {
        out.push((
            "trade-pareto".to_string(),
            "Worst margin against system mass; the Pareto set coloured by price, the lightest combination meeting every requirement ringed".to_string(),
            p.svg,
        ));
    }
    for w in whats {
        if let Some(Ok(p)) = plots::sweep_svg(w, &s) {
            let slug: String = w
                .label
                .chars()
                .map(|c| {
                    if c.is_ascii_alphanumeric() {
                        c.to_ascii_lowercase()
                    } else {
                        '-'
                    }
                })
                .collect::<String>()
                .split('-')
                .filter(|t| !t.is_empty())
                .collect::<Vec<_>>()
                .join("-");
            out.push((
                format!("trade-sweep-{slug}"),
                format!("What would it take: worst margin against {}", w.label),
                p.svg,
            ));
        }
    }
    out
}

/// Files of `trade --out` and of `run`: the report as text and JSON, the plots as SVG and PNG.
pub fn files(
    r: &TradeReport,
    plots: &[(String, String, String)],
) -> Result<Vec<OutputFile>, String> {
    let mut files = vec![
        OutputFile {
            name: "trade.txt".to_string(),
            bytes: render_text(r).into_bytes(),
        },
        OutputFile {
            name: "trade.json".to_string(),
            bytes: (serde_json::to_string_pretty(r).map_err(|e| e.to_string())? + "\n")
                .into_bytes(),
        },
    ];
    for (stem, _, svg) in plots {
        files.push(OutputFile {
            name: format!("{stem}.png"),
            bytes: svg_to_png(svg, 1.0).map_err(|e| e.to_string())?,
        });
        files.push(OutputFile {
            name: format!("{stem}.svg"),
            bytes: svg.clone().into_bytes(),
        });
    }
    Ok(files)
}

/// The section of the HTML report.
pub fn html_sections(r: &TradeReport, plots: &[(String, String, String)]) -> Vec<Section> {
    let mut blocks = vec![Block::Paragraph(format!(
        "{} combinations of the parts in \"{}\", {} evaluated; {} broke no rule and {} meet every requirement. Hold time: {}.",
        r.combinations, r.parts, r.evaluated, r.accepted, r.meeting, r.hold_time
    ))];
    blocks.push(Block::Paragraph(match &r.lightest {
        Some(l) => format!(
            "Lightest combination meeting every requirement: {} — {}.",
            l.parts,
            figures(&l.metrics, &r.currency)
        ),
        None => "No accepted combination meets every requirement.".to_string(),
    }));
    let table = |caption: &str, rows: &[Row]| Table {
        caption: caption.to_string(),
        headers: vec![
            "#".into(),
            "parts".into(),
            "worst margin".into(),
            "manoeuvre gas".into(),
            "system mass".into(),
            "price".into(),
            "peak coil current".into(),
            "meets all".into(),
        ],
        rows: rows
            .iter()
            .map(|p| {
                vec![
                    p.index.to_string(),
                    p.parts.clone(),
                    format!("{} ({})", margin(&p.metrics), p.metrics.worst_margin_at),
                    grams(p.metrics.manoeuvre_gas_kg),
                    format!("{:.0} g", p.metrics.system_mass_kg * 1e3),
                    money(p.metrics.price, &r.currency),
                    format!("{:.2} A", p.metrics.peak_coil_current_a),
                    if p.metrics.meets_requirements {
                        "yes"
                    } else {
                        "no"
                    }
                    .to_string(),
                ]
            })
            .collect(),
    };
    blocks.push(Block::Table(table("Pareto set", &r.pareto)));
    if !r.rejections.is_empty() {
        blocks.push(Block::Table(Table {
            caption: "rules broken".to_string(),
            headers: vec!["rule".into(), "combinations".into(), "example".into()],
            rows: r
                .rejections
                .iter()
                .map(|c| {
                    vec![
                        c.rule.to_string(),
                        c.count.to_string(),
                        c.examples
                            .first()
                            .map_or_else(String::new, |(p, d)| format!("{p}: {d}")),
                    ]
                })
                .collect(),
        }));
    }
    if !r.what_it_takes.is_empty() {
        let mut items: Vec<String> = r.what_it_takes.iter().map(least_line).collect();
        if let Some(b) = &r.what_it_takes_basis {
            items.insert(0, format!("fixed: {b}"));
        }
        blocks.push(Block::List(items));
    }
    for (_, caption, svg) in plots {
        blocks.push(Block::Figure(Figure {
            caption: caption.clone(),
            svg: svg.clone(),
        }));
    }
    blocks.push(Block::List(
        r.ranking_rules.iter().map(|s| s.to_string()).collect(),
    ));
    vec![Section {
        heading: "Parts: trade study".to_string(),
        blocks,
    }]
}

/// Rule names and what each means, for help texts and the README.
pub fn rule_descriptions() -> Vec<(&'static str, &'static str)> {
    use Rule::*;
    [
        (TankFit, "the tank is wider than the body tube's inside"),
        (TankRating, "the tank is rated below its fill pressure"),
        (
            RegulatorInletRating,
            "the regulator (a chain's first stage) is rated below the tank pressure",
        ),
        (
            ChainInletRating,
            "a chain's working stage is rated below the first stage's outlet",
        ),
        (
            ChainIntermediate,
            "a chain's first stage delivers less than the working stage needs",
        ),
        (
            SetPressureRange,
            "the set pressure is outside the regulator's range",
        ),
        (
            FillBelowRegulator,
            "the fill pressure is not above what the regulator needs at its inlet",
        ),
        (
            ValveRating,
            "the valve is rated below the regulated pressure it sees",
        ),
        (
            CoilCurrent,
            "every valve open at once draws more than the supply limit",
        ),
        (Analysis, "the analysis cannot be made"),
    ]
    .into_iter()
    .map(|(r, d)| (r.name(), d))
    .collect()
}
