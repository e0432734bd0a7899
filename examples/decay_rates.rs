//! The decay rates κ of |ψ| ~ e^{−κ|r|} on R for every strip family, from the envelope fit of
//! `Eigenfunction::normalization` (the decay table of docs/MATHEMATICS.md §2):
//! `cargo run --release --example decay_rates -- 1` (level; default 1).
use num_complex::Complex64;
use regwave::eigenfunction::construction::Eigenfunction;
use std::time::Instant;

fn main() {
    let level: usize = std::env::args()
        .nth(1)
        .and_then(|s| s.parse().ok())
        .unwrap_or(1);
    println!("level {level}, double precision, step 0.05");
    println!("family  left κ (p)        right κ (p)       range       tail      time");
    for f in regwave::lattice::catalogue::all()
        .iter()
        .filter(|f| f.applicable)
    {
        let l = regwave::curve::laurent::Laurent::tempered(&f.polygon());
        let a = regwave::curve::attractor::solve_levels(&l, level..=level, 20).expect("attractor")
            [0]
        .modulus
        .to_f64();
        let t = Instant::now();
        let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).expect("eigenfunction");
        let n = eig.normalization(0.05).expect("normalization");
        println!(
            "{:<6}  {:.3} ({:+.2})   {:.3} ({:+.2})   [−{}, {}]   {:.1e}   {:.2} s",
            f.id,
            n.decay[0],
            n.decay_power[0],
            n.decay[1],
            n.decay_power[1],
            n.range_ends[0],
            n.range_ends[1],
            n.tail,
            t.elapsed().as_secs_f64()
        );
    }
}
