//! The tempered Laurent polynomial φ of a strip reflexive polygon, its strip decomposition
//! `φ = A(x)·y + B(x) + C(x)/y`, evaluation, classical minimum, and exact constant terms `[φⁿ]₀`.
//!
//! # Formula
//! `φ(x, y) = Σ_{m ∈ ∂Δ} c_m x^{m₁} y^{m₂}` over the boundary lattice points, constant term 0.
//! Along an edge of lattice length ℓ with lattice points m₀, …, m_ℓ the coefficients are
//! `c_{m_j} = C(ℓ, j)` (edge polynomial `(w + 1)^ℓ`): with these the tame symbols of {−x, −y}
//! at the boundary points are 1 (the symbol is *tempered*), which is what makes the Beilinson
//! regulator well defined on the curve `φ + a = 0`. Other coefficients are rejected.
//!
//! In strip form (every lattice point at m₂ ∈ {−1, 0, 1}) `A`, `B`, `C` are the Laurent
//! polynomials in x collecting the terms with m₂ = 1, 0, −1.
//!
//! # Accuracy
//! Coefficients and constant terms are exact integers; evaluation is at the precision of the
//! arguments ([`CNum`]). The classical minimum is computed by Newton's method in f64 (relative
//! accuracy ≈ 1e-15), which is all its uses need (it fixes a unitary frame, not a result).
//!
//! # Errors
//! [`LaurentError`]: non-binomial edge coefficients, coefficients off the boundary, a
//! polygon that is not in strip form (for [`Laurent::strip_parts`]).
//!
//! # References
//! Tempered Laurent polynomials and the regulator: "Mahler's measure and the dilogarithm (I)",
//! Canad. J. Math. 54 (2002); "Modular Mahler measures I", Topics in Number Theory (1999).
//! See `docs/REFERENCES.md`.

use crate::curve::constant_terms::{self, RecurrenceError, Term};
use crate::lattice::polygon::{LatticePoint, Polygon};
use crate::numerics::complex::CNum;
use rug::Integer;
use std::fmt;
use thiserror::Error;

/// Why a set of coefficients cannot be used.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
#[non_exhaustive]
pub enum LaurentError {
    /// A boundary coefficient differs from the binomial one of its edge.
    #[error(
        "coefficient {given} at {point:?} is not tempered: on the edge {from:?}–{to:?} (lattice length {length}) \
         the tame symbols of {{-x,-y}} are all 1 only for the binomial coefficients of (w+1)^{length}, \
         which give {expected} here; with other coefficients the regulator is not defined on the curve"
    )]
    NotTempered {
        point: LatticePoint,
        given: i64,
        expected: i64,
        from: LatticePoint,
        to: LatticePoint,
        length: usize,
    },
    /// A coefficient was given at a point that is not a boundary lattice point.
    #[error("coefficient given at {point:?}, which is not a boundary lattice point of the polygon{}",
        if *point == [0, 0] { " (the constant term is the modulus a, not part of φ)" } else { "" })]
    OffBoundary { point: LatticePoint },
    /// The same point was given twice.
    #[error("coefficient at {point:?} given twice")]
    Repeated { point: LatticePoint },
    /// The polygon has a lattice point with |m₂| > 1.
    #[error("the polygon is not in strip form: the point {point:?} has |m2| > 1")]
    NotStrip { point: LatticePoint },
    /// Malformed `--coefficients` text.
    #[error("cannot read coefficients from {text:?}: {reason}; expected e.g. \"(1,0)=1,(0,1)=1,(-1,-1)=1\"")]
    Parse { text: String, reason: String },
}

/// A Laurent polynomial in one variable, `Σ c_k x^k`, exponents increasing.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Univariate {
    /// `(k, c_k)` with `c_k ≠ 0`, k increasing.
    pub terms: Vec<(i64, i64)>,
}

impl Univariate {
    /// Value at x (x ≠ 0 when there are negative exponents).
    pub fn eval<T: CNum>(&self, x: &T) -> T {
        let mut acc = x.int_like(0);
        for &(k, c) in &self.terms {
            acc = acc + x.powi(k) * x.int_like(c);
        }
        acc
    }

    /// Derivative `x·d/dx` applied: `Σ k c_k x^k`.
    pub fn euler_derivative(&self) -> Univariate {
        Univariate {
            terms: self
                .terms
                .iter()
                .filter(|t| t.0 != 0)
                .map(|&(k, c)| (k, k * c))
                .collect(),
        }
    }

    /// Value at x = −1.
    pub fn at_minus_one(&self) -> i64 {
        self.terms
            .iter()
            .map(|&(k, c)| if k.rem_euclid(2) == 0 { c } else { -c })
            .sum()
    }

    /// Human-readable form in the variable `var`.
    pub fn render(&self, var: &str) -> String {
        render_terms(self.terms.iter().map(|&(k, c)| (c, monomial(&[(var, k)]))))
    }
}

/// The strip decomposition `φ = A(x)·y + B(x) + C(x)/y`.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct StripParts {
    pub a: Univariate,
    pub b: Univariate,
    pub c: Univariate,
}

/// A tempered Laurent polynomial with integer coefficients on the boundary of a reflexive polygon.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Laurent {
    terms: Vec<Term>,
}

impl Laurent {
    /// φ of a polygon with the binomial (tempered) edge coefficients.
    pub fn tempered(polygon: &Polygon) -> Laurent {
        let mut terms: Vec<Term> = Vec::new();
        for edge in polygon.edges() {
            let len = edge.len() - 1;
            for (j, m) in edge.iter().enumerate() {
                if terms.iter().all(|t| t.0 != *m) {
                    terms.push((*m, binomial(len, j)));
                }
            }
        }
        terms.sort();
        Laurent { terms }
    }

    /// φ from user-supplied coefficients, accepted only if they are the tempered ones.
    /// Boundary points that are not mentioned get their binomial coefficient.
    ///
    /// # Errors
    /// [`LaurentError::NotTempered`], [`LaurentError::OffBoundary`], [`LaurentError::Repeated`].
    pub fn with_coefficients(polygon: &Polygon, given: &[Term]) -> Result<Laurent, LaurentError> {
        let tempered = Laurent::tempered(polygon);
        for (i, &(point, c)) in given.iter().enumerate() {
            if given[..i].iter().any(|t| t.0 == point) {
                return Err(LaurentError::Repeated { point });
            }
            let edge = polygon
                .edges()
                .into_iter()
                .find_map(|e| e.iter().position(|q| *q == point).map(|j| (e, j)));
            let Some((edge, j)) = edge else {
                return Err(LaurentError::OffBoundary { point });
            };
            let length = edge.len() - 1;
            let expected = binomial(length, j);
            if c != expected {
                return Err(LaurentError::NotTempered {
                    point,
                    given: c,
                    expected,
                    from: edge[0],
                    to: edge[length],
                    length,
                });
            }
        }
        Ok(tempered)
    }

    /// φ from explicit terms, trusted as given (no tempering check): for tests and examples
    /// that need a polynomial without a polygon. Commands use [`Laurent::tempered`] or
    /// [`Laurent::with_coefficients`].
    pub fn from_terms(mut terms: Vec<Term>) -> Laurent {
        terms.sort();
        Laurent { terms }
    }

    /// The terms `(m, c_m)`, sorted by m.
    pub fn terms(&self) -> &[Term] {
        &self.terms
    }

    /// `φ(x, y)` at the precision of the arguments.
    pub fn eval<T: CNum>(&self, x: &T, y: &T) -> T {
        let mut acc = x.int_like(0);
        for &([m1, m2], c) in &self.terms {
            acc = acc + x.powi(m1) * y.powi(m2) * x.int_like(c);
        }
        acc
    }

    /// Sum of the coefficients, `φ(1, 1)`: the series in 1/a at a = ∞ converges for |a| above it.
    pub fn coefficient_sum(&self) -> i64 {
        self.terms.iter().map(|t| t.1).sum()
    }

    /// `A`, `B`, `C` of the strip decomposition.
    ///
    /// # Errors
    /// [`LaurentError::NotStrip`] when a term has |m₂| > 1.
    pub fn strip_parts(&self) -> Result<StripParts, LaurentError> {
        let mut parts = [
            Univariate::default(),
            Univariate::default(),
            Univariate::default(),
        ];
        for &([m1, m2], c) in &self.terms {
            if m2.abs() > 1 {
                return Err(LaurentError::NotStrip { point: [m1, m2] });
            }
            parts[(1 - m2) as usize].terms.push((m1, c));
        }
        for p in &mut parts {
            p.terms.sort();
        }
        let [a, b, c] = parts;
        Ok(StripParts { a, b, c })
    }

    /// Exact `[φⁿ]₀` for n = 0..=n_max (via the recurrence the sequence satisfies).
    ///
    /// # Errors
    /// See [`constant_terms::constant_terms`].
    pub fn constant_terms(&self, n_max: usize) -> Result<Vec<Integer>, RecurrenceError> {
        constant_terms::constant_terms(&self.terms, n_max)
    }

    /// The classical Hamiltonian `H(r, p) = φ(e^r, e^p)` with its gradient and Hessian.
    pub fn hamiltonian(&self, z: [f64; 2]) -> (f64, [f64; 2], [[f64; 2]; 2]) {
        let mut h = 0.0;
        let mut g = [0.0; 2];
        let mut hess = [[0.0; 2]; 2];
        for &([m1, m2], c) in &self.terms {
            let m = [m1 as f64, m2 as f64];
            let w = c as f64 * (m[0] * z[0] + m[1] * z[1]).exp();
            h += w;
            for i in 0..2 {
                g[i] += w * m[i];
                for j in 0..2 {
                    hess[i][j] += w * m[i] * m[j];
                }
            }
        }
        (h, g, hess)
    }

    /// The classical minimum `min_{x,y>0} φ(x, y)` and where it is attained, `(r*, p*)` with
    /// `x = e^{r*}`, `y = e^{p*}`. The spectrum of the quantum curve lies above this value.
    ///
    /// Newton's method on the strictly convex `H(r, p)` (a positive sum of exponentials whose
    /// exponents span a polygon around the origin), with step halving.
    pub fn classical_minimum(&self) -> ([f64; 2], f64) {
        let mut z = [0.0f64; 2];
        for _ in 0..200 {
            let (h, g, m) = self.hamiltonian(z);
            let det = m[0][0] * m[1][1] - m[0][1] * m[1][0];
            let step = [
                (m[1][1] * g[0] - m[0][1] * g[1]) / det,
                (m[0][0] * g[1] - m[1][0] * g[0]) / det,
            ];
            let mut t = 1.0;
            loop {
                let trial = [z[0] - t * step[0], z[1] - t * step[1]];
                if self.hamiltonian(trial).0 <= h || t < 1e-12 {
                    z = trial;
                    break;
                }
                t *= 0.5;
            }
            if step[0].abs().max(step[1].abs()) < 1e-15 {
                break;
            }
        }
        (z, self.hamiltonian(z).0)
    }

    /// The spectral threshold `min_{x,y>0} φ(x, y)` at `bits` bits: the f64 minimiser of
    /// [`Laurent::classical_minimum`] refined by Newton's method on ∇H = 0 at `bits` bits
    /// (quadratic convergence from ~1e-15: ⌈log₂(bits/40)⌉ + 2 steps). The value at the minimum
    /// is stationary, so it is accurate to a few units in the last place. Used to decide,
    /// by an exact comparison at the working precision, whether a modulus lies above it.
    pub fn threshold_at(&self, bits: u32) -> rug::Float {
        use rug::Float;
        let ([r0, p0], _) = self.classical_minimum();
        let mut z = [Float::with_val(bits, r0), Float::with_val(bits, p0)];
        let steps = (bits as f64 / 40.0).log2().ceil().max(0.0) as usize + 2;
        let mut h = Float::new(bits);
        for k in 0..=steps {
            h = Float::new(bits);
            let mut g = [Float::new(bits), Float::new(bits)];
            let mut m = [
                [Float::new(bits), Float::new(bits)],
                [Float::new(bits), Float::new(bits)],
            ];
            for &([m1, m2], c) in &self.terms {
                let e = Float::with_val(bits, &z[0] * m1) + Float::with_val(bits, &z[1] * m2);
                let w = e.exp() * c;
                let mm = [m1, m2];
                for i in 0..2 {
                    g[i] += Float::with_val(bits, &w * mm[i]);
                    for j in 0..2 {
                        m[i][j] += Float::with_val(bits, &w * (mm[i] * mm[j]));
                    }
                }
                h += w;
            }
            if k == steps {
                break;
            }
            let det = Float::with_val(bits, &m[0][0] * &m[1][1])
                - Float::with_val(bits, &m[0][1] * &m[1][0]);
            let d0 = (Float::with_val(bits, &m[1][1] * &g[0])
                - Float::with_val(bits, &m[0][1] * &g[1]))
                / &det;
            let d1 = (Float::with_val(bits, &m[0][0] * &g[1])
                - Float::with_val(bits, &m[1][0] * &g[0]))
                / &det;
            z[0] -= d0;
            z[1] -= d1;
        }
        h
    }
}

impl fmt::Display for Laurent {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mut terms: Vec<&Term> = self.terms.iter().collect();
        // Display order: by m₂ descending, then m₁ descending.
        terms.sort_by_key(|t| (-t.0[1], -t.0[0]));
        let s = render_terms(
            terms
                .iter()
                .map(|&&([m1, m2], c)| (c, monomial(&[("x", m1), ("y", m2)]))),
        );
        f.write_str(&s)
    }
}

/// C(n, k) for the small edge lengths of reflexive polygons (n ≤ 60).
fn binomial(n: usize, k: usize) -> i64 {
    (0..k).fold(1i64, |acc, i| acc * (n - i) as i64 / (i + 1) as i64)
}

fn monomial(vars: &[(&str, i64)]) -> (String, String) {
    let mut num = Vec::new();
    let mut den = Vec::new();
    for &(v, k) in vars {
        match k {
            0 => {}
            1 => num.push(v.to_string()),
            -1 => den.push(v.to_string()),
            k if k > 0 => num.push(format!("{v}^{k}")),
            k => den.push(format!("{v}^{}", -k)),
        }
    }
    (num.join(""), den.join(""))
}

fn render_terms(terms: impl Iterator<Item = (i64, (String, String))>) -> String {
    let mut out = String::new();
    for (c, (num, den)) in terms {
        let sign = if c < 0 { "-" } else { "+" };
        let c = c.abs();
        let coeff = if c == 1 && !(num.is_empty() && den.is_empty()) {
            String::new()
        } else {
            c.to_string()
        };
        let body = match (num.is_empty(), den.is_empty()) {
            (true, true) => coeff,
            (false, true) => format!("{coeff}{num}"),
            (true, false) => format!(
                "{}/{den}",
                if coeff.is_empty() { "1".into() } else { coeff }
            ),
            (false, false) => format!("{coeff}{num}/{den}"),
        };
        if out.is_empty() {
            out = if sign == "-" {
                format!("-{body}")
            } else {
                body
            };
        } else {
            out.push_str(&format!(" {sign} {body}"));
        }
    }
    if out.is_empty() {
        "0".into()
    } else {
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn binomials() {
        assert_eq!(binomial(4, 2), 6);
        assert_eq!(binomial(3, 0), 1);
        assert_eq!(binomial(3, 3), 1);
    }

    #[test]
    fn rendering() {
        let u = Univariate {
            terms: vec![(-1, 1), (0, 2), (1, 1)],
        };
        assert_eq!(u.render("x"), "1/x + 2 + x");
        assert_eq!(u.at_minus_one(), 0);
    }
}
