//! The small complex-number trait that lets one algorithm run in double precision
//! ([`num_complex::Complex64`]) and at any precision ([`rug::Complex`], MPC).
//!
//! Precision is explicit: constructors take the precision in bits, and every value created from
//! another (`*_like`) inherits that value's precision. For `Complex64` the precision arguments
//! are ignored (53 bits). Constants (π, 2πi, ħ = 2π) are always made at the precision of the
//! values they meet: one constant left at 53 bits caps a whole computation at 1e-15.

use num_complex::Complex64;
use rug::float::Constant;
use rug::{Complex, Float};
use std::fmt::Debug;
use std::ops::{Add, Div, Mul, Neg, Sub};

/// A complex field element at a known precision.
pub trait CNum:
    Clone
    + Debug
    + Add<Output = Self>
    + Sub<Output = Self>
    + Mul<Output = Self>
    + Div<Output = Self>
    + Neg<Output = Self>
{
    /// Working precision in bits (53 for `Complex64`).
    fn prec(&self) -> u32;
    /// `re + i·im` at `prec` bits.
    fn from_f64s(re: f64, im: f64, prec: u32) -> Self;
    /// An integer at `prec` bits.
    fn from_i64(n: i64, prec: u32) -> Self;
    /// An integer at the precision of `self`.
    fn int_like(&self, n: i64) -> Self {
        Self::from_i64(n, self.prec())
    }
    /// π at the precision of `self`.
    fn pi_like(&self) -> Self;
    /// The imaginary unit at the precision of `self`.
    fn i_like(&self) -> Self;
    fn exp(&self) -> Self;
    /// Principal logarithm.
    fn ln(&self) -> Self;
    /// Principal square root.
    fn sqrt(&self) -> Self;
    /// Integer power (negative allowed).
    fn powi(&self, n: i64) -> Self;
    fn conj(&self) -> Self;
    /// |z| rounded to f64.
    fn abs_f64(&self) -> f64;
    /// log₁₀|z| in f64, also where |z| itself leaves f64's range (−∞ at 0, NaN for NaN).
    fn log10_abs(&self) -> f64;
    /// |z| as a (real) value of this type: keeps magnitudes outside f64's range.
    fn abs_like(&self) -> Self;
    /// log₂|z| in f64 (−∞ at 0): compares magnitudes outside f64's range.
    fn log2_abs(&self) -> f64;
    /// Re z rounded to f64.
    fn re_f64(&self) -> f64;
    /// Im z rounded to f64.
    fn im_f64(&self) -> f64;
    /// z rounded to `Complex64`.
    fn to_c64(&self) -> Complex64 {
        Complex64::new(self.re_f64(), self.im_f64())
    }
    /// Re z and Im z as decimal strings with every digit of the working precision (enough to
    /// read back the same binary value).
    fn decimal_parts(&self) -> (String, String);
    /// A real MPFR value as a value of this type at `prec` bits (rounded to f64 for
    /// `Complex64`).
    fn from_real(x: &Float, prec: u32) -> Self;
    /// z as an MPC value at its own precision (exact).
    fn to_complex(&self) -> Complex;
    /// An MPC value as a value of this type at `prec` bits (rounded to `Complex64` in double
    /// precision).
    fn from_complex(z: &Complex, prec: u32) -> Self;
}

impl CNum for Complex64 {
    fn prec(&self) -> u32 {
        53
    }
    fn from_f64s(re: f64, im: f64, _prec: u32) -> Self {
        Complex64::new(re, im)
    }
    fn from_i64(n: i64, _prec: u32) -> Self {
        Complex64::new(n as f64, 0.0)
    }
    fn pi_like(&self) -> Self {
        Complex64::new(std::f64::consts::PI, 0.0)
    }
    fn i_like(&self) -> Self {
        Complex64::new(0.0, 1.0)
    }
    fn exp(&self) -> Self {
        Complex64::exp(*self)
    }
    fn ln(&self) -> Self {
        Complex64::ln(*self)
    }
    fn sqrt(&self) -> Self {
        Complex64::sqrt(*self)
    }
    fn powi(&self, n: i64) -> Self {
        Complex64::powi(self, n as i32)
    }
    fn conj(&self) -> Self {
        Complex64::conj(self)
    }
    fn abs_f64(&self) -> f64 {
        self.norm()
    }
    fn log10_abs(&self) -> f64 {
        self.norm().log10()
    }
    fn abs_like(&self) -> Self {
        Complex64::new(self.norm(), 0.0)
    }
    fn log2_abs(&self) -> f64 {
        self.norm().log2()
    }
    fn re_f64(&self) -> f64 {
        self.re
    }
    fn im_f64(&self) -> f64 {
        self.im
    }
    fn decimal_parts(&self) -> (String, String) {
        // Rust's shortest round-trip rendering of a double.
        (format!("{:?}", self.re), format!("{:?}", self.im))
    }
    fn from_real(x: &Float, _prec: u32) -> Self {
        Complex64::new(x.to_f64(), 0.0)
    }
    fn to_complex(&self) -> Complex {
        Complex::with_val(53, (self.re, self.im))
    }
    fn from_complex(z: &Complex, _prec: u32) -> Self {
        Complex64::new(z.real().to_f64(), z.imag().to_f64())
    }
}

impl CNum for Complex {
    fn prec(&self) -> u32 {
        self.prec().0
    }
    fn from_f64s(re: f64, im: f64, prec: u32) -> Self {
        Complex::with_val(prec, (re, im))
    }
    fn from_i64(n: i64, prec: u32) -> Self {
        Complex::with_val(prec, n)
    }
    fn pi_like(&self) -> Self {
        let p = CNum::prec(self);
        Complex::with_val(p, Float::with_val(p, Constant::Pi))
    }
    fn i_like(&self) -> Self {
        Complex::with_val(CNum::prec(self), (0, 1))
    }
    fn exp(&self) -> Self {
        self.clone().exp()
    }
    fn ln(&self) -> Self {
        self.clone().ln()
    }
    fn sqrt(&self) -> Self {
        self.clone().sqrt()
    }
    fn powi(&self, n: i64) -> Self {
        // Binary powering by multiplication (MPC's pow goes through log/exp: slow and less exact).
        let p = CNum::prec(self);
        let mut base = if n < 0 {
            Complex::with_val(p, self.recip_ref())
        } else {
            self.clone()
        };
        let mut e = n.unsigned_abs();
        let mut acc = Complex::with_val(p, 1);
        while e > 0 {
            if e & 1 == 1 {
                acc *= &base;
            }
            e >>= 1;
            if e > 0 {
                base = Complex::with_val(p, base.square_ref());
            }
        }
        acc
    }
    fn conj(&self) -> Self {
        self.clone().conj()
    }
    fn abs_f64(&self) -> f64 {
        // Rounded parts, then hypot in f64 (these values steer steps and root choices; a
        // full-precision modulus costs ~1 µs). Falls back when the parts leave f64's range.
        let v = self.real().to_f64().hypot(self.imag().to_f64());
        if v.is_finite() && (v > 1e-300 || (self.real().is_zero() && self.imag().is_zero())) {
            v
        } else {
            Float::with_val(CNum::prec(self), self.abs_ref()).to_f64()
        }
    }
    fn log10_abs(&self) -> f64 {
        let v = self.abs_f64();
        if v.is_nan() || (v > 1e-300 && v.is_finite()) {
            v.log10()
        } else {
            Float::with_val(CNum::prec(self), self.abs_ref())
                .log10()
                .to_f64()
        }
    }
    fn abs_like(&self) -> Self {
        Complex::with_val(CNum::prec(self), self.abs_ref())
    }
    fn log2_abs(&self) -> f64 {
        let a = Float::with_val(CNum::prec(self), self.abs_ref());
        if a.is_zero() {
            return f64::NEG_INFINITY;
        }
        let (m, e) = a.to_f64_exp();
        m.log2() + e as f64
    }
    fn re_f64(&self) -> f64 {
        self.real().to_f64()
    }
    fn im_f64(&self) -> f64 {
        self.imag().to_f64()
    }
    fn decimal_parts(&self) -> (String, String) {
        (
            crate::numerics::serial::float_text(self.real()),
            crate::numerics::serial::float_text(self.imag()),
        )
    }
    fn from_real(x: &Float, prec: u32) -> Self {
        Complex::with_val(prec, (x, 0))
    }
    fn to_complex(&self) -> Complex {
        self.clone()
    }
    fn from_complex(z: &Complex, prec: u32) -> Self {
        Complex::with_val(prec, z)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::precision::{tolerance, DOUBLE_BITS};

    /// Bits e^{iπ} + 1 may lose: π is rounded to half an ulp, 2^{1−bits}, and the exponential
    /// adds one rounding (measured 0.1, −0.1, −0.6 and 0.7 bits at 53, 64, 128 and 256 bits).
    const EULER_LOSS_BITS: u32 = 3;
    /// Bits √π² − π may lose: two roundings relative to π ≈ 2^1.65 (measured 0 at 64, 128, 256
    /// and 300 bits).
    const SQRT_LOSS_BITS: u32 = 4;

    fn euler_identity<T: CNum>(one: T) -> f64 {
        // e^{iπ} + 1 = 0 (Handbook of Mathematical Functions (1964) 4.3.1 with z = iπ).
        let z = one.i_like() * one.pi_like();
        (z.exp() + one.int_like(1)).abs_f64()
    }

    #[test]
    fn one_algorithm_every_precision() {
        let e = euler_identity(Complex64::new(1.0, 0.0));
        assert!(e < tolerance(DOUBLE_BITS, EULER_LOSS_BITS), "{e}");
        for bits in [64, 128, 256] {
            let e = euler_identity(Complex::with_val(bits, 1));
            assert!(e < tolerance(bits, EULER_LOSS_BITS), "{bits} bits: {e}");
        }
    }

    #[test]
    fn constants_follow_the_precision() {
        for bits in [64, 128, 256, 300] {
            let x = Complex::with_val(bits, 1);
            assert_eq!(CNum::prec(&x.pi_like()), bits);
            let p = x.pi_like().sqrt().powi(2) - x.pi_like();
            assert!(p.abs_f64() < tolerance(bits, SQRT_LOSS_BITS), "{bits} bits");
        }
    }
}

/// `z` as readable text for messages, e.g. `234.836928+3.141593i`.
pub fn show(z: Complex64) -> String {
    format!("{:.6}{:+.6}i", z.re, z.im)
}
