//! Which line of a strip map fails (development aid): `cargo run --release --example strip_probe -- dP3 2`.
use num_complex::Complex64;
use regwave::eigenfn::Eigenfunction;
fn main() {
    let mut args = std::env::args().skip(1);
    let id = args.next().unwrap_or_else(|| "dP3".into());
    let level: usize = args.next().and_then(|s| s.parse().ok()).unwrap_or(2);
    let l =
        regwave::laurent::Laurent::tempered(&regwave::catalogue::by_id(&id).expect("id").polygon());
    let a = regwave::attractor::solve_levels(&l, level..=level, 20).expect("a")[0]
        .modulus
        .to_f64();
    let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), 15.0, None, 0.3).expect("eig");
    let two_pi = 2.0 * std::f64::consts::PI;
    let re: Vec<f64> = (0..=160).map(|k| -8.0 + 0.1 * k as f64).collect();
    for k in 0..=40 {
        let y = -two_pi + two_pi * k as f64 / 20.0;
        if let Err(e) = eig.psi_on_line(&re, y) {
            println!("line {k} im {y:e}: {e}");
            for &r in &re {
                if let Err(e) = eig.psi_on_line(&[r], y) {
                    println!("   r {r:e}: {e}");
                }
            }
        }
    }
}
