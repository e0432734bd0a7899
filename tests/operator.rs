//! The ħ = 2π shift form of the quantum curve.

use num_complex::Complex64;
use regwave::curve::laurent::Laurent;
use regwave::lattice::catalogue;
use regwave::numerics::complex::CNum;
use regwave::operator::quantum_curve::QuantumCurve;
use rug::Complex;

#[test]
fn shift_coefficients_are_a_minus_b_and_c() {
    // With x = −e^r the Weyl-sign coefficients equal A(x), −B(x), C(x) (parity of ∂Δ, MATH §1–2),
    // for every strip family, in f64 and at 200 bits.
    for f in catalogue::all().iter().filter(|f| f.applicable) {
        let laurent = Laurent::tempered(&f.polygon());
        let parts = laurent.strip_parts().unwrap();
        let q = QuantumCurve::new(&laurent).unwrap();
        for r in [
            Complex64::new(0.3, 0.1),
            Complex64::new(-1.2, 2.0),
            Complex64::new(2.5, -0.7),
        ] {
            let x = -r.exp();
            let k = q.coefficients(&r);
            let scale =
                1.0 + parts.a.eval(&x).norm() + parts.b.eval(&x).norm() + parts.c.eval(&x).norm();
            assert!(
                (k.down - parts.a.eval(&x)).norm() < 1e-13 * scale,
                "{} A",
                f.id
            );
            assert!(
                (k.centre + parts.b.eval(&x)).norm() < 1e-13 * scale,
                "{} B",
                f.id
            );
            assert!(
                (k.up - parts.c.eval(&x)).norm() < 1e-13 * scale,
                "{} C",
                f.id
            );
            let rm = Complex::with_val(200, (r.re, r.im));
            let xm = -(rm.clone().exp());
            let km = q.coefficients(&rm);
            let d = km.down - parts.a.eval(&xm);
            assert!(d.abs_f64() < 1e-55 * scale, "{} A at 200 bits", f.id);
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
            (integral - expected).norm() < 1e-9 * expected,
            "{id}: {integral} vs {expected}"
        );
    }
}
