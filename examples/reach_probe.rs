//! The reach of a profile on every family (development aid for `precision::DOUBLE_RANGE`,
//! `precision::REACH` and `eigenfunction::profile::reach`):
//! `cargo run --release --example reach_probe -- [r] [families…]`.
//!
//! For each family (default: all applicable ones), level 0 on the grid −r, 0, r (default
//! r = 250): the profile at 16 digits (double precision, far points raised) and at 40 digits,
//! each compared point by point with an independent run at 60 digits (its own attractor solve
//! and precision plan). Prints per end the size log₁₀|ψ/ψ_peak|, the digits each run claims
//! (relative to the value's own size), the digits it agrees on, the points raised, without a
//! value or taken for zeros, and the seconds.

use num_complex::Complex64;
use regwave::eigenfunction::profile::Profile;
use regwave::lattice::catalogue;
use regwave::{build_profile, Grid, ProfileOptions, Target};
use std::time::Instant;

fn run(
    l: &regwave::curve::laurent::Laurent,
    grid: &str,
    digits: u32,
) -> (Result<Profile, String>, f64) {
    let options = ProfileOptions {
        grid: Grid::parse(grid).unwrap(),
        strip: false,
        digits,
        allow_non_attractor: false,
    };
    let start = Instant::now();
    let p = build_profile(l, &Target::Level(0), &options).map_err(|e| e.to_string());
    (p, start.elapsed().as_secs_f64())
}

fn agreement(v: Complex64, reference: Complex64) -> f64 {
    -((v - reference).norm() / reference.norm()).log10()
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let r: f64 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(250.0);
    let chosen: Vec<String> = args.iter().skip(2).cloned().collect();
    let grid = format!("{}:{}:3", -r, r);
    for family in catalogue::all() {
        if !family.applicable || (!chosen.is_empty() && !chosen.iter().any(|c| c == family.id)) {
            continue;
        }
        let l = regwave::curve::laurent::Laurent::tempered(&family.polygon());
        let (reference, t_ref) = run(&l, &grid, 60);
        let reference = match reference {
            Ok(p) => p,
            Err(e) => {
                println!("{:4}  reference at 60 digits: {e}", family.id);
                continue;
            }
        };
        let peak = reference.real_line[1].map_or(f64::NAN, |v| v.norm());
        for digits in [16, 40] {
            let (p, t) = run(&l, &grid, digits);
            let p = match p {
                Ok(p) => p,
                Err(e) => {
                    println!("{:4}  {digits:2} digits: {e}", family.id);
                    continue;
                }
            };
            let ends: Vec<String> = [0, 2]
                .iter()
                .map(|&k| {
                    let size =
                        reference.real_line[k].map_or(f64::NAN, |v| (v.norm() / peak).log10());
                    match (p.real_line[k], reference.real_line[k]) {
                        (Some(v), Some(w)) => format!(
                            "r={:+}: size {size:7.1}, claims {:5.1}, agrees {:5.1}",
                            p.grid[k],
                            p.point_digits.relative[0][k].unwrap_or(f64::NAN),
                            agreement(v, w).min(99.0)
                        ),
                        _ => format!("r={:+}: size {size:7.1}, no value", p.grid[k]),
                    }
                })
                .collect();
            println!(
                "{:4}  {digits:2} digits ({} bits): {}; raised {}, without value {}, zeros {}; {t:.1} s (reference {t_ref:.1} s)",
                family.id,
                p.precision_bits,
                ends.join("; "),
                p.point_digits.raised.len(),
                p.point_digits.dropped.len(),
                p.point_digits.zeros.len()
            );
        }
    }
}
