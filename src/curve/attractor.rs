//! Attractor moduli: the real a in the spectral range where the higher normal function ν(a)
//! takes an integer value, labelled by level.
//!
//! # Method
//! `f(t) = Re ν(e^t) − k` is solved in t = ln a: first in double precision (bracketing from
//! the leading asymptotics `ν ≈ (12 − b)(ln a)² / (8π²)`, b the number of boundary points, or
//! from the previous levels, then Newton safeguarded by bisection), then refined by Halley's
//! method at the working precision (one step usually suffices: cubic convergence from 1e-14),
//! and finally re-solved at a higher precision. The derivatives are exact:
//! `dν/da = −τ' R_α/(2πi)²` (the regulator periods satisfy `dR/da = Ω`) and its derivative,
//! with Ω' and Ω'' integrated along the same paths. The digits reported are those on
//! which the two solves agree (capped at the digits requested).
//!
//! # Level labels
//! With the β rule of [`crate::curve::periods`], **ν(a_n) = n + 1 for all 15 strip families**
//! ([`LEVEL_OFFSET`]): established against the independent harmonic-oscillator spectrum for
//! levels 0..5 of every family (`tests/attractor.rs`; `docs/MATHEMATICS.md` §4).
//!
//! # Accuracy
//! Limited by the working precision only (periods to working precision, series α with a
//! rigorous tail bound). Measured: see `tests/attractor.rs`.
//!
//! # Errors
//! [`AttractorError`].
//!
//! # References
//! Attractor points and the eigenvalues at ħ = 2π: docs/MATHEMATICS.md §4; the asymptotics from the
//! perturbative quantization volumes, "Topological strings from quantum mechanics",
//! arXiv:1410.3382 (2014).

use crate::curve::asymptotics;
use crate::curve::constant_terms::RecurrenceError;
use crate::curve::laurent::Laurent;
use crate::curve::periods::{self, CyclePeriods, PeriodsError};
use crate::curve::series_periods::{SeriesError, SeriesMethod};
use crate::numerics::complex::CNum;
use crate::numerics::serial;
use crate::precision::{
    confirming_bits, tolerance, working_bits, SEARCH_FALLBACK_BITS, SERIES_MAX_RATIO,
    SUM_ROUNDING_BITS,
};
use num_complex::Complex64;
use rayon::prelude::*;
use rug::{Complex, Float, Integer};
use thiserror::Error;

/// ν(a_n) = n + LEVEL_OFFSET for every strip family with the β rule of [`crate::curve::periods`].
pub const LEVEL_OFFSET: i64 = 1;

/// Why an attractor modulus could not be found.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum AttractorError {
    #[error(transparent)]
    Periods(#[from] PeriodsError),
    #[error(transparent)]
    ConstantTerms(#[from] RecurrenceError),
    #[error(transparent)]
    Series(#[from] SeriesError),
    /// ν was not real on the real axis (the β cycle is not real there).
    #[error("ν({a}) has imaginary part {im:e}: not real on the spectral range")]
    NotReal { a: f64, im: f64 },
    /// No sign change of ν − k found.
    #[error("could not bracket ν = {target} (last ν = {last} at ln a = {log_a})")]
    NoBracket { target: i64, last: f64, log_a: f64 },
    /// The iteration did not converge.
    #[error("the root of ν = {target} did not converge (last step {step:e})")]
    NoConvergence { target: i64, step: f64 },
    /// A level above [`MAX_LEVEL`].
    #[error("level {level} is beyond the levels regwave solves (0 to {max}): the solve is measured to level {max} for every family")]
    BeyondReach { level: usize, max: usize },
}

/// The highest level whose attractor modulus is solved: levels 0..=1000 of all 15 families solve
/// at 100 digits with every digit confirmed, by the series at a = ∞ (measured with
/// `attractors --levels 0..1000 --digits 100` per family, 0.9–1.7 s each; `examples/bench.rs`).
/// Every attractor modulus lies outside the series radius (radius/a_n ≤ 0.232, at level 0 of
/// P2: 3/12.97), so the paths are not needed for the solve.
pub const MAX_LEVEL: usize = 1000;

/// Checks that every level of `levels` is within [`MAX_LEVEL`].
///
/// # Errors
/// [`AttractorError::BeyondReach`] naming the highest level asked for.
pub fn check_reach(levels: &std::ops::RangeInclusive<usize>) -> Result<(), AttractorError> {
    match *levels.end() {
        level if level > MAX_LEVEL => Err(AttractorError::BeyondReach {
            level,
            max: MAX_LEVEL,
        }),
        _ => Ok(()),
    }
}

/// One attractor modulus.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Attractor {
    pub level: usize,
    /// The integer value of ν.
    pub nu: i64,
    #[serde(serialize_with = "serial::float")]
    pub modulus: Float,
    #[serde(serialize_with = "serial::float")]
    pub log_modulus: Float,
    /// Decimal digits that survived the confirming solve at higher precision.
    pub digits: u32,
    /// |Re ν(a) − k| at the final modulus (working precision).
    pub residual: f64,
    /// |Im ν(a)| at the final modulus.
    pub imaginary_part: f64,
    /// Working precision of the reported value.
    pub precision_bits: u32,
    /// `Area(Δ°)·(log a_n)² − 4π²(n + ½)` ([`crate::curve::asymptotics::volume_gap`]): tends to
    /// minus the constant of the perturbative volume, with exponentially small corrections.
    pub volume_gap: f64,
}

/// The higher normal function ν(a) of one family as a function of the modulus: φ, and its
/// constant terms for the α series at a = ∞ (extended on demand). Evaluates ν and its
/// derivatives in double precision or at any precision, and solves ν(a) = k.
#[derive(Debug, Clone)]
pub struct HigherNormalFunction {
    pub laurent: Laurent,
    pub boundary_points: usize,
    constant_terms: Vec<Integer>,
    /// Every period by series at a = ∞ where radius/a ≤ [`SERIES_MAX_RATIO`] (None: paths only).
    series: Option<SeriesMethod>,
}

impl HigherNormalFunction {
    /// # Errors
    /// [`AttractorError::ConstantTerms`].
    pub fn new(laurent: &Laurent) -> Result<Self, AttractorError> {
        let boundary_points = laurent.terms().len();
        Ok(HigherNormalFunction {
            laurent: laurent.clone(),
            boundary_points,
            constant_terms: laurent.constant_terms(200)?,
            series: None,
        })
    }

    /// Uses the series at a = ∞ wherever radius/a ≤ [`SERIES_MAX_RATIO`], with the β constants
    /// matched for `bits` (the highest precision the solve will use).
    ///
    /// # Errors
    /// [`AttractorError::Series`] when the operator or the matching fails.
    pub fn with_series(mut self, bits: u32) -> Result<Self, AttractorError> {
        let method = SeriesMethod::new(&self.laurent)?;
        method.constants(bits)?;
        self.series = Some(method);
        Ok(self)
    }

    /// The series method if it applies at a (real, positive).
    fn series_at(&self, a: &Float) -> Option<&SeriesMethod> {
        self.series
            .as_ref()
            .filter(|m| m.operator.radius / a.to_f64() <= SERIES_MAX_RATIO)
    }

    fn ensure_terms(&mut self, n: usize) -> Result<(), AttractorError> {
        if self.constant_terms.len() <= n {
            self.constant_terms = self
                .laurent
                .constant_terms(n.max(2 * self.constant_terms.len()))?;
        }
        Ok(())
    }

    /// α by the series when it converges fast (a > 2 φ(1,1)), at the precision of `a`.
    fn alpha_series(
        &mut self,
        a: &Complex,
    ) -> Result<Option<CyclePeriods<Complex>>, AttractorError> {
        let s = self.laurent.coefficient_sum() as f64;
        let re = a.real().to_f64();
        if re <= 2.0 * s {
            return Ok(None);
        }
        let bits = a.prec().0;
        let need = (bits as f64 * std::f64::consts::LN_2 / (re / s).ln()).ceil() as usize + 16;
        self.ensure_terms(need)?;
        Ok(Some(periods::alpha_series(
            &self.constant_terms,
            self.laurent.coefficient_sum(),
            a,
        )?))
    }

    /// `(Re ν, d Re ν/dt, d² Re ν/dt², |Im ν|)` at a = e^t, `bits` bits.
    ///
    /// # Errors
    /// See [`AttractorError`].
    pub fn nu(
        &mut self,
        a: &Float,
        bits: u32,
    ) -> Result<(Float, Float, Float, f64), AttractorError> {
        let ac = Complex::with_val(bits, (a, 0));
        let (nu, nu_da, nu_daa) = match self.series_at(a) {
            Some(m) => {
                let p = m.periods(&ac)?.derived;
                (p.nu, p.nu_da, p.nu_daa)
            }
            None => {
                let alpha = self.alpha_series(&ac)?;
                let p = periods::periods(&self.laurent, ac, alpha)?;
                (p.nu, p.nu_da, p.nu_daa)
            }
        };
        // t = ln a: dν/dt = a ν_a, d²ν/dt² = a ν_a + a² ν_aa.
        let slope = Float::with_val(bits, nu_da.real() * a);
        let a2 = Float::with_val(bits, a.square_ref());
        let curvature = Float::with_val(bits, nu_daa.real() * &a2) + &slope;
        Ok((
            nu.real().clone(),
            slope,
            curvature,
            nu.imag().to_f64().abs(),
        ))
    }

    /// `(Re ν(e^t), d Re ν/dt)` in double precision (the search phase).
    pub fn nu_f64(&mut self, t: f64) -> Result<(f64, f64), AttractorError> {
        let a = t.exp();
        if self.series_at(&Float::with_val(64, a)).is_some() {
            let (nu, slope, _, _) = self.nu(&Float::with_val(64, t).exp(), 64)?;
            return Ok((nu.to_f64(), slope.to_f64()));
        }
        let alpha = self
            .alpha_series(&Complex::with_val(64, a))?
            .map(|c| CyclePeriods {
                omega: c.omega.to_c64(),
                regulator: c.regulator.to_c64(),
                omega_da: c.omega_da.to_c64(),
                omega_daa: c.omega_daa.to_c64(),
                steps: 0,
                error: c.error,
            });
        match periods::periods(&self.laurent, Complex64::new(a, 0.0), alpha) {
            Ok(p) => Ok((p.nu.re, p.nu_da.re * a)),
            // At large moduli two branch points can come closer than double precision resolves
            // (P2 from level 19 on: a pair at ln a ± iε with ε ≈ 1e-8, measured): the β loop
            // then fails in double precision, and the same values are computed in MPFR at
            // SEARCH_FALLBACK_BITS instead.
            Err(_) => {
                let bits = SEARCH_FALLBACK_BITS;
                let (nu, slope, _, _) = self.nu(&Float::with_val(bits, t).exp(), bits)?;
                Ok((nu.to_f64(), slope.to_f64()))
            }
        }
    }

    /// Leading-order guess of ln a where ν = k: `(12 − b)(ln a)²/(8π²) ≈ k − 1/5`.
    fn guess_log(&self, k: i64) -> f64 {
        let c = (12.0 - self.boundary_points as f64) / (8.0 * std::f64::consts::PI.powi(2));
        ((k as f64 - 0.2).max(0.3) / c).sqrt()
    }

    /// Double-precision root of Re ν(e^t) = k near `t0`: bracket, then Newton safeguarded by
    /// bisection.
    fn root_f64(&mut self, k: i64, t0: f64) -> Result<f64, AttractorError> {
        let target = k as f64;
        // Plain Newton first (the guesses are good); the bracketing search below is the fallback.
        let mut t = t0;
        for _ in 0..8 {
            let Ok((v, dv)) = self.nu_f64(t) else { break };
            let f = v - target;
            if f.abs() < 1e-13 * target.abs().max(1.0) {
                return Ok(t);
            }
            if !(dv > 0.0) {
                break;
            }
            let step = (f / dv).clamp(-0.5, 0.5);
            t -= step;
            if step.abs() < 1e-15 * t.abs() {
                return Ok(t);
            }
        }
        let (mut lo, mut hi) = (t0, t0);
        let (f0, _) = self.nu_f64(t0)?;
        let (mut flo, mut fhi) = (f0 - target, f0 - target);
        let mut step = 0.25;
        let mut tries = 0;
        while flo.signum() == fhi.signum() {
            tries += 1;
            if tries > 60 {
                return Err(AttractorError::NoBracket {
                    target: k,
                    last: flo + target,
                    log_a: lo,
                });
            }
            if flo > 0.0 {
                hi = lo;
                fhi = flo;
                lo = (lo - step).max(0.05);
                flo = self.nu_f64(lo)?.0 - target;
            } else {
                lo = hi;
                flo = fhi;
                hi += step;
                fhi = self.nu_f64(hi)?.0 - target;
            }
            step *= 1.5;
        }
        let mut t = 0.5 * (lo + hi);
        for _ in 0..100 {
            let (v, dv) = self.nu_f64(t)?;
            let f = v - target;
            if f.abs() < 1e-14 * target.abs().max(1.0) {
                return Ok(t);
            }
            if f.signum() == flo.signum() {
                lo = t;
                flo = f;
            } else {
                hi = t;
            }
            let newton = t - f / dv;
            let next = if dv > 0.0 && newton > lo.min(hi) && newton < lo.max(hi) {
                newton
            } else {
                0.5 * (lo + hi)
            };
            if (next - t).abs() < 1e-15 * t.abs() {
                return Ok(next);
            }
            t = next;
        }
        Err(AttractorError::NoConvergence {
            target: k,
            step: hi - lo,
        })
    }

    /// Halley refinement of Re ν(e^t) = k at `bits` from the approximation t0 (cubic
    /// convergence, exact first and second derivatives); returns (t, |residual|, |Im ν|).
    fn root_mp(
        &mut self,
        k: i64,
        t0: &Float,
        bits: u32,
    ) -> Result<(Float, f64, f64), AttractorError> {
        let mut t = Float::with_val(bits, t0);
        let tol = tolerance(bits, SUM_ROUNDING_BITS);
        let mut last = f64::INFINITY;
        for _ in 0..30 {
            let a = Float::with_val(bits, t.exp_ref());
            let (nu, d1, d2, im) = self.nu(&a, bits)?;
            let f = nu - k;
            // δ = −f/f' · 1/(1 − f f''/(2 f'²))
            let newton = Float::with_val(bits, &f / &d1);
            let corr = Float::with_val(bits, &newton * &d2) / Float::with_val(bits, &d1 * 2u32);
            let step = newton / (1u32 - corr);
            t -= &step;
            let s = step.to_f64().abs();
            // Cubic convergence from a start within ~1e-13 of the root, where ν is smooth on
            // the scale 1: the error left after a step s is O(s³).
            if s <= tol * t.to_f64().abs()
                || (s < 1e-8 && 100.0 * s * s * s <= tol * t.to_f64().abs())
            {
                return Ok((t, f.to_f64().abs(), im));
            }
            last = s;
        }
        Err(AttractorError::NoConvergence {
            target: k,
            step: last,
        })
    }
}

/// Attractor moduli for the levels `levels` at `digits` decimal digits.
///
/// # Errors
/// See [`AttractorError`].
///
/// # Example
/// The ground state of P2 (x + y + 1/(xy)); the reference value was computed independently of
/// this project (`docs/MATHEMATICS.md` §4).
/// ```
/// let p2 = regwave::family("P2").unwrap();
/// let a = regwave::solve_levels(&p2, 0..=0, 25).unwrap();
/// assert_eq!((a[0].level, a[0].nu), (0, 1));
/// assert!(a[0].digits >= 25);
/// assert!(a[0].modulus.to_string().starts_with("12.97003982179333743762395"));
/// ```
pub fn solve_levels(
    laurent: &Laurent,
    levels: std::ops::RangeInclusive<usize>,
    digits: u32,
) -> Result<Vec<Attractor>, AttractorError> {
    solve_levels_at(laurent, levels, digits, working_bits(digits as f64))
}

/// As [`solve_levels`] at an explicit working precision `bits` (the confirming solve uses more).
///
/// # Errors
/// See [`AttractorError`].
pub fn solve_levels_at(
    laurent: &Laurent,
    levels: std::ops::RangeInclusive<usize>,
    digits: u32,
    bits: u32,
) -> Result<Vec<Attractor>, AttractorError> {
    check_reach(&levels)?;
    let check_bits = confirming_bits(bits);
    let mut fam = HigherNormalFunction::new(laurent)?.with_series(check_bits)?;
    let points: Vec<[i64; 2]> = laurent.terms().iter().map(|t| t.0).collect();
    let polar_area = asymptotics::polar_twice_area(&points).unwrap_or(0);
    // Phase 1 (sequential, double precision): each level's root seeds the next guess.
    let mut roots: Vec<(usize, i64, f64)> = Vec::new();
    let mut previous: Vec<(f64, f64)> = Vec::new(); // (k, t)
    for level in levels {
        let k = level as i64 + LEVEL_OFFSET;
        // Guess: from ν ≈ c t² + d through the last two roots, else the leading asymptotics.
        let t0 = match previous.as_slice() {
            [.., (k1, t1), (k2, t2)] => {
                let c = (k2 - k1) / (t2 * t2 - t1 * t1);
                let d = k2 - c * t2 * t2;
                ((k as f64 - d) / c).max(0.1).sqrt()
            }
            [(k1, t1)] => t1 * (k as f64 / k1).sqrt(),
            [] => fam.guess_log(k),
        };
        let t = fam.root_f64(k, t0)?;
        previous.push((k as f64, t));
        roots.push((level, k, t));
    }
    // Enough constant terms for the series α at the check precision of the smallest modulus.
    if let Some(&(_, _, t_min)) = roots.first() {
        let _ = fam.alpha_series(&Complex::with_val(check_bits, t_min.exp()))?;
    }
    // Phase 2 (levels in parallel): refinement at the working precision, then the confirming
    // solve at a higher one.
    roots
        .into_par_iter()
        .map(|(level, k, t)| {
            let mut fam = fam.clone();
            let (t_work, residual, imaginary_part) =
                fam.root_mp(k, &Float::with_val(bits, t), bits)?;
            if imaginary_part > 1e-6 {
                return Err(AttractorError::NotReal {
                    a: t.exp(),
                    im: imaginary_part,
                });
            }
            let (t_check, _, _) = fam.root_mp(k, &t_work, check_bits)?;
            let a = Float::with_val(bits, t_work.exp_ref());
            let a_check = Float::with_val(check_bits, t_check.exp_ref());
            let rel = (Float::with_val(check_bits, &a_check - &a) / &a_check)
                .to_f64()
                .abs();
            let agreed = if rel == 0.0 {
                digits as f64
            } else {
                -rel.log10()
            };
            let volume_gap = asymptotics::volume_gap(polar_area, &t_work, level).to_f64();
            Ok(Attractor {
                volume_gap,
                level,
                nu: k,
                log_modulus: t_work,
                modulus: a,
                digits: (agreed.floor().max(0.0) as u32).min(digits),
                residual,
                imaginary_part,
                precision_bits: bits,
            })
        })
        .collect()
}
