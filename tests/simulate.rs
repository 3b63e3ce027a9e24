//! The `simulate` command through the real binary on the committed layouts:
//! the summary fields, the files, the exit codes, located layout errors, and
//! Monte Carlo results that do not depend on the thread count.

use std::process::Command;

fn portwright() -> Command {
    Command::new(env!("CARGO_BIN_EXE_portwright"))
}

fn run_ok(cmd: &mut Command) -> String {
    let out = cmd.output().expect("binary runs");
    assert!(
        out.status.success(),
        "failed:\n{}",
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
fn both_demos_simulate_every_case_with_the_summary_fields() {
    for layout in ["layouts/heron-54.toml", "layouts/osprey-98.toml"] {
        let text = run_ok(portwright().args(["simulate", layout]));
        clean(&text);
        for want in [
            "coast hold",
            "gimbal stand",
            "hold time",
            "findings",
            "pressure-vessel codes",
        ] {
            assert!(text.contains(want), "{layout}: no `{want}` in\n{text}");
        }
        let json = run_ok(portwright().args(["simulate", layout, "--json"]));
        clean(&json);
        let v: serde_json::Value = serde_json::from_str(&json).unwrap();
        let cases = v.as_array().unwrap();
        assert!(cases.len() >= 2);
        let mounts: Vec<&str> = cases.iter().map(|c| c["mount"].as_str().unwrap()).collect();
        assert!(mounts.contains(&"free flight"));
        assert!(mounts.iter().any(|m| m.contains("gimbal")));
        for c in cases {
            assert!(c["hold_time_s"].as_f64().unwrap() > 0.0);
            assert!(c["gas_used_kg"].as_f64().unwrap() > 0.0);
            for a in c["axes"].as_array().unwrap() {
                for f in [
                    "limit_cycle_amplitude_rad",
                    "limit_cycle_period_s",
                    "settling_time_s",
                    "peak_rate_rad_s",
                ] {
                    assert!(a.get(f).is_some(), "no {f}");
                }
            }
            for p in c["ports"].as_array().unwrap() {
                assert!(p["pulses"].is_number());
                assert!(p["on_time_s"].is_number());
                assert!(p.get("shortest_pulse_s").is_some());
            }
        }
    }
}

#[test]
fn out_writes_csv_json_text_and_plots() {
    let dir = tempfile::tempdir().unwrap();
    run_ok(portwright().args([
        "simulate",
        "layouts/heron-54.toml",
        "--case",
        "gimbal stand",
        "--out",
        dir.path().to_str().unwrap(),
    ]));
    let csv = std::fs::read_to_string(dir.path().join("sim-gimbal-stand.csv")).unwrap();
    let header = csv.lines().next().unwrap();
    assert!(header.starts_with("time_s,roll_error_rad,"));
    assert!(header.contains("tank_pressure_pa_abs"));
    assert!(header.contains("thrust_pitch-pos_n"));
    let cols = header.split(',').count();
    assert!(csv.lines().skip(1).all(|l| l.split(',').count() == cols));
    for f in [
        "sim-gimbal-stand.json",
        "sim-gimbal-stand.txt",
        "sim-gimbal-stand-error.svg",
        "sim-gimbal-stand-rate.svg",
        "sim-gimbal-stand-valves-1.svg",
        "sim-gimbal-stand-tank-pressure.svg",
        "sim-gimbal-stand-tank-temperature.svg",
        "sim-gimbal-stand-gas.svg",
        "sim-gimbal-stand-thrust-1.svg",
    ] {
        assert!(dir.path().join(f).exists(), "{f} not written");
    }
    assert!(!dir.path().join("sim-coast-hold.csv").exists());
}

#[test]
fn an_unknown_case_is_a_usage_error() {
    let out = portwright()
        .args(["simulate", "layouts/heron-54.toml", "--case", "no such"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("coast hold"), "{err}");
}

#[test]
fn a_bad_case_field_is_located() {
    let text = std::fs::read_to_string("layouts/heron-54.toml").unwrap();
    let bad = text.replacen("duration = \"30 s\"", "duration = \"30 kg\"", 1);
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("bad.toml");
    std::fs::write(&path, &bad).unwrap();
    let line = bad
        .lines()
        .position(|l| l.starts_with("duration = \"30 kg\""))
        .unwrap()
        + 1;
    let out = portwright()
        .args(["simulate", path.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains(&format!("bad.toml:{line}:12: case `coast hold`.duration")),
        "{err}"
    );
    // An unknown field names its place too.
    let bad = text.replacen(
        "pointing = \"3 deg\"",
        "pointing = \"3 deg\"\npointin = 2",
        1,
    );
    std::fs::write(&path, &bad).unwrap();
    let out = portwright()
        .args(["simulate", path.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("pointin"));
}

#[test]
fn monte_carlo_is_the_same_on_one_thread_and_two() {
    let args = [
        "simulate",
        "layouts/heron-54.toml",
        "--case",
        "coast hold",
        "--runs",
        "4",
        "--seed",
        "5",
        "--json",
    ];
    let one = run_ok(portwright().env("RAYON_NUM_THREADS", "1").args(args));
    let two = run_ok(portwright().env("RAYON_NUM_THREADS", "2").args(args));
    assert_eq!(one, two);
    let v: serde_json::Value = serde_json::from_str(&one).unwrap();
    let mc = &v[0]["monte_carlo"];
    assert_eq!(mc["runs"], 4);
    let hold = mc["figures"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["figure"] == "hold_time_s")
        .unwrap();
    assert!(hold["p5"].as_f64().unwrap() <= hold["p95"].as_f64().unwrap());
}
