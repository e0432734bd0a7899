//! General numerical tools the mathematics is built on, independent of it: one complex-number
//! trait over `Complex64` and MPFR, Gauss–Legendre quadrature at any precision, polynomial
//! roots, Laurent polynomials with exact coefficient arithmetic, dense Hermitian linear algebra
//! (Cholesky, Jacobi, inverse iteration) in MPFR, planar geometry for path layout, integer relations (PSLQ), and the
//! serialization of numbers with every computed digit.

pub mod complex;
pub mod hermitian;
pub mod laurent_poly;
pub mod plane;
pub mod pslq;
pub mod quadrature;
pub mod roots;
pub mod serial;
