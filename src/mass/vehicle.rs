//! The whole vehicle's mass properties at a flight state.
//!
//! Parts: body tube, nose shell, fin set, the listed components, the motor (case
//! plus propellant while burning, case alone after burnout), the tank shell and
//! the gas in it. The gas mass at a state comes from the caller (the gas model
//! knows the inventory); the gas is a uniform cylinder filling the tank.

use super::{shapes, MassProperties, MassSummary};
use crate::model::{Design, FlightState, MotorCondition, Shape};

/// Mass properties of the vehicle at a state, before any measured override.
pub fn vehicle_properties(
    design: &Design,
    state: &FlightState,
    gas_mass_kg: f64,
) -> MassProperties {
    let a = &design.airframe;
    let mut parts = Vec::new();
    if a.tube_mass_kg > 0.0 {
        parts.push(shapes::tube(
            a.tube_mass_kg,
            a.tube_fore_station_m(),
            a.tube_length_m,
            a.outer_diameter_m,
            a.inner_diameter_m,
        ));
    }
    if a.nose.mass_kg > 0.0 {
        parts.push(shapes::nose_shell(
            a.nose.mass_kg,
            0.0,
            a.nose.shape,
            a.nose.length_m,
            a.outer_diameter_m,
        ));
    }
    if let Some(f) = &a.fins {
        if f.mass_kg > 0.0 {
            parts.push(shapes::fin_set(f, a.outer_radius_m()));
        }
    }
    for c in &design.components {
        parts.push(match c.shape {
            Shape::Point {
                station_m,
                radial_m,
                clock_rad,
            } => shapes::point(c.mass_kg, station_m, radial_m, clock_rad),
            Shape::Tube {
                fore_station_m,
                length_m,
                outer_diameter_m,
                inner_diameter_m,
            } => shapes::tube(
                c.mass_kg,
                fore_station_m,
                length_m,
                outer_diameter_m,
                inner_diameter_m,
            ),
            Shape::Cylinder {
                fore_station_m,
                length_m,
                diameter_m,
            } => shapes::cylinder(c.mass_kg, fore_station_m, length_m, diameter_m),
            Shape::Cone {
                fore_station_m,
                length_m,
                diameter_m,
            } => shapes::cone_shell(c.mass_kg, fore_station_m, length_m, diameter_m),
        });
    }
    let m = &design.motor;
    // The empty case is a thin tube; 1 mm wall is representative of hobby motor cases.
    let case_inner = (m.diameter_m - 2e-3).max(0.0);
    parts.push(shapes::tube(
        m.burnout_mass_kg,
        m.fore_station_m,
        m.length_m,
        m.diameter_m,
        case_inner,
    ));
    if state.motor == MotorCondition::Burning {
        let propellant = m.loaded_mass_kg - m.burnout_mass_kg;
        parts.push(shapes::cylinder(
            propellant,
            m.fore_station_m,
            m.length_m,
            case_inner,
        ));
    }
    let t = &design.feed.tank;
    let t_inner = (t.diameter_m - 4e-3).max(0.5 * t.diameter_m);
    parts.push(shapes::tube(
        t.empty_mass_kg,
        t.fore_station_m,
        t.length_m,
        t.diameter_m,
        t_inner,
    ));
    if gas_mass_kg > 0.0 {
        parts.push(shapes::cylinder(
            gas_mass_kg,
            t.fore_station_m,
            t.length_m,
            t_inner,
        ));
    }
    parts.into_iter().sum()
}

/// The summary a report shows, with measured overrides applied.
///
/// An override of the mass or CG alone keeps the computed inertias (about the new
/// CG the computed inertia is only approximate; the report flags overridden states).
pub fn state_summary(design: &Design, state: &FlightState, gas_mass_kg: f64) -> MassSummary {
    let p = vehicle_properties(design, state, gas_mass_kg);
    let mut s = MassSummary::from_properties(&p);
    let o = &state.mass_override;
    if let Some(v) = o.mass_kg {
        s.mass_kg = v;
        s.overridden = true;
    }
    if let Some(v) = o.cg_station_m {
        s.cg_station_m = v;
        s.overridden = true;
    }
    if let Some(v) = o.ixx_kg_m2 {
        s.ixx_kg_m2 = v;
        s.overridden = true;
    }
    if let Some(v) = o.iyy_kg_m2 {
        s.iyy_kg_m2 = v;
        s.izz_kg_m2 = v;
        s.overridden = true;
    }
    s
}
