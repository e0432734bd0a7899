//! What the command line shows on the terminal while work runs: a progress bar when stderr is a
//! terminal, else a heartbeat line every 10 s once the work has run that long; and the clean stop
//! on SIGINT and SIGTERM (exit codes 130 and 143).

use indicatif::{ProgressBar, ProgressStyle};
use regwave::progress::{Heartbeat, Observer, Progress};
use std::io::IsTerminal;
#[cfg(unix)]
use std::time::Duration;

/// Interval of the heartbeat lines when no progress bar is drawn.
pub const HEARTBEAT: Duration = Duration::from_secs(10);

/// Runs `work` with an observer that draws `bar` and, while `bar` is hidden (stderr not a
/// terminal, or quiet output), a heartbeat: a line on stderr every [`HEARTBEAT`] once the work
/// has run that long ("regwave build: still working, 20 s; last finished: modulus (1/2)").
pub fn observed<T>(label: &str, bar: &ProgressBar, work: impl FnOnce(Observer<'_>) -> T) -> T {
    /// Stops the heartbeat also when the work unwinds, so that the scope can end.
    struct Stop<'a>(&'a Heartbeat);
    impl Drop for Stop<'_> {
        fn drop(&mut self) {
            self.0.stop();
        }
    }
    let heartbeat = Heartbeat::new(HEARTBEAT);
    std::thread::scope(|s| {
        if bar.is_hidden() {
            s.spawn(|| {
                while let Some(line) = heartbeat.next_line() {
                    eprintln!("regwave {label}: {line}");
                }
            });
        }
        let _stop = Stop(&heartbeat);
        work(&|p: &Progress| {
            tick(bar, p);
            heartbeat.observe(p);
        })
    })
}

/// SIGINT and SIGTERM stop the program cleanly: a set of outputs being written is first
/// completed or rolled back ([`regwave::output::files::try_stop_writing`]), so neither a
/// partial set nor a staging folder is left; then one line on stderr and exit code 128 + the
/// signal (130, 143). A second signal while waiting for the write stops at once.
#[cfg(unix)]
pub fn stop_cleanly_on_signals() {
    use signal_hook::consts::{SIGINT, SIGTERM};
    let Ok(mut signals) = signal_hook::iterator::Signals::new([SIGINT, SIGTERM]) else {
        return;
    };
    std::thread::spawn(move || {
        let Some(signal) = signals.forever().next() else {
            return;
        };
        let mut whole = true;
        while !regwave::output::files::try_stop_writing() {
            if signals.pending().next().is_some() {
                whole = false;
                break;
            }
            std::thread::sleep(Duration::from_millis(10));
        }
        let name = if signal == SIGINT {
            "SIGINT"
        } else {
            "SIGTERM"
        };
        // Over a progress bar on a terminal: clear its line first.
        let clear = if std::io::stderr().is_terminal() {
            "\r\x1b[2K"
        } else {
            ""
        };
        if whole {
            eprintln!("{clear}regwave: stopped by {name}; no partial outputs left");
        } else {
            eprintln!("{clear}regwave: stopped by {name} while moving outputs in; they may be incomplete (the old files are in the hidden staging folder)");
        }
        std::process::exit(128 + signal);
    });
}

/// A progress bar on stderr when it is a terminal and output is not quiet; hidden otherwise.
pub fn progress_bar(quiet: bool, label: &str) -> ProgressBar {
    if quiet || !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let bar = ProgressBar::new(1);
    bar.set_style(
        ProgressStyle::with_template("{prefix} [{bar:30}] {pos}/{len} {msg} ({elapsed})")
            .expect("a valid template")
            .progress_chars("=> "),
    );
    bar.set_prefix(label.to_string());
    bar
}

/// Shows one progress event.
fn tick(bar: &ProgressBar, p: &Progress) {
    bar.set_length(p.total as u64);
    bar.set_position(p.done as u64);
    bar.set_message(p.stage.to_string());
}
