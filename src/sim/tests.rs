//! Whole-loop checks on the demo layouts and against textbook limit-cycle formulas.

use super::*;
use crate::analysis::analyze;

fn demo(text: &str, name: &str) -> (Design, Analysis, Vec<Case>) {
    let design = crate::layout::parse_str(text, name).unwrap();
    let analysis = analyze(&design).unwrap();
    let cases = crate::layout::case_sections(text, name, &design).unwrap();
    (design, analysis, cases)
}

#[test]
fn demo_cases_run_and_hold() {
    for (text, name) in [
        (include_str!("../../layouts/heron-54.toml"), "heron-54.toml"),
        (
            include_str!("../../layouts/osprey-98.toml"),
            "osprey-98.toml",
        ),
    ] {
        let (design, analysis, cases) = demo(text, name);
        assert!(cases.len() >= 2);
        for case in &cases {
            let r = simulate(&design, &analysis, case, &Settings::default()).unwrap();
            eprintln!("{name} {}: {:#?}", case.name, r.findings);
            assert!(r.stopped.is_none(), "{:?}", r.stopped);
            assert!(r.gas_used_kg > 0.0);
            assert!(r.hold_time_s > 0.0, "{}: {}", case.name, r.hold_end);
        }
    }
}
