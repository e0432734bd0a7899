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

/// The working precision of a spectral solve: the bits of the condition number (`condition_bits`,
/// from a bound on the matrix entries and the threshold), the bits of the digits wanted, and the
/// guard bits.
pub fn spectrum_bits(condition_bits: f64, digits: u32) -> u32 {
    with_guard(condition_bits.max(0.0).ceil() as u32 + bits_for_digits(digits as f64))
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
