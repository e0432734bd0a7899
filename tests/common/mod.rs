//! Tolerances of the integration tests, all from the precision policy (`regwave::precision`):
//! a check states the digits (or bits) it may lose at the precision it runs at, never a bare
//! `1e-NN`. Each test file uses a part of this module.
#![allow(dead_code, unused_imports)]

pub use regwave::precision::{
    bits_for_digits, digits_of, tolerance, tolerance_digits, working_bits, DOUBLE_BITS,
};

/// The precisions at which the key invariants are checked: a double-extended, a quadruple and
/// an octuple word.
pub const LADDER_BITS: [u32; 3] = [64, 128, 256];

/// Relative tolerance of a double-precision check that may lose `lost` of its 15 digits.
pub fn double(lost: f64) -> f64 {
    tolerance_digits(DOUBLE_BITS, lost)
}

/// Relative tolerance of a result requested at `digits` decimal digits that may lose `lost` of
/// them (the bits of the request carry exactly `digits` digits).
pub fn requested(digits: u32, lost: f64) -> f64 {
    tolerance_digits(bits_for_digits(digits as f64), lost)
}

/// Digits the eigen-equation residual of a double-precision profile may lose: the issue's
/// requirement, residual ≤ 1e-9 (measured ≤ 9.2e-11 over the audits of all 15 families, levels
/// 0..4, and 2.2e-12 for the build of dP3 level 2).
pub const DOUBLE_RESIDUAL_LOSS: f64 = 6.0;

/// Digits of the 40 requested that the eigen-equation residual of a 40-digit profile may lose:
/// the requirement, residual ≤ 1e-30 (measured ≤ 1.5e-47 for F0 and P2 levels 0..4).
pub const HIGH_RESIDUAL_LOSS: f64 = 10.0;

/// Detection threshold of the negative controls off the attractor (the requirement: a
/// defect ≥ 1e-8 at a perturbed modulus); not a tolerance.
pub const NEGATIVE_CONTROL_MIN: f64 = 1e-8;
