//! The committed `exports/` folders are the demo layouts' current outputs.
//!
//! Refresh after an intended change with
//! `cargo run --release -- run layouts/heron-54.toml --out exports/heron-54`
//! (and the same for `osprey-98`), then review the diff.

use std::collections::BTreeSet;
use std::path::Path;
use std::process::Command;

fn names(dir: &Path) -> BTreeSet<String> {
    std::fs::read_dir(dir)
        .unwrap_or_else(|e| panic!("{}: {e}", dir.display()))
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect()
}

#[test]
fn committed_exports_are_current() {
    for demo in ["heron-54", "osprey-98"] {
        let dir = tempfile::tempdir().unwrap();
        let out = Command::new(env!("CARGO_BIN_EXE_portwright"))
            .args([
                "run",
                &format!("layouts/{demo}.toml"),
                "--out",
                dir.path().to_str().unwrap(),
            ])
            .output()
            .unwrap();
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let committed = Path::new("exports").join(demo);
        assert_eq!(
            names(dir.path()),
            names(&committed),
            "{demo}: the set of files differs"
        );
        for name in names(&committed) {
            let want = std::fs::read(committed.join(&name)).unwrap();
            let got = std::fs::read(dir.path().join(&name)).unwrap();
            if want != got {
                let hint = if name.ends_with(".png") || name.ends_with(".stl") {
                    String::new()
                } else {
                    let w = String::from_utf8_lossy(&want);
                    let g = String::from_utf8_lossy(&got);
                    let line = w
                        .lines()
                        .zip(g.lines())
                        .position(|(a, b)| a != b)
                        .unwrap_or(0);
                    format!(
                        "\nfirst difference at line {}:\n  committed: {}\n  now:       {}",
                        line + 1,
                        w.lines().nth(line).unwrap_or(""),
                        g.lines().nth(line).unwrap_or("")
                    )
                };
                panic!("exports/{demo}/{name} is out of date (refresh with `cargo run --release -- run layouts/{demo}.toml --out exports/{demo}`){hint}");
            }
        }
    }
}

/// Every STL written for the demos reads back as closed, outward-facing shells.
#[test]
fn exported_stl_files_read_back_closed() {
    use portwright::export::mesh::MeshTolerances;
    use portwright::export::stl::stl_to_mesh;
    for demo in ["heron-54", "osprey-98"] {
        for name in ["airframe.stl", "drill-axes.stl", "exhaust-markers.stl"] {
            let bytes = std::fs::read(Path::new("exports").join(demo).join(name)).unwrap();
            let mesh = stl_to_mesh(&bytes).unwrap_or_else(|e| panic!("{demo}/{name}: {e}"));
            mesh.check(&MeshTolerances::default())
                .unwrap_or_else(|e| panic!("{demo}/{name}: {e:?}"));
        }
    }
}
