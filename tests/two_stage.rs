//! Two-stage regulation read from `[feed.first_stage]`: the chain's dropout tank pressure is the
//! working set pressure plus both dropout margins (closed form), the usable gas shrinks to match,
//! and a first stage set too low is refused where it is written.

use portwright::layout::parse_str;

const HERON: &str = include_str!("../layouts/heron-54.toml");

fn with_first_stage(section: &str) -> String {
    format!("{HERON}\n[feed.first_stage]\n{section}\n")
}

#[test]
fn first_stage_adds_its_margin_to_the_dropout() {
    let one = parse_str(HERON, "one.toml").unwrap();
    let text = with_first_stage(
        "set_pressure = \"900 psig\"\ndropout_margin = \"100 psi\"\nsupply_cv = 0.6",
    );
    let two = parse_str(&text, "two.toml").unwrap();
    assert!(two.feed.first_stage.is_some());
    let b1 = portwright::analysis::feed::gas_budget(&one).unwrap();
    let b2 = portwright::analysis::feed::gas_budget(&two).unwrap();
    // 100 psi = 689 475.7 Pa more tank pressure at dropout.
    let extra = b2.end_pressure_pa - b1.end_pressure_pa;
    assert!((extra - 100.0 * 6_894.757).abs() < 1.0, "{extra}");
    assert!(b2.usable_isothermal_kg < b1.usable_isothermal_kg);
}

#[test]
fn first_stage_below_the_working_pressure_is_refused() {
    let text = with_first_stage("set_pressure = \"160 psig\"");
    let e = parse_str(&text, "t.toml").expect_err("must be refused");
    let p = e
        .problems()
        .iter()
        .find(|p| p.field == "feed.first_stage.set_pressure")
        .unwrap_or_else(|| panic!("{e}"));
    assert!(p.message.contains("at least"), "{}", p.message);
    let line = text[..text.find("set_pressure = \"160 psig\"").unwrap()]
        .matches('\n')
        .count()
        + 1;
    assert_eq!(p.line, line);
}
