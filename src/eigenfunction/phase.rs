//! The phase of ψ: reality rules from the symmetries of φ, and the global phase convention.
//!
//! # Formula
//! When the terms of φ are invariant under m ↦ (m₁ + k m₂, −m₂), the antiunitary
//! Θ_k = e^{ikr²/(4π)}K (K complex conjugation) commutes with Ô at ħ = 2π, so an eigenfunction
//! satisfies Θ_k ψ = cψ and e^{−ikr²/(8π)}ψ(r) is real up to a constant. k = 0 for F0 and F0*,
//! k = −1 for P2 and dP3; the other families have no such rule, and their phase profile is the
//! information to report.
//!
//! # Convention
//! With a rule k, e^{−ikr²/(8π)}ψ is made real and positive where |ψ| is largest on the grid
//! ([`fix_phase`]); without one, ψ itself is made real and positive there (by the
//! normalization).
//!
//! # Accuracy
//! The imaginary part left after the rule is measured and reported (`tests/eigenfn.rs`: below
//! 1e-9 with the right k, above 1e-3 with a wrong one).
//!
//! # References
//! `docs/MATHEMATICS.md` §2 (phase).

use crate::curve::laurent::Laurent;
use num_complex::Complex64;

/// The reality rule of a family: the k ∈ {−3, …, 3} (smallest |k|, then k) for which the terms of
/// φ are invariant under m ↦ (m₁ + k m₂, −m₂). That map is the linear antisymplectic
/// (r, p) ↦ (r, k r − p), implemented at ħ = 2π by the antiunitary Θ_k = e^{ikr²/(4π)}K (K complex
/// conjugation), which then commutes with Ô; so an eigenfunction satisfies Θ_k ψ = cψ and
/// **e^{−ikr²/(8π)} ψ(r) is real up to a constant**. k = 0 for F0 (ψ real), k = −1 for P2 and dP3
/// (e^{ir²/(8π)}ψ real, docs/MATHEMATICS.md §2). None when no such k exists (then the phase profile is the
/// information to report).
pub fn reality_rule(laurent: &Laurent) -> Option<i64> {
    let terms = laurent.terms();
    let mut ks: Vec<i64> = (-3..=3).collect();
    ks.sort_by_key(|k| (k.abs(), *k));
    ks.into_iter().find(|&k| {
        terms.iter().all(|&([m1, m2], c)| {
            terms
                .iter()
                .any(|&(q, cq)| q == [m1 + k * m2, -m2] && cq == c)
        })
    })
}

/// The phase factor e^{−ikr²/(8π)} of the reality rule at r.
pub fn reality_factor(k: i64, r: f64) -> Complex64 {
    Complex64::from_polar(1.0, -(k as f64) * r * r / (8.0 * std::f64::consts::PI))
}

/// Phase rule with a reality rule k: e^{−ikr²/(8π)}ψ real and positive at the grid point of
/// largest |ψ| (the normalization already made ψ itself positive at the peak on R); returns the
/// largest imaginary part left, relative to that peak, and the phase turned.
pub fn fix_phase(
    k: i64,
    grid: &[f64],
    main: &mut [Option<Complex64>],
    others: &mut [&mut [Option<Complex64>]],
) -> Option<(f64, Complex64)> {
    let g: Vec<Complex64> = main
        .iter()
        .zip(grid)
        .filter_map(|(v, &r)| v.map(|v| v * reality_factor(k, r)))
        .filter(|v| v.is_finite())
        .collect();
    let peak = g
        .iter()
        .copied()
        .max_by(|x, y| x.norm().total_cmp(&y.norm()))?;
    let turn = (peak / peak.norm()).conj();
    for v in main.iter_mut().flatten() {
        *v *= turn;
    }
    for line in others.iter_mut() {
        for v in line.iter_mut().flatten() {
            *v *= turn;
        }
    }
    let defect = g.iter().map(|v| (v * turn).im.abs()).fold(0.0, f64::max) / peak.norm();
    Some((defect, turn))
}
