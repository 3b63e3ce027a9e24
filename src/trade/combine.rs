//! One combination of parts: which valve, regulator, set pressure, tank and hole
//! size per group; its number in the catalogue, and the design it makes.
//!
//! Combinations are numbered in mixed radix with the valve as the most
//! significant digit and the last hole group as the least, so "catalogue order"
//! (the final tie-break everywhere) is the order a builder reads the parts file.

use super::catalogue::Catalogue;
use crate::model::{Design, MassComponent, NozzleSpec, Regulator, Shape, Valve, ValveFlow};
use serde::Serialize;

/// The choice for each slot, as indices into the catalogue's lists.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
pub struct Choice {
    /// Index into `valves`.
    pub valve: usize,
    /// Index into `regulators`.
    pub regulator: usize,
    /// Index into `set_pressures_gauge_pa`.
    pub set_pressure: usize,
    /// Index into `tanks`.
    pub tank: usize,
    /// Index into each hole group's `diameters_m`.
    pub holes: Vec<usize>,
}

impl Choice {
    /// The digits in the order of [`Catalogue::radices`].
    pub fn digits(&self) -> Vec<usize> {
        let mut d = vec![self.valve, self.regulator, self.set_pressure, self.tank];
        d.extend(&self.holes);
        d
    }

    /// Build from digits in the order of [`Catalogue::radices`].
    pub fn from_digits(d: &[usize]) -> Choice {
        Choice {
            valve: d[0],
            regulator: d[1],
            set_pressure: d[2],
            tank: d[3],
            holes: d[4..].to_vec(),
        }
    }

    /// The combination's number in catalogue order.
    pub fn index(&self, cat: &Catalogue) -> u64 {
        self.digits()
            .iter()
            .zip(cat.radices())
            .fold(0u64, |acc, (&d, r)| acc * r as u64 + d as u64)
    }

    /// The combination with number `index` (taken modulo the catalogue size).
    pub fn from_index(cat: &Catalogue, mut index: u64) -> Choice {
        let radices = cat.radices();
        let mut d = vec![0; radices.len()];
        for (k, &r) in radices.iter().enumerate().rev() {
            d[k] = (index % r as u64) as usize;
            index /= r as u64;
        }
        Choice::from_digits(&d)
    }

    /// The parts by name, in words: "valve A, regulator B at 150 psig, tank C, holes …".
    pub fn describe(&self, cat: &Catalogue) -> String {
        let mut s = format!(
            "{} · {} at {} · {}",
            cat.valves[self.valve].name,
            cat.regulators[self.regulator].name,
            psig(cat.set_pressures_gauge_pa[self.set_pressure]),
            cat.tanks[self.tank].name
        );
        for (g, &k) in cat.holes.iter().zip(&self.holes) {
            s.push_str(&format!(" · {} {:.2} mm", g.name, g.diameters_m[k] * 1e3));
        }
        s
    }
}

/// A gauge pressure in Pa as "150 psig" (whole psi).
pub fn psig(gauge_pa: f64) -> String {
    format!("{:.0} psig", gauge_pa / 6_894.757_293_168 + 0.0)
}

/// Name of the mass component the valves add.
pub const VALVES_COMPONENT: &str = "trade: valves";
/// Name of the mass component the regulator adds.
pub const REGULATOR_COMPONENT: &str = "trade: regulator";

/// The design with the chosen parts: the feed's valve, regulator (and first
/// stage of a chain), tank and the hole groups' sizes replaced; the valves (as
/// one point mass at the valve block) and the regulator (a point mass at its
/// station) added to the mass components; the tank at the placement's station.
pub fn apply(base: &Design, cat: &Catalogue, choice: &Choice) -> Design {
    let mut d = base.clone();
    let v = &cat.valves[choice.valve];
    let r = &cat.regulators[choice.regulator];
    let t = &cat.tanks[choice.tank];
    d.feed.valve = Valve {
        flow: ValveFlow::Cv { cv: v.cv, xt: v.xt },
        opening_delay_s: v.opening_delay_s,
        closing_delay_s: v.closing_delay_s,
        coil_current_a: v.coil_current_a,
    };
    d.feed.regulator = Regulator {
        set_pressure_gauge_pa: cat.set_pressures_gauge_pa[choice.set_pressure],
        dropout_margin_pa: r.dropout_margin_pa,
        supply: r.supply,
    };
    d.feed.first_stage = r.first_stage.as_ref().map(|f| Regulator {
        set_pressure_gauge_pa: f.set_pressure_gauge_pa,
        dropout_margin_pa: f.dropout_margin_pa,
        supply: f.supply,
    });
    d.feed.tank.volume_m3 = t.volume_m3;
    d.feed.tank.empty_mass_kg = t.empty_mass_kg;
    d.feed.tank.length_m = t.length_m;
    d.feed.tank.diameter_m = t.diameter_m;
    d.feed.tank.fore_station_m = cat.placement.tank_station_m;
    let point = |station_m: f64| Shape::Point {
        station_m,
        radial_m: 0.0,
        clock_rad: 0.0,
    };
    d.components.push(MassComponent {
        name: VALVES_COMPONENT.to_string(),
        mass_kg: v.mass_kg * base.ports.len() as f64,
        shape: point(cat.placement.valve_block_station_m),
    });
    d.components.push(MassComponent {
        name: REGULATOR_COMPONENT.to_string(),
        mass_kg: r.mass_kg,
        shape: point(cat.placement.regulator_station_m),
    });
    for (g, &k) in cat.holes.iter().zip(&choice.holes) {
        for &p in &g.ports {
            set_hole(&mut d.ports[p].nozzle, g.diameters_m[k]);
        }
    }
    d
}

/// Set a plain hole's diameter, or a converging–diverging nozzle's throat with
/// its exit scaled to keep the area ratio.
pub fn set_hole(n: &mut NozzleSpec, diameter_m: f64) {
    match n {
        NozzleSpec::Hole { diameter_m: d, .. } => *d = diameter_m,
        NozzleSpec::ConvergingDiverging {
            throat_diameter_m,
            exit_diameter_m,
            ..
        } => {
            let ratio = *exit_diameter_m / *throat_diameter_m;
            *throat_diameter_m = diameter_m;
            *exit_diameter_m = diameter_m * ratio;
        }
    }
}

/// Price of a combination: one valve per port, the regulator, the tank.
pub fn price(cat: &Catalogue, choice: &Choice, ports: usize) -> f64 {
    cat.valves[choice.valve].price * ports as f64
        + cat.regulators[choice.regulator].price
        + cat.tanks[choice.tank].price
}

/// Mass of the parts: one valve per port, the regulator, the empty tank, kg.
pub fn parts_mass_kg(cat: &Catalogue, choice: &Choice, ports: usize) -> f64 {
    cat.valves[choice.valve].mass_kg * ports as f64
        + cat.regulators[choice.regulator].mass_kg
        + cat.tanks[choice.tank].empty_mass_kg
}
