//! The real binary on layouts the firmware tables once could not serve: a
//! pitch/yaw-only vehicle (committed under `tests/layouts/`), a layout with more
//! ports than any valve mask holds (generated here), large torque commands, and
//! out-of-range on/off options.

use std::path::Path;
use std::process::{Command, Output};

const PITCH_YAW: &str = "tests/layouts/plover-64-pitch-yaw.toml";

fn portwright(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_portwright"))
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .expect("binary runs")
}

fn ok(args: &[&str]) -> String {
    let out = portwright(args);
    assert!(
        out.status.success(),
        "portwright {args:?} failed:\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).expect("utf-8 output")
}

#[test]
fn pitch_yaw_vehicle_gets_tables_on_its_two_axes() {
    let dir = tempfile::tempdir().expect("temp dir");
    for (format, needle) in [
        ("c", "#define PW_BASIC_COUNT 2"),
        ("csv", "map_axes,pitch yaw"),
        ("json", "\"map_axes\": [\n    \"pitch\",\n    \"yaw\"\n  ]"),
    ] {
        let out = dir.path().join(format!("t.{format}"));
        ok(&[
            "table",
            PITCH_YAW,
            "--format",
            format,
            "--out",
            out.to_str().expect("path"),
            "--state",
            "burnout",
        ]);
        let text = std::fs::read_to_string(&out).expect("written");
        assert!(text.contains(needle), "{format}: `{needle}` missing");
    }
    let header = std::fs::read_to_string(dir.path().join("t.c")).expect("written");
    assert!(header.contains("pitch and yaw only. The ports make no roll torque"));
}

#[test]
fn run_writes_every_output_for_the_pitch_yaw_vehicle() {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = ok(&[
        "run",
        PITCH_YAW,
        "--out",
        dir.path().to_str().expect("path"),
    ]);
    assert!(!out.contains("not written"), "{out}");
    for f in [
        "analysis.txt",
        "allocation.h",
        "allocation.csv",
        "allocation.json",
        "airframe.stl",
        "drill-axes.stl",
        "exhaust-markers.stl",
        "drill-template-1.svg",
        "report.html",
    ] {
        assert!(dir.path().join(f).is_file(), "{f} missing");
    }
    let html = std::fs::read_to_string(dir.path().join("report.html")).expect("report");
    assert!(html.contains("The ports span pitch and yaw only"));
}

/// The Heron demo with `extra` more ports in rings aft of its own, so that it
/// has 8 + `extra` ports.
fn heron_with_extra_ports(extra: usize) -> String {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("layouts/heron-54.toml");
    let text = std::fs::read_to_string(path).expect("demo reads");
    // The optimiser sections name ports; they are not needed here.
    let cut = text.find("[[freedom]]").expect("demo has freedoms");
    let limits = text.find("[limits]").expect("demo has limits");
    let mut text = format!("{}{}", &text[..cut], &text[limits..]);
    let mut ports = String::new();
    for k in 0..extra {
        let station = 740 + 12 * (k / 8);
        let clock = 10 + 45 * (k % 8);
        let cant = if k % 2 == 0 { 20 } else { -20 };
        ports.push_str(&format!(
            "\n[[port]]\nname = \"extra-{k}\"\nstation = \"{station} mm\"\nclock = \"{clock} deg\"\n\
             tangential_cant = \"{cant} deg\"\nhole = \"0.5 mm\"\n"
        ));
    }
    let at = text.find("[requirements]").expect("demo has requirements");
    text.insert_str(at, &format!("{ports}\n"));
    text
}

#[test]
fn run_writes_what_it_can_beyond_the_valve_mask_limit() {
    // 66 ports: more than a 64-bit valve mask holds. `run` still writes the
    // analysis, the STL, the template, the plots and the report, names the tables
    // it could not make and says why, in the terminal and in the report.
    let dir = tempfile::tempdir().expect("temp dir");
    let layout = dir.path().join("many.toml");
    std::fs::write(&layout, heron_with_extra_ports(58)).expect("write layout");
    let out_dir = dir.path().join("out");
    let out = ok(&[
        "run",
        layout.to_str().expect("path"),
        "--out",
        out_dir.to_str().expect("path"),
    ]);
    let reason = "66 ports do not fit a 64-bit valve mask: firmware tables hold at most 64 ports";
    assert!(
        out.contains("allocation.h, allocation.csv and allocation.json not written")
            && out.contains(reason),
        "{out}"
    );
    for f in [
        "analysis.txt",
        "airframe.stl",
        "drill-template-1.svg",
        "report.html",
    ] {
        assert!(out_dir.join(f).is_file(), "{f} missing");
    }
    assert!(!out_dir.join("allocation.h").exists());
    let html = std::fs::read_to_string(out_dir.join("report.html")).expect("report");
    assert!(html.contains("Files not written") && html.contains(reason));
    // `table` on the same layout is a layout problem: exit 1 with the limit named.
    let t = portwright(&[
        "table",
        layout.to_str().expect("path"),
        "--out",
        dir.path().join("t.h").to_str().expect("path"),
    ]);
    assert_eq!(t.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&t.stderr).contains(reason));
}

#[test]
fn huge_commands_get_the_exact_scale() {
    // Along one direction (3, 4, −2) the largest attainable torque t* = |B u| is the
    // same for every command out of reach, however far out it is: 1e-9 relative,
    // the allocator's feasibility tolerance on order-one rows. The scale reported
    // is t*/|τ|, to the same tolerance. The command line takes torques up to
    // 1e5 N m (about 1e5 times this envelope); the library tests go to 1e15 times.
    let along = |k: f64| -> (f64, f64) {
        let torque = format!("{:e} N m,{:e} N m,{:e} N m", 3.0 * k, 4.0 * k, -2.0 * k);
        let v: serde_json::Value = serde_json::from_str(&ok(&[
            "allocate",
            "layouts/heron-54.toml",
            "--torque",
            &torque,
            "--json",
        ]))
        .expect("JSON");
        assert_eq!(v["saturated"], true, "{torque}");
        let got: f64 = v["achieved_torque_n_m"]
            .as_array()
            .expect("torque")
            .iter()
            .map(|x| x.as_f64().expect("number").powi(2))
            .sum::<f64>()
            .sqrt();
        (got, v["scale"].as_f64().expect("scale"))
    };
    let length = 29f64.sqrt();
    let (base, _) = along(1.0);
    for k in [1e2, 1e3, 1e4] {
        let (t, scale) = along(k);
        assert!((t - base).abs() <= 1e-9 * base, "{k:e}: {t} against {base}");
        let want = base / (k * length);
        assert!((scale - want).abs() <= 1e-9 * want, "{k:e}: scale {scale}");
    }
}

#[test]
fn onoff_options_out_of_range_are_command_line_errors() {
    for (flag, value) in [
        ("--fraction", "1.5"),
        ("--fraction", "-0.1"),
        ("--fraction", "half"),
        ("--tolerance", "-1"),
        ("--tolerance", "inf"),
    ] {
        let out = portwright(&[
            "table",
            "layouts/heron-54.toml",
            "--out",
            "never-written.h",
            flag,
            value,
        ]);
        assert_eq!(out.status.code(), Some(2), "{flag} {value}");
        assert!(String::from_utf8_lossy(&out.stderr).contains(flag));
    }
    assert!(!Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("never-written.h")
        .exists());
}
