//! Growth of |ψ| near r = ±2πi (development aid): `cargo run --release --example pole_probe -- F1`.
use num_complex::Complex64;
use regwave::eigenfunction::construction::Eigenfunction;
fn main() {
    for id in ["F1", "dP3", "Q5", "T6", "Q6", "dP2*", "F0*", "F2"] {
        let l = regwave::curve::laurent::Laurent::tempered(
            &regwave::lattice::catalogue::by_id(id)
                .expect("id")
                .polygon(),
        );
        let a = regwave::curve::attractor::solve_levels(&l, 1..=1, 20).expect("a")[0]
            .modulus
            .to_f64();
        let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).expect("eig");
        let two_pi = 2.0 * std::f64::consts::PI;
        let mut line = format!("{id:5}");
        for s in [1.0, -1.0] {
            for e in [1e-1, 1e-2, 1e-3] {
                let v = eig.psi_direct(&Complex64::new(e, s * two_pi)).expect("psi");
                line += &format!(" {:9.2e}", v.norm());
            }
            line += " |";
        }
        println!("{line}  orders {:?}", eig.curve().puncture_orders());
    }
}
