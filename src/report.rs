//! JSON documents and human-readable tables for the commands. Pure formatting: no I/O.
//!
//! # Conventions
//! Keys are snake_case and stable. Every document carries `tool_version`, `inputs`,
//! `precision_bits` (where a computation ran) and `elapsed_s`. High-precision numbers are
//! decimal strings holding only the digits the computation supports.

use crate::catalogue::Family;
use crate::laurent::Laurent;
use crate::spectrum::Spectrum;
use crate::TOOL_VERSION;
use rug::Float;
use serde_json::{json, Value};

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
    let Some((mantissa, exp)) = s.split_once('e') else { return s.to_string() };
    let Ok(exp) = exp.parse::<i64>() else { return s.to_string() };
    if !(-6..=30).contains(&exp) {
        return s.to_string();
    }
    let (sign, m) = mantissa.strip_prefix('-').map(|m| ("-", m)).unwrap_or(("", mantissa));
    let digits: String = m.chars().filter(|c| *c != '.').collect();
    let point = m.find('.').unwrap_or(m.len()) as i64 + exp;
    let out = if point <= 0 {
        format!("0.{}{}", "0".repeat((-point) as usize), digits)
    } else if point as usize >= digits.len() {
        format!("{}{}", digits, "0".repeat(point as usize - digits.len()))
    } else {
        format!("{}.{}", &digits[..point as usize], &digits[point as usize..])
    };
    format!("{sign}{out}")
}

/// A short scientific rendering of an error estimate.
pub fn sci(x: f64) -> String {
    format!("{x:.1e}")
}

/// One catalogue entry as JSON.
pub fn family_json(f: &Family) -> Value {
    let mut v = json!({
        "id": f.id,
        "description": f.description,
        "vertices": f.vertices,
        "boundary_points": f.boundary_points,
        "dual": f.dual,
        "applicable": f.applicable,
    });
    if f.applicable {
        let laurent = Laurent::tempered(&f.polygon());
        let parts = laurent.strip_parts().expect("applicable families are in strip form");
        let (_, threshold) = laurent.classical_minimum();
        v["phi"] = json!(laurent.to_string());
        v["a"] = json!(parts.a.render("x"));
        v["b"] = json!(parts.b.render("x"));
        v["c"] = json!(parts.c.render("x"));
        v["threshold"] = json!(threshold);
        v["series_radius"] = json!(laurent.coefficient_sum());
    } else {
        v["phi"] = Value::Null;
        v["reason"] = json!(f.reason);
    }
    v
}

/// `regwave families --json`.
pub fn families_json(families: &[Family]) -> Value {
    json!({
        "families": families.iter().map(family_json).collect::<Vec<_>>(),
        "tool_version": TOOL_VERSION,
    })
}

/// `regwave families` as a table.
pub fn families_table(families: &[Family]) -> String {
    let mut out = String::new();
    out.push_str(&format!("{:<6} {:>3}  {:<42} {:>9}  {}\n", "id", "b", "vertices (strip form)", "threshold", "phi"));
    for f in families {
        let verts = f.vertices.iter().map(|p| format!("({},{})", p[0], p[1])).collect::<Vec<_>>().join(",");
        if f.applicable {
            let laurent = Laurent::tempered(&f.polygon());
            let (_, t) = laurent.classical_minimum();
            out.push_str(&format!("{:<6} {:>3}  {:<42} {:>9.5}  {}\n", f.id, f.boundary_points, verts, t, laurent));
        } else {
            out.push_str(&format!("{:<6} {:>3}  {:<42} {:>9}  not applicable: {}\n", f.id, f.boundary_points, verts, "-", f.reason.unwrap_or("")));
        }
    }
    let n = families.iter().filter(|f| f.applicable).count();
    out.push_str(&format!("\n{} families in strip form, {} not applicable.\n", n, families.len() - n));
    out
}

/// Digits shown for a level: what the error estimate supports, at most the digits requested.
fn level_digits(value: &Float, error: f64, requested: u32) -> u32 {
    supported_digits(value, error, requested)
}

/// `regwave spectrum --json`.
pub fn spectrum_json(family: &str, spectrum: &Spectrum, digits: u32, inputs: Value, elapsed_s: f64) -> Value {
    let eigenvalues: Vec<Value> = spectrum
        .levels
        .iter()
        .map(|l| {
            let d = level_digits(&l.value, l.error_estimate, digits);
            let log = Float::with_val(spectrum.working_bits, l.value.ln_ref());
            json!({
                "level": l.level,
                "value": decimal(&l.value, d),
                "log_value": decimal(&log, d),
                "error_estimate": sci(l.error_estimate),
                "digits": d,
            })
        })
        .collect();
    json!({
        "family": family,
        "eigenvalues": eigenvalues,
        "method": "harmonic-oscillator Rayleigh-Ritz",
        "bases": spectrum.bases,
        "frame": {
            "centre": spectrum.frame.centre,
            "symplectic": spectrum.frame.symplectic,
            "squeeze": spectrum.frame.squeeze,
            "threshold": spectrum.frame.threshold,
        },
        "real_matrix": spectrum.real_matrix,
        "precision_bits": spectrum.working_bits,
        "tool_version": TOOL_VERSION,
        "inputs": inputs,
        "elapsed_s": elapsed_s,
        "note": "numerical evidence: error estimates are differences between basis sizes, not bounds",
    })
}

/// `regwave spectrum` as a table.
pub fn spectrum_table(family: &str, spectrum: &Spectrum, digits: u32, elapsed_s: f64) -> String {
    let mut out = format!(
        "family {family}: eigenvalues a_n of the quantum curve at hbar = 2 pi\n\
         harmonic-oscillator Rayleigh-Ritz, bases {:?}, {} bits, {:.2} s\n\n",
        spectrum.bases, spectrum.working_bits, elapsed_s
    );
    out.push_str(&format!("{:>5}  {:<40} {:<28} {:>9}\n", "level", "a_n", "log a_n", "error"));
    for l in &spectrum.levels {
        let d = level_digits(&l.value, l.error_estimate, digits);
        let log = Float::with_val(spectrum.working_bits, l.value.ln_ref());
        out.push_str(&format!("{:>5}  {:<40} {:<28} {:>9}\n", l.level, decimal(&l.value, d), decimal(&log, d.min(26)), sci(l.error_estimate)));
    }
    let short: Vec<String> = spectrum.levels.iter().filter(|l| level_digits(&l.value, l.error_estimate, digits) < digits).map(|l| l.level.to_string()).collect();
    if !short.is_empty() {
        out.push_str(&format!(
            "\nlevels {} did not reach {digits} digits within the largest basis; raise --max-basis for more.\n",
            short.join(", ")
        ));
    }
    out.push_str("\nErrors are estimates from the change between the last two bases (numerical evidence, not bounds).\n");
    out
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
