//! What `simulate` prints and writes (here rather than in `report`, so the module
//! graph stays acyclic: `export` uses `report`, and this uses `export`): the text report, the JSON summary, the CSV
//! time series, and the report sections `run` adds.

use crate::export::html::{Block, Section, Table};
use crate::sim::montecarlo::MonteCarlo;
use crate::sim::run::{Plant, RunResult};
use serde::Serialize;
use std::fmt::Write;

/// Caution printed with every simulation.
pub const CAUTION: &str = "The simulation is a design estimate of a model, not a test: fly a vehicle only \
after stand tests with the real valves and tank; high-pressure gas systems follow your pressure-vessel \
codes, the launch site's safety code and licensed practice.";

/// The JSON summary of one case.
#[derive(Debug, Clone, Serialize)]
pub struct CaseSummary<'a> {
    /// Units of the fields, in words.
    pub units: &'static str,
    /// Mount, in words.
    pub mount: &'static str,
    /// Controller, in words.
    pub controller: String,
    /// The nominal run.
    #[serde(flatten)]
    pub nominal: &'a RunResult,
    /// Monte Carlo, when asked for.
    pub monte_carlo: Option<&'a MonteCarlo>,
    /// Caution.
    pub caution: &'static str,
}

/// Controller in words.
pub fn controller_words(plant: &Plant) -> String {
    use crate::sim::case::Controller;
    let c = plant.case();
    match c.controller {
        Controller::OnOff {
            deadband_rad,
            hysteresis_rad,
            rate_weight_s,
        } => format!(
            "on/off per axis on s = error + {rate_weight_s:.3} s × rate, deadband {:.2}°, hysteresis {:.2}°, \
             firing the 27-row on/off table; control period {:.1} ms; minimum on-time {:.1} ms",
            deadband_rad.to_degrees(),
            hysteresis_rad.to_degrees(),
            c.sensing.control_period_s * 1e3,
            c.minimum_on_time_s * 1e3
        ),
        Controller::Pid { .. } => {
            let g = plant.gains().unwrap_or_default_gains();
            format!(
                "PD/PID torque command → least-gas duty cycles (duty-cycle map) → PWM at a {:.1} ms period, \
                 minimum on-time {:.1} ms; gains roll/pitch/yaw kp {} N·m/rad, kd {} N·m·s/rad, ki {} N·m/(rad·s)",
                c.sensing.control_period_s * 1e3,
                c.minimum_on_time_s * 1e3,
                g.iter().map(|a| format!("{:.4}", a.kp)).collect::<Vec<_>>().join("/"),
                g.iter().map(|a| format!("{:.4}", a.kd)).collect::<Vec<_>>().join("/"),
                g.iter().map(|a| format!("{:.4}", a.ki)).collect::<Vec<_>>().join("/"),
            )
        }
    }
}

trait OrZero {
    fn unwrap_or_default_gains(self) -> [crate::sim::case::AxisGains; 3];
}

impl OrZero for Option<[crate::sim::case::AxisGains; 3]> {
    fn unwrap_or_default_gains(self) -> [crate::sim::case::AxisGains; 3] {
        self.unwrap_or(
            [crate::sim::case::AxisGains {
                kp: 0.0,
                ki: 0.0,
                kd: 0.0,
            }; 3],
        )
    }
}

fn opt_deg(v: Option<f64>) -> String {
    v.map_or("none seen".to_string(), |x| {
        format!("{:.3}°", x.to_degrees())
    })
}

fn opt_s(v: Option<f64>, none: &str) -> String {
    v.map_or(none.to_string(), |x| format!("{x:.2} s"))
}

/// The JSON summary.
pub fn summary<'a>(plant: &Plant, r: &'a RunResult, mc: Option<&'a MonteCarlo>) -> CaseSummary<'a> {
    CaseSummary {
        units: "SI: s, kg, rad, rad/s, Pa absolute, K; *_rad fields are attitude errors about the body axes",
        mount: plant.case().mount.words(),
        controller: controller_words(plant),
        nominal: r,
        monte_carlo: mc,
        caution: CAUTION,
    }
}

/// The text report of one case.
pub fn render_text(plant: &Plant, r: &RunResult, mc: Option<&MonteCarlo>) -> String {
    let mut o = String::new();
    let c = plant.case();
    let _ = writeln!(
        o,
        "Case `{}` (flight state `{}`, {}, {:.1} s)",
        r.case,
        c.state,
        c.mount.words(),
        r.duration_s
    );
    let _ = writeln!(o, "  controller: {}", controller_words(plant));
    let _ = writeln!(
        o,
        "  pointing requirement: {:.2}° per axis",
        c.pointing_rad.to_degrees()
    );
    let _ = writeln!(o, "  hold time: {:.2} s ({})", r.hold_time_s, r.hold_end);
    let _ = writeln!(
        o,
        "  gas used: {:.3} g of {:.3} g; tank at the end {:.2} bar absolute, lowest tank temperature {:.1} K",
        r.gas_used_kg * 1e3,
        r.gas_start_kg * 1e3,
        r.end_tank_pressure_pa / 1e5,
        r.lowest_tank_temperature_k
    );
    let _ = writeln!(
        o,
        "  regulator dropout: {}; gas out: {}",
        opt_s(r.regulator_dropout_s, "not reached"),
        opt_s(r.gas_out_s, "not reached")
    );
    let _ = writeln!(
        o,
        "  axis   limit cycle (half p-p)   period      settling     peak rate"
    );
    for a in &r.axes {
        if !a.free {
            let _ = writeln!(o, "  {:<6} locked by the mount", a.axis);
            continue;
        }
        let _ = writeln!(
            o,
            "  {:<6} {:<24} {:<11} {:<12} {:.2}°/s",
            a.axis,
            opt_deg(a.limit_cycle_amplitude_rad),
            opt_s(a.limit_cycle_period_s, "none seen"),
            opt_s(a.settling_time_s, "never"),
            a.peak_rate_rad_s.to_degrees()
        );
    }
    let _ = writeln!(
        o,
        "  port          pulses   on time    shortest pulse   gas"
    );
    for p in &r.ports {
        let _ = writeln!(
            o,
            "  {:<13} {:>6}   {:>7.3} s  {:<16} {:.3} g",
            p.port,
            p.pulses,
            p.on_time_s,
            p.shortest_pulse_s
                .map_or("never fired".to_string(), |s| format!("{:.1} ms", s * 1e3)),
            p.gas_kg * 1e3
        );
    }
    let _ = writeln!(o, "  findings:");
    for f in &r.findings {
        let _ = writeln!(o, "  - {f}");
    }
    if let Some(m) = mc {
        let _ = writeln!(
            o,
            "  Monte Carlo: {} runs, seed {}; {:.1} % held to the end",
            m.runs,
            m.seed,
            100.0 * m.held_to_end_share
        );
        let _ = writeln!(
            o,
            "  figure                                   p5          p50         p95"
        );
        for f in &m.figures {
            let _ = writeln!(
                o,
                "  {:<40} {:<11} {:<11} {:<11}",
                f.figure,
                fmt(f.p5),
                fmt(f.p50),
                fmt(f.p95)
            );
        }
    }
    let _ = writeln!(o, "  caution: {CAUTION}");
    o
}

fn fmt(v: f64) -> String {
    let v = if v == 0.0 { 0.0 } else { v };
    if v.abs() >= 1e-3 || v == 0.0 {
        format!("{v:.4}")
    } else {
        format!("{v:.3e}")
    }
}

/// The CSV time series: one header line with units, then one row per recorded instant.
pub fn render_csv(plant: &Plant, r: &RunResult) -> String {
    let mut o = String::new();
    let Some(s) = &r.series else {
        return o;
    };
    o.push_str("time_s,roll_error_rad,pitch_error_rad,yaw_error_rad,roll_rate_rad_s,pitch_rate_rad_s,yaw_rate_rad_s,tank_pressure_pa_abs,tank_temperature_k,gas_in_tank_kg,valves_open_mask");
    for n in plant.port_names() {
        let _ = write!(o, ",thrust_{}_n", n.replace([',', '"', '\n'], "_"));
    }
    o.push('\n');
    let z = |v: f64| if v == 0.0 { 0.0 } else { v };
    for i in 0..s.time_s.len() {
        let e = s.error_rad[i];
        let w = s.rate_rad_s[i];
        let _ = write!(
            o,
            "{:.6},{:.6e},{:.6e},{:.6e},{:.6e},{:.6e},{:.6e},{:.1},{:.3},{:.6e},{}",
            s.time_s[i],
            z(e[0]),
            z(e[1]),
            z(e[2]),
            z(w[0]),
            z(w[1]),
            z(w[2]),
            s.tank_pressure_pa[i],
            s.tank_temperature_k[i],
            s.gas_kg[i],
            s.valve_mask[i]
        );
        for th in &s.thrust_n {
            let _ = write!(o, ",{:.4}", z(th[i]));
        }
        o.push('\n');
    }
    o
}

/// The report section `run` adds for a case.
pub fn html_section(plant: &Plant, r: &RunResult, plots: &[(String, String)]) -> Section {
    let mut blocks = vec![
        Block::Paragraph(format!(
            "Flight state `{}`, {}, {:.1} s; controller: {}.",
            plant.case().state,
            plant.case().mount.words(),
            r.duration_s,
            controller_words(plant)
        )),
        Block::List(r.findings.clone()),
    ];
    let mut t = Table {
        headers: vec![
            "axis".into(),
            "limit cycle, half peak-to-peak (deg)".into(),
            "period (s)".into(),
            "settling (s)".into(),
            "peak rate (deg/s)".into(),
        ],
        ..Table::default()
    };
    for a in &r.axes {
        if !a.free {
            t.rows.push(vec![
                a.axis.into(),
                "locked by the mount".into(),
                String::new(),
                String::new(),
                String::new(),
            ]);
            continue;
        }
        t.rows.push(vec![
            a.axis.to_string(),
            a.limit_cycle_amplitude_rad
                .map_or("none seen".into(), |x| format!("{:.3}", x.to_degrees())),
            a.limit_cycle_period_s
                .map_or("none seen".into(), |x| format!("{x:.2}")),
            a.settling_time_s
                .map_or("never".into(), |x| format!("{x:.2}")),
            format!("{:.2}", a.peak_rate_rad_s.to_degrees()),
        ]);
    }
    blocks.push(Block::Table(t));
    for (stem, svg) in plots {
        if stem == "error" || stem == "tank-pressure" || stem == "valves-1" {
            blocks.push(Block::Figure(crate::export::html::Figure {
                caption: format!("{} ({})", stem.replace('-', " "), r.case),
                svg: svg.clone(),
            }));
        }
    }
    blocks.push(Block::Paragraph(CAUTION.to_string()));
    Section {
        heading: format!("Simulation: {}", r.case),
        blocks,
    }
}
