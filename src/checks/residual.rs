//! The eigen-equation residual `A(x)ψ(r − 2πi) + C(x)ψ(r + 2πi) − (B(x) + a)ψ(r)`, x = −e^r,
//! on a grid of R, relative to max|ψ| on the grid.
//!
//! # Method
//! The three values come from three lines of ψ, each reached along its own route on the cover
//! ([`Eigenfunction::psi_on_line`]), never through the shift relation χ(z − 2πi) = −yχ(z) that
//! the construction assumes (a residual formed through it would be vacuous). At the poles of ψ on
//! the boundary lines (r = 0 when A or C vanishes at x = −1) the products A·ψ(r − 2πi),
//! C·ψ(r + 2πi) are analytic, and their values are the mean over a circle around r (trapezoid
//! rule: exponentially accurate).
//!
//! # Points without a value
//! Where ψ on R has no value (a point the profile could not compute to its digits, see
//! [`crate::eigenfunction::profile::PointDigits`]) or the residual is not finite, the residual is
//! not formed: it is `None` there, counted in [`Residual::points_without_value`], and the maximum
//! and rms are over the [`Residual::points_formed`] only (None, never NaN, when there are none).
//!
//! # What it detects
//! A wrong operator (e.g. the wrong Weyl sign: residual of order one, tested below) and loss of
//! precision. It is **not** a negative control for the modulus: for dP3 and for F0 it stays
//! tiny off the attractor modulus (the shift routes never change sheet); single-valuedness
//! ([`crate::checks::single_valuedness`]) detects that.
//!
//! # Accuracy
//! The working precision of the eigenfunction less its losses (`docs/MATHEMATICS.md` §6):
//! measured 1e-14…1e-10 in double precision for levels 0..4 of all 15 families, 1e-47…1e-50 at
//! 40 digits for F0 and P2.
//!
//! # Errors
//! [`EigenError`].
//!
//! # References
//! `docs/MATHEMATICS.md` §2 and §7; "The exponentially convergent trapezoidal rule", SIAM Review
//! 56 (2014) 385–458.

use crate::eigenfunction::construction::{mean_value_circle, EigenError, Eigenfunction};
use crate::numerics::complex::CNum;
use crate::operator::quantum_curve::QuantumCurve;
use crate::precision::digits_of;

/// The eigen-equation residual on the grid.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Residual {
    /// |A ψ(r − 2πi) + C ψ(r + 2πi) − (B + a) ψ(r)| / max|ψ| per grid point; None where a value
    /// of ψ on one of the three lines is missing (not a pole: a point without a value, see
    /// [`crate::eigenfunction::profile::PointDigits`]).
    pub per_point: Vec<Option<f64>>,
    /// The largest over the points where it was formed; None when it was formed nowhere.
    pub max: Option<f64>,
    /// Root mean square over the points where it was formed; None when it was formed nowhere
    /// (never NaN).
    pub rms: Option<f64>,
    /// Grid points on a pole where a product was evaluated as a limit.
    pub pole_limits: usize,
    /// Grid points where it was formed, and where it was not (no value of ψ there).
    pub points_formed: usize,
    pub points_without_value: usize,
    /// max|ψ| on R of the raw (unnormalized) ψ: the scale the residual is relative to.
    #[serde(skip)]
    pub scale: f64,
}

impl Residual {
    /// The residual from absolute per-point values relative to `scale`.
    pub fn from_absolute(absolute: &[Option<f64>], scale: f64, pole_limits: usize) -> Self {
        let per_point: Vec<Option<f64>> = absolute
            .iter()
            .map(|v| v.map(|v| v / scale).filter(|v| v.is_finite()))
            .collect();
        let defined: Vec<f64> = per_point.iter().flatten().copied().collect();
        let formed = defined.len();
        Residual {
            max: (formed > 0).then(|| defined.iter().copied().fold(0.0, f64::max)),
            rms: (formed > 0)
                .then(|| (defined.iter().map(|v| v * v).sum::<f64>() / formed as f64).sqrt()),
            points_without_value: per_point.len() - formed,
            points_formed: formed,
            per_point,
            pole_limits,
            scale,
        }
    }

    /// Replaces the values at `indices` (absolute, relative to [`Residual::scale`]; None: not
    /// formed) and recomputes the summary.
    pub fn replace(&mut self, indices: &[usize], absolute: &[Option<f64>]) {
        let mut all: Vec<Option<f64>> = self
            .per_point
            .iter()
            .map(|v| v.map(|v| v * self.scale))
            .collect();
        for (&k, v) in indices.iter().zip(absolute) {
            all[k] = *v;
        }
        *self = Residual::from_absolute(&all, self.scale, self.pole_limits);
    }
}

/// The residual at the real parts `points` (at the working precision) from ψ on the three lines Im r = 0 (`real_line`), +2π (`upper`) and
/// −2π (`lower`), each integrated along its own route, at the working precision of `eig`; `None`
/// on a boundary line marks a pole of ψ, where the product is evaluated as a limit.
///
/// # Errors
/// See [`EigenError`] (evaluating ψ on the circles of the pole limits).
pub fn eigen_equation_residual<T: CNum>(
    q: &QuantumCurve,
    eig: &Eigenfunction<T>,
    points: &[T],
    real_line: &[Option<T>],
    upper: &[Option<T>],
    lower: &[Option<T>],
) -> Result<Residual, EigenError> {
    let scale = real_line
        .iter()
        .flatten()
        .map(|v| v.abs_f64())
        .filter(|v| v.is_finite())
        .fold(0.0, f64::max);
    let (absolute, pole_limits) = absolute_residuals(q, eig, points, real_line, upper, lower)?;
    Ok(Residual::from_absolute(&absolute, scale, pole_limits))
}

/// The absolute residual |A ψ(r − 2πi) + C ψ(r + 2πi) − (B + a) ψ(r)| of raw ψ per point (None
/// where ψ on R has no value or the residual is not finite), and the number of pole products
/// evaluated as limits.
///
/// # Errors
/// See [`eigen_equation_residual`].
pub fn absolute_residuals<T: CNum>(
    q: &QuantumCurve,
    eig: &Eigenfunction<T>,
    points: &[T],
    real_line: &[Option<T>],
    upper: &[Option<T>],
    lower: &[Option<T>],
) -> Result<(Vec<Option<f64>>, usize), EigenError> {
    let a = eig.curve().modulus().clone();
    let mut per_point = Vec::with_capacity(points.len());
    let mut pole_limits = 0;
    for (k, z) in points.iter().enumerate() {
        let Some(m) = &real_line[k] else {
            per_point.push(None);
            continue;
        };
        let c = q.coefficients(z);
        let down = match &lower[k] {
            Some(d) => c.down * d.clone(),
            None => {
                pole_limits += 1;
                pole_product(eig, q, z, -1)?
            }
        };
        let up = match &upper[k] {
            Some(u) => c.up * u.clone(),
            None => {
                pole_limits += 1;
                pole_product(eig, q, z, 1)?
            }
        };
        let res = down + (c.centre - a.clone()) * m.clone() + up;
        per_point.push(Some(res.abs_f64()).filter(|v| v.is_finite()));
    }
    Ok((per_point, pole_limits))
}

/// Largest radius of the circle on which a product at a pole is averaged: on it ψ is
/// (ρ_small/ρ)^ℓ smaller than on a small circle, so its rounding error, which the zero of C or A
/// then multiplies, is that much less amplified (measured: T6, a triple pole at +2πi, residual at
/// r = 0 of 7.7e-10 with ρ = 0.1 in double precision, 4e-11 elsewhere).
const POLE_CIRCLE: f64 = 0.5;

/// The limit at r of A(x)·ψ(r − 2πi) (`side` = −1) or C(x)·ψ(r + 2πi) (`side` = +1) where ψ has a
/// pole: the product is analytic at r (the zero of A or C cancels the pole, docs/MATHEMATICS.md §2), so its
/// value is the mean over a circle around r (trapezoid rule, exact up to (ρ/R)^M, R = 2π the
/// distance to the next singularity of the product; M from the working digits).
fn pole_product<T: CNum>(
    eig: &Eigenfunction<T>,
    q: &QuantumCurve,
    r: &T,
    side: i64,
) -> Result<T, EigenError> {
    let shift = r.int_like(2 * side) * r.pi_like() * r.i_like();
    // The product's nearest singularities are 2π away (the next poles of ψ), and the circle keeps
    // clear of the branch points: the trapezoid error (ρ/2π)^M with M from the working digits.
    let pole = [
        r.re_f64(),
        r.im_f64() + 2.0 * std::f64::consts::PI * side as f64,
    ];
    let rho = POLE_CIRCLE.min(0.4 * eig.distance_to_branch_point(pole));
    let m = ((digits_of(r.prec()) + 2.0) / (2.0 * std::f64::consts::PI / rho).log10())
        .ceil()
        .max(16.0) as usize;
    let mut acc = r.int_like(0);
    for w in mean_value_circle(r, rho, m) {
        let c = q.coefficients(&w);
        let coefficient = if side < 0 { c.down } else { c.up };
        acc = acc + coefficient * eig.psi(&(w + shift.clone()))?;
    }
    Ok(acc / r.int_like(m as i64))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::curve::attractor;
    use crate::curve::laurent::Laurent;
    use crate::eigenfunction::profile::BASE_RE;
    use num_complex::Complex64;

    /// The hexagon dP3 from the catalogue: poles of ψ at ±2πi, cancelled in the eigen-equation
    /// by the zeros of A and C at r = 0.
    fn hexagon() -> Laurent {
        Laurent::tempered(&crate::lattice::catalogue::by_id("dP3").unwrap().polygon())
    }

    #[test]
    fn points_without_value_are_counted_never_averaged() {
        // A NaN and a missing value are not formed: max and rms over the one formed point. The
        // old summary (a fold with f64::max and a mean over all values) gave max 2 and rms NaN.
        let r = Residual::from_absolute(&[Some(2.0), None, Some(f64::NAN)], 2.0, 0);
        assert_eq!((r.points_formed, r.points_without_value), (1, 2));
        assert_eq!((r.max, r.rms), (Some(1.0), Some(1.0)));
        assert_eq!(r.per_point, vec![Some(1.0), None, None]);
        let none = Residual::from_absolute(&[None, Some(f64::INFINITY)], 1.0, 0);
        assert_eq!((none.max, none.rms, none.points_formed), (None, None, 0));
    }

    #[test]
    fn residual_with_pole_limits_and_its_failure_for_the_wrong_operator() {
        // On a grid through r = 0 the products A·ψ(r − 2πi), C·ψ(r + 2πi) at the poles are
        // evaluated as limits: the residual stays at double-precision level there (docs/MATHEMATICS.md §2,
        // checked values for the hexagon). With the wrong Weyl sign (the m₂ = ±1 terms negated)
        // the same lines give a residual of order one (negative companion).
        let l = hexagon();
        let a = attractor::solve_levels(&l, 1..=1, 20).unwrap()[0]
            .modulus
            .to_f64();
        let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, BASE_RE).unwrap();
        let grid: Vec<f64> = (-20..=20).map(|k| 0.1 * k as f64).collect();
        let two_pi = 2.0 * std::f64::consts::PI;
        let line = |im: f64| eig.psi_on_line(&grid, im).unwrap();
        let (real_line, upper, lower) = (line(0.0), line(two_pi), line(-two_pi));
        let points: Vec<Complex64> = grid.iter().map(|&r| Complex64::new(r, 0.0)).collect();
        let residual = |q: &QuantumCurve| {
            eigen_equation_residual(q, &eig, &points, &real_line, &upper, &lower).unwrap()
        };
        let right = residual(&QuantumCurve::new(&l).unwrap());
        assert_eq!(right.pole_limits, 2, "both products at r = 0 are limits");
        let max = right.max.unwrap();
        assert!(max < 1e-10, "residual {max:e}");
        let flipped: Vec<_> = l
            .terms()
            .iter()
            .map(|&(m, c)| (m, if m[1] == 0 { c } else { -c }))
            .collect();
        let wrong = QuantumCurve::new(&Laurent::from_terms(flipped)).unwrap();
        let bad = residual(&wrong);
        let bad = bad.max.unwrap();
        assert!(bad > 1e-2, "wrong operator residual {bad:e}");
    }
}
