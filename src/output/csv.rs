//! Samples of ψ as CSV, with the digits the run supports: one line per grid point, `nan` where ψ
//! has a pole. Header `r,re_psi,im_psi` for the real line and `r,im_r,re_psi,im_psi` for the
//! boundary lines of the strip. Every file loads with
//! `numpy.loadtxt(path, delimiter=",", skiprows=1)`; at more than double precision the values
//! are decimal strings to be read at full precision (e.g. with `mpmath.mpf` or Python's
//! `decimal.Decimal`).
//!
//! # Digits
//! In double precision the values are written with 18 significant digits (enough to read back
//! the same double) and the grid with 12 decimals. At more than double precision the grid point
//! is written exactly ([`Grid::point_text`]) and each value with the digits its line supports:
//! a line accurate to `d` digits relative to its largest |ψ| gives a value v
//! `d + log₁₀(|v|/max|ψ|)` significant digits (at least one), so that every written digit is
//! backed by the computation.

use crate::eigenfunction::profile::Profile;
use crate::input::grid::Grid;
use num_complex::Complex64;
use rug::{Complex, Float};

/// The CSV text of double-precision samples `values` at the real parts `grid`, on the line
/// Im r = `im_r` when given (a boundary line of the strip).
pub fn samples(grid: &[f64], values: &[Option<Complex64>], im_r: Option<f64>) -> String {
    let mut out = String::from(header(im_r.is_some()));
    for (r, v) in grid.iter().zip(values) {
        out.push_str(&format!("{r:.12},"));
        if let Some(im) = im_r {
            out.push_str(&format!("{im:.17e},"));
        }
        match v {
            Some(v) => out.push_str(&format!("{:.17e},{:.17e}\n", v.re, v.im)),
            None => out.push_str("nan,nan\n"),
        }
    }
    out
}

/// The CSV text of samples `values` at working precision at the points of `grid`, each with the
/// digits the line supports (`digits` relative to its largest |ψ|), on the line Im r = `im_r`
/// when given.
pub fn precise_samples(
    grid: &Grid,
    values: &[Option<Complex>],
    digits: f64,
    im_r: Option<&Float>,
) -> String {
    let peak = values
        .iter()
        .flatten()
        .map(|v| Float::with_val(v.prec().0, v.abs_ref()).to_f64())
        .fold(0.0, f64::max);
    let grid_digits = digits.ceil().max(17.0) as u32;
    let mut out = String::from(header(im_r.is_some()));
    for (k, v) in values.iter().enumerate() {
        out.push_str(&grid.point_text(k, grid_digits));
        out.push(',');
        if let Some(im) = im_r {
            out.push_str(&im.to_string_radix(10, Some(grid_digits as usize)));
            out.push(',');
        }
        match v {
            Some(v) => out.push_str(&format!(
                "{},{}\n",
                part(v.real(), peak, digits),
                part(v.imag(), peak, digits)
            )),
            None => out.push_str("nan,nan\n"),
        }
    }
    out
}

/// One real part with `digits + log₁₀(|x|/peak)` significant digits (at least one).
fn part(x: &Float, peak: f64, digits: f64) -> String {
    if x.is_zero() {
        return "0".into();
    }
    let relative = x.to_f64().abs() / peak;
    let significant = (digits + relative.log10()).floor().max(1.0) as usize;
    x.to_string_radix(10, Some(significant))
}

fn header(strip: bool) -> &'static str {
    if strip {
        "r,im_r,re_psi,im_psi\n"
    } else {
        "r,re_psi,im_psi\n"
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn digits_follow_the_size_of_each_value() {
        let grid = Grid::parse("-1:1:3").unwrap();
        let v = |re: &str| {
            let x = Float::with_val(200, Float::parse(re).unwrap()) / 3u32;
            Some(Complex::with_val(200, (x, 0)))
        };
        let text = precise_samples(&grid, &[v("1"), v("1e-10"), None], 30.0, None);
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines[0], "r,re_psi,im_psi");
        // 1/3 with 30 digits, 1e-10/3 with 20, a pole as nan.
        assert!(
            lines[1].starts_with("-1,3.33333333333333333333333333333e-1,0"),
            "{}",
            lines[1]
        );
        assert!(
            lines[2].starts_with("0,3.3333333333333333333e-11,0"),
            "{}",
            lines[2]
        );
        assert_eq!(lines[3], "1,nan,nan");
    }
}

/// The CSV files of a profile: `psi.csv`, and with the strip `psi_up.csv` (Im r = +2π),
/// `psi_down.csv` (Im r = −2π) and `residual.csv` (`r, residual`: the eigen-equation residual
/// per grid point relative to max|ψ|, the data of the residual figure); the samples at the
/// working precision when the profile has it.
pub fn profile_files(p: &Profile, strip: bool) -> Vec<(&'static str, String)> {
    let mut out = Vec::new();
    if let Some(res) = &p.residual {
        // The data of the residual figure: per grid point, relative to max|ψ|.
        // An error estimate: three significant digits; the grid point exactly.
        let mut text = String::from("r,residual\n");
        for (k, v) in res.per_point.iter().enumerate() {
            text.push_str(&p.grid_spec.point_text(k, 17));
            match v {
                Some(v) => text.push_str(&format!(",{v:.2e}\n")),
                None => text.push_str(",nan\n"),
            }
        }
        out.push(("residual.csv", text));
    }
    match &p.precise {
        Some(lines) => {
            let two_pi = Float::with_val(p.precision_bits, rug::float::Constant::Pi) * 2u32;
            out.push((
                "psi.csv",
                precise_samples(&p.grid_spec, &lines.real_line, lines.digits[0], None),
            ));
            if strip {
                out.push((
                    "psi_up.csv",
                    precise_samples(
                        &p.grid_spec,
                        &lines.upper_line,
                        lines.digits[1],
                        Some(&two_pi),
                    ),
                ));
                out.push((
                    "psi_down.csv",
                    precise_samples(
                        &p.grid_spec,
                        &lines.lower_line,
                        lines.digits[2],
                        Some(&Float::with_val(p.precision_bits, -&two_pi)),
                    ),
                ));
            }
        }
        None => {
            let two_pi = 2.0 * std::f64::consts::PI;
            out.push(("psi.csv", samples(&p.grid, &p.real_line, None)));
            if strip {
                out.push(("psi_up.csv", samples(&p.grid, &p.upper_line, Some(two_pi))));
                out.push((
                    "psi_down.csv",
                    samples(&p.grid, &p.lower_line, Some(-two_pi)),
                ));
            }
        }
    }
    out
}
