//! The quantum curve at ħ = 2π and its independent spectrum.

pub mod quantum_curve;
pub mod spectrum;
