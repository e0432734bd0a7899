//! Development probe: the single-valuedness figures of ψ (route dependence, Cauchy defect) at
//! attractor moduli of higher levels, for every family: `route_probe DIGITS LEVEL...`.
use regwave::checks::single_valuedness::{cauchy_defect, route_dependence};
use regwave::curve::attractor;
use regwave::eigenfunction::construction::Eigenfunction;
use regwave::eigenfunction::profile::BASE_RE;
use rug::Complex;

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let digits: u32 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(30);
    let levels: Vec<usize> = args[2..].iter().filter_map(|s| s.parse().ok()).collect();
    for fam in regwave::lattice::catalogue::all()
        .iter()
        .filter(|f| f.applicable)
    {
        let l = regwave::curve::laurent::Laurent::tempered(&fam.polygon());
        for &n in &levels {
            let at = attractor::solve_levels(&l, n..=n, digits).unwrap();
            let a = &at[0].modulus;
            let bits = a.prec();
            let eig =
                Eigenfunction::new(&l, Complex::with_val(bits, (a, 0)), None, BASE_RE).unwrap();
            let r = route_dependence(&l, &eig).map_or(f64::NAN, |v| v);
            let c = cauchy_defect(&eig).map_or(f64::NAN, |v| v);
            println!(
                "{:5} level {n:3}: a = {:.4e}, bits {bits}, route {r:.1e}, Cauchy {c:.1e}",
                fam.id,
                a.to_f64()
            );
        }
    }
}
