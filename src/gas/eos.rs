//! Real-gas properties from the GERG-2008 reference equation of state.
//!
//! Why this model: a cold-gas tank holds 200–300 bar of nitrogen, air, helium or argon, where the
//! ideal gas is 3–15 % off, or saturated CO2, which no ideal-gas model describes at all. GERG-2008
//! (Kunz & Wagner 2012, also AGA Report No. 8 Part 2) is a reference-quality multiparameter
//! Helmholtz equation of state for natural-gas components, among them nitrogen, oxygen, CO2,
//! helium and argon. The `aga8` crate (0.6.1) is a port of the public-domain NIST reference
//! implementation; this module calls it and adds what a tank model needs: the stable root at a
//! pressure and temperature, phase equilibrium and mass-based units.
//!
//! * Pure fluids: nitrogen, CO2, helium and argon use the GERG-2008 pure-fluid equations.
//! * Air is the GERG-2008 mixture of nitrogen 0.7812, oxygen 0.2096 and argon 0.0092 by mole
//!   ([`AIR_COMPOSITION`], the dry-air composition of Lemmon et al. 2000). Its condensation
//!   (a dew and a bubble line, not one saturation line) is not computed: [`saturation`] refuses
//!   air, and states below its critical temperature are the lower-Gibbs-energy root of the
//!   mixture equation.
//! * The state at pressure and temperature is the root of `p(ρ, T) = p` with the lower molar Gibbs
//!   energy when a liquid-like and a vapour-like root both exist.
//! * Saturation (CO2; nitrogen and argon when a blowdown cools them far enough) is where the two
//!   roots have equal pressure and equal Gibbs energy, from the same equation.
//! * Entropy and enthalpy have the zero of the GERG-2008 reference implementation; only
//!   differences mean anything.
//!
//! Validity (GERG-2008): normal range 90–450 K up to 35 MPa, extended range 60–700 K up to
//! 70 MPa. States outside the extended range (or below a gas's triple point) are refused with
//! [`EosError::OutOfRange`]; [`validity`] says whether a state is in the normal range, so callers
//! can warn.
//!
//! The measured deviations from an independent reference library (CoolProp 8.0.0, whose
//! pure-fluid equations are the individual reference equations of each gas) are in the tests of
//! this module and published per gas and per quantity by [`model_uncertainty`].

use super::species::Gas;
use aga8::composition::Composition;
use aga8::gerg2008::Gerg2008;
use std::cell::RefCell;
use thiserror::Error;

/// Gas constant of the GERG-2008 reference implementation, J/(mol·K). The equation's own value
/// (8.314 472) is used inside it so that its ideal-gas limit is exact.
const R_GERG: f64 = 8.314_472;

/// Mole fractions of the air model: (nitrogen, oxygen, argon).
pub const AIR_COMPOSITION: (f64, f64, f64) = (0.7812, 0.2096, 0.0092);

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
    /// The state is not physical in this model (e.g. a negative pressure).
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
    /// Saturation asked of a mixture (air), which has no single saturation line.
    #[error(
        "{gas} is a mixture: it has a dew and a bubble line, which this model does not compute"
    )]
    NotPureFluid {
        /// The gas.
        gas: &'static str,
    },
}

/// Convergence settings of the iterations in this module.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EosTolerances {
    /// Gibbs-energy balance |g_liquid − g_vapour|/(R·T) accepted as equal (dimensionless; the
    /// same number as a fugacity balance |ln φ_liquid − ln φ_vapour|). 1e-11 is far below the
    /// 1e-6 relative pressure change the callers can see.
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
    /// Below the critical temperature, less dense than the critical density.
    Vapour,
    /// Below the critical temperature, denser than the critical density.
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
    /// Compressibility factor Z = p/(ρ·R·T).
    pub compressibility: f64,
    /// Specific enthalpy, J/kg (arbitrary zero, see the module notes).
    pub enthalpy_j_kg: f64,
    /// Specific entropy, J/(kg·K) (arbitrary zero, see the module notes).
    pub entropy_j_kg_k: f64,
    /// Branch of the equation of state.
    pub phase: Phase,
    /// Speed of sound, m/s.
    pub speed_of_sound_m_s: f64,
    /// Isentropic exponent κ = (ρ/p)·(∂p/∂ρ)_s = w²ρ/p (equals cp/cv for an ideal gas).
    pub isentropic_exponent: f64,
    /// Isobaric specific heat capacity, J/(kg·K).
    pub cp_j_kg_k: f64,
    /// Isochoric specific heat capacity, J/(kg·K).
    pub cv_j_kg_k: f64,
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

fn composition(gas: Gas) -> Composition {
    let (n2, o2, ar) = AIR_COMPOSITION;
    match gas {
        Gas::Air => Composition {
            nitrogen: n2,
            oxygen: o2,
            argon: ar,
            ..Default::default()
        },
        Gas::Nitrogen => Composition {
            nitrogen: 1.0,
            ..Default::default()
        },
        Gas::CarbonDioxide => Composition {
            carbon_dioxide: 1.0,
            ..Default::default()
        },
        Gas::Helium => Composition {
            helium: 1.0,
            ..Default::default()
        },
        Gas::Argon => Composition {
            argon: 1.0,
            ..Default::default()
        },
    }
}

pub(crate) fn gas_index(gas: Gas) -> usize {
    match gas {
        Gas::Air => 0,
        Gas::Nitrogen => 1,
        Gas::CarbonDioxide => 2,
        Gas::Helium => 3,
        Gas::Argon => 4,
    }
}

thread_local! {
    /// One configured equation per gas and thread (the equation caches its temperature terms,
    /// so keeping it between calls saves work along an isotherm).
    static MODELS: RefCell<Option<Vec<Gerg2008>>> = const { RefCell::new(None) };
}

/// The equation's raw output at one temperature and molar density.
#[derive(Debug, Clone, Copy)]
struct Raw {
    t: f64,
    /// mol/l.
    d: f64,
    /// kPa.
    p: f64,
    /// kPa/(mol/l).
    dp_dd: f64,
    z: f64,
    /// J/mol.
    h: f64,
    /// J/(mol K).
    s: f64,
    /// J/mol.
    g: f64,
    w: f64,
    kappa: f64,
    cp: f64,
    cv: f64,
    /// g/mol.
    mm: f64,
}

fn raw(gas: Gas, t: f64, d: f64) -> Raw {
    MODELS.with_borrow_mut(|models| {
        let list = models.get_or_insert_with(|| {
            Gas::ALL
                .iter()
                .map(|&g| {
                    let mut m = Gerg2008::new();
                    // The compositions above are fixed and sum to one, which is all the
                    // crate checks (tested in `every_composition_is_accepted`).
                    let _ = m.set_composition(&composition(g));
                    m.molar_mass();
                    m
                })
                .collect()
        });
        let m = &mut list[gas_index(gas)];
        m.t = t;
        m.d = d;
        let p = m.properties();
        Raw {
            t,
            d,
            p,
            dp_dd: m.dp_dd,
            z: m.z,
            h: m.h,
            s: m.s,
            g: m.g,
            w: m.w,
            kappa: m.kappa,
            cp: m.cp,
            cv: m.cv,
            mm: m.mm,
        }
    })
}

/// Critical density of the equation, mol/l (GERG-2008 reducing densities; air: the molar
/// average of its components' critical volumes, as the equation's own pseudo-critical point).
fn critical_density_mol_l(gas: Gas) -> f64 {
    const N2: f64 = 11.1839;
    const O2: f64 = 13.63;
    const AR: f64 = 13.407_429_659;
    match gas {
        Gas::Air => {
            let (a, b, c) = AIR_COMPOSITION;
            1.0 / (a / N2 + b / O2 + c / AR)
        }
        Gas::Nitrogen => N2,
        Gas::CarbonDioxide => 10.624_978_698,
        Gas::Helium => 17.399,
        Gas::Argon => AR,
    }
}

/// Critical temperature of the equation, K (air: its pseudo-pure critical temperature from
/// [`Gas::constants`], used only to name the phase).
fn tc(gas: Gas) -> f64 {
    gas.constants().critical_temperature_k
}

fn phase_of(gas: Gas, r: &Raw) -> Phase {
    if r.t >= tc(gas) {
        Phase::Supercritical
    } else if r.d > critical_density_mol_l(gas) {
        Phase::Liquid
    } else {
        Phase::Vapour
    }
}

fn to_state(gas: Gas, r: &Raw, phase: Option<Phase>) -> State {
    let kg_per_mol = r.mm * 1e-3;
    State {
        temperature_k: r.t,
        pressure_pa: r.p * 1e3,
        density_kg_m3: r.d * r.mm,
        compressibility: r.z,
        enthalpy_j_kg: r.h / kg_per_mol,
        entropy_j_kg_k: r.s / kg_per_mol,
        phase: phase.unwrap_or_else(|| phase_of(gas, r)),
        speed_of_sound_m_s: r.w,
        isentropic_exponent: r.kappa,
        cp_j_kg_k: r.cp / kg_per_mol,
        cv_j_kg_k: r.cv / kg_per_mol,
    }
}

/// Solve `p(ρ, T) = p` for the molar density from `d0` by Newton's method in (ln ρ, ln p) with
/// a step-halving line search that keeps (∂p/∂ρ)_T > 0 and p > 0: from a vapour-like start it
/// stays on the vapour branch, from a liquid-like start on the liquid branch. None when the
/// branch holds no root at this pressure (past its spinodal).
fn solve_branch(gas: Gas, t: f64, p_kpa: f64, d0: f64) -> Option<Raw> {
    let target = p_kpa.ln();
    let ok = |r: &Raw| r.dp_dd > 0.0 && r.p > 0.0 && r.p.is_finite();
    let mut r = raw(gas, t, d0);
    if !ok(&r) {
        return None;
    }
    for _ in 0..100 {
        let f = r.p.ln() - target;
        if f.abs() < 1e-14 {
            return Some(r);
        }
        let slope = r.d * r.dp_dd / r.p;
        let mut step = (-f / slope).clamp(-1.0, 1.0);
        let mut accepted = None;
        for _ in 0..40 {
            let cand = raw(gas, t, r.d * step.exp());
            if ok(&cand) && (cand.p.ln() - target).abs() < f.abs() {
                accepted = Some(cand);
                break;
            }
            step *= 0.5;
        }
        match accepted {
            Some(c) => {
                let done = (c.d / r.d - 1.0).abs() < 1e-15;
                r = c;
                if done {
                    return Some(r);
                }
            }
            // No step lowers the residual: a residual of rounding size is a root, anything
            // larger means the branch ends (spinodal) before this pressure.
            None => return (f.abs() < 1e-11).then_some(r),
        }
    }
    None
}

/// Vapour-like start: the ideal-gas density.
fn vapour_start(t: f64, p_kpa: f64) -> f64 {
    p_kpa / (R_GERG * t)
}

/// Liquid-like start: three times the critical density (the reference implementation's choice),
/// denser than any liquid in the valid range.
fn liquid_start(gas: Gas) -> f64 {
    3.0 * critical_density_mol_l(gas)
}

fn stable_root(gas: Gas, t: f64, p_kpa: f64) -> Result<Raw, EosError> {
    let dc = critical_density_mol_l(gas);
    let vap = solve_branch(gas, t, p_kpa, vapour_start(t, p_kpa));
    if t >= tc(gas) {
        return vap
            .or_else(|| solve_branch(gas, t, p_kpa, liquid_start(gas)))
            .ok_or(EosError::NoConvergence {
                what: "density at pressure and temperature",
                iterations: 100,
            });
    }
    let vap = vap.filter(|r| r.d < dc);
    let liq = solve_branch(gas, t, p_kpa, liquid_start(gas)).filter(|r| r.d > dc);
    match (vap, liq) {
        // Both branches hold a root: the stable one has the lower Gibbs energy; an exact tie
        // (only at the saturation pressure itself) goes to the vapour.
        (Some(v), Some(l)) => Ok(if l.g < v.g { l } else { v }),
        (Some(v), None) => Ok(v),
        (None, Some(l)) => Ok(l),
        (None, None) => Err(EosError::NoConvergence {
            what: "density at pressure and temperature",
            iterations: 100,
        }),
    }
}

fn check_positive(what: &'static str, value: f64) -> Result<f64, EosError> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(EosError::BadInput { what, value })
    }
}

/// Triple-point temperature of each gas, K (CoolProp 8.0.0 `Ttriple`; the lambda point for
/// helium; for air the solidification temperature of the pseudo-pure model).
pub fn triple_point_k(gas: Gas) -> f64 {
    match gas {
        Gas::Air => 59.75,
        Gas::Nitrogen => 63.151,
        Gas::CarbonDioxide => 216.592,
        Gas::Helium => 2.1768,
        Gas::Argon => 83.806,
    }
}

/// Lowest temperature accepted for a gas, K: the triple point or the lower end of the GERG-2008
/// extended range (60 K), whichever is higher. Below the triple point the fluid may be solid,
/// which the model does not know.
pub fn min_temperature_k(gas: Gas) -> f64 {
    triple_point_k(gas).max(EXTENDED_MIN_TEMPERATURE_K)
}

/// Lower end of the GERG-2008 extended range, K.
pub const EXTENDED_MIN_TEMPERATURE_K: f64 = 60.0;
/// Highest temperature accepted, K (upper end of the GERG-2008 extended range).
pub const MAX_TEMPERATURE_K: f64 = 700.0;
/// Highest pressure accepted, Pa (upper end of the GERG-2008 extended range, 700 bar).
pub const MAX_PRESSURE_PA: f64 = 7.0e7;
/// GERG-2008 normal range: lowest temperature, K.
pub const NORMAL_MIN_TEMPERATURE_K: f64 = 90.0;
/// GERG-2008 normal range: highest temperature, K.
pub const NORMAL_MAX_TEMPERATURE_K: f64 = 450.0;
/// GERG-2008 normal range: highest pressure, Pa (350 bar).
pub const NORMAL_MAX_PRESSURE_PA: f64 = 3.5e7;

/// Where a state lies in the equation's validity ranges.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Validity {
    /// Inside the normal range (90–450 K, up to 350 bar): the published uncertainties hold.
    Normal,
    /// Inside the extended range only (60–700 K, up to 700 bar): larger uncertainty; warn.
    Extended,
}

/// Where a temperature and pressure lie in the validity ranges (errors as [`state_tp`]).
pub fn validity(gas: Gas, pressure_pa: f64, temperature_k: f64) -> Result<Validity, EosError> {
    let t = check_temperature(gas, temperature_k)?;
    let p = check_pressure(pressure_pa)?;
    let normal = (NORMAL_MIN_TEMPERATURE_K..=NORMAL_MAX_TEMPERATURE_K).contains(&t)
        && p <= NORMAL_MAX_PRESSURE_PA;
    Ok(if normal {
        Validity::Normal
    } else {
        Validity::Extended
    })
}

fn check_temperature(gas: Gas, t: f64) -> Result<f64, EosError> {
    let t = check_positive("temperature_k", t)?;
    let lo = min_temperature_k(gas);
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

/// The stable state at pressure and temperature. Below the critical temperature the root with
/// the lower Gibbs energy is returned.
pub fn state_tp(gas: Gas, pressure_pa: f64, temperature_k: f64) -> Result<State, EosError> {
    let t = check_temperature(gas, temperature_k)?;
    let p = check_pressure(pressure_pa)?;
    let r = stable_root(gas, t, p * 1e-3)?;
    Ok(to_state(gas, &r, None))
}

/// The state at density and temperature (any branch, including inside the two-phase dome where
/// the single-phase state is metastable or unstable; the tank code never asks for those).
pub fn state_td(gas: Gas, density_kg_m3: f64, temperature_k: f64) -> Result<State, EosError> {
    let t = check_temperature(gas, temperature_k)?;
    let rho = check_positive("density_kg_m3", density_kg_m3)?;
    let mm = raw(gas, t, 1e-9).mm;
    let r = raw(gas, t, rho / mm);
    if !(r.p.is_finite() && r.p > 0.0) {
        return Err(EosError::NoPhysicalState {
            reason: "negative pressure (inside the spinodal region)",
        });
    }
    if r.p * 1e3 > MAX_PRESSURE_PA {
        return Err(EosError::OutOfRange {
            what: "pressure_pa",
            value: r.p * 1e3,
            min: 0.0,
            max: MAX_PRESSURE_PA,
        });
    }
    Ok(to_state(gas, &r, None))
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

/// Ideal-gas specific heat capacity cp⁰(T), J/(kg·K) (the equation's ideal-gas part).
pub fn ideal_gas_cp(gas: Gas, temperature_k: f64) -> Result<f64, EosError> {
    let t = check_positive("temperature_k", temperature_k)?;
    let r = raw(gas, t, 1e-12);
    Ok((r.cv + R_GERG) / (r.mm * 1e-3))
}

/// Temperatures where [`saturation`] is valid for a gas, K: the lowest accepted temperature up
/// to [`SATURATION_GAP_BELOW_TC_K`] below the critical point (closer to it the two roots merge
/// in double precision).
pub fn saturation_range_k(gas: Gas) -> (f64, f64) {
    (min_temperature_k(gas), tc(gas) - SATURATION_GAP_BELOW_TC_K)
}

/// Gap below the critical temperature where [`saturation`] stops, K.
pub const SATURATION_GAP_BELOW_TC_K: f64 = 0.02;

/// Saturated liquid and vapour at a temperature, from equal pressure and Gibbs energy.
pub fn saturation(gas: Gas, temperature_k: f64) -> Result<Saturation, EosError> {
    saturation_with(gas, temperature_k, &EosTolerances::default())
}

/// [`saturation`] with explicit tolerances.
pub fn saturation_with(
    gas: Gas,
    temperature_k: f64,
    tol: &EosTolerances,
) -> Result<Saturation, EosError> {
    if gas == Gas::Air {
        return Err(EosError::NotPureFluid { gas: gas.name() });
    }
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
    let c = gas.constants();
    let pc_kpa = c.critical_pressure_pa * 1e-3;
    let dc = critical_density_mol_l(gas);
    let rt = R_GERG * t;
    // Wilson's estimate as the first guess.
    let mut ln_p =
        pc_kpa.ln() + 5.373 * (1.0 + c.acentric_factor) * (1.0 - c.critical_temperature_k / t);
    let (mut ln_lo, mut ln_hi) = (f64::NEG_INFINITY, pc_kpa.ln());
    ln_p = ln_p.min(ln_hi - 1e-6);
    let mut d_liquid = liquid_start(gas);
    let found = |l: Raw, v: Raw| Saturation {
        temperature_k: t,
        pressure_pa: 0.5 * (l.p + v.p) * 1e3,
        liquid: to_state(gas, &l, Some(Phase::Liquid)),
        vapour: to_state(gas, &v, Some(Phase::Vapour)),
    };
    for _ in 0..tol.max_iterations {
        let p = ln_p.exp();
        let vap = solve_branch(gas, t, p, vapour_start(t, p)).filter(|r| r.d < dc);
        let liq = solve_branch(gas, t, p, d_liquid)
            .or_else(|| solve_branch(gas, t, p, liquid_start(gas)))
            .filter(|r| r.d > dc);
        let mut newton = f64::NAN;
        match (liq, vap) {
            (Some(l), Some(v)) => {
                d_liquid = l.d;
                let dg = (l.g - v.g) / rt;
                if dg.abs() < tol.fugacity_balance {
                    return Ok(found(l, v));
                }
                // Liquid Gibbs energy above the vapour's: the pressure is below saturation.
                if dg > 0.0 {
                    ln_lo = ln_lo.max(ln_p);
                } else {
                    ln_hi = ln_hi.min(ln_p);
                }
                // d(g_l − g_v)/d ln p = p·(v_l − v_v), in units of RT: Z_l − Z_v.
                newton = ln_p - dg / (l.z - v.z);
                if ln_hi - ln_lo < 1e-13 {
                    return Ok(found(l, v));
                }
            }
            // Only the vapour branch reaches this pressure: it is below saturation.
            (None, Some(_)) => ln_lo = ln_lo.max(ln_p),
            // Only the liquid branch: above saturation.
            (Some(_), None) => ln_hi = ln_hi.min(ln_p),
            (None, None) => {
                return Err(EosError::NoConvergence {
                    what: "saturation roots",
                    iterations: 0,
                })
            }
        }
        ln_p = if newton > ln_lo && newton < ln_hi {
            newton
        } else if ln_lo.is_finite() {
            0.5 * (ln_lo + ln_hi)
        } else {
            ln_p - 1.0
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

/// Measured deviation of this model from an independent reference library, per gas and per
/// quantity: the largest deviation found in the checks of this module and of `gas::tank`
/// against CoolProp 8.0.0, rounded up. The tests assert that every measured deviation stays
/// inside these figures and that no figure is more than twice the largest deviation seen
/// (so the claim is neither exceeded nor padded).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct ModelUncertainty {
    /// Gas-phase (and supercritical) density, relative, 200–350 K and 1–300 bar.
    pub gas_density_fraction: f64,
    /// Gas-phase density below 200 K (down to 150 K), relative.
    pub cold_gas_density_fraction: f64,
    /// Saturated and compressed liquid density, relative (CO2 only; None, and absent from the
    /// JSON, for the others).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub liquid_density_fraction: Option<f64>,
    /// Vapour pressure, relative (CO2, 250–303 K; None, and absent from the JSON, for the
    /// others).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub vapour_pressure_fraction: Option<f64>,
    /// Isothermal usable gas of a blowdown, relative.
    pub usable_isothermal_fraction: f64,
    /// Adiabatic usable gas of a blowdown, relative.
    pub usable_adiabatic_fraction: f64,
    /// End temperature of an adiabatic blowdown, K.
    pub adiabatic_end_temperature_k: f64,
}

/// The measured uncertainty of this model for one gas (see [`ModelUncertainty`]).
pub fn model_uncertainty(gas: Gas) -> ModelUncertainty {
    match gas {
        // Largest seen: 0.023 % (150 K, 200 bar).
        Gas::Nitrogen => ModelUncertainty {
            gas_density_fraction: 0.0005,
            cold_gas_density_fraction: 0.0005,
            liquid_density_fraction: None,
            vapour_pressure_fraction: None,
            usable_isothermal_fraction: USABLE_ISO[1],
            usable_adiabatic_fraction: USABLE_ADI[1],
            adiabatic_end_temperature_k: END_T[1],
        },
        // Largest seen: 0.155 % (200 K, 100 bar) and 0.42 % at 150 K, 50 bar, near air's
        // critical region, where the GERG-2008 mixture and the reference's pseudo-pure air
        // differ most.
        Gas::Air => ModelUncertainty {
            gas_density_fraction: 0.002,
            cold_gas_density_fraction: 0.005,
            liquid_density_fraction: None,
            vapour_pressure_fraction: None,
            usable_isothermal_fraction: USABLE_ISO[0],
            usable_adiabatic_fraction: USABLE_ADI[0],
            adiabatic_end_temperature_k: END_T[0],
        },
        // Largest seen: vapour 0.018 % on the grid, 0.06 % near-critical supercritical
        // (320 K, 100 bar), saturated vapour 0.18 % at 303 K; liquid 0.031 %; vapour pressure
        // 0.016 %.
        Gas::CarbonDioxide => ModelUncertainty {
            gas_density_fraction: CO2_GAS,
            cold_gas_density_fraction: CO2_GAS,
            liquid_density_fraction: Some(0.0005),
            vapour_pressure_fraction: Some(0.0005),
            usable_isothermal_fraction: USABLE_ISO[2],
            usable_adiabatic_fraction: USABLE_ADI[2],
            adiabatic_end_temperature_k: END_T[2],
        },
        // Largest seen: 0.152 % (200 K, 300 bar).
        Gas::Helium => ModelUncertainty {
            gas_density_fraction: 0.002,
            cold_gas_density_fraction: 0.002,
            liquid_density_fraction: None,
            vapour_pressure_fraction: None,
            usable_isothermal_fraction: USABLE_ISO[3],
            usable_adiabatic_fraction: USABLE_ADI[3],
            adiabatic_end_temperature_k: END_T[3],
        },
        // Largest seen: 0.198 % (200 K, 300 bar).
        Gas::Argon => ModelUncertainty {
            gas_density_fraction: 0.0025,
            cold_gas_density_fraction: 0.0025,
            liquid_density_fraction: None,
            vapour_pressure_fraction: None,
            usable_isothermal_fraction: USABLE_ISO[4],
            usable_adiabatic_fraction: USABLE_ADI[4],
            adiabatic_end_temperature_k: END_T[4],
        },
    }
}

/// CO2 gas and supercritical density uncertainty (largest seen in the tests, rounded up).
const CO2_GAS: f64 = 0.002;
/// Usable-gas and end-temperature uncertainties per gas, in the order air, nitrogen, CO2,
/// helium, argon (largest deviations seen in the `gas::tank` tests, rounded up).
/// Seen: air 0.12 %, nitrogen 0.006 %, CO2 0.000 %, helium 0.15 %, argon 0.19 %.
const USABLE_ISO: [f64; 5] = [0.002, 0.0005, 0.0005, 0.002, 0.0025];
/// See [`USABLE_ISO`].
/// Seen: air 0.17 %, nitrogen 0.010 %, CO2 0.018 %, helium 0.21 %, argon 0.22 %.
const USABLE_ADI: [f64; 5] = [0.002, 0.0005, 0.0005, 0.003, 0.003];
/// See [`USABLE_ISO`], K.
/// Seen: air 0.22 K, nitrogen 0.001 K, CO2 0.010 K, helium 0.11 K, argon 0.022 K.
const END_T: [f64; 5] = [0.3, 0.1, 0.1, 0.2, 0.1];

/// Relative density uncertainty of this model at a temperature and phase (from
/// [`model_uncertainty`]). `liquid` selects the liquid branch of CO2 (ignored for the others).
pub fn density_relative_uncertainty(gas: Gas, temperature_k: f64, liquid: bool) -> f64 {
    let u = model_uncertainty(gas);
    match (liquid, u.liquid_density_fraction) {
        (true, Some(l)) => l,
        _ if temperature_k < 200.0 => u.cold_gas_density_fraction,
        _ => u.gas_density_fraction,
    }
}

#[cfg(test)]
mod tests {
    //! Reference values: CoolProp 8.0.0 (PyPI `CoolProp`), `PropsSI`, whose pure fluids use the
    //! individual reference equations (Lemmon et al. 2000 pseudo-pure air, Span et al. 2000
    //! nitrogen, Span & Wagner 1996 CO2, Ortiz-Vega et al. helium, Tegeler et al. 1999 argon):
    //! independent of GERG-2008's own pure-fluid equations.
    use super::*;
    use crate::gas::species::R_UNIVERSAL;

    const ALL: [Gas; 5] = Gas::ALL;

    /// (gas, T K, p bar, CoolProp 8.0.0 density kg/m³): 150–350 K, 1–300 bar, gas phase only
    /// (CO2 and argon below their vapour pressure).
    const DENSITY_GRID: &[(Gas, f64, f64, f64)] = &[
        (Gas::Nitrogen, 150.0, 1.0, 2.259189),
        (Gas::Nitrogen, 150.0, 10.0, 23.87596),
        (Gas::Nitrogen, 150.0, 50.0, 168.9047),
        (Gas::Nitrogen, 150.0, 100.0, 419.1656),
        (Gas::Nitrogen, 150.0, 200.0, 561.7505),
        (Gas::Nitrogen, 150.0, 300.0, 622.6031),
        (Gas::Nitrogen, 200.0, 1.0, 1.688238),
        (Gas::Nitrogen, 200.0, 10.0, 17.21163),
        (Gas::Nitrogen, 200.0, 50.0, 93.36569),
        (Gas::Nitrogen, 200.0, 100.0, 199.4394),
        (Gas::Nitrogen, 200.0, 200.0, 372.2282),
        (Gas::Nitrogen, 200.0, 300.0, 470.0486),
        (Gas::Nitrogen, 250.0, 1.0, 1.348754),
        (Gas::Nitrogen, 250.0, 10.0, 13.58013),
        (Gas::Nitrogen, 250.0, 50.0, 69.54351),
        (Gas::Nitrogen, 250.0, 100.0, 140.5924),
        (Gas::Nitrogen, 250.0, 200.0, 268.096),
        (Gas::Nitrogen, 250.0, 300.0, 362.7576),
        (Gas::Nitrogen, 300.0, 1.0, 1.123279),
        (Gas::Nitrogen, 300.0, 10.0, 11.24877),
        (Gas::Nitrogen, 300.0, 50.0, 56.3445),
        (Gas::Nitrogen, 300.0, 100.0, 111.7254),
        (Gas::Nitrogen, 300.0, 200.0, 212.5372),
        (Gas::Nitrogen, 300.0, 300.0, 294.7812),
        (Gas::Nitrogen, 350.0, 1.0, 0.9625218),
        (Gas::Nitrogen, 350.0, 10.0, 9.613559),
        (Gas::Nitrogen, 350.0, 50.0, 47.66843),
        (Gas::Nitrogen, 350.0, 100.0, 93.74096),
        (Gas::Nitrogen, 350.0, 200.0, 178.0313),
        (Gas::Nitrogen, 350.0, 300.0, 249.6801),
        (Gas::Air, 150.0, 1.0, 2.336766),
        (Gas::Air, 150.0, 10.0, 24.78789),
        (Gas::Air, 150.0, 50.0, 188.2025),
        (Gas::Air, 150.0, 100.0, 488.0887),
        (Gas::Air, 150.0, 200.0, 622.778),
        (Gas::Air, 150.0, 300.0, 682.4941),
        (Gas::Air, 200.0, 1.0, 1.745981),
        (Gas::Air, 200.0, 10.0, 17.83533),
        (Gas::Air, 200.0, 50.0, 97.95721),
        (Gas::Air, 200.0, 100.0, 214.1443),
        (Gas::Air, 200.0, 200.0, 407.6596),
        (Gas::Air, 200.0, 300.0, 513.226),
        (Gas::Air, 250.0, 1.0, 1.394811),
        (Gas::Air, 250.0, 10.0, 14.06359),
        (Gas::Air, 250.0, 50.0, 72.4959),
        (Gas::Air, 250.0, 100.0, 148.0612),
        (Gas::Air, 250.0, 200.0, 287.0262),
        (Gas::Air, 250.0, 300.0, 390.8243),
        (Gas::Air, 300.0, 1.0, 1.1616),
        (Gas::Air, 300.0, 10.0, 11.64547),
        (Gas::Air, 300.0, 50.0, 58.60364),
        (Gas::Air, 300.0, 100.0, 116.9333),
        (Gas::Air, 300.0, 200.0, 225.0313),
        (Gas::Air, 300.0, 300.0, 314.3078),
        (Gas::Air, 350.0, 1.0, 0.9953375),
        (Gas::Air, 350.0, 10.0, 9.950525),
        (Gas::Air, 350.0, 50.0, 49.52227),
        (Gas::Air, 350.0, 100.0, 97.82818),
        (Gas::Air, 350.0, 200.0, 187.4017),
        (Gas::Air, 350.0, 300.0, 264.4698),
        (Gas::Argon, 150.0, 1.0, 3.225503),
        (Gas::Argon, 150.0, 10.0, 34.55128),
        (Gas::Argon, 200.0, 1.0, 2.409261),
        (Gas::Argon, 200.0, 10.0, 24.74276),
        (Gas::Argon, 200.0, 50.0, 141.186),
        (Gas::Argon, 200.0, 100.0, 337.7395),
        (Gas::Argon, 200.0, 200.0, 699.7144),
        (Gas::Argon, 200.0, 300.0, 863.0401),
        (Gas::Argon, 250.0, 1.0, 1.924403),
        (Gas::Argon, 250.0, 10.0, 19.47517),
        (Gas::Argon, 250.0, 50.0, 102.5162),
        (Gas::Argon, 250.0, 100.0, 216.5022),
        (Gas::Argon, 250.0, 200.0, 447.6454),
        (Gas::Argon, 250.0, 300.0, 626.3165),
        (Gas::Argon, 300.0, 1.0, 1.602511),
        (Gas::Argon, 300.0, 10.0, 16.11124),
        (Gas::Argon, 300.0, 50.0, 82.27494),
        (Gas::Argon, 300.0, 100.0, 167.6026),
        (Gas::Argon, 300.0, 200.0, 335.8421),
        (Gas::Argon, 300.0, 300.0, 482.5785),
        (Gas::Argon, 350.0, 1.0, 1.373066),
        (Gas::Argon, 350.0, 10.0, 13.75819),
        (Gas::Argon, 350.0, 50.0, 69.25356),
        (Gas::Argon, 350.0, 100.0, 138.9033),
        (Gas::Argon, 350.0, 200.0, 273.944),
        (Gas::Argon, 350.0, 300.0, 395.73),
        (Gas::Helium, 150.0, 1.0, 0.3206221),
        (Gas::Helium, 150.0, 10.0, 3.178347),
        (Gas::Helium, 150.0, 50.0, 15.30217),
        (Gas::Helium, 150.0, 100.0, 29.25528),
        (Gas::Helium, 150.0, 200.0, 53.81536),
        (Gas::Helium, 150.0, 300.0, 74.84035),
        (Gas::Helium, 200.0, 1.0, 0.2405251),
        (Gas::Helium, 200.0, 10.0, 2.389529),
        (Gas::Helium, 200.0, 50.0, 11.61216),
        (Gas::Helium, 200.0, 100.0, 22.44459),
        (Gas::Helium, 200.0, 200.0, 42.10559),
        (Gas::Helium, 200.0, 300.0, 59.54175),
        (Gas::Helium, 250.0, 1.0, 0.1924496),
        (Gas::Helium, 250.0, 10.0, 1.914539),
        (Gas::Helium, 250.0, 50.0, 9.358765),
        (Gas::Helium, 250.0, 100.0, 18.21424),
        (Gas::Helium, 250.0, 200.0, 34.59868),
        (Gas::Helium, 250.0, 300.0, 49.46358),
        (Gas::Helium, 300.0, 1.0, 0.1603914),
        (Gas::Helium, 300.0, 10.0, 1.597105),
        (Gas::Helium, 300.0, 50.0, 7.838464),
        (Gas::Helium, 300.0, 100.0, 15.32776),
        (Gas::Helium, 300.0, 200.0, 29.36843),
        (Gas::Helium, 300.0, 300.0, 42.31079),
        (Gas::Helium, 350.0, 1.0, 0.1374887),
        (Gas::Helium, 350.0, 10.0, 1.369969),
        (Gas::Helium, 350.0, 50.0, 6.743209),
        (Gas::Helium, 350.0, 100.0, 13.23143),
        (Gas::Helium, 350.0, 200.0, 25.51282),
        (Gas::Helium, 350.0, 300.0, 36.96666),
        (Gas::CarbonDioxide, 250.0, 1.0, 2.136308),
        (Gas::CarbonDioxide, 250.0, 10.0, 23.4352),
        (Gas::CarbonDioxide, 300.0, 1.0, 1.773026),
        (Gas::CarbonDioxide, 300.0, 10.0, 18.57938),
        (Gas::CarbonDioxide, 300.0, 50.0, 128.3983),
        (Gas::CarbonDioxide, 350.0, 1.0, 1.516728),
        (Gas::CarbonDioxide, 350.0, 10.0, 15.58129),
        (Gas::CarbonDioxide, 350.0, 50.0, 89.6193),
        (Gas::CarbonDioxide, 350.0, 100.0, 228.8044),
        (Gas::CarbonDioxide, 350.0, 200.0, 614.1762),
        (Gas::CarbonDioxide, 350.0, 300.0, 758.9843),
    ];

    /// Every grid state inside the published uncertainty, and the published figure no more than
    /// twice the largest deviation seen (or 0.05 %, whichever is larger).
    #[test]
    fn densities_match_reference_within_published_uncertainty() {
        let mut worst = [0.0_f64; 5];
        let mut worst_cold = [0.0_f64; 5];
        for &(gas, t, p_bar, rho_ref) in DENSITY_GRID {
            let rho = density(gas, p_bar * 1e5, t).unwrap();
            let err = (rho / rho_ref - 1.0).abs();
            let claimed = density_relative_uncertainty(gas, t, false);
            assert!(
                err <= claimed,
                "{gas:?} {t} K {p_bar} bar: {rho} vs {rho_ref} ({:.3} %) beyond {claimed}",
                err * 100.0
            );
            let k = gas_index(gas);
            if t < 200.0 {
                worst_cold[k] = worst_cold[k].max(err);
            } else {
                worst[k] = worst[k].max(err);
            }
        }
        let co2_grid = worst[gas_index(Gas::CarbonDioxide)];
        // CO2's gas figure also covers its saturated vapour up to 303 K.
        for &(t, _, _, rv_ref, _, _) in CO2_SAT {
            let rv = saturation(Gas::CarbonDioxide, t)
                .unwrap()
                .vapour
                .density_kg_m3;
            let k = gas_index(Gas::CarbonDioxide);
            worst[k] = worst[k].max((rv / rv_ref - 1.0).abs());
        }
        for gas in ALL {
            let u = model_uncertainty(gas);
            let k = gas_index(gas);
            assert!(
                u.gas_density_fraction <= (2.0 * worst[k]).max(5e-4),
                "{gas:?} padded"
            );
            assert!(
                u.cold_gas_density_fraction <= (2.0 * worst_cold[k].max(worst[k])).max(5e-4),
                "{gas:?} cold padded"
            );
        }
        // The targets: nitrogen and CO2 vapour ≤ 0.1 %, argon and helium ≤ 0.25 %.
        assert!(worst[gas_index(Gas::Nitrogen)] <= 1e-3);
        assert!(co2_grid <= 1e-3);
        assert!(worst[gas_index(Gas::Argon)] <= 2.5e-3);
        assert!(worst[gas_index(Gas::Helium)] <= 2.5e-3);
    }

    /// The crate's two spot values quoted for this model: nitrogen at 300 K and 200 bar
    /// 212.54 kg/m³ (CoolProp 8.0.0: 212.537).
    #[test]
    fn nitrogen_spot_value() {
        let rho = density(Gas::Nitrogen, 200e5, 300.0).unwrap();
        assert!((rho - 212.54).abs() < 0.01, "{rho}");
    }

    /// Dense CO2 (compressed liquid and near-critical supercritical), CoolProp 8.0.0.
    #[test]
    fn co2_dense_states_match_reference() {
        let gas = Gas::CarbonDioxide;
        let cases = [
            (300.0, 200.0, 905.567, Phase::Liquid),
            (300.0, 300.0, 959.699, Phase::Liquid),
            (250.0, 200.0, 1105.47, Phase::Liquid),
            (250.0, 300.0, 1129.3, Phase::Liquid),
            (320.0, 200.0, 802.331, Phase::Supercritical),
            (320.0, 300.0, 883.002, Phase::Supercritical),
            (320.0, 100.0, 448.277, Phase::Supercritical),
            (310.0, 80.0, 327.712, Phase::Supercritical),
            (350.0, 300.0, 758.984, Phase::Supercritical),
            (280.0, 40.0, 113.079, Phase::Vapour),
        ];
        for (t, p_bar, rho_ref, phase) in cases {
            let st = state_tp(gas, p_bar * 1e5, t).unwrap();
            let err = (st.density_kg_m3 / rho_ref - 1.0).abs();
            let claimed = density_relative_uncertainty(gas, t, st.phase == Phase::Liquid);
            assert!(
                err <= claimed,
                "CO2 {t} K {p_bar} bar: {} vs {rho_ref} ({:.3} %)",
                st.density_kg_m3,
                err * 100.0
            );
            assert_eq!(st.phase, phase, "CO2 {t} K {p_bar} bar");
        }
    }

    /// (T K, psat Pa, rho_l, rho_v kg/m³, s_v − s_l J/(kg K), h_v − h_l J/kg), CoolProp 8.0.0.
    const CO2_SAT: &[(f64, f64, f64, f64, f64, f64)] = &[
        (220.0, 599130.4, 1166.14, 15.81742, 1567.771, 344909.7),
        (250.0, 1785044.0, 1045.972, 46.64401, 1157.334, 289333.6),
        (260.0, 2418793.0, 998.8862, 64.41703, 1024.908, 266476.1),
        (273.15, 3485141.0, 927.432, 97.64734, 845.2987, 230893.3),
        (280.0, 4160739.0, 883.5828, 121.743, 745.148, 208641.4),
        (290.0, 5317728.0, 804.6664, 171.9627, 579.7427, 168125.4),
        (293.15, 5729053.0, 773.3865, 194.2016, 518.4951, 151996.8),
        (300.0, 6713078.0, 679.2392, 268.5837, 345.6757, 103702.7),
        (303.0, 7189010.0, 599.8609, 338.9975, 210.6353, 63822.5),
    ];

    /// Vapour pressure ≤ 0.2 % and saturated densities ≤ 0.5 % from 250 to 303 K (the issue's
    /// targets; seen ≤ 0.016 %, ≤ 0.031 % liquid, ≤ 0.18 % vapour at 303 K), inside the published
    /// figures; latent entropy and enthalpy within 0.3 % (seen ≤ 0.2 % at 303 K); equal Gibbs
    /// energies of the two phases.
    #[test]
    fn co2_saturation_matches_reference() {
        let gas = Gas::CarbonDioxide;
        let u = model_uncertainty(gas);
        for &(t, p_ref, rl_ref, rv_ref, ds_ref, dh_ref) in CO2_SAT {
            let s = saturation(gas, t).unwrap();
            let ep = (s.pressure_pa / p_ref - 1.0).abs();
            let el = (s.liquid.density_kg_m3 / rl_ref - 1.0).abs();
            let ev = (s.vapour.density_kg_m3 / rv_ref - 1.0).abs();
            let ds = (s.vapour.entropy_j_kg_k - s.liquid.entropy_j_kg_k) / ds_ref - 1.0;
            let dh = (s.vapour.enthalpy_j_kg - s.liquid.enthalpy_j_kg) / dh_ref - 1.0;
            assert!(
                ep <= 2e-3 && ep <= u.vapour_pressure_fraction.unwrap(),
                "{t} K psat {ep}"
            );
            assert!(
                el <= 5e-3 && el <= u.liquid_density_fraction.unwrap(),
                "{t} K rho_l {el}"
            );
            assert!(
                ev <= 5e-3 && ev <= density_relative_uncertainty(gas, t, false),
                "{t} K rho_v {ev}"
            );
            assert!(ds.abs() < 3e-3, "{t} K latent entropy {ds}");
            assert!(dh.abs() < 3e-3, "{t} K latent enthalpy {dh}");
            let gl = s.liquid.enthalpy_j_kg - t * s.liquid.entropy_j_kg_k;
            let gv = s.vapour.enthalpy_j_kg - t * s.vapour.entropy_j_kg_k;
            assert!((gl - gv).abs() < 1e-6 * dh_ref, "{t} K Gibbs {gl} vs {gv}");
            assert!((s.liquid.pressure_pa / s.vapour.pressure_pa - 1.0).abs() < 1e-12);
        }
        // The spot values quoted for this model: 773.3 / 194.2 kg/m³ at 20 °C.
        let s = saturation(gas, 293.15).unwrap();
        assert!((s.liquid.density_kg_m3 - 773.3).abs() < 0.1);
        assert!((s.vapour.density_kg_m3 - 194.2).abs() < 0.1);
    }

    /// Nitrogen and argon saturation (the lines a cold blowdown meets), CoolProp 8.0.0:
    /// (T, psat Pa, rho_l, rho_v). Vapour pressure within 0.2 %, densities within 0.5 %
    /// (seen: nitrogen ≤ 0.02 %, argon ≤ 0.18 %).
    #[test]
    fn nitrogen_and_argon_saturation_match_reference() {
        let cases = [
            (Gas::Nitrogen, 80.0, 136_871.8, 793.9371, 6.089_394),
            (Gas::Nitrogen, 100.0, 778_275.0, 689.3526, 31.961_17),
            (Gas::Nitrogen, 120.0, 2_510_584.0, 523.3573, 125.0886),
            (Gas::Argon, 90.0, 133_506.1, 1378.626, 7.436_164),
            (Gas::Argon, 120.0, 1_213_038.0, 1162.818, 60.144_43),
        ];
        for (gas, t, p_ref, rl, rv) in cases {
            let s = saturation(gas, t).unwrap();
            assert!((s.pressure_pa / p_ref - 1.0).abs() < 2e-3, "{gas:?} {t} p");
            assert!(
                (s.liquid.density_kg_m3 / rl - 1.0).abs() < 5e-3,
                "{gas:?} {t} l"
            );
            assert!(
                (s.vapour.density_kg_m3 / rv - 1.0).abs() < 5e-3,
                "{gas:?} {t} v"
            );
        }
    }

    /// Inverse saturation: CoolProp 8.0.0 gives Tsat(20 bar) = 253.647 K and Tsat(50 bar) =
    /// 287.434 K; within 0.02 K. The round trip T → psat → T closes to 1e-7 K.
    #[test]
    fn co2_saturation_temperature_at_pressure() {
        let gas = Gas::CarbonDioxide;
        for (p, t_ref) in [(20e5, 253.647), (50e5, 287.434)] {
            let s = saturation_at_pressure(gas, p).unwrap();
            assert!(
                (s.temperature_k - t_ref).abs() < 0.02,
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
    /// s(300 K, 300 bar) − s(300 K, 1 bar), s(300 K) − s(250 K) at 1 bar, and
    /// h(300 K, 300 bar) − h(300 K, 1 bar). Seen: entropy ≤ 0.08 %, the enthalpy departure
    /// ≤ 1.3 % (helium, a small difference of large terms; 0.5 % argon, 0.3 % air).
    #[test]
    fn entropy_and_enthalpy_differences_match_reference() {
        let cases = [
            (Gas::Nitrogen, -1835.387, 189.8755, -38_385.02, 0.001),
            (Gas::Air, -1781.51, 183.3711, -42_176.17, 0.004),
            (Gas::Helium, -11_819.4, 946.8382, 95_597.36, 0.015),
            (Gas::Argon, -1308.273, 95.1414, -42_501.69, 0.006),
        ];
        for (gas, dsp_ref, dst_ref, dhp_ref, tol_h) in cases {
            let s_hi = specific_entropy(gas, 300e5, 300.0).unwrap();
            let s_lo = specific_entropy(gas, 1e5, 300.0).unwrap();
            let s_cold = specific_entropy(gas, 1e5, 250.0).unwrap();
            let dh = specific_enthalpy(gas, 300e5, 300.0).unwrap()
                - specific_enthalpy(gas, 1e5, 300.0).unwrap();
            let e1 = (s_hi - s_lo) / dsp_ref - 1.0;
            let e2 = (s_lo - s_cold) / dst_ref - 1.0;
            let e3 = dh / dhp_ref - 1.0;
            assert!(e1.abs() < 1e-3, "{gas:?} Δs(p) {e1}");
            assert!(e2.abs() < 1e-3, "{gas:?} Δs(T) {e2}");
            assert!(e3.abs() < tol_h, "{gas:?} Δh(p) {e3}");
        }
        // CO2: s(300 K, 1 bar) − s_liquid(273.15 K) = 1744.593 J/(kg K); s_v(293.15) − s_v(250) =
        // −257.858 and s_l(293.15) − s_l(250) = 380.981 J/(kg K); within 0.5 %.
        let gas = Gas::CarbonDioxide;
        let s273 = saturation(gas, 273.15).unwrap();
        let s250 = saturation(gas, 250.0).unwrap();
        let s293 = saturation(gas, 293.15).unwrap();
        let d1 = specific_entropy(gas, 1e5, 300.0).unwrap() - s273.liquid.entropy_j_kg_k;
        let d2 = s293.vapour.entropy_j_kg_k - s250.vapour.entropy_j_kg_k;
        let d3 = s293.liquid.entropy_j_kg_k - s250.liquid.entropy_j_kg_k;
        assert!((d1 / 1744.593 - 1.0).abs() < 5e-3, "{d1}");
        assert!((d2 / -257.858 - 1.0).abs() < 5e-3, "{d2}");
        assert!((d3 / 380.981 - 1.0).abs() < 5e-3, "{d3}");
    }

    /// Speed of sound and isentropic exponent (CoolProp 8.0.0 `A` and
    /// `isentropic_expansion_coefficient`) at 300 K 1 bar, 300 K 200 bar and 250 K 300 bar.
    /// Seen: ≤ 0.03 % nitrogen and air, ≤ 0.35 % helium, ≤ 0.8 % argon (κ at 250 K, 300 bar).
    #[test]
    fn speed_of_sound_and_isentropic_exponent_match_reference() {
        let cases = [
            (
                Gas::Nitrogen,
                [
                    (353.1591, 1.400_968),
                    (425.9627, 1.928_182),
                    (480.6576, 2.793_617),
                ],
                1e-3,
            ),
            (
                Gas::Air,
                [
                    (347.3185, 1.401_239),
                    (411.9295, 1.909_232),
                    (465.1354, 2.818_507),
                ],
                1e-3,
            ),
            (
                Gas::Helium,
                [
                    (1019.58, 1.667_338),
                    (1104.915, 1.792_705),
                    (1071.79, 1.894_017),
                ],
                7e-3,
            ),
            (
                Gas::Argon,
                [
                    (322.6714, 1.668_483),
                    (372.0389, 2.324_244),
                    (423.932, 3.752_019),
                ],
                1e-2,
            ),
        ];
        for (gas, refs, tol) in cases {
            for ((t, p_bar), (w, k)) in [(300.0, 1.0), (300.0, 200.0), (250.0, 300.0)]
                .into_iter()
                .zip(refs)
            {
                let s = state_tp(gas, p_bar * 1e5, t).unwrap();
                assert!(
                    (s.speed_of_sound_m_s / w - 1.0).abs() < tol,
                    "{gas:?} {t} {p_bar} w"
                );
                assert!(
                    (s.isentropic_exponent / k - 1.0).abs() < tol,
                    "{gas:?} {t} {p_bar} κ"
                );
            }
        }
    }

    /// The nozzle's γ at a regulated state: nitrogen at 12.3 bara and 293.15 K, CoolProp 8.0.0
    /// κ = 1.418 612; within 0.05 %.
    #[test]
    fn isentropic_exponent_at_a_regulated_state() {
        let k = state_tp(Gas::Nitrogen, 12.3e5, 293.15)
            .unwrap()
            .isentropic_exponent;
        assert!((k / 1.418_612 - 1.0).abs() < 5e-4, "{k}");
    }

    /// Ideal-gas cp against CoolProp 8.0.0 `Cp0mass` at 300 and 230 K: 0.1 %.
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
    }

    /// Ideal-gas limit: at 1 kPa the density equals pM/(RT) within 1e-4 for every gas.
    #[test]
    fn ideal_gas_limit_at_low_pressure() {
        for gas in ALL {
            let m = gas.constants().molar_mass_kg_mol;
            for t in [250.0, 300.0, 350.0] {
                let rho = density(gas, 1e3, t).unwrap();
                let ideal = 1e3 * m / (R_UNIVERSAL * t);
                // Air: the mixture's molar mass (28.9586 g/mol) is 0.024 % below the
                // reference's pseudo-pure value in `Gas::constants`.
                let tol = if gas == Gas::Air { 4e-4 } else { 1e-4 };
                assert!(
                    (rho / ideal - 1.0).abs() < tol,
                    "{gas:?} {t}: {rho} vs {ideal}"
                );
            }
        }
    }

    /// pressure(density(p, T), T) returns p (1e-9 relative).
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

    /// Thermodynamic consistency: Δh/T = Δs along an isobar by central differences.
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

    /// Saturation works over its whole stated range for the pure fluids, up to the gap below
    /// the critical temperature, with the liquid denser than the vapour.
    #[test]
    fn saturation_covers_its_range() {
        for gas in [Gas::Nitrogen, Gas::CarbonDioxide, Gas::Argon] {
            let (lo, hi) = saturation_range_k(gas);
            for t in [lo, 0.5 * (lo + hi), hi - 1.0, hi] {
                let s = saturation(gas, t).unwrap_or_else(|e| panic!("{gas:?} {t}: {e}"));
                assert!(
                    s.liquid.density_kg_m3 > s.vapour.density_kg_m3,
                    "{gas:?} {t}"
                );
            }
        }
    }

    #[test]
    fn every_composition_is_accepted() {
        for gas in ALL {
            let mut m = Gerg2008::new();
            assert!(m.set_composition(&composition(gas)).is_ok(), "{gas:?}");
        }
    }

    #[test]
    fn validity_ranges() {
        let g = Gas::Nitrogen;
        assert_eq!(validity(g, 200e5, 300.0).unwrap(), Validity::Normal);
        assert_eq!(validity(g, 400e5, 300.0).unwrap(), Validity::Extended);
        assert_eq!(validity(g, 200e5, 80.0).unwrap(), Validity::Extended);
        assert!(matches!(
            validity(g, 800e5, 300.0),
            Err(EosError::OutOfRange { .. })
        ));
        assert!(matches!(
            density(Gas::Helium, 1e5, 40.0),
            Err(EosError::OutOfRange { .. })
        ));
        assert!(matches!(
            density(g, 1e5, 750.0),
            Err(EosError::OutOfRange { .. })
        ));
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
        assert!(matches!(
            saturation(Gas::Air, 100.0),
            Err(EosError::NotPureFluid { .. })
        ));
        // Far denser than any liquid: beyond the pressure range.
        assert!(pressure(g, 5e3, 300.0).is_err());
    }
}
