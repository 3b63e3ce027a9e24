//! Writing output files without ever leaving a half-written one or clobbering an input.
//!
//! Every file is written to a temporary file in the destination's folder and
//! renamed into place, so a reader sees the old file or the new one, never a
//! part. The temporary file is created with the modes a new file would get
//! (0666 less the umask); when it replaces a file, the old file's mode is kept.
//! A destination that is a symbolic link is written through: the file it points
//! to is replaced and the link stays.

use super::values::UsageError;
use anyhow::{Context, Result};
use std::io::Write;
use std::path::{Path, PathBuf};

/// What a write did.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Written {
    /// The file did not exist before.
    Created,
    /// An existing file was replaced.
    Replaced,
}

/// The file a write to `path` lands in: the final target when `path` is a
/// symbolic link (followed through any chain), else `path` itself.
pub fn destination(path: &Path) -> PathBuf {
    let is_link = std::fs::symlink_metadata(path)
        .map(|m| m.file_type().is_symlink())
        .unwrap_or(false);
    if !is_link {
        return path.to_path_buf();
    }
    if let Ok(p) = std::fs::canonicalize(path) {
        return p;
    }
    // A dangling link: write where it points, relative to the link's folder.
    let mut p = path.to_path_buf();
    for _ in 0..40 {
        match std::fs::read_link(&p) {
            Ok(target) => {
                p = match p.parent() {
                    Some(dir) if target.is_relative() => dir.join(target),
                    _ => target,
                }
            }
            Err(_) => break,
        }
    }
    p
}

/// Refuse, as a command-line error, an output path that is an input file or
/// another output of the same command. Call before any work is done.
pub fn check_distinct(outputs: &[(&str, &Path)], inputs: &[&Path]) -> Result<()> {
    for (k, (option, out)) in outputs.iter().enumerate() {
        for input in inputs {
            if same_file(out, input) {
                return Err(anyhow::Error::new(UsageError(format!(
                    "{option} {}: is the input layout; refusing to overwrite it (optimize takes --in-place for that)",
                    out.display()
                ))));
            }
        }
        for (other, path) in &outputs[..k] {
            if same_file(out, path) {
                return Err(anyhow::Error::new(UsageError(format!(
                    "{option} {}: is also given to {other}; give each output its own file",
                    out.display()
                ))));
            }
        }
    }
    Ok(())
}

/// Write `bytes` to `path` through a temporary file in the same folder, renamed into place.
/// Refuses to overwrite any path in `protected` (the inputs) unless `allow_inputs` is set.
pub fn write_atomic(
    path: &Path,
    bytes: &[u8],
    protected: &[&Path],
    allow_inputs: bool,
) -> Result<Written> {
    if !allow_inputs {
        for p in protected {
            if same_file(path, p) {
                anyhow::bail!("{}: refusing to overwrite an input file", path.display());
            }
        }
    }
    let target = destination(path);
    let dir = match target.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    std::fs::create_dir_all(&dir)
        .with_context(|| format!("{}: cannot create the folder", dir.display()))?;
    let old = std::fs::metadata(&target).ok().filter(|m| m.is_file());
    let mut builder = tempfile::Builder::new();
    builder.prefix(".portwright-").suffix(".part");
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        // 0666 less the umask, as for any new file.
        builder.permissions(std::fs::Permissions::from_mode(0o666));
    }
    let mut tmp = builder
        .tempfile_in(&dir)
        .with_context(|| format!("{}: cannot create a temporary file", dir.display()))?;
    tmp.write_all(bytes)
        .with_context(|| format!("{}: cannot write", path.display()))?;
    if let Some(m) = &old {
        std::fs::set_permissions(tmp.path(), m.permissions())
            .with_context(|| format!("{}: cannot keep the file's mode", path.display()))?;
    }
    tmp.as_file().sync_all().ok();
    tmp.persist(&target).with_context(|| {
        format!(
            "{}: cannot move the finished file into place",
            path.display()
        )
    })?;
    Ok(if old.is_some() {
        Written::Replaced
    } else {
        Written::Created
    })
}

fn same_file(a: &Path, b: &Path) -> bool {
    match (a.canonicalize(), b.canonicalize()) {
        (Ok(x), Ok(y)) => x == y,
        _ => a == b,
    }
}
