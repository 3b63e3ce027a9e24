//! The `analyze` report rendered for a terminal: a few plain tables and the findings.
//!
//! Numbers are shown in the units a builder works in (mm, g, N, mN·m, deg/s²,
//! bar and psi) while the JSON form keeps SI with the unit in each field name.

use crate::analysis::Analysis;
use crate::units::signed;
use comfy_table::{presets::UTF8_FULL_CONDENSED, Cell, CellAlignment, Table};
use std::fmt::Write;

const PSI_PA: f64 = 6_894.757_293;

fn table(headers: &[&str]) -> Table {
    let mut t = Table::new();
    t.load_preset(UTF8_FULL_CONDENSED);
    t.set_header(headers.iter().copied().map(Cell::new));
    t
}

fn num(v: f64, decimals: usize) -> Cell {
    let text = if v.is_finite() {
        let t = format!("{v:.decimals$}");
        // A value that rounds to zero is shown without a sign.
        if t.trim_start_matches('-')
            .chars()
            .all(|c| c == '0' || c == '.')
        {
            t.trim_start_matches('-').to_string()
        } else {
            t
        }
    } else {
        "not available".to_string()
    };
    Cell::new(text).set_alignment(CellAlignment::Right)
}

/// An absolute pressure in bar and psi, marked absolute.
fn bar_psi(pa: f64) -> String {
    format!("{:.2} bar absolute ({:.0} psia)", pa / 1e5, pa / PSI_PA)
}

/// Render the report as text.
pub fn render_text(a: &Analysis) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "portwright analysis: {}", a.layout);
    let _ = writeln!(s, "frame: body axes, +x toward the nose; stations aft of the nose tip; torques about each state's CG\n");

    let _ = writeln!(s, "Safety");
    for c in &a.cautions {
        let _ = writeln!(s, "  ! {c}");
    }
    let _ = writeln!(s);

    let _ = writeln!(s, "How the file was read and what the models assume");
    for r in &a.assumptions {
        let _ = writeln!(s, "  - {r}");
    }
    let _ = writeln!(s);

    let g = &a.gas;
    let _ = writeln!(s, "Gas ({})", g.gas);
    let mut t = table(&["quantity", "value"]);
    t.add_row(vec![
        Cell::new("tank volume"),
        Cell::new(format!("{:.1} mL", g.tank_volume_m3 * 1e6)),
    ]);
    t.add_row(vec![
        Cell::new("at fill"),
        Cell::new(format!(
            "{} at {:.1} °C, {}",
            g.phase,
            g.fill_temperature_k - 273.15,
            bar_psi(g.supply_pressure_pa)
        )),
    ]);
    if g.liquid_mass_kg > 0.0 {
        t.add_row(vec![
            Cell::new("liquid at fill"),
            Cell::new(format!(
                "{:.1} g, {:.0} % of the volume",
                g.liquid_mass_kg * 1e3,
                g.liquid_volume_fraction * 100.0
            )),
        ]);
    }
    t.add_row(vec![
        Cell::new("inventory"),
        Cell::new(format!(
            "{:.1} g (± {:.1} g)",
            g.inventory_kg * 1e3,
            g.inventory_uncertainty_kg * 1e3
        )),
    ]);
    t.add_row(vec![
        Cell::new("regulator stops at tank pressure"),
        Cell::new(bar_psi(g.end_pressure_pa)),
    ]);
    t.add_row(vec![
        Cell::new("usable, isothermal blowdown"),
        Cell::new(format!(
            "{:.1} g (± {:.1} %)",
            g.usable_isothermal_kg * 1e3,
            g.uncertainty_fraction * 100.0
        )),
    ]);
    t.add_row(vec![
        Cell::new("usable, adiabatic blowdown"),
        Cell::new(format!(
            "{:.1} g (tank ends at {:.1} °C)",
            g.usable_adiabatic_kg * 1e3,
            g.adiabatic_end_temperature_k - 273.15
        )),
    ]);
    t.add_row(vec![
        Cell::new("total impulse of usable gas"),
        Cell::new(format!(
            "{:.1} to {:.1} N s",
            g.total_impulse_adiabatic_n_s, g.total_impulse_isothermal_n_s
        )),
    ]);
    t.add_row(vec![
        Cell::new("all ports open together"),
        Cell::new(format!(
            "{:.1} to {:.1} s",
            g.firing_time_all_ports_adiabatic_s, g.firing_time_all_ports_s
        )),
    ]);
    let _ = writeln!(s, "{t}");
    let mut t = table(&["port", "full-on time (s)", "minimum impulse bit (mN s)"]);
    for p in &g.per_port {
        t.add_row(vec![
            Cell::new(&p.name),
            num(p.firing_time_s, 1),
            num(p.minimum_impulse_bit_n_s * 1e3, 3),
        ]);
    }
    let _ = writeln!(s, "{t}\n");

    let _ = writeln!(s, "Mass properties");
    let mut t = table(&[
        "state",
        "mass (g)",
        "CG station (mm)",
        "Ixx (kg m²)",
        "Iyy (kg m²)",
        "Izz (kg m²)",
        "gas (g)",
        "",
    ]);
    for st in &a.states {
        let m = &st.mass;
        t.add_row(vec![
            Cell::new(&st.name),
            num(m.mass_kg * 1e3, 1),
            num(m.cg_station_m * 1e3, 1),
            num(m.ixx_kg_m2, 5),
            num(m.iyy_kg_m2, 4),
            num(m.izz_kg_m2, 4),
            num(st.gas_in_tank_kg * 1e3, 1),
            Cell::new(if m.overridden {
                "measured values used"
            } else {
                ""
            }),
        ]);
    }
    let _ = writeln!(s, "{t}\n");

    for st in &a.states {
        let _ = writeln!(
            s,
            "State `{}`: altitude {} m, ambient {:.1} kPa absolute, manifold {} with one valve open, motor {}",
            st.name,
            signed(st.altitude_m, 0).trim_start_matches('+'),
            st.ambient_pressure_pa / 1e3,
            bar_psi(st.regulated_pressure_pa),
            match st.motor {
                crate::model::MotorCondition::Burning => "burning",
                crate::model::MotorCondition::Burnout => "burnt out",
            }
        );
        let mut t = table(&[
            "port",
            "thrust (N)",
            "flow (g/s)",
            "Isp (s)",
            "Fx Fy Fz (N)",
            "roll pitch yaw torque (mN m)",
            "nozzle",
        ]);
        for p in &st.ports {
            t.add_row(vec![
                Cell::new(&p.name),
                num(p.thrust_n, 3),
                num(p.mass_flow_kg_s * 1e3, 3),
                num(p.specific_impulse_s, 1),
                Cell::new(format!(
                    "{} {} {}",
                    signed(p.force_n[0], 2),
                    signed(p.force_n[1], 2),
                    signed(p.force_n[2], 2)
                )),
                Cell::new(format!(
                    "{} {} {}",
                    signed(p.torque_n_m[0] * 1e3, 1),
                    signed(p.torque_n_m[1] * 1e3, 1),
                    signed(p.torque_n_m[2] * 1e3, 1)
                )),
                Cell::new(&p.nozzle_regime),
            ]);
        }
        let _ = writeln!(s, "{t}");
        let mut t = table(&[
            "axis",
            "+ torque (mN m)",
            "− torque (mN m)",
            "accel (deg/s²)",
            "required (mN m)",
            "margin",
        ]);
        for ax in &st.authority {
            t.add_row(vec![
                Cell::new(ax.axis),
                num(ax.positive_n_m * 1e3, 1),
                num(ax.negative_n_m * 1e3, 1),
                num(ax.angular_accel_rad_s2.to_degrees(), 0),
                num(ax.required_n_m * 1e3, 2),
                match ax.margin_note {
                    Some(_) => Cell::new("none required").set_alignment(CellAlignment::Right),
                    None => num(ax.margin, 2),
                },
            ]);
        }
        let _ = writeln!(s, "{t}");
        let env = &st.envelope;
        let _ = writeln!(
            s,
            "exact torque envelope: {} facets, {} vertices, volume {:.3e} (N m)³; torque guaranteed in every direction {:.1} mN m ({:.1} deg/s² about the weakest axis)",
            env.facets,
            env.vertices,
            env.volume_n3_m3,
            env.guaranteed_torque_n_m * 1e3,
            env.guaranteed_accel_rad_s2.to_degrees()
        );
        let _ = writeln!(
            s,
            "roll-to-pitch authority ratio {:.2}",
            st.roll_to_pitch_ratio
        );
        let droop: Vec<String> = st
            .droop
            .iter()
            .map(|d| {
                format!(
                    "{}: {:.3} N (−{:.1} %)",
                    d.open_ports,
                    d.thrust_per_port_n,
                    d.thrust_drop_fraction * 100.0
                )
            })
            .collect();
        let _ = writeln!(
            s,
            "thrust per port with k valves open: {}",
            droop.join(", ")
        );
        let _ = writeln!(
            s,
            "valves that can fire together within 5 % thrust droop: {}\n",
            st.ports_within_5_percent
        );
    }

    if let Some(p) = &a.manoeuvres {
        let _ = writeln!(s, "Manoeuvre gas budget (least gas from the allocator)");
        let mut t = table(&["manoeuvre", "state", "axis", "impulse (mN m s)", "gas (g)"]);
        for m in &p.items {
            t.add_row(vec![
                Cell::new(&m.name),
                Cell::new(&m.state),
                Cell::new(m.axis),
                num(m.impulse_n_m_s * 1e3, 2),
                num(m.gas_kg * 1e3, 2),
            ]);
        }
        let _ = writeln!(s, "{t}");
        let _ = writeln!(
            s,
            "total {:.2} g of {:.2} g usable after a {:.0} % reserve: {}\n",
            p.total_gas_kg * 1e3,
            p.available_kg * 1e3,
            p.reserve_fraction * 100.0,
            if p.fits { "fits" } else { "DOES NOT FIT" }
        );
    }
    let _ = writeln!(s, "Findings");
    for f in &a.findings {
        let _ = writeln!(s, "  * {f}");
    }
    s
}
