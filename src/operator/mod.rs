//! The quantum curve at ħ = 2π, the harmonic-oscillator basis it is truncated in, and its
//! independent spectrum.

pub mod oscillator;
pub mod quantum_curve;
pub mod spectrum;
