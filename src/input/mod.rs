//! Requests read from text: families (catalogue ids or vertex lists with coefficients), levels,
//! moduli, grids. Every reader names what it could not read.

pub mod coefficients;
pub mod grid;
pub mod numbers;
pub mod selection;
mod tokens;
pub mod vertices;
