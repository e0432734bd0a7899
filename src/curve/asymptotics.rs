//! The perturbative asymptotics of the attractor moduli: the gap between the quantization
//! volume of level n, 4π²(n + ½), and its leading term Area(Δ°)·E², E = log a_n.
//!
//! # Formula
//! The perturbative quantization condition at ħ = 2π reads `vol(E) = 4π²(n + ½)` with
//! `vol(E) = Area(Δ°)·E² + V₀ + O(E e^{−cE})`, Δ° the polar polygon of φ's Newton polygon
//! (published for F0 and P2 in arXiv:1410.3382: V₀ = −4π²/3 and −π², i.e.
//! log a_n ≈ π√(n + 5/6) and π√(2(4n + 3)/9)). [`volume_gap`] returns
//! `Area(Δ°)·E_n² − 4π²(n + ½)`, which tends to −V₀ with exponentially small corrections; it
//! is a sanity check of the attractor moduli at high levels, not an independent method.
//!
//! # Accuracy
//! At the precision of E_n.
//!
//! # References
//! "Topological strings from quantum mechanics", arXiv:1410.3382 (2014).

use crate::lattice::polygon::{Polygon, PolygonError};
use rug::Float;

/// Twice the area of the polar polygon Δ° of the Newton polygon with the given points.
///
/// # Errors
/// [`PolygonError`] when the points span no reflexive polygon.
pub fn polar_twice_area(points: &[[i64; 2]]) -> Result<i64, PolygonError> {
    Ok(Polygon::from_points(points)?.polar_dual()?.twice_area())
}

/// `Area(Δ°)·E² − 4π²(n + ½)` at E = `log_modulus` (precision of `log_modulus`).
pub fn volume_gap(polar_twice_area: i64, log_modulus: &Float, level: usize) -> Float {
    let bits = log_modulus.prec();
    let area_e2 = Float::with_val(bits, log_modulus.square_ref()) * polar_twice_area / 2u32;
    let pi = Float::with_val(bits, rug::float::Constant::Pi);
    let four_pi2 = Float::with_val(bits, pi.square_ref()) * 4u32;
    let half_level = Float::with_val(bits, 2 * level + 1) / 2u32;
    area_e2 - four_pi2 * half_level
}
