//! The double cover of the z-plane defined by the curve `E_a : A(x) y² + (B(x) + a) y + C(x) = 0`,
//! `x = −e^z`: roots, branch points, punctures, and continuation of a root along a path with
//! Gauss–Legendre integration of the periods' integrands on the way.
//!
//! # Formulas
//! - `Δ = (B + a)² − 4AC`, evaluated from its expanded polynomial `x^k Δ(x)` (coefficients
//!   exact: integers and a). Where the edge of the polygon facing x → 0 or ∞ has lattice length
//!   2 across m₂ = −1..1 (edge polynomial (1 + w)², e.g. F0*, Q7, T6), the two roots merge
//!   asymptotically and the leading terms of (B + a)² and 4AC cancel exactly; the expanded
//!   coefficients carry that cancellation, the unexpanded difference loses it to rounding
//!   (measured for F0* level 1 in double precision: relative error of Δ 8e-7 at |Re z| = 30 and
//!   1 at 45 unexpanded, 2e-16 expanded; `examples/merging_roots.rs`).
//! - `D = y ∂φ/∂y = A y − C/y = 2Ay + B + a = ±√Δ`: the sign is the sheet.
//! - Roots from D: `y = (D − (B + a))/(2A)`, or `2C/(−D − (B + a))` when that avoids the
//!   cancellation; the two roots are those of D = ±√Δ.
//! - `d log y / dz = −x ∂_x φ / D` (implicit differentiation, `dx/x = dz`), with
//!   `x ∂_x φ = A'y + B' + C'/y` (′ = x d/dx); where that sum cancels (merging roots) it is
//!   `(D W + Q)/(2AC)` with the expanded polynomials `W = A'C − AC'` and
//!   `Q = 2ACB' − (B + a)(AC)'` ([`Curve::log_slope`]).
//! - Integrands: `ω = dz / D` and `η = z · d log(−y) = z (d log y/dz) dz`; for the a-derivatives
//!   `A y + C/y = −(B + a)`.
//! - Branch points: zeros of `x^k Δ(x)`, found by the Aberth–Ehrlich iteration and polished by
//!   Newton at the working precision; in z they repeat with period 2πi.
//! - Punctures: zeros of A and C (one root runs to ∞ or 0 there).
//!
//! # Continuation
//! Along each segment of a polyline the step is `h = min(h_max, κ · dist(z, singular set))`
//! (κ = 0.5, h_max = 2); on each step an n-point Gauss–Legendre rule integrates ω and η. The
//! sheet is carried node by node by D, not by y: predictor `D·(1 + w + w²/2)`,
//! `w = ½ (d log Δ/dz)·Δz`, then the nearer of ±√Δ. The two candidates are a factor −1 apart
//! however close the roots y come, so the choice is ambiguous only near a branch point (which
//! the step rule keeps at a distance). Following y instead fails where the roots merge: the
//! relative root gap shrinks like e^{−|Re z|/2} while a second-order predictor over a node
//! spacing of 0.3 errs by ≈ 5e-3 (measured, T6 level 1 at Re z = −20: prediction error 4× the
//! root gap; the old y-following continuation stopped at Re z ≈ −16 for T6, Q7, F1*, F2* and at
//! ≈ ±43 for F0*). If the prediction error approaches |D| the continuation stops with
//! [`CoverError::SheetAmbiguous`] rather than guess. Starting from a point given by its root y,
//! the sheet is the one of ±√Δ nearer to `A y − C/y` ([`Curve::sheet_point`]); [`SheetPoint`]
//! carries D from one continuation to the next.
//!
//! # Accuracy
//! With the step rule the integrand is analytic in a Bernstein ellipse of parameter ρ ≥ 3 + √8
//! ≈ 5.8 around every step (worst case: the singularity straight ahead), so an n-point rule
//! errs by ≲ ρ^{−2n}; n = 0.66·digits + 6 gives the digits with margin. The returned error
//! estimate is this a-priori bound times the integrand size, plus rounding. Measured agreement
//! with series and with the AGM: see `tests/periods.rs`. Far out where the roots merge the
//! integrands stay accurate to rounding (Δ, D and x ∂_x φ are evaluated without the
//! cancellation).
//!
//! # Errors
//! [`CoverError`]: a modulus where the curve degenerates, a path through a singular point,
//! roots that cannot be told apart at the working precision.
//!
//! # References
//! Aberth–Ehrlich iteration: "Iteration methods for finding all zeros of a polynomial
//! simultaneously", Math. Comp. 27 (1973) 339–344. Gauss–Legendre: see [`crate::numerics::quadrature`].

use crate::curve::laurent::{Laurent, StripParts, Univariate};
use crate::numerics::complex::CNum;
use crate::numerics::quadrature;
use thiserror::Error;

/// Step factor κ: step ≤ κ · distance to the nearest singular point (ρ ≥ 5.8, see above).
pub const STEP_FACTOR: f64 = 0.5;
/// Largest step.
pub const MAX_STEP: f64 = 2.0;
/// Smallest ratio (distance to the other sheet's value / distance to the chosen one) at which a
/// sheet is taken as identified; below it the continuation stops with
/// [`CoverError::SheetAmbiguous`].
pub const SEPARATION_RATIO: f64 = 4.0;
/// Cancellation factor of `A'y + B' + C'/y` (sum of the moduli of the terms over the modulus of
/// the sum) above which [`Curve::log_slope`] also evaluates the cancellation-free form: 2⁶, i.e.
/// six bits lost (below that the direct sum is as good as any).
pub const SLOPE_CANCELLATION: f64 = 64.0;

/// Why a continuation or a root computation failed.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum CoverError {
    /// The two roots at z are too close to tell which one continues the path.
    #[error("the two roots at z = {z} cannot be told apart at the working precision (separation/prediction error = {gap:.3})")]
    SheetAmbiguous { z: String, gap: f64 },
    /// The path runs into a singular point.
    #[error("the path passes within {distance:e} of a singular point at z = {z}")]
    ThroughSingularPoint { z: String, distance: f64 },
    /// The polynomial root finder did not converge.
    #[error("the roots of the discriminant did not converge ({iterations} iterations)")]
    RootsNotConverged { iterations: usize },
    /// Δ vanishes identically or A ≡ 0: not an elliptic curve.
    #[error("the curve degenerates: {reason}")]
    Degenerate { reason: String },
}

/// A point of the cover: z and the root y at x = −e^z.
#[derive(Debug, Clone)]
pub struct Point<T> {
    pub z: T,
    pub y: T,
}

/// A point of the cover with its sheet: z, the root y and `D = A y − C/y = ±√Δ`. D tells the
/// sheets apart however close the two roots come (its two values are a factor −1 apart); y does
/// not once their relative gap nears the working precision (as x → 0 or ∞ where the roots merge).
#[derive(Debug, Clone)]
pub struct SheetPoint<T> {
    pub z: T,
    pub y: T,
    pub d: T,
}

impl<T: CNum> SheetPoint<T> {
    /// The point without its D.
    pub fn point(&self) -> Point<T> {
        Point {
            z: self.z.clone(),
            y: self.y.clone(),
        }
    }
}

/// Integrals accumulated along a path.
#[derive(Debug, Clone)]
pub struct PathIntegrals<T> {
    /// `∫ dz / D`.
    pub omega: T,
    /// `∫ z d log y`.
    pub eta: T,
    /// `∫ ∂_a(1/D) dz = ∫ (A y + C/y) / D³ dz`: the derivative of `omega` in the modulus.
    pub omega_da: T,
    /// `∫ ∂²_a(1/D) dz`: the second derivative of `omega` in the modulus.
    pub omega_daa: T,
    /// `∫ dz` (end minus start).
    pub dz: T,
    /// `∫ z d log(C/A)` (zero unless [`March::twist`]): with it the exponent of the other sheet needs no continuation of its
    /// own — on ιy = C/(A y), D changes sign, so `∫ (z d log(ιy) − λ dz/D_ι) = twist −
    /// ∫ (z d log y − λ dz/D)` (an identity of integrands, node by node).
    pub twist: T,
    /// Estimated absolute error of `omega` and `eta` (the larger).
    pub error: f64,
    /// Steps taken.
    pub steps: usize,
}

impl<T: CNum> PathIntegrals<T> {
    fn zero(like: &T) -> Self {
        PathIntegrals {
            omega: like.int_like(0),
            eta: like.int_like(0),
            omega_da: like.int_like(0),
            omega_daa: like.int_like(0),
            dz: like.int_like(0),
            twist: like.int_like(0),
            error: 0.0,
            steps: 0,
        }
    }

    /// Sum of two consecutive pieces.
    pub fn then(self, next: PathIntegrals<T>) -> PathIntegrals<T> {
        PathIntegrals {
            omega: self.omega + next.omega,
            eta: self.eta + next.eta,
            omega_da: self.omega_da + next.omega_da,
            omega_daa: self.omega_daa + next.omega_daa,
            dz: self.dz + next.dz,
            twist: self.twist + next.twist,
            error: self.error + next.error,
            steps: self.steps + next.steps,
        }
    }
}

/// A Laurent polynomial in x with coefficients of type T: `x^low · Σ c_k x^k`.
#[derive(Debug, Clone)]
struct LaurentT<T> {
    low: i64,
    coeffs: Vec<T>,
}

impl<T: CNum> LaurentT<T> {
    fn from_univariate(u: &Univariate, like: &T) -> Self {
        let low = u.terms.iter().map(|t| t.0).min().unwrap_or(0).min(0);
        let high = u.terms.iter().map(|t| t.0).max().unwrap_or(0).max(0);
        let mut coeffs = vec![like.int_like(0); (high - low + 1) as usize];
        for &(k, c) in &u.terms {
            coeffs[(k - low) as usize] = like.int_like(c);
        }
        LaurentT { low, coeffs }
    }

    fn mul(&self, other: &Self) -> Self {
        let zero = self.coeffs[0].int_like(0);
        let mut coeffs = vec![zero; self.coeffs.len() + other.coeffs.len() - 1];
        for (i, a) in self.coeffs.iter().enumerate() {
            for (j, b) in other.coeffs.iter().enumerate() {
                coeffs[i + j] = coeffs[i + j].clone() + a.clone() * b.clone();
            }
        }
        LaurentT {
            low: self.low + other.low,
            coeffs,
        }
    }

    fn sub(&self, other: &Self) -> Self {
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
        LaurentT { low, coeffs }
    }

    fn add(&self, other: &Self) -> Self {
        let minus_other = LaurentT {
            low: other.low,
            coeffs: other.coeffs.iter().map(|c| -c.clone()).collect(),
        };
        self.sub(&minus_other)
    }

    fn scaled(&self, n: i64) -> Self {
        let like = &self.coeffs[0];
        LaurentT {
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
    fn trimmed(&self) -> Self {
        let (coeffs, low) = self.polynomial();
        LaurentT { low, coeffs }
    }

    /// The value at x and its Euler derivative `x d/dx`, by Horner's rule on the polynomial part
    /// (`inv` = 1/x supplies the negative powers).
    fn eval_with_euler(&self, x: &T, inv: &T) -> (T, T) {
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
    fn term_size(&self, x_abs: f64) -> f64 {
        let mut acc = 0.0;
        for c in self.coeffs.iter().rev() {
            acc = acc * x_abs + c.abs_f64();
        }
        acc * x_abs.powi(self.low as i32)
    }

    /// The value at x (see [`LaurentT::eval_with_euler`]).
    fn eval(&self, x: &T, inv: &T) -> T {
        let n = self.coeffs.len();
        let mut p = self.coeffs[n - 1].clone();
        for c in self.coeffs[..n - 1].iter().rev() {
            p = p * x.clone() + c.clone();
        }
        p * power(x, inv, self.low)
    }

    /// The polynomial `x^{−low} · self` with leading and trailing zero coefficients removed;
    /// returns (coefficients low → high, power of x factored out).
    fn polynomial(&self) -> (Vec<T>, i64) {
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

/// The curve `φ + a = 0` over the z-plane.
#[derive(Debug, Clone)]
pub struct Curve<T> {
    parts: StripParts,
    /// Euler derivatives x·d/dx of A, B, C.
    da: Univariate,
    db: Univariate,
    dc: Univariate,
    modulus: T,
    /// Range of x-exponents in A, B, C.
    lowest: i64,
    highest: i64,
    /// `Δ = (B + a)² − 4AC` expanded, its coefficients exact (integers and a): the leading
    /// terms that cancel where the two roots merge as x → 0 or ∞ are removed exactly.
    discriminant: LaurentT<T>,
    /// `W = A'C − AC'` (′ = x d/dx), expanded.
    wronskian: LaurentT<T>,
    /// `Q = 2ACB' − (B + a)(AC)'`, expanded: with W, `x ∂_x φ = (D W + Q)/(2AC)` on the sheet D.
    slope_numerator: LaurentT<T>,
}

impl<T: CNum> Curve<T> {
    /// The curve of φ at modulus `a` (precision of `a`).
    ///
    /// # Errors
    /// [`CoverError::Degenerate`] when φ is not in strip form or A or C vanishes identically.
    pub fn new(laurent: &Laurent, a: T) -> Result<Self, CoverError> {
        let parts = laurent.strip_parts().map_err(|e| CoverError::Degenerate {
            reason: e.to_string(),
        })?;
        if parts.a.terms.is_empty() || parts.c.terms.is_empty() {
            return Err(CoverError::Degenerate {
                reason: "A or C vanishes identically".into(),
            });
        }
        let exps = || {
            parts
                .a
                .terms
                .iter()
                .chain(&parts.b.terms)
                .chain(&parts.c.terms)
                .map(|t| t.0)
        };
        let lowest = exps().min().unwrap_or(0).min(-1);
        let highest = exps().max().unwrap_or(0).max(1);
        let (da, db, dc) = (
            parts.a.euler_derivative(),
            parts.b.euler_derivative(),
            parts.c.euler_derivative(),
        );
        let poly = |u: &Univariate| LaurentT::from_univariate(u, &a);
        let (pa, pc, pda, pdb, pdc) = (
            poly(&parts.a),
            poly(&parts.c),
            poly(&da),
            poly(&db),
            poly(&dc),
        );
        let mut pb = poly(&parts.b);
        let k0 = (-pb.low) as usize;
        pb.coeffs[k0] = pb.coeffs[k0].clone() + a.clone();
        let ac = pa.mul(&pc);
        let discriminant = pb.mul(&pb).sub(&ac.scaled(4)).trimmed();
        let wronskian = pda.mul(&pc).sub(&pa.mul(&pdc)).trimmed();
        let ac_euler = pda.mul(&pc).add(&pa.mul(&pdc));
        let slope_numerator = ac.mul(&pdb).scaled(2).sub(&pb.mul(&ac_euler)).trimmed();
        if discriminant.coeffs.iter().all(|c| c.abs_f64() == 0.0) {
            return Err(CoverError::Degenerate {
                reason: "the discriminant vanishes identically".into(),
            });
        }
        Ok(Curve {
            lowest,
            highest,
            da,
            db,
            dc,
            parts,
            modulus: a,
            discriminant,
            wronskian,
            slope_numerator,
        })
    }

    /// The modulus a.
    pub fn modulus(&self) -> &T {
        &self.modulus
    }

    /// The strip parts A, B, C.
    pub fn parts(&self) -> &StripParts {
        &self.parts
    }

    /// `x = −e^z`.
    pub fn x_of(z: &T) -> T {
        -z.exp()
    }

    /// `(A(x), B(x) + a, C(x))`.
    pub fn coefficients(&self, x: &T) -> (T, T, T) {
        (
            self.parts.a.eval(x),
            self.parts.b.eval(x) + self.modulus.clone(),
            self.parts.c.eval(x),
        )
    }

    /// Everything the continuation needs at one z, with one exponential and the powers of x by
    /// multiplication.
    pub fn fiber(&self, z: &T) -> Fiber<T> {
        let x = Self::x_of(z);
        let inv = x.int_like(1) / x.clone();
        let (lo, hi) = (self.lowest, self.highest);
        let mut powers: Vec<T> = Vec::with_capacity((hi - lo + 1) as usize);
        for k in lo..=hi {
            let v = match k {
                0 => x.int_like(1),
                1 => x.clone(),
                -1 => inv.clone(),
                k if k > 1 => powers[(k - 1 - lo) as usize].clone() * x.clone(),
                _ => inv.clone(),
            };
            powers.push(v);
        }
        for k in (lo..=-2).rev() {
            let i = (k - lo) as usize;
            powers[i] = powers[i + 1].clone() * inv.clone();
        }
        let eval = |u: &Univariate| -> T {
            let mut acc = x.int_like(0);
            for &(k, c) in &u.terms {
                let p = powers[(k - lo) as usize].clone();
                acc = acc + if c == 1 { p } else { p * x.int_like(c) };
            }
            acc
        };
        let (a, b, c) = (
            eval(&self.parts.a),
            eval(&self.parts.b) + self.modulus.clone(),
            eval(&self.parts.c),
        );
        let (da, db, dc) = (eval(&self.da), eval(&self.db), eval(&self.dc));
        // Δ in the form with the smaller terms: expanded where the roots merge as x → 0 or ∞ (its
        // leading terms cancel exactly in the coefficients), (B + a)² − 4AC elsewhere — near a
        // finite branch point at a large modulus the expanded coefficients (powers of a) cancel
        // instead (measured: P2 level 4 at r = 6.5, residual 4e-11 expanded, 2e-12 unexpanded).
        let four = x.int_like(4);
        let direct_size = b.abs_f64().powi(2) + 4.0 * a.abs_f64() * c.abs_f64();
        let (disc, disc_euler) = if direct_size <= self.discriminant.term_size(x.abs_f64()) {
            (
                b.clone() * b.clone() - four.clone() * a.clone() * c.clone(),
                x.int_like(2) * b.clone() * db.clone()
                    - four * (da.clone() * c.clone() + a.clone() * dc.clone()),
            )
        } else {
            self.discriminant.eval_with_euler(&x, &inv)
        };
        Fiber {
            a,
            b,
            c,
            da,
            db,
            dc,
            half_log_slope: disc_euler / (disc.clone() * x.int_like(2)),
            disc,
            x,
            inv,
        }
    }

    /// The two roots at z, larger modulus first (cancellation-free).
    pub fn roots(&self, z: &T) -> [T; 2] {
        Self::roots_at(&self.fiber(z))
    }

    /// The two roots over a fiber, larger modulus first.
    pub fn roots_at(f: &Fiber<T>) -> [T; 2] {
        let root = f.disc.sqrt();
        let y1 = Self::root_on_sheet(f, &root);
        let y2 = Self::root_on_sheet(f, &-root);
        if y1.abs_f64() >= y2.abs_f64() {
            [y1, y2]
        } else {
            [y2, y1]
        }
    }

    /// The root y on the sheet D (D = ±√Δ): `y = (D − (B + a))/(2A)`, computed as
    /// `2C/(−D − (B + a))` when that avoids the cancellation.
    pub fn root_on_sheet(f: &Fiber<T>, d: &T) -> T {
        let plus = d.clone() - f.b.clone();
        let minus = -d.clone() - f.b.clone();
        if plus.abs_f64() >= minus.abs_f64() {
            plus / (f.a.clone() * f.x.int_like(2))
        } else {
            f.c.clone() * f.x.int_like(2) / minus
        }
    }

    /// The sheet of the root y over a fiber: the one of ±√Δ (Δ from the expanded polynomial)
    /// nearer to `A y − C/y`, and the separation ratio |far − (A y − C/y)| / |near − (A y − C/y)|
    /// (≥ 1; small when y does not tell the sheets apart at the working precision).
    pub fn sheet_of(f: &Fiber<T>, y: &T) -> (T, f64) {
        let raw = f.a.clone() * y.clone() - f.c.clone() / y.clone();
        let root = f.disc.sqrt();
        let e_plus = (root.clone() - raw.clone()).abs_f64();
        let e_minus = (root.clone() + raw).abs_f64();
        if e_plus <= e_minus {
            (root, e_minus / e_plus.max(f64::MIN_POSITIVE))
        } else {
            (-root, e_plus / e_minus.max(f64::MIN_POSITIVE))
        }
    }

    /// The point (z, y) with its sheet D.
    ///
    /// # Errors
    /// [`CoverError::SheetAmbiguous`] when y does not tell the sheets apart at the working
    /// precision (the two roots closer than a few units of rounding).
    pub fn sheet_point(&self, p: &Point<T>) -> Result<SheetPoint<T>, CoverError> {
        let (d, separation) = Self::sheet_of(&self.fiber(&p.z), &p.y);
        if separation < SEPARATION_RATIO {
            return Err(CoverError::SheetAmbiguous {
                z: format!("{:?}", p.z.to_c64()),
                gap: separation,
            });
        }
        Ok(SheetPoint {
            z: p.z.clone(),
            y: p.y.clone(),
            d,
        })
    }

    /// `D = A y − C/y` at (z, y), evaluated as the one of ±√Δ it is nearer to (Δ from the
    /// expanded polynomial: accurate where the two roots nearly coincide and `A y − C/y` cancels).
    pub fn d(&self, z: &T, y: &T) -> T {
        Self::sheet_of(&self.fiber(z), y).0
    }

    /// `d log y / dz = −x ∂_x φ / D`.
    pub fn dlog_y(&self, z: &T, y: &T) -> T {
        let f = self.fiber(z);
        let d = Self::sheet_of(&f, y).0;
        let inv_d = d.int_like(1) / d.clone();
        self.log_slope(&f, y, &d, &inv_d)
    }

    /// `d log y/dz = −x ∂_x φ / D` over a fiber on the sheet (y, D), given 1/D.
    ///
    /// `x ∂_x φ = A'y + B' + C'/y` (′ = x d/dx) cancels where the roots merge as x → 0 or ∞ (the
    /// terms grow like a power of x while the sum stays bounded); when it has cancelled more than
    /// [`SLOPE_CANCELLATION`] the sum is recomputed as `(D W + Q)/(2AC)` with the expanded
    /// polynomials W and Q of [`Curve`], and the form with the smaller rounding bound is used.
    pub fn log_slope(&self, f: &Fiber<T>, y: &T, d: &T, inv_d: &T) -> T {
        let t1 = f.da.clone() * y.clone();
        let t3 = f.dc.clone() / y.clone();
        let size = t1.abs_f64() + f.db.abs_f64() + t3.abs_f64();
        let mut sum = t1 + f.db.clone() + t3;
        if size > SLOPE_CANCELLATION * sum.abs_f64() {
            let w = self.wronskian.eval(&f.x, &f.inv);
            let q = self.slope_numerator.eval(&f.x, &f.inv);
            let two_ac = f.a.clone() * f.c.clone() * f.x.int_like(2);
            let dw = d.clone() * w;
            let bound = (dw.abs_f64() + q.abs_f64()) / two_ac.abs_f64();
            if bound < size {
                sum = (dw + q) / two_ac;
            }
        }
        -(sum * inv_d.clone())
    }

    /// `x^k Δ(x)` as a polynomial (coefficients low → high, exact integers and a) and k.
    pub fn discriminant_polynomial(&self) -> (Vec<T>, i64) {
        (self.discriminant.coeffs.clone(), -self.discriminant.low)
    }

    /// Branch points as x-values (zeros of Δ, x ≠ 0).
    ///
    /// # Errors
    /// [`CoverError::RootsNotConverged`], [`CoverError::Degenerate`] when Δ is constant.
    pub fn branch_points_x(&self) -> Result<Vec<T>, CoverError> {
        let (poly, _) = self.discriminant_polynomial();
        if poly.len() < 2 {
            return Err(CoverError::Degenerate {
                reason: "the discriminant has no zeros".into(),
            });
        }
        polynomial_roots(&poly)
    }

    /// Punctures: the zeros of A and C. For a tempered strip polynomial the rows m₂ = ±1 are a
    /// vertex or an edge with binomial coefficients, so A and C are `x^k (1 + x)^ℓ`: every
    /// puncture is at x = −1, i.e. z ∈ 2πiZ, with multiplicity ℓ. Returns `(ℓ_A, ℓ_C)`.
    ///
    /// # Errors
    /// [`CoverError::Degenerate`] if A or C is not of that form (not tempered).
    pub fn puncture_orders(&self) -> Result<(usize, usize), CoverError> {
        let order = |u: &Univariate| -> Result<usize, CoverError> {
            let low = u.terms.first().map(|t| t.0).unwrap_or(0);
            let l = u.terms.len() - 1;
            let binomial_edge = u.terms.iter().enumerate().all(|(j, &(k, c))| {
                k == low + j as i64
                    && c == (0..j).fold(1i64, |acc, i| acc * (l - i) as i64 / (i + 1) as i64)
            });
            if binomial_edge {
                Ok(l)
            } else {
                Err(CoverError::Degenerate {
                    reason: format!("{} is not x^k (1+x)^l", u.render("x")),
                })
            }
        };
        Ok((order(&self.parts.a)?, order(&self.parts.c)?))
    }

    /// How the two roots behave at the two ends of the z-line, `[x → 0, x → ∞]` (Re z → −∞, +∞),
    /// read off the Newton polygon of `A y² + (B + a) y + C`: with e₁, e₀, e₋₁ the extreme
    /// x-exponents of A, B + a (a counts at exponent 0) and C at that end, the end is
    /// [`EndRoots::Separate`] when the point (e₀, 0) lies outside the segment from (e₁, 1) to
    /// (e₋₁, −1), [`EndRoots::Merging`] when it lies on it (an edge of lattice length 2 whose
    /// binomial polynomial (1 + w)² has a double root) and [`EndRoots::Branched`] when inside.
    pub fn end_roots(&self) -> [EndRoots; 2] {
        self.end_exponent_gaps().map(|g| match g.cmp(&0) {
            std::cmp::Ordering::Greater => EndRoots::Separate,
            std::cmp::Ordering::Equal => EndRoots::Merging,
            std::cmp::Ordering::Less => EndRoots::Branched,
        })
    }

    /// `2e₀ − e₁ − e₋₁` at the two ends `[x → 0, x → ∞]` (see [`Curve::end_roots`]): at a
    /// separate end (> 0) it is the difference Δm of the exponents of the two roots,
    /// y₁ ~ x^{±(e₀ − e₁)} and y₂ ~ x^{±(e₋₁ − e₀)}, which sets the oscillation of ψ in that tail:
    /// the exponents of χ on the two sheets differ by ≈ Δm r²/(4π), so successive zeros are
    /// ≈ 4π²/(Δm |r|) apart (F0: Δm = 2, the 2π²/|r| of MATH.md §2; measured for all 15
    /// families, `verify::tail_zeros`).
    pub fn end_exponent_gaps(&self) -> [i64; 2] {
        let extreme = |u: &Univariate, side: i64| {
            u.terms
                .iter()
                .map(|t| side * t.0)
                .max()
                .unwrap_or(i64::MIN / 4)
        };
        [-1, 1].map(|side| {
            let (e1, em1) = (extreme(&self.parts.a, side), extreme(&self.parts.c, side));
            let e0 = extreme(&self.parts.b, side).max(0);
            2 * e0 - e1 - em1
        })
    }

    /// Representatives in z (Im z ∈ (−π, π]) of all singular points: branch points first,
    /// then the puncture z = 0 if A or C vanishes at x = −1.
    ///
    /// # Errors
    /// See [`Curve::branch_points_x`] and [`Curve::puncture_orders`].
    pub fn singular_points(&self) -> Result<Vec<Singular<T>>, CoverError> {
        let mut out = Vec::new();
        let two_pi_i = self.modulus.int_like(2) * self.modulus.pi_like() * self.modulus.i_like();
        for x in self.branch_points_x()? {
            // Im z ∈ (−π, π]: a positive real x gives Im = ±π by the sign of a rounding error;
            // take +π so that the choice is deterministic.
            let mut z = (-x).ln();
            if z.im_f64() < -std::f64::consts::PI + 1e-9 {
                z = z + two_pi_i.clone();
            }
            out.push(Singular {
                z,
                kind: SingularKind::Branch,
            });
        }
        let (la, lc) = self.puncture_orders()?;
        if la + lc > 0 {
            out.push(Singular {
                z: self.modulus.int_like(0),
                kind: SingularKind::Puncture,
            });
        }
        Ok(out)
    }
}

/// The values at one z that the continuation uses: x, A, B + a, C and their Euler derivatives,
/// Δ from the expanded polynomial and `½ d log Δ/dz = d log D/dz`.
#[derive(Debug, Clone)]
pub struct Fiber<T> {
    pub x: T,
    /// 1/x.
    pub inv: T,
    /// Δ = (B + a)² − 4AC from its expanded polynomial.
    pub disc: T,
    /// `d log D / dz = ½ d log Δ / dz`.
    pub half_log_slope: T,
    pub a: T,
    pub b: T,
    pub c: T,
    pub da: T,
    pub db: T,
    pub dc: T,
}

/// The two roots at one end of the z-line (see [`Curve::end_roots`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EndRoots {
    /// Two roots of different orders in x: the sheets stay apart.
    Separate,
    /// Both roots tend to the same leading term, `y ≈ c x^m (1 ± O(|x|^{∓1/2}))`: the end is a
    /// branch point and the relative gap of the roots shrinks like e^{−|Re z|/2}.
    Merging,
    /// `y ~ ±c x^{m/2}` with m odd: the end is a branch point and the roots stay apart.
    Branched,
}

/// Kind of a singular point of the cover over the z-plane.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SingularKind {
    /// A zero of Δ: the two sheets meet.
    Branch,
    /// A zero of A or C: one root runs to ∞ or 0.
    Puncture,
}

/// A singular point, z with Im z ∈ (−π, π] (it repeats with period 2πi).
#[derive(Debug, Clone)]
pub struct Singular<T> {
    pub z: T,
    pub kind: SingularKind,
}

/// Distance from z to the nearest point of `s + 2πiZ` (f64 is enough for step control).
pub fn periodic_distance(z: [f64; 2], s: [f64; 2]) -> f64 {
    let two_pi = 2.0 * std::f64::consts::PI;
    let dx = z[0] - s[0];
    let k = ((z[1] - s[1]) / two_pi).round();
    let mut best = f64::INFINITY;
    for dk in [-1.0, 0.0, 1.0] {
        let dy = z[1] - s[1] - (k + dk) * two_pi;
        best = best.min((dx * dx + dy * dy).sqrt());
    }
    best
}

/// All zeros of the polynomial `Σ c_k x^k` (low → high) by the Aberth–Ehrlich iteration,
/// then Newton-polished, at the precision of the coefficients.
///
/// Initial guesses lie on circles whose radii come from the upper convex hull of
/// `(k, log|c_k|)` (the Newton polygon), so roots of very different sizes (here x ~ a^{±2})
/// start near their own scale (common practice for simultaneous iterations). The iteration
/// stops when every relative correction is below the working precision, or when the
/// corrections stop shrinking while every residual is at rounding level.
///
/// # Errors
/// [`CoverError::RootsNotConverged`] when neither happens within 500 iterations.
pub fn polynomial_roots<T: CNum>(coeffs: &[T]) -> Result<Vec<T>, CoverError> {
    let n = coeffs.len() - 1;
    let lead = coeffs[n].clone();
    let monic: Vec<T> = coeffs.iter().map(|c| c.clone() / lead.clone()).collect();
    let like = &coeffs[0];
    let prec = like.prec();
    let mut z = newton_polygon_guesses(&monic, prec);
    let eval = |x: &T| -> (T, T, f64) {
        let mut p = monic[n].clone();
        let mut dp = x.int_like(0);
        let mut size = monic[n].abs_f64();
        let ax = x.abs_f64();
        for k in (0..n).rev() {
            dp = dp * x.clone() + p.clone();
            p = p * x.clone() + monic[k].clone();
            size = size * ax + monic[k].abs_f64();
        }
        (p, dp, size)
    };
    let eps = 2f64.powi(-(prec as i32));
    let tol = eps * 4096.0;
    let mut best = f64::INFINITY;
    let mut stalled = 0;
    for _ in 0..500 {
        let mut max_step: f64 = 0.0;
        let mut at_rounding = true;
        for i in 0..n {
            let (p, dp, size) = eval(&z[i]);
            if p.abs_f64() > 64.0 * n as f64 * eps * size {
                at_rounding = false;
            }
            if p.abs_f64() == 0.0 {
                continue;
            }
            let ratio = p / dp;
            let mut sum = like.int_like(0);
            for j in 0..n {
                if j != i {
                    sum = sum + like.int_like(1) / (z[i].clone() - z[j].clone());
                }
            }
            let step = ratio.clone() / (like.int_like(1) - ratio * sum);
            max_step = max_step.max(step.abs_f64() / z[i].abs_f64().max(f64::MIN_POSITIVE));
            z[i] = z[i].clone() - step;
        }
        if max_step < tol {
            break;
        }
        if max_step < 0.5 * best {
            best = max_step;
            stalled = 0;
        } else {
            stalled += 1;
        }
        if stalled >= 8 {
            if at_rounding {
                break;
            }
            return Err(CoverError::RootsNotConverged { iterations: 500 });
        }
    }
    // Newton polish.
    for zi in z.iter_mut() {
        for _ in 0..3 {
            let (p, dp, _) = eval(zi);
            if dp.abs_f64() == 0.0 {
                break;
            }
            *zi = zi.clone() - p / dp;
        }
    }
    Ok(z)
}

/// Starting points on circles from the Newton polygon of a monic polynomial.
fn newton_polygon_guesses<T: CNum>(monic: &[T], prec: u32) -> Vec<T> {
    let n = monic.len() - 1;
    let logs: Vec<f64> = monic
        .iter()
        .map(|c| {
            if c.abs_f64() > 0.0 {
                c.abs_f64().ln()
            } else {
                f64::NEG_INFINITY
            }
        })
        .collect();
    // Upper convex hull of (k, log|c_k|), k = 0..n.
    let mut hull: Vec<usize> = Vec::new();
    for k in 0..=n {
        if logs[k] == f64::NEG_INFINITY {
            continue;
        }
        while hull.len() >= 2 {
            let (i, j) = (hull[hull.len() - 2], hull[hull.len() - 1]);
            let cross = (j as f64 - i as f64) * (logs[k] - logs[i])
                - (logs[j] - logs[i]) * (k as f64 - i as f64);
            if cross >= 0.0 {
                hull.pop();
            } else {
                break;
            }
        }
        hull.push(k);
    }
    let mut out = Vec::with_capacity(n);
    let mut count = 0usize;
    for w in hull.windows(2) {
        let (i, j) = (w[0], w[1]);
        let m = j - i;
        let radius = ((logs[i] - logs[j]) / m as f64).exp();
        for q in 0..m {
            let angle = 2.0 * std::f64::consts::PI * q as f64 / m as f64 + 0.4 + 0.7 * count as f64;
            out.push(T::from_f64s(
                radius * angle.cos(),
                radius * angle.sin(),
                prec,
            ));
        }
        count += 1;
    }
    // A zero constant term (not expected here) leaves roots at 0 unassigned: put them near 0.
    while out.len() < n {
        out.push(T::from_f64s(1e-3 * (out.len() as f64 + 1.0), 1e-3, prec));
    }
    out
}

/// A closed polygonal circle of radius r around the point c (z-plane, f64), counter-clockwise,
/// starting and ending at c + r. Continuing a root once around a single branch point along it
/// lands on the other sheet (y ↦ ιy = C/(A y)).
pub fn circle_around(c: [f64; 2], r: f64, vertices: usize) -> Vec<[f64; 2]> {
    (0..=vertices)
        .map(|k| {
            let t = 2.0 * std::f64::consts::PI * k as f64 / vertices as f64;
            [c[0] + r * t.cos(), c[1] + r * t.sin()]
        })
        .collect()
}

/// Continuation settings.
#[derive(Debug, Clone)]
pub struct March {
    /// Largest number of Gauss–Legendre nodes per step (the worst case ρ = 5.8).
    pub nodes: usize,
    /// Decimal digits each step must deliver: the nodes of a step are chosen from the Bernstein
    /// ellipse of its actual nearest singular points, `n = ⌈digits·ln 10 / (2 ln ρ)⌉ + 4`.
    pub digits: f64,
    /// Step factor κ.
    pub step_factor: f64,
    /// Largest step.
    pub max_step: f64,
    /// Smallest distance to a singular point a path may come.
    pub min_distance: f64,
    /// Also integrate `∫ z d log(C/A)` ([`PathIntegrals::twist`]); only the eigenfunction needs
    /// it, the periods do not (it costs two divisions per node).
    pub twist: bool,
}

impl March {
    /// Settings for `digits` decimal digits.
    pub fn for_digits(digits: f64) -> Self {
        March {
            nodes: (0.66 * digits + 6.0).ceil() as usize,
            digits,
            step_factor: STEP_FACTOR,
            max_step: MAX_STEP,
            min_distance: 1e-30,
            twist: false,
        }
    }
}

/// Follows the root from `start` along the polyline `path` (start.z first), integrating ω and
/// η; returns the end point on the continued sheet and the integrals. The sheet of `start` is
/// read off its root y ([`Curve::sheet_point`]); to continue where the two roots are closer than
/// the working precision can tell, carry the sheet with [`continue_sheet`].
///
/// # Errors
/// [`CoverError::SheetAmbiguous`], [`CoverError::ThroughSingularPoint`].
pub fn continue_along<T: CNum>(
    curve: &Curve<T>,
    singular: &[Singular<T>],
    start: &Point<T>,
    path: &[T],
    march: &March,
) -> Result<(Point<T>, PathIntegrals<T>), CoverError> {
    let start = curve.sheet_point(start)?;
    let (end, ints) = continue_sheet(curve, singular, &start, path, march)?;
    Ok((end.point(), ints))
}

/// [`continue_along`] with the sheet carried by D at both ends.
///
/// # Errors
/// [`CoverError::SheetAmbiguous`], [`CoverError::ThroughSingularPoint`].
pub fn continue_sheet<T: CNum>(
    curve: &Curve<T>,
    singular: &[Singular<T>],
    start: &SheetPoint<T>,
    path: &[T],
    march: &March,
) -> Result<(SheetPoint<T>, PathIntegrals<T>), CoverError> {
    let sing: Vec<[f64; 2]> = singular
        .iter()
        .map(|s| [s.z.re_f64(), s.z.im_f64()])
        .collect();
    let dist = |z: &T| {
        sing.iter()
            .map(|s| periodic_distance([z.re_f64(), z.im_f64()], *s))
            .fold(f64::INFINITY, f64::min)
    };
    let mut rules: Vec<Option<Vec<(T, T)>>> = vec![None; march.nodes + 8];
    let mut here = start.point();
    // The sheet is carried by D = ±√Δ (its sign), not by y: the two values of D stay a factor
    // −1 apart however close the two roots y come, so the choice below stays well separated
    // where the roots merge asymptotically (x → 0 or ∞ a branch point of the leading terms).
    let mut sheet = start.d.clone();
    let mut half_log_slope = curve.fiber(&start.z).half_log_slope;
    let mut acc = PathIntegrals::zero(&start.z);
    let two = start.z.int_like(2);
    let eps = 2f64.powi(-(start.z.prec() as i32));
    for target in path.iter().skip(1) {
        loop {
            let remaining = target.clone() - here.z.clone();
            let rem = remaining.abs_f64();
            if rem == 0.0 {
                break;
            }
            let d = dist(&here.z);
            // Below the working precision relative to |z| a step could not even move z.
            let floor = march
                .min_distance
                .max(2f64.powi(16 - start.z.prec() as i32) * (1.0 + here.z.abs_f64()));
            if d < floor {
                return Err(CoverError::ThroughSingularPoint {
                    z: format!("{:?}", here.z.to_c64()),
                    distance: d,
                });
            }
            let h = (march.step_factor * d).min(march.max_step);
            let end = if rem <= h * 1.0000001 {
                target.clone()
            } else {
                here.z.clone() + remaining * T::from_f64s(h / rem, 0.0, start.z.prec())
            };
            let half = (end.clone() - here.z.clone()) / two.clone();
            let mid = (end.clone() + here.z.clone()) / two.clone();
            let rho = bernstein_parameter(
                [mid.re_f64(), mid.im_f64()],
                [half.re_f64(), half.im_f64()],
                &sing,
            );
            let nodes =
                ((march.digits * std::f64::consts::LN_10 / (2.0 * rho.ln())).ceil() as usize + 4)
                    .div_ceil(4)
                    * 4;
            let nodes = nodes.clamp(8, march.nodes.div_ceil(4) * 4);
            let rule = rules[nodes]
                .get_or_insert_with(|| quadrature::rule_for(nodes, &start.z))
                .clone();
            let mut z_prev = here.z.clone();
            let mut sum_omega = start.z.int_like(0);
            let mut sum_eta = start.z.int_like(0);
            let mut sum_da = start.z.int_like(0);
            let mut sum_daa = start.z.int_like(0);
            let mut sum_twist = start.z.int_like(0);
            let mut size: f64 = 0.0;
            for (t, w) in &rule {
                let z = mid.clone() + half.clone() * t.clone();
                let fib = curve.fiber(&z);
                sheet = follow(&fib, &z, &z_prev, &sheet, &half_log_slope)?;
                half_log_slope = fib.half_log_slope.clone();
                let y = Curve::root_on_sheet(&fib, &sheet);
                let inv_d = y.int_like(1) / sheet.clone();
                let eta = z.clone() * curve.log_slope(&fib, &y, &sheet, &inv_d);
                size = size.max(inv_d.abs_f64()).max(eta.abs_f64());
                // ∂_a(1/D) = (A y + C/y)/D³ and ∂²_a(1/D) = 3(A y + C/y)²/D⁵ − 1/D³
                // (from ∂_a y = −y/D, ∂_a(A y + C/y) = −1, ∂_a D = −(A y + C/y)/D), with
                // A y + C/y = A (y + ιy) = −(B + a) exactly.
                let s_ac = -fib.b;
                let inv_d2 = inv_d.clone() * inv_d.clone();
                let inv_d3 = inv_d2.clone() * inv_d.clone();
                let g = s_ac.clone() * inv_d3.clone();
                let g2 = g.clone() * s_ac * inv_d2 * y.int_like(3) - inv_d3;
                sum_da = sum_da + w.clone() * g;
                sum_daa = sum_daa + w.clone() * g2;
                sum_omega = sum_omega + w.clone() * inv_d;
                sum_eta = sum_eta + w.clone() * eta;
                if march.twist {
                    // d log(C/A)/dz = (x C')/C − (x A')/A: the Euler derivatives (dx/x = dz).
                    let twist = z.clone()
                        * (fib.dc.clone() / fib.c.clone() - fib.da.clone() / fib.a.clone());
                    sum_twist = sum_twist + w.clone() * twist;
                }
                z_prev = z;
            }
            let end_fiber = curve.fiber(&end);
            sheet = follow(&end_fiber, &end, &z_prev, &sheet, &half_log_slope)?;
            half_log_slope = end_fiber.half_log_slope.clone();
            let y = Curve::root_on_sheet(&end_fiber, &sheet);
            acc.omega = acc.omega + sum_omega * half.clone();
            acc.eta = acc.eta + sum_eta * half.clone();
            acc.omega_da = acc.omega_da + sum_da * half.clone();
            acc.omega_daa = acc.omega_daa + sum_daa * half.clone();
            acc.twist = acc.twist + sum_twist * half.clone();
            let hh = 2.0 * half.abs_f64();
            // A-priori Gauss–Legendre bound for this step's ellipse plus rounding (module docs).
            acc.error += hh * size * (rho.powi(-2 * nodes as i32) + eps * nodes as f64);
            acc.steps += 1;
            here = Point { z: end, y };
        }
    }
    acc.dz = here.z.clone() - start.z.clone();
    Ok((
        SheetPoint {
            z: here.z,
            y: here.y,
            d: sheet,
        },
        acc,
    ))
}

/// The smallest Bernstein-ellipse parameter ρ of the singular points (and their 2πi
/// translates) for the segment `mid ± half`: for a singularity at p, with w = (p − mid)/half,
/// ρ = |w + √(w² − 1)| (the branch with modulus ≥ 1).
fn bernstein_parameter(mid: [f64; 2], half: [f64; 2], singular: &[[f64; 2]]) -> f64 {
    use num_complex::Complex64;
    let m = Complex64::new(mid[0], mid[1]);
    let h = Complex64::new(half[0], half[1]);
    let two_pi = 2.0 * std::f64::consts::PI;
    let mut best = f64::INFINITY;
    for s in singular {
        let k0 = ((mid[1] - s[1]) / two_pi).round();
        for dk in [-1.0, 0.0, 1.0] {
            let p = Complex64::new(s[0], s[1] + (k0 + dk) * two_pi);
            let w = (p - m) / h;
            let r = (w * w - 1.0).sqrt();
            let rho = (w + r).norm().max((w - r).norm());
            best = best.min(rho);
        }
    }
    best.max(1.0 + 1e-12)
}

/// D at z continuing `d` from z_prev: predictor `d·(1 + w + w²/2)`, `w = (d log D/dz)·Δz`
/// (second order in the step), then the nearer of ±√Δ. The two candidates are a factor −1
/// apart, so the choice fails only where the prediction error approaches |D| itself: near a
/// branch point (Δ = 0), which the step rule keeps at a distance.
fn follow<T: CNum>(
    fib: &Fiber<T>,
    z: &T,
    z_prev: &T,
    d: &T,
    half_log_slope: &T,
) -> Result<T, CoverError> {
    let w = half_log_slope.clone() * (z.clone() - z_prev.clone());
    let predicted = d.clone() * (z.int_like(1) + w.clone() + w.clone() * w / z.int_like(2));
    let root = fib.disc.sqrt();
    let e_plus = (root.clone() - predicted.clone()).abs_f64();
    let e_minus = (root.clone() + predicted.clone()).abs_f64();
    let (pick, near, far) = if e_plus <= e_minus {
        (root, e_plus, e_minus)
    } else {
        (-root, e_minus, e_plus)
    };
    // The other candidate must be much farther than the prediction error.
    let scale = predicted.abs_f64().max(1e-300);
    let gap = far / near.max(scale * 2f64.powi(-(z.prec() as i32) + 8));
    if gap < SEPARATION_RATIO {
        return Err(CoverError::SheetAmbiguous {
            z: format!("{:?}", z.to_c64()),
            gap,
        });
    }
    Ok(pick)
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_complex::Complex64;
    use rug::float::Constant;
    use rug::{Complex, Float};

    fn f0() -> Laurent {
        Laurent::from_terms(vec![([1, 0], 1), ([0, 1], 1), ([-1, 0], 1), ([0, -1], 1)])
    }

    fn alpha<T: CNum>(a: T, digits: f64) -> PathIntegrals<T> {
        let curve = Curve::new(&f0(), a.clone()).unwrap();
        let sing = curve.singular_points().unwrap();
        let z0 = a.int_like(0);
        let [_, small] = curve.roots(&z0);
        let two_pi_i = a.int_like(2) * a.pi_like() * a.i_like();
        let path = vec![z0.clone(), z0.clone() - two_pi_i];
        let (_, ints) = continue_along(
            &curve,
            &sing,
            &Point { z: z0, y: small },
            &path,
            &March::for_digits(digits),
        )
        .unwrap();
        ints
    }

    #[test]
    fn f0_alpha_period_against_the_agm() {
        // −Ω_α·a/(2πi) = 1/AGM(1, √(1 − 16/a²)) (Handbook of Mathematical Functions (1964)
        // 17.6.1 with K(k) = π / (2 AGM(1, k')), k = 4/a; MPFR's agm via rug).
        let w = alpha(Complex64::new(20.0, 0.0), 15.0);
        let expect = 1.0 / agm_f64(1.0, (1.0 - 16.0 / 400.0f64).sqrt());
        let got = -w.omega * 20.0 / Complex64::new(0.0, 2.0 * std::f64::consts::PI);
        assert!((got - expect).norm() < 1e-13, "{got} vs {expect}");
        let prec = 200;
        let a = Complex::with_val(prec, 20);
        let w = alpha(a.clone(), 55.0);
        let two_pi = Float::with_val(prec, Constant::Pi) * 2u32;
        let got = Complex::with_val(prec, -w.omega * &a) / Complex::with_val(prec, (0, &two_pi));
        let kp = Float::with_val(prec, 1u32 - Float::with_val(prec, 16u32) / 400u32).sqrt();
        let expect = Float::with_val(prec, Float::with_val(prec, 1u32).agm_ref(&kp)).recip();
        let diff = Complex::with_val(prec, got - expect).abs().real().to_f64();
        assert!(diff < 1e-50, "{diff:e}, steps {}", w.steps);
    }

    #[test]
    fn once_around_a_branch_point_is_the_other_sheet() {
        // Monodromy of √Δ around a simple zero: the continued root is ιy = C/(A y).
        let curve = Curve::new(&f0(), Complex64::new(20.0, 0.0)).unwrap();
        let sing = curve.singular_points().unwrap();
        let b = sing
            .iter()
            .find(|s| s.kind == SingularKind::Branch)
            .unwrap()
            .z;
        let d = sing
            .iter()
            .filter(|s| (s.z - b).norm() > 1e-9)
            .map(|s| (s.z - b).norm())
            .fold(f64::INFINITY, f64::min);
        let circle: Vec<Complex64> = circle_around([b.re, b.im], 0.3 * d, 12)
            .iter()
            .map(|p| Complex64::new(p[0], p[1]))
            .collect();
        let [y0, y1] = curve.roots(&circle[0]);
        let (end, _) = continue_along(
            &curve,
            &sing,
            &Point {
                z: circle[0],
                y: y0,
            },
            &circle,
            &March::for_digits(15.0),
        )
        .unwrap();
        assert!(
            (end.y - y1).norm() < 1e-10 * y1.norm(),
            "{} vs {}",
            end.y,
            y1
        );
        // Twice around: back on the first sheet.
        let mut twice = circle.clone();
        twice.extend(circle.iter().skip(1));
        let (end, _) = continue_along(
            &curve,
            &sing,
            &Point {
                z: circle[0],
                y: y0,
            },
            &twice,
            &March::for_digits(15.0),
        )
        .unwrap();
        assert!((end.y - y0).norm() < 1e-10 * y0.norm());
    }

    #[test]
    fn a_path_through_a_branch_point_is_refused() {
        // Typed error, no panic, no silent sheet guess.
        let curve = Curve::new(&f0(), Complex64::new(20.0, 0.0)).unwrap();
        let sing = curve.singular_points().unwrap();
        let b = sing
            .iter()
            .find(|s| s.kind == SingularKind::Branch)
            .unwrap()
            .z;
        let start = b - Complex64::new(0.5, 0.0);
        let path = vec![start, b + Complex64::new(0.5, 0.0)];
        let [y0, _] = curve.roots(&start);
        let r = continue_along(
            &curve,
            &sing,
            &Point { z: start, y: y0 },
            &path,
            &March::for_digits(15.0),
        );
        assert!(
            matches!(
                r,
                Err(CoverError::ThroughSingularPoint { .. })
                    | Err(CoverError::SheetAmbiguous { .. })
            ),
            "{r:?}"
        );
    }

    /// F0* (the square with vertices (±1, ±1)): the two roots merge as x → 0 and x → ∞.
    fn f0_dual() -> Laurent {
        Laurent::tempered(&crate::lattice::catalogue::by_id("F0*").unwrap().polygon())
    }

    #[test]
    fn discriminant_near_a_finite_branch_point_at_a_large_modulus() {
        // P2 at a = 636 (level 4), z = 6.455 + 0.01i, near the branch points at Re z ≈ log a: in
        // x Δ(x) = x³ + 2a x² + a² x − 4 the terms (≈ 3e8) cancel to ≈ 3e4, while
        // (B + a)² − 4AC = (x + a)² − 4/x keeps its accuracy. The fiber must use the latter
        // (reference: 256 bits); the expanded value is measurably worse (negative companion).
        let p2 = Laurent::from_terms(vec![([1, 0], 1), ([0, 1], 1), ([-1, -1], 1)]);
        let a = 636.10219121449;
        let z = Complex64::new(6.455, 0.01);
        let curve = Curve::new(&p2, Complex64::new(a, 0.0)).unwrap();
        let curve_hi = Curve::new(&p2, Complex::with_val(256, a)).unwrap();
        let exact = curve_hi
            .fiber(&Complex::with_val(256, (6.455, 0.01)))
            .disc
            .to_c64();
        let rel = |v: Complex64| (v - exact).norm() / exact.norm();
        let chosen = curve.fiber(&z).disc;
        let x = Curve::x_of(&z);
        let expanded = curve.discriminant.eval(&x, &(1.0 / x));
        assert!(rel(chosen) < 2e-15, "chosen: {:e}", rel(chosen));
        assert!(rel(expanded) > 1e-13, "expanded: {:e}", rel(expanded));
    }

    #[test]
    fn expanded_discriminant_is_accurate_where_the_roots_merge() {
        // At Re z = 45 the leading terms of (B + a)² and 4AC (≈ 4e39) cancel to ≈ 3e22: the
        // unexpanded difference in double precision is wrong in its first digit, the expanded
        // polynomial is accurate to rounding (reference: the same polynomial at 256 bits).
        let a = 687.5;
        let z = Complex64::new(45.0, 3.0);
        let curve = Curve::new(&f0_dual(), Complex64::new(a, 0.0)).unwrap();
        let curve_hi = Curve::new(&f0_dual(), Complex::with_val(256, a)).unwrap();
        let exact = curve_hi
            .fiber(&Complex::with_val(256, (45.0, 3.0)))
            .disc
            .to_c64();
        let expanded = curve.fiber(&z).disc;
        let (ca, cb, cc) = curve.coefficients(&Curve::x_of(&z));
        let unexpanded = cb * cb - 4.0 * ca * cc;
        let rel = |v: Complex64| (v - exact).norm() / exact.norm();
        assert!(rel(expanded) < 1e-14, "expanded: {:e}", rel(expanded));
        // Negative companion: the cancellation is real.
        assert!(rel(unexpanded) > 1e-2, "unexpanded: {:e}", rel(unexpanded));
    }

    #[test]
    fn continuation_far_out_where_the_roots_merge() {
        // Along Im z = π from Re z = 0.5 to ±60 (relative root gap ≈ 5e-12 there) the double
        // precision continuation of F0* succeeds and its integrals agree with 40 digits.
        let a = 687.5;
        let ends = |a: Complex64, b: Complex| {
            let curve = Curve::new(&f0_dual(), a).unwrap();
            let sing = curve.singular_points().unwrap();
            let curve_hi = Curve::new(&f0_dual(), b.clone()).unwrap();
            let sing_hi = curve_hi.singular_points().unwrap();
            let pi = std::f64::consts::PI;
            let mut worst: f64 = 0.0;
            for end in [-60.0, 60.0] {
                let path = [Complex64::new(0.5, pi), Complex64::new(end, pi)];
                let [y0, _] = curve.roots(&path[0]);
                let (_, ints) = continue_along(
                    &curve,
                    &sing,
                    &Point { z: path[0], y: y0 },
                    &path,
                    &March::for_digits(15.0),
                )
                .unwrap();
                let prec = b.prec().0;
                let pi_hi = b.pi_like();
                let path_hi = [
                    Complex::with_val(prec, 0.5) + pi_hi.clone() * b.i_like(),
                    Complex::with_val(prec, end) + pi_hi * b.i_like(),
                ];
                let [y0_hi, _] = curve_hi.roots(&path_hi[0]);
                let (_, hi) = continue_along(
                    &curve_hi,
                    &sing_hi,
                    &Point {
                        z: path_hi[0].clone(),
                        y: y0_hi,
                    },
                    &path_hi,
                    &March::for_digits(40.0),
                )
                .unwrap();
                let (eta, omega) = (hi.eta.to_c64(), hi.omega.to_c64());
                worst = worst
                    .max((ints.eta - eta).norm() / eta.norm())
                    .max((ints.omega - omega).norm() / omega.norm());
            }
            worst
        };
        let worst = ends(Complex64::new(a, 0.0), Complex::with_val(170, a));
        assert!(worst < 1e-12, "{worst:e}");
    }

    #[test]
    fn a_root_between_the_sheets_is_refused() {
        // The mean of the two roots identifies no sheet: typed error, no guess (negative
        // companion of the sheet identification by ±√Δ).
        let curve = Curve::new(&f0(), Complex64::new(20.0, 0.0)).unwrap();
        let z = Complex64::new(0.3, 1.0);
        let [y1, y2] = curve.roots(&z);
        assert!(curve.sheet_point(&Point { z, y: y1 }).is_ok());
        let r = curve.sheet_point(&Point {
            z,
            y: 0.5 * (y1 + y2),
        });
        assert!(matches!(r, Err(CoverError::SheetAmbiguous { .. })), "{r:?}");
    }

    fn agm_f64(mut a: f64, mut b: f64) -> f64 {
        for _ in 0..40 {
            let m = 0.5 * (a + b);
            b = (a * b).sqrt();
            a = m;
        }
        a
    }
}
