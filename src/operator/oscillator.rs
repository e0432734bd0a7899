//! The harmonic-oscillator basis of the quantum curve: the frame it is centred and shaped in,
//! the exact matrix elements of Ô in it, and the oscillator functions ⟨r|n⟩.
//!
//! # Method
//! 1. **Frame.** Translate to the classical minimum z* = (r*, p*) of `H(r, p) = φ(e^r, e^p)` and
//!    round its Hessian 𝐇 there with the symplectic `S = (det 𝐇)^{1/4} 𝐇^{−1/2}` (so
//!    `Sᵀ𝐇S = √det 𝐇 · 1`). Both are unitary changes of frame (translation, metaplectic), so
//!    they do not change the spectrum; they only make the basis fit the operator. In the new
//!    frame `(r, p) = z* + S(r', p')` each term becomes
//!    `c_m e^{m·(r,p)} = c_m e^{m·z*} e^{α r' + β p'}` with `(α, β) = Sᵀm`. When φ has a det −1
//!    symmetry the frame is further rotated so that the matrix is real ([`Frame::mirror`]).
//! 2. **Basis.** With squeeze s, `r̂' = s√(ħ/2)(â + â†)`, `p̂' = −i s⁻¹√(ħ/2)(â − â†)`, so
//!    `α r̂' + β p̂' = u â† + ū â`, `u = √(ħ/2)(α s + iβ/s) = ρ e^{iθ}`, and
//!    `⟨j| e^{u â† + ū â} |k⟩ = e^{iθ(j−k)} P_{jk}(ρ)` where `P(ρ) = e^{ρ(â+â†)}` has positive
//!    entries given by the exact recurrence (from `â e^{X} = e^{X}(â + ρ)`)
//!    `P_{0k} = e^{ρ²/2} ρᵏ/√(k!)`, `P_{j+1,k} = (√k P_{j,k−1} + ρ P_{jk}) / √(j+1)`:
//!    all terms positive, so every entry is computed to full relative precision.
//! 3. **Truncation.** The N×N section `H_N` of Ô is Hermitian positive definite; its
//!    eigenvalues bound those of Ô from above and decrease as N grows (Rayleigh–Ritz). The
//!    working precision for it is chosen from a bound on its condition number: entries are
//!    bounded by `w e^{ρ²/2 + 2ρ√N}` (since `L_n(−x) ≤ e^{2√(nx)}`), eigenvalues exceed the
//!    classical minimum.
//!
//! The ψ(r) of an eigenvector is `Σ_n v_n ⟨r|n⟩`, with the frame's oscillator functions from the
//! stable three-term recurrence
//! `ψ_{n+1} = [(κ̄₁ − κ̄₂κ₁/κ₂)(r − r*) ψ_n + (κ̄₂/κ₂)√n ψ_{n−1}] / √(n+1)`,
//! where `â = κ₁(r̂ − r*) + κ₂(p̂ − p*)` (for the plain frame this is the Hermite-function
//! recurrence; `|κ̄₂/κ₂| = 1` keeps it as stable), started from the Gaussian ⟨r|0⟩ and rescaled
//! on the fly so that it neither overflows nor underflows.
//!
//! # Accuracy
//! Matrix elements: every entry to the full relative precision of the working precision (sums
//! of positive terms, times phases). The frame itself (minimum, S, rotation) is computed in f64;
//! any frame is exact in the sense that it is a unitary change of basis, made exactly
//! symplectic at the working precision. Oscillator functions: f64, orthonormal to 1e-10
//! in the tests for a rotated, squeezed frame.
//!
//! # References
//! Harmonic-oscillator bases for these operators: "Topological strings from quantum mechanics",
//! Annales Henri Poincaré 17 (2016), arXiv:1410.3382; "Spectral theory and mirror curves of
//! higher genus", Annales Henri Poincaré 18 (2017), arXiv:1506.09176.

use crate::curve::laurent::Laurent;
use crate::numerics::hermitian::HermitianMatrix;
use crate::operator::spectrum::HBAR;
use crate::precision::spectrum_bits;
use num_complex::Complex64;
use rug::float::Constant;
use rug::ops::CompleteRound;
use rug::{Assign, Float};

/// The unitary frame of the oscillator basis.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Frame {
    /// The classical minimum (r*, p*).
    pub centre: [f64; 2],
    /// The classical minimum value: the spectral threshold.
    pub threshold: f64,
    /// The symplectic matrix S (det 1), rows.
    pub symplectic: [[f64; 2]; 2],
    /// Squeeze s.
    pub squeeze: f64,
    /// A det −1 symmetry g of φ (`c_{gm} = c_m`), if one exists: the frame is then rotated so
    /// that g acts as (r', p') ↦ (r', −p'), complex conjugation commutes with Ô, and the matrix
    /// is real symmetric (four times cheaper than complex Hermitian).
    pub mirror: Option<[[i64; 2]; 2]>,
}

/// One exponential term `c_m e^{m·z*} e^{u â† + ū â}` of Ô in the oscillator frame (item 2 of
/// the module doc): weight `c_m e^{m·z*}`, `u = ρ e^{iθ}`.
#[derive(Debug, Clone)]
pub(crate) struct OscTerm {
    weight: Float,
    /// ρ of either sign, so that θ ∈ (−π/2, π/2].
    rho: Float,
    theta: Float,
}

/// The frame for φ: classical minimum and Hessian rounding.
pub fn frame(laurent: &Laurent, squeeze: f64) -> Frame {
    let (centre, threshold) = laurent.classical_minimum();
    let (_, _, h) = laurent.hamiltonian(centre);
    // H^{-1/2} for a 2×2 symmetric positive matrix: eigen-decomposition.
    let (a, b, c) = (h[0][0], h[0][1], h[1][1]);
    let half_tr = 0.5 * (a + c);
    let disc = (0.25 * (a - c) * (a - c) + b * b).sqrt();
    let (l1, l2) = (half_tr + disc, half_tr - disc);
    let angle = 0.5 * (2.0 * b).atan2(a - c);
    let (cs, sn) = (angle.cos(), angle.sin());
    let (f1, f2) = (l1.powf(-0.5), l2.powf(-0.5));
    let scale = (l1 * l2).powf(0.25);
    let symplectic = [
        [
            scale * (cs * cs * f1 + sn * sn * f2),
            scale * cs * sn * (f1 - f2),
        ],
        [
            scale * cs * sn * (f1 - f2),
            scale * (sn * sn * f1 + cs * cs * f2),
        ],
    ];
    let mut frame = Frame {
        centre,
        threshold,
        symplectic,
        squeeze,
        mirror: None,
    };
    if let Some(g) = mirror_symmetry(laurent) {
        // z ↦ gᵀz preserves H, so in the rounded frame it is M = S⁻¹gᵀS, orthogonal with
        // det −1: the reflection across the line at angle φ, 2φ = atan2(M₁₀, M₀₀). Rotating by
        // φ makes it (r', p') ↦ (r', −p').
        let s = frame.symplectic;
        let inv = [[s[1][1], -s[0][1]], [-s[1][0], s[0][0]]];
        let gt = [
            [g[0][0] as f64, g[1][0] as f64],
            [g[0][1] as f64, g[1][1] as f64],
        ];
        let m = mat_mul(&mat_mul(&inv, &gt), &s);
        let phi = 0.5 * m[1][0].atan2(m[0][0]);
        let rot = [[phi.cos(), -phi.sin()], [phi.sin(), phi.cos()]];
        frame.symplectic = mat_mul(&s, &rot);
        frame.mirror = Some(g);
    }
    frame
}

fn mat_mul(a: &[[f64; 2]; 2], b: &[[f64; 2]; 2]) -> [[f64; 2]; 2] {
    let mut c = [[0.0; 2]; 2];
    for i in 0..2 {
        for j in 0..2 {
            c[i][j] = a[i][0] * b[0][j] + a[i][1] * b[1][j];
        }
    }
    c
}

/// A g ∈ GL₂(Z) with det g = −1 that maps the terms of φ to themselves, coefficients included.
/// Automorphisms of a polygon map vertices to vertices, so entries are bounded by the largest
/// coordinate; the search covers |g_ij| ≤ 4, enough for every reflexive polygon.
pub fn mirror_symmetry(laurent: &Laurent) -> Option<[[i64; 2]; 2]> {
    let terms = laurent.terms();
    let r = -4..=4i64;
    for a in r.clone() {
        for b in r.clone() {
            for c in r.clone() {
                for d in r.clone() {
                    if a * d - b * c != -1 {
                        continue;
                    }
                    let ok = terms.iter().all(|&([m1, m2], cm)| {
                        let gm = [a * m1 + b * m2, c * m1 + d * m2];
                        terms.iter().any(|&(q, cq)| q == gm && cq == cm)
                    });
                    if ok {
                        return Some([[a, b], [c, d]]);
                    }
                }
            }
        }
    }
    None
}

impl Frame {
    /// S at `prec` bits, rescaled so that det S = 1 at that precision.
    fn symplectic_mp(&self, prec: u32) -> [[Float; 2]; 2] {
        let s = self
            .symplectic
            .map(|row| row.map(|x| Float::with_val(prec, x)));
        let det = Float::with_val(prec, &s[0][0] * &s[1][1] - &s[0][1] * &s[1][0]);
        let k = det.sqrt().recip();
        s.map(|row| row.map(|x| x * &k))
    }

    /// The terms of φ in this frame at `prec` bits: `(α, β) = Sᵀm`,
    /// `u = √(ħ/2)(α s + iβ/s) = ρ e^{iθ}`, weight `c_m e^{m·z*}` (item 2 of the module doc).
    /// With a mirror symmetry the pairs `m ↔ gm` are made exactly `β ↔ −β`.
    pub(crate) fn terms(&self, laurent: &Laurent, prec: u32) -> Vec<OscTerm> {
        let s = self.symplectic_mp(prec);
        let root_half_hbar = Float::with_val(prec, Constant::Pi).sqrt();
        let sq = Float::with_val(prec, self.squeeze);
        let terms = laurent.terms();
        let mut raw: Vec<(Float, Float, Float)> = terms
            .iter()
            .map(|&([m1, m2], c)| {
                let shift = Float::with_val(prec, m1) * self.centre[0]
                    + Float::with_val(prec, m2) * self.centre[1];
                let weight = shift.exp() * c;
                let alpha =
                    Float::with_val(prec, &s[0][0] * m1) + Float::with_val(prec, &s[1][0] * m2);
                let beta =
                    Float::with_val(prec, &s[0][1] * m1) + Float::with_val(prec, &s[1][1] * m2);
                (weight, alpha, beta)
            })
            .collect();
        if let Some(g) = self.mirror {
            // Make the mirror pairs exact: (α, β) of gm is (α, −β) of m up to rounding of the
            // frame; setting it exactly changes Ô by a unitary at the working precision.
            for i in 0..terms.len() {
                let [m1, m2] = terms[i].0;
                let gm = [g[0][0] * m1 + g[0][1] * m2, g[1][0] * m1 + g[1][1] * m2];
                let j = terms
                    .iter()
                    .position(|t| t.0 == gm)
                    .expect("mirror maps terms to terms");
                if j == i {
                    raw[i].2 = Float::new(prec);
                } else if j > i {
                    let (w, a, b) = raw[i].clone();
                    raw[j] = (w, a, -b);
                }
            }
        }
        raw.into_iter()
            .map(|(weight, alpha, beta)| {
                let re = Float::with_val(prec, &alpha * &sq) * &root_half_hbar;
                let im = Float::with_val(prec, &beta / &sq) * &root_half_hbar;
                // u = ρ e^{iθ} with θ ∈ (−π/2, π/2] and ρ of either sign, so that real exponents
                // have θ = 0 exactly and mirror pairs β ↦ −β have exactly opposite θ: their
                // imaginary parts then cancel exactly and the matrix is detected as real.
                let mut rho = Float::with_val(prec, re.hypot_ref(&im));
                let theta = if re.is_zero() {
                    Float::with_val(prec, Constant::Pi) / 2u32 * im.signum_ref().complete(prec)
                } else {
                    Float::with_val(prec, &im / &re).atan()
                };
                if re < 0 {
                    rho = -rho;
                }
                OscTerm { weight, rho, theta }
            })
            .collect()
    }

    /// `(κ₁, κ₂)` with `â = κ₁(r̂ − r*) + κ₂(p̂ − p*)`.
    fn annihilator(&self) -> (Complex64, Complex64) {
        let s = self.symplectic;
        let det = s[0][0] * s[1][1] - s[0][1] * s[1][0];
        // S⁻¹ rows.
        let inv = [
            [s[1][1] / det, -s[0][1] / det],
            [-s[1][0] / det, s[0][0] / det],
        ];
        let q = self.squeeze;
        let norm = (2.0 * HBAR).sqrt();
        let k1 = Complex64::new(inv[0][0] / q, q * inv[1][0]) / norm;
        let k2 = Complex64::new(inv[0][1] / q, q * inv[1][1]) / norm;
        (k1, k2)
    }

    /// The oscillator functions `⟨r|n⟩`, n < count, of this frame at a real r.
    pub fn oscillator_functions(&self, r: f64, count: usize) -> Vec<Complex64> {
        let (k1, k2) = self.annihilator();
        let i = Complex64::new(0.0, 1.0);
        let x = r - self.centre[0];
        let quad = k1 / (i * HBAR * k2);
        let gamma = -quad.re;
        let log0 = 0.25 * (gamma / std::f64::consts::PI).ln()
            + 0.5 * quad * x * x
            + i * self.centre[1] * x / HBAR;
        let up = k1.conj() - k2.conj() * k1 / k2;
        let back = k2.conj() / k2;
        // Scaled recurrence: values = stored · e^{scale}.
        let mut scale = log0.re;
        let mut prev = Complex64::new(0.0, 0.0);
        let mut cur = Complex64::from_polar(1.0, log0.im);
        let mut out = Vec::with_capacity(count);
        for n in 0..count {
            out.push(cur * scale.exp());
            let next = (up * x * cur + back * (n as f64).sqrt() * prev) / ((n + 1) as f64).sqrt();
            prev = cur;
            cur = next;
            let m = cur.norm().max(prev.norm());
            if m > 1e100 || (m < 1e-100 && m > 0.0) {
                scale += m.ln();
                cur /= m;
                prev /= m;
            }
        }
        out
    }
}

/// Working precision for a basis of size n: covers log₂ of the condition number (entries are
/// bounded by `w e^{ρ²/2 + 2|ρ|√n}` since `L_n(−x) ≤ e^{2√(nx)}` with x = ρ², eigenvalues
/// exceed the threshold), the wanted digits, and the guard bits. ρ is stored with a sign (so
/// that θ ∈ (−π/2, π/2]); the bound needs its modulus — with the signed value it fell short by
/// up to ~200 bits for the families with ρ < 0 terms (T6 at N = 675), and T6 at 20 digits lost
/// positive definiteness at N = 1013.
pub(crate) fn working_bits(terms: &[OscTerm], n: usize, threshold: f64, digits: u32) -> u32 {
    let ln_max = terms
        .iter()
        .map(|t| {
            let rho = t.rho.to_f64().abs();
            t.weight.to_f64().ln() + 0.5 * rho * rho + 2.0 * rho * (n as f64).sqrt()
        })
        .fold(f64::MIN, f64::max);
    let cond_bits = (ln_max + (n as f64).ln() - threshold.ln()) / std::f64::consts::LN_2;
    spectrum_bits(cond_bits, digits)
}

/// The N×N section of Ô in the frame's oscillator basis at `prec` bits: `Σ_terms w e^{iθ(j−k)}
/// P_{jk}(ρ)` by the recurrence of item 2 of the module doc, lower triangle only (the layout of
/// [`HermitianMatrix`]); real (`im` empty) when the imaginary parts cancel exactly. With `real`
/// (the frame has a mirror symmetry, so the imaginary parts cancel identically in pairs) only
/// the real part is formed.
pub(crate) fn assemble(terms: &[OscTerm], n: usize, prec: u32, real: bool) -> HermitianMatrix {
    let zero = Float::new(prec);
    let mut re = vec![zero.clone(); n * n];
    let mut im = vec![zero.clone(); n * n];
    let sqrt: Vec<Float> = (0..=n).map(|k| Float::with_val(prec, k).sqrt()).collect();
    let mut any_imag = false;
    for t in terms {
        // w·cos(dθ), w·sin(dθ) for d = 0..n.
        let mut wc = Vec::with_capacity(n);
        let mut ws = Vec::with_capacity(n);
        for d in 0..n {
            let angle = Float::with_val(prec, &t.theta * d as u32);
            let (s, c) = angle.sin_cos(Float::new(prec));
            wc.push(c * &t.weight);
            ws.push(s * &t.weight);
        }
        // Row 0 of P: e^{ρ²/2} ρᵏ/√(k!).
        let mut row: Vec<Float> = Vec::with_capacity(n);
        let mut v = Float::with_val(prec, t.rho.square_ref()) / 2u32;
        v.exp_mut();
        for k in 0..n {
            if k > 0 {
                v *= &t.rho;
                v /= &sqrt[k];
            }
            row.push(v.clone());
        }
        let mut next = vec![zero.clone(); n];
        let mut scratch = zero.clone();
        for j in 0..n {
            // Row j holds P_{jk} for k ≥ j; store into the lower triangle at (k, j).
            for k in j..n {
                let d = k - j;
                let idx = k * n + j;
                // Products rounded before the sum (no fused multiply-add), so that the terms
                // of a mirror pair cancel exactly. ⟨k|·|j⟩ carries e^{iθ(k−j)}.
                scratch.assign(&row[k] * &wc[d]);
                re[idx] += &scratch;
                if !real {
                    scratch.assign(&row[k] * &ws[d]);
                    im[idx] += &scratch;
                }
            }
            if j + 1 == n {
                break;
            }
            for k in (j + 1)..n {
                let mut e = Float::with_val(prec, &sqrt[k] * &row[k - 1]);
                e += &t.rho * &row[k];
                e /= &sqrt[j + 1];
                next[k] = e;
            }
            std::mem::swap(&mut row, &mut next);
        }
        any_imag |= !t.theta.is_zero();
    }
    // Real symmetric when the imaginary parts cancel exactly (mirror-symmetric frames).
    if real || !any_imag || im.iter().all(|x| x.is_zero()) {
        im.clear();
    }
    HermitianMatrix { n, re, im }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn oscillator_functions_are_orthonormal_in_a_rotated_squeezed_frame() {
        // ∫ conj(ψ_m) ψ_n dr = δ_mn for the metaplectic image of the Hermite functions
        // (common practice: trapezoidal rule is spectrally accurate for Gaussian-decaying
        // analytic integrands).
        let frame = Frame {
            centre: [0.3, -0.2],
            threshold: 1.0,
            symplectic: [[1.3, 0.4], [0.4, (1.0 + 0.16) / 1.3]],
            squeeze: 0.8,
            mirror: None,
        };
        let (a, b, h) = (-40.0, 40.0, 0.02);
        let count = 12;
        let mut gram = vec![Complex64::new(0.0, 0.0); count * count];
        let mut r = a;
        while r <= b {
            let f = frame.oscillator_functions(r, count);
            for m in 0..count {
                for n in 0..count {
                    gram[m * count + n] += f[m].conj() * f[n] * h;
                }
            }
            r += h;
        }
        for m in 0..count {
            for n in 0..count {
                let want = if m == n { 1.0 } else { 0.0 };
                assert!(
                    (gram[m * count + n] - want).norm() < 1e-10,
                    "({m},{n}) {}",
                    gram[m * count + n]
                );
            }
        }
    }
}
