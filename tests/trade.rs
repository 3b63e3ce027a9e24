//! `portwright trade` as a user runs it: both demo layouts with the demo parts
//! file, JSON with finite numbers only, files written, and located errors with
//! the right exit codes.

use std::process::Command;

fn portwright() -> Command {
    Command::new(env!("CARGO_BIN_EXE_portwright"))
}

fn run(args: &[&str]) -> (i32, String, String) {
    let out = portwright().args(args).output().expect("binary runs");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn finite_numbers_only(v: &serde_json::Value, path: &str) {
    match v {
        serde_json::Value::Number(n) => {
            let x = n.as_f64().expect("a number");
            assert!(x.is_finite(), "{path}: {x}");
            assert!(!(x == 0.0 && x.is_sign_negative()), "{path}: negative zero");
        }
        serde_json::Value::Array(a) => a
            .iter()
            .enumerate()
            .for_each(|(k, x)| finite_numbers_only(x, &format!("{path}[{k}]"))),
        serde_json::Value::Object(o) => o
            .iter()
            .for_each(|(k, x)| finite_numbers_only(x, &format!("{path}.{k}"))),
        _ => {}
    }
}

#[test]
fn trade_on_both_demos_prints_the_pareto_set_and_json() {
    let mut heron_json = None;
    for layout in ["layouts/heron-54.toml", "layouts/osprey-98.toml"] {
        let (code, text, err) = run(&["trade", layout, "--parts", "layouts/parts-demo.toml"]);
        assert_eq!(code, 0, "{layout}: {err}");
        for part in [
            "Trade study:",
            "Rules broken",
            "Lightest combination meeting every requirement",
            "Pareto set (",
            "What would it take",
            "hold time: not computed",
            "pressure-vessel codes",
        ] {
            assert!(text.contains(part), "{layout}: no `{part}` in\n{text}");
        }
        assert!(!text.contains("NaN") && !text.contains("inf") && !text.contains("-0.0"));
        let (code, json, err) = run(&["trade", layout, "--json"]);
        assert_eq!(code, 0, "{layout}: {err}");
        let v: serde_json::Value = serde_json::from_str(&json).expect("JSON");
        finite_numbers_only(&v, "trade");
        assert_eq!(v["combinations"], 1152);
        assert!(!v["pareto"].as_array().unwrap().is_empty());
        assert_eq!(v["what_it_takes"].as_array().unwrap().len(), 5);
        if layout.contains("heron") {
            heron_json = Some(v);
        }
    }
    // Heron has a lightest combination meeting every requirement.
    let v = heron_json.expect("heron ran");
    assert!(v["lightest"]["metrics"]["meets_requirements"]
        .as_bool()
        .unwrap());
}

#[test]
fn trade_writes_its_report_and_plots() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().to_str().unwrap();
    let (code, _, err) = run(&["trade", "layouts/heron-54.toml", "--out", out]);
    assert_eq!(code, 0, "{err}");
    for f in [
        "trade.txt",
        "trade.json",
        "trade-pareto.svg",
        "trade-pareto.png",
        "trade-sweep-valve-cv.svg",
        "trade-sweep-set-pressure.png",
        "trade-sweep-tank-volume.svg",
        "trade-sweep-hole-size-of-pitch-yaw.svg",
    ] {
        let p = dir.path().join(f);
        assert!(
            p.metadata().map(|m| m.len() > 100).unwrap_or(false),
            "{f} missing"
        );
    }
    let svg = std::fs::read_to_string(dir.path().join("trade-pareto.svg")).unwrap();
    assert!(svg.contains("Pareto set") && svg.contains("lightest meeting all"));
}

#[test]
fn bad_parts_files_are_located_and_exit_1() {
    let dir = tempfile::tempdir().unwrap();
    let parts = std::fs::read_to_string("layouts/parts-demo.toml").unwrap();
    let bad = parts.replacen("mass = \"18 g\"", "mass = \"18 psi\"", 1);
    let p = dir.path().join("bad-parts.toml");
    std::fs::write(&p, &bad).unwrap();
    let line = bad.lines().position(|l| l.contains("18 psi")).unwrap() + 1;
    let (code, _, err) = run(&[
        "trade",
        "layouts/heron-54.toml",
        "--parts",
        p.to_str().unwrap(),
    ]);
    assert_eq!(code, 1, "{err}");
    assert!(
        err.contains(&format!(
            "bad-parts.toml:{line}:8: valve `SV-mini`.mass: expected a mass"
        )),
        "{err}"
    );
    let (code, _, err) = run(&[
        "trade",
        "layouts/heron-54.toml",
        "--parts",
        "no/such/parts.toml",
    ]);
    assert_eq!(code, 1);
    assert!(err.contains("no/such/parts.toml"), "{err}");
}

#[test]
fn a_layout_without_parts_section_or_file_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let heron = std::fs::read_to_string("layouts/heron-54.toml").unwrap();
    let cut = heron.split("\n[parts]").next().unwrap().to_string();
    let p = dir.path().join("no-parts.toml");
    std::fs::write(&p, &cut).unwrap();
    let (code, _, err) = run(&[
        "trade",
        p.to_str().unwrap(),
        "--parts",
        "layouts/parts-demo.toml",
    ]);
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("no [parts] section"), "{err}");
    // A [parts] section without `file` and no --parts: a command-line problem.
    let nofile = heron.replacen("file = \"parts-demo.toml\"", "", 1);
    let p = dir.path().join("no-file.toml");
    std::fs::write(&p, &nofile).unwrap();
    let (code, _, err) = run(&["trade", p.to_str().unwrap()]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("--parts"), "{err}");
}

/// `--hold-case` naming no `[[case]]` of the layout is a command-line problem,
/// refused before any combination is evaluated, with the cases the layout has.
#[test]
fn an_unknown_hold_case_exits_2_and_names_the_cases() {
    let (code, _, err) = run(&["trade", "layouts/heron-54.toml", "--hold-case", "nope"]);
    assert_eq!(code, 2, "{err}");
    assert!(
        err.contains("--hold-case \"nope\"") && err.contains("`coast hold`"),
        "{err}"
    );
}
