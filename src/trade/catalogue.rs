//! The builder's candidate parts, in SI, checked: what the parts file lists and
//! where the layout puts the parts.
//!
//! Built only by `layout::parts` from a parts file and the layout's `[parts]`
//! section, so every number here is finite and inside its physical range.

use crate::model::SupplyCapacity;
use serde::Serialize;

/// A candidate solenoid valve (one per port, all ports the same).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ValvePart {
    /// Name in the parts file.
    pub name: String,
    /// Flow coefficient Cv (IEC 60534).
    pub cv: f64,
    /// Pressure differential ratio factor xT.
    pub xt: f64,
    /// Highest inlet pressure the valve is rated for, Pa absolute (a gauge rating
    /// is referred to sea-level standard atmosphere).
    pub rated_pressure_pa: f64,
    /// Delay from command to full open, s.
    pub opening_delay_s: f64,
    /// Delay from command to closed, s.
    pub closing_delay_s: f64,
    /// Coil current when energised, A.
    pub coil_current_a: f64,
    /// Mass of one valve, kg.
    pub mass_kg: f64,
    /// Price of one valve, in the parts file's currency.
    pub price: f64,
}

/// The high-pressure stage of a regulator chain: it brings tank pressure down to
/// an intermediate pressure that feeds the working stage.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FirstStagePart {
    /// Outlet pressure above ambient, Pa.
    pub set_pressure_gauge_pa: f64,
    /// Inlet pressure needed above the set pressure, Pa.
    pub dropout_margin_pa: f64,
    /// Flow capacity of the stage and its line.
    pub supply: SupplyCapacity,
    /// Highest inlet pressure the stage is rated for, Pa absolute.
    pub rated_inlet_pa: f64,
}

/// A candidate regulator, or a regulator chain (with a first stage).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RegulatorPart {
    /// Name in the parts file.
    pub name: String,
    /// Lowest set pressure the working stage can be adjusted to, Pa above ambient.
    pub set_min_gauge_pa: f64,
    /// Highest set pressure the working stage can be adjusted to, Pa above ambient.
    pub set_max_gauge_pa: f64,
    /// Inlet pressure the working stage needs above its set pressure, Pa.
    pub dropout_margin_pa: f64,
    /// Flow capacity of the working stage and its line to the manifold.
    pub supply: SupplyCapacity,
    /// Highest inlet pressure the working stage is rated for, Pa absolute.
    pub rated_inlet_pa: f64,
    /// The first stage of a chain, if any.
    pub first_stage: Option<FirstStagePart>,
    /// Mass of the regulator (the whole chain), kg.
    pub mass_kg: f64,
    /// Price (the whole chain).
    pub price: f64,
}

/// A candidate tank.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TankPart {
    /// Name in the parts file.
    pub name: String,
    /// Internal volume, m³.
    pub volume_m3: f64,
    /// Highest pressure the tank is rated for (service pressure), Pa absolute.
    pub rated_pressure_pa: f64,
    /// Empty mass, kg.
    pub empty_mass_kg: f64,
    /// Length, m.
    pub length_m: f64,
    /// Outer diameter, m.
    pub diameter_m: f64,
    /// Price.
    pub price: f64,
}

/// Hole (or throat) sizes to try for a group of ports, all the group's ports the same.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HoleGroup {
    /// Label of the group (the parts file's `name`).
    pub name: String,
    /// Indices of the layout's ports in the group.
    pub ports: Vec<usize>,
    /// Port names, for reports.
    pub port_names: Vec<String>,
    /// Diameters to try, m, ascending: a plain hole's diameter, or a
    /// converging–diverging nozzle's throat (its exit scaled to keep the area ratio).
    pub diameters_m: Vec<f64>,
}

/// Where the layout puts the parts (the layout's `[parts]` section).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Placement {
    /// Station of the valve block (every valve, as one point mass on the axis), m.
    pub valve_block_station_m: f64,
    /// Station of the regulator (a point mass on the axis), m.
    pub regulator_station_m: f64,
    /// Station of the tank's fore end, m.
    pub tank_station_m: f64,
}

/// The whole parts file, checked, with the layout's placement.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Catalogue {
    /// Name of the parts list.
    pub name: String,
    /// Currency label of the prices (text, e.g. "EUR").
    pub currency: String,
    /// Largest total coil current the power supply can give, A; `None` when not stated.
    pub coil_supply_limit_a: Option<f64>,
    /// Candidate valves (at least one).
    pub valves: Vec<ValvePart>,
    /// Candidate regulators and chains (at least one).
    pub regulators: Vec<RegulatorPart>,
    /// Working-stage set pressures to try, Pa above ambient, ascending (at least one).
    pub set_pressures_gauge_pa: Vec<f64>,
    /// Candidate tanks (at least one).
    pub tanks: Vec<TankPart>,
    /// Hole-size groups (possibly none: every port keeps its drawn hole).
    pub holes: Vec<HoleGroup>,
    /// Where the parts sit.
    pub placement: Placement,
    /// What the file reader accepts, so sweeps stay inside it.
    pub bounds: Bounds,
}

/// The ranges the parts reader accepts (the layout reader's own), kept with the
/// catalogue so that "what would it take" never sweeps outside them.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Bounds {
    /// Smallest flow coefficient.
    pub min_cv: f64,
    /// Largest flow coefficient.
    pub max_cv: f64,
    /// Smallest hole or throat diameter, m.
    pub min_diameter_m: f64,
}

impl Catalogue {
    /// The size of each choice, in the order a combination lists them: valve,
    /// regulator, set pressure, tank, then one per hole group.
    pub fn radices(&self) -> Vec<usize> {
        let mut r = vec![
            self.valves.len(),
            self.regulators.len(),
            self.set_pressures_gauge_pa.len(),
            self.tanks.len(),
        ];
        r.extend(self.holes.iter().map(|h| h.diameters_m.len()));
        r
    }

    /// How many combinations the catalogue holds (saturating at `u64::MAX`).
    pub fn combinations(&self) -> u64 {
        self.radices()
            .iter()
            .fold(1u64, |a, &r| a.saturating_mul(r as u64))
    }
}
