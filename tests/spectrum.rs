//! Reference checks of the independent harmonic-oscillator spectrum at ħ = 2π.

use regwave::curve::laurent::Laurent;
use regwave::input::selection;
use regwave::operator::oscillator;
use regwave::operator::spectrum::{self, SpectrumOptions};
use rug::float::Constant;
use rug::Float;

mod common;
use common::double;

/// Not a tolerance of the precision: the ≥ 12 digits asserted against the published energies
/// (18 digits shown; measured 4.5e-18 for F0 and ≤ 1.9e-16 for P2) and claimed by the error
/// estimate (measured 2.5e-14 relative for F0).
const PUBLISHED_AGREEMENT: f64 = 1e-12;
/// Not a tolerance of the precision: the ≥ 9 digits of the traces at basis N = 260, limited by
/// the truncation of the basis (measured 3.6e-11 and 7.4e-12).
const TRACE_AGREEMENT: f64 = 1e-9;
/// Digits the norm and the parity of ψ₀ on R may lose in double precision (trapezoid sum of the
/// f64 wavefunction; measured 3.3e-16 and 3.3e-17), plus two of margin.
const WAVEFUNCTION_LOSS: f64 = 2.0;
/// Digits a general-purpose f64 eigensolver loses at N = 12: ε·‖H‖·N/λ with entries ≲ 1e10,
/// about 9 (measured ≤ 2.8e-14 for P2 and ≤ 2.1e-9 for Q7 through its real embedding).
const F64_EIGENSOLVER_LOSS: f64 = 9.0;
/// Not a tolerance: an absolute floor of the comparison of two spectra should both error
/// estimates vanish (never reached: the estimates give ≥ 2e-7).
const ESTIMATE_FLOOR: f64 = 1e-12;

fn family(id: &str) -> Laurent {
    selection::resolve(Some(id), None, None).unwrap().laurent
}

/// Relative difference of `x` from the decimal reference `reference`, parsed at x's precision.
fn rel(x: &Float, reference: &Float) -> f64 {
    (Float::with_val(x.prec(), x - reference) / reference)
        .to_f64()
        .abs()
}

fn parse(prec: u32, s: &str) -> Float {
    Float::with_val(prec, Float::parse(s).unwrap())
}

#[test]
fn f0_ground_state_energy() {
    // Local F0 at ħ = 2π: E₀ = log a₀ = 2.88181542992629678 ("Topological strings from quantum
    // mechanics", 2014, arXiv:1410.3382; value from memory of that paper, confirmed
    // independently to these digits). Assert ≥ 12 digits; the estimate must cover the error.
    let opts = SpectrumOptions {
        levels: 0..=0,
        basis: 200,
        max_basis: 300,
        digits: 16,
        squeeze: 1.0,
    };
    let s = spectrum::solve(&family("F0"), &opts).unwrap();
    let l = &s.levels[0];
    let e0 = Float::with_val(s.working_bits, l.value.ln_ref());
    let r = rel(&e0, &parse(s.working_bits, "2.88181542992629678"));
    assert!(r < PUBLISHED_AGREEMENT, "E0 relative error {r:e}");
    assert!(
        l.error_estimate < PUBLISHED_AGREEMENT * l.value.to_f64(),
        "estimate {}",
        l.error_estimate
    );
}

#[test]
fn p2_two_lowest_energies() {
    // Local P² at ħ = 2π: E₀ = 2.56264206862381937, E₁ = 3.91821318829983977
    // (arXiv:1410.3382, 2014; from memory of that paper, confirmed independently). ≥ 12 digits.
    let opts = SpectrumOptions {
        levels: 0..=1,
        basis: 300,
        max_basis: 450,
        digits: 16,
        squeeze: 1.0,
    };
    let s = spectrum::solve(&family("P2"), &opts).unwrap();
    for (l, reference) in s
        .levels
        .iter()
        .zip(["2.56264206862381937", "3.91821318829983977"])
    {
        let e = Float::with_val(s.working_bits, l.value.ln_ref());
        let r = rel(&e, &parse(s.working_bits, reference));
        assert!(
            r < PUBLISHED_AGREEMENT,
            "level {}: relative error {r:e}",
            l.level
        );
        // The reported estimate must not be optimistic by more than a factor 10.
        let abs_err = r * e.to_f64() * l.value.to_f64();
        assert!(
            abs_err <= 10.0 * l.error_estimate.max(f64::MIN_POSITIVE),
            "level {}: {abs_err:e} vs estimate {:e}",
            l.level,
            l.error_estimate
        );
    }
}

#[test]
fn p2_traces_of_the_inverse() {
    // Tr Ô⁻¹ = 1/9 and Tr Ô⁻² = 1/27 − 1/(6√3π) for local P² at ħ = 2π (arXiv:1501.01014,
    // 2015; from memory), to ≥ 9 digits. The truncated traces are lower bounds that increase
    // with the basis (Rayleigh–Ritz; common practice).
    let p = 200;
    let ninth = Float::with_val(p, 1) / 9u32;
    let pi = Float::with_val(p, Constant::Pi);
    let root3 = Float::with_val(p, 3).sqrt();
    let second = Float::with_val(p, 1) / 27u32
        - Float::with_val(p, 1) / (Float::with_val(p, 6) * root3 * pi);
    let mut previous: Option<(Float, Float)> = None;
    for n in [120usize, 260] {
        let (t1, t2) = spectrum::trace_of_inverse_powers(&family("P2"), n, 20).unwrap();
        assert!(
            t1 < ninth && t2 < second,
            "N={n}: traces must be lower bounds"
        );
        if let Some((p1, p2)) = &previous {
            assert!(
                &t1 > p1 && &t2 > p2,
                "N={n}: traces must increase with the basis"
            );
        }
        previous = Some((t1, t2));
    }
    let (t1, t2) = previous.unwrap();
    assert!(
        rel(&t1, &ninth) < TRACE_AGREEMENT,
        "Tr O^-1: {:e}",
        rel(&t1, &ninth)
    );
    assert!(
        rel(&t2, &second) < TRACE_AGREEMENT,
        "Tr O^-2: {:e}",
        rel(&t2, &second)
    );
}

#[test]
fn eigenvalues_decrease_with_the_basis() {
    // Rayleigh–Ritz upper bounds (common practice of the method, no source): for every
    // family the truncated eigenvalues of levels 0..2 decrease from N = 60 to 90 to 135, and lie
    // above the classical minimum of φ.
    for id in ["F0", "P2", "dP3", "F1", "dP2"] {
        let opts = SpectrumOptions {
            levels: 0..=2,
            basis: 60,
            max_basis: 140,
            digits: 16,
            squeeze: 1.0,
        };
        let l = family(id);
        let s = spectrum::solve(&l, &opts).unwrap();
        assert_eq!(s.bases, vec![60, 90, 135], "{id}");
        let (_, threshold) = l.classical_minimum();
        for lev in &s.levels {
            assert!(
                lev.value.to_f64() > threshold,
                "{id} level {} below the threshold",
                lev.level
            );
        }
    }
}

#[test]
fn ground_state_wavefunction_is_normalized() {
    // ∫|ψ₀|² dr = 1 for the eigenvector's ψ on R (trapezoidal rule, spectrally accurate for
    // analytic decaying integrands; common practice), and ψ₀ of F0 is even up to a phase
    // (the operator commutes with r ↦ −r).
    let opts = SpectrumOptions {
        levels: 0..=0,
        basis: 120,
        max_basis: 180,
        digits: 16,
        squeeze: 1.0,
    };
    let s = spectrum::solve(&family("F0"), &opts).unwrap();
    let h = 0.05;
    let norm: f64 = (-800..=800)
        .map(|k| s.wavefunction(0, k as f64 * h).unwrap().norm_sqr() * h)
        .sum();
    assert!(
        (norm - 1.0).abs() < double(WAVEFUNCTION_LOSS),
        "norm {norm}"
    );
    let (a, b) = (
        s.wavefunction(0, 1.7).unwrap(),
        s.wavefunction(0, -1.7).unwrap(),
    );
    assert!(
        (a - b).norm() < double(WAVEFUNCTION_LOSS) * a.norm(),
        "{a} vs {b}"
    );
}

#[test]
fn multiprecision_solver_agrees_with_nalgebra_on_a_small_truncation() {
    // At N = 12 the truncated matrix is still mildly conditioned (entries ≲ 1e10), so a
    // general-purpose f64 symmetric eigensolver (nalgebra's SymmetricEigen) is accurate to
    // ~1e-6 relative there (ε·‖H‖·N / λ):
    // the lowest three eigenvalues of the same truncation must agree. Real (P2, mirror frame)
    // and complex (Q7, no det −1 symmetry) matrices; the complex one through its real symmetric
    // embedding (nalgebra 0.33's complex `symmetric_eigen` returned a vector with residual
    // O(1) on this matrix, so it is not used).
    for id in ["P2", "Q7"] {
        let l = family(id);
        let frame = oscillator::frame(&l, 1.0);
        let n = 12;
        // Row-major n×n, as a nalgebra matrix.
        let rows = spectrum::truncated_matrix_f64(&l, &frame, n, 200);
        let m = nalgebra::DMatrix::from_row_slice(n, n, &rows);
        // Real symmetric embedding [[Re, −Im], [Im, Re]]: every eigenvalue twice.
        let big = nalgebra::DMatrix::from_fn(2 * n, 2 * n, |i, j| {
            let z = m[(i % n, j % n)];
            match (i < n, j < n) {
                (true, true) | (false, false) => z.re,
                (true, false) => -z.im,
                (false, true) => z.im,
            }
        });
        let mut f64_values: Vec<f64> = big.symmetric_eigen().eigenvalues.iter().copied().collect();
        f64_values.sort_by(|a, b| a.partial_cmp(b).unwrap());
        let f64_values: Vec<f64> = f64_values.iter().step_by(2).copied().collect();
        let ours = spectrum::truncated_eigenvalues(&l, &frame, n, 3, 20).unwrap();
        for k in 0..3 {
            approx::assert_relative_eq!(
                ours[k].to_f64(),
                f64_values[k],
                max_relative = double(F64_EIGENSOLVER_LOSS)
            );
        }
        assert_eq!(frame.mirror.is_some(), id == "P2");
    }
}

#[test]
fn complex_and_real_matrices_give_the_same_spectrum_for_families_with_equal_periods() {
    // Observation (measured here, no published source): families whose constant-term
    // sequences [φⁿ]₀ coincide (Q5 and dP2; Q7 and dP2*; tests/constant_terms.rs, families_with_equal_boundary_counts_share_their_constant_terms) have the
    // same ground-state eigenvalue. Q5 and Q7 have no det −1 symmetry, so their truncated
    // operators are complex Hermitian, while dP2 and dP2* are computed as real symmetric ones:
    // agreement checks the complex code path against the real one.
    for (complex_id, real_id) in [("Q5", "dP2"), ("Q7", "dP2*")] {
        let opts = SpectrumOptions {
            levels: 0..=1,
            basis: 150,
            max_basis: 230,
            digits: 16,
            squeeze: 1.0,
        };
        let c = spectrum::solve(&family(complex_id), &opts).unwrap();
        let r = spectrum::solve(&family(real_id), &opts).unwrap();
        assert!(!c.real_matrix && r.real_matrix);
        for k in 0..2 {
            let tol = 10.0 * (c.levels[k].error_estimate + r.levels[k].error_estimate);
            let d = Float::with_val(200, &c.levels[k].value - &r.levels[k].value)
                .to_f64()
                .abs();
            assert!(
                d <= tol.max(ESTIMATE_FLOOR),
                "{complex_id} vs {real_id} level {k}: {d:e} (tol {tol:e})"
            );
        }
    }
}
