//! The recurrence `Σ_{j=0}^{r} p_j(n) u_{n+j} = 0` with polynomial coefficients: evaluation,
//! residuals, the exact check, running it forward, its singular steps, and its display.
//!
//! # Method
//! `p_j(n)` by nested multiplication on arbitrary-size integers. Running the recurrence
//! forward, `u_{n+r} = −Σ_{j<r} p_j(n) u_{n+j} / p_r(n)`, is one exact division per step: a
//! non-zero remainder means the recurrence is wrong there (the terms are integers). Where
//! `p_r(n) = 0` the step is singular and the value must come from elsewhere. The equation at
//! n, read as a linear form in the unknown coefficients of the `p_j`, gives the rows of the
//! linear systems that determine a recurrence from its terms.
//!
//! # Accuracy
//! Exact; no rounding anywhere.
//!
//! # Errors
//! [`RecurrenceError::Mismatch`] (a residual is not zero), [`RecurrenceError::TooFewTerms`]
//! (fewer initial values than the order), [`RecurrenceError::SingularStep`] (`p_r(n) = 0`
//! without a value to fall back to), [`RecurrenceError::InexactStep`] (a step does not divide).
//!
//! # References
//! - "Differentiably finite power series", European J. Combin. 1 (1980) 175–188
//!   (P-recursive sequences).

use super::RecurrenceError;
use rug::Integer;
use std::fmt;

/// `Σ_{j=0}^{order} p_j(n) u_{n+j} = 0` for all n ≥ 0, `p_j(n) = Σ_k coeffs[j][k] nᵏ`.
///
/// As returned by [`guess`](super::guess): every `coeffs[j]` has length `degree + 1`, the
/// coefficients are coprime and the leading coefficient of `p_order` is positive.
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
    /// use regwave::curve::constant_terms::{guess, Term};
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
    /// use regwave::curve::constant_terms::guess;
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

/// Unknown `j·(d+1) + k` is the coefficient of nᵏ in `p_j`; equation n reads
/// `Σ_{j,k} nᵏ u_{n+j} · unknown = 0`.
pub(super) fn equation_row<T>(
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::curve::constant_terms::tests::ints;

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
