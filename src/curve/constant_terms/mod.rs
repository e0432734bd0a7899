//! Exact constant terms `[φⁿ]₀` and the P-recursive recurrence they satisfy.
//!
//! For a polynomial in `x^{±1}, y^{±1}`, `φ(x, y) = Σ c_m x^{m₁} y^{m₂}`, the constant terms
//! `u_n = [φⁿ]₀` are the exact integers in the series at `a = ∞` of the α-period,
//! `Ω_α = −2πi Σ (−1)ⁿ u_n a^{−n−1}`, and of the regulator `R_α`; they also seed the
//! differential equation in `a` that the α-period satisfies (see `docs/MATHEMATICS.md` §8).
//!
//! # Formula
//! `u_n` is the weighted number of closed walks of length n on Z² from the origin whose
//! steps are the exponents `m` of φ, each step weighted by `c_m`. The sequence is
//! P-recursive: there are polynomials `p₀, …, p_r`, not all zero, with
//!
//! `Σ_{j=0}^{r} p_j(n) u_{n+j} = 0` for all `n ≥ 0`
//!
//! (`u_n` is the diagonal of a rational power series, hence its generating function is
//! differentiably finite; see the references).
//!
//! # Method ("guess and check")
//! 1. [`constant_terms_direct`]: dynamic programming over lattice positions, `φ^{k+1} =
//!    φ·φ^k`, keeping only positions in the box reachable in k steps from which the origin can
//!    still be reached in the remaining steps (bounding-box pruning). Exact; O(n³).
//! 2. [`guess`]: for `(r, d)` in lexicographic order (least order first, then least degree)
//!    up to [`MAX_ORDER`], [`MAX_DEGREE`], build the linear system for the
//!    `U = (r+1)(d+1)` unknown coefficients, one equation per n, and compute its rank modulo
//!    the prime `2⁶¹ − 1` with one-word arithmetic. Full rank rules the shape out (full rank
//!    modulo a prime implies full rank over Q, so this step is certain); the first shape whose
//!    nullspace is one-dimensional on at least `2U + 20` equations ([`required_terms`]) wins.
//!    Terms modulo the prime come from the same walk count, in stages of growing length.
//! 3. That `(r, d)` is solved exactly over Z: the `U − 1` equations that were independent
//!    modulo the prime are reduced by fraction-free row reduction (every intermediate entry is
//!    a minor of the matrix, so each division is exact — common practice); the null vector is
//!    made primitive with a positive leading coefficient of `p_r`, and then checked exactly
//!    against **every** equation the computed terms allow.
//! 4. [`constant_terms`]: the recurrence is run forward from `u₀ … u_{r−1}` with exact
//!    integer arithmetic (each step is an exact division by `p_r(n)`, and a non-zero remainder
//!    is reported as an error), and the first [`CROSS_CHECK_TERMS`] values (at least) are
//!    compared with the direct expansion.
//!
//! Fitting a recurrence to finitely many terms and verifying it on many more is common
//! practice, **not a proof**: the recurrence is certain on the verified range only. Beyond
//! it the values are exact consequences of the recurrence; the integrality of every step is a
//! further (weak) check.
//!
//! # Layout
//! The public API is here; the work is done in private submodules, one per job: `walks` (the
//! direct expansion over a coefficient ring, step 1), `residue` (arithmetic modulo `2⁶¹ − 1`),
//! `search` (the rank search over shapes, step 2), `exact` (the fraction-free solve over Z,
//! step 3) and `recurrence` (the [`Recurrence`] type: check, run forward, display, step 4).
//!
//! # Singular steps
//! Where the leading coefficient vanishes, `p_r(n) = 0`, the recurrence does not determine
//! `u_{n+r}`. [`constant_terms`] then falls back to the direct value for that index: the direct
//! expansion is extended to cover every such index up to [`SINGULAR_FALLBACK_MAX`]; a singular
//! step beyond it is [`RecurrenceError::SingularStep`].
//!
//! # Cost
//! With `T` terms in φ: the direct expansion makes O(T·n³) small multiply-adds on integers
//! of O(n) bits. The modular search costs at most `E·U²` word operations per tested
//! `(r, d)` (it stops early once the rank is full). Running the recurrence costs O(r·n)
//! products of an O(n)-bit integer by a small one. Measured with
//! `examples/bench_constant_terms.rs` (release build, 2 cores shared with other work): all of
//! `n ≤ 2000` in 3–16 ms per polygon for the 16 reflexive polygons with binomial edge
//! coefficients (130 ms for all 16), of which the exact direct expansion of the first 64
//! terms is most; the direct expansion alone to n = 150 takes 20 ms (F0) to 180 ms (the
//! 9-point triangle). When nothing fits (a 9-term polynomial with exponents up to 4), the
//! whole search takes about 0.3 s.
//!
//! # Accuracy
//! Exact (arbitrary-size integers); no rounding anywhere.
//!
//! # Errors
//! See [`RecurrenceError`]: no recurrence within the search range, too few terms for the
//! search, a non-unique fit, a failed exact check, a singular or non-integral step.
//!
//! # References
//! - "Differentiably finite power series", European J. Combin. 1 (1980) 175–188
//!   (P-recursive sequences and D-finite generating functions).
//! - "The diagonal of a D-finite power series is D-finite", J. Algebra 113 (1988) 373–378
//!   (`Σ [φⁿ]₀ tⁿ` is the constant term of `1/(1 − tφ)`, the diagonal of a rational series).
//! - OEIS A002894 (`x + 1/x + y + 1/y`), A006480 (`x + y + 1/(xy)`), A002898 (the hexagon).
//!
//! # Example
//! ```
//! use regwave::curve::constant_terms::{constant_terms, guess};
//! // F0: φ = x + 1/x + y + 1/y; [φ²ᵏ]₀ = C(2k, k)² (OEIS A002894).
//! let f0 = [([1, 0], 1), ([-1, 0], 1), ([0, 1], 1), ([0, -1], 1)];
//! let u = constant_terms(&f0, 6).unwrap();
//! assert_eq!(u, [1, 0, 4, 0, 36, 0, 400]);
//! let rec = guess(&f0).unwrap();
//! assert_eq!((rec.order(), rec.degree()), (2, 2));
//! ```

mod exact;
mod recurrence;
mod residue;
mod search;
mod walks;

pub use recurrence::Recurrence;

use exact::exact_fit;
use residue::Residue;
use rug::Integer;
use search::{search_modular, search_pairs, search_walks_modular, Search};
use thiserror::Error;
use walks::closed_walks;

/// A term `c·x^{m₁} y^{m₂}` of a Laurent polynomial with integer coefficient.
///
/// Exponents are meant to be small (the direct expansion's grid grows with their range);
/// terms with `c = 0` are ignored and repeated exponents add up.
pub type Term = ([i64; 2], i64);

/// Largest recurrence order [`guess`] tries.
pub const MAX_ORDER: usize = 8;
/// Largest degree (in n) of the recurrence's polynomial coefficients [`guess`] tries.
pub const MAX_DEGREE: usize = 8;
/// Equations beyond twice the number of unknowns that every fit must satisfy.
pub const EXTRA_EQUATIONS: usize = 20;
/// [`constant_terms`] compares at least this many values with the direct expansion.
pub const CROSS_CHECK_TERMS: usize = 64;
/// Largest index at which a singular step of the recurrence falls back to the direct value.
pub const SINGULAR_FALLBACK_MAX: usize = 600;

/// Why a recurrence could not be found, checked or run.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
#[non_exhaustive]
pub enum RecurrenceError {
    /// Every `(order, degree)` in the search range is ruled out by the terms.
    #[error("no recurrence of order ≤ {max_order} and degree ≤ {max_degree} fits the first {terms} constant terms")]
    NotFound {
        max_order: usize,
        max_degree: usize,
        terms: usize,
    },
    /// `p_r(n) = 0` and no direct value is available for index `n + r`.
    #[error("the leading coefficient of the recurrence vanishes at n = {n}; cannot step past it")]
    SingularStep { n: usize },
    /// The search reached `(order, degree)`, which needs `needed` terms; only `terms` given.
    #[error("testing order {order}, degree {degree} needs {needed} terms; only {terms} given")]
    TooFewTerms {
        order: usize,
        degree: usize,
        needed: usize,
        terms: usize,
    },
    /// The first fitting `(order, degree)` leaves more than one free recurrence.
    #[error("order {order}, degree {degree}: the recurrences fitting the terms form a space of dimension {dimension}")]
    Ambiguous {
        order: usize,
        degree: usize,
        dimension: usize,
    },
    /// `Σ_j p_j(n) u_{n+j} ≠ 0` for the terms given.
    #[error("the recurrence fails at n = {n}")]
    Mismatch { n: usize },
    /// Running the recurrence gave a non-integer `u_{n+r}`, so it is wrong beyond the verified terms.
    #[error("the recurrence gives a non-integer term at n = {n}")]
    InexactStep { n: usize },
    /// The value from the recurrence differs from the direct expansion at `index`.
    #[error("the recurrence and the direct expansion disagree at index {index}")]
    DirectDisagrees { index: usize },
}

/// Terms `u₀ … u_{N−1}` needed to accept a recurrence of order r and degree d:
/// `2U + 20` equations for `U = (r+1)(d+1)` unknowns, each equation using `r + 1`
/// consecutive terms. (Ruling a shape out needs only as many equations as give full rank.)
pub fn required_terms(order: usize, degree: usize) -> usize {
    order + 2 * (order + 1) * (degree + 1) + EXTRA_EQUATIONS
}

/// `[φⁿ]₀` for n = 0..=n_max by direct expansion (exact; cost O(n³)).
///
/// ```
/// use regwave::curve::constant_terms::constant_terms_direct;
/// // The hexagon: closed walks on the triangular lattice (OEIS A002898).
/// let hexagon = [([1, 0], 1), ([1, 1], 1), ([0, 1], 1), ([-1, 0], 1), ([-1, -1], 1), ([0, -1], 1)];
/// assert_eq!(constant_terms_direct(&hexagon, 4), [1, 0, 6, 12, 90]);
/// ```
pub fn constant_terms_direct(terms: &[Term], n_max: usize) -> Vec<Integer> {
    closed_walks::<Integer>(terms, n_max)
}

/// The recurrence of least order (then degree) satisfied by `[φⁿ]₀`.
///
/// Searches order ≤ [`MAX_ORDER`], degree ≤ [`MAX_DEGREE`]; the recurrence is checked
/// exactly on [`required_terms`] terms (at least `2U + 20` equations).
///
/// # Errors
/// [`RecurrenceError::NotFound`] when nothing in the range fits; `Ambiguous` or `Mismatch`
/// in the (unobserved) case that the fit modulo the prime is not the exact one.
pub fn guess(terms: &[Term]) -> Result<Recurrence, RecurrenceError> {
    fit(terms, 0).map(|(recurrence, _)| recurrence)
}

/// The recurrence of least order (then degree) satisfied by the given terms `u₀, u₁, …`,
/// searching order ≤ `max_order`, degree ≤ `max_degree`, checked exactly on all of `u`.
///
/// A pair `(r, d)` is ruled out as soon as its equations have full rank, and accepted only
/// when `u` has [`required_terms`]`(r, d)` terms; the search stops at the first pair it can
/// neither rule out nor accept, so that the answer is always the least one.
///
/// # Errors
/// [`RecurrenceError::TooFewTerms`] when the search reaches an untestable pair,
/// [`RecurrenceError::NotFound`] when nothing in the range fits, `Ambiguous` / `Mismatch` as
/// for [`guess`].
///
/// ```
/// use regwave::curve::constant_terms::{guess_from_terms, MAX_DEGREE, MAX_ORDER};
/// use rug::Integer;
/// // OEIS A000108: (n + 2) C_{n+1} = (4n + 2) C_n.
/// let mut u = vec![Integer::from(1)];
/// for n in 0..60u32 {
///     let next = Integer::from(&u[n as usize] * (4 * n + 2)) / (n + 2);
///     u.push(next);
/// }
/// let rec = guess_from_terms(&u, MAX_ORDER, MAX_DEGREE).unwrap();
/// assert_eq!(rec.to_string(), "(n + 2)·u(n+1) + (−4n − 2)·u(n) = 0");
/// ```
pub fn guess_from_terms(
    u: &[Integer],
    max_order: usize,
    max_degree: usize,
) -> Result<Recurrence, RecurrenceError> {
    let residues: Vec<Residue> = u.iter().map(Residue::from_integer).collect();
    let pairs = search_pairs(max_order, max_degree);
    match search_modular(&residues, &pairs)? {
        Search::Found(candidate) => exact_fit(u, &candidate),
        Search::Exhausted => Err(RecurrenceError::NotFound {
            max_order,
            max_degree,
            terms: u.len(),
        }),
        Search::Short { next } => {
            let (order, degree) = pairs[next];
            let needed = required_terms(order, degree);
            Err(RecurrenceError::TooFewTerms {
                order,
                degree,
                needed,
                terms: u.len(),
            })
        }
    }
}

/// `[φⁿ]₀` for n = 0..=n_max, fast (recurrence), exact.
///
/// # Errors
/// Those of [`guess`]; [`RecurrenceError::SingularStep`] for a singular step beyond
/// [`SINGULAR_FALLBACK_MAX`]; `InexactStep` or `DirectDisagrees` if running the recurrence
/// contradicts integrality or the direct expansion.
pub fn constant_terms(terms: &[Term], n_max: usize) -> Result<Vec<Integer>, RecurrenceError> {
    constant_terms_with_recurrence(terms, n_max).map(|(_, u)| u)
}

/// [`constant_terms`] together with the recurrence that produced them.
///
/// # Errors
/// As [`constant_terms`].
pub fn constant_terms_with_recurrence(
    terms: &[Term],
    n_max: usize,
) -> Result<(Recurrence, Vec<Integer>), RecurrenceError> {
    let (recurrence, mut direct) = fit(terms, CROSS_CHECK_TERMS)?;
    let r = recurrence.order();
    let last = n_max.max(direct.len() - 1);
    let beyond_direct = recurrence
        .singular_steps(last.saturating_sub(r))
        .into_iter()
        .map(|n| n + r)
        .filter(|&index| index >= direct.len())
        .max();
    if let Some(index) = beyond_direct {
        if index > SINGULAR_FALLBACK_MAX {
            return Err(RecurrenceError::SingularStep { n: index - r });
        }
        direct = constant_terms_direct(terms, index);
        recurrence.check(&direct)?;
    }
    let mut u = recurrence.extend(&direct, last)?;
    if let Some(index) = (0..direct.len()).find(|&i| u[i] != direct[i]) {
        return Err(RecurrenceError::DirectDisagrees { index });
    }
    u.truncate(n_max + 1);
    Ok((recurrence, u))
}

/// Finds the recurrence modulo the prime, then fits and checks it exactly on the direct
/// expansion to at least `min_terms` terms; returns it with those exact terms.
fn fit(terms: &[Term], min_terms: usize) -> Result<(Recurrence, Vec<Integer>), RecurrenceError> {
    let candidate = search_walks_modular(terms, MAX_ORDER, MAX_DEGREE)?;
    // The exact solve reads the equations that were independent modulo the prime, which may
    // lie beyond `required_terms` when the modular stage was longer.
    let last_row = candidate
        .independent_rows
        .last()
        .map_or(0, |n| n + candidate.order + 1);
    let needed = required_terms(candidate.order, candidate.degree)
        .max(min_terms)
        .max(last_row);
    let direct = constant_terms_direct(terms, needed - 1);
    let recurrence = exact_fit(&direct, &candidate)?;
    Ok((recurrence, direct))
}

#[cfg(test)]
mod tests {
    use super::*;

    pub(super) fn ints(values: &[i64]) -> Vec<Integer> {
        values.iter().map(|&v| Integer::from(v)).collect()
    }

    #[test]
    fn factorials_give_the_first_order_recurrence() {
        // u_n = n!: u_{n+1} − (n + 1) u_n = 0, normalized with positive leading coefficient.
        let mut u = vec![Integer::from(1)];
        for n in 1..40u32 {
            let next = Integer::from(&u[n as usize - 1] * n);
            u.push(next);
        }
        let rec = guess_from_terms(&u, MAX_ORDER, MAX_DEGREE).unwrap();
        assert_eq!(rec.coeffs, vec![ints(&[-1, -1]), ints(&[1, 0])]);
    }

    #[test]
    fn too_few_terms_is_reported() {
        let u = ints(&[1, 1, 2, 6, 24]);
        let err = guess_from_terms(&u, MAX_ORDER, MAX_DEGREE).unwrap_err();
        // Five equations rule out order 0 up to degree 4; degree 5 has six unknowns.
        assert_eq!(
            err,
            RecurrenceError::TooFewTerms {
                order: 0,
                degree: 5,
                needed: 32,
                terms: 5
            }
        );
    }
}
