//! Exit codes of the real binary: 2 for bad command-line use (including a wrong
//! option value), 1 for a problem in the layout, 0 for success; and the help
//! text says so.

use std::process::{Command, Output};

const HERON: &str = "layouts/heron-54.toml";

fn portwright(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_portwright"))
        .args(args)
        .output()
        .expect("the binary runs")
}

fn code_and_error(args: &[&str]) -> (Option<i32>, String) {
    let out = portwright(args);
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// Exit 2, with every expected word in the message.
fn usage_error(args: &[&str], words: &[&str]) {
    let (code, err) = code_and_error(args);
    assert_eq!(code, Some(2), "{args:?}: {err}");
    for w in words {
        assert!(err.contains(w), "{args:?}: `{w}` missing from:\n{err}");
    }
}

#[test]
fn wrong_option_values_exit_2_naming_the_option() {
    let out = tempfile::tempdir().unwrap();
    let table_out = out.path().join("t.csv");
    let table_out = table_out.to_str().unwrap();
    let new = out.path().join("new.toml");
    let new = new.to_str().unwrap();
    usage_error(
        &["allocate", HERON, "--torque", "7,0,0"],
        &["--torque", "roll", "expected a torque"],
    );
    usage_error(
        &["allocate", HERON, "--torque", "0,0,0", "--state", "orbit"],
        &["--state", "orbit", "`liftoff`"],
    );
    usage_error(
        &[
            "allocate",
            HERON,
            "--torque",
            "0,0,0",
            "--side-force",
            "3 kg",
        ],
        &["--side-force", "expected a force"],
    );
    usage_error(
        &[
            "allocate",
            HERON,
            "--torque",
            "0,0,0",
            "--side-force",
            "-1 N",
        ],
        &["--side-force", "zero (pure couples) or more"],
    );
    usage_error(
        &["table", HERON, "--out", table_out, "--grid", "66"],
        &["--grid", "2 to 65"],
    );
    usage_error(
        &["table", HERON, "--out", table_out, "--fraction", "nan"],
        &["--fraction", "not a number"],
    );
    usage_error(
        &["table", HERON, "--out", table_out, "--state", "orbit"],
        &["--state", "orbit"],
    );
    usage_error(
        &["optimize", HERON, "--out", new, "--objective", "fastest"],
        &["--objective", "expected margin"],
    );
    usage_error(
        &["optimize", HERON, "--out", new, "--max-evals", "0"],
        &["--max-evals", "from 2"],
    );
    // The true least budget depends on the freedoms: 8 coordinates give a
    // population of 80, so 81 evaluations.
    usage_error(
        &["optimize", HERON, "--out", new, "--max-evals", "40"],
        &["--max-evals", "at least 81"],
    );
    usage_error(
        &["optimize", HERON, "--out", new, "--then-within", "2"],
        &["--then-within", "not including, 1"],
    );
    for t in ["nan", "-1 s", "inf s", "1e300 s", "2", "90000 s"] {
        usage_error(
            &["optimize", HERON, "--out", new, "--time-limit", t],
            &["--time-limit"],
        );
    }
    assert!(!std::path::Path::new(new).exists(), "nothing was written");
    assert!(
        !std::path::Path::new(table_out).exists(),
        "nothing was written"
    );
}

#[test]
fn keywords_are_case_insensitive_and_time_limits_take_units() {
    let out = tempfile::tempdir().unwrap();
    let csv = out.path().join("t.csv");
    let o = portwright(&[
        "table",
        HERON,
        "--format",
        "CSV",
        "--out",
        csv.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let new = out.path().join("new.toml");
    let o = portwright(&[
        "optimize",
        HERON,
        "--out",
        new.to_str().unwrap(),
        "--max-evals",
        "120",
        "--time-limit",
        "2 min",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
}

#[test]
fn layout_problems_exit_1_and_help_documents_the_codes() {
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("bad.toml");
    let text = std::fs::read_to_string(HERON).unwrap().replacen(
        "objective = \"margin\"",
        "objective = \"fastest\"",
        1,
    );
    std::fs::write(&bad, text).unwrap();
    // Every command reads the optimiser sections, so `analyze` refuses it too.
    let (code, err) = code_and_error(&["analyze", bad.to_str().unwrap()]);
    assert_eq!(code, Some(1), "{err}");
    assert!(err.contains("optimize.objective"), "{err}");
    let (code, _) = code_and_error(&["analyze", "no-such-file.toml"]);
    assert_eq!(code, Some(1));
    let (code, _) = code_and_error(&["analyze"]);
    assert_eq!(code, Some(2));
    let help = portwright(&["--help"]);
    let text = String::from_utf8_lossy(&help.stdout);
    assert!(help.status.success());
    for w in [
        "Exit codes:",
        "2  bad command-line use",
        "1  a problem in the layout",
        "200 characters",
    ] {
        assert!(text.contains(w), "`{w}` missing from --help:\n{text}");
    }
    let help = portwright(&["optimize", "--help"]);
    let text = String::from_utf8_lossy(&help.stdout);
    assert!(
        text.contains("Exit codes:") && text.contains("at most 24 h"),
        "{text}"
    );
}
