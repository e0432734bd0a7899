//! General numerical tools the mathematics is built on: one complex-number trait over
//! `Complex64` and MPFR, Gauss–Legendre quadrature at any precision, dense Hermitian linear
//! algebra (Cholesky, Jacobi, inverse iteration) in MPFR.

pub mod complex;
pub mod hermitian;
pub mod quadrature;
