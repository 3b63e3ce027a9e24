//! What the binary does to files: new files follow the umask, a replaced file
//! keeps its mode, a symbolic link is written through, an output that is the
//! input (or another output) is refused before anything is written, and a write
//! that fails leaves the old file as it was.

#![cfg(unix)]

use std::fs;
use std::os::unix::fs::{symlink, PermissionsExt};
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

const HERON: &str = "layouts/heron-54.toml";

fn bin() -> &'static str {
    env!("CARGO_BIN_EXE_portwright")
}

/// Run the binary under a given umask (through the shell, which sets it).
fn with_umask(umask: &str, args: &[&str]) -> Output {
    let mut line = format!("umask {umask}; exec \"$0\"");
    for k in 1..=args.len() {
        line.push_str(&format!(" \"${k}\""));
    }
    Command::new("sh")
        .arg("-c")
        .arg(line)
        .arg(bin())
        .args(args)
        .output()
        .expect("the shell runs")
}

fn run(args: &[&str]) -> Output {
    Command::new(bin()).args(args).output().expect("runs")
}

fn mode(p: &Path) -> u32 {
    fs::metadata(p).unwrap().permissions().mode() & 0o777
}

fn ok(o: &Output) {
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
}

fn s(p: &Path) -> &str {
    p.to_str().unwrap()
}

/// A copy of the demo layout in `dir`.
fn layout_in(dir: &Path) -> PathBuf {
    let p = dir.join("heron.toml");
    fs::copy(HERON, &p).unwrap();
    p
}

#[test]
fn new_files_follow_the_umask_and_replaced_files_keep_their_mode() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("table.csv");
    for (umask, want) in [("022", 0o644), ("027", 0o640), ("077", 0o600)] {
        let _ = fs::remove_file(&out);
        ok(&with_umask(
            umask,
            &["table", HERON, "--format", "csv", "--out", s(&out)],
        ));
        assert_eq!(mode(&out), want, "umask {umask}");
    }
    // Replace a file with an unusual mode: the mode stays, the content is new.
    fs::write(&out, "old").unwrap();
    fs::set_permissions(&out, fs::Permissions::from_mode(0o604)).unwrap();
    ok(&with_umask(
        "077",
        &["table", HERON, "--format", "csv", "--out", s(&out)],
    ));
    assert_eq!(mode(&out), 0o604);
    assert_ne!(fs::read_to_string(&out).unwrap(), "old");
    // No temporary file is left behind.
    let names: Vec<_> = fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().into_string().unwrap())
        .collect();
    assert_eq!(names, ["table.csv"], "{names:?}");
}

#[test]
fn in_place_through_a_symlink_writes_the_target() {
    let dir = tempfile::tempdir().unwrap();
    let real = layout_in(dir.path());
    fs::set_permissions(&real, fs::Permissions::from_mode(0o640)).unwrap();
    let link = dir.path().join("link.toml");
    symlink("heron.toml", &link).unwrap();
    let before = fs::read_to_string(&real).unwrap();
    ok(&run(&[
        "optimize",
        s(&link),
        "--in-place",
        "--max-evals",
        "200",
        "--seed",
        "2",
    ]));
    let meta = fs::symlink_metadata(&link).unwrap();
    assert!(meta.file_type().is_symlink(), "the link is still a link");
    assert_eq!(fs::read_link(&link).unwrap(), Path::new("heron.toml"));
    let after = fs::read_to_string(&real).unwrap();
    assert_ne!(before, after, "the target was rewritten");
    assert_eq!(mode(&real), 0o640, "and kept its mode");
    // A link as --out is written through too.
    let target = dir.path().join("target.toml");
    fs::write(&target, "old").unwrap();
    let out_link = dir.path().join("out-link.toml");
    symlink(&target, &out_link).unwrap();
    ok(&run(&[
        "optimize",
        s(&real),
        "--out",
        s(&out_link),
        "--max-evals",
        "200",
    ]));
    assert!(fs::symlink_metadata(&out_link)
        .unwrap()
        .file_type()
        .is_symlink());
    assert_ne!(fs::read_to_string(&target).unwrap(), "old");
}

#[test]
fn outputs_equal_to_the_input_or_each_other_are_refused_before_any_work() {
    let dir = tempfile::tempdir().unwrap();
    let layout = layout_in(dir.path());
    let before = fs::read(&layout).unwrap();
    let other = dir.path().join("new.toml");
    let link = dir.path().join("alias.toml");
    symlink(&layout, &link).unwrap();
    for (args, words) in [
        (
            vec!["optimize", s(&layout), "--out", s(&layout)],
            "is the input",
        ),
        (
            vec!["optimize", s(&layout), "--out", s(&link)],
            "is the input",
        ),
        (
            vec![
                "optimize",
                s(&layout),
                "--out",
                s(&other),
                "--plot",
                s(&other),
            ],
            "also given to --out",
        ),
        (
            vec![
                "optimize",
                s(&layout),
                "--out",
                s(&other),
                "--plot",
                s(&layout),
            ],
            "is the input",
        ),
        (
            vec!["optimize", s(&layout), "--in-place", "--plot", s(&link)],
            "is the input layout; refusing to overwrite it\n",
        ),
        (
            vec!["table", s(&layout), "--out", s(&layout)],
            "is the input",
        ),
        (
            vec!["analyze", s(&layout), "--out", s(&layout)],
            "is the input",
        ),
    ] {
        let o = run(&args);
        let err = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {err}");
        assert!(err.contains(words), "{args:?}: {err}");
        assert!(!other.exists(), "{args:?} wrote a file");
        assert_eq!(
            fs::read(&layout).unwrap(),
            before,
            "{args:?} touched the input"
        );
    }
}

#[test]
fn a_failed_write_leaves_the_old_file_intact() {
    let dir = tempfile::tempdir().unwrap();
    let locked = dir.path().join("locked");
    fs::create_dir(&locked).unwrap();
    let out = locked.join("table.csv");
    fs::write(&out, "old table").unwrap();
    fs::set_permissions(&locked, fs::Permissions::from_mode(0o555)).unwrap();
    // A privileged user can write in a read-only folder; then there is nothing to test here
    // (the write-failure path is also tested beside the writer, in src/cli/output.rs).
    let probe = locked.join("probe");
    if fs::write(&probe, "x").is_ok() {
        let _ = fs::remove_file(&probe);
        eprintln!("skipped: this user can write into a read-only folder");
    } else {
        let o = run(&["table", HERON, "--format", "csv", "--out", s(&out)]);
        assert_eq!(
            o.status.code(),
            Some(1),
            "{}",
            String::from_utf8_lossy(&o.stderr)
        );
        assert_eq!(fs::read_to_string(&out).unwrap(), "old table");
    }
    fs::set_permissions(&locked, fs::Permissions::from_mode(0o755)).unwrap();
    // The finished file cannot be moved into place over a folder: the folder stays.
    let clash = dir.path().join("clash.csv");
    fs::create_dir(&clash).unwrap();
    fs::write(clash.join("keep"), "kept").unwrap();
    let o = run(&["table", HERON, "--format", "csv", "--out", s(&clash)]);
    assert_eq!(o.status.code(), Some(1));
    assert_eq!(fs::read_to_string(clash.join("keep")).unwrap(), "kept");
    let stray: Vec<_> = fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().into_string().unwrap())
        .filter(|n| n.ends_with(".part"))
        .collect();
    assert!(stray.is_empty(), "temporary files left: {stray:?}");
}

#[test]
fn run_says_what_it_replaced_and_leaves_other_files_alone() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("bundle");
    fs::create_dir(&out).unwrap();
    fs::write(out.join("notes.txt"), "mine").unwrap();
    fs::write(out.join("analysis.txt"), "stale").unwrap();
    let o = run(&["run", HERON, "--out", s(&out)]);
    ok(&o);
    let text = String::from_utf8_lossy(&o.stdout);
    assert!(
        text.lines()
            .any(|l| l.starts_with("replaced ") && l.contains("analysis.txt")),
        "{text}"
    );
    assert!(
        text.lines()
            .any(|l| l.starts_with("wrote ") && l.contains("analysis.json")),
        "{text}"
    );
    assert_eq!(fs::read_to_string(out.join("notes.txt")).unwrap(), "mine");
    // --out naming a file is a command-line error.
    let o = run(&["run", HERON, "--out", s(&out.join("notes.txt"))]);
    assert_eq!(o.status.code(), Some(2));
}
