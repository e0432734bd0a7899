//! What each `regwave` command runs and writes, as library functions: a request (plain data, no
//! command-line types) goes in; the JSON document, the human-readable text and the files written
//! come out. The binary only parses arguments into requests, prints the outcome and maps
//! [`CommandError`] to exit codes.
//!
//! Every computation is timed and every document records its inputs, precision and the tool
//! version ([`crate::output::records::Document`]). Files are written atomically as a set
//! ([`crate::output::files`]), after a writability check that runs before any computation.

mod attractors;
mod audit;
mod build;
mod check;
mod families;
mod periods;
mod spectrum;
#[cfg(feature = "figures")]
mod tour;

pub use attractors::{attractors, AttractorsRequest};
pub use audit::{audit, AuditRequest};
pub use build::{build, BuildRequest};
pub use check::{check, CheckRequest};
pub use families::families;
pub use periods::{periods, PeriodsRequest};
pub use spectrum::{spectrum, SpectrumRequest};
#[cfg(feature = "figures")]
pub use tour::{tour, TourRequest, TOUR_FAMILIES};

use crate::checks::audit::AuditError;
use crate::curve::attractor::AttractorError;
use crate::curve::constant_terms::RecurrenceError;
use crate::curve::periods::PeriodsError;
use crate::eigenfunction::profile::{ProfileError, Target};
use crate::input::grid::GridError;
use crate::input::selection::{self, Selection, SelectionError};
use crate::operator::spectrum::SpectrumError;
use crate::output::files::FileError;
use crate::output::records::FamilyInputs;
use crate::precision::PrecisionError;
use std::path::PathBuf;
use thiserror::Error;

/// The defaults every command shares.
pub mod defaults {
    /// Levels: the first five.
    pub const LEVELS: &str = "0..4";
    /// Decimal digits: double precision where it suffices (the precision is raised where the
    /// computation needs it to deliver them).
    pub const DIGITS: u32 = crate::precision::DOUBLE_DIGITS;
    /// Grid of real parts: 241 points on [−12, 12] (step 0.1).
    pub const GRID: &str = "-12:12:241";
}

/// Why a command could not run or did not pass.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum CommandError {
    #[error(transparent)]
    Precision(#[from] PrecisionError),
    #[error(transparent)]
    Selection(#[from] SelectionError),
    #[error(transparent)]
    Grid(#[from] GridError),
    #[error(transparent)]
    Spectrum(#[from] SpectrumError),
    #[error(transparent)]
    Periods(#[from] PeriodsError),
    #[error(transparent)]
    Attractor(#[from] AttractorError),
    #[error(transparent)]
    ConstantTerms(#[from] RecurrenceError),
    #[error(transparent)]
    Profile(#[from] ProfileError),
    #[error(transparent)]
    Audit(#[from] AuditError),
    #[cfg(feature = "figures")]
    #[error(transparent)]
    Plot(#[from] crate::output::plot::PlotError),
    #[error(transparent)]
    Files(#[from] FileError),
    /// A request that would need more memory than the machine has available (estimated
    /// before anything is allocated).
    #[error("{what} would need about {} of memory, more than the {} available; ask for fewer levels or a smaller basis", gib(*needed), gib(*available))]
    TooLarge {
        what: String,
        needed: f64,
        available: f64,
    },
    /// Neither a level nor a modulus was given.
    #[error("no eigenfunction selected: a level or a modulus is needed")]
    NoTarget,
    /// An audit found an attractor modulus without an eigenvalue or the converse (the outputs
    /// were written; this is the finding).
    #[error("{family}: unmatched in the audit window: {list}")]
    Unmatched { family: String, list: String },
}

impl CommandError {
    /// Whether the error is the caller's input (a request outside its domain, unreadable text,
    /// an output that cannot or may not be written) rather than a computation that failed or a
    /// check that did not pass. The binary exits with 2 for the first, 1 for the second.
    pub fn is_input(&self) -> bool {
        use CommandError as E;
        match self {
            E::Precision(_)
            | E::Selection(_)
            | E::Grid(_)
            | E::Files(_)
            | E::NoTarget
            | E::TooLarge { .. }
            | E::Attractor(AttractorError::BeyondReach { .. })
            | E::Spectrum(SpectrumError::EmptyLevels | SpectrumError::BasisTooSmall { .. }) => true,
            E::Profile(p) | E::Audit(AuditError::Profile(p)) => p.is_input(),
            _ => false,
        }
    }
}

#[cfg(feature = "figures")]
impl From<crate::output::figures::FiguresError> for CommandError {
    fn from(e: crate::output::figures::FiguresError) -> Self {
        match e {
            crate::output::figures::FiguresError::Plot(p) => CommandError::Plot(p),
            crate::output::figures::FiguresError::Profile(p) => CommandError::Profile(p),
        }
    }
}

/// Bytes as GiB with two decimals.
fn gib(bytes: f64) -> String {
    format!("{:.2} GiB", bytes / f64::from(1u32 << 30))
}

/// The memory available to this process in bytes: `MemAvailable` of `/proc/meminfo` where
/// there is one, else 8 GiB (a conservative guess for machines without it).
fn available_memory() -> f64 {
    std::fs::read_to_string("/proc/meminfo")
        .ok()
        .and_then(|text| {
            text.lines()
                .find_map(|l| l.strip_prefix("MemAvailable:"))
                .and_then(|v| v.trim().trim_end_matches("kB").trim().parse::<f64>().ok())
        })
        .map_or(8.0 * f64::from(1u32 << 30), |kib| kib * 1024.0)
}

/// Refuses a request whose estimated peak memory `needed` exceeds 80 % of what is available.
///
/// # Errors
/// [`CommandError::TooLarge`].
fn check_memory(what: &str, needed: f64) -> Result<(), CommandError> {
    let available = available_memory();
    if needed > 0.8 * available {
        return Err(CommandError::TooLarge {
            what: what.to_string(),
            needed,
            available,
        });
    }
    Ok(())
}

/// The family a command works on, as given: a catalogue id, or vertices (and optionally
/// coefficients to check against the tempered ones).
#[derive(Debug, Clone, Default)]
#[cfg_attr(feature = "cli", derive(clap::Args))]
#[cfg_attr(
    feature = "cli",
    command(group(clap::ArgGroup::new("polygon").required(true).args(["family", "vertices"])))
)]
pub struct FamilyRequest {
    /// Catalogue id (see `regwave families`).
    #[cfg_attr(feature = "cli", arg(long))]
    pub family: Option<String>,
    /// Vertices of a reflexive polygon, e.g. "(1,0),(0,1),(-1,-1)".
    #[cfg_attr(feature = "cli", arg(long, allow_hyphen_values = true))]
    pub vertices: Option<String>,
    /// Coefficients to check against the tempered ones, e.g. "(1,0)=1,(0,1)=1".
    #[cfg_attr(feature = "cli", arg(long, allow_hyphen_values = true))]
    pub coefficients: Option<String>,
}

impl FamilyRequest {
    /// A catalogue family by id.
    pub fn catalogue(id: &str) -> Self {
        FamilyRequest {
            family: Some(id.to_string()),
            ..Default::default()
        }
    }

    /// The selection it resolves to.
    ///
    /// # Errors
    /// [`SelectionError`].
    pub fn resolve(&self) -> Result<Selection, SelectionError> {
        selection::resolve(
            self.family.as_deref(),
            self.vertices.as_deref(),
            self.coefficients.as_deref(),
        )
    }

    /// The inputs record: as given, and what it resolved to.
    pub fn inputs(&self, s: &Selection) -> FamilyInputs {
        FamilyInputs {
            family: self.family.clone(),
            vertices: self.vertices.clone(),
            coefficients: self.coefficients.clone(),
            resolved_family: s.family.id,
            polygon: s.polygon.vertices().to_vec(),
            transform: s.transform,
            phi: s.laurent.to_string(),
        }
    }
}

/// Which eigenfunction: a level, or an explicit modulus (decimal text, read at the working
/// precision).
#[derive(Debug, Clone, Default)]
#[cfg_attr(feature = "cli", derive(clap::Args))]
#[cfg_attr(
    feature = "cli",
    command(group(clap::ArgGroup::new("target").required(true).args(["level", "modulus"])))
)]
pub struct TargetRequest {
    /// Level n (the attractor modulus with nu = n + 1).
    #[cfg_attr(
        feature = "cli",
        arg(long, conflicts_with = "modulus", allow_negative_numbers = true)
    )]
    pub level: Option<usize>,
    /// An explicit modulus a (must be an attractor modulus unless --allow-non-attractor).
    #[cfg_attr(feature = "cli", arg(long, allow_hyphen_values = true))]
    pub modulus: Option<String>,
    /// Accept a modulus that is not an attractor modulus (the result is then not an
    /// eigenfunction; the checks show it).
    #[cfg_attr(feature = "cli", arg(long))]
    pub allow_non_attractor: bool,
}

impl TargetRequest {
    /// The profile target, its domain checked up front: a level within reach, or a modulus
    /// that reads strictly and lies above the threshold of `sel` at the precision of `digits`.
    ///
    /// # Errors
    /// [`CommandError::NoTarget`], [`CommandError::Attractor`] for a level beyond reach,
    /// [`CommandError::Selection`] for a modulus outside its domain.
    pub fn target(&self, sel: &Selection, digits: u32) -> Result<Target, CommandError> {
        match (self.level, &self.modulus) {
            (Some(n), _) => {
                crate::eigenfunction::profile::check_level_reach(&(n..=n))?;
                Ok(Target::Level(n))
            }
            (None, Some(text)) => {
                // The domain of the modulus is checked here, before any computation.
                let bits = crate::precision::working_bits(f64::from(digits));
                crate::input::numbers::parse_modulus(text, bits, &sel.laurent)?;
                Ok(Target::Modulus(text.clone()))
            }
            (None, None) => Err(CommandError::NoTarget),
        }
    }
}

/// What a command produced.
#[derive(Debug, Clone)]
pub struct Outcome {
    /// The JSON document.
    pub json: String,
    /// The human-readable text (a table or a report).
    pub text: String,
    /// The directory written into, if any.
    pub wrote: Option<PathBuf>,
    /// Wall time of the command in seconds.
    pub elapsed_s: f64,
    /// A finding that makes the command fail after its outputs were written (an unmatched
    /// level of an audit).
    pub finding: Option<CommandError>,
}

impl Outcome {
    /// An outcome with nothing written and nothing found.
    pub fn printed(json: String, text: String, elapsed_s: f64) -> Self {
        Outcome {
            json,
            text,
            wrote: None,
            elapsed_s,
            finding: None,
        }
    }
}
