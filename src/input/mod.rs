//! Requests read from text: families, vertices, coefficients, levels, moduli, grids.

pub mod grid;
pub mod selection;
