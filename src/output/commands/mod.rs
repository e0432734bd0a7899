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
    /// Neither a level nor a modulus was given.
    #[error("no eigenfunction selected: a level or a modulus is needed")]
    NoTarget,
    /// An audit found an attractor modulus without an eigenvalue or the converse (the outputs
    /// were written; this is the finding).
    #[error("{family}: unmatched in the audit window: {list}")]
    Unmatched { family: String, list: String },
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
    #[cfg_attr(feature = "cli", arg(long, conflicts_with = "modulus"))]
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
    /// The profile target.
    ///
    /// # Errors
    /// [`CommandError::NoTarget`].
    pub fn target(&self) -> Result<Target, CommandError> {
        match (self.level, &self.modulus) {
            (Some(n), _) => Ok(Target::Level(n)),
            (None, Some(text)) => Ok(Target::Modulus(text.clone())),
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
