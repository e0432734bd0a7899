//! Unit L² normalization of ψ on R, and the decay law of |ψ| at the two ends.
//!
//! # Method
//! ψ on R is sampled by one march ([`Eigenfunction::psi_on_line`]) on [−L₋, L₊], each end grown
//! by 4 until |ψ| has fallen below 1e-16 of its peak there (or to [`MAX_RANGE`]); the trapezoid
//! rule with step h gives ∫|ψ|² (exponentially accurate for a function analytic in the strip
//! |Im r| < 2π), and the tails beyond ±L are estimated as |ψ(L)|²/(2κ) with κ the fitted decay
//! rate ([`envelope_decay`]).
//!
//! # Decay
//! |ψ| ≈ c |r|^p e^{−κ|r|} with κ = 1/2 at a branched end and 1 otherwise, p ≈ 1 at a merging
//! end (the table of all 15 families is in `docs/MATHEMATICS.md` §2).
//!
//! # Accuracy
//! The norm to double precision (the trapezoid error at step 0.05 is far below rounding); the
//! fitted rates to about 1 % (measured for all 15 families, `tests/eigenfn.rs`).
//!
//! # References
//! "The exponentially convergent trapezoidal rule", SIAM Review 56 (2014) 385–458.

use crate::eigenfunction::construction::{EigenError, Eigenfunction};
use crate::numerics::complex::CNum;
use crate::numerics::serial;
use num_complex::Complex64;

/// Normalization of ψ on R: unit L² norm and the phase rule "ψ real and positive at the point of
/// largest |ψ|".
#[derive(Debug, Clone, serde::Serialize)]
pub struct Normalization {
    /// Multiply the raw ψ by this factor.
    #[serde(serialize_with = "serial::complex64")]
    pub factor: Complex64,
    /// ∫|ψ_raw|² over R (trapezoid on the quadrature range plus the tail estimate).
    pub raw_norm_squared: f64,
    /// The larger of the two ends of the quadrature range ([`Normalization::range_ends`]).
    pub range: f64,
    /// Quadrature range [−L₋, L₊] as [L₋, L₊], and step.
    pub range_ends: [f64; 2],
    pub step: f64,
    /// Estimated relative contribution of the tails beyond ±L.
    pub tail: f64,
    /// Fitted decay rates κ of |ψ| ~ |r|^p e^{−κ|r|} at the left and right ends
    /// ([`envelope_decay`]).
    pub decay: [f64; 2],
    /// The fitted powers p of the prefactor at the left and right ends.
    pub decay_power: [f64; 2],
    /// Where |ψ| is largest on the quadrature grid.
    pub peak: f64,
    /// The raw ψ on the quadrature grid r_k = −range_ends\[0\] + k·step (multiply by `factor`).
    #[serde(serialize_with = "serial::complex64_list")]
    pub samples: Vec<Complex64>,
}

impl<T: CNum> Eigenfunction<T> {
    /// Unit L² normalization on R with the documented phase rule: trapezoid with step h on
    /// [−L₋, L₊], each end grown until |ψ| has fallen below 1e-16 of its maximum there (or to
    /// [`MAX_RANGE`]), plus the tails ∫_{L₊}^∞ |ψ|² ≈ |ψ(L₊)|²/(2κ) (and at −L₋) with κ the
    /// fitted decay rate ([`envelope_decay`] on the quadrature grid).
    ///
    /// # Errors
    /// See [`Eigenfunction::psi`].
    pub fn normalization(&self, step: f64) -> Result<Normalization, EigenError> {
        let prec = self.lambda.prec();
        let at = |r: f64| -> Result<Complex64, EigenError> {
            Ok(self.psi(&T::from_f64s(r, 0.0, prec))?.to_c64())
        };
        let mut peak_value: f64 = 0.0;
        // Each end grows by 4 until |ψ| there is below 1e-16 of the peak, at most to
        // MAX_RANGE; if the continuation fails far out, that end stays at the last range that
        // worked. The ends differ: |ψ| ~ e^{−|r|/2} needs twice the range of e^{−|r|}.
        let mut ends = [4.0f64, 4.0];
        let mut open = [true, true];
        // The scale: |ψ| on [−8, 8] by one march (an underestimate of the peak only makes the
        // stopping rule stricter; the peak itself is taken from the final line).
        let scale_grid: Vec<f64> = (-32..=32).map(|k| k as f64 * 0.25).collect();
        for v in self.psi_on_line(&scale_grid, 0.0)?.into_iter().flatten() {
            peak_value = peak_value.max(v.abs_f64());
        }
        while open[0] || open[1] {
            for (side, sign) in [(0, -1.0), (1, 1.0)] {
                if !open[side] {
                    continue;
                }
                match at(sign * (ends[side] + 4.0)) {
                    Ok(v) => {
                        ends[side] += 4.0;
                        open[side] = v.norm() >= 1e-16 * peak_value && ends[side] < MAX_RANGE;
                    }
                    Err(_) => open[side] = false,
                }
            }
        }
        let n = ((ends[0] + ends[1]) / step).round() as usize;
        let h = (ends[0] + ends[1]) / n as f64;
        let mut sum = 0.0;
        let mut peak = (0.0, 0.0f64, Complex64::new(0.0, 0.0));
        let mut values = Vec::with_capacity(n + 1);
        let mut samples = Vec::with_capacity(n + 1);
        let grid: Vec<f64> = (0..=n).map(|k| -ends[0] + k as f64 * h).collect();
        let line = self.psi_on_line(&grid, 0.0)?;
        for (k, v) in line.into_iter().enumerate() {
            let r = grid[k];
            let v = v.map(|v| v.to_c64()).unwrap_or(Complex64::new(0.0, 0.0));
            samples.push(v);
            let w = if k == 0 || k == n { 0.5 } else { 1.0 };
            sum += w * v.norm_sqr() * h;
            if v.norm() > peak.1 {
                peak = (r, v.norm(), v);
            }
            values.push(v.norm());
        }
        let top = values.iter().copied().fold(peak_value, f64::max);
        let fits = [
            envelope_decay(&grid, &values, -1.0, top),
            envelope_decay(&grid, &values, 1.0, top),
        ];
        let decay = [fits[0].rate, fits[1].rate];
        let tail_of = |v: f64, k: f64| {
            if k.is_finite() && k > 0.0 {
                v * v / (2.0 * k)
            } else {
                0.0
            }
        };
        let tail = tail_of(values[0], decay[0]) + tail_of(values[n], decay[1]);
        let total = sum + tail;
        let phase = peak.2 / peak.2.norm();
        Ok(Normalization {
            factor: 1.0 / (phase * total.sqrt()),
            raw_norm_squared: total,
            range: ends[0].max(ends[1]),
            range_ends: ends,
            step: h,
            tail: tail / total,
            decay,
            decay_power: [fits[0].power, fits[1].power],
            peak: peak.0,
            samples,
        })
    }
}

/// Largest end of the normalization range: |ψ| ~ e^{−|r|/2} falls below 1e-16 of its peak about
/// 75 beyond the classically allowed region.
pub const MAX_RANGE: f64 = 100.0;

/// Where the envelope fit of [`envelope_decay`] starts: |ψ| below this fraction of its peak (far
/// enough out that the prefactor is close to its asymptotic power law; measured: starting at
/// 1e-3 instead moves κ by up to 1 % for the families whose |ψ| oscillates in the tails).
pub const ENVELOPE_START: f64 = 1e-6;

/// A fitted decay law `|ψ(r)| ≈ c |r|^p e^{−κ|r|}` at one end of R.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Decay {
    /// κ.
    pub rate: f64,
    /// p.
    pub power: f64,
    /// Envelope points the fit used.
    pub points: usize,
}

/// The decay law of |ψ| at one end (`side` = −1: r → −∞, +1: r → +∞) from samples `abs_psi` of
/// |ψ| on the increasing `grid`, by a least-squares fit of `log|ψ| = c + p ln|r| − κ|r|` to the
/// envelope where |ψ| < [`ENVELOPE_START`]·`peak` and |r| > 2: the local maxima of |ψ| (vertex of
/// the parabola through log|ψ| at the three grid points) when there are at least four (ψ
/// oscillates while it decays), all points otherwise. The power p matters: where the two roots
/// merge as x → 0 or ∞, |ψ| ~ |r| e^{−|r|}, and a pure exponential fitted over |r| ≲ 40 reads
/// κ ≈ 0.95 (measured; the decay table of `docs/MATHEMATICS.md` §2). NaN when fewer than four points remain.
pub fn envelope_decay(grid: &[f64], abs_psi: &[f64], side: f64, peak: f64) -> Decay {
    let n = grid.len().min(abs_psi.len());
    let usable = |i: usize| {
        grid[i] * side > 2.0
            && abs_psi[i] > 0.0
            && abs_psi[i].is_finite()
            && abs_psi[i] < ENVELOPE_START * peak
    };
    let mut maxima = Vec::new();
    for i in 1..n.saturating_sub(1) {
        let (a, b, c) = (abs_psi[i - 1], abs_psi[i], abs_psi[i + 1]);
        if usable(i) && b >= a && b >= c && a > 0.0 && c > 0.0 {
            let (la, lb, lc) = (a.ln(), b.ln(), c.ln());
            let curvature = la - 2.0 * lb + lc;
            let (shift, top) = if curvature < 0.0 {
                let t = 0.5 * (la - lc) / curvature;
                (t, lb - 0.25 * (la - lc) * t)
            } else {
                (0.0, lb)
            };
            let h = grid[i + 1] - grid[i];
            maxima.push(((grid[i] + shift * h).abs(), top));
        }
    }
    let points = if maxima.len() >= 4 {
        maxima
    } else {
        (0..n)
            .filter(|&i| usable(i))
            .map(|i| (grid[i].abs(), abs_psi[i].ln()))
            .collect()
    };
    let (rate, power) = fit_exponential_with_power(&points);
    Decay {
        rate,
        power,
        points: points.len(),
    }
}

/// Least squares `v ≈ c + p ln r − κ r` through the points (r, v); returns (κ, p), NaN when
/// fewer than four points or the normal equations are singular. Centred variables keep the
/// 2×2 system for (κ, p) well conditioned.
fn fit_exponential_with_power(points: &[(f64, f64)]) -> (f64, f64) {
    if points.len() < 4 {
        return (f64::NAN, f64::NAN);
    }
    let m = points.len() as f64;
    let mean = |f: &dyn Fn(&(f64, f64)) -> f64| points.iter().map(f).sum::<f64>() / m;
    let (mr, ml, mv) = (mean(&|p| p.0), mean(&|p| p.0.ln()), mean(&|p| p.1));
    let (mut srr, mut sll, mut srl, mut srv, mut slv) = (0.0, 0.0, 0.0, 0.0, 0.0);
    for &(r, v) in points {
        let (dr, dl, dv) = (r - mr, r.ln() - ml, v - mv);
        srr += dr * dr;
        sll += dl * dl;
        srl += dr * dl;
        srv += dr * dv;
        slv += dl * dv;
    }
    let det = srr * sll - srl * srl;
    if det.abs() <= 1e-12 * srr * sll {
        return (f64::NAN, f64::NAN);
    }
    // v − mv ≈ s (r − mr) + p (ln r − ml), κ = −s.
    let slope = (srv * sll - slv * srl) / det;
    let power = (slv * srr - srv * srl) / det;
    (-slope, power)
}
