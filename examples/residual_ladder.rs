//! Eigen-equation residual at one point for several working precisions (development aid):
//! `cargo run --release --example residual_ladder -- F0 0`.
use regwave::eigenfn::Eigenfunction;
use regwave::numeric::CNum;
use regwave::operator::QuantumCurve;
use rug::Complex;
fn main() {
    let id = std::env::args().nth(1).unwrap_or_else(|| "F0".into());
    let level: usize = std::env::args().nth(2).and_then(|s| s.parse().ok()).unwrap_or(0);
    let l = regwave::laurent::Laurent::tempered(&regwave::catalogue::by_id(&id).expect("id").polygon());
    let a = regwave::attractor::solve_levels(&l, level..=level, 80).expect("a")[0].modulus.clone();
    let q = QuantumCurve::new(&l).expect("q");
    for digits in [20u32, 30, 40, 60] {
        let bits = regwave::precision::with_guard(regwave::precision::bits_for_digits(digits as f64));
        let ac = Complex::with_val(bits, (&a, 0));
        let eig = Eigenfunction::new(&l, ac.clone(), digits as f64, None, 0.3).expect("eig");
        for r in [0.37, 1.3] {
            let z = Complex::with_val(bits, r);
            let res = q.apply(|w: &Complex| eig.psi(w).expect("psi"), &z, &ac);
            let here = eig.psi(&z).expect("psi");
            let line = eig.psi_on_line(&[r], 0.0).expect("line")[0].clone().unwrap();
            println!("digits {digits} r {r}: residual/|psi| {:.2e}  line vs point {:.2e}", res.abs_f64() / here.abs_f64(), (line - here.clone()).abs_f64() / here.abs_f64());
        }
    }
}
