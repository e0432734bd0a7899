//! The eigenfunction of the ħ = 2π quantum curve at an attractor modulus, from the regulator.
//!
//! # Formula
//! With `λ = R_α/Ω_α`, on the cover over the z-plane (x = −e^z)
//! `χ(z̃) = exp(−(1/2πi) ∫_{z̃₀}^{z̃} (z d log(−y) − λ ω))`, ω = dz/D, and
//! `ψ(z) = (χ(z̃) − χ(ι̃z̃)) / D(z̃)`,
//! independent of the sheet (D changes sign under ι̃), single valued in z and analytic in the
//! strip |Im z| < 2π exactly when a is an attractor modulus; then ψ on R is an eigenfunction,
//! Ôψ = aψ (docs/MATHEMATICS.md §5).
//!
//! # Conventions
//! - Base point z̃₀ = (z₀, y₀) on the *spine* Im z = c (c chosen per family in (0, 2π) as far as
//!   possible from the singular points), y₀ the root of larger modulus.
//! - **The other sheet is reached by continuation**: χ(ι̃z̃₀) is the value after continuing from
//!   z̃₀ once around the branch point nearest to z₀ back to z₀ (never set by hand).
//! - Route to a target z: along the spine to Re z, then vertically to z (sideways around a
//!   singular point in the way); both sheets follow the same z-route. Only the first sheet is
//!   continued along it: on the other sheet ιy = C/(A y) and D changes sign, so its exponent
//!   integrand is `z d log(C/A) − (z d log y − λω)` node by node, and the continuation carries
//!   `∫ z d log(C/A)` ([`crate::curve::continuation::PathIntegrals::twist`]) beside the rest (half the work;
//!   measured: the same residuals to the last digit shown, F0 level 5 at 20 and 40 digits).
//!
//! # Accuracy
//! That of the path integrals ([`crate::curve::cover`]) times the condition of exp and of the
//! difference χ − χ∘ι̃ (large where |ψ| is small; `docs/MATHEMATICS.md` §6 lists the measured
//! losses). Measured: see `tests/eigenfn.rs`. In the tails the
//! sheets are carried by D ([`crate::curve::cover::SheetPoint`]), so the continuation reaches any |r|;
//! at an end where the two roots merge ([`crate::curve::cover::EndRoots::Merging`]) χ and χ∘ι̃ tend to
//! the same value and the difference loses ≈ |r|/(2 ln 10) digits (F0* level 1 in double
//! precision against 40 digits: 1e-10 at |r| = 30, 1e-7 at 45, 1e-4 at 60;
//! `examples/merging_roots.rs`), elsewhere ≈ 1e-14 out to |r| = 60.
//!
//! # Decay on R
//! |ψ| ≈ c |r|^p e^{−κ|r|} with κ = 1/2 at a branched end and 1 otherwise, p ≈ 1 at a merging
//! end ([`crate::eigenfunction::normalization::envelope_decay`]; the table of all 15 families is in
//! `docs/MATHEMATICS.md` §2).
//!
//! # Errors
//! [`EigenError`].
//!
//! # References
//! docs/MATHEMATICS.md §5 (the construction, and the checks it was confirmed with).

use crate::curve::continuation::{continue_along, continue_sheet, March, PathIntegrals};
use crate::curve::cover::{CoverError, Curve, Point, Singular, SingularKind};
use crate::curve::laurent::Laurent;
use crate::curve::periods::{self, PeriodsError};
use crate::numerics::complex::CNum;
use crate::numerics::plane::segment_distance;
use crate::precision::point_loss_digits;
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
    /// The branch point (z, a 2πi translate nearest to z₀) that the continuation to ι̃z̃₀ went
    /// around once.
    pub sheet_branch_point: [f64; 2],
    march: March,
    /// Orders (ℓ_A, ℓ_C) of the zeros of A and C at x = −1: ψ has a pole of order ℓ_C at +2πi
    /// and of order ℓ_A at −2πi.
    pole_orders: (usize, usize),
}

/// ψ on one line with the digits its values cost.
#[derive(Debug, Clone)]
pub struct LineSamples<T> {
    /// ψ at the points (None on a pole of ψ).
    pub values: Vec<Option<T>>,
    /// Digits the line lost relative to its largest |ψ|:
    /// `log₁₀(max_k max(|χ|, |χ∘ι̃|)/|D| / max_k |ψ|)` (at least 0).
    pub loss: f64,
    /// Per point, the digits of the working precision its value lost relative to its own size
    /// ([`crate::precision::point_loss_digits`]: the cancellation in χ − χ∘ι̃ at that point and
    /// the error of the exponent integral; infinite where χ over- or underflowed or ψ is 0);
    /// None on a pole. Points evaluated by the mean-value formula get the loss of the line
    /// relative to their size.
    pub point_loss: Vec<Option<f64>>,
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
    pub fn new(
        laurent: &Laurent,
        a: T,
        spine: Option<f64>,
        base_re: f64,
    ) -> Result<Self, EigenError> {
        let curve = Curve::new(laurent, a)?;
        let singular = curve.singular_points()?;
        let pole_orders = curve.puncture_orders()?;
        let march = March {
            twist: true,
            ..March::for_bits(curve.modulus().prec())
        };
        let alpha = periods::alpha_path(&curve, &singular, &march)?;
        let lambda = alpha.regulator.clone() / alpha.omega.clone();
        let c = spine.unwrap_or_else(|| default_spine(&singular));
        let like = curve.modulus().clone();
        let z0 = T::from_f64s(base_re, c, like.prec());
        let [y0, _] = curve.roots(&z0);
        let base = Point { z: z0, y: y0 };
        let mut eig = Eigenfunction {
            curve,
            singular,
            lambda,
            spine: c,
            base: base.clone(),
            base_other: (base.clone(), like.int_like(0)),
            sheet_branch_point: [f64::NAN; 2],
            march,
            pole_orders,
        };
        let (other, exponent, branch_point) = eig.other_sheet_base()?;
        eig.base_other = (other, exponent);
        eig.sheet_branch_point = branch_point;
        Ok(eig)
    }

    /// The curve.
    pub fn curve(&self) -> &Curve<T> {
        &self.curve
    }

    /// The singular points of the cover (representatives with Im z ∈ (−π, π]), computed once at
    /// construction.
    pub fn singular_points(&self) -> &[Singular<T>] {
        &self.singular
    }

    /// Real and imaginary parts of the branch points among [`Eigenfunction::singular_points`].
    pub fn branch_points(&self) -> Vec<[f64; 2]> {
        self.singular
            .iter()
            .filter(|s| s.kind == SingularKind::Branch)
            .map(|s| [s.z.re_f64(), s.z.im_f64()])
            .collect()
    }

    /// The exponent integral `∫ (z d log y − λ ω)` of a path piece.
    fn exponent(&self, ints: &PathIntegrals<T>) -> T {
        ints.eta.clone() - self.lambda.clone() * ints.omega.clone()
    }

    /// The exponent integral of the same z-path on the other sheet: `twist − exponent`
    /// ([`crate::curve::continuation::PathIntegrals::twist`]), so one continuation serves both sheets.
    fn other_exponent(&self, ints: &PathIntegrals<T>) -> T {
        ints.twist.clone() - self.exponent(ints)
    }

    /// `χ = exp(−e/(2πi))` for an accumulated exponent e.
    fn chi(&self, e: &T) -> T {
        let like = &self.lambda;
        let two_pi_i = like.int_like(2) * like.pi_like() * like.i_like();
        (-(e.clone() / two_pi_i)).exp()
    }

    /// Continues z̃₀ once around the branch point nearest to z₀ and back: ι̃z̃₀, the exponent
    /// integral `∫ (z d log y − λ ω)` along that loop, and the branch point.
    fn other_sheet_base(&self) -> Result<(Point<T>, T, [f64; 2]), EigenError> {
        let z0 = [self.base.z.re_f64(), self.base.z.im_f64()];
        let two_pi = 2.0 * std::f64::consts::PI;
        // Nearest branch point (any 2πi translate) to z₀.
        let mut best: Option<([f64; 2], f64)> = None;
        for s in self
            .singular
            .iter()
            .filter(|s| s.kind == SingularKind::Branch)
        {
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
        let (end, ints) =
            continue_along(&self.curve, &self.singular, &self.base, &path, &self.march)?;
        Ok((end, self.exponent(&ints), b))
    }

    /// χ on both sheets and D at z, along the route spine → vertical.
    ///
    /// # Errors
    /// See [`crate::curve::continuation::continue_along`].
    pub fn sheets_at(&self, z: &T) -> Result<SheetValues<T>, EigenError> {
        let prec = z.prec();
        let (r, im) = (z.re_f64(), z.im_f64());
        let corner = T::from_f64s(r, self.spine, prec);
        // The vertical step detours around a singular point on its way (measured: a mean-value
        // point straight above dP3's puncture z = 0 otherwise ended the route on it).
        let mut path = vec![self.base.z.clone()];
        path.extend(self.vertical_route(corner, z, r, self.spine, im));
        self.sheets_along(&path)
    }

    /// χ on both sheets and D at the end of an explicit route (starting at the base point).
    ///
    /// # Errors
    /// See [`crate::curve::continuation::continue_along`].
    pub fn sheets_along(&self, path: &[T]) -> Result<SheetValues<T>, EigenError> {
        let s1 = self.curve.sheet_point(&self.base)?;
        let (p1, i1) = continue_sheet(&self.curve, &self.singular, &s1, path, &self.march)?;
        // The other sheet follows the same z-path from ι̃z̃₀: its exponent is that of this
        // sheet's integrals; D is read on p1.
        let chi = self.chi(&self.exponent(&i1));
        let chi_other = self.chi(&(self.base_other.1.clone() + self.other_exponent(&i1)));
        Ok(SheetValues {
            chi,
            chi_other,
            d: p1.d,
        })
    }

    /// ψ at every vertex of a route starting at the base point (both sheets continued along it):
    /// e.g. around a circle, where ψ stays single valued at an attractor modulus while the sheets
    /// swap.
    ///
    /// # Errors
    /// See [`crate::curve::continuation::continue_along`].
    pub fn psi_along(&self, path: &[T]) -> Result<Vec<T>, EigenError> {
        let like = &self.lambda;
        let mut a1 = self.curve.sheet_point(&self.base)?;
        let (mut e1, mut e2) = (like.int_like(0), self.base_other.1.clone());
        let mut out = Vec::with_capacity(path.len());
        for w in path.windows(2) {
            let (p1, i1) = continue_sheet(&self.curve, &self.singular, &a1, w, &self.march)?;
            e1 = e1 + self.exponent(&i1);
            e2 = e2 + self.other_exponent(&i1);
            let chi = self.chi(&e1);
            let chi_other = self.chi(&e2);
            out.push((chi - chi_other) / p1.d.clone());
            a1 = p1;
        }
        Ok(out)
    }

    /// ψ(z) = (χ(z̃) − χ(ι̃z̃))/D(z̃) (unnormalized), directly (no special handling).
    ///
    /// # Errors
    /// See [`Eigenfunction::sheets_at`].
    pub fn psi_direct(&self, z: &T) -> Result<T, EigenError> {
        let v = self.sheets_at(z)?;
        Ok((v.chi - v.chi_other) / v.d)
    }

    /// ψ(z). Within [`NEAR_SINGULAR`] of a branch point or puncture of the cover in the interior
    /// of the strip — where the quotient loses about one digit per decade of distance, or the
    /// route would end on the singular point — ψ is evaluated by the mean-value (Cauchy) formula
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
        // Poles of ψ (punctures at ±2πi where C resp. A vanishes, and every puncture farther out)
        // get no mean value: the route to a point near them is regular, and a point on them is
        // refused by the continuation.
        if self.distance_to_pole(z) < 4.0 * NEAR_SINGULAR {
            return self.psi_direct(z);
        }
        // Elsewhere ψ is analytic in a neighbourhood of the closed strip (χ is single valued on
        // the whole cover at an attractor modulus), so the circle may cross Im z = ±2π: measured
        // for F0 level 5 at 40 digits, the residual with circles around r₁ ± 2πi stays at 1e-45
        // (a cap near 1e-14 seen earlier came from circle points rounded to f64), and the
        // removable punctures (−2πi for F1, where A(−1) ≠ 0) are evaluated this way.
        let m = (self.march.digits / 1.2).ceil().max(16.0) as usize;
        let mut acc = z.int_like(0);
        for w in mean_value_circle(z, 2.0 * NEAR_SINGULAR, m) {
            acc = acc + self.psi_direct(&w)?;
        }
        Ok(acc / z.int_like(m as i64))
    }

    /// ψ on the line Im z = `im` at the real parts `grid`, with the cost per point independent of
    /// its distance from the base point: the spine (Im z = c for the lines Im 0 and +2π, and its
    /// translate Im z = c − 2π for −2π, reached from the base point by a vertical path) is marched
    /// once in each direction from the base point, and each target is reached by one vertical
    /// step from the spine, on both sheets. Points within [`NEAR_SINGULAR`] of a singular point
    /// are evaluated by [`Eigenfunction::psi`]; points on a pole of ψ give `None`. An `im` within
    /// 1e-9 of a multiple of 2π means exactly that multiple, at the working precision.
    ///
    /// # Errors
    /// See [`crate::curve::continuation::continue_along`].
    pub fn psi_on_line(&self, grid: &[f64], im: f64) -> Result<Vec<Option<T>>, EigenError> {
        Ok(self.psi_on_line_with_loss(grid, im)?.0)
    }

    /// As [`Eigenfunction::psi_on_line`], also returning the cancellation loss on the line in
    /// decimal digits, `log₁₀(max_k max(|χ|, |χ∘ι̃|)/|D| / max_k |ψ|)`: the digits of the working
    /// precision that the difference χ − χ∘ι̃ consumes, relative to the scale of ψ on the line
    /// (the absolute accuracy that matters for the residual and the profiles).
    ///
    /// # Errors
    /// See [`Eigenfunction::psi_on_line`].
    pub fn psi_on_line_with_loss(
        &self,
        grid: &[f64],
        im: f64,
    ) -> Result<(Vec<Option<T>>, f64), EigenError> {
        let prec = self.lambda.prec();
        let exact: Vec<T> = grid.iter().map(|&r| T::from_f64s(r, 0.0, prec)).collect();
        let line = self.psi_on_line_at(&exact, im)?;
        Ok((line.values, line.loss))
    }

    /// As [`Eigenfunction::psi_on_line_with_loss`] at real parts given at the working precision
    /// (their imaginary parts are ignored): ψ is evaluated at exactly these points, e.g. the
    /// points of a decimal grid rounded to the working precision rather than to f64. Also
    /// returns the digits each value lost relative to its own size
    /// ([`LineSamples::point_loss`]).
    ///
    /// # Errors
    /// See [`Eigenfunction::psi_on_line`].
    pub fn psi_on_line_at(&self, points: &[T], im: f64) -> Result<LineSamples<T>, EigenError> {
        let grid: Vec<f64> = points.iter().map(|p| p.re_f64()).collect();
        // Loss relative to the scale of ψ on the line (zeros of ψ are not losses).
        let (mut largest_term, mut largest_value): (f64, f64) = (0.0, 0.0);
        let prec = self.lambda.prec();
        let two_pi = 2.0 * std::f64::consts::PI;
        let spine = if im < -1e-9 {
            self.spine - two_pi
        } else {
            self.spine
        };
        let like = &self.lambda;
        let two_pi_i = like.int_like(2) * like.pi_like() * like.i_like();
        // A line at a multiple of 2π is placed at that multiple computed at the working precision
        // (an f64 2π would cap the eigen-equation residual near 1e-13).
        let periods = (im / two_pi).round();
        let line_im = if (im - periods * two_pi).abs() < 1e-9 {
            two_pi_i.clone() * like.int_like(periods as i64)
        } else {
            T::from_f64s(0.0, im, prec)
        };
        // Spine start: the base point, or its vertical translate onto the lower spine. The sheets
        // are carried by D from point to point (y cannot tell them apart far out where the roots
        // merge).
        let mut s1 = self.curve.sheet_point(&self.base)?;
        let (mut e1, mut e2) = (like.int_like(0), self.base_other.1.clone());
        if (spine - self.spine).abs() > 1e-12 {
            let start = T::from_f64s(self.base.z.re_f64(), spine, prec);
            let path = [self.base.z.clone(), start];
            let (p1, i1) = continue_sheet(&self.curve, &self.singular, &s1, &path, &self.march)?;
            e1 = e1 + self.exponent(&i1);
            e2 = e2 + self.other_exponent(&i1);
            s1 = p1;
        }
        let base_re = self.base.z.re_f64();
        let mut out: Vec<Option<T>> = vec![None; grid.len()];
        let mut point_loss: Vec<Option<f64>> = vec![None; grid.len()];
        let mut order: Vec<usize> = (0..grid.len()).collect();
        order.sort_by(|&i, &j| grid[i].total_cmp(&grid[j]));
        let right: Vec<usize> = order
            .iter()
            .copied()
            .filter(|&i| grid[i] >= base_re)
            .collect();
        let left: Vec<usize> = order
            .iter()
            .rev()
            .copied()
            .filter(|&i| grid[i] < base_re)
            .collect();
        for side in [right, left] {
            let (mut a1, mut f1, mut f2) = (s1.clone(), e1.clone(), e2.clone());
            for i in side {
                let r = grid[i];
                let re = points[i].clone() - T::from_f64s(0.0, points[i].im_f64(), prec);
                let z = re.clone() + line_im.clone();
                if self.distance_to_pole(&z) < 1e-12 {
                    continue;
                }
                let on_spine = re + T::from_f64s(0.0, spine, prec);
                let along = [a1.z.clone(), on_spine.clone()];
                let (p1, i1) =
                    continue_sheet(&self.curve, &self.singular, &a1, &along, &self.march)?;
                f1 = f1 + self.exponent(&i1);
                f2 = f2 + self.other_exponent(&i1);
                a1 = p1;
                if self.distance_to_singular(&z) < NEAR_SINGULAR {
                    out[i] = Some(self.psi(&z)?);
                    continue;
                }
                let down = self.vertical_route(on_spine, &z, r, spine, im);
                let (q1, j1) =
                    continue_sheet(&self.curve, &self.singular, &a1, &down, &self.march)?;
                let exponent = f1.clone() + self.exponent(&j1);
                let exponent_other = f2.clone() + self.other_exponent(&j1);
                let chi = self.chi(&exponent);
                let chi_other = self.chi(&exponent_other);
                let d = q1.d;
                let diff = chi.clone() - chi_other.clone();
                let big = chi.abs_f64().max(chi_other.abs_f64()) / d.abs_f64();
                let value = diff / d.clone();
                largest_term = largest_term.max(big);
                largest_value = largest_value.max(value.abs_f64());
                point_loss[i] = Some(point_loss_digits(
                    chi.log10_abs().max(chi_other.log10_abs()) - d.log10_abs(),
                    value.log10_abs(),
                    exponent.abs_f64().max(exponent_other.abs_f64()),
                ));
                out[i] = Some(value);
            }
        }
        let loss = if largest_value > 0.0 {
            (largest_term / largest_value).log10().max(0.0)
        } else {
            0.0
        };
        // Values from the mean-value formula: the loss of the line, relative to their own size.
        for (v, l) in out.iter().zip(point_loss.iter_mut()) {
            if let (Some(v), None) = (v, &l) {
                *l = Some(point_loss_digits(
                    largest_value.log10() + loss,
                    v.log10_abs(),
                    0.0,
                ));
            }
        }
        Ok(LineSamples {
            values: out,
            loss,
            point_loss,
        })
    }

    /// The step from the spine point above `r` to `z`: straight down when that keeps clear of the
    /// singular points, else down a vertical line shifted sideways (by 3, 6 or 10 × [`NEAR_SINGULAR`],
    /// either side) and then across to z — the first detour whose clearance is at least
    /// min(2·[`NEAR_SINGULAR`], half the distance from z to its nearest singular point), or the
    /// clearest one. (Measured: a fixed sideways shift once ran the horizontal leg exactly through
    /// the translate r₁ − 2πi of an F0 branch point.)
    fn vertical_route(&self, on_spine: T, z: &T, r: f64, spine: f64, im: f64) -> Vec<T> {
        let prec = z.prec();
        let target = [r, im];
        let need = (2.0 * NEAR_SINGULAR).min(0.5 * self.distance_to_singular(z));
        let direct = [[r, spine], target];
        if self.clearance(&direct) >= need {
            return vec![on_spine, z.clone()];
        }
        let mut best: Option<(f64, f64)> = None;
        for step in [3.0, -3.0, 6.0, -6.0, 10.0, -10.0] {
            let x = r + step * NEAR_SINGULAR;
            let c = self.clearance(&[[r, spine], [x, spine], [x, im], target]);
            if best.map(|b| c > b.1).unwrap_or(true) {
                best = Some((x, c));
            }
            if c >= need {
                break;
            }
        }
        let x = best.map(|b| b.0).unwrap_or(r);
        vec![
            on_spine,
            T::from_f64s(x, spine, prec),
            T::from_f64s(x, im, prec),
            z.clone(),
        ]
    }

    /// Smallest distance from a polyline (f64 vertices) to the singular points and their 2πi
    /// translates.
    fn clearance(&self, polyline: &[[f64; 2]]) -> f64 {
        let two_pi = 2.0 * std::f64::consts::PI;
        let mut best = f64::INFINITY;
        for s in &self.singular {
            let (sr, si) = (s.z.re_f64(), s.z.im_f64());
            for j in -3..=3 {
                let p = [sr, si + j as f64 * two_pi];
                for w in polyline.windows(2) {
                    best = best.min(segment_distance(p, w[0], w[1]));
                }
            }
        }
        best
    }

    /// Distance from z to the nearest pole of ψ: +2πi when ℓ_C > 0, −2πi when ℓ_A > 0 (measured:
    /// |ψ| grows like ε^{−ℓ_C} resp. ε^{−ℓ_A} there, `examples/pole_probe.rs`; the zero of C resp.
    /// A in the eigen-equation cancels it), and, conservatively, every puncture 2πik with |k| ≥ 2
    /// when there is any; infinite when A and C do not vanish at x = −1.
    pub fn distance_to_pole(&self, z: &T) -> f64 {
        let (la, lc) = self.pole_orders;
        if la + lc == 0 {
            return f64::INFINITY;
        }
        let two_pi = 2.0 * std::f64::consts::PI;
        let (re, im) = (z.re_f64(), z.im_f64());
        let k = (im / two_pi).round();
        [k - 1.0, k, k + 1.0]
            .iter()
            .filter(|&&j| match j as i64 {
                0 => false,
                1 => lc > 0,
                -1 => la > 0,
                _ => true,
            })
            .map(|&j| (re * re + (im - j * two_pi).powi(2)).sqrt())
            .fold(f64::INFINITY, f64::min)
    }

    /// Distance from the point p = (re, im) to the nearest branch point (all 2πi translates).
    pub fn distance_to_branch_point(&self, p: [f64; 2]) -> f64 {
        self.singular
            .iter()
            .filter(|s| s.kind == SingularKind::Branch)
            .map(|s| crate::curve::cover::periodic_distance(p, [s.z.re_f64(), s.z.im_f64()]))
            .fold(f64::INFINITY, f64::min)
    }

    /// Distance from z to the nearest singular point of the cover (all 2πi translates).
    pub fn distance_to_singular(&self, z: &T) -> f64 {
        let p = [z.re_f64(), z.im_f64()];
        self.singular
            .iter()
            .map(|s| crate::curve::cover::periodic_distance(p, [s.z.re_f64(), s.z.im_f64()]))
            .fold(f64::INFINITY, f64::min)
    }
}

/// The m points `z + ρ e^{2πi(k + 1/2)/m}`, k = 0..m−1, of the mean-value formula, placed at the
/// working precision of z: the trapezoid rule on the circle is exact only for equally spaced
/// points, and angles rounded to f64 would move each point by ≈ 1e-17·ρ and cap the mean value
/// at ≈ 1e-17·|ψ'| (measured: the residual near F0's real branch points stalled at 5e-17 at
/// every precision until the points were computed this way).
pub fn mean_value_circle<T: CNum>(z: &T, rho: f64, m: usize) -> Vec<T> {
    let prec = z.prec();
    let two_pi_i = z.int_like(2) * z.pi_like() * z.i_like();
    let radius = T::from_f64s(rho, 0.0, prec);
    (0..m)
        .map(|k| {
            let angle = two_pi_i.clone() * z.int_like(2 * k as i64 + 1) / z.int_like(2 * m as i64);
            z.clone() + radius.clone() * angle.exp()
        })
        .collect()
}

/// The spine height c ∈ (0, 2π) farthest (in Im, modulo 2π) from every singular point.
fn default_spine<T: CNum>(singular: &[Singular<T>]) -> f64 {
    let two_pi = 2.0 * std::f64::consts::PI;
    let ims: Vec<f64> = singular
        .iter()
        .map(|s| s.z.im_f64().rem_euclid(two_pi))
        .collect();
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
