//! Independent spectrum of the quantum curve: Rayleigh–Ritz in a harmonic-oscillator basis,
//! in multiprecision.
//!
//! # Method
//! 1. **Frame.** Translate to the classical minimum z* = (r*, p*) of `H(r, p) = φ(e^r, e^p)` and
//!    round its Hessian 𝐇 there with the symplectic `S = (det 𝐇)^{1/4} 𝐇^{−1/2}` (so
//!    `Sᵀ𝐇S = √det 𝐇 · 1`). Both are unitary changes of frame (translation, metaplectic), so
//!    they do not change the spectrum; they only make the basis fit the operator. In the new
//!    frame `(r, p) = z* + S(r', p')` each term becomes
//!    `c_m e^{m·(r,p)} = c_m e^{m·z*} e^{α r' + β p'}` with `(α, β) = Sᵀm`.
//! 2. **Basis.** With squeeze s, `r̂' = s√(ħ/2)(â + â†)`, `p̂' = −i s⁻¹√(ħ/2)(â − â†)`, so
//!    `α r̂' + β p̂' = u â† + ū â`, `u = √(ħ/2)(α s + iβ/s) = ρ e^{iθ}`, and
//!    `⟨j| e^{u â† + ū â} |k⟩ = e^{iθ(j−k)} P_{jk}(ρ)` where `P(ρ) = e^{ρ(â+â†)}` has positive
//!    entries given by the exact recurrence (from `â e^{X} = e^{X}(â + ρ)`)
//!    `P_{0k} = e^{ρ²/2} ρᵏ/√(k!)`, `P_{j+1,k} = (√k P_{j,k−1} + ρ P_{jk}) / √(j+1)`:
//!    all terms positive, so every entry is computed to full relative precision.
//! 3. **Truncation.** The N×N section `H_N` of Ô is Hermitian positive definite; its
//!    eigenvalues bound those of Ô from above and decrease as N grows (Rayleigh–Ritz).
//! 4. **Lowest eigenpairs.** Cholesky `H_N = L Lᴴ` at a working precision that covers the
//!    condition number (bits ≥ log₂(N·max|entry| / threshold) + result bits + guard), then
//!    block inverse iteration on `K = L⁻¹L⁻ᴴ` (similar to `H_N⁻¹`) with Rayleigh–Ritz, the small
//!    projected problem solved by cyclic Jacobi in the same precision.
//! 5. **Convergence.** The solve is repeated at 3N/2; the difference is the error estimate of
//!    each level, and the 3N/2 value is reported.
//!
//! The ψ(r) of a level is `Σ_n v_n ⟨r|n⟩`, the frame's oscillator functions from the stable
//! three-term recurrence `ψ_{n+1} = [(κ̄₁ − κ̄₂κ₁/κ₂)(r − r*) ψ_n + (κ̄₂/κ₂)√n ψ_{n−1}] / √(n+1)`,
//! where `â = κ₁(r̂ − r*) + κ₂(p̂ − p*)` (for the plain frame this is the Hermite-function
//! recurrence; `|κ̄₂/κ₂| = 1` keeps it as stable).
//!
//! # Accuracy
//! Limited by the basis (truncation), not by arithmetic: the working precision is chosen so that
//! rounding is far below the truncation error. Measured: see the tests and the bench example.
//! The result is numerical evidence with an error *estimate*, not a bound.
//!
//! # Errors
//! [`SpectrumError`]: empty level range, basis too small for the levels, loss of positive
//! definiteness (working precision too low), no convergence.
//!
//! # References
//! Harmonic-oscillator bases for these operators: "Topological strings from quantum mechanics",
//! Annales Henri Poincaré 17 (2016), arXiv:1410.3382; "Spectral theory and mirror curves of
//! higher genus", Annales Henri Poincaré 18 (2017), arXiv:1506.09176. Cholesky and subspace
//! iteration: "Matrix Computations", 4th ed. (2013), §4.2 and §8.2.

use crate::curve::laurent::Laurent;
use crate::precision::{bits_for_digits, with_guard};
use num_complex::Complex64;
use rayon::prelude::*;
use rug::float::Constant;
use rug::ops::CompleteRound;
use rug::{Assign, Float};
use std::ops::RangeInclusive;
use thiserror::Error;

/// ħ in the spectral problem.
pub const HBAR: f64 = 2.0 * std::f64::consts::PI;

/// Why the spectrum could not be computed.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum SpectrumError {
    #[error("the level range is empty")]
    EmptyLevels,
    #[error("basis size {basis} is too small for level {level}: use at least {needed}")]
    BasisTooSmall {
        basis: usize,
        level: usize,
        needed: usize,
    },
    #[error("the truncated operator lost positive definiteness at pivot {pivot} with {bits} bits: working precision too low")]
    PrecisionTooLow { pivot: usize, bits: u32 },
    #[error("inverse iteration did not converge in {iterations} iterations (last relative change {change:e})")]
    NoConvergence { iterations: usize, change: f64 },
}

/// Options of [`solve`].
#[derive(Debug, Clone)]
pub struct SpectrumOptions {
    /// Levels wanted (0 = ground state).
    pub levels: RangeInclusive<usize>,
    /// First basis size N. Each further solve uses ⌈3N/2⌉ of the previous one.
    pub basis: usize,
    /// Largest basis the adaptive loop may use; the loop stops earlier once the estimated
    /// relative error of every level is below `10^-digits`. At least two bases are solved.
    pub max_basis: usize,
    /// Decimal digits wanted.
    pub digits: u32,
    /// Squeeze s of the oscillator basis in the rounded frame.
    pub squeeze: f64,
}

impl Default for SpectrumOptions {
    fn default() -> Self {
        SpectrumOptions {
            levels: 0..=0,
            basis: 200,
            max_basis: 450,
            digits: 20,
            squeeze: 1.0,
        }
    }
}

/// The next basis size of the convergence ladder, ⌈3N/2⌉.
pub fn next_basis(n: usize) -> usize {
    (3 * n).div_ceil(2)
}

/// The unitary frame of the oscillator basis.
#[derive(Debug, Clone)]
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

/// One level of the truncated problem.
#[derive(Debug, Clone)]
pub struct Level {
    pub level: usize,
    /// The eigenvalue a_n (at the largest basis solved).
    pub value: Float,
    /// |a_n(N) − a_n(3N/2)| for the last two bases solved.
    pub error_estimate: f64,
    /// Eigenvector coefficients in the frame's oscillator basis (unit norm).
    pub eigenvector: Vec<Complex64>,
}

/// The result of [`solve`].
#[derive(Debug, Clone)]
pub struct Spectrum {
    pub frame: Frame,
    /// Basis sizes solved, in order.
    pub bases: Vec<usize>,
    /// Working precision of the largest solve.
    pub working_bits: u32,
    /// Whether the truncated matrix was real symmetric (a symmetry of the frame).
    pub real_matrix: bool,
    /// Inverse-iteration steps of the largest solve.
    pub iterations: usize,
    pub levels: Vec<Level>,
}

/// One exponential term in the oscillator frame: weight `c_m e^{m·z*}`, `u = ρ e^{iθ}`.
#[derive(Debug, Clone)]
struct OscTerm {
    weight: Float,
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

    fn terms(&self, laurent: &Laurent, prec: u32) -> Vec<OscTerm> {
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

/// A Hermitian matrix in row-major order at one precision; `im` empty when real.
struct HermitianMatrix {
    n: usize,
    re: Vec<Float>,
    im: Vec<Float>,
}

impl HermitianMatrix {
    fn is_real(&self) -> bool {
        self.im.is_empty()
    }
}

/// Working precision for a basis of size n: covers log₂ of the condition number (entries are
/// bounded by `w e^{ρ²/2 + 2ρ√n}` since `L_n(−x) ≤ e^{2√(nx)}`, eigenvalues exceed the
/// threshold), the wanted digits, and the guard bits.
fn working_bits(terms: &[OscTerm], n: usize, threshold: f64, digits: u32) -> u32 {
    let ln_max = terms
        .iter()
        .map(|t| {
            let rho = t.rho.to_f64();
            t.weight.to_f64().ln() + 0.5 * rho * rho + 2.0 * rho * (n as f64).sqrt()
        })
        .fold(f64::MIN, f64::max);
    let cond_bits = (ln_max + (n as f64).ln() - threshold.ln()) / std::f64::consts::LN_2;
    with_guard(cond_bits.max(0.0).ceil() as u32 + bits_for_digits(digits as f64))
}

/// The N×N section of Ô in the frame's oscillator basis. With `real` (the frame has a mirror
/// symmetry, so the imaginary parts cancel identically in pairs) only the real part is formed.
fn assemble(terms: &[OscTerm], n: usize, prec: u32, real: bool) -> HermitianMatrix {
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

/// In-place Cholesky: the lower triangle becomes L with `H = L Lᴴ`, L_ii real positive.
/// The rows below each pivot are updated in parallel (they are independent).
fn cholesky(h: &mut HermitianMatrix, prec: u32) -> Result<(), SpectrumError> {
    let n = h.n;
    let real = h.is_real();
    for j in 0..n {
        let mut pivot = h.re[j * n + j].clone();
        for k in 0..j {
            pivot -= &h.re[j * n + k] * &h.re[j * n + k];
            if !real {
                pivot -= &h.im[j * n + k] * &h.im[j * n + k];
            }
        }
        if pivot <= 0 {
            return Err(SpectrumError::PrecisionTooLow {
                pivot: j,
                bits: prec,
            });
        }
        pivot.sqrt_mut();
        let inv = Float::with_val(prec, pivot.recip_ref());
        h.re[j * n + j] = pivot;
        let (upper_re, lower_re) = h.re.split_at_mut((j + 1) * n);
        let row_j_re = &upper_re[j * n..j * n + j];
        if real {
            lower_re.par_chunks_mut(n).with_min_len(4).for_each(|row| {
                let mut acc = row[j].clone();
                for (a, c) in row[..j].iter().zip(row_j_re) {
                    acc -= a * c;
                }
                acc *= &inv;
                row[j] = acc;
            });
        } else {
            h.im[j * n + j] = Float::new(prec);
            let (upper_im, lower_im) = h.im.split_at_mut((j + 1) * n);
            let row_j_im = &upper_im[j * n..j * n + j];
            lower_re
                .par_chunks_mut(n)
                .zip(lower_im.par_chunks_mut(n))
                .with_min_len(4)
                .for_each(|(rr, ri)| {
                    let mut acc_re = rr[j].clone();
                    let mut acc_im = ri[j].clone();
                    for k in 0..j {
                        // L_ik · conj(L_jk) = (a + ib)(c − id) = (ac + bd) + i(bc − ad).
                        let (a, b) = (&rr[k], &ri[k]);
                        let (c, d) = (&row_j_re[k], &row_j_im[k]);
                        acc_re -= a * c;
                        acc_re -= b * d;
                        acc_im -= b * c;
                        acc_im += a * d;
                    }
                    acc_re *= &inv;
                    acc_im *= &inv;
                    rr[j] = acc_re;
                    ri[j] = acc_im;
                });
        }
    }
    Ok(())
}

trait AssignFrom {
    fn assign_from(&mut self, other: &Float);
}

impl AssignFrom for Float {
    fn assign_from(&mut self, other: &Float) {
        self.assign(other);
    }
}

/// A block of complex vectors, each stored as (re, im) columns of length n.
#[derive(Clone)]
struct Block {
    re: Vec<Vec<Float>>,
    im: Vec<Vec<Float>>,
}

impl Block {
    fn len(&self) -> usize {
        self.re.len()
    }
}

/// Solves `L y = b` in place (forward substitution), L lower from [`cholesky`].
fn solve_lower(l: &HermitianMatrix, re: &mut [Float], im: &mut [Float], prec: u32) {
    let n = l.n;
    let real = l.is_real();
    let mut ar = Float::new(prec);
    let mut ai = Float::new(prec);
    for i in 0..n {
        let ri = i * n;
        ar.assign_from(&re[i]);
        ai.assign_from(&im[i]);
        for k in 0..i {
            let (c, d) = (&l.re[ri + k], &re[k]);
            ar -= c * d;
            ai -= c * &im[k];
            if !real {
                let b = &l.im[ri + k];
                // (c + ib)(yr + i yi) = (c yr − b yi) + i(c yi + b yr)
                ar += b * &im[k];
                ai -= b * d;
            }
        }
        ar /= &l.re[ri + i];
        ai /= &l.re[ri + i];
        re[i].assign_from(&ar);
        im[i].assign_from(&ai);
    }
}

/// Solves `Lᴴ x = y` in place (backward substitution, column-oriented over the rows of L).
fn solve_upper(l: &HermitianMatrix, re: &mut [Float], im: &mut [Float]) {
    let n = l.n;
    let real = l.is_real();
    for i in (0..n).rev() {
        let ri = i * n;
        re[i] /= &l.re[ri + i];
        im[i] /= &l.re[ri + i];
        let (xr, xi) = (re[i].clone(), im[i].clone());
        for k in 0..i {
            // y_k −= conj(L_ik) x_i,  conj(c + ib)(xr + i xi) = (c xr + b xi) + i(c xi − b xr)
            let c = &l.re[ri + k];
            re[k] -= c * &xr;
            im[k] -= c * &xi;
            if !real {
                let b = &l.im[ri + k];
                re[k] -= b * &xi;
                im[k] += b * &xr;
            }
        }
    }
}

/// Modified Gram–Schmidt, twice (reorthogonalization), on the columns of a block.
fn orthonormalize(block: &mut Block, prec: u32) {
    let b = block.len();
    for _pass in 0..2 {
        for q in 0..b {
            for p in 0..q {
                // coefficient ⟨v_p, v_q⟩ = Σ conj(v_p) v_q
                let (cr, ci) = inner(&block.re[p], &block.im[p], &block.re[q], &block.im[q], prec);
                let (pr, pi) = (block.re[p].clone(), block.im[p].clone());
                for i in 0..pr.len() {
                    // v_q −= (cr + i ci)(pr + i pi)
                    block.re[q][i] -= &cr * &pr[i];
                    block.re[q][i] += &ci * &pi[i];
                    block.im[q][i] -= &cr * &pi[i];
                    block.im[q][i] -= &ci * &pr[i];
                }
            }
            let (nr, _) = inner(&block.re[q], &block.im[q], &block.re[q], &block.im[q], prec);
            let inv = nr.sqrt().recip();
            for x in block.re[q].iter_mut().chain(block.im[q].iter_mut()) {
                *x *= &inv;
            }
        }
    }
}

/// `Σ conj(a) b`.
fn inner(ar: &[Float], ai: &[Float], br: &[Float], bi: &[Float], prec: u32) -> (Float, Float) {
    let mut re = Float::new(prec);
    let mut im = Float::new(prec);
    for i in 0..ar.len() {
        re += &ar[i] * &br[i];
        re += &ai[i] * &bi[i];
        im += &ar[i] * &bi[i];
        im -= &ai[i] * &br[i];
    }
    (re, im)
}

/// Eigenpairs of the b×b Hermitian matrix T (re, im row-major), largest eigenvalue first, by
/// the cyclic complex Jacobi method at `prec` bits: each rotation first removes the phase of
/// T_pq with a diagonal unitary, then applies the real rotation that zeroes it ("Matrix
/// Computations", 4th ed., §8.5). Rotations are skipped when |T_pq| is below the working
/// precision relative to the diagonal. A real T costs no complex arithmetic.
fn hermitian_eigen(
    tr: &[Float],
    ti: &[Float],
    b: usize,
    prec: u32,
) -> Vec<(Float, Vec<Float>, Vec<Float>)> {
    let mut ar = tr.to_vec();
    let mut ai = ti.to_vec();
    let real = ai.iter().all(|x| x.is_zero());
    let mut vr: Vec<Float> = (0..b * b)
        .map(|i| Float::with_val(prec, (i / b == i % b) as u32))
        .collect();
    let mut vi: Vec<Float> = vec![Float::new(prec); b * b];
    let eps = Float::with_val(prec, Float::i_exp(1, 8 - prec as i32));
    let mut f = [
        Float::new(prec),
        Float::new(prec),
        Float::new(prec),
        Float::new(prec),
        Float::new(prec),
    ];
    let (mut x, mut y, mut modulus, mut bound) = (
        Float::new(prec),
        Float::new(prec),
        Float::new(prec),
        Float::new(prec),
    );
    // (u_i, u_j) ← (c u_i − s u_j, s u_i + c u_j) for real c, s.
    fn rotate(
        m: &mut [Float],
        i: usize,
        j: usize,
        c: &Float,
        s: &Float,
        x: &mut Float,
        y: &mut Float,
    ) {
        x.assign(c * &m[i]);
        *x -= s * &m[j];
        y.assign(s * &m[i]);
        *y += c * &m[j];
        std::mem::swap(&mut m[i], x);
        std::mem::swap(&mut m[j], y);
    }
    // (re, im) of entry k ← (re, im) · (cr + i ci).
    fn phase(
        re: &mut [Float],
        im: &mut [Float],
        k: usize,
        cr: &Float,
        ci: &Float,
        x: &mut Float,
        y: &mut Float,
    ) {
        x.assign(&re[k] * cr);
        *x -= &im[k] * ci;
        y.assign(&re[k] * ci);
        *y += &im[k] * cr;
        std::mem::swap(&mut re[k], x);
        std::mem::swap(&mut im[k], y);
    }
    for _sweep in 0..60 {
        let mut rotated = false;
        for p in 0..b {
            for q in (p + 1)..b {
                let (pq, pp, qq) = (p * b + q, p * b + p, q * b + q);
                modulus.assign(ar[pq].hypot_ref(&ai[pq]));
                bound.assign(ar[pp].abs_ref());
                bound = bound.max(&Float::with_val(prec, ar[qq].abs_ref()));
                bound *= &eps;
                if modulus <= bound {
                    continue;
                }
                rotated = true;
                if !real && !ai[pq].is_zero() {
                    // e^{iφ} = T_pq/|T_pq|: column q times e^{−iφ}, row q times e^{iφ}.
                    let cr = Float::with_val(prec, &ar[pq] / &modulus);
                    let ci = Float::with_val(prec, &ai[pq] / &modulus);
                    let mci = Float::with_val(prec, -&ci);
                    for k in 0..b {
                        phase(&mut ar, &mut ai, k * b + q, &cr, &mci, &mut x, &mut y);
                        phase(&mut vr, &mut vi, k * b + q, &cr, &mci, &mut x, &mut y);
                    }
                    for k in 0..b {
                        phase(&mut ar, &mut ai, q * b + k, &cr, &ci, &mut x, &mut y);
                    }
                    ar[pq].assign(&modulus);
                    ar[q * b + p].assign(&modulus);
                    ai[pq] = Float::new(prec);
                    ai[q * b + p] = Float::new(prec);
                    ai[qq] = Float::new(prec);
                }
                let [tau, root, t, c, s] = &mut f;
                tau.assign(&ar[qq] - &ar[pp]);
                // T_pq is real now (signed when T was real).
                x.assign(&ar[pq] * 2u32);
                *tau /= &x;
                root.assign(tau.square_ref());
                *root += 1u32;
                root.sqrt_mut();
                if *tau >= 0 {
                    t.assign(&*tau + &*root);
                } else {
                    t.assign(&*tau - &*root);
                }
                t.recip_mut();
                c.assign(t.square_ref());
                *c += 1u32;
                c.sqrt_mut();
                c.recip_mut();
                s.assign(&*t * &*c);
                for k in 0..b {
                    rotate(&mut ar, k * b + p, k * b + q, c, s, &mut x, &mut y);
                    rotate(&mut vr, k * b + p, k * b + q, c, s, &mut x, &mut y);
                    if !real {
                        rotate(&mut ai, k * b + p, k * b + q, c, s, &mut x, &mut y);
                        rotate(&mut vi, k * b + p, k * b + q, c, s, &mut x, &mut y);
                    }
                }
                for k in 0..b {
                    rotate(&mut ar, p * b + k, q * b + k, c, s, &mut x, &mut y);
                    if !real {
                        rotate(&mut ai, p * b + k, q * b + k, c, s, &mut x, &mut y);
                    }
                }
            }
        }
        if !rotated {
            break;
        }
    }
    let mut order: Vec<usize> = (0..b).collect();
    order.sort_by(|&i, &j| {
        ar[j * b + j]
            .partial_cmp(&ar[i * b + i])
            .unwrap_or(std::cmp::Ordering::Equal)
    });
    order
        .into_iter()
        .map(|c| {
            let col_r = (0..b).map(|i| vr[i * b + c].clone()).collect();
            let col_i = (0..b).map(|i| vi[i * b + c].clone()).collect();
            (ar[c * b + c].clone(), col_r, col_i)
        })
        .collect()
}

/// The lowest `count` eigenpairs of `H = L Lᴴ` by block inverse iteration.
struct Eigenpairs {
    values: Vec<Float>,
    vectors: Block,
    iterations: usize,
}

fn lowest_eigenpairs(
    l: &HermitianMatrix,
    count: usize,
    digits: u32,
    prec: u32,
    seed: Option<&Block>,
) -> Result<Eigenpairs, SpectrumError> {
    let n = l.n;
    let b = (count + count / 2 + 4).min(n);
    let zero = Float::new(prec);
    // X: the seed (eigenvectors of a smaller basis, padded) or the lowest oscillator states;
    // Z = Lᴴ X, i.e. z_i = Σ_{k ≥ i} conj(L_ki) x_k.
    let x: Vec<(Vec<Float>, Vec<Float>)> = (0..b)
        .map(|c| {
            let mut xr = vec![zero.clone(); n];
            let mut xi = vec![zero.clone(); n];
            match seed {
                Some(s) if c < s.len() => {
                    for (i, v) in s.re[c].iter().enumerate().take(n) {
                        xr[i] = Float::with_val(prec, v);
                        xi[i] = Float::with_val(prec, &s.im[c][i]);
                    }
                }
                _ => xr[c] = Float::with_val(prec, 1),
            }
            (xr, xi)
        })
        .collect();
    let columns: Vec<(Vec<Float>, Vec<Float>)> = x
        .par_iter()
        .map(|(xr, xi)| {
            let mut zr = vec![zero.clone(); n];
            let mut zi = vec![zero.clone(); n];
            for k in 0..n {
                if xr[k].is_zero() && xi[k].is_zero() {
                    continue;
                }
                for i in 0..=k {
                    // conj(c + i d)(xr + i xi) = (c xr + d xi) + i(c xi − d xr)
                    let c = &l.re[k * n + i];
                    zr[i] += c * &xr[k];
                    zi[i] += c * &xi[k];
                    if !l.is_real() {
                        let d = &l.im[k * n + i];
                        zr[i] += d * &xi[k];
                        zi[i] -= d * &xr[k];
                    }
                }
            }
            (zr, zi)
        })
        .collect();
    let (re, im): (Vec<_>, Vec<_>) = columns.into_iter().unzip();
    let mut z = Block { re, im };
    orthonormalize(&mut z, prec);
    let tol = 10f64.powi(-(digits as i32) - 6);
    let mut previous: Option<Vec<f64>> = None;
    let max_iter = 400;
    let mut change = f64::INFINITY;
    for iter in 1..=max_iter {
        // W = L⁻ᴴ Z.
        let mut w = z.clone();
        w.re.par_iter_mut()
            .zip(w.im.par_iter_mut())
            .for_each(|(r, i)| solve_upper(l, r, i));
        // T = Wᴴ W = Zᴴ K Z.
        let mut tr = vec![zero.clone(); b * b];
        let mut ti = vec![zero.clone(); b * b];
        for p in 0..b {
            for q in p..b {
                let (r, i) = inner(&w.re[p], &w.im[p], &w.re[q], &w.im[q], prec);
                tr[q * b + p] = r.clone();
                ti[q * b + p] = -i.clone();
                tr[p * b + q] = r;
                ti[p * b + q] = i;
            }
        }
        let eig = hermitian_eigen(&tr, &ti, b, prec);
        // Ritz vectors of H: X = W V (unnormalized); next Z = orth(L⁻¹ W V).
        let mut x = Block {
            re: vec![vec![zero.clone(); n]; b],
            im: vec![vec![zero.clone(); n]; b],
        };
        for (c, (_, vr, vi)) in eig.iter().enumerate() {
            for (p, (a, bb)) in vr.iter().zip(vi).enumerate() {
                for i in 0..n {
                    x.re[c][i] += &w.re[p][i] * a;
                    x.re[c][i] -= &w.im[p][i] * bb;
                    x.im[c][i] += &w.re[p][i] * bb;
                    x.im[c][i] += &w.im[p][i] * a;
                }
            }
        }
        let values: Vec<Float> = eig
            .iter()
            .map(|(mu, _, _)| Float::with_val(prec, mu.recip_ref()))
            .collect();
        let approx: Vec<f64> = values[..count].iter().map(|v| v.to_f64()).collect();
        if let Some(prev) = &previous {
            change = approx
                .iter()
                .zip(prev)
                .map(|(a, p)| ((a - p) / a).abs())
                .fold(0.0, f64::max);
            if change < tol || (change == 0.0) {
                let mut vectors = x;
                for c in 0..b {
                    let (nr, _) = inner(
                        &vectors.re[c],
                        &vectors.im[c],
                        &vectors.re[c],
                        &vectors.im[c],
                        prec,
                    );
                    let inv = nr.sqrt().recip();
                    for v in vectors.re[c].iter_mut().chain(vectors.im[c].iter_mut()) {
                        *v *= &inv;
                    }
                }
                return Ok(Eigenpairs {
                    values: values[..count].to_vec(),
                    vectors,
                    iterations: iter,
                });
            }
        }
        previous = Some(approx);
        let mut next = x;
        next.re
            .par_iter_mut()
            .zip(next.im.par_iter_mut())
            .for_each(|(r, i)| solve_lower(l, r, i, prec));
        orthonormalize(&mut next, prec);
        z = next;
    }
    Err(SpectrumError::NoConvergence {
        iterations: max_iter,
        change,
    })
}

/// Result of one basis size.
struct Solve {
    values: Vec<Float>,
    vectors: Block,
    bits: u32,
    real: bool,
    iterations: usize,
}

fn solve_basis(
    laurent: &Laurent,
    frame: &Frame,
    n: usize,
    count: usize,
    digits: u32,
    seed: Option<&Block>,
) -> Result<Solve, SpectrumError> {
    let probe = frame.terms(laurent, 64);
    let bits = working_bits(&probe, n, frame.threshold, digits);
    let terms = frame.terms(laurent, bits);
    let mut h = assemble(&terms, n, bits, frame.mirror.is_some());
    let real = h.is_real();
    cholesky(&mut h, bits)?;
    let e = lowest_eigenpairs(&h, count, digits, bits, seed)?;
    Ok(Solve {
        values: e.values,
        vectors: e.vectors,
        bits,
        real,
        iterations: e.iterations,
    })
}

/// The N×N truncated operator in the frame's oscillator basis, assembled at `bits` and
/// rounded to f64 (for cross-checks with general-purpose linear algebra at small N).
pub fn truncated_matrix_f64(
    laurent: &Laurent,
    frame: &Frame,
    n: usize,
    bits: u32,
) -> nalgebra::DMatrix<Complex64> {
    let terms = frame.terms(laurent, bits);
    let h = assemble(&terms, n, bits, frame.mirror.is_some());
    nalgebra::DMatrix::from_fn(n, n, |i, j| {
        let (r, c, sign) = if i >= j { (i, j, 1.0) } else { (j, i, -1.0) };
        let im = if h.is_real() {
            0.0
        } else {
            h.im[r * n + c].to_f64() * sign
        };
        Complex64::new(h.re[r * n + c].to_f64(), im)
    })
}

/// Lowest eigenvalues of the N×N truncation by this module's own multiprecision solver (no
/// convergence ladder): the counterpart of [`truncated_matrix_f64`].
pub fn truncated_eigenvalues(
    laurent: &Laurent,
    frame: &Frame,
    n: usize,
    count: usize,
    digits: u32,
) -> Result<Vec<Float>, SpectrumError> {
    Ok(solve_basis(laurent, frame, n, count, digits, None)?.values)
}

/// Minimum basis size for the levels wanted: the block iteration needs room above them.
pub fn minimum_basis(top_level: usize) -> usize {
    2 * (top_level + 1) + 8
}

/// Eigenvalues (and eigenvectors) of the ħ = 2π quantum curve of φ for the requested levels.
///
/// Solves at N, ⌈3N/2⌉, … until the estimated relative error of every level is below
/// `10^-digits` or the next basis would exceed `max_basis`; the error estimate of a level is
/// the change between the last two bases, and the value is the one of the largest basis.
///
/// # Errors
/// See [`SpectrumError`].
pub fn solve(laurent: &Laurent, options: &SpectrumOptions) -> Result<Spectrum, SpectrumError> {
    let (lo, hi) = (*options.levels.start(), *options.levels.end());
    if lo > hi {
        return Err(SpectrumError::EmptyLevels);
    }
    let needed = minimum_basis(hi);
    if options.basis < needed {
        return Err(SpectrumError::BasisTooSmall {
            basis: options.basis,
            level: hi,
            needed,
        });
    }
    let frame = frame(laurent, options.squeeze);
    let count = hi + 1;
    let mut n = options.basis;
    let mut bases = vec![n];
    // A small basis first seeds the inverse iteration of the first real solve (fewer steps).
    let pilot_n = (n / 3).max(needed);
    let pilot = if pilot_n < n {
        Some(solve_basis(
            laurent,
            &frame,
            pilot_n,
            count,
            options.digits.min(12),
            None,
        )?)
    } else {
        None
    };
    let mut coarse = solve_basis(
        laurent,
        &frame,
        n,
        count,
        options.digits,
        pilot.as_ref().map(|p| &p.vectors),
    )?;
    let target = 10f64.powi(-(options.digits as i32));
    let (best, errors) = loop {
        n = next_basis(n);
        bases.push(n);
        let fine = solve_basis(
            laurent,
            &frame,
            n,
            count,
            options.digits,
            Some(&coarse.vectors),
        )?;
        let errors: Vec<f64> = (0..count)
            .map(|k| {
                Float::with_val(fine.bits, &coarse.values[k] - &fine.values[k])
                    .to_f64()
                    .abs()
            })
            .collect();
        let converged = (lo..=hi).all(|k| errors[k] <= target * fine.values[k].to_f64().abs());
        if converged || next_basis(n) > options.max_basis {
            break (fine, errors);
        }
        coarse = fine;
    };
    let levels = (lo..=hi)
        .map(|k| {
            let eigenvector = best.vectors.re[k]
                .iter()
                .zip(&best.vectors.im[k])
                .map(|(r, i)| Complex64::new(r.to_f64(), i.to_f64()))
                .collect();
            Level {
                level: k,
                value: best.values[k].clone(),
                error_estimate: errors[k],
                eigenvector,
            }
        })
        .collect();
    Ok(Spectrum {
        frame,
        bases,
        working_bits: best.bits,
        real_matrix: best.real,
        iterations: best.iterations,
        levels,
    })
}

impl Spectrum {
    /// ψ(r) of a solved level at real r, from its eigenvector: `Σ_n v_n ⟨r|n⟩` (unit L² norm,
    /// phase as the eigenvector came out).
    pub fn wavefunction(&self, level: usize, r: f64) -> Option<Complex64> {
        let l = self.levels.iter().find(|l| l.level == level)?;
        let basis = self.frame.oscillator_functions(r, l.eigenvector.len());
        Some(l.eigenvector.iter().zip(basis).map(|(v, b)| v * b).sum())
    }
}

/// The trace of `H_N^{-k}` (k = 1, 2) of the truncated operator: a lower bound of `Tr Ô^{-k}`
/// that increases with N (Rayleigh–Ritz), computed from the Cholesky factor
/// (`Tr H⁻¹ = ‖L⁻¹‖²_F`, `Tr H⁻² = ‖L⁻ᴴL⁻¹‖²_F`).
pub fn trace_of_inverse_powers(
    laurent: &Laurent,
    basis: usize,
    digits: u32,
) -> Result<(Float, Float), SpectrumError> {
    let frame = frame(laurent, 1.0);
    let probe = frame.terms(laurent, 64);
    let bits = working_bits(&probe, basis, frame.threshold, digits);
    let terms = frame.terms(laurent, bits);
    let mut h = assemble(&terms, basis, bits, frame.mirror.is_some());
    cholesky(&mut h, bits)?;
    let n = basis;
    // Columns of L⁻¹: solve L y = e_k.
    let zero = Float::new(bits);
    let mut inv = Block {
        re: vec![vec![zero.clone(); n]; n],
        im: vec![vec![zero.clone(); n]; n],
    };
    for k in 0..n {
        inv.re[k][k] = Float::with_val(bits, 1);
        solve_lower(&h, &mut inv.re[k], &mut inv.im[k], bits);
    }
    let mut t1 = Float::new(bits);
    for k in 0..n {
        let (r, _) = inner(&inv.re[k], &inv.im[k], &inv.re[k], &inv.im[k], bits);
        t1 += r;
    }
    // H⁻¹ = L⁻ᴴ L⁻¹: columns are L⁻ᴴ applied to the columns of L⁻¹.
    let mut t2 = Float::new(bits);
    for k in 0..n {
        let (mut re, mut im) = (inv.re[k].clone(), inv.im[k].clone());
        solve_upper(&h, &mut re, &mut im);
        let (r, _) = inner(&re, &im, &re, &im, bits);
        t2 += r;
    }
    Ok((t1, t2))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn f0() -> Laurent {
        Laurent::from_terms(vec![([1, 0], 1), ([0, 1], 1), ([-1, 0], 1), ([0, -1], 1)])
    }

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

    #[test]
    fn small_basis_upper_bounds_decrease() {
        // Rayleigh–Ritz: truncated eigenvalues decrease as the basis grows (common practice of
        // the method, no source).
        let opts = SpectrumOptions {
            levels: 0..=2,
            basis: 40,
            max_basis: 100,
            digits: 40,
            squeeze: 1.0,
        };
        let s = solve(&f0(), &opts).unwrap();
        assert_eq!(s.bases, vec![40, 60, 90]);
        assert!(s.real_matrix);
        let frame = frame(&f0(), 1.0);
        let mut last: Option<Vec<Float>> = None;
        for n in [40usize, 60, 90] {
            let v = solve_basis(&f0(), &frame, n, 3, 30, None).unwrap().values;
            if let Some(prev) = last {
                for k in 0..3 {
                    assert!(
                        v[k] < prev[k],
                        "level {k}: N={n} gives {} ≥ {}",
                        v[k],
                        prev[k]
                    );
                }
            }
            last = Some(v);
        }
    }
}
