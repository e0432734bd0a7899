//! Where the two roots merge as x → 0 or ∞ (development aid for the continuation in `cover`):
//! `cargo run --release --example merging_roots -- F0* 1`.
//!
//! On the spine Im z = c at large |Re z| it prints the relative gap of the two roots, the relative
//! error in double precision of Δ evaluated as (B + a)² − 4AC and from the expanded polynomial
//! `Curve::discriminant_polynomial` (both against 256 bits), the error of a second-order predictor
//! over a node spacing of 0.3 for y (relative to the root gap) and for D (relative to |D|), and
//! the relative difference of ψ on R in double precision and at 40 digits.
mod common;

use num_complex::Complex64;
use regwave::curve::cover::Curve;
use regwave::eigenfunction::construction::Eigenfunction;
use regwave::numerics::complex::CNum;
use rug::Complex;

fn disc_expanded<T: CNum>(curve: &Curve<T>, x: &T) -> T {
    let (poly, k) = curve.discriminant_polynomial();
    let mut p = poly.last().unwrap().clone();
    for c in poly.iter().rev().skip(1) {
        p = p * x.clone() + c.clone();
    }
    p * x.powi(-k)
}

fn disc_direct<T: CNum>(curve: &Curve<T>, x: &T) -> T {
    let (a, b, c) = curve.coefficients(x);
    b.clone() * b - x.int_like(4) * a * c
}

fn main() {
    let (id, l, level) = common::family_and_level("F0*", 1);
    let bits = 256;
    let a_hi = regwave::curve::attractor::solve_levels(&l, level..=level, 40).expect("attractor")
        [0]
    .modulus
    .clone();
    let a = a_hi.to_f64();
    let curve = Curve::new(&l, Complex64::new(a, 0.0)).expect("curve");
    let curve_hi = Curve::new(&l, Complex::with_val(bits, (&a_hi, 0))).expect("curve");
    let eig = Eigenfunction::new(&l, Complex64::new(a, 0.0), None, 0.3).expect("eig");
    let prec40 = regwave::precision::with_guard(regwave::precision::bits_for_digits(40.0));
    let eig_hi =
        Eigenfunction::new(&l, Complex::with_val(prec40, (&a_hi, 0)), None, 0.3).expect("eig");
    let c = eig.spine;
    println!("{id} level {level}, a = {a}, spine Im z = {c:.4}");
    println!("    r   root gap  err Δ direct  err Δ expanded  y-pred err/gap  D-pred err/|D|  ψ f64 vs 40 digits");
    let h = Complex64::new(0.3, 0.0);
    for r in [
        -60.0, -45.0, -30.0, -20.0, -10.0, 10.0, 20.0, 30.0, 45.0, 60.0,
    ] {
        let z = Complex64::new(r, c);
        let x = Curve::x_of(&z);
        let x_hi = Curve::x_of(&Complex::with_val(bits, (r, c)));
        let exact = disc_expanded(&curve_hi, &x_hi).to_c64();
        let rel = |v: Complex64| (v - exact).norm() / exact.norm();
        let [y1_hi, y2] = curve_hi.roots(&Complex::with_val(bits, (r, c)));
        let (y1, y2) = (y1_hi.to_c64(), y2.to_c64());
        let gap = (y1 - y2).norm() / y1.norm();
        // The old predictor: y (1 + w + w²/2), w = h d log y/dz, against the continued root.
        let [n1, n2] = curve_hi.roots(&Complex::with_val(bits, (r + 0.3, c)));
        let (n1, n2) = (n1.to_c64(), n2.to_c64());
        let w = h * curve_hi
            .dlog_y(&Complex::with_val(bits, (r, c)), &y1_hi)
            .to_c64();
        let pred = y1 * (1.0 + w + w * w / 2.0);
        let next = if (n1 - pred).norm() < (n2 - pred).norm() {
            n1
        } else {
            n2
        };
        let y_err = (pred - next).norm() / (n1 - n2).norm();
        // The D predictor: D (1 + w + w²/2), w = h ½ d log Δ/dz.
        let f0 = curve_hi.fiber(&Complex::with_val(bits, (r, c)));
        let f1 = curve_hi.fiber(&Complex::with_val(bits, (r + 0.3, c)));
        let d0 = f0.disc.clone().sqrt().to_c64();
        let wd = h * f0.half_log_slope.to_c64();
        let dpred = d0 * (1.0 + wd + wd * wd / 2.0);
        let d1 = f1.disc.clone().sqrt().to_c64();
        let d_next = if (d1 - dpred).norm() < (d1 + dpred).norm() {
            d1
        } else {
            -d1
        };
        let d_err = (dpred - d_next).norm() / d_next.norm();
        let psi = eig.psi(&Complex64::new(r, 0.0));
        let psi_hi = eig_hi
            .psi(&Complex::with_val(prec40, (r, 0)))
            .expect("psi")
            .to_c64();
        // The two constructions share base point and normalization: compare directly.
        let psi_rel = match psi {
            Ok(p) => format!("{:.1e}", (p - psi_hi).norm() / psi_hi.norm()),
            Err(e) => format!("{e}"),
        };
        println!(
            "{r:>6}  {gap:.1e}  {:.1e}       {:.1e}         {y_err:.1e}          {d_err:.1e}         {psi_rel}",
            rel(disc_direct(&curve, &x)),
            rel(disc_expanded(&curve, &x)),
        );
    }
}
