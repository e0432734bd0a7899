//! Progress of long computations as small typed events. Kernels never print: a caller that wants
//! a progress bar passes an observer (`&dyn Fn(&Progress) + Sync`) and draws what it is told.

use std::fmt;

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
