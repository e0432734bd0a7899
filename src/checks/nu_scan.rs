//! The ν scan: Re ν(a) on a grid uniform in ln a, and its integer crossings.
//!
//! # Method
//! From just above the spectral threshold to a given modulus, every integer crossing of Re ν
//! between grid points is an attractor modulus (ν is checked to increase at every grid point, and
//! the result says whether it did). Just above the threshold the β rule may not apply yet; those
//! points are skipped and counted.
//!
//! # Accuracy
//! Crossings are located by linear interpolation (to be refined by the caller); ν in double
//! precision.
//!
//! # Errors
//! See [`VerifyError`].
//!
//! # References
//! `docs/MATHEMATICS.md` §4.

use crate::checks::VerifyError;
use crate::curve::attractor::HigherNormalFunction;
use crate::curve::laurent::Laurent;

/// ν on a grid uniform in ln a, with the integer crossings.
#[derive(Debug, Clone, serde::Serialize)]
pub struct NuScan {
    pub log_a: Vec<f64>,
    pub nu: Vec<f64>,
    /// (ln a by linear interpolation, the integer crossed).
    pub crossings: Vec<(f64, i64)>,
    /// Whether dν/d(ln a) > 0 at every grid point.
    pub increasing: bool,
    /// Grid points just above the threshold where ν could not be computed (the scan starts at
    /// `log_a[0]`; crossings below it are not seen, which the audit reports with ν there).
    pub skipped: usize,
}

/// Scans Re ν(a) on `points` values of ln a from just above the spectral threshold (relative
/// offset 1e-6) to `a_max`, skipping points at the low end where ν is not computable.
///
/// # Errors
/// See [`crate::curve::attractor::AttractorError`]; [`VerifyError::Empty`] when `a_max` is not above the threshold.
pub fn nu_scan(laurent: &Laurent, a_max: f64, points: usize) -> Result<NuScan, VerifyError> {
    let (_, threshold) = laurent.classical_minimum();
    let t0 = (threshold * (1.0 + 1e-6)).ln();
    let t1 = a_max.ln();
    if !(t1 > t0) || points < 2 {
        return Err(VerifyError::Empty {
            what: format!("no window above the threshold {threshold} up to {a_max}"),
        });
    }
    let mut fam = HigherNormalFunction::new(laurent)?;
    let mut log_a = Vec::with_capacity(points);
    let mut nu = Vec::with_capacity(points);
    let mut increasing = true;
    let mut skipped = 0;
    for k in 0..points {
        let t = t0 + (t1 - t0) * k as f64 / (points - 1) as f64;
        // Just above the threshold the β rule may not apply yet (F2: the four branch points do
        // not straddle the α circle there): those points are skipped and reported; a failure
        // after the first success is an error.
        let (v, slope) = match fam.nu_f64(t) {
            Ok(v) => v,
            Err(_) if log_a.is_empty() => {
                skipped += 1;
                continue;
            }
            Err(e) => return Err(e.into()),
        };
        increasing &= slope > 0.0;
        log_a.push(t);
        nu.push(v);
    }
    if log_a.len() < 2 {
        return Err(VerifyError::Empty {
            what: format!("nu could not be computed in the window up to {a_max}"),
        });
    }
    let points = log_a.len();
    let mut crossings = Vec::new();
    for k in 1..points {
        let (v0, v1) = (nu[k - 1], nu[k]);
        let (lo, hi) = (v0.min(v1), v0.max(v1));
        let mut j = lo.floor() as i64 + 1;
        while (j as f64) <= hi {
            let s = (j as f64 - v0) / (v1 - v0);
            crossings.push((log_a[k - 1] + s * (log_a[k] - log_a[k - 1]), j));
            j += 1;
        }
    }
    Ok(NuScan {
        log_a,
        nu,
        crossings,
        increasing,
        skipped,
    })
}
