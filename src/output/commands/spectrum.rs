//! `spectrum`: independent eigenvalues from the harmonic-oscillator basis.

use super::{CommandError, FamilyRequest, Outcome};
use crate::input::numbers::parse_levels;
use crate::operator::spectrum::{self, SpectrumOptions};
use crate::output::records::{pretty, Document, Inputs, SpectrumRecord, SPECTRUM_NOTE};
use crate::output::tables::spectrum_table;
use crate::precision::check_digits;
use serde::Serialize;
use std::time::Instant;

/// What to solve.
#[derive(Debug, Clone)]
#[cfg_attr(feature = "cli", derive(clap::Args))]
pub struct SpectrumRequest {
    #[cfg_attr(feature = "cli", command(flatten))]
    pub family: FamilyRequest,
    /// Levels: an inclusive range A..B or one level n.
    #[cfg_attr(feature = "cli", arg(long, default_value = super::defaults::LEVELS, allow_hyphen_values = true))]
    pub levels: String,
    /// Basis size N: solve at N and 3N/2 only (default: adaptive from 200 up to --max-basis).
    #[cfg_attr(feature = "cli", arg(long, allow_negative_numbers = true))]
    pub basis: Option<usize>,
    /// Largest basis of the adaptive ladder 200, 300, 450, 675, 1013, ... (it stops once the
    /// digits are reached).
    #[cfg_attr(
        feature = "cli",
        arg(long, default_value_t = 1013, allow_negative_numbers = true)
    )]
    pub max_basis: usize,
    /// Decimal digits wanted (8 to 1000).
    #[cfg_attr(feature = "cli", arg(long, default_value_t = super::defaults::DIGITS, allow_negative_numbers = true))]
    pub digits: u32,
}

#[derive(Serialize)]
struct Options {
    levels: [usize; 2],
    basis: Option<usize>,
    max_basis: usize,
    digits: u32,
}

/// Solves the spectrum of the requested levels.
///
/// # Errors
/// See [`CommandError`].
pub fn spectrum(request: &SpectrumRequest) -> Result<Outcome, CommandError> {
    check_digits(request.digits)?;
    let sel = request.family.resolve()?;
    let levels = parse_levels(&request.levels)?;
    let (basis, max_basis) = match request.basis {
        Some(n) => (n, spectrum::next_basis(n)),
        None => (
            200.max(spectrum::minimum_basis(*levels.end())),
            request.max_basis,
        ),
    };
    let options = SpectrumOptions {
        levels: levels.clone(),
        basis,
        max_basis,
        digits: request.digits,
        squeeze: 1.0,
    };
    spectrum::validate(&options)?;
    let needed = spectrum::peak_memory(&sel.laurent, &options);
    super::check_memory(
        &format!(
            "the spectrum of levels {}..{} with bases up to {}",
            levels.start(),
            levels.end(),
            spectrum::ladder(&options).last().copied().unwrap_or(basis)
        ),
        needed,
    )?;
    let start = Instant::now();
    let spec = spectrum::solve(&sel.laurent, &options)?;
    let elapsed = start.elapsed().as_secs_f64();
    let inputs = Inputs {
        family: request.family.inputs(&sel),
        options: Options {
            levels: [*levels.start(), *levels.end()],
            basis: request.basis,
            max_basis,
            digits: request.digits,
        },
    };
    let id = sel.family.id;
    let doc = Document::new(
        SpectrumRecord::new(id, &spec, request.digits),
        inputs,
        Some(spec.working_bits),
        elapsed,
    )
    .noting(SPECTRUM_NOTE);
    let text = spectrum_table(id, &spec, request.digits, elapsed);
    Ok(Outcome::printed(pretty(&doc), text, elapsed))
}
