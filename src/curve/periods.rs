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
//!   `Ω_α = −2πi Σ_{n≥0} (−1)ⁿ [φⁿ]₀ a^{−n−1}`, `R_α = −2πi (ln a − Σ_{n≥1} (−1)ⁿ [φⁿ]₀ / (n aⁿ))`.
//! - **β**: the loop of the rule in [`crate::curve::cycles`] (valid for all 15 families), on the
//!   orientation with Im τ > 0.
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
use crate::curve::cover::{CoverError, Curve, Point, Singular};
use crate::curve::cycles::{alpha_offset, beta_loop, crowding_bits, BetaLoop, CycleError};
use crate::curve::laurent::Laurent;
use crate::numerics::complex::CNum;
use crate::numerics::serial;
use crate::precision::{
    crowding_resolved, digits_of, layout_bits, tolerance, MAX_LAYOUT_BITS, SUM_ROUNDING_BITS,
};
use rug::{Complex, Float, Integer};
use thiserror::Error;

/// Why a period could not be computed.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum PeriodsError {
    #[error(transparent)]
    Cover(#[from] CoverError),
    #[error(transparent)]
    Cycle(#[from] CycleError),
    /// |a| is not above the radius of the series at a = ∞.
    #[error("the series at a = infinity needs |a| > {radius}, got |a| = {modulus}")]
    SeriesDiverges { modulus: f64, radius: f64 },
    /// Not enough constant terms for the requested precision.
    #[error("the series needs {needed} constant terms, only {available} were given")]
    TooFewTerms { needed: usize, available: usize },
    /// The β loop did not close on the cover.
    #[error("the β loop did not return to its starting sheet (two branch points crowd closer than the loop's layout resolves at this modulus)")]
    BetaNotClosed,
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

/// Ω and R over any closed polyline (z-values at the working precision) on the cover, starting
/// on the root of larger modulus at its first point.
///
/// # Errors
/// [`PeriodsError::BetaNotClosed`] if the loop does not return to its sheet; see
/// [`crate::curve::continuation::continue_along`].
pub fn loop_periods<T: CNum>(
    curve: &Curve<T>,
    singular: &[Singular<T>],
    path: &[T],
    march: &March,
) -> Result<CyclePeriods<T>, PeriodsError> {
    let [y0, _] = curve.roots(&path[0]);
    let start = Point {
        z: path[0].clone(),
        y: y0,
    };
    let (end, ints) = continue_along(curve, singular, &start, path, march)?;
    let closure = (end.y.clone() - start.y.clone()).abs_f64() / start.y.abs_f64();
    if closure > 1e-6 {
        return Err(PeriodsError::BetaNotClosed);
    }
    Ok(regulator_of(ints, &start))
}

/// Ω_β and R_β on the loop of [`beta_loop`], oriented so that Im(Ω_β/Ω_α) > 0, at the
/// precision of the curve.
///
/// # Errors
/// [`PeriodsError::BetaNotClosed`], and see [`crate::curve::continuation::continue_along`].
pub fn beta_path<T: CNum>(
    curve: &Curve<T>,
    singular: &[Singular<T>],
    omega_alpha: &T,
    march: &March,
) -> Result<(CyclePeriods<T>, BetaLoop), PeriodsError> {
    let (lp, polyline) = beta_loop(curve, singular)?;
    let mut p = loop_periods(curve, singular, &polyline, march)?;
    let tau = p.omega.clone() / omega_alpha.clone();
    if tau.im_f64() < 0.0 {
        p.omega = -p.omega;
        p.regulator = -p.regulator;
        p.omega_da = -p.omega_da;
        p.omega_daa = -p.omega_daa;
    }
    Ok((p, lp))
}

/// The curve of φ at modulus `a` and its singular points at the precision the β loop needs:
/// that of `a` unless two branch points crowd the layout ([`crowding_bits`]), else
/// [`layout_bits`] (the branch points recomputed at more bits until their crowding is a real
/// one, [`crowding_resolved`]). Returns None when the precision of `a` suffices.
///
/// # Errors
/// [`CycleError::BranchPointsTooClose`] beyond [`MAX_LAYOUT_BITS`]; see [`Curve::new`].
pub fn layout_curve<T: CNum>(
    laurent: &Laurent,
    a: &T,
    singular: &[Singular<T>],
) -> Result<Option<(Curve<Complex>, Vec<Singular<Complex>>)>, PeriodsError> {
    let bits = a.prec();
    let crowding = crowding_bits(singular);
    if layout_bits(bits, crowding) == bits && crowding_resolved(bits, crowding) {
        return Ok(None);
    }
    let a = a.to_complex();
    let at = |b: u32| -> Result<_, PeriodsError> {
        let curve = Curve::new(laurent, Complex::with_val(b, &a))?;
        let singular = curve.singular_points()?;
        Ok((curve, singular))
    };
    let mut b = layout_bits(bits, crowding).max(2 * bits);
    loop {
        let (curve, singular) = at(b)?;
        let crowding = crowding_bits(&singular);
        let need = layout_bits(bits, crowding);
        if crowding_resolved(b, crowding) && need <= b {
            if need == b {
                return Ok(Some((curve, singular)));
            }
            // The curve at `need` bits with the branch points found at b (at `need` itself the
            // root finder would split the close pair by rounding again).
            let rounded = singular
                .into_iter()
                .map(|s| Singular {
                    z: Complex::with_val(need, &s.z),
                    kind: s.kind,
                })
                .collect();
            return Ok(Some((
                Curve::new(laurent, Complex::with_val(need, &a))?,
                rounded,
            )));
        }
        b = need.max(2 * b);
        if b > MAX_LAYOUT_BITS {
            return Err(CycleError::BranchPointsTooClose {
                near: a.real().to_f64(),
                separation: (-crowding).exp2(),
            }
            .into());
        }
    }
}

/// [`beta_path`] at the precision the loop needs ([`layout_curve`]), rounded back to the
/// precision of `curve`.
///
/// # Errors
/// See [`beta_path`] and [`layout_curve`].
pub fn beta_periods<T: CNum>(
    laurent: &Laurent,
    curve: &Curve<T>,
    singular: &[Singular<T>],
    omega_alpha: &T,
    march: &March,
) -> Result<(CyclePeriods<T>, BetaLoop), PeriodsError> {
    let Some((raised, raised_singular)) = layout_curve(laurent, curve.modulus(), singular)? else {
        return beta_path(curve, singular, omega_alpha, march);
    };
    let prec = curve.modulus().prec();
    let (p, lp) = beta_path(&raised, &raised_singular, &omega_alpha.to_complex(), march)?;
    let back = |z: &Complex| T::from_complex(z, prec);
    Ok((
        CyclePeriods {
            omega: back(&p.omega),
            regulator: back(&p.regulator),
            omega_da: back(&p.omega_da),
            omega_daa: back(&p.omega_daa),
            steps: p.steps,
            error: p.error,
        },
        lp,
    ))
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

/// τ, ν and the derivatives of ν from the periods of α and β (by any method).
#[derive(Debug, Clone, serde::Serialize)]
#[serde(bound(serialize = "T: CNum"))]
pub struct NuParts<T> {
    #[serde(serialize_with = "serial::complex")]
    pub tau: T,
    #[serde(serialize_with = "serial::complex")]
    pub nu: T,
    #[serde(serialize_with = "serial::complex")]
    pub nu_da: T,
    #[serde(serialize_with = "serial::complex")]
    pub nu_daa: T,
    pub nu_error: f64,
}

/// τ = Ω_β/Ω_α, ν = (R_β − τR_α)/(2πi)² and its first two a-derivatives (see [`Periods`]), with
/// the error of ν propagated from the errors of the cycles.
pub fn nu_parts<T: CNum>(alpha: &CyclePeriods<T>, beta: &CyclePeriods<T>) -> NuParts<T> {
    let like = &alpha.omega;
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
    NuParts {
        tau,
        nu,
        nu_da,
        nu_daa,
        nu_error,
    }
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
    let (beta, beta_loop) = beta_periods(laurent, &curve, &singular, &alpha.omega, &march)?;
    let NuParts {
        tau,
        nu,
        nu_da,
        nu_daa,
        nu_error,
    } = nu_parts(&alpha, &beta);
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
