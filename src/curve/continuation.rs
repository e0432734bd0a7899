//! Continuation of a root of the curve along a path in the z-plane, with Gauss–Legendre
//! integration of the periods' integrands (ω, η, their a-derivatives) on the way.
//!
//! # Method
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
//! [`CoverError::SheetAmbiguous`] rather than guess.
//!
//! # Accuracy
//! With the step rule the integrand is analytic in a Bernstein ellipse of parameter ρ ≥ 3 + √8
//! ≈ 5.8 around every step (worst case: the singularity straight ahead), so an n-point rule
//! errs by ≲ ρ^{−2n}; n = 0.66·digits + 6 gives the digits with margin. The returned error
//! estimate is this a-priori bound times the integrand size, plus rounding. Measured agreement
//! with series and with the AGM: see `tests/periods.rs` and the tests below.
//!
//! # Errors
//! [`CoverError::SheetAmbiguous`], [`CoverError::ThroughSingularPoint`].
//!
//! # References
//! Gauss–Legendre: see [`crate::numerics::quadrature`]; the Bernstein-ellipse bound: "The
//! exponentially convergent trapezoidal rule", SIAM Review 56 (2014) 385–458, and
//! `docs/MATHEMATICS.md` §6.

use crate::curve::cover::{
    periodic_offset, CoverError, Curve, Fiber, Point, SheetPoint, Singular, SEPARATION_RATIO,
};
use crate::numerics::complex::CNum;
use crate::numerics::quadrature;
use crate::precision::{digits_of, tolerance, unit_roundoff, SUM_ROUNDING_BITS};

/// Step factor κ: step ≤ κ · distance to the nearest singular point (ρ ≥ 5.8, see above).
pub const STEP_FACTOR: f64 = 0.5;
/// Largest step.
pub const MAX_STEP: f64 = 2.0;

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
    /// Also integrate `∫ z d log(C/A)` ([`PathIntegrals::twist`]); only the eigenfunction needs
    /// it, the periods do not (it costs two divisions per node).
    pub twist: bool,
}

impl March {
    /// Settings for computations at `bits`: steps that deliver [`digits_of`] those bits.
    pub fn for_bits(bits: u32) -> Self {
        Self::for_digits(digits_of(bits))
    }

    /// Settings for `digits` decimal digits (a precision the values need not carry: for
    /// comparisons of the step rule only; computations use [`March::for_bits`]).
    pub fn for_digits(digits: f64) -> Self {
        March {
            nodes: (0.66 * digits + 6.0).ceil() as usize,
            digits,
            step_factor: STEP_FACTOR,
            max_step: MAX_STEP,
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
    let prec = start.z.prec();
    let sing: Vec<T> = singular.iter().map(|s| s.z.clone()).collect();
    let mut rules: Vec<Option<Vec<(T, T)>>> = vec![None; march.nodes + 8];
    let mut here = start.point();
    // The sheet is carried by D = ±√Δ (its sign), not by y: the two values of D stay a factor
    // −1 apart however close the two roots y come, so the choice below stays well separated
    // where the roots merge asymptotically (x → 0 or ∞ a branch point of the leading terms).
    let mut sheet = start.d.clone();
    let mut half_log_slope = curve.fiber(&start.z).half_log_slope;
    let mut acc = PathIntegrals::zero(&start.z);
    let two = start.z.int_like(2);
    let eps = unit_roundoff(prec);
    // Below the working precision relative to |z| a step could not even move z.
    let floor_log2 = -((prec.saturating_sub(16)) as f64);
    for target in path.iter().skip(1) {
        loop {
            let remaining = target.clone() - here.z.clone();
            let rem_log2 = remaining.log2_abs();
            if rem_log2 == f64::NEG_INFINITY {
                break;
            }
            // The nearest singular point at the working precision (two branch points can be
            // closer than f64 resolves relative to |z|, or than f64's range).
            let offset = nearest_offset(&here.z, &sing);
            let d_log2 = offset.as_ref().map_or(f64::INFINITY, |o| o.log2_abs());
            if d_log2 - (1.0 + here.z.abs_f64()).log2() < floor_log2 {
                return Err(CoverError::ThroughSingularPoint {
                    z: crate::numerics::complex::show(here.z.to_c64()),
                    distance: d_log2.exp2(),
                });
            }
            let step_log2 = (march.step_factor.log2() + d_log2).min(march.max_step.log2());
            let end = if step_log2 >= rem_log2 + 1e-7 * std::f64::consts::LOG2_E {
                target.clone()
            } else if step_log2 >= march.max_step.log2() {
                let ratio = march.max_step / rem_log2.exp2();
                here.z.clone() + remaining * T::from_f64s(ratio, 0.0, prec)
            } else {
                // h/|remaining| at the working precision (it can leave f64's range).
                let h = offset.expect("finite distance").abs_like()
                    * T::from_f64s(march.step_factor, 0.0, prec);
                here.z.clone() + remaining.clone() * (h / remaining.abs_like())
            };
            let half = (end.clone() - here.z.clone()) / two.clone();
            let mid = (end.clone() + here.z.clone()) / two.clone();
            let rho = bernstein_parameter(&mid, &half, &sing);
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
/// ρ = |w + √(w² − 1)| (the branch with modulus ≥ 1). w is formed at the working precision, so
/// that a singular point closer to the segment than f64 resolves relative to |z| still counts.
fn bernstein_parameter<T: CNum>(mid: &T, half: &T, singular: &[T]) -> f64 {
    use num_complex::Complex64;
    let two_pi_i = mid.int_like(2) * mid.pi_like() * mid.i_like();
    let mut best = f64::INFINITY;
    for s in singular {
        let o = periodic_offset(s, mid);
        for p in [
            o.clone() - two_pi_i.clone(),
            o.clone(),
            o + two_pi_i.clone(),
        ] {
            let w: Complex64 = (p / half.clone()).to_c64();
            if !(w.re.is_finite() && w.im.is_finite()) {
                continue;
            }
            let r = (w * w - 1.0).sqrt();
            let rho = (w + r).norm().max((w - r).norm());
            best = best.min(rho);
        }
    }
    best.max(1.0 + 1e-12)
}

/// The offset z − s to the nearest singular point s (any 2πi translate), at the working
/// precision; None without singular points.
fn nearest_offset<T: CNum>(z: &T, singular: &[T]) -> Option<T> {
    let mut best: Option<(T, f64)> = None;
    for s in singular {
        let o = periodic_offset(z, s);
        let l = o.log2_abs();
        if best.as_ref().is_none_or(|b| l < b.1) {
            best = Some((o, l));
        }
    }
    best.map(|b| b.0)
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
    let gap = far / near.max(scale * tolerance(z.prec(), SUM_ROUNDING_BITS));
    if gap < SEPARATION_RATIO {
        return Err(CoverError::SheetAmbiguous {
            z: crate::numerics::complex::show(z.to_c64()),
            gap,
        });
    }
    Ok(pick)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::curve::cover::SingularKind;
    use crate::curve::laurent::Laurent;
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

    fn f0_dual() -> Laurent {
        Laurent::tempered(&crate::lattice::catalogue::by_id("F0*").unwrap().polygon())
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

    fn agm_f64(mut a: f64, mut b: f64) -> f64 {
        for _ in 0..40 {
            let m = 0.5 * (a + b);
            b = (a * b).sqrt();
            a = m;
        }
        a
    }
}
