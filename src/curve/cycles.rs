//! The cycles α and β of the curve over the z-plane: where the α circle lies, and which loop is
//! β — the rule that works for all 15 strip families.
//!
//! # Rule
//! - **α**: the circle |x| = e^{z_α}, z_α = 0 unless A or C vanishes at x = −1 (a puncture at
//!   z = 0), then z_α = 1/2 ([`alpha_offset`]).
//! - **β**: the circle |x| = e^{z_α} separates the four branch points of the x-line into two
//!   inside and two outside (0 and ∞ count when they branch); α is homologous to a loop around
//!   the inside pair, so a loop around one inside and one outside branch point meets α once. β is
//!   the stadium around the segment from the finite inside branch point nearest the circle to
//!   the finite outside one nearest it (its 2πi translate closest in Im; ties prefer the upper
//!   one) ([`beta_loop`], [`stadium`]). A puncture close to the segment is kept inside the
//!   stadium, one farther away outside; either choice changes R_β by (2πi)²Z only, i.e. ν by an
//!   integer, which the level offset of the family absorbs. The orientation (Im τ > 0) is fixed
//!   where the periods are integrated ([`crate::curve::periods::beta_path`]).
//!
//! # Accuracy
//! The layout is in double precision (the periods are integrated at the working precision along
//! it); two branch points closer than about 5e-14 relative cannot be separated by it
//! ([`CycleError::BranchPointsTooClose`]: P2 beyond level 40).
//!
//! # Errors
//! [`CycleError`].
//!
//! # References
//! `docs/MATHEMATICS.md` §4.

use crate::curve::cover::{CoverError, Curve, Singular, SingularKind};
use crate::numerics::complex::CNum;
use crate::numerics::plane::segment_distance;
use thiserror::Error;

/// Why no β cycle could be laid out.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum CycleError {
    #[error(transparent)]
    Cover(#[from] CoverError),
    /// The branch points do not split into two inside and two outside the α circle.
    #[error("no β cycle: the branch points do not straddle the α circle |x| = e^{z_alpha} (found {inside} inside, {outside} outside); this modulus is beyond what the double-precision layout of the cycles resolves, i.e. beyond regwave's current range")]
    NoBetaCycle {
        z_alpha: f64,
        inside: usize,
        outside: usize,
    },
    /// Two branch points are closer than the double-precision layout of the β loop resolves
    /// (a conjugate pair at ln a ± iε, ε ≈ 2a^{−3/2} for P2: the limit is near level 40).
    #[error("branch points near z = {near:.6} are {separation:.1e} apart, below what the double-precision layout of the beta loop resolves (about 5e-14 relative); this modulus is beyond regwave's current range")]
    BranchPointsTooClose { near: f64, separation: f64 },
}

/// The real part z_α of the α circle |x| = e^{z_α}.
pub fn alpha_offset<T: CNum>(curve: &Curve<T>) -> Result<f64, CoverError> {
    let (la, lc) = curve.puncture_orders()?;
    Ok(if la + lc > 0 { 0.5 } else { 0.0 })
}

/// The β cycle chosen by the rule of this module: its polyline (closed) and the two branch points.
#[derive(Debug, Clone, serde::Serialize)]
pub struct BetaLoop {
    /// The two branch points the loop surrounds (z, f64).
    pub branch_points: [[f64; 2]; 2],
    /// Closed polyline around them.
    pub polyline: Vec<[f64; 2]>,
    /// Whether a puncture lies inside the loop.
    pub encloses_puncture: bool,
}

/// The β loop of the rule of this module.
///
/// # Errors
/// [`CycleError::NoBetaCycle`] when the branch points do not straddle the α circle.
pub fn beta_loop<T: CNum>(
    curve: &Curve<T>,
    singular: &[Singular<T>],
) -> Result<BetaLoop, CycleError> {
    let two_pi = 2.0 * std::f64::consts::PI;
    let z_alpha = alpha_offset(curve)?;
    let branch: Vec<[f64; 2]> = singular
        .iter()
        .filter(|s| s.kind == SingularKind::Branch)
        .map(|s| [s.z.re_f64(), s.z.im_f64()])
        .collect();
    let inside: Vec<[f64; 2]> = branch.iter().copied().filter(|b| b[0] < z_alpha).collect();
    let outside: Vec<[f64; 2]> = branch.iter().copied().filter(|b| b[0] > z_alpha).collect();
    if inside.is_empty() || outside.is_empty() {
        return Err(CycleError::NoBetaCycle {
            z_alpha,
            inside: inside.len(),
            outside: outside.len(),
        });
    }
    // Nearest to the circle; ties (conjugate pairs) prefer the upper point. The tolerances are
    // relative to rounding, not absolute: at high levels a conjugate pair can be closer than any
    // fixed tolerance (P2: ln a ± 2i a^{−3/2}, 1e-9 apart at level 25).
    let tie = 1e-13 * branch.iter().map(|b| b[0].abs()).fold(1.0, f64::max);
    let b_in = *inside
        .iter()
        .max_by(|p, q| {
            if (p[0] - q[0]).abs() < tie {
                p[1].total_cmp(&q[1])
            } else {
                p[0].total_cmp(&q[0])
            }
        })
        .expect("non-empty");
    let mut b_out = *outside
        .iter()
        .min_by(|p, q| {
            if (p[0] - q[0]).abs() < tie {
                q[1].total_cmp(&p[1])
            } else {
                p[0].total_cmp(&q[0])
            }
        })
        .expect("non-empty");
    // The 2πi translate of b_out closest in Im to b_in (ties: the upper one).
    let k = ((b_in[1] - b_out[1]) / two_pi).round();
    let mut best = f64::INFINITY;
    let base = b_out;
    for dk in [-1.0, 0.0, 1.0] {
        let cand = [base[0], base[1] + (k + dk) * two_pi];
        let d = (cand[1] - b_in[1]).abs();
        if d < best - tie || ((d - best).abs() <= tie && cand[1] > b_out[1]) {
            best = best.min(d);
            b_out = cand;
        }
    }
    // Clearance from the other branch points (all translates) and the punctures.
    let mut clearance_branch = f64::INFINITY;
    let mut puncture_distance = f64::INFINITY;
    for s in singular {
        let p = [s.z.re_f64(), s.z.im_f64()];
        for j in -3..=3 {
            let q = [p[0], p[1] + j as f64 * two_pi];
            let d = segment_distance(q, b_in, b_out);
            let is_end = |e: [f64; 2]| {
                ((q[0] - e[0]).powi(2) + (q[1] - e[1]).powi(2)).sqrt() < 1e-14 * (1.0 + e[0].abs())
            };
            match s.kind {
                SingularKind::Branch if !is_end(b_in) && !is_end(b_out) => {
                    clearance_branch = clearance_branch.min(d)
                }
                SingularKind::Puncture => puncture_distance = puncture_distance.min(d),
                _ => {}
            }
        }
    }
    let length = ((b_out[0] - b_in[0]).powi(2) + (b_out[1] - b_in[1]).powi(2)).sqrt();
    let scale = 1.0 + b_in[0].abs().max(b_out[0].abs());
    if clearance_branch < 5e-14 * scale {
        return Err(CycleError::BranchPointsTooClose {
            near: b_out[0],
            separation: clearance_branch,
        });
    }
    let mut delta = (0.4 * clearance_branch).min(0.25 * length).min(1.0);
    let encloses_puncture = puncture_distance < 0.5 * delta;
    if !encloses_puncture {
        delta = delta.min(0.5 * puncture_distance);
    }
    Ok(BetaLoop {
        branch_points: [b_in, b_out],
        polyline: stadium(b_in, b_out, delta),
        encloses_puncture,
    })
}

/// A closed polyline at distance δ around the segment [a, b], counter-clockwise, starting and
/// ending at the middle of the upper side.
pub fn stadium(a: [f64; 2], b: [f64; 2], delta: f64) -> Vec<[f64; 2]> {
    let d = [b[0] - a[0], b[1] - a[1]];
    let len = (d[0] * d[0] + d[1] * d[1]).sqrt();
    let u = [d[0] / len, d[1] / len];
    let n = [-u[1], u[0]];
    let at = |c: [f64; 2], angle: f64| {
        let (s, co) = angle.sin_cos();
        [
            c[0] + delta * (co * u[0] + s * n[0]),
            c[1] + delta * (co * u[1] + s * n[1]),
        ]
    };
    let mid = [
        0.5 * (a[0] + b[0]) + delta * n[0],
        0.5 * (a[1] + b[1]) + delta * n[1],
    ];
    let arc = 6;
    // Upper side (+n) from the middle towards a, around a, lower side to b, around b, back.
    let mut out = vec![mid];
    for k in 0..=arc {
        let angle = std::f64::consts::FRAC_PI_2 + std::f64::consts::PI * k as f64 / arc as f64;
        out.push(at(a, angle));
    }
    for k in 0..=arc {
        let angle = -std::f64::consts::FRAC_PI_2 + std::f64::consts::PI * k as f64 / arc as f64;
        out.push(at(b, angle));
    }
    out.push(mid);
    out
}
