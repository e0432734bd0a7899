//! Levels above the solver's cap (40) by path integration: the β loop laid out at the working
//! precision around branch pairs closer than double precision resolves (P2: ln a ± 2i a^{−3/2};
//! F0: ln(a ∓ 2)), and large moduli for every family.

use regwave::curve::attractor::HigherNormalFunction;
use regwave::curve::continuation::March;
use regwave::curve::cover::Curve;
use regwave::curve::laurent::Laurent;
use regwave::curve::periods;
use rug::{Complex, Float};

mod common;
use common::{tolerance_digits, working_bits};

/// Digits of ν an attractor solve by path may lose at its working precision (measured: ν − k
/// ≤ 1e-44 at 164 bits for P2 levels 60 and 100, F0 level 100).
const NU_LOSS: f64 = 4.0;

/// Digits of |Im ν|/|ν| (zero on the real axis) that path integration at a = 1e40 may lose
/// (measured at 30 digits: ≤ 5e-41 for 14 families, 3.4e-30 for Q7, whose roots merge at both
/// ends).
const IM_NU_LOSS: f64 = 12.0;

fn family(id: &str) -> Laurent {
    regwave::family(id).unwrap()
}

/// Solves Re ν(e^t) = n + 1 by Newton's method in t = ln a from `t0` at `bits`, with the exact
/// derivative of ν (the solver of the library stops at level 40; this is the same equation).
fn solve(l: &Laurent, n: usize, t0: f64, bits: u32) -> (Float, Float) {
    let mut fam = HigherNormalFunction::new(l).unwrap();
    let mut t = Float::with_val(bits, t0);
    for _ in 0..30 {
        let a = Float::with_val(bits, t.exp_ref());
        let (nu, slope, _, _) = fam.nu(&a, bits).unwrap();
        let f = Float::with_val(bits, &nu - (n as u32 + 1));
        let step = Float::with_val(bits, &f / &slope);
        t -= &step;
        if step.to_f64().abs() < tolerance_digits(bits, NU_LOSS) {
            let a = Float::with_val(bits, t.exp_ref());
            let (nu, _, _, _) = fam.nu(&a, bits).unwrap();
            return (a, nu);
        }
    }
    panic!("level {n} did not converge");
}

#[test]
fn p2_and_f0_above_level_forty_by_path() {
    // Starting guesses from the perturbative volumes log a_n ≈ π√(2(4n+3)/9) (P2) and
    // π√(n + 5/6) (F0) ("Topological strings from quantum mechanics", arXiv:1410.3382).
    let bits = working_bits(40.0);
    let pi = std::f64::consts::PI;
    let cases: [(&str, usize, f64); 3] = [
        ("P2", 60, pi * (2.0 * (4.0 * 60.0 + 3.0) / 9.0f64).sqrt()),
        ("P2", 100, pi * (2.0 * (4.0 * 100.0 + 3.0) / 9.0f64).sqrt()),
        ("F0", 100, pi * (100.0 + 5.0 / 6.0f64).sqrt()),
    ];
    for (id, n, t0) in cases {
        let t = std::time::Instant::now();
        let (a, nu) = solve(&family(id), n, t0, bits);
        let off = Float::with_val(bits, &nu - (n as u32 + 1)).to_f64().abs();
        eprintln!(
            "{id} level {n}: a = {a:.45}, |ν − {}| = {off:e}, {:.1?}",
            n + 1,
            t.elapsed()
        );
        assert!(
            off < tolerance_digits(bits, NU_LOSS),
            "{id} level {n}: {off:e}"
        );
        // The gap to the perturbative volume is exponentially small at these levels.
        assert!(
            (a.clone().ln().to_f64() - t0).abs() < 1e-6,
            "{id} level {n}"
        );
    }
}

#[test]
fn series_and_path_agree_for_every_family_at_large_moduli() {
    // Ω_α, R_α by the series at a = ∞ against path integration (the β loop laid out around the
    // close branch pairs on the way), and ν real, at a = 1e40, 30 digits (measured also at 1e100
    // for 11 families, 1.4–13 s each; larger moduli are outside the input domain, 1e100).
    let bits = working_bits(30.0);
    for fam in regwave::lattice::catalogue::all()
        .iter()
        .filter(|c| c.applicable)
    {
        let l = family(fam.id);
        let terms = l.constant_terms(400).unwrap();
        for m in ["1e40"] {
            let a = Complex::with_val(bits, Complex::parse(m).unwrap());
            let t = std::time::Instant::now();
            let c = periods::compare(&l, &a, &terms).unwrap();
            let agree = c.agreement_digits.unwrap();
            let im = c.path.nu.imag().to_f64().abs() / c.path.nu.real().to_f64().abs();
            eprintln!(
                "{} a = {m}: agree {agree:.1}, ν = {:.6e}, Im/Re {im:e}, {:.1?}",
                fam.id,
                c.path.nu.real().to_f64(),
                t.elapsed()
            );
            assert!(agree > 30.0, "{} at {m}: {agree}", fam.id);
            assert!(
                im < tolerance_digits(bits, IM_NU_LOSS),
                "{} at {m}: {im:e}",
                fam.id
            );
        }
    }
}

#[test]
fn negative_companions_perturbed_modulus_and_unraised_layout() {
    // A modulus 1e-30 (relative) off the P2 level-60 attractor modulus moves ν far from 61 (the
    // integrality check can fail), and the β loop laid out at the curve's own double precision
    // (no raise) does not close or is refused where the pair is 4a^{−3/2} ≈ 4e-15 apart.
    let bits = working_bits(40.0);
    let l = family("P2");
    let t0 = std::f64::consts::PI * (2.0 * (4.0 * 60.0 + 3.0) / 9.0f64).sqrt();
    let (a, _) = solve(&l, 60, t0, bits);
    let off = Float::with_val(bits, &a + Float::with_val(bits, 1e-30 * a.to_f64()));
    let mut fam = HigherNormalFunction::new(&l).unwrap();
    let (nu, _, _, _) = fam.nu(&off, bits).unwrap();
    let moved = Float::with_val(bits, &nu - 61u32).to_f64().abs();
    assert!(
        moved > 1e6 * tolerance_digits(bits, NU_LOSS),
        "ν moved only {moved:e}"
    );
    let curve = Curve::new(&l, num_complex::Complex64::new(a.to_f64(), 0.0)).unwrap();
    let sing = curve.singular_points().unwrap();
    let alpha = periods::alpha_path(&curve, &sing, &March::for_bits(53)).unwrap();
    let unraised = periods::beta_path(&curve, &sing, &alpha.omega, &March::for_bits(53));
    assert!(unraised.is_err(), "{:?}", unraised.map(|p| p.0.omega));
    // The same loop with the raise succeeds.
    let raised = periods::beta_periods(&l, &curve, &sing, &alpha.omega, &March::for_bits(53));
    assert!(raised.is_ok(), "{raised:?}");
}

#[test]
fn eigenfunctions_at_the_highest_built_level_at_40_digits() {
    // ψ at level 20 (the highest built, `profile::MAX_LEVEL`; a ≈ 7e5 for P2, 1.7e6 for F0): the
    // attractor modulus by the series at a = ∞, the eigenfunction by path integration. The
    // eigen-equation residual from three independently integrated lines is ≤ 1e-30, and the
    // larger of route dependence and Cauchy defect — the negative controls, the residual is none
    // (docs/MATHEMATICS.md §7) — is near rounding level at the attractor modulus (measured 1e-23
    // for P2, whose Cauchy defect grows with the level) and many orders larger at a(1 + 1e-10).
    // Above level 20 eigenfunctions are refused: for P2 at level 30 the route dependence is
    // 5e-4 and the Cauchy defect 2 while the residual stays tiny (examples/route_probe.rs).
    use regwave::checks::single_valuedness::{cauchy_defect, route_dependence};
    use regwave::eigenfunction::construction::Eigenfunction;
    use regwave::eigenfunction::profile::{build, ProfileError, ProfileOptions, Target, BASE_RE};
    use regwave::input::grid::Grid;
    let options = ProfileOptions {
        grid: Grid::parse("-6:6:13").unwrap(),
        strip: true,
        digits: 40,
        allow_non_attractor: false,
    };
    for id in ["P2", "F0"] {
        let l = regwave::family(id).unwrap();
        let p = build(&l, &Target::Level(20), &options).unwrap();
        let res = p.residual.as_ref().unwrap();
        assert_eq!(res.points_without_value, 0, "{id}");
        let max = res.max.unwrap();
        assert!(max <= 1e-30, "{id}: residual {max:e}");
        let bits = p.modulus.prec();
        let route = |a: Float| {
            let eig =
                Eigenfunction::new(&l, Complex::with_val(bits, (&a, 0)), None, BASE_RE).unwrap();
            route_dependence(&l, &eig)
                .unwrap()
                .max(cauchy_defect(&eig).unwrap())
        };
        let at = route(p.modulus.clone());
        let shift = Float::with_val(bits, &p.modulus * Float::with_val(bits, 1e-10));
        let off = route(Float::with_val(bits, &p.modulus + &shift));
        assert!(
            at < 1e-28,
            "{id}: route dependence {at:e} at the attractor modulus"
        );
        assert!(
            off > 1e6 * at.max(1e-40),
            "{id}: off the attractor {off:e} vs {at:e}"
        );
        assert!(matches!(
            build(&l, &Target::Level(21), &options),
            Err(ProfileError::LevelBeyondReach { level: 21, .. })
        ));
    }
}
