//! General numerical tools the mathematics is built on: one complex-number trait over
//! `Complex64` and MPFR, Gauss–Legendre quadrature at any precision.

pub mod complex;
pub mod quadrature;
