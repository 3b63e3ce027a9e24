//! Malformed or impossible layouts give a clear message naming the line, column
//! and field, and never panic. Each case starts from a small valid layout and
//! changes one thing.

use portwright::layout::{parse_str, LayoutError};

const BASE: &str = r#"
name = "bad-input base"

[airframe]
outer_diameter = "54 mm"
inner_diameter = "51 mm"
length = "1000 mm"

[airframe.nose]
length = "200 mm"

[airframe.fins]
count = 3
root_chord = "100 mm"
tip_chord = "40 mm"
span = "50 mm"
station = "1090 mm"
thickness = "3 mm"

[[airframe.keep_out]]
name = "coupler"
from = "600 mm"
to = "640 mm"

[motor]
loaded_mass = "400 g"
burnout_mass = "200 g"
station = "900 mm"
length = "300 mm"
diameter = "38 mm"

[feed]
gas = "nitrogen"

[feed.tank]
volume = "0.2 L"
fill_pressure = "3000 psig"
temperature = "20 C"
empty_mass = "300 g"
station = "400 mm"
length = "150 mm"
diameter = "48 mm"

[feed.regulator]
set_pressure = "150 psig"
dropout_margin = "50 psig"

[feed.valve]
cv = 0.05
opening_delay = "8 ms"
closing_delay = "5 ms"
coil_current = "0.5 A"

[[port]]
name = "a"
station = "300 mm"
clock = "0 deg"
hole = "1.5 mm"

[[port]]
name = "b"
station = "300 mm"
clock = "180 deg"
hole = "1.5 mm"

[requirements]
roll_accel = "100 deg/s^2"
pitch_accel = "30 deg/s^2"

[[state]]
name = "liftoff"
motor = "burning"

[[state]]
name = "burnout"
motor = "burnout"
altitude = "400 m"
"#;

/// Replace one exact piece of the base layout (which must be present once).
fn with(from: &str, to: &str) -> String {
    assert_eq!(
        BASE.matches(from).count(),
        1,
        "fixture text {from:?} must occur once"
    );
    BASE.replacen(from, to, 1)
}

/// Parse and return the rendered error, checking it names the file and a line.
fn error_of(text: &str) -> String {
    match parse_str(text, "bad.toml") {
        Ok(_) => panic!("expected an error for:\n{text}"),
        Err(e @ LayoutError::Invalid { .. }) => {
            let msg = e.to_string();
            assert!(
                msg.starts_with("bad.toml:"),
                "message lacks the file name: {msg}"
            );
            msg
        }
        Err(e) => panic!("unexpected error kind: {e}"),
    }
}

fn line_of(text: &str, needle: &str) -> usize {
    text.lines()
        .position(|l| l.contains(needle))
        .expect("needle in text")
        + 1
}

/// Assert the error names the field and points at the line holding `needle`.
fn assert_error(text: &str, needle: &str, field: &str, words: &str) {
    let msg = error_of(text);
    let line = line_of(text, needle);
    assert!(
        msg.contains(&format!("bad.toml:{line}:")),
        "expected line {line} in: {msg}"
    );
    assert!(msg.contains(field), "expected field `{field}` in: {msg}");
    assert!(msg.contains(words), "expected `{words}` in: {msg}");
}

#[test]
fn base_layout_is_valid() {
    parse_str(BASE, "base.toml").unwrap_or_else(|e| panic!("{e}"));
}

#[test]
fn toml_syntax_error() {
    let t = with("length = \"1000 mm\"", "length = \"1000 mm");
    let msg = error_of(&t);
    assert!(
        msg.contains(&format!("bad.toml:{}:", line_of(&t, "length = \"1000 mm"))),
        "{msg}"
    );
}

#[test]
fn missing_unit() {
    let t = with("outer_diameter = \"54 mm\"", "outer_diameter = \"54\"");
    assert_error(&t, "outer_diameter", "airframe.outer_diameter", "no unit");
}

#[test]
fn number_instead_of_string() {
    let t = with("outer_diameter = \"54 mm\"", "outer_diameter = 54");
    let msg = error_of(&t);
    assert!(msg.contains("such as \"54 mm\""), "{msg}");
    assert!(
        msg.contains(&format!(":{}:", line_of(&t, "outer_diameter"))),
        "{msg}"
    );
}

#[test]
fn unknown_unit() {
    let t = with("length = \"200 mm\"", "length = \"200 furlongs\"");
    assert_error(
        &t,
        "200 furlongs",
        "airframe.nose.length",
        "unknown unit `furlongs`",
    );
}

#[test]
fn unit_of_wrong_kind() {
    let t = with(
        "hole = \"1.5 mm\"\n\n[[port]]\nname = \"b\"",
        "hole = \"12 kg\"\n\n[[port]]\nname = \"b\"",
    );
    assert_error(
        &t,
        "12 kg",
        "port `a`.hole",
        "expected a length such as \"54 mm\"",
    );
}

#[test]
fn nan_and_infinite_values() {
    let t = with("volume = \"0.2 L\"", "volume = \"NaN L\"");
    assert_error(&t, "NaN L", "feed.tank.volume", "not a finite number");
    let t = with("volume = \"0.2 L\"", "volume = \"inf L\"");
    assert_error(&t, "inf L", "feed.tank.volume", "not a finite number");
}

#[test]
fn zero_and_negative_sizes() {
    let t = with("volume = \"0.2 L\"", "volume = \"0 L\"");
    assert_error(&t, "0 L", "feed.tank.volume", "above zero");
    let t = with("span = \"50 mm\"", "span = \"-50 mm\"");
    assert_error(&t, "-50 mm", "airframe.fins.span", "above zero");
}

#[test]
fn inner_diameter_not_below_outer() {
    let t = with("inner_diameter = \"51 mm\"", "inner_diameter = \"56 mm\"");
    assert_error(
        &t,
        "56 mm",
        "airframe.inner_diameter",
        "must be less than the outer diameter",
    );
}

#[test]
fn port_outside_tube() {
    let t = with(
        "station = \"300 mm\"\nclock = \"0 deg\"",
        "station = \"1500 mm\"\nclock = \"0 deg\"",
    );
    assert_error(&t, "1500 mm", "port `a`.station", "not on the body tube");
    let t = with(
        "station = \"300 mm\"\nclock = \"0 deg\"",
        "station = \"100 mm\"\nclock = \"0 deg\"",
    );
    assert_error(
        &t,
        "station = \"100 mm\"",
        "port `a`.station",
        "not on the body tube",
    );
}

#[test]
fn port_in_fin_root() {
    // Fins default to a first clock of 0 deg; this port sits on fin 1's root.
    let t = with(
        "station = \"300 mm\"\nclock = \"0 deg\"",
        "station = \"1120 mm\"\nclock = \"0 deg\"",
    );
    assert_error(&t, "clock = \"0 deg\"", "port `a`.clock", "root of fin 1");
}

#[test]
fn port_in_keep_out() {
    let t = with(
        "station = \"300 mm\"\nclock = \"0 deg\"",
        "station = \"620 mm\"\nclock = \"0 deg\"",
    );
    assert_error(&t, "620 mm", "port `a`.station", "keep-out zone `coupler`");
}

#[test]
fn set_pressure_at_or_above_fill() {
    let t = with(
        "fill_pressure = \"3000 psig\"",
        "fill_pressure = \"180 psig\"",
    );
    assert_error(
        &t,
        "180 psig",
        "feed.tank.fill_pressure",
        "must exceed the regulator set pressure",
    );
}

#[test]
fn temperature_below_absolute_zero() {
    let t = with("temperature = \"20 C\"", "temperature = \"-300 C\"");
    assert_error(&t, "-300 C", "feed.tank.temperature", "absolute zero");
}

#[test]
fn unknown_gas() {
    let t = with("gas = \"nitrogen\"", "gas = \"unobtainium\"");
    assert_error(&t, "unobtainium", "feed.gas", "unknown gas");
}

#[test]
fn duplicate_port_names() {
    let t = with("name = \"b\"", "name = \"a\"");
    let msg = error_of(&t);
    let second = t
        .lines()
        .enumerate()
        .filter(|(_, l)| l.contains("name = \"a\""))
        .nth(1)
        .unwrap()
        .0
        + 1;
    assert!(msg.contains(&format!("bad.toml:{second}:")), "{msg}");
    assert!(
        msg.contains("port `a`.name") && msg.contains("duplicate"),
        "{msg}"
    );
}

#[test]
fn no_ports() {
    let start = BASE.find("[[port]]").unwrap();
    let end = BASE.find("[requirements]").unwrap();
    let t = format!("{}{}", &BASE[..start], &BASE[end..]);
    let msg = error_of(&t);
    assert!(msg.contains("port") && msg.contains("no ports"), "{msg}");
}

#[test]
fn unknown_field_is_named() {
    let t = with("span = \"50 mm\"", "span = \"50 mm\"\nspna = \"1 mm\"");
    let msg = error_of(&t);
    assert!(msg.contains("spna"), "{msg}");
    assert!(msg.contains(&format!(":{}:", line_of(&t, "spna"))), "{msg}");
}

#[test]
fn every_problem_is_listed_at_once() {
    let t = with("volume = \"0.2 L\"", "volume = \"0 L\"")
        .replace("gas = \"nitrogen\"", "gas = \"xenonite\"");
    let e = parse_str(&t, "bad.toml").unwrap_err();
    assert!(e.problems().len() >= 2, "{e}");
}

#[test]
fn optimiser_sections_are_checked_by_every_reader() {
    for (extra, needle) in [
        (
            "[[freedom]]\nports = [\"a\"]\nstation = [\"1 deg\", \"2 m\"]\n",
            "freedom 1.station",
        ),
        ("[[freedom]]\nports = \"a\"\n", "freedom 1.ports"),
        ("[limits]\nside_force = \"2 kg\"\n", "limits.side_force"),
        ("[limits]\nmargn = \"2 mm\"\n", "margn"),
        ("[optimize]\nseed = \"seven\"\n", "optimize.seed"),
        ("[optimize]\nthen_within = -0.5\n", "optimize.then_within"),
        ("[optimize]\ntime_limit = \"0 s\"\n", "optimize.time_limit"),
    ] {
        let t = format!("{BASE}\n{extra}");
        let msg = error_of(&t);
        assert!(msg.contains(needle), "{needle}: {msg}");
        // The line is that of the offending key (or the header for a table-wide problem).
        let key = needle.rsplit('.').next().unwrap();
        let first = BASE.lines().count() + 1;
        let line = t
            .lines()
            .enumerate()
            .skip(first)
            .find(|(_, l)| l.starts_with(key))
            .map_or(0, |(k, _)| k + 1);
        assert!(
            msg.contains(&format!("bad.toml:{line}:")),
            "{needle}: line {line}: {msg}"
        );
    }
}

#[test]
fn bare_psi_is_read_as_gauge_and_said() {
    let t = with("set_pressure = \"150 psig\"", "set_pressure = \"150 psi\"");
    let d = parse_str(&t, "ok.toml").unwrap();
    assert!(
        d.readings.iter().any(|r| r.contains("read as gauge")),
        "{:?}",
        d.readings
    );
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(256))]
    // Any byte-level corruption of a valid layout is answered with a value, not a panic.
    #[test]
    fn corrupted_layouts_never_panic(pos in 0usize..2000, junk in "\\PC{0,8}") {
        let mut t = BASE.to_string();
        let mut p = pos.min(t.len());
        while !t.is_char_boundary(p) { p -= 1; }
        t.insert_str(p, &junk);
        let _ = parse_str(&t, "fuzz.toml");
    }
}
