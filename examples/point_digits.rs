//! Per-point digits of ψ on R far out (development aid for the per-point digit estimate of
//! `precision::point_loss_digits` and the grid reach of `eigenfunction::profile`):
//! `cargo run --release --example point_digits -- F0 0 [bits] [r_max] [step]`.
//!
//! Prints, per point r of 0, step, …, r_max: log₁₀|ψ| and the digits lost relative to |ψ| at the
//! given working precision (53: double), and the seconds the line took.
mod common;

use num_complex::Complex64;
use regwave::eigenfunction::construction::Eigenfunction;
use regwave::eigenfunction::profile::BASE_RE;
use regwave::numerics::complex::CNum;
use rug::Complex;
use std::time::Instant;

fn print<T: CNum>(eig: &Eigenfunction<T>, points: &[T], bits: u32) {
    let start = Instant::now();
    let line = eig.psi_on_line_at(points, 0.0).expect("line");
    println!("bits {bits}: {:.2} s", start.elapsed().as_secs_f64());
    for (k, p) in points.iter().enumerate() {
        let v = line.values[k].as_ref();
        println!(
            "r = {:8.1}  log10|psi| = {:10.2}  loss = {:8.2}",
            p.re_f64(),
            v.map(|v| v.log10_abs()).unwrap_or(f64::NAN),
            line.point_loss[k].unwrap_or(f64::NAN)
        );
    }
}

fn main() {
    let (_, l, level) = common::family_and_level("F0", 0);
    let args: Vec<String> = std::env::args().collect();
    let bits: u32 = args.get(3).and_then(|s| s.parse().ok()).unwrap_or(53);
    let r_max: f64 = args.get(4).and_then(|s| s.parse().ok()).unwrap_or(400.0);
    let step: f64 = args.get(5).and_then(|s| s.parse().ok()).unwrap_or(50.0);
    let n = (r_max / step).round() as usize;
    let grid: Vec<f64> = (0..=n).map(|k| k as f64 * step).collect();
    let digits = (bits as f64 / 3.3).max(20.0) as u32;
    let a = regwave::curve::attractor::solve_levels(&l, level..=level, digits).expect("attractor")
        [0]
    .modulus
    .clone();
    if bits == 53 {
        let eig = Eigenfunction::new(&l, Complex64::new(a.to_f64(), 0.0), None, BASE_RE).unwrap();
        let pts: Vec<Complex64> = grid.iter().map(|&r| Complex64::new(r, 0.0)).collect();
        print(&eig, &pts, bits);
    } else {
        let eig = Eigenfunction::new(&l, Complex::with_val(bits, (&a, 0)), None, BASE_RE).unwrap();
        let pts: Vec<Complex> = grid
            .iter()
            .map(|&r| Complex::with_val(bits, (r, 0)))
            .collect();
        print(&eig, &pts, bits);
    }
}
