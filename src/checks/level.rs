//! All checks of one eigenfunction: the figures an audit reports per level, and `check`.
//!
//! # Method
//! The profile with its eigen-equation residual ([`crate::eigenfunction::profile`]), the norm by
//! an independent quadrature ([`crate::checks::norms`]), zeros inside the turning points and in
//! the tails ([`crate::checks::zeros`]), decay rates, agreement with the harmonic-oscillator
//! eigenvector ([`crate::checks::eigenvector`]), route dependence and Cauchy defect
//! ([`crate::checks::single_valuedness`]), and the negative control: the same single-valuedness
//! figures at the modulus perturbed off the attractor value.
//!
//! # Accuracy
//! The diagnostics run in double precision while |λ| costs at most
//! [`crate::precision::DIAGNOSTIC_LOSS_MAX`] digits, else at 19 + log₁₀|λ| digits
//! ([`diagnostic_bits`]); the report states their precision.
//!
//! # Errors
//! [`AuditError`].
//!
//! # References
//! `docs/MATHEMATICS.md` §7.

use crate::checks::audit::AuditError;
use crate::checks::zeros::{self, Zeros};
use crate::checks::{eigenvector, norms, single_valuedness};
use crate::curve::attractor::LEVEL_OFFSET;
use crate::curve::laurent::Laurent;
use crate::curve::periods;
use crate::eigenfunction::construction::Eigenfunction;
use crate::eigenfunction::profile::{self, Profile, ProfileOptions, Target, BASE_RE};
use crate::input::grid::Grid;
use crate::numerics::complex::CNum;
use crate::operator::spectrum::{self, SpectrumOptions};
use crate::precision::{self, working_bits, DOUBLE_BITS, DOUBLE_DIGITS, MIN_ATTRACTOR_DIGITS};
use num_complex::Complex64;
use rug::Float;

/// One audited level.
#[derive(Debug, Clone, serde::Serialize)]
pub struct LevelAudit {
    pub level: usize,
    /// The integer value of ν at the modulus.
    pub nu: i64,
    /// The independent eigenvalue of the same level and its error estimate.
    #[serde(serialize_with = "crate::numerics::serial::float")]
    pub spectrum_value: Float,
    pub spectrum_error: f64,
    /// Digits on which modulus and eigenvalue agree, and the digits the comparison supports.
    pub agreement_digits: f64,
    pub agreement_cap: f64,
    pub profile: Profile,
    /// ∫|ψ|² over R by the trapezoid rule at twice the normalization step, plus the tail
    /// estimate (an independent quadrature of the normalized function).
    pub norm: f64,
    /// ∫|ψ|² of the written values on the output grid (Simpson): the mass inside the grid.
    pub norm_on_grid: f64,
    /// Points of the output grid on R without a value (left out of the mass and the tail
    /// zeros), and the bound on the share of the mass they may carry.
    pub grid_points_without_value: usize,
    pub excluded_mass_bound: f64,
    pub zeros: Zeros,
    /// Zeros beyond the turning points on the output grid, with their spacing law.
    pub tail_zeros: [zeros::TailZeros; 2],
    /// max|ψ − ψ_HO| / max|ψ| after normalization and phase alignment.
    pub eigenvector_difference: f64,
    pub route_dependence: f64,
    pub cauchy_defect: f64,
}

/// The negative control at a perturbed modulus, beside the same figures at the attractor.
#[derive(Debug, Clone, serde::Serialize)]
pub struct NegativeControl {
    pub perturbation: f64,
    pub modulus: f64,
    pub route_dependence: f64,
    pub cauchy_defect: f64,
    pub route_dependence_at_attractor: f64,
    pub cauchy_defect_at_attractor: f64,
}

impl NegativeControl {
    /// The defect off the attractor (the larger of the two).
    pub fn defect(&self) -> f64 {
        self.route_dependence.max(self.cauchy_defect)
    }
}

/// The precision of the diagnostics of a profile ([`crate::precision::diagnostic_bits`]).
pub fn diagnostic_bits(p: &Profile) -> u32 {
    precision::diagnostic_bits(p.lambda.abs_f64())
}

/// The per-level figures at the diagnostic precision.
struct Diagnostics {
    zeros: Zeros,
    eigenvector_difference: f64,
    route_dependence: f64,
    cauchy_defect: f64,
    /// The exponent gaps of the roots at the two ends (for the tail zeros).
    end_gaps: [i64; 2],
}

fn diagnostics<T: CNum>(
    laurent: &Laurent,
    a: T,
    rule: Option<i64>,
    spec: &spectrum::Spectrum,
    level: usize,
) -> Result<Diagnostics, AuditError> {
    let eig = Eigenfunction::new(laurent, a, None, BASE_RE)?;
    Ok(Diagnostics {
        zeros: zeros::zeros_inside(&eig, rule)?,
        eigenvector_difference: eigenvector::eigenvector_difference(&eig, spec, level)?,
        route_dependence: single_valuedness::route_dependence(laurent, &eig)?,
        cauchy_defect: single_valuedness::cauchy_defect(&eig)?,
        end_gaps: eig.curve().end_exponent_gaps(),
    })
}

/// Diagnostics of modulus `a` at `bits` (53: double precision).
fn diagnostics_at(
    laurent: &Laurent,
    a: &Float,
    bits: u32,
    rule: Option<i64>,
    spec: &spectrum::Spectrum,
    level: usize,
) -> Result<Diagnostics, AuditError> {
    if bits == DOUBLE_BITS {
        diagnostics(laurent, Complex64::new(a.to_f64(), 0.0), rule, spec, level)
    } else {
        diagnostics(
            laurent,
            rug::Complex::with_val(bits, (a, 0)),
            rule,
            spec,
            level,
        )
    }
}

/// The level audit of a profile against level `level` of the spectrum.
pub(crate) fn level_audit(
    laurent: &Laurent,
    profile: Profile,
    spec: &spectrum::Spectrum,
    level: usize,
) -> Result<LevelAudit, AuditError> {
    let bits = diagnostic_bits(&profile);
    let d = diagnostics_at(laurent, &profile.modulus, bits, profile.rule, spec, level)?;
    let sl = &spec.levels[level];
    let modulus = &profile.modulus;
    let rel = Float::with_val(modulus.prec(), modulus - &sl.value)
        .to_f64()
        .abs()
        / sl.value.to_f64();
    let cap = (sl.value.to_f64() / sl.error_estimate.max(1e-300))
        .log10()
        .min(profile.modulus_digits as f64);
    let agreement_digits = crate::precision::agreement_digits(rel, cap.max(0.0));
    let norm = norms::norm_coarse(&profile.normalization);
    let grid_norm = norms::norm_on_grid(&profile.grid, &profile.real_line)?;
    let tail_zeros = zeros::tail_zeros(
        &profile.grid,
        &profile.real_line,
        profile.rule,
        d.zeros.window,
        d.end_gaps,
    );
    Ok(LevelAudit {
        level,
        nu: profile.nu.to_f64().round() as i64,
        spectrum_value: sl.value.clone(),
        spectrum_error: sl.error_estimate,
        agreement_digits,
        agreement_cap: cap,
        norm,
        norm_on_grid: grid_norm.mass,
        grid_points_without_value: grid_norm.points_without_value,
        excluded_mass_bound: grid_norm.excluded_mass_bound,
        zeros: d.zeros,
        tail_zeros,
        eigenvector_difference: d.eigenvector_difference,
        route_dependence: d.route_dependence,
        cauchy_defect: d.cauchy_defect,
        profile,
    })
}

/// What `check` examines.
#[derive(Debug, Clone)]
pub struct CheckOptions {
    /// The grid of the residual and the profile.
    pub grid: Grid,
    pub digits: u32,
    pub allow_non_attractor: bool,
    /// Relative perturbation of the modulus for the negative control.
    pub perturbation: f64,
}

/// All checks of one eigenfunction.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Check {
    pub level: LevelAudit,
    pub negative_control: NegativeControl,
    pub period_agreement_digits: Option<f64>,
    pub spectrum_bases: Vec<usize>,
    pub spectrum_bits: u32,
}

/// Runs every check of docs/MATHEMATICS.md §7 on one eigenfunction (orthogonality needs several levels: see
/// [`crate::checks::audit::run`]). For a modulus that is not an attractor modulus (allowed explicitly) the level is the
/// nearest one, ν − 1 rounded.
///
/// # Errors
/// See [`AuditError`].
pub fn check(
    laurent: &Laurent,
    target: &Target,
    options: &CheckOptions,
) -> Result<Check, AuditError> {
    let profile_options = ProfileOptions {
        grid: options.grid.clone(),
        strip: true,
        digits: options.digits,
        allow_non_attractor: options.allow_non_attractor,
    };
    let profile = profile::build(laurent, target, &profile_options)?;
    // The level to compare with: the attractor's, or for a modulus off the attractor values the
    // nearest one.
    let level = profile.level.unwrap_or_else(|| {
        (profile.nu.to_f64().round().max(LEVEL_OFFSET as f64) as i64 - LEVEL_OFFSET) as usize
    });
    let spec = spectrum::solve(
        laurent,
        &SpectrumOptions {
            levels: 0..=level + 1,
            basis: 200.max(spectrum::minimum_basis(level + 1)),
            max_basis: 300,
            digits: options.digits.min(DOUBLE_DIGITS),
            squeeze: 1.0,
        },
    )?;
    let audited = level_audit(laurent, profile, &spec, level)?;
    let negative_control = negative_control(laurent, &audited, options.perturbation)?;
    let bits = working_bits(options.digits.max(MIN_ATTRACTOR_DIGITS) as f64);
    let terms = laurent.constant_terms(2000)?;
    let period_agreement_digits = periods::compare(
        laurent,
        &rug::Complex::with_val(bits, (&audited.profile.modulus, 0)),
        &terms,
    )?
    .agreement_digits;
    Ok(Check {
        level: audited,
        negative_control,
        period_agreement_digits,
        spectrum_bases: spec.bases.clone(),
        spectrum_bits: spec.working_bits,
    })
}

/// Route dependence and Cauchy defect at the level's modulus perturbed by the relative
/// perturbation, beside the same at the attractor modulus.
pub(crate) fn negative_control(
    laurent: &Laurent,
    level: &LevelAudit,
    perturbation: f64,
) -> Result<NegativeControl, AuditError> {
    let a = level.profile.modulus.to_f64() * (1.0 + perturbation);
    let eig = Eigenfunction::new(laurent, Complex64::new(a, 0.0), None, BASE_RE)?;
    Ok(NegativeControl {
        perturbation,
        modulus: a,
        route_dependence: single_valuedness::route_dependence(laurent, &eig)?,
        cauchy_defect: single_valuedness::cauchy_defect(&eig)?,
        route_dependence_at_attractor: level.route_dependence,
        cauchy_defect_at_attractor: level.cauchy_defect,
    })
}
