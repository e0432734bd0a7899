//! Properties of the text readers, by randomized testing (proptest): no text makes a reader
//! panic, and valid input round-trips exactly. The command-line table of hostile inputs is in
//! `tests/robustness.rs`; a coverage-guided fuzz harness for the vertex and coefficient readers
//! is in `fuzz/` (see its README).

use proptest::prelude::*;
use regwave::input::coefficients::parse_coefficients;
use regwave::input::grid::Grid;
use regwave::input::numbers::{decimal_syntax, parse_levels, parse_modulus};
use regwave::input::selection;
use regwave::input::vertices::parse_vertices;
use rug::ops::Pow;
use rug::{Float, Rational};

/// Text made of the characters the readers care about, and any others.
fn hostile_text() -> impl Strategy<Value = String> {
    prop_oneof![
        "[()=,:.0-9eE+\\-−_ \t]{0,40}",
        any::<String>(),
        "\\PC{0,60}",
    ]
}

/// A decimal number in the strict syntax, as text, with its exact value.
fn decimal() -> impl Strategy<Value = (String, Rational)> {
    decimal_in(-30..30)
}

/// As [`decimal`], with the exponent (when written) in `exponents`.
fn decimal_in(exponents: std::ops::Range<i32>) -> impl Strategy<Value = (String, Rational)> {
    (
        any::<bool>(),
        0u64..1_000_000_000,
        0u32..12,
        exponents,
        any::<bool>(),
    )
        .prop_map(|(negative, mantissa, places, exponent, with_exponent)| {
            let digits = format!("{mantissa:0>width$}", width = places as usize + 1);
            let (int, frac) = digits.split_at(digits.len() - places as usize);
            let mut text = String::new();
            if negative {
                text.push('-');
            }
            text.push_str(int);
            if places > 0 {
                text.push('.');
                text.push_str(frac);
            }
            let exponent = if with_exponent { exponent } else { 0 };
            if with_exponent {
                text.push_str(&format!("e{exponent}"));
            }
            let mut value = Rational::from((
                rug::Integer::from(mantissa),
                rug::Integer::from(10u32).pow(places),
            ));
            let scale = Rational::from(rug::Integer::from(10u32).pow(exponent.unsigned_abs()));
            value = if exponent >= 0 {
                value * scale
            } else {
                value / scale
            };
            if negative {
                value = -value;
            }
            (text, value)
        })
}

proptest! {
    #![proptest_config(ProptestConfig {
        cases: 2000,
        failure_persistence: None,
        ..ProptestConfig::default()
    })]

    #[test]
    fn no_text_makes_a_reader_panic(text in hostile_text()) {
        let _ = parse_vertices(&text);
        let _ = parse_coefficients(&text);
        let _ = parse_levels(&text);
        let _ = Grid::parse(&text);
        let _ = decimal_syntax(&text);
        let f0 = regwave::family("F0").unwrap();
        let _ = parse_modulus(&text, 64, &f0);
    }

    #[test]
    fn vertex_lists_round_trip(
        points in prop::collection::vec((-1_000_000i64..=1_000_000, -1_000_000i64..=1_000_000), 1..12),
        space in "[ \t]{0,2}",
    ) {
        let text = points
            .iter()
            .map(|(x, y)| format!("{space}({space}{x}{space},{space}{y}{space}){space}"))
            .collect::<Vec<_>>()
            .join(",");
        let parsed = parse_vertices(&text).unwrap();
        let expected: Vec<[i64; 2]> = points.iter().map(|&(x, y)| [x, y]).collect();
        prop_assert_eq!(parsed, expected);
    }

    #[test]
    fn coefficient_lists_round_trip(
        terms in prop::collection::vec(((-50i64..50, -50i64..50), -1_000_000i64..1_000_000), 1..10),
    ) {
        let text = terms
            .iter()
            .map(|((x, y), c)| format!("({x}, {y}) = {c}"))
            .collect::<Vec<_>>()
            .join(", ");
        let parsed = parse_coefficients(&text).unwrap();
        let expected: Vec<([i64; 2], i64)> = terms.iter().map(|&((x, y), c)| ([x, y], c)).collect();
        prop_assert_eq!(parsed, expected);
    }

    #[test]
    fn level_ranges_round_trip(a in 0usize..=10_000, b in 0usize..=10_000) {
        let (lo, hi) = (a.min(b), a.max(b));
        prop_assert_eq!(parse_levels(&format!("{lo}..{hi}")).unwrap(), lo..=hi);
        prop_assert_eq!(parse_levels(&format!("{lo}..={hi}")).unwrap(), lo..=hi);
        prop_assert_eq!(parse_levels(&lo.to_string()).unwrap(), lo..=lo);
    }

    #[test]
    fn grids_keep_their_ends_exactly(a in decimal_in(-12..-3), b in decimal_in(-12..-3), points in 2usize..500) {
        prop_assume!(a.1 != b.1);
        let ((start, s), (end, e)) = if a.1 < b.1 { (a, b) } else { (b, a) };
        let text = format!("{start}:{end}:{points}");
        match Grid::parse(&text) {
            Ok(g) => {
                prop_assert!(s.clone().abs() <= 1e6 && e.clone().abs() <= 1e6);
                prop_assert_eq!(g.exact(0), s);
                prop_assert_eq!(g.exact(points - 1), e.clone());
                // The written end reads back to the same rational.
                let back = g.point_text(points - 1, 40);
                let again = Grid::parse(&format!("{start}:{back}:{points}")).unwrap();
                prop_assert_eq!(again.exact(points - 1), e);
            }
            // Only the domain refuses a well-formed grid: an end beyond ±1e6, or a step too
            // fine for double precision.
            Err(err) => {
                let why = err.to_string();
                let far = s.clone().abs() > 1e6 || e.clone().abs() > 1e6;
                prop_assert!(why.contains("too fine") || far && why.contains("an end beyond"), "{}", why);
            }
        }
    }

    #[test]
    fn moduli_are_read_exactly_and_strictly((text, value) in decimal(), bits in 53u32..400, gap in 0usize..3) {
        let f0 = regwave::family("F0").unwrap();
        // A valid number: the correctly rounded value of its decimal text, or a refusal for
        // the domain (threshold 4, at most 1e100), never for the syntax.
        match parse_modulus(&text, bits, &f0) {
            Ok(a) => prop_assert_eq!(a, Float::with_val(bits, &value)),
            Err(e) => {
                let why = e.to_string();
                prop_assert!(value <= 4 || why.contains("largest modulus"), "{}", why);
            }
        }
        // The same text with a space or an underscore inside is refused.
        if text.len() > 1 {
            let cut = 1 + gap.min(text.len() - 2);
            for sep in [" ", "_"] {
                let broken = format!("{}{sep}{}", &text[..cut], &text[cut..]);
                prop_assert!(parse_modulus(&broken, bits, &f0).is_err(), "{:?}", broken);
            }
        }
    }

    #[test]
    fn selections_never_panic(
        points in prop::collection::vec((-3i64..=3, -3i64..=3), 0..10),
        coefficient in prop::option::of(((-3i64..=3, -3i64..=3), -3i64..=3)),
    ) {
        let text = points.iter().map(|(x, y)| format!("({x},{y})")).collect::<Vec<_>>().join(",");
        let coefficients = coefficient.map(|((x, y), c)| format!("({x},{y})={c}"));
        let _ = selection::resolve(None, Some(&text), coefficients.as_deref());
    }
}

/// The negative companion of the round trips: a list with a space inside a number is not read
/// as the number without it.
#[test]
fn a_space_inside_a_number_is_refused_not_joined() {
    assert!(parse_vertices("(1 0,0),(0,1),(-1,-1)").is_err());
    assert!(parse_coefficients("(1,0)=1 0").is_err());
    assert!(decimal_syntax("1 7.8466").is_err());
    assert!(Grid::parse("1 0:20:3").is_err());
    assert_eq!(decimal_syntax(" 17.8466 "), Ok("17.8466"));
}
