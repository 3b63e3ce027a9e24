//! Measured ports: what was drilled and what each jet gave on a thrust stand,
//! replacing the drawn port in every command.
//!
//! Geometry given by the builder (station, clock, cants, hole or throat) simply
//! replaces the drawn value. A stand test (thrust and/or mass flow at a stated
//! supply pressure at the valve inlet, into a stated ambient) calibrates the
//! port's discharge coefficient: the coefficient is found (bisection between
//! 0.05 and 1) at which the existing valve-and-nozzle model, fed at that
//! pressure, gives the measured thrust; with only a flow measured, the measured
//! flow. The port then runs through the same model at every flight state's
//! regulated pressure and altitude, so the measurement is scaled by the flow
//! model rather than copied. When both thrust and flow are given, thrust sets
//! the coefficient (authority and tables depend on it) and the report shows how
//! far the model's flow is from the measured one.
//!
//! A coefficient that already reproduces the measurement to 1 part in 10⁶
//! (far below any thrust stand's resolution) is kept as drawn, so a layout
//! whose measurements equal the design gives exactly the design's tables.

use super::AsBuiltError;
use crate::analysis::feed;
use crate::model::{Design, NozzleSpec, SupplyCapacity};
use serde::Serialize;

/// Relative agreement at which the drawn discharge coefficient is kept.
pub const KEEP_WITHIN: f64 = 1e-6;

/// A thrust-stand test of one port.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct StandTest {
    /// Measured thrust, N.
    pub thrust_n: Option<f64>,
    /// Measured mass flow, kg/s.
    pub mass_flow_kg_s: Option<f64>,
    /// Supply pressure at the valve inlet, Pa absolute.
    pub supply_pressure_pa: f64,
    /// Ambient pressure around the stand, Pa absolute.
    pub ambient_pa: f64,
}

/// What the builder measured on one port; `None` where the drawn value stands.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Measurement {
    /// Index of the port in the design.
    pub port: usize,
    /// Station, m.
    pub station_m: Option<f64>,
    /// Clock, rad.
    pub clock_rad: Option<f64>,
    /// Tangential cant, rad.
    pub tangential_cant_rad: Option<f64>,
    /// Axial cant, rad.
    pub axial_cant_rad: Option<f64>,
    /// Plain-hole diameter, or the throat of a converging–diverging nozzle, m.
    pub hole_m: Option<f64>,
    /// Stand test.
    pub test: Option<StandTest>,
}

/// One port, drawn against built.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PortComparison {
    /// Port name.
    pub port: String,
    /// Station drawn and built, m.
    pub station_m: [f64; 2],
    /// Clock drawn and built, rad.
    pub clock_rad: [f64; 2],
    /// Tangential cant drawn and built, rad.
    pub tangential_cant_rad: [f64; 2],
    /// Axial cant drawn and built, rad.
    pub axial_cant_rad: [f64; 2],
    /// Hole (or throat) diameter drawn and built, m.
    pub hole_m: [f64; 2],
    /// Discharge coefficient drawn and calibrated.
    pub discharge_coefficient: [f64; 2],
    /// At the stand's conditions: thrust the drawn port would give, and the measured thrust, N.
    pub stand_thrust_n: Option<[f64; 2]>,
    /// At the stand's conditions: flow of the built port by the model, and the measured flow, kg/s.
    pub stand_flow_kg_s: Option<[f64; 2]>,
}

fn cd(n: &NozzleSpec) -> f64 {
    match *n {
        NozzleSpec::Hole {
            discharge_coefficient,
            ..
        }
        | NozzleSpec::ConvergingDiverging {
            discharge_coefficient,
            ..
        } => discharge_coefficient,
    }
}

fn with_cd(n: &NozzleSpec, c: f64) -> NozzleSpec {
    let mut n = *n;
    match &mut n {
        NozzleSpec::Hole {
            discharge_coefficient,
            ..
        }
        | NozzleSpec::ConvergingDiverging {
            discharge_coefficient,
            ..
        } => *discharge_coefficient = c,
    }
    n
}

fn throat(n: &NozzleSpec) -> f64 {
    match *n {
        NozzleSpec::Hole { diameter_m, .. } => diameter_m,
        NozzleSpec::ConvergingDiverging {
            throat_diameter_m, ..
        } => throat_diameter_m,
    }
}

/// Thrust and flow of port `i` of `design` alone on the stand.
pub fn on_stand(design: &Design, i: usize, test: &StandTest) -> Result<(f64, f64), AsBuiltError> {
    let mut d = design.clone();
    d.ports = vec![design.ports[i].clone()];
    d.feed.regulator.set_pressure_gauge_pa = test.supply_pressure_pa - test.ambient_pa;
    d.feed.regulator.supply = SupplyCapacity::Unlimited;
    let at = feed::ports_at(&d, "thrust stand", test.ambient_pa)
        .map_err(|e| AsBuiltError::Model(e.to_string()))?;
    let p = &at.ports[0];
    Ok((p.thrust_n, p.mass_flow_kg_s))
}

/// The design as built, and each measured port drawn against built.
pub fn apply(
    design: &Design,
    measurements: &[Measurement],
) -> Result<(Design, Vec<PortComparison>), AsBuiltError> {
    let mut built = design.clone();
    let mut out = Vec::new();
    for m in measurements {
        let i = m.port;
        let drawn = &design.ports[i];
        {
            let p = &mut built.ports[i];
            if let Some(v) = m.station_m {
                p.station_m = v;
            }
            if let Some(v) = m.clock_rad {
                p.clock_rad = v;
            }
            if let Some(v) = m.tangential_cant_rad {
                p.tangential_cant_rad = v;
            }
            if let Some(v) = m.axial_cant_rad {
                p.axial_cant_rad = v;
            }
            if let Some(h) = m.hole_m {
                p.nozzle = match p.nozzle {
                    NozzleSpec::Hole {
                        discharge_coefficient,
                        ..
                    } => NozzleSpec::Hole {
                        diameter_m: h,
                        discharge_coefficient,
                    },
                    NozzleSpec::ConvergingDiverging {
                        exit_diameter_m,
                        discharge_coefficient,
                        ..
                    } => NozzleSpec::ConvergingDiverging {
                        throat_diameter_m: h,
                        exit_diameter_m,
                        discharge_coefficient,
                    },
                };
            }
        }
        let mut stand_thrust = None;
        let mut stand_flow = None;
        if let Some(test) = &m.test {
            let name = &drawn.name;
            let target_is_thrust = test.thrust_n.is_some();
            let target = test.thrust_n.or(test.mass_flow_kg_s).unwrap_or(0.0);
            let value = |c: f64, built: &Design| -> Result<f64, AsBuiltError> {
                let mut d = built.clone();
                d.ports[i].nozzle = with_cd(&built.ports[i].nozzle, c);
                let (t, f) = on_stand(&d, i, test)?;
                Ok(if target_is_thrust { t } else { f })
            };
            let c0 = cd(&built.ports[i].nozzle);
            let at_c0 = value(c0, &built)?;
            let c = if (at_c0 - target).abs() <= KEEP_WITHIN * target {
                c0
            } else {
                let (mut lo, mut hi) = (0.05, 1.0);
                let v_hi = value(hi, &built)?;
                let v_lo = value(lo, &built)?;
                let what = if target_is_thrust { "thrust" } else { "flow" };
                if target > v_hi {
                    return Err(AsBuiltError::Model(format!(
                        "port `{name}`: the measured {what} is more than the model gives with a discharge coefficient of 1 ({v_hi:.4e} in SI units); check the stand's supply pressure and the measured hole"
                    )));
                }
                if target < v_lo {
                    return Err(AsBuiltError::Model(format!(
                        "port `{name}`: the measured {what} is less than the model gives with a discharge coefficient of 0.05 ({v_lo:.4e} in SI units); check the stand's supply pressure and the valve"
                    )));
                }
                // Thrust and flow both rise with the coefficient; 50 halvings
                // leave an interval of 1e-15, below any stand's resolution.
                for _ in 0..50 {
                    let mid = 0.5 * (lo + hi);
                    if value(mid, &built)? < target {
                        lo = mid;
                    } else {
                        hi = mid;
                    }
                }
                0.5 * (lo + hi)
            };
            built.ports[i].nozzle = with_cd(&built.ports[i].nozzle, c);
            let (t_drawn, _) = on_stand(design, i, test)?;
            let (_, f_built) = on_stand(&built, i, test)?;
            if let Some(t) = test.thrust_n {
                stand_thrust = Some([t_drawn, t]);
            }
            if let Some(f) = test.mass_flow_kg_s {
                stand_flow = Some([f_built, f]);
            }
        }
        let b = &built.ports[i];
        out.push(PortComparison {
            port: drawn.name.clone(),
            station_m: [drawn.station_m, b.station_m],
            clock_rad: [drawn.clock_rad, b.clock_rad],
            tangential_cant_rad: [drawn.tangential_cant_rad, b.tangential_cant_rad],
            axial_cant_rad: [drawn.axial_cant_rad, b.axial_cant_rad],
            hole_m: [throat(&drawn.nozzle), throat(&b.nozzle)],
            discharge_coefficient: [cd(&drawn.nozzle), cd(&b.nozzle)],
            stand_thrust_n: stand_thrust,
            stand_flow_kg_s: stand_flow,
        });
    }
    Ok((built, out))
}

/// One axis at one state, drawn against built.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AxisComparison {
    /// Flight state.
    pub state: String,
    /// Axis name.
    pub axis: &'static str,
    /// Authority (weaker sense) drawn and built, N·m.
    pub authority_n_m: [f64; 2],
    /// Margin drawn and built (absent when nothing is required).
    pub margin: Option<[f64; 2]>,
}

/// Measured against designed: the ports and what they do.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MeasuredReport {
    /// Each measured port.
    pub ports: Vec<PortComparison>,
    /// Each state and axis.
    pub axes: Vec<AxisComparison>,
}

/// Compare the analyses of the drawn and the built design.
pub fn compare(
    drawn: &crate::analysis::Analysis,
    built: &crate::analysis::Analysis,
    ports: Vec<PortComparison>,
) -> MeasuredReport {
    let mut axes = Vec::new();
    for (d, b) in drawn.states.iter().zip(&built.states) {
        for k in 0..3 {
            let (ad, ab) = (&d.authority[k], &b.authority[k]);
            let margin =
                (ad.required_n_m > 0.0 && ab.required_n_m > 0.0).then_some([ad.margin, ab.margin]);
            axes.push(AxisComparison {
                state: d.name.clone(),
                axis: ad.axis,
                authority_n_m: [
                    ad.positive_n_m.min(ad.negative_n_m),
                    ab.positive_n_m.min(ab.negative_n_m),
                ],
                margin,
            });
        }
    }
    MeasuredReport { ports, axes }
}

fn z(v: f64) -> f64 {
    if v == 0.0 {
        0.0
    } else {
        v
    }
}

/// The comparison as text.
pub fn render_text(m: &MeasuredReport) -> String {
    use std::fmt::Write;
    let mut o = String::new();
    let _ = writeln!(o, "Measured against designed");
    let _ = writeln!(
        o,
        "  port          station (mm)       clock (deg)      tangential cant (deg)  axial cant (deg)   hole or throat (mm)   discharge coefficient"
    );
    let deg = |r: f64| z(r.to_degrees());
    for p in &m.ports {
        let _ = writeln!(
            o,
            "  {:<12} {:>7.2} → {:<7.2}  {:>6.2} → {:<6.2}  {:>7.2} → {:<7.2}      {:>6.2} → {:<6.2}   {:>6.3} → {:<6.3}     {:.3} → {:.3}",
            p.port,
            z(p.station_m[0] * 1e3),
            z(p.station_m[1] * 1e3),
            deg(p.clock_rad[0]),
            deg(p.clock_rad[1]),
            deg(p.tangential_cant_rad[0]),
            deg(p.tangential_cant_rad[1]),
            deg(p.axial_cant_rad[0]),
            deg(p.axial_cant_rad[1]),
            z(p.hole_m[0] * 1e3),
            z(p.hole_m[1] * 1e3),
            p.discharge_coefficient[0],
            p.discharge_coefficient[1]
        );
        if let Some([model, measured]) = p.stand_thrust_n {
            let _ = writeln!(
                o,
                "      on the stand: thrust {:.4} N as drawn (model), {:.4} N measured ({:+.1} %)",
                model,
                measured,
                z((measured / model - 1.0) * 100.0)
            );
        }
        if let Some([model, measured]) = p.stand_flow_kg_s {
            let _ = writeln!(
                o,
                "      on the stand: flow {:.4} g/s as built (model), {:.4} g/s measured ({:+.1} %)",
                model * 1e3,
                measured * 1e3,
                z((measured / model - 1.0) * 100.0)
            );
        }
    }
    let _ = writeln!(
        o,
        "  state       axis    authority drawn → built (mN m)   change     margin drawn → built"
    );
    for a in &m.axes {
        let change = if a.authority_n_m[0] > 0.0 {
            format!(
                "{:+.1} %",
                z((a.authority_n_m[1] / a.authority_n_m[0] - 1.0) * 100.0)
            )
        } else {
            "none as drawn".to_string()
        };
        let margin = match a.margin {
            Some([d, b]) => format!("{d:.2} → {b:.2}"),
            None => "no requirement".to_string(),
        };
        let _ = writeln!(
            o,
            "  {:<11} {:<6} {:>10.2} → {:<10.2}             {:<10} {}",
            a.state,
            a.axis,
            z(a.authority_n_m[0] * 1e3),
            z(a.authority_n_m[1] * 1e3),
            change,
            margin
        );
    }
    super::stats::without_signed_zeros(&o)
}
