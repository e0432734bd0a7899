//! Attractor moduli: against the checked values, the independent spectrum, and precision.

use regwave::attractor;
use regwave::laurent::Laurent;
use regwave::selection;
use rug::Float;

fn family(id: &str) -> Laurent {
    selection::resolve(Some(id), None, None).unwrap().laurent
}

fn assert_prefix(value: &Float, reference: &str, digits: usize) {
    let s = value.to_string_radix(10, Some(digits + 6));
    let want: String = reference.chars().filter(|c| c.is_ascii_digit()).take(digits).collect();
    let got: String = s.chars().filter(|c| c.is_ascii_digit()).take(digits).collect();
    assert_eq!(got, want, "{s} vs {reference}");
}

#[test]
fn checked_values_at_thirty_digits() {
    // MATH.md §4 checked values (computed independently of this project, 24 digits shown).
    let t = std::time::Instant::now();
    let cases = [
        ("F0", ["17.846643118044799282389997", "70.428043469428353462422178"]),
        ("P2", ["12.970039821793337437623954", "50.310469082394391151368474"]),
        ("dP3", ["36.512388457960298416625508", "167.892587542034465264653056"]),
    ];
    for (id, refs) in cases {
        let at = attractor::solve_levels(&family(id), 0..=1, 30).unwrap();
        for (a, r) in at.iter().zip(refs) {
            assert!(a.digits >= 28, "{id} level {}: {} digits", a.level, a.digits);
            assert_prefix(&a.modulus, r, 24);
        }
    }
    eprintln!("{:?}", t.elapsed());
}

