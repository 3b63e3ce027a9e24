//! The `tolerance` command, the robust objective and measured ports, through the
//! real binary on the committed layouts.

use std::process::Command;

fn portwright() -> Command {
    Command::new(env!("CARGO_BIN_EXE_portwright"))
}

fn run_ok(args: &[&str]) -> String {
    let out = portwright().args(args).output().expect("binary runs");
    assert!(
        out.status.success(),
        "portwright {args:?} failed:\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).expect("utf-8 output")
}

/// No NaN, infinity or negative zero reaches a reader.
fn clean(text: &str) {
    for bad in ["NaN", "inf", "-0.0 ", "-0.00 ", "-0.000 "] {
        assert!(!text.contains(bad), "output contains `{bad}`:\n{text}");
    }
}

#[test]
fn tolerance_reports_both_demos_as_text_and_json() {
    for layout in ["layouts/heron-54.toml", "layouts/osprey-98.toml"] {
        let text = run_ok(&["tolerance", layout, "--samples", "500", "--seed", "3"]);
        clean(&text);
        for want in [
            "Chance that any margin at any flight state falls below 1",
            "cross-coupling",
            "on/off table",
            "Which tolerance matters",
            "Minimum impulse bit",
            "Safety",
        ] {
            assert!(text.contains(want), "{layout}: no `{want}`");
        }
        let json = run_ok(&[
            "tolerance",
            layout,
            "--samples",
            "500",
            "--seed",
            "3",
            "--json",
        ]);
        let v: serde_json::Value = serde_json::from_str(&json).unwrap();
        assert_eq!(v["samples"], 500);
        let st = &v["states"][0];
        assert!(st["axes"][1]["margin"]["p5"].is_number());
        assert!(st["onoff"]["rows_checked"].is_number());
        assert!(v["sensitivities"][0]["entries"][0]["variance_share"].is_number());
        // Same seed, same numbers.
        let again = run_ok(&[
            "tolerance",
            layout,
            "--samples",
            "500",
            "--seed",
            "3",
            "--json",
        ]);
        assert_eq!(json, again);
    }
}

#[test]
fn tolerance_rejects_bad_options_and_layouts_without_tolerances() {
    let out = portwright()
        .args(["tolerance", "layouts/heron-54.toml", "--samples", "1"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string("layouts/heron-54.toml").unwrap();
    let start = text.find("[tolerances]").unwrap();
    let end = text.find("# What the optimiser").unwrap();
    let path = dir.path().join("plain.toml");
    std::fs::write(&path, format!("{}{}", &text[..start], &text[end..])).unwrap();
    let out = portwright()
        .args(["tolerance", path.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("no [tolerances] section"));
    let bad = dir.path().join("bad.toml");
    std::fs::write(
        &bad,
        text.replace("clock = \"±1 deg\"", "clock = \"±1 kg\""),
    )
    .unwrap();
    let out = portwright()
        .args(["tolerance", bad.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("bad.toml:") && err.contains("tolerances.clock"),
        "{err}"
    );
}

#[test]
fn tolerance_and_run_write_the_spread_files() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("spread");
    run_ok(&[
        "tolerance",
        "layouts/heron-54.toml",
        "--samples",
        "300",
        "--out",
        out.to_str().unwrap(),
    ]);
    for f in [
        "tolerance.txt",
        "tolerance.json",
        "tolerance-shares.svg",
        "tolerance-shares.png",
        "tolerance-margins-liftoff.svg",
    ] {
        assert!(out.join(f).exists(), "{f}");
    }
    let svg = std::fs::read_to_string(out.join("tolerance-shares.svg")).unwrap();
    roxmltree::Document::parse(&svg).expect("well-formed SVG");
    let bundle = dir.path().join("run");
    let printed = run_ok(&[
        "run",
        "layouts/heron-54.toml",
        "--out",
        bundle.to_str().unwrap(),
    ]);
    assert!(printed.contains("As built (2000 sampled vehicles"));
    let html = std::fs::read_to_string(bundle.join("report.html")).unwrap();
    assert!(html.contains("As built: tolerances"));
    assert!(bundle.join("tolerance-margins-burnout.png").exists());
}

/// Worst nominal margin and the chance of a margin below 1 (seed 77, 4000 samples).
fn spread_of(layout: &str) -> (f64, f64) {
    let v: serde_json::Value = serde_json::from_str(&run_ok(&[
        "tolerance",
        layout,
        "--samples",
        "4000",
        "--seed",
        "77",
        "--json",
    ]))
    .unwrap();
    let mut worst = f64::INFINITY;
    for s in v["states"].as_array().unwrap() {
        for a in s["axes"].as_array().unwrap() {
            if let Some(m) = a["nominal_margin"].as_f64() {
                worst = worst.min(m);
            }
        }
    }
    (
        worst,
        v["probability_any_margin_below_one"].as_f64().unwrap(),
    )
}

#[test]
fn the_robust_objective_finds_a_layout_the_plain_margin_does_not() {
    // The cant-trade demo: the plain worst margin keeps the roll ports steep;
    // margin@p5 gives up nominal roll margin for pitch margin, whose spread at
    // liftoff (motor misalignment, CG) is wider. Judged on fresh samples (another
    // seed than the search used): the robust layout has the lower nominal worst
    // margin but the smaller chance of any margin below 1.
    let dir = tempfile::tempdir().unwrap();
    let plain = dir.path().join("plain.toml");
    let robust = dir.path().join("robust.toml");
    let layout = "layouts/heron-54-cant-trade.toml";
    run_ok(&[
        "optimize",
        layout,
        "--objective",
        "margin",
        "--out",
        plain.to_str().unwrap(),
    ]);
    let report = run_ok(&[
        "optimize",
        layout,
        "--objective",
        "margin@p5",
        "--out",
        robust.to_str().unwrap(),
    ]);
    assert!(report.contains("margin@p5"), "{report}");
    let (plain_nominal, plain_risk) = spread_of(plain.to_str().unwrap());
    let (robust_nominal, robust_risk) = spread_of(robust.to_str().unwrap());
    assert!(
        plain_nominal > robust_nominal + 0.1,
        "{plain_nominal} vs {robust_nominal}"
    );
    assert!(
        robust_risk < 0.75 * plain_risk,
        "{robust_risk} vs {plain_risk}"
    );
    // Osprey too (converging–diverging pitch and yaw nozzles), briefly.
    run_ok(&[
        "optimize",
        "layouts/osprey-98.toml",
        "--objective",
        "margin@p5",
        "--max-evals",
        "300",
        "--out",
        dir.path().join("osprey.toml").to_str().unwrap(),
    ]);
    // Combined with another objective it still runs.
    run_ok(&[
        "optimize",
        layout,
        "--objective",
        "margin@p5 then gas",
        "--max-evals",
        "600",
        "--out",
        dir.path().join("combined.toml").to_str().unwrap(),
    ]);
}

#[test]
fn measured_throats_work_on_osprey() {
    let text = std::fs::read_to_string("layouts/osprey-98.toml").unwrap();
    let measured = format!(
        "{text}\n[[measured]]\nport = \"pitch-pos\"\nclock = \"91 deg\"\nthroat = \"2.25 mm\"\nmass_flow = \"4 g/s\"\nsupply_pressure = \"120 psig\"\n"
    );
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("built.toml");
    std::fs::write(&path, &measured).unwrap();
    let report = run_ok(&["tolerance", path.to_str().unwrap(), "--samples", "200"]);
    clean(&report);
    assert!(report.contains("Measured against designed"), "{report}");
    assert!(report.contains("g/s measured"), "{report}");
    let wrong = measured.replace("throat = \"2.25 mm\"", "hole = \"2.25 mm\"");
    std::fs::write(&path, wrong).unwrap();
    let out = portwright()
        .args(["analyze", path.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("measured[0].hole"));
}

#[test]
fn measured_ports_reach_every_command() {
    let text = std::fs::read_to_string("layouts/heron-54.toml").unwrap();
    let measured = format!(
        "{text}\n[[measured]]\nport = \"pitch-pos\"\nstation = \"302 mm\"\nclock = \"91.5 deg\"\nhole = \"1.62 mm\"\nthrust = \"1.05 N\"\nmass_flow = \"2.3 g/s\"\nsupply_pressure = \"150 psig\"\n"
    );
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("built.toml");
    std::fs::write(&path, &measured).unwrap();
    let p = path.to_str().unwrap();
    let report = run_ok(&["tolerance", p, "--samples", "200"]);
    clean(&report);
    assert!(report.contains("Measured against designed"), "{report}");
    assert!(report.contains("measured"));
    let analysis = run_ok(&["analyze", p]);
    assert!(
        analysis.contains("as built from [[measured]]"),
        "{analysis}"
    );
    let drawn = dir.path().join("drawn.h");
    let built = dir.path().join("built.h");
    run_ok(&[
        "table",
        "layouts/heron-54.toml",
        "--format",
        "c",
        "--out",
        drawn.to_str().unwrap(),
    ]);
    run_ok(&[
        "table",
        p,
        "--format",
        "c",
        "--out",
        built.to_str().unwrap(),
    ]);
    assert_ne!(
        std::fs::read_to_string(drawn).unwrap(),
        std::fs::read_to_string(built).unwrap()
    );
}
