//! The Picard–Fuchs operator of a family at the large-modulus point a = ∞, and its Frobenius
//! basis there.
//!
//! # Formulas and conventions (`docs/MATHEMATICS.md` §8)
//! Variable **t = 1/a** (not −1/a: then log t = −log a is real on the spectral range a > 0).
//! With `u_n = [φⁿ]₀` and the exact recurrence `Σ_j p_j(n) u_{n+j} = 0` of
//! [`crate::curve::constant_terms`], the coefficients `w_n = (−1)ⁿ u_n` of
//! `f₀(t) = Σ w_n tⁿ` satisfy the sign-twisted recurrence `Σ_j q_j(n) w_{n+j} = 0`,
//! `q_j = (−1)^j p_j`, and `Ω_α = −2πi t f₀(t)`. With θ = t d/dt the recurrence of order r and
//! degree d is the differential operator
//!
//! `L = Σ_{j=0}^{r} t^{r−j} q_j(θ − j) = Σ_{k=0}^{d} P_k(t) θ^k`,
//!
//! of order d in θ and degree r in t: the coefficient of t^{m} of `L Σ w_n tⁿ` is
//! `Σ_j q_j(m − r) w_{m−r+j}` (w at negative indices zero). It vanishes for m ≥ r by the
//! recurrence; for m < r (the boundary terms) it is checked exactly ([`PicardFuchsError::BoundaryTermsNonzero`]
//! otherwise: a recurrence guessed for n ≥ 0 need not hold at negative n; it does for all 15
//! families). So `L f₀ = 0` exactly.
//!
//! **Indicial polynomial** at t = 0: `q_r(s − r)`. Maximal unipotent monodromy needs a double
//! root at s = 0 ([`PicardFuchsError::NotMaximallyUnipotent`] otherwise). **Frobenius basis**: with
//! `w_n(ε) = w_n + ε v_n`, `w_0(ε) = 1`, defined by the ε-shifted recurrence
//! `Σ_j q_j(n + ε) w_{n+j}(ε) = O(ε²)` for n ≥ 1 − r, `L(t^ε Σ w_n(ε) tⁿ) = t^ε q_r(ε − r) = O(ε²)`,
//! so `∂_ε` at ε = 0 gives the logarithmic solution
//!
//! `f₁(t) = f₀(t) log t + g(t)`, `g = Σ_{n≥1} v_n tⁿ`,
//! `v_{n+r} = (N₁ q_r(n) − N₀ q_r′(n)) / q_r(n)²`, `N₀ = −Σ_{j<r} q_j(n) w_{n+j}`,
//! `N₁ = −Σ_{j<r} (q_j(n) v_{n+j} + q_j′(n) w_{n+j})`.
//!
//! The v_n are exact rationals (cached per family, extended on demand). A further indicial root
//! at a positive integer s would make a step divide by zero ([`PicardFuchsError::Resonance`]); none of the 15
//! families has one.
//!
//! **Order > 2.** The minimal recurrence of F1 and dP2 has order 4 and degree 3, so L has order
//! 3 in θ: `p_4(n) = (n + 4)²(283n + 593)` adds the exponent s = 4 − 593/283 at t = 0, not an
//! integer, whose solution is not a period. f₀ and f₁ are built exactly as above; the periods
//! (a two-dimensional space) lie in their span, which the series/path agreement confirms.
//!
//! **Singular points** are the zeros t_s of the leading coefficient P_d(t) (and t = ∞). Each is
//! classified by the curve at a_s = 1/t_s: if the discriminant of φ + a_s has a double root in x
//! (or vanishes identically: φ + a_s factors, as for F0*, F1*, F2* at a_s = 4), the curve is
//! singular and −a_s is a **critical value** of φ; otherwise the point is
//! **apparent** (all solutions holomorphic there: it does not limit convergence). The series
//! in t converge for |a| > [`PicardFuchs::radius`], the largest |a_s| of a critical value.
//!
//! # Accuracy
//! Coefficients exact (integers and rationals); evaluation at the precision of t. The number of
//! terms N is chosen from q = radius/|a| so that `q^N N² ≤ 2^{−bits−16}` (coefficients grow
//! like radiusⁿ times a power of n, the log part like n times more); the stated tail estimate
//! is the size of the last terms times q/(1 − q). This is an estimate, not a rigorous bound;
//! it is validated against path integration at 30 and 100 digits from 1.1 × radius to 10⁴⁰
//! (`tests/periods.rs`).
//!
//! # Errors
//! [`PicardFuchsError`].
//!
//! # References
//! - "Differentiably finite power series", European J. Combin. 1 (1980) 175–188 (recurrences
//!   and differential operators).
//! - Frobenius' method at a regular singular point with a repeated exponent: "Ordinary
//!   Differential Equations" (E. L. Ince, 1926), ch. XVI.
//! - Maximal unipotent monodromy at the large-modulus point of local mirror curves:
//!   "Topological strings from quantum mechanics", arXiv:1410.3382 (2014).

use crate::curve::constant_terms::{Recurrence, RecurrenceError};
use crate::curve::cover::{CoverError, Curve};
use crate::curve::laurent::Laurent;
use crate::numerics::roots::{polynomial_roots, RootsError};
use crate::precision::{
    frobenius_terms, FROBENIUS_MAX_TERMS, SINGULAR_POINT_BITS, SINGULAR_POINT_SPLIT,
};
use rug::ops::Pow;
use rug::{Complex, Float, Integer, Rational};
use std::sync::{Arc, Mutex};
use thiserror::Error;

/// Why the operator or its Frobenius basis could not be built.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum PicardFuchsError {
    #[error(transparent)]
    Recurrence(#[from] RecurrenceError),
    #[error(transparent)]
    Roots(#[from] RootsError),
    #[error(transparent)]
    Cover(#[from] CoverError),
    /// The recurrence does not hold at negative n with zero terms there.
    #[error("the recurrence leaves the boundary term of t^{power} nonzero: L f₀ ≠ 0")]
    BoundaryTermsNonzero { power: usize },
    /// The indicial polynomial has no double root at 0.
    #[error("the indicial polynomial has no double root at 0: a = ∞ is not a point of maximal unipotent monodromy")]
    NotMaximallyUnipotent,
    /// Another exponent at a positive integer: the ε-step divides by zero.
    #[error("the indicial polynomial vanishes at the positive integer {exponent}: the Frobenius recursion is resonant")]
    Resonance { exponent: usize },
    /// L applied to a truncated Frobenius series leaves a nonzero coefficient.
    #[error("L applied to the {solution} solution leaves a nonzero coefficient of t^{power}")]
    NotAnnihilated {
        solution: &'static str,
        power: usize,
    },
    /// |a| not above the radius of convergence.
    #[error("the series at a = infinity needs |a| > {radius}, got |a| = {modulus}")]
    OutsideRadius { modulus: f64, radius: f64 },
    /// So close to the radius that the series would need too many terms.
    #[error("the series at a = infinity would need {needed} terms this close to its radius (at most {max})")]
    TooManyTerms { needed: usize, max: usize },
    /// No singular point other than t = 0 makes the curve singular.
    #[error("the operator has no singular point where the curve degenerates")]
    NoCriticalValue,
}

/// One finite nonzero singular point of L.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SingularPoint {
    /// a_s = 1/t_s (re, im).
    pub modulus: [f64; 2],
    /// True if the curve φ + a_s = 0 is singular (−a_s a critical value of φ); false for an
    /// apparent singularity.
    pub critical: bool,
    /// Smallest relative distance of two zeros of the discriminant at a_s.
    pub root_separation: f64,
}

/// The operator L, its singular points and the Frobenius coefficients at t = 0.
#[derive(Debug)]
pub struct PicardFuchs {
    /// The sign-twisted recurrence `Σ_j q_j(n) w_{n+j} = 0` (t = 1/a).
    pub recurrence: Recurrence,
    /// `P_k(t)` for k = 0..=d, coefficients low → high in t: `L = Σ_k P_k(t) θ^k`.
    pub theta_form: Vec<Vec<Integer>>,
    /// The finite nonzero singular points, critical and apparent.
    pub singular_points: Vec<SingularPoint>,
    /// max |a_s| over the critical values: the series converge for |a| > radius.
    pub radius: f64,
    laurent: Laurent,
    coefficients: Mutex<Arc<Coefficients>>,
}

/// The exact Frobenius coefficients w_n (integers) and v_n (rationals), n = 0..len.
#[derive(Debug, Clone, Default)]
pub struct Coefficients {
    pub w: Vec<Integer>,
    pub v: Vec<Rational>,
}

/// The Frobenius sums at one t (all at the precision of t): f₀, θf₀, θ²f₀, g, θg, θ²g and the
/// sums of the t-integrals `I₁ = Σ_{n≥1} w_n tⁿ/n`, `I₂ = Σ_{n≥1} w_n tⁿ/n²`,
/// `J₁ = Σ_{n≥1} v_n tⁿ/n`.
#[derive(Debug, Clone)]
pub struct FrobeniusSums {
    pub f: [Complex; 3],
    pub g: [Complex; 3],
    pub i1: Complex,
    pub i2: Complex,
    pub j1: Complex,
    /// Terms summed.
    pub terms: usize,
    /// Estimated relative size of the omitted tail (see the module doc).
    pub tail: f64,
}

impl PicardFuchs {
    /// The operator of φ from its constant-term recurrence.
    ///
    /// # Errors
    /// See [`PicardFuchsError`].
    pub fn new(laurent: &Laurent) -> Result<Self, PicardFuchsError> {
        let (rec, u) =
            crate::curve::constant_terms::constant_terms_with_recurrence(laurent.terms(), 64)?;
        let recurrence = Recurrence {
            coeffs: rec
                .coeffs
                .iter()
                .enumerate()
                .map(|(j, p)| {
                    if j % 2 == 0 {
                        p.clone()
                    } else {
                        p.iter().map(|c| Integer::from(-c)).collect()
                    }
                })
                .collect(),
        };
        let w = twist(&u);
        let r = recurrence.order();
        // Indicial polynomial q_r(s − r): double root at s = 0.
        let lead = &recurrence.coeffs[r];
        let at = |s: i64| eval(lead, &Integer::from(s - r as i64));
        let slope = eval(&derivative(lead), &Integer::from(-(r as i64)));
        if !at(0).is_zero() || !slope.is_zero() {
            return Err(PicardFuchsError::NotMaximallyUnipotent);
        }
        // Boundary terms: Σ_j q_j(m − r) w_{m−r+j} for m = 1..r−1.
        for m in 1..r {
            if !boundary_term(&recurrence, &w, m).is_zero() {
                return Err(PicardFuchsError::BoundaryTermsNonzero { power: m });
            }
        }
        let theta_form = theta_form(&recurrence);
        let singular_points = singular_points(laurent, &theta_form)?;
        let radius = singular_points
            .iter()
            .filter(|s| s.critical)
            .map(|s| s.modulus[0].hypot(s.modulus[1]))
            .fold(0.0, f64::max);
        if radius == 0.0 {
            return Err(PicardFuchsError::NoCriticalValue);
        }
        let pf = PicardFuchs {
            recurrence,
            theta_form,
            singular_points,
            radius,
            laurent: laurent.clone(),
            coefficients: Mutex::new(Arc::new(Coefficients::default())),
        };
        pf.coefficients(64)?;
        Ok(pf)
    }

    /// The order of L in θ.
    pub fn order(&self) -> usize {
        self.theta_form.len() - 1
    }

    /// The exact coefficients w_n, v_n for n = 0..=n_max (cached, extended on demand).
    ///
    /// # Errors
    /// [`PicardFuchsError::Recurrence`], [`PicardFuchsError::Resonance`].
    pub fn coefficients(&self, n_max: usize) -> Result<Arc<Coefficients>, PicardFuchsError> {
        let mut cache = self.coefficients.lock().unwrap_or_else(|e| e.into_inner());
        if cache.w.len() > n_max {
            return Ok(Arc::clone(&cache));
        }
        let n_max = n_max.max(2 * cache.w.len());
        let w = twist(&self.laurent.constant_terms(n_max)?);
        let v = log_coefficients(&self.recurrence, &w, &cache.v)?;
        *cache = Arc::new(Coefficients { w, v });
        Ok(Arc::clone(&cache))
    }

    /// Checks exactly that L annihilates f₀ and f₁ = f₀ log t + g truncated after `n` terms:
    /// every coefficient of t^m, m < n, of `L f₀` and of `L′f₀ + L g` vanishes, with L applied
    /// in its θ-form (`L′ = Σ_k k P_k θ^{k−1}` comes from `θ^k(h log t) = log t θ^k h + kθ^{k−1}h`).
    ///
    /// # Errors
    /// [`PicardFuchsError::NotAnnihilated`] at the first nonzero coefficient.
    pub fn check_exact(&self, n: usize) -> Result<(), PicardFuchsError> {
        let c = self.coefficients(n)?;
        let w: Vec<Rational> = c.w[..n].iter().map(Rational::from).collect();
        let v = &c.v[..n];
        let derived: Vec<Vec<Integer>> = self
            .theta_form
            .iter()
            .enumerate()
            .skip(1)
            .map(|(k, p)| p.iter().map(|x| Integer::from(x * k as u32)).collect())
            .collect();
        for m in 0..n {
            if !apply(&self.theta_form, &w, m).is_zero() {
                return Err(PicardFuchsError::NotAnnihilated {
                    solution: "holomorphic",
                    power: m,
                });
            }
            let log_part = apply(&derived, &w, m) + apply(&self.theta_form, v, m);
            if !log_part.is_zero() {
                return Err(PicardFuchsError::NotAnnihilated {
                    solution: "logarithmic",
                    power: m,
                });
            }
        }
        Ok(())
    }

    /// The Frobenius sums at t = 1/a for |a| > radius, at the precision of `t`.
    ///
    /// # Errors
    /// [`PicardFuchsError::OutsideRadius`], [`PicardFuchsError::TooManyTerms`]; [`PicardFuchsError::Recurrence`],
    /// [`PicardFuchsError::Resonance`] while extending the coefficients.
    pub fn sums(&self, t: &Complex) -> Result<FrobeniusSums, PicardFuchsError> {
        let bits = t.prec().0;
        let q = self.radius * t.abs_f64_like();
        if !(q < 1.0) {
            return Err(PicardFuchsError::OutsideRadius {
                modulus: 1.0 / t.abs_f64_like(),
                radius: self.radius,
            });
        }
        let n = frobenius_terms(q, bits);
        if n > FROBENIUS_MAX_TERMS {
            return Err(PicardFuchsError::TooManyTerms {
                needed: n,
                max: FROBENIUS_MAX_TERMS,
            });
        }
        let c = self.coefficients(n)?;
        let zero = || Complex::new(bits);
        let (mut f, mut g) = ([zero(), zero(), zero()], [zero(), zero(), zero()]);
        let (mut i1, mut i2, mut j1) = (zero(), zero(), zero());
        let mut power = Complex::with_val(bits, 1);
        let mut last = 0.0f64;
        for k in 0..n {
            let wk = Float::with_val(bits, &c.w[k]);
            let vk = Float::with_val(bits, &c.v[k]);
            let tw = Complex::with_val(bits, &power * &wk);
            let tv = Complex::with_val(bits, &power * &vk);
            if k >= n.saturating_sub(self.recurrence.order() + 1) {
                last = last.max(tw.abs_f64_like().max(tv.abs_f64_like()));
            }
            f[0] += &tw;
            g[0] += &tv;
            if k > 0 {
                let kk = k as u32;
                f[1] += Complex::with_val(bits, &tw * kk);
                f[2] += Complex::with_val(bits, &tw * kk) * kk;
                g[1] += Complex::with_val(bits, &tv * kk);
                g[2] += Complex::with_val(bits, &tv * kk) * kk;
                i1 += Complex::with_val(bits, &tw / kk);
                i2 += Complex::with_val(bits, &tw / kk) / kk;
                j1 += Complex::with_val(bits, &tv / kk);
            }
            power *= t;
        }
        let tail = last * (n as f64) * (n as f64) * q / (1.0 - q);
        Ok(FrobeniusSums {
            f,
            g,
            i1,
            i2,
            j1,
            terms: n,
            tail,
        })
    }
}

/// |z| in double precision (also for values beyond the f64 exponent range: then 0 or ∞).
trait AbsF64 {
    fn abs_f64_like(&self) -> f64;
}

impl AbsF64 for Complex {
    fn abs_f64_like(&self) -> f64 {
        Float::with_val(53, self.abs_ref()).to_f64()
    }
}

/// `(−1)ⁿ uₙ`.
fn twist(u: &[Integer]) -> Vec<Integer> {
    u.iter()
        .enumerate()
        .map(|(n, x)| {
            if n % 2 == 0 {
                x.clone()
            } else {
                Integer::from(-x)
            }
        })
        .collect()
}

/// `Σ_k p[k] xᵏ`.
fn eval(p: &[Integer], x: &Integer) -> Integer {
    p.iter().rev().fold(Integer::new(), |acc, c| acc * x + c)
}

/// The derivative of `Σ_k p[k] nᵏ`.
fn derivative(p: &[Integer]) -> Vec<Integer> {
    p.iter()
        .enumerate()
        .skip(1)
        .map(|(k, c)| Integer::from(c * k as u32))
        .collect()
}

/// `Σ_{j: m−r+j ≥ 0} q_j(m − r) w_{m−r+j}`: the coefficient of t^m of L f₀.
fn boundary_term(rec: &Recurrence, w: &[Integer], m: usize) -> Integer {
    let r = rec.order();
    let n = Integer::from(m as i64 - r as i64);
    (r - m..=r)
        .map(|j| eval(&rec.coeffs[j], &n) * &w[m + j - r])
        .sum()
}

/// The θ-form of `L = Σ_j t^{r−j} q_j(θ − j)`: `P_k[r − j] = [θ^k] q_j(θ − j)` (Taylor shift).
fn theta_form(rec: &Recurrence) -> Vec<Vec<Integer>> {
    let r = rec.order();
    let d = rec.degree();
    let mut out = vec![vec![Integer::new(); r + 1]; d + 1];
    for (j, p) in rec.coeffs.iter().enumerate() {
        // (θ − j)^i = Σ_k C(i, k) θ^k (−j)^{i−k}
        for (i, c) in p.iter().enumerate() {
            for (k, row) in out.iter_mut().enumerate().take(i + 1) {
                let binom = Integer::from(Integer::binomial_u(i as u32, k as u32));
                let shift = Integer::from(-(j as i64)).pow((i - k) as u32);
                row[r - j] += binom * shift * c;
            }
        }
    }
    out
}

/// The coefficient of t^m of `Σ_k P_k(t) θ^k f`, f truncated (exact).
fn apply(theta: &[Vec<Integer>], f: &[Rational], m: usize) -> Rational {
    let mut sum = Rational::new();
    for (k, p) in theta.iter().enumerate() {
        for (i, c) in p
            .iter()
            .enumerate()
            .filter(|(i, c)| *i <= m && !c.is_zero())
        {
            let n = m - i;
            let nk = Integer::from(n).pow(k as u32);
            sum += Rational::from(&f[n] * Rational::from(nk * c));
        }
    }
    sum
}

/// v_n for n < w.len() (v_0 = 0), continuing `known`.
fn log_coefficients(
    rec: &Recurrence,
    w: &[Integer],
    known: &[Rational],
) -> Result<Vec<Rational>, PicardFuchsError> {
    let r = rec.order() as i64;
    let derivs: Vec<Vec<Integer>> = rec.coeffs.iter().map(|p| derivative(p)).collect();
    let mut v: Vec<Rational> = known.to_vec();
    if v.is_empty() {
        v.push(Rational::new());
    }
    while v.len() < w.len() {
        let m = v.len() as i64; // index n + r
        let n = Integer::from(m - r);
        let (mut n0, mut n1) = (Integer::new(), Rational::new());
        for j in 0..r as usize {
            let idx = m - r + j as i64;
            if idx < 0 {
                continue;
            }
            let idx = idx as usize;
            let qj = eval(&rec.coeffs[j], &n);
            let dqj = eval(&derivs[j], &n);
            n0 -= Integer::from(&qj * &w[idx]);
            n1 -= Rational::from(&v[idx] * &qj);
            n1 -= Rational::from(dqj * &w[idx]);
        }
        let lead = eval(&rec.coeffs[r as usize], &n);
        if lead.is_zero() {
            return Err(PicardFuchsError::Resonance {
                exponent: m as usize,
            });
        }
        let dlead = eval(&derivs[r as usize], &n);
        let num = n1 * &lead - Rational::from(n0 * dlead);
        let den = Integer::from(lead.square_ref());
        v.push(num / den);
    }
    Ok(v)
}

/// The zeros of the leading coefficient P_d(t), classified by the curve at a_s = 1/t_s.
fn singular_points(
    laurent: &Laurent,
    theta: &[Vec<Integer>],
) -> Result<Vec<SingularPoint>, PicardFuchsError> {
    let lead = theta.last().map(Vec::as_slice).unwrap_or(&[]);
    let top = lead.iter().rposition(|c| !c.is_zero()).unwrap_or(0);
    if top == 0 {
        return Ok(Vec::new());
    }
    let bits = SINGULAR_POINT_BITS;
    // Each zero once (a multiple zero would be found only to the square root of the precision).
    let coeffs: Vec<Complex> = squarefree(&lead[..=top])
        .iter()
        .map(|c| Complex::with_val(bits, c))
        .collect();
    let mut out = Vec::new();
    for t in polynomial_roots(&coeffs)? {
        if t.abs_f64_like() == 0.0 {
            continue;
        }
        let a = Complex::with_val(bits, t.recip_ref());
        let modulus = [a.real().to_f64(), a.imag().to_f64()];
        // A discriminant vanishing identically: φ + a_s factors, the curve is reducible.
        let roots = match Curve::new(laurent, a) {
            Ok(curve) => curve.branch_points_x()?,
            Err(CoverError::Degenerate { .. }) => Vec::new(),
            Err(e) => return Err(e.into()),
        };
        let mut separation = if roots.is_empty() { 0.0 } else { f64::INFINITY };
        for (i, x) in roots.iter().enumerate() {
            for y in &roots[i + 1..] {
                let d = Complex::with_val(bits, x - y).abs_f64_like();
                let s = x.abs_f64_like().max(y.abs_f64_like());
                separation = separation.min(d / s);
            }
        }
        out.push(SingularPoint {
            modulus,
            critical: separation < SINGULAR_POINT_SPLIT,
            root_separation: separation,
        });
    }
    Ok(out)
}

/// The squarefree part `p / gcd(p, p′)` of an integer polynomial (low → high), over Q.
fn squarefree(p: &[Integer]) -> Vec<Rational> {
    let p: Vec<Rational> = p.iter().map(Rational::from).collect();
    let dp: Vec<Rational> = p
        .iter()
        .enumerate()
        .skip(1)
        .map(|(k, c)| Rational::from(c * k as u32))
        .collect();
    let g = poly_gcd(p.clone(), dp);
    poly_divide(&p, &g).0
}

/// Quotient and remainder of polynomials over Q (low → high; `d` with a nonzero last entry).
fn poly_divide(n: &[Rational], d: &[Rational]) -> (Vec<Rational>, Vec<Rational>) {
    let mut rem = n.to_vec();
    let dl = d.len() - 1;
    if rem.len() <= dl {
        return (vec![Rational::new()], rem);
    }
    let mut quo = vec![Rational::new(); rem.len() - dl];
    for k in (0..quo.len()).rev() {
        let c = Rational::from(&rem[k + dl] / &d[dl]);
        for (i, di) in d.iter().enumerate() {
            rem[k + i] -= Rational::from(&c * di);
        }
        quo[k] = c;
    }
    rem.truncate(dl.max(1));
    (quo, rem)
}

/// The monic gcd of two polynomials over Q (Euclid).
fn poly_gcd(mut a: Vec<Rational>, mut b: Vec<Rational>) -> Vec<Rational> {
    let trim = |p: &mut Vec<Rational>| {
        while p.len() > 1 && p.last().is_some_and(|c| *c == 0) {
            p.pop();
        }
    };
    trim(&mut a);
    trim(&mut b);
    while !(b.len() == 1 && b[0] == 0) {
        let (_, mut r) = poly_divide(&a, &b);
        trim(&mut r);
        a = b;
        b = r;
    }
    let lead = a.last().cloned().unwrap_or_else(|| Rational::from(1));
    a.iter().map(|c| Rational::from(c / &lead)).collect()
}
