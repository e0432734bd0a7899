//! The precision policy: decimal digits ↔ bits, guard bits, the working precision of each part
//! of the computation, and tolerances that scale with precision — every such rule of the crate,
//! each with its reason, in this one module.
//!
//! # Conventions
//! - `digits` always means decimal digits of a *result*; `bits` means MPFR working precision.
//!   Double precision is 53 bits and delivers [`digits_of`]`(53)` = 15 digits.
//! - Numerical entry points take one precision: the bits of the values they are given (a
//!   `Complex64` is 53 bits, a `rug::Complex` carries its own); the accuracy they aim at is
//!   [`digits_of`] those bits.
//! - A working precision is the bits of the digits wanted plus [`GUARD_BITS`] ([`working_bits`]).
//! - Tolerances are `2^-(bits − lost)` ([`tolerance`]) or `10^-(digits − lost)`
//!   ([`tolerance_digits`]) with `lost` a documented loss of the method; tests take theirs from
//!   here too.
//!
//! # References
//! Guard bits and precision-scaled tolerances: common practice in multiprecision libraries
//! (e.g. working at the target precision plus a fixed number of guard bits).

use thiserror::Error;

/// Smallest number of result digits a command accepts.
pub const MIN_DIGITS: u32 = 8;
/// Largest number of result digits a command accepts.
pub const MAX_DIGITS: u32 = 1000;
/// Guard bits added on top of the bits a result needs: covers the rounding of O(10⁴) elementary
/// operations (≈ 14 bits) with a comfortable margin (common practice: guard bits of 10–30).
pub const GUARD_BITS: u32 = 32;
/// The precision of `f64` and `Complex64`.
pub const DOUBLE_BITS: u32 = 53;
/// Requests of at most this many digits run in double precision where that suffices (the
/// default of the commands).
pub const DOUBLE_DIGITS: u32 = 16;

/// log₂ 10.
pub const LOG2_10: f64 = std::f64::consts::LOG2_10;

/// A request for a precision outside what the tool supports.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
#[non_exhaustive]
pub enum PrecisionError {
    /// `digits` outside `[MIN_DIGITS, MAX_DIGITS]`.
    #[error("{digits} digits is outside the supported range [{min}, {max}]")]
    DigitsOutOfRange { digits: u32, min: u32, max: u32 },
}

/// Checks a requested number of result digits.
///
/// # Errors
/// [`PrecisionError::DigitsOutOfRange`] outside `[MIN_DIGITS, MAX_DIGITS]`.
pub fn check_digits(digits: u32) -> Result<(), PrecisionError> {
    if (MIN_DIGITS..=MAX_DIGITS).contains(&digits) {
        Ok(())
    } else {
        Err(PrecisionError::DigitsOutOfRange {
            digits,
            min: MIN_DIGITS,
            max: MAX_DIGITS,
        })
    }
}

/// Bits that carry `digits` decimal digits: ⌈digits·log₂10⌉.
pub fn bits_for_digits(digits: f64) -> u32 {
    (digits.max(0.0) * LOG2_10).ceil() as u32
}

/// Decimal digits carried by `bits` bits: ⌊bits·log₁₀2⌋.
pub fn digits_for_bits(bits: u32) -> u32 {
    (bits as f64 / LOG2_10).floor() as u32
}

/// The digits a computation at `bits` aims at: all those the bits carry (15 in double
/// precision). Path integrations choose their nodes for these digits.
pub fn digits_of(bits: u32) -> f64 {
    digits_for_bits(bits) as f64
}

/// `bits` plus the guard bits.
pub fn with_guard(bits: u32) -> u32 {
    bits + GUARD_BITS
}

/// The working precision for results of `digits` digits: their bits plus the guard bits.
pub fn working_bits(digits: f64) -> u32 {
    with_guard(bits_for_digits(digits))
}

/// Relative tolerance `2^-(bits - lost)` for a computation at `bits` that is known to lose
/// `lost` bits.
pub fn tolerance(bits: u32, lost: u32) -> f64 {
    let e = bits.saturating_sub(lost) as i32;
    2f64.powi(-e.min(1074))
}

/// Relative tolerance `10^-(digits_of(bits) − lost)` for a computation at `bits` that loses
/// `lost` decimal digits (the form the measured losses of this crate are stated in).
pub fn tolerance_digits(bits: u32, lost: f64) -> f64 {
    10f64.powf(-(digits_of(bits) - lost).min(307.0))
}

/// The unit roundoff of `bits`-bit arithmetic, 2^-bits (the floor line of residual figures).
pub fn unit_roundoff(bits: u32) -> f64 {
    tolerance(bits, 0)
}

/// Number of decimal digits on which two values agree, from their relative difference
/// `|a − b| / max(|a|, |b|)`, capped at `cap` (the digits the computation can support).
pub fn agreement_digits(rel_diff: f64, cap: f64) -> f64 {
    if rel_diff <= 0.0 || !rel_diff.is_finite() {
        return if rel_diff == 0.0 { cap } else { 0.0 };
    }
    (-rel_diff.log10()).clamp(0.0, cap)
}

// ---------------------------------------------------------------------------------------------
// Guard bits inside the methods

/// Bits at which Gauss–Legendre nodes are found by Newton's method before rounding to the rule's
/// precision: 16 above it, so that the last Newton step's rounding does not reach the result.
pub fn quadrature_node_bits(bits: u32) -> u32 {
    bits + 16
}

/// Bits of the confirming solve of an attractor modulus: an eighth more than the working
/// precision, at least 32 more, so that the digits on which the two solves agree are the digits
/// the working precision delivered.
pub fn confirming_bits(bits: u32) -> u32 {
    bits + (bits / 8).max(32)
}

/// The precision of the search phase of the attractor solve where double precision cannot
/// resolve two close branch points (P2 from level 19 on): 128 bits resolve pairs down to 1e-30
/// apart, far beyond the levels where the β loop's double-precision layout still works.
pub const SEARCH_FALLBACK_BITS: u32 = 128;

/// Bits of z a path may lose to two crowded branch points before the β loop is laid out and
/// integrated at a raised precision ([`layout_bits`]): half the guard bits.
pub const LAYOUT_FREE_LOSS_BITS: f64 = 16.0;

/// The precision at which the β loop between branch points crowded by `crowding` bits
/// (`log₂((1 + |z|)/gap)` of the closest pair, [`crate::curve::cycles::crowding_bits`]) is laid
/// out and integrated for results at `bits`: a path threading the pair evaluates e^z with the
/// absolute error |z|·2^−bits at a distance ≈ gap from the pair, i.e. it loses `crowding` bits
/// there (measured: P2 level 42, gap 9.5e-13 at z ≈ 19.4, fails in double precision and agrees
/// with a 2× precision re-run to the working precision at `bits` + crowding + 16). `bits`
/// itself while the loss stays within [`LAYOUT_FREE_LOSS_BITS`].
pub fn layout_bits(bits: u32, crowding: f64) -> u32 {
    if crowding <= LAYOUT_FREE_LOSS_BITS {
        bits
    } else {
        bits + (crowding + LAYOUT_FREE_LOSS_BITS).ceil() as u32
    }
}

/// Whether the closest branch points found at `bits` are a real pair rather than a double root
/// split by rounding: the root finder separates a near-double root by ≈ 2^{−bits/2} (relative)
/// at most, so a crowding up to bits/2 − 8 is trusted, a larger one is recomputed at more bits.
pub fn crowding_resolved(bits: u32, crowding: f64) -> bool {
    crowding <= bits as f64 / 2.0 - 8.0
}

/// The largest precision the β loop's layout is raised to (beyond: the branch points are
/// reported as too close): 2^−20,000 relative, far beyond any modulus the input accepts.
pub const MAX_LAYOUT_BITS: u32 = 20_000;

/// Bits at which the double-precision Gauss–Legendre rules are computed before rounding to f64:
/// far more than the 53 they keep, so that every node and weight is correctly rounded.
pub const DOUBLE_RULE_BITS: u32 = 128;

/// Stopping tolerance of inverse iteration for eigenvalues wanted to `digits` digits: six digits
/// beyond them, so that the iteration error stays far below the basis error the ladder measures.
pub fn inverse_iteration_tolerance(digits: u32) -> f64 {
    10f64.powi(-(digits as i32) - 6)
}

/// Bits lost to rounding by the sum of a series or a path integral of a few thousand terms, for
/// error estimates: 8.
pub const SUM_ROUNDING_BITS: u32 = 8;

// ---------------------------------------------------------------------------------------------
// Attractor moduli, eigenfunctions and their diagnostics

/// A given modulus counts as an attractor modulus when ν is this close to an integer: far above
/// the error of ν at any working precision the commands accept (≤ 1e-12 at double precision),
/// far below the distance 1e-5…1e-3 that a relative perturbation of 1e-6 moves ν.
pub const ATTRACTOR_TOLERANCE: f64 = 1e-6;

/// Smallest relative tolerance for a match of an attractor modulus and an eigenvalue of the
/// independent spectrum (which is compared within 100 × its own error estimate when that is
/// larger): above the agreement of the two at double precision, below the relative gaps between
/// eigenvalues.
pub const MATCH_FLOOR: f64 = 1e-8;

/// Decimal digits of a period or of λ = R_α/Ω_α computed by path integration at `bits`: the
/// digits of the bits less 2 (measured: path and series at a = ∞ agree to within 1.1 digits of
/// the working precision for all 15 families at 64, 128 and 256 bits, `tests/periods.rs`).
pub fn path_digits(bits: u32) -> u32 {
    digits_for_bits(bits).saturating_sub(2).max(1)
}

/// Attractor moduli are solved to at least this many digits before a profile or audit uses them
/// (a profile re-solves at its working precision when it needs more).
pub const MIN_ATTRACTOR_DIGITS: u32 = 20;

/// Digits the exponential of the regulator integral costs: log₁₀|λ|, λ = R_α/Ω_α (the exponent
/// grows like |λ|; measured residual ≈ 2e-15·|λ| in double precision).
pub fn lambda_loss_digits(lambda_abs: f64) -> f64 {
    lambda_abs.max(1.0).log10()
}

/// Whether a profile requested at `digits` can run in double precision: the request asks for no
/// more than double precision and |λ| costs at most 4 of its digits (residual 2e-15·|λ| ≤ 1e-11).
pub fn profile_in_double(digits: u32, lambda_abs: f64) -> bool {
    digits <= DOUBLE_DIGITS && 2e-15 * lambda_abs <= 1e-11
}

/// The working digits of a profile requested at `digits` with |λ| = `lambda_abs`: 15 in double
/// precision; else 16 plus the loss to |λ| for a request of at most 16 digits, or the requested
/// digits plus that loss.
pub fn profile_digits(digits: u32, lambda_abs: f64) -> f64 {
    let lost = lambda_loss_digits(lambda_abs);
    if profile_in_double(digits, lambda_abs) {
        digits_of(DOUBLE_BITS)
    } else if digits <= DOUBLE_DIGITS {
        (DOUBLE_DIGITS as f64 + lost).ceil()
    } else {
        digits as f64 + lost
    }
}

/// Digits that must survive the cancellation in χ − χ∘ι̃ on R; below, a profile is sampled again
/// at a higher precision ([`profile_digits_after_loss`]).
pub const DIGITS_LEFT_MIN: f64 = 12.0;

/// The working digits of a profile sampled again after a cancellation of `lost` digits at
/// `working` digits: 15 + the loss (at least `working − 8`, so that the precision grows) + 4 of
/// margin, at most [`MAX_DIGITS`].
pub fn profile_digits_after_loss(lost: f64, working: f64) -> f64 {
    (15.0 + lost.max(working - 8.0) + 4.0)
        .ceil()
        .min(MAX_DIGITS as f64)
}

/// Digits of the normalization of ψ (a double-precision factor): 16 + 3 of margin + the loss to
/// |λ|.
pub fn normalization_digits(lambda_abs: f64) -> f64 {
    19.0 + lambda_loss_digits(lambda_abs)
}

/// Digits of the working precision that one value ψ = (χ − χ∘ι̃)/D loses relative to its own
/// size: the cancellation at that point, `log₁₀(max(|χ|, |χ∘ι̃|)/|D|) − log₁₀|ψ|` (at least 0),
/// plus the error of the exponent integral e it was exponentiated from: χ = exp(−e/2πi) carries
/// the absolute error of e, which grows with |e| (≈ r²/2 far out), as a relative error
/// ε·|e|/2π, hence `log₁₀(1 + |e|/2π)` digits. Infinite where a magnitude is not finite (χ over-
/// or underflowed, or ψ is 0). Arguments: `log10_term` = log₁₀ of the larger term over |D|,
/// `log10_value` = log₁₀|ψ|, `exponent_abs` = the larger |e| of the two sheets.
pub fn point_loss_digits(log10_term: f64, log10_value: f64, exponent_abs: f64) -> f64 {
    let cancellation = log10_term - log10_value;
    let exponent = (1.0 + exponent_abs / (2.0 * std::f64::consts::PI)).log10();
    if cancellation.is_finite() && exponent.is_finite() {
        cancellation.max(0.0) + exponent
    } else {
        f64::INFINITY
    }
}

/// Digits every written value of a profile requested at `digits` must hold relative to its own
/// size, else it is computed again at a raised precision ([`raised_point_digits`]) or written as
/// `nan`: the requested digits, and for a request of at most [`DOUBLE_DIGITS`] the
/// [`POINT_DIGITS_MIN_DOUBLE`].
pub fn point_digits_wanted(digits: u32) -> f64 {
    if digits <= DOUBLE_DIGITS {
        POINT_DIGITS_MIN_DOUBLE
    } else {
        digits as f64
    }
}

/// Digits every value of a double-precision request must hold relative to its own size: 10, the
/// 15 of double precision less the 4 that |λ| may cost a run in double precision
/// ([`profile_in_double`]: residual 2e-15·|λ| ≤ 1e-11) and 1 for the cancellation near the peak.
pub const POINT_DIGITS_MIN_DOUBLE: f64 = 10.0;

/// Margin of the raised precision above the wanted digits plus the estimated loss: 4 digits.
pub const RAISE_MARGIN_DIGITS: f64 = 4.0;

/// The budget of the recomputation of points that hold too few digits: at most this many digits
/// above the profile's working digits (100: ~1 s per line out to |r| = 250 at double-precision
/// requests, measured with `examples/point_digits.rs`), and never more than [`MAX_DIGITS`] + 100.
pub const RAISE_EXTRA_DIGITS: f64 = 100.0;

/// The working digits at which points of a profile at `working` digits are recomputed so that
/// they hold `wanted` digits after a loss of `loss` digits: wanted + loss +
/// [`RAISE_MARGIN_DIGITS`], at least `working` + 8 so that the precision grows; None beyond the
/// budget ([`raise_budget_digits`]).
pub fn raised_point_digits(wanted: f64, loss: f64, working: f64) -> Option<f64> {
    let need = (wanted + loss + RAISE_MARGIN_DIGITS)
        .max(working + 8.0)
        .ceil();
    (need.is_finite() && need <= raise_budget_digits(working)).then_some(need)
}

/// The largest working digits of a recomputation for a profile at `working` digits.
pub fn raise_budget_digits(working: f64) -> f64 {
    (working + RAISE_EXTRA_DIGITS).min(MAX_DIGITS as f64 + RAISE_EXTRA_DIGITS)
}

/// The share of the mass ∫|ψ|² inside a grid that points without a value may carry at most
/// for the norm on the grid to be formed over the other points: 1e-13, below the 12 decimals
/// of the mass the check prints.
pub const EXCLUDED_MASS_MAX: f64 = 1e-13;

/// Whether a value that held `before` digits relative to its own size at `run` working digits,
/// fewer than the `wanted`, and `after` when computed again at `raised` working digits, is
/// rounding noise — a zero of ψ, whose size is below the absolute accuracy of its line at every
/// precision: the precision grew by more than [`RAISE_MARGIN_DIGITS`] and the value's own digits
/// by at most that margin (a value whose loss is real gains the digits added), or the value
/// came out exactly 0 (−∞ digits) at either precision. Measured: dP3 levels 1 and 3 at r = 0,
/// the odd ψ at the puncture from the mean-value formula, hold 0.5 and 0.6 digits of their own
/// at 16 and 35 digits and come out exactly 0 at 40 digits more, while far-out values of F0
/// and T6 gain the digits added (`tests/far_points.rs`).
pub fn is_rounding_noise(before: f64, after: f64, run: f64, raised: f64, wanted: f64) -> bool {
    before < wanted
        && raised > run + RAISE_MARGIN_DIGITS
        && (before == f64::NEG_INFINITY
            || after == f64::NEG_INFINITY
            || after - before <= RAISE_MARGIN_DIGITS)
}

/// The loss to expect at `r` before it is measured (for a point whose double-precision value is
/// out of range): at an end where the roots merge the difference χ − χ∘ι̃ loses |r|/(2 ln 10)
/// digits (measured at T6's left end: 8.95, 17.9, 26.8 digits at |r| = 40, 80, 120 at 300 bits,
/// `examples/point_digits.rs`); elsewhere the exponent's log₁₀(1 + r²/4π) plus
/// [`RAISE_MARGIN_DIGITS`] for the cancellation (measured at most 4 digits out to |r| = 300 for
/// F0).
pub fn expected_loss_digits(r: f64, merging: bool) -> f64 {
    let merge = if merging {
        r.abs() / (2.0 * std::f64::consts::LN_10)
    } else {
        0.0
    };
    merge + (1.0 + r * r / (4.0 * std::f64::consts::PI)).log10() + RAISE_MARGIN_DIGITS
}

/// |r| beyond which double-precision values of ψ are not used (the points are computed again at
/// a raised precision): the continuation forms products of the coefficients that grow like
/// |x|⁴ = e^{4|r|}, which leave the double range at |r| = 177 (measured: F0 wrong from r = 180,
/// P2 and dP3 from between 160 and 200, F2 and T6 NaN at 360; `examples/point_digits.rs`).
pub const DOUBLE_RANGE: f64 = 140.0;

/// |r| beyond which ψ is not computed at any precision: the step control of the continuation
/// reads magnitudes of x = −e^r, of the roots and of products of the coefficients in double
/// precision, and they leave its range (measured first wrong values at 200–300 bits: T6's
/// merging end at |r| ≈ 320, F0, P2 and dP3 at ≈ 720; `examples/point_digits.rs`). With margin.
/// Probed on level 0 of all 15 families at r = ±250 (`examples/reach_probe.rs`, against an
/// independent 60-digit run): 14 hold their claimed digits at 16 requested digits (agreement
/// 13.2–15.8 digits, each within one digit of its claim capped at the 16 of the double values
/// compared) and at 40 digits; dP2* does not: its continuation stops at z ≈ 234.8 + πi (two
/// roots not told apart) at every precision tried. At r = ±230 all 15 families hold their
/// claimed digits at 16 and 40 requested digits (`cargo run --release --example reach_probe 230`),
/// so the reach is 230 for every family.
pub const REACH: f64 = 230.0;

/// How far a profile reaches at an end where the roots merge, when its points may be computed
/// at up to `budget` digits and must hold `wanted`: the loss |r|/(2 ln 10)
/// ([`expected_loss_digits`]) must fit, at most [`REACH`].
pub fn merging_reach(wanted: f64, budget: f64) -> f64 {
    let mut r = REACH;
    while r > 0.0 && wanted + expected_loss_digits(r, true) > budget {
        r -= 1.0;
    }
    r
}

/// Digits the diagnostics (zeros, eigenvector, route dependence, Cauchy defect) may lose to |λ|
/// in double precision: they judge defects of 1e-8 against 1e-11 and count zeros, not the last
/// digit.
pub const DIAGNOSTIC_LOSS_MAX: f64 = 5.0;

/// The precision of the diagnostics of an eigenfunction with |λ| = `lambda_abs`: double while
/// |λ| costs at most [`DIAGNOSTIC_LOSS_MAX`] digits, else the bits of
/// [`normalization_digits`] (with guard bits).
pub fn diagnostic_bits(lambda_abs: f64) -> u32 {
    if lambda_loss_digits(lambda_abs) <= DIAGNOSTIC_LOSS_MAX {
        DOUBLE_BITS
    } else {
        working_bits(normalization_digits(lambda_abs))
    }
}

/// How many times a spectral solve raises its precision after a non-positive pivot before it
/// reports the failure.
pub const SPECTRUM_RETRIES: usize = 2;

/// The precision of the next try of a spectral solve that lost positive definiteness at `bits`:
/// half as much again (the condition-number estimate fell short; its shortfall is unknown, so
/// the step is geometric).
pub fn raised_spectrum_bits(bits: u32) -> u32 {
    bits.saturating_add(bits.div_ceil(2))
}

/// The working precision of a spectral solve: the bits of the condition number (`condition_bits`,
/// from a bound on the matrix entries and the threshold), the bits of the digits wanted, and the
/// guard bits.
pub fn spectrum_bits(condition_bits: f64, digits: u32) -> u32 {
    with_guard(condition_bits.max(0.0).ceil() as u32 + bits_for_digits(digits as f64))
}

// ---------------------------------------------------------------------------------------------
// Series at the large-modulus point

/// Terms of the Frobenius series at a = ∞ for `bits` bits at q = radius/|a| < 1: the least N
/// with `q^N N² ≤ 2^{−bits−16}` (coefficients grow like radiusⁿ times a power of n, the
/// logarithmic ones one power more; 16 bits cover the rounding of the sums), at least 4.
/// Usize::MAX for q ≥ 1 (no convergence).
pub fn frobenius_terms(q: f64, bits: u32) -> usize {
    if !(q < 1.0) {
        return usize::MAX;
    }
    if q <= 0.0 {
        return 4;
    }
    let target = (bits + 16) as f64 * std::f64::consts::LN_2;
    let mut n = (target / -q.ln()).ceil().max(4.0);
    for _ in 0..4 {
        n = ((target + 2.0 * n.ln()) / -q.ln()).ceil().max(4.0);
    }
    n as usize
}

/// Most terms of the Frobenius series summed (closer to the radius the series is not used): 1.1 ×
/// the radius at 100 digits needs about 2,500; the exact coefficients cost ≈ 0.4 s per 2,500.
pub const FROBENIUS_MAX_TERMS: usize = 6000;

/// Bits at which the singular points of the Picard–Fuchs operator are located and classified:
/// at 256 bits a double zero of the discriminant splits by about 2^-128 ≈ 3e-39 (relative).
pub const SINGULAR_POINT_BITS: u32 = 256;

/// Two zeros of the discriminant closer than this (relative) are one double zero: far above the
/// split 3e-39 of a double zero at [`SINGULAR_POINT_BITS`], far below the separations ≥ 1e-3 of
/// the simple zeros at the apparent singularities of the 15 families (measured,
/// `tests/periods.rs`).
pub const SINGULAR_POINT_SPLIT: f64 = 1e-20;

/// Largest q = radius/|a| at which the attractor solver uses the series at a = ∞ (beyond, the
/// paths): 0.9 needs about 25 terms per digit; every attractor modulus of the 15 families has
/// q < 0.4 (measured).
pub const SERIES_MAX_RATIO: f64 = 0.9;

/// Bits of the path integration that fixes the constants of the β series: the working bits plus
/// 16, so that the matched constants carry the working precision after the 2-digit loss of the
/// paths ([`path_digits`]).
pub fn matching_bits(bits: u32) -> u32 {
    bits + 16
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn digits_and_bits_round_trip() {
        for d in [8u32, 16, 30, 50, 100, 1000] {
            let b = bits_for_digits(d as f64);
            assert!(digits_for_bits(b) >= d, "{d} digits → {b} bits");
            assert!(digits_for_bits(b - 4) < d);
        }
        assert_eq!(digits_of(DOUBLE_BITS), 15.0);
    }

    #[test]
    fn digit_range_is_enforced() {
        assert!(check_digits(7).is_err());
        assert!(check_digits(8).is_ok());
        assert!(check_digits(1000).is_ok());
        assert!(check_digits(1001).is_err());
    }

    #[test]
    fn tolerances_scale_with_precision() {
        assert_eq!(tolerance(64, 4), 2f64.powi(-60));
        assert!((tolerance_digits(DOUBLE_BITS, 5.0) / 1e-10 - 1.0).abs() < 1e-12);
        assert!(tolerance_digits(256, 10.0) < tolerance_digits(128, 10.0));
    }

    #[test]
    fn rounding_noise_is_a_value_that_gains_no_digits() {
        // A zero: 0.5 digits of its own at 16 working digits, 0.6 at 56 (or exactly 0).
        assert!(is_rounding_noise(0.5, 0.6, 16.0, 56.0, 10.0));
        assert!(is_rounding_noise(0.5, f64::NEG_INFINITY, 16.0, 56.0, 10.0));
        assert!(is_rounding_noise(f64::NEG_INFINITY, 2.0, 16.0, 56.0, 10.0));
        // Negative companions: a real loss gains the digits added; a value that held the wanted
        // digits (raised for its range only) is never taken for noise; no raise, no verdict.
        assert!(!is_rounding_noise(5.0, 9.5, 16.0, 56.0, 10.0));
        assert!(!is_rounding_noise(5.0, 40.0, 16.0, 56.0, 10.0));
        assert!(!is_rounding_noise(14.0, 12.0, 16.0, 56.0, 10.0));
        assert!(!is_rounding_noise(0.5, 0.6, 16.0, 16.0, 10.0));
    }

    #[test]
    fn raised_points_stay_within_the_budget() {
        assert_eq!(point_digits_wanted(16), POINT_DIGITS_MIN_DOUBLE);
        assert_eq!(point_digits_wanted(40), 40.0);
        // 12 wanted + 20 lost + 4 of margin at a double-precision run.
        assert_eq!(raised_point_digits(12.0, 20.0, 15.0), Some(36.0));
        assert_eq!(raised_point_digits(12.0, f64::INFINITY, 15.0), None);
        assert_eq!(raised_point_digits(12.0, 200.0, 15.0), None);
        // A merging end loses |r|/(2 ln 10) digits: at 115 digits of budget 12 survive to
        // |r| ≈ 400 > REACH; at 40 requested digits of 60 working, budget 160: also REACH.
        assert_eq!(merging_reach(12.0, 115.0), REACH);
        assert!(merging_reach(990.0, 1000.0) < 100.0);
    }

    #[test]
    fn profile_precision_follows_lambda() {
        // F0 level 0: |λ| ≈ 50 runs in double precision; level 9: |λ| ≈ 2e5 does not.
        assert!(profile_in_double(16, 50.0));
        assert_eq!(profile_digits(16, 50.0), 15.0);
        assert!(!profile_in_double(16, 2e5));
        assert_eq!(profile_digits(16, 2e5), 22.0);
        assert_eq!(profile_digits(40, 1e3), 43.0);
        assert_eq!(diagnostic_bits(1e3), DOUBLE_BITS);
        assert!(diagnostic_bits(1e6) > DOUBLE_BITS);
    }
}
