//! Wall time of each audit stage (development aid): `cargo run --release --example audit_stages -- F0 4 16`.
use regwave::checks::audit::{self, AuditOptions};
use std::time::Instant;
fn main() {
    let mut args = std::env::args().skip(1);
    let id = args.next().unwrap_or_else(|| "F0".into());
    let top: usize = args.next().and_then(|s| s.parse().ok()).unwrap_or(4);
    let low: usize = std::env::var("AUDIT_LOW")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(0);
    let digits: u32 = args.next().and_then(|s| s.parse().ok()).unwrap_or(16);
    let l = regwave::curve::laurent::Laurent::tempered(
        &regwave::lattice::catalogue::by_id(&id)
            .expect("id")
            .polygon(),
    );
    let start = Instant::now();
    let options = AuditOptions {
        levels: low..=top,
        digits,
        grid: regwave::Grid::new(-12.0, 12.0, 241),
        perturbation: 1e-6,
        spectrum_basis: 200,
        spectrum_max_basis: 300,
    };
    let tick = |p: &regwave::progress::Progress| {
        eprintln!("{:7.2} s  {}", start.elapsed().as_secs_f64(), p.stage)
    };
    let a = audit::run(&l, &options, &tick).expect("audit");
    for lv in &a.levels {
        println!(
            "{id} level {} residual {:.1e} bits {} zeros {} unmatched {}",
            lv.level,
            lv.profile
                .residual
                .as_ref()
                .and_then(|r| r.max)
                .unwrap_or(f64::NAN),
            lv.profile.precision_bits,
            lv.zeros.count,
            a.unmatched.len()
        );
    }
}
