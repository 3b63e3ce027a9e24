//! On the pad: gas lost to leaks behind an arming valve, and the tank pressure on hot and cold
//! days.
//!
//! *Pad hold.* The manifold stays unpressurised behind an arming valve that opens at launch;
//! what leaks is the tank and its fittings up to that valve. A leak is given as a standard
//! volumetric flow (at the reference conditions [`STANDARD_TEMPERATURE_K`] and
//! [`STANDARD_PRESSURE_PA`], converted with the gas's real density there) or as a measured tank
//! pressure drop over a time at the fill temperature (converted with the real densities before
//! and after). The mass rate is taken as constant over the hold: a leak through a choked path
//! shrinks as the tank pressure falls, so this is the cautious side.
//!
//! *Hot and cold pads.* A tank filled with a mass at one temperature keeps that mass; at another
//! temperature its pressure follows the equation of state at that mean density (the vapour
//! pressure while CO2 is two-phase; a liquid-full CO2 tank, whose pressure rises steeply, is
//! flagged loudly). Each pad temperature is compared with the tank's rated working pressure and
//! relief setting.

use crate::gas::eos::{self, EosError};
use crate::gas::tank::{self, TankError, TankFill, TankPhase};
use crate::gas::Gas;
use serde::Serialize;
use thiserror::Error;

/// Temperature of the standard reference conditions of a volumetric leak rate, K (0 °C).
pub const STANDARD_TEMPERATURE_K: f64 = 273.15;
/// Pressure of the standard reference conditions of a volumetric leak rate, Pa (1 atm).
pub const STANDARD_PRESSURE_PA: f64 = 101_325.0;

/// What can go wrong on the pad.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum PadError {
    /// Tank model failure.
    #[error(transparent)]
    Tank(#[from] TankError),
    /// Property model failure.
    #[error(transparent)]
    Eos(#[from] EosError),
    /// An input was not finite or not positive (or negative where zero is allowed).
    #[error("{what} must be a finite {expected} number, got {value}")]
    BadInput {
        /// Which input.
        what: &'static str,
        /// The value given.
        value: f64,
        /// "positive" or "non-negative".
        expected: &'static str,
    },
}

/// How a leak was measured.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum LeakRate {
    /// Volumetric flow at the standard reference conditions (0 °C, 101.325 kPa), m³/s.
    StandardFlow {
        /// m³/s at 0 °C and 101.325 kPa.
        standard_m3_s: f64,
    },
    /// Tank pressure fell by `drop_pa` over `over_s` seconds at the fill temperature, starting
    /// from the fill pressure.
    PressureDrop {
        /// Pressure drop, Pa.
        drop_pa: f64,
        /// Time it took, s.
        over_s: f64,
    },
}

/// The longest pad time, or why there is none.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum LongestHold {
    /// No leak: no limit from leaks.
    Unlimited,
    /// The budget plus reserve is covered up to this pad time, s.
    Seconds {
        /// s.
        seconds: f64,
    },
    /// Not covered even with no hold at all.
    NotEvenAtFill,
}

/// Gas at launch after a pad hold.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PadHold {
    /// Leak mass rate, kg/s.
    pub leak_kg_s: f64,
    /// Pad time assumed, s.
    pub pad_time_s: f64,
    /// Gas in the tank at fill, kg.
    pub fill_mass_kg: f64,
    /// Gas in the tank at launch, kg.
    pub launch_mass_kg: f64,
    /// Tank pressure at launch, Pa absolute.
    pub launch_pressure_pa: f64,
    /// Usable gas at launch, adiabatic bound, kg.
    pub usable_adiabatic_at_launch_kg: f64,
    /// Longest pad time for which the manoeuvre gas plus reserve is still covered.
    pub longest: LongestHold,
    /// Delay of the arming valve from launch detection to a pressurised manifold, s.
    pub arming_delay_s: f64,
}

fn check(what: &'static str, v: f64, allow_zero: bool) -> Result<f64, PadError> {
    if v.is_finite() && (v > 0.0 || (allow_zero && v == 0.0)) {
        Ok(v)
    } else {
        Err(PadError::BadInput {
            what,
            value: v,
            expected: if allow_zero {
                "non-negative"
            } else {
                "positive"
            },
        })
    }
}

/// Leak mass rate of a measured leak, kg/s, for a tank of `volume_m3` filled to
/// `fill_pressure_pa` at `temperature_k` (the pressure and temperature only matter for a
/// pressure-drop measurement).
pub fn leak_mass_rate_kg_s(
    gas: Gas,
    leak: LeakRate,
    volume_m3: f64,
    fill_pressure_pa: f64,
    temperature_k: f64,
) -> Result<f64, PadError> {
    match leak {
        LeakRate::StandardFlow { standard_m3_s } => {
            let q = check("standard leak flow", standard_m3_s, true)?;
            Ok(q * eos::density(gas, STANDARD_PRESSURE_PA, STANDARD_TEMPERATURE_K)?)
        }
        LeakRate::PressureDrop { drop_pa, over_s } => {
            let dp = check("leak pressure drop", drop_pa, true)?;
            let t = check("leak test time", over_s, false)?;
            let v = check("tank volume", volume_m3, false)?;
            let p0 = check("fill pressure", fill_pressure_pa, false)?;
            if dp == 0.0 {
                return Ok(0.0);
            }
            let p1 = check("pressure after the leak test", p0 - dp, false)?;
            let r0 = eos::density(gas, p0, temperature_k)?;
            let r1 = eos::density(gas, p1, temperature_k)?;
            Ok(v * (r0 - r1) / t)
        }
    }
}

fn usable_adiabatic(fill: &TankFill, mass: f64, end_pa: f64) -> Result<f64, PadError> {
    let f = TankFill::by_mass(fill.gas, fill.volume_m3, mass, fill.fill_temperature_k);
    let inv = tank::inventory(&f)?;
    if inv.supply_pressure_pa <= end_pa {
        return Ok(0.0);
    }
    Ok(tank::usable_gas(&f, end_pa)?.adiabatic.usable_mass_kg)
}

/// Gas at launch after `pad_time_s` on the pad, and the longest pad time for which the usable
/// gas (adiabatic bound) less `reserve_fraction` still covers `needed_kg` (the rule of the
/// manoeuvre budget). The tank stays at its fill temperature.
pub fn pad_hold(
    fill: &TankFill,
    end_pressure_pa: f64,
    leak_kg_s: f64,
    pad_time_s: f64,
    needed_kg: f64,
    reserve_fraction: f64,
    arming_delay_s: f64,
) -> Result<PadHold, PadError> {
    let leak = check("leak mass rate", leak_kg_s, true)?;
    let t_pad = check("pad time", pad_time_s, true)?;
    let needed = check("gas needed", needed_kg, true)?;
    let keep = 1.0 - reserve_fraction;
    let m0 = tank::inventory(fill)?.mass_kg;
    let launch_mass = (m0 - leak * t_pad).max(0.0);
    let at_launch = if launch_mass > 0.0 {
        usable_adiabatic(fill, launch_mass, end_pressure_pa)?
    } else {
        0.0
    };
    let launch_pressure_pa = if launch_mass > 0.0 {
        tank::inventory(&TankFill::by_mass(
            fill.gas,
            fill.volume_m3,
            launch_mass,
            fill.fill_temperature_k,
        ))?
        .supply_pressure_pa
    } else {
        0.0
    };
    let covered = |m: f64| -> Result<bool, PadError> {
        Ok(m > 0.0 && usable_adiabatic(fill, m, end_pressure_pa)? * keep >= needed)
    };
    let longest = if !covered(m0)? {
        LongestHold::NotEvenAtFill
    } else if leak == 0.0 {
        LongestHold::Unlimited
    } else {
        // Bisection on the mass left: usable gas grows with the mass in the tank.
        let (mut lo, mut hi) = (0.0, m0);
        for _ in 0..60 {
            let mid = 0.5 * (lo + hi);
            if covered(mid)? {
                hi = mid;
            } else {
                lo = mid;
            }
            if hi - lo < 1e-9 * m0 {
                break;
            }
        }
        LongestHold::Seconds {
            seconds: (m0 - hi) / leak,
        }
    };
    Ok(PadHold {
        leak_kg_s: leak,
        pad_time_s: t_pad,
        fill_mass_kg: m0,
        launch_mass_kg: launch_mass,
        launch_pressure_pa,
        usable_adiabatic_at_launch_kg: at_launch,
        longest,
        arming_delay_s: check("arming valve delay", arming_delay_s, true)?,
    })
}

/// The tank at one pad temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PadTemperature {
    /// Pad (tank) temperature, K.
    pub temperature_k: f64,
    /// Tank pressure, Pa absolute; None when beyond the model's range (a liquid-full CO2
    /// tank heated).
    pub pressure_pa: Option<f64>,
    /// Phase in words.
    pub phase: &'static str,
    /// At or above the rated working pressure.
    pub at_rating: bool,
    /// At or above the relief (or burst) setting, when one is given.
    pub at_relief: bool,
    /// Usable gas, isothermal and adiabatic bounds, kg (None when not computable).
    pub usable_isothermal_kg: Option<f64>,
    /// See `usable_isothermal_kg`.
    pub usable_adiabatic_kg: Option<f64>,
}

/// The tank filled with `fill_mass_kg` at any temperature, at each pad temperature.
pub fn pad_temperatures(
    gas: Gas,
    volume_m3: f64,
    fill_mass_kg: f64,
    temperatures_k: &[f64],
    rated_pressure_pa: f64,
    relief_pressure_pa: Option<f64>,
    end_pressure_pa: f64,
) -> Result<Vec<PadTemperature>, PadError> {
    let rating = check("rated working pressure", rated_pressure_pa, false)?;
    let mut rows = Vec::with_capacity(temperatures_k.len());
    for &t in temperatures_k {
        let t = check("pad temperature", t, false)?;
        let fill = TankFill::by_mass(gas, volume_m3, fill_mass_kg, t);
        let (pressure, phase) = match tank::inventory(&fill) {
            Ok(inv) => (
                Some(inv.supply_pressure_pa),
                match inv.phase {
                    TankPhase::Gas => "gas",
                    TankPhase::Supercritical => "supercritical",
                    TankPhase::TwoPhase { .. } => "liquid under vapour",
                },
            ),
            Err(TankError::LiquidFull { .. }) => {
                // Liquid-full: the pressure of the compressed liquid at that density.
                match eos::state_td(gas, fill_mass_kg / volume_m3, t) {
                    Ok(s) => (Some(s.pressure_pa), "liquid-full"),
                    Err(_) => (None, "liquid-full"),
                }
            }
            Err(e) => return Err(e.into()),
        };
        let at_rating = pressure.is_none_or(|p| p >= rating);
        let at_relief = match relief_pressure_pa {
            Some(r) => pressure.is_none_or(|p| p >= r),
            None => false,
        };
        let usable = match pressure {
            Some(p) if p > end_pressure_pa && phase != "liquid-full" => {
                tank::usable_gas(&fill, end_pressure_pa).ok()
            }
            _ => None,
        };
        rows.push(PadTemperature {
            temperature_k: t,
            pressure_pa: pressure,
            phase,
            at_rating,
            at_relief,
            usable_isothermal_kg: usable.as_ref().map(|u| u.isothermal.usable_mass_kg),
            usable_adiabatic_kg: usable.as_ref().map(|u| u.adiabatic.usable_mass_kg),
        });
    }
    Ok(rows)
}

#[cfg(test)]
mod tests {
    //! Reference values: CoolProp 8.0.0 (PyPI), `PropsSI`.
    use super::*;

    /// 1e-6 m³/s of nitrogen at 0 °C and 1 atm is 1.250 386 mg/s (CoolProp density 1.250 386
    /// kg/m³); a 10 bar drop from 300 bar at 300 K in a 1 L tank over 1 h is
    /// 1 L × (294.7812 − 287.3956) kg/m³ / 3600 s = 2.0516 mg/s.
    #[test]
    fn leak_rates_convert_with_real_densities() {
        let q = leak_mass_rate_kg_s(
            Gas::Nitrogen,
            LeakRate::StandardFlow {
                standard_m3_s: 1e-6,
            },
            1e-3,
            300e5,
            300.0,
        )
        .unwrap();
        assert!((q / 1.250_386e-6 - 1.0).abs() < 1e-3, "{q}");
        let d = leak_mass_rate_kg_s(
            Gas::Nitrogen,
            LeakRate::PressureDrop {
                drop_pa: 10e5,
                over_s: 3600.0,
            },
            1e-3,
            300e5,
            300.0,
        )
        .unwrap();
        let expected = 1e-3 * (294.781_2 - 287.395_6) / 3600.0;
        assert!((d / expected - 1.0).abs() < 2e-3, "{d} vs {expected}");
    }

    /// The longest hold is where the usable gas less the reserve equals the need: one second
    /// shorter is covered, one longer is not; and a longer pad time leaves less gas.
    #[test]
    fn longest_hold_is_the_coverage_limit() {
        let fill = TankFill::by_pressure(Gas::Nitrogen, 1e-3, 300e5, 300.0);
        let leak = 2e-6;
        let h = pad_hold(&fill, 15e5, leak, 3600.0, 0.15, 0.2, 0.05).unwrap();
        let LongestHold::Seconds { seconds } = h.longest else {
            panic!("{:?}", h.longest)
        };
        assert!(seconds > 0.0);
        let at = |t: f64| pad_hold(&fill, 15e5, leak, t, 0.15, 0.2, 0.05).unwrap();
        assert!(at(seconds - 1.0).usable_adiabatic_at_launch_kg * 0.8 >= 0.15);
        assert!(at(seconds + 1.0).usable_adiabatic_at_launch_kg * 0.8 < 0.15);
        assert!((h.launch_mass_kg - (h.fill_mass_kg - leak * 3600.0)).abs() < 1e-12);
        assert!(at(7200.0).launch_mass_kg < h.launch_mass_kg);
        // No leak: no limit; a need beyond the usable gas: not even at fill.
        let none = pad_hold(&fill, 15e5, 0.0, 3600.0, 0.15, 0.2, 0.05).unwrap();
        assert_eq!(none.longest, LongestHold::Unlimited);
        let too_much = pad_hold(&fill, 15e5, leak, 0.0, 10.0, 0.2, 0.05).unwrap();
        assert_eq!(too_much.longest, LongestHold::NotEvenAtFill);
    }

    /// CO2 at 0.6 kg/L, CoolProp 8.0.0: 26.487 bar at −10 °C and 57.291 bar at 20 °C
    /// (liquid under vapour), liquid-full at 30 °C (72.234 bar), supercritical at 45 °C
    /// (109.561 bar) and 60 °C (148.922 bar). Rated 100 bar, relief 140 bar: 45 °C is at the
    /// rating, 60 °C at the relief.
    #[test]
    fn co2_pad_temperatures_match_reference_and_flag_the_rating() {
        let temps = [263.15, 293.15, 303.15, 318.15, 333.15];
        let rows = pad_temperatures(
            Gas::CarbonDioxide,
            1e-3,
            0.6,
            &temps,
            100e5,
            Some(140e5),
            15e5,
        )
        .unwrap();
        let refs = [
            26.486_77e5,
            57.290_53e5,
            72.234_09e5,
            109.561_3e5,
            148.922_1e5,
        ];
        for (r, p_ref) in rows.iter().zip(refs) {
            let p = r.pressure_pa.unwrap();
            assert!(
                (p / p_ref - 1.0).abs() < 3e-3,
                "{} K: {p} vs {p_ref}",
                r.temperature_k
            );
        }
        assert_eq!(rows[1].phase, "liquid under vapour");
        assert_eq!(rows[2].phase, "liquid-full");
        assert_eq!(rows[3].phase, "supercritical");
        assert!(!rows[2].at_rating && rows[3].at_rating && !rows[3].at_relief);
        assert!(rows[4].at_relief);
        assert!(rows[0].usable_adiabatic_kg.unwrap() < rows[1].usable_adiabatic_kg.unwrap());
        assert!(rows[2].usable_isothermal_kg.is_none());
    }

    /// Nitrogen filled at 300 bar and 300 K, CoolProp 8.0.0: 244.811 bar at −10 °C and
    /// 326.952 bar at 45 °C.
    #[test]
    fn nitrogen_pad_temperatures_match_reference() {
        let m = 294.781_2e-3;
        let rows =
            pad_temperatures(Gas::Nitrogen, 1e-3, m, &[263.15, 318.15], 310e5, None, 15e5).unwrap();
        assert!((rows[0].pressure_pa.unwrap() / 244.810_9e5 - 1.0).abs() < 1e-3);
        assert!((rows[1].pressure_pa.unwrap() / 326.952_1e5 - 1.0).abs() < 1e-3);
        assert!(!rows[0].at_rating && rows[1].at_rating);
    }
}
