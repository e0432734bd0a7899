//! # regwave
//!
//! Eigenfunctions of quantized mirror curves at ħ = 2π, built from the Beilinson regulator on the
//! elliptic curves `φ(x, y) + a = 0` of the strip reflexive polygons, and checked against an
//! independent harmonic-oscillator spectrum.
//!
//! Modules follow the mathematical objects (see `DEVELOPERS.md` for the architecture and
//! `docs/REFERENCES.md` for the bibliography):
//! - [`curve::attractor`]: attractor moduli (ν(a) ∈ Z) to any precision, with level labels.
//! - [`checks::audit`]: attractor moduli matched to the independent spectrum both ways, and every
//!   level's eigenfunction checked.
//! - [`lattice::polygon`]: lattice polygons, reflexivity, GL₂(Z) normal form, strip form.
//! - [`lattice::catalogue`]: the 16 reflexive classes, 15 with a canonical strip form.
//! - [`curve::laurent`]: the tempered Laurent polynomial φ, its strip decomposition
//!   `A y + B + C/y`, and the exact constant terms `[φⁿ]₀`.
//! - [`curve::constant_terms`]: the exact constant terms `[φⁿ]₀` and the P-recursive
//!   recurrence they satisfy, guessed and checked exactly.
//! - [`operator::quantum_curve`]: the quantum curve at ħ = 2π in shift form.
//! - [`curve::periods`]: Ω and R over α and β, τ and the higher normal function ν.
//! - [`operator::spectrum`]: the independent harmonic-oscillator diagonalization.
//! - [`curve::cover`]: the double cover over the z-plane, branch points, root continuation.
//! - [`eigenfunction::construction`]: χ on the cover, ψ = (χ − χ∘ι̃)/D at attractor moduli.
//! - [`eigenfunction::profile`]: the sampled, normalized eigenfunction on a grid with its
//!   residual, at a working precision that keeps the reported digits real.
//! - [`output::figures`]: audits and profiles laid out as figures (SVG documents with captions).
//! - [`numerics::complex`]: the small complex-number trait shared by the f64 and MPFR paths.
//! - [`numerics::quadrature`]: Gauss–Legendre rules at any precision, cached.
//! - [`precision`]: digits ↔ bits, guard bits and tolerances in one place.
//! - [`input::selection`]: command-line selections (family id or vertices, level ranges) resolved.
//! - [`checks::verify`]: the checks of docs/MATHEMATICS.md §7 as measured figures (route dependence, Cauchy
//!   integrals, eigenvector agreement, zeros, orthogonality, norm, the ν scan).
//! - [`output::report`]: JSON documents and human tables (pure formatting, no I/O).
//! - [`output::plot`]: figures as SVG strings and PNG bytes from plain data (no I/O): stacked
//!   profiles, strip heat maps, residuals, ν(a) with its attractors, agreement digits.

pub mod checks;
pub mod curve;
pub mod eigenfunction;
pub mod input;
pub mod lattice;
pub mod numerics;
pub mod operator;
pub mod output;
pub mod precision;
pub mod progress;

/// The version of this tool, recorded in every output.
pub const TOOL_VERSION: &str = env!("CARGO_PKG_VERSION");
