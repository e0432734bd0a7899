//! ν(a_n) at the independent spectrum's eigenvalues, per family (exploration of level offsets):
//! `cargo run --release --example offsets`.

use num_complex::Complex64;
use regwave::curve::laurent::Laurent;
use regwave::curve::periods;
use regwave::lattice::catalogue;
use regwave::operator::spectrum::{self, SpectrumOptions};

fn main() {
    for f in catalogue::all().iter().filter(|f| f.applicable) {
        let laurent = Laurent::tempered(&f.polygon());
        let opts = SpectrumOptions {
            levels: 0..=3,
            basis: 120,
            max_basis: 180,
            digits: 16,
            squeeze: 1.0,
        };
        let s = spectrum::solve(&laurent, &opts).expect("spectrum");
        let mut line = format!("{:<5}", f.id);
        for l in &s.levels {
            let a = l.value.to_f64();
            match periods::periods(&laurent, Complex64::new(a, 0.0), None) {
                Ok(p) => line.push_str(&format!(
                    "  a{}={:.6} nu={:.6}{:+.1e}i",
                    l.level, a, p.nu.re, p.nu.im
                )),
                Err(e) => line.push_str(&format!("  a{}={a:.4} error {e}", l.level)),
            }
        }
        println!("{line}");
    }
}
