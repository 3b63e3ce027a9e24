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
                let hint = if *option == "--out" {
                    " (optimize takes --in-place for that)"
                } else {
                    ""
                };
                return Err(anyhow::Error::new(UsageError(format!(
                    "{option} {}: is the input layout; refusing to overwrite it{hint}",
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
    write_atomic_with(path, protected, allow_inputs, |w| w.write_all(bytes))
}

/// [`write_atomic`] with the content written by `fill`; when `fill` fails part
/// way, the temporary file is removed and the old file is left as it was.
pub fn write_atomic_with(
    path: &Path,
    protected: &[&Path],
    allow_inputs: bool,
    fill: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
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
    fill(tmp.as_file_mut()).with_context(|| format!("{}: cannot write", path.display()))?;
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_write_that_fails_half_way_leaves_the_old_file_and_no_temporary() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("out.txt");
        std::fs::write(&path, "old").unwrap();
        let r = write_atomic_with(&path, &[], false, |w| {
            w.write_all(b"half of the new")?;
            Err(std::io::Error::other("serialisation failed"))
        });
        assert!(r.is_err());
        assert_eq!(std::fs::read_to_string(&path).unwrap(), "old");
        let names: Vec<_> = std::fs::read_dir(dir.path())
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(names.len(), 1, "{names:?}");
        assert_eq!(
            write_atomic(&path, b"new", &[], false).unwrap(),
            Written::Replaced
        );
        assert_eq!(std::fs::read_to_string(&path).unwrap(), "new");
    }
}
