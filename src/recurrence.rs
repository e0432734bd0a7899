//! Exact constant terms `[φⁿ]₀` and the P-recursive recurrence they satisfy.
//!
//! (Interface fixed; bodies to be filled in.)

use rug::Integer;
use thiserror::Error;

/// A term `c·x^{m₁} y^{m₂}` of a Laurent polynomial with integer coefficient.
pub type Term = ([i64; 2], i64);

#[derive(Debug, Clone, PartialEq, Eq, Error)]
#[non_exhaustive]
pub enum RecurrenceError {
    #[error("no recurrence of order ≤ {max_order} and degree ≤ {max_degree} fits the first {terms} constant terms")]
    NotFound { max_order: usize, max_degree: usize, terms: usize },
    #[error("the leading coefficient of the recurrence vanishes at n = {n}; cannot step past it")]
    SingularStep { n: usize },
}

/// `Σ_{j=0}^{order} p_j(n) u_{n+j} = 0` for all n ≥ 0, `p_j(n) = Σ_k coeffs[j][k] nᵏ`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Recurrence {
    pub coeffs: Vec<Vec<Integer>>,
}

/// `[φⁿ]₀` for n = 0..=n_max by direct expansion (exact; cost O(n³)).
pub fn constant_terms_direct(terms: &[Term], n_max: usize) -> Vec<Integer> {
    let _ = (terms, n_max);
    todo!()
}

/// The recurrence of least order (then degree) satisfied by `[φⁿ]₀`.
pub fn guess(terms: &[Term]) -> Result<Recurrence, RecurrenceError> {
    let _ = terms;
    todo!()
}

/// `[φⁿ]₀` for n = 0..=n_max, fast (recurrence), exact.
pub fn constant_terms(terms: &[Term], n_max: usize) -> Result<Vec<Integer>, RecurrenceError> {
    let _ = (terms, n_max);
    todo!()
}
