//! The ħ = 2π shift form of the quantum curve.

use num_complex::Complex64;
use regwave::curve::laurent::{Laurent, StripParts};
use regwave::lattice::catalogue;
use regwave::numerics::complex::CNum;
use regwave::operator::quantum_curve::QuantumCurve;
use rug::Complex;

mod common;
use common::{double, tolerance_digits, DOUBLE_BITS, LADDER_BITS};

/// Digits the shift coefficients may lose against A, −B, C: measured −0.84, 0.06, −0.40 and
/// −0.24 at 53, 64, 128 and 256 bits over all families and three points (a few roundings of
/// exponentials and sums), plus one of margin.
const COEFFICIENT_LOSS: f64 = 1.0;
/// Digits the Gaussian expectation may lose in double precision: measured ≤ 7.2e-13 (2.9
/// digits; the 3001-term trapezoid sum cancels oscillating terms up to e^{2π²} ≈ 4e8 to a
/// result of size ≈ e^{π²} ≈ 2e4), plus 1.1 of margin.
const GAUSSIAN_LOSS: f64 = 4.0;

/// The largest relative defect of the shift coefficients at `r` against A(x), −B(x), C(x) with
/// x = −e^r (relative to 1 + |A| + |B| + |C|), and the same for the opposite sign convention
/// (−A, B, −C) of the negative companion.
fn coefficient_defects<T: CNum>(q: &QuantumCurve, parts: &StripParts, r: &T) -> (f64, f64) {
    let x = -r.exp();
    let k = q.coefficients(r);
    let (a, b, c) = (parts.a.eval(&x), parts.b.eval(&x), parts.c.eval(&x));
    let scale = 1.0 + a.abs_f64() + b.abs_f64() + c.abs_f64();
    let right = [
        k.down.clone() - a.clone(),
        k.centre.clone() + b.clone(),
        k.up.clone() - c.clone(),
    ];
    let wrong = [k.down + a, k.centre - b, k.up + c];
    let max = |v: [T; 3]| v.iter().map(CNum::abs_f64).fold(0.0, f64::max) / scale;
    (max(right), max(wrong))
}

#[test]
fn shift_coefficients_are_a_minus_b_and_c() {
    // With x = −e^r the Weyl-sign coefficients equal A(x), −B(x), C(x) (parity of ∂Δ, MATH §1–2),
    // for every strip family, in f64 and at 64, 128 and 256 bits. Negative companion: the
    // opposite sign convention misses by far more than the tolerance.
    for f in catalogue::all().iter().filter(|f| f.applicable) {
        let laurent = Laurent::tempered(&f.polygon());
        let parts = laurent.strip_parts().unwrap();
        let q = QuantumCurve::new(&laurent).unwrap();
        for (re, im) in [(0.3, 0.1), (-1.2, 2.0), (2.5, -0.7)] {
            let mut defects = vec![(
                DOUBLE_BITS,
                coefficient_defects(&q, &parts, &Complex64::new(re, im)),
            )];
            for bits in LADDER_BITS {
                let r = Complex::with_val(bits, (re, im));
                defects.push((bits, coefficient_defects(&q, &parts, &r)));
            }
            for (bits, (right, wrong)) in defects {
                let tol = tolerance_digits(bits, COEFFICIENT_LOSS);
                assert!(
                    right < tol,
                    "{} at r = {re} + {im}i, {bits} bits: {right:e}",
                    f.id
                );
                assert!(
                    wrong > tol,
                    "{} at r = {re} + {im}i, {bits} bits: the opposite signs fit too",
                    f.id
                );
            }
        }
    }
}

#[test]
fn gaussian_expectation_fixes_the_weyl_sign() {
    // For ψ = π^{-1/4} e^{-r²/2} (a Gaussian state, ⟨r̂²⟩ = 1/2, ⟨p̂²⟩ = ħ²/2, ⟨r̂p̂ + p̂r̂⟩ = 0),
    // ⟨e^{m₁r̂ + m₂p̂}⟩ = e^{⟨(m₁r̂+m₂p̂)²⟩/2} = e^{m₁²/4 + m₂²π²} at ħ = 2π (moment identity of
    // Gaussian states, common practice). The shift form applied by quadrature must give
    // Σ c_m e^{m₁²/4 + m₂²π²}: positive, so a wrong sign (−1)^{m₁m₂} would show.
    let psi = |z: &Complex64| (-z * z / 2.0).exp() * std::f64::consts::PI.powf(-0.25);
    for id in ["F0", "P2", "dP3", "F1"] {
        let laurent = Laurent::tempered(&catalogue::by_id(id).unwrap().polygon());
        let q = QuantumCurve::new(&laurent).unwrap();
        let a = Complex64::new(0.0, 0.0);
        let h = 0.01;
        let mut integral = Complex64::new(0.0, 0.0);
        for k in -1500..=1500 {
            let r = Complex64::new(k as f64 * h, 0.0);
            // (Ô − 0)ψ at r, times conj ψ(r).
            integral += psi(&r).conj() * q.apply(psi, &r, &a) * h;
        }
        let expected: f64 = laurent
            .terms()
            .iter()
            .map(|&([m1, m2], c)| {
                c as f64
                    * ((m1 * m1) as f64 / 4.0 + (m2 * m2) as f64 * std::f64::consts::PI.powi(2))
                        .exp()
            })
            .sum();
        assert!(
            (integral - expected).norm() < double(GAUSSIAN_LOSS) * expected,
            "{id}: {integral} vs {expected}"
        );
    }
}
