//! Numbers as text with the digits they support: plain decimal strings of MPFR values cut to the
//! digits an error estimate or a confirming solve supports, and short scientific renderings of
//! error estimates. (Every computed digit is serialized by [`crate::numerics::serial`]; here the
//! report decides how many of them it vouches for.)

use rug::Float;

/// Significant digits a value supports given its absolute error estimate, at most `cap`.
pub fn supported_digits(value: &Float, error: f64, cap: u32) -> u32 {
    let v = value.to_f64().abs();
    if error <= 0.0 || v == 0.0 {
        return cap;
    }
    let d = (v / error).log10().floor();
    (d.max(1.0) as u32).min(cap)
}

/// `value` as a decimal string with `digits` significant digits.
pub fn decimal(value: &Float, digits: u32) -> String {
    let digits = digits.max(1) as usize;
    let s = value.to_string_radix(10, Some(digits));
    // rug writes e.g. "1.7846643118044799e1": render plainly when the exponent is small.
    plain_decimal(&s)
}

fn plain_decimal(s: &str) -> String {
    let Some((mantissa, exp)) = s.split_once('e') else {
        return s.to_string();
    };
    let Ok(exp) = exp.parse::<i64>() else {
        return s.to_string();
    };
    if !(-6..=30).contains(&exp) {
        return s.to_string();
    }
    let (sign, m) = mantissa
        .strip_prefix('-')
        .map(|m| ("-", m))
        .unwrap_or(("", mantissa));
    let digits: String = m.chars().filter(|c| *c != '.').collect();
    let point = m.find('.').unwrap_or(m.len()) as i64 + exp;
    let out = if point <= 0 {
        format!("0.{}{}", "0".repeat((-point) as usize), digits)
    } else if point as usize >= digits.len() {
        format!("{}{}", digits, "0".repeat(point as usize - digits.len()))
    } else {
        format!(
            "{}.{}",
            &digits[..point as usize],
            &digits[point as usize..]
        )
    };
    format!("{sign}{out}")
}

/// A short scientific rendering of an error estimate.
pub fn sci(x: f64) -> String {
    format!("{x:.1e}")
}

/// [`sci`] of a value that may be missing ("–": e.g. a residual formed at no point).
pub fn sci_opt(x: Option<f64>) -> String {
    x.map(sci).unwrap_or_else(|| "–".into())
}

/// One decimal place (agreement digits are reported to a tenth).
pub fn round1(x: f64) -> f64 {
    (x * 10.0).round() / 10.0
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn decimals_are_plain_and_honest() {
        let x = Float::with_val(200, 17.846643118044799282_f64);
        assert_eq!(decimal(&x, 5), "17.847");
        let y = Float::with_val(200, 0.00012345_f64);
        assert_eq!(decimal(&y, 3), "0.000123");
        assert_eq!(supported_digits(&x, 1e-10, 30), 11);
        assert_eq!(supported_digits(&x, 0.0, 30), 30);
    }
}
