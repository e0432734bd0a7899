//! The eigenfunction of the ħ = 2π quantum curve at an attractor modulus, from the regulator.
//!
//! # Formula
//! With `λ = R_α/Ω_α`, on the cover over the z-plane (x = −e^z)
//! `χ(z̃) = exp(−(1/2πi) ∫_{z̃₀}^{z̃} (z d log(−y) − λ ω))`, ω = dz/D, and
//! `ψ(z) = (χ(z̃) − χ(ι̃z̃)) / D(z̃)`,
//! independent of the sheet (D changes sign under ι̃), single valued in z and analytic in the
//! strip |Im z| < 2π exactly when a is an attractor modulus; then ψ on R is an eigenfunction,
//! Ôψ = aψ (MATH.md §5).
//!
//! # Conventions
//! - Base point z̃₀ = (z₀, y₀) on the *spine* Im z = c (c chosen per family in (0, 2π) as far as
//!   possible from the singular points), y₀ the root of larger modulus.
//! - **The other sheet is reached by continuation**: χ(ι̃z̃₀) is the value after continuing from
//!   z̃₀ once around the branch point nearest to z₀ back to z₀ (never set by hand).
//! - Route to a target z: along the spine to Re z, then vertically to z; both sheets follow the
//!   same z-route.
//!
//! # Accuracy
//! That of the path integrals ([`crate::cover`]) times the condition of exp and of the
//! difference χ − χ∘ι̃ (large where |ψ| is small: see the tail and branch-point notes of the
//! verification module when it lands). Measured: see `tests/eigenfn.rs`.
//!
//! # Errors
//! [`EigenError`].
//!
//! # References
//! MATH.md §5 (the construction, and the checks it was confirmed with).

use crate::cover::{continue_along, CoverError, Curve, March, Point, Singular, SingularKind};
use crate::laurent::Laurent;
use crate::numeric::CNum;
use crate::periods::{self, PeriodsError};
use thiserror::Error;

/// Distance to a branch point or puncture below which ψ is evaluated by the mean-value formula.
pub const NEAR_SINGULAR: f64 = 0.05;

/// Why an eigenfunction could not be built or evaluated.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum EigenError {
    #[error(transparent)]
    Cover(#[from] CoverError),
    #[error(transparent)]
    Periods(#[from] PeriodsError),
    /// The curve has no branch point to continue around.
    #[error("no branch point found to reach the other sheet")]
    NoBranchPoint,
}

/// The constructed eigenfunction at one modulus.
#[derive(Debug, Clone)]
pub struct Eigenfunction<T> {
    curve: Curve<T>,
    singular: Vec<Singular<T>>,
    /// λ = R_α/Ω_α.
    pub lambda: T,
    /// Im z of the spine.
    pub spine: f64,
    /// The base point z̃₀ on the spine.
    pub base: Point<T>,
    /// ι̃z̃₀ reached by continuation, with the exponent integral accumulated on the way.
    pub base_other: (Point<T>, T),
    march: March,
}

/// Values of χ on both sheets and D at one z.
#[derive(Debug, Clone)]
pub struct SheetValues<T> {
    pub chi: T,
    pub chi_other: T,
    pub d: T,
}

impl<T: CNum> Eigenfunction<T> {
    /// Builds the eigenfunction data at modulus `a` (precision of `a`), with the spine at Im z = c
    /// (None: the family's default, farthest from the singular points).
    ///
    /// # Errors
    /// See [`EigenError`].
    pub fn new(laurent: &Laurent, a: T, digits: f64, spine: Option<f64>, base_re: f64) -> Result<Self, EigenError> {
        let curve = Curve::new(laurent, a)?;
        let singular = curve.singular_points()?;
        let march = March::for_digits(digits);
        let alpha = periods::alpha_path(&curve, &singular, &march)?;
        let lambda = alpha.regulator.clone() / alpha.omega.clone();
        let c = spine.unwrap_or_else(|| default_spine(&singular));
        let like = curve.modulus().clone();
        let z0 = T::from_f64s(base_re, c, like.prec());
        let [y0, _] = curve.roots(&z0);
        let base = Point { z: z0, y: y0 };
        let mut eig = Eigenfunction { curve, singular, lambda, spine: c, base: base.clone(), base_other: (base.clone(), like.int_like(0)), march };
        eig.base_other = eig.other_sheet_base()?;
        Ok(eig)
    }

    /// The curve.
    pub fn curve(&self) -> &Curve<T> {
        &self.curve
    }

    /// Continues z̃₀ once around the branch point nearest to z₀ and back: ι̃z̃₀ and the exponent
    /// integral `∫ (z d log y − λ ω)` along that loop.
    fn other_sheet_base(&self) -> Result<(Point<T>, T), EigenError> {
        let z0 = [self.base.z.re_f64(), self.base.z.im_f64()];
        let two_pi = 2.0 * std::f64::consts::PI;
        // Nearest branch point (any 2πi translate) to z₀.
        let mut best: Option<([f64; 2], f64)> = None;
        for s in self.singular.iter().filter(|s| s.kind == SingularKind::Branch) {
            let p = [s.z.re_f64(), s.z.im_f64()];
            let k = ((z0[1] - p[1]) / two_pi).round();
            for dk in [-1.0, 0.0, 1.0] {
                let q = [p[0], p[1] + (k + dk) * two_pi];
                let d = ((q[0] - z0[0]).powi(2) + (q[1] - z0[1]).powi(2)).sqrt();
                if best.map(|b| d < b.1).unwrap_or(true) {
                    best = Some((q, d));
                }
            }
        }
        let (b, _) = best.ok_or(EigenError::NoBranchPoint)?;
        // Radius: well inside the gap to every other singular point.
        let mut gap = f64::INFINITY;
        for s in &self.singular {
            let p = [s.z.re_f64(), s.z.im_f64()];
            for j in -2..=2 {
                let q = [p[0], p[1] + j as f64 * two_pi];
                let d = ((q[0] - b[0]).powi(2) + (q[1] - b[1]).powi(2)).sqrt();
                if d > 1e-9 {
                    gap = gap.min(d);
                }
            }
        }
        let to_base = [z0[0] - b[0], z0[1] - b[1]];
        let dist = (to_base[0].powi(2) + to_base[1].powi(2)).sqrt();
        let r = (0.3 * gap).min(0.5 * dist);
        let start_angle = to_base[1].atan2(to_base[0]);
        let prec = self.base.z.prec();
        let mut path = vec![self.base.z.clone()];
        for k in 0..=16 {
            let t = start_angle + 2.0 * std::f64::consts::PI * k as f64 / 16.0;
            path.push(T::from_f64s(b[0] + r * t.cos(), b[1] + r * t.sin(), prec));
        }
        path.push(self.base.z.clone());
        let (end, ints) = continue_along(&self.curve, &self.singular, &self.base, &path, &self.march)?;
        let exponent = ints.eta - self.lambda.clone() * ints.omega;
        Ok((end, exponent))
    }

    /// χ on both sheets and D at z, along the route spine → vertical.
    ///
    /// # Errors
    /// See [`crate::cover::continue_along`].
    pub fn sheets_at(&self, z: &T) -> Result<SheetValues<T>, EigenError> {
        let prec = z.prec();
        let corner = T::from_f64s(z.re_f64(), self.spine, prec);
        let path = vec![self.base.z.clone(), corner, z.clone()];
        self.sheets_along(&path)
    }

    /// χ on both sheets and D at the end of an explicit route (starting at the base point).
    ///
    /// # Errors
    /// See [`crate::cover::continue_along`].
    pub fn sheets_along(&self, path: &[T]) -> Result<SheetValues<T>, EigenError> {
        let (p1, i1) = continue_along(&self.curve, &self.singular, &self.base, path, &self.march)?;
        let (p2, i2) = continue_along(&self.curve, &self.singular, &self.base_other.0, path, &self.march)?;
        let like = &self.lambda;
        let two_pi_i = like.int_like(2) * like.pi_like() * like.i_like();
        let e1 = i1.eta - self.lambda.clone() * i1.omega;
        let e2 = self.base_other.1.clone() + i2.eta - self.lambda.clone() * i2.omega;
        let chi = (-(e1 / two_pi_i.clone())).exp();
        let chi_other = (-(e2 / two_pi_i)).exp();
        let d = self.curve.d(&p1.z, &p1.y);
        let _ = p2;
        Ok(SheetValues { chi, chi_other, d })
    }

    /// ψ(z) = (χ(z̃) − χ(ι̃z̃))/D(z̃) (unnormalized), directly (no special handling).
    ///
    /// # Errors
    /// See [`Eigenfunction::sheets_at`].
    pub fn psi_direct(&self, z: &T) -> Result<T, EigenError> {
        let v = self.sheets_at(z)?;
        Ok((v.chi - v.chi_other) / v.d)
    }

    /// ψ(z). Within [`NEAR_SINGULAR`] of a branch point or puncture of the cover — where the
    /// quotient loses about one digit per decade of distance, or the route would end on the
    /// singular point — ψ is evaluated by the mean-value (Cauchy) formula
    /// `ψ(z) = (1/M) Σ_k ψ(z + ρ e^{2πik/M})` on a circle of radius ρ = 2·[`NEAR_SINGULAR`]
    /// (ψ is analytic in the strip; the trapezoid rule on the circle converges like (ρ/R)^M,
    /// R ≥ 2π − |Im z| the distance to the poles at ±2πi).
    ///
    /// # Errors
    /// See [`Eigenfunction::sheets_at`].
    pub fn psi(&self, z: &T) -> Result<T, EigenError> {
        if self.distance_to_singular(z) >= NEAR_SINGULAR {
            return self.psi_direct(z);
        }
        let prec = z.prec();
        let rho = 2.0 * NEAR_SINGULAR;
        let m = (self.march.digits / 1.2).ceil().max(16.0) as usize;
        let mut acc = z.int_like(0);
        for k in 0..m {
            let t = 2.0 * std::f64::consts::PI * (k as f64 + 0.5) / m as f64;
            let w = z.clone() + T::from_f64s(rho * t.cos(), rho * t.sin(), prec);
            acc = acc + self.psi_direct(&w)?;
        }
        Ok(acc / z.int_like(m as i64))
    }

    /// Distance from z to the nearest singular point of the cover (all 2πi translates).
    pub fn distance_to_singular(&self, z: &T) -> f64 {
        let p = [z.re_f64(), z.im_f64()];
        self.singular
            .iter()
            .map(|s| crate::cover::periodic_distance(p, [s.z.re_f64(), s.z.im_f64()]))
            .fold(f64::INFINITY, f64::min)
    }
}

/// The spine height c ∈ (0, 2π) farthest (in Im, modulo 2π) from every singular point.
fn default_spine<T: CNum>(singular: &[Singular<T>]) -> f64 {
    let two_pi = 2.0 * std::f64::consts::PI;
    let ims: Vec<f64> = singular.iter().map(|s| s.z.im_f64().rem_euclid(two_pi)).collect();
    let mut best = (std::f64::consts::PI, -1.0);
    for k in 1..256 {
        let c = two_pi * k as f64 / 256.0;
        let clearance = ims
            .iter()
            .map(|&m| {
                let d = (c - m).rem_euclid(two_pi);
                d.min(two_pi - d)
            })
            .fold(f64::INFINITY, f64::min);
        if clearance > best.1 {
            best = (c, clearance);
        }
    }
    best.0
}
