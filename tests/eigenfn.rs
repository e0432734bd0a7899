//! The constructed eigenfunction: against the independent harmonic-oscillator eigenvector, the
//! eigen-equation with independently integrated shifted values, single valuedness and
//! analyticity, and the negative controls off the attractor modulus.

use num_complex::Complex64;
use regwave::checks::{eigenvector, zeros};
use regwave::curve::laurent::Laurent;
use regwave::curve::{attractor, cycles};
use regwave::eigenfunction::construction::Eigenfunction;
use regwave::input::selection;
use regwave::operator::quantum_curve::QuantumCurve;
use regwave::operator::spectrum::{self, SpectrumOptions};
use regwave::precision::lambda_loss_digits;

mod common;
use common::{double, tolerance_digits, working_bits};

/// Digits ψ may lose against the independent eigenvector in double precision: the issue's
/// requirement ≤ 1e-9 (measured ≤ 1.4e-13, 2.2 digits, over F0, P2, dP3 levels 0..3: the
/// eigenvector's own truncation and the cancellation in χ − χ∘ι̃).
const EIGENVECTOR_LOSS: f64 = 6.0;
/// Digits the eigen-equation residual loses beyond log₁₀|λ| (the exponential of the regulator
/// integral, precision::lambda_loss_digits): measured 0.24–0.63 for F0, P2, dP3 at level 1
/// (residuals 3.4e-14…2.8e-13 at |λ| = 197…860), plus 1.4 of margin.
const RESIDUAL_LOSS_BEYOND_LAMBDA: f64 = 2.0;
/// Digits ψ(0.3)/ψ(−0.9) may lose at the lower working precision of two rungs of the ladder:
/// measured −0.3 (32 vs 64 digits, at 139 bits) and 0.13 (64 vs 128 digits, at 245 bits), plus
/// about two of margin.
const LADDER_LOSS: f64 = 2.0;
/// Digits the shift relation may lose in double precision: measured ≤ 9.2e-15 (1.0 digit) for
/// F0, P2, dP3 at level 1, plus two of margin (the detection threshold off the attractor is
/// [`OFF_ATTRACTOR_DEFECT`]).
const SHIFT_LOSS: f64 = 3.0;
/// Digits the reality rule may lose in double precision: measured ≤ 1.5e-14 (1.2 digits) over
/// the families with a rule at level 1, plus 1.8 of margin.
const REALITY_LOSS: f64 = 3.0;
/// Detection threshold of the negative companions that break an identity outright (a wrong Weyl
/// sign, a wrong reality rule): measured ≥ 0.3, far above it; not a tolerance.
const BROKEN_IDENTITY: f64 = 1e-3;
/// Detection threshold of the shift relation at a modulus 1e-6 off the attractor (measured
/// ≥ 4.9e-6); not a tolerance.
const OFF_ATTRACTOR_DEFECT: f64 = 1e-8;
/// Relative offset of the modulus in the negative companion of the shift relation.
const OFF_ATTRACTOR_SHIFT: f64 = 1e-6;
/// Geometry, not a tolerance: two positions of singular points from double-precision
/// computations closer than this are the same point (far below the gaps between distinct ones,
/// e.g. 0.057 between F0's two outer real branch points).
const SAME_POINT: f64 = 1e-9;

fn family(id: &str) -> Laurent {
    selection::resolve(Some(id), None, None).unwrap().laurent
}

fn attractor_moduli(id: &str, levels: std::ops::RangeInclusive<usize>) -> Vec<f64> {
    attractor::solve_levels(&family(id), levels, 20)
        .unwrap()
        .iter()
        .map(|a| a.modulus.to_f64())
        .collect()
}

#[test]
fn matches_the_harmonic_oscillator_eigenvectors() {
    // ψ_n of F0, P2, dP3, levels 0..3, normalized on R, equals the normalized eigenvector of the
    // independent harmonic-oscillator solver up to one global phase, to ≤ 1e-9 (issue
    // requirement, EIGENVECTOR_LOSS; measured ≤ 1.4e-13). The negative companion (a modulus off
    // the attractor) is in tests/verify.rs.
    for id in ["F0", "P2", "dP3"] {
        let l = family(id);
        let opts = SpectrumOptions {
            levels: 0..=3,
            basis: 300,
            max_basis: 450,
            digits: 16,
            squeeze: 1.0,
        };
        let spec = spectrum::solve(&l, &opts).unwrap();
        for (lev, &a) in attractor_moduli(id, 0..=3).iter().enumerate() {
            let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).unwrap();
            let diff = eigenvector::eigenvector_difference(&eig, &spec, lev).unwrap();
            assert!(
                diff < double(EIGENVECTOR_LOSS),
                "{id} level {lev}: max difference {diff:e}"
            );
        }
    }
}

#[test]
fn eigen_equation_with_independently_integrated_shifts() {
    // A ψ(r − 2πi) + C ψ(r + 2πi) = (B + a) ψ(r), each of the three values integrated along its
    // own route on the cover (never through the shift relation), relative to max|ψ| on R; and
    // the same residual with the wrong Weyl sign (A and C negated) is large (negative companion).
    for id in ["F0", "P2", "dP3"] {
        let l = family(id);
        let a = attractor_moduli(id, 1..=1)[0];
        let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).unwrap();
        let q = QuantumCurve::new(&l).unwrap();
        let ac = Complex64::new(a, 0.0);
        let scale = (-40..=40)
            .map(|k| {
                eig.psi(&Complex64::new(k as f64 * 0.1, 0.0))
                    .unwrap()
                    .norm()
            })
            .fold(0.0, f64::max);
        let mut worst: f64 = 0.0;
        let mut wrong: f64 = 0.0;
        for r in [-2.3, -1.1, -0.45, 0.37, 1.3, 2.9] {
            let z = Complex64::new(r, 0.0);
            let res = q.apply(|w: &Complex64| eig.psi(w).unwrap(), &z, &ac);
            worst = worst.max(res.norm() / scale);
            let k = q.coefficients(&z);
            let (down, here, up) = (
                eig.psi(&(z - Complex64::new(0.0, 2.0 * std::f64::consts::PI)))
                    .unwrap(),
                eig.psi(&z).unwrap(),
                eig.psi(&(z + Complex64::new(0.0, 2.0 * std::f64::consts::PI)))
                    .unwrap(),
            );
            let flipped = -k.down * down + (k.centre - ac) * here - k.up * up;
            wrong = wrong.max(flipped.norm() / scale);
        }
        let lost = lambda_loss_digits(eig.lambda.norm()) + RESIDUAL_LOSS_BEYOND_LAMBDA;
        assert!(worst < double(lost), "{id}: residual {worst:e}");
        assert!(
            wrong > BROKEN_IDENTITY,
            "{id}: wrong sign still gives {wrong:e}"
        );
    }
}

#[test]
fn precision_ladder() {
    // ψ(0.3) for F0 level 2 at 32, 64 and 128 digits (normalized by ψ(−0.9) to remove the base
    // constant) agree with one another to the working precision of the lower of each pair.
    use rug::Complex;
    let l = family("F0");
    let a = attractor::solve_levels(&l, 2..=2, 128).unwrap()[0]
        .modulus
        .clone();
    let ratio = |digits: u32| -> (Complex, u32) {
        let bits = working_bits(digits as f64);
        let eig = Eigenfunction::new(&l, Complex::with_val(bits, (&a, 0)), None, 0.3).unwrap();
        let p = eig.psi(&Complex::with_val(bits, 0.3)).unwrap();
        let q = eig.psi(&Complex::with_val(bits, -0.9)).unwrap();
        (Complex::with_val(bits, p / q), bits)
    };
    let rungs: Vec<(u32, Complex, u32)> = [32, 64, 128]
        .into_iter()
        .map(|d| {
            let (r, bits) = ratio(d);
            (d, r, bits)
        })
        .collect();
    let rel = |x: &Complex, y: &Complex| {
        Complex::with_val(400, x - y).abs().real().to_f64()
            / Complex::with_val(400, y.abs_ref()).real().to_f64()
    };
    for (i, (low, r_low, bits)) in rungs.iter().enumerate() {
        for (high, r_high, _) in &rungs[i + 1..] {
            let d = rel(r_low, r_high);
            assert!(
                d < tolerance_digits(*bits, LADDER_LOSS),
                "{low} vs {high} digits ({bits} bits): {d:e}"
            );
        }
    }
}

#[test]
fn level_n_has_n_zeros_between_the_outermost_turning_points() {
    // Sign changes of the real function of the reality rule (F0: ψ itself, k = 0; P2 and dP3:
    // e^{ir²/(8π)}ψ, k = −1) between the outermost real parts of the branch points equal the
    // level, levels 0..5 (fact of the trade for these operators; common practice, no source).
    // The counters' negative companions are in tests/verify.rs.
    for id in ["F0", "P2", "dP3"] {
        let l = family(id);
        let rule = regwave::eigenfunction::phase::reality_rule(&l);
        assert!(rule.is_some(), "{id} has a reality rule");
        for (n, &a) in attractor_moduli(id, 0..=5).iter().enumerate() {
            let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).unwrap();
            let z = zeros::zeros_inside(&eig, rule).unwrap();
            assert_eq!(z.count, n, "{id} level {n}: zeros at {:?}", z.positions);
        }
    }
}

/// The staircase route of `shift_relation_on_independent_routes` from the base point (on the
/// spine Im z = c) to z − 2πi, where z = (0.5, c): along the spine past b (real part p) by w, down
/// to just below b (Im q − δ, q the representative of Im b in (c − 2π, c)), back across to p ± w on
/// the base's side, down to Im c − 2π and along it to z − 2πi. Together with the straight vertical
/// from z to z − 2πi (the α circle |x| = e^{0.5}) it encloses b and no other branch point: the
/// margins w and δ are half the gaps to the nearest other singular points (at most 1), so the
/// conjugate of b (same real part, for dP3) stays below the crossing and the outer real branch
/// point of F0 (0.057 beyond b) stays outside. The puncture z = 0 of dP3 may be enclosed: around
/// it z d log(−y) and ω are holomorphic (z vanishes there, D stays finite), so it adds nothing.
fn staircase_around(
    b: [f64; 2],
    base: Complex64,
    c: f64,
    singular: &[regwave::curve::cover::Singular<Complex64>],
) -> Vec<Complex64> {
    let two_pi = 2.0 * std::f64::consts::PI;
    let (p, q) = (b[0], b[1] - two_pi * ((b[1] - c) / two_pi).ceil());
    let others: Vec<Complex64> = singular
        .iter()
        .flat_map(|s| (-1..=1).map(move |k| s.z + Complex64::new(0.0, k as f64 * two_pi)))
        .filter(|s| (s.re - p).abs() > SAME_POINT || (s.im - q).abs() > SAME_POINT)
        .collect();
    let w = others
        .iter()
        .map(|s| (s.re - p).abs())
        .filter(|&d| d > SAME_POINT)
        .fold(2.0, f64::min)
        / 2.0;
    let delta = others
        .iter()
        .filter(|s| (s.re - p).abs() <= SAME_POINT && s.im < q)
        .map(|s| q - s.im)
        .fold((q - (c - two_pi)).min(2.0), f64::min)
        / 2.0;
    let away = if p < base.re { -1.0 } else { 1.0 };
    let (far, near) = (p + away * w, p - away * w);
    vec![
        base,
        Complex64::new(far, c),
        Complex64::new(far, q - delta),
        Complex64::new(near, q - delta),
        Complex64::new(near, c - two_pi),
        Complex64::new(0.5, c - two_pi),
    ]
}

#[test]
fn shift_relation_on_independent_routes() {
    // χ(τ̃z̃) = −y·χ(z̃), τ̃(z, y) = (z − 2πi, y) (docs/MATHEMATICS.md §5), with χ(τ̃z̃) integrated along its own
    // route: a staircase that encloses exactly the member b of the β pair (periods::beta_loop)
    // other than the branch point b₀ the eigenfunction went around to reach the other sheet
    // (Eigenfunction::sheet_branch_point). That route meets the point over z − 2πi on the sheet
    // whose D differs in sign from the direct one (it went around b), so the value is read off the
    // other sheet, which started with the loop around b₀: together the loops around b₀ and b make
    // the β cycle. Holds at the attractor modulus, fails off it (a β loop multiplies χ by
    // e^{−2πiν}, ν no longer an integer). dP3's pair ±r_c + is shares its real parts with the
    // conjugate pair ±r_c − is, which the staircase passes between.
    let two_pi = 2.0 * std::f64::consts::PI;
    let same_point = |u: [f64; 2], v: [f64; 2]| {
        let k = ((u[1] - v[1]) / two_pi).round();
        (u[0] - v[0]).abs() < SAME_POINT && (u[1] - v[1] - k * two_pi).abs() < SAME_POINT
    };
    for id in ["F0", "P2", "dP3"] {
        let l = family(id);
        let a = attractor_moduli(id, 1..=1)[0];
        // Both moduli on the same spine (the default one can flip between two equally clear
        // heights, e.g. π/2 and 3π/2 for P2, which changes the branch point b₀).
        let defect = |a: f64, spine: Option<f64>| -> (f64, f64) {
            let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), spine, 0.3).unwrap();
            let sing = eig.curve().singular_points().unwrap();
            let pair = cycles::beta_loop(eig.curve(), &sing)
                .unwrap()
                .0
                .branch_points;
            let b0 = eig.sheet_branch_point;
            assert!(
                pair.iter().any(|&b| same_point(b, b0)),
                "{id}: the sheet was reached around {b0:?}, not a member of the β pair {pair:?}"
            );
            let b = *pair.iter().find(|&&b| !same_point(b, b0)).unwrap();
            let c = eig.spine;
            let z = Complex64::new(0.5, c);
            let here = eig.sheets_along(&[eig.base.z, z]).unwrap();
            let route = staircase_around(b, eig.base.z, c, &sing);
            let below = eig.sheets_along(&route).unwrap();
            // The sheet of `below` with the same y as `here` has the same D (D is 2πi-periodic).
            let chi_below = if (below.d - here.d).norm() < (below.d + here.d).norm() {
                below.chi
            } else {
                below.chi_other
            };
            let [y1, y2] = eig.curve().roots(&z);
            let y = if (eig.curve().y_dphi_dy(&z, &y1) - here.d).norm()
                < (eig.curve().y_dphi_dy(&z, &y2) - here.d).norm()
            {
                y1
            } else {
                y2
            };
            ((chi_below + y * here.chi).norm() / (y * here.chi).norm(), c)
        };
        let (at, spine) = defect(a, None);
        let (off, _) = defect(a * (1.0 + OFF_ATTRACTOR_SHIFT), Some(spine));
        assert!(
            at < double(SHIFT_LOSS),
            "{id}: shift relation defect {at:e} at the attractor"
        );
        assert!(
            off > OFF_ATTRACTOR_DEFECT,
            "{id}: shift relation still holds ({off:e}) off the attractor"
        );
    }
}

#[test]
fn reality_rules_hold_for_every_family_that_has_one() {
    // e^{−ikr²/(8π)} ψ(r) is real up to a constant when φ is invariant under m ↦ (m₁ + k m₂, −m₂)
    // (an antiunitary symmetry of Ô; docs/MATHEMATICS.md §2 states k = 0 for F0 and k = −1 for P2, dP3).
    // Measured for all 15 families at level 1; the rule is checked, and where a family has none
    // the test records it.
    use regwave::eigenfunction::phase::{reality_factor, reality_rule};
    use regwave::lattice::catalogue;
    assert_eq!(reality_rule(&family("F0")), Some(0));
    assert_eq!(reality_rule(&family("P2")), Some(-1));
    assert_eq!(reality_rule(&family("dP3")), Some(-1));
    for f in catalogue::all().iter().filter(|f| f.applicable) {
        let l = family(f.id);
        let Some(k) = reality_rule(&l) else { continue };
        let a = attractor_moduli(f.id, 1..=1)[0];
        let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).unwrap();
        let grid: Vec<f64> = (-160..=160).map(|j| j as f64 * 0.05).collect();
        let g: Vec<Complex64> = eig
            .psi_on_line(&grid, 0.0)
            .unwrap()
            .into_iter()
            .zip(&grid)
            .map(|(v, &r)| v.unwrap() * reality_factor(k, r))
            .collect();
        let peak = g
            .iter()
            .copied()
            .max_by(|x, y| x.norm().total_cmp(&y.norm()))
            .unwrap();
        let phase = peak / peak.norm();
        let defect = g.iter().map(|v| (v / phase).im.abs()).fold(0.0, f64::max) / peak.norm();
        assert!(
            defect < double(REALITY_LOSS),
            "{} (k = {k}): imaginary part {defect:e}",
            f.id
        );
        // Negative companion: the wrong rule (k + 1) leaves a large imaginary part.
        let wrong: Vec<Complex64> = g
            .iter()
            .zip(&grid)
            .map(|(v, &r)| v * reality_factor(1, r))
            .collect();
        let wpeak = wrong
            .iter()
            .copied()
            .max_by(|x, y| x.norm().total_cmp(&y.norm()))
            .unwrap();
        let wphase = wpeak / wpeak.norm();
        let wdefect = wrong
            .iter()
            .map(|v| (v / wphase).im.abs())
            .fold(0.0, f64::max)
            / wpeak.norm();
        assert!(
            wdefect > BROKEN_IDENTITY,
            "{}: rule k + 1 also looks real ({wdefect:e})",
            f.id
        );
    }
}

#[test]
fn decay_rates_on_the_real_line() {
    // |ψ| ~ e^{−|r|} on both sides for F0 and dP3; for P2 e^{−r} as r → +∞ and e^{r/2} as
    // r → −∞ (docs/MATHEMATICS.md §2, x → 0 is a branch point of P2): fitted slopes within 2 %.
    let cases = [("F0", [1.0, 1.0]), ("dP3", [1.0, 1.0]), ("P2", [0.5, 1.0])];
    for (id, want) in cases {
        let l = family(id);
        let a = attractor_moduli(id, 1..=1)[0];
        let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).unwrap();
        let norm = eig.normalization(0.05).unwrap();
        for side in 0..2 {
            let rel = (norm.decay[side] - want[side]).abs() / want[side];
            assert!(
                rel < 0.02,
                "{id} side {side}: rate {} vs {}",
                norm.decay[side],
                want[side]
            );
        }
    }
}

/// The documented decay law of every strip family at level 1 (DEVELOPERS.md, "Measured decay of
/// ψ on R"): the kind of each end `[r → −∞, r → +∞]`. |ψ| ~ e^{−|r|/2} at a branched end, and
/// e^{−|r|} otherwise, with a prefactor |r| at a merging end. docs/MATHEMATICS.md §2 states the rates of P2
/// (1/2 on the left, where x → 0 is a branch point; 1 on the right) and of F0 and dP3 (1 on both
/// sides); the other rows are this project's measurement.
fn documented_ends() -> [(&'static str, [regwave::curve::cover::EndRoots; 2]); 15] {
    use regwave::curve::cover::EndRoots::{Branched as B, Merging as M, Separate as S};
    [
        ("P2", [B, S]),
        ("F0", [S, S]),
        ("F1", [B, S]),
        ("F2", [B, B]),
        ("Q5", [S, B]),
        ("dP2", [S, S]),
        ("T6", [M, B]),
        ("Q6", [M, B]),
        ("Pe6", [S, S]),
        ("dP3", [S, S]),
        ("Q7", [M, S]),
        ("dP2*", [S, M]),
        ("F0*", [M, M]),
        ("F1*", [M, M]),
        ("F2*", [M, M]),
    ]
}

fn documented_rate(end: regwave::curve::cover::EndRoots) -> f64 {
    if end == regwave::curve::cover::EndRoots::Branched {
        0.5
    } else {
        1.0
    }
}

#[test]
fn decay_rates_of_all_fifteen_families() {
    // κ of the fit |ψ| ≈ c|r|^p e^{−κ|r|} (Eigenfunction::normalization) at level 1 within 2 % of
    // the documented value (measured within 1 %), the documented kinds of the ends equal to the
    // Newton-polygon classification Curve::end_roots, and the prefactor: fitted p ≥ 0.9 at a
    // merging end (measured 1.27–1.37; e^{|r|}|ψ| becomes linear in |r|), p ≤ 0.7 elsewhere
    // (measured 0.00–0.47). Negative companion: the swapped value (1 for 1/2 and back) misses
    // every end by far more than 2 %.
    use regwave::curve::cover::EndRoots;
    use regwave::lattice::catalogue;
    let table = documented_ends();
    assert_eq!(
        table.len(),
        catalogue::all().iter().filter(|f| f.applicable).count()
    );
    for (id, ends) in table {
        let l = family(id);
        let a = attractor_moduli(id, 1..=1)[0];
        let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).unwrap();
        assert_eq!(eig.curve().end_roots(), ends, "{id}: kinds of the ends");
        let norm = eig.normalization(0.05).unwrap();
        for side in 0..2 {
            let (kappa, p) = (norm.decay[side], norm.decay_power[side]);
            let want = documented_rate(ends[side]);
            let rel = (kappa - want).abs() / want;
            assert!(rel < 0.02, "{id} side {side}: rate {kappa} vs {want}");
            let swapped = 1.5 - want;
            assert!(
                (kappa - swapped).abs() / swapped > 0.2,
                "{id} side {side}: rate {kappa} also fits {swapped}"
            );
            if ends[side] == EndRoots::Merging {
                assert!(
                    p >= 0.9,
                    "{id} side {side}: merging end without prefactor, p = {p}"
                );
            } else {
                assert!(p <= 0.7, "{id} side {side}: prefactor p = {p}");
            }
        }
    }
}

#[test]
fn merging_end_decays_at_rate_one_only_at_the_attractor() {
    // F0*: at the attractor modulus (level 1) χ and χ∘ι̃ tend to the same value as x → 0 and
    // |ψ| ~ |r| e^{r} on the left; at the modulus × (1 + 1e-3) they do not, and the fitted left
    // rate falls to ≈ 1/2 (measured 0.49): more than 2 % from the documented 1 (negative
    // companion of decay_rates_of_all_fifteen_families).
    let l = family("F0*");
    let a = attractor_moduli("F0*", 1..=1)[0];
    let rate = |a: f64| {
        let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).unwrap();
        eig.normalization(0.05).unwrap().decay[0]
    };
    let want = documented_rate(documented_ends()[12].1[0]);
    assert_eq!(documented_ends()[12].0, "F0*");
    let at = rate(a);
    assert!((at - want).abs() / want < 0.02, "at the attractor: {at}");
    let off = rate(a * (1.0 + 1e-3));
    assert!(
        (off - want).abs() / want > 0.2,
        "off the attractor the left rate is still {off}"
    );
}
