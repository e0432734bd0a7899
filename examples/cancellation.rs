//! Digits lost to the cancellation in χ − χ∘ι̃ along R (development aid):
//! `cargo run --release --example cancellation -- F0 3`.
mod common;

use num_complex::Complex64;
use regwave::eigenfunction::construction::Eigenfunction;
fn main() {
    let (_, l, level) = common::family_and_level("F0", 1);
    let a = regwave::curve::attractor::solve_levels(&l, level..=level, 20).expect("a")[0]
        .modulus
        .to_f64();
    let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).expect("eig");
    for r in [-30.0, -20.0, -12.0, -6.0, 0.5, 6.0, 12.0, 20.0, 30.0] {
        let v = eig.sheets_at(&Complex64::new(r, 0.0)).expect("sheets");
        let lost = (v.chi.norm().max(v.chi_other.norm()) / (v.chi - v.chi_other).norm()).log10();
        println!(
            "r = {r:>6}: |chi| = {:.3e}, digits lost {lost:.1}",
            v.chi.norm()
        );
    }
}
