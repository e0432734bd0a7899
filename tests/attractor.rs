//! Attractor moduli: against the checked values, the independent spectrum, and precision.

use regwave::curve::attractor;
use regwave::curve::laurent::Laurent;
use regwave::input::selection;
use rug::Float;

fn family(id: &str) -> Laurent {
    selection::resolve(Some(id), None, None).unwrap().laurent
}

fn assert_prefix(value: &Float, reference: &str, digits: usize) {
    let s = value.to_string_radix(10, Some(digits + 6));
    let want: String = reference
        .chars()
        .filter(|c| c.is_ascii_digit())
        .take(digits)
        .collect();
    let got: String = s
        .chars()
        .filter(|c| c.is_ascii_digit())
        .take(digits)
        .collect();
    assert_eq!(got, want, "{s} vs {reference}");
}

#[test]
fn checked_values_at_thirty_digits() {
    // docs/MATHEMATICS.md §4 checked values (computed independently of this project, 24 digits shown).
    let t = std::time::Instant::now();
    let cases = [
        (
            "F0",
            ["17.846643118044799282389997", "70.428043469428353462422178"],
        ),
        (
            "P2",
            ["12.970039821793337437623954", "50.310469082394391151368474"],
        ),
        (
            "dP3",
            [
                "36.512388457960298416625508",
                "167.892587542034465264653056",
            ],
        ),
    ];
    for (id, refs) in cases {
        let at = attractor::solve_levels(&family(id), 0..=1, 30).unwrap();
        for (a, r) in at.iter().zip(refs) {
            assert!(
                a.digits >= 28,
                "{id} level {}: {} digits",
                a.level,
                a.digits
            );
            assert_prefix(&a.modulus, r, 24);
        }
    }
    eprintln!("{:?}", t.elapsed());
}

#[test]
fn attractor_moduli_are_the_independent_eigenvalues_for_every_family() {
    // Levels 0..5 of all 15 families: ν(a_n) = n + 1 at the harmonic-oscillator eigenvalues, to
    // the digits the spectrum supports (≥ 12 for F0, P2, dP3: docs/MATHEMATICS.md §4 / issue requirement).
    use regwave::lattice::catalogue;
    use regwave::operator::spectrum::{self, SpectrumOptions};
    for f in catalogue::all().iter().filter(|f| f.applicable) {
        let l = family(f.id);
        let main = ["F0", "P2", "dP3"].contains(&f.id);
        let opts = SpectrumOptions {
            levels: 0..=5,
            basis: 200,
            max_basis: if main { 675 } else { 450 },
            digits: 16,
            squeeze: 1.0,
        };
        let spec = spectrum::solve(&l, &opts).unwrap();
        let at = attractor::solve_levels(&l, 0..=5, 20).unwrap();
        for (s, a) in spec.levels.iter().zip(&at) {
            let diff = Float::with_val(128, &s.value - &a.modulus).to_f64().abs();
            let rel = diff / a.modulus.to_f64();
            assert!(
                diff <= 10.0 * s.error_estimate + 1e-15 * a.modulus.to_f64(),
                "{} level {}: attractor {} vs spectrum {} (estimate {:e})",
                f.id,
                s.level,
                a.modulus,
                s.value,
                s.error_estimate
            );
            if main {
                assert!(
                    rel < 1e-12,
                    "{} level {}: only {:.1} digits",
                    f.id,
                    s.level,
                    -rel.log10()
                );
            }
        }
    }
}

#[test]
fn forty_digits_survive_doubling_the_working_precision() {
    // F0 and P2, levels 0..3 at 40 digits: the moduli change by less than 1e-38 (relative) when
    // the working precision is doubled.
    use regwave::precision::{bits_for_digits, with_guard};
    for id in ["F0", "P2"] {
        let l = family(id);
        let bits = with_guard(bits_for_digits(40.0));
        let base = attractor::solve_levels_at(&l, 0..=3, 40, bits).unwrap();
        let doubled = attractor::solve_levels_at(&l, 0..=3, 40, 2 * bits).unwrap();
        for (x, y) in base.iter().zip(&doubled) {
            let rel = (Float::with_val(2 * bits, &x.modulus - &y.modulus) / &y.modulus)
                .to_f64()
                .abs();
            assert!(rel < 1e-38, "{id} level {}: {rel:e}", x.level);
            assert!(
                x.digits >= 39,
                "{id} level {}: {} digits",
                x.level,
                x.digits
            );
        }
    }
}

#[test]
fn spectral_asymptotics_from_the_perturbative_volumes() {
    // log a_n − π√(n + 5/6) → 0 for F0 and log a_n − π√(2(4n+3)/9) → 0 for P2, exponentially
    // ("Topological strings from quantum mechanics", arXiv:1410.3382): the gap shrinks with n.
    let pi = std::f64::consts::PI;
    let cases: [(&str, fn(f64) -> f64); 2] = [
        ("F0", |n| std::f64::consts::PI * (n + 5.0 / 6.0).sqrt()),
        ("P2", |n| {
            std::f64::consts::PI * (2.0 * (4.0 * n + 3.0) / 9.0).sqrt()
        }),
    ];
    let _ = pi;
    for (id, volume) in cases {
        let at = attractor::solve_levels(&family(id), 0..=9, 16).unwrap();
        let gaps: Vec<f64> = at
            .iter()
            .map(|a| (a.log_modulus.to_f64() - volume(a.level as f64)).abs())
            .collect();
        for w in gaps.windows(2) {
            assert!(w[1] < w[0], "{id}: gaps {gaps:?} do not shrink");
        }
        assert!(
            gaps[9] < 1e-3 * gaps[0].max(1e-300) || gaps[9] < 1e-6,
            "{id}: gaps {gaps:?}"
        );
    }
}

#[test]
fn perturbed_modulus_is_not_an_attractor() {
    // Negative companion: ν at a modulus 1e-6 off the attractor value is ≥ 1e-8 away from an
    // integer (the check can fail).
    let l = family("dP3");
    let at = attractor::solve_levels(&l, 1..=1, 30).unwrap();
    let mut fam = attractor::HigherNormalFunction::new(&l).unwrap();
    let bits = at[0].precision_bits;
    let off = Float::with_val(bits, &at[0].modulus * Float::with_val(bits, 1.000001));
    let (nu, _, _, _) = fam.nu(&off, bits).unwrap();
    let dist = Float::with_val(bits, &nu - 2u32).to_f64().abs();
    assert!(dist > 1e-8, "ν moved only {dist:e}");
    let (nu0, _, _, _) = fam.nu(&at[0].modulus, bits).unwrap();
    assert!(Float::with_val(bits, &nu0 - 2u32).to_f64().abs() < 1e-28);
}

#[test]
fn high_levels_and_the_limit_of_the_double_precision_layout() {
    // P2 levels 25 and 30 (a ≈ 3e6, 1.4e7): the two branch points near log a are only
    // 2a^{−3/2} ≈ 4e-10 apart; the attractor moduli are still found, with log a_n within 1e-6 of
    // the perturbative volume π√(2(4n+3)/9) ("Topological strings from quantum mechanics",
    // arXiv:1410.3382; the corrections are exponentially small). At level 45 the pair is 3.5e-13
    // apart, below what the double-precision layout of the β loop resolves: refused with that
    // reason (not a wrong number).
    let p2 = family("P2");
    for n in [25usize, 30] {
        let at = attractor::solve_levels(&p2, n..=n, 20).unwrap();
        let volume = std::f64::consts::PI * (2.0 * (4.0 * n as f64 + 3.0) / 9.0).sqrt();
        let gap = (at[0].log_modulus.to_f64() - volume).abs();
        assert!(
            gap < 1e-6,
            "level {n}: log a = {}, gap {gap:e}",
            at[0].log_modulus
        );
        assert!(at[0].digits >= 17, "level {n}: {} digits", at[0].digits);
    }
    let refused = attractor::solve_levels(&p2, 45..=45, 20).unwrap_err();
    assert!(refused.to_string().contains("apart"), "level 45: {refused}");
}
