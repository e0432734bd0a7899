//! Writing outputs whole or not at all: every file goes to a temporary name beside its target
//! first and is renamed only when all were written; outputs are checked for writability before
//! any computation, and existing outputs are replaced only when asked.

use std::path::{Path, PathBuf};
use thiserror::Error;

/// Why outputs could not be written.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum FileError {
    /// A directory or file could not be created or written.
    #[error("cannot write {path}: {reason}")]
    CannotWrite { path: String, reason: String },
    /// An output exists and replacing it was not asked for.
    #[error("{path} exists; replacing it must be asked for")]
    Exists { path: String },
}

/// A family id as it appears in file and folder names: no shell glob characters (`F0*` →
/// `F0-dual`).
pub fn file_stem(family: &str) -> String {
    family.replace('*', "-dual")
}

/// A file to write: its name inside the output directory (may hold subdirectories) and contents.
pub type OutputFile = (String, Vec<u8>);

/// Fails early (before any computation) when `dir` cannot be created or written.
///
/// # Errors
/// [`FileError::CannotWrite`].
pub fn ensure_writable(dir: &Path) -> Result<(), FileError> {
    let probe = dir.join(format!(".regwave-probe.{}", std::process::id()));
    std::fs::create_dir_all(dir)
        .and_then(|_| std::fs::write(&probe, b""))
        .and_then(|_| std::fs::remove_file(&probe))
        .map_err(|e| FileError::CannotWrite {
            path: format!("into {}", dir.display()),
            reason: e.to_string(),
        })
}

/// Refuses to replace existing outputs unless `replace`.
///
/// # Errors
/// [`FileError::Exists`] naming the first existing file.
pub fn refuse_existing(dir: &Path, files: &[&str], replace: bool) -> Result<(), FileError> {
    if replace {
        return Ok(());
    }
    match files.iter().find(|f| dir.join(f).exists()) {
        Some(f) => Err(FileError::Exists {
            path: dir.join(f).display().to_string(),
        }),
        None => Ok(()),
    }
}

/// Refuses to replace existing files that an earlier run of the same writer did not write,
/// unless `replace`: `manifest` (a file in `dir`, one name per line) lists what that run wrote,
/// and those files it may replace. So a re-run refreshes its own outputs and nothing else.
///
/// # Errors
/// [`FileError::Exists`] naming the first existing file not in the manifest.
pub fn refuse_foreign(
    dir: &Path,
    files: &[String],
    manifest: &str,
    replace: bool,
) -> Result<(), FileError> {
    if replace {
        return Ok(());
    }
    let owned = std::fs::read_to_string(dir.join(manifest)).unwrap_or_default();
    let owned: std::collections::HashSet<&str> = owned.lines().map(str::trim).collect();
    match files
        .iter()
        .find(|f| dir.join(f).exists() && !owned.contains(f.as_str()))
    {
        Some(f) => Err(FileError::Exists {
            path: dir.join(f).display().to_string(),
        }),
        None => Ok(()),
    }
}

/// Writes `files` into `dir` atomically as a set: all are written to temporary names first and
/// renamed only when every one was written, so a failure leaves nothing half-written.
///
/// # Errors
/// [`FileError::CannotWrite`]; the temporary files are removed.
pub fn write_all_atomic(dir: &Path, files: &[OutputFile]) -> Result<(), FileError> {
    let mut temps: Vec<(PathBuf, PathBuf)> = Vec::new();
    let cleanup = |temps: &[(PathBuf, PathBuf)]| {
        for (t, _) in temps {
            let _ = std::fs::remove_file(t);
        }
    };
    let failed = |target: &Path, e: std::io::Error| FileError::CannotWrite {
        path: target.display().to_string(),
        reason: e.to_string(),
    };
    for (name, contents) in files {
        let target = dir.join(name);
        let parent = target.parent().unwrap_or(dir).to_path_buf();
        let file = target
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default();
        let tmp = parent.join(format!(".{file}.{}.tmp", std::process::id()));
        let written = std::fs::create_dir_all(&parent).and_then(|_| std::fs::write(&tmp, contents));
        if let Err(e) = written {
            cleanup(&temps);
            let _ = std::fs::remove_file(&tmp);
            return Err(failed(&target, e));
        }
        temps.push((tmp, target));
    }
    for (k, (tmp, target)) in temps.iter().enumerate() {
        if let Err(e) = std::fs::rename(tmp, target) {
            cleanup(&temps[k..]);
            return Err(failed(target, e));
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn written_whole_or_not_at_all() {
        let dir = std::env::temp_dir().join(format!("regwave-files-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        let files = vec![
            ("a.txt".to_string(), b"one".to_vec()),
            ("sub/b.txt".to_string(), b"two".to_vec()),
        ];
        write_all_atomic(&dir, &files).unwrap();
        assert_eq!(std::fs::read(dir.join("sub/b.txt")).unwrap(), b"two");
        assert!(refuse_existing(&dir, &["a.txt"], false).is_err());
        assert!(refuse_existing(&dir, &["a.txt"], true).is_ok());
        // A file whose parent is a regular file cannot be written: nothing of the set lands.
        let bad = vec![
            ("c.txt".to_string(), b"three".to_vec()),
            ("a.txt/d.txt".to_string(), b"four".to_vec()),
        ];
        assert!(write_all_atomic(&dir, &bad).is_err());
        assert!(!dir.join("c.txt").exists());
        let leftovers = std::fs::read_dir(&dir)
            .unwrap()
            .filter(|e| {
                e.as_ref()
                    .unwrap()
                    .file_name()
                    .to_string_lossy()
                    .ends_with(".tmp")
            })
            .count();
        assert_eq!(leftovers, 0);
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
