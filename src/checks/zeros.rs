//! Zeros of ψ on R: inside the outermost turning points (their number is the level), and in
//! the tails, where ψ keeps oscillating while it decays.
//!
//! # Method
//! With a reality rule k the zeros are the sign changes of the real function e^{−ikr²/(8π)}ψ
//! (phase fixed at its largest value); without one, ψ is genuinely complex and its zeros lie
//! near, not on, R: they are counted as *phase slips* ([`phase_slips`]: deep local minima of |ψ|
//! across which arg ψ turns by more than π/2; measured ≈ −π at each, with |ψ| down to
//! 1e-3…1e-5 of its peak, F1, dP2, Q5 level 3). Inside: between the outermost real parts of the
//! branch points. In the tails, successive zeros are ≈ 4π²/(Δm |r|) apart, Δm the exponent gap
//! of the two roots at that end ([`crate::curve::cover::Curve::end_exponent_gaps`]).
//!
//! # Accuracy
//! Counts are exact on a fine enough grid (4001 points inside); the tail spacing law holds to
//! 1 % for all 15 families (`tests/verify.rs`).
//!
//! # Errors
//! See [`VerifyError`].
//!
//! # References
//! `docs/MATHEMATICS.md` §2 (zeros) and §7.

use crate::checks::VerifyError;
use crate::eigenfunction::construction::Eigenfunction;
use crate::eigenfunction::phase;
use crate::numerics::complex::CNum;
use num_complex::Complex64;

/// How zeros were counted.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ZeroMethod {
    /// Sign changes of the real function e^{−ikr²/(8π)}ψ.
    SignChanges,
    /// Local minima of |ψ| with a phase turn above π/2.
    PhaseSlips,
}

impl std::fmt::Display for ZeroMethod {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            ZeroMethod::SignChanges => "sign changes of the real function of the reality rule",
            ZeroMethod::PhaseSlips => "phase slips of the complex ψ",
        })
    }
}

/// Zeros of ψ between the outermost real parts of the branch points.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Zeros {
    pub count: usize,
    pub method: ZeroMethod,
    /// The window [lo, hi] they were counted in.
    pub window: [f64; 2],
    /// Where they are (grid midpoints).
    pub positions: Vec<f64>,
}

/// Grid points used to count zeros.
const ZERO_GRID: usize = 4001;

/// Counts the zeros of ψ on R inside the outermost turning points (see the module docs).
///
/// # Errors
/// See [`crate::eigenfunction::construction::EigenError`]; [`VerifyError::Empty`] when the branch points have no extent in Re.
pub fn zeros_inside<T: CNum>(
    eig: &Eigenfunction<T>,
    rule: Option<i64>,
) -> Result<Zeros, VerifyError> {
    let res: Vec<f64> = eig.branch_points().iter().map(|b| b[0]).collect();
    let lo = res.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = res.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if !(hi > lo) {
        return Err(VerifyError::Empty {
            what: "the branch points span no interval of R".into(),
        });
    }
    let grid: Vec<f64> = (0..ZERO_GRID)
        .map(|j| lo + (hi - lo) * j as f64 / (ZERO_GRID - 1) as f64)
        .collect();
    let values: Vec<Complex64> = eig
        .psi_on_line(&grid, 0.0)?
        .into_iter()
        .zip(&grid)
        .map(|(v, &r)| {
            let v = v.map(|v| v.to_c64()).unwrap_or_default();
            rule.map(|k| v * phase::reality_factor(k, r)).unwrap_or(v)
        })
        .collect();
    let (method, positions) = match rule {
        Some(_) => (ZeroMethod::SignChanges, sign_changes(&grid, &values)),
        None => (ZeroMethod::PhaseSlips, phase_slips(&grid, &values)),
    };
    Ok(Zeros {
        count: positions.len(),
        method,
        window: [lo, hi],
        positions,
    })
}

/// Sign changes of the real part after turning the largest value real and positive.
pub fn sign_changes(grid: &[f64], values: &[Complex64]) -> Vec<f64> {
    let Some(peak) = values
        .iter()
        .copied()
        .max_by(|x, y| x.norm().total_cmp(&y.norm()))
    else {
        return Vec::new();
    };
    let turn = (peak / peak.norm()).conj();
    let real: Vec<f64> = values.iter().map(|v| (v * turn).re).collect();
    (1..real.len())
        .filter(|&k| real[k - 1].signum() != real[k].signum())
        .map(|k| 0.5 * (grid[k - 1] + grid[k]))
        .collect()
}

/// Zeros of a complex ψ near R: deep local minima of |ψ| (below [`SLIP_DEPTH`] of the smaller
/// neighbouring maximum) across which arg ψ turns by more than π/2 within the stretch where
/// |ψ| ≤ 2|ψ_min| (at least the two neighbouring points). Near a zero ζ = r₀ + iδ, ψ ≈ c(r − ζ):
/// that stretch is |r − r₀| ≤ √3 δ and the turn there is 2 atan √3 = 2π/3, whatever δ is, while a
/// smooth drift of the phase contributes only O(δ).
pub fn phase_slips(grid: &[f64], values: &[Complex64]) -> Vec<f64> {
    let n = values.len();
    let m: Vec<f64> = values.iter().map(|v| v.norm()).collect();
    let mut out = Vec::new();
    for k in 1..n.saturating_sub(1) {
        if !(m[k] < m[k - 1] && m[k] <= m[k + 1]) {
            continue;
        }
        // The neighbouring maxima.
        let mut a = k;
        while a > 0 && m[a - 1] >= m[a] {
            a -= 1;
        }
        let mut b = k;
        while b + 1 < n && m[b + 1] >= m[b] {
            b += 1;
        }
        if m[k] >= SLIP_DEPTH * m[a].min(m[b]) {
            continue;
        }
        let mut lo = k - 1;
        while lo > a && m[lo - 1] <= 2.0 * m[k] {
            lo -= 1;
        }
        let mut hi = k + 1;
        while hi < b && m[hi + 1] <= 2.0 * m[k] {
            hi += 1;
        }
        let turn: f64 = (lo..hi).map(|j| (values[j + 1] / values[j]).arg()).sum();
        if turn.abs() > std::f64::consts::FRAC_PI_2 {
            out.push(grid[k]);
        }
    }
    out
}

/// Depth (relative to the smaller neighbouring maximum of |ψ|) below which a local minimum may be
/// a zero near R.
pub const SLIP_DEPTH: f64 = 0.1;

/// The zeros of ψ beyond the outermost turning points at one end, where ψ keeps oscillating
/// while it decays.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct TailZeros {
    /// −1: r → −∞, +1: r → +∞.
    pub side: i64,
    /// Zeros on the grid beyond the window.
    pub count: usize,
    /// Grid points beyond the window without a value: a zero between them and their valued
    /// neighbours is not seen (stated, not guessed).
    pub points_without_value: usize,
    /// Median of s·|r|/π² over successive zeros (s their spacing, r their midpoint); None with
    /// fewer than two spacings.
    pub spacing_constant: Option<f64>,
    /// The predicted constant 4/Δm, Δm the exponent gap of the two roots at that end
    /// ([`crate::curve::cover::Curve::end_exponent_gaps`]); None where the roots meet at the end (no
    /// oscillation: |ψ| decays like e^{−|r|/2} or with a power of |r|).
    pub predicted: Option<f64>,
}

/// Zeros of the written ψ beyond `window` on `grid` at both ends (sign changes with a reality
/// rule, phase slips without), with the spacing law `s ≈ 4π²/(Δm |r|)` measured against its
/// prediction from the exponent gaps `gaps` = [x → 0, x → ∞].
pub fn tail_zeros(
    grid: &[f64],
    values: &[Option<Complex64>],
    rule: Option<i64>,
    window: [f64; 2],
    gaps: [i64; 2],
) -> [TailZeros; 2] {
    let pairs: Vec<(f64, Complex64)> = grid
        .iter()
        .zip(values)
        .filter_map(|(&r, v)| v.filter(|v| v.is_finite()).map(|v| (r, v)))
        .map(|(r, v)| {
            (
                r,
                rule.map(|k| v * phase::reality_factor(k, r)).unwrap_or(v),
            )
        })
        .collect();
    let r: Vec<f64> = pairs.iter().map(|p| p.0).collect();
    let v: Vec<Complex64> = pairs.iter().map(|p| p.1).collect();
    let zeros = match rule {
        Some(_) => sign_changes(&r, &v),
        None => phase_slips(&r, &v),
    };
    [(-1i64, window[0], gaps[0]), (1, window[1], gaps[1])].map(|(side, edge, gap)| {
        let mut beyond: Vec<f64> = zeros
            .iter()
            .copied()
            .filter(|&z| (z - edge) * side as f64 > 0.0)
            .collect();
        beyond.sort_by(f64::total_cmp);
        let mut constants: Vec<f64> = beyond
            .windows(2)
            .map(|w| (w[1] - w[0]) * (0.5 * (w[0] + w[1])).abs() / std::f64::consts::PI.powi(2))
            .collect();
        constants.sort_by(f64::total_cmp);
        let points_without_value = grid
            .iter()
            .zip(values)
            .filter(|(&r, v)| (r - edge) * side as f64 > 0.0 && !v.is_some_and(|v| v.is_finite()))
            .count();
        TailZeros {
            side,
            count: beyond.len(),
            points_without_value,
            spacing_constant: (!constants.is_empty()).then(|| constants[constants.len() / 2]),
            predicted: (gap > 0).then(|| 4.0 / gap as f64),
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tail_zeros_state_the_points_without_a_value() {
        // ψ = cos(r) (real, k = 0) on [−20, 20]; zeros at π/2 + kπ (common practice). Beyond the
        // window [−5, 5]: 4 on each side (5π/2 … 11π/2).
        let grid: Vec<f64> = (0..401).map(|k| -20.0 + 0.1 * k as f64).collect();
        let mut values: Vec<Option<Complex64>> = grid
            .iter()
            .map(|&r| Some(Complex64::new(r.cos(), 0.0)))
            .collect();
        let full = tail_zeros(&grid, &values, Some(0), [-5.0, 5.0], [0, 0]);
        assert_eq!((full[0].count, full[1].count), (4, 4));
        assert_eq!(full[1].points_without_value, 0);
        // Three points on the right without a value (one inside the window): two stated.
        for k in [250, 300, 400] {
            values[k] = None;
        }
        let part = tail_zeros(&grid, &values, Some(0), [-5.0, 5.0], [0, 0]);
        assert_eq!(part[0].points_without_value, 0);
        assert_eq!(part[1].points_without_value, 2);
    }
}
