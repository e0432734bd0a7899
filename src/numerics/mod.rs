//! General numerical tools the mathematics is built on: one complex-number trait over
//! `Complex64` and MPFR, Gauss–Legendre quadrature at any precision, polynomial
//! roots, Laurent polynomials with exact coefficient arithmetic.

pub mod complex;
pub mod laurent_poly;
pub mod plane;
pub mod quadrature;
pub mod roots;
pub mod serial;
