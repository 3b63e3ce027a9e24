//! The `analyze` report rendered for a terminal: a few plain tables and the findings.
//!
//! Numbers are shown in the units a builder works in (mm, g, N, mN·m, deg/s²,
//! bar and psi) while the JSON form keeps SI with the unit in each field name.

pub mod allocate;
pub mod optimize;

use crate::analysis::Analysis;
use comfy_table::{presets::UTF8_FULL_CONDENSED, Cell, CellAlignment, Table};
use std::fmt::Write;

const PSI_PA: f64 = 6_894.757_293;

fn table(headers: &[&str]) -> Table {
    let mut t = Table::new();
    t.load_preset(UTF8_FULL_CONDENSED);
    t.set_header(headers.iter().copied().map(Cell::new));
    t
}

/// `v` to `decimals` places, never "-0.0" (a value that rounds to zero is shown
/// as zero); `None` for NaN or infinity, which the caller puts in words.
pub fn fixed(v: f64, decimals: usize) -> Option<String> {
    if !v.is_finite() {
        return None;
    }
    let text = format!("{v:.decimals$}");
    Some(
        if text
            .trim_start_matches('-')
            .chars()
            .all(|c| c == '0' || c == '.')
        {
            text.trim_start_matches('-').to_string()
        } else {
            text
        },
    )
}

/// Like [`fixed`] with a sign in front of every value that does not round to zero.
pub fn signed(v: f64, decimals: usize) -> Option<String> {
    fixed(v, decimals).map(|t| {
        if t.starts_with('-') || t.chars().all(|c| c == '0' || c == '.') {
            t
        } else {
            format!("+{t}")
        }
    })
}

/// A right-aligned number, or `missing` in words when there is none.
fn num_or(v: f64, decimals: usize, missing: &str) -> Cell {
    Cell::new(fixed(v, decimals).unwrap_or_else(|| missing.to_string()))
        .set_alignment(CellAlignment::Right)
}

fn num(v: f64, decimals: usize) -> Cell {
    num_or(v, decimals, "not available")
}

/// Three components with signs, never "-0.00".
fn triple(v: [f64; 3], scale: f64, decimals: usize) -> String {
    v.map(|x| signed(x * scale, decimals).unwrap_or_else(|| "?".to_string()))
        .join(" ")
}

/// An absolute pressure in bar and psi, marked absolute.
fn bar_psi(pa: f64) -> String {
    format!("{:.2} bara ({:.0} psia)", pa / 1e5, pa / PSI_PA)
}

/// Motor condition in the words of the layout file.
fn motor_words(m: crate::model::MotorCondition) -> &'static str {
    match m {
        crate::model::MotorCondition::Burning => "burning",
        crate::model::MotorCondition::Burnout => "burnout",
    }
}

/// The roll-to-pitch ratio, or in words why there is none.
fn ratio_words(ratio: f64, authority: &[crate::analysis::authority::AxisAuthority; 3]) -> String {
    if authority[1].angular_accel_rad_s2 <= 0.0 {
        "not defined: no pitch authority".to_string()
    } else if authority[0].angular_accel_rad_s2 <= 0.0 {
        "0 (no roll authority)".to_string()
    } else {
        fixed(ratio, 2).unwrap_or_else(|| "not defined".to_string())
    }
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
            "{:.1} g (± {:.2} g)",
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
            "{:.1} g (± {:.2} %)",
            g.usable_isothermal_kg * 1e3,
            g.uncertainty_fraction * 100.0
        )),
    ]);
    t.add_row(vec![
        Cell::new("usable, adiabatic blowdown"),
        Cell::new(format!(
            "{:.1} g (± {:.2} %; tank ends at {:.1} °C ± {:.1} K)",
            g.usable_adiabatic_kg * 1e3,
            g.adiabatic_uncertainty_fraction * 100.0,
            g.adiabatic_end_temperature_k - 273.15,
            g.adiabatic_end_temperature_uncertainty_k
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

    let _ = writeln!(s, "Mass properties (about each state's CG)");
    let mut t = table(&[
        "state",
        "mass (g)",
        "CG station (mm)",
        "CG off axis y z (mm)",
        "Ixx (kg m²)",
        "Iyy (kg m²)",
        "Izz (kg m²)",
        "gas in tank (g)",
    ]);
    for st in &a.states {
        let m = &st.mass;
        t.add_row(vec![
            Cell::new(&st.name),
            num(m.mass_kg * 1e3, 1),
            num(m.cg_station_m * 1e3, 1),
            Cell::new(format!(
                "{} {}",
                signed(m.cg_y_m * 1e3, 2).unwrap_or_default(),
                signed(m.cg_z_m * 1e3, 2).unwrap_or_default()
            ))
            .set_alignment(CellAlignment::Right),
            num(m.ixx_kg_m2, 5),
            num(m.iyy_kg_m2, 4),
            num(m.izz_kg_m2, 4),
            num(st.gas_in_tank_kg * 1e3, 1),
        ]);
    }
    let _ = writeln!(s, "{t}");
    for st in &a.states {
        let m = &st.mass;
        if m.ixy_kg_m2 != 0.0 || m.ixz_kg_m2 != 0.0 || m.iyz_kg_m2 != 0.0 {
            let _ = writeln!(
                s,
                "products of inertia at {} (tensor elements, kg m²): Ixy {:.3e}, Ixz {:.3e}, Iyz {:.3e}; accelerations below use the full tensor",
                st.name, m.ixy_kg_m2, m.ixz_kg_m2, m.iyz_kg_m2
            );
        }
        if m.overridden {
            let _ = writeln!(
                s,
                "{}: measured values from the layout replace computed ones",
                st.name
            );
        }
    }
    let _ = writeln!(s);

    for st in &a.states {
        let _ = writeln!(
            s,
            "State `{}`: {} m, ambient {:.1} kPa abs, manifold {} with one valve open, motor {}",
            st.name,
            fixed(st.altitude_m, 0).unwrap_or_else(|| "unknown".to_string()),
            st.ambient_pressure_pa / 1e3,
            bar_psi(st.regulated_pressure_pa),
            motor_words(st.motor)
        );
        let mut t = table(&[
            "port",
            "thrust (N)",
            "flow (g/s)",
            "Isp (s)",
            "axial Fx (N)",
            "side force Fy Fz (N)",
            "roll pitch yaw torque (mN m)",
            "nozzle",
        ]);
        for p in &st.ports {
            t.add_row(vec![
                Cell::new(&p.name),
                num(p.thrust_n, 3),
                num(p.mass_flow_kg_s * 1e3, 3),
                num(p.specific_impulse_s, 1),
                Cell::new(signed(p.force_n[0], 3).unwrap_or_default())
                    .set_alignment(CellAlignment::Right),
                Cell::new(format!(
                    "{} {}",
                    signed(p.force_n[1], 3).unwrap_or_default(),
                    signed(p.force_n[2], 3).unwrap_or_default()
                )),
                Cell::new(triple(p.torque_n_m, 1e3, 1)),
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
            let none = format!("no {} authority", ax.axis);
            let margin = if ax.required_n_m > 0.0 {
                num_or(ax.margin, 2, "none required")
            } else {
                Cell::new("none required").set_alignment(CellAlignment::Right)
            };
            let accel = if ax.angular_accel_rad_s2 > 0.0 {
                num(ax.angular_accel_rad_s2.to_degrees(), 0)
            } else {
                Cell::new(&none).set_alignment(CellAlignment::Right)
            };
            t.add_row(vec![
                Cell::new(ax.axis),
                num(ax.positive_n_m * 1e3, 1),
                num(ax.negative_n_m * 1e3, 1),
                accel,
                num(ax.required_n_m * 1e3, 2),
                margin,
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
            "roll-to-pitch authority ratio {}",
            ratio_words(st.roll_to_pitch_ratio, &st.authority)
        );
        let droop: Vec<String> = st
            .droop
            .iter()
            .map(|d| {
                let drop = fixed(d.thrust_drop_fraction * 100.0, 1).unwrap_or_default();
                if drop == "0.0" {
                    format!("{}: {:.3} N", d.open_ports, d.thrust_per_port_n)
                } else {
                    format!(
                        "{}: {:.3} N ({drop} % less)",
                        d.open_ports, d.thrust_per_port_n
                    )
                }
            })
            .collect();
        let _ = writeln!(
            s,
            "thrust of `{}` (largest flow; first in the layout among equals) with k equal valves open: {}",
            st.droop_port,
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
    if let Some(g) = &a.ground {
        s.push_str(&ground_text(g));
    }
    let _ = writeln!(s, "Findings");
    for f in &a.findings {
        let _ = writeln!(s, "  * {f}");
    }
    s
}

/// The `[ground]` section as text: its lines, then the fill sequence and pad temperature tables.
fn ground_text(g: &crate::ground::report::GroundReport) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "Ground: filling, pad hold and pad temperatures");
    for l in g.lines() {
        let _ = writeln!(s, "  - {l}");
    }
    for t in g.tables() {
        let _ = writeln!(s, "{}", t.caption);
        let headers: Vec<&str> = t.headers.iter().map(String::as_str).collect();
        let mut table = table(&headers);
        for r in &t.rows {
            table.add_row(r.iter().map(Cell::new).collect::<Vec<_>>());
        }
        let _ = writeln!(s, "{table}");
    }
    let _ = writeln!(s);
    s
}
