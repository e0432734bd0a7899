//! Prints the reality rule k of every strip family (e^{−ikr²/(8π)}ψ real), or none:
//! `cargo run --release --example reality_rules`.
fn main() {
    for f in regwave::lattice::catalogue::all()
        .iter()
        .filter(|f| f.applicable)
    {
        let l = regwave::curve::laurent::Laurent::tempered(&f.polygon());
        println!(
            "{:<5} {:?}",
            f.id,
            regwave::eigenfunction::phase::reality_rule(&l)
        );
    }
}
