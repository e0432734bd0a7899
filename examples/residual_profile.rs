//! Where the eigen-equation residual of a profile is largest (development aid):
//! `cargo run --release --example residual_profile -- T6 2 16`.
mod common;

use regwave::eigenfunction::profile::{self, ProfileOptions, Target};
fn main() {
    let (id, l, level) = common::family_and_level("T6", 2);
    let digits: u32 = std::env::args()
        .nth(3)
        .and_then(|s| s.parse().ok())
        .unwrap_or(16);
    let grid = regwave::Grid::new(-12.0, 12.0, 241);
    let p = profile::build(
        &l,
        &Target::Level(level),
        &ProfileOptions {
            grid,
            strip: true,
            digits,
            allow_non_attractor: false,
        },
    )
    .expect("profile");
    let r = p.residual.expect("residual");
    let mut worst: Vec<(f64, f64)> = p
        .grid
        .iter()
        .zip(&r.per_point)
        .filter_map(|(&x, v)| v.map(|v| (x, v)))
        .collect();
    worst.sort_by(|a, b| b.1.total_cmp(&a.1));
    println!(
        "{id} level {level}: bits {} lambda {:.3e} max {:.2e}",
        p.precision_bits,
        regwave::numerics::complex::CNum::abs_f64(&p.lambda),
        r.max.unwrap_or(f64::NAN)
    );
    for (x, v) in worst.iter().take(8) {
        println!("  r = {x:6.2}  residual {v:.2e}");
    }
}
