//! The data behind every figure and table of an audit, as tidy CSV tables (one observation per
//! row, one variable per column, a single header line), each loadable with
//! `numpy.loadtxt(path, delimiter=",", skiprows=1)` (or `numpy.genfromtxt(..., names=True)` to
//! keep the column names). Empty cells are written `nan`. Column names carry their units and
//! conventions; [`COLUMNS`] defines every column in words, and the audit's JSON document carries
//! those definitions.
//!
//! - `levels.csv`: one row per audited level with every scalar check;
//! - `profiles.csv`: ψ on the grid of every level (`level, r, re_psi, im_psi, abs_psi,
//!   residual`), normalized and phase-fixed as in the figures' data;
//! - `nu_scan.csv`: the scan of the higher normal function (`a, ln_a, nu`);
//! - `strip.csv`: |ψ| and arg ψ of the strip map of the middle level (`re_r, im_r,
//!   log10_abs_psi, arg_psi`).

use crate::checks::audit::Audit;
use crate::checks::level::LevelAudit;
use crate::curve::laurent::Laurent;
use crate::eigenfunction::profile::{self, ProfileError};
use crate::output::decimal::{decimal, supported_digits};
use num_complex::Complex64;

/// Every column of the tables, defined: (file, column, definition).
pub const COLUMNS: &[(&str, &str, &str)] = &[
    ("levels.csv", "level", "n, the level: the attractor modulus with nu = n + 1"),
    ("levels.csv", "nu", "the integer value of the higher normal function at the modulus"),
    ("levels.csv", "modulus", "the attractor modulus a_n, with its confirmed digits"),
    ("levels.csv", "modulus_digits", "digits of a_n confirmed by a second solve at higher precision"),
    ("levels.csv", "spectrum_value", "the eigenvalue of level n of the independent harmonic-oscillator spectrum, with the digits its error estimate supports"),
    ("levels.csv", "spectrum_error_estimate", "change of that eigenvalue between the two largest bases (an estimate, not a bound)"),
    ("levels.csv", "agreement_digits", "decimal digits on which a_n and the eigenvalue agree"),
    ("levels.csv", "agreement_cap_digits", "the digits the comparison can support (from the spectrum's error estimate and the modulus digits)"),
    ("levels.csv", "residual_max", "max over the grid of |A psi(r-2 pi i) + C psi(r+2 pi i) - (B+a) psi(r)| / max|psi|, each value integrated along its own route"),
    ("levels.csv", "residual_rms", "root mean square of the same over the grid"),
    ("levels.csv", "norm", "the L2 norm squared of the normalized psi on R by an independent quadrature (1 when converged)"),
    ("levels.csv", "norm_on_grid", "the integral of |psi|^2 over the output grid (Simpson): the mass inside the grid"),
    ("levels.csv", "norm_tail_fraction", "estimated fraction of the norm beyond the quadrature range"),
    ("levels.csv", "zeros_inside", "zeros of psi between the outermost real parts of the branch points (= n)"),
    ("levels.csv", "tail_zeros_left", "zeros of psi on the grid beyond the turning points as r -> -infinity"),
    ("levels.csv", "tail_zeros_right", "zeros of psi on the grid beyond the turning points as r -> +infinity"),
    ("levels.csv", "tail_spacing_left", "median of s |r| / pi^2 over successive tail zeros as r -> -infinity (s their spacing)"),
    ("levels.csv", "tail_spacing_right", "the same as r -> +infinity"),
    ("levels.csv", "tail_spacing_predicted_left", "the predicted 4/dm, dm the exponent gap of the two roots at x -> 0 (nan: no oscillation)"),
    ("levels.csv", "tail_spacing_predicted_right", "the same at x -> infinity"),
    ("levels.csv", "decay_rate_left", "fitted kappa of |psi| ~ c |r|^p exp(-kappa |r|) as r -> -infinity"),
    ("levels.csv", "decay_rate_right", "the same as r -> +infinity"),
    ("levels.csv", "eigenvector_difference", "max |psi - psi_oscillator| / max|psi| after normalization and phase alignment"),
    ("levels.csv", "route_dependence", "max |psi(r) - k psi'(r)| / max|psi| between two constructions with different base points"),
    ("levels.csv", "cauchy_defect", "largest |contour integral of psi| / (rho max|psi|) around the branch points (0 for analytic psi)"),
    ("levels.csv", "phase_rule_k", "k of the reality rule: exp(-i k r^2/(8 pi)) psi is real (nan: no rule)"),
    ("levels.csv", "phase_rule_max_imaginary_part", "largest imaginary part left after the rule, relative to max|psi|"),
    ("levels.csv", "precision_bits", "working precision of the eigenfunction in bits (53: double)"),
    ("levels.csv", "cancellation_digits_lost_on_r", "decimal digits consumed by chi - chi o iota on R"),
    ("profiles.csv", "level", "n"),
    ("profiles.csv", "r", "the real part r (x = -e^r)"),
    ("profiles.csv", "re_psi", "Re psi(r), unit L2 norm, global phase of the documented rule"),
    ("profiles.csv", "im_psi", "Im psi(r)"),
    ("profiles.csv", "abs_psi", "|psi(r)|"),
    ("profiles.csv", "residual", "the eigen-equation residual at r relative to max|psi| (nan where not formed)"),
    ("nu_scan.csv", "a", "the modulus a"),
    ("nu_scan.csv", "ln_a", "its natural logarithm"),
    ("nu_scan.csv", "nu", "Re nu(a), the higher normal function (integer at attractor moduli)"),
    ("strip.csv", "re_r", "Re r"),
    ("strip.csv", "im_r", "Im r, in [-2 pi, 2 pi]"),
    ("strip.csv", "log10_abs_psi", "log10 |psi(r)| (nan on a pole or where psi vanishes)"),
    ("strip.csv", "arg_psi", "arg psi(r) in radians, in (-pi, pi]"),
];

/// A number as a CSV cell (`nan` when absent or not finite).
fn cell(x: Option<f64>) -> String {
    match x {
        Some(v) if v.is_finite() => format!("{v:e}"),
        _ => "nan".into(),
    }
}

/// `levels.csv`: one row per level.
pub fn levels(levels: &[LevelAudit]) -> String {
    let names: Vec<&str> = COLUMNS
        .iter()
        .filter(|c| c.0 == "levels.csv")
        .map(|c| c.1)
        .collect();
    let mut out = names.join(",");
    out.push('\n');
    for l in levels {
        let p = &l.profile;
        let spectrum_digits = supported_digits(&l.spectrum_value, l.spectrum_error, 30);
        let [left, right] = &l.tail_zeros;
        let row = [
            l.level.to_string(),
            l.nu.to_string(),
            decimal(&p.modulus, p.modulus_digits.max(1)),
            p.modulus_digits.to_string(),
            decimal(&l.spectrum_value, spectrum_digits),
            cell(Some(l.spectrum_error)),
            cell(Some(l.agreement_digits)),
            cell(Some(l.agreement_cap)),
            cell(p.residual.as_ref().and_then(|r| r.max)),
            cell(p.residual.as_ref().and_then(|r| r.rms)),
            cell(Some(l.norm)),
            cell(Some(l.norm_on_grid)),
            cell(Some(p.normalization.tail)),
            l.zeros.count.to_string(),
            left.count.to_string(),
            right.count.to_string(),
            cell(left.spacing_constant),
            cell(right.spacing_constant),
            cell(left.predicted),
            cell(right.predicted),
            cell(Some(p.normalization.decay[0])),
            cell(Some(p.normalization.decay[1])),
            cell(Some(l.eigenvector_difference)),
            cell(Some(l.route_dependence)),
            cell(Some(l.cauchy_defect)),
            cell(p.rule.map(|k| k as f64)),
            cell(p.reality_defect),
            p.precision_bits.to_string(),
            cell(Some(p.cancellation_digits)),
        ];
        out.push_str(&row.join(","));
        out.push('\n');
    }
    out
}

/// `profiles.csv`: ψ of every level on its grid, long format.
pub fn profiles(levels: &[LevelAudit]) -> String {
    let mut out = String::from("level,r,re_psi,im_psi,abs_psi,residual\n");
    for l in levels {
        let p = &l.profile;
        for (k, (r, v)) in p.grid.iter().zip(&p.real_line).enumerate() {
            let residual = p.residual.as_ref().and_then(|res| res.per_point[k]);
            let (re, im, abs) = match v {
                Some(v) => (Some(v.re), Some(v.im), Some(v.norm())),
                None => (None, None, None),
            };
            out.push_str(&format!(
                "{},{},{},{},{},{}\n",
                l.level,
                cell(Some(*r)),
                cell(re),
                cell(im),
                cell(abs),
                cell(residual)
            ));
        }
    }
    out
}

/// `nu_scan.csv`: the scan of ν.
pub fn nu_scan(audit: &Audit) -> String {
    let mut out = String::from("a,ln_a,nu\n");
    for (t, nu) in audit.scan.log_a.iter().zip(&audit.scan.nu) {
        out.push_str(&format!(
            "{},{},{}\n",
            cell(Some(t.exp())),
            cell(Some(*t)),
            cell(Some(*nu))
        ));
    }
    out
}

/// `strip.csv`: |ψ| and arg ψ on the lines Im r = `im[j]` at the real parts `re`
/// (`values[j][k]`).
pub fn strip(re: &[f64], im: &[f64], values: &[Vec<Option<Complex64>>]) -> String {
    let mut out = String::from("re_r,im_r,log10_abs_psi,arg_psi\n");
    for (j, y) in im.iter().enumerate() {
        for (k, x) in re.iter().enumerate() {
            let v = values[j][k];
            let (abs, arg) = match v {
                Some(v) if v.norm() > 0.0 => (Some(v.norm().log10()), Some(v.arg())),
                _ => (None, None),
            };
            out.push_str(&format!(
                "{},{},{},{}\n",
                cell(Some(*x)),
                cell(Some(*y)),
                cell(abs),
                cell(arg)
            ));
        }
    }
    out
}

/// Real parts and imaginary parts of the strip map: 81 × 33 points, enough to see the zeros and
/// poles.
pub fn strip_axes() -> (Vec<f64>, Vec<f64>) {
    let two_pi = 2.0 * std::f64::consts::PI;
    let re = (0..=80).map(|k| -8.0 + 0.2 * k as f64).collect();
    let im = (0..=32)
        .map(|k| -two_pi + two_pi * k as f64 / 16.0)
        .collect();
    (re, im)
}

/// The strip map of an audit: ψ of its middle level on the lines Im r = `im[j]` at the real
/// parts `re` (double precision: for pictures and tables of |ψ| and arg ψ, not for digits).
#[derive(Debug, Clone)]
pub struct StripSample {
    /// Index into the audit's levels.
    pub level_index: usize,
    pub re: Vec<f64>,
    pub im: Vec<f64>,
    /// `values[j][k]` at `re[k] + i·im[j]`; None on a pole.
    pub values: Vec<Vec<Option<Complex64>>>,
}

/// Samples the strip map of the middle level of `audit`.
///
/// # Errors
/// See [`ProfileError`].
pub fn strip_sample(laurent: &Laurent, audit: &Audit) -> Result<StripSample, ProfileError> {
    let level_index = audit.levels.len() / 2;
    let (re, im) = strip_axes();
    let values = profile::strip_map(laurent, &audit.levels[level_index].profile, &re, &im)?;
    Ok(StripSample {
        level_index,
        re,
        im,
        values,
    })
}

/// The column definitions of one table, for a JSON document.
pub fn definitions(file: &str) -> Vec<(&'static str, &'static str)> {
    COLUMNS
        .iter()
        .filter(|c| c.0 == file)
        .map(|c| (c.1, c.2))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_levels_column_is_defined_once() {
        let names: Vec<&str> = definitions("levels.csv").iter().map(|c| c.0).collect();
        let mut unique = names.clone();
        unique.sort();
        unique.dedup();
        assert_eq!(names.len(), unique.len());
        assert_eq!(names.len(), 29, "the row of levels() has 29 cells");
        assert_eq!(cell(None), "nan");
        assert_eq!(cell(Some(f64::INFINITY)), "nan");
        assert_eq!(cell(Some(0.5)), "5e-1");
    }
}
