//! Periods Ω and regulator periods R of the curve `φ + a = 0` over the cycles α and β, the
//! modular ratio τ and the higher normal function ν.
//!
//! # Formulas
//! For a path γ on the cover starting at p₀:
//! `Ω_γ = ∫_γ dz / D`, `R_γ = ∫_γ z d log(−y) − log(−y(p₀)) ∫_γ dz` (the Beilinson regulator of
//! {−x, −y} in the coordinate z, x = −e^z; principal logarithm).
//! - **α** (the torus circle): z from z₀ to z₀ − 2πi on the root of small modulus, z₀ = z_α + iπ.
//!   z_α = 0 unless A or C vanishes at x = −1 (a puncture at z = 0), then z_α = 1/2 keeps the
//!   path off the puncture; moving the path across z = 0 changes R_α by 2πi times the residue
//!   of z·d log y there, which vanishes (the factor z is 0), so the value is the torus integral
//!   over |x| = 1 either way. At a = ∞ (|a| > φ(1,1)):
//!   `Ω_α = −2πi Σ_{n≥0} (−1)ⁿ [φⁿ]₀ a^{−n−1}`, `R_α = −2πi (log a − Σ_{n≥1} (−1)ⁿ [φⁿ]₀ / (n aⁿ))`.
//! - **β** (rule valid for all 15 families): the circle |x| = e^{z_α} separates the four branch
//!   points of the x-line into two inside and two outside (0 and ∞ count when they branch);
//!   α is homologous to a loop around the inside pair, so a loop around one inside and one
//!   outside branch point meets α once. β is the stadium around the segment from the finite
//!   inside branch point nearest the circle to the finite outside one nearest it (its 2πi
//!   translate closest in Im; ties prefer the upper one), on the orientation with Im τ > 0.
//!   A puncture close to the segment is kept inside the stadium, one farther away outside;
//!   either choice changes R_β by (2πi)²Z only, i.e. ν by an integer, which the level offset of
//!   the family absorbs.
//! - `τ = Ω_β / Ω_α`, `ν(a) = (R_β − τ R_α) / (2πi)²`.
//!
//! # Accuracy
//! Series: rigorous tail bound from `[φⁿ]₀ ≤ φ(1,1)ⁿ`. Paths: see [`crate::curve::cover`]. The
//! series/path agreement is tested at ≥ 30 digits for every family.
//!
//! # Errors
//! [`PeriodsError`].
//!
//! # References
//! "Modular Mahler measures I" (1999) for R_α as a Mahler measure; the Beilinson regulator and
//! its periods: "Mahler's measure and the dilogarithm (I)", Canad. J. Math. 54 (2002).

use crate::curve::continuation::{continue_along, March, PathIntegrals};
use crate::curve::cover::{CoverError, Curve, Point, Singular, SingularKind};
use crate::curve::laurent::Laurent;
use crate::numerics::complex::CNum;
use crate::numerics::plane::segment_distance;
use crate::numerics::serial;
use crate::precision::{digits_of, tolerance, SUM_ROUNDING_BITS};
use rug::{Complex, Float, Integer};
use thiserror::Error;

/// Why a period could not be computed.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum PeriodsError {
    #[error(transparent)]
    Cover(#[from] CoverError),
    /// |a| is not above the radius of the series at a = ∞.
    #[error("the series at a = infinity needs |a| > {radius}, got |a| = {modulus}")]
    SeriesDiverges { modulus: f64, radius: f64 },
    /// Not enough constant terms for the requested precision.
    #[error("the series needs {needed} constant terms, only {available} were given")]
    TooFewTerms { needed: usize, available: usize },
    /// The branch points do not split into two inside and two outside the α circle.
    #[error("no β cycle: the branch points do not straddle the α circle |x| = e^{z_alpha} (found {inside} inside, {outside} outside)")]
    NoBetaCycle {
        z_alpha: f64,
        inside: usize,
        outside: usize,
    },
    /// The β loop did not close on the cover.
    #[error("the β loop did not return to its starting sheet (at very high levels, e.g. P2 beyond level 40, two branch points near log a come closer than the loop's double-precision layout resolves)")]
    BetaNotClosed,
    /// Two branch points are closer than the double-precision layout of the β loop resolves
    /// (a conjugate pair at log a ± iε, ε ≈ 2a^{−3/2} for P2: the limit is near level 40).
    #[error("branch points near z = {near:.6} are {separation:.1e} apart, below what the double-precision layout of the beta loop resolves (about 5e-14 relative); this modulus is beyond regwave's current range")]
    BranchPointsTooClose { near: f64, separation: f64 },
}

/// Ω and R of one cycle, with the error estimate of the computation.
#[derive(Debug, Clone, serde::Serialize)]
#[serde(bound(serialize = "T: CNum"))]
pub struct CyclePeriods<T> {
    #[serde(serialize_with = "serial::complex")]
    pub omega: T,
    #[serde(serialize_with = "serial::complex")]
    pub regulator: T,
    /// dΩ/da (then dR/da = Ω: the correction term of the regulator cancels the boundary terms).
    #[serde(serialize_with = "serial::complex")]
    pub omega_da: T,
    /// d²Ω/da².
    #[serde(serialize_with = "serial::complex")]
    pub omega_daa: T,
    /// Integration steps taken (0 for the series).
    pub steps: usize,
    /// Estimated absolute error (the larger of the two).
    pub error: f64,
}

/// Ω_α and R_α from the series at a = ∞.
///
/// # Errors
/// [`PeriodsError::SeriesDiverges`] for |a| ≤ φ(1,1); [`PeriodsError::TooFewTerms`].
pub fn alpha_series(
    constant_terms: &[Integer],
    coefficient_sum: i64,
    a: &Complex,
) -> Result<CyclePeriods<Complex>, PeriodsError> {
    let prec = CNum::prec(a);
    let modulus = a.abs_f64();
    let radius = coefficient_sum as f64;
    if modulus <= radius {
        return Err(PeriodsError::SeriesDiverges { modulus, radius });
    }
    // Tail after N terms ≤ (S/|a|)^N / (1 − S/|a|) relative to the leading term.
    let ratio = radius / modulus;
    let needed = ((prec + SUM_ROUNDING_BITS) as f64 * std::f64::consts::LN_2 / -ratio.ln()).ceil()
        as usize
        + 1;
    if needed > constant_terms.len() {
        return Err(PeriodsError::TooFewTerms {
            needed,
            available: constant_terms.len(),
        });
    }
    let inv = Complex::with_val(prec, a.clone().recip());
    let mut power = inv.clone(); // a^{-n-1}
    let mut omega_sum = Complex::new(prec);
    let mut da_sum = Complex::new(prec);
    let mut daa_sum = Complex::new(prec);
    let mut reg_sum = Complex::new(prec);
    for (n, u) in constant_terms.iter().enumerate().take(needed) {
        let signed = if n % 2 == 0 {
            Float::with_val(prec, u)
        } else {
            -Float::with_val(prec, u)
        };
        omega_sum += Complex::with_val(prec, &power * &signed);
        // d/da a^{−n−1} = −(n+1) a^{−n−2}
        da_sum -= Complex::with_val(prec, &power * &signed) * &inv * (n + 1) as u32;
        daa_sum +=
            Complex::with_val(prec, &power * &signed) * &inv * &inv * ((n + 1) * (n + 2)) as u32;
        if n >= 1 {
            // (−1)ⁿ uₙ / (n aⁿ) = (−1)ⁿ uₙ a^{−n−1} · a / n
            let t = Complex::with_val(prec, &power * &signed) * a / n as u32;
            reg_sum += t;
        }
        power *= &inv;
    }
    let two_pi_i = a.int_like(2) * a.pi_like() * a.i_like();
    let omega = -(two_pi_i.clone() * omega_sum);
    let omega_da = -(two_pi_i.clone() * da_sum);
    let omega_daa = -(two_pi_i.clone() * daa_sum);
    let regulator = -(two_pi_i * (a.clone().ln() - reg_sum));
    let tail = ratio.powi(needed as i32) / (1.0 - ratio);
    let error = tail * (omega.abs_f64() + regulator.abs_f64())
        + tolerance(prec, SUM_ROUNDING_BITS) * regulator.abs_f64();
    Ok(CyclePeriods {
        omega,
        regulator,
        omega_da,
        omega_daa,
        steps: 0,
        error,
    })
}

/// The real part z_α of the α circle |x| = e^{z_α}.
pub fn alpha_offset<T: CNum>(curve: &Curve<T>) -> Result<f64, PeriodsError> {
    let (la, lc) = curve.puncture_orders()?;
    Ok(if la + lc > 0 { 0.5 } else { 0.0 })
}

/// Ω_α and R_α by path integration.
///
/// # Errors
/// See [`crate::curve::continuation::continue_along`].
pub fn alpha_path<T: CNum>(
    curve: &Curve<T>,
    singular: &[Singular<T>],
    march: &March,
) -> Result<CyclePeriods<T>, PeriodsError> {
    let like = curve.modulus();
    let prec = like.prec();
    let z_alpha = alpha_offset(curve)?;
    let pi_i = like.pi_like() * like.i_like();
    let z0 = T::from_f64s(z_alpha, 0.0, prec) + pi_i.clone();
    let z1 = z0.clone() - pi_i.clone() * like.int_like(2);
    let [_, small] = curve.roots(&z0);
    let start = Point {
        z: z0.clone(),
        y: small,
    };
    let (_, ints) = continue_along(curve, singular, &start, &[z0, z1], march)?;
    Ok(regulator_of(ints, &start))
}

fn regulator_of<T: CNum>(ints: PathIntegrals<T>, start: &Point<T>) -> CyclePeriods<T> {
    let log_start = (-start.y.clone()).ln();
    let regulator = ints.eta.clone() - log_start * ints.dz.clone();
    CyclePeriods {
        omega: ints.omega,
        regulator,
        omega_da: ints.omega_da,
        omega_daa: ints.omega_daa,
        steps: ints.steps,
        error: ints.error,
    }
}

/// The β cycle chosen by the module's rule: its polyline (closed) and the two branch points.
#[derive(Debug, Clone, serde::Serialize)]
pub struct BetaLoop {
    /// The two branch points the loop surrounds (z, f64).
    pub branch_points: [[f64; 2]; 2],
    /// Closed polyline around them.
    pub polyline: Vec<[f64; 2]>,
    /// Whether a puncture lies inside the loop.
    pub encloses_puncture: bool,
}

/// The β loop of the module's rule.
///
/// # Errors
/// [`PeriodsError::NoBetaCycle`] when the branch points do not straddle the α circle.
pub fn beta_loop<T: CNum>(
    curve: &Curve<T>,
    singular: &[Singular<T>],
) -> Result<BetaLoop, PeriodsError> {
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
        return Err(PeriodsError::NoBetaCycle {
            z_alpha,
            inside: inside.len(),
            outside: outside.len(),
        });
    }
    // Nearest to the circle; ties (conjugate pairs) prefer the upper point. The tolerances are
    // relative to rounding, not absolute: at high levels a conjugate pair can be closer than any
    // fixed tolerance (P2: log a ± 2i a^{−3/2}, 1e-9 apart at level 25).
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
        return Err(PeriodsError::BranchPointsTooClose {
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

/// Ω and R over any closed polyline (z-values) on the cover, starting on the root of larger
/// modulus at its first point.
///
/// # Errors
/// [`PeriodsError::BetaNotClosed`] if the loop does not return to its sheet; see
/// [`crate::curve::continuation::continue_along`].
pub fn loop_periods<T: CNum>(
    curve: &Curve<T>,
    singular: &[Singular<T>],
    polyline: &[[f64; 2]],
    march: &March,
) -> Result<CyclePeriods<T>, PeriodsError> {
    let prec = curve.modulus().prec();
    let path: Vec<T> = polyline
        .iter()
        .map(|p| T::from_f64s(p[0], p[1], prec))
        .collect();
    let [y0, _] = curve.roots(&path[0]);
    let start = Point {
        z: path[0].clone(),
        y: y0,
    };
    let (end, ints) = continue_along(curve, singular, &start, &path, march)?;
    let closure = (end.y.clone() - start.y.clone()).abs_f64() / start.y.abs_f64();
    if closure > 1e-6 {
        return Err(PeriodsError::BetaNotClosed);
    }
    Ok(regulator_of(ints, &start))
}

/// Ω_β and R_β on the loop of [`beta_loop`], oriented so that Im(Ω_β/Ω_α) > 0.
///
/// # Errors
/// [`PeriodsError::BetaNotClosed`], and see [`crate::curve::continuation::continue_along`].
pub fn beta_path<T: CNum>(
    curve: &Curve<T>,
    singular: &[Singular<T>],
    omega_alpha: &T,
    march: &March,
) -> Result<(CyclePeriods<T>, BetaLoop), PeriodsError> {
    let lp = beta_loop(curve, singular)?;
    let mut p = loop_periods(curve, singular, &lp.polyline, march)?;
    let tau = p.omega.clone() / omega_alpha.clone();
    if tau.im_f64() < 0.0 {
        p.omega = -p.omega;
        p.regulator = -p.regulator;
        p.omega_da = -p.omega_da;
        p.omega_daa = -p.omega_daa;
    }
    Ok((p, lp))
}

/// All periods at one modulus.
#[derive(Debug, Clone, serde::Serialize)]
#[serde(bound(serialize = "T: CNum"))]
pub struct Periods<T> {
    pub alpha: CyclePeriods<T>,
    pub beta: CyclePeriods<T>,
    #[serde(serialize_with = "serial::complex")]
    pub tau: T,
    /// `(R_β − τ R_α)/(2πi)²`.
    #[serde(serialize_with = "serial::complex")]
    pub nu: T,
    /// dν/da = −τ' R_α/(2πi)², τ' = (Ω_β' Ω_α − Ω_β Ω_α')/Ω_α² (using R_γ' = Ω_γ).
    #[serde(serialize_with = "serial::complex")]
    pub nu_da: T,
    /// d²ν/da² = −(τ'' R_α + τ' Ω_α)/(2πi)², τ'' = (Ω_β''Ω_α − Ω_βΩ_α'')/Ω_α² − 2τ'Ω_α'/Ω_α.
    #[serde(serialize_with = "serial::complex")]
    pub nu_daa: T,
    pub beta_loop: BetaLoop,
    /// Estimated absolute error of ν.
    pub nu_error: f64,
}

/// Ω, R of α and β, τ and ν at modulus a, by path integration at the precision of `a` (α from
/// `alpha` if given, e.g. the series).
///
/// # Errors
/// See [`PeriodsError`].
pub fn periods<T: CNum>(
    laurent: &Laurent,
    a: T,
    alpha: Option<CyclePeriods<T>>,
) -> Result<Periods<T>, PeriodsError> {
    let curve = Curve::new(laurent, a)?;
    let singular = curve.singular_points()?;
    let march = March::for_bits(curve.modulus().prec());
    let alpha = match alpha {
        Some(a) => a,
        None => alpha_path(&curve, &singular, &march)?,
    };
    let (beta, beta_loop) = beta_path(&curve, &singular, &alpha.omega, &march)?;
    let like = curve.modulus();
    let two_pi_i = like.int_like(2) * like.pi_like() * like.i_like();
    let tau = beta.omega.clone() / alpha.omega.clone();
    let four_pi2 = two_pi_i.clone() * two_pi_i;
    let nu = (beta.regulator.clone() - tau.clone() * alpha.regulator.clone()) / four_pi2.clone();
    let tau_da = (beta.omega_da.clone() * alpha.omega.clone()
        - beta.omega.clone() * alpha.omega_da.clone())
        / (alpha.omega.clone() * alpha.omega.clone());
    let tau_daa = (beta.omega_daa.clone() * alpha.omega.clone()
        - beta.omega.clone() * alpha.omega_daa.clone())
        / (alpha.omega.clone() * alpha.omega.clone())
        - like.int_like(2) * tau_da.clone() * alpha.omega_da.clone() / alpha.omega.clone();
    let nu_da = -(tau_da.clone() * alpha.regulator.clone()) / four_pi2.clone();
    let nu_daa = -(tau_daa * alpha.regulator.clone() + tau_da * alpha.omega.clone()) / four_pi2;
    let scale = 1.0 / (4.0 * std::f64::consts::PI * std::f64::consts::PI);
    let nu_error = scale
        * (beta.error
            + tau.abs_f64() * alpha.error
            + alpha.regulator.abs_f64() * (beta.error + tau.abs_f64() * alpha.error)
                / alpha.omega.abs_f64());
    Ok(Periods {
        alpha,
        beta,
        tau,
        nu,
        nu_da,
        nu_daa,
        beta_loop,
        nu_error,
    })
}

/// Ω_α and R_α by both methods with their agreement, and the path periods at modulus `a`.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Comparison {
    /// The series values (None when |a| is not above the series radius φ(1,1)).
    pub series: Option<CyclePeriods<Complex>>,
    /// Why the series is absent.
    pub series_note: Option<String>,
    /// Everything by path integration.
    pub path: Periods<Complex>,
    /// Decimal digits on which series and path agree for Ω_α and R_α (the smaller).
    pub agreement_digits: Option<f64>,
}

/// [`Comparison`] at modulus a (real or complex), at the precision of `a`.
///
/// # Errors
/// See [`PeriodsError`].
///
/// # Example
/// At the ground state of F0 the higher normal function is 1, and Ω_α, R_α by the series at
/// a = ∞ and by path integration agree to the working precision:
/// ```
/// use regwave::{Complex, Float};
/// let f0 = regwave::family("F0").unwrap();
/// let a = Float::parse("17.846643118044799282389997").unwrap();
/// let a = Complex::with_val(128, (Float::with_val(128, a), 0));
/// let terms = f0.constant_terms(400).unwrap();
/// let c = regwave::compare_periods(&f0, &a, &terms).unwrap();
/// assert!((c.path.nu.real().to_f64() - 1.0).abs() < 1e-20);
/// assert!(c.agreement_digits.unwrap() > 30.0);
/// ```
pub fn compare(
    laurent: &Laurent,
    a: &Complex,
    constant_terms: &[Integer],
) -> Result<Comparison, PeriodsError> {
    let bits = CNum::prec(a);
    let (series, series_note) = match alpha_series(constant_terms, laurent.coefficient_sum(), a) {
        Ok(s) => (Some(s), None),
        Err(e) => (None, Some(e.to_string())),
    };
    let path = periods(laurent, a.clone(), None)?;
    let agreement_digits = series.as_ref().map(|s| {
        let rel = |x: &Complex, y: &Complex| (x.clone() - y.clone()).abs_f64() / y.abs_f64();
        let worst = rel(&s.omega, &path.alpha.omega).max(rel(&s.regulator, &path.alpha.regulator));
        if worst == 0.0 {
            digits_of(bits)
        } else {
            -worst.log10()
        }
    });
    Ok(Comparison {
        series,
        series_note,
        path,
        agreement_digits,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_complex::Complex64;

    fn lp(terms: Vec<([i64; 2], i64)>) -> Laurent {
        Laurent::from_terms(terms)
    }

    #[test]
    fn nu_is_one_at_the_checked_ground_states() {
        // docs/MATHEMATICS.md §4 checked values: a₀ of F0, P2 and the hexagon give ν = 1 (level 0 ↔ ν = n + 1).
        let cases = [
            (
                lp(vec![([1, 0], 1), ([0, 1], 1), ([-1, 0], 1), ([0, -1], 1)]),
                17.846643118044799282,
            ),
            (
                lp(vec![([1, 0], 1), ([0, 1], 1), ([-1, -1], 1)]),
                12.970039821793337437,
            ),
            (
                lp(vec![
                    ([1, 0], 1),
                    ([1, 1], 1),
                    ([0, 1], 1),
                    ([-1, 0], 1),
                    ([-1, -1], 1),
                    ([0, -1], 1),
                ]),
                36.512388457960298416,
            ),
        ];
        for (l, a) in cases {
            let p = periods(&l, Complex64::new(a, 0.0), None).unwrap();
            eprintln!(
                "a {a} nu {} tau {} loop {:?}",
                p.nu, p.tau, p.beta_loop.branch_points
            );
            assert!((p.nu - 1.0).norm() < 1e-9, "ν = {}", p.nu);
            // dν/da against a central difference.
            let h = 1e-5 * a;
            let up = periods(&l, Complex64::new(a + h, 0.0), None).unwrap().nu;
            let down = periods(&l, Complex64::new(a - h, 0.0), None).unwrap().nu;
            let fd = (up - down) / (2.0 * h);
            assert!(
                (fd - p.nu_da).norm() < 1e-7 * p.nu_da.norm(),
                "dν/da {} vs {}",
                p.nu_da,
                fd
            );
            let up_d = periods(&l, Complex64::new(a + h, 0.0), None).unwrap().nu_da;
            let down_d = periods(&l, Complex64::new(a - h, 0.0), None).unwrap().nu_da;
            let fd2 = (up_d - down_d) / (2.0 * h);
            assert!(
                (fd2 - p.nu_daa).norm() < 1e-6 * p.nu_daa.norm(),
                "d²ν/da² {} vs {}",
                p.nu_daa,
                fd2
            );
            // The series α agrees with the path α.
            let terms = l.constant_terms(400).unwrap();
            let s =
                alpha_series(&terms, l.coefficient_sum(), &rug::Complex::with_val(64, a)).unwrap();
            assert!(
                (s.omega.real().to_f64() - p.alpha.omega.re).abs() < 1e-13 * p.alpha.omega.norm()
            );
            assert!(
                (s.omega_da.imag().to_f64() - p.alpha.omega_da.im).abs()
                    < 1e-12 * p.alpha.omega_da.norm()
            );
        }
    }
}
