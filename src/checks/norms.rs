//! Norms and overlaps of normalized eigenfunctions on R.
//!
//! # Formulas
//! - **Norm**: ‖ψ‖² of the normalized function by the trapezoid rule at twice the normalization
//!   step (an independent quadrature: 1 when the normalization has converged), and the mass of
//!   the written values inside the output grid (Simpson's rule).
//! - **Orthogonality**: |⟨ψ_m, ψ_n⟩| by the trapezoid rule on the normalization grids of the two
//!   levels (step 0.05; beyond a grid ψ is below 1e-16 of its peak or its tail is estimated).
//!
//! # Accuracy
//! For ψ analytic in the strip |Im r| < 2π the trapezoid error falls like e^{−2π·2π/h}: far below
//! rounding at these steps. Measured: |‖ψ‖² − 1| < 1e-12 and orthogonality < 1e-9 for levels
//! 0..4 of all 15 families (`tests/audit.rs`).
//!
//! # References
//! "The exponentially convergent trapezoidal rule", SIAM Review 56 (2014) 385–458.

use crate::eigenfunction::normalization::Normalization;
use num_complex::Complex64;

/// ∫|ψ|² of the written values on a uniform grid by Simpson's rule (trapezoid on a last odd
/// interval), points without a value skipped as zero.
pub fn norm_on_grid(grid: &[f64], values: &[Option<Complex64>]) -> f64 {
    let n = grid.len();
    if n < 2 {
        return 0.0;
    }
    let h = (grid[n - 1] - grid[0]) / (n - 1) as f64;
    let f: Vec<f64> = values
        .iter()
        .map(|v| v.map(|v| v.norm_sqr()).unwrap_or(0.0))
        .collect();
    let even = if (n - 1) % 2 == 0 { n } else { n - 1 };
    let mut sum = 0.0;
    for k in (0..even.saturating_sub(2)).step_by(2) {
        sum += h / 3.0 * (f[k] + 4.0 * f[k + 1] + f[k + 2]);
    }
    if even < n {
        sum += 0.5 * h * (f[n - 2] + f[n - 1]);
    }
    sum
}

/// ‖ψ‖² of the normalized function by the trapezoid rule on every other normalization sample
/// (step 2h) plus the tail estimate: equal to 1 when the normalization's quadrature has
/// converged (for analytic ψ the trapezoid error falls like e^{−2πd/h}, d the strip half-width).
pub fn norm_coarse(n: &Normalization) -> f64 {
    let s = &n.samples;
    if s.len() < 3 {
        return f64::NAN;
    }
    let last = (s.len() - 1) / 2 * 2;
    let mut sum = 0.0;
    for k in (0..=last).step_by(2) {
        let w = if k == 0 || k == last { 0.5 } else { 1.0 };
        sum += w * s[k].norm_sqr();
    }
    (sum * 2.0 * n.step + n.tail * n.raw_norm_squared) * n.factor.norm_sqr()
}

/// |⟨ψ_m, ψ_n⟩| for every pair of the given normalizations (trapezoid on their common grid).
pub fn orthogonality(levels: &[&Normalization]) -> Vec<Vec<f64>> {
    let n = levels.len();
    let mut out = vec![vec![0.0; n]; n];
    for i in 0..n {
        for j in 0..n {
            out[i][j] = overlap(levels[i], levels[j]).norm();
        }
    }
    out
}

/// ⟨ψ_a, ψ_b⟩ of two normalized eigenfunctions from their quadrature samples (trapezoid on the
/// overlap of the two ranges, with the step of `a`; a sample of `b` is taken at the nearest node).
pub fn overlap(a: &Normalization, b: &Normalization) -> Complex64 {
    let h = a.step;
    let at = |m: &Normalization, r: f64| -> Complex64 {
        let k = ((r + m.range_ends[0]) / m.step).round();
        if k < 0.0 || k as usize >= m.samples.len() {
            return Complex64::new(0.0, 0.0);
        }
        m.samples[k as usize] * m.factor
    };
    let lo = -a.range_ends[0].min(b.range_ends[0]);
    let hi = a.range_ends[1].min(b.range_ends[1]);
    let n = ((hi - lo) / h).round() as usize;
    let mut sum = Complex64::new(0.0, 0.0);
    for k in 0..=n {
        let r = lo + k as f64 * h;
        let w = if k == 0 || k == n { 0.5 } else { 1.0 };
        sum += w * at(a, r).conj() * at(b, r);
    }
    sum * h
}
