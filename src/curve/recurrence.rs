//! Exact constant terms `[φⁿ]₀` and the P-recursive recurrence they satisfy.
//!
//! For a polynomial in `x^{±1}, y^{±1}`, `φ(x, y) = Σ c_m x^{m₁} y^{m₂}`, the constant terms
//! `u_n = [φⁿ]₀` are the exact integers in the series at `a = ∞` of the α-period,
//! `Ω_α = −2πi Σ (−1)ⁿ u_n a^{−n−1}`, and of the regulator `R_α`; they also seed the
//! differential equation in `a` that the α-period satisfies (see `MATH.md` §4).
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
//! use regwave::curve::recurrence::{constant_terms, guess};
//! // F0: φ = x + 1/x + y + 1/y; [φ²ᵏ]₀ = C(2k, k)² (OEIS A002894).
//! let f0 = [([1, 0], 1), ([-1, 0], 1), ([0, 1], 1), ([0, -1], 1)];
//! let u = constant_terms(&f0, 6).unwrap();
//! assert_eq!(u, [1, 0, 4, 0, 36, 0, 400]);
//! let rec = guess(&f0).unwrap();
//! assert_eq!((rec.order(), rec.degree()), (2, 2));
//! ```

use rug::Integer;
use std::fmt;
use thiserror::Error;

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

/// `Σ_{j=0}^{order} p_j(n) u_{n+j} = 0` for all n ≥ 0, `p_j(n) = Σ_k coeffs[j][k] nᵏ`.
///
/// As returned by [`guess`]: every `coeffs[j]` has length `degree + 1`, the coefficients
/// are coprime and the leading coefficient of `p_order` is positive.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Recurrence {
    pub coeffs: Vec<Vec<Integer>>,
}

impl Recurrence {
    /// The order r (the largest shift `u_{n+r}`).
    pub fn order(&self) -> usize {
        self.coeffs.len().saturating_sub(1)
    }

    /// The largest degree in n of the polynomial coefficients.
    pub fn degree(&self) -> usize {
        self.coeffs
            .iter()
            .filter_map(|p| p.iter().rposition(|c| !c.is_zero()))
            .max()
            .unwrap_or(0)
    }

    /// `p_j(n)`, exactly.
    ///
    /// ```
    /// use regwave::curve::recurrence::{guess, Term};
    /// let p2: [Term; 3] = [([1, 0], 1), ([0, 1], 1), ([-1, -1], 1)];
    /// let rec = guess(&p2).unwrap();
    /// // (n + 3)² u_{n+3} = 27 (n + 1)(n + 2) u_n, from the closed form (OEIS A006480).
    /// assert_eq!(rec.eval(3, 1), 16);
    /// assert_eq!(rec.eval(0, 1), -27 * 6);
    /// ```
    pub fn eval(&self, j: usize, n: usize) -> Integer {
        eval_poly(&self.coeffs[j], &Integer::from(n))
    }

    /// `Σ_j p_j(n) u_{n+j}`; needs `u.len() > n + order`.
    pub fn residual(&self, u: &[Integer], n: usize) -> Integer {
        let mut sum = Integer::new();
        for (j, value) in u[n..=n + self.order()].iter().enumerate() {
            sum += self.eval(j, n) * value;
        }
        sum
    }

    /// Checks the recurrence at every n the terms allow (`n + order < u.len()`).
    ///
    /// # Errors
    /// [`RecurrenceError::Mismatch`] at the first n where the residual is not zero.
    pub fn check(&self, u: &[Integer]) -> Result<(), RecurrenceError> {
        let equations = u.len().saturating_sub(self.order());
        match (0..equations).find(|&n| !self.residual(u, n).is_zero()) {
            Some(n) => Err(RecurrenceError::Mismatch { n }),
            None => Ok(()),
        }
    }

    /// `u₀ … u_{n_max}` from the initial values `initial[..order]`, running the recurrence
    /// forward with exact division by `p_r(n)`. Where `p_r(n) = 0` the value `initial[n + r]`
    /// is taken; only there are later entries of `initial` read.
    ///
    /// # Errors
    /// [`RecurrenceError::TooFewTerms`] if fewer than `order` initial values are given,
    /// [`RecurrenceError::SingularStep`] if `p_r(n) = 0` and `initial` has no value for index
    /// `n + r`, [`RecurrenceError::InexactStep`] if a step does not divide exactly.
    ///
    /// ```
    /// use regwave::curve::recurrence::guess;
    /// use rug::Integer;
    /// let f0 = [([1, 0], 1), ([-1, 0], 1), ([0, 1], 1), ([0, -1], 1)];
    /// let rec = guess(&f0).unwrap();
    /// let u = rec.extend(&[Integer::from(1), Integer::from(0)], 8).unwrap();
    /// assert_eq!(u[8], 4900); // C(8, 4)²
    /// ```
    pub fn extend(
        &self,
        initial: &[Integer],
        n_max: usize,
    ) -> Result<Vec<Integer>, RecurrenceError> {
        let r = self.order();
        let wanted = n_max + 1;
        if initial.len() < r.min(wanted) {
            return Err(RecurrenceError::TooFewTerms {
                order: r,
                degree: self.degree(),
                needed: r.min(wanted),
                terms: initial.len(),
            });
        }
        let mut u: Vec<Integer> = initial[..r.min(wanted)].to_vec();
        while u.len() < wanted {
            let n = u.len() - r;
            let next = self.step(&u[n..], n, initial.get(n + r))?;
            u.push(next);
        }
        Ok(u)
    }

    /// `u_{n+r}` from `window = [u_n, …, u_{n+r−1}]`, or `fallback` where `p_r(n) = 0`.
    fn step(
        &self,
        window: &[Integer],
        n: usize,
        fallback: Option<&Integer>,
    ) -> Result<Integer, RecurrenceError> {
        let r = self.order();
        let lead = self.eval(r, n);
        if lead.is_zero() {
            return fallback.cloned().ok_or(RecurrenceError::SingularStep { n });
        }
        let mut sum = Integer::new();
        for (j, value) in window[..r].iter().enumerate() {
            sum -= self.eval(j, n) * value;
        }
        let (quotient, remainder) = <(Integer, Integer)>::from(sum.div_rem_ref(&lead));
        if remainder.is_zero() {
            Ok(quotient)
        } else {
            Err(RecurrenceError::InexactStep { n })
        }
    }

    /// Every n ≤ `n_max` with `p_r(n) = 0`.
    pub fn singular_steps(&self, n_max: usize) -> Vec<usize> {
        let r = self.order();
        (0..=n_max).filter(|&n| self.eval(r, n).is_zero()).collect()
    }
}

/// Writes `Σ_j p_j(n)·u(n+j) = 0` with each `p_j` expanded in powers of n.
impl fmt::Display for Recurrence {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mut first = true;
        for (j, p) in self.coeffs.iter().enumerate().rev() {
            if p.iter().all(|c| c.is_zero()) {
                continue;
            }
            if !first {
                write!(f, " + ")?;
            }
            first = false;
            write!(f, "(")?;
            write_poly(f, p)?;
            match j {
                0 => write!(f, ")·u(n)")?,
                _ => write!(f, ")·u(n+{j})")?,
            }
        }
        if first {
            write!(f, "0")?;
        }
        write!(f, " = 0")
    }
}

fn write_poly(f: &mut fmt::Formatter<'_>, p: &[Integer]) -> fmt::Result {
    let mut first = true;
    for (k, c) in p.iter().enumerate().rev().filter(|(_, c)| !c.is_zero()) {
        let sign = if c.is_negative() { "−" } else { "+" };
        match (first, c.is_negative()) {
            (true, true) => write!(f, "−")?,
            (true, false) => {}
            (false, _) => write!(f, " {sign} ")?,
        }
        first = false;
        let magnitude = Integer::from(c.abs_ref());
        match (k, magnitude == 1) {
            (0, _) => write!(f, "{magnitude}")?,
            (1, true) => write!(f, "n")?,
            (1, false) => write!(f, "{magnitude}n")?,
            (_, true) => write!(f, "n^{k}")?,
            (_, false) => write!(f, "{magnitude}n^{k}")?,
        }
    }
    Ok(())
}

/// `Σ_k p[k] nᵏ`, by nested multiplication.
fn eval_poly(p: &[Integer], n: &Integer) -> Integer {
    let mut value = Integer::new();
    for c in p.iter().rev() {
        value *= n;
        value += c;
    }
    value
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
/// use regwave::curve::recurrence::constant_terms_direct;
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
/// use regwave::curve::recurrence::{guess_from_terms, MAX_DEGREE, MAX_ORDER};
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

// ---------------------------------------------------------------------------------------
// Closed walks: the constant terms over any coefficient ring.

/// The coefficient ring of the walk count: exact integers, or residues modulo the prime.
trait WalkRing: Clone {
    type Weight: Copy;
    fn zero() -> Self;
    fn one() -> Self;
    fn is_zero(&self) -> bool;
    fn set_zero(&mut self);
    fn weight(c: i64) -> Self::Weight;
    /// `self += a·w`.
    fn add_mul(&mut self, a: &Self, w: Self::Weight);
}

impl WalkRing for Integer {
    type Weight = i64;
    fn zero() -> Self {
        Integer::new()
    }
    fn one() -> Self {
        Integer::from(1)
    }
    fn is_zero(&self) -> bool {
        Integer::is_zero(self)
    }
    fn set_zero(&mut self) {
        // Keeps the limb allocation for the next step, unlike `Integer::new()`.
        rug::Assign::assign(self, 0);
    }
    fn weight(c: i64) -> i64 {
        c
    }
    fn add_mul(&mut self, a: &Self, w: i64) {
        *self += a * w;
    }
}

/// An inclusive box `[x₀, x₁] × [y₀, y₁]` of lattice positions (empty when `x₀ > x₁`).
#[derive(Debug, Clone, Copy)]
struct Window {
    x: (i64, i64),
    y: (i64, i64),
}

impl Window {
    fn contains(&self, p: [i64; 2]) -> bool {
        (self.x.0..=self.x.1).contains(&p[0]) && (self.y.0..=self.y.1).contains(&p[1])
    }

    /// The positions, row by row.
    fn points(self) -> impl Iterator<Item = [i64; 2]> {
        (self.y.0..=self.y.1).flat_map(move |y| (self.x.0..=self.x.1).map(move |x| [x, y]))
    }
}

/// Positions after `k` of `horizon` steps that matter for some constant term up to the
/// horizon: reachable (inside `k·[lo, hi]`) and able to return (`−p ∈ (horizon−k)·[lo, hi]`).
fn walk_window(k: i64, horizon: i64, lo: [i64; 2], hi: [i64; 2]) -> Window {
    let rest = horizon - k;
    let axis = |i: usize| {
        (
            (k * lo[i]).max(-rest * hi[i]),
            (k * hi[i]).min(-rest * lo[i]),
        )
    };
    Window {
        x: axis(0),
        y: axis(1),
    }
}

/// The smallest box `[lo, hi]` holding the origin and every step.
fn step_box<W>(steps: &[([i64; 2], W)]) -> ([i64; 2], [i64; 2]) {
    let (mut lo, mut hi) = ([0i64; 2], [0i64; 2]);
    for (m, _) in steps {
        for i in 0..2 {
            lo[i] = lo[i].min(m[i]);
            hi[i] = hi[i].max(m[i]);
        }
    }
    (lo, hi)
}

/// Row-major storage for the box covering all windows.
struct Grid {
    bounds: Window,
    width: i64,
}

impl Grid {
    fn covering(windows: &[Window]) -> Self {
        let bounds = Window {
            x: (
                windows.iter().map(|w| w.x.0).min().unwrap_or(0),
                windows.iter().map(|w| w.x.1).max().unwrap_or(0),
            ),
            y: (
                windows.iter().map(|w| w.y.0).min().unwrap_or(0),
                windows.iter().map(|w| w.y.1).max().unwrap_or(0),
            ),
        };
        Grid {
            bounds,
            width: bounds.x.1 - bounds.x.0 + 1,
        }
    }

    fn index(&self, p: [i64; 2]) -> usize {
        ((p[1] - self.bounds.y.0) * self.width + (p[0] - self.bounds.x.0)) as usize
    }

    fn cells(&self) -> usize {
        self.index([self.bounds.x.1, self.bounds.y.1]) + 1
    }
}

/// `[φᵏ]₀` for k = 0..=n_max in the ring `R`.
fn closed_walks<R: WalkRing>(terms: &[Term], n_max: usize) -> Vec<R> {
    let steps: Vec<([i64; 2], R::Weight)> = terms
        .iter()
        .filter(|(_, c)| *c != 0)
        .map(|&(m, c)| (m, R::weight(c)))
        .collect();
    let (lo, hi) = step_box(&steps);
    let horizon = n_max as i64;
    let windows: Vec<Window> = (0..=horizon)
        .map(|k| walk_window(k, horizon, lo, hi))
        .collect();
    let grid = Grid::covering(&windows);
    let mut current = vec![R::zero(); grid.cells()];
    let mut next = current.clone();
    let origin = grid.index([0, 0]);
    current[origin] = R::one();
    let mut out = Vec::with_capacity(n_max + 1);
    out.push(current[origin].clone());
    for k in 0..n_max {
        multiply_by_phi(
            &grid,
            &steps,
            &current,
            &mut next,
            windows[k],
            windows[k + 1],
        );
        std::mem::swap(&mut current, &mut next);
        out.push(current[origin].clone());
    }
    out
}

/// `next = φ·current`, read on `source` and written on `target` only.
fn multiply_by_phi<R: WalkRing>(
    grid: &Grid,
    steps: &[([i64; 2], R::Weight)],
    current: &[R],
    next: &mut [R],
    source: Window,
    target: Window,
) {
    for p in target.points() {
        next[grid.index(p)].set_zero();
    }
    for p in source.points() {
        let value = &current[grid.index(p)];
        if value.is_zero() {
            continue;
        }
        for &(m, w) in steps {
            let q = [p[0] + m[0], p[1] + m[1]];
            if target.contains(q) {
                next[grid.index(q)].add_mul(value, w);
            }
        }
    }
}

// ---------------------------------------------------------------------------------------
// Arithmetic modulo the prime 2⁶¹ − 1: a product of two residues fits in u128 and reduces
// with a shift and an add, so the search runs on machine words.

const PRIME: u64 = (1 << 61) - 1;

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct Residue(u64);

impl Residue {
    fn new(value: u64) -> Self {
        // Any u64 is below 8·PRIME + 8: fold the top bits once, then one subtraction.
        let folded = (value & PRIME) + (value >> 61);
        Residue(if folded >= PRIME {
            folded - PRIME
        } else {
            folded
        })
    }

    fn from_integer(value: &Integer) -> Self {
        let modulus = Integer::from(PRIME);
        Residue(Integer::from(value.modulo_ref(&modulus)).to_u64_wrapping())
    }

    fn add(self, other: Self) -> Self {
        Residue::new(self.0 + other.0)
    }

    fn sub(self, other: Self) -> Self {
        Residue::new(self.0 + PRIME - other.0)
    }

    fn mul(self, other: Self) -> Self {
        // 2⁶¹ ≡ 1: the product (< 2¹²²) folds into its low 61 bits plus the rest (< 2⁶¹).
        let product = self.0 as u128 * other.0 as u128;
        Residue::new((product as u64 & PRIME) + (product >> 61) as u64)
    }

    fn pow(self, mut exponent: u64) -> Self {
        let (mut base, mut result) = (self, Residue(1));
        while exponent > 0 {
            if exponent & 1 == 1 {
                result = result.mul(base);
            }
            base = base.mul(base);
            exponent >>= 1;
        }
        result
    }

    fn inverse(self) -> Self {
        self.pow(PRIME - 2)
    }
}

impl WalkRing for Residue {
    type Weight = Residue;
    fn zero() -> Self {
        Residue(0)
    }
    fn one() -> Self {
        Residue(1)
    }
    fn is_zero(&self) -> bool {
        self.0 == 0
    }
    fn set_zero(&mut self) {
        self.0 = 0;
    }
    fn weight(c: i64) -> Residue {
        let magnitude = Residue::new(c.unsigned_abs());
        if c < 0 {
            Residue(0).sub(magnitude)
        } else {
            magnitude
        }
    }
    fn add_mul(&mut self, a: &Self, w: Residue) {
        *self = self.add(a.mul(w));
    }
}

// ---------------------------------------------------------------------------------------
// The search modulo the prime.

/// The `(order, degree)` pairs in search order: least order first, then least degree.
fn search_pairs(max_order: usize, max_degree: usize) -> Vec<(usize, usize)> {
    (0..=max_order)
        .flat_map(|r| (0..=max_degree).map(move |d| (r, d)))
        .collect()
}

/// A recurrence shape whose system has a one-dimensional nullspace modulo the prime, with
/// the equations (values of n) that were independent there.
#[derive(Debug, Clone)]
struct Candidate {
    order: usize,
    degree: usize,
    independent_rows: Vec<usize>,
}

enum Search {
    Found(Candidate),
    Exhausted,
    /// `pairs[next]` needs more terms than given (all earlier pairs failed).
    Short {
        next: usize,
    },
}

/// Unknown `j·(d+1) + k` is the coefficient of nᵏ in `p_j`; equation n reads
/// `Σ_{j,k} nᵏ u_{n+j} · unknown = 0`.
fn equation_row<T>(
    u: &[T],
    n: usize,
    order: usize,
    degree: usize,
    power: impl Fn(usize, usize) -> T,
    times: impl Fn(&T, &T) -> T,
) -> Vec<T> {
    let mut row = Vec::with_capacity((order + 1) * (degree + 1));
    for value in &u[n..=n + order] {
        for k in 0..=degree {
            row.push(times(&power(n, k), value));
        }
    }
    row
}

/// Tests `pairs` in order on the residues `u`, stopping at the first fit.
fn search_modular(u: &[Residue], pairs: &[(usize, usize)]) -> Result<Search, RecurrenceError> {
    search_modular_from(u, pairs, 0)
}

fn search_modular_from(
    u: &[Residue],
    pairs: &[(usize, usize)],
    start: usize,
) -> Result<Search, RecurrenceError> {
    for (i, &(order, degree)) in pairs.iter().enumerate().skip(start) {
        let unknowns = (order + 1) * (degree + 1);
        let independent_rows = independent_equations(u, order, degree);
        // Full rank on some equations rules the shape out for good (full rank modulo the
        // prime implies full rank over Q); accepting a fit needs all `2U + 20` equations.
        if independent_rows.len() == unknowns {
            continue;
        }
        if u.len() < required_terms(order, degree) {
            return Ok(Search::Short { next: i });
        }
        match unknowns - independent_rows.len() {
            1 => {
                return Ok(Search::Found(Candidate {
                    order,
                    degree,
                    independent_rows,
                }))
            }
            dimension => {
                return Err(RecurrenceError::Ambiguous {
                    order,
                    degree,
                    dimension,
                })
            }
        }
    }
    Ok(Search::Exhausted)
}

/// The equations (values of n) that raise the rank modulo the prime, in increasing n,
/// stopping once the rank is full.
fn independent_equations(u: &[Residue], order: usize, degree: usize) -> Vec<usize> {
    let unknowns = (order + 1) * (degree + 1);
    let power = |n: usize, k: usize| Residue::new(n as u64).pow(k as u64);
    let mut echelon = EchelonModP::default();
    let mut independent_rows = Vec::new();
    for n in 0..u.len().saturating_sub(order) {
        if echelon.insert(equation_row(u, n, order, degree, power, |a, b| a.mul(*b))) {
            independent_rows.push(n);
            if independent_rows.len() == unknowns {
                break;
            }
        }
    }
    independent_rows
}

/// The search on the walk count modulo the prime, lengthening the computed sequence in
/// stages of growth 5/4 (each stage recomputes with its own pruning horizon, which costs
/// less in total than extending one unpruned expansion).
fn search_walks_modular(
    terms: &[Term],
    max_order: usize,
    max_degree: usize,
) -> Result<Candidate, RecurrenceError> {
    const FIRST_STAGE: usize = 64;
    let pairs = search_pairs(max_order, max_degree);
    let most = required_terms(max_order, max_degree);
    let mut length = FIRST_STAGE.min(most);
    let mut start = 0;
    loop {
        let residues = closed_walks::<Residue>(terms, length - 1);
        match search_modular_from(&residues, &pairs, start)? {
            Search::Found(candidate) => return Ok(candidate),
            Search::Exhausted => {
                return Err(RecurrenceError::NotFound {
                    max_order,
                    max_degree,
                    terms: length,
                })
            }
            Search::Short { next } => {
                let (order, degree) = pairs[next];
                start = next;
                length = required_terms(order, degree).max((length + length / 4).min(most));
            }
        }
    }
}

/// Rows in echelon form modulo the prime, each with its pivot column (pivot entry 1).
#[derive(Default)]
struct EchelonModP {
    rows: Vec<(usize, Vec<Residue>)>,
}

impl EchelonModP {
    /// Reduces `row` by the stored rows; stores it and returns true if it is independent.
    fn insert(&mut self, mut row: Vec<Residue>) -> bool {
        for (pivot, basis) in &self.rows {
            let factor = row[*pivot];
            if factor.0 != 0 {
                for (entry, b) in row.iter_mut().zip(basis) {
                    *entry = entry.sub(factor.mul(*b));
                }
            }
        }
        let Some(pivot) = row.iter().position(|e| e.0 != 0) else {
            return false;
        };
        let scale = row[pivot].inverse();
        for entry in row.iter_mut() {
            *entry = entry.mul(scale);
        }
        self.rows.push((pivot, row));
        true
    }
}

// ---------------------------------------------------------------------------------------
// The exact fit.

/// Solves the candidate's shape exactly on the equations independent modulo the prime,
/// normalizes, and checks the result on every equation `u` allows.
fn exact_fit(u: &[Integer], candidate: &Candidate) -> Result<Recurrence, RecurrenceError> {
    let (order, degree) = (candidate.order, candidate.degree);
    let power = |n: usize, k: usize| Integer::from(Integer::u_pow_u(n as u32, k as u32));
    let times = |a: &Integer, b: &Integer| Integer::from(a * b);
    let matrix: Vec<Vec<Integer>> = candidate
        .independent_rows
        .iter()
        .map(|&n| equation_row(u, n, order, degree, power, times))
        .collect();
    let mut vector = null_vector(matrix, (order + 1) * (degree + 1));
    make_primitive(&mut vector);
    let recurrence = Recurrence {
        coeffs: vector.chunks(degree + 1).map(<[Integer]>::to_vec).collect(),
    };
    let recurrence = with_positive_leading_coefficient(recurrence);
    recurrence.check(u)?;
    Ok(recurrence)
}

/// A non-zero null vector of `matrix` (columns `columns`), which must have a free column.
///
/// Fraction-free reduction to reduced echelon form: with pivot `p` and previous pivot `q`,
/// every other row becomes `(p·row − row[c]·pivot_row)/q`; the division is exact because the
/// entries stay minors of the original matrix, and at the end every pivot equals the last one.
fn null_vector(mut matrix: Vec<Vec<Integer>>, columns: usize) -> Vec<Integer> {
    let mut previous = Integer::from(1);
    let mut pivot_columns = Vec::new();
    let mut free = None;
    for column in 0..columns {
        let row = pivot_columns.len();
        let Some(found) = (row..matrix.len()).find(|&i| !matrix[i][column].is_zero()) else {
            free.get_or_insert(column);
            continue;
        };
        matrix.swap(row, found);
        let pivot_row = matrix[row].clone();
        let pivot = &pivot_row[column];
        for (i, other) in matrix.iter_mut().enumerate() {
            if i == row {
                continue;
            }
            let factor = other[column].clone();
            for (entry, p) in other.iter_mut().zip(&pivot_row) {
                *entry *= pivot;
                *entry -= &factor * p;
                entry.div_exact_mut(&previous);
            }
        }
        previous = pivot.clone();
        pivot_columns.push(column);
    }
    let free = free.unwrap_or(columns - 1);
    let mut vector = vec![Integer::new(); columns];
    vector[free] = previous;
    for (row, &column) in pivot_columns.iter().enumerate() {
        vector[column] = -Integer::from(&matrix[row][free]);
    }
    vector
}

/// Divides by the gcd of the entries.
fn make_primitive(vector: &mut [Integer]) {
    let mut content = Integer::new();
    for entry in vector.iter() {
        content.gcd_mut(entry);
    }
    if !content.is_zero() && content != 1 {
        for entry in vector.iter_mut() {
            entry.div_exact_mut(&content);
        }
    }
}

/// Flips all signs unless the leading coefficient of the highest non-zero `p_j` is positive.
fn with_positive_leading_coefficient(mut recurrence: Recurrence) -> Recurrence {
    let leading = recurrence
        .coeffs
        .iter()
        .rev()
        .flat_map(|p| p.iter().rev())
        .find(|c| !c.is_zero());
    if leading.is_some_and(|c| c.is_negative()) {
        for c in recurrence.coeffs.iter_mut().flatten() {
            *c = -std::mem::take(c);
        }
    }
    recurrence
}

#[cfg(test)]
mod tests {
    use super::*;
    use rug::Rational;

    fn ints(values: &[i64]) -> Vec<Integer> {
        values.iter().map(|&v| Integer::from(v)).collect()
    }

    #[test]
    fn residue_arithmetic_matches_u128_remainder() {
        // Values near the modulus and the top of u64, where the folding is exercised.
        let samples = [
            0,
            1,
            2,
            PRIME - 1,
            PRIME - 2,
            1 << 60,
            (1 << 61) + 5,
            u64::MAX / 3,
        ];
        for &a in &samples {
            for &b in &samples {
                let (ra, rb) = (Residue::new(a), Residue::new(b));
                let (ma, mb) = (a as u128 % PRIME as u128, b as u128 % PRIME as u128);
                assert_eq!(ra.0 as u128, ma);
                assert_eq!(ra.mul(rb).0 as u128, ma * mb % PRIME as u128);
                assert_eq!(ra.add(rb).0 as u128, (ma + mb) % PRIME as u128);
                assert_eq!(
                    ra.sub(rb).0 as u128,
                    (ma + PRIME as u128 - mb) % PRIME as u128
                );
            }
        }
        assert_eq!(Residue(12345).mul(Residue(12345).inverse()), Residue(1));
        assert_eq!(Residue::weight(-3).add(Residue(3)), Residue(0));
        assert_eq!(
            Residue::from_integer(&Integer::from(-1)),
            Residue(PRIME - 1)
        );
    }

    #[test]
    fn null_vector_agrees_with_rational_solve() {
        // A 4×5 integer matrix of rank 4; the null vector is checked by multiplying back and
        // against the solution with the last unknown set to 1, solved over Q by substitution.
        let matrix = vec![
            ints(&[3, -1, 4, 1, -5]),
            ints(&[9, 2, -6, 5, 3]),
            ints(&[5, 8, 9, -7, 9]),
            ints(&[-3, 2, 3, 8, 4]),
        ];
        let vector = null_vector(matrix.clone(), 5);
        assert_null_vector(&matrix, &vector);
        assert!(!vector[4].is_zero());
        let solution = rational_solve_last_free(&matrix);
        for (v, s) in vector.iter().zip(&solution) {
            assert_eq!(Rational::from((v.clone(), vector[4].clone())), *s);
        }
    }

    /// `vector` is non-zero and every row of `matrix` is orthogonal to it.
    fn assert_null_vector(matrix: &[Vec<Integer>], vector: &[Integer]) {
        assert!(vector.iter().any(|v| !v.is_zero()), "zero vector");
        for (i, row) in matrix.iter().enumerate() {
            let dot: Integer = row
                .iter()
                .zip(vector)
                .map(|(a, b)| Integer::from(a * b))
                .sum();
            assert_eq!(dot, 0, "row {i}");
        }
    }

    /// Row reduction over Q with the last unknown fixed to 1 (an independent path).
    fn rational_solve_last_free(matrix: &[Vec<Integer>]) -> Vec<Rational> {
        let n = matrix.len();
        let mut a: Vec<Vec<Rational>> = matrix
            .iter()
            .map(|row| row.iter().map(|x| Rational::from(x.clone())).collect())
            .collect();
        for c in 0..n {
            let p = (c..n).find(|&i| a[i][c] != 0).unwrap();
            a.swap(c, p);
            let pivot_row = a[c].clone();
            for (i, row) in a.iter_mut().enumerate() {
                if i != c {
                    let f = Rational::from(&row[c] / &pivot_row[c]);
                    for (x, q) in row.iter_mut().zip(&pivot_row) {
                        *x -= Rational::from(&f * q);
                    }
                }
            }
        }
        let mut x: Vec<Rational> = (0..n)
            .map(|i| -Rational::from(&a[i][n] / &a[i][i]))
            .collect();
        x.push(Rational::from(1));
        x
    }

    #[test]
    fn null_vector_of_pseudo_random_matrices() {
        // k × (k+1) matrices with entries in [−50, 50], some with a dependent last row (then
        // the first free column is used): the result must be a non-zero null vector. A wrong
        // exact division would leave garbage, caught by the product.
        let mut state = 0x2545_f491_4f6c_dd1du64;
        let mut entry = || {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            Integer::from((state >> 33) as i64 % 101 - 50)
        };
        for k in 1..=16 {
            let mut matrix: Vec<Vec<Integer>> =
                (0..k).map(|_| (0..=k).map(|_| entry()).collect()).collect();
            if k % 3 == 0 {
                let combination: Vec<Integer> = matrix[0]
                    .iter()
                    .zip(&matrix[1])
                    .map(|(a, b)| Integer::from(a * 3) - b)
                    .collect();
                matrix[k - 1] = combination;
            }
            let vector = null_vector(matrix.clone(), k + 1);
            assert_null_vector(&matrix, &vector);
        }
    }

    #[test]
    fn null_vector_with_a_free_column_in_the_middle() {
        // Column 1 is twice column 0: the first free column is 1, null vector (2, −1, 0).
        let vector = null_vector(vec![ints(&[1, 2, 0]), ints(&[3, 6, 1])], 3);
        let mut v = vector.clone();
        make_primitive(&mut v);
        assert!(v == ints(&[2, -1, 0]) || v == ints(&[-2, 1, 0]), "{v:?}");
    }

    #[test]
    fn direct_expansion_of_x_plus_inverse_is_central_binomial() {
        // [ (x + 1/x)ⁿ ]₀ = C(n, n/2) for even n, 0 for odd n (binomial theorem).
        let u = constant_terms_direct(&[([1, 0], 1), ([-1, 0], 1)], 30);
        for (n, value) in u.iter().enumerate() {
            let expected = if n % 2 == 0 {
                Integer::from(Integer::binomial_u(n as u32, n as u32 / 2))
            } else {
                Integer::new()
            };
            assert_eq!(*value, expected, "n = {n}");
        }
    }

    #[test]
    fn modular_walks_agree_with_exact_walks() {
        // Negative coefficients too: (x − 2 + 3/y)ⁿ, exact values reduced vs residues.
        let phi = [([1, 0], 1), ([0, 0], -2), ([0, -1], 3), ([-1, 1], 5)];
        let exact = constant_terms_direct(&phi, 40);
        let modular = closed_walks::<Residue>(&phi, 40);
        assert!(exact.iter().any(|v| Integer::from(v.abs_ref()) > PRIME));
        for (e, m) in exact.iter().zip(&modular) {
            assert_eq!(Residue::from_integer(e), *m);
        }
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

    #[test]
    fn extend_falls_back_at_a_singular_step_and_reports_it_otherwise() {
        // (n − 1)·u(n+1) − u(n) = 0 is singular at n = 1 (index 2).
        let rec = Recurrence {
            coeffs: vec![ints(&[-1, 0]), ints(&[-1, 1])],
        };
        assert_eq!(rec.singular_steps(10), vec![1]);
        assert_eq!(
            rec.extend(&ints(&[1]), 3),
            Err(RecurrenceError::SingularStep { n: 1 })
        );
        // u₁ = −u₀ = −1 from n = 0; u₂ = 7 taken from the initial values; u₃ = u₂/1 = 7.
        assert_eq!(
            rec.extend(&ints(&[1, 99, 7]), 3).unwrap(),
            ints(&[1, -1, 7, 7])
        );
    }

    #[test]
    fn extend_reports_a_non_integral_step() {
        // 2·u(n+1) − u(n) = 0 from u₀ = 1 gives u₁ = 1/2.
        let rec = Recurrence {
            coeffs: vec![ints(&[-1]), ints(&[2])],
        };
        assert_eq!(
            rec.extend(&ints(&[1]), 2),
            Err(RecurrenceError::InexactStep { n: 0 })
        );
    }

    #[test]
    fn display_writes_powers_of_n() {
        let rec = Recurrence {
            coeffs: vec![ints(&[-16, -32, -16]), ints(&[0, 0, 0]), ints(&[4, 4, 1])],
        };
        assert_eq!(
            rec.to_string(),
            "(n^2 + 4n + 4)·u(n+2) + (−16n^2 − 32n − 16)·u(n) = 0"
        );
        assert_eq!((rec.order(), rec.degree()), (2, 2));
    }
}
