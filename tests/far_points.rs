//! Far out on R: every written value of ψ holds the digits `psi.json` states for it (checked
//! against an independent run at much higher precision), values that could not be computed
//! are `nan` with a reason, and grids beyond the reach are refused before any sampling.

use num_complex::Complex64;
use regwave::eigenfunction::construction::Eigenfunction;
use regwave::eigenfunction::profile::{Profile, ProfileError, BASE_RE};
use regwave::{build_profile, Grid, ProfileOptions, Target};
use std::time::Instant;

mod common;

fn family(id: &str) -> regwave::curve::laurent::Laurent {
    regwave::family(id).unwrap()
}

fn profile(id: &str, level: usize, grid: &str, digits: u32) -> Result<Profile, ProfileError> {
    let options = ProfileOptions {
        grid: Grid::parse(grid).unwrap(),
        strip: false,
        digits,
        allow_non_attractor: false,
    };
    build_profile(&family(id), &Target::Level(level), &options)
}

/// The relative difference of a written value from the reference, in digits of agreement.
fn agreement(value: Complex64, reference: Complex64) -> f64 {
    -((value - reference).norm() / reference.norm()).log10()
}

/// Every value of `low` against the same point of `high` (a run at much higher precision, whose
/// values hold far more digits): they agree on the digits `low` claims for them, less one for
/// the last digit's rounding (common practice). Returns the smallest margin (agreement − claim).
/// A zero of ψ (`point_digits.zeros`) is compared relative to the peak of the line, with the
/// digits it claims there.
fn check_claims(low: &Profile, high: &Profile) -> f64 {
    let mut margin = f64::INFINITY;
    let peak = high
        .real_line
        .iter()
        .flatten()
        .map(|v| v.norm())
        .fold(0.0, f64::max);
    for (k, v) in low.real_line.iter().enumerate() {
        let claimed = low.point_digits.relative[0][k];
        let Some(v) = v else {
            assert!(claimed.is_none(), "a point without a value claims digits");
            continue;
        };
        let reference = high.real_line[k].expect("the reference has every value");
        if let Some(zero) = low.point_digits.zeros.iter().find(|z| z.index == k) {
            let claimed = zero
                .digits_relative_to_peak
                .expect("a zero states its digits");
            assert!(claimed >= low.point_digits.wanted);
            let claimed = claimed.min(common::digits_of(common::DOUBLE_BITS));
            let agree = -((*v - reference).norm() / peak).log10();
            assert!(
                agree >= claimed - 1.0,
                "zero at r = {}: {v} agrees with {reference} on {agree:.1} digits of the peak, claims {claimed:.1}",
                low.grid[k]
            );
            margin = margin.min(agree - claimed);
            continue;
        }
        let claimed = claimed.expect("a written value states its digits");
        assert!(claimed >= low.point_digits.wanted, "r = {}", low.grid[k]);
        // The values compared here are rounded to double precision.
        let claimed = claimed.min(common::digits_of(common::DOUBLE_BITS));
        let agree = agreement(*v, reference);
        assert!(
            agree >= claimed - 1.0,
            "r = {}: {v} agrees with {reference} on {agree:.1} digits, claims {claimed:.1}",
            low.grid[k]
        );
        margin = margin.min(agree - claimed);
    }
    margin
}

#[test]
fn far_points_hold_the_digits_they_claim() {
    // F0 level 0 in double precision out to |r| = 200, where |ψ| ~ 1e-87: the points past
    // |r| = 140 (the double range) and those whose cancellation left fewer than the 10 wanted are
    // computed again at a raised precision. Reference: the same grid at 40 digits (a run at
    // 160+ bits with its own attractor solve).
    let grid = "-200:200:11";
    let low = profile("F0", 0, grid, 16).unwrap();
    let high = profile("F0", 0, grid, 40).unwrap();
    assert_eq!(low.precision_bits, common::DOUBLE_BITS);
    assert!(low.point_digits.raised.len() >= 4, "{:?}", low.point_digits);
    assert!(low.point_digits.dropped.is_empty());
    // Raised far-out values gain the digits added: none is taken for a zero of ψ.
    assert!(
        low.point_digits.zeros.is_empty(),
        "{:?}",
        low.point_digits.zeros
    );
    let r200 = low.grid.iter().position(|&r| r == 200.0).unwrap();
    let v = low.real_line[r200].unwrap().norm();
    assert!(v > 1e-88 && v < 1e-86, "|psi(200)| = {v:e}");
    check_claims(&low, &high);
    // The state psi.json reports: the fewest digits relative to the peak is at least the
    // wanted 10, and the fewest relative to each value's own size too.
    let wanted = low.point_digits.wanted;
    assert_eq!(wanted, 10.0);
    assert!(low.point_digits.min_relative(0).unwrap() >= wanted);
    assert!(low.digits_left_min_on_r().unwrap() >= wanted);
}

#[test]
fn the_old_double_precision_values_fail_the_same_comparison() {
    // Negative companion: the double-precision line as it was written before (one march in
    // double precision, normalized by the profile's factor) is garbage at r = ±200 (the
    // products of the coefficients leave the double range past |r| ≈ 177): the comparison of
    // `far_points_hold_the_digits_they_claim` rejects it.
    let grid = "-200:200:3";
    let high = profile("F0", 0, grid, 40).unwrap();
    let eig = Eigenfunction::new(
        &family("F0"),
        Complex64::new(high.modulus.to_f64(), 0.0),
        Some(high.spine),
        BASE_RE,
    )
    .unwrap();
    let old = eig.psi_on_line(&[200.0], 0.0).unwrap()[0].unwrap() * high.factor;
    let reference = high.real_line[2].unwrap();
    assert!(
        agreement(old, reference) < 1.0,
        "the old value {old} agrees with {reference}"
    );
}

#[test]
fn merging_end_points_are_raised_and_hold_their_digits() {
    // T6's left end: the roots merge and χ − χ∘ι̃ loses |r|/(2 ln 10) digits (26 at r = −120,
    // more than double precision holds: the old value there was wrong by 10 orders of
    // magnitude, `examples/point_digits.rs`). Reference: the same points at 40 digits.
    let grid = "-120:-40:3";
    let low = profile("T6", 0, grid, 16).unwrap();
    let high = profile("T6", 0, grid, 40).unwrap();
    assert!(!low.point_digits.raised.is_empty());
    assert!(
        low.point_digits.zeros.is_empty(),
        "{:?}",
        low.point_digits.zeros
    );
    check_claims(&low, &high);
}

#[test]
fn a_zero_of_psi_keeps_its_value_held_relative_to_the_peak() {
    // dP3 level 1: ψ is odd about r = 0, the puncture where ψ comes from the mean-value formula.
    // Its value there is rounding noise at any precision (0.5 digits of its own at double
    // precision, exactly 0 at 40 digits more): it is kept, finite and tiny, listed as a zero with
    // its digits relative to the peak, and it agrees with a 40-digit run on those digits.
    // (The grid is not symmetric: at ±r |ψ| is the same, and the phase is fixed where it is
    // largest.)
    let grid = "-2:1:4";
    let low = profile("dP3", 1, grid, 16).unwrap();
    let high = profile("dP3", 1, grid, 40).unwrap();
    let v = low.real_line[2].expect("the zero has a value");
    let peak = low
        .real_line
        .iter()
        .flatten()
        .map(|v| v.norm())
        .fold(0.0, f64::max);
    assert!(
        v.norm().is_finite() && v.norm() < 1e-12 * peak,
        "psi(0) = {v}"
    );
    assert!(
        low.point_digits.dropped.is_empty(),
        "{:?}",
        low.point_digits
    );
    let zero = &low.point_digits.zeros;
    assert_eq!(zero.len(), 1, "{zero:?}");
    assert_eq!((zero[0].index, zero[0].r), (2, 0.0));
    assert!(zero[0].digits_relative_to_peak.unwrap() >= 10.0, "{zero:?}");
    // The minima of digits relative to each value's own size leave the zero aside.
    assert!(low.point_digits.min_relative(0).unwrap() >= 10.0);
    check_claims(&low, &high);
}

#[test]
fn a_nonzero_value_is_not_taken_for_a_zero() {
    // Negative companion: the same family at level 0, even about r = 0 with its peak near there,
    // and level 1 off r = 0 (ψ(±1) ≈ 0.23): no zero is listed, and a wrong value written at the
    // zero (its neighbour's) fails the comparison of `check_claims`.
    let even = profile("dP3", 0, "-2:2:5", 16).unwrap();
    assert!(even.point_digits.zeros.is_empty());
    let odd = profile("dP3", 1, "-1:1:3", 16).unwrap();
    assert_eq!(odd.point_digits.zeros.len(), 1);
    let off = profile("dP3", 1, "0.5:1.5:3", 16).unwrap();
    assert!(off.point_digits.zeros.is_empty(), "{:?}", off.point_digits);
    let mut wrong = odd.clone();
    wrong.real_line[1] = wrong.real_line[0].map(|v| v * 1e-9);
    let caught = std::panic::catch_unwind(|| check_claims(&wrong, &odd));
    assert!(caught.is_err(), "a zero off by 1e-9 of the peak passed");
}

#[test]
fn grids_beyond_the_reach_are_refused_before_sampling() {
    for grid in ["-1e6:-300:3", "-400:400:9", "0:231:2"] {
        let start = Instant::now();
        let err = profile("F0", 0, grid, 16).unwrap_err();
        assert!(start.elapsed().as_secs_f64() < 5.0, "{grid}: slow refusal");
        assert!(err.is_input(), "{grid}: {err}");
        let text = err.to_string();
        assert!(text.contains("beyond the reach |r| <= 230"), "{text}");
        assert!(text.contains("|psi| is below 10^-"), "{text}");
    }
    // The same family within the reach is built (the refusal is not a blanket one).
    assert!(profile("F0", 0, "0:230:2", 16).is_ok());
}

#[test]
fn a_point_without_a_usable_recomputation_keeps_its_first_value_with_its_digits() {
    // F1* level 1 on a 121-point grid: at r = −5.2 the recomputation at raised precision gives
    // no usable value; the first value is kept, listed under point_digits.kept_short with the
    // digits it holds (8.4), and agrees with an independent 40-digit run to those digits — it is
    // not left without a value (the audit's norm would then be refused).
    let l = family("F1*");
    let options = |digits| ProfileOptions {
        grid: Grid::parse("-12:12:121").unwrap(),
        strip: true,
        digits,
        allow_non_attractor: false,
    };
    let low = build_profile(&l, &Target::Level(1), &options(16)).unwrap();
    assert!(
        low.point_digits.dropped.is_empty(),
        "{:?}",
        low.point_digits.dropped
    );
    let kept = &low.point_digits.kept_short;
    assert!(!kept.is_empty());
    let reference = build_profile(
        &l,
        &Target::Level(1),
        &ProfileOptions {
            grid: Grid::parse("-5.2:-5:2").unwrap(),
            ..options(40)
        },
    )
    .unwrap();
    for note in kept {
        assert!(note.digits >= 1.0);
        let value = low.real_line[note.index].unwrap();
        let exact = reference.real_line[0].unwrap();
        assert!((note.r + 5.2).abs() < 1e-12);
        assert!(agreement(value, exact) >= note.digits - 1.0, "{note:?}");
    }
}
