//! Dense Hermitian linear algebra in multiprecision (MPFR): Cholesky, triangular solves,
//! Gram–Schmidt, the cyclic complex Jacobi eigensolver, and block inverse iteration for the
//! lowest eigenpairs of a positive definite matrix.
//!
//! # Storage
//! A complex n×n matrix or vector is held as two arrays of [`Float`]s, real and imaginary
//! parts, all at one precision. [`HermitianMatrix`] is row-major and keeps only its lower
//! triangle (entry (i, j) with i ≥ j at `i·n + j`; the upper triangle is the conjugate and is
//! never read); its `im` is empty when the matrix is real, and every routine then skips the
//! complex arithmetic (a real symmetric problem costs about a quarter of a complex one).
//! A [`Block`] is a list of complex column vectors.
//!
//! # Methods
//! - [`cholesky`]: `H = L Lᴴ` in place, column by column (outer-product form), the updates of
//!   the rows below each pivot in parallel.
//! - [`solve_lower`], [`solve_upper`]: `L y = b` and `Lᴴ x = y` by substitution.
//! - [`orthonormalize`]: modified Gram–Schmidt, applied twice.
//! - [`hermitian_eigen`]: all eigenpairs of a small Hermitian matrix by cyclic Jacobi
//!   rotations, each preceded by a diagonal unitary that makes the pivot entry real.
//! - [`lowest_eigenpairs`]: block inverse iteration (subspace iteration on `H⁻¹`, applied as
//!   two triangular solves with the Cholesky factor) with a Rayleigh–Ritz step each sweep.
//!
//! # Accuracy
//! Every operation rounds at the working precision `prec` (unit roundoff `u = 2^{−prec}`).
//! Cholesky is backward stable: the computed L is the exact factor of `H + E` with
//! `|E| ≤ c·n·u·|L||Lᴴ|`, so an eigenvalue λ of H is perturbed by at most about `n·u·‖H‖`, i.e.
//! relatively by `n·u·κ(H)`; the caller chooses `prec` so that this is far below what it
//! needs (log₂ κ(H) bits are lost). Jacobi is accurate to a few units of `u·‖T‖` per
//! eigenvalue; inverse iteration stops when the wanted Ritz values, rounded to f64, repeat
//! (see [`lowest_eigenpairs`] for what that guarantees). Checked in the tests against matrices
//! with known spectra (real and complex) and, through the spectrum of the quantum curve, against
//! nalgebra's f64 eigensolver (`tests/spectrum.rs`).
//!
//! # Errors
//! [`HermitianError`]: a non-positive pivot in Cholesky (the matrix is not positive definite at
//! this precision), or inverse iteration without convergence.
//!
//! # References
//! "Matrix Computations", 4th ed. (2013): §4.2 (Cholesky), §3.1 (triangular systems), §5.2
//! (Gram–Schmidt), §8.2 (subspace iteration, Rayleigh–Ritz), §8.5 (Jacobi methods).

use crate::precision::{inverse_iteration_tolerance, SUM_ROUNDING_BITS};
use rayon::prelude::*;
use rug::{Assign, Float};
use thiserror::Error;

/// Why a factorization or an eigensolve failed.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum HermitianError {
    /// A pivot of [`cholesky`] was ≤ 0: the matrix is not positive definite at `bits` bits (for
    /// a matrix that is positive definite in exact arithmetic, the precision is too low for its
    /// condition number). The message keeps the wording of the spectrum solver, this
    /// module's first user, whose error it becomes.
    #[error("the truncated operator lost positive definiteness at pivot {pivot} with {bits} bits: working precision too low")]
    NotPositiveDefinite { pivot: usize, bits: u32 },
    /// [`lowest_eigenpairs`] did not reach its tolerance; `change` is the last relative change
    /// of the wanted Ritz values.
    #[error("inverse iteration did not converge in {iterations} iterations (last relative change {change:e})")]
    NoConvergence { iterations: usize, change: f64 },
}

/// A Hermitian n×n matrix at one precision, row-major, lower triangle only: entry (i, j),
/// i ≥ j, is `re[i·n + j] + i·im[i·n + j]`; the upper triangle is implied by `H = Hᴴ` and never
/// read. `im` is empty when the matrix is real.
#[derive(Debug, Clone)]
pub struct HermitianMatrix {
    /// The dimension n.
    pub n: usize,
    /// Real parts, n·n entries.
    pub re: Vec<Float>,
    /// Imaginary parts, n·n entries, or empty for a real symmetric matrix.
    pub im: Vec<Float>,
}

impl HermitianMatrix {
    /// Whether the matrix is real symmetric (`im` empty).
    pub fn is_real(&self) -> bool {
        self.im.is_empty()
    }

    /// The full matrix rounded to f64, row-major (entry (i, j) at `i·n + j`), the upper
    /// triangle filled in as the conjugate of the lower one.
    pub fn to_complex64(&self) -> Vec<num_complex::Complex64> {
        let n = self.n;
        let mut out = Vec::with_capacity(n * n);
        for i in 0..n {
            for j in 0..n {
                let (r, c, sign) = if i >= j { (i, j, 1.0) } else { (j, i, -1.0) };
                let im = if self.is_real() {
                    0.0
                } else {
                    self.im[r * n + c].to_f64() * sign
                };
                out.push(num_complex::Complex64::new(self.re[r * n + c].to_f64(), im));
            }
        }
        out
    }
}

/// In-place Cholesky factorization `H = L Lᴴ` at `prec` bits: the lower triangle of `h` becomes
/// L, with `L_jj = √(H_jj − Σ_{k<j} |L_jk|²)` real positive and
/// `L_ij = (H_ij − Σ_{k<j} L_ik conj(L_jk)) / L_jj` for i > j. The rows below each pivot are
/// updated in parallel (they are independent). Backward stable ("Matrix Computations", 4th ed.
/// (2013), §4.2): the computed L factors `H + E` with `|E| ≤ c·n·u·|L||Lᴴ|` to first order, `u = 2^{−prec}`.
///
/// # Errors
/// [`HermitianError::NotPositiveDefinite`] at the first pivot that is ≤ 0; `h` is then
/// partly overwritten.
pub fn cholesky(h: &mut HermitianMatrix, prec: u32) -> Result<(), HermitianError> {
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
            return Err(HermitianError::NotPositiveDefinite {
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

/// A block of complex vectors (the columns of an n×b matrix), each stored as real and
/// imaginary parts of length n: column c is `re[c] + i·im[c]`.
#[derive(Debug, Clone)]
pub struct Block {
    /// Real parts of the columns.
    pub re: Vec<Vec<Float>>,
    /// Imaginary parts of the columns (same shapes as `re`).
    pub im: Vec<Vec<Float>>,
}

impl Block {
    /// The number of columns.
    pub fn len(&self) -> usize {
        self.re.len()
    }

    /// Whether the block has no columns.
    pub fn is_empty(&self) -> bool {
        self.re.is_empty()
    }
}

/// Solves `L y = b` in place by forward substitution, `y_i = (b_i − Σ_{k<i} L_ik y_k) / L_ii`,
/// with L the lower factor from [`cholesky`]; `(re, im)` holds b on entry and y on return.
/// Backward stable ("Matrix Computations", 4th ed. (2013), §3.1): the computed y solves
/// `(L + F) y = b` with `|F| ≤ n·u·|L|` to first order.
pub fn solve_lower(l: &HermitianMatrix, re: &mut [Float], im: &mut [Float], prec: u32) {
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

/// Solves `Lᴴ x = y` in place by backward substitution, with L the lower factor from
/// [`cholesky`] (column-oriented: after `x_i = y_i / L_ii`, every `y_k`, k < i, loses
/// `conj(L_ik) x_i`, so only rows of L are read); `(re, im)` holds y on entry and x on return.
/// Backward stable as [`solve_lower`] ("Matrix Computations", 4th ed. (2013), §3.1).
pub fn solve_upper(l: &HermitianMatrix, re: &mut [Float], im: &mut [Float]) {
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

/// Orthonormalizes the columns of `block` in place by modified Gram–Schmidt at `prec` bits:
/// `v_q ← v_q − ⟨v_p, v_q⟩ v_p` for p < q in turn, then `v_q ← v_q / ‖v_q‖`. The whole pass is
/// done twice: one pass loses orthogonality in proportion to the condition of the block, the
/// second brings it back to O(u) (reorthogonalization; common practice, "twice is enough").
/// Modified Gram–Schmidt: "Matrix Computations", 4th ed. (2013), §5.2. The columns must be
/// linearly independent at this precision (a zero column gives non-finite entries).
pub fn orthonormalize(block: &mut Block, prec: u32) {
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

/// The inner product `⟨a, b⟩ = Σ_i conj(a_i) b_i` of `a = ar + i·ai` and `b = br + i·bi`, as
/// (re, im) at `prec` bits, accumulated term by term (error about n·u·Σ|a_i||b_i|).
pub fn inner(ar: &[Float], ai: &[Float], br: &[Float], bi: &[Float], prec: u32) -> (Float, Float) {
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

/// All eigenpairs `(λ, re v, im v)` of the b×b Hermitian matrix `T = tr + i·ti` (full,
/// row-major, both triangles), largest eigenvalue first, each v of unit norm, by the cyclic
/// complex Jacobi method at `prec` bits: each rotation first removes the phase of T_pq with a
/// diagonal unitary, then applies the real rotation `t = sign(τ)/(|τ| + √(1 + τ²))`,
/// `τ = (T_qq − T_pp)/(2 T_pq)`, `c = 1/√(1 + t²)`, `s = t c`, that zeroes it ("Matrix
/// Computations", 4th ed. (2013), §8.5). Rotations are skipped when |T_pq| is below `2^{8−prec}`
/// times the larger of |T_pp|, |T_qq|; at most 60 sweeps (convergence is asymptotically
/// quadratic: a few sweeps usually suffice). Eigenvalues are accurate to a few units of `u·‖T‖`. A real T
/// (`ti` all zero) costs no complex arithmetic.
#[allow(clippy::type_complexity)]
pub fn hermitian_eigen(
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
    let eps = Float::with_val(
        prec,
        Float::i_exp(1, SUM_ROUNDING_BITS as i32 - prec as i32),
    );
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

/// The result of [`lowest_eigenpairs`].
#[derive(Debug, Clone)]
pub struct Eigenpairs {
    /// The lowest `count` eigenvalues, increasing.
    pub values: Vec<Float>,
    /// The Ritz vectors of the whole block (at least `count` columns, the first `count` belong
    /// to `values`, in the same order), each of unit norm.
    pub vectors: Block,
    /// Inverse-iteration sweeps done.
    pub iterations: usize,
}

/// The lowest `count` eigenpairs of the positive definite `H = L Lᴴ`, given its Cholesky factor
/// `l` (from [`cholesky`]), by block inverse iteration at `prec` bits.
///
/// Iterates on `K = L⁻¹L⁻ᴴ`, which is similar to `H⁻¹` (`K = L⁻¹ H⁻¹ L`), with a block of
/// `b = min(n, ⌊3·count/2⌋ + 4)` orthonormal vectors Z: `W = L⁻ᴴ Z`, the projected matrix
/// `T = Wᴴ W = Zᴴ K Z` is diagonalized by [`hermitian_eigen`], the Ritz vectors of H are
/// `X = W V` with Ritz values `1/μ`, and the next block is `Z = orth(L⁻¹ X)` (subspace
/// iteration with Rayleigh–Ritz, "Matrix Computations", 4th ed. (2013), §8.2). Eigenvalue k
/// converges geometrically at a rate set by `λ_k / λ_{b+1}`.
///
/// Stopping rule: the iteration stops once the lowest `count` Ritz values, *rounded to f64*,
/// change by less than `10^{−digits−6}` relatively between sweeps (at most 400 sweeps). Since
/// the change is measured in f64, for `digits ≳ 10` this means that the f64 roundings repeat:
/// the last change is then below about 10⁻¹⁶, and the values are accurate to about
/// `10⁻¹⁶·q/(1 − q)`, q the per-sweep contraction, whatever `digits` asks for (measured in the
/// tests: relative errors 3·10⁻⁴⁸, 2·10⁻³⁰, 2·10⁻²⁰ for the lowest three; residuals of the
/// vectors about the square root of the eigenvalue error). Callers needing more must check
/// convergence themselves (the spectrum's basis ladder does, through its error estimate).
///
/// The start block X is `seed` (e.g. eigenvectors of a smaller problem, truncated or padded
/// with zeros to length n) for its first columns and unit vectors `e_c` for the rest; it must
/// span a block of rank b.
///
/// # Errors
/// [`HermitianError::NoConvergence`] after 400 sweeps.
pub fn lowest_eigenpairs(
    l: &HermitianMatrix,
    count: usize,
    digits: u32,
    prec: u32,
    seed: Option<&Block>,
) -> Result<Eigenpairs, HermitianError> {
    let n = l.n;
    let b = (count + count / 2 + 4).min(n);
    let zero = Float::new(prec);
    // X: the seed (e.g. eigenvectors of a smaller problem, padded) or unit vectors;
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
    let tol = inverse_iteration_tolerance(digits);
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
    Err(HermitianError::NoConvergence {
        iterations: max_iter,
        change,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    const PREC: u32 = 200;

    /// The n×n tridiagonal `H_jj = 2`, `H_{j+1,j} = −e^{iφ_j}`: for any phases it is unitarily
    /// similar (by a diagonal unitary) to the real second-difference matrix, whose eigenvalues
    /// are `2 − 2cos(kπ/(n+1))`, k = 1..n (common practice: the discrete Laplacian).
    fn second_difference(n: usize, phases: bool) -> HermitianMatrix {
        let mut re = vec![Float::new(PREC); n * n];
        let mut im = vec![Float::new(PREC); n * n];
        for j in 0..n {
            re[j * n + j] = Float::with_val(PREC, 2);
            if j + 1 < n {
                let phi = Float::with_val(PREC, 0.7 * j as f64 + 0.3);
                let (sin, cos) = phi.sin_cos(Float::new(PREC));
                re[(j + 1) * n + j] = -cos;
                im[(j + 1) * n + j] = -sin;
            }
        }
        if !phases {
            re = re
                .into_iter()
                .enumerate()
                .map(|(k, x)| {
                    let (i, j) = (k / n, k % n);
                    if i == j + 1 {
                        Float::with_val(PREC, -1)
                    } else {
                        x
                    }
                })
                .collect();
            im.clear();
        }
        HermitianMatrix { n, re, im }
    }

    fn exact(n: usize, k: usize) -> Float {
        let pi = Float::with_val(PREC, rug::float::Constant::Pi);
        let angle = pi * (k as u32) / ((n + 1) as u32);
        2u32 - Float::with_val(PREC, angle.cos() * 2u32)
    }

    #[test]
    fn lowest_eigenpairs_of_the_second_difference_matrix_real_and_complex() {
        let n = 30;
        for phases in [false, true] {
            let h = second_difference(n, phases);
            assert_eq!(h.is_real(), !phases);
            let full = h.to_complex64();
            let mut l = h.clone();
            cholesky(&mut l, PREC).unwrap();
            // digits = 10: the stop is when the f64 roundings of the Ritz values repeat (see
            // the doc), which gives about 1e-16 or better; measured 3e-48, 2e-30, 2e-20.
            let e = lowest_eigenpairs(&l, 3, 10, PREC, None).unwrap();
            for k in 0..3 {
                let want = exact(n, k + 1);
                let rel = (Float::with_val(PREC, &e.values[k] - &want) / &want).abs();
                assert!(rel < 1e-16, "phases {phases}, level {k}: {rel}");
                // Residual ‖H v − λ v‖ in f64 with the full matrix.
                let v: Vec<_> = (0..n)
                    .map(|i| {
                        num_complex::Complex64::new(
                            e.vectors.re[k][i].to_f64(),
                            e.vectors.im[k][i].to_f64(),
                        )
                    })
                    .collect();
                let lambda = e.values[k].to_f64();
                let residual: f64 = (0..n)
                    .map(|i| {
                        let hv: num_complex::Complex64 =
                            (0..n).map(|j| full[i * n + j] * v[j]).sum();
                        (hv - lambda * v[i]).norm_sqr()
                    })
                    .sum::<f64>()
                    .sqrt();
                assert!(
                    residual < 1e-9,
                    "phases {phases}, level {k}: residual {residual:e}"
                );
            }
        }
    }

    #[test]
    fn jacobi_on_a_complex_two_by_two() {
        // [[2, 1 + i], [1 − i, 3]]: eigenvalues (5 ± 3)/2 = 4, 1.
        let f = |x: i32| Float::with_val(PREC, x);
        let tr = [f(2), f(1), f(1), f(3)];
        let ti = [f(0), f(1), f(-1), f(0)];
        let eig = hermitian_eigen(&tr, &ti, 2, PREC);
        for ((value, _, _), want) in eig.iter().zip([4, 1]) {
            let err = Float::with_val(PREC, value - want).abs();
            assert!(err < 1e-55, "{value} vs {want}");
        }
        // T v = λ v for the largest.
        let (lambda, vr, vi) = &eig[0];
        let v = [
            num_complex::Complex64::new(vr[0].to_f64(), vi[0].to_f64()),
            num_complex::Complex64::new(vr[1].to_f64(), vi[1].to_f64()),
        ];
        let t01 = num_complex::Complex64::new(1.0, 1.0);
        let r0 = 2.0 * v[0] + t01 * v[1] - lambda.to_f64() * v[0];
        let r1 = t01.conj() * v[0] + 3.0 * v[1] - lambda.to_f64() * v[1];
        assert!(r0.norm() < 1e-14 && r1.norm() < 1e-14, "{r0} {r1}");
    }

    #[test]
    fn cholesky_rejects_an_indefinite_matrix() {
        // [[1, 2], [2, 1]] has eigenvalues 3 and −1: the second pivot is 1 − 4 < 0.
        let f = |x: i32| Float::with_val(64, x);
        let mut h = HermitianMatrix {
            n: 2,
            re: vec![f(1), f(0), f(2), f(1)],
            im: vec![],
        };
        assert_eq!(
            cholesky(&mut h, 64),
            Err(HermitianError::NotPositiveDefinite { pivot: 1, bits: 64 })
        );
    }
}
