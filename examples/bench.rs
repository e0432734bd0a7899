//! Benchmarks of the performance targets (run with `cargo run --release --example bench`).
//! Timings are printed, not asserted: they depend on the machine.

use regwave::catalogue;
use regwave::laurent::Laurent;
use regwave::spectrum::{self, SpectrumOptions};
use std::time::Instant;

fn main() {
    println!("target: spectrum with basis 200 under 2 s per family (levels 0..5)");
    println!("  (each row: `spectrum --basis 200`, i.e. N = 200 and its 3N/2 = 300 convergence check)");
    let mut worst: f64 = 0.0;
    for f in catalogue::all().iter().filter(|f| f.applicable) {
        let laurent = Laurent::tempered(&f.polygon());
        let t = Instant::now();
        // basis 200, the ladder stopped right after it: solves N = 200 and 300.
        let opts = SpectrumOptions { levels: 0..=5, basis: 200, max_basis: 300, digits: 16, squeeze: 1.0 };
        let s = spectrum::solve(&laurent, &opts).expect("spectrum");
        let secs = t.elapsed().as_secs_f64();
        worst = worst.max(secs);
        println!(
            "  {:<5} bases {:?} real {:<5} {:>6.2} s  a0 = {:.15}  (est. error {:.1e})",
            f.id,
            s.bases,
            s.real_matrix,
            secs,
            s.levels[0].value.to_f64(),
            s.levels[0].error_estimate
        );
    }
    println!("  worst {worst:.2} s (N = 200 and the 3N/2 = 300 check together)");

    println!("target: [phi^n]_0 for n <= 2000 under 0.5 s");
    for id in ["F0", "P2", "dP3", "F0*"] {
        let laurent = Laurent::tempered(&catalogue::by_id(id).expect("id").polygon());
        let t = Instant::now();
        let terms = laurent.constant_terms(2000).expect("constant terms");
        println!("  {:<5} {:>6.3} s  ({} digits at n = 2000)", id, t.elapsed().as_secs_f64(), terms[2000].to_string().len());
    }
}
