//! The double cover of the z-plane defined by the curve `E_a : A(x) y² + (B(x) + a) y + C(x) = 0`,
//! `x = −e^z`: the fiber over a point (the two roots and their sheets), branch points,
//! punctures, and how the two roots behave at the ends of the z-line. Following a root along a
//! path is [`crate::curve::continuation`].
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
//! - Branch points: zeros of `x^k Δ(x)` ([`crate::numerics::roots`]); in z they repeat with
//!   period 2πi.
//! - Punctures: zeros of A and C (one root runs to ∞ or 0 there).
//!
//! # Accuracy
//! Δ, D and x ∂_x φ are evaluated in the form with the smaller terms (see [`Curve::fiber`] and
//! [`Curve::log_slope`]), so far out where the roots merge the integrands stay accurate to
//! rounding. Starting from a point given by its root y, the sheet is the one of ±√Δ nearer to
//! `A y − C/y` ([`Curve::sheet_point`]); [`SheetPoint`] carries D from one continuation to the
//! next.
//!
//! # Errors
//! [`CoverError`]: a modulus where the curve degenerates, a path through a singular point,
//! roots that cannot be told apart at the working precision.
//!
//! # References
//! The curve and its sheets: `docs/MATHEMATICS.md` §1 and §4.

use crate::curve::laurent::{Laurent, StripParts, Univariate};
use crate::numerics::complex::CNum;
use crate::numerics::laurent_poly::LaurentPoly;
use crate::numerics::roots::{polynomial_roots, RootsError};
use crate::precision::MAX_LAYOUT_BITS;
use thiserror::Error;

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

impl From<RootsError> for CoverError {
    fn from(e: RootsError) -> Self {
        match e {
            RootsError::NotConverged { iterations } => CoverError::RootsNotConverged { iterations },
        }
    }
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
    discriminant: LaurentPoly<T>,
    /// `W = A'C − AC'` (′ = x d/dx), expanded.
    wronskian: LaurentPoly<T>,
    /// `Q = 2ACB' − (B + a)(AC)'`, expanded: with W, `x ∂_x φ = (D W + Q)/(2AC)` on the sheet D.
    slope_numerator: LaurentPoly<T>,
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
        let poly = |u: &Univariate| LaurentPoly::from_integer_terms(&u.terms, &a);
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
        let ac = pa.times(&pc);
        let discriminant = pb.times(&pb).minus(&ac.scaled(4)).trimmed();
        let wronskian = pda.times(&pc).minus(&pa.times(&pdc)).trimmed();
        let ac_euler = pda.times(&pc).plus(&pa.times(&pdc));
        let slope_numerator = ac
            .times(&pdb)
            .scaled(2)
            .minus(&pb.times(&ac_euler))
            .trimmed();
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
                z: crate::numerics::complex::show(p.z.to_c64()),
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
    pub fn y_dphi_dy(&self, z: &T, y: &T) -> T {
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
        let first = match polynomial_roots(&poly) {
            Ok(roots) => return Ok(roots),
            Err(e) => e,
        };
        // Two branch points closer than the precision resolves form a near-double root that can
        // stall the iteration: the roots of the same coefficients at more bits, rounded back.
        let prec = self.modulus.prec();
        let mut bits = 2 * prec.max(64);
        while bits <= MAX_LAYOUT_BITS {
            let raised: Vec<rug::Complex> = poly
                .iter()
                .map(|c| rug::Complex::with_val(bits, c.to_complex()))
                .collect();
            if let Ok(roots) = polynomial_roots(&raised) {
                return Ok(roots.iter().map(|z| T::from_complex(z, prec)).collect());
            }
            bits *= 2;
        }
        Err(first.into())
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
    /// ≈ 4π²/(Δm |r|) apart (F0: Δm = 2, the 2π²/|r| of docs/MATHEMATICS.md §2; measured for all 15
    /// families, `zeros::tail_zeros`).
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

/// `z − s` shifted by the multiple of 2πi that brings its imaginary part nearest to 0: the
/// offset from the nearest 2πi translate of s, at the precision of z (exact however close the
/// two points are, relative to their size).
pub fn periodic_offset<T: CNum>(z: &T, s: &T) -> T {
    let d = z.clone() - s.clone();
    let k = (d.im_f64() / (2.0 * std::f64::consts::PI)).round();
    if k == 0.0 {
        d
    } else {
        let two_pi_i = d.int_like(2) * d.pi_like() * d.i_like();
        let k = d.int_like(k as i64);
        d - two_pi_i * k
    }
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

#[cfg(test)]
mod tests {
    use super::*;
    use num_complex::Complex64;
    use rug::Complex;

    /// F0* (the square with vertices (±1, ±1)): the two roots merge as x → 0 and x → ∞.
    fn f0_dual() -> Laurent {
        Laurent::tempered(&crate::lattice::catalogue::by_id("F0*").unwrap().polygon())
    }

    fn f0() -> Laurent {
        Laurent::from_terms(vec![([1, 0], 1), ([0, 1], 1), ([-1, 0], 1), ([0, -1], 1)])
    }

    #[test]
    fn discriminant_near_a_finite_branch_point_at_a_large_modulus() {
        // P2 at a = 636 (level 4), z = 6.455 + 0.01i, near the branch points at Re z ≈ ln a: in
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
}
