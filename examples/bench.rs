//! Benchmarks of the performance targets (run with `cargo run --release --example bench`).
//! Timings are printed, not asserted: they depend on the machine.

use rayon::prelude::*;
use regwave::curve::attractor;
use regwave::curve::laurent::Laurent;
use regwave::lattice::catalogue;
use regwave::operator::oscillator;
use regwave::operator::spectrum::{self, SpectrumOptions};
use std::time::Instant;

fn main() {
    println!("target: spectrum with basis 200 under 2 s per family (levels 0..5)");
    println!(
        "  columns: one N = 200 solve | `spectrum --basis 200` (N = 200 plus its 3N/2 = 300 check)"
    );
    let (mut worst_single, mut worst_pair): (f64, f64) = (0.0, 0.0);
    for f in catalogue::all().iter().filter(|f| f.applicable) {
        let laurent = Laurent::tempered(&f.polygon());
        let frame = oscillator::frame(&laurent, 1.0);
        let t = Instant::now();
        let single =
            spectrum::truncated_eigenvalues(&laurent, &frame, 200, 6, 16).expect("spectrum");
        let single_s = t.elapsed().as_secs_f64();
        let t = Instant::now();
        let opts = SpectrumOptions {
            levels: 0..=5,
            basis: 200,
            max_basis: 300,
            digits: 16,
            squeeze: 1.0,
        };
        let s = spectrum::solve(&laurent, &opts).expect("spectrum");
        let pair_s = t.elapsed().as_secs_f64();
        worst_single = worst_single.max(single_s);
        worst_pair = worst_pair.max(pair_s);
        println!(
            "  {:<5} real {:<5} {:>6.2} s | {:>6.2} s  a0 = {:.15} (N=200: {:.15}, est. error {:.1e})",
            f.id,
            s.real_matrix,
            single_s,
            pair_s,
            s.levels[0].value.to_f64(),
            single[0].to_f64(),
            s.levels[0].error_estimate
        );
    }
    println!("  worst: {worst_single:.2} s (N = 200) | {worst_pair:.2} s (with the check)");

    println!("target: attractor moduli, levels 0..9 of all 15 families at 30 digits, under 1 s total on 2 cores");
    let t = Instant::now();
    let fams: Vec<&catalogue::Family> = catalogue::all().iter().filter(|f| f.applicable).collect();
    let results: Vec<(String, f64, u32)> = fams
        .par_iter()
        .map(|f| {
            let t = Instant::now();
            let laurent = Laurent::tempered(&f.polygon());
            let at = attractor::solve_levels(&laurent, 0..=9, 30).expect("attractors");
            let min_digits = at.iter().map(|a| a.digits).min().unwrap_or(0);
            (f.id.to_string(), t.elapsed().as_secs_f64(), min_digits)
        })
        .collect();
    for (id, secs, d) in &results {
        println!("  {id:<5} {secs:>6.2} s  (all 10 levels confirmed to >= {d} digits)");
    }
    println!("  total {:.2} s wall clock", t.elapsed().as_secs_f64());

    println!("target: attractor moduli, levels 0..1000 of one family at 100 digits, under 60 s");
    for id in ["F0", "P2", "dP3"] {
        let laurent = Laurent::tempered(&catalogue::by_id(id).expect("id").polygon());
        let t = Instant::now();
        let at = attractor::solve_levels(&laurent, 0..=1000, 100).expect("attractors");
        let min_digits = at.iter().map(|a| a.digits).min().unwrap_or(0);
        println!(
            "  {id:<5} {:.2} s (1001 levels, all confirmed to >= {min_digits} digits)",
            t.elapsed().as_secs_f64()
        );
    }
    println!(
        "target: one attractor modulus at 60 digits (F0 level 0), at most 40 ms as a whole process"
    );
    println!(
        "  (measure the process: `time regwave attractors --family F0 --levels 0..0 --digits 60`)"
    );

    println!("target: one periods call at 50 digits under 1 s");
    for id in ["F0", "P2", "dP3", "Q7"] {
        let laurent = Laurent::tempered(&catalogue::by_id(id).expect("id").polygon());
        let t = Instant::now();
        let bits = regwave::precision::with_guard(regwave::precision::bits_for_digits(50.0));
        let a = rug::Complex::with_val(bits, 200);
        let c = regwave::curve::series_periods::compare(&laurent, &a).expect("periods");
        println!(
            "  {id:<5} a = 200: {:.3} s (series/path agreement {:.1} digits)",
            t.elapsed().as_secs_f64(),
            c.agreement.map_or(0.0, |g| g.worst())
        );
    }

    println!("target: F0 level 0, psi at 2,000 points of R in double precision with the residual check, under 0.5 s");
    {
        use num_complex::Complex64;
        use regwave::eigenfunction::construction::Eigenfunction;
        let laurent = Laurent::tempered(&catalogue::by_id("F0").expect("id").polygon());
        let a = attractor::solve_levels(&laurent, 0..=0, 20).expect("attractor")[0]
            .modulus
            .to_f64();
        let t = Instant::now();
        let eig =
            Eigenfunction::new(&laurent, Complex64::new(a, 0.0), None, 0.3).expect("eigenfunction");
        let grid: Vec<f64> = (0..2000)
            .map(|k| -10.0 + 20.0 * k as f64 / 1999.0)
            .collect();
        let two_pi = 2.0 * std::f64::consts::PI;
        let (main, (up, down)) = rayon::join(
            || eig.psi_on_line(&grid, 0.0).expect("line"),
            || {
                rayon::join(
                    || eig.psi_on_line(&grid, two_pi).expect("line"),
                    || eig.psi_on_line(&grid, -two_pi).expect("line"),
                )
            },
        );
        let q = regwave::operator::quantum_curve::QuantumCurve::new(&laurent).expect("operator");
        let scale = main.iter().flatten().map(|v| v.norm()).fold(0.0, f64::max);
        let mut worst: f64 = 0.0;
        for k in 0..grid.len() {
            if let (Some(m), Some(u), Some(d)) = (main[k], up[k], down[k]) {
                let c = q.coefficients(&Complex64::new(grid[k], 0.0));
                worst = worst.max((c.down * d + (c.centre - a) * m + c.up * u).norm() / scale);
            }
        }
        println!(
            "  {:.3} s for 3 x 2,000 values, residual max {worst:.1e}",
            t.elapsed().as_secs_f64()
        );
        println!("target: time per point independent of the distance from the base point (ratio within 1.5)");
        let near: Vec<f64> = (0..200).map(|k| -2.0 + 4.0 * k as f64 / 199.0).collect();
        let far: Vec<f64> = (0..200).map(|k| -20.0 + 4.0 * k as f64 / 199.0).collect();
        let t = Instant::now();
        let _ = eig.psi_on_line(&near, 0.0).expect("line");
        let t_near = t.elapsed().as_secs_f64();
        let t = Instant::now();
        let _ = eig.psi_on_line(&far, 0.0).expect("line");
        let t_far = t.elapsed().as_secs_f64();
        println!(
            "  [-2,2]: {t_near:.3} s, [-20,-16]: {t_far:.3} s, ratio {:.2}",
            t_far / t_near
        );
        println!("target: 200 points at 50 digits under 20 s");
        let bits = regwave::precision::with_guard(regwave::precision::bits_for_digits(50.0));
        let a50 = attractor::solve_levels(&laurent, 0..=0, 50).expect("attractor")[0]
            .modulus
            .clone();
        let t = Instant::now();
        let eig = Eigenfunction::new(&laurent, rug::Complex::with_val(bits, (&a50, 0)), None, 0.3)
            .expect("eigenfunction");
        let _ = eig.psi_on_line(&near, 0.0).expect("line");
        println!("  {:.2} s", t.elapsed().as_secs_f64());
    }

    println!("target: [phi^n]_0 for n <= 2000 under 0.5 s");
    for id in ["F0", "P2", "dP3", "F0*"] {
        let laurent = Laurent::tempered(&catalogue::by_id(id).expect("id").polygon());
        let t = Instant::now();
        let terms = laurent.constant_terms(2000).expect("constant terms");
        let longest = terms.iter().map(|u| u.to_string().len()).max().unwrap_or(0);
        println!(
            "  {:<5} {:>6.3} s  (largest value has {} digits)",
            id,
            t.elapsed().as_secs_f64(),
            longest
        );
    }
}
