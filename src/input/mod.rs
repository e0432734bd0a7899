//! Requests read from text: families, vertices, coefficients, levels, moduli.

pub mod selection;
