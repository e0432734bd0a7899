//! `check`: every check of one eigenfunction, without writing samples.

use super::{CommandError, FamilyRequest, Outcome, TargetRequest};
use crate::checks::level::{self, CheckOptions};
use crate::input::grid::Grid;
use crate::output::records::{pretty, CheckRecord, Document, GridRecord, Inputs};
use crate::output::tables::check_text;
use crate::precision::check_digits;
use serde::Serialize;
use std::time::Instant;

/// Which eigenfunction, on which grid, how precisely.
#[derive(Debug, Clone)]
#[cfg_attr(feature = "cli", derive(clap::Args))]
pub struct CheckRequest {
    #[cfg_attr(feature = "cli", command(flatten))]
    pub family: FamilyRequest,
    #[cfg_attr(feature = "cli", command(flatten))]
    pub target: TargetRequest,
    /// Grid of real parts R0:R1:N for the residual.
    #[cfg_attr(
        feature = "cli",
        arg(long, default_value = super::defaults::GRID, allow_hyphen_values = true)
    )]
    pub grid: String,
    /// Decimal digits (8 to 1000; 16 or less: double precision where it suffices).
    #[cfg_attr(feature = "cli", arg(long, default_value_t = super::defaults::DIGITS, allow_negative_numbers = true))]
    pub digits: u32,
}

#[derive(Serialize)]
struct Options {
    level: Option<usize>,
    modulus: Option<String>,
    grid: String,
    grid_read: GridRecord,
    digits: u32,
}

/// Relative perturbation of the modulus for the negative control.
pub const PERTURBATION: f64 = 1e-6;

/// Runs every check of the eigenfunction.
///
/// # Errors
/// See [`CommandError`].
pub fn check(request: &CheckRequest) -> Result<Outcome, CommandError> {
    let start = Instant::now();
    check_digits(request.digits)?;
    let sel = request.family.resolve()?;
    let grid = Grid::parse(&request.grid)?;
    let target = request.target.target(&sel, request.digits)?;
    let options = CheckOptions {
        grid,
        digits: request.digits,
        allow_non_attractor: request.target.allow_non_attractor,
        perturbation: PERTURBATION,
    };
    let c = level::check(&sel.laurent, &target, &options)?;
    let elapsed = start.elapsed().as_secs_f64();
    let inputs = Inputs {
        family: request.family.inputs(&sel),
        options: Options {
            level: request.target.level,
            modulus: request.target.modulus.clone(),
            grid: request.grid.clone(),
            grid_read: GridRecord::new(&options.grid),
            digits: request.digits,
        },
    };
    let id = sel.family.id;
    let doc = Document::new(
        CheckRecord::new(id, &c),
        inputs,
        Some(c.level.profile.precision_bits),
        elapsed,
    );
    Ok(Outcome::printed(
        pretty(&doc),
        check_text(id, &c, elapsed),
        elapsed,
    ))
}
