//! From the model's feed description to operating points: the gas budget once,
//! and each port's flow and thrust at a flight state's ambient pressure.
//!
//! The regulator holds its set pressure above local ambient (vented bonnet), so
//! the absolute manifold pressure falls with altitude. Gas reaches the valves at
//! the tank's fill temperature (isenthalpic valve, no Joule–Thomson cooling).
//! Densities come from the Peng–Robinson model with volume translation.

use super::{AnalysisError, DroopRow};
use crate::gas::chain::{FlowContext, PortChain, SharedSupply, SupplyCapacity};
use crate::gas::nozzle::{Nozzle, NozzleRegime, STANDARD_GRAVITY_M_S2};
use crate::gas::valve::{CvValve, OrificeValve, Valve};
use crate::gas::{eos, tank, FlowError, FlowTolerances};
use crate::model::{Design, FillSpec, NozzleSpec, TankOutlet, ValveFlow};
use serde::Serialize;

/// Thrust drop accepted when several valves fire together (the report's 5 % line).
pub const ALLOWED_DROOP: f64 = 0.05;

/// Gas figures for one port.
#[derive(Debug, Clone, Serialize)]
pub struct PortGas {
    /// Port name.
    pub name: String,
    /// Seconds of full-on firing of this port alone on the usable gas (isothermal bound).
    pub firing_time_s: f64,
    /// Minimum impulse bit from the valve delays, N·s.
    pub minimum_impulse_bit_n_s: f64,
}

/// The tank, what is usable, and how long it lasts.
#[derive(Debug, Clone, Serialize)]
pub struct GasBudget {
    /// Gas name.
    pub gas: &'static str,
    /// Tank volume, m³.
    pub tank_volume_m3: f64,
    /// Fill temperature, K.
    pub fill_temperature_k: f64,
    /// Phase at fill, in words.
    pub phase: String,
    /// Tank pressure at fill, Pa absolute.
    pub supply_pressure_pa: f64,
    /// Gas in the tank at fill, kg.
    pub inventory_kg: f64,
    /// Liquid at fill (CO2 below its critical temperature), kg.
    pub liquid_mass_kg: f64,
    /// Liquid share of the tank volume at fill.
    pub liquid_volume_fraction: f64,
    /// Tank pressure at which the regulator stops regulating, Pa absolute.
    pub end_pressure_pa: f64,
    /// Usable gas if the tank stays at the fill temperature, kg.
    pub usable_isothermal_kg: f64,
    /// Usable gas if the contents expand adiabatically and reversibly, kg.
    pub usable_adiabatic_kg: f64,
    /// Tank temperature at the end of an adiabatic blowdown, K.
    pub adiabatic_end_temperature_k: f64,
    /// Gas left in the tank at the end (isothermal), kg.
    pub residual_kg: f64,
    /// Uncertainty of the inventory from the equation of state, kg (zero when filled by mass).
    pub inventory_uncertainty_kg: f64,
    /// Relative uncertainty of the usable gas (isothermal bound) from the equation of state:
    /// the largest deviation measured for this gas against a reference library.
    pub uncertainty_fraction: f64,
    /// Relative uncertainty of the usable gas, adiabatic bound (measured, per gas).
    pub adiabatic_uncertainty_fraction: f64,
    /// Uncertainty of the adiabatic end temperature, K (measured, per gas).
    pub adiabatic_end_temperature_uncertainty_k: f64,
    /// The equation of state's measured uncertainty for this gas, per quantity.
    pub model_uncertainty: crate::gas::eos::ModelUncertainty,
    /// Where an adiabatic blowdown of a single-phase gas first meets the saturation line and
    /// begins to condense (tank pressure Pa absolute, temperature K), if it does (absent from
    /// the JSON when it does not).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub condensation: Option<crate::gas::tank::DomeEntry>,
    /// Total impulse of the usable gas, isothermal bound, N·s.
    pub total_impulse_isothermal_n_s: f64,
    /// Total impulse of the usable gas, adiabatic bound, N·s.
    pub total_impulse_adiabatic_n_s: f64,
    /// Seconds with every port open together (isothermal bound).
    pub firing_time_all_ports_s: f64,
    /// Seconds with every port open together (adiabatic bound).
    pub firing_time_all_ports_adiabatic_s: f64,
    /// Per-port figures.
    pub per_port: Vec<PortGas>,
    /// Tank pressure and temperature against gas expelled, adiabatic blowdown.
    pub blowdown: Vec<BlowdownPoint>,
    /// Warnings about the feed in plain words.
    pub warnings: Vec<String>,
}

/// A point of the blowdown curve.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct BlowdownPoint {
    /// Gas expelled so far, kg.
    pub expelled_kg: f64,
    /// Tank pressure, Pa absolute.
    pub pressure_pa: f64,
    /// Tank temperature, K.
    pub temperature_k: f64,
    /// Liquid left, kg.
    pub liquid_kg: f64,
}

/// One port's operating point at a flight state.
#[derive(Debug, Clone, Serialize)]
pub struct PortReport {
    /// Port name.
    pub name: String,
    /// Thrust, N.
    pub thrust_n: f64,
    /// Mass flow, kg/s.
    pub mass_flow_kg_s: f64,
    /// Specific impulse, s.
    pub specific_impulse_s: f64,
    /// Pressure between valve and nozzle, Pa absolute.
    pub nozzle_inlet_pressure_pa: f64,
    /// Whether the valve itself is choked.
    pub valve_choked: bool,
    /// Exit Mach number.
    pub exit_mach: f64,
    /// Exit pressure, Pa absolute.
    pub exit_pressure_pa: f64,
    /// Nozzle flow regime, in words.
    pub nozzle_regime: String,
    /// Exit pressure below 0.4 of ambient.
    pub strongly_overexpanded: bool,
    /// Force on the vehicle at full thrust, body frame, N (all three components).
    pub force_n: [f64; 3],
    /// Its axial part Fx, N (+ toward the nose).
    pub axial_force_n: f64,
    /// Its lateral part (Fy, Fz), the side force, N.
    pub side_force_n: [f64; 2],
    /// Torque about the state's CG at full thrust, N·m.
    pub torque_n_m: [f64; 3],
}

/// Operating points at one ambient pressure.
#[derive(Debug, Clone)]
pub struct PortsAt {
    /// Each port alone.
    pub ports: Vec<PortReport>,
    /// Manifold pressure with one valve open, Pa absolute.
    pub regulated_pressure_pa: f64,
    /// Droop table for the port with the largest flow.
    pub droop: Vec<DroopRow>,
    /// Index of that port (see [`droop_port`] for the tie rule).
    pub droop_port: usize,
    /// Valves that can fire together within the accepted droop.
    pub ports_within_5_percent: usize,
    /// Total flow with every valve open, kg/s.
    pub all_open_flow_kg_s: f64,
}

fn gas_error(e: impl std::fmt::Display) -> AnalysisError {
    AnalysisError::Gas(e.to_string())
}

/// The flow pieces of each port, in layout order.
pub fn port_chains(design: &Design) -> Result<Vec<PortChain>, FlowError> {
    let valve = match design.feed.valve.flow {
        ValveFlow::Cv { cv, xt } => Valve::FlowCoefficient(CvValve::new(cv, xt)?),
        ValveFlow::Orifice {
            diameter_m,
            discharge_coefficient,
        } => Valve::Orifice(OrificeValve::from_diameter(
            diameter_m,
            discharge_coefficient,
        )?),
    };
    design
        .ports
        .iter()
        .map(|p| {
            let nozzle = match p.nozzle {
                NozzleSpec::Hole {
                    diameter_m,
                    discharge_coefficient,
                } => Nozzle::plain_hole(diameter_m, discharge_coefficient)?,
                NozzleSpec::ConvergingDiverging {
                    throat_diameter_m,
                    exit_diameter_m,
                    discharge_coefficient,
                } => Nozzle::converging_diverging(
                    throat_diameter_m,
                    exit_diameter_m,
                    discharge_coefficient,
                )?,
            };
            Ok(PortChain { valve, nozzle })
        })
        .collect()
}

/// The regulator and its line as a shared supply at a given ambient pressure.
pub fn shared_supply(design: &Design, ambient_pa: f64) -> Result<SharedSupply, FlowError> {
    let reg = &design.feed.regulator;
    let single = SharedSupply::new(
        reg.set_pressure_gauge_pa + ambient_pa,
        design.feed.tank.fill_temperature_k,
        capacity_of(&reg.supply)?,
    )?;
    match &design.feed.first_stage {
        None => Ok(single),
        Some(first) => single.with_first_stage(
            crate::gas::chain::FirstStage {
                set_pressure_pa: first.set_pressure_gauge_pa + ambient_pa,
                dropout_margin_pa: first.dropout_margin_pa,
                capacity: capacity_of(&first.supply)?,
            },
            reg.dropout_margin_pa,
        ),
    }
}

fn capacity_of(supply: &crate::model::SupplyCapacity) -> Result<SupplyCapacity, FlowError> {
    Ok(match *supply {
        crate::model::SupplyCapacity::Unlimited => SupplyCapacity::Unlimited,
        crate::model::SupplyCapacity::Cv { cv, xt } => {
            SupplyCapacity::Restriction(CvValve::new(cv, xt)?)
        }
        crate::model::SupplyCapacity::Droop {
            droop_pa,
            at_flow_kg_s,
        } => SupplyCapacity::LinearDroop {
            droop_pa,
            reference_flow_kg_s: at_flow_kg_s,
        },
    })
}

/// Tank pressure at which the regulator chain stops holding the working pressure, Pa absolute,
/// at a local ambient: the working set pressure plus its dropout margin, plus the first stage's
/// margin when there is one (see [`crate::gas::chain::chain_dropout_tank_pressure_pa`]).
pub fn dropout_tank_pressure_pa(design: &Design, ambient_pa: f64) -> f64 {
    let feed = &design.feed;
    let mut stages = Vec::with_capacity(2);
    if let Some(f) = &feed.first_stage {
        stages.push((f.set_pressure_gauge_pa + ambient_pa, f.dropout_margin_pa));
    }
    stages.push((
        feed.regulator.set_pressure_gauge_pa + ambient_pa,
        feed.regulator.dropout_margin_pa,
    ));
    crate::gas::chain::chain_dropout_tank_pressure_pa(&stages).unwrap_or(ambient_pa)
}

/// Real-gas density for the flow models (the same function serves the analysis, the
/// simulation's feed map and the trade study's quick path, so all three see one gas).
pub fn real_density(gas: crate::gas::Gas) -> impl Fn(f64, f64) -> Result<f64, FlowError> {
    move |p, t| {
        eos::density(gas, p, t).map_err(|e| FlowError::Density {
            pressure_pa: p,
            temperature_k: t,
            reason: e.to_string(),
        })
    }
}

/// The γ and gas constant the isentropic nozzle and valve relations use: γ is the real gas's
/// isentropic exponent κ = w²ρ/p (GERG-2008) at the regulated pressure and the fill
/// temperature, where the gas enters the valves; the ideal-gas cp/cv when that state cannot be
/// evaluated (the state errors are reported by the density evaluations themselves).
pub fn flow_gas(design: &Design, ambient_pa: f64) -> crate::gas::IdealGas {
    let gas = design.feed.gas;
    let mut ideal = gas.ideal();
    let p = design.feed.regulator.set_pressure_gauge_pa + ambient_pa;
    if let Ok(s) = eos::state_tp(gas, p, design.feed.tank.fill_temperature_k) {
        if s.isentropic_exponent.is_finite() && s.isentropic_exponent > 1.0 {
            ideal.gamma = s.isentropic_exponent;
        }
    }
    ideal
}

fn regime_words(r: NozzleRegime) -> &'static str {
    match r {
        NozzleRegime::NoFlow => "no flow",
        NozzleRegime::Subsonic => "subsonic",
        NozzleRegime::ChokedSonicExit => "choked, sonic exit",
        NozzleRegime::ShockInNozzle => "shock inside nozzle",
        NozzleRegime::UnderExpanded => "under-expanded",
        NozzleRegime::Matched => "matched",
        NozzleRegime::OverExpanded => "over-expanded",
        NozzleRegime::StronglyOverExpanded => "strongly over-expanded",
    }
}

/// Each port's operating point at an ambient pressure, and the droop table.
pub fn ports_at(design: &Design, state: &str, ambient_pa: f64) -> Result<PortsAt, AnalysisError> {
    let gas = design.feed.gas;
    let density = real_density(gas);
    let ctx = FlowContext {
        gas: flow_gas(design, ambient_pa),
        density: &density,
        ambient_pa,
        tolerances: FlowTolerances::default(),
    };
    let flow_err = |port: &str, e: FlowError| AnalysisError::Flow {
        port: port.to_string(),
        state: state.to_string(),
        reason: e.to_string(),
    };
    let chains = port_chains(design).map_err(|e| AnalysisError::Chain {
        reason: e.to_string(),
    })?;
    let supply = shared_supply(design, ambient_pa).map_err(|e| AnalysisError::Supply {
        state: state.to_string(),
        reason: e.to_string(),
    })?;
    let mut ports = Vec::with_capacity(chains.len());
    let mut regulated = supply.set_pressure_pa();
    for (p, chain) in design.ports.iter().zip(&chains) {
        let m = supply
            .solve(std::slice::from_ref(chain), &ctx)
            .map_err(|e| flow_err(&p.name, e))?;
        let s = m.ports[0];
        regulated = regulated.min(m.manifold_pressure_pa);
        ports.push(PortReport {
            name: p.name.clone(),
            thrust_n: s.thrust_n,
            mass_flow_kg_s: s.mass_flow_kg_s,
            specific_impulse_s: s.specific_impulse_s,
            nozzle_inlet_pressure_pa: s.intermediate_pressure_pa,
            valve_choked: s.valve.choked,
            exit_mach: s.nozzle.exit_mach,
            exit_pressure_pa: s.nozzle.exit_pressure_pa,
            nozzle_regime: regime_words(s.nozzle.regime).to_string(),
            strongly_overexpanded: s.nozzle.regime == NozzleRegime::StronglyOverExpanded,
            force_n: [0.0; 3],
            axial_force_n: 0.0,
            side_force_n: [0.0; 2],
            torque_n_m: [0.0; 3],
        });
    }
    let flows: Vec<f64> = ports.iter().map(|p| p.mass_flow_kg_s).collect();
    let biggest = droop_port(&flows);
    let firing = supply
        .equal_ports(&chains[biggest], chains.len(), ALLOWED_DROOP, &ctx)
        .map_err(|e| flow_err(&design.ports[biggest].name, e))?;
    let droop = firing
        .rows
        .iter()
        .map(|r| DroopRow {
            open_ports: r.open_ports,
            manifold_pressure_pa: r.manifold_pressure_pa,
            thrust_per_port_n: r.thrust_per_port_n,
            thrust_drop_fraction: r.thrust_drop_fraction,
        })
        .collect();
    let all = supply
        .solve(&chains, &ctx)
        .map_err(|e| flow_err("(all open)", e))?;
    Ok(PortsAt {
        ports,
        regulated_pressure_pa: regulated,
        droop,
        droop_port: biggest,
        ports_within_5_percent: firing.ports_within_limit,
        all_open_flow_kg_s: all.total_mass_flow_kg_s,
    })
}

/// Flows within this fraction of the largest count as equal when choosing the
/// port whose droop table is shown: mirrored ports differ only by round-off.
pub const DROOP_TIE_RELATIVE: f64 = 1e-9;

/// The port the droop table is computed for: the one with the largest mass flow,
/// and among flows equal to it within [`DROOP_TIE_RELATIVE`] the lowest port
/// index (the first in the layout file), so a tie is never settled by round-off.
pub fn droop_port(flows_kg_s: &[f64]) -> usize {
    let top = flows_kg_s.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    flows_kg_s
        .iter()
        .position(|&f| f >= top - DROOP_TIE_RELATIVE * top.abs())
        .unwrap_or(0)
}

/// Minimum impulse bit: the shortest command pulse lasts the opening delay; with
/// thrust ramping linearly up over the opening delay and down over the closing
/// delay, the impulse is F·(t_open + t_close)/2 (simple valve model, common
/// practice, no source).
pub fn minimum_impulse_bit(thrust_n: f64, opening_s: f64, closing_s: f64) -> f64 {
    thrust_n * 0.5 * (opening_s + closing_s)
}

/// Inventory, usable gas and how long it lasts, at the first flight state's ambient.
pub fn gas_budget(design: &Design) -> Result<GasBudget, AnalysisError> {
    let feed = &design.feed;
    let t = &feed.tank;
    let first_altitude = design.states.first().map_or(0.0, |s| s.altitude_m);
    let ambient = crate::atmosphere::at_geometric_altitude(first_altitude)
        .map_err(gas_error)?
        .pressure_pa;
    let fill = match t.fill {
        FillSpec::Pressure { pressure_pa } => {
            tank::TankFill::by_pressure(feed.gas, t.volume_m3, pressure_pa, t.fill_temperature_k)
        }
        FillSpec::Mass { mass_kg } => {
            tank::TankFill::by_mass(feed.gas, t.volume_m3, mass_kg, t.fill_temperature_k)
        }
    };
    // The regulator needs set + dropout at its inlet; the set pressure is above local ambient.
    let end = dropout_tank_pressure_pa(design, ambient);
    let usable = tank::usable_gas(&fill, end).map_err(gas_error)?;
    let inv = &usable.fill;
    let mut warnings = Vec::new();
    if inv.supply_pressure_pa <= end {
        warnings.push(format!(
            "the tank pressure at fill ({:.1} bara) is below what the regulator needs ({:.1} bara): no gas is usable",
            inv.supply_pressure_pa / 1e5,
            end / 1e5
        ));
    }
    let (phase, liquid_mass_kg, liquid_volume_fraction) = match inv.phase {
        tank::TankPhase::Gas => ("gas".to_string(), 0.0, 0.0),
        tank::TankPhase::Supercritical => ("supercritical gas".to_string(), 0.0, 0.0),
        tank::TankPhase::TwoPhase {
            liquid_mass_kg,
            liquid_volume_fraction,
        } => (
            "saturated liquid under vapour".to_string(),
            liquid_mass_kg,
            liquid_volume_fraction,
        ),
    };
    if liquid_mass_kg > 0.0 {
        match t.outlet {
            TankOutlet::Aft => warnings.push(
                "the tank outlet is aft: under motor thrust the liquid settles onto it and the regulator inlet will see liquid CO2; put the outlet forward or use a dip tube".to_string(),
            ),
            TankOutlet::Fore if liquid_volume_fraction > 0.9 => warnings.push(format!(
                "the tank is {:.0} % liquid at fill: little vapour space, so liquid can reach a forward outlet when the vehicle tips; fill less",
                liquid_volume_fraction * 100.0
            )),
            TankOutlet::Fore => {}
        }
    }
    if let Some(c) = usable.adiabatic.condensation {
        warnings.push(format!(
            "in an adiabatic blowdown the {} cools onto its saturation line and begins to condense at a tank pressure of {:.1} bara ({:.0} psia) and {:.1} K ({:.1} °C), after {:.1} g has left; below that the liquid stays in the tank and only vapour leaves",
            feed.gas.name(),
            c.pressure_pa / 1e5,
            c.pressure_pa / 6_894.757,
            c.temperature_k,
            c.temperature_k - 273.15,
            c.mass_expelled_kg * 1e3
        ));
    }
    if let Ok(crate::gas::eos::Validity::Extended) =
        crate::gas::eos::validity(feed.gas, inv.supply_pressure_pa, inv.temperature_k)
    {
        warnings.push(format!(
            "the fill state ([tank] fill_pressure / temperature: {:.1} bara, {:.1} K) is outside the normal range of the GERG-2008 equation of state (90–450 K, up to 350 bar); its uncertainty there is larger than the figures stated",
            inv.supply_pressure_pa / 1e5,
            inv.temperature_k
        ));
    }
    if usable.adiabatic.dry_ice_warning {
        warnings.push("in an adiabatic blowdown the CO2 cools to its triple point (216.6 K): dry ice forms in the tank and the usable gas falls".to_string());
    }

    let first = design
        .states
        .first()
        .map_or("sea level", |s| s.name.as_str());
    let at = ports_at(design, first, ambient)?;
    let v = &feed.valve;
    let per_port = at
        .ports
        .iter()
        .map(|p| PortGas {
            name: p.name.clone(),
            firing_time_s: usable.isothermal.usable_mass_kg / p.mass_flow_kg_s,
            minimum_impulse_bit_n_s: minimum_impulse_bit(
                p.thrust_n,
                v.opening_delay_s,
                v.closing_delay_s,
            ),
        })
        .collect();
    // Flow-weighted mean specific impulse of the ports.
    let (flow, thrust): (f64, f64) = at.ports.iter().fold((0.0, 0.0), |acc, p| {
        (acc.0 + p.mass_flow_kg_s, acc.1 + p.thrust_n)
    });
    let isp = thrust / (flow * STANDARD_GRAVITY_M_S2);
    let iso = usable.isothermal.usable_mass_kg;
    let adi = usable.adiabatic.usable_mass_kg;
    let model_u = crate::gas::eos::model_uncertainty(feed.gas);
    Ok(GasBudget {
        gas: feed.gas.name(),
        tank_volume_m3: t.volume_m3,
        fill_temperature_k: t.fill_temperature_k,
        phase,
        supply_pressure_pa: inv.supply_pressure_pa,
        inventory_kg: inv.mass_kg,
        liquid_mass_kg,
        liquid_volume_fraction,
        end_pressure_pa: end,
        usable_isothermal_kg: iso,
        usable_adiabatic_kg: adi,
        adiabatic_end_temperature_k: usable.adiabatic.end_temperature_k,
        residual_kg: (inv.mass_kg - iso).max(0.0),
        inventory_uncertainty_kg: inv.mass_uncertainty_kg,
        uncertainty_fraction: model_u.usable_isothermal_fraction,
        adiabatic_uncertainty_fraction: model_u.usable_adiabatic_fraction,
        adiabatic_end_temperature_uncertainty_k: model_u.adiabatic_end_temperature_k,
        model_uncertainty: model_u,
        condensation: usable.adiabatic.condensation,
        total_impulse_isothermal_n_s: iso * isp * STANDARD_GRAVITY_M_S2,
        total_impulse_adiabatic_n_s: adi * isp * STANDARD_GRAVITY_M_S2,
        firing_time_all_ports_s: iso / at.all_open_flow_kg_s,
        firing_time_all_ports_adiabatic_s: adi / at.all_open_flow_kg_s,
        per_port,
        blowdown: usable
            .adiabatic
            .curve
            .iter()
            .map(|b| BlowdownPoint {
                expelled_kg: b.mass_expelled_kg,
                pressure_pa: b.pressure_pa,
                temperature_k: b.temperature_k,
                liquid_kg: b.liquid_mass_kg,
            })
            .collect(),
        warnings,
    })
}

/// What the feed models assume, for the report.
pub fn assumptions(design: &Design, budget: &GasBudget) -> Vec<String> {
    let mut a = vec![
        format!(
            "tank inventory from the GERG-2008 equation of state; measured uncertainty for {} against a reference library: usable gas ±{:.2} % isothermal, ±{:.2} % adiabatic, adiabatic end temperature ±{:.1} K, gas density ±{:.2} %{}",
            budget.gas,
            budget.uncertainty_fraction * 100.0,
            budget.adiabatic_uncertainty_fraction * 100.0,
            budget.adiabatic_end_temperature_uncertainty_k,
            budget.model_uncertainty.gas_density_fraction * 100.0,
            match (
                budget.model_uncertainty.liquid_density_fraction,
                budget.model_uncertainty.vapour_pressure_fraction
            ) {
                (Some(l), Some(p)) => format!(
                    ", saturated liquid density ±{:.2} %, vapour pressure ±{:.2} %",
                    l * 100.0,
                    p * 100.0
                ),
                _ => String::new(),
            }
        ),
        "usable gas runs from fill to the tank pressure at which the regulator drops out (set pressure + dropout margin); isothermal and adiabatic blowdown bound it".to_string(),
        "the regulator holds its set pressure above local ambient (US Standard Atmosphere 1976 at each state's altitude)".to_string(),
        "gas reaches the valves at the fill temperature; the valve is isenthalpic and Joule–Thomson cooling is ignored".to_string(),
        "valve per IEC 60534-2-1 gas sizing equations (or an orifice); nozzle flow is ideal-gas isentropic with the gas's ratio of specific heats".to_string(),
        "minimum impulse bit: thrust × (opening delay + closing delay) / 2 (linear ramps)".to_string(),
    ];
    if let Some(f) = &design.feed.first_stage {
        a.push(format!(
            "two-stage regulation: a first stage holds {:.1} barg ({:.0} psig) ahead of the regulator; the chain stops regulating at a tank pressure of {:.2} bara ({:.0} psia), the regulator's set pressure plus its dropout margin plus the first stage's dropout margin of {:.1} bar; the manifold flow is limited by both stages (a wide-open second stage needs its dropout margin across it)",
            f.set_pressure_gauge_pa / 1e5,
            f.set_pressure_gauge_pa / 6_894.757,
            budget.end_pressure_pa / 1e5,
            budget.end_pressure_pa / 6_894.757,
            f.dropout_margin_pa / 1e5
        ));
    }
    if matches!(
        design.feed.regulator.supply,
        crate::model::SupplyCapacity::Unlimited
    ) {
        a.push("no supply capacity given: the manifold stays at the set pressure however many valves are open".to_string());
    }
    a
}
