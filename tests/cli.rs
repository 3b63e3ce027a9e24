//! The real binary on the committed layouts, in a temporary folder.

use std::path::Path;
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

#[test]
fn analyze_prints_the_report_for_both_demos() {
    for layout in ["layouts/heron-54.toml", "layouts/osprey-98.toml"] {
        let text = run_ok(&["analyze", layout]);
        for heading in [
            "Safety",
            "Gas (",
            "Mass properties",
            "State `liftoff`",
            "State `burnout`",
            "Findings",
        ] {
            assert!(
                text.contains(heading),
                "{layout}: report lacks `{heading}`:\n{text}"
            );
        }
        assert!(text.contains("eye protection"), "cautions missing");
    }
}

#[test]
fn analyze_json_holds_the_documented_fields() {
    for layout in ["layouts/heron-54.toml", "layouts/osprey-98.toml"] {
        let text = run_ok(&["analyze", layout, "--json"]);
        let v: serde_json::Value = serde_json::from_str(&text).expect("valid JSON");
        let states = v["states"].as_array().expect("states");
        assert!(states.len() >= 2);
        for s in states {
            for f in ["cg_station_m", "mass_kg", "ixx_kg_m2", "iyy_kg_m2"] {
                assert!(
                    s["mass"][f].as_f64().is_some_and(|x| x > 0.0),
                    "{layout}: mass.{f}"
                );
            }
            for p in s["ports"].as_array().expect("ports") {
                assert!(
                    p["thrust_n"].as_f64().is_some_and(|x| x > 0.0),
                    "{layout}: thrust_n"
                );
                assert!(
                    p["mass_flow_kg_s"].as_f64().is_some_and(|x| x > 0.0),
                    "{layout}: mass_flow_kg_s"
                );
                assert!(
                    p["specific_impulse_s"].as_f64().is_some_and(|x| x > 20.0),
                    "{layout}: Isp"
                );
                assert_eq!(p["torque_n_m"].as_array().map(|a| a.len()), Some(3));
            }
            assert_eq!(s["authority"].as_array().map(|a| a.len()), Some(3));
            assert!(s["roll_to_pitch_ratio"].as_f64().is_some());
        }
        let gas = &v["gas"];
        for f in [
            "inventory_kg",
            "usable_isothermal_kg",
            "usable_adiabatic_kg",
            "total_impulse_isothermal_n_s",
        ] {
            assert!(
                gas[f].as_f64().is_some_and(|x| x > 0.0),
                "{layout}: gas.{f}"
            );
        }
        // The adiabatic bound never exceeds the isothermal one.
        assert!(gas["usable_adiabatic_kg"].as_f64() <= gas["usable_isothermal_kg"].as_f64());
        assert!(!v["cautions"].as_array().expect("cautions").is_empty());
    }
}

#[test]
fn bad_layout_exits_nonzero_naming_file_line_and_field() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("broken.toml");
    let text = std::fs::read_to_string("layouts/heron-54.toml")
        .unwrap()
        .replacen(
            "outer_diameter = \"54 mm\"",
            "outer_diameter = \"54 kg\"",
            1,
        );
    std::fs::write(&path, &text).unwrap();
    let out = portwright()
        .args(["analyze", path.to_str().unwrap()])
        .output()
        .unwrap();
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    let line = text.lines().position(|l| l.contains("\"54 kg\"")).unwrap() + 1;
    assert!(err.contains(&format!("broken.toml:{line}:")), "{err}");
    assert!(err.contains("airframe.outer_diameter"), "{err}");
    assert!(err.contains("expected a length"), "{err}");
}

#[test]
fn output_never_overwrites_the_input() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("mine.toml");
    std::fs::copy("layouts/heron-54.toml", &path).unwrap();
    let before = std::fs::read(&path).unwrap();
    let out = portwright()
        .args([
            "analyze",
            path.to_str().unwrap(),
            "--out",
            path.to_str().unwrap(),
        ])
        .output()
        .unwrap();
    assert!(
        !out.status.success(),
        "writing over the input must be refused"
    );
    assert_eq!(std::fs::read(&path).unwrap(), before, "the input changed");
    // A separate output path is written whole.
    let report = dir.path().join("report.txt");
    let out = portwright()
        .args([
            "analyze",
            path.to_str().unwrap(),
            "--out",
            report.to_str().unwrap(),
        ])
        .output()
        .unwrap();
    assert!(out.status.success());
    assert!(std::fs::read_to_string(&report)
        .unwrap()
        .contains("Findings"));
}

/// The README's quick-start and example commands run as written.
#[test]
fn readme_commands_work() {
    let readme = std::fs::read_to_string(Path::new("README.md")).unwrap();
    let mut ran = 0;
    for line in readme.lines() {
        let cmd = line.split('#').next().unwrap().trim();
        if let Some(args) = cmd.strip_prefix("cargo run --release -- ") {
            let mut args = split_args(args);
            // Commands that write files write into a temporary folder instead.
            let dir = tempfile::tempdir().unwrap();
            for flag in ["--out", "--plot"] {
                if let Some(k) = args.iter().position(|a| a == flag) {
                    args[k + 1] = dir
                        .path()
                        .join(args[k + 1].replace('/', "_"))
                        .display()
                        .to_string();
                }
            }
            let out = portwright().args(&args).output().unwrap();
            assert!(
                out.status.success(),
                "README command `{cmd}` failed:\n{}",
                String::from_utf8_lossy(&out.stderr)
            );
            ran += 1;
        }
    }
    assert!(ran >= 5, "expected the README's commands, found {ran}");
}

#[test]
fn allocate_meets_a_command_inside_the_envelope_and_saturates_outside() {
    for layout in ["layouts/heron-54.toml", "layouts/osprey-98.toml"] {
        let text = run_ok(&[
            "allocate",
            layout,
            "--torque",
            "10 mN m,20 mN m,-5 mN m",
            "--json",
        ]);
        let v: serde_json::Value = serde_json::from_str(&text).unwrap();
        let got: Vec<f64> = v["achieved_torque_n_m"]
            .as_array()
            .unwrap()
            .iter()
            .map(|x| x.as_f64().unwrap())
            .collect();
        // The allocator's equality rows hold to its primal tolerance (1e-9 relative): 1e-9 N m is ample.
        for (g, want) in got.iter().zip([0.010, 0.020, -0.005]) {
            assert!((g - want).abs() < 1e-9, "{layout}: {got:?}");
        }
        assert_eq!(v["saturated"], false);
        for d in v["duty"].as_array().unwrap() {
            let u = d["duty"].as_f64().unwrap();
            assert!((0.0..=1.0).contains(&u));
        }
        let text = run_ok(&[
            "allocate",
            layout,
            "--torque",
            "50 N m,0,0",
            "--state",
            "burnout",
            "--json",
        ]);
        let v: serde_json::Value = serde_json::from_str(&text).unwrap();
        assert_eq!(v["saturated"], true);
        assert!(v["scale"].as_f64().unwrap() < 1.0);
    }
    let out = portwright()
        .args(["allocate", "layouts/heron-54.toml", "--torque", "1 kg,0,0"])
        .output()
        .unwrap();
    assert!(!out.status.success());
    assert!(String::from_utf8_lossy(&out.stderr).contains("--torque"));
}

#[test]
fn table_writes_each_format_and_optimize_improves_the_demo() {
    let dir = tempfile::tempdir().unwrap();
    for (format, needle) in [
        ("c", "#ifndef"),
        ("csv", "[onoff]"),
        ("json", "\"regions\""),
    ] {
        let out = dir.path().join(format!("t.{format}"));
        run_ok(&[
            "table",
            "layouts/heron-54.toml",
            "--format",
            format,
            "--out",
            out.to_str().unwrap(),
            "--state",
            "burnout",
        ]);
        let text = std::fs::read_to_string(&out).unwrap();
        assert!(text.contains(needle), "{format}: {needle} missing");
        assert!(text.contains("burnout"), "{format}: flight state not named");
    }
    let new = dir.path().join("better.toml");
    let a = run_ok(&[
        "optimize",
        "layouts/heron-54.toml",
        "--out",
        new.to_str().unwrap(),
        "--seed",
        "7",
        "--json",
    ]);
    let b = run_ok(&[
        "optimize",
        "layouts/heron-54.toml",
        "--out",
        new.to_str().unwrap(),
        "--seed",
        "7",
        "--json",
    ]);
    let va: serde_json::Value = serde_json::from_str(&a).unwrap();
    let vb: serde_json::Value = serde_json::from_str(&b).unwrap();
    assert_eq!(va["after"], vb["after"], "same seed, same answer");
    assert!(
        va["worst_margin_after"].as_f64().unwrap() >= va["worst_margin_before"].as_f64().unwrap()
    );
    // The written layout keeps the user's comments and reads back.
    let text = std::fs::read_to_string(&new).unwrap();
    assert!(text.contains("# Copy this file and change the numbers"));
    run_ok(&["analyze", new.to_str().unwrap()]);
}

/// Split a shell command line on spaces, keeping "double-quoted" words together.
fn split_args(line: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut quoted = false;
    for c in line.chars() {
        match c {
            '"' => quoted = !quoted,
            ' ' if !quoted => {
                if !cur.is_empty() {
                    out.push(std::mem::take(&mut cur));
                }
            }
            _ => cur.push(c),
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

#[test]
fn optimize_matches_a_target_roll_to_pitch_ratio() {
    let dir = tempfile::tempdir().unwrap();
    let new = dir.path().join("ratio.toml");
    run_ok(&[
        "optimize",
        "layouts/heron-54.toml",
        "--out",
        new.to_str().unwrap(),
        "--objective",
        "ratio:10",
        "--max-evals",
        "6000",
    ]);
    let v: serde_json::Value =
        serde_json::from_str(&run_ok(&["analyze", new.to_str().unwrap(), "--json"])).unwrap();
    // The objective is the smallest ratio over states; the start layout has about 19.
    let ratio = v["states"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| s["roll_to_pitch_ratio"].as_f64().unwrap())
        .fold(f64::INFINITY, f64::min);
    assert!(
        (ratio / 10.0).ln().abs() < 0.1,
        "smallest roll-to-pitch ratio {ratio}, wanted 10"
    );
}

/// The Heron demo with an `[optimize]` section and a side-force limit added.
fn heron_with(extra_limits: &str, optimize: &str) -> String {
    let text = std::fs::read_to_string("layouts/heron-54.toml").unwrap();
    let text = text.replace(
        "max_cant = \"60 deg\"",
        &format!("max_cant = \"60 deg\"\n{extra_limits}"),
    );
    // Replace the demo's own `[optimize]` section (the last in the file).
    let cut = text
        .find("\n[optimize]")
        .expect("the demo has an [optimize] section");
    format!("{}\n[optimize]\n{optimize}\n", &text[..cut])
}

#[test]
fn optimize_reads_its_settings_from_the_layout() {
    let dir = tempfile::tempdir().unwrap();
    let layout = dir.path().join("heron.toml");
    std::fs::write(
        &layout,
        heron_with(
            "side_force = \"0.4 N\"",
            "objective = \"margin then gas\"\nthen_within = 0.02\nmax_evals = 4000\nseed = 3",
        ),
    )
    .unwrap();
    let new = dir.path().join("new.toml");
    let run = || {
        run_ok(&[
            "optimize",
            layout.to_str().unwrap(),
            "--out",
            new.to_str().unwrap(),
            "--json",
        ])
    };
    let v: serde_json::Value = serde_json::from_str(&run()).unwrap();
    assert_eq!(v["objective"], "margin then gas");
    assert_eq!(v["side_force_limit_n"].as_f64(), Some(0.4));
    let stages = v["stages"].as_array().unwrap();
    assert_eq!(stages.len(), 2);
    assert!(v["evaluations"].as_u64().unwrap() <= 4000);
    // The second stage keeps the margin within 2 % of the first stage's best.
    let first_best = stages[0]["best"].as_f64().unwrap();
    let margin_after = v["after"]["objective"][0].as_f64().unwrap();
    assert!(
        margin_after >= first_best - 0.02 * first_best.abs() - 1e-9,
        "{margin_after} vs {first_best}"
    );
    // The second stage's best is the gas term of the layout as written and read
    // back (a fresh analysis of the new file), to rounding.
    let gas_after = v["after"]["objective"][1].as_f64().unwrap();
    let gas_best = stages[1]["best"].as_f64().unwrap();
    assert!(
        (gas_after - gas_best).abs() <= 1e-9 * gas_best.abs(),
        "{gas_after} vs {gas_best}"
    );
    assert!(
        v["after"]["worst_margin"].as_f64().unwrap()
            >= v["before"]["worst_margin"].as_f64().unwrap()
    );
    // Every allocation for a required torque keeps the side force within the limit.
    for s in v["after"]["states"].as_array().unwrap() {
        for f in s["side_force_at_required_n"].as_array().unwrap() {
            if let Some(f) = f.as_f64() {
                assert!(f <= 0.4 * (1.0 + 1e-9) * std::f64::consts::SQRT_2, "{f}");
            }
        }
    }
    // The command line overrides the file, and the same settings give the same answer.
    let again: serde_json::Value = serde_json::from_str(&run()).unwrap();
    assert_eq!(v["after"], again["after"]);
    let text = run_ok(&[
        "optimize",
        layout.to_str().unwrap(),
        "--out",
        new.to_str().unwrap(),
        "--objective",
        "margin",
        "--side-force",
        "0 N",
        "--max-evals",
        "500",
    ]);
    assert!(text.contains("for `margin`"), "{text}");
    assert!(text.contains("pure couples only"), "{text}");
    assert!(text.contains("gas at required"), "{text}");
    assert!(text.contains("side force per torque"), "{text}");
}

#[test]
fn bad_optimizer_sections_name_file_line_column_and_field() {
    let dir = tempfile::tempdir().unwrap();
    for (limits, optimize, needle) in [
        ("", "objective = \"speed\"", "optimize.objective"),
        ("side_force = \"3 m\"", "", "limits.side_force"),
        ("", "then_within = 2.0", "optimize.then_within"),
        ("", "max_evals = 1", "optimize.max_evals"),
    ] {
        let layout = dir.path().join("bad.toml");
        let text = heron_with(limits, optimize);
        std::fs::write(&layout, &text).unwrap();
        let out = portwright()
            .args([
                "optimize",
                layout.to_str().unwrap(),
                "--out",
                dir.path().join("x.toml").to_str().unwrap(),
            ])
            .output()
            .unwrap();
        assert!(!out.status.success());
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(err.contains(needle), "{needle}: {err}");
        // file:line:col: with the line of the offending value.
        let key = needle.rsplit('.').next().unwrap();
        let line = text
            .lines()
            .position(|l| l.starts_with(key))
            .expect("the key is in the text")
            + 1;
        let place = format!("bad.toml:{line}:");
        assert!(err.contains(&place), "{needle}: expected {place} in {err}");
        assert!(!err.contains("panicked"), "{err}");
        assert!(!dir.path().join("x.toml").exists());
    }
}

#[test]
fn optimize_improves_both_demos_and_says_by_how_much() {
    let dir = tempfile::tempdir().unwrap();
    for layout in ["layouts/heron-54.toml", "layouts/osprey-98.toml"] {
        let new = dir.path().join("new.toml");
        let v: serde_json::Value = serde_json::from_str(&run_ok(&[
            "optimize",
            layout,
            "--out",
            new.to_str().unwrap(),
            "--json",
        ]))
        .unwrap();
        let (b, a) = (
            v["worst_margin_before"].as_f64().unwrap(),
            v["worst_margin_after"].as_f64().unwrap(),
        );
        // Strictly better: both demos start with room to move (common sense, the
        // starts were drawn by hand). 1 % is far above rounding.
        assert!(a > 1.01 * b, "{layout}: worst margin {b} -> {a}");
        let text = run_ok(&["optimize", layout, "--out", new.to_str().unwrap()]);
        assert!(
            text.contains(&format!("worst margin {b:.3} -> {a:.3}")),
            "{layout}: {text}"
        );
        run_ok(&["analyze", new.to_str().unwrap()]);
    }
}

/// The template alone: PDF and SVG pages at the paper's size, the print options
/// reach the pages, and a wrong option value is a command-line error.
#[test]
fn template_command_writes_pdf_and_pages_with_the_print_options() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("t");
    let o = out.to_str().unwrap();
    run_ok(&[
        "template",
        "layouts/osprey-98.toml",
        "--out",
        o,
        "--paper",
        "letter",
        "--landscape",
    ]);
    let pdf = std::fs::read(out.join("drill-template.pdf")).unwrap();
    let text = String::from_utf8_lossy(&pdf);
    // US Letter turned: 11 × 8.5 in = 792 × 612 pt.
    assert!(text.contains("/MediaBox [0 0 792 612]"), "MediaBox");
    let page = std::fs::read_to_string(out.join("drill-template-1.svg")).unwrap();
    assert!(page.contains(r#"width="279.400mm" height="215.900mm""#));
    // Letter labels stations in inches (and mm).
    assert!(page.contains("stations in inches"));
    assert!(page.contains("row 1, column 1 (of "));
    let single = dir.path().join("s");
    run_ok(&[
        "template",
        "layouts/heron-54.toml",
        "--out",
        single.to_str().unwrap(),
        "--single-sheet",
        "--ruler-unit",
        "mm",
    ]);
    assert!(single.join("drill-template-1.svg").exists());
    assert!(!single.join("drill-template-2.svg").exists());
    let bad = portwright()
        .args([
            "template",
            "layouts/heron-54.toml",
            "--out",
            o,
            "--ruler-unit",
            "cm",
        ])
        .output()
        .unwrap();
    assert_eq!(bad.status.code(), Some(2));
}

/// The file `optimize` writes is the file it checked: optimising again from it
/// starts from a layout that meets every rule, and drills read back as drills.
#[test]
fn optimize_again_from_its_own_output_starts_feasible() {
    let dir = tempfile::tempdir().unwrap();
    let first = dir.path().join("first.toml");
    let second = dir.path().join("second.toml");
    for seed in ["2", "7"] {
        let report = run_ok(&[
            "optimize",
            "layouts/heron-54.toml",
            "--out",
            first.to_str().unwrap(),
            "--seed",
            seed,
            "--max-evals",
            "600",
        ]);
        assert!(!report.contains("starting layout breaks"), "{report}");
        let again = run_ok(&[
            "optimize",
            first.to_str().unwrap(),
            "--out",
            second.to_str().unwrap(),
            "--seed",
            seed,
            "--max-evals",
            "600",
        ]);
        assert!(!again.contains("starting layout breaks"), "{again}");
        run_ok(&["analyze", second.to_str().unwrap()]);
    }
}
