//! Long work on the command line: a heartbeat line on stderr when it is not a terminal, a clean
//! stop on SIGINT and SIGTERM (exit codes 130 and 143, old outputs untouched, no temporary files
//! or folders, no output folder created), and the output checked for writability before the
//! work. Each test stops its long run after at most about 12 s.
#![cfg(unix)]

use std::path::{Path, PathBuf};
use std::process::{Child, Command, ExitStatus, Stdio};
use std::sync::mpsc::{Receiver, RecvTimeoutError};
use std::time::{Duration, Instant};

/// A build that runs far longer than any test waits: the same at 60 digits on 401 points took
/// 46 s on the development machine, this one has twice the points at twice the digits. Never
/// waited for: every test stops it.
const LONG_BUILD: [&str; 9] = [
    "build",
    "--family",
    "F0",
    "--level",
    "2",
    "--digits",
    "120",
    "--strip",
    "--grid=-10:10:801",
];

/// Longest wait for the program to end after a signal or a refusal.
const PATIENCE: Duration = Duration::from_secs(10);

/// The heartbeat interval of the binary, and the longest wait for its first line beyond it.
const HEARTBEAT: Duration = Duration::from_secs(10);
const HEARTBEAT_SLACK: Duration = Duration::from_secs(5);

struct Running {
    child: Child,
    stderr: Receiver<String>,
}

/// Starts regwave with `args` and `--out out`, stderr read line by line (not a terminal).
fn start(args: &[&str], out: &Path) -> Running {
    let mut child = Command::new(env!("CARGO_BIN_EXE_regwave"))
        .args(args)
        .arg("--out")
        .arg(out)
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .expect("run regwave");
    let stderr = child.stderr.take().unwrap();
    let (send, receive) = std::sync::mpsc::channel();
    std::thread::spawn(move || {
        use std::io::BufRead;
        for line in std::io::BufReader::new(stderr)
            .lines()
            .map_while(Result::ok)
        {
            if send.send(line).is_err() {
                break;
            }
        }
    });
    Running {
        child,
        stderr: receive,
    }
}

impl Running {
    fn still_running(&mut self) -> bool {
        self.child.try_wait().unwrap().is_none()
    }

    fn signal(&self, signal: libc::c_int) {
        // SAFETY: kill(2) on the pid of a child we started and have not reaped.
        let sent = unsafe { libc::kill(self.child.id() as libc::pid_t, signal) };
        assert_eq!(sent, 0, "kill failed");
    }

    /// The exit status within [`PATIENCE`] (the child is killed and the test fails otherwise),
    /// and all of stderr.
    fn finish(mut self) -> (ExitStatus, String) {
        let deadline = Instant::now() + PATIENCE;
        let status = loop {
            if let Some(status) = self.child.try_wait().unwrap() {
                break status;
            }
            if Instant::now() > deadline {
                let _ = self.child.kill();
                let _ = self.child.wait();
                panic!("still running {PATIENCE:?} after the signal or refusal");
            }
            std::thread::sleep(Duration::from_millis(50));
        };
        let stderr: Vec<String> = self.stderr.iter().collect();
        (status, stderr.join("\n"))
    }

    /// Waits for a stderr line containing `needle` until `limit`; the lines seen on the way.
    fn wait_for_line(&self, needle: &str, limit: Duration) -> Result<String, Vec<String>> {
        let deadline = Instant::now() + limit;
        let mut seen = Vec::new();
        loop {
            let left = deadline.saturating_duration_since(Instant::now());
            match self.stderr.recv_timeout(left) {
                Ok(line) if line.contains(needle) => return Ok(line),
                Ok(line) => seen.push(line),
                Err(RecvTimeoutError::Timeout | RecvTimeoutError::Disconnected) => {
                    return Err(seen)
                }
            }
        }
    }
}

fn temp_dir(tag: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("regwave-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    d
}

/// Every entry of `dir` (hidden ones included) with its bytes, sorted.
fn entries(dir: &Path) -> Vec<(String, Vec<u8>)> {
    let mut out: Vec<(String, Vec<u8>)> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| {
            let p = e.unwrap().path();
            let name = p.file_name().unwrap().to_string_lossy().into_owned();
            (name, std::fs::read(&p).unwrap_or_default())
        })
        .collect();
    out.sort();
    out
}

/// An output folder holding an earlier result (psi.csv, psi.json).
fn old_outputs(tag: &str) -> PathBuf {
    let dir = temp_dir(tag);
    std::fs::create_dir_all(&dir).unwrap();
    std::fs::write(dir.join("psi.csv"), "r,re_psi,im_psi\nold\n").unwrap();
    std::fs::write(dir.join("psi.json"), "{\"old\": true}\n").unwrap();
    dir
}

#[test]
fn sigint_stops_a_build_cleanly_and_leaves_the_old_outputs() {
    let dir = old_outputs("sigint");
    let before = entries(&dir);
    let mut run = start(&[&LONG_BUILD[..], &["--force"]].concat(), &dir);
    std::thread::sleep(Duration::from_secs(1));
    assert!(run.still_running(), "the long build ended within 1 s");
    run.signal(libc::SIGINT);
    let (status, stderr) = run.finish();
    assert_eq!(status.code(), Some(130), "{stderr}");
    assert!(stderr.contains("stopped by SIGINT"), "{stderr}");
    assert!(!stderr.contains("panicked"), "{stderr}");
    // Not yet 10 s: no heartbeat.
    assert!(!stderr.contains("still working"), "{stderr}");
    // The old outputs byte for byte, nothing else (no hidden staging folder or temporary file).
    assert_eq!(entries(&dir), before);
    // Companion: the same folder, a short build with --force and no signal: the outputs are
    // replaced (the comparison above sees a change), still with nothing else left.
    let o = Command::new(env!("CARGO_BIN_EXE_regwave"))
        .args(["build", "--family", "F0", "--level", "0", "--grid=-2:2:21"])
        .args(["--force", "--out"])
        .arg(&dir)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let after = entries(&dir);
    assert_ne!(after, before);
    let names: Vec<&str> = after.iter().map(|e| e.0.as_str()).collect();
    assert_eq!(names, ["psi.csv", "psi.json"]);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_long_run_off_a_terminal_says_it_is_alive_and_sigterm_stops_it() {
    let root = temp_dir("sigterm");
    std::fs::create_dir_all(&root).unwrap();
    let out = root.join("not-yet");
    let run = start(&LONG_BUILD, &out);
    let line = run
        .wait_for_line("still working", HEARTBEAT + HEARTBEAT_SLACK)
        .unwrap_or_else(|seen| panic!("no heartbeat line; stderr: {seen:?}"));
    assert!(
        line.starts_with("regwave build: still working, 1"),
        "{line}"
    );
    run.signal(libc::SIGTERM);
    let (status, stderr) = run.finish();
    assert_eq!(status.code(), Some(143), "{stderr}");
    assert!(stderr.contains("stopped by SIGTERM"), "{stderr}");
    // The output folder was never created, and nothing was left beside it.
    assert!(entries(&root).is_empty(), "{:?}", entries(&root));
    let _ = std::fs::remove_dir_all(&root);
}

#[test]
fn a_long_build_checks_writability_before_the_work() {
    // Refused at once: the build itself would run for minutes (the first test shows it still
    // running after 1 s).
    let run = start(&LONG_BUILD, Path::new("/proc/regwave-cannot-write-here"));
    let (status, stderr) = run.finish();
    assert_eq!(status.code(), Some(2), "{stderr}");
    assert!(stderr.contains("cannot write"), "{stderr}");
}
