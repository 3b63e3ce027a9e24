//! Words on the screen: every number says what it is, nothing prints as NaN,
//! infinity or −0, side force is only the lateral part, pressures say absolute,
//! the droop table names its port by a stated tie rule, and the HTML report
//! carries the mass properties, equal-scale envelopes and a readable gas plot.

use portwright::analysis::analyze;
use portwright::analysis::feed::droop_port;
use portwright::export::bundle::{html_report, plots};
use portwright::layout::parse_str;
use portwright::report::render_text;

fn heron() -> String {
    std::fs::read_to_string("layouts/heron-54.toml").unwrap()
}

/// Remove the `[[port]]` table whose name is `name`.
fn without_port(text: &str, name: &str) -> String {
    let at = text.find(&format!("name = \"{name}\"")).unwrap();
    let start = text[..at].rfind("[[port]]").unwrap();
    let end = start + 8 + text[start + 8..].find("\n[").unwrap() + 1;
    format!("{}{}", &text[..start], &text[end..])
}

fn no_bad_numbers(text: &str) {
    for bad in ["NaN", "inf", "-0.0 ", "-0.00 ", "−0.0 %", "-0.0°", "+-"] {
        assert!(!text.contains(bad), "found {bad:?} in:\n{text}");
    }
    // A bare "-0" followed by a non-digit, anywhere.
    let b = text.as_bytes();
    for i in 0..b.len().saturating_sub(3) {
        if b[i] == b'-' && b[i + 1] == b'0' && b[i + 2] == b'.' {
            let rest: String = text[i + 1..]
                .chars()
                .take_while(|c| c.is_ascii_digit() || *c == '.')
                .collect();
            assert!(
                rest.chars().any(|c| c.is_ascii_digit() && c != '0'),
                "negative zero {rest:?}"
            );
        }
    }
}

#[test]
fn analysis_text_says_what_every_number_is() {
    let a = analyze(&parse_str(&heron(), "h.toml").unwrap()).unwrap();
    let t = render_text(&a);
    no_bad_numbers(&t);
    assert!(
        t.contains("kPa abs") && t.contains("bara") && t.contains("psia"),
        "{t}"
    );
    assert!(
        !t.contains(" bar (") && !t.contains(" psi)"),
        "an unmarked pressure: {t}"
    );
    assert!(
        t.contains("motor burning") && t.contains("motor burnout"),
        "{t}"
    );
    assert!(!t.contains("Burning") && !t.contains("Burnout"));
    assert!(
        t.contains("side force Fy Fz (N)") && t.contains("axial Fx (N)"),
        "{t}"
    );
    assert!(
        !t.contains("Fx Fy Fz"),
        "side force must not include the axial part"
    );
    // No header cell of the mass table is empty.
    let header = t.lines().find(|l| l.contains("CG station (mm)")).unwrap();
    let cells: Vec<&str> = header.trim_matches('│').split('┆').collect();
    assert!(cells.iter().all(|c| !c.trim().is_empty()), "{header}");
    assert!(header.contains("Izz"), "{header}");
    // The JSON form has no negative zero either.
    let j = serde_json::to_string(&a).unwrap();
    for bad in ["-0.0,", "-0.0]", "-0.0}"] {
        assert!(!j.contains(bad), "JSON holds {bad}");
    }
    // The four radial ports have equal flows: the droop table is for the first.
    assert!(
        t.contains("thrust of `yaw-neg` (largest flow; first in the layout among equals)"),
        "{t}"
    );
}

/// Heron with only its two yaw ports, no optimiser sections and no manoeuvres.
fn yaw_only() -> String {
    let mut text = heron();
    for p in [
        "pitch-pos",
        "pitch-neg",
        "roll-pos-a",
        "roll-pos-b",
        "roll-neg-a",
        "roll-neg-b",
    ] {
        text = without_port(&text, p);
    }
    let text = text.replace("[[freedom]]", "[[unused]]");
    // Cut at the freedoms, or at the build tolerances before them (they name ports
    // this layout no longer has).
    let cut = text
        .find("[tolerances]")
        .unwrap_or(usize::MAX)
        .min(text.find("[[unused]]").unwrap());
    let text = text[..cut].to_string();
    let (m, f) = (
        text.find("[[manoeuvre]]").unwrap(),
        text.find("[[state]]").unwrap(),
    );
    format!("{}{}", &text[..m], &text[f..])
}

#[test]
fn yaw_authority_of_a_one_axis_layout_survives_products_of_inertia() {
    // A side mass at clock 0 moves the CG along +y and gives a product of inertia
    // Ixy; the two yaw ports still span the yaw axis alone (their roll arm is the
    // CG's z offset, zero). The yaw acceleration is the yaw torque over Izz.
    let text = yaw_only();
    let at = text.find("[[port]]").unwrap();
    let text = format!(
        "{}[[mass]]\nname = \"side\"\nmass = \"200 g\"\nstation = \"500 mm\"\noffset = \"20 mm\"\nclock = \"0 deg\"\n\n{}",
        &text[..at],
        &text[at..]
    );
    let a = analyze(&parse_str(&text, "h.toml").unwrap()).unwrap();
    for st in &a.states {
        assert!(st.mass.ixy_kg_m2.abs() > 0.0);
        let y = &st.authority[2];
        let want = y.positive_n_m.min(y.negative_n_m) / st.mass.izz_kg_m2;
        // 1e-12 relative: one division.
        assert!(want > 0.0 && (y.angular_accel_rad_s2 - want).abs() <= 1e-12 * want);
    }
}

#[test]
fn missing_authority_is_said_in_words() {
    let text = yaw_only();
    let a = analyze(&parse_str(&text, "h.toml").unwrap()).unwrap();
    let t = render_text(&a);
    no_bad_numbers(&t);
    assert!(t.contains("no pitch authority"), "{t}");
    let plots = plots(&parse_str(&text, "h.toml").unwrap(), &a).unwrap();
    let html = html_report(&parse_str(&text, "h.toml").unwrap(), &a, &plots).unwrap();
    assert!(html.contains("no pitch authority"));
    assert!(!html.contains(">inf<") && !html.contains("NaN"));
}

#[test]
fn droop_port_ties_go_to_the_first_port() {
    // Equal within round-off: the first wins, whichever way the round-off leans.
    assert_eq!(droop_port(&[2.0e-3, 2.0e-3 * (1.0 + 1e-13), 1.0e-3]), 0);
    assert_eq!(droop_port(&[1.0e-3, 2.0e-3 * (1.0 - 1e-13), 2.0e-3]), 1);
    // A real difference (1e-6 relative, far above the 1e-9 rule) is not a tie.
    assert_eq!(droop_port(&[2.0e-3, 2.0e-3 * (1.0 + 1e-6)]), 1);
    assert_eq!(droop_port(&[]), 0);
}

#[test]
fn html_report_has_mass_table_equal_scales_and_a_readable_gas_plot() {
    let d = parse_str(&heron(), "h.toml").unwrap();
    let a = analyze(&d).unwrap();
    let p = plots(&d, &a).unwrap();
    let html = html_report(&d, &a, &p).unwrap();
    assert!(
        html.contains("<th scope=\"col\">Izz (kg m²)</th>"),
        "no Izz column"
    );
    assert!(
        html.contains("class=\"table-wrap\""),
        "tables cannot scroll on a narrow screen"
    );
    assert!(html.contains("bara"));
    no_bad_numbers(&html.replace("stroke-dasharray", ""));
    for plot in p.iter().filter(|p| p.name.starts_with("envelope-")) {
        let f = plot.plot.frames[0];
        let sx = (f.right_px - f.left_px) as f64 / (f.x_range.1 - f.x_range.0);
        let sy = (f.bottom_px - f.top_px) as f64 / (f.y_range.1 - f.y_range.0);
        // Whole-pixel plot edges: 2 % covers one pixel of a few hundred.
        assert!(
            (sx / sy - 1.0).abs() < 0.02,
            "{}: {sx} vs {sy} px per N m",
            plot.name
        );
    }
    // The gas plots show the tank's pressure and temperature against time, each
    // with a dashed reference level: two curves that cannot be confused.
    let gas = p.iter().find(|p| p.name == "gas").unwrap();
    assert!(gas.plot.svg.contains("Tank pressure (bar absolute)"));
    assert!(gas.plot.svg.contains("regulator drops out"));
    let temp = p.iter().find(|p| p.name == "gas-temperature").unwrap();
    assert!(temp.plot.svg.contains("fill temperature"));
    // The pressure curve starts at the fill pressure and ends at the dropout
    // pressure (both bar absolute, as the gas budget has them).
    let g = &a.gas;
    let first = g.blowdown.first().unwrap();
    let last = g.blowdown.last().unwrap();
    assert!((first.pressure_pa - g.supply_pressure_pa).abs() < 1e-6 * g.supply_pressure_pa);
    assert!((last.pressure_pa - g.end_pressure_pa).abs() < 1e-3 * g.end_pressure_pa);
}

#[test]
fn allocate_text_separates_side_and_axial_force() {
    use nalgebra::Vector3;
    use portwright::allocation::saturation::limiter;
    use portwright::allocation::{MinGasAllocator, SideForceLimit, Tolerances};
    let d = parse_str(&heron(), "h.toml").unwrap();
    let a = analyze(&d).unwrap();
    let st = &a.states[0];
    let e = portwright::analysis::effectiveness(&d, &st.mass, &st.ports).unwrap();
    let tol = Tolerances::default();
    let mut alloc = MinGasAllocator::new(&e, SideForceLimit::Free, &tol).unwrap();
    let cmd = Vector3::new(0.02, 0.0, 0.0);
    let r = alloc.allocate(&cmd).unwrap();
    let why = limiter(&e, SideForceLimit::Free, &cmd, &r, &tol);
    let names: Vec<String> = d.ports.iter().map(|p| p.name.clone()).collect();
    let t =
        portwright::report::allocate::allocation_text(&d.name, &st.name, &cmd, &r, &why, &names);
    no_bad_numbers(&t);
    assert!(
        t.contains("side force Fy") && t.contains("axial force Fx"),
        "{t}"
    );
    assert!(t.contains("pitch 0.00"), "{t}");
}
