//! The audit of a family: every attractor modulus in a window matched to an eigenvalue of the
//! independent spectrum and every eigenvalue to an attractor modulus, and for each level the
//! eigenfunction with all the checks of MATH.md §7.
//!
//! # Method
//! 1. The independent spectrum ([`crate::operator::spectrum`]) for levels 0..K+1; the window is
//!    (threshold, √(E_K E_{K+1})], so that it holds the eigenvalues of the audited levels and no
//!    other.
//! 2. ν(a) is scanned over the window ([`verify::nu_scan`]); every integer crossing is an attractor
//!    modulus. Those with ν = n + 1, n ∈ 0..K, are the attractor moduli of the levels
//!    ([`crate::curve::attractor`], to the requested digits); any other crossing is refined in double
//!    precision and must match an eigenvalue too.
//! 3. Matching, both ways: an attractor modulus a and an eigenvalue E match when
//!    |a − E|/E < max([`MATCH_FLOOR`], 100 × the spectrum's relative error estimate); an attractor
//!    modulus without an eigenvalue or an eigenvalue without an attractor modulus is listed in
//!    `unmatched`, with its nearest partner and gap. A match between different level labels is
//!    listed too.
//! 4. Per level: the profile with its eigen-equation residual ([`crate::eigenfunction::profile`]), the norm of the
//!    written values by an independent quadrature, zeros inside the outermost turning points,
//!    decay rates, agreement with the harmonic-oscillator eigenvector, route dependence and
//!    Cauchy defect ([`crate::checks::verify`]); levels run in parallel.
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
//! MATH.md §3–7; attractor moduli are eigenvalues (proven), every eigenvalue an attractor modulus
//! (conjectured): the two directions are checked separately for that reason.

use crate::checks::verify::{self, NuScan, VerifyError, Zeros};
use crate::curve::attractor::{self, AttractorError, LEVEL_OFFSET};
use crate::curve::laurent::Laurent;
use crate::curve::periods;
use crate::eigenfunction::construction::{EigenError, Eigenfunction};
use crate::eigenfunction::profile::{self, Profile, ProfileError, ProfileOptions, Target, BASE_RE};
use crate::numerics::complex::CNum;
use crate::operator::spectrum::{self, SpectrumError, SpectrumOptions};
use crate::precision::{bits_for_digits, digits_for_bits, with_guard};
use num_complex::Complex64;
use rayon::prelude::*;
use rug::Float;
use std::ops::RangeInclusive;
use thiserror::Error;

/// Smallest relative tolerance for a match of an attractor modulus and an eigenvalue.
pub const MATCH_FLOOR: f64 = 1e-8;

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
    /// Real parts of the residual grid.
    pub grid: Vec<f64>,
    /// Relative perturbation of the level-0 modulus for the negative control.
    pub perturbation: f64,
    /// Spectrum bases: solved at `basis` and up the ladder to `max_basis`.
    pub spectrum_basis: usize,
    pub spectrum_max_basis: usize,
}

/// One audited level.
#[derive(Debug, Clone)]
pub struct LevelAudit {
    pub level: usize,
    /// The integer value of ν at the modulus.
    pub nu: i64,
    /// The independent eigenvalue of the same level and its error estimate.
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
    pub zeros: Zeros,
    /// Zeros beyond the turning points on the output grid, with their spacing law.
    pub tail_zeros: [verify::TailZeros; 2],
    /// max|ψ − ψ_HO| / max|ψ| after normalization and phase alignment.
    pub eigenvector_difference: f64,
    pub route_dependence: f64,
    pub cauchy_defect: f64,
}

/// An attractor modulus without an eigenvalue, or an eigenvalue without an attractor modulus.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Unmatched {
    /// "attractor_modulus", "eigenvalue" or "level_label".
    pub kind: String,
    pub value: f64,
    /// ν for an attractor modulus, the level for an eigenvalue.
    pub label: i64,
    pub nearest: f64,
    pub relative_gap: f64,
    pub note: String,
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

/// A whole audit.
#[derive(Debug, Clone)]
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
    pub eigenvalues_in_window: Vec<f64>,
    /// Series-vs-path agreement of Ω_α, R_α at the largest audited modulus (None: below the
    /// series radius).
    pub period_agreement_digits: Option<f64>,
    /// Precision of the diagnostics.
    pub diagnostic_bits: u32,
    /// Spectrum bases solved and working precision.
    pub spectrum_bases: Vec<usize>,
    pub spectrum_bits: u32,
}

/// Runs the audit; `progress` is told of every finished stage (for a progress bar).
///
/// # Errors
/// See [`AuditError`].
pub fn run(
    laurent: &Laurent,
    options: &AuditOptions,
    progress: &(dyn Fn(&str) + Sync),
) -> Result<Audit, AuditError> {
    let (lo, hi) = (*options.levels.start(), *options.levels.end());
    let spec = spectrum::solve(
        laurent,
        &SpectrumOptions {
            levels: 0..=hi + 1,
            basis: options.spectrum_basis.max(spectrum::minimum_basis(hi + 1)),
            max_basis: options.spectrum_max_basis,
            digits: options.digits.min(16),
            squeeze: 1.0,
        },
    )?;
    progress("independent spectrum");
    let e = |k: usize| spec.levels[k].value.to_f64();
    let window_top = (e(hi) * e(hi + 1)).sqrt();
    let (_, threshold) = laurent.classical_minimum();
    let scan = verify::nu_scan(laurent, window_top, 48 + 12 * (hi + 1))?;
    progress("nu scan");
    let attractors = attractor::solve_levels(laurent, lo..=hi, options.digits.max(20))?;
    progress("attractor moduli");
    let levels: Vec<LevelAudit> = attractors
        .par_iter()
        .map(|at| {
            let audit = audit_level(laurent, at, &spec, options);
            progress(&format!("level {}", at.level));
            audit
        })
        .collect::<Result<_, _>>()?;
    let eigenvalues_in_window: Vec<f64> =
        (0..=hi + 1).map(e).filter(|&v| v <= window_top).collect();
    let unmatched = match_both_ways(laurent, &scan, &attractors, &spec, &eigenvalues_in_window)?;
    let norms: Vec<_> = levels.iter().map(|l| &l.profile.normalization).collect();
    let orthogonality = verify::orthogonality(&norms);
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
    progress("negative control");
    let top = &attractors[attractors.len() - 1].modulus;
    let bits = with_guard(bits_for_digits(options.digits.max(20) as f64));
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

/// The diagnostics run in double precision while |λ| costs fewer than [`DIAGNOSTIC_LOSS_MAX`]
/// digits (they judge defects of 1e-8 against 1e-11 and count zeros, not the last digit), else
/// at 19 + log₁₀|λ| digits.
pub fn diagnostic_bits(p: &Profile) -> u32 {
    let lost = p.lambda.norm().max(1.0).log10();
    if lost <= DIAGNOSTIC_LOSS_MAX {
        53
    } else {
        with_guard(bits_for_digits(19.0 + lost))
    }
}

/// Digits the diagnostics may lose to |λ| in double precision.
pub const DIAGNOSTIC_LOSS_MAX: f64 = 5.0;

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
    let digits = if a.prec() == 53 {
        15.0
    } else {
        digits_for_bits(a.prec()) as f64
    };
    let eig = Eigenfunction::new(laurent, a, digits, None, BASE_RE)?;
    Ok(Diagnostics {
        zeros: verify::zeros_inside(&eig, rule)?,
        eigenvector_difference: verify::eigenvector_difference(&eig, spec, level)?,
        route_dependence: verify::route_dependence(laurent, &eig)?,
        cauchy_defect: verify::cauchy_defect(&eig)?,
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
    if bits == 53 {
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

/// The level audit of a profile against level `level` of the spectrum.
fn level_audit(
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
    let norm = verify::norm_coarse(&profile.normalization);
    let norm_on_grid = verify::norm_on_grid(&profile.grid, &profile.main);
    let tail_zeros = verify::tail_zeros(
        &profile.grid,
        &profile.main,
        profile.rule,
        d.zeros.window,
        d.end_gaps,
    );
    Ok(LevelAudit {
        level,
        nu: profile.nu.round() as i64,
        spectrum_value: sl.value.clone(),
        spectrum_error: sl.error_estimate,
        agreement_digits,
        agreement_cap: cap,
        norm,
        norm_on_grid,
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
    pub grid: Vec<f64>,
    pub digits: u32,
    pub allow_non_attractor: bool,
    /// Relative perturbation of the modulus for the negative control.
    pub perturbation: f64,
}

/// All checks of one eigenfunction.
#[derive(Debug, Clone)]
pub struct Check {
    pub level: LevelAudit,
    pub negative_control: NegativeControl,
    pub period_agreement_digits: Option<f64>,
    pub spectrum_bases: Vec<usize>,
    pub spectrum_bits: u32,
}

/// Runs every check of MATH.md §7 on one eigenfunction (orthogonality needs several levels: see
/// [`run`]). For a modulus that is not an attractor modulus (allowed explicitly) the level is the
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
        (profile.nu.round().max(LEVEL_OFFSET as f64) as i64 - LEVEL_OFFSET) as usize
    });
    let spec = spectrum::solve(
        laurent,
        &SpectrumOptions {
            levels: 0..=level + 1,
            basis: 200.max(spectrum::minimum_basis(level + 1)),
            max_basis: 300,
            digits: options.digits.min(16),
            squeeze: 1.0,
        },
    )?;
    let audited = level_audit(laurent, profile, &spec, level)?;
    let negative_control = negative_control(laurent, &audited, options.perturbation)?;
    let bits = with_guard(bits_for_digits(options.digits.max(20) as f64));
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
fn negative_control(
    laurent: &Laurent,
    level: &LevelAudit,
    perturbation: f64,
) -> Result<NegativeControl, AuditError> {
    let a = level.profile.modulus.to_f64() * (1.0 + perturbation);
    let eig = Eigenfunction::new(laurent, Complex64::new(a, 0.0), 15.0, None, BASE_RE)?;
    Ok(NegativeControl {
        perturbation,
        modulus: a,
        route_dependence: verify::route_dependence(laurent, &eig)?,
        cauchy_defect: verify::cauchy_defect(&eig)?,
        route_dependence_at_attractor: level.route_dependence,
        cauchy_defect_at_attractor: level.cauchy_defect,
    })
}

/// Relative tolerance of a match with eigenvalue `k`.
fn tolerance(spec: &spectrum::Spectrum, k: usize) -> f64 {
    let l = &spec.levels[k];
    (100.0 * l.error_estimate / l.value.to_f64()).max(MATCH_FLOOR)
}

/// Both directions of the matching (see the module docs): the solved attractor moduli and every
/// other crossing of the scan, against the spectrum.
fn match_both_ways(
    laurent: &Laurent,
    scan: &NuScan,
    attractors: &[attractor::Attractor],
    spec: &spectrum::Spectrum,
    window_eigenvalues: &[f64],
) -> Result<Vec<Unmatched>, AuditError> {
    let mut fam = attractor::Family::new(laurent)?;
    let mut moduli: Vec<(f64, i64)> = attractors
        .iter()
        .map(|a| (a.modulus.to_f64(), a.nu))
        .collect();
    for &(t, k) in &scan.crossings {
        let solved = attractors.iter().any(|a| a.nu == k);
        let count = scan.crossings.iter().filter(|c| c.1 == k).count();
        if !solved || count > 1 {
            moduli.push((refine_crossing(&mut fam, t, k)?.exp(), k));
        }
    }
    let eigen: Vec<(f64, f64)> = (0..spec.levels.len())
        .map(|k| (spec.levels[k].value.to_f64(), tolerance(spec, k)))
        .collect();
    Ok(match_moduli(&moduli, &eigen, window_eigenvalues.len()))
}

/// Matches attractor moduli `(a, ν)` with eigenvalues `(E_k, relative tolerance)` (index = level)
/// both ways: every modulus must lie within tolerance of an eigenvalue, of the level ν − 1, and
/// each of the first `window_count` eigenvalues within tolerance of a modulus. Returns what did
/// not match.
pub fn match_moduli(
    moduli: &[(f64, i64)],
    eigen: &[(f64, f64)],
    window_count: usize,
) -> Vec<Unmatched> {
    let nearest = |a: f64, set: &mut dyn Iterator<Item = f64>| -> Option<(usize, f64)> {
        set.enumerate()
            .map(|(i, v)| (i, (a - v).abs() / v))
            .min_by(|x, y| x.1.total_cmp(&y.1))
    };
    let mut out = Vec::new();
    for &(a, k) in moduli {
        let Some((i, gap)) = nearest(a, &mut eigen.iter().map(|e| e.0)) else {
            continue;
        };
        let level = k - LEVEL_OFFSET;
        if gap >= eigen[i].1 {
            out.push(Unmatched {
                kind: "attractor_modulus".into(),
                value: a,
                label: k,
                nearest: eigen[i].0,
                relative_gap: gap,
                note: "no eigenvalue of the independent spectrum within tolerance".into(),
            });
        } else if i as i64 != level {
            out.push(Unmatched {
                kind: "level_label".into(),
                value: a,
                label: k,
                nearest: eigen[i].0,
                relative_gap: gap,
                note: format!(
                    "the attractor modulus with nu = {k} matches eigenvalue {i}, not level {level}"
                ),
            });
        }
    }
    for (i, &(v, tol)) in eigen.iter().enumerate().take(window_count) {
        match nearest(v, &mut moduli.iter().map(|m| m.0)) {
            Some((_, gap)) if gap < tol => {}
            found => out.push(Unmatched {
                kind: "eigenvalue".into(),
                value: v,
                label: i as i64,
                nearest: found.map(|f| moduli[f.0].0).unwrap_or(f64::NAN),
                relative_gap: found.map(|f| f.1).unwrap_or(f64::INFINITY),
                note: "no attractor modulus within tolerance".into(),
            }),
        }
    }
    out
}

/// A crossing ν = k of the scan refined by Newton in log a (double precision).
fn refine_crossing(fam: &mut attractor::Family, t0: f64, k: i64) -> Result<f64, AuditError> {
    let mut t = t0;
    for _ in 0..30 {
        let (v, slope) = fam.nu_f64(t)?;
        let step = (v - k as f64) / slope;
        t -= step.clamp(-0.2, 0.2);
        if step.abs() < 1e-14 * t.abs().max(1.0) {
            break;
        }
    }
    Ok(t)
}
