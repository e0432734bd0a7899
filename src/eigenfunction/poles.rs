//! The poles of ψ on the boundary lines Im r = ±2π of the strip.
//!
//! # Formula
//! ψ has a pole at +2πi of order ℓ_C when C(−1) = 0 and at −2πi of order ℓ_A when A(−1) = 0
//! (ℓ the order of the zero at x = −1); in the eigen-equation the zeros of C resp. A at r = 0
//! cancel them.
//!
//! # Accuracy
//! Exact (integer orders from the strip parts). Measured: |ψ(±2πi + ε)| ∝ ε^{−ℓ}
//! (`examples/pole_probe.rs`).
//!
//! # References
//! `docs/MATHEMATICS.md` §2.

use crate::curve::cover::Curve;
use crate::numerics::complex::CNum;

/// A pole of ψ in the closed strip |Im z| ≤ 2π.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Pole {
    /// Its position (re, im).
    pub at: [f64; 2],
    /// Its order.
    pub order: usize,
}

/// Where ψ has poles in the closed strip |Im z| ≤ 2π (docs/MATHEMATICS.md §2: families with a horizontal top
/// or bottom edge): at +2πi of order ℓ_C and at −2πi of order ℓ_A, the orders of the zeros of C
/// and A at x = −1 (measured, `examples/pole_probe.rs`: |ψ(±2πi + ε)| ∝ ε^{−ℓ} for the eight
/// families with punctures probed).
pub fn strip_poles<T: CNum>(curve: &Curve<T>) -> Vec<Pole> {
    let two_pi = 2.0 * std::f64::consts::PI;
    let Ok((la, lc)) = curve.puncture_orders() else {
        return Vec::new();
    };
    let mut out = Vec::new();
    if lc > 0 {
        out.push(Pole {
            at: [0.0, two_pi],
            order: lc,
        });
    }
    if la > 0 {
        out.push(Pole {
            at: [0.0, -two_pi],
            order: la,
        });
    }
    out
}
