//! Single-valuedness of ψ: the figures that tell an attractor modulus from any other modulus.
//!
//! # Formulas
//! - **Route dependence**: ψ from two constructions with different base points and spines
//!   (z₀ = 0.3 + ic and z₀' = −0.8 + i(c + 0.6)) differ by a constant factor at an attractor
//!   modulus; the defect is `max_r |ψ(r) − κψ'(r)| / max_r |ψ(r)|` over a few points of R, κ fixed
//!   at r = 0.2. Off the attractor modulus χ is multivalued and the defect is large.
//! - **Cauchy defect**: for every branch point b (representatives with Im b ∈ (−π, π]),
//!   `|∮ ψ dz| / (ρ·max|ψ|)` on the circle |z − b| = ρ (ρ = 0.4 × the gap to the nearest other
//!   singular point, M = 64 points, trapezoid rule: exponentially accurate for analytic ψ), with ψ
//!   continued around the circle on the cover (the sheets swap, ψ must not), together with the
//!   closure defect `|ψ(end) − ψ(start)|/max|ψ|`; the largest over the branch points.
//!
//! # What they detect
//! These are the negative controls: the eigen-equation residual is not one (for dP3 and F0 it
//! stays tiny off the attractor modulus; [`crate::checks::residual`]). Neither figure alone is a
//! negative control for every family: for Q5, T6, Q6 and Q7 the two routes of the
//! route-dependence check differ by a loop on which χ stays single valued off the attractor too
//! (1e-15 at a(1 + 1e-6), measured), while the Cauchy defect is ≥ 1e-5; audits therefore report
//! the larger of the two.
//!
//! # Accuracy
//! Measured at double precision: ≈ 1e-12…1e-14 at attractor moduli, ≥ 1e-8 at a modulus
//! perturbed by 1e-6 (`tests/verify.rs`).
//!
//! # Errors
//! [`VerifyError`].
//!
//! # References
//! `docs/MATHEMATICS.md` §5 and §7; trapezoid rule on circles for analytic functions: "The exponentially convergent trapezoidal rule", SIAM Review 56 (2014) 385–458.

use crate::checks::VerifyError;
use crate::curve::cover::SingularKind;
use crate::curve::laurent::Laurent;
use crate::eigenfunction::construction::{mean_value_circle, Eigenfunction};
use crate::numerics::complex::CNum;

/// Points of R where the two constructions are compared.
const ROUTE_POINTS: [f64; 4] = [-1.7, -0.3, 0.9, 2.2];

/// Route dependence of the eigenfunction `eig` (built with the default spine and base point
/// [`crate::eigenfunction::profile::BASE_RE`]) against a second construction of φ at the same modulus with its
/// base point at −0.8 and its spine 0.6 higher.
///
/// # Errors
/// See [`crate::eigenfunction::construction::EigenError`].
pub fn route_dependence<T: CNum>(
    laurent: &Laurent,
    eig: &Eigenfunction<T>,
) -> Result<f64, VerifyError> {
    let a = eig.curve().modulus().clone();
    let other = Eigenfunction::new(laurent, a.clone(), Some(eig.spine + 0.6), -0.8)?;
    let prec = a.prec();
    let at = |e: &Eigenfunction<T>, r: f64| e.psi(&T::from_f64s(r, 0.0, prec));
    let kappa = at(eig, 0.2)? / at(&other, 0.2)?;
    let mut size: f64 = 0.0;
    let mut worst: f64 = 0.0;
    for r in ROUTE_POINTS {
        let p1 = at(eig, r)?;
        let p2 = at(&other, r)?;
        size = size.max(p1.abs_f64());
        worst = worst.max((p1 - kappa.clone() * p2).abs_f64());
    }
    Ok(worst / size)
}

/// Points on each Cauchy circle.
const CAUCHY_POINTS: usize = 64;

/// The largest Cauchy/closure defect of ψ around the branch points in the strip.
///
/// # Errors
/// See [`crate::eigenfunction::construction::EigenError`].
pub fn cauchy_defect<T: CNum>(eig: &Eigenfunction<T>) -> Result<f64, VerifyError> {
    let sing = eig.singular_points();
    let prec = eig.lambda.prec();
    let mut worst: f64 = 0.0;
    for b in sing.iter().filter(|s| s.kind == SingularKind::Branch) {
        let centre = [b.z.re_f64(), b.z.im_f64()];
        let gap = sing
            .iter()
            .map(|s| crate::curve::cover::periodic_distance(centre, [s.z.re_f64(), s.z.im_f64()]))
            .filter(|&d| d > 1e-9)
            .fold(1.0, f64::min);
        let rho = 0.4 * gap;
        let circle = mean_value_circle(&b.z, rho, CAUCHY_POINTS);
        // Route: along the spine above the first circle point, down to it, once around, and back
        // to the first point (closure).
        let first = &circle[0];
        let mut path = vec![
            eig.base.z.clone(),
            T::from_f64s(first.re_f64(), eig.spine, prec),
        ];
        path.extend(circle.iter().cloned());
        path.push(first.clone());
        let values = eig.psi_along(&path)?;
        // values[k] is ψ at path[k + 1]: the circle is values[1..=M], the closure values[M + 1].
        let on_circle = &values[1..=CAUCHY_POINTS];
        let size = on_circle.iter().map(|v| v.abs_f64()).fold(0.0, f64::max);
        let mut integral = b.z.int_like(0);
        for (v, w) in on_circle.iter().zip(&circle) {
            integral = integral + v.clone() * (w.clone() - b.z.clone());
        }
        // ∮ψ dz ≈ (2πi/M) Σ ψ(w_k)(w_k − b).
        let cauchy = integral.abs_f64() * 2.0 * std::f64::consts::PI / CAUCHY_POINTS as f64;
        let closure = (values[CAUCHY_POINTS + 1].clone() - values[1].clone()).abs_f64();
        worst = worst.max(cauchy / (size * rho)).max(closure / size);
    }
    Ok(worst)
}
