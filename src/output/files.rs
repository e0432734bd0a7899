//! Writing outputs whole or not at all.
//!
//! A [`Destination`] is prepared before any computation: the output directory, or the nearest
//! of its ancestors that exists, must be writable (tested with a probe file; nothing is created
//! yet), and no output name may exist — tested without following symlinks, so a dangling link
//! counts — unless [`Replace`] allows it.
//!
//! [`Destination::write`] then writes every file of the result into a hidden staging folder
//! inside the output directory (`.regwave-staging.PID.N`), re-checks that no output name
//! appeared since the destination was prepared (a file created during a long run is not
//! replaced unless everything may be), and moves the set in file by file: an existing file is
//! first moved aside into the staging folder, then the new one into its place. If a move fails,
//! the files already moved in are removed and the old ones moved back, so the old set is left
//! byte for byte; on success the staging folder, with the old files, is deleted. The folders
//! the write created are removed again on failure. Each move is a rename within one directory
//! tree (atomic on POSIX file systems); a reader watching during the moves may see a mix, but
//! no failure and no interrupt leaves one.
//!
//! Interrupts: writes hold a process-wide gate; [`try_stop_writing`] (for a signal handler)
//! succeeds only while no write is under way, and closes the gate for good, so a process that
//! exits after it leaves either the complete new set or the complete old one and no staging
//! folder. The staging folder is also removed when a write unwinds.

use std::collections::HashSet;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::{Mutex, MutexGuard};
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

/// Which existing outputs may be replaced.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Replace {
    /// None: an existing output is refused.
    Nothing,
    /// Those listed in a manifest (a file in the output directory, one name per line) that an
    /// earlier run of the same writer wrote: a re-run refreshes its own outputs and nothing else.
    Listed(String),
    /// All of them.
    Everything,
}

impl Replace {
    /// [`Replace::Everything`] when replacing was asked for, else [`Replace::Nothing`].
    pub fn asked(replace: bool) -> Self {
        if replace {
            Replace::Everything
        } else {
            Replace::Nothing
        }
    }
}

/// An output directory checked before computing, to write one result into.
#[derive(Debug, Clone)]
pub struct Destination {
    dir: PathBuf,
    replace: Replace,
    /// Outputs that existed when the destination was prepared and may be replaced.
    replaceable: HashSet<String>,
}

/// Whether anything (a file, a folder, a symlink even if dangling) is at `path`.
fn occupied(path: &Path) -> bool {
    std::fs::symlink_metadata(path).is_ok()
}

fn cannot_write(path: &Path, e: impl std::fmt::Display) -> FileError {
    FileError::CannotWrite {
        path: path.display().to_string(),
        reason: e.to_string(),
    }
}

impl Destination {
    /// Checks, before any computation, that `dir` can be written and that none of `names`
    /// exists there unless `replace` allows it; remembers which may be replaced.
    ///
    /// # Errors
    /// [`FileError::CannotWrite`]; [`FileError::Exists`] naming the first refused output.
    pub fn prepare<S: AsRef<str>>(
        dir: &Path,
        names: &[S],
        replace: Replace,
    ) -> Result<Self, FileError> {
        check_writable(dir)?;
        let listed: HashSet<String> = match &replace {
            Replace::Listed(manifest) => std::fs::read_to_string(dir.join(manifest))
                .unwrap_or_default()
                .lines()
                .map(|l| l.trim().to_string())
                .filter(|l| !l.is_empty())
                .collect(),
            _ => HashSet::new(),
        };
        let mut destination = Destination {
            dir: dir.to_path_buf(),
            replace,
            replaceable: HashSet::new(),
        };
        let existing = |name: &String| occupied(&dir.join(name));
        destination
            .replaceable
            .extend(listed.iter().filter(|n| existing(n)).cloned());
        destination.refuse_unknown(names.iter().map(AsRef::as_ref))?;
        destination.replaceable.extend(
            names
                .iter()
                .map(|n| n.as_ref().to_string())
                .filter(existing),
        );
        Ok(destination)
    }

    /// The output directory.
    pub fn dir(&self) -> &Path {
        &self.dir
    }

    /// Refuses the first of `names` that exists and may not be replaced.
    fn refuse_unknown<'a>(
        &self,
        mut names: impl Iterator<Item = &'a str>,
    ) -> Result<(), FileError> {
        if self.replace == Replace::Everything {
            return Ok(());
        }
        match names.find(|n| !self.replaceable.contains(*n) && occupied(&self.dir.join(n))) {
            Some(n) => Err(FileError::Exists {
                path: self.dir.join(n).display().to_string(),
            }),
            None => Ok(()),
        }
    }

    /// Writes `files` into the directory whole or not at all (see the module documentation).
    ///
    /// # Errors
    /// [`FileError::Exists`] for an output that appeared since [`Destination::prepare`];
    /// [`FileError::CannotWrite`] when a file could not be written or moved (the old set is
    /// left intact), or when writing was stopped ([`try_stop_writing`]).
    pub fn write(&self, files: &[OutputFile]) -> Result<(), FileError> {
        let gate = GATE
            .enter()
            .ok_or_else(|| cannot_write(&self.dir, STOPPED))?;
        let created = create_missing(&self.dir)?;
        let staging = Staging(self.dir.join(format!(
            ".regwave-staging.{}.{}",
            std::process::id(),
            STAGED.fetch_add(1, Ordering::SeqCst)
        )));
        let result = stage(&staging.0, files)
            .and_then(|_| self.refuse_unknown(files.iter().map(|f| f.0.as_str())))
            .map_err(|error| Unmoved {
                error,
                restored: true,
            })
            .and_then(|_| move_in(&self.dir, &staging.0, files));
        match result {
            Ok(()) => Ok(()),
            Err(Unmoved {
                error,
                restored: false,
            }) => {
                // The old files that could not be moved back stay in the staging folder, which
                // the error names.
                std::mem::forget(staging);
                Err(error)
            }
            Err(Unmoved { error, .. }) => {
                drop(staging);
                remove_empty(&created);
                drop(gate);
                Err(error)
            }
        }
    }
}

/// The reason given for writes refused after [`try_stop_writing`].
const STOPPED: &str = "writing was stopped by a signal";

/// Staging folders made by this process so far (their names are unique within it).
static STAGED: AtomicUsize = AtomicUsize::new(0);

/// The staging folder of a write, removed when dropped (also when a write unwinds).
struct Staging(PathBuf);

impl Drop for Staging {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

/// A failed write, and whether the old files are back in place.
struct Unmoved {
    error: FileError,
    restored: bool,
}

/// Writes every file below `staging/new`.
fn stage(staging: &Path, files: &[OutputFile]) -> Result<(), FileError> {
    for (name, contents) in files {
        let path = staging.join("new").join(name);
        path.parent()
            .map_or(Ok(()), std::fs::create_dir_all)
            .and_then(|_| std::fs::write(&path, contents))
            .map_err(|e| cannot_write(&path, e))?;
    }
    Ok(())
}

/// One output moved into place: the old file moved aside, if there was one, and the folders
/// created for it.
struct Moved {
    target: PathBuf,
    aside: Option<PathBuf>,
    created: Vec<PathBuf>,
}

impl Moved {
    /// Removes the new file and puts the old one back.
    fn undo(&self, new_in_place: bool) -> std::io::Result<()> {
        if new_in_place {
            std::fs::remove_file(&self.target)?;
        }
        if let Some(aside) = &self.aside {
            std::fs::rename(aside, &self.target)?;
        }
        remove_empty(&self.created);
        Ok(())
    }
}

/// Moves the staged files into `dir`, rolling back every move when one fails.
fn move_in(dir: &Path, staging: &Path, files: &[OutputFile]) -> Result<(), Unmoved> {
    let mut done: Vec<Moved> = Vec::new();
    for (name, _) in files {
        let target = dir.join(name);
        let mut moved = Moved {
            target: target.clone(),
            aside: None,
            created: Vec::new(),
        };
        let step = (|| {
            if occupied(&target) {
                let aside = staging.join("old").join(name);
                if let Some(parent) = aside.parent() {
                    std::fs::create_dir_all(parent)?;
                }
                std::fs::rename(&target, &aside)?;
                moved.aside = Some(aside);
            }
            if let Some(parent) = target.parent() {
                moved.created = create_missing(parent).map_err(std::io::Error::other)?;
            }
            std::fs::rename(staging.join("new").join(name), &target)
        })();
        if let Err(e) = step {
            // Every undo is tried, even after one failed.
            let undone: Vec<std::io::Result<()>> = std::iter::once(moved.undo(false))
                .chain(done.iter().rev().map(|m| m.undo(true)))
                .collect();
            return Err(match undone.into_iter().find_map(Result::err) {
                None => Unmoved {
                    error: cannot_write(&target, e),
                    restored: true,
                },
                Some(r) => Unmoved {
                    error: cannot_write(
                        &target,
                        format!(
                            "{e}; restoring the old files failed ({r}): they are in {}",
                            staging.join("old").display()
                        ),
                    ),
                    restored: false,
                },
            });
        }
        done.push(moved);
    }
    Ok(())
}

/// Creates `dir` and its missing ancestors; returns those it created, deepest first.
fn create_missing(dir: &Path) -> Result<Vec<PathBuf>, FileError> {
    let missing: Vec<PathBuf> = dir
        .ancestors()
        .take_while(|a| !a.as_os_str().is_empty() && !occupied(a))
        .map(Path::to_path_buf)
        .collect();
    std::fs::create_dir_all(dir).map_err(|e| cannot_write(dir, e))?;
    Ok(missing)
}

/// Removes the given folders, deepest first, where they are empty.
fn remove_empty(dirs: &[PathBuf]) {
    for d in dirs {
        let _ = std::fs::remove_dir(d);
    }
}

/// Fails early (before any computation) when `dir` could not be created or written: probes the
/// nearest existing ancestor without creating anything.
fn check_writable(dir: &Path) -> Result<(), FileError> {
    let refused = |e: &dyn std::fmt::Display| FileError::CannotWrite {
        path: format!("into {}", dir.display()),
        reason: e.to_string(),
    };
    let base = dir
        .ancestors()
        .find(|a| a.as_os_str().is_empty() || a.exists())
        .map(|a| {
            if a.as_os_str().is_empty() {
                Path::new(".")
            } else {
                a
            }
        })
        .unwrap_or(Path::new("."));
    if !base.is_dir() {
        return Err(refused(&format!("{} is not a directory", base.display())));
    }
    let _gate = GATE.enter().ok_or_else(|| refused(&STOPPED))?;
    let probe = base.join(format!(".regwave-probe.{}", std::process::id()));
    std::fs::OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&probe)
        .and_then(|_| std::fs::remove_file(&probe))
        .map_err(|e| refused(&e))
}

/// Admits writes one at a time until it is closed.
struct Gate {
    closed: Mutex<bool>,
}

impl Gate {
    const fn new() -> Self {
        Gate {
            closed: Mutex::new(false),
        }
    }

    /// Waits for the write under way, if any; `None` once closed.
    fn enter(&self) -> Option<MutexGuard<'_, bool>> {
        let guard = self.closed.lock().unwrap_or_else(|e| e.into_inner());
        (!*guard).then_some(guard)
    }

    /// Closes the gate unless a write is under way; true when closed.
    fn try_close(&self) -> bool {
        let mut guard = match self.closed.try_lock() {
            Ok(g) => g,
            Err(std::sync::TryLockError::Poisoned(e)) => e.into_inner(),
            Err(std::sync::TryLockError::WouldBlock) => return false,
        };
        *guard = true;
        true
    }
}

/// The gate of every write of this process.
static GATE: Gate = Gate::new();

/// Stops all writing of this process, for a signal handler before it exits: returns false while
/// a set of outputs is being written (retry shortly: the write completes or rolls back), true
/// once no write is under way; every later write is refused. No staging folder is left then.
pub fn try_stop_writing() -> bool {
    GATE.try_close()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn fresh(tag: &str) -> PathBuf {
        let dir = std::env::temp_dir().join(format!("regwave-files-{tag}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        dir
    }

    /// Every entry below `dir` (hidden ones included), with the bytes of files and the targets
    /// of symlinks.
    fn snapshot(dir: &Path) -> Vec<(PathBuf, Vec<u8>)> {
        let mut out = Vec::new();
        let mut stack = vec![dir.to_path_buf()];
        while let Some(d) = stack.pop() {
            for e in std::fs::read_dir(&d).unwrap() {
                let p = e.unwrap().path();
                let meta = std::fs::symlink_metadata(&p).unwrap();
                let bytes = if meta.is_symlink() {
                    std::fs::read_link(&p)
                        .unwrap()
                        .into_os_string()
                        .into_encoded_bytes()
                } else if meta.is_dir() {
                    stack.push(p.clone());
                    b"<dir>".to_vec()
                } else {
                    std::fs::read(&p).unwrap()
                };
                out.push((p.strip_prefix(dir).unwrap().to_path_buf(), bytes));
            }
        }
        out.sort();
        out
    }

    fn set(names: &[&str], contents: &str) -> Vec<OutputFile> {
        names
            .iter()
            .map(|n| (n.to_string(), format!("{contents} {n}").into_bytes()))
            .collect()
    }

    #[test]
    fn written_whole_into_new_folders() {
        let dir = fresh("whole").join("deeper/out");
        let files = set(&["a.txt", "sub/b.txt"], "new");
        let dest = Destination::prepare(&dir, &["a.txt", "sub/b.txt"], Replace::Nothing).unwrap();
        assert!(!dir.exists(), "preparing creates nothing");
        dest.write(&files).unwrap();
        assert_eq!(
            std::fs::read(dir.join("sub/b.txt")).unwrap(),
            b"new sub/b.txt"
        );
        let names: Vec<PathBuf> = snapshot(&dir).into_iter().map(|e| e.0).collect();
        assert_eq!(names, ["a.txt", "sub", "sub/b.txt"].map(PathBuf::from));
        std::fs::remove_dir_all(dir.parent().unwrap().parent().unwrap()).unwrap();
    }

    /// A move that fails at the k-th file (its parent is a regular file) leaves the old set byte
    /// for byte, no staging folder and no new folder; the same set without the obstacle is
    /// written (the snapshot sees the change).
    #[test]
    fn a_failed_move_leaves_the_old_set_intact() {
        for k in 0..4 {
            let dir = fresh(&format!("rollback-{k}"));
            let mut names = vec!["a.txt", "new/c.txt", "b.txt"];
            names.insert(k, "blocker/x.txt");
            Destination::prepare(&dir, &["a.txt", "b.txt"], Replace::Nothing)
                .unwrap()
                .write(&set(&["a.txt", "b.txt"], "old"))
                .unwrap();
            std::fs::write(dir.join("blocker"), b"a regular file").unwrap();
            let before = snapshot(&dir);
            let dest = Destination::prepare(&dir, &names, Replace::Everything).unwrap();
            let e = dest.write(&set(&names, "new")).unwrap_err();
            assert!(e.to_string().contains("blocker"), "{e}");
            assert_eq!(snapshot(&dir), before, "failure at move {k}");
            std::fs::remove_file(dir.join("blocker")).unwrap();
            dest.write(&set(&names, "new")).unwrap();
            let after = snapshot(&dir);
            assert_ne!(after, before);
            assert_eq!(std::fs::read(dir.join("a.txt")).unwrap(), b"new a.txt");
            assert!(after
                .iter()
                .all(|e| !e.0.to_string_lossy().starts_with('.')));
            std::fs::remove_dir_all(&dir).unwrap();
        }
    }

    #[cfg(unix)]
    #[test]
    fn a_dangling_symlink_counts_as_existing() {
        let dir = fresh("symlink");
        let nowhere = dir.join("nowhere");
        std::os::unix::fs::symlink(&nowhere, dir.join("psi.csv")).unwrap();
        let e = Destination::prepare(&dir, &["psi.csv", "psi.json"], Replace::Nothing);
        assert!(matches!(e, Err(FileError::Exists { path }) if path.ends_with("psi.csv")));
        // Without the link the same names are accepted; with replacing asked for, the link itself
        // is replaced and its target is never created.
        assert!(Destination::prepare(&dir, &["psi.json"], Replace::Nothing).is_ok());
        let dest = Destination::prepare(&dir, &["psi.csv"], Replace::Everything).unwrap();
        dest.write(&set(&["psi.csv"], "new")).unwrap();
        assert!(!std::fs::symlink_metadata(dir.join("psi.csv"))
            .unwrap()
            .is_symlink());
        assert!(!nowhere.exists());
        std::fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn an_output_that_appears_during_the_run_is_not_replaced() {
        let dir = fresh("appears");
        let names = ["a.txt", "b.txt"];
        let dest = Destination::prepare(&dir, &names, Replace::Nothing).unwrap();
        std::fs::write(dir.join("b.txt"), b"someone else's").unwrap();
        let before = snapshot(&dir);
        let e = dest.write(&set(&names, "new")).unwrap_err();
        assert!(
            matches!(e, FileError::Exists { ref path } if path.ends_with("b.txt")),
            "{e}"
        );
        assert_eq!(snapshot(&dir), before);
        // Nothing appeared: written. Replacing asked for: the newcomer is replaced.
        std::fs::remove_file(dir.join("b.txt")).unwrap();
        dest.write(&set(&names, "new")).unwrap();
        let forced = Destination::prepare(&dir, &names, Replace::Everything).unwrap();
        std::fs::write(dir.join("c.txt"), b"someone else's").unwrap();
        forced.write(&set(&["a.txt", "c.txt"], "newer")).unwrap();
        assert_eq!(std::fs::read(dir.join("c.txt")).unwrap(), b"newer c.txt");
        std::fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn a_manifest_allows_replacing_what_it_lists() {
        let dir = fresh("manifest");
        std::fs::write(dir.join("list.txt"), "a.txt\nfig.svg\nlist.txt\n").unwrap();
        for name in ["a.txt", "fig.svg", "foreign.txt"] {
            std::fs::write(dir.join(name), b"old").unwrap();
        }
        let listed = || Replace::Listed("list.txt".into());
        let dest = Destination::prepare(&dir, &["a.txt"], listed()).unwrap();
        // Listed outputs known only after computing (fig.svg) are refreshed too.
        dest.write(&set(&["a.txt", "fig.svg"], "new")).unwrap();
        assert_eq!(std::fs::read(dir.join("fig.svg")).unwrap(), b"new fig.svg");
        // An output not listed is refused, before computing and before moving.
        let e = Destination::prepare(&dir, &["a.txt", "foreign.txt"], listed()).unwrap_err();
        assert!(e.to_string().contains("foreign.txt"), "{e}");
        let e = dest
            .write(&set(&["a.txt", "foreign.txt"], "new"))
            .unwrap_err();
        assert!(e.to_string().contains("foreign.txt"), "{e}");
        assert_eq!(std::fs::read(dir.join("foreign.txt")).unwrap(), b"old");
        std::fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn writability_is_checked_without_creating_anything() {
        let dir = fresh("writable");
        std::fs::write(dir.join("file"), b"").unwrap();
        let e = Destination::prepare(&dir.join("file/out"), &["a.txt"], Replace::Nothing);
        assert!(matches!(e, Err(FileError::CannotWrite { .. })), "{e:?}");
        assert!(Destination::prepare(&dir.join("x/y"), &["a.txt"], Replace::Nothing).is_ok());
        assert_eq!(snapshot(&dir).len(), 1, "nothing created, no probe left");
        std::fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn a_closed_gate_waits_for_the_write_under_way_and_refuses_later_ones() {
        let gate = Gate::new();
        let entered = gate.enter().unwrap();
        assert!(!gate.try_close(), "a write is under way");
        drop(entered);
        assert!(gate.try_close());
        assert!(gate.enter().is_none());
    }
}
