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

/// Awkward option values: empty, huge, non-finite, negative, wrong units, long.
const NASTY: &[&str] = &[
    "",
    "0",
    "-0",
    "-1",
    "nan",
    "inf",
    "1e308",
    "99999999999999999999999",
    "2 s",
    "-1 N",
    "3 kg",
    "0.5",
    "7,0,0",
    "0,0,0",
    "1 N m,nan N m,0",
    "margin then",
    "ratio:0",
    "liftoff",
    "CSV",
    "ring",
];

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig {
        cases: 48,
        failure_persistence: None,
        ..proptest::prelude::ProptestConfig::default()
    })]
    /// Mutated command lines end with 0, 1 or 2 and never a panic.
    #[test]
    fn mutated_command_lines_never_crash(which in 0usize..12, value in 0usize..100, long in proptest::bool::ANY) {
        let dir = tempfile::tempdir().unwrap();
        let out = dir.path().join("out");
        let out = out.to_str().unwrap().to_string();
        let v = if long { "9".repeat(5_000) } else { NASTY[value % NASTY.len()].to_string() };
        let v_len = v.len();
        let args: Vec<String> = match which {
            0 => vec!["allocate".into(), HERON.into(), "--torque".into(), v],
            1 => vec!["allocate".into(), HERON.into(), "--torque".into(), "0,0,0".into(), "--side-force".into(), v],
            2 => vec!["allocate".into(), HERON.into(), "--torque".into(), "0,0,0".into(), "--state".into(), v],
            3 => vec!["table".into(), HERON.into(), "--out".into(), out, "--grid".into(), v],
            4 => vec!["table".into(), HERON.into(), "--out".into(), out, "--fraction".into(), v],
            5 => vec!["table".into(), HERON.into(), "--out".into(), out, "--tolerance".into(), v],
            6 => vec!["table".into(), HERON.into(), "--out".into(), out, "--format".into(), v],
            7 => vec!["optimize".into(), HERON.into(), "--out".into(), out, "--max-evals".into(), "100".into(), "--time-limit".into(), v],
            8 => vec!["optimize".into(), HERON.into(), "--out".into(), out, "--max-evals".into(), v],
            9 => vec!["optimize".into(), HERON.into(), "--out".into(), out, "--max-evals".into(), "100".into(), "--then-within".into(), v],
            10 => vec!["optimize".into(), HERON.into(), "--out".into(), out, "--max-evals".into(), "100".into(), "--objective".into(), v],
            _ => vec!["optimize".into(), HERON.into(), "--out".into(), out, "--max-evals".into(), "100".into(), "--seed".into(), v],
        };
        let refs: Vec<&str> = args.iter().map(String::as_str).collect();
        let (code, err) = code_and_error(&refs);
        proptest::prop_assert!(matches!(code, Some(0..=2)), "{refs:?}: {code:?} {err}");
        proptest::prop_assert!(!err.contains("panicked"), "{refs:?}: {err}");
        // The parser may echo the value once; nothing grows faster than the input.
        proptest::prop_assert!(err.len() < 2_000 + 2 * v_len, "{refs:?}: a message of {} bytes", err.len());
        if code == Some(1) {
            // An option value is never reported as a layout problem.
            proptest::prop_assert!(!err.contains("the layout cannot be used"), "{refs:?}: {err}");
        }
    }
}

#[test]
fn problems_the_analysis_finds_are_placed_at_their_field() {
    // Every roll port cants one way, so the despin manoeuvre is impossible.
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("one-way.toml");
    let text = std::fs::read_to_string(HERON)
        .unwrap()
        .replace(
            "tangential_cant = \"-60 deg\"",
            "tangential_cant = \"60 deg\"",
        )
        .replace(
            "tangential_cant = [\"-60 deg\", \"-20 deg\"]",
            "tangential_cant = [\"20 deg\", \"60 deg\"]",
        );
    std::fs::write(&path, &text).unwrap();
    let (code, err) = code_and_error(&["analyze", path.to_str().unwrap()]);
    assert_eq!(code, Some(1), "{err}");
    let line = text[..text.find("name = \"despin").unwrap()]
        .matches('\n')
        .count();
    let place = format!(
        "{}:{line}:1: manoeuvre `despin before apogee`: ",
        path.display()
    );
    assert!(err.contains(&place), "expected `{place}` in:\n{err}");
    assert!(
        !err.contains("analysis failed") && !err.contains("gas model"),
        "{err}"
    );
}

#[test]
fn a_staged_objective_from_the_command_line_checks_the_layouts_budget() {
    // 100 evaluations suit one stage (81 needed) but not two (162).
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("small-budget.toml");
    let text =
        std::fs::read_to_string(HERON)
            .unwrap()
            .replacen("max_evals = 20000", "max_evals = 100", 1);
    std::fs::write(&path, text).unwrap();
    let out = dir.path().join("new.toml");
    let (code, err) = code_and_error(&[
        "optimize",
        path.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--objective",
        "margin then gas",
    ]);
    assert_eq!(code, Some(2), "{err}");
    assert!(err.contains("at least 162"), "{err}");
    assert!(!out.exists());
}
