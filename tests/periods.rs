//! Periods and regulator periods: series against path, elliptic integrals, Mahler measures,
//! path-deformation invariance, puncture loops and ν at the ground states. The invariants run at
//! 64, 128 and 256 bits with tolerances from the precision policy.

use regwave::curve::attractor;
use regwave::curve::continuation::March;
use regwave::curve::cover::Curve;
use regwave::curve::cycles;
use regwave::curve::laurent::Laurent;
use regwave::curve::periods::{self, CyclePeriods};
use regwave::input::selection;
use regwave::lattice::catalogue;
use regwave::numerics::complex::CNum;
use regwave::numerics::quadrature;
use rug::float::Constant;
use rug::{Complex, Float};

mod common;
use common::{digits_of, tolerance_digits, LADDER_BITS};

/// Digits the α periods of series and path may differ by: measured worst over the 15 families ×
/// 3 moduli 0.66, 0.51 and 1.04 digits at 64, 128 and 256 bits (rounding of the path's few
/// thousand terms and of the series' tail), plus one of margin.
const SERIES_PATH_LOSS: f64 = 2.0;
/// Digits the AGM identity may lose: measured 0.04, −0.23 and 0.24 at 64, 128 and 256 bits
/// (one rounding of each side), plus one of margin.
const AGM_LOSS: f64 = 1.0;
/// Digits two homologous β loops may differ by: measured 0.99, 0.40 and 0.77 at 64, 128 and
/// 256 bits (rounding along two different paths), plus one of margin.
const HOMOLOGOUS_LOSS: f64 = 2.0;
/// Digits the puncture residue and Ω = 0 may lose (absolute, both of size ≈ 1 in units of
/// (2πi)²): measured 0.04, −2.4 and 0.24 at 64, 128 and 256 bits, plus one of margin.
const PUNCTURE_LOSS: f64 = 1.0;
/// Digits |ν − 1| at the ground states may lose: measured 0.74, 0.45 and 0.84 at 64, 128 and
/// 256 bits (the modulus solved with the series α, ν evaluated with the path α), plus one of
/// margin.
const NU_LOSS: f64 = 2.0;
/// Digits m(8) = 4 m(2) may lose at 140 bits: measured 0.45 (42 digits, 2.8e-42), plus 1.5 of
/// margin.
const MAHLER_LOSS: f64 = 2.0;
/// Not a tolerance of the precision: the error of m(4 + ε) for m(4) at ε = 2⁻¹⁰⁰ ≈ 7.9e-31 is
/// O(ε log ε) ≈ 5e-29 (measured relative 4.0e-30).
const CONIFOLD_OFFSET_ERROR: f64 = 1e-25;
/// Accuracy of the checked values of docs/MATHEMATICS.md §4 (24 decimals shown), relative.
const CHECKED_VALUE_ACCURACY: f64 = 1e-24;
/// Not a tolerance: Ω of two loops around the same pair agree or differ in sign, so a relative
/// difference below this tells "same sign" from "opposite sign" (the opposite gives 2).
const SAME_SIGN: f64 = 1e-3;

fn family(id: &str) -> Laurent {
    selection::resolve(Some(id), None, None).unwrap().laurent
}

fn rel(x: &Complex, y: &Complex) -> f64 {
    (x.clone() - y.clone()).abs_f64() / y.abs_f64()
}

fn alpha_both(l: &Laurent, a: f64, bits: u32) -> (CyclePeriods<Complex>, CyclePeriods<Complex>) {
    let ac = Complex::with_val(bits, a);
    let terms = l.constant_terms(1500).unwrap();
    let series = periods::alpha_series(&terms, l.coefficient_sum(), &ac).unwrap();
    (series, alpha_path(l, ac))
}

/// The α periods by path integration at the precision of `a`.
fn alpha_path(l: &Laurent, a: Complex) -> CyclePeriods<Complex> {
    let bits = a.prec().0;
    let curve = Curve::new(l, a).unwrap();
    let sing = curve.singular_points().unwrap();
    periods::alpha_path(&curve, &sing, &March::for_bits(bits)).unwrap()
}

/// `a·(1 + 2^−(bits/2))` at the precision of `a`: a modulus off by far more than the tolerances
/// at that precision, for the negative companions.
fn moved(a: &Float) -> Float {
    let bits = a.prec();
    let shift = Float::with_val(bits, a >> (bits / 2));
    Float::with_val(bits, a + shift)
}

#[test]
fn series_and_path_agree_at_64_128_and_256_bits_for_every_family() {
    // Two independent computations of the α periods (the a = ∞ series from exact constant
    // terms, and path integration on the cover) at three moduli per family, at each precision of
    // the ladder. Negative companion: the path at a modulus moved by 2^−(bits/2) (relative)
    // differs from the series by more than the tolerance.
    for bits in LADDER_BITS {
        let tol = tolerance_digits(bits, SERIES_PATH_LOSS);
        for f in catalogue::all().iter().filter(|f| f.applicable) {
            let l = Laurent::tempered(&f.polygon());
            let s = l.coefficient_sum() as f64;
            for a in [2.0 * s + 1.0, 8.0 * s, 100.0 * s] {
                let (series, path) = alpha_both(&l, a, bits);
                let d =
                    rel(&series.omega, &path.omega).max(rel(&series.regulator, &path.regulator));
                assert!(
                    d < tol,
                    "{} at a = {a}, {bits} bits: relative difference {d:e}",
                    f.id
                );
            }
        }
        let l = family("F0");
        let (series, _) = alpha_both(&l, 50.0, bits);
        let off = alpha_path(
            &l,
            Complex::with_val(bits, (moved(&Float::with_val(bits, 50)), 0)),
        );
        let d = rel(&series.omega, &off.omega).min(rel(&series.regulator, &off.regulator));
        assert!(
            d > tol,
            "F0 at {bits} bits: a moved modulus still agrees ({d:e})"
        );
    }
}

#[test]
fn f0_alpha_period_is_an_agm_at_64_128_and_256_bits() {
    // −Ω_α·a/(2πi) = 1/AGM(1, √(1 − 16/a²)): the complete elliptic integral K through the
    // arithmetic–geometric mean (Handbook of Mathematical Functions (1964) 17.6.1; MPFR's agm
    // via rug), for both methods. Negative companion: the AGM at a modulus moved by 2^−(bits/2)
    // (relative) misses both by more than the tolerance.
    let inverse_agm = |a: &Float| {
        let bits = a.prec();
        let kp =
            (1u32 - Float::with_val(bits, 16u32) / Float::with_val(bits, a.square_ref())).sqrt();
        let agm = Float::with_val(bits, Float::with_val(bits, 1).agm_ref(&kp));
        Complex::with_val(bits, agm.recip())
    };
    let l = family("F0");
    for bits in LADDER_BITS {
        let tol = tolerance_digits(bits, AGM_LOSS);
        let two_pi_i = Complex::with_val(bits, (0, Float::with_val(bits, Constant::Pi) * 2u32));
        for a in [17.846643118044799, 50.0, 300.0] {
            let (series, path) = alpha_both(&l, a, bits);
            let af = Float::with_val(bits, a);
            let want = inverse_agm(&af);
            let wrong = inverse_agm(&moved(&af));
            for (name, w) in [("series", &series.omega), ("path", &path.omega)] {
                let got = Complex::with_val(bits, -w.clone() * &af) / &two_pi_i;
                assert!(
                    rel(&got, &want) < tol,
                    "{name} at a = {a}, {bits} bits: {:e}",
                    rel(&got, &want)
                );
                assert!(
                    rel(&got, &wrong) > tol,
                    "{name} at a = {a}, {bits} bits: the moved modulus also fits"
                );
            }
        }
    }
}

/// m(x + 1/x + y + 1/y + k) by Jensen's formula, (1/π)∫₀^π arccosh⁺(|k + 2cos t|/2) dt, computed
/// here for k = 2 with the substitution t = π/2 − w² that removes the square-root endpoint.
fn jensen_mahler_k2(bits: u32) -> Float {
    let half_pi = Float::with_val(bits, Constant::Pi) / 2u32;
    let top = Float::with_val(bits, half_pi.sqrt_ref());
    let rule = quadrature::rule(80, bits);
    let mut sum = Float::new(bits);
    for (t, w) in rule.nodes.iter().zip(&rule.weights) {
        // w ∈ [0, top]: w = top (1 + t)/2
        let x = Float::with_val(bits, &top * Float::with_val(bits, t + 1u32)) / 2u32;
        let u = Float::with_val(bits, x.square_ref()).sin() + 1u32; // 1 + cos(π/2 − x²)
        let f = u.acosh() * Float::with_val(bits, &x * 2u32);
        sum += f * w;
    }
    sum * &top / 2u32 / Float::with_val(bits, Constant::Pi)
}

#[test]
fn mahler_measures_of_the_f0_family() {
    // R_α/(−2πi) at a = k is m(x + 1/x + y + 1/y + k) ("Modular Mahler measures I", 1999).
    // m(8) = 4 m(2) (Algebra & Number Theory 1 (2007) 87–117), m(2) from Jensen's formula here.
    let bits = 140;
    let l = family("F0");
    let (series8, path8) = alpha_both(&l, 8.0, bits);
    let minus_two_pi_i = Complex::with_val(bits, (0, -Float::with_val(bits, Constant::Pi) * 2u32));
    let m8 = Complex::with_val(bits, &series8.regulator / &minus_two_pi_i);
    let m8_path = Complex::with_val(bits, &path8.regulator / &minus_two_pi_i);
    let m2 = jensen_mahler_k2(bits);
    let four_m2 = Complex::with_val(bits, m2 * 4u32);
    assert!(
        rel(&m8, &four_m2) < tolerance_digits(bits, MAHLER_LOSS),
        "m(8) vs 4 m(2): {:e}",
        rel(&m8, &four_m2)
    );
    assert!(
        rel(&m8_path, &four_m2) < tolerance_digits(bits, MAHLER_LOSS),
        "path m(8) vs 4 m(2): {:e}",
        rel(&m8_path, &four_m2)
    );
    // m(4) = 4G/π, G Catalan's constant ("Modular Mahler measures I", 1999): the conifold a = 4,
    // approached from above by path integration at a = 4 + 2⁻¹⁰⁰ (m(4 + ε) − m(4) = O(ε log ε)).
    let a = Complex::with_val(bits, 4) + Float::with_val(bits, Float::i_exp(1, -100));
    let curve = Curve::new(&l, a).unwrap();
    let sing = curve.singular_points().unwrap();
    let near = periods::alpha_path(&curve, &sing, &March::for_bits(bits)).unwrap();
    let m4 = Complex::with_val(bits, &near.regulator / &minus_two_pi_i);
    let catalan = Float::with_val(bits, Constant::Catalan);
    let want = Complex::with_val(bits, catalan * 4u32 / Float::with_val(bits, Constant::Pi));
    assert!(
        rel(&m4, &want) < CONIFOLD_OFFSET_ERROR,
        "m(4) vs 4G/π: {:e}",
        rel(&m4, &want)
    );
}

#[test]
fn homologous_beta_loops_give_the_same_periods_at_64_128_and_256_bits() {
    // Path-deformation invariance: two different loops around the same pair of branch points.
    for bits in LADDER_BITS {
        for id in ["dP3", "P2", "F0"] {
            let l = family(id);
            let a = Complex::with_val(bits, 3.0 * l.coefficient_sum() as f64 + 20.0);
            let curve = Curve::new(&l, a).unwrap();
            let sing = curve.singular_points().unwrap();
            let march = March::for_bits(bits);
            let (rule, polyline) = cycles::beta_loop(&curve, &sing).unwrap();
            let [b0, b1] = rule.branch_points;
            let one = periods::loop_periods(&curve, &sing, &polyline, &march).unwrap();
            let narrow: Vec<Complex> = cycles::stadium(b0, b1, 0.02)
                .iter()
                .map(|p| Complex::with_val(bits, (p[0], p[1])))
                .collect();
            let two = periods::loop_periods(&curve, &sing, &narrow, &march).unwrap();
            // Same orientation and sheet up to a common sign.
            let sign = if rel(&one.omega, &two.omega) < SAME_SIGN {
                1
            } else {
                -1
            };
            let two_omega = Complex::with_val(bits, &two.omega * sign);
            let two_reg = Complex::with_val(bits, &two.regulator * sign);
            let tol = tolerance_digits(bits, HOMOLOGOUS_LOSS);
            assert!(
                rel(&two_omega, &one.omega) < tol,
                "{id} Ω at {bits} bits: {:e}",
                rel(&two_omega, &one.omega)
            );
            assert!(
                rel(&two_reg, &one.regulator) < tol,
                "{id} R at {bits} bits: {:e}",
                rel(&two_reg, &one.regulator)
            );
        }
    }
}

#[test]
fn loops_around_a_puncture_give_integer_multiples_of_two_pi_i_squared_at_64_128_and_256_bits() {
    // dP3: A = 1 + x and C = 1/x + 1 vanish at x = −1. On a small circle around z = 2πi the
    // regulator integral is 2πi·Res(z d log y) = (2πi)²·(order of y there) and Ω = 0 (tame
    // symbols 1: docs/MATHEMATICS.md §4).
    let l = family("dP3");
    let circle: Vec<[f64; 2]> = (0..=24)
        .map(|k| {
            let t = 2.0 * std::f64::consts::PI * k as f64 / 24.0;
            [0.3 * t.cos(), 2.0 * std::f64::consts::PI + 0.3 * t.sin()]
        })
        .collect();
    for bits in LADDER_BITS {
        let curve = Curve::new(&l, Complex::with_val(bits, 50)).unwrap();
        let sing = curve.singular_points().unwrap();
        let circle: Vec<Complex> = circle
            .iter()
            .map(|p| Complex::with_val(bits, (p[0], p[1])))
            .collect();
        let p = periods::loop_periods(&curve, &sing, &circle, &March::for_bits(bits)).unwrap();
        let two_pi_i = Complex::with_val(bits, (0, Float::with_val(bits, Constant::Pi) * 2u32));
        let k = Complex::with_val(
            bits,
            &p.regulator / Complex::with_val(bits, two_pi_i.square_ref()),
        );
        let nearest = k.real().to_f64().round();
        assert!(nearest != 0.0, "the large root has a pole there");
        let dev = (k.clone() - Complex::with_val(bits, nearest)).abs_f64();
        let tol = tolerance_digits(bits, PUNCTURE_LOSS);
        assert!(dev < tol, "R/(2πi)² = {k} at {bits} bits");
        assert!(p.omega.abs_f64() < tol, "Ω = {} at {bits} bits", p.omega);
    }
}

#[test]
fn nu_is_one_at_the_ground_states_at_64_128_and_256_bits() {
    // The ground states of F0, P2 and dP3 solved at each precision of the ladder (attractor::
    // solve_levels_at, which evaluates ν with the series α) agree with the checked values of
    // docs/MATHEMATICS.md §4, and ν there, evaluated again with the path α (periods::periods
    // without a given α), is 1 to the precision. Negative companion: at the modulus moved by
    // 2^−(bits/2) (relative) ν is farther from 1 than the tolerance.
    let checked = [
        ("F0", "17.846643118044799282389997"),
        ("P2", "12.970039821793337437623954"),
        ("dP3", "36.512388457960298416625508"),
    ];
    for bits in LADDER_BITS {
        let digits = digits_of(bits);
        let tol = tolerance_digits(bits, NU_LOSS);
        for (id, reference) in checked {
            let l = family(id);
            let at = attractor::solve_levels_at(&l, 0..=0, digits as u32, bits).unwrap();
            let reference = Float::with_val(bits, Float::parse(reference).unwrap());
            let off_reference = (Float::with_val(bits, &at[0].modulus - &reference) / &reference)
                .to_f64()
                .abs();
            assert!(
                off_reference < tol.max(CHECKED_VALUE_ACCURACY),
                "{id} at {bits} bits: a₀ = {} vs {reference}",
                at[0].modulus
            );
            let nu_minus_one = |a: Float| {
                let p = periods::periods(&l, Complex::with_val(bits, (a, 0)), None).unwrap();
                (p.nu - Complex::with_val(bits, 1)).abs_f64()
            };
            let dev = nu_minus_one(at[0].modulus.clone());
            assert!(dev < tol, "{id} at {bits} bits: |ν − 1| = {dev:e}");
            let dev_off = nu_minus_one(moved(&at[0].modulus));
            assert!(
                dev_off > tol,
                "{id} at {bits} bits: ν stays 1 ({dev_off:e}) off the ground state"
            );
        }
    }
}
