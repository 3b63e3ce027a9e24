//! The tank in time: mass and energy balance of the contents with the real-gas
//! model, heat from a lumped tank wall.
//!
//! State: contents mass m, contents internal energy U, wall temperature T_w. Gas
//! leaving takes its specific enthalpy with it (saturated vapour when liquid CO2
//! lies under its vapour and the outlet draws from the vapour; the contents'
//! enthalpy otherwise), so dU = −h_out·dm + Q. The temperature and pressure follow
//! from (m/V, U/m) by inverting the equation of state ([`crate::gas::eos`]): a
//! single-phase state at density and temperature, or a saturated mixture when the
//! density lies between the saturated vapour and liquid densities.
//!
//! The wall exchanges heat only with the contents (the outside is neglected over
//! a hold of minutes): Q = hA·(T_w − T). Over each tank step the two
//! temperatures relax toward each other exactly (exponential in time with the
//! heat capacities of that step), so any coefficient, however large, is stable:
//! hA = 0 gives the adiabatic bound, a very large hA with a heavy wall the
//! isothermal one. The outflow enthalpy is the mean of its values before and after
//! each mass step (trapezoidal rule, second order).

use crate::gas::eos::{self, EosError};
use crate::gas::Gas;

/// Heat exchange of the contents with the tank wall.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct WallHeat {
    /// Wall mass, kg.
    pub mass_kg: f64,
    /// Wall specific heat, J/(kg·K).
    pub specific_heat_j_kg_k: f64,
    /// Heat-transfer coefficient times inner area, W/K.
    pub coefficient_area_w_k: f64,
}

impl WallHeat {
    /// No heat reaches the contents (the adiabatic bound).
    pub fn adiabatic() -> Self {
        WallHeat {
            mass_kg: 1.0,
            specific_heat_j_kg_k: 1.0,
            coefficient_area_w_k: 0.0,
        }
    }

    /// Heat capacity of the wall, J/K.
    pub fn capacity_j_k(&self) -> f64 {
        self.mass_kg * self.specific_heat_j_kg_k
    }
}

/// Specific heat of an aluminium-alloy tank wall, J/(kg·K) (6061-T6, about
/// 896 J/(kg·K) at room temperature; from memory).
pub const ALUMINIUM_SPECIFIC_HEAT_J_KG_K: f64 = 896.0;

/// Inside heat-transfer coefficient between a gently stirred gas and the tank
/// wall, W/(m²·K): natural convection in a small bottle during pulsed outflow
/// (common practice, no source).
pub const INSIDE_HEAT_TRANSFER_W_M2_K: f64 = 20.0;

/// Contents of the tank at one instant.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TankContents {
    /// Mass, kg.
    pub mass_kg: f64,
    /// Total internal energy, J (zero as in [`eos`]).
    pub energy_j: f64,
    /// Temperature, K.
    pub temperature_k: f64,
    /// Pressure, Pa absolute.
    pub pressure_pa: f64,
    /// Liquid mass, kg (zero in a single-phase tank).
    pub liquid_kg: f64,
    /// Specific enthalpy of what leaves, J/kg.
    pub outflow_enthalpy_j_kg: f64,
    /// ∂u/∂T at constant density, J/(kg·K) (includes boiling in a two-phase tank).
    pub cv_j_kg_k: f64,
    /// Wall temperature, K.
    pub wall_temperature_k: f64,
}

/// Why the tank cannot be followed further.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum TankTimeError {
    /// The equation of state failed.
    #[error(transparent)]
    Eos(#[from] EosError),
    /// The temperature search did not converge.
    #[error("the tank temperature did not converge (contents {mass_kg} kg)")]
    NoConvergence {
        /// Mass in the tank, kg.
        mass_kg: f64,
    },
    /// The contents cooled to the triple point: solid would form.
    #[error("the tank contents cooled to the triple point ({temperature_k:.1} K): solid forms and can block the outlet")]
    TriplePoint {
        /// Temperature, K.
        temperature_k: f64,
    },
}

/// A tank followed in time.
#[derive(Debug, Clone, PartialEq)]
pub struct TankInTime {
    gas: Gas,
    volume_m3: f64,
    wall: WallHeat,
    now: TankContents,
    /// Enthalpy carried out so far, J.
    enthalpy_out_j: f64,
    /// Heat moved from wall to contents so far, J.
    heat_in_j: f64,
}

/// Specific internal energy, pressure, liquid mass fraction and outflow enthalpy at (ρ, T).
fn state_at(gas: Gas, rho: f64, t: f64) -> Result<(f64, f64, f64, f64), EosError> {
    let (lo, hi) = eos::saturation_range_k(gas);
    if t >= lo && t <= hi {
        let sat = eos::saturation(gas, t)?;
        let (rl, rv) = (sat.liquid.density_kg_m3, sat.vapour.density_kg_m3);
        if rho > rv && rho < rl {
            // Vapour quality x from 1/ρ = (1 − x)/ρl + x/ρv.
            let x = (1.0 / rho - 1.0 / rl) / (1.0 / rv - 1.0 / rl);
            let ul = sat.liquid.internal_energy_j_kg();
            let uv = sat.vapour.internal_energy_j_kg();
            return Ok((
                ul + x * (uv - ul),
                sat.pressure_pa,
                1.0 - x,
                sat.vapour.enthalpy_j_kg,
            ));
        }
    }
    let s = eos::state_td(gas, rho, t)?;
    Ok((
        s.internal_energy_j_kg(),
        s.pressure_pa,
        0.0,
        s.enthalpy_j_kg,
    ))
}

impl TankInTime {
    /// A tank of `volume_m3` holding `mass_kg` of `gas` at `temperature_k`, wall at the same temperature.
    pub fn new(
        gas: Gas,
        volume_m3: f64,
        mass_kg: f64,
        temperature_k: f64,
        wall: WallHeat,
    ) -> Result<Self, TankTimeError> {
        let rho = mass_kg / volume_m3;
        let (u, p, liq, h) = state_at(gas, rho, temperature_k)?;
        let cv = Self::cv(gas, rho, temperature_k, u)?;
        Ok(TankInTime {
            gas,
            volume_m3,
            wall,
            now: TankContents {
                mass_kg,
                energy_j: u * mass_kg,
                temperature_k,
                pressure_pa: p,
                liquid_kg: liq * mass_kg,
                outflow_enthalpy_j_kg: h,
                cv_j_kg_k: cv,
                wall_temperature_k: temperature_k,
            },
            enthalpy_out_j: 0.0,
            heat_in_j: 0.0,
        })
    }

    fn cv(gas: Gas, rho: f64, t: f64, u: f64) -> Result<f64, EosError> {
        let dt = 1e-3 * t.max(1.0) * 1e-2;
        let up = match state_at(gas, rho, t + dt) {
            Ok(s) => s.0,
            Err(_) => return Ok((u - state_at(gas, rho, t - dt)?.0) / dt),
        };
        Ok((up - u) / dt)
    }

    /// The contents now.
    pub fn contents(&self) -> &TankContents {
        &self.now
    }

    /// The gas.
    pub fn gas(&self) -> Gas {
        self.gas
    }

    /// Volume, m³.
    pub fn volume_m3(&self) -> f64 {
        self.volume_m3
    }

    /// Energy-balance residual, J: contents energy + wall energy change + enthalpy
    /// carried out, against the start; zero up to round-off when the balance closes.
    pub fn energy_books_j(&self) -> (f64, f64) {
        (self.enthalpy_out_j, self.heat_in_j)
    }

    /// Solve T with (ρ, u) given, from a starting guess.
    fn solve_temperature(
        &self,
        rho: f64,
        u: f64,
        guess: f64,
    ) -> Result<(f64, f64, f64, f64, f64), TankTimeError> {
        let tp = eos::triple_point_k(self.gas);
        let mut t = guess;
        for _ in 0..60 {
            let (ui, p, liq, h) = state_at(self.gas, rho, t)?;
            let cv = Self::cv(self.gas, rho, t, ui)?;
            let err = ui - u;
            if err.abs() <= 1e-11 * u.abs().max(1e3) {
                return Ok((t, p, liq, h, cv));
            }
            let mut step = -err / cv.max(1.0);
            step = step.clamp(-0.2 * t, 0.2 * t);
            let next = t + step;
            if next < tp {
                if t <= tp * (1.0 + 1e-9) {
                    return Err(TankTimeError::TriplePoint { temperature_k: t });
                }
                t = 0.5 * (t + tp);
            } else {
                t = next;
            }
        }
        Err(TankTimeError::NoConvergence {
            mass_kg: rho * self.volume_m3,
        })
    }

    /// Take `dm_kg` out and let heat flow for `dt_s`. The mass taken is limited to
    /// what is in the tank; returns the mass actually taken.
    pub fn advance(&mut self, dm_kg: f64, dt_s: f64) -> Result<f64, TankTimeError> {
        let old = self.now;
        let dm = dm_kg.clamp(0.0, old.mass_kg * (1.0 - 1e-9));
        let m = old.mass_kg - dm;
        let rho = m / self.volume_m3;
        // Outflow first (adiabatic, predictor with the old outflow enthalpy and
        // corrector with the mean), then heat over the step: exact relaxation of
        // the two temperatures from the state the outflow left.
        let mut h_out = old.outflow_enthalpy_j_kg;
        let mut after = None;
        for _ in 0..2 {
            let energy = old.energy_j - h_out * dm;
            let s = self.solve_temperature(rho, energy / m, old.temperature_k)?;
            h_out = 0.5 * (old.outflow_enthalpy_j_kg + s.3);
            after = Some(s);
        }
        let a = after.expect("two passes ran");
        let cg = (m * a.4).max(1e-12);
        let cw = self.wall.capacity_j_k();
        let ha = self.wall.coefficient_area_w_k;
        let q = if ha > 0.0 && dt_s > 0.0 {
            let c_eff = 1.0 / (1.0 / cg + 1.0 / cw);
            let diff = old.wall_temperature_k - a.0;
            c_eff * diff * (1.0 - (-ha * dt_s / c_eff).exp())
        } else {
            0.0
        };
        let energy = old.energy_j - h_out * dm + q;
        // The final state is solved for exactly the energy booked.
        let s = if q == 0.0 {
            self.solve_temperature(rho, energy / m, a.0)?
        } else {
            self.solve_temperature(rho, energy / m, a.0 + q / cg)?
        };
        self.enthalpy_out_j += h_out * dm;
        self.heat_in_j += q;
        self.now = TankContents {
            mass_kg: m,
            energy_j: energy,
            temperature_k: s.0,
            pressure_pa: s.1,
            liquid_kg: s.2 * m,
            outflow_enthalpy_j_kg: s.3,
            cv_j_kg_k: s.4,
            wall_temperature_k: old.wall_temperature_k - q / cw,
        };
        Ok(dm)
    }

    /// Internal energy of the contents recomputed from the equation of state at
    /// the present mass and temperature, J (to check the inversion).
    pub fn energy_from_state_j(&self) -> Result<f64, EosError> {
        let rho = self.now.mass_kg / self.volume_m3;
        Ok(state_at(self.gas, rho, self.now.temperature_k)?.0 * self.now.mass_kg)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::tank::{self, TankFill};

    const V: f64 = 13.0 * 16.387_064e-6; // 13 in³ (1 in = 25.4 mm exactly)

    fn nitrogen(wall: WallHeat) -> (TankInTime, f64) {
        let p_fill = 3000.0 * 6_894.757 + 101_325.0;
        let fill = TankFill::by_pressure(Gas::Nitrogen, V, p_fill, 293.15);
        let inv = tank::inventory(&fill).unwrap();
        (
            TankInTime::new(Gas::Nitrogen, V, inv.mass_kg, 293.15, wall).unwrap(),
            p_fill,
        )
    }

    /// Drain in small mass steps until the pressure reaches `p_end`; the mass delivered.
    fn drain_to(t: &mut TankInTime, p_end: f64, steps: usize, dt: f64) -> f64 {
        let m0 = t.contents().mass_kg;
        let dm = m0 / steps as f64;
        let mut out = 0.0;
        while t.contents().pressure_pa > p_end {
            let before = t.clone();
            out += t.advance(dm, dt).unwrap();
            if t.contents().pressure_pa < p_end {
                // Interpolate the last step to the end pressure.
                let (p0, p1) = (before.contents().pressure_pa, t.contents().pressure_pa);
                let f = (p0 - p_end) / (p0 - p1);
                out -= dm * (1.0 - f);
                break;
            }
        }
        out
    }

    /// No wall heat: the usable gas and end temperature must match the project's
    /// isentropic blowdown (gas::tank::usable_gas, adiabatic bound), an independent
    /// path through the same equation of state (entropy instead of energy). The
    /// trapezoidal energy balance at 4000 steps is within 1e-4 of it.
    #[test]
    fn no_wall_heat_is_the_adiabatic_bound() {
        let (mut t, p_fill) = nitrogen(WallHeat::adiabatic());
        let p_end = 200.0 * 6_894.757 + 101_325.0;
        let fill = TankFill::by_pressure(Gas::Nitrogen, V, p_fill, 293.15);
        let bound = tank::usable_gas(&fill, p_end).unwrap();
        let out = drain_to(&mut t, p_end, 4000, 0.0);
        let rel = (out - bound.adiabatic.usable_mass_kg).abs() / bound.adiabatic.usable_mass_kg;
        assert!(
            rel < 1e-4,
            "usable {out} vs {} ({rel})",
            bound.adiabatic.usable_mass_kg
        );
        assert!((t.contents().temperature_k - bound.adiabatic.end_temperature_k).abs() < 0.1);
    }

    /// A very large coefficient and a very heavy wall hold the fill temperature:
    /// the isothermal bound of gas::tank::usable_gas.
    #[test]
    fn large_coefficient_is_the_isothermal_bound() {
        let wall = WallHeat {
            mass_kg: 1e6,
            specific_heat_j_kg_k: 900.0,
            coefficient_area_w_k: 1e9,
        };
        let (mut t, p_fill) = nitrogen(wall);
        let p_end = 200.0 * 6_894.757 + 101_325.0;
        let fill = TankFill::by_pressure(Gas::Nitrogen, V, p_fill, 293.15);
        let bound = tank::usable_gas(&fill, p_end).unwrap();
        let out = drain_to(&mut t, p_end, 4000, 1.0);
        let rel = (out - bound.isothermal.usable_mass_kg).abs() / bound.isothermal.usable_mass_kg;
        assert!(
            rel < 1e-4,
            "usable {out} vs {} ({rel})",
            bound.isothermal.usable_mass_kg
        );
        assert!((t.contents().temperature_k - 293.15).abs() < 0.01);
    }

    /// Energy balance: contents energy + wall energy + enthalpy carried out stays
    /// what it was at fill, to 1e-6 of the enthalpy carried out; and the booked
    /// contents energy equals the equation of state's at the solved temperature.
    #[test]
    fn energy_balance_closes() {
        let wall = WallHeat {
            mass_kg: 0.38,
            specific_heat_j_kg_k: ALUMINIUM_SPECIFIC_HEAT_J_KG_K,
            coefficient_area_w_k: 0.6,
        };
        let (mut t, _) = nitrogen(wall);
        let e0 = t.contents().energy_j + wall.capacity_j_k() * t.contents().wall_temperature_k;
        for _ in 0..500 {
            t.advance(t.contents().mass_kg * 2e-3, 0.05).unwrap();
        }
        let c = t.contents();
        let (h_out, q) = t.energy_books_j();
        let e1 = c.energy_j + wall.capacity_j_k() * c.wall_temperature_k + h_out;
        assert!(
            ((e1 - e0) / h_out).abs() < 1e-6,
            "residual {}",
            (e1 - e0) / h_out
        );
        assert!(q > 0.0, "the wall warms the cooling gas");
        let from_state = t.energy_from_state_j().unwrap();
        assert!(((from_state - c.energy_j) / h_out).abs() < 1e-6);
        assert!(c.temperature_k < c.wall_temperature_k);
    }

    /// Liquid CO2 under its vapour: drawing vapour boils liquid and cools the tank
    /// along the saturation line; pressure is the vapour pressure of the model at
    /// the solved temperature, and the liquid mass falls.
    #[test]
    fn co2_boils_off_and_cools() {
        let v = 0.5e-3;
        let m = 0.31;
        let mut t =
            TankInTime::new(Gas::CarbonDioxide, v, m, 293.15, WallHeat::adiabatic()).unwrap();
        let liq0 = t.contents().liquid_kg;
        assert!(liq0 > 0.0);
        for _ in 0..100 {
            t.advance(5e-4, 0.0).unwrap();
        }
        let c = t.contents();
        assert!(c.temperature_k < 290.0);
        assert!(c.liquid_kg < liq0 - 0.05 * 0.0);
        let sat = eos::saturation(Gas::CarbonDioxide, c.temperature_k).unwrap();
        assert!((c.pressure_pa - sat.pressure_pa).abs() < 1e-6 * sat.pressure_pa);
        // Adiabatic two-phase draw: compare with the project's isentropic walk at that pressure.
        let fill = TankFill::by_mass(Gas::CarbonDioxide, v, m, 293.15);
        let bound = tank::usable_gas(&fill, c.pressure_pa).unwrap();
        let rel = (0.05 - bound.adiabatic.usable_mass_kg).abs() / bound.adiabatic.usable_mass_kg;
        assert!(
            rel < 5e-3,
            "drawn 0.05 kg vs {} ({rel})",
            bound.adiabatic.usable_mass_kg
        );
    }
}
