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
//! The layout is computed at the precision of the curve (every coordinate relative to the inner
//! branch point), and [`crate::curve::periods`] raises that precision by the crowding of the
//! closest branch pair (`precision::layout_bits`), so close pairs (P2 at level 100: 4a^{−3/2}
//! ≈ 1e-19 apart) are resolved; only a pair closer than the largest layout precision allows is
//! refused ([`CycleError::BranchPointsTooClose`]).
//!
//! # Errors
//! [`CycleError`].
//!
//! # References
//! `docs/MATHEMATICS.md` §4.

use crate::curve::cover::{periodic_offset, CoverError, Curve, Singular, SingularKind};
use crate::numerics::complex::CNum;
use std::cmp::Ordering;
use thiserror::Error;

/// Why no β cycle could be laid out.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum CycleError {
    #[error(transparent)]
    Cover(#[from] CoverError),
    /// The branch points do not split into two inside and two outside the α circle.
    #[error("no β cycle: the branch points do not straddle the α circle |x| = e^{z_alpha} (found {inside} inside, {outside} outside); the cycles cannot be laid out at this modulus")]
    NoBetaCycle {
        z_alpha: f64,
        inside: usize,
        outside: usize,
    },
    /// Two branch points are closer than the double-precision layout of the β loop resolves
    /// (a conjugate pair at ln a ± iε, ε ≈ 2a^{−3/2} for P2), even at the largest layout precision.
    #[error("branch points near z = {near:.6} are {separation:.1e} apart, closer than the largest layout precision of the beta loop resolves; this modulus is beyond regwave's range")]
    BranchPointsTooClose { near: f64, separation: f64 },
}

/// The real part z_α of the α circle |x| = e^{z_α}.
pub fn alpha_offset<T: CNum>(curve: &Curve<T>) -> Result<f64, CoverError> {
    let (la, lc) = curve.puncture_orders()?;
    Ok(if la + lc > 0 { 0.5 } else { 0.0 })
}

/// The β cycle chosen by the rule of this module, as reported: the two branch points it
/// surrounds and whether a puncture lies inside (the loop itself is returned by [`beta_loop`] at
/// the working precision).
#[derive(Debug, Clone, serde::Serialize)]
pub struct BetaLoop {
    /// The two branch points the loop surrounds (z, rounded to f64).
    pub branch_points: [[f64; 2]; 2],
    /// Whether a puncture lies inside the loop.
    pub encloses_puncture: bool,
    /// Vertices of the closed polyline.
    pub vertices: usize,
}

/// Largest number of vertices of a β loop (a close pair costs ≈ 4.5 per factor 10 of its
/// crowding; 1e-300 apart ≈ 3,000 at each end).
const MAX_LOOP_VERTICES: usize = 50_000;

/// Width of the tube of the β loop over a point of its segment: this fraction of the distance
/// to the nearest singular point it must not enclose (so the loop keeps ≥ 0.6 of that distance).
const TUBE_FRACTION: f64 = 0.4;

/// Bits two branch points crowd the path layout: `log₂((1 + |z|)/|z₁ − z₂|)` for the closest
/// pair (2πi translates included); a path between them loses about these bits of z to
/// rounding ([`crate::precision::layout_bits`]).
pub fn crowding_bits<T: CNum>(singular: &[Singular<T>]) -> f64 {
    let branch: Vec<&T> = singular
        .iter()
        .filter(|s| s.kind == SingularKind::Branch)
        .map(|s| &s.z)
        .collect();
    let mut worst = f64::NEG_INFINITY;
    for (i, p) in branch.iter().enumerate() {
        for q in &branch[i + 1..] {
            let gap = periodic_offset(*p, *q).log2_abs();
            let scale = (1.0 + p.abs_f64().max(q.abs_f64())).log2();
            worst = worst.max(scale - gap);
        }
    }
    worst
}

/// Orders two points by real part, treating a pair that is nearly vertical (|Δ Re| ≤ 10⁻³ |Δ Im|:
/// a conjugate pair, however close) as tied and ordered by imaginary part instead. Formed on
/// the difference at the working precision, so pairs closer than f64 resolves are ordered too.
fn order_by_real<T: CNum>(p: &T, q: &T) -> Ordering {
    let d = p.clone() - q.clone();
    if d.log2_abs() == f64::NEG_INFINITY {
        return Ordering::Equal;
    }
    let unit = (d.clone() / d.abs_like()).to_c64();
    if unit.re.abs() <= 1e-3 * unit.im.abs() {
        unit.im.total_cmp(&0.0)
    } else {
        unit.re.total_cmp(&0.0)
    }
}

/// The β loop of the rule of this module: its report and the closed polyline at the working
/// precision.
///
/// The loop is a tube around the segment [b_in, b_out] (capped by half circles at both ends)
/// whose half-width over a point q of the segment is `TUBE_FRACTION` of the distance from q to
/// the nearest singular point not to be enclosed, at most min(¼ length, 1). Its vertices step
/// along the segment by the local width, so next to a close pair (P2: ln a ± 2i a^{−3/2}) the
/// loop narrows geometrically down to the pair's scale; every coordinate is formed at the
/// working precision relative to b_in (a pair closer than f64 resolves, or than its range, is
/// laid out like any other; [`crate::precision::layout_bits`] says what precision resolves it).
///
/// # Errors
/// [`CycleError::NoBetaCycle`] when the branch points do not straddle the α circle;
/// [`CycleError::BranchPointsTooClose`] when the tube would be narrower than the working
/// precision resolves.
pub fn beta_loop<T: CNum>(
    curve: &Curve<T>,
    singular: &[Singular<T>],
) -> Result<(BetaLoop, Vec<T>), CycleError> {
    let two_pi = 2.0 * std::f64::consts::PI;
    let z_alpha = alpha_offset(curve)?;
    let like = curve.modulus();
    let prec = like.prec();
    let two_pi_i = like.int_like(2) * like.pi_like() * like.i_like();
    let branch: Vec<usize> = (0..singular.len())
        .filter(|&j| singular[j].kind == SingularKind::Branch)
        .collect();
    let (inside, outside): (Vec<usize>, Vec<usize>) = branch
        .iter()
        .partition(|&&j| singular[j].z.re_f64() < z_alpha);
    let outside: Vec<usize> = outside
        .into_iter()
        .filter(|&j| singular[j].z.re_f64() > z_alpha)
        .collect();
    if inside.is_empty() || outside.is_empty() {
        return Err(CycleError::NoBetaCycle {
            z_alpha,
            inside: inside.len(),
            outside: outside.len(),
        });
    }
    // Nearest to the circle; ties (conjugate pairs) prefer the upper point.
    let z = |j: usize| &singular[j].z;
    let i_in = *inside
        .iter()
        .max_by(|&&p, &&q| order_by_real(z(p), z(q)))
        .expect("non-empty");
    let i_out = *outside
        .iter()
        .min_by(|&&p, &&q| match order_by_real(z(p), z(q)) {
            // Vertical ties: the upper one first.
            Ordering::Equal => Ordering::Equal,
            o if is_vertical(z(p), z(q)) => o.reverse(),
            o => o,
        })
        .expect("non-empty");
    let b_in = z(i_in).clone();
    // The 2πi translate of b_out closest in Im to b_in (ties: the upper one).
    let (im_in, im_out) = (b_in.im_f64(), z(i_out).im_f64());
    let k = ((im_in - im_out) / two_pi).round();
    let mut best = f64::INFINITY;
    let mut k_out = 0.0;
    for dk in [-1.0, 0.0, 1.0] {
        let d = (im_out + (k + dk) * two_pi - im_in).abs();
        if d < best - 1e-9 || ((d - best).abs() <= 1e-9 && k + dk > k_out) {
            best = best.min(d);
            k_out = k + dk;
        }
    }
    let b_out = z(i_out).clone() + two_pi_i.clone() * like.int_like(k_out as i64);
    let span = b_out.clone() - b_in.clone();
    let length = span.abs_like();
    let u = span / length.clone();
    // Segment coordinates w = (p − b_in)/u: Re w along the segment, Im w across.
    let along = |p: &T| (p.clone() - b_in.clone()) / u.clone();
    let to_segment = |p: &T| -> T {
        let w = along(p);
        if w.re_f64() < 0.0 {
            w.abs_like()
        } else if (w.clone() - length.clone()).re_f64() > 0.0 {
            (w - length.clone()).abs_like()
        } else {
            ((w.clone() - w.conj()) / like.int_like(2)).abs_like()
        }
    };
    // Every singular point and its translates but the two ends, with its distance to the segment.
    let mut others: Vec<(T, SingularKind, T)> = Vec::new();
    for (j, s) in singular.iter().enumerate() {
        for t in -3..=3i64 {
            if (j == i_in && t == 0) || (j == i_out && t == k_out as i64) {
                continue;
            }
            let p = s.z.clone() + two_pi_i.clone() * like.int_like(t);
            let d = to_segment(&p);
            others.push((p, s.kind, d));
        }
    }
    let smallest = |kind: SingularKind| {
        others
            .iter()
            .filter(|o| o.1 == kind)
            .map(|o| o.2.log2_abs())
            .fold(f64::INFINITY, f64::min)
    };
    // The puncture rule of the module doc: inside when closer to the segment than half the
    // stadium width min(0.4 · branch clearance, ¼ length, 1).
    let cap_log2 = (0.25f64.log2() + length.log2_abs()).min(0.0);
    let width_log2 = (TUBE_FRACTION.log2() + smallest(SingularKind::Branch)).min(cap_log2);
    let encloses_puncture = smallest(SingularKind::Puncture) < width_log2 - 1.0;
    let obstacles: Vec<T> = others
        .into_iter()
        .filter(|o| o.1 == SingularKind::Branch || !encloses_puncture)
        .map(|o| o.0)
        .collect();
    let fraction = T::from_f64s(TUBE_FRACTION, 0.0, prec);
    let cap = T::from_f64s(cap_log2.exp2(), 0.0, prec);
    // Half-width over the point b_in + u t of the segment.
    let width = |t: &T| -> T {
        let q = b_in.clone() + u.clone() * t.clone();
        let mut w = cap.clone();
        let mut w_log2 = cap_log2;
        for p in &obstacles {
            let d = (q.clone() - p.clone()).abs_like() * fraction.clone();
            let l = d.log2_abs();
            if l < w_log2 {
                w = d;
                w_log2 = l;
            }
        }
        w
    };
    let floor_log2 = -((prec.saturating_sub(16)) as f64);
    let mut tube: Vec<(T, T)> = Vec::new();
    let mut t = like.int_like(0);
    loop {
        let w = width(&t);
        let q_size = (b_in.clone() + u.clone() * t.clone()).abs_f64();
        if w.log2_abs() - (1.0 + q_size).log2() < floor_log2 || tube.len() > MAX_LOOP_VERTICES {
            return Err(CycleError::BranchPointsTooClose {
                near: b_out.re_f64(),
                separation: w.abs_f64() / TUBE_FRACTION,
            });
        }
        let next = t.clone() + w.clone();
        let last = (next.clone() - length.clone()).re_f64() >= 0.0;
        tube.push((t, w));
        if last {
            break;
        }
        t = next;
    }
    tube.push((length.clone(), width(&length)));
    let point = |t: &T, across: &T| b_in.clone() + u.clone() * (t.clone() + across.clone());
    let i = like.i_like();
    let arc = |t: &T, w: &T, from: f64| -> Vec<T> {
        (0..=6)
            .map(|k| {
                let angle = from + std::f64::consts::PI * k as f64 / 6.0;
                let e = T::from_f64s(angle.cos(), angle.sin(), prec);
                point(t, &(w.clone() * e))
            })
            .collect()
    };
    // Start on the upper side where the tube is widest (far from every singular point).
    let start = (0..tube.len())
        .max_by(|&p, &q| tube[p].1.log2_abs().total_cmp(&tube[q].1.log2_abs()))
        .expect("non-empty");
    let upper = |k: usize| point(&tube[k].0, &(i.clone() * tube[k].1.clone()));
    let lower = |k: usize| point(&tube[k].0, &-(i.clone() * tube[k].1.clone()));
    // Counter-clockwise: upper side towards b_in, around b_in, lower side to b_out, around
    // b_out, upper side back.
    let mut polyline: Vec<T> = (0..=start).rev().map(upper).collect();
    polyline.extend(arc(&tube[0].0, &tube[0].1, std::f64::consts::FRAC_PI_2));
    polyline.extend((0..tube.len()).map(lower));
    let end = tube.len() - 1;
    polyline.extend(arc(
        &tube[end].0,
        &tube[end].1,
        -std::f64::consts::FRAC_PI_2,
    ));
    polyline.extend((start..tube.len()).rev().map(upper));
    Ok((
        BetaLoop {
            branch_points: [
                [b_in.re_f64(), b_in.im_f64()],
                [b_out.re_f64(), b_out.im_f64()],
            ],
            encloses_puncture,
            vertices: polyline.len(),
        },
        polyline,
    ))
}

/// Whether p − q is nearly vertical (see [`order_by_real`]).
fn is_vertical<T: CNum>(p: &T, q: &T) -> bool {
    let d = p.clone() - q.clone();
    if d.log2_abs() == f64::NEG_INFINITY {
        return true;
    }
    let unit = (d.clone() / d.abs_like()).to_c64();
    unit.re.abs() <= 1e-3 * unit.im.abs()
}

/// A closed polyline at distance δ around the segment [a, b], counter-clockwise, starting and
/// ending at the middle of the upper side (double precision: for loops around well separated
/// branch points, e.g. a second loop homologous to β).
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
