//! Periods and regulator periods: series against path, elliptic integrals, Mahler measures,
//! path-deformation invariance and puncture loops.

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
    let curve = Curve::new(l, ac).unwrap();
    let sing = curve.singular_points().unwrap();
    let path = periods::alpha_path(&curve, &sing, &March::for_digits(bits as f64 / 3.33)).unwrap();
    (series, path)
}

#[test]
fn series_and_path_agree_to_thirty_digits_for_every_family() {
    // Two independent computations of the α periods (the a = ∞ series from exact constant
    // terms, and path integration on the cover) at three moduli per family.
    for f in catalogue::all().iter().filter(|f| f.applicable) {
        let l = Laurent::tempered(&f.polygon());
        let s = l.coefficient_sum() as f64;
        for a in [2.0 * s + 1.0, 8.0 * s, 100.0 * s] {
            let (series, path) = alpha_both(&l, a, 128);
            let d = rel(&series.omega, &path.omega).max(rel(&series.regulator, &path.regulator));
            assert!(d < 1e-30, "{} at a = {a}: relative difference {d:e}", f.id);
        }
    }
}

#[test]
fn f0_alpha_period_is_an_agm_to_forty_digits() {
    // −Ω_α·a/(2πi) = 1/AGM(1, √(1 − 16/a²)): the complete elliptic integral K through the
    // arithmetic–geometric mean (Handbook of Mathematical Functions (1964) 17.6.1; MPFR's agm
    // via rug), for both methods.
    let bits = 180;
    let l = family("F0");
    for a in [17.846643118044799, 50.0, 300.0] {
        let (series, path) = alpha_both(&l, a, bits);
        let af = Float::with_val(bits, a);
        let kp =
            (1u32 - Float::with_val(bits, 16u32) / Float::with_val(bits, af.square_ref())).sqrt();
        let agm = Float::with_val(bits, Float::with_val(bits, 1).agm_ref(&kp));
        let want = Complex::with_val(bits, agm.recip());
        let two_pi_i = Complex::with_val(bits, (0, Float::with_val(bits, Constant::Pi) * 2u32));
        for (name, w) in [("series", &series.omega), ("path", &path.omega)] {
            let got = Complex::with_val(bits, -w.clone() * &af) / &two_pi_i;
            assert!(
                rel(&got, &want) < 1e-40,
                "{name} at a = {a}: {:e}",
                rel(&got, &want)
            );
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
        rel(&m8, &four_m2) < 1e-35,
        "m(8) vs 4 m(2): {:e}",
        rel(&m8, &four_m2)
    );
    assert!(
        rel(&m8_path, &four_m2) < 1e-35,
        "path m(8) vs 4 m(2): {:e}",
        rel(&m8_path, &four_m2)
    );
    // m(4) = 4G/π, G Catalan's constant ("Modular Mahler measures I", 1999): the conifold a = 4,
    // approached from above by path integration at a = 4 + 10⁻³⁰ (m(4 + ε) − m(4) = O(ε log ε)).
    let a = Complex::with_val(bits, 4) + Float::with_val(bits, Float::i_exp(1, -100));
    let curve = Curve::new(&l, a).unwrap();
    let sing = curve.singular_points().unwrap();
    let near = periods::alpha_path(&curve, &sing, &March::for_digits(40.0)).unwrap();
    let m4 = Complex::with_val(bits, &near.regulator / &minus_two_pi_i);
    let catalan = Float::with_val(bits, Constant::Catalan);
    let want = Complex::with_val(bits, catalan * 4u32 / Float::with_val(bits, Constant::Pi));
    assert!(
        rel(&m4, &want) < 1e-25,
        "m(4) vs 4G/π: {:e}",
        rel(&m4, &want)
    );
}

#[test]
fn homologous_beta_loops_give_the_same_periods() {
    // Path-deformation invariance: two different loops around the same pair of branch points.
    for id in ["dP3", "P2", "F0"] {
        let l = family(id);
        let bits = 128;
        let a = Complex::with_val(bits, 3.0 * l.coefficient_sum() as f64 + 20.0);
        let curve = Curve::new(&l, a).unwrap();
        let sing = curve.singular_points().unwrap();
        let march = March::for_digits(36.0);
        let rule = cycles::beta_loop(&curve, &sing).unwrap();
        let [b0, b1] = rule.branch_points;
        let one = periods::loop_periods(&curve, &sing, &rule.polyline, &march).unwrap();
        let narrow = cycles::stadium(b0, b1, 0.02);
        let two = periods::loop_periods(&curve, &sing, &narrow, &march).unwrap();
        // Same orientation and sheet up to a common sign.
        let sign = if rel(&one.omega, &two.omega) < 1e-3 {
            1
        } else {
            -1
        };
        let two_omega = Complex::with_val(bits, &two.omega * sign);
        let two_reg = Complex::with_val(bits, &two.regulator * sign);
        assert!(
            rel(&two_omega, &one.omega) < 1e-30,
            "{id} Ω: {:e}",
            rel(&two_omega, &one.omega)
        );
        assert!(
            rel(&two_reg, &one.regulator) < 1e-30,
            "{id} R: {:e}",
            rel(&two_reg, &one.regulator)
        );
    }
}

#[test]
fn loops_around_a_puncture_give_integer_multiples_of_two_pi_i_squared() {
    // dP3: A = 1 + x and C = 1/x + 1 vanish at x = −1. On a small circle around z = 2πi the
    // regulator integral is 2πi·Res(z d log y) = (2πi)²·(order of y there) and Ω = 0 (tame
    // symbols 1: docs/MATHEMATICS.md §4).
    let l = family("dP3");
    let bits = 128;
    let curve = Curve::new(&l, Complex::with_val(bits, 50)).unwrap();
    let sing = curve.singular_points().unwrap();
    let march = March::for_digits(36.0);
    let circle: Vec<[f64; 2]> = (0..=24)
        .map(|k| {
            let t = 2.0 * std::f64::consts::PI * k as f64 / 24.0;
            [0.3 * t.cos(), 2.0 * std::f64::consts::PI + 0.3 * t.sin()]
        })
        .collect();
    let p = periods::loop_periods(&curve, &sing, &circle, &march).unwrap();
    let two_pi_i = Complex::with_val(bits, (0, Float::with_val(bits, Constant::Pi) * 2u32));
    let k = Complex::with_val(
        bits,
        &p.regulator / Complex::with_val(bits, two_pi_i.square_ref()),
    );
    let nearest = k.real().to_f64().round();
    assert!(nearest != 0.0, "the large root has a pole there");
    let dev = (k.clone() - Complex::with_val(bits, nearest)).abs_f64();
    assert!(dev < 1e-30, "R/(2πi)² = {k}");
    assert!(p.omega.abs_f64() < 1e-30, "Ω = {}", p.omega);
}
