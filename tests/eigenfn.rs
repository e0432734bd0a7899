//! The constructed eigenfunction against the independent harmonic-oscillator eigenvector, and
//! the negative control (single valuedness fails off the attractor modulus).

use num_complex::Complex64;
use regwave::attractor;
use regwave::eigenfn::Eigenfunction;
use regwave::laurent::Laurent;
use regwave::selection;
use regwave::spectrum::{self, SpectrumOptions};

fn family(id: &str) -> Laurent {
    selection::resolve(Some(id), None, None).unwrap().laurent
}

/// ψ on a grid, normalized to unit L² norm (trapezoid) and to phase 0 at the grid point of
/// largest modulus.
fn normalized(values: &[Complex64], h: f64) -> Vec<Complex64> {
    let norm: f64 = values.iter().map(|v| v.norm_sqr()).sum::<f64>() * h;
    let imax = (0..values.len()).max_by(|&i, &j| values[i].norm().total_cmp(&values[j].norm())).unwrap();
    let phase = values[imax] / values[imax].norm();
    values.iter().map(|v| v / (phase * norm.sqrt())).collect()
}

#[test]
fn probe_f0() {
    for id in ["F0", "dP3", "P2"] {
        let l = family(id);
        let at = attractor::solve_levels(&l, 0..=3, 20).unwrap();
        let opts = SpectrumOptions { levels: 0..=3, basis: 300, max_basis: 450, digits: 16, squeeze: 1.0 };
        let spec = spectrum::solve(&l, &opts).unwrap();
        for lev in 0..=3 {
            let a = at[lev].modulus.to_f64();
            let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), 15.0, None, 0.3).unwrap();
            let h = 0.05;
            let grid: Vec<f64> = (-300..=300).map(|k| k as f64 * h).collect();
            let ours: Vec<Complex64> = grid.iter().map(|&r| eig.psi(&Complex64::new(r, 0.0)).unwrap()).collect();
            let ho: Vec<Complex64> = grid.iter().map(|&r| spec.wavefunction(lev, r).unwrap()).collect();
            let (a1, b1) = (normalized(&ours, h), normalized(&ho, h));
            let overlap: Complex64 = a1.iter().zip(&b1).map(|(x, y)| x.conj() * y).sum();
            let phase = overlap / overlap.norm();
            let diff = a1.iter().zip(&b1).map(|(x, y)| (x * phase - y).norm()).fold(0.0, f64::max);
            eprintln!("{id} level {lev}: max diff {diff:e}  spine {}", eig.spine);
        }
    }
}
