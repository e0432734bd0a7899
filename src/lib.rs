//! # regwave
//!
//! Eigenfunctions of quantized mirror curves at ħ = 2π, built from the Beilinson regulator on the
//! elliptic curves `φ(x, y) + a = 0` of the strip reflexive polygons, and checked against an
//! independent harmonic-oscillator spectrum. All results are numerical evidence with stated
//! precision, not proofs.
//!
//! ## Quick start
//!
//! The attractor moduli of the family F0 (φ = x + 1/x + y + 1/y) at 30 digits, and the
//! eigenfunction of level 1 with its eigen-equation residual:
//!
//! ```
//! use regwave::{build_profile, family, solve_levels, Grid, ProfileOptions, Target};
//!
//! let f0 = family("F0")?; // the tempered Laurent polynomial of the catalogue entry
//! // Attractor moduli: the moduli where the higher normal function is ν(a_n) = n + 1.
//! let moduli = solve_levels(&f0, 0..=1, 30)?;
//! assert!(moduli[0].modulus.to_string().starts_with("17.84664311804479928238999"));
//! // ψ on a grid of R and on the lines Im r = ±2π, normalized, with the residual of
//! // A ψ(r − 2πi) + C ψ(r + 2πi) = (B + a) ψ(r), each side integrated along its own route.
//! let options = ProfileOptions {
//!     grid: Grid::parse("-6:6:61")?,
//!     strip: true,
//!     digits: 16,
//!     allow_non_attractor: false,
//! };
//! let psi = build_profile(&f0, &Target::Attractor(moduli[1].clone()), &options)?;
//! assert!(psi.residual.as_ref().unwrap().max.unwrap() < 1e-10);
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```
//!
//! ## The pipeline, layer by layer
//! - [`lattice`]: reflexive polygons, strip forms, the catalogue of the 16 classes.
//! - [`curve`]: the tempered Laurent polynomial φ = A y + B + C/y and its constant terms; the
//!   double cover of the z-plane (x = −e^z) and root continuation along paths; the periods Ω and
//!   regulator periods R over the cycles α and β, τ and the higher normal function ν; the
//!   attractor moduli.
//! - [`operator`]: the quantum curve at ħ = 2π and its independent spectrum in a
//!   harmonic-oscillator basis.
//! - [`eigenfunction`]: χ on the cover and ψ = (χ − χ∘ι̃)/D, its poles, normalization and phase,
//!   sampled profiles.
//! - [`checks`]: the residual, single-valuedness, eigenvector agreement, zeros, norms, the ν scan,
//!   and audits matching attractor moduli and eigenvalues both ways.
//! - [`output`]: JSON records, tables, Markdown, CSV, figures, atomic files, and the commands of
//!   the `regwave` binary.
//! - Underneath: [`numerics`] (the number trait over `Complex64` and MPFR, quadrature, roots,
//!   MPFR linear algebra, serialization), [`precision`] (every precision rule), [`input`]
//!   (reading requests from text), [`progress`] (typed progress events).
//!
//! The mathematics, its conventions and what each check can and cannot detect are in
//! `docs/MATHEMATICS.md`; the sources in `docs/REFERENCES.md`; the architecture and where new code
//! goes in `DEVELOPERS.md`.
//!
//! ## Features
//! `cli` (clap, indicatif: the binary) and `figures` (resvg, svg2pdf and an embedded font) are on
//! by default; `default-features = false` leaves the mathematics with rug, rayon and serde only.

#![forbid(unsafe_code)]

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

pub use checks::audit::{run as run_audit, Audit, AuditOptions};
pub use curve::attractor::{solve_levels, Attractor};
pub use curve::laurent::Laurent;
pub use curve::periods::{compare as compare_periods, periods, Comparison, CyclePeriods, Periods};
pub use eigenfunction::profile::{build as build_profile, Profile, ProfileOptions, Target};
pub use input::grid::Grid;
pub use input::selection::SelectionError;
pub use num_complex::Complex64;
pub use operator::spectrum::{solve as solve_spectrum, Spectrum, SpectrumOptions};
pub use rug::{Complex, Float};

/// The version of this tool, recorded in every output.
pub const TOOL_VERSION: &str = env!("CARGO_PKG_VERSION");

/// The tempered Laurent polynomial φ of a catalogue family (`"F0"`, `"P2"`, `"dP3"`, …; see
/// [`lattice::catalogue::all`]), in its canonical strip form.
///
/// # Errors
/// [`SelectionError`] for an unknown id or the one class without a strip form.
///
/// ```
/// let p2 = regwave::family("P2").unwrap();
/// assert_eq!(p2.to_string(), "y + x + 1/xy");
/// assert!(regwave::family("P2*").is_err()); // lattice width 3: no strip form
/// ```
pub fn family(id: &str) -> Result<Laurent, SelectionError> {
    Ok(input::selection::resolve(Some(id), None, None)?.laurent)
}
