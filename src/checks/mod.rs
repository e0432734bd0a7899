//! Verification: the checks every eigenfunction carries, each returning figures, not booleans
//! (`docs/MATHEMATICS.md` §7), and audits of whole families.
//!
//! - [`residual`]: the eigen-equation residual from independently integrated lines.
//! - [`single_valuedness`]: route dependence and Cauchy defects (the negative controls).
//! - [`eigenvector`]: agreement with the harmonic-oscillator eigenfunction.
//! - [`zeros`]: zeros inside the turning points and in the tails.
//! - [`norms`]: norms and orthogonality.
//! - [`nu_scan`]: every integer crossing of ν in a window of moduli.
//! - [`level`]: all checks of one eigenfunction; [`audit`]: a family matched both ways against
//!   the independent spectrum; [`matching`]: the matching itself.

use crate::curve::attractor::AttractorError;
use crate::eigenfunction::construction::EigenError;
use thiserror::Error;

pub mod audit;
pub mod eigenvector;
pub mod level;
pub mod matching;
pub mod norms;
pub mod nu_scan;
pub mod residual;
pub mod single_valuedness;
pub mod zeros;

/// Why a check could not be carried out.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum VerifyError {
    #[error(transparent)]
    Eigen(#[from] EigenError),
    #[error(transparent)]
    Attractor(#[from] AttractorError),
    #[error(transparent)]
    Cover(#[from] crate::curve::cover::CoverError),
    /// The independent spectrum does not contain the level.
    #[error("the independent spectrum has no level {level}")]
    MissingLevel { level: usize },
    /// Points without a value where ψ may carry a share of the mass inside the grid that the
    /// norm on the grid would notice ([`crate::precision::EXCLUDED_MASS_MAX`]).
    #[error("psi has no value at {count} grid points, the first at r = {r}, where they may carry up to {bound:.1e} of the mass inside the grid: the norm on the grid is not formed")]
    MissingInsideMass { count: usize, r: f64, bound: f64 },
    /// Nothing to check (an empty grid or window).
    #[error("nothing to check: {what}")]
    Empty { what: String },
}
