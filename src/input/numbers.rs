//! Numbers read from text: a modulus at the working precision (checked against the spectral
//! threshold) and level ranges `A..B` / `n`.

use crate::curve::laurent::Laurent;
use crate::input::selection::SelectionError;
use std::ops::RangeInclusive;

/// Parses a real modulus `a` at `bits` bits and checks it lies above the spectral threshold
/// (the classical minimum of φ on the positive quadrant).
///
/// # Errors
/// [`SelectionError::Modulus`] for malformed or non-finite text,
/// [`SelectionError::BelowThreshold`].
pub fn parse_modulus(
    text: &str,
    bits: u32,
    laurent: &Laurent,
) -> Result<rug::Float, SelectionError> {
    let err = |reason: &str| SelectionError::Modulus {
        text: text.to_string(),
        reason: reason.to_string(),
    };
    let parsed = rug::Float::parse(text.trim()).map_err(|_| err("not a decimal number"))?;
    let a = rug::Float::with_val(bits, parsed);
    if !a.is_finite() {
        return Err(err("not finite"));
    }
    let (_, threshold) = laurent.classical_minimum();
    if a.to_f64() <= threshold {
        return Err(SelectionError::BelowThreshold {
            modulus: text.trim().to_string(),
            threshold,
        });
    }
    Ok(a)
}

/// Parses `A..B` (inclusive) or `n`.
///
/// # Errors
/// [`SelectionError::Levels`] for malformed, negative, empty or reversed ranges.
pub fn parse_levels(text: &str) -> Result<RangeInclusive<usize>, SelectionError> {
    let err = |reason: &str| SelectionError::Levels {
        text: text.to_string(),
        reason: reason.to_string(),
    };
    let t = text.trim();
    let num = |s: &str| {
        s.trim().parse::<usize>().map_err(|_| {
            err(&format!(
                "{:?} is not a level (a whole number ≥ 0)",
                s.trim()
            ))
        })
    };
    let (a, b) = match t.split_once("..") {
        Some((a, b)) => {
            let b = b.strip_prefix('=').unwrap_or(b);
            if a.trim().is_empty() || b.trim().is_empty() {
                return Err(err("both ends are needed"));
            }
            (num(a)?, num(b)?)
        }
        None => {
            let n = num(t)?;
            (n, n)
        }
    };
    if a > b {
        return Err(err("the range is reversed"));
    }
    if b > 10_000 {
        return Err(err("levels above 10000 are not supported"));
    }
    Ok(a..=b)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn level_ranges() {
        assert_eq!(parse_levels("0..5").unwrap(), 0..=5);
        assert_eq!(parse_levels("3").unwrap(), 3..=3);
        assert_eq!(parse_levels(" 2..=4 ").unwrap(), 2..=4);
        for bad in ["5..2", "", "a..b", "-1..3", "1..", "..3", "1.5"] {
            assert!(parse_levels(bad).is_err(), "{bad:?}");
        }
    }
}
