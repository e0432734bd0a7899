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
