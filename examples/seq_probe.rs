//! Timing of the pieces of a high-precision profile (development aid):
//! `cargo run --release --example seq_probe -- F0 1 40`.
use regwave::eigenfn::Eigenfunction;
use rug::Complex;
use std::time::Instant;
fn main() {
    let mut args = std::env::args().skip(1);
    let id = args.next().unwrap_or_else(|| "F0".into());
    let level: usize = args.next().and_then(|s| s.parse().ok()).unwrap_or(1);
    let digits: u32 = args.next().and_then(|s| s.parse().ok()).unwrap_or(40);
    let l =
        regwave::laurent::Laurent::tempered(&regwave::catalogue::by_id(&id).expect("id").polygon());
    let t = Instant::now();
    let a = regwave::attractor::solve_levels(&l, level..=level, digits + 5).expect("a")[0]
        .modulus
        .clone();
    println!("attractor {:.2} s", t.elapsed().as_secs_f64());
    let bits =
        regwave::precision::with_guard(regwave::precision::bits_for_digits(digits as f64 + 2.0));
    let t = Instant::now();
    let eig = Eigenfunction::new(
        &l,
        Complex::with_val(bits, (&a, 0)),
        digits as f64 + 2.0,
        None,
        0.3,
    )
    .expect("eig");
    println!("construct {:.2} s", t.elapsed().as_secs_f64());
    let grid: Vec<f64> = (0..241).map(|k| -12.0 + 0.1 * k as f64).collect();
    for im in [0.0, 2.0 * std::f64::consts::PI] {
        let t = Instant::now();
        eig.psi_on_line(&grid, im).expect("line");
        println!("line im {im:.3}: {:.2} s", t.elapsed().as_secs_f64());
    }
    let t = Instant::now();
    let n = eig.normalization(0.05).expect("norm");
    println!(
        "normalization at {bits} bits: {:.2} s (range {})",
        t.elapsed().as_secs_f64(),
        n.range
    );
}
