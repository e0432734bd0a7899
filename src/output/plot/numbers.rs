//! Numbers as text for tick labels, legends and headings: tick values, significant digits,
//! powers of ten with superscript exponents, multiples of π/2, all with the minus sign U+2212.
//!
//! # Method
//! Rust's decimal formatting (`{:.N}` and `{:.Ne}`), trimmed of trailing zeros for ticks;
//! powers of ten are recognized when `log₁₀ x` is within 10⁻⁹ of an integer; multiples of π/2
//! are rounded to the nearest half-integer multiple.
//!
//! # Accuracy
//! As printed: four decimals for ticks, the requested significant digits elsewhere (checked as
//! text in `tests/plot.rs`: level labels, moduli, decades, π ticks).
//!
//! # References
//! - The Unicode Standard: U+2212 MINUS SIGN and the superscript digits U+2070–U+2079 (with
//!   U+00B9, U+00B2, U+00B3) as typeset mathematics writes them.

use std::f64::consts::PI;

/// Minus sign U+2212 instead of the hyphen, as typeset mathematics has it.
pub(super) fn typeset_minus(s: String) -> String {
    s.replace('-', "−")
}

/// A tick value with at most four decimals and no trailing zeros.
pub(super) fn tick_label(v: &f64) -> String {
    let s = format!("{:.4}", v);
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" {
        return "0".into();
    }
    typeset_minus(s.to_string())
}

/// `x` with `digits` significant digits, plainly written (scientific outside 1e-4..1e9).
pub(super) fn significant(x: f64, digits: usize) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let magnitude = x.abs().log10().floor() as i32;
    let s = if (-4..9).contains(&magnitude) {
        let decimals = (digits as i32 - 1 - magnitude).max(0) as usize;
        format!("{:.*}", decimals, x)
    } else {
        format!("{:.*e}", digits.saturating_sub(1), x)
    };
    typeset_minus(s)
}

/// 10 to an integer power with superscript digits, e.g. "10⁻⁴⁰".
pub(super) fn power_of_ten(exponent: i32) -> String {
    const SUPERSCRIPT: [char; 10] = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];
    let digits: String = exponent
        .unsigned_abs()
        .to_string()
        .bytes()
        .map(|b| SUPERSCRIPT[(b - b'0') as usize])
        .collect();
    let sign = if exponent < 0 { "⁻" } else { "" };
    format!("10{sign}{digits}")
}

/// A positive value as a power of ten ("10⁻⁴⁰") when it is one, else with three digits, in
/// the same notation as the decades of the axis ("1.11 × 10⁻¹⁶") outside 10⁻⁴..10⁹.
pub(super) fn scientific(x: f64) -> String {
    let exponent = x.log10().round();
    if (x.log10() - exponent).abs() < 1e-9 {
        return power_of_ten(exponent as i32);
    }
    let magnitude = x.abs().log10().floor() as i32;
    if (-4..9).contains(&magnitude) {
        return significant(x, 3);
    }
    let mantissa = x / 10f64.powi(magnitude);
    format!("{} × {}", significant(mantissa, 3), power_of_ten(magnitude))
}

/// Labels of the multiples of π/2 between −2π and 2π.
pub(super) fn pi_label(v: &f64) -> String {
    let halves = (2.0 * v / PI).round() as i32;
    let s = match halves {
        0 => "0".to_string(),
        h if h % 2 == 0 && h.abs() == 2 => "π".to_string(),
        h if h % 2 == 0 => format!("{}π", h.abs() / 2),
        h if h.abs() == 1 => "π/2".to_string(),
        h => format!("{}π/2", h.abs()),
    };
    if halves < 0 {
        format!("−{s}")
    } else {
        s
    }
}
