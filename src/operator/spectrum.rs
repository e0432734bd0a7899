//! Independent spectrum of the quantum curve: Rayleigh–Ritz in a harmonic-oscillator basis,
//! in multiprecision.
//!
//! The basis, its frame and the exact matrix elements of the N×N section `H_N` are in
//! [`oscillator`](super::oscillator) (method items 1–3: frame, basis, truncation); the dense
//! multiprecision linear algebra (Cholesky, Jacobi, block inverse iteration) is in
//! [`hermitian`](crate::numerics::hermitian). This module is the spectral solve itself.
//!
//! # Method
//! 4. **Lowest eigenpairs.** Cholesky `H_N = L Lᴴ` at a working precision that covers the
//!    condition number (bits ≥ log₂(N·max|entry| / threshold) + result bits + guard), then
//!    block inverse iteration on `K = L⁻¹L⁻ᴴ` (similar to `H_N⁻¹`) with Rayleigh–Ritz, the small
//!    projected problem solved by cyclic Jacobi in the same precision.
//! 5. **Convergence.** The solve is repeated at 3N/2; the difference is the error estimate of
//!    each level, and the 3N/2 value is reported.
//!
//! The ψ(r) of a level is `Σ_n v_n ⟨r|n⟩` ([`Spectrum::wavefunction`]), with the oscillator
//! functions of the frame ([`Frame::oscillator_functions`]).
//!
//! # Accuracy
//! Limited by the basis (truncation), not by arithmetic: the working precision is chosen so that
//! rounding is far below the truncation error. Measured: see the tests and the bench example.
//! The result is numerical evidence with an error *estimate*, not a bound. The inverse iteration
//! stops when the f64 roundings of the eigenvalues repeat (see [`lowest_eigenpairs`]): its own
//! error is then about 10⁻¹⁶ relative or less, not `10^-digits`; being part of the difference
//! between two bases, it enters the error estimate.
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
use crate::numerics::hermitian::{
    cholesky, inner, lowest_eigenpairs, solve_lower, solve_upper, Block, HermitianError,
};
use crate::operator::oscillator::{assemble, frame, working_bits, Frame};
use num_complex::Complex64;
use rug::Float;
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
    /// Loss of positive definiteness (working precision too low) or no convergence of the
    /// inverse iteration.
    #[error(transparent)]
    Hermitian(#[from] HermitianError),
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
    n.saturating_add(n.div_ceil(2))
}

/// One level of the truncated problem.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Level {
    pub level: usize,
    /// The eigenvalue a_n (at the largest basis solved).
    #[serde(serialize_with = "crate::numerics::serial::float")]
    pub value: Float,
    /// |a_n(N) − a_n(3N/2)| for the last two bases solved.
    pub error_estimate: f64,
    /// Eigenvector coefficients in the frame's oscillator basis (unit norm, rounded to double
    /// precision).
    #[serde(serialize_with = "crate::numerics::serial::complex64_list")]
    pub eigenvector: Vec<Complex64>,
}

/// The result of [`solve`].
#[derive(Debug, Clone, serde::Serialize)]
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

/// Result of one basis size.
struct Solve {
    values: Vec<Float>,
    vectors: Block,
    bits: u32,
    real: bool,
    iterations: usize,
}

/// One rung of the ladder: working precision from the condition-number estimate of the frame's
/// terms, `H_N` assembled, factored and its lowest `count` eigenpairs found (item 4 of the
/// module doc), the iteration started from `seed` if given.
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
/// rounded to f64 (for cross-checks with general-purpose linear algebra at small N): the full
/// Hermitian matrix, row-major, n·n entries (entry (i, j) at `i·n + j`).
pub fn truncated_matrix_f64(
    laurent: &Laurent,
    frame: &Frame,
    n: usize,
    bits: u32,
) -> Vec<Complex64> {
    let terms = frame.terms(laurent, bits);
    assemble(&terms, n, bits, frame.mirror.is_some()).to_complex64()
}

/// Lowest eigenvalues of the N×N truncation by this crate's own multiprecision solver (no
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

/// The basis sizes [`solve`] may use with `options`: the ladder N, ⌈3N/2⌉, … while within
/// `max_basis` (at least two rungs), saturating instead of overflowing for absurd inputs.
pub fn ladder(options: &SpectrumOptions) -> Vec<usize> {
    let mut bases = vec![options.basis];
    let mut n = options.basis.max(1);
    loop {
        n = next_basis(n);
        bases.push(n);
        if next_basis(n) > options.max_basis || n == usize::MAX {
            return bases;
        }
    }
}

/// Checks the options of [`solve`] before any work: a non-empty level range and a first basis
/// of at least [`minimum_basis`].
///
/// # Errors
/// [`SpectrumError::EmptyLevels`], [`SpectrumError::BasisTooSmall`].
pub fn validate(options: &SpectrumOptions) -> Result<(), SpectrumError> {
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
    Ok(())
}

/// An upper estimate of the peak memory of [`solve`] in bytes: the largest rung's N×N matrix of
/// MPFR numbers (real and imaginary parts, each 32 bytes of header plus its limbs at the
/// working precision of that rung) and the block of iteration vectors. Computed before
/// anything is allocated, so that a request the machine cannot hold is refused up front.
pub fn peak_memory(laurent: &Laurent, options: &SpectrumOptions) -> f64 {
    let frame = frame(laurent, options.squeeze);
    let probe = frame.terms(laurent, 64);
    let n = *ladder(options).last().expect("at least two rungs");
    let bits = working_bits(&probe, n.min(1 << 40), frame.threshold, options.digits);
    let per_number = 32.0 + 8.0 * f64::from(bits.div_ceil(64));
    let n = n as f64;
    let count = (*options.levels.end() as f64) + 1.0;
    per_number * (2.0 * n * n + 6.0 * count * n)
}

/// Minimum basis size for the levels wanted: the block iteration needs room above them.
pub fn minimum_basis(top_level: usize) -> usize {
    top_level
        .saturating_add(1)
        .saturating_mul(2)
        .saturating_add(8)
}

/// Eigenvalues (and eigenvectors) of the ħ = 2π quantum curve of φ for the requested levels.
///
/// Solves at N, ⌈3N/2⌉, … until the estimated relative error of every level is below
/// `10^-digits` or the next basis would exceed `max_basis`; the error estimate of a level is
/// the change between the last two bases, and the value is the one of the largest basis.
///
/// # Errors
/// See [`SpectrumError`].
///
/// # Example
/// The ground state of F0 at ħ = 2π from bases 200 and 300 (it agrees with the attractor
/// modulus 17.846643118044799282… to the digits the basis supports):
/// ```
/// use regwave::{solve_spectrum, SpectrumOptions};
/// let f0 = regwave::family("F0").unwrap();
/// let options = SpectrumOptions { levels: 0..=0, basis: 200, max_basis: 300, digits: 12, squeeze: 1.0 };
/// let s = solve_spectrum(&f0, &options).unwrap();
/// let e0 = s.levels[0].value.to_f64();
/// assert!((e0 - 17.846643118044799).abs() < 1e-9 && s.levels[0].error_estimate < 1e-9);
/// ```
pub fn solve(laurent: &Laurent, options: &SpectrumOptions) -> Result<Spectrum, SpectrumError> {
    validate(options)?;
    let (lo, hi) = (*options.levels.start(), *options.levels.end());
    let needed = minimum_basis(hi);
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
    fn linear_algebra_errors_read_as_spectrum_errors() {
        // The messages users saw before the linear algebra moved to numerics::hermitian.
        let e = SpectrumError::from(HermitianError::NotPositiveDefinite {
            pivot: 3,
            bits: 100,
        });
        assert_eq!(
            e.to_string(),
            "the truncated operator lost positive definiteness at pivot 3 with 100 bits: \
             working precision too low"
        );
        let e = SpectrumError::from(HermitianError::NoConvergence {
            iterations: 400,
            change: 0.5,
        });
        assert_eq!(
            e.to_string(),
            "inverse iteration did not converge in 400 iterations (last relative change 5e-1)"
        );
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
