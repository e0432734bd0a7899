//! Laurent polynomials in one variable with coefficients of any [`CNum`] type,
//! `x^low · Σ_k c_k x^k`: exact ring operations on the coefficients (the cancellations of integer
//! coefficients stay exact), Horner evaluation with the Euler derivative `x d/dx`, and the size
//! of the terms (a bound on the rounding error of a value).
//!
//! # Accuracy
//! Products and sums are exact when the coefficients are exact (integers and the modulus);
//! evaluation errs by at most a few units of rounding times [`LaurentPoly::term_size`].
//!
//! # References
//! Horner's rule: common practice.

use crate::numerics::complex::CNum;

/// A Laurent polynomial in x with coefficients of type T: `x^low · Σ c_k x^k`.
#[derive(Debug, Clone)]
pub struct LaurentPoly<T> {
    /// The power of x of the first coefficient.
    pub low: i64,
    /// Coefficients from x^low upwards.
    pub coeffs: Vec<T>,
}

impl<T: CNum> LaurentPoly<T> {
    /// The polynomial `Σ c x^k` of integer terms `(k, c)`, at the precision of `like` (its
    /// exponent range always includes 0, so the constant term can be adjusted in place).
    pub fn from_integer_terms(terms: &[(i64, i64)], like: &T) -> Self {
        let low = terms.iter().map(|t| t.0).min().unwrap_or(0).min(0);
        let high = terms.iter().map(|t| t.0).max().unwrap_or(0).max(0);
        let mut coeffs = vec![like.int_like(0); (high - low + 1) as usize];
        for &(k, c) in terms {
            coeffs[(k - low) as usize] = like.int_like(c);
        }
        LaurentPoly { low, coeffs }
    }

    pub fn times(&self, other: &Self) -> Self {
        let zero = self.coeffs[0].int_like(0);
        let mut coeffs = vec![zero; self.coeffs.len() + other.coeffs.len() - 1];
        for (i, a) in self.coeffs.iter().enumerate() {
            for (j, b) in other.coeffs.iter().enumerate() {
                coeffs[i + j] = coeffs[i + j].clone() + a.clone() * b.clone();
            }
        }
        LaurentPoly {
            low: self.low + other.low,
            coeffs,
        }
    }

    pub fn minus(&self, other: &Self) -> Self {
        let low = self.low.min(other.low);
        let high = (self.low + self.coeffs.len() as i64).max(other.low + other.coeffs.len() as i64);
        let zero = self.coeffs[0].int_like(0);
        let mut coeffs = vec![zero; (high - low) as usize];
        for (i, a) in self.coeffs.iter().enumerate() {
            let k = (self.low + i as i64 - low) as usize;
            coeffs[k] = coeffs[k].clone() + a.clone();
        }
        for (i, b) in other.coeffs.iter().enumerate() {
            let k = (other.low + i as i64 - low) as usize;
            coeffs[k] = coeffs[k].clone() - b.clone();
        }
        LaurentPoly { low, coeffs }
    }

    pub fn plus(&self, other: &Self) -> Self {
        let minus_other = LaurentPoly {
            low: other.low,
            coeffs: other.coeffs.iter().map(|c| -c.clone()).collect(),
        };
        self.minus(&minus_other)
    }

    pub fn scaled(&self, n: i64) -> Self {
        let like = &self.coeffs[0];
        LaurentPoly {
            low: self.low,
            coeffs: self
                .coeffs
                .iter()
                .map(|c| c.clone() * like.int_like(n))
                .collect(),
        }
    }

    /// Without leading and trailing zero coefficients (exact zeros: the cancellations of the
    /// integer coefficients).
    pub fn trimmed(&self) -> Self {
        let (coeffs, low) = self.polynomial();
        LaurentPoly { low, coeffs }
    }

    /// The value at x and its Euler derivative `x d/dx`, by Horner's rule on the polynomial part
    /// (`inv` = 1/x supplies the negative powers).
    pub fn eval_with_euler(&self, x: &T, inv: &T) -> (T, T) {
        let n = self.coeffs.len();
        let mut p = self.coeffs[n - 1].clone();
        let mut dp = x.int_like(0);
        for c in self.coeffs[..n - 1].iter().rev() {
            dp = dp * x.clone() + p.clone();
            p = p * x.clone() + c.clone();
        }
        // x^low P(x) and x d/dx of it: x^low (low P + x P').
        let euler = p.clone() * x.int_like(self.low) + dp * x.clone();
        let scale = power(x, inv, self.low);
        (p * scale.clone(), euler * scale)
    }

    /// `Σ |c_k| |x|^k` in f64: the size of the terms, which bounds the rounding error of the
    /// value (relative to the working precision).
    pub fn term_size(&self, x_abs: f64) -> f64 {
        let mut acc = 0.0;
        for c in self.coeffs.iter().rev() {
            acc = acc * x_abs + c.abs_f64();
        }
        acc * x_abs.powi(self.low as i32)
    }

    /// The value at x (see [`LaurentPoly::eval_with_euler`]).
    pub fn eval(&self, x: &T, inv: &T) -> T {
        let n = self.coeffs.len();
        let mut p = self.coeffs[n - 1].clone();
        for c in self.coeffs[..n - 1].iter().rev() {
            p = p * x.clone() + c.clone();
        }
        p * power(x, inv, self.low)
    }

    /// The polynomial `x^{−low} · self` with leading and trailing zero coefficients removed;
    /// returns (coefficients low → high, power of x factored out).
    pub fn polynomial(&self) -> (Vec<T>, i64) {
        let mut c = self.coeffs.clone();
        let mut shift = self.low;
        while c.len() > 1 && c[0].abs_f64() == 0.0 {
            c.remove(0);
            shift += 1;
        }
        while c.len() > 1 && c.last().map(|v| v.abs_f64() == 0.0).unwrap_or(false) {
            c.pop();
        }
        (c, shift)
    }
}

/// `x^k` from x and 1/x by repeated multiplication (|k| is at most a few here).
fn power<T: CNum>(x: &T, inv: &T, k: i64) -> T {
    let base = if k < 0 { inv } else { x };
    let mut acc = x.int_like(1);
    for _ in 0..k.unsigned_abs() {
        acc = acc * base.clone();
    }
    acc
}
