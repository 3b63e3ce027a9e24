//! U.S. Standard Atmosphere 1976 from 500 m below sea level (the lowest dry land
//! is about 430 m below) to 86 km geometric altitude; below sea level the
//! standard's lowest layer continues, as its own tables do down to −5 km.
//!
//! The ambient pressure sets a nozzle's back pressure, so thrust and regime
//! change along the flight; this module supplies it. Below 86 km the standard
//! is seven layers, each with a constant lapse rate of molecular-scale
//! temperature in geopotential altitude, joined by hydrostatic equilibrium of a
//! gas of constant mean molar mass M0. Geometric altitude is converted to
//! geopotential with the standard's effective Earth radius r0 = 6356.766 km.
//!
//! Kinetic temperature equals molecular-scale temperature up to 80 km; from 80
//! to 86 km the standard scales it by the tabulated ratio M/M0 (dissociation of
//! oxygen begins). Pressure and density use the molecular-scale temperature
//! with M0 and are unaffected by that ratio.
//!
//! Constants are those of the standard (NOAA/NASA/USAF, U.S. Standard
//! Atmosphere 1976, Tables 1–4), including its gas constant 8314.32 J/(kmol·K),
//! which differs from today's CODATA value in the sixth figure; using the
//! standard's own value is what reproduces its tables.

use thiserror::Error;

/// Why the atmosphere cannot give a state.
#[derive(Debug, Clone, Copy, PartialEq, Error)]
pub enum AtmosphereError {
    /// The altitude is outside −500 m to 86 km geometric (−500 m′ to 84.852 km
    /// geopotential) or not finite.
    #[error("altitude {altitude_m:.0} m is outside the modelled range -500 m to {max_m:.0} m")]
    OutOfRange {
        /// Altitude given, m.
        altitude_m: f64,
        /// Highest altitude accepted in the same kind of altitude, m.
        max_m: f64,
    },
}

/// The atmosphere at one altitude.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AtmosphereState {
    /// Geopotential altitude, m'.
    pub geopotential_altitude_m: f64,
    /// Pressure, Pa absolute.
    pub pressure_pa: f64,
    /// Kinetic temperature, K.
    pub temperature_k: f64,
    /// Molecular-scale temperature, K (equal to kinetic below 80 km).
    pub molecular_scale_temperature_k: f64,
    /// Density, kg/m³.
    pub density_kg_m3: f64,
}

/// Effective Earth radius of the standard, m.
pub const EARTH_RADIUS_M: f64 = 6_356_766.0;
/// Sea-level pressure, Pa.
pub const SEA_LEVEL_PRESSURE_PA: f64 = 101_325.0;
/// Sea-level temperature, K.
pub const SEA_LEVEL_TEMPERATURE_K: f64 = 288.15;
/// Highest geometric altitude modelled, m.
pub const MAX_GEOMETRIC_ALTITUDE_M: f64 = 86_000.0;

/// Lowest altitude modelled, m (geometric and, near enough for the check, geopotential).
pub const MIN_ALTITUDE_M: f64 = -500.0;

const G0: f64 = 9.80665; // m/s², also the geopotential unit's reference
const M0: f64 = 28.9644; // kg/kmol, sea-level mean molar mass
const R_STAR: f64 = 8314.32; // J/(kmol K), the standard's gas constant

/// Layer bases: geopotential altitude (m') and lapse rate (K/m').
const LAYERS: [(f64, f64); 7] = [
    (0.0, -0.0065),
    (11_000.0, 0.0),
    (20_000.0, 0.0010),
    (32_000.0, 0.0028),
    (47_000.0, 0.0),
    (51_000.0, -0.0028),
    (71_000.0, -0.0020),
];

/// Highest geopotential altitude accepted, m' (86 km geometric is 84 852.05 m').
const TOP_GEOPOTENTIAL_M: f64 = 84_852.0;

/// M/M0 against geometric altitude from 80 to 86 km in 0.5 km steps
/// (the standard's Table 8, from memory; the 86 km value 0.999579 is the one
/// that turns the molecular-scale 186.946 K into the tabulated kinetic
/// 186.8673 K).
const MOLAR_MASS_RATIO: [f64; 13] = [
    1.000000, 0.999996, 0.999989, 0.999971, 0.999941, 0.999909, 0.999870, 0.999829, 0.999786,
    0.999741, 0.999694, 0.999641, 0.999579,
];

fn geopotential_from_geometric(z: f64) -> f64 {
    EARTH_RADIUS_M * z / (EARTH_RADIUS_M + z)
}

/// Atmosphere at geometric altitude `altitude_m` (−500 m to 86 000 m).
pub fn at_geometric_altitude(altitude_m: f64) -> Result<AtmosphereState, AtmosphereError> {
    if !(altitude_m.is_finite()
        && (MIN_ALTITUDE_M..=MAX_GEOMETRIC_ALTITUDE_M).contains(&altitude_m))
    {
        return Err(AtmosphereError::OutOfRange {
            altitude_m,
            max_m: MAX_GEOMETRIC_ALTITUDE_M,
        });
    }
    let h = geopotential_from_geometric(altitude_m);
    let mut state = state_at_geopotential(h);
    state.temperature_k = state.molecular_scale_temperature_k * molar_mass_ratio(altitude_m);
    Ok(state)
}

/// Atmosphere at geopotential altitude `altitude_m` (0 to 84 852 m'), the
/// altitude the standard's layers are written in.
pub fn at_geopotential_altitude(altitude_m: f64) -> Result<AtmosphereState, AtmosphereError> {
    if !(altitude_m.is_finite() && (MIN_ALTITUDE_M..=TOP_GEOPOTENTIAL_M).contains(&altitude_m)) {
        return Err(AtmosphereError::OutOfRange {
            altitude_m,
            max_m: TOP_GEOPOTENTIAL_M,
        });
    }
    let mut state = state_at_geopotential(altitude_m);
    let z = EARTH_RADIUS_M * altitude_m / (EARTH_RADIUS_M - altitude_m);
    state.temperature_k = state.molecular_scale_temperature_k * molar_mass_ratio(z);
    Ok(state)
}

fn molar_mass_ratio(z: f64) -> f64 {
    if z <= 80_000.0 {
        return 1.0;
    }
    let s = ((z - 80_000.0) / 500.0).min(12.0);
    let i = (s.floor() as usize).min(11);
    let f = s - i as f64;
    MOLAR_MASS_RATIO[i] + f * (MOLAR_MASS_RATIO[i + 1] - MOLAR_MASS_RATIO[i])
}

fn state_at_geopotential(h: f64) -> AtmosphereState {
    let k = G0 * M0 / R_STAR; // K/m' per unit lapse exponent
    let mut t_base = SEA_LEVEL_TEMPERATURE_K;
    let mut p_base = SEA_LEVEL_PRESSURE_PA;
    let mut layer = 0;
    // Walk up the layers, carrying base temperature and pressure.
    while layer + 1 < LAYERS.len() && h >= LAYERS[layer + 1].0 {
        let (h0, lapse) = LAYERS[layer];
        let dh = LAYERS[layer + 1].0 - h0;
        let (t, p) = step(t_base, p_base, lapse, dh, k);
        t_base = t;
        p_base = p;
        layer += 1;
    }
    let (h0, lapse) = LAYERS[layer];
    let (tm, p) = step(t_base, p_base, lapse, h - h0, k);
    AtmosphereState {
        geopotential_altitude_m: h,
        pressure_pa: p,
        temperature_k: tm,
        molecular_scale_temperature_k: tm,
        density_kg_m3: p * M0 / (R_STAR * tm),
    }
}

/// Temperature and pressure after rising `dh` in a layer of constant lapse rate.
fn step(t0: f64, p0: f64, lapse: f64, dh: f64, k: f64) -> (f64, f64) {
    if lapse == 0.0 {
        (t0, p0 * (-k * dh / t0).exp())
    } else {
        let t = t0 + lapse * dh;
        (t, p0 * (t0 / t).powf(k / lapse))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn standard_table_values_at_geopotential_altitudes() {
        // U.S. Standard Atmosphere 1976 tables (geopotential altitude),
        // printed to 6 figures: 0 m 101325 Pa, 1000 m 89874.6 Pa,
        // 5000 m 54019.9 Pa, 11000 m 22632.1 Pa (layer base), 20000 m
        // 5474.89 Pa (layer base, from memory). Tolerance: half a unit in the
        // 6th figure, 1e-5 relative.
        for (h, p) in [
            (0.0, 101_325.0),
            (1000.0, 89_874.6),
            (5000.0, 54_019.9),
            (11_000.0, 22_632.1),
            (20_000.0, 5474.89),
        ] {
            let s = at_geopotential_altitude(h).unwrap();
            assert_relative_eq!(s.pressure_pa, p, max_relative = 1e-5);
        }
        // Sea-level density 1.225 kg/m³ (the standard's table, 4 figures).
        let s0 = at_geometric_altitude(0.0).unwrap();
        assert!((s0.density_kg_m3 - 1.225).abs() < 0.5e-3);
        // Tropopause temperature 216.65 K, stratopause 270.65 K (layer definitions).
        assert_relative_eq!(
            at_geopotential_altitude(11_000.0).unwrap().temperature_k,
            216.65,
            max_relative = 1e-12
        );
        assert_relative_eq!(
            at_geopotential_altitude(47_000.0).unwrap().temperature_k,
            270.65,
            max_relative = 1e-12
        );
    }

    #[test]
    fn matches_fluids_atmosphere_1976_at_geometric_altitudes() {
        // Python package fluids 1.3.1, `fluids.atmosphere.ATMOSPHERE_1976(Z)`
        // (geometric altitude, the same standard, same constants): P, T, rho.
        // fluids reports the molecular-scale temperature everywhere, so T is
        // compared with ours. Same formulas and constants: 1e-9 relative.
        let rows: [(f64, f64, f64, f64); 17] = [
            (0.0, 101325.0, 288.15, 1.2249991558877125),
            (
                500.0,
                95461.28949694506,
                284.9002556130261,
                1.1672725123243854,
            ),
            (
                1000.0,
                89876.28518727123,
                281.6510223716947,
                1.1116589850558272,
            ),
            (
                3000.0,
                70121.16223642998,
                268.65919845164115,
                0.9092539408451479,
            ),
            (
                5000.0,
                54048.28614576141,
                255.67554322180348,
                0.7364284207799743,
            ),
            (
                11000.0,
                22699.960739233353,
                216.77351270445553,
                0.3648015641865601,
            ),
            (15000.0, 12111.825698085444, 216.65, 0.1947550464440157),
            (20000.0, 5529.3118922991525, 216.65, 0.08890991508888647),
            (
                25000.0,
                2549.222992375915,
                221.55206472628424,
                0.0400838867180783,
            ),
            (
                32000.0,
                889.0644172017433,
                228.48971865615363,
                0.01355515122238047,
            ),
            (
                40000.0,
                287.1439554634391,
                250.34964610242113,
                0.0039956781404817,
            ),
            (50000.0, 79.77909299649136, 270.65, 0.0010268780342616336),
            (
                60000.0,
                21.958666139698384,
                247.02088477279673,
                0.00030967780764751664,
            ),
            (
                71000.0,
                4.479563246198172,
                216.84591067876457,
                7.196515035502572e-05,
            ),
            (
                80000.0,
                1.0524735450545426,
                198.63857625086885,
                1.845803203685814e-05,
            ),
            (
                85000.0,
                0.4456807630079311,
                188.89317368870587,
                8.219500504352634e-06,
            ),
            (86000.0, 0.37338046183182483, 186.946, 6.957820368802233e-06),
        ];
        for (z, p, t, rho) in rows {
            let s = at_geometric_altitude(z).unwrap();
            assert_relative_eq!(s.pressure_pa, p, max_relative = 1e-9);
            // At 86 km (84 852.05 m') fluids has stepped into the isothermal
            // layer above 84 852 m' while we stay on the −2 K/km' layer to its
            // end: 0.05 m' × 2 K/km' = 1e-4 K, 5e-7 relative (density the same).
            let t_tol = if z == 86_000.0 { 1e-6 } else { 1e-9 };
            assert_relative_eq!(s.molecular_scale_temperature_k, t, max_relative = t_tol);
            assert_relative_eq!(s.density_kg_m3, rho, max_relative = t_tol);
        }
    }

    #[test]
    fn kinetic_temperature_at_86_km() {
        // The standard gives T = 186.8673 K at 86 km (start of its upper
        // part; from memory), 0.04 % below the molecular-scale 186.946 K.
        let s = at_geometric_altitude(86_000.0).unwrap();
        assert_relative_eq!(s.temperature_k, 186.8673, max_relative = 1e-5);
        let low = at_geometric_altitude(79_000.0).unwrap();
        assert_eq!(low.temperature_k, low.molecular_scale_temperature_k);
    }

    #[test]
    fn pressure_falls_monotonically_and_out_of_range_is_an_error() {
        let mut last = f64::INFINITY;
        for i in 0..=860 {
            let p = at_geometric_altitude(i as f64 * 100.0).unwrap().pressure_pa;
            assert!(p < last);
            last = p;
        }
        assert!(at_geometric_altitude(-501.0).is_err());
        assert!(at_geometric_altitude(86_001.0).is_err());
        assert!(at_geometric_altitude(f64::NAN).is_err());
        assert!(at_geopotential_altitude(85_000.0).is_err());
    }

    #[test]
    fn below_sea_level_follows_the_lowest_layer() {
        // fluids 1.3.1, fluids.atmosphere.ATMOSPHERE_1976 (geometric altitude):
        // the same standard, computed independently. 1e-6 relative: both evaluate
        // the same closed form, so only the constants' last digits differ.
        for (z, t, p, rho) in [
            (
                -500.0,
                291.40025565324044,
                107478.00229517762,
                1.2848944642950364,
            ),
            (
                -250.0,
                289.7750639107964,
                104364.66720710343,
                1.2546722227982345,
            ),
        ] {
            let s = at_geometric_altitude(z).unwrap();
            assert_relative_eq!(s.temperature_k, t, max_relative = 1e-6);
            assert_relative_eq!(s.pressure_pa, p, max_relative = 1e-6);
            assert_relative_eq!(s.density_kg_m3, rho, max_relative = 1e-6);
        }
    }
}
