//! The audit of a family: every attractor modulus in a window matched to an eigenvalue of the
//! independent spectrum and every eigenvalue to an attractor modulus, and for each level the
//! eigenfunction with all the checks of docs/MATHEMATICS.md §7.
//!
//! # Method
//! 1. The independent spectrum ([`crate::operator::spectrum`]) for levels 0..K+1; the window is
//!    (threshold, √(E_K E_{K+1})], so that it holds the eigenvalues of the audited levels and no
//!    other.
//! 2. ν(a) is scanned over the window ([`crate::checks::nu_scan`]); every integer crossing is an attractor
//!    modulus. Those with ν = n + 1, n ∈ 0..K, are the attractor moduli of the levels
//!    ([`crate::curve::attractor`], to the requested digits); any other crossing is refined in double
//!    precision and must match an eigenvalue too.
//! 3. Matching, both ways ([`crate::checks::matching`]): an attractor modulus a and an eigenvalue E match when
//!    |a − E|/E < max([`crate::precision::MATCH_FLOOR`], 100 × the spectrum's relative error estimate); an attractor
//!    modulus without an eigenvalue or an eigenvalue without an attractor modulus is listed in
//!    `unmatched`, with its nearest partner and gap. A match between different level labels is
//!    listed too.
//! 4. Per level ([`crate::checks::level`]): the profile with its eigen-equation residual ([`crate::eigenfunction::profile`]), the norm of the
//!    written values by an independent quadrature, zeros inside the outermost turning points,
//!    decay rates, agreement with the harmonic-oscillator eigenvector, route dependence and
//!    Cauchy defect ([`crate::checks::single_valuedness`]); levels run in parallel.
//! 5. Orthogonality of the audited levels, series-vs-path agreement of Ω_α and R_α at the largest
//!    audited modulus, and the negative control: route dependence and Cauchy defect at the level-0
//!    modulus perturbed by [`AuditOptions::perturbation`] (relative).
//!
//! # Accuracy
//! Each figure is a measurement at a stated precision: the profile at its working precision, the
//! diagnostics (zeros, eigenvector, route, Cauchy) at [`Audit::diagnostic_bits`], the spectrum
//! with its own error estimate, which caps the agreement digits.
//!
//! # Errors
//! [`AuditError`].
//!
//! # References
//! docs/MATHEMATICS.md §3–7; attractor moduli are eigenvalues (proven), every eigenvalue an attractor modulus
//! (conjectured): the two directions are checked separately for that reason.

use crate::checks::level::{
    diagnostic_bits, level_audit, negative_control, LevelAudit, NegativeControl,
};
use crate::checks::matching::{match_both_ways, Unmatched};
use crate::checks::nu_scan::{self, NuScan};
use crate::checks::{norms, VerifyError};
use crate::curve::attractor::{self, AttractorError};
use crate::curve::laurent::Laurent;
use crate::curve::periods;
use crate::eigenfunction::construction::EigenError;
use crate::eigenfunction::profile::{self, ProfileError, ProfileOptions, Target};
use crate::input::grid::Grid;
use crate::operator::spectrum::{self, SpectrumError, SpectrumOptions};
use crate::precision::{working_bits, DOUBLE_DIGITS, MIN_ATTRACTOR_DIGITS};
use crate::progress::{Counter, Observer, Stage};
use rayon::prelude::*;
use std::ops::RangeInclusive;
use thiserror::Error;

/// Why an audit could not be completed.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum AuditError {
    #[error(transparent)]
    Profile(#[from] ProfileError),
    #[error(transparent)]
    Spectrum(#[from] SpectrumError),
    #[error(transparent)]
    Attractor(#[from] AttractorError),
    #[error(transparent)]
    Verify(#[from] VerifyError),
    #[error(transparent)]
    Eigen(#[from] EigenError),
    #[error(transparent)]
    Periods(#[from] periods::PeriodsError),
    #[error(transparent)]
    ConstantTerms(#[from] crate::curve::constant_terms::RecurrenceError),
}

/// What to audit.
#[derive(Debug, Clone)]
pub struct AuditOptions {
    pub levels: RangeInclusive<usize>,
    /// Requested digits (attractor moduli and profiles; 16 or less: double precision where it
    /// suffices).
    pub digits: u32,
    /// The grid of the residual and the profiles.
    pub grid: Grid,
    /// Relative perturbation of the level-0 modulus for the negative control.
    pub perturbation: f64,
    /// Spectrum bases: solved at `basis` and up the ladder to `max_basis`.
    pub spectrum_basis: usize,
    pub spectrum_max_basis: usize,
}

/// An eigenvalue of the independent spectrum inside the audit window, with its error estimate.
#[derive(Debug, Clone, serde::Serialize)]
pub struct WindowEigenvalue {
    #[serde(serialize_with = "crate::numerics::serial::float")]
    pub value: rug::Float,
    pub error_estimate: f64,
}

/// A whole audit.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Audit {
    pub levels: Vec<LevelAudit>,
    /// |⟨ψ_m, ψ_n⟩| of the audited levels.
    pub orthogonality: Vec<Vec<f64>>,
    /// Largest off-diagonal entry, and largest |⟨ψ_n, ψ_n⟩ − 1|.
    pub orthogonality_max: f64,
    pub normalization_max_deviation: f64,
    pub unmatched: Vec<Unmatched>,
    pub negative_control: NegativeControl,
    pub scan: NuScan,
    /// The modulus window (threshold, upper end].
    pub window: [f64; 2],
    /// Eigenvalues of the spectrum inside the window.
    pub eigenvalues_in_window: Vec<WindowEigenvalue>,
    /// Series-vs-path agreement of Ω_α, R_α at the largest audited modulus (None: below the
    /// series radius).
    pub period_agreement_digits: Option<f64>,
    /// Precision of the diagnostics.
    pub diagnostic_bits: u32,
    /// Spectrum bases solved and working precision.
    pub spectrum_bases: Vec<usize>,
    pub spectrum_bits: u32,
}

/// Runs the audit; `progress` is told of every finished stage ([`Stage::Spectrum`],
/// [`Stage::NuScan`], [`Stage::AttractorModuli`], one [`Stage::Level`] per level,
/// [`Stage::NegativeControl`]: levels + 4 in all).
///
/// # Errors
/// See [`AuditError`].
///
/// # Example
/// Levels 0 and 1 of P2, matched both ways against the independent spectrum:
/// ```
/// use regwave::{run_audit, AuditOptions, Grid};
/// let p2 = regwave::family("P2").unwrap();
/// let options = AuditOptions {
///     levels: 0..=1,
///     digits: 16,
///     grid: Grid::parse("-8:8:81").unwrap(),
///     perturbation: 1e-6,
///     spectrum_basis: 200,
///     spectrum_max_basis: 300,
/// };
/// let audit = run_audit(&p2, &options, &regwave::progress::quiet).unwrap();
/// assert!(audit.unmatched.is_empty());
/// assert!(audit.levels.iter().all(|l| l.agreement_digits > 8.0));
/// // The negative control: off the attractor modulus ψ is no longer single valued.
/// assert!(audit.negative_control.defect() > 1e3 * audit.negative_control.cauchy_defect_at_attractor);
/// ```
pub fn run(
    laurent: &Laurent,
    options: &AuditOptions,
    progress: Observer<'_>,
) -> Result<Audit, AuditError> {
    let (lo, hi) = (*options.levels.start(), *options.levels.end());
    let stages = Counter::new(progress, hi - lo + 5);
    let spec = spectrum::solve(
        laurent,
        &SpectrumOptions {
            levels: 0..=hi + 1,
            basis: options.spectrum_basis.max(spectrum::minimum_basis(hi + 1)),
            max_basis: options.spectrum_max_basis,
            digits: options.digits.min(DOUBLE_DIGITS),
            squeeze: 1.0,
        },
    )?;
    stages.finished(Stage::Spectrum);
    let e = |k: usize| spec.levels[k].value.to_f64();
    let window_top = (e(hi) * e(hi + 1)).sqrt();
    let (_, threshold) = laurent.classical_minimum();
    let scan = nu_scan::nu_scan(laurent, window_top, 48 + 12 * (hi + 1))?;
    stages.finished(Stage::NuScan);
    let attractors =
        attractor::solve_levels(laurent, lo..=hi, options.digits.max(MIN_ATTRACTOR_DIGITS))?;
    stages.finished(Stage::AttractorModuli);
    let levels: Vec<LevelAudit> = attractors
        .par_iter()
        .map(|at| {
            let audit = audit_level(laurent, at, &spec, options);
            stages.finished(Stage::Level(at.level));
            audit
        })
        .collect::<Result<_, _>>()?;
    let eigenvalues_in_window: Vec<WindowEigenvalue> = spec
        .levels
        .iter()
        .filter(|l| l.value.to_f64() <= window_top)
        .map(|l| WindowEigenvalue {
            value: l.value.clone(),
            error_estimate: l.error_estimate,
        })
        .collect();
    let window_values: Vec<f64> = eigenvalues_in_window
        .iter()
        .map(|w| w.value.to_f64())
        .collect();
    let unmatched = match_both_ways(laurent, &scan, &attractors, &spec, &window_values)?;
    let norms: Vec<_> = levels.iter().map(|l| &l.profile.normalization).collect();
    let orthogonality = norms::orthogonality(&norms);
    let (mut off, mut diag): (f64, f64) = (0.0, 0.0);
    for (i, row) in orthogonality.iter().enumerate() {
        for (j, v) in row.iter().enumerate() {
            if i == j {
                diag = diag.max((v - 1.0).abs());
            } else {
                off = off.max(*v);
            }
        }
    }
    let negative_control = negative_control(laurent, &levels[0], options.perturbation)?;
    stages.finished(Stage::NegativeControl);
    let top = &attractors[attractors.len() - 1].modulus;
    let bits = working_bits(options.digits.max(MIN_ATTRACTOR_DIGITS) as f64);
    let terms = laurent.constant_terms(2000)?;
    let period_agreement_digits =
        periods::compare(laurent, &rug::Complex::with_val(bits, (top, 0)), &terms)?
            .agreement_digits;
    Ok(Audit {
        diagnostic_bits: levels
            .iter()
            .map(|l| diagnostic_bits(&l.profile))
            .max()
            .unwrap_or(53),
        levels,
        orthogonality,
        orthogonality_max: off,
        normalization_max_deviation: diag,
        unmatched,
        negative_control,
        scan,
        window: [threshold, window_top],
        eigenvalues_in_window,
        period_agreement_digits,
        spectrum_bases: spec.bases.clone(),
        spectrum_bits: spec.working_bits,
    })
}

fn audit_level(
    laurent: &Laurent,
    at: &attractor::Attractor,
    spec: &spectrum::Spectrum,
    options: &AuditOptions,
) -> Result<LevelAudit, AuditError> {
    let profile_options = ProfileOptions {
        grid: options.grid.clone(),
        strip: true,
        digits: options.digits,
        allow_non_attractor: false,
    };
    let profile = profile::build(laurent, &Target::Attractor(at.clone()), &profile_options)?;
    level_audit(laurent, profile, spec, at.level)
}
