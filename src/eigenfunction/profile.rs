//! The sampled eigenfunction: ψ at an attractor modulus on a grid of R (and, on request, on the
//! boundary lines Im r = ±2π of the strip), normalized, phase-fixed, with the eigen-equation
//! residual formed from the three independently integrated lines — at a working precision chosen
//! so that the reported digits are real.
//!
//! # Method
//! 1. The modulus: the attractor modulus of a level (ν = n + 1, [`crate::curve::attractor`]), or a given
//!    modulus, refused when ν is more than [`crate::precision::ATTRACTOR_TOLERANCE`] from an integer unless allowed.
//! 2. The working precision: the exponent integrals grow like |λ| = |R_α/Ω_α| (≈ 50 at F0 level 0,
//!    2e5 at level 9) and exp loses log₁₀|λ| digits (measured residual ≈ 2e-15·|λ| in double
//!    precision), so the double-precision path is used only while that stays below 1e-11; else
//!    MPFR at 16 + log₁₀|λ| digits (or the requested digits plus the loss), with the attractor
//!    modulus re-solved at that precision.
//! 3. The lines Im r = 0, ±2π by spine marching ([`Eigenfunction::psi_on_line`]), in parallel.
//! 4. The cancellation in χ − χ∘ι̃ is measured on every line; if fewer than
//!    [`DIGITS_LEFT_MIN`] digits would survive on R the lines are recomputed at a precision that
//!    covers the loss (at most three times).
//! 5. Per point ([`PointDigits`]): the digits each value holds relative to its own size — the
//!    working digits less the cancellation in χ − χ∘ι̃ at that point and the error of the
//!    exponent integral ([`crate::precision::point_loss_digits`]). Values with fewer than the
//!    wanted digits ([`crate::precision::point_digits_wanted`]), and in double precision every
//!    value beyond [`DOUBLE_RANGE`], are computed again at a raised precision on all lines, with
//!    their residual (twice at most, within [`crate::precision::raise_budget_digits`]); a zero of
//!    ψ (a value that gains no digits of its own when the precision is raised,
//!    [`crate::precision::is_rounding_noise`], e.g. the odd ψ of dP3 levels 1 and 3 at r = 0)
//!    keeps its first value if that holds the wanted digits relative to its line's peak, and is
//!    listed with those digits ([`PointDigits::zeros`]); what is still short has no value (`nan`
//!    in the files) and is listed with its reason.
//! 6. Reach ([`reach`]): a grid beyond |r| = [`REACH`] (less at a merging end when the loss
//!    |r|/(2 ln 10) exceeds the budget) is refused before any sampling
//!    ([`ProfileError::BeyondReach`], an input error), with the size of |ψ| there from the decay
//!    rate κ of the end (1/2 branched, 1 otherwise).
//! 7. Residual `A ψ(r − 2πi) + C ψ(r + 2πi) − (B + a) ψ(r)` relative to max|ψ| on the grid, at the
//!    working precision, before any rounding. At the poles of ψ on the boundary lines (r = 0 when
//!    A or C vanishes at x = −1) the products A·ψ(r − 2πi), C·ψ(r + 2πi) are finite and are
//!    evaluated as limits: by the mean-value formula of the analytic product on a circle around r.
//! 8. Unit L² norm on R ([`Eigenfunction::normalization`]) and the phase rule: with a reality rule
//!    k ([`phase::reality_rule`]) e^{−ikr²/(8π)}ψ is made real and positive where |ψ| is largest
//!    on the grid; otherwise ψ itself is made real and positive there.
//!
//! # Accuracy
//! Measured: residual ≈ 10^−(digits − 6) (F0 level 5: 2e-26 at 16 requested digits, which runs at
//! 102 bits because of |λ|; 1e-49 at 40 digits); see `tests/eigenfn.rs` and `tests/verify.rs`.
//!
//! # Errors
//! [`ProfileError`].
//!
//! # References
//! docs/MATHEMATICS.md §5–7.

use crate::checks::residual::{absolute_residuals, eigen_equation_residual, Residual};
use crate::curve::attractor::{self, AttractorError};
use crate::curve::continuation::March;
use crate::curve::cover::{CoverError, Curve, EndRoots};
use crate::curve::laurent::{Laurent, LaurentError};
use crate::curve::periods::{self, PeriodsError};
use crate::eigenfunction::construction::{EigenError, Eigenfunction, LineSamples};
use crate::eigenfunction::normalization::Normalization;
use crate::eigenfunction::phase;
use crate::eigenfunction::poles::{self, Pole};
use crate::input::grid::Grid;
use crate::input::numbers;
use crate::input::selection::SelectionError;
use crate::numerics::complex::CNum;
use crate::numerics::serial;
use crate::operator::quantum_curve::QuantumCurve;
use crate::precision::{
    digits_for_bits, digits_of, expected_loss_digits, is_rounding_noise, lambda_loss_digits,
    merging_reach, normalization_digits, point_digits_wanted, profile_digits,
    profile_digits_after_loss, profile_in_double, raise_budget_digits, raised_point_digits,
    working_bits, ATTRACTOR_TOLERANCE, DIGITS_LEFT_MIN, DOUBLE_BITS, DOUBLE_RANGE, MAX_DIGITS,
    MIN_ATTRACTOR_DIGITS, RAISE_MARGIN_DIGITS, REACH,
};
use crate::progress::{Counter, Observer, Stage};
use num_complex::Complex64;
use rug::Float;
use thiserror::Error;

/// Step of the normalization quadrature on R.
pub const NORM_STEP: f64 = 0.05;
/// Real part of the base point on the spine.
pub const BASE_RE: f64 = 0.3;

/// Why a profile could not be built.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum ProfileError {
    #[error(transparent)]
    Selection(#[from] SelectionError),
    /// The given modulus is not an attractor modulus.
    #[error("the modulus {modulus} is not an attractor modulus: nu = {nu:.12}, {distance:.3e} from the nearest integer {nearest} (a function built there is not an eigenfunction)")]
    NotAttractor {
        modulus: String,
        nu: f64,
        distance: f64,
        nearest: i64,
    },
    #[error(transparent)]
    Attractor(#[from] AttractorError),
    #[error(transparent)]
    Eigen(#[from] EigenError),
    #[error(transparent)]
    Cover(#[from] CoverError),
    #[error(transparent)]
    Periods(#[from] PeriodsError),
    #[error(transparent)]
    Operator(#[from] LaurentError),
    /// A level above [`MAX_LEVEL`].
    #[error("level {level} is beyond the levels whose eigenfunctions regwave builds (0 to {max}): above them the single-valuedness checks fail for some families (P2 from level 30); the attractor moduli themselves are solved to level 1000 (`attractors`)")]
    LevelBeyondReach { level: usize, max: usize },
    /// The grid reaches farther out than the profile can compute ψ ([`reach`]).
    #[error("the grid reaches |r| = {r}, beyond the reach |r| <= {reach} of this eigenfunction: there |psi| is below 10^-{below:.0} of its peak (decay e^(-{rate}|r|)), and {cause}")]
    BeyondReach {
        r: f64,
        reach: f64,
        below: f64,
        rate: f64,
        cause: &'static str,
    },
}

impl ProfileError {
    /// Whether the error is the caller's input (exit code 2) rather than a failed computation.
    pub fn is_input(&self) -> bool {
        matches!(
            self,
            ProfileError::Selection(_)
                | ProfileError::NotAttractor { .. }
                | ProfileError::BeyondReach { .. }
                | ProfileError::LevelBeyondReach { .. }
        )
    }
}

/// The highest level whose eigenfunction is built. Measured with `examples/route_probe.rs` (30
/// digits, levels 10, 20, 30, all 15 families): route dependence and Cauchy defect stay at
/// 1e-31…1e-38 through level 30 for 14 families, but for P2 the Cauchy defect grows from 1e-32
/// (level 10) to 1e-23 (level 20) and both figures reach O(1e-4…1) at level 30 (and at 40, 60,
/// 100; F0 from level 50), while the eigen-equation residual stays tiny (1e-26…1e-50: it is no
/// negative control). Until that is understood, levels above 20 are refused for eigenfunctions;
/// their attractor moduli are solved to level [`attractor::MAX_LEVEL`].
pub const MAX_LEVEL: usize = 20;

/// Checks that every level of `levels` is within [`MAX_LEVEL`].
///
/// # Errors
/// [`ProfileError::LevelBeyondReach`] naming the highest level asked for.
pub fn check_level_reach(levels: &std::ops::RangeInclusive<usize>) -> Result<(), ProfileError> {
    match *levels.end() {
        level if level > MAX_LEVEL => Err(ProfileError::LevelBeyondReach {
            level,
            max: MAX_LEVEL,
        }),
        _ => Ok(()),
    }
}

/// Which eigenfunction.
#[derive(Debug, Clone, PartialEq)]
pub enum Target {
    /// The attractor modulus of level n (ν = n + 1).
    Level(usize),
    /// An attractor modulus already solved (re-solved only if more precision is needed).
    Attractor(attractor::Attractor),
    /// A modulus given as decimal text (read at the working precision).
    Modulus(String),
}

/// What to sample and how precisely.
#[derive(Debug, Clone)]
pub struct ProfileOptions {
    /// The grid of real parts: exact, its points rounded to the working precision (to f64 in
    /// double precision).
    pub grid: Grid,
    /// Also sample the lines Im r = ±2π (and form the residual).
    pub strip: bool,
    /// Requested decimal digits (16 or less: double precision where it suffices).
    pub digits: u32,
    /// Build at a modulus that is not an attractor modulus.
    pub allow_non_attractor: bool,
}

/// The sampled eigenfunction with everything needed to reproduce and judge it.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Profile {
    /// The level (ν − 1) when the modulus is an attractor modulus with ν ≥ 1.
    pub level: Option<usize>,
    /// The modulus at the final working precision.
    #[serde(serialize_with = "serial::float")]
    pub modulus: Float,
    /// Its confirmed digits: those of the attractor solve (a second solve at higher precision
    /// agrees on them), or the digits of a given modulus as typed.
    pub modulus_digits: u32,
    /// ν at the modulus (at the precision it was computed at: the integer itself for an
    /// attractor modulus solved to the requested digits) and its distance to the nearest integer.
    #[serde(serialize_with = "serial::float")]
    pub nu: Float,
    pub nu_distance: f64,
    /// λ = R_α/Ω_α at the working precision.
    #[serde(serialize_with = "serial::complex")]
    pub lambda: rug::Complex,
    pub spine: f64,
    #[serde(serialize_with = "serial::complex64")]
    pub base: Complex64,
    /// Working precision (53 = double).
    pub precision_bits: u32,
    /// Decimal digits of the working precision.
    pub working_digits: f64,
    /// log₁₀|λ|: digits the exponential costs.
    pub lambda_digits_lost: f64,
    /// Digits consumed by χ − χ∘ι̃ on R, and on all three lines.
    pub cancellation_digits: f64,
    pub strip_cancellation_digits: Option<f64>,
    /// The grid as given (exact).
    #[serde(skip)]
    pub grid_spec: Grid,
    /// The grid points rounded to f64 (for figures and double-precision checks).
    pub grid: Vec<f64>,
    /// ψ on R at the grid points, normalized and phase-fixed (None: not sampled).
    #[serde(serialize_with = "serial::complex64_line")]
    pub real_line: Vec<Option<Complex64>>,
    /// ψ on the boundary line Im r = +2π (empty without `strip`; None on a pole).
    #[serde(serialize_with = "serial::complex64_line")]
    pub upper_line: Vec<Option<Complex64>>,
    /// ψ on the boundary line Im r = −2π (empty without `strip`; None on a pole).
    #[serde(serialize_with = "serial::complex64_line")]
    pub lower_line: Vec<Option<Complex64>>,
    /// The three lines at the working precision (None in double precision, where the lines above
    /// are the values).
    pub precise: Option<PreciseLines>,
    pub residual: Option<Residual>,
    /// The digits each written value holds, and the points raised or left without a value.
    pub point_digits: PointDigits,
    pub poles: Vec<Pole>,
    /// Real parts of the branch points in the period strip Im z ∈ (−π, π].
    pub branch_points: Vec<[f64; 2]>,
    /// The reality rule k and the largest imaginary part left after applying it (relative).
    pub rule: Option<i64>,
    pub reality_defect: Option<f64>,
    /// The factor that takes the raw ψ (χ = 1 at the base point) to the written one: the unit
    /// norm and the phase rule.
    #[serde(serialize_with = "serial::complex64")]
    pub factor: Complex64,
    pub normalization: Normalization,
}

/// ψ on the three lines at the working precision, normalized and phase-fixed as the lines of the
/// [`Profile`], with the digits each supports.
#[derive(Debug, Clone, serde::Serialize)]
pub struct PreciseLines {
    /// ψ on R at the grid points rounded to the working precision.
    #[serde(serialize_with = "serial::complex_line")]
    pub real_line: Vec<Option<rug::Complex>>,
    /// ψ on Im r = +2π (empty without the strip; None on a pole).
    #[serde(serialize_with = "serial::complex_line")]
    pub upper_line: Vec<Option<rug::Complex>>,
    /// ψ on Im r = −2π (empty without the strip; None on a pole).
    #[serde(serialize_with = "serial::complex_line")]
    pub lower_line: Vec<Option<rug::Complex>>,
    /// Decimal digits each line (R, +2π, −2π) supports relative to its largest |ψ|: the working
    /// digits less the cancellation in χ − χ∘ι̃ measured on that line.
    pub digits: [f64; 3],
    /// The factor that took the raw lines to these (unit norm and phase rule).
    #[serde(skip)]
    pub factor: rug::Complex,
}

/// The digits of every written value of a profile, relative to its own size, and the points
/// that were computed again at a raised precision or left without a value.
#[derive(Debug, Clone, serde::Serialize)]
pub struct PointDigits {
    /// Digits each value must hold ([`crate::precision::point_digits_wanted`]).
    pub wanted: f64,
    /// Per line (R, +2π, −2π) and point, the digits the value holds relative to its own |ψ|
    /// (None: a pole, or no value).
    pub relative: [Vec<Option<f64>>; 3],
    /// The points computed again at a raised precision.
    pub raised: Vec<PointNote>,
    /// The working precision of the last recomputation (None: none was needed).
    pub raised_bits: Option<u32>,
    /// The points left without a value (written as `nan`), with the reason.
    pub dropped: Vec<PointNote>,
    /// Zeros of ψ: points whose value is rounding noise at every precision tried (its digits
    /// relative to its own size did not grow when the precision was raised); the first value is
    /// kept, held absolutely, with its digits relative to the line's peak.
    pub zeros: Vec<PointNote>,
    /// Points whose recomputation at a raised precision gave no usable value (no finite digits):
    /// the first value is kept with the digits it holds (fewer than `wanted`, stated here, and
    /// relative to the line's peak) rather than dropped.
    pub kept_short: Vec<PointNote>,
}

/// A grid point of one line of a profile that was recomputed or dropped.
#[derive(Debug, Clone, serde::Serialize)]
pub struct PointNote {
    /// 0: R, 1: Im r = +2π, 2: Im r = −2π.
    pub line: usize,
    /// Index in the grid, and the point.
    pub index: usize,
    pub r: f64,
    /// Digits the value held relative to its own size (at the run's precision for a raised
    /// point or a zero; at the last precision tried for a dropped one).
    pub digits: f64,
    /// For a zero of ψ: the digits of its value relative to the largest |ψ| on its line (its
    /// absolute accuracy).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub digits_relative_to_peak: Option<f64>,
    pub reason: String,
}

impl Profile {
    /// The fewest digits a value on R holds relative to the largest |ψ| on R (the absolute
    /// accuracy of the line, per point: its digits relative to its own size plus
    /// log₁₀(max|ψ|/|ψ|)); None without values.
    pub fn digits_left_min_on_r(&self) -> Option<f64> {
        let peak = self
            .real_line
            .iter()
            .flatten()
            .map(|v| v.norm())
            .fold(0.0, f64::max);
        self.real_line
            .iter()
            .zip(&self.point_digits.relative[0])
            .filter_map(|(v, d)| Some(d.as_ref()? + (peak / v.as_ref()?.norm()).log10()))
            .reduce(f64::min)
    }
}

impl PointDigits {
    /// The smallest digits relative to its own size of a value on `line`, zeros of ψ aside
    /// (their digits are stated relative to the peak, [`PointDigits::zeros`]).
    pub fn min_relative(&self, line: usize) -> Option<f64> {
        self.relative[line]
            .iter()
            .enumerate()
            .filter(|(k, _)| !self.zeros.iter().any(|z| z.index == *k))
            .filter_map(|(_, d)| *d)
            .reduce(f64::min)
    }
}

/// The modulus and what is known of it before sampling.
struct Resolved {
    modulus: Float,
    level: Option<usize>,
    nu: Float,
    distance: f64,
    /// Confirmed digits of the modulus (see [`Profile::modulus_digits`]).
    digits: u32,
}

/// Builds the profile of the eigenfunction `target` of φ.
///
/// # Errors
/// See [`ProfileError`].
///
/// # Example
/// The ground state of the hexagon dP3 on R: unit L² norm, no zero inside the turning points,
/// and e^{ir²/(8π)}ψ real (its reality rule k = −1):
/// ```
/// use regwave::{build_profile, Grid, ProfileOptions, Target};
/// let dp3 = regwave::family("dP3").unwrap();
/// let options = ProfileOptions {
///     grid: Grid::parse("-8:8:81").unwrap(),
///     strip: false,
///     digits: 16,
///     allow_non_attractor: false,
/// };
/// let psi = build_profile(&dp3, &Target::Level(0), &options).unwrap();
/// assert_eq!(psi.rule, Some(-1));
/// assert!(psi.reality_defect.unwrap() < 1e-9);
/// assert!((regwave::checks::norms::norm_coarse(&psi.normalization) - 1.0).abs() < 1e-12);
/// ```
pub fn build(
    laurent: &Laurent,
    target: &Target,
    options: &ProfileOptions,
) -> Result<Profile, ProfileError> {
    build_observed(laurent, target, options, &crate::progress::quiet)
}

/// As [`build`], telling `progress` of every finished stage ([`Stage::Modulus`], then
/// [`Stage::Sampled`] once per
/// sampling pass).
///
/// # Errors
/// See [`ProfileError`].
pub fn build_observed(
    laurent: &Laurent,
    target: &Target,
    options: &ProfileOptions,
    progress: Observer<'_>,
) -> Result<Profile, ProfileError> {
    let resolved = resolve(laurent, target, options)?;
    let stages = Counter::new(progress, 2);
    stages.finished(Stage::Modulus);
    // Digits the exponential of the regulator integral costs.
    let lambda = lambda_estimate(laurent, resolved.modulus.to_f64())?;
    let lost = lambda_loss_digits(lambda);
    let double = profile_in_double(options.digits, lambda);
    let work_digits = profile_digits(options.digits, lambda);
    check_reach(laurent, resolved.modulus.to_f64(), options, work_digits)?;
    let mut profile = sample_at(laurent, target, &resolved, work_digits, double, options)?;
    stages.finished(Stage::Sampled);
    // The loss is only measurable below the working precision, so the check repeats (at most
    // three times) until at least DIGITS_LEFT_MIN digits are left everywhere on R. On the strip
    // lines far out at high levels |ψ| is astronomically small against |χ|: their accuracy is
    // absolute (relative to max|ψ| on R, as the residual is) and their loss is reported only.
    for _ in 0..3 {
        if profile.working_digits - profile.cancellation_digits >= DIGITS_LEFT_MIN {
            break;
        }
        let need = profile_digits_after_loss(profile.cancellation_digits, profile.working_digits);
        profile = sample_at(laurent, target, &resolved, need, false, options)?;
        stages.finished(Stage::Sampled);
    }
    profile.lambda_digits_lost = lost;
    settle_points(laurent, target, &resolved, options, &mut profile)?;
    Ok(profile)
}

/// The end kinds of the curve at the two ends of R and the decay rate of |ψ| there (κ = 1/2 at a
/// branched end, 1 otherwise: docs/MATHEMATICS.md §2, [`crate::eigenfunction::normalization`]).
fn ends(laurent: &Laurent, a: f64) -> Result<[(EndRoots, f64); 2], ProfileError> {
    let curve = Curve::new(laurent, Complex64::new(a, 0.0))?;
    Ok(curve.end_roots().map(|e| {
        let rate = if e == EndRoots::Branched { 0.5 } else { 1.0 };
        (e, rate)
    }))
}

/// The largest |r| a profile of `laurent` at the modulus `a` reaches at each end (left, right),
/// working at `working` digits with values that must hold `wanted` digits, and the cause of the
/// limit: [`REACH`] (the continuation's range), less at an end where the roots merge when the
/// loss |r|/(2 ln 10) would exceed the budget of a recomputation
/// ([`crate::precision::merging_reach`]).
///
/// # Errors
/// See [`ProfileError`] (the curve at `a`).
pub fn reach(
    laurent: &Laurent,
    a: f64,
    wanted: f64,
    working: f64,
) -> Result<[(f64, &'static str); 2], ProfileError> {
    let budget = raise_budget_digits(working);
    Ok(ends(laurent, a)?.map(|(end, _)| {
        let merging = merging_reach(wanted, budget);
        if end == EndRoots::Merging && merging < REACH {
            (merging, "at this end the two roots merge: chi - chi o iota loses |r|/(2 ln 10) digits, more than the budget of raised precision")
        } else {
            (REACH, "the continuation steers by double-precision magnitudes of x = -e^r and of the curve's coefficients, which leave the double range")
        }
    }))
}

/// Refuses a grid that reaches beyond [`reach`], before any sampling.
fn check_reach(
    laurent: &Laurent,
    a: f64,
    options: &ProfileOptions,
    working: f64,
) -> Result<(), ProfileError> {
    let wanted = point_digits_wanted(options.digits);
    let limits = reach(laurent, a, wanted, working)?;
    let rates = ends(laurent, a)?.map(|e| e.1);
    for r in options.grid.values() {
        let side = usize::from(r > 0.0);
        let (limit, cause) = limits[side];
        if !(r.abs() <= limit) {
            return Err(ProfileError::BeyondReach {
                r: r.abs(),
                reach: limit,
                below: rates[side] * limit / std::f64::consts::LN_10,
                rate: rates[side],
                cause,
            });
        }
    }
    Ok(())
}

/// The values of the profile that hold fewer than the wanted digits relative to their own size
/// ([`crate::precision::point_digits_wanted`]), and in double precision those beyond
/// [`DOUBLE_RANGE`], are computed again at a raised precision
/// ([`crate::precision::raised_point_digits`]; twice at most, within
/// [`crate::precision::raise_budget_digits`]), on all sampled lines at once and with their
/// residual; what still falls short is left without a value and listed with its reason.
fn settle_points(
    laurent: &Laurent,
    target: &Target,
    resolved: &Resolved,
    options: &ProfileOptions,
    p: &mut Profile,
) -> Result<(), ProfileError> {
    let wanted = p.point_digits.wanted;
    let double = p.precision_bits == DOUBLE_BITS;
    let kinds = ends(laurent, p.modulus.to_f64())?;
    let lines_n = if options.strip { 3 } else { 1 };
    // Per short point, the loss to plan for: measured, or expected where not measurable (a
    // double-precision value out of range, before it was raised).
    let plan = |p: &Profile, k: usize, work: f64, raised: bool| -> Option<f64> {
        let out_of_range = |r: f64| double && !raised && r.abs() > DOUBLE_RANGE;
        let r = p.grid[k];
        let mut short = false;
        let mut loss: f64 = 0.0;
        for l in 0..lines_n {
            let Some(d) = p.point_digits.relative[l][k] else {
                continue;
            };
            short |= d < wanted || out_of_range(r);
            let measured = work - d;
            loss = loss.max(if measured.is_finite() && !out_of_range(r) {
                measured
            } else {
                expected_loss_digits(r, kinds[usize::from(r > 0.0)].0 == EndRoots::Merging)
            });
        }
        short.then_some(loss)
    };
    let mut work = p.working_digits;
    let mut todo: Vec<(usize, f64)> = (0..p.grid.len())
        .filter_map(|k| plan(p, k, work, false).map(|l| (k, l)))
        .collect();
    // The values as first computed: kept at a zero of ψ (see below).
    let original: Vec<(usize, [Option<rug::Complex>; 3])> = todo
        .iter()
        .map(|&(k, _)| (k, [0, 1, 2].map(|l| value_at(p, l, k))))
        .collect();
    let first_digits = p.point_digits.relative.clone();
    let first_residual = p.residual.clone();
    let first: Vec<(usize, f64)> = todo
        .iter()
        .map(|&(k, _)| (k, min_digits(p, k, lines_n)))
        .collect();
    let mut reason = String::new();
    for _ in 0..2 {
        if todo.is_empty() {
            break;
        }
        let loss = todo.iter().map(|t| t.1).fold(0.0, f64::max);
        let Some(need) = raised_point_digits(wanted, loss, work) else {
            reason = format!(
                "needs about {:.0} working digits (a loss of {loss:.0}), beyond the budget of {:.0}",
                wanted + loss + RAISE_MARGIN_DIGITS,
                raise_budget_digits(p.working_digits)
            );
            break;
        };
        let bits = working_bits(need);
        let (a, _) = modulus_at(laurent, target, resolved, bits)?;
        let eig = Eigenfunction::new(
            laurent,
            rug::Complex::with_val(bits, (&a, 0)),
            Some(p.spine),
            BASE_RE,
        )?;
        let all = options.grid.points_at(bits);
        let points: Vec<rug::Complex> = todo
            .iter()
            .map(|&(k, _)| rug::Complex::with_val(bits, (&all[k], 0)))
            .collect();
        let raw = lines(&eig, &points, options.strip)?;
        let indices: Vec<usize> = todo.iter().map(|t| t.0).collect();
        if let Some(res) = p.residual.as_mut() {
            let q = QuantumCurve::new(laurent)?;
            let (absolute, _) = absolute_residuals(
                &q,
                &eig,
                &points,
                &raw.real_line,
                &raw.upper_line,
                &raw.lower_line,
            )?;
            res.replace(&indices, &absolute);
        }
        let factor = match &p.precise {
            Some(lines) => lines.factor.clone(),
            None => rug::Complex::with_val(bits, (p.factor.re, p.factor.im)),
        };
        let high = digits_of(bits);
        let raw_lines = [&raw.real_line, &raw.upper_line, &raw.lower_line];
        for (j, &k) in indices.iter().enumerate() {
            for l in 0..lines_n {
                let value = raw_lines[l][j].as_ref().map(|v| v.clone() * &factor);
                // The factor holds the run's working digits.
                let held = raw.point_losses[l][j].map(|loss| (high - loss).min(p.working_digits));
                p.point_digits.relative[l][k] = held.filter(|_| value.is_some());
                set_value(p, l, k, value);
            }
        }
        p.point_digits.raised_bits = Some(bits);
        work = high;
        reason = format!("holds fewer than {wanted:.0} digits at {high:.0} working digits");
        todo = indices
            .iter()
            .filter_map(|&k| plan(p, k, work, true).map(|l| (k, l)))
            .collect();
    }
    // A zero of ψ: raising the precision by (work − run) digits gained at most the margin in
    // digits relative to the value's own size (or the value is exactly 0): it is rounding noise
    // at every precision, |ψ| there is below the absolute accuracy of the line. Such a point keeps
    // its first value if that holds the wanted digits relative to the line's peak.
    let run_digits = p.working_digits;
    let mut zeros = Vec::new();
    todo.retain(|&(k, _)| {
        let i = original.iter().position(|o| o.0 == k).unwrap_or(0);
        let lines: Vec<usize> = (0..lines_n)
            .filter(|&l| first_digits[l][k].is_some())
            .collect();
        let before = lines
            .iter()
            .filter_map(|&l| first_digits[l][k])
            .fold(f64::INFINITY, f64::min);
        let after = min_digits(p, k, lines_n);
        // A double-precision value beyond the double range was raised for its range: its first
        // value is not kept.
        let noise = !(double && p.grid[k].abs() > DOUBLE_RANGE)
            && is_rounding_noise(before, after, run_digits, work, wanted);
        let kept: [Option<rug::Complex>; 3] = original[i].1.clone();
        let to_peak: Vec<Option<f64>> = lines
            .iter()
            .map(|&l| {
                zero_digits_to_peak(
                    p,
                    l,
                    k,
                    kept[l].as_ref().map(CNum::abs_f64),
                    first_digits[l][k],
                )
            })
            .collect();
        let held = to_peak
            .iter()
            .map(|d| d.unwrap_or(f64::NEG_INFINITY))
            .fold(f64::INFINITY, f64::min);
        let zero = noise && !lines.is_empty() && held >= wanted;
        // The recomputation gave no finite digits on any line (e.g. the isolated point routed
        // differently) while the first value held some: keep the first value, stated with the
        // digits it holds, instead of leaving the point without a value.
        let unusable = (0..lines_n).all(|l| {
            p.point_digits.relative[l][k].is_none_or(|d| !d.is_finite())
        });
        // `before` is the fewest digits the first value held over its lines.
        let short = !zero && unusable && !lines.is_empty() && before.is_finite() && before >= 1.0;
        if zero || short {
            for (l, v) in kept.into_iter().enumerate().take(lines_n) {
                set_value(p, l, k, v);
                p.point_digits.relative[l][k] = first_digits[l][k];
            }
            if let (Some(res), Some(old)) = (p.residual.as_mut(), &first_residual) {
                let absolute = old.per_point[k].map(|v| v * old.scale);
                res.replace(&[k], &[absolute]);
            }
        }
        if zero {
            zeros.push((k, before, after, held));
        }
        if short {
            p.point_digits.kept_short.push(PointNote {
                line: 0,
                index: k,
                r: p.grid[k],
                digits: before,
                digits_relative_to_peak: None,
                reason: format!(
                    "computed again at {work:.0} working digits without a usable value; the first value is kept, holding {before:.1} digits of its own (the fewest over its lines)"
                ),
            });
        }
        !(zero || short)
    });
    let dropped: Vec<usize> = todo.iter().map(|t| t.0).collect();
    for &k in &dropped {
        for l in 0..lines_n {
            if let Some(digits) = p.point_digits.relative[l][k] {
                p.point_digits.dropped.push(PointNote {
                    line: l,
                    index: k,
                    r: p.grid[k],
                    digits,
                    digits_relative_to_peak: None,
                    reason: reason.clone(),
                });
            }
            p.point_digits.relative[l][k] = None;
            set_value(p, l, k, None);
        }
    }
    for &(k, digits, after, held) in &zeros {
        p.point_digits.zeros.push(PointNote {
            line: 0,
            index: k,
            r: p.grid[k],
            digits,
            digits_relative_to_peak: Some(held),
            reason: format!(
                "a zero of psi: computed again with {:.0} more working digits its value {} (rounding noise at every precision); the first value is kept, holding {held:.1} digits relative to the line's peak",
                work - run_digits,
                if after == f64::NEG_INFINITY {
                    "came out exactly 0".to_string()
                } else {
                    format!("gained {:.1} digits relative to its own size", after - digits)
                }
            ),
        });
    }
    if let Some(res) = p.residual.as_mut() {
        res.replace(&dropped, &vec![None; dropped.len()]);
    }
    if let Some(bits) = p.point_digits.raised_bits {
        let kept_short: Vec<usize> = p.point_digits.kept_short.iter().map(|n| n.index).collect();
        for (k, digits) in first {
            if !dropped.contains(&k) && !zeros.iter().any(|z| z.0 == k) && !kept_short.contains(&k)
            {
                p.point_digits.raised.push(PointNote {
                    line: 0,
                    index: k,
                    r: p.grid[k],
                    digits,
                    digits_relative_to_peak: None,
                    reason: format!(
                        "held {digits:.1} digits at the run's precision (fewer than the {wanted:.0} wanted, or beyond |r| = {DOUBLE_RANGE} in double precision); computed again at {bits} bits on every line"
                    ),
                });
            }
        }
    }
    Ok(())
}

/// The fewest digits relative to its own size of the values at grid point `k` (+∞ without
/// any).
fn min_digits(p: &Profile, k: usize, lines_n: usize) -> f64 {
    (0..lines_n)
        .filter_map(|l| p.point_digits.relative[l][k])
        .fold(f64::INFINITY, f64::min)
}

/// The digits relative to the largest written |ψ| on line `l` of a zero of ψ at point `k`, of
/// size `size` and holding `relative` digits relative to its own size: `relative +
/// log₁₀(peak/size)`, at most the fewest such digits of the line's other values (the value is
/// rounding noise of a computation from its neighbours; a value exactly 0 holds just that).
fn zero_digits_to_peak(
    p: &Profile,
    l: usize,
    k: usize,
    size: Option<f64>,
    relative: Option<f64>,
) -> Option<f64> {
    let line = [&p.real_line, &p.upper_line, &p.lower_line][l];
    let peak = line.iter().flatten().map(|v| v.norm()).fold(0.0, f64::max);
    let of = |size: f64, relative: f64| relative + (peak / size).log10();
    let others = line
        .iter()
        .zip(&p.point_digits.relative[l])
        .enumerate()
        .filter(|&(j, _)| j != k)
        .filter_map(|(_, (v, d))| Some((v.as_ref()?.norm(), (*d)?)))
        .filter(|&(size, _)| size > 0.0)
        .map(|(size, d)| of(size, d))
        .reduce(f64::min)?;
    match (size?, relative?) {
        (size, relative) if size > 0.0 => Some(of(size, relative).min(others)),
        _ => Some(others),
    }
}

/// The written value of line `l` at point `k` (at the working precision when the profile has
/// it).
fn value_at(p: &Profile, l: usize, k: usize) -> Option<rug::Complex> {
    match &p.precise {
        Some(precise) => [&precise.real_line, &precise.upper_line, &precise.lower_line][l]
            .get(k)
            .cloned()
            .flatten(),
        None => [&p.real_line, &p.upper_line, &p.lower_line][l]
            .get(k)
            .copied()
            .flatten()
            .map(|v| rug::Complex::with_val(DOUBLE_BITS, (v.re, v.im))),
    }
}

/// Sets the written value of line `l` at point `k` (normalized and phase-fixed; None: no value),
/// in double precision and, when the profile has them, in the precise lines.
fn set_value(p: &mut Profile, l: usize, k: usize, value: Option<rug::Complex>) {
    let lines = [&mut p.real_line, &mut p.upper_line, &mut p.lower_line];
    lines[l][k] = value.as_ref().map(|v| v.to_c64());
    if let Some(precise) = p.precise.as_mut() {
        let lines = [
            &mut precise.real_line,
            &mut precise.upper_line,
            &mut precise.lower_line,
        ];
        lines[l][k] = value;
    }
}

/// The modulus of the target at the default precision, with ν and its distance to Z.
fn resolve(
    laurent: &Laurent,
    target: &Target,
    options: &ProfileOptions,
) -> Result<Resolved, ProfileError> {
    let digits = options.digits.max(MIN_ATTRACTOR_DIGITS);
    let bits = working_bits(digits as f64);
    let solved = |at: &attractor::Attractor| Resolved {
        modulus: at.modulus.clone(),
        level: Some(at.level),
        nu: Float::with_val(at.precision_bits, at.nu),
        distance: at.residual,
        digits: at.digits,
    };
    match target {
        Target::Level(n) => {
            check_level_reach(&(*n..=*n))?;
            Ok(solved(
                &attractor::solve_levels(laurent, *n..=*n, digits)?[0],
            ))
        }
        Target::Attractor(at) => Ok(solved(at)),
        Target::Modulus(text) => {
            let a = numbers::parse_modulus(text, bits, laurent)?;
            let mut fam = attractor::HigherNormalFunction::new(laurent)?;
            let (nu_exact, _, _, _) = fam.nu(&a, bits)?;
            let nu = nu_exact.to_f64();
            let nearest = nu.round();
            let distance = (nu - nearest).abs();
            if distance > ATTRACTOR_TOLERANCE && !options.allow_non_attractor {
                return Err(ProfileError::NotAttractor {
                    modulus: text.trim().to_string(),
                    nu,
                    distance,
                    nearest: nearest as i64,
                });
            }
            let level = (distance <= ATTRACTOR_TOLERANCE && nearest >= 1.0)
                .then(|| (nearest as i64 - attractor::LEVEL_OFFSET) as usize);
            Ok(Resolved {
                modulus: a,
                level,
                nu: nu_exact,
                distance,
                digits: text.chars().filter(|c| c.is_ascii_digit()).count() as u32,
            })
        }
    }
}

/// |λ| = |R_α/Ω_α| in double precision.
fn lambda_estimate(laurent: &Laurent, a: f64) -> Result<f64, ProfileError> {
    let curve = Curve::new(laurent, Complex64::new(a, 0.0))?;
    let sing = curve.singular_points()?;
    let alpha = periods::alpha_path(&curve, &sing, &March::for_bits(DOUBLE_BITS))?;
    Ok((alpha.regulator / alpha.omega).norm())
}

/// The modulus of the target at `bits` and its confirmed digits (an attractor modulus is
/// re-solved there; a given one is re-read from its text).
fn modulus_at(
    laurent: &Laurent,
    target: &Target,
    resolved: &Resolved,
    bits: u32,
) -> Result<(Float, u32), ProfileError> {
    if bits <= resolved.modulus.prec() {
        return Ok((Float::with_val(bits, &resolved.modulus), resolved.digits));
    }
    match (target, resolved.level) {
        (Target::Modulus(text), _) => Ok((
            numbers::parse_modulus(text, bits, laurent)?,
            resolved.digits,
        )),
        (_, Some(n)) => {
            let d = digits_for_bits(bits).min(MAX_DIGITS);
            let at = attractor::solve_levels(laurent, n..=n, d)?;
            Ok((Float::with_val(bits, &at[0].modulus), at[0].digits))
        }
        (_, None) => Ok((Float::with_val(bits, &resolved.modulus), resolved.digits)),
    }
}

/// Samples at `digits` working digits (with guard bits; double precision when `double`).
fn sample_at(
    laurent: &Laurent,
    target: &Target,
    resolved: &Resolved,
    digits: f64,
    double: bool,
    options: &ProfileOptions,
) -> Result<Profile, ProfileError> {
    if double {
        let a = Complex64::new(resolved.modulus.to_f64(), 0.0);
        let known = (resolved.modulus.clone(), resolved.digits);
        return sample(laurent, a, known, resolved, options);
    }
    let bits = working_bits(digits);
    let (a, a_digits) = modulus_at(laurent, target, resolved, bits)?;
    sample(
        laurent,
        rug::Complex::with_val(bits, (&a, 0)),
        (a, a_digits),
        resolved,
        options,
    )
}

/// The raw (unnormalized) lines at the working precision.
struct Lines<T> {
    real_line: Vec<Option<T>>,
    upper_line: Vec<Option<T>>,
    lower_line: Vec<Option<T>>,
    /// Cancellation losses on the three lines (R, +2π, −2π).
    losses: [f64; 3],
    strip_loss: Option<f64>,
    /// Per point, the digits each value lost relative to its own size (R, +2π, −2π).
    point_losses: [Vec<Option<f64>>; 3],
}

fn lines<T: CNum + Send + Sync>(
    eig: &Eigenfunction<T>,
    points: &[T],
    strip: bool,
) -> Result<Lines<T>, EigenError> {
    let two_pi = 2.0 * std::f64::consts::PI;
    let line_at = |im: f64| eig.psi_on_line_at(points, im);
    // The three lines are independent: computed in parallel.
    let (main, (up, down)) = rayon::join(
        || line_at(0.0),
        || {
            if strip {
                rayon::join(|| line_at(two_pi).map(Some), || line_at(-two_pi).map(Some))
            } else {
                (Ok(None), Ok(None))
            }
        },
    );
    let empty = || LineSamples {
        values: Vec::new(),
        loss: 0.0,
        point_loss: Vec::new(),
    };
    let main = main?;
    let (up, down) = (up?.unwrap_or_else(empty), down?.unwrap_or_else(empty));
    let losses = [main.loss, up.loss, down.loss];
    Ok(Lines {
        real_line: main.values,
        upper_line: up.values,
        lower_line: down.values,
        losses,
        strip_loss: strip.then_some(losses[0].max(losses[1]).max(losses[2])),
        point_losses: [main.point_loss, up.point_loss, down.point_loss],
    })
}

fn sample<T: CNum + Send + Sync>(
    laurent: &Laurent,
    a: T,
    (modulus, modulus_digits): (Float, u32),
    resolved: &Resolved,
    options: &ProfileOptions,
) -> Result<Profile, ProfileError> {
    let prec = a.prec();
    let eig = Eigenfunction::new(laurent, a.clone(), None, BASE_RE)?;
    let normalization = normalization(laurent, &eig, &a)?;
    let grid = options.grid.values();
    // The points at the working precision: the exact grid rounded there (to f64 in double
    // precision, where that is the same).
    let points: Vec<T> = if prec > DOUBLE_BITS {
        options
            .grid
            .points_at(prec)
            .iter()
            .map(|x| T::from_real(x, prec))
            .collect()
    } else {
        grid.iter().map(|&r| T::from_f64s(r, 0.0, prec)).collect()
    };
    let raw = lines(&eig, &points, options.strip)?;
    let residual = if options.strip {
        Some(eigen_equation_residual(
            &QuantumCurve::new(laurent)?,
            &eig,
            &points,
            &raw.real_line,
            &raw.upper_line,
            &raw.lower_line,
        )?)
    } else {
        None
    };
    let round = |v: &[Option<T>]| -> Vec<Option<Complex64>> {
        v.iter()
            .map(|v| v.as_ref().map(|v| v.to_c64() * normalization.factor))
            .collect()
    };
    let mut real_line = round(&raw.real_line);
    let mut upper_line = round(&raw.upper_line);
    let mut lower_line = round(&raw.lower_line);
    let rule = phase::reality_rule(laurent);
    let fixed = rule.and_then(|k| {
        phase::fix_phase(
            k,
            &grid,
            &mut real_line,
            &mut [upper_line.as_mut_slice(), lower_line.as_mut_slice()],
        )
    });
    let reality_defect = fixed.map(|f| f.0);
    let factor = normalization.factor * fixed.map(|f| f.1).unwrap_or(Complex64::new(1.0, 0.0));
    let precise = if prec > DOUBLE_BITS {
        // The unit norm (to double precision) and the phase rule at the working precision: the
        // written ψ is an eigenfunction to the working precision, and real (with a reality rule)
        // to the working precision too.
        let peak_r = normalization.peak;
        let f = precise_factor(&eig, &points, &raw.real_line, rule, factor.norm(), peak_r)?;
        let scale = |v: &[Option<T>]| -> Vec<Option<rug::Complex>> {
            v.iter()
                .map(|v| v.as_ref().map(|v| v.to_complex() * &f))
                .collect()
        };
        let working = digits_of(prec);
        Some(PreciseLines {
            real_line: scale(&raw.real_line),
            upper_line: scale(&raw.upper_line),
            lower_line: scale(&raw.lower_line),
            digits: raw.losses.map(|loss| working - loss),
            factor: f,
        })
    } else {
        None
    };
    let branch_points = eig.branch_points();
    let working = digits_of(prec);
    let point_digits = PointDigits {
        wanted: point_digits_wanted(options.digits),
        relative: raw
            .point_losses
            .map(|line| line.iter().map(|l| l.map(|l| working - l)).collect()),
        raised: Vec::new(),
        raised_bits: None,
        dropped: Vec::new(),
        zeros: Vec::new(),
        kept_short: Vec::new(),
    };
    Ok(Profile {
        level: resolved.level,
        modulus,
        modulus_digits,
        nu: resolved.nu.clone(),
        nu_distance: resolved.distance,
        lambda: eig.lambda.to_complex(),
        spine: eig.spine,
        base: eig.base.z.to_c64(),
        precision_bits: prec,
        working_digits: digits_of(prec),
        lambda_digits_lost: 0.0,
        cancellation_digits: raw.losses[0],
        strip_cancellation_digits: raw.strip_loss,
        grid_spec: options.grid.clone(),
        grid,
        real_line,
        upper_line,
        lower_line,
        precise,
        residual,
        point_digits,
        poles: poles::strip_poles(eig.curve()),
        branch_points,
        rule,
        reality_defect,
        factor,
        normalization,
    })
}

/// The factor of the precise lines: `magnitude` (the unit norm, to double precision) times the
/// phase of the documented rule computed at the working precision — with a reality rule k,
/// e^{−ikr²/(8π)}ψ real and positive at the grid point where it is largest; without one, ψ real
/// and positive at the peak of the normalization grid `peak_r` (the double-precision lines follow
/// the same rule to double precision).
fn precise_factor<T: CNum>(
    eig: &Eigenfunction<T>,
    points: &[T],
    real_line: &[Option<T>],
    rule: Option<i64>,
    magnitude: f64,
    peak_r: f64,
) -> Result<rug::Complex, EigenError> {
    let prec = eig.lambda.prec();
    let w = match rule {
        Some(k) => {
            let eight_pi = eig.lambda.pi_like() * eig.lambda.int_like(8);
            points
                .iter()
                .zip(real_line)
                .filter_map(|(r, v)| {
                    let v = v.as_ref()?;
                    let turn =
                        -(eig.lambda.i_like() * eig.lambda.int_like(k) * r.clone() * r.clone()
                            / eight_pi.clone());
                    Some(v.clone() * turn.exp())
                })
                .max_by(|x, y| x.abs_f64().total_cmp(&y.abs_f64()))
        }
        None => Some(eig.psi(&T::from_f64s(peak_r, 0.0, prec))?),
    };
    let w = w
        .map(|w| w.to_complex())
        .unwrap_or(rug::Complex::with_val(prec, 1));
    let unit = rug::Complex::with_val(prec, w.conj_ref()) / rug::Float::with_val(prec, w.abs_ref());
    Ok(unit * rug::Float::with_val(prec, magnitude))
}

/// The normalization (a double-precision factor) at the lowest precision that gives it to double
/// precision: 16 digits plus the log₁₀|λ| the exponential costs (its quadrature grid spans
/// hundreds of points, so at 40+ working digits this saves most of the time). The lower-precision
/// eigenfunction has the same spine and base point, hence the same raw ψ up to rounding.
fn normalization<T: CNum + Send + Sync>(
    laurent: &Laurent,
    eig: &Eigenfunction<T>,
    a: &T,
) -> Result<Normalization, ProfileError> {
    let enough = normalization_digits(eig.lambda.abs_f64());
    if a.prec() == DOUBLE_BITS || enough >= digits_of(a.prec()) {
        return Ok(eig.normalization(NORM_STEP)?);
    }
    let bits = working_bits(enough);
    let low = T::from_f64s(0.0, 0.0, bits) + a.clone();
    let coarse = Eigenfunction::new(laurent, low, Some(eig.spine), BASE_RE)?;
    Ok(coarse.normalization(NORM_STEP)?)
}

/// ψ of a profile (its normalization and phase) on the lines Im r = `im[j]` at the real parts
/// `re` (`values[j][k]` at `re[k] + i·im[j]`; None on a pole), in double precision, the lines in
/// parallel: for pictures of |ψ| and arg ψ over the strip, not for digits (at high levels the
/// double-precision exponential loses log₁₀|λ| digits).
///
/// # Errors
/// See [`ProfileError`].
pub fn strip_map(
    laurent: &Laurent,
    p: &Profile,
    re: &[f64],
    im: &[f64],
) -> Result<Vec<Vec<Option<Complex64>>>, ProfileError> {
    use rayon::prelude::*;
    let a = Complex64::new(p.modulus.to_f64(), 0.0);
    let eig = Eigenfunction::new(laurent, a, Some(p.spine), BASE_RE)?;
    im.par_iter()
        .map(|&y| {
            Ok(eig
                .psi_on_line(re, y)?
                .into_iter()
                .map(|v| v.map(|v| v * p.factor))
                .collect())
        })
        .collect()
}
