//! The gases a cold-gas feed may carry and their constants.
//!
//! Critical constants, acentric factors and molar masses are the values used by
//! the reference equations of state (checked against CoolProp 8.0.0);
//! the tests of `gas::eos` check the model built on them against a reference
//! property library, which is what matters for the user.

use serde::Serialize;

/// Universal gas constant, J/(mol·K) (CODATA 2018, exact).
pub const R_UNIVERSAL: f64 = 8.314_462_618;

/// A gas the tool knows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Gas {
    /// Dry air treated as a pseudo-pure fluid.
    Air,
    /// Nitrogen, N2.
    Nitrogen,
    /// Carbon dioxide, CO2 (stored as a saturated liquid below 31 °C).
    CarbonDioxide,
    /// Helium-4.
    Helium,
    /// Argon.
    Argon,
}

/// Constants of one gas.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GasConstants {
    /// Critical temperature, K.
    pub critical_temperature_k: f64,
    /// Critical pressure, Pa.
    pub critical_pressure_pa: f64,
    /// Pitzer acentric factor.
    pub acentric_factor: f64,
    /// Molar mass, kg/mol.
    pub molar_mass_kg_mol: f64,
    /// Ratio of specific heats of the ideal gas near 300 K.
    pub gamma: f64,
}

impl Gas {
    /// All gases, in the order the docs list them.
    pub const ALL: [Gas; 5] = [
        Gas::Air,
        Gas::Nitrogen,
        Gas::CarbonDioxide,
        Gas::Helium,
        Gas::Argon,
    ];

    /// Parse the name used in layout files (`air`, `nitrogen`/`n2`, `co2`, `helium`/`he`, `argon`/`ar`).
    pub fn from_name(name: &str) -> Option<Gas> {
        match name.trim().to_ascii_lowercase().as_str() {
            "air" => Some(Gas::Air),
            "nitrogen" | "n2" => Some(Gas::Nitrogen),
            "co2" | "carbon dioxide" | "carbon-dioxide" => Some(Gas::CarbonDioxide),
            "helium" | "he" => Some(Gas::Helium),
            "argon" | "ar" => Some(Gas::Argon),
            _ => None,
        }
    }

    /// The name written in reports and layout files.
    pub fn name(self) -> &'static str {
        match self {
            Gas::Air => "air",
            Gas::Nitrogen => "nitrogen",
            Gas::CarbonDioxide => "co2",
            Gas::Helium => "helium",
            Gas::Argon => "argon",
        }
    }

    /// The constants of this gas.
    pub fn constants(self) -> GasConstants {
        // Values of the CoolProp 8.0.0 fluid files (PropsSI Tcrit, pcrit, acentric, M);
        // molar masses of air, nitrogen and CO2 and the acentric factor of helium were
        // corrected to those values after an earlier set written from memory.
        match self {
            Gas::Air => GasConstants {
                critical_temperature_k: 132.5306,
                critical_pressure_pa: 3.7860e6,
                acentric_factor: 0.0335,
                molar_mass_kg_mol: 28.965_46e-3,
                gamma: 1.400,
            },
            Gas::Nitrogen => GasConstants {
                critical_temperature_k: 126.192,
                critical_pressure_pa: 3.3958e6,
                acentric_factor: 0.0372,
                molar_mass_kg_mol: 28.013_48e-3,
                gamma: 1.400,
            },
            Gas::CarbonDioxide => GasConstants {
                critical_temperature_k: 304.1282,
                critical_pressure_pa: 7.3773e6,
                acentric_factor: 0.22394,
                molar_mass_kg_mol: 44.0098e-3,
                gamma: 1.289,
            },
            Gas::Helium => GasConstants {
                critical_temperature_k: 5.1953,
                critical_pressure_pa: 0.228_32e6,
                acentric_factor: -0.383_54,
                molar_mass_kg_mol: 4.002_602e-3,
                gamma: 5.0 / 3.0,
            },
            Gas::Argon => GasConstants {
                critical_temperature_k: 150.687,
                critical_pressure_pa: 4.863e6,
                acentric_factor: -0.00219,
                molar_mass_kg_mol: 39.948e-3,
                gamma: 5.0 / 3.0,
            },
        }
    }

    /// Ideal-gas properties used by the flow models.
    pub fn ideal(self) -> IdealGas {
        let c = self.constants();
        IdealGas {
            gamma: c.gamma,
            r_specific_j_kg_k: R_UNIVERSAL / c.molar_mass_kg_mol,
        }
    }
}

/// The two numbers the compressible-flow relations need.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct IdealGas {
    /// Ratio of specific heats cp/cv.
    pub gamma: f64,
    /// Specific gas constant, J/(kg·K).
    pub r_specific_j_kg_k: f64,
}
