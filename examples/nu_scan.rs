//! ν(a) from just above the spectral threshold (development aid):
//! `cargo run --release --example nu_scan -- F0`.
use regwave::curve::attractor::HigherNormalFunction;
fn main() {
    let id = std::env::args().nth(1).unwrap_or_else(|| "F0".into());
    let l = regwave::curve::laurent::Laurent::tempered(
        &regwave::lattice::catalogue::by_id(&id)
            .expect("id")
            .polygon(),
    );
    let (_, threshold) = l.classical_minimum();
    let mut fam = HigherNormalFunction::new(&l).expect("family");
    for eps in [1e-6, 1e-4, 1e-3, 1e-2, 0.1, 0.5, 1.0, 2.0, 4.0] {
        let a: f64 = threshold * (1.0 + eps);
        match fam.nu_f64(a.ln()) {
            Ok((nu, d)) => println!("{id} a = {a:.6} nu = {nu:.9} dnu/dlog a = {d:.4}"),
            Err(e) => println!("{id} a = {a:.6} error {e}"),
        }
    }
}
