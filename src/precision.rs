//! Precision policy: decimal digits ↔ bits, guard bits, and tolerances that scale with precision.
//!
//! Every numerical entry point of the library takes its working precision explicitly, in bits;
//! this module is the one place where digits are turned into bits and where guard bits are added,
//! so that the policy can be read (and changed) in one spot.
//!
//! # Conventions
//! - `digits` always means decimal digits of the *result*; `bits` means MPFR working precision.
//! - Guard bits are added by [`with_guard`]; the amount is [`GUARD_BITS`].
//! - Tolerances are `2^-(bits - lost)` where `lost` is a documented loss of the method.

use thiserror::Error;

/// Smallest number of result digits a command accepts.
pub const MIN_DIGITS: u32 = 8;
/// Largest number of result digits a command accepts.
pub const MAX_DIGITS: u32 = 1000;
/// Guard bits added on top of the bits a result needs: covers the rounding of O(10⁴) elementary
/// operations (≈ 14 bits) with a comfortable margin (common practice: guard bits of 10–30).
pub const GUARD_BITS: u32 = 32;

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

/// `bits` plus the guard bits.
pub fn with_guard(bits: u32) -> u32 {
    bits + GUARD_BITS
}

/// Relative tolerance `2^-(bits - lost)` for a computation at `bits` that is known to lose
/// `lost` bits.
pub fn tolerance(bits: u32, lost: u32) -> f64 {
    let e = bits.saturating_sub(lost) as i32;
    2f64.powi(-e.min(1074))
}

/// Number of decimal digits on which two values agree, from their relative difference
/// `|a − b| / max(|a|, |b|)`, capped at `cap` (the digits the computation can support).
pub fn agreement_digits(rel_diff: f64, cap: f64) -> f64 {
    if rel_diff <= 0.0 || !rel_diff.is_finite() {
        return if rel_diff == 0.0 { cap } else { 0.0 };
    }
    (-rel_diff.log10()).clamp(0.0, cap)
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
    }

    #[test]
    fn digit_range_is_enforced() {
        assert!(check_digits(7).is_err());
        assert!(check_digits(8).is_ok());
        assert!(check_digits(1000).is_ok());
        assert!(check_digits(1001).is_err());
    }
}
