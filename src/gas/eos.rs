//! Real-gas properties from the Peng–Robinson equation of state with a volume translation.
//!
//! Why this model: a cold-gas tank holds 200–300 bar of nitrogen, air, helium or argon, where the
//! ideal gas is 3–15 % off, or saturated CO2, which no ideal-gas model describes at all. A cubic
//! equation of state covers both with one closed-form, allocation-free model that is fast enough
//! to sit inside a blowdown integration or an optimiser loop.
//!
//! * Pressure: Peng & Robinson (1976), `p = RT/(v−b) − a·α(T)/(v² + 2bv − b²)`, with the 1976
//!   κ(ω) for ω ≤ 0.49 and the 1978 cubic κ(ω) above (no gas here needs it).
//! * Volume translation (Péneloux-style constant shift): the true molar volume is `v = v_PR − c`.
//!   A constant `c` leaves vapour pressures, fugacity ratios and entropies unchanged and shifts the
//!   enthalpy by `−p·c`. For the permanent gases `c` was fitted to the CoolProp 8.0.0 density at one
//!   state, 285 K and 250 bar (the middle of the 250–320 K, 200–300 bar storage band); for CO2 it was
//!   fitted to the CoolProp saturated-liquid density at 273.15 K. The tests check other states.
//! * Ideal-gas heat capacity: monatomic gases 5/2 R exactly; nitrogen and air from the NIST
//!   Chemistry WebBook Shomate coefficients (air as 78.12 % N2, 20.96 % O2, 0.92 % Ar by mole,
//!   composition from memory); CO2 from the rigid-rotor harmonic-oscillator sum with the
//!   fundamental frequencies 667.4 (twice), 1333 (Fermi-resonance mean) and 2349.2 cm⁻¹ (from
//!   memory). All three agree with CoolProp's ideal-gas cp within 0.03 % over 216–350 K.
//! * Entropy and enthalpy are ideal-gas terms plus the PR departure functions. Their zero is
//!   arbitrary (ideal gas at 298.15 K and 1 bar for every gas); only differences mean anything.
//!
//! Known limit (measured in the tests): near the CO2 critical point the PR liquid is too light
//! (−8 % at 293 K, −12 % at 300 K against CoolProp); [`density_relative_uncertainty`] carries this
//! into the tank inventory.

use super::species::{Gas, R_UNIVERSAL};
use thiserror::Error;

/// √2, used by the PR departure functions.
const SQRT2: f64 = std::f64::consts::SQRT_2;
/// Reference pressure of the ideal-gas entropy, Pa.
const P_REF_PA: f64 = 1.0e5;
/// Reference temperature of the ideal-gas enthalpy and entropy, K.
const T_REF_K: f64 = 298.15;
/// Second radiation constant hc/k, cm·K (CODATA 2018), turns wavenumbers into temperatures.
const HC_OVER_K_CM_K: f64 = 1.438_776_877;

/// What can go wrong while evaluating the equation of state.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum EosError {
    /// An input was NaN, infinite, zero or negative where a positive number is required.
    #[error("{what} must be a finite positive number, got {value}")]
    BadInput {
        /// Which input.
        what: &'static str,
        /// The value given.
        value: f64,
    },
    /// An input lies outside the range where the model is valid.
    #[error("{what} = {value} is outside the valid range {min} to {max}")]
    OutOfRange {
        /// Which input.
        what: &'static str,
        /// The value given.
        value: f64,
        /// Lowest valid value.
        min: f64,
        /// Highest valid value.
        max: f64,
    },
    /// The state is not physical in this model (e.g. a density beyond the co-volume limit).
    #[error("no physical state: {reason}")]
    NoPhysicalState {
        /// Why.
        reason: &'static str,
    },
    /// An iteration did not converge.
    #[error("{what} did not converge in {iterations} iterations")]
    NoConvergence {
        /// Which iteration.
        what: &'static str,
        /// Iterations spent.
        iterations: usize,
    },
}

/// Convergence settings of the iterations in this module.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EosTolerances {
    /// Fugacity balance |ln φ_liquid − ln φ_vapour| accepted as equal (dimensionless). 1e-11 is
    /// far below the 1e-6 relative pressure change the callers can see.
    pub fugacity_balance: f64,
    /// Relative change of the saturation temperature accepted as converged.
    pub temperature_rel: f64,
    /// Iteration cap of every loop; reaching it is reported as [`EosError::NoConvergence`].
    pub max_iterations: usize,
}

impl Default for EosTolerances {
    fn default() -> Self {
        EosTolerances {
            fugacity_balance: 1e-11,
            temperature_rel: 1e-11,
            max_iterations: 200,
        }
    }
}

/// Which branch of the equation of state a state is on.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Phase {
    /// Below the critical temperature, on the vapour branch.
    Vapour,
    /// Below the critical temperature, on the liquid branch.
    Liquid,
    /// At or above the critical temperature.
    Supercritical,
}

/// A thermodynamic state of one gas.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct State {
    /// Temperature, K.
    pub temperature_k: f64,
    /// Pressure, Pa absolute.
    pub pressure_pa: f64,
    /// Density, kg/m³.
    pub density_kg_m3: f64,
    /// Compressibility factor Z = p·v/(R·T) with the translated volume.
    pub compressibility: f64,
    /// Specific enthalpy, J/kg (arbitrary zero, see the module notes).
    pub enthalpy_j_kg: f64,
    /// Specific entropy, J/(kg·K) (arbitrary zero, see the module notes).
    pub entropy_j_kg_k: f64,
    /// Branch of the equation of state.
    pub phase: Phase,
}

impl State {
    /// Specific internal energy u = h − p/ρ, J/kg.
    pub fn internal_energy_j_kg(&self) -> f64 {
        self.enthalpy_j_kg - self.pressure_pa / self.density_kg_m3
    }
}

/// Saturated liquid and vapour in equilibrium at one temperature.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Saturation {
    /// Saturation temperature, K.
    pub temperature_k: f64,
    /// Vapour pressure, Pa absolute.
    pub pressure_pa: f64,
    /// Saturated liquid.
    pub liquid: State,
    /// Saturated vapour.
    pub vapour: State,
}

/// Ideal-gas heat-capacity model of one gas.
#[derive(Debug, Clone, Copy)]
enum IdealCp {
    /// cp = 5/2 R.
    Monatomic,
    /// NIST Shomate form, cp = A + B t + C t² + D t³ + E/t², t = T/1000 K, J/(mol·K).
    Shomate([f64; 5]),
    /// Linear molecule: cp/R = 7/2 + Σ Einstein terms of the vibrational temperatures, K.
    Vibrational([f64; 4]),
}

/// Shomate coefficients of N2, 100–500 K (NIST Chemistry WebBook, from memory; checked against CoolProp).
const SHOMATE_N2: [f64; 5] = [28.98641, 1.853978, -9.647459, 16.63537, 0.000117];
/// Shomate coefficients of O2, 100–700 K (NIST Chemistry WebBook, from memory; checked via air).
const SHOMATE_O2: [f64; 5] = [31.32234, -20.23531, 57.86644, -36.50624, -0.007374];
/// Ideal-gas cp of argon, J/(mol·K) (5/2 R).
const CP_AR: f64 = 2.5 * R_UNIVERSAL;

/// Peng–Robinson parameters of one gas.
#[derive(Debug, Clone, Copy)]
struct Pr {
    /// Critical temperature, K.
    tc: f64,
    /// Critical pressure, Pa.
    pc: f64,
    /// a at the critical point, Pa·m⁶/mol².
    a_c: f64,
    /// Co-volume, m³/mol.
    b: f64,
    /// κ of the α function.
    kappa: f64,
    /// Volume translation, m³/mol (v = v_PR − c).
    c: f64,
    /// Molar mass, kg/mol.
    m: f64,
    /// Ideal-gas heat capacity.
    cp: IdealCp,
}

/// Volume translation of each gas, m³/mol, and where it comes from.
fn translation_m3_mol(gas: Gas) -> f64 {
    match gas {
        // v_PR − v_CoolProp at 285 K, 250 bar (CoolProp 8.0.0 densities 289.8656, 271.9250,
        // 37.63516, 444.3506 kg/m³).
        Gas::Air => -3.640_209e-6,
        Gas::Nitrogen => -3.651_585e-6,
        Gas::Helium => -3.735_691e-6,
        Gas::Argon => -2.497_499e-6,
        // v_PR − v_CoolProp of the saturated liquid at 273.15 K (CoolProp 8.0.0: 927.4320 kg/m³).
        Gas::CarbonDioxide => 0.840_228e-6,
    }
}

fn pr(gas: Gas) -> Pr {
    let k = gas.constants();
    let (tc, pc, w) = (
        k.critical_temperature_k,
        k.critical_pressure_pa,
        k.acentric_factor,
    );
    let kappa = if w <= 0.49 {
        0.37464 + 1.54226 * w - 0.26992 * w * w
    } else {
        0.379642 + 1.48503 * w - 0.164423 * w * w + 0.016666 * w * w * w
    };
    let cp = match gas {
        Gas::Helium | Gas::Argon => IdealCp::Monatomic,
        Gas::Nitrogen => IdealCp::Shomate(SHOMATE_N2),
        Gas::Air => {
            let mut s = [0.0; 5];
            for (i, v) in s.iter_mut().enumerate() {
                *v = 0.7812 * SHOMATE_N2[i] + 0.2096 * SHOMATE_O2[i];
            }
            s[0] += 0.0092 * CP_AR;
            IdealCp::Shomate(s)
        }
        Gas::CarbonDioxide => IdealCp::Vibrational([
            HC_OVER_K_CM_K * 667.4,
            HC_OVER_K_CM_K * 667.4,
            HC_OVER_K_CM_K * 1333.0,
            HC_OVER_K_CM_K * 2349.2,
        ]),
    };
    Pr {
        tc,
        pc,
        a_c: 0.45724 * R_UNIVERSAL * R_UNIVERSAL * tc * tc / pc,
        b: 0.07780 * R_UNIVERSAL * tc / pc,
        kappa,
        c: translation_m3_mol(gas),
        m: k.molar_mass_kg_mol,
        cp,
    }
}

/// Ideal-gas molar enthalpy relative to 298.15 K, J/mol.
fn ideal_enthalpy(cp: IdealCp, t: f64) -> f64 {
    let h = |t: f64| match cp {
        IdealCp::Monatomic => 2.5 * R_UNIVERSAL * t,
        IdealCp::Shomate([a, b, c, d, e]) => {
            let x = t / 1000.0;
            1000.0 * (a * x + b * x * x / 2.0 + c * x.powi(3) / 3.0 + d * x.powi(4) / 4.0 - e / x)
        }
        IdealCp::Vibrational(th) => {
            let vib: f64 = th.iter().map(|&q| q / (q / t).exp_m1()).sum();
            R_UNIVERSAL * (3.5 * t + vib)
        }
    };
    h(t) - h(T_REF_K)
}

/// Ideal-gas molar entropy at 1 bar relative to 298.15 K, J/(mol·K).
fn ideal_entropy(cp: IdealCp, t: f64) -> f64 {
    let s = |t: f64| match cp {
        IdealCp::Monatomic => 2.5 * R_UNIVERSAL * t.ln(),
        IdealCp::Shomate([a, b, c, d, e]) => {
            let x = t / 1000.0;
            a * x.ln() + b * x + c * x * x / 2.0 + d * x.powi(3) / 3.0 - e / (2.0 * x * x)
        }
        IdealCp::Vibrational(th) => {
            let vib: f64 = th
                .iter()
                .map(|&q| {
                    let x = q / t;
                    x / x.exp_m1() - (-(-x).exp_m1()).ln()
                })
                .sum();
            R_UNIVERSAL * (3.5 * t.ln() + vib)
        }
    };
    s(t) - s(T_REF_K)
}

/// Ideal-gas molar heat capacity at constant pressure, J/(mol·K).
fn ideal_cp(cp: IdealCp, t: f64) -> f64 {
    match cp {
        IdealCp::Monatomic => 2.5 * R_UNIVERSAL,
        IdealCp::Shomate([a, b, c, d, e]) => {
            let x = t / 1000.0;
            a + b * x + c * x * x + d * x.powi(3) + e / (x * x)
        }
        IdealCp::Vibrational(th) => {
            let vib: f64 = th
                .iter()
                .map(|&q| {
                    let x = q / t;
                    let em = x.exp_m1();
                    x * x * (em + 1.0) / (em * em)
                })
                .sum();
            R_UNIVERSAL * (3.5 + vib)
        }
    }
}

impl Pr {
    /// a·α(T) and its temperature derivative.
    fn a_alpha(&self, t: f64) -> (f64, f64) {
        let sq = (t / self.tc).sqrt();
        let f = 1.0 + self.kappa * (1.0 - sq);
        let aa = self.a_c * f * f;
        let daa = -self.a_c * self.kappa * f / (t * self.tc).sqrt();
        (aa, daa)
    }

    /// PR pressure at the untranslated molar volume.
    fn pressure(&self, t: f64, v: f64) -> f64 {
        let (aa, _) = self.a_alpha(t);
        R_UNIVERSAL * t / (v - self.b) - aa / (v * v + 2.0 * self.b * v - self.b * self.b)
    }

    /// Real roots Z > B of the PR cubic at (T, p), ascending; returns (roots, count).
    fn z_roots(&self, t: f64, p: f64) -> ([f64; 3], usize) {
        let (aa, _) = self.a_alpha(t);
        let rt = R_UNIVERSAL * t;
        let a = aa * p / (rt * rt);
        let b = self.b * p / rt;
        let c2 = -(1.0 - b);
        let c1 = a - 3.0 * b * b - 2.0 * b;
        let c0 = -(a * b - b * b - b * b * b);
        let mut roots = [0.0; 3];
        let mut n = 0;
        let shift = -c2 / 3.0;
        let pp = c1 - c2 * c2 / 3.0;
        let qq = 2.0 * c2 * c2 * c2 / 27.0 - c2 * c1 / 3.0 + c0;
        let disc = qq * qq / 4.0 + pp * pp * pp / 27.0;
        let mut raw = [0.0; 3];
        let nraw;
        if disc > 0.0 {
            let sd = disc.sqrt();
            raw[0] = (-qq / 2.0 + sd).cbrt() + (-qq / 2.0 - sd).cbrt() + shift;
            nraw = 1;
        } else {
            let m = 2.0 * (-pp / 3.0).sqrt();
            let arg = if m > 0.0 {
                (3.0 * qq / (pp * m)).clamp(-1.0, 1.0)
            } else {
                0.0
            };
            let th = arg.acos() / 3.0;
            for (k, r) in raw.iter_mut().enumerate() {
                *r = m * (th - 2.0 * std::f64::consts::PI * k as f64 / 3.0).cos() + shift;
            }
            nraw = 3;
        }
        for &r0 in raw.iter().take(nraw) {
            // Two Newton steps clean up the rounding of the closed form.
            let mut z = r0;
            for _ in 0..2 {
                let f = ((z + c2) * z + c1) * z + c0;
                let d = (3.0 * z + 2.0 * c2) * z + c1;
                if d != 0.0 {
                    z -= f / d;
                }
            }
            if z > b && z.is_finite() {
                roots[n] = z;
                n += 1;
            }
        }
        roots[..n].sort_by(|x, y| x.total_cmp(y));
        // Merge duplicates produced by a double root.
        let mut m = 0;
        for i in 0..n {
            if m == 0 || (roots[i] - roots[m - 1]).abs() > 1e-12 * roots[i].abs() {
                roots[m] = roots[i];
                m += 1;
            }
        }
        (roots, m)
    }

    /// ln φ at (T, p) for compressibility root z.
    fn ln_phi(&self, t: f64, p: f64, z: f64) -> f64 {
        let (aa, _) = self.a_alpha(t);
        let rt = R_UNIVERSAL * t;
        let a = aa * p / (rt * rt);
        let b = self.b * p / rt;
        z - 1.0
            - (z - b).ln()
            - a / (2.0 * SQRT2 * b) * ((z + (1.0 + SQRT2) * b) / (z + (1.0 - SQRT2) * b)).ln()
    }

    /// Full state from temperature and untranslated molar volume.
    fn state(&self, t: f64, v_pr: f64, phase_hint: Option<Phase>) -> State {
        let p = self.pressure(t, v_pr);
        let (aa, daa) = self.a_alpha(t);
        let rt = R_UNIVERSAL * t;
        let z_pr = p * v_pr / rt;
        let log_ratio = ((v_pr + (1.0 + SQRT2) * self.b) / (v_pr + (1.0 - SQRT2) * self.b)).ln();
        let h_res = rt * (z_pr - 1.0) + (t * daa - aa) / (2.0 * SQRT2 * self.b) * log_ratio;
        // R ln(Z − B) = R ln(p (v − b) / RT).
        let s_res = R_UNIVERSAL * (p * (v_pr - self.b) / rt).ln()
            + daa / (2.0 * SQRT2 * self.b) * log_ratio;
        let h = ideal_enthalpy(self.cp, t) + h_res - p * self.c;
        let s = ideal_entropy(self.cp, t) - R_UNIVERSAL * (p / P_REF_PA).ln() + s_res;
        let v = v_pr - self.c;
        let phase = if t >= self.tc {
            Phase::Supercritical
        } else if let Some(ph) = phase_hint {
            ph
        } else {
            // The PR critical volume is Zc·R·Tc/pc with Zc = 0.307401.
            let vc = 0.307_401 * R_UNIVERSAL * self.tc / self.pc;
            if v_pr < vc {
                Phase::Liquid
            } else {
                Phase::Vapour
            }
        };
        State {
            temperature_k: t,
            pressure_pa: p,
            density_kg_m3: self.m / v,
            compressibility: p * v / rt,
            enthalpy_j_kg: h / self.m,
            entropy_j_kg_k: s / self.m,
            phase,
        }
    }

    /// Stable untranslated molar volume at (T, p) and its phase.
    fn stable_volume(&self, t: f64, p: f64) -> Result<(f64, Phase), EosError> {
        let (z, n) = self.z_roots(t, p);
        if n == 0 {
            return Err(EosError::NoPhysicalState {
                reason: "the cubic has no root above the co-volume",
            });
        }
        let rt = R_UNIVERSAL * t;
        if n == 1 {
            return Ok((z[0] * rt / p, self.classify(t, p, z[0])));
        }
        let (zl, zv) = (z[0], z[n - 1]);
        // Lower Gibbs energy wins; the translation shifts both by the same −p·c.
        let (zs, ph) = if self.ln_phi(t, p, zl) < self.ln_phi(t, p, zv) {
            (zl, Phase::Liquid)
        } else {
            (zv, Phase::Vapour)
        };
        let ph = if t >= self.tc {
            Phase::Supercritical
        } else {
            ph
        };
        Ok((zs * rt / p, ph))
    }

    /// Branch of a single real root.
    fn classify(&self, t: f64, p: f64, z: f64) -> Phase {
        if t >= self.tc {
            return Phase::Supercritical;
        }
        // Spinodal volumes bracket the PR critical volume Zc·R·Tc/pc (Zc = 0.307401), so a lone
        // root with a larger volume is on the vapour branch.
        let vc = 0.307_401 * R_UNIVERSAL * self.tc / self.pc;
        if z * R_UNIVERSAL * t / p > vc {
            Phase::Vapour
        } else {
            Phase::Liquid
        }
    }
}

fn check_positive(what: &'static str, value: f64) -> Result<f64, EosError> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(EosError::BadInput { what, value })
    }
}

/// Lowest temperature of the model for each gas, K: the triple point (CoolProp 8.0.0 `Ttriple`;
/// the lambda point for helium). Below it the fluid may be solid, which the model does not know.
pub fn triple_point_k(gas: Gas) -> f64 {
    match gas {
        Gas::Air => 59.75,
        Gas::Nitrogen => 63.151,
        Gas::CarbonDioxide => 216.592,
        Gas::Helium => 2.1768,
        Gas::Argon => 83.806,
    }
}

/// Highest temperature accepted, K. The ideal-gas heat capacities are checked to 350 K; the
/// fits behind them hold to 500 K or more, which is as far as the model is offered.
pub const MAX_TEMPERATURE_K: f64 = 500.0;
/// Highest pressure accepted, Pa (1000 bar: beyond any cold-gas tank).
pub const MAX_PRESSURE_PA: f64 = 1.0e8;

fn check_temperature(gas: Gas, t: f64) -> Result<f64, EosError> {
    let t = check_positive("temperature_k", t)?;
    let lo = triple_point_k(gas);
    if t < lo || t > MAX_TEMPERATURE_K {
        return Err(EosError::OutOfRange {
            what: "temperature_k",
            value: t,
            min: lo,
            max: MAX_TEMPERATURE_K,
        });
    }
    Ok(t)
}

fn check_pressure(p: f64) -> Result<f64, EosError> {
    let p = check_positive("pressure_pa", p)?;
    if p > MAX_PRESSURE_PA {
        return Err(EosError::OutOfRange {
            what: "pressure_pa",
            value: p,
            min: 0.0,
            max: MAX_PRESSURE_PA,
        });
    }
    Ok(p)
}

/// The stable state at pressure and temperature. Below the critical temperature the branch with
/// the lower Gibbs energy is returned.
pub fn state_tp(gas: Gas, pressure_pa: f64, temperature_k: f64) -> Result<State, EosError> {
    let t = check_temperature(gas, temperature_k)?;
    let p = check_pressure(pressure_pa)?;
    let m = pr(gas);
    let (v, ph) = m.stable_volume(t, p)?;
    Ok(m.state(t, v, Some(ph)))
}

/// The state at density and temperature (any branch, including inside the two-phase dome where
/// the single-phase state is metastable or unstable; the tank code never asks for those).
pub fn state_td(gas: Gas, density_kg_m3: f64, temperature_k: f64) -> Result<State, EosError> {
    let t = check_temperature(gas, temperature_k)?;
    let rho = check_positive("density_kg_m3", density_kg_m3)?;
    let m = pr(gas);
    let v_pr = m.m / rho + m.c;
    if v_pr <= m.b {
        return Err(EosError::NoPhysicalState {
            reason: "density beyond the co-volume limit of the equation of state",
        });
    }
    let s = m.state(t, v_pr, None);
    if s.pressure_pa <= 0.0 || !s.pressure_pa.is_finite() {
        return Err(EosError::NoPhysicalState {
            reason: "negative pressure (inside the spinodal region)",
        });
    }
    Ok(s)
}

/// Density at pressure and temperature, kg/m³ (the stable root).
pub fn density(gas: Gas, pressure_pa: f64, temperature_k: f64) -> Result<f64, EosError> {
    state_tp(gas, pressure_pa, temperature_k).map(|s| s.density_kg_m3)
}

/// Pressure at density and temperature, Pa absolute.
pub fn pressure(gas: Gas, density_kg_m3: f64, temperature_k: f64) -> Result<f64, EosError> {
    state_td(gas, density_kg_m3, temperature_k).map(|s| s.pressure_pa)
}

/// Compressibility factor Z = p/(ρ R_s T) at pressure and temperature.
pub fn compressibility(gas: Gas, pressure_pa: f64, temperature_k: f64) -> Result<f64, EosError> {
    state_tp(gas, pressure_pa, temperature_k).map(|s| s.compressibility)
}

/// Specific entropy at pressure and temperature, J/(kg·K) (arbitrary zero).
pub fn specific_entropy(gas: Gas, pressure_pa: f64, temperature_k: f64) -> Result<f64, EosError> {
    state_tp(gas, pressure_pa, temperature_k).map(|s| s.entropy_j_kg_k)
}

/// Specific enthalpy at pressure and temperature, J/kg (arbitrary zero).
pub fn specific_enthalpy(gas: Gas, pressure_pa: f64, temperature_k: f64) -> Result<f64, EosError> {
    state_tp(gas, pressure_pa, temperature_k).map(|s| s.enthalpy_j_kg)
}

/// Ideal-gas specific heat capacity cp⁰(T), J/(kg·K).
pub fn ideal_gas_cp(gas: Gas, temperature_k: f64) -> Result<f64, EosError> {
    let t = check_positive("temperature_k", temperature_k)?;
    let m = pr(gas);
    Ok(ideal_cp(m.cp, t) / m.m)
}

/// Temperatures where [`saturation`] is valid for a gas, K: the triple point up to 20 mK below
/// the critical point (closer to it the two PR roots merge in double precision).
pub fn saturation_range_k(gas: Gas) -> (f64, f64) {
    (
        triple_point_k(gas),
        gas.constants().critical_temperature_k - SATURATION_GAP_BELOW_TC_K,
    )
}

/// Gap below the critical temperature where [`saturation`] stops, K.
pub const SATURATION_GAP_BELOW_TC_K: f64 = 0.02;

/// Saturated liquid and vapour at a temperature, from equal PR fugacities.
pub fn saturation(gas: Gas, temperature_k: f64) -> Result<Saturation, EosError> {
    saturation_with(gas, temperature_k, &EosTolerances::default())
}

/// [`saturation`] with explicit tolerances.
pub fn saturation_with(
    gas: Gas,
    temperature_k: f64,
    tol: &EosTolerances,
) -> Result<Saturation, EosError> {
    let t = check_positive("temperature_k", temperature_k)?;
    let (lo, hi) = saturation_range_k(gas);
    if t < lo || t > hi {
        return Err(EosError::OutOfRange {
            what: "saturation temperature_k",
            value: t,
            min: lo,
            max: hi,
        });
    }
    let m = pr(gas);
    let w = gas.constants().acentric_factor;
    // Wilson's estimate as the first guess.
    let mut ln_p = m.pc.ln() + 5.373 * (1.0 + w) * (1.0 - m.tc / t);
    let (mut ln_lo, mut ln_hi) = (f64::NEG_INFINITY, m.pc.ln());
    let rt = R_UNIVERSAL * t;
    for _ in 0..tol.max_iterations {
        let p = ln_p.exp();
        let (z, n) = m.z_roots(t, p);
        let step_target;
        if n >= 2 {
            let (zl, zv) = (z[0], z[n - 1]);
            let g = m.ln_phi(t, p, zl) - m.ln_phi(t, p, zv);
            if g.abs() < tol.fugacity_balance {
                let liquid = m.state(t, zl * rt / p, Some(Phase::Liquid));
                let vapour = m.state(t, zv * rt / p, Some(Phase::Vapour));
                return Ok(Saturation {
                    temperature_k: t,
                    pressure_pa: p,
                    liquid,
                    vapour,
                });
            }
            // g decreases with ln p: positive means the pressure is still below saturation.
            if g > 0.0 {
                ln_lo = ln_lo.max(ln_p);
            } else {
                ln_hi = ln_hi.min(ln_p);
            }
            // Newton step: d(ln φ_l − ln φ_v)/d ln p = Z_l − Z_v.
            step_target = ln_p - g / (zl - zv);
        } else {
            // A single root: on the vapour side the pressure is too low, on the liquid side too high.
            if m.classify(t, p, z[0]) == Phase::Vapour {
                ln_lo = ln_lo.max(ln_p);
            } else {
                ln_hi = ln_hi.min(ln_p);
            }
            step_target = f64::NAN;
        }
        if (ln_hi - ln_lo) < 1e-13 {
            // Bracket closed to rounding: near Tc the fugacity balance cannot get smaller.
            ln_p = 0.5 * (ln_lo + ln_hi);
            let p = ln_p.exp();
            let (z, n) = m.z_roots(t, p);
            if n >= 2 {
                let liquid = m.state(t, z[0] * rt / p, Some(Phase::Liquid));
                let vapour = m.state(t, z[n - 1] * rt / p, Some(Phase::Vapour));
                return Ok(Saturation {
                    temperature_k: t,
                    pressure_pa: p,
                    liquid,
                    vapour,
                });
            }
        }
        ln_p = if step_target > ln_lo && step_target < ln_hi {
            step_target
        } else if ln_lo.is_finite() {
            0.5 * (ln_lo + ln_hi)
        } else {
            ln_hi - 1.0
        };
    }
    Err(EosError::NoConvergence {
        what: "saturation pressure",
        iterations: tol.max_iterations,
    })
}

/// Saturated liquid and vapour at a pressure (the inverse of [`saturation`]).
pub fn saturation_at_pressure(gas: Gas, pressure_pa: f64) -> Result<Saturation, EosError> {
    let tol = EosTolerances::default();
    let p = check_positive("pressure_pa", pressure_pa)?;
    let (t_lo, t_hi) = saturation_range_k(gas);
    let lo = saturation_with(gas, t_lo, &tol)?;
    let t_top = t_hi;
    let hi = saturation_with(gas, t_top, &tol)?;
    if p < lo.pressure_pa || p > hi.pressure_pa {
        return Err(EosError::OutOfRange {
            what: "saturation pressure_pa",
            value: p,
            min: lo.pressure_pa,
            max: hi.pressure_pa,
        });
    }
    // ln p is nearly linear in 1/T (Clausius–Clapeyron): regula falsi (Illinois) on that pair.
    let target = p.ln();
    let (mut x0, mut f0) = (1.0 / t_lo, lo.pressure_pa.ln() - target);
    let (mut x1, mut f1) = (1.0 / t_top, hi.pressure_pa.ln() - target);
    if f0 == 0.0 {
        return Ok(lo);
    }
    if f1 == 0.0 {
        return Ok(hi);
    }
    let mut side = 0;
    for _ in 0..tol.max_iterations {
        let x = x1 - f1 * (x1 - x0) / (f1 - f0);
        let s = saturation_with(gas, 1.0 / x, &tol)?;
        let f = s.pressure_pa.ln() - target;
        if f.abs() < 1e-13 || ((x - x1) / x).abs() < tol.temperature_rel {
            return Ok(s);
        }
        if f * f1 < 0.0 {
            x0 = x1;
            f0 = f1;
            side = 0;
        } else {
            side += 1;
            if side >= 2 {
                f0 *= 0.5;
            }
        }
        x1 = x;
        f1 = f;
    }
    Err(EosError::NoConvergence {
        what: "saturation temperature",
        iterations: tol.max_iterations,
    })
}

/// Relative density uncertainty of this model at a temperature and phase, from the comparison with
/// CoolProp 8.0.0 in the tests of this module (each number is the largest deviation found in the
/// checked band, rounded up; the tests assert that the model stays inside it).
///
/// Valid for 250–320 K and up to 300 bar for the permanent gases, and for CO2 from its triple point
/// to 350 K. `liquid` selects the liquid branch of CO2 (ignored for the other gases).
pub fn density_relative_uncertainty(gas: Gas, temperature_k: f64, liquid: bool) -> f64 {
    match gas {
        Gas::Air | Gas::Nitrogen => 0.005,
        Gas::Argon | Gas::Helium => 0.01,
        Gas::CarbonDioxide => {
            if liquid {
                if temperature_k <= 275.0 {
                    0.08
                } else {
                    0.15
                }
            } else if temperature_k < 300.0 {
                0.03
            } else {
                // Near-critical dense gas (e.g. 320 K, 100 bar is 4.8 % low).
                0.05
            }
        }
    }
}

#[cfg(test)]
mod tests {
    //! Reference values: CoolProp 8.0.0 (PyPI `CoolProp`, reference-quality Helmholtz equations of
    //! state: Lemmon et al. for air, Span et al. for nitrogen, Span & Wagner for CO2, Ortiz-Vega et
    //! al. for helium, Tegeler et al. for argon), `PropsSI` at the states named.
    use super::*;

    const ALL: [Gas; 5] = Gas::ALL;

    /// (T K, p bar, CoolProp density kg/m³) for each gas at the storage states.
    fn reference_densities(gas: Gas) -> [(f64, f64, f64); 8] {
        match gas {
            Gas::Air => [
                (300.0, 1.0, 1.1616),
                (300.0, 50.0, 58.6036),
                (300.0, 200.0, 225.031),
                (300.0, 300.0, 314.308),
                (250.0, 200.0, 287.026),
                (250.0, 300.0, 390.824),
                (320.0, 200.0, 208.012),
                (320.0, 300.0, 292.011),
            ],
            Gas::Nitrogen => [
                (300.0, 1.0, 1.12328),
                (300.0, 50.0, 56.3445),
                (300.0, 200.0, 212.537),
                (300.0, 300.0, 294.781),
                (250.0, 200.0, 268.096),
                (250.0, 300.0, 362.758),
                (320.0, 200.0, 197.001),
                (320.0, 300.0, 274.692),
            ],
            Gas::Helium => [
                (300.0, 1.0, 0.160391),
                (300.0, 50.0, 7.83846),
                (300.0, 200.0, 29.3684),
                (300.0, 300.0, 42.3108),
                (250.0, 200.0, 34.5987),
                (250.0, 300.0, 49.4636),
                (320.0, 200.0, 27.6943),
                (320.0, 300.0, 39.9978),
            ],
            Gas::Argon => [
                (300.0, 1.0, 1.60251),
                (300.0, 50.0, 82.2749),
                (300.0, 200.0, 335.842),
                (300.0, 300.0, 482.579),
                (250.0, 200.0, 447.645),
                (250.0, 300.0, 626.317),
                (320.0, 200.0, 307.377),
                (320.0, 300.0, 443.028),
            ],
            // 300 K at 1 and 50 bar is vapour; 200 and 300 bar at 250 and 300 K compressed liquid.
            Gas::CarbonDioxide => [
                (300.0, 1.0, 1.77303),
                (300.0, 50.0, 128.398),
                (300.0, 200.0, 905.567),
                (300.0, 300.0, 959.699),
                (250.0, 200.0, 1105.47),
                (250.0, 300.0, 1129.3),
                (320.0, 200.0, 802.331),
                (320.0, 300.0, 883.002),
            ],
        }
    }

    /// Permanent gases: within 1 % of CoolProp at every storage state (largest seen: argon 0.98 %
    /// at 250 K, 300 bar); 1 % is what a tank inventory can carry without changing a design decision,
    /// and it is also the uncertainty the module publishes, which must cover what is measured here.
    #[test]
    fn permanent_gas_densities_match_reference() {
        for gas in [Gas::Air, Gas::Nitrogen, Gas::Helium, Gas::Argon] {
            for (t, p_bar, rho_ref) in reference_densities(gas) {
                let rho = density(gas, p_bar * 1e5, t).unwrap();
                let err = rho / rho_ref - 1.0;
                let claimed = density_relative_uncertainty(gas, t, false);
                assert!(
                    err.abs() <= claimed,
                    "{gas:?} {t} K {p_bar} bar: {rho} vs {rho_ref} ({:.3} %) beyond claimed {claimed}",
                    err * 100.0
                );
                assert!(err.abs() < 0.01);
            }
        }
    }

    /// The translation was fitted at 285 K, 250 bar: the density there must reproduce the
    /// CoolProp 8.0.0 value it was fitted to (1e-5: the fit constants carry 7 digits).
    #[test]
    fn translation_reproduces_its_fit_state() {
        for (gas, rho_ref) in [
            (Gas::Air, 289.8656),
            (Gas::Nitrogen, 271.9250),
            (Gas::Helium, 37.635_16),
            (Gas::Argon, 444.3506),
        ] {
            let rho = density(gas, 250e5, 285.0).unwrap();
            assert!((rho / rho_ref - 1.0).abs() < 1e-5, "{gas:?}: {rho}");
        }
        let sat = saturation(Gas::CarbonDioxide, 273.15).unwrap();
        assert!((sat.liquid.density_kg_m3 / 927.432 - 1.0).abs() < 1e-5);
    }

    /// Plain PR (c = 0) is 2.5–4.5 % off at 300 bar, 300 K (checked against CoolProp 8.0.0);
    /// the translation must cut that error at least in half for every permanent gas.
    #[test]
    fn translation_beats_plain_peng_robinson_at_300_bar() {
        for gas in [Gas::Air, Gas::Nitrogen, Gas::Helium, Gas::Argon] {
            let (t, p_bar, rho_ref) = reference_densities(gas)[3];
            let m = pr(gas);
            let (v_pr, _) = m.stable_volume(t, p_bar * 1e5).unwrap();
            let plain = (m.m / v_pr / rho_ref - 1.0).abs();
            let translated = (density(gas, p_bar * 1e5, t).unwrap() / rho_ref - 1.0).abs();
            assert!(plain > 0.02, "{gas:?}: plain PR already {plain}");
            assert!(
                translated < 0.5 * plain,
                "{gas:?}: {translated} vs plain {plain}"
            );
        }
    }

    /// CO2 single-phase states: vapour and supercritical within 3 % (largest seen 2.7 % at 300 K,
    /// 50 bar, near saturation); compressed liquid within the published liquid uncertainty
    /// (8 % at 250 K, 15 % at 300 K, where PR's liquid is known to be too compressible).
    #[test]
    fn co2_single_phase_densities_match_reference() {
        let gas = Gas::CarbonDioxide;
        let extra = [
            (320.0, 100.0, 448.277),
            (310.0, 80.0, 327.712),
            (350.0, 300.0, 758.984),
            (280.0, 40.0, 113.079),
        ];
        for (t, p_bar, rho_ref) in reference_densities(gas).into_iter().chain(extra) {
            let st = state_tp(gas, p_bar * 1e5, t).unwrap();
            let err = st.density_kg_m3 / rho_ref - 1.0;
            let claimed = density_relative_uncertainty(gas, t, st.phase == Phase::Liquid);
            assert!(
                err.abs() <= claimed,
                "CO2 {t} K {p_bar} bar: {} vs {rho_ref} ({:.2} %), claimed {claimed}",
                st.density_kg_m3,
                err * 100.0
            );
        }
        // Phase picks: 50 bar at 300 K is vapour, 200 bar at 300 K liquid, 320 K supercritical.
        assert_eq!(state_tp(gas, 50e5, 300.0).unwrap().phase, Phase::Vapour);
        assert_eq!(state_tp(gas, 200e5, 300.0).unwrap().phase, Phase::Liquid);
        assert_eq!(
            state_tp(gas, 200e5, 320.0).unwrap().phase,
            Phase::Supercritical
        );
    }

    /// (T K, psat Pa, rho_l, rho_v kg/m³, s_v − s_l J/(kg K), h_v − h_l J/kg), CoolProp 8.0.0.
    const CO2_SAT: [(f64, f64, f64, f64, f64, f64); 5] = [
        (220.0, 599_130.0, 1166.14, 15.8174, 1567.77, 344_910.0),
        (250.0, 1.785_04e6, 1045.97, 46.644, 1157.33, 289_334.0),
        (273.15, 3.485_14e6, 927.432, 97.6473, 845.299, 230_893.0),
        (293.15, 5.729_05e6, 773.387, 194.202, 518.495, 151_997.0),
        (300.0, 6.713_08e6, 679.239, 268.584, 345.676, 103_703.0),
    ];

    /// Vapour pressure within 1 % (PR with the CO2 acentric factor is built to reproduce it; seen
    /// ≤ 0.8 %), vapour density within 3 % (seen ≤ 2.2 %), liquid density within the published
    /// uncertainty: 8 % to 275 K (seen 6.8 % at 220 K), 15 % above (seen −12.4 % at 300 K — PR's
    /// critical volume is 12 % too large for CO2, so no constant shift can fix both ends).
    /// Latent entropy and enthalpy within 6 % at 220–273 K (they drive the boil-off in the
    /// adiabatic blowdown), 15 % at 293–300 K where both shrink towards zero at Tc (seen −13.5 %
    /// for the latent entropy at 300 K).
    #[test]
    fn co2_saturation_matches_reference() {
        let gas = Gas::CarbonDioxide;
        for (t, p_ref, rl_ref, rv_ref, ds_ref, dh_ref) in CO2_SAT {
            let s = saturation(gas, t).unwrap();
            let ep = s.pressure_pa / p_ref - 1.0;
            let el = s.liquid.density_kg_m3 / rl_ref - 1.0;
            let ev = s.vapour.density_kg_m3 / rv_ref - 1.0;
            let ds = (s.vapour.entropy_j_kg_k - s.liquid.entropy_j_kg_k) / ds_ref - 1.0;
            let dh = (s.vapour.enthalpy_j_kg - s.liquid.enthalpy_j_kg) / dh_ref - 1.0;
            let latent_tol = if t < 280.0 { 0.06 } else { 0.15 };
            assert!(ep.abs() < 0.01, "{t} K psat {ep}");
            assert!(
                ev.abs() <= density_relative_uncertainty(gas, t, false),
                "{t} K rho_v {ev}"
            );
            assert!(
                el.abs() <= density_relative_uncertainty(gas, t, true),
                "{t} K rho_l {el}"
            );
            assert!(ds.abs() < latent_tol, "{t} K latent entropy {ds}");
            assert!(dh.abs() < latent_tol, "{t} K latent enthalpy {dh}");
            // Fugacities are equal, so the Gibbs energies h − T s of both phases are equal.
            let gl = s.liquid.enthalpy_j_kg - t * s.liquid.entropy_j_kg_k;
            let gv = s.vapour.enthalpy_j_kg - t * s.vapour.entropy_j_kg_k;
            assert!((gl - gv).abs() < 1e-6 * dh_ref, "{t} K Gibbs {gl} vs {gv}");
        }
    }

    /// Inverse saturation: CoolProp 8.0.0 gives Tsat(20 bar) = 253.647 K and Tsat(50 bar) =
    /// 287.434 K. The model's vapour pressure is within 1 %, which moves Tsat by about 0.2 K;
    /// allow 0.5 K. The round trip T → psat → T must close to 1e-7 K.
    #[test]
    fn co2_saturation_temperature_at_pressure() {
        let gas = Gas::CarbonDioxide;
        for (p, t_ref) in [(20e5, 253.647), (50e5, 287.434)] {
            let s = saturation_at_pressure(gas, p).unwrap();
            assert!(
                (s.temperature_k - t_ref).abs() < 0.5,
                "{p}: {}",
                s.temperature_k
            );
            assert!((s.pressure_pa / p - 1.0).abs() < 1e-9);
        }
        for t in [217.0, 240.0, 280.0, 303.0] {
            let p = saturation(gas, t).unwrap().pressure_pa;
            let back = saturation_at_pressure(gas, p).unwrap().temperature_k;
            assert!((back - t).abs() < 1e-7, "{t} -> {back}");
        }
    }

    /// Entropy and enthalpy differences the blowdown uses, against CoolProp 8.0.0:
    /// s(300 K, 300 bar) − s(300 K, 1 bar) (the pressure departure), s(300 K) − s(250 K) at 1 bar
    /// (the ideal-gas cp), h(300 K, 300 bar) − h(300 K, 1 bar). Tolerance 3 % of the entropy
    /// departure and 0.5 % of the ideal-gas term; the enthalpy departure within 8 % for the
    /// diatomic gases and argon (it is a small difference of large terms) and 25 % for helium
    /// (see below).
    #[test]
    fn entropy_and_enthalpy_differences_match_reference() {
        // (gas, Δs pressure, Δs temperature, Δh pressure)
        let cases = [
            (Gas::Nitrogen, -1835.39, 189.876, -38_385.0),
            (Gas::Air, -1781.51, 183.371, -42_176.2),
            (Gas::Helium, -11_819.4, 946.838, 95_597.4),
            (Gas::Argon, -1308.27, 95.1414, -42_501.7),
        ];
        for (gas, dsp_ref, dst_ref, dhp_ref) in cases {
            let s_hi = specific_entropy(gas, 300e5, 300.0).unwrap();
            let s_lo = specific_entropy(gas, 1e5, 300.0).unwrap();
            let s_cold = specific_entropy(gas, 1e5, 250.0).unwrap();
            let dh = specific_enthalpy(gas, 300e5, 300.0).unwrap()
                - specific_enthalpy(gas, 1e5, 300.0).unwrap();
            let e1 = (s_hi - s_lo) / dsp_ref - 1.0;
            let e2 = (s_lo - s_cold) / dst_ref - 1.0;
            let e3 = dh / dhp_ref - 1.0;
            // Helium is the known weak spot: PR's α(T) grows with T for ω < 0, which makes the
            // enthalpy departure 24 % small (72 vs 96 kJ/kg over 300 bar, the size of a 4.6 K
            // error in a throttling temperature). Densities and entropies are unaffected.
            let tol_h = if gas == Gas::Helium { 0.25 } else { 0.08 };
            assert!(e1.abs() < 0.03, "{gas:?} Δs(p) {e1}");
            assert!(e2.abs() < 0.005, "{gas:?} Δs(T) {e2}");
            assert!(e3.abs() < tol_h, "{gas:?} Δh(p) {e3}");
        }
        // CO2: s(300 K, 1 bar) − s_liquid(273.15 K) = 1744.59 J/(kg K); s_v(293.15) − s_v(250) =
        // −257.858 and s_l(293.15) − s_l(250) = 380.981 J/(kg K). Within 3 % for the first (a
        // gas-to-liquid span dominated by latent heat) and 15 % for the other two, which are
        // differences along the saturation line where PR's near-critical error shows.
        let gas = Gas::CarbonDioxide;
        let s273 = saturation(gas, 273.15).unwrap();
        let s250 = saturation(gas, 250.0).unwrap();
        let s293 = saturation(gas, 293.15).unwrap();
        let d1 = specific_entropy(gas, 1e5, 300.0).unwrap() - s273.liquid.entropy_j_kg_k;
        let d2 = s293.vapour.entropy_j_kg_k - s250.vapour.entropy_j_kg_k;
        let d3 = s293.liquid.entropy_j_kg_k - s250.liquid.entropy_j_kg_k;
        assert!((d1 / 1744.59 - 1.0).abs() < 0.03, "{d1}");
        assert!((d2 / -257.858 - 1.0).abs() < 0.15, "{d2}");
        assert!((d3 / 380.981 - 1.0).abs() < 0.15, "{d3}");
    }

    /// Ideal-gas cp against CoolProp 8.0.0 `Cp0mass` at 230 and 300 K: 0.1 % (the Shomate and
    /// vibrational forms agree to 0.03 %; 0.1 % leaves room for the molar-mass rounding).
    /// Monatomic gases must equal 5/2 R/M exactly.
    #[test]
    fn ideal_gas_heat_capacity_matches_reference() {
        let cases = [
            (Gas::Air, 1004.776, 1002.700),
            (Gas::Nitrogen, 1039.719, 1039.124),
            (Gas::CarbonDioxide, 845.846, 769.010),
            (Gas::Helium, 5193.159, 5193.159),
            (Gas::Argon, 520.3333, 520.3333),
        ];
        for (gas, cp300, cp230) in cases {
            let a = ideal_gas_cp(gas, 300.0).unwrap();
            let b = ideal_gas_cp(gas, 230.0).unwrap();
            assert!((a / cp300 - 1.0).abs() < 1e-3, "{gas:?} {a}");
            assert!((b / cp230 - 1.0).abs() < 1e-3, "{gas:?} {b}");
        }
        let m = Gas::Helium.constants().molar_mass_kg_mol;
        assert_eq!(
            ideal_gas_cp(Gas::Helium, 123.0).unwrap(),
            2.5 * R_UNIVERSAL / m
        );
    }

    /// Ideal-gas limit: at 1 kPa the density equals pM/(RT) within 1e-4 for every gas
    /// (the second virial term is of order 1e-5 there).
    #[test]
    fn ideal_gas_limit_at_low_pressure() {
        for gas in ALL {
            let m = gas.constants().molar_mass_kg_mol;
            for t in [250.0, 300.0, 350.0] {
                let rho = density(gas, 1e3, t).unwrap();
                let ideal = 1e3 * m / (R_UNIVERSAL * t);
                assert!(
                    (rho / ideal - 1.0).abs() < 1e-4,
                    "{gas:?} {t}: {rho} vs {ideal}"
                );
            }
        }
    }

    /// pressure(density(p, T), T) returns p (1e-9 relative: one cubic root polish).
    #[test]
    fn pressure_and_density_are_inverse() {
        for gas in ALL {
            for (t, p) in [(250.0, 200e5), (300.0, 300e5), (320.0, 5e5), (300.0, 2e5)] {
                let rho = density(gas, p, t).unwrap();
                let back = pressure(gas, rho, t).unwrap();
                assert!((back / p - 1.0).abs() < 1e-9, "{gas:?} {t} {p}: {back}");
            }
        }
    }

    /// Thermodynamic consistency: (∂h/∂T)_p from the model divided by T equals (∂s/∂T)_p, both
    /// by central differences (2e-5 relative: the truncation error of a 0.01 K step).
    #[test]
    fn enthalpy_and_entropy_are_consistent() {
        for gas in ALL {
            let (p, t, dt) = (150e5, 290.0, 0.01);
            let dh = specific_enthalpy(gas, p, t + dt).unwrap()
                - specific_enthalpy(gas, p, t - dt).unwrap();
            let ds = specific_entropy(gas, p, t + dt).unwrap()
                - specific_entropy(gas, p, t - dt).unwrap();
            assert!((dh / t / ds - 1.0).abs() < 2e-5, "{gas:?}: {dh} {ds}");
        }
    }

    #[test]
    fn bad_inputs_are_errors() {
        let g = Gas::Nitrogen;
        assert!(matches!(
            density(g, f64::NAN, 300.0),
            Err(EosError::BadInput { .. })
        ));
        assert!(matches!(
            density(g, -1.0, 300.0),
            Err(EosError::BadInput { .. })
        ));
        assert!(matches!(
            density(g, 1e5, 0.0),
            Err(EosError::BadInput { .. })
        ));
        assert!(matches!(
            density(g, 1e5, 20.0),
            Err(EosError::OutOfRange { .. })
        ));
        assert!(matches!(
            pressure(g, f64::INFINITY, 300.0),
            Err(EosError::BadInput { .. })
        ));
        assert!(matches!(
            saturation(Gas::CarbonDioxide, 310.0),
            Err(EosError::OutOfRange { .. })
        ));
        assert!(matches!(
            saturation(Gas::CarbonDioxide, 200.0),
            Err(EosError::OutOfRange { .. })
        ));
        assert!(matches!(
            saturation_at_pressure(Gas::CarbonDioxide, 100e5),
            Err(EosError::OutOfRange { .. })
        ));
        // Denser than the co-volume allows.
        assert!(matches!(
            pressure(g, 1e5, 300.0),
            Err(EosError::NoPhysicalState { .. })
        ));
    }
}
