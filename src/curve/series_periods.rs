//! Every period at the large-modulus point by series: Ω and R over α and β, τ, ν and the
//! derivatives of ν, from the Frobenius basis of [`crate::curve::picard_fuchs`].
//!
//! # Formulas (`docs/MATHEMATICS.md` §8)
//! t = 1/a, ℓ = log t = −log a (principal), f₀ and f₁ = f₀ℓ + g the Frobenius basis. For a cycle
//! with `Ω = −2πi t h(t)`:
//! - `dΩ/da = 2πi t² (h + θh)`, `d²Ω/da² = −2πi t³ (2h + 3θh + θ²h)` (θ = t d/dt = −a d/da);
//! - `R = ∫ Ω da = 2πi ∫ h dt/t + const`.
//!
//! **α**: h = f₀, `R_α = 2πi (ℓ + I₁)` (the series (4.2) of `docs/MATHEMATICS.md` §4; no
//! constant). **β**: `h = A f₁ + B f₀`, and with `∫ f₁ dt/t = ℓ²/2 + ℓI₁ − I₂ + J₁`,
//!
//! `R_β = 2πi [A (ℓ²/2 + ℓI₁ − I₂ + J₁) + B (ℓ + I₁)] + C`,
//!
//! `I₁ = Σ_{n≥1} w_n tⁿ/n`, `I₂ = Σ w_n tⁿ/n²`, `J₁ = Σ v_n tⁿ/n`. The three constants A, B, C of a
//! family are fixed by matching Ω_β, dΩ_β/da and R_β of path integration
//! ([`crate::curve::periods::periods`]) at one reference modulus a_ref = ⌈3·radius⌉ (series ratio
//! 1/3; the paths are routine there), at [`crate::precision::matching_bits`] of the precision
//! asked for, and cached per (family, precision) for the life of the process: a later request at
//! the same or a lower precision reuses them. 2πi·A is an integer to the working precision for
//! every family (the monodromy of β around a = ∞ adds that multiple of α); B and C are recorded at
//! 100+ digits by `tests/periods.rs` for identification in closed form.
//!
//! # Domain
//! |a| > radius (the largest |critical value| of φ), on the principal branch of log a: for real
//! a > radius the β of the path rule continues analytically into the series (measured for all 15
//! families from 1.1·radius to 10⁴⁰; `tests/periods.rs`). Off the real axis the path rule may
//! pick a β differing by a multiple of α, which changes Ω_β and R_β but not ν.
//!
//! # Accuracy
//! The series tail (see [`crate::curve::picard_fuchs`]) plus the error of the matched constants
//! (the path error at the matching precision, 16 bits beyond the working precision). Measured:
//! series and path agree to within 3 digits of the working precision at 30 and 100 digits
//! (`tests/periods.rs`).
//!
//! # Errors
//! [`SeriesError`].
//!
//! # References
//! See [`crate::curve::picard_fuchs`]; the regulator periods and dR/da = Ω: `docs/MATHEMATICS.md` §4.

use crate::curve::constant_terms::Term;
use crate::curve::laurent::Laurent;
use crate::curve::periods::{self, nu_parts, CyclePeriods, NuParts, Periods, PeriodsError};
use crate::curve::picard_fuchs::{FrobeniusSums, PicardFuchs, PicardFuchsError};
use crate::numerics::complex::CNum;
use crate::numerics::serial;
use crate::precision::{agreement_digits, digits_of, matching_bits, tolerance, SUM_ROUNDING_BITS};
use rug::{Complex, Float};
use std::collections::HashMap;
use std::sync::{Arc, Mutex, OnceLock};
use thiserror::Error;

/// Why the series periods could not be computed.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum SeriesError {
    #[error(transparent)]
    PicardFuchs(#[from] PicardFuchsError),
    /// The path integration at the reference modulus failed.
    #[error("matching the β series at a = {reference}: {source}")]
    Matching {
        reference: f64,
        source: PeriodsError,
    },
}

/// The constants of Ω_β = −2πi t (A f₁ + B f₀) and R_β (C), matched at `reference`.
#[derive(Debug, Clone, serde::Serialize)]
pub struct BetaConstants {
    #[serde(serialize_with = "serial::complex")]
    pub a: Complex,
    #[serde(serialize_with = "serial::complex")]
    pub b: Complex,
    #[serde(serialize_with = "serial::complex")]
    pub c: Complex,
    /// The reference modulus.
    pub reference: u64,
    /// Precision of the path integration that fixed them.
    pub bits: u32,
    /// Estimated relative error of the constants (from the path error).
    pub error: f64,
}

/// The series method of one family: its operator and (through a process-wide cache) the
/// matched constants.
#[derive(Debug, Clone)]
pub struct SeriesMethod {
    pub laurent: Laurent,
    pub operator: Arc<PicardFuchs>,
}

/// All periods by series at one modulus.
#[derive(Debug, Clone, serde::Serialize)]
pub struct SeriesPeriods {
    pub alpha: CyclePeriods<Complex>,
    pub beta: CyclePeriods<Complex>,
    /// τ, ν, dν/da, d²ν/da² and the error of ν.
    #[serde(flatten)]
    pub derived: NuParts<Complex>,
    /// Terms of the Frobenius series summed.
    pub terms: usize,
}

type ConstantsCache = Mutex<HashMap<Vec<Term>, Vec<Arc<BetaConstants>>>>;

fn constants_cache() -> &'static ConstantsCache {
    static CACHE: OnceLock<ConstantsCache> = OnceLock::new();
    CACHE.get_or_init(|| Mutex::new(HashMap::new()))
}

type OperatorCache = Mutex<HashMap<Vec<Term>, Arc<PicardFuchs>>>;

impl SeriesMethod {
    /// The series method of φ (the operator is built once per process and family).
    ///
    /// # Errors
    /// [`SeriesError::PicardFuchs`].
    pub fn new(laurent: &Laurent) -> Result<Self, SeriesError> {
        static OPERATORS: OnceLock<OperatorCache> = OnceLock::new();
        let cache = OPERATORS.get_or_init(|| Mutex::new(HashMap::new()));
        let key = laurent.terms().to_vec();
        let found = cache
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .get(&key)
            .cloned();
        let operator = match found {
            Some(op) => op,
            None => {
                let op = Arc::new(PicardFuchs::new(laurent)?);
                cache
                    .lock()
                    .unwrap_or_else(|e| e.into_inner())
                    .insert(key, Arc::clone(&op));
                op
            }
        };
        Ok(SeriesMethod {
            laurent: laurent.clone(),
            operator,
        })
    }

    /// radius/|a|: the series converge below 1.
    pub fn ratio(&self, a: &Complex) -> f64 {
        self.operator.radius / Float::with_val(53, a.abs_ref()).to_f64()
    }

    /// The reference modulus of the matching: ⌈3·radius⌉.
    pub fn reference(&self) -> u64 {
        (3.0 * self.operator.radius).ceil() as u64
    }

    /// The β constants good to `bits` bits: from the cache (any entry of at least `bits`), else
    /// matched now.
    ///
    /// # Errors
    /// [`SeriesError::Matching`] when the path integration fails.
    pub fn constants(&self, bits: u32) -> Result<Arc<BetaConstants>, SeriesError> {
        let key = self.laurent.terms().to_vec();
        let cached = constants_cache()
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .get(&key)
            .and_then(|list| list.iter().find(|c| c.bits >= matching_bits(bits)).cloned());
        if let Some(c) = cached {
            return Ok(c);
        }
        let c = Arc::new(self.match_constants(matching_bits(bits))?);
        constants_cache()
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .entry(key)
            .or_default()
            .push(Arc::clone(&c));
        Ok(c)
    }

    /// A, B, C from path integration at the reference modulus at `bits`.
    ///
    /// # Errors
    /// [`SeriesError::Matching`].
    pub fn match_constants(&self, bits: u32) -> Result<BetaConstants, SeriesError> {
        let reference = self.reference();
        let a = Complex::with_val(bits, reference);
        let path = periods::periods(&self.laurent, a.clone(), None).map_err(|source| {
            SeriesError::Matching {
                reference: reference as f64,
                source,
            }
        })?;
        let t = Complex::with_val(bits, a.recip_ref());
        let ell = -Complex::with_val(bits, a.ln_ref());
        let s = self.operator.sums(&t)?;
        let two_pi_i = t.int_like(2) * t.pi_like() * t.i_like();
        // Ω_β = −2πi t (A F₁ + B F₀), dΩ_β/da = 2πi t² (A (F₁ + θF₁) + B (F₀ + θF₀)).
        let [f1, df1, _] = log_solution(&s, &ell);
        let f0 = s.f[0].clone();
        let df0 = s.f[1].clone();
        let m11 = -(two_pi_i.clone() * &t * &f1);
        let m12 = -(two_pi_i.clone() * &t * &f0);
        let t2 = Complex::with_val(bits, t.square_ref());
        let m21 = two_pi_i.clone() * &t2 * (f1.clone() + df1);
        let m22 = two_pi_i.clone() * &t2 * (f0 + df0);
        let det = m11.clone() * &m22 - m12.clone() * &m21;
        let (o, o_da) = (&path.beta.omega, &path.beta.omega_da);
        let a_coeff = (m22 * o - m12 * o_da) / det.clone();
        let b_coeff = (m11 * o_da - m21 * o) / det;
        let reg = beta_regulator_without_constant(&s, &ell, &a_coeff, &b_coeff, &two_pi_i);
        let c = path.beta.regulator.clone() - reg;
        let error = (path.beta.error / path.beta.omega.abs_f64()).max(tolerance(bits, 0));
        Ok(BetaConstants {
            a: a_coeff,
            b: b_coeff,
            c,
            reference,
            bits,
            error,
        })
    }

    /// Every period by series at modulus `a` (|a| > radius), at the precision of `a`.
    ///
    /// # Errors
    /// [`PicardFuchsError::OutsideRadius`] and the errors of [`SeriesMethod::constants`].
    pub fn periods(&self, a: &Complex) -> Result<SeriesPeriods, SeriesError> {
        let bits = a.prec().0;
        let ell = -Complex::with_val(bits, a.ln_ref());
        self.periods_log(a, &ell)
    }

    /// As [`SeriesMethod::periods`] with ℓ = −log a given (e.g. exactly −T when a = e^T).
    ///
    /// # Errors
    /// As [`SeriesMethod::periods`].
    pub fn periods_log(&self, a: &Complex, ell: &Complex) -> Result<SeriesPeriods, SeriesError> {
        let k = self.constants(a.prec().0)?;
        self.periods_with(a, ell, &k)
    }

    /// As [`SeriesMethod::periods_log`] with the β constants given.
    ///
    /// # Errors
    /// [`PicardFuchsError::OutsideRadius`]; coefficient errors of the operator.
    pub fn periods_with(
        &self,
        a: &Complex,
        ell: &Complex,
        k: &BetaConstants,
    ) -> Result<SeriesPeriods, SeriesError> {
        let bits = a.prec().0;
        let t = Complex::with_val(bits, a.recip_ref());
        let s = self.operator.sums(&t)?;
        let two_pi_i = t.int_like(2) * t.pi_like() * t.i_like();
        let (ka, kb) = (Complex::with_val(bits, &k.a), Complex::with_val(bits, &k.b));
        // α: h = f₀.
        let r_alpha = two_pi_i.clone() * (ell.clone() + &s.i1);
        let alpha = cycle(&s.f, r_alpha, &t, &two_pi_i, s.tail, bits);
        // β: h = A f₁ + B f₀.
        let logs = log_solution(&s, ell);
        let h: [Complex; 3] = std::array::from_fn(|i| ka.clone() * &logs[i] + kb.clone() * &s.f[i]);
        let reg = beta_regulator_without_constant(&s, ell, &ka, &kb, &two_pi_i);
        let r_beta = reg + Complex::with_val(bits, &k.c);
        let mut beta = cycle(&h, r_beta, &t, &two_pi_i, s.tail, bits);
        beta.error += k.error * (beta.omega.abs_f64() + beta.regulator.abs_f64());
        let derived = nu_parts(&alpha, &beta);
        Ok(SeriesPeriods {
            alpha,
            beta,
            derived,
            terms: s.terms,
        })
    }
}

/// `[f₁, θf₁, θ²f₁]` with `f₁ = f₀ℓ + g`: `θf₁ = θf₀·ℓ + f₀ + θg`, `θ²f₁ = θ²f₀·ℓ + 2θf₀ + θ²g`.
fn log_solution(s: &FrobeniusSums, ell: &Complex) -> [Complex; 3] {
    let [f, df, ddf] = &s.f;
    let [g, dg, ddg] = &s.g;
    [
        f.clone() * ell + g,
        df.clone() * ell + f + dg,
        ddf.clone() * ell + df.clone() * 2u32 + ddg,
    ]
}

/// `2πi [A (ℓ²/2 + ℓI₁ − I₂ + J₁) + B (ℓ + I₁)]`: R_β less its constant C.
fn beta_regulator_without_constant(
    s: &FrobeniusSums,
    ell: &Complex,
    a: &Complex,
    b: &Complex,
    two_pi_i: &Complex,
) -> Complex {
    let half_ell2 = Complex::with_val(ell.prec(), ell.square_ref()) / 2u32;
    let log_integral = half_ell2 + ell.clone() * &s.i1 - &s.i2 + &s.j1;
    let holo_integral = ell.clone() + &s.i1;
    two_pi_i.clone() * (a.clone() * log_integral + b.clone() * holo_integral)
}

/// Ω = −2πi t h, dΩ/da = 2πi t²(h + θh), d²Ω/da² = −2πi t³(2h + 3θh + θ²h), with R given.
fn cycle(
    h: &[Complex; 3],
    regulator: Complex,
    t: &Complex,
    two_pi_i: &Complex,
    tail: f64,
    bits: u32,
) -> CyclePeriods<Complex> {
    let t2 = Complex::with_val(bits, t.square_ref());
    let t3 = Complex::with_val(bits, &t2 * t);
    let omega = -(two_pi_i.clone() * t * &h[0]);
    let omega_da = two_pi_i.clone() * &t2 * (h[0].clone() + &h[1]);
    let omega_daa = -(two_pi_i.clone() * &t3 * (h[0].clone() * 2u32 + h[1].clone() * 3u32 + &h[2]));
    let error =
        (tail + tolerance(bits, SUM_ROUNDING_BITS)) * (omega.abs_f64() + regulator.abs_f64());
    CyclePeriods {
        omega,
        regulator,
        omega_da,
        omega_daa,
        steps: 0,
        error,
    }
}

/// Series and path at one modulus, with their agreement.
#[derive(Debug, Clone, serde::Serialize)]
pub struct TwoMethods {
    /// Everything by series (None outside the radius, with the reason in `series_note`).
    pub series: Option<SeriesPeriods>,
    pub series_note: Option<String>,
    /// Everything by path integration.
    pub path: Periods<Complex>,
    /// Digits of agreement of series and path: Ω_α, R_α, Ω_β, R_β, τ, ν.
    pub agreement: Option<Agreement>,
}

/// Decimal digits on which the two methods agree (relative to the larger value).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Agreement {
    pub omega_alpha: f64,
    pub r_alpha: f64,
    pub omega_beta: f64,
    pub r_beta: f64,
    pub tau: f64,
    pub nu: f64,
    /// k with β_path = β_series + kα (the β values are compared after removing kα; measured
    /// k = −2 for P2 from a ≈ 1e10, 0 elsewhere).
    pub beta_shift: i64,
}

impl Agreement {
    /// The smallest of the six.
    pub fn worst(&self) -> f64 {
        [
            self.omega_alpha,
            self.r_alpha,
            self.omega_beta,
            self.r_beta,
            self.tau,
            self.nu,
        ]
        .into_iter()
        .fold(f64::INFINITY, f64::min)
    }
}

/// Digits on which x and y agree, at most those of their precision.
pub fn digits_agreeing(x: &Complex, y: &Complex) -> f64 {
    let cap = digits_of(x.prec().0.min(y.prec().0));
    let scale = x.abs_f64().max(y.abs_f64());
    let rel = if scale == 0.0 {
        0.0
    } else {
        Complex::with_val(x.prec().0, x - y).abs_f64() / scale
    };
    agreement_digits(rel, cap)
}

/// Both methods at modulus `a` (real or complex), at the precision of `a`.
///
/// # Errors
/// The path's [`PeriodsError`]; a failing series is reported in `series_note`, not as an error.
pub fn compare(laurent: &Laurent, a: &Complex) -> Result<TwoMethods, PeriodsError> {
    let path = periods::periods(laurent, a.clone(), None)?;
    let series = SeriesMethod::new(laurent).and_then(|m| m.periods(a));
    let (series, series_note) = match series {
        Ok(s) => (Some(s), None),
        Err(e) => (None, Some(e.to_string())),
    };
    let agreement = series.as_ref().map(|s| {
        // The path's β loop and the series' β may be different cycles of the same class modulo
        // α: β_path = β_series + kα with k = Re(τ_path − τ_series) an integer. ν does not depend
        // on k; Ω_β, R_β and τ are compared after removing kα.
        let prec = a.prec().0;
        let shift = Complex::with_val(prec, &path.tau - &s.derived.tau)
            .real()
            .to_f64();
        let k = if shift.is_finite() {
            shift.round()
        } else {
            0.0
        };
        let kc = Complex::with_val(prec, k);
        let less = |v: &Complex, alpha: &Complex| {
            Complex::with_val(prec, v - Complex::with_val(prec, alpha * &kc))
        };
        Agreement {
            omega_alpha: digits_agreeing(&s.alpha.omega, &path.alpha.omega),
            r_alpha: digits_agreeing(&s.alpha.regulator, &path.alpha.regulator),
            omega_beta: digits_agreeing(&s.beta.omega, &less(&path.beta.omega, &path.alpha.omega)),
            r_beta: digits_agreeing(
                &s.beta.regulator,
                &less(&path.beta.regulator, &path.alpha.regulator),
            ),
            tau: digits_agreeing(&s.derived.tau, &Complex::with_val(prec, &path.tau - &kc)),
            nu: digits_agreeing(&s.derived.nu, &path.nu),
            beta_shift: k as i64,
        }
    });
    Ok(TwoMethods {
        series,
        series_note,
        path,
        agreement,
    })
}
