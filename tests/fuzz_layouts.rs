//! Property test: random valid and invalid layouts, made by mutating the two demo
//! layouts, never panic. Each one is either refused with a located message
//! (`file:line:column: field: ...`) or analysed, with only finite numbers in the
//! JSON and no NaN, infinity or negative zero in the text report. The library
//! entry points are those the binary calls; a handful of cases go through the
//! real binary as well, checking the exit codes (0 or 1, never a crash).
//!
//! The case count is bounded (400) so the whole file runs in seconds;
//! `PORTWRIGHT_FUZZ_CASES=20000 cargo test --test fuzz_layouts` runs a longer sweep.

use portwright::layout::{locate, parse_layout, LayoutError};
use proptest::prelude::*;
use std::process::Command;

const DEMOS: [&str; 2] = [
    include_str!("../layouts/heron-54.toml"),
    include_str!("../layouts/osprey-98.toml"),
];

/// Numbers that have broken readers before: zero and its negative, huge and
/// tiny magnitudes, words for non-finite values, integers past i64.
const NUMBERS: &[&str] = &[
    "0",
    "-0",
    "-1",
    "1e200",
    "-1e200",
    "1e-200",
    "1e308",
    "nan",
    "inf",
    "-inf",
    "123456789",
    "0.5",
    "2",
    "99999999999999999999",
];

const VALUES: &[&str] = &[
    "\"\"",
    "\"x\"",
    "3",
    "-2.5",
    "true",
    "[]",
    "[\"1 mm\", \"2 mm\"]",
    "{}",
    "nan",
    "inf",
    "\"1e999 mm\"",
    "\"0 psi\"",
    "\"-500 m\"",
    "\"200 deg\"",
];

const UNITS: &[&str] = &[
    "mm", "deg", "psig", "psi", "g", "s", "N", "N m", "kg m2", "L", "C", "rpm", "bar", "%", "",
];

/// Byte ranges of the quoted values (`= "..."`) in the text.
fn quoted_values(text: &str) -> Vec<(usize, usize)> {
    let mut out = Vec::new();
    let mut from = 0;
    while let Some(k) = text[from..].find("= \"") {
        let start = from + k + 2;
        match text[start + 1..].find('"') {
            Some(len) => {
                out.push((start, start + len + 2));
                from = start + len + 2;
            }
            None => break,
        }
    }
    out
}

/// Byte ranges of bare numbers after `= ` (counts and coefficients).
fn bare_numbers(text: &str) -> Vec<(usize, usize)> {
    let mut out = Vec::new();
    let mut offset = 0;
    for line in text.split_inclusive('\n') {
        if let Some(k) = line.find("= ") {
            let rest = &line[k + 2..];
            let len = rest
                .find(|c: char| !(c.is_ascii_digit() || matches!(c, '.' | '-' | 'e' | '+')))
                .unwrap_or(rest.len());
            if len > 0 && rest.as_bytes()[0].is_ascii_digit() {
                out.push((offset + k + 2, offset + k + 2 + len));
            }
        }
        offset += line.len();
    }
    out
}

fn pick<T: Copy>(list: &[T], k: usize) -> T {
    list[k % list.len()]
}

/// One mutation of a demo layout (several kinds; `at` and `choice` pick where and what).
fn mutate(demo: usize, kind: usize, at: usize, choice: usize, junk: &str) -> String {
    let text = DEMOS[demo % 2];
    let replace =
        |(a, b): (usize, usize), with: &str| format!("{}{with}{}", &text[..a], &text[b..]);
    match kind % 7 {
        0 => {
            // The number of a quantity.
            let values = quoted_values(text);
            let (a, b) = pick(&values, at);
            let inner = &text[a + 1..b - 1];
            let unit_at = inner
                .find(|c: char| c.is_alphabetic() || c == '%')
                .unwrap_or(inner.len());
            let new = format!("\"{}{}\"", pick(NUMBERS, choice), &inner[unit_at..]);
            replace((a, b), &format!(" {}", new.trim_start()))
        }
        1 => replace(pick(&quoted_values(text), at), pick(VALUES, choice)),
        2 => {
            // A unit swapped for another kind's.
            let (a, b) = pick(&quoted_values(text), at);
            let inner = &text[a + 1..b - 1];
            let unit_at = inner
                .find(|c: char| c.is_alphabetic() || c == '%')
                .unwrap_or(inner.len());
            let new = format!("\"{}{}\"", &inner[..unit_at], pick(UNITS, choice));
            replace((a, b), &new)
        }
        3 => {
            let lines: Vec<&str> = text.lines().collect();
            let k = at % lines.len();
            let mut out: Vec<&str> = lines.clone();
            out.remove(k);
            out.join("\n")
        }
        4 => {
            let lines: Vec<&str> = text.lines().collect();
            let k = at % lines.len();
            let mut out: Vec<&str> = lines.clone();
            out.insert(k, lines[k]);
            out.join("\n")
        }
        5 => {
            let numbers = bare_numbers(text);
            replace(pick(&numbers, at), pick(NUMBERS, choice))
        }
        _ => {
            let mut p = at % text.len();
            while !text.is_char_boundary(p) {
                p -= 1;
            }
            format!("{}{junk}{}", &text[..p], &text[p..])
        }
    }
}

/// Every line of a layout error starts `fuzz.toml:LINE:COLUMN: `.
fn assert_located(e: &LayoutError, text: &str) {
    let message = e.to_string();
    assert!(!e.problems().is_empty(), "no problems listed: {message}");
    for line in message.lines() {
        let rest = line
            .strip_prefix("fuzz.toml:")
            .unwrap_or_else(|| panic!("not located: {line}\n--- layout ---\n{text}"));
        let mut parts = rest.splitn(3, ':');
        for what in ["line", "column"] {
            let n: usize = parts
                .next()
                .and_then(|p| p.parse().ok())
                .unwrap_or_else(|| panic!("no {what} in: {line}"));
            assert!(n >= 1, "{what} 0 in: {line}");
        }
    }
    for p in e.problems() {
        assert!(
            !p.message.contains("NaN") && !p.message.contains("(supply)"),
            "{p}"
        );
    }
}

/// Nulls are allowed only where the JSON documents them: a margin with its
/// note beside it, the note of a real margin, and an absent manoeuvre list.
fn assert_finite_json(v: &serde_json::Value, path: &str, parent: Option<&serde_json::Value>) {
    match v {
        serde_json::Value::Null => {
            let key = path.rsplit('.').next().unwrap_or("");
            let ok = match key {
                "margin_note" | "manoeuvres" => true,
                "margin" => parent.is_some_and(|p| p["margin_note"] == "no requirement"),
                _ => false,
            };
            assert!(ok, "null (a non-finite number?) at {path}");
        }
        serde_json::Value::Number(n) => {
            let x = n.as_f64().expect("a number");
            assert!(x.is_finite(), "{path}: {x}");
        }
        serde_json::Value::Array(a) => {
            for (k, x) in a.iter().enumerate() {
                assert_finite_json(x, &format!("{path}[{k}]"), Some(v));
            }
        }
        serde_json::Value::Object(o) => {
            for (k, x) in o {
                assert_finite_json(x, &format!("{path}.{k}"), Some(v));
            }
        }
        _ => {}
    }
}

fn assert_clean_text(report: &str) {
    for word in report.split(|c: char| c.is_whitespace() || matches!(c, '(' | ')' | ',' | ';')) {
        assert!(
            !matches!(
                word,
                "NaN" | "inf" | "-inf" | "-0" | "-0.0" | "-0.00" | "-0.000"
            ),
            "`{word}` in the report:\n{report}"
        );
    }
}

/// What the binary does with a layout, through the library.
fn check(text: &str) {
    match parse_layout(text, "fuzz.toml") {
        Err(e) => assert_located(&e, text),
        Ok(l) => match portwright::analysis::analyze(&l.design) {
            Ok(a) => {
                let v = serde_json::to_value(&a).expect("the analysis serialises");
                assert_finite_json(&v, "", None);
                assert_clean_text(&portwright::report::render_text(&a));
            }
            Err(e) => {
                let located = locate::analysis_problem(text, "fuzz.toml", &e);
                assert_located(&located, text);
            }
        },
    }
}

#[test]
fn the_demos_pass_the_checks_unchanged() {
    for d in DEMOS {
        check(d);
    }
}

proptest! {
    #![proptest_config(ProptestConfig {
        // PORTWRIGHT_FUZZ_CASES=20000 runs a longer sweep by hand.
        cases: std::env::var("PORTWRIGHT_FUZZ_CASES")
            .ok()
            .and_then(|v| v.parse().ok())
            .unwrap_or(400),
        failure_persistence: None,
        ..ProptestConfig::default()
    })]
    #[test]
    fn mutated_layouts_are_refused_with_a_place_or_analysed_finitely(
        demo in 0usize..2,
        kind in 0usize..7,
        at in 0usize..10_000,
        choice in 0usize..100,
        junk in "\\PC{0,6}",
    ) {
        check(&mutate(demo, kind, at, choice, &junk));
    }
}

/// Layouts that once crashed or misbehaved, through the real binary: exit 0 or 1,
/// a located message on failure, never a panic.
#[test]
fn the_binary_answers_mutated_layouts_with_0_or_1() {
    let dir = tempfile::tempdir().unwrap();
    let heron = DEMOS[0];
    let cases: Vec<(String, i32)> = vec![
        (
            heron.replacen("station = \"300 mm\"", "station = \"1e200 mm\"", 1),
            1,
        ),
        (
            heron.replacen("length = \"1000 mm\"", "length = \"1e250 mm\"", 1),
            1,
        ),
        (
            heron.replacen(
                "max_evals = 20000",
                "max_evals = 20000\ntime_limit = \"nan s\"",
                1,
            ),
            1,
        ),
        (
            heron.replacen("seed = 1", "seed = 1\ntime_limit = \"1e300 s\"", 1),
            1,
        ),
        (
            heron.replacen(
                "name = \"Heron 54 (demo)\"",
                &format!("name = \"{}\"", "n".repeat(1 << 20)),
                1,
            ),
            1,
        ),
        (
            heron.replacen("objective = \"margin\"", "objective = \"fastest\"", 1),
            1,
        ),
        (heron.to_string(), 0),
    ];
    for (k, (text, want)) in cases.iter().enumerate() {
        let path = dir.path().join(format!("case-{k}.toml"));
        std::fs::write(&path, text).unwrap();
        let out = Command::new(env!("CARGO_BIN_EXE_portwright"))
            .args(["analyze", "--json"])
            .arg(&path)
            .output()
            .unwrap();
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(*want), "case {k}: {stderr}");
        if *want == 1 {
            let shown = path.display().to_string();
            assert!(
                stderr.lines().any(|l| l.starts_with(&format!("{shown}:"))),
                "case {k}: not located: {stderr}"
            );
            assert!(
                stderr.len() < 4_000,
                "case {k}: message of {} bytes",
                stderr.len()
            );
        } else {
            let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
            assert_finite_json(&v, "", None);
        }
    }
}
