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
//! is written exactly ([`Grid::point_text`]) and each value with the digits it holds relative to
//! its own size ([`crate::eigenfunction::profile::PointDigits`]: the working digits less the
//! cancellation at that point and the error of the exponent integral): a part x of a value v
//! held to `d` digits gets `d + log₁₀(|x|/|v|)` significant digits (at least one: a part far
//! below |v|, e.g. the rounding left in Im ψ by a reality rule, is written as its order of
//! magnitude), so that every written digit is backed by the computation.
//!
//! # Points without a value
//! A value that holds fewer digits than the profile wants and could not be computed again within
//! the budget is written `nan`, as a pole is; `psi.json` lists it with its reason.

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
/// digits it holds: `digits[k]` relative to its own size (None: a pole or no value, written
/// `nan`), on the line Im r = `im_r` when given.
pub fn precise_samples(
    grid: &Grid,
    values: &[Option<Complex>],
    digits: &[Option<f64>],
    im_r: Option<&Float>,
) -> String {
    let most = digits.iter().flatten().copied().fold(0.0, f64::max);
    let grid_digits = most.ceil().max(17.0) as u32;
    let mut out = String::from(header(im_r.is_some()));
    for (k, v) in values.iter().enumerate() {
        out.push_str(&grid.point_text(k, grid_digits));
        out.push(',');
        if let Some(im) = im_r {
            out.push_str(&im.to_string_radix(10, Some(grid_digits as usize)));
            out.push(',');
        }
        match (v, digits.get(k).copied().flatten()) {
            (Some(v), Some(d)) => {
                let size = Float::with_val(v.prec().0, v.abs_ref());
                out.push_str(&format!(
                    "{},{}\n",
                    part(v.real(), &size, d),
                    part(v.imag(), &size, d)
                ))
            }
            _ => out.push_str("nan,nan\n"),
        }
    }
    out
}

/// One part x of a value of size `size` held to `digits` digits relative to that size, with
/// `digits + log₁₀(|x|/size)` significant digits (at least one: a part far below the value's
/// size is written as its order of magnitude).
fn part(x: &Float, size: &Float, digits: f64) -> String {
    if x.is_zero() {
        return "0".into();
    }
    let relative = Float::with_val(53, x.abs_ref()).log10() - Float::with_val(53, size.log10_ref());
    let significant = (digits + relative.to_f64()).floor().max(1.0) as usize;
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
        let digits = [Some(30.0), Some(20.0), None];
        let text = precise_samples(&grid, &[v("1"), v("1e-10"), None], &digits, None);
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines[0], "r,re_psi,im_psi");
        // 1/3 with its 30 digits, 1e-10/3 with its 20, a pole as nan.
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
    let held = &p.point_digits.relative;
    match &p.precise {
        Some(lines) => {
            let two_pi = Float::with_val(p.precision_bits, rug::float::Constant::Pi) * 2u32;
            out.push((
                "psi.csv",
                precise_samples(&p.grid_spec, &lines.real_line, &held[0], None),
            ));
            if strip {
                out.push((
                    "psi_up.csv",
                    precise_samples(&p.grid_spec, &lines.upper_line, &held[1], Some(&two_pi)),
                ));
                out.push((
                    "psi_down.csv",
                    precise_samples(
                        &p.grid_spec,
                        &lines.lower_line,
                        &held[2],
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
