//! Writing output files without ever leaving a half-written one or clobbering an input.

use anyhow::{bail, Context, Result};
use std::io::Write;
use std::path::Path;

/// Write `bytes` to `path` through a temporary file in the same folder, renamed into place.
/// Refuses to overwrite any path in `protected` (the inputs) unless `allow_inputs` is set.
pub fn write_atomic(
    path: &Path,
    bytes: &[u8],
    protected: &[&Path],
    allow_inputs: bool,
) -> Result<()> {
    if !allow_inputs {
        for p in protected {
            if same_file(path, p) {
                bail!("{}: refusing to overwrite an input file", path.display());
            }
        }
    }
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    std::fs::create_dir_all(dir)
        .with_context(|| format!("{}: cannot create the folder", dir.display()))?;
    let mut tmp = tempfile::NamedTempFile::new_in(dir)
        .with_context(|| format!("{}: cannot create a temporary file", dir.display()))?;
    tmp.write_all(bytes)
        .with_context(|| format!("{}: cannot write", path.display()))?;
    tmp.as_file().sync_all().ok();
    tmp.persist(path).with_context(|| {
        format!(
            "{}: cannot move the finished file into place",
            path.display()
        )
    })?;
    Ok(())
}

fn same_file(a: &Path, b: &Path) -> bool {
    match (a.canonicalize(), b.canonicalize()) {
        (Ok(x), Ok(y)) => x == y,
        _ => a == b,
    }
}
