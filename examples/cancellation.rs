//! Digits lost to the cancellation in χ − χ∘ι̃ along R (development aid):
//! `cargo run --release --example cancellation -- F0 3`.
use num_complex::Complex64;
use regwave::eigenfn::Eigenfunction;
fn main() {
    let id = std::env::args().nth(1).unwrap_or_else(|| "F0".into());
    let level: usize = std::env::args()
        .nth(2)
        .and_then(|s| s.parse().ok())
        .unwrap_or(1);
    let l =
        regwave::laurent::Laurent::tempered(&regwave::catalogue::by_id(&id).expect("id").polygon());
    let a = regwave::attractor::solve_levels(&l, level..=level, 20).expect("a")[0]
        .modulus
        .to_f64();
    let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), 15.0, None, 0.3).expect("eig");
    for r in [-30.0, -20.0, -12.0, -6.0, 0.5, 6.0, 12.0, 20.0, 30.0] {
        let v = eig.sheets_at(&Complex64::new(r, 0.0)).expect("sheets");
        let lost = (v.chi.norm().max(v.chi_other.norm()) / (v.chi - v.chi_other).norm()).log10();
        println!(
            "r = {r:>6}: |chi| = {:.3e}, digits lost {lost:.1}",
            v.chi.norm()
        );
    }
}
