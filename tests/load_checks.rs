//! Checks made where the layout is read: each message names line, column and
//! field, says what was expected, and shows no internal names. One test per
//! problem that once got through to a later stage (or crashed it).

use portwright::layout::{locate, parse_layout, parse_str, LayoutError};

const HERON: &str = include_str!("../layouts/heron-54.toml");

fn line_of(text: &str, needle: &str) -> usize {
    let at = text
        .find(needle)
        .unwrap_or_else(|| panic!("`{needle}` not in the text"));
    text[..at].matches('\n').count() + 1
}

/// The demo with one replacement (which must apply).
fn heron_with(from: &str, to: &str) -> String {
    assert!(HERON.contains(from), "`{from}` not in the demo");
    HERON.replacen(from, to, 1)
}

fn refused(text: &str) -> LayoutError {
    parse_str(text, "t.toml").expect_err("the layout must be refused")
}

/// The one problem of a layout whose field is `field`; asserts it is on `line`.
fn problem_on(text: &str, field: &str, line: usize) -> String {
    let e = refused(text);
    let p = e
        .problems()
        .iter()
        .find(|p| p.field == field)
        .unwrap_or_else(|| panic!("no problem for `{field}`: {e}"));
    assert_eq!(p.line, line, "{p}");
    assert!(p.column >= 1);
    p.message.clone()
}

#[test]
fn huge_lengths_and_stations_are_refused_with_the_range() {
    // 1e200 mm once reached the envelope builder as non-finite torques.
    for (from, to, field) in [
        (
            "length = \"1000 mm\"",
            "length = \"1e200 mm\"",
            "airframe.length",
        ),
        (
            "sweep = \"60 mm\"",
            "sweep = \"1e200 mm\"",
            "airframe.fins.sweep",
        ),
        (
            "station = \"915 mm\"",
            "station = \"1e200 mm\"",
            "motor.station",
        ),
        (
            "station = \"400 mm\"",
            "station = \"101 m\"",
            "feed.tank.station",
        ),
    ] {
        let text = heron_with(from, to);
        let m = problem_on(&text, field, line_of(&text, to));
        assert!(m.contains("100 "), "{field}: {m}");
    }
    // A mass's station and length.
    let text = heron_with("station = \"240 mm\"", "station = \"1e200 mm\"");
    let m = problem_on(
        &text,
        "mass `recovery bay (parachute, harness)`.station",
        line_of(&text, "1e200 mm"),
    );
    assert!(m.contains("100 m"), "{m}");
    let text = heron_with("length = \"150 mm\"", "length = \"1e300 mm\"");
    let m = problem_on(
        &text,
        "mass `recovery bay (parachute, harness)`.length",
        line_of(&text, "1e300 mm"),
    );
    assert!(m.contains("100 "), "{m}");
}

#[test]
fn optimiser_sections_are_checked_by_every_reader() {
    // The reader all commands share refuses these, not only `optimize`.
    for (from, to, field, words) in [
        (
            "ports = [\"roll-pos-a\", \"roll-pos-b\"]",
            "ports = [\"roll-pos-a\", \"no-such-port\"]",
            "freedom 2.ports",
            "no port named `no-such-port`",
        ),
        (
            "ports = [\"roll-pos-a\", \"roll-pos-b\"]",
            "ports = [\"roll-pos-a\", \"roll-pos-b\", \"yaw-neg\"]",
            "freedom 2.ports",
            "exactly two ports",
        ),
        (
            "ports = [\"roll-neg-a\", \"roll-neg-b\"]",
            "ports = [\"roll-neg-a\", \"roll-pos-a\"]",
            "freedom 3.ports",
            "already moved by freedom 2",
        ),
        (
            "objective = \"margin\"",
            "objective = \"quickest\"",
            "optimize.objective",
            "expected margin",
        ),
        (
            "max_evals = 20000",
            "max_evals = 20000\ntime_limit = \"1e300 s\"",
            "optimize.time_limit",
            "at most",
        ),
        (
            "max_evals = 20000",
            "max_evals = 20000\ntime_limit = \"nan s\"",
            "optimize.time_limit",
            "not a finite number",
        ),
    ] {
        let text = heron_with(from, to);
        let needle = to.lines().last().unwrap();
        let value_line = line_of(&text, needle);
        let m = problem_on(&text, field, value_line);
        assert!(m.contains(words), "{field}: {m}");
    }
}

#[test]
fn type_errors_name_the_field_and_hint_units_only_for_quantities() {
    let text = heron_with("outer_diameter = \"54 mm\"", "outer_diameter = 54");
    let e = refused(&text);
    let p = &e.problems()[0];
    assert_eq!(p.field, "airframe.outer_diameter");
    assert_eq!(p.line, line_of(&text, "outer_diameter = 54"));
    assert!(p.message.contains("such as \"54 mm\""), "{p}");

    let text = heron_with("name = \"Heron 54 (demo)\"", "name = 54");
    let e = refused(&text);
    let p = &e.problems()[0];
    assert_eq!(p.field, "name");
    assert!(!p.message.contains("unit"), "no unit hint for a name: {p}");

    // Inside a list of tables, the entry is numbered.
    let text = heron_with("hole = \"1.6 mm\"", "hole = 1.6");
    let p = refused(&text).problems()[0].clone();
    assert_eq!(p.field, "port 1.hole", "{p}");
}

#[test]
fn a_duplicate_key_is_named() {
    let text = heron_with(
        "outer_diameter = \"54 mm\"",
        "outer_diameter = \"54 mm\"\nouter_diameter = \"55 mm\"",
    );
    let p = refused(&text).problems()[0].clone();
    assert!(p.message.contains("outer_diameter"), "{p}");
    assert_eq!(p.line, line_of(&text, "outer_diameter = \"55 mm\""));
}

#[test]
fn long_text_is_refused_before_it_is_read() {
    // A 50 MB name once made `run` use 24 GB; 200 characters is the bound.
    let name = "n".repeat(1 << 20);
    let text = heron_with("name = \"Heron 54 (demo)\"", &format!("name = \"{name}\""));
    let e = refused(&text);
    let p = &e.problems()[0];
    assert_eq!(
        (p.field.as_str(), p.line),
        ("name", line_of(&text, "name = \"nnn"))
    );
    assert!(p.message.contains("at most 200"), "{p}");
    assert!(
        e.to_string().len() < 300,
        "the message does not repeat the text"
    );
    // 200 is accepted.
    let ok = heron_with(
        "name = \"Heron 54 (demo)\"",
        &format!("name = \"{}\"", "n".repeat(200)),
    );
    parse_str(&ok, "t.toml").expect("200 characters are accepted");
    // A long quantity is refused by the unit reader with its length only.
    let text = heron_with(
        "span = \"60 mm\"",
        &format!("span = \"{} mm\"", "1".repeat(100)),
    );
    let m = problem_on(&text, "airframe.fins.span", line_of(&text, "span = \"111"));
    assert!(m.contains("103 characters"), "{m}");
}

#[test]
fn invalid_utf8_names_the_line() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("latin1.toml");
    let mut bytes = HERON.as_bytes().to_vec();
    let at = HERON.find("name = \"coupler joint\"").unwrap() + 8;
    bytes[at] = 0xE9; // "é" in Latin-1
    std::fs::write(&path, bytes).unwrap();
    let e = portwright::layout::load(&path).unwrap_err();
    let p = &e.problems()[0];
    assert_eq!(p.line, line_of(HERON, "name = \"coupler joint\""));
    assert_eq!(p.column, 9);
    assert!(p.message.contains("UTF-8"), "{p}");
}

#[test]
fn misalignment_is_bounded_and_negative_altitudes_on_land_are_modelled() {
    let text = heron_with(
        "thrust_misalignment = \"0.1 deg\"",
        "thrust_misalignment = \"200 deg\"",
    );
    let m = problem_on(
        &text,
        "requirements.thrust_misalignment",
        line_of(&text, "thrust_misalignment = \"200 deg\""),
    );
    assert!(m.contains("0 deg to 10 deg"), "{m}");
    // The Dead Sea shore is about 430 m below sea level; the loader and the
    // atmosphere agree down to -500 m.
    let text = heron_with("altitude = \"450 m\"", "altitude = \"-430 m\"");
    let d = parse_str(&text, "t.toml").unwrap();
    let a = portwright::analysis::analyze(&d).expect("analysed below sea level");
    assert!(a.states[1].ambient_pressure_pa > 101_325.0);
    let text = heron_with("altitude = \"450 m\"", "altitude = \"-501 m\"");
    problem_on(
        &text,
        "state `burnout`.altitude",
        line_of(&text, "altitude = \"-501 m\""),
    );
}

#[test]
fn zero_droop_means_no_droop() {
    let text = heron_with(
        "supply_cv = 0.45",
        "droop = \"0 psi\"\ndroop_at = \"10 g/s\"",
    );
    let d = parse_str(&text, "t.toml").expect("zero droop is accepted");
    assert!(
        d.readings.iter().any(|r| r.contains("means no droop")),
        "{:?}",
        d.readings
    );
    portwright::analysis::analyze(&d).expect("analysed");
}

#[test]
fn problems_after_loading_carry_their_field_and_place() {
    // Every roll port cants the same way: no port makes negative roll torque,
    // so the despin manoeuvre cannot be performed.
    let text = HERON
        .replace(
            "tangential_cant = \"-60 deg\"",
            "tangential_cant = \"60 deg\"",
        )
        .replace(
            "tangential_cant = [\"-60 deg\", \"-20 deg\"]",
            "tangential_cant = [\"20 deg\", \"60 deg\"]",
        );
    let layout = parse_layout(&text, "t.toml").expect("the file itself is fine");
    let e = portwright::analysis::analyze(&layout.design).expect_err("despin is impossible");
    let located = locate::analysis_problem(&text, "t.toml", &e);
    let p = &located.problems()[0];
    assert!(p.field.starts_with("manoeuvre `"), "{p}");
    assert!(p.message.contains("no port can make torque"), "{p}");
    assert!(!p.message.contains("gas model"), "{p}");
    assert_eq!(
        p.line,
        line_of(&text, "[[manoeuvre]]\nname = \"despin"),
        "{p}"
    );
}
