//! The `[ground]` section of a layout as SI data: supply bottles, the tank's rated and relief
//! pressures, pad temperatures, the leak behind the arming valve, pad time and arming delay.

use super::fill::Bottle;
use super::pad::LeakRate;
use serde::Serialize;

/// What the layout says about the ground work before a flight.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroundSpec {
    /// Supply bottles of the cascade, in the order given (pressures Pa absolute). Empty when
    /// no fill is planned.
    #[serde(serialize_with = "bottles")]
    pub bottles: Vec<Bottle>,
    /// Tank pressure before a fill, Pa absolute (1 atm when not given).
    pub start_pressure_pa: f64,
    /// Rated working pressure of the flight tank, Pa absolute, when given.
    pub rated_pressure_pa: Option<f64>,
    /// Relief (or burst-disc) setting, Pa absolute, when given.
    pub relief_pressure_pa: Option<f64>,
    /// Pad temperatures to check, K.
    pub pad_temperatures_k: Vec<f64>,
    /// The leak behind the arming valve, when given (no leak otherwise).
    pub leak: Option<LeakRate>,
    /// Time on the pad between fill and launch, s.
    pub pad_time_s: f64,
    /// Arming valve delay from launch detection to a pressurised manifold, s.
    pub arming_delay_s: f64,
}

fn bottles<S: serde::Serializer>(b: &[Bottle], s: S) -> Result<S::Ok, S::Error> {
    use serde::ser::SerializeSeq;
    #[derive(Serialize)]
    struct Row {
        volume_m3: f64,
        pressure_pa: f64,
    }
    let mut seq = s.serialize_seq(Some(b.len()))?;
    for x in b {
        seq.serialize_element(&Row {
            volume_m3: x.volume_m3,
            pressure_pa: x.pressure_pa,
        })?;
    }
    seq.end()
}
