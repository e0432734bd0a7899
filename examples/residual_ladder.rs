//! Eigen-equation residual at a few points for several working precisions, pointwise and by
//! spine marching (development aid): `cargo run --release --example residual_ladder -- F0 5`.
mod common;

use regwave::eigenfunction::construction::Eigenfunction;
use regwave::numerics::complex::CNum;
use regwave::operator::quantum_curve::QuantumCurve;
use rug::Complex;
fn main() {
    let (_, l, level) = common::family_and_level("F0", 0);
    let a = regwave::curve::attractor::solve_levels(&l, level..=level, 80).expect("a")[0]
        .modulus
        .clone();
    let q = QuantumCurve::new(&l).expect("q");
    let two_pi = 2.0 * std::f64::consts::PI;
    for digits in [20u32, 40] {
        let bits =
            regwave::precision::with_guard(regwave::precision::bits_for_digits(digits as f64));
        let ac = Complex::with_val(bits, (&a, 0));
        let eig = Eigenfunction::new(&l, ac.clone(), None, 0.3).expect("eig");
        let grid = [0.37, 7.6, 10.7];
        let main = eig.psi_on_line(&grid, 0.0).expect("line");
        let up = eig.psi_on_line(&grid, two_pi).expect("line");
        let down = eig.psi_on_line(&grid, -two_pi).expect("line");
        for (k, &r) in grid.iter().enumerate() {
            let z = Complex::with_val(bits, r);
            let point = q.apply(|w: &Complex| eig.psi(w).expect("psi"), &z, &ac);
            let c = q.coefficients(&z);
            let (m, u, d) = (
                main[k].clone().unwrap(),
                up[k].clone().unwrap(),
                down[k].clone().unwrap(),
            );
            let line = c.down * d.clone() + (c.centre - ac.clone()) * m.clone() + c.up * u.clone();
            let pd = eig
                .psi(&(z.clone() - z.int_like(2) * z.pi_like() * z.i_like()))
                .expect("psi");
            println!(
                "digits {digits} r {r}: pointwise {:.2e}  lines {:.2e}  (down line vs point {:.2e})",
                point.abs_f64() / m.abs_f64(),
                line.abs_f64() / m.abs_f64(),
                (d.clone() - pd.clone()).abs_f64() / pd.abs_f64()
            );
        }
    }
}
