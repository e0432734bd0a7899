//! Agreement of ψ with the independent harmonic-oscillator eigenfunction of the same level.
//!
//! # Formula
//! ψ and the oscillator ψ ([`Spectrum::wavefunction`]) on r ∈ [−15, 15] (step 0.05), both
//! normalized by the same trapezoid rule, the phase aligned by their overlap; the figure is the
//! largest difference relative to max|ψ|.
//!
//! # Accuracy
//! Limited by the spectrum's basis (its eigenvector, not ψ): measured 1e-15…1e-11 for levels
//! 0..4 (`tests/audit.rs`). A function that is not the eigenfunction of that level differs at
//! order one (`tests/verify.rs`).
//!
//! # Errors
//! [`VerifyError::MissingLevel`], or see [`crate::eigenfunction::construction::EigenError`].
//!
//! # References
//! `docs/MATHEMATICS.md` §3 and §7.

use crate::checks::VerifyError;
use crate::eigenfunction::construction::Eigenfunction;
use crate::numerics::complex::CNum;
use crate::operator::spectrum::Spectrum;
use num_complex::Complex64;

/// Largest difference between the normalized ψ and the normalized harmonic-oscillator
/// eigenfunction of `level`, relative to max|ψ|, after aligning the phase.
///
/// # Errors
/// [`VerifyError::MissingLevel`], or see [`crate::eigenfunction::construction::EigenError`].
pub fn eigenvector_difference<T: CNum>(
    eig: &Eigenfunction<T>,
    spectrum: &Spectrum,
    level: usize,
) -> Result<f64, VerifyError> {
    let h = 0.05;
    let grid: Vec<f64> = (-300..=300).map(|k| k as f64 * h).collect();
    let ours: Vec<Complex64> = eig
        .psi_on_line(&grid, 0.0)?
        .into_iter()
        .map(|v| v.map(|v| v.to_c64()).unwrap_or_default())
        .collect();
    let theirs = grid
        .iter()
        .map(|&r| spectrum.wavefunction(level, r))
        .collect::<Option<Vec<_>>>()
        .ok_or(VerifyError::MissingLevel { level })?;
    let (ours, theirs) = (unit_norm(&ours, h), unit_norm(&theirs, h));
    let overlap: Complex64 = ours.iter().zip(&theirs).map(|(x, y)| x.conj() * y).sum();
    let phase = overlap / overlap.norm();
    let size = ours.iter().map(|v| v.norm()).fold(0.0, f64::max);
    Ok(ours
        .iter()
        .zip(&theirs)
        .map(|(x, y)| (x * phase - y).norm())
        .fold(0.0, f64::max)
        / size)
}

fn unit_norm(values: &[Complex64], h: f64) -> Vec<Complex64> {
    let norm: f64 = values.iter().map(|v| v.norm_sqr()).sum::<f64>() * h;
    values.iter().map(|v| v / norm.sqrt()).collect()
}
