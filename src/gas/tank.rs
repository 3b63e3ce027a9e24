//! Tank inventory at fill and the usable gas of a blowdown down to an end pressure.
//!
//! The usable gas is bracketed by two limits that real tanks fall between:
//!
//! * **isothermal** — heat from the tank wall keeps the contents at the fill temperature (a slow
//!   duty cycle). For two-phase CO2 the pressure stays at the vapour pressure until the last liquid
//!   has boiled, then falls as a gas.
//! * **adiabatic** — no heat reaches the contents (a long continuous firing). Vapour leaves from the
//!   top of the tank; the contents left behind change reversibly, so their entropy obeys
//!   `d(m·s) = s_out·dm` with `s_out` the entropy of what leaves. In a single-phase tank that is
//!   constant specific entropy (an isentropic expansion). In a two-phase CO2 tank the outflow is
//!   saturated vapour, the liquid boils to replace it and the tank cools along the saturation line;
//!   with `V = m·v(T, x)` both balances are linear in the new mass, so each temperature step has a
//!   closed-form update. The walk stops at the end pressure, or at the CO2 triple point 216.59 K
//!   where dry ice would form (flagged in the result).
//!
//! A CO2 fill given by pressure above the vapour pressure at a temperature below critical is a
//! tank full of compressed liquid, and a fill by mass denser than the saturated liquid is a tank
//! full of liquid too: both are reported as errors, because a liquid-full tank has no gas cushion,
//! its pressure follows the temperature violently and a gas feed cannot be designed on it.

use super::eos::{self, EosError, Phase, State};
use super::species::Gas;
use thiserror::Error;

/// What can go wrong with a tank calculation.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum TankError {
    /// The equation of state failed.
    #[error(transparent)]
    Eos(#[from] EosError),
    /// An input was NaN, infinite, zero or negative.
    #[error("{what} must be a finite positive number, got {value}")]
    BadInput {
        /// Which input.
        what: &'static str,
        /// The value given.
        value: f64,
    },
    /// Fill pressure above the vapour pressure below the critical temperature: compressed liquid.
    #[error(
        "fill pressure {pressure_pa} Pa is above the vapour pressure {vapour_pressure_pa} Pa at \
         {temperature_k} K: the tank would be full of compressed liquid; give the fill mass instead"
    )]
    CompressedLiquid {
        /// Fill pressure, Pa.
        pressure_pa: f64,
        /// Vapour pressure at the fill temperature, Pa.
        vapour_pressure_pa: f64,
        /// Fill temperature, K.
        temperature_k: f64,
    },
    /// Fill density above the saturated-liquid density: the tank is full of liquid.
    #[error(
        "fill density {fill_density_kg_m3} kg/m³ is above the saturated-liquid density \
         {liquid_density_kg_m3} kg/m³ at {temperature_k} K: the tank would be full of liquid"
    )]
    LiquidFull {
        /// Mean density of the fill, kg/m³.
        fill_density_kg_m3: f64,
        /// Saturated-liquid density of the model, kg/m³.
        liquid_density_kg_m3: f64,
        /// Fill temperature, K.
        temperature_k: f64,
    },
    /// The end pressure is not below the pressure the tank supplies.
    #[error("end pressure {end_pressure_pa} Pa is not below the supply pressure {supply_pressure_pa} Pa")]
    EndPressureNotBelowSupply {
        /// Requested end pressure, Pa.
        end_pressure_pa: f64,
        /// Supply pressure at fill, Pa.
        supply_pressure_pa: f64,
    },
    /// An iteration of the blowdown did not converge.
    #[error("{what} did not converge")]
    NoConvergence {
        /// Which iteration.
        what: &'static str,
    },
}

/// How much gas was put in the tank.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum FillAmount {
    /// Fill pressure, Pa absolute (the usual way for nitrogen, air, helium, argon).
    PressurePa(f64),
    /// Fill mass, kg (the usual way for CO2; see [`TankFill::by_fill_ratio`]).
    MassKg(f64),
}

/// A filled tank.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TankFill {
    /// The gas.
    pub gas: Gas,
    /// Internal volume, m³.
    pub volume_m3: f64,
    /// Temperature of the contents at fill, K.
    pub fill_temperature_k: f64,
    /// Pressure or mass of the fill.
    pub amount: FillAmount,
}

impl TankFill {
    /// A fill given by pressure.
    pub fn by_pressure(
        gas: Gas,
        volume_m3: f64,
        fill_pressure_pa: f64,
        temperature_k: f64,
    ) -> Self {
        TankFill {
            gas,
            volume_m3,
            fill_temperature_k: temperature_k,
            amount: FillAmount::PressurePa(fill_pressure_pa),
        }
    }

    /// A fill given by mass.
    pub fn by_mass(gas: Gas, volume_m3: f64, fill_mass_kg: f64, temperature_k: f64) -> Self {
        TankFill {
            gas,
            volume_m3,
            fill_temperature_k: temperature_k,
            amount: FillAmount::MassKg(fill_mass_kg),
        }
    }

    /// A fill given by fill ratio, kg of gas per litre of tank volume (CO2 practice: 0.6–0.68).
    pub fn by_fill_ratio(gas: Gas, volume_m3: f64, kg_per_litre: f64, temperature_k: f64) -> Self {
        Self::by_mass(
            gas,
            volume_m3,
            kg_per_litre * volume_m3 * 1000.0,
            temperature_k,
        )
    }
}

/// Phase state of the tank contents.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum TankPhase {
    /// Gas or vapour below the critical temperature.
    Gas,
    /// Above the critical temperature.
    Supercritical,
    /// Saturated liquid under its vapour.
    TwoPhase {
        /// Mass of the liquid, kg.
        liquid_mass_kg: f64,
        /// Fraction of the tank volume taken by the liquid.
        liquid_volume_fraction: f64,
    },
}

/// What is in the tank at fill.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Inventory {
    /// The gas.
    pub gas: Gas,
    /// Tank volume, m³.
    pub volume_m3: f64,
    /// Temperature, K.
    pub temperature_k: f64,
    /// Pressure the tank supplies to the regulator, Pa absolute.
    pub supply_pressure_pa: f64,
    /// Mass of gas in the tank, kg.
    pub mass_kg: f64,
    /// Phase state.
    pub phase: TankPhase,
    /// Mean specific entropy of the contents, J/(kg·K) (zero as in [`eos`]).
    pub specific_entropy_j_kg_k: f64,
    /// Uncertainty of `mass_kg` from the equation of state, kg (zero when the mass was given).
    pub mass_uncertainty_kg: f64,
}

/// Resolution of the blowdown walk.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BlowdownSettings {
    /// Number of pressure steps of a single-phase expansion (each point is solved exactly, so this
    /// only sets the curve resolution).
    pub pressure_steps: usize,
    /// Temperature step of the two-phase walk, K. The trapezoidal entropy outflow term has an error
    /// of order step²; 0.1 K is within 1e-4 relative of a 0.02 K walk (tested).
    pub two_phase_step_k: f64,
    /// Relative tolerance of the temperature solves.
    pub temperature_rel: f64,
    /// Cap on the total number of steps of one walk.
    pub max_steps: usize,
}

impl Default for BlowdownSettings {
    fn default() -> Self {
        BlowdownSettings {
            pressure_steps: 60,
            two_phase_step_k: 0.1,
            temperature_rel: 1e-10,
            max_steps: 100_000,
        }
    }
}

/// One point of a blowdown curve.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BlowdownPoint {
    /// Mass that has left the tank, kg.
    pub mass_expelled_kg: f64,
    /// Tank pressure, Pa absolute.
    pub pressure_pa: f64,
    /// Tank temperature, K.
    pub temperature_k: f64,
    /// Liquid left in the tank, kg.
    pub liquid_mass_kg: f64,
}

/// Why a blowdown stopped.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BlowdownEnd {
    /// The tank reached the end pressure.
    EndPressure,
    /// The contents cooled to the triple point (dry ice for CO2) before the end pressure.
    TriplePoint,
}

/// Result of one blowdown limit.
#[derive(Debug, Clone, PartialEq)]
pub struct Blowdown {
    /// Mass delivered before the stop, kg.
    pub usable_mass_kg: f64,
    /// Uncertainty of `usable_mass_kg` from the equation of state, kg (worst-case sum of the fill
    /// and end inventory uncertainties).
    pub usable_mass_uncertainty_kg: f64,
    /// Temperature at the stop, K.
    pub end_temperature_k: f64,
    /// Pressure at the stop, Pa absolute.
    pub end_pressure_pa: f64,
    /// Why the walk stopped.
    pub end: BlowdownEnd,
    /// True when the temperature reached the triple point: solid (dry ice) can form and block
    /// the outlet.
    pub dry_ice_warning: bool,
    /// Curve from fill to stop.
    pub curve: Vec<BlowdownPoint>,
    /// Where a single-phase gas first met the saturation line and began to condense (argon or
    /// nitrogen cooled by an adiabatic blowdown, or supercritical CO2); None when it never did
    /// or when the tank started two-phase.
    pub condensation: Option<DomeEntry>,
}

/// The tank state where an expanding single-phase gas meets its saturation line.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct DomeEntry {
    /// Tank pressure, Pa absolute.
    pub pressure_pa: f64,
    /// Tank temperature, K.
    pub temperature_k: f64,
    /// Mass that had left the tank by then, kg.
    pub mass_expelled_kg: f64,
}

/// Both limits of the usable gas.
#[derive(Debug, Clone, PartialEq)]
pub struct UsableGas {
    /// The inventory at fill.
    pub fill: Inventory,
    /// Tank held at the fill temperature.
    pub isothermal: Blowdown,
    /// No heat reaches the contents.
    pub adiabatic: Blowdown,
}

/// End pressure of the usable gas: regulator set pressure plus the dropout margin the regulator
/// needs to hold it, both absolute/differential in Pa.
pub fn end_pressure_pa(regulator_set_pressure_pa: f64, dropout_margin_pa: f64) -> f64 {
    regulator_set_pressure_pa + dropout_margin_pa
}

fn positive(what: &'static str, v: f64) -> Result<f64, TankError> {
    if v.is_finite() && v > 0.0 {
        Ok(v)
    } else {
        Err(TankError::BadInput { what, value: v })
    }
}

fn tc(gas: Gas) -> f64 {
    gas.constants().critical_temperature_k
}

fn single_phase(state: &State) -> TankPhase {
    if state.phase == Phase::Supercritical {
        TankPhase::Supercritical
    } else {
        TankPhase::Gas
    }
}

fn rel_unc(gas: Gas, s: &State) -> f64 {
    eos::density_relative_uncertainty(gas, s.temperature_k, s.phase == Phase::Liquid)
}

/// The inventory of a filled tank.
pub fn inventory(fill: &TankFill) -> Result<Inventory, TankError> {
    let gas = fill.gas;
    let vol = positive("volume_m3", fill.volume_m3)?;
    let t = positive("fill_temperature_k", fill.fill_temperature_k)?;
    let below_critical = t < tc(gas);
    match fill.amount {
        FillAmount::PressurePa(p) => {
            let p = positive("fill_pressure_pa", p)?;
            if below_critical {
                let sat = eos::saturation(gas, t)?;
                if p > sat.pressure_pa {
                    return Err(TankError::CompressedLiquid {
                        pressure_pa: p,
                        vapour_pressure_pa: sat.pressure_pa,
                        temperature_k: t,
                    });
                }
            }
            let s = eos::state_tp(gas, p, t)?;
            let mass = s.density_kg_m3 * vol;
            Ok(Inventory {
                gas,
                volume_m3: vol,
                temperature_k: t,
                supply_pressure_pa: p,
                mass_kg: mass,
                phase: single_phase(&s),
                specific_entropy_j_kg_k: s.entropy_j_kg_k,
                mass_uncertainty_kg: rel_unc(gas, &s) * mass,
            })
        }
        FillAmount::MassKg(m) => {
            let m = positive("fill_mass_kg", m)?;
            let rho = m / vol;
            if below_critical {
                let sat = eos::saturation(gas, t)?;
                let (rl, rv) = (sat.liquid.density_kg_m3, sat.vapour.density_kg_m3);
                if rho >= rl {
                    return Err(TankError::LiquidFull {
                        fill_density_kg_m3: rho,
                        liquid_density_kg_m3: rl,
                        temperature_k: t,
                    });
                }
                if rho > rv {
                    let x = (1.0 / rho - 1.0 / rl) / (1.0 / rv - 1.0 / rl);
                    let ml = (1.0 - x) * m;
                    let s = x * sat.vapour.entropy_j_kg_k + (1.0 - x) * sat.liquid.entropy_j_kg_k;
                    return Ok(Inventory {
                        gas,
                        volume_m3: vol,
                        temperature_k: t,
                        supply_pressure_pa: sat.pressure_pa,
                        mass_kg: m,
                        phase: TankPhase::TwoPhase {
                            liquid_mass_kg: ml,
                            liquid_volume_fraction: ml / rl / vol,
                        },
                        specific_entropy_j_kg_k: s,
                        mass_uncertainty_kg: 0.0,
                    });
                }
            }
            let s = eos::state_td(gas, rho, t)?;
            Ok(Inventory {
                gas,
                volume_m3: vol,
                temperature_k: t,
                supply_pressure_pa: s.pressure_pa,
                mass_kg: m,
                phase: single_phase(&s),
                specific_entropy_j_kg_k: s.entropy_j_kg_k,
                mass_uncertainty_kg: 0.0,
            })
        }
    }
}

/// Usable gas between fill and `end_pressure_pa` (absolute), both limits, default settings.
pub fn usable_gas(fill: &TankFill, end_pressure_pa: f64) -> Result<UsableGas, TankError> {
    usable_gas_with(fill, end_pressure_pa, &BlowdownSettings::default())
}

/// [`usable_gas`] with explicit settings.
pub fn usable_gas_with(
    fill: &TankFill,
    end_pressure_pa: f64,
    settings: &BlowdownSettings,
) -> Result<UsableGas, TankError> {
    let p_end = positive("end_pressure_pa", end_pressure_pa)?;
    let inv = inventory(fill)?;
    if p_end >= inv.supply_pressure_pa {
        return Err(TankError::EndPressureNotBelowSupply {
            end_pressure_pa: p_end,
            supply_pressure_pa: inv.supply_pressure_pa,
        });
    }
    let isothermal = isothermal_blowdown(&inv, p_end, settings)?;
    let adiabatic = adiabatic_blowdown(&inv, p_end, settings)?;
    Ok(UsableGas {
        fill: inv,
        isothermal,
        adiabatic,
    })
}

/// Geometric pressure steps from `p0` (excluded) to `p1` (included).
fn pressure_steps(p0: f64, p1: f64, n: usize) -> impl Iterator<Item = f64> {
    let n = n.max(1);
    let r = (p1 / p0).ln();
    (1..=n).map(move |i| {
        if i == n {
            p1
        } else {
            p0 * (r * i as f64 / n as f64).exp()
        }
    })
}

fn isothermal_blowdown(
    inv: &Inventory,
    p_end: f64,
    settings: &BlowdownSettings,
) -> Result<Blowdown, TankError> {
    let (gas, vol, t, m0) = (inv.gas, inv.volume_m3, inv.temperature_k, inv.mass_kg);
    let mut curve = Vec::with_capacity(settings.pressure_steps + 12);
    let liquid0 = match inv.phase {
        TankPhase::TwoPhase { liquid_mass_kg, .. } => liquid_mass_kg,
        _ => 0.0,
    };
    curve.push(BlowdownPoint {
        mass_expelled_kg: 0.0,
        pressure_pa: inv.supply_pressure_pa,
        temperature_k: t,
        liquid_mass_kg: liquid0,
    });
    let mut p_start = inv.supply_pressure_pa;
    if let TankPhase::TwoPhase { .. } = inv.phase {
        // The liquid boils at constant pressure until the tank holds saturated vapour only.
        let sat = eos::saturation(gas, t)?;
        let m_dry = sat.vapour.density_kg_m3 * vol;
        let n = 10;
        for i in 1..=n {
            let ml = liquid0 * (1.0 - i as f64 / n as f64);
            // Mass left for liquid ml: ml + (V − ml/ρl)·ρv.
            let m = ml + (vol - ml / sat.liquid.density_kg_m3) * sat.vapour.density_kg_m3;
            curve.push(BlowdownPoint {
                mass_expelled_kg: m0 - m,
                pressure_pa: sat.pressure_pa,
                temperature_k: t,
                liquid_mass_kg: ml,
            });
        }
        debug_assert!((curve[curve.len() - 1].mass_expelled_kg - (m0 - m_dry)).abs() < 1e-9 * m0);
        p_start = sat.pressure_pa;
    }
    let mut last = eos::state_tp(gas, p_start, t)?;
    for p in pressure_steps(p_start, p_end, settings.pressure_steps) {
        last = eos::state_tp(gas, p, t)?;
        curve.push(BlowdownPoint {
            mass_expelled_kg: m0 - last.density_kg_m3 * vol,
            pressure_pa: p,
            temperature_k: t,
            liquid_mass_kg: 0.0,
        });
    }
    let m_end = last.density_kg_m3 * vol;
    Ok(Blowdown {
        usable_mass_kg: m0 - m_end,
        usable_mass_uncertainty_kg: inv.mass_uncertainty_kg + rel_unc(gas, &last) * m_end,
        end_temperature_k: t,
        end_pressure_pa: p_end,
        end: BlowdownEnd::EndPressure,
        dry_ice_warning: false,
        curve,
        condensation: None,
    })
}

/// Regula falsi (Illinois) on a bracket [lo, hi] with f(lo)·f(hi) ≤ 0.
fn solve_bracket<F>(
    mut f: F,
    mut lo: f64,
    mut hi: f64,
    rel: f64,
    what: &'static str,
) -> Result<f64, TankError>
where
    F: FnMut(f64) -> Result<f64, TankError>,
{
    let mut flo = f(lo)?;
    let mut fhi = f(hi)?;
    if flo == 0.0 {
        return Ok(lo);
    }
    if fhi == 0.0 {
        return Ok(hi);
    }
    if flo * fhi > 0.0 {
        return Err(TankError::NoConvergence { what });
    }
    let mut side = 0i32;
    for _ in 0..200 {
        let mut x = hi - fhi * (hi - lo) / (fhi - flo);
        if !(x > lo && x < hi) {
            x = 0.5 * (lo + hi);
        }
        let fx = f(x)?;
        if fx == 0.0 || (hi - lo) < rel * x.abs() {
            return Ok(x);
        }
        if fx * fhi < 0.0 {
            lo = hi;
            flo = fhi;
            hi = x;
            fhi = fx;
            side = 0;
        } else {
            hi = x;
            fhi = fx;
            side += 1;
            if side >= 2 {
                flo *= 0.5;
            }
        }
        if lo > hi {
            std::mem::swap(&mut lo, &mut hi);
            std::mem::swap(&mut flo, &mut fhi);
        }
    }
    Err(TankError::NoConvergence { what })
}

/// Where the isentrope of entropy `s0` lies at pressure `p`.
enum IsentropeAt {
    /// Single-phase at this temperature.
    Single(State),
    /// Inside the two-phase dome.
    Dome,
    /// Would need a temperature below the triple point.
    BelowTriple,
}

/// Temperature on the isentrope `s0` at pressure `p`, searching below `t_hi`.
fn isentrope_at(
    gas: Gas,
    s0: f64,
    p: f64,
    t_hi: f64,
    settings: &BlowdownSettings,
) -> Result<IsentropeAt, TankError> {
    let t_min = eos::min_temperature_k(gas);
    let f = |t: f64| -> Result<f64, TankError> { Ok(eos::specific_entropy(gas, p, t)? - s0) };
    let (mut lo, mut hi) = (t_min, t_hi.max(t_min));
    if p < gas.constants().critical_pressure_pa {
        if let Ok(sat) = eos::saturation_at_pressure(gas, p) {
            let (sl, sv) = (sat.liquid.entropy_j_kg_k, sat.vapour.entropy_j_kg_k);
            if s0 >= sl && s0 <= sv {
                return Ok(IsentropeAt::Dome);
            }
            let ts = sat.temperature_k;
            if s0 > sv {
                lo = ts * (1.0 + 1e-9);
            } else {
                hi = hi.min(ts * (1.0 - 1e-9));
            }
        }
    }
    if f(lo)? > 0.0 {
        return Ok(IsentropeAt::BelowTriple);
    }
    // Entropy grows with temperature at fixed pressure, so f(hi) ≥ 0 when hi is above the answer;
    // widen upward in the rare case it is not.
    let mut tries = 0;
    while f(hi)? < 0.0 {
        hi *= 1.1;
        tries += 1;
        if tries > 20 || hi > eos::MAX_TEMPERATURE_K {
            return Err(TankError::NoConvergence {
                what: "isentrope temperature bracket",
            });
        }
    }
    let t = solve_bracket(f, lo, hi, settings.temperature_rel, "isentrope temperature")?;
    Ok(IsentropeAt::Single(eos::state_tp(gas, p, t)?))
}

/// State of the adiabatic walk.
struct Walk {
    mass: f64,
    curve: Vec<BlowdownPoint>,
    steps: usize,
    condensation: Option<DomeEntry>,
}

impl Walk {
    fn push(&mut self, m0: f64, p: f64, t: f64, liquid: f64) {
        self.curve.push(BlowdownPoint {
            mass_expelled_kg: m0 - self.mass,
            pressure_pa: p,
            temperature_k: t,
            liquid_mass_kg: liquid,
        });
    }
}

fn adiabatic_blowdown(
    inv: &Inventory,
    p_end: f64,
    settings: &BlowdownSettings,
) -> Result<Blowdown, TankError> {
    let (gas, vol, m0) = (inv.gas, inv.volume_m3, inv.mass_kg);
    let t_triple = eos::triple_point_k(gas);
    let mut walk = Walk {
        mass: m0,
        curve: Vec::with_capacity(settings.pressure_steps + 64),
        steps: 0,
        condensation: None,
    };
    let liquid0 = match inv.phase {
        TankPhase::TwoPhase { liquid_mass_kg, .. } => liquid_mass_kg,
        _ => 0.0,
    };
    walk.push(m0, inv.supply_pressure_pa, inv.temperature_k, liquid0);
    // Mode: Some(temperature) while two-phase, None while single-phase.
    let mut two_phase_t =
        matches!(inv.phase, TankPhase::TwoPhase { .. }).then_some(inv.temperature_k);
    let mut s_single = inv.specific_entropy_j_kg_k;
    let mut p_cur = inv.supply_pressure_pa;
    let mut t_cur = inv.temperature_k;
    let mut end_state: Option<State> = None;
    // Saturation temperature of the end pressure, found once when the walk first goes two-phase.
    let mut t_end_sat: Option<f64> = None;
    loop {
        walk.steps += 1;
        if walk.steps > settings.max_steps {
            return Err(TankError::NoConvergence {
                what: "adiabatic blowdown walk",
            });
        }
        if let Some(t) = two_phase_t {
            // Two-phase: step the temperature down.
            let old = eos::saturation(gas, t)?;
            let x_old = quality(vol / walk.mass, &old);
            let s_old = mix(x_old, old.liquid.entropy_j_kg_k, old.vapour.entropy_j_kg_k);
            let t_end = match t_end_sat {
                Some(t) => t,
                None => {
                    // An end pressure below the triple-point pressure cannot be reached on the
                    // saturation line: the walk then stops at the triple point.
                    let t = match eos::saturation_at_pressure(gas, p_end) {
                        Ok(s) => s.temperature_k,
                        Err(EosError::OutOfRange { .. }) => t_triple,
                        Err(e) => return Err(e.into()),
                    };
                    t_end_sat = Some(t);
                    t
                }
            };
            let floor = t_end.max(t_triple);
            let mut t_new = (t - settings.two_phase_step_k).max(floor);
            let mut sat_new = eos::saturation(gas, t_new)?;
            let mut m_new = boil_step(vol, walk.mass, s_old, &old, &sat_new);
            let x_new = quality(vol / m_new, &sat_new);
            if x_new >= 1.0 {
                // The last liquid boils inside this step: find where.
                let g = |tt: f64| -> Result<f64, TankError> {
                    let s = eos::saturation(gas, tt)?;
                    let m = boil_step(vol, walk.mass, s_old, &old, &s);
                    Ok(quality(vol / m, &s) - 1.0)
                };
                t_new = solve_bracket(g, t_new, t, settings.temperature_rel, "liquid dry-out")?;
                sat_new = eos::saturation(gas, t_new)?;
                m_new = boil_step(vol, walk.mass, s_old, &old, &sat_new);
                walk.mass = m_new;
                walk.push(m0, sat_new.pressure_pa, t_new, 0.0);
                two_phase_t = None;
                s_single = sat_new.vapour.entropy_j_kg_k;
                p_cur = sat_new.pressure_pa;
                t_cur = t_new;
                continue;
            }
            walk.mass = m_new;
            let liquid = (1.0 - x_new) * m_new;
            walk.push(m0, sat_new.pressure_pa, t_new, liquid);
            p_cur = sat_new.pressure_pa;
            t_cur = t_new;
            if t_new <= floor {
                // The floor is the end pressure's saturation temperature unless that lies below
                // the triple point (or the end pressure is below the triple-point pressure).
                let end = if t_end > t_triple {
                    BlowdownEnd::EndPressure
                } else {
                    BlowdownEnd::TriplePoint
                };
                let m_end = walk.mass;
                return Ok(Blowdown {
                    usable_mass_kg: m0 - m_end,
                    usable_mass_uncertainty_kg: inv.mass_uncertainty_kg
                        + eos::density_relative_uncertainty(gas, t_new, false) * m_end,
                    end_temperature_k: t_new,
                    end_pressure_pa: sat_new.pressure_pa,
                    end,
                    dry_ice_warning: end == BlowdownEnd::TriplePoint,
                    curve: walk.curve,
                    condensation: walk.condensation,
                });
            }
            two_phase_t = Some(t_new);
            continue;
        }
        // Single phase: walk the pressure down along the isentrope s_single.
        let mut entered_dome = false;
        let steps: Vec<f64> = pressure_steps(p_cur, p_end, settings.pressure_steps).collect();
        let mut p_prev = p_cur;
        for p in steps {
            match isentrope_at(gas, s_single, p, t_cur, settings)? {
                IsentropeAt::Single(st) => {
                    walk.mass = st.density_kg_m3 * vol;
                    walk.push(m0, p, st.temperature_k, 0.0);
                    t_cur = st.temperature_k;
                    p_prev = p;
                    end_state = Some(st);
                }
                IsentropeAt::Dome => {
                    // Find the pressure where the isentrope meets the saturation line.
                    let p_star = dome_entry(gas, s_single, p, p_prev)?;
                    let sat = eos::saturation_at_pressure(gas, p_star)?;
                    let x = quality_from_entropy(s_single, &sat);
                    let v = mix(
                        x,
                        1.0 / sat.liquid.density_kg_m3,
                        1.0 / sat.vapour.density_kg_m3,
                    );
                    walk.mass = vol / v;
                    if walk.condensation.is_none() {
                        walk.condensation = Some(DomeEntry {
                            pressure_pa: sat.pressure_pa,
                            temperature_k: sat.temperature_k,
                            mass_expelled_kg: m0 - walk.mass,
                        });
                    }
                    walk.push(
                        m0,
                        sat.pressure_pa,
                        sat.temperature_k,
                        (1.0 - x) * walk.mass,
                    );
                    two_phase_t = Some(sat.temperature_k);
                    entered_dome = true;
                    break;
                }
                IsentropeAt::BelowTriple => {
                    let m_end = walk.mass;
                    return Ok(Blowdown {
                        usable_mass_kg: m0 - m_end,
                        usable_mass_uncertainty_kg: inv.mass_uncertainty_kg
                            + end_state.map_or(0.0, |s| rel_unc(gas, &s)) * m_end,
                        end_temperature_k: t_cur,
                        end_pressure_pa: p_prev,
                        end: BlowdownEnd::TriplePoint,
                        dry_ice_warning: true,
                        curve: walk.curve,
                        condensation: walk.condensation,
                    });
                }
            }
        }
        if entered_dome {
            continue;
        }
        let m_end = walk.mass;
        return Ok(Blowdown {
            usable_mass_kg: m0 - m_end,
            usable_mass_uncertainty_kg: inv.mass_uncertainty_kg
                + end_state.map_or(0.0, |s| rel_unc(gas, &s)) * m_end,
            end_temperature_k: t_cur,
            end_pressure_pa: p_end,
            end: BlowdownEnd::EndPressure,
            dry_ice_warning: false,
            curve: walk.curve,
            condensation: walk.condensation,
        });
    }
}

fn mix(x: f64, liquid: f64, vapour: f64) -> f64 {
    liquid + x * (vapour - liquid)
}

/// Vapour mass fraction of a saturated mixture of specific volume `v`.
fn quality(v: f64, sat: &eos::Saturation) -> f64 {
    let vl = 1.0 / sat.liquid.density_kg_m3;
    let vv = 1.0 / sat.vapour.density_kg_m3;
    (v - vl) / (vv - vl)
}

fn quality_from_entropy(s: f64, sat: &eos::Saturation) -> f64 {
    let (sl, sv) = (sat.liquid.entropy_j_kg_k, sat.vapour.entropy_j_kg_k);
    ((s - sl) / (sv - sl)).clamp(0.0, 1.0)
}

/// Mass left after one two-phase step with saturated vapour leaving.
///
/// Balances: `V = M·(v_l + x·(v_v − v_l))` and `M·s_new − m·s_old = s̄_v·(M − m)` with
/// `s_new = s_l + x·(s_v − s_l)` and `s̄_v` the mean outflow entropy over the step. Eliminating x
/// leaves an equation linear in M.
fn boil_step(
    vol: f64,
    m_old: f64,
    s_old: f64,
    old: &eos::Saturation,
    new: &eos::Saturation,
) -> f64 {
    let vl = 1.0 / new.liquid.density_kg_m3;
    let vv = 1.0 / new.vapour.density_kg_m3;
    let (sl, sv) = (new.liquid.entropy_j_kg_k, new.vapour.entropy_j_kg_k);
    let k = (sv - sl) / (vv - vl);
    let s_out = 0.5 * (old.vapour.entropy_j_kg_k + sv);
    (m_old * (s_old - s_out) - vol * k) / (sl - vl * k - s_out)
}

/// Pressure between `p_in` (inside the dome) and `p_out` (single-phase) where the isentrope meets
/// the saturation line, by bisection on the inside/outside test.
fn dome_entry(gas: Gas, s0: f64, p_in: f64, p_out: f64) -> Result<f64, TankError> {
    let inside = |p: f64| -> Result<bool, TankError> {
        match eos::saturation_at_pressure(gas, p) {
            Ok(sat) => Ok(s0 >= sat.liquid.entropy_j_kg_k && s0 <= sat.vapour.entropy_j_kg_k),
            Err(EosError::OutOfRange { .. }) => Ok(false),
            Err(e) => Err(e.into()),
        }
    };
    let (mut a, mut b) = (p_in, p_out);
    for _ in 0..60 {
        let m = 0.5 * (a + b);
        if inside(m)? {
            a = m;
        } else {
            b = m;
        }
        if (b - a) < 1e-10 * b {
            break;
        }
    }
    Ok(a)
}

#[cfg(test)]
mod tests {
    //! Reference values: CoolProp 8.0.0 (PyPI), `PropsSI`; the CO2 two-phase references come from
    //! the same vapour-withdrawal balance integrated with CoolProp saturation properties in 0.01 K
    //! steps, so they check this module's property model and integration, not the balance itself.
    use super::*;

    fn n2_fill() -> TankFill {
        TankFill::by_pressure(Gas::Nitrogen, 1e-3, 300e5, 300.0)
    }

    fn co2_fill() -> TankFill {
        TankFill::by_fill_ratio(Gas::CarbonDioxide, 0.5e-3, 0.6, 293.15)
    }

    /// (gas, fill bar, fill K, end bar; CoolProp 8.0.0: fill kg, isothermal usable kg,
    /// isentropic end K, adiabatic usable kg), 1 L tanks. Argon condenses on the way and has its
    /// own test below.
    type BlowdownCase = (Gas, f64, f64, f64, f64, f64, f64, f64);
    const SINGLE_PHASE_BLOWDOWNS: [BlowdownCase; 6] = [
        (
            Gas::Nitrogen,
            300.0,
            300.0,
            20.0,
            0.294_781_2,
            0.272_257_8,
            135.124,
            0.234_002_4,
        ),
        (
            Gas::Nitrogen,
            200.0,
            290.0,
            10.0,
            0.221_442_6,
            0.209_795_7,
            118.566,
            0.188_759_7,
        ),
        (
            Gas::Air,
            300.0,
            300.0,
            20.0,
            0.314_307_8,
            0.290_962_6,
            135.046,
            0.250_311_1,
        ),
        (
            Gas::Air,
            200.0,
            290.0,
            10.0,
            0.234_846_9,
            0.222_788_7,
            118.412,
            0.200_654_4,
        ),
        (
            Gas::Helium,
            300.0,
            300.0,
            20.0,
            0.042_310_79,
            0.039_131_54,
            102.306,
            0.033_152_78,
        ),
        (
            Gas::Helium,
            200.0,
            290.0,
            10.0,
            0.030_283_83,
            0.028_631_95,
            87.9592,
            0.024_894_63,
        ),
    ];

    /// Usable gas ≤ 0.4 % (helium ≤ 0.5 %) and end temperature within 0.8 K of the reference
    /// (the targets), and inside the published per-gas figures of
    /// `eos::model_uncertainty`, which in turn are not padded beyond twice what is seen here
    /// or 0.05 %/0.1 K.
    #[test]
    fn single_phase_blowdowns_match_reference() {
        let mut worst = [[0.0_f64; 3]; 5];
        for (gas, p0, t0, pe, m0, iso_ref, t_end_ref, adi_ref) in SINGLE_PHASE_BLOWDOWNS {
            let u = usable_gas(&TankFill::by_pressure(gas, 1e-3, p0 * 1e5, t0), pe * 1e5).unwrap();
            let pub_u = eos::model_uncertainty(gas);
            let target = if gas == Gas::Helium { 0.005 } else { 0.004 };
            let e_fill = (u.fill.mass_kg / m0 - 1.0).abs();
            let e_iso = (u.isothermal.usable_mass_kg / iso_ref - 1.0).abs();
            let e_adi = (u.adiabatic.usable_mass_kg / adi_ref - 1.0).abs();
            let e_t = (u.adiabatic.end_temperature_k - t_end_ref).abs();
            assert!(
                (u.fill.mass_kg - m0).abs() <= u.fill.mass_uncertainty_kg,
                "{gas:?} fill"
            );
            assert!(
                e_iso <= target && e_iso <= pub_u.usable_isothermal_fraction,
                "{gas:?} {p0} bar: isothermal {e_iso}"
            );
            assert!(
                (u.isothermal.usable_mass_kg - iso_ref).abs()
                    <= u.isothermal.usable_mass_uncertainty_kg,
                "{gas:?} {p0} bar: isothermal outside its stated uncertainty"
            );
            assert!(
                e_adi <= target && e_adi <= pub_u.usable_adiabatic_fraction,
                "{gas:?} {p0} bar: adiabatic {e_adi}"
            );
            assert!(
                e_t <= 0.8 && e_t <= pub_u.adiabatic_end_temperature_k,
                "{gas:?} {p0} bar: end temperature {} vs {t_end_ref}",
                u.adiabatic.end_temperature_k
            );
            assert!(e_fill < 0.004);
            assert_eq!(u.adiabatic.end, BlowdownEnd::EndPressure);
            assert!(
                u.adiabatic.condensation.is_none(),
                "{gas:?} should stay gas"
            );
            assert!(!u.adiabatic.dry_ice_warning);
            let w = &mut worst[eos::gas_index(gas)];
            *w = [w[0].max(e_iso), w[1].max(e_adi), w[2].max(e_t)];
        }
        for gas in [Gas::Nitrogen, Gas::Air, Gas::Helium] {
            let w = worst[eos::gas_index(gas)];
            let p = eos::model_uncertainty(gas);
            assert!(
                p.usable_isothermal_fraction <= (2.0 * w[0]).max(5e-4),
                "{gas:?}"
            );
            assert!(
                p.usable_adiabatic_fraction <= (2.0 * w[1]).max(5e-4),
                "{gas:?}"
            );
            assert!(
                p.adiabatic_end_temperature_k <= (2.0 * w[2]).max(0.1),
                "{gas:?}"
            );
        }
    }

    /// Argon, 1 L from 300 bar, 300 K to 20 bar and from 200 bar, 290 K to 10 bar: the
    /// isentrope meets the saturation line and the gas begins to condense. Reference: the dome
    /// entry from CoolProp 8.0.0 (the pressure where s(p, saturated vapour) equals the fill
    /// entropy: 32.17 bar, 140.365 K and 23.60 bar, 133.282 K), then the vapour-withdrawal
    /// balance integrated with CoolProp 8.0.0 saturation properties in 0.005 K steps (usable
    /// 0.359 776 kg and 0.289 328 kg, end at the saturation temperature of the end pressure,
    /// 129.735 K and 116.598 K), and the isothermal usable gas 0.450 171 kg and 0.335 968 kg.
    #[test]
    fn argon_blowdown_condenses_where_the_reference_says() {
        let cases = [
            (
                300.0,
                300.0,
                20.0,
                32.171_85,
                140.365,
                0.359_776_3,
                129.735,
                0.450_171_4,
            ),
            (
                200.0,
                290.0,
                10.0,
                23.604_81,
                133.282,
                0.289_328_3,
                116.598,
                0.335_968,
            ),
        ];
        let pub_u = eos::model_uncertainty(Gas::Argon);
        let mut worst = [0.0_f64; 3];
        for (p0, t0, pe, p_entry, t_entry, adi_ref, t_end_ref, iso_ref) in cases {
            let u = usable_gas(
                &TankFill::by_pressure(Gas::Argon, 1e-3, p0 * 1e5, t0),
                pe * 1e5,
            )
            .unwrap();
            let c = u.adiabatic.condensation.expect("argon should condense");
            assert!(
                (c.pressure_pa / (p_entry * 1e5) - 1.0).abs() < 0.01,
                "{c:?}"
            );
            assert!((c.temperature_k - t_entry).abs() < 0.8, "{c:?}");
            let e_adi = (u.adiabatic.usable_mass_kg / adi_ref - 1.0).abs();
            let e_iso = (u.isothermal.usable_mass_kg / iso_ref - 1.0).abs();
            let e_t = (u.adiabatic.end_temperature_k - t_end_ref).abs();
            assert!(
                e_adi <= 0.005 && e_adi <= pub_u.usable_adiabatic_fraction,
                "adi {e_adi}"
            );
            assert!(
                e_iso <= 0.005 && e_iso <= pub_u.usable_isothermal_fraction,
                "iso {e_iso}"
            );
            assert!(
                e_t <= 0.8 && e_t <= pub_u.adiabatic_end_temperature_k,
                "T {e_t}"
            );
            assert!(u.adiabatic.curve.last().unwrap().liquid_mass_kg > 0.0);
            worst = [worst[0].max(e_iso), worst[1].max(e_adi), worst[2].max(e_t)];
        }
        assert!(pub_u.usable_isothermal_fraction <= (2.0 * worst[0]).max(5e-4));
        assert!(pub_u.usable_adiabatic_fraction <= (2.0 * worst[1]).max(5e-4));
        assert!(pub_u.adiabatic_end_temperature_k <= (2.0 * worst[2]).max(0.1));
    }

    /// CO2, 0.5 L at fill ratio 0.6 kg/L and 293.15 K. CoolProp 8.0.0: vapour pressure
    /// 57.2905 bar, liquid 0.270932 kg filling 70.0637 % of the volume. Vapour pressure within
    /// 0.2 %, liquid mass and volume fraction within 0.5 % (the saturated densities are within
    /// 0.03 %, see `gas::eos`).
    #[test]
    fn co2_two_phase_fill_matches_reference() {
        let inv = inventory(&co2_fill()).unwrap();
        assert!((inv.mass_kg - 0.3).abs() < 1e-12);
        assert!((inv.supply_pressure_pa / 5.729_05e6 - 1.0).abs() < 0.002);
        match inv.phase {
            TankPhase::TwoPhase {
                liquid_mass_kg,
                liquid_volume_fraction,
            } => {
                let ef = liquid_volume_fraction / 0.700_637 - 1.0;
                let em = liquid_mass_kg / 0.270_932 - 1.0;
                assert!(ef.abs() < 0.005, "{liquid_volume_fraction}");
                assert!(em.abs() < 0.005, "{liquid_mass_kg}");
            }
            other => panic!("expected two-phase, got {other:?}"),
        }
    }

    /// The same CO2 tank to 20 bar. Isothermal usable (CoolProp 8.0.0): 0.279614 kg. Adiabatic
    /// with vapour withdrawal (the balance integrated with CoolProp 8.0.0 saturation properties
    /// in 0.01 K steps): end 253.647 K, usable 0.102947 kg. Usable gas within 0.4 %, end
    /// temperature within 0.8 K, and inside the published CO2 figures.
    #[test]
    fn co2_blowdown_matches_reference() {
        let u = usable_gas(&co2_fill(), 20e5).unwrap();
        let pub_u = eos::model_uncertainty(Gas::CarbonDioxide);
        let iso = &u.isothermal;
        let e_iso = (iso.usable_mass_kg / 0.279_614 - 1.0).abs();
        assert!(
            (iso.usable_mass_kg - 0.279_614).abs() <= iso.usable_mass_uncertainty_kg,
            "{} ± {}",
            iso.usable_mass_kg,
            iso.usable_mass_uncertainty_kg
        );
        let adi = &u.adiabatic;
        assert_eq!(adi.end, BlowdownEnd::EndPressure);
        let e_t = (adi.end_temperature_k - 253.647).abs();
        let e_adi = (adi.usable_mass_kg / 0.102_947 - 1.0).abs();
        assert!(e_iso <= 0.004 && e_iso <= pub_u.usable_isothermal_fraction);
        assert!(
            e_t <= 0.8 && e_t <= pub_u.adiabatic_end_temperature_k,
            "{e_t}"
        );
        assert!(
            e_adi <= 0.004 && e_adi <= pub_u.usable_adiabatic_fraction,
            "{e_adi}"
        );
        assert!(adi.usable_mass_kg < iso.usable_mass_kg);
        let last = adi.curve.last().unwrap();
        assert!(last.liquid_mass_kg > 0.0, "liquid should remain at 253 K");
        assert!(
            adi.condensation.is_none(),
            "started two-phase: no dome entry to report"
        );
    }

    /// Down to 3 bar the adiabatic CO2 walk meets the triple point first. CoolProp-based
    /// integration: at 216.6 K 0.151106 kg has left. Usable mass within 0.4 %.
    #[test]
    fn co2_adiabatic_walk_stops_at_the_triple_point() {
        let u = usable_gas(&co2_fill(), 3e5).unwrap();
        let adi = &u.adiabatic;
        assert_eq!(adi.end, BlowdownEnd::TriplePoint);
        assert!(adi.dry_ice_warning);
        assert!((adi.end_temperature_k - eos::triple_point_k(Gas::CarbonDioxide)).abs() < 1e-9);
        let e = (adi.usable_mass_kg / 0.151_106 - 1.0).abs();
        assert!(e < 0.004, "{}", adi.usable_mass_kg);
        assert!(e <= eos::model_uncertainty(Gas::CarbonDioxide).usable_adiabatic_fraction);
        // The isothermal limit reaches the end pressure with all liquid boiled.
        assert_eq!(u.isothermal.end, BlowdownEnd::EndPressure);
        assert_eq!(u.isothermal.curve.last().unwrap().liquid_mass_kg, 0.0);
    }

    /// Halving the two-phase temperature step must not move the answer (1e-4 relative).
    #[test]
    fn two_phase_step_is_converged() {
        let coarse = usable_gas(&co2_fill(), 20e5)
            .unwrap()
            .adiabatic
            .usable_mass_kg;
        let fine = usable_gas_with(
            &co2_fill(),
            20e5,
            &BlowdownSettings {
                two_phase_step_k: 0.02,
                ..BlowdownSettings::default()
            },
        )
        .unwrap()
        .adiabatic
        .usable_mass_kg;
        assert!((coarse / fine - 1.0).abs() < 1e-4, "{coarse} vs {fine}");
    }

    /// Curves start at the fill, expel mass monotonically while the pressure falls, and the
    /// adiabatic limit never delivers more than the isothermal one.
    #[test]
    fn curves_are_monotonic() {
        for fill in [
            n2_fill(),
            co2_fill(),
            TankFill::by_pressure(Gas::Argon, 2e-4, 200e5, 280.0),
        ] {
            let u = usable_gas(&fill, 15e5).unwrap();
            for b in [&u.isothermal, &u.adiabatic] {
                assert_eq!(b.curve[0].mass_expelled_kg, 0.0);
                for w in b.curve.windows(2) {
                    assert!(w[1].mass_expelled_kg >= w[0].mass_expelled_kg - 1e-12);
                    assert!(w[1].pressure_pa <= w[0].pressure_pa * (1.0 + 1e-9));
                }
                let last = b.curve.last().unwrap();
                assert!((last.mass_expelled_kg - b.usable_mass_kg).abs() < 1e-12);
            }
            assert!(u.adiabatic.usable_mass_kg <= u.isothermal.usable_mass_kg);
        }
    }

    /// Supercritical CO2 (320 K, 0.45 kg/L) blown down adiabatically crosses into the dome.
    #[test]
    fn supercritical_co2_enters_the_dome() {
        let fill = TankFill::by_fill_ratio(Gas::CarbonDioxide, 1e-3, 0.45, 320.0);
        let u = usable_gas(&fill, 20e5).unwrap();
        assert_eq!(u.fill.phase, TankPhase::Supercritical);
        assert!(u.adiabatic.curve.iter().any(|p| p.liquid_mass_kg > 0.0));
        assert!(u.adiabatic.end_temperature_k < 260.0);
    }

    /// Supercritical CO2 from 350 K, 300 bar expanded isentropically to 100 bar: CoolProp 8.0.0
    /// gives 313.59 K; within 0.8 K.
    #[test]
    fn co2_supercritical_isentrope_end_temperature() {
        let fill = TankFill::by_pressure(Gas::CarbonDioxide, 1e-3, 300e5, 350.0);
        let u = usable_gas(&fill, 100e5).unwrap();
        let t = u.adiabatic.end_temperature_k;
        assert!((t - 313.59).abs() < 0.8, "{t}");
    }

    /// One two-phase step conserves energy: m₁u₁ − m₀u₀ = h̄_v (m₁ − m₀) for a rigid adiabatic
    /// tank with vapour leaving. The step is built from the entropy balance, so this checks the
    /// closed-form update against the first law (residual of order ΔT², 1e-4 of the energy
    /// drawn for a 0.1 K step).
    #[test]
    fn two_phase_step_conserves_energy() {
        let inv = inventory(&co2_fill()).unwrap();
        let vol = inv.volume_m3;
        let old = eos::saturation(Gas::CarbonDioxide, 293.15).unwrap();
        let new = eos::saturation(Gas::CarbonDioxide, 293.05).unwrap();
        let x0 = quality(vol / inv.mass_kg, &old);
        let s0 = mix(x0, old.liquid.entropy_j_kg_k, old.vapour.entropy_j_kg_k);
        let m1 = boil_step(vol, inv.mass_kg, s0, &old, &new);
        let x1 = quality(vol / m1, &new);
        let u = |x: f64, s: &eos::Saturation| {
            mix(
                x,
                s.liquid.internal_energy_j_kg(),
                s.vapour.internal_energy_j_kg(),
            )
        };
        let d_energy = m1 * u(x1, &new) - inv.mass_kg * u(x0, &old);
        let outflow =
            0.5 * (old.vapour.enthalpy_j_kg + new.vapour.enthalpy_j_kg) * (m1 - inv.mass_kg);
        assert!(m1 < inv.mass_kg);
        assert!(
            (d_energy / outflow - 1.0).abs() < 1e-4,
            "{d_energy} vs {outflow}"
        );
    }

    #[test]
    fn impossible_fills_are_errors() {
        let co2 = Gas::CarbonDioxide;
        assert!(matches!(
            inventory(&TankFill::by_pressure(co2, 1e-3, 80e5, 293.15)),
            Err(TankError::CompressedLiquid { .. })
        ));
        assert!(matches!(
            inventory(&TankFill::by_fill_ratio(co2, 1e-3, 0.9, 293.15)),
            Err(TankError::LiquidFull { .. })
        ));
        assert!(matches!(
            usable_gas(&n2_fill(), 400e5),
            Err(TankError::EndPressureNotBelowSupply { .. })
        ));
        assert!(matches!(
            inventory(&TankFill::by_pressure(Gas::Air, f64::NAN, 200e5, 300.0)),
            Err(TankError::BadInput { .. })
        ));
        assert!(matches!(
            inventory(&TankFill::by_mass(Gas::Air, 1e-3, -1.0, 300.0)),
            Err(TankError::BadInput { .. })
        ));
        // CO2 vapour below its vapour pressure is a valid gas fill.
        let inv = inventory(&TankFill::by_pressure(co2, 1e-3, 40e5, 293.15)).unwrap();
        assert_eq!(inv.phase, TankPhase::Gas);
    }

    #[test]
    fn end_pressure_adds_the_dropout_margin() {
        assert_eq!(end_pressure_pa(10e5, 3e5), 13e5);
    }
}
