//! Numbers read from text: a modulus at the working precision (checked against the spectral
//! threshold and the largest modulus the tool handles) and level ranges `A..B` / `n`.
//!
//! # Syntax
//! Decimal numbers are read strictly: `[+-]digits[.digits][(e|E)[+-]digits]` (or `.digits`),
//! surrounding whitespace allowed, nothing inside — no spaces, underscores, thousands
//! separators, `inf` or `nan` — and a decimal exponent of at most [`MAX_EXPONENT`] in absolute
//! value. So `"1 7.8466"` is refused instead of being read as 17.8466.

use crate::curve::laurent::Laurent;
use crate::input::selection::SelectionError;
use std::ops::RangeInclusive;

/// The largest decimal exponent a number may carry (far beyond any modulus or grid the tool
/// handles; it keeps exact conversions of the text cheap).
pub const MAX_EXPONENT: u32 = 10_000;

/// The largest modulus the tool handles: log₁₀ a ≤ 100. Above it the branch points of the curve
/// lie beyond the double-precision layout of the β cycle for some families (measured: P2 fails
/// between 10^60 and 10^100, F0 at 10^155 where a² overflows a double); the series at a = ∞ will
/// extend it.
pub const MAX_MODULUS_LOG10: u32 = 100;

/// Checks the strict decimal syntax of the module doc and returns the trimmed text.
///
/// # Errors
/// The reason, in words.
///
/// ```
/// use regwave::input::numbers::decimal_syntax;
/// assert_eq!(decimal_syntax(" -1.5e3 "), Ok("-1.5e3"));
/// assert!(decimal_syntax("1 7.8466").is_err());
/// assert!(decimal_syntax("1_000").is_err());
/// ```
pub fn decimal_syntax(text: &str) -> Result<&str, String> {
    let t = text.trim();
    if t.is_empty() {
        return Err("the text is empty".into());
    }
    if let Some(c) = t.chars().find(|c| c.is_whitespace() || *c == '_') {
        return Err(format!(
            "{c:?} inside a number (write it without spaces or separators)"
        ));
    }
    let body = t.strip_prefix(['+', '-']).unwrap_or(t);
    if ["inf", "infinity", "nan"].contains(&body.to_ascii_lowercase().as_str()) {
        return Err("not a finite number".into());
    }
    let (mantissa, exponent) = match body.find(['e', 'E']) {
        Some(i) => (&body[..i], Some(&body[i + 1..])),
        None => (body, None),
    };
    let (int, frac) = mantissa.split_once('.').unwrap_or((mantissa, ""));
    let digits = |s: &str| s.chars().all(|c| c.is_ascii_digit());
    if int.is_empty() && frac.is_empty() || !digits(int) || !digits(frac) {
        return Err("not a decimal number".into());
    }
    if let Some(e) = exponent {
        let e = e.strip_prefix(['+', '-']).unwrap_or(e);
        if e.is_empty() || !digits(e) {
            return Err("the exponent is not a whole number".into());
        }
        let small = e.trim_start_matches('0');
        if small.len() > 5 || small.parse::<u32>().unwrap_or(0) > MAX_EXPONENT {
            return Err(format!("the exponent is beyond ±{MAX_EXPONENT}"));
        }
    }
    Ok(t)
}

/// Parses a real modulus `a` at `bits` bits and checks its domain: strictly above the spectral
/// threshold (the classical minimum of φ on the positive quadrant, computed at the same
/// precision and compared exactly, with a margin of a few units in the last place for its own
/// rounding) and at most 10^[`MAX_MODULUS_LOG10`].
///
/// # Errors
/// [`SelectionError::Modulus`] for malformed text or a modulus above the largest one handled,
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
    let t = decimal_syntax(text).map_err(|reason| err(&reason))?;
    let parsed = rug::Float::parse(t).map_err(|_| err("not a decimal number"))?;
    let a = rug::Float::with_val(bits, parsed);
    if !a.is_finite() {
        return Err(err("not finite"));
    }
    let threshold = laurent.threshold_at(bits);
    // The threshold is accurate to a few units in its last place; a modulus within them is
    // treated as equal to it (and refused).
    let margin = rug::Float::with_val(bits, &threshold >> (bits as i32 - 8));
    if a <= rug::Float::with_val(bits, &threshold + &margin) {
        return Err(SelectionError::BelowThreshold {
            modulus: t.to_string(),
            threshold: threshold.to_f64(),
        });
    }
    if a.clone().log10() > MAX_MODULUS_LOG10 {
        return Err(err(&format!(
            "it is above 1e{MAX_MODULUS_LOG10}, the largest modulus handled (the β cycle is laid \
             out in double precision, which does not resolve the branch points beyond it)"
        )));
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
    use rug::Float;

    #[test]
    fn the_threshold_is_compared_at_the_working_precision() {
        // Q6, φ = xy + 2y + y/x + 2/x + 1/y + 1/xy: the minimum on x, y > 0 is φ(3, 1/2) =
        // 3/2 + 1 + 1/6 + 2/3 + 2 + 2/3 = 6 exactly, a critical point since x∂ₓφ = 3/2 − 1/6 −
        // 2/3 − 2/3 = 0 and y∂ᵧφ = 3/2 + 1 + 1/6 − 2 − 2/3 = 0 there (checked by hand; φ is
        // strictly convex in log coordinates, so it is the minimum).
        let q6 = crate::family("Q6").unwrap();
        for bits in [64, 200, 1000] {
            let t = q6.threshold_at(bits);
            let err = Float::with_val(bits, &t - 6u32).abs();
            assert!(
                err < Float::with_val(bits, 1u32) >> (bits as i32 - 4),
                "{bits}: {t}"
            );
            assert!(parse_modulus("6", bits, &q6).is_err());
            assert!(parse_modulus("6.0", bits, &q6).is_err());
            // Just above, by much more than the rounding: inside the domain.
            let above = format!("6.{}1", "0".repeat((bits as usize / 5).min(200)));
            assert!(parse_modulus(&above, bits, &q6).is_ok(), "{above}");
        }
        // The negative companion: the double-precision minimum alone is not exact.
        let (_, t64) = q6.classical_minimum();
        assert!((t64 - 6.0).abs() < 1e-12);
    }

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
