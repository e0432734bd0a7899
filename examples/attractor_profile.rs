//! Timing of the attractor solve of one family (development aid):
//! `cargo run --release --example attractor_profile -- dP3 30`.
use regwave::curve::attractor;
use regwave::curve::laurent::Laurent;
use regwave::lattice::catalogue;
use std::time::Instant;

fn main() {
    let id = std::env::args().nth(1).unwrap_or_else(|| "dP3".into());
    let digits: u32 = std::env::args()
        .nth(2)
        .and_then(|s| s.parse().ok())
        .unwrap_or(30);
    let l = Laurent::tempered(&catalogue::by_id(&id).expect("id").polygon());
    let t = Instant::now();
    let at = attractor::solve_levels(&l, 0..=9, digits).expect("solve");
    println!(
        "{id}: 10 levels at {digits} digits in {:.2} s (min confirmed digits {})",
        t.elapsed().as_secs_f64(),
        at.iter().map(|a| a.digits).min().unwrap_or(0)
    );
}
