//! The quantum curve at ħ = 2π in shift form.
//!
//! # Formula
//! On L²(R) with `(X̂ψ)(r) = e^r ψ(r)` and `(Ŷψ)(r) = ψ(r − iħ)`, the Weyl quantization of
//! `Σ c_m e^{m₁ r + m₂ p}` is `Ô = Σ c_m e^{m₁ r̂ + m₂ p̂}`. By the Baker–Campbell–Hausdorff
//! formula `e^{m₁ r̂ + m₂ p̂} = e^{−i ħ m₁ m₂ / 2} X̂^{m₁} Ŷ^{m₂}`, which at ħ = 2π is
//! `(−1)^{m₁ m₂} X̂^{m₁} Ŷ^{m₂}`. Hence
//!
//! `(Ôψ)(r) = Σ_m c_m (−1)^{m₁m₂} e^{m₁ r} ψ(r − 2πi m₂)`.
//!
//! For a strip polygon (m₂ ∈ {−1, 0, 1}) the three shift coefficients are computed from this
//! sign rule directly; on ∂Δ no point has both coordinates even, so `(−1)^{m₁m₂} = (−1)^{m₁+m₂+1}`
//! and with `x = −e^r` they equal `A(x)`, `−B(x)`, `C(x)`: the eigen-equation `Ôψ = aψ` reads
//!
//! `A(x)·ψ(r − 2πi) + C(x)·ψ(r + 2πi) = (B(x) + a)·ψ(r)`.
//!
//! The tests check that identity rather than assume it.
//!
//! # Domain
//! Any complex r; the evaluator passed to [`QuantumCurve::apply`] must be defined at r and r ± 2πi.
//!
//! # Accuracy
//! Exact formula; evaluation at the precision of the arguments.
//!
//! # References
//! "Topological strings from quantum mechanics", Annales Henri Poincaré 17 (2016), arXiv:1410.3382
//! (the operators); the ħ = 2π shift form as in docs/MATHEMATICS.md §2.

use crate::curve::constant_terms::Term;
use crate::curve::laurent::{Laurent, LaurentError};
use crate::numerics::complex::CNum;

/// The three shift coefficients at one r: `(Ôψ)(r) = down·ψ(r − 2πi) + centre·ψ(r) + up·ψ(r + 2πi)`.
#[derive(Debug, Clone)]
pub struct ShiftCoefficients<T> {
    /// Multiplies ψ(r − 2πi): `Σ_{m₂=1} c_m (−1)^{m₁} e^{m₁ r}` (= A(x)).
    pub down: T,
    /// Multiplies ψ(r): `Σ_{m₂=0} c_m e^{m₁ r}` (= −B(x)).
    pub centre: T,
    /// Multiplies ψ(r + 2πi): `Σ_{m₂=−1} c_m (−1)^{m₁} e^{m₁ r}` (= C(x)).
    pub up: T,
}

/// The ħ = 2π quantum curve `Ô` of a tempered strip Laurent polynomial.
#[derive(Debug, Clone)]
pub struct QuantumCurve {
    terms: Vec<Term>,
}

/// The Weyl-ordering sign `(−1)^{m₁ m₂}` at ħ = 2π.
pub fn weyl_sign(m: [i64; 2]) -> i64 {
    if (m[0] * m[1]).rem_euclid(2) == 0 {
        1
    } else {
        -1
    }
}

impl QuantumCurve {
    /// # Errors
    /// [`LaurentError::NotStrip`] if φ has a term with |m₂| > 1.
    pub fn new(laurent: &Laurent) -> Result<Self, LaurentError> {
        laurent.strip_parts()?;
        Ok(QuantumCurve {
            terms: laurent.terms().to_vec(),
        })
    }

    /// The shift coefficients at r.
    pub fn coefficients<T: CNum>(&self, r: &T) -> ShiftCoefficients<T> {
        let zero = r.int_like(0);
        let mut out = ShiftCoefficients {
            down: zero.clone(),
            centre: zero.clone(),
            up: zero,
        };
        for &([m1, m2], c) in &self.terms {
            let term = (r.clone() * r.int_like(m1)).exp() * r.int_like(c * weyl_sign([m1, m2]));
            match m2 {
                1 => out.down = out.down.clone() + term,
                0 => out.centre = out.centre.clone() + term,
                _ => out.up = out.up.clone() + term,
            }
        }
        out
    }

    /// `(Ô − a)ψ` at r for an evaluator `psi` of ψ on the lines Im = Im r, Im r ± 2π.
    /// The evaluator is called at `r − 2πi`, `r`, `r + 2πi` (all at the precision of r).
    pub fn apply<T: CNum, F: FnMut(&T) -> T>(&self, mut psi: F, r: &T, a: &T) -> T {
        let shift = r.int_like(2) * r.pi_like() * r.i_like();
        let k = self.coefficients(r);
        let below = psi(&(r.clone() - shift.clone()));
        let here = psi(r);
        let above = psi(&(r.clone() + shift));
        k.down * below + (k.centre - a.clone()) * here + k.up * above
    }

    /// The terms of the classical symbol.
    pub fn terms(&self) -> &[Term] {
        &self.terms
    }
}
