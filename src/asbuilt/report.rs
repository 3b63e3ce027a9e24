//! The `tolerance` report: spreads of authority and margin per flight state and
//! axis, the chance that any margin falls below 1, cross-coupling torques and
//! side forces, on/off rows that stop meeting their thresholds, minimum impulse
//! bits, and the ranked sensitivities. Plain data (serialised as JSON) and a
//! text rendering.

// Index loops here follow the formulas (axis k, input j, port i, pairs j < k).
#![allow(clippy::needless_range_loop)]

use super::onoff::OnOffCheck;
use super::sampling::{self, Sample};
use super::sensitivity::{sensitivities, MarginSensitivity};
use super::spec::ToleranceSpec;
use super::stats::{mean_variance, Percentiles};
use super::vehicle::Basis;
use super::AsBuiltError;
use crate::allocation::OnOffOptions;
use crate::analysis::authority::AXES;
use crate::analysis::Analysis;
use crate::model::Design;
use serde::Serialize;
use std::fmt::Write;

/// How to sample.
#[derive(Debug, Clone, PartialEq)]
pub struct SpreadSettings {
    /// Number of as-built vehicles.
    pub samples: usize,
    /// Random seed.
    pub seed: u64,
    /// Thresholds of the on/off table (as `table` and `run` use them).
    pub onoff: OnOffOptions,
}

impl Default for SpreadSettings {
    fn default() -> Self {
        Self {
            samples: 2000,
            seed: 1,
            onoff: OnOffOptions::default(),
        }
    }
}

/// One input that varies, for the report.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InputRow {
    /// What varies.
    pub input: String,
    /// Its spread with unit, e.g. "±0.5 mm" or "σ 1 deg".
    pub spread: String,
}

/// One axis at one state.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AxisSpread {
    /// Axis name.
    pub axis: &'static str,
    /// Authority as drawn (weaker sense), N·m.
    pub nominal_authority_n_m: f64,
    /// Authority (weaker sense) over the samples, N·m.
    pub authority_n_m: Percentiles,
    /// Required torque over the samples, N·m (absent when nothing is required).
    pub required_n_m: Option<Percentiles>,
    /// Margin as drawn (absent when nothing is required).
    pub nominal_margin: Option<f64>,
    /// Margin over the samples.
    pub margin: Option<Percentiles>,
    /// Share of samples with this margin below 1.
    pub probability_margin_below_one: Option<f64>,
}

/// Torque of one port on an axis it is not meant for.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OffAxis {
    /// Axis name.
    pub axis: &'static str,
    /// As drawn, N·m.
    pub nominal_n_m: f64,
    /// Magnitude over the samples, N·m.
    pub magnitude_n_m: Percentiles,
}

/// One port's cross-coupling and side force at one state.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PortCoupling {
    /// Port name.
    pub port: String,
    /// The axis it mainly serves: the largest share of that axis's required torque.
    pub main_axis: &'static str,
    /// Its torque on the other two axes.
    pub off_axis: Vec<OffAxis>,
    /// Lateral force (|(F_y, F_z)|) as drawn, N.
    pub nominal_side_force_n: f64,
    /// Lateral force over the samples, N.
    pub side_force_n: Percentiles,
}

/// One on/off row on the as-built vehicles.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RowSpread {
    /// Command (roll, pitch, yaw).
    pub command: [i8; 3],
    /// Open ports.
    pub ports: Vec<String>,
    /// Share of samples on which the row no longer meets its thresholds.
    pub share_failing: f64,
    /// Lateral force of the set as drawn, N.
    pub nominal_side_force_n: f64,
    /// Lateral force over the samples, N.
    pub side_force_n: Percentiles,
}

/// The on/off table on the as-built vehicles at one state.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OnOffSpread {
    /// Rows that met their thresholds as drawn (the ones checked).
    pub rows_checked: usize,
    /// Rows that did not meet them even as drawn (near misses, not checked).
    pub rows_not_met_as_drawn: usize,
    /// Mean over samples of the share of checked rows that fail.
    pub mean_share_failing: f64,
    /// Share of samples on which at least one checked row fails.
    pub probability_any_failing: f64,
    /// Per row, most often failing first (ties in table order).
    pub rows: Vec<RowSpread>,
}

/// One flight state.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StateSpread {
    /// Name.
    pub name: String,
    /// Per axis.
    pub axes: Vec<AxisSpread>,
    /// Share of samples with any margin of this state below 1.
    pub probability_any_margin_below_one: f64,
    /// Per port.
    pub ports: Vec<PortCoupling>,
    /// The on/off table.
    pub onoff: OnOffSpread,
}

/// A port's minimum impulse bit over the samples (first flight state).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ImpulseBit {
    /// Port name.
    pub port: String,
    /// As drawn, N·s.
    pub nominal_n_s: f64,
    /// Over the samples, N·s.
    pub spread_n_s: Percentiles,
}

/// The whole report.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ToleranceReport {
    /// Layout name.
    pub layout: String,
    /// Number of as-built vehicles sampled.
    pub samples: usize,
    /// Random seed.
    pub seed: u64,
    /// What varies and how.
    pub inputs: Vec<InputRow>,
    /// Per flight state.
    pub states: Vec<StateSpread>,
    /// Share of samples with any margin at any state below 1.
    pub probability_any_margin_below_one: f64,
    /// Minimum impulse bits at the first state.
    pub minimum_impulse_bits: Vec<ImpulseBit>,
    /// First-order sensitivities of each state's and axis's weaker-sense margin.
    pub sensitivities: Vec<MarginSensitivity>,
    /// Measured against designed, when the layout has `[[measured]]` ports.
    pub measured: Option<super::measured::MeasuredReport>,
    /// How the numbers were made.
    pub method: Vec<String>,
    /// Safety cautions.
    pub cautions: Vec<&'static str>,
}

/// Everything the report and the plots are made of.
#[derive(Debug, Clone)]
pub struct SpreadRun {
    /// The reduced design.
    pub basis: Basis,
    /// On/off checks per state.
    pub checks: Vec<OnOffCheck>,
    /// The vehicle as drawn.
    pub nominal: Sample,
    /// The samples.
    pub samples: Vec<Sample>,
}

/// Sample the as-built vehicles of `design` (with its `analysis`) under `spec`.
pub fn sample(
    design: &Design,
    analysis: &Analysis,
    spec: &ToleranceSpec,
    settings: &SpreadSettings,
) -> Result<SpreadRun, AsBuiltError> {
    if settings.samples < 2 {
        return Err(AsBuiltError::Setting(
            "the number of samples must be at least 2".to_string(),
        ));
    }
    let basis = Basis::new(design, analysis, spec)?;
    let columns = sampling::nominal_columns(&basis);
    let mut checks = Vec::new();
    for (k, st) in analysis.states.iter().enumerate() {
        let tables = crate::export::bundle::state_tables(design, st, &settings.onoff, None)
            .map_err(AsBuiltError::Model)?;
        checks.push(OnOffCheck::new(
            &tables,
            &columns[k],
            &basis.states[k].droop_factor,
            &settings.onoff,
        ));
    }
    let zero = vec![0.0; basis.inputs.len()];
    let nominal = sampling::evaluate(
        &basis,
        &checks,
        &zero,
        &mut super::vehicle::Applied::default(),
    );
    let samples = sampling::run(&basis, &checks, settings.samples, settings.seed);
    Ok(SpreadRun {
        basis,
        checks,
        nominal,
        samples,
    })
}

fn pct(values: &[f64]) -> Percentiles {
    // Every value here is finite by construction; the zero fallback is never shown.
    Percentiles::of(values).unwrap_or(Percentiles {
        p1: 0.0,
        p5: 0.0,
        p50: 0.0,
        p95: 0.0,
        p99: 0.0,
    })
}

fn share(hits: usize, n: usize) -> f64 {
    if n == 0 {
        0.0
    } else {
        hits as f64 / n as f64
    }
}

/// Describe each input's spread in the layout's usual units.
fn input_rows(basis: &Basis) -> Vec<InputRow> {
    use super::spec::Input;
    let names = basis.port_names();
    basis
        .inputs
        .iter()
        .map(|(input, s)| {
            let spread = match input {
                Input::Station(_) | Input::Hole(_) | Input::CgStation => s.describe(1e3, "mm"),
                Input::Clock(_)
                | Input::TangentialCant(_)
                | Input::AxialCant(_)
                | Input::Misalignment => s.describe(180.0 / std::f64::consts::PI, "deg"),
                Input::DischargeCoefficient(_) => s.describe(1.0, "(absolute)"),
                Input::ValveCv(_) | Input::Mass | Input::Ixx | Input::Iyy => s.describe(100.0, "%"),
                Input::SetPressure => s.describe(1e-5, "bar"),
                Input::OpeningDelay | Input::ClosingDelay => s.describe(1e3, "ms"),
            };
            InputRow {
                input: input.label(&names),
                spread,
            }
        })
        .collect()
}

/// Method notes shown with every report.
pub const METHOD: [&str; 6] = [
    "each sample is one as-built vehicle: every input drawn independently from its spread (uniform ± or normal σ), one ChaCha8 random stream per sample",
    "port geometry is exact: each hole is re-placed and its force and torque about the shifted CG recomputed; authority is the exact ray limit of the attainable torque set along ±roll, ±pitch, ±yaw",
    "port thrust: ln T is a quadratic (with cross terms) in the logarithms of hole diameter, discharge coefficient, valve Cv and set pressure over nominal, fitted through 15 full regulator–valve–nozzle solves per state (nominal, ±5 % each, +5 % each pair)",
    "a mass error scales both inertias with it; the inertia tolerances come on top; the CG shift is the same at every state",
    "on/off rows keep the thresholds of the table as drawn (what the firmware expects); only rows that met them as drawn are checked",
    "sensitivities: central differences (step 1 % of each input's standard deviation) of each axis's weaker-sense margin; variance shares from first-order propagation",
];

/// Summarise a run.
pub fn summarise(design: &Design, run: &SpreadRun, settings: &SpreadSettings) -> ToleranceReport {
    let basis = &run.basis;
    let names = basis.port_names();
    let n = run.samples.len();
    let mut states = Vec::new();
    let mut any_overall = 0usize;
    let mut below_any = vec![false; n];
    for (k, sb) in basis.states.iter().enumerate() {
        let nom = &run.nominal.states[k];
        let mut axes = Vec::new();
        let mut any = vec![false; n];
        for axis in 0..3 {
            let auth: Vec<f64> = run
                .samples
                .iter()
                .map(|s| s.states[k].positive_n_m[axis].min(s.states[k].negative_n_m[axis]))
                .collect();
            let margins: Vec<Option<f64>> = run
                .samples
                .iter()
                .map(|s| s.states[k].margin(axis))
                .collect();
            let has_req = nom.required_n_m[axis] > 0.0;
            let m: Vec<f64> = margins.iter().flatten().copied().collect();
            for (i, v) in margins.iter().enumerate() {
                if v.is_some_and(|v| v < 1.0) {
                    any[i] = true;
                    below_any[i] = true;
                }
            }
            let req: Vec<f64> = run
                .samples
                .iter()
                .map(|s| s.states[k].required_n_m[axis])
                .collect();
            axes.push(AxisSpread {
                axis: AXES[axis],
                nominal_authority_n_m: nom.positive_n_m[axis].min(nom.negative_n_m[axis]),
                authority_n_m: pct(&auth),
                required_n_m: has_req.then(|| pct(&req)),
                nominal_margin: nom.margin(axis),
                margin: (has_req && !m.is_empty()).then(|| pct(&m)),
                probability_margin_below_one: has_req
                    .then(|| share(m.iter().filter(|&&v| v < 1.0).count(), n)),
            });
        }
        // Main axis of each port: the largest share of an axis's requirement
        // (raw torque where nothing is required); ties go to the lower axis.
        let req0 = nom.required_n_m;
        let ports = names
            .iter()
            .enumerate()
            .map(|(i, name)| {
                let t = nom.port_torque_n_m[i];
                let weight = |a: usize| {
                    if req0[a] > 0.0 {
                        t[a].abs() / req0[a]
                    } else {
                        t[a].abs()
                    }
                };
                let mut main = 0;
                for a in 1..3 {
                    if weight(a) > weight(main) {
                        main = a;
                    }
                }
                let off_axis = (0..3)
                    .filter(|&a| a != main)
                    .map(|a| OffAxis {
                        axis: AXES[a],
                        nominal_n_m: t[a],
                        magnitude_n_m: pct(&run
                            .samples
                            .iter()
                            .map(|s| s.states[k].port_torque_n_m[i][a].abs())
                            .collect::<Vec<_>>()),
                    })
                    .collect();
                PortCoupling {
                    port: name.clone(),
                    main_axis: AXES[main],
                    off_axis,
                    nominal_side_force_n: nom.port_side_force_n[i],
                    side_force_n: pct(&run
                        .samples
                        .iter()
                        .map(|s| s.states[k].port_side_force_n[i])
                        .collect::<Vec<_>>()),
                }
            })
            .collect();
        let check = &run.checks[k];
        let rows_checked = check.rows.len();
        let mut rows: Vec<(usize, RowSpread)> = check
            .rows
            .iter()
            .enumerate()
            .map(|(r, row)| {
                let fails = run
                    .samples
                    .iter()
                    .filter(|s| s.states[k].failed_rows & (1 << r) != 0)
                    .count();
                (
                    r,
                    RowSpread {
                        command: row.command,
                        ports: (0..names.len())
                            .filter(|&i| row.mask & (1 << i) != 0)
                            .map(|i| names[i].clone())
                            .collect(),
                        share_failing: share(fails, n),
                        nominal_side_force_n: nom.row_side_force_n[r],
                        side_force_n: pct(&run
                            .samples
                            .iter()
                            .map(|s| s.states[k].row_side_force_n[r])
                            .collect::<Vec<_>>()),
                    },
                )
            })
            .collect();
        rows.sort_by(|a, b| {
            b.1.share_failing
                .total_cmp(&a.1.share_failing)
                .then(a.0.cmp(&b.0))
        });
        let failing: Vec<f64> = run
            .samples
            .iter()
            .map(|s| share(s.states[k].failed_rows.count_ones() as usize, rows_checked))
            .collect();
        let onoff = OnOffSpread {
            rows_checked,
            rows_not_met_as_drawn: 26 - rows_checked,
            mean_share_failing: mean_variance(&failing).0,
            probability_any_failing: share(
                run.samples
                    .iter()
                    .filter(|s| s.states[k].failed_rows != 0)
                    .count(),
                n,
            ),
            rows: rows.into_iter().map(|r| r.1).collect(),
        };
        states.push(StateSpread {
            name: sb.name.clone(),
            axes,
            probability_any_margin_below_one: share(any.iter().filter(|&&b| b).count(), n),
            ports,
            onoff,
        });
    }
    any_overall += below_any.iter().filter(|&&b| b).count();
    let minimum_impulse_bits = names
        .iter()
        .enumerate()
        .map(|(i, name)| ImpulseBit {
            port: name.clone(),
            nominal_n_s: run
                .nominal
                .minimum_impulse_bit_n_s
                .get(i)
                .copied()
                .unwrap_or(0.0),
            spread_n_s: pct(&run
                .samples
                .iter()
                .map(|s| s.minimum_impulse_bit_n_s.get(i).copied().unwrap_or(0.0))
                .collect::<Vec<_>>()),
        })
        .collect();
    ToleranceReport {
        layout: design.name.clone(),
        samples: n,
        seed: settings.seed,
        inputs: input_rows(basis),
        states,
        probability_any_margin_below_one: share(any_overall, n),
        minimum_impulse_bits,
        sensitivities: sensitivities(basis),
        measured: None,
        method: METHOD.iter().map(|s| s.to_string()).collect(),
        cautions: crate::analysis::CAUTIONS.to_vec(),
    }
}

/// Sample and summarise in one call.
pub fn tolerance_report(
    design: &Design,
    analysis: &Analysis,
    spec: &ToleranceSpec,
    settings: &SpreadSettings,
) -> Result<(ToleranceReport, SpreadRun), AsBuiltError> {
    let run = sample(design, analysis, spec, settings)?;
    Ok((summarise(design, &run, settings), run))
}

fn p5(p: &Percentiles, k: f64, digits: usize) -> String {
    p.values()
        .iter()
        .map(|v| format!("{:.*}", digits, clean(v * k)))
        .collect::<Vec<_>>()
        .join("  ")
}

/// Never print negative zero: values that would print as -0.000… print as 0.
fn clean(v: f64) -> f64 {
    if v.abs() < 5e-7 {
        0.0
    } else {
        v
    }
}

/// For three-decimal output: anything that rounds to zero prints as 0.000.
fn clean3(v: f64) -> f64 {
    if v.abs() < 5e-4 {
        0.0
    } else {
        v
    }
}

fn percent(v: f64) -> String {
    format!("{:.1} %", clean(v * 100.0))
}

/// How many sensitivity entries the text shows per margin.
const SHOWN_ENTRIES: usize = 5;

/// The report as text.
pub fn render_text(r: &ToleranceReport) -> String {
    let mut o = String::new();
    let _ = writeln!(o, "As-built spread: {}", r.layout);
    let _ = writeln!(
        o,
        "{} sampled vehicles, seed {}. Percentiles are 1st, 5th, 50th, 95th, 99th.",
        r.samples, r.seed
    );
    let _ = writeln!(o, "\nTolerances");
    for i in &r.inputs {
        let _ = writeln!(o, "  {:<40} {}", i.input, i.spread);
    }
    let _ = writeln!(
        o,
        "\nChance that any margin at any flight state falls below 1: {}",
        percent(r.probability_any_margin_below_one)
    );
    for s in &r.states {
        let _ = writeln!(o, "\nFlight state: {}", s.name);
        let _ = writeln!(
            o,
            "  axis   authority as drawn (mN m)   authority p1 p5 p50 p95 p99 (mN m)     margin as drawn   margin p1 p5 p50 p95 p99       P(margin < 1)"
        );
        for a in &s.axes {
            let (mn, mp, pb) = match (&a.nominal_margin, &a.margin, a.probability_margin_below_one)
            {
                (Some(n), Some(m), Some(p)) => (format!("{n:.2}"), p5(m, 1.0, 2), percent(p)),
                _ => (
                    "no requirement".to_string(),
                    "no requirement".to_string(),
                    "—".to_string(),
                ),
            };
            let _ = writeln!(
                o,
                "  {:<6} {:>26.2}   {:<38} {:>15}   {:<30} {}",
                a.axis,
                clean(a.nominal_authority_n_m * 1e3),
                p5(&a.authority_n_m, 1e3, 2),
                mn,
                mp,
                pb
            );
        }
        let _ = writeln!(
            o,
            "  chance that any margin here falls below 1: {}",
            percent(s.probability_any_margin_below_one)
        );
        let _ = writeln!(
            o,
            "  cross-coupling: each port's torque on the axes it is not meant for (magnitude, mN m), and its side force (N)"
        );
        for p in &s.ports {
            let off: Vec<String> = p
                .off_axis
                .iter()
                .map(|x| {
                    format!(
                        "{} {:.3} as drawn, p50 {:.3}, p99 {:.3}",
                        x.axis,
                        clean3(x.nominal_n_m * 1e3),
                        clean(x.magnitude_n_m.p50 * 1e3),
                        clean(x.magnitude_n_m.p99 * 1e3)
                    )
                })
                .collect();
            let _ = writeln!(
                o,
                "    {:<12} ({} port): {}; side force {:.3} N as drawn, p99 {:.3} N",
                p.port,
                p.main_axis,
                off.join("; "),
                clean(p.nominal_side_force_n),
                clean(p.side_force_n.p99)
            );
        }
        let on = &s.onoff;
        let _ = writeln!(
            o,
            "  on/off table: {} rows checked ({} did not meet their thresholds even as drawn); on average {} of them fail on an as-built vehicle; at least one fails on {} of the vehicles",
            on.rows_checked,
            on.rows_not_met_as_drawn,
            percent(on.mean_share_failing),
            percent(on.probability_any_failing)
        );
        for row in on.rows.iter().filter(|r| r.share_failing > 0.0).take(5) {
            let _ = writeln!(
                o,
                "    command {:+} {:+} {:+} ({}): fails on {}; side force {:.3} N as drawn, p99 {:.3} N",
                row.command[0],
                row.command[1],
                row.command[2],
                row.ports.join(", "),
                percent(row.share_failing),
                clean(row.nominal_side_force_n),
                clean(row.side_force_n.p99)
            );
        }
    }
    let _ = writeln!(
        o,
        "\nMinimum impulse bit at the first state (mN s): as drawn, then p1 p5 p50 p95 p99"
    );
    for b in &r.minimum_impulse_bits {
        let _ = writeln!(
            o,
            "  {:<12} {:>8.3}   {}",
            b.port,
            clean(b.nominal_n_s * 1e3),
            p5(&b.spread_n_s, 1e3, 3)
        );
    }
    let _ = writeln!(
        o,
        "\nWhich tolerance matters (first order, central differences; share of each margin's variance)"
    );
    for m in &r.sensitivities {
        let _ = writeln!(
            o,
            "  {} {} ({} sense): margin {:.2} as drawn, first-order σ {:.3}",
            m.state, m.axis, m.sense, m.nominal_margin, m.first_order_sigma
        );
        for e in m
            .entries
            .iter()
            .filter(|e| e.variance_share > 0.0)
            .take(SHOWN_ENTRIES)
        {
            let _ = writeln!(
                o,
                "    {:>6}  {:<40} σ of margin {:.4}{}",
                percent(e.variance_share),
                e.label,
                e.margin_sigma,
                if e.corner {
                    " (limiting facet changes here: first order unreliable)"
                } else {
                    ""
                }
            );
        }
    }
    if let Some(m) = &r.measured {
        let _ = writeln!(o);
        o.push_str(&super::measured::render_text(m));
    }
    let _ = writeln!(o, "\nMethod");
    for m in &r.method {
        let _ = writeln!(o, "  - {m}");
    }
    let _ = writeln!(o, "\nSafety");
    for c in &r.cautions {
        let _ = writeln!(o, "  - {c}");
    }
    super::stats::without_signed_zeros(&o)
}

/// A few lines for `run`: the chance of a margin below 1, the weakest margin's
/// spread and the tolerance that matters most for it.
pub fn render_summary(r: &ToleranceReport) -> String {
    let mut o = String::new();
    let _ = writeln!(
        o,
        "As built ({} sampled vehicles, seed {}): chance that any margin falls below 1: {}",
        r.samples,
        r.seed,
        percent(r.probability_any_margin_below_one)
    );
    for s in &r.states {
        let weakest = s
            .axes
            .iter()
            .filter_map(|a| a.margin.map(|m| (a, m)))
            .reduce(|x, y| if y.1.p5 < x.1.p5 { y } else { x });
        if let Some((a, m)) = weakest {
            let _ = writeln!(
                o,
                "  {}: weakest {} margin, p5 {:.2}, p50 {:.2} (as drawn {:.2}); on/off rows failing on average {}",
                s.name,
                a.axis,
                m.p5,
                m.p50,
                a.nominal_margin.unwrap_or(0.0),
                percent(s.onoff.mean_share_failing)
            );
        }
    }
    if let Some(m) = super::plots::limiting(r) {
        if let Some(e) = m.entries.first().filter(|e| e.variance_share > 0.0) {
            let _ = writeln!(
                o,
                "  the {} margin at {} depends most on {} ({} of its first-order variance)",
                m.axis,
                m.state,
                e.label,
                percent(e.variance_share)
            );
        }
    }
    let _ = writeln!(o, "  full report: tolerance.txt and tolerance.json");
    super::stats::without_signed_zeros(&o)
}
