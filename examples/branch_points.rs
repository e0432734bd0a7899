//! Prints the singular points of the cover over the z-plane (Im z ∈ (−π, π]) for every strip
//! family at a given modulus: `cargo run --release --example branch_points -- 40`.

use num_complex::Complex64;
use regwave::curve::cover::{Curve, SingularKind};
use regwave::curve::laurent::Laurent;
use regwave::lattice::catalogue;

fn main() {
    let a: f64 = std::env::args()
        .nth(1)
        .and_then(|s| s.parse().ok())
        .unwrap_or(40.0);
    for f in catalogue::all().iter().filter(|f| f.applicable) {
        let laurent = Laurent::tempered(&f.polygon());
        let curve = Curve::new(&laurent, Complex64::new(a, 0.0)).expect("curve");
        let parts = laurent.strip_parts().expect("strip");
        println!(
            "{:<5} A = {:<14} B = {:<22} C = {}",
            f.id,
            parts.a.render("x"),
            parts.b.render("x"),
            parts.c.render("x")
        );
        for s in curve.singular_points().expect("singular points") {
            let kind = match s.kind {
                SingularKind::Branch => "branch",
                SingularKind::Puncture => "puncture",
            };
            println!("        {kind:<8} z = {:>9.5} {:+9.5}i", s.z.re, s.z.im);
        }
    }
}
