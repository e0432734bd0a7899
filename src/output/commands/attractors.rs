//! `attractors`: the attractor moduli of a range of levels.

use super::{CommandError, FamilyRequest, Outcome};
use crate::curve::attractor;
use crate::input::numbers::parse_levels;
use crate::output::records::{pretty, AttractorsRecord, Document, Inputs, ATTRACTORS_NOTE};
use crate::output::tables::attractors_table;
use crate::precision::check_digits;
use serde::Serialize;
use std::time::Instant;

/// Which levels, how precisely.
#[derive(Debug, Clone)]
#[cfg_attr(feature = "cli", derive(clap::Args))]
pub struct AttractorsRequest {
    #[cfg_attr(feature = "cli", command(flatten))]
    pub family: FamilyRequest,
    /// Levels: an inclusive range A..B or one level n.
    #[cfg_attr(feature = "cli", arg(long, default_value = super::defaults::LEVELS, allow_hyphen_values = true))]
    pub levels: String,
    /// Decimal digits wanted (8 to 1000).
    #[cfg_attr(feature = "cli", arg(long, default_value_t = super::defaults::DIGITS, allow_negative_numbers = true))]
    pub digits: u32,
}

#[derive(Serialize)]
struct Options {
    levels: [usize; 2],
    digits: u32,
}

/// Solves ν(a) = n + 1 for the requested levels.
///
/// # Errors
/// See [`CommandError`].
pub fn attractors(request: &AttractorsRequest) -> Result<Outcome, CommandError> {
    check_digits(request.digits)?;
    let sel = request.family.resolve()?;
    let levels = parse_levels(&request.levels)?;
    attractor::check_reach(&levels)?;
    let start = Instant::now();
    let list = attractor::solve_levels(&sel.laurent, levels.clone(), request.digits)?;
    let elapsed = start.elapsed().as_secs_f64();
    let inputs = Inputs {
        family: request.family.inputs(&sel),
        options: Options {
            levels: [*levels.start(), *levels.end()],
            digits: request.digits,
        },
    };
    let id = sel.family.id;
    let doc = Document::new(
        AttractorsRecord::new(id, &list, request.digits),
        inputs,
        list.first().map(|a| a.precision_bits),
        elapsed,
    )
    .noting(ATTRACTORS_NOTE);
    let text = attractors_table(id, &list, request.digits, elapsed);
    Ok(Outcome::printed(pretty(&doc), text, elapsed))
}
