//! Progress of long computations as small typed events. Kernels never print: a caller that wants
//! a progress bar passes an observer (`&dyn Fn(&Progress) + Sync`) and draws what it is told.
//!
//! [`Heartbeat`] turns the events into a line at fixed intervals for callers that cannot draw a
//! bar (stderr not a terminal): nothing while the work is shorter than one interval, then
//! "still working, 20 s; last finished: level 2 (3/7)" every interval until it is stopped.

use std::fmt;
use std::sync::{Condvar, Mutex};
use std::time::{Duration, Instant};

/// A stage of a long computation that has just finished.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum Stage {
    /// The independent spectrum of an audit.
    Spectrum,
    /// The scan of ν over the audit window.
    NuScan,
    /// The attractor moduli of the audited levels.
    AttractorModuli,
    /// The checks of one level.
    Level(usize),
    /// The negative control off the attractor modulus.
    NegativeControl,
    /// The modulus of an eigenfunction, solved or read.
    Modulus,
    /// One sampling pass of an eigenfunction (repeated at a higher precision when the
    /// cancellation in χ − χ∘ι̃ needs it).
    Sampled,
    /// The audit of one family of several.
    FamilyAudited(&'static str),
    /// A high-precision eigenfunction of a report.
    HighPrecision,
}

impl fmt::Display for Stage {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Stage::Spectrum => f.write_str("independent spectrum"),
            Stage::NuScan => f.write_str("nu scan"),
            Stage::AttractorModuli => f.write_str("attractor moduli"),
            Stage::Level(n) => write!(f, "level {n}"),
            Stage::NegativeControl => f.write_str("negative control"),
            Stage::Modulus => f.write_str("modulus"),
            Stage::Sampled => f.write_str("sampled"),
            Stage::FamilyAudited(id) => write!(f, "{id} audited"),
            Stage::HighPrecision => f.write_str("high-precision eigenfunction"),
        }
    }
}

/// A finished stage, and how far the whole computation has come.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Progress {
    pub stage: Stage,
    /// Stages finished so far (counting this one) — for a parallel computation, in the order
    /// they finished.
    pub done: usize,
    /// Stages expected in all (an upper bound when a stage may repeat).
    pub total: usize,
}

/// An observer of progress.
pub type Observer<'a> = &'a (dyn Fn(&Progress) + Sync);

/// An observer that ignores everything.
pub fn quiet(_: &Progress) {}

/// Counts finished stages of a computation with a known total and reports each to an observer;
/// safe to share between threads.
pub struct Counter<'a> {
    observer: Observer<'a>,
    done: std::sync::atomic::AtomicUsize,
    total: usize,
}

impl<'a> Counter<'a> {
    /// A counter of `total` stages reporting to `observer`.
    pub fn new(observer: Observer<'a>, total: usize) -> Self {
        Counter {
            observer,
            done: std::sync::atomic::AtomicUsize::new(0),
            total,
        }
    }

    /// Reports that `stage` has finished.
    pub fn finished(&self, stage: Stage) {
        let done = self.done.fetch_add(1, std::sync::atomic::Ordering::SeqCst) + 1;
        (self.observer)(&Progress {
            stage,
            done,
            total: self.total.max(done),
        });
    }
}

/// A line at every multiple of an interval while a computation runs, saying how long it has run
/// and the last stage it reported. One thread waits in [`Heartbeat::next_line`] and prints the
/// lines; the computation's observer calls [`Heartbeat::observe`]; [`Heartbeat::stop`] ends the
/// waiting at once.
pub struct Heartbeat {
    interval: Duration,
    start: Instant,
    state: Mutex<Beat>,
    wake: Condvar,
}

#[derive(Default)]
struct Beat {
    stopped: bool,
    lines: u32,
    latest: Option<Progress>,
}

impl Heartbeat {
    /// A heartbeat every `interval` from now.
    pub fn new(interval: Duration) -> Self {
        Heartbeat {
            interval,
            start: Instant::now(),
            state: Mutex::new(Beat::default()),
            wake: Condvar::new(),
        }
    }

    fn state(&self) -> std::sync::MutexGuard<'_, Beat> {
        self.state.lock().unwrap_or_else(|e| e.into_inner())
    }

    /// Remembers the latest progress event (an observer).
    pub fn observe(&self, p: &Progress) {
        self.state().latest = Some(*p);
    }

    /// Ends the heartbeat: [`Heartbeat::next_line`] returns `None` from now on.
    pub fn stop(&self) {
        self.state().stopped = true;
        self.wake.notify_all();
    }

    /// Waits for the next multiple of the interval since the start and returns its line, or
    /// `None` as soon as the heartbeat is stopped.
    pub fn next_line(&self) -> Option<String> {
        let mut state = self.state();
        loop {
            if state.stopped {
                return None;
            }
            let due = self.interval * (state.lines + 1);
            let elapsed = self.start.elapsed();
            if elapsed >= due {
                state.lines += 1;
                return Some(line(elapsed, state.latest.as_ref()));
            }
            state = self
                .wake
                .wait_timeout(state, due - elapsed)
                .unwrap_or_else(|e| e.into_inner())
                .0;
        }
    }
}

/// "still working, 20 s; last finished: level 2 (3/7)" (without the last part before any event).
fn line(elapsed: Duration, latest: Option<&Progress>) -> String {
    let mut text = format!("still working, {} s", elapsed.as_secs());
    if let Some(p) = latest {
        text.push_str(&format!(
            "; last finished: {} ({}/{})",
            p.stage, p.done, p.total
        ));
    }
    text
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Interval of the tests: short, but far above the scheduling delays of a loaded machine.
    const INTERVAL: Duration = Duration::from_millis(200);

    /// Collects the lines of a heartbeat while `work` runs, then stops it.
    fn lines_during(work: impl FnOnce(&Heartbeat)) -> (Vec<(Duration, String)>, Duration) {
        let heartbeat = Heartbeat::new(INTERVAL);
        let lines = std::thread::scope(|s| {
            let printer = s.spawn(|| {
                let mut lines = Vec::new();
                while let Some(l) = heartbeat.next_line() {
                    lines.push((heartbeat.start.elapsed(), l));
                }
                lines
            });
            work(&heartbeat);
            heartbeat.stop();
            printer.join().unwrap()
        });
        (lines, heartbeat.start.elapsed())
    }

    #[test]
    fn long_work_gets_a_line_every_interval() {
        let (lines, total) = lines_during(|h| {
            std::thread::sleep(INTERVAL / 2);
            h.observe(&Progress {
                stage: Stage::Level(2),
                done: 3,
                total: 7,
            });
            std::thread::sleep(INTERVAL * 3);
        });
        assert!((3..=4).contains(&lines.len()), "{lines:?} in {total:?}");
        for (k, (at, text)) in lines.iter().enumerate() {
            assert!(*at >= INTERVAL * (k as u32 + 1), "line {k} early at {at:?}");
            assert!(text.starts_with("still working, "), "{text}");
            assert!(text.ends_with(" s; last finished: level 2 (3/7)"), "{text}");
        }
        // The stop ends the waiting at once, not at the next interval.
        assert!(total < INTERVAL * 4 + INTERVAL / 2, "{total:?}");
    }

    #[test]
    fn short_work_gets_no_line() {
        let (lines, total) = lines_during(|_| std::thread::sleep(INTERVAL / 2));
        assert!(lines.is_empty(), "{lines:?}");
        assert!(total < INTERVAL, "{total:?}");
    }

    #[test]
    fn a_line_before_any_event_says_only_the_time() {
        assert_eq!(
            line(Duration::from_millis(20_400), None),
            "still working, 20 s"
        );
    }
}
