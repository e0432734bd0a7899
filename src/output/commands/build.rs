//! `build`: the eigenfunction at an attractor modulus, sampled on a grid of R (and the boundary
//! lines of the strip), written as CSV with a JSON sidecar.

use super::{CommandError, FamilyRequest, Outcome, TargetRequest};
use crate::eigenfunction::profile::{self, ProfileOptions};
use crate::input::grid::Grid;
use crate::output::csv;
use crate::output::files::{Destination, OutputFile, Replace};
use crate::output::records::{pretty, Document, GridRecord, Inputs, ProfileRecord};
use crate::precision::check_digits;
use crate::progress::Observer;
use serde::Serialize;
use std::path::PathBuf;
use std::time::Instant;

/// What to build and where to write it.
#[derive(Debug, Clone)]
#[cfg_attr(feature = "cli", derive(clap::Args))]
pub struct BuildRequest {
    #[cfg_attr(feature = "cli", command(flatten))]
    pub family: FamilyRequest,
    #[cfg_attr(feature = "cli", command(flatten))]
    pub target: TargetRequest,
    /// Grid of real parts R0:R1:N.
    #[cfg_attr(
        feature = "cli",
        arg(long, default_value = super::defaults::GRID, allow_hyphen_values = true)
    )]
    pub grid: String,
    /// Also write the lines Im r = +2 pi and -2 pi (psi_up.csv, psi_down.csv) and form the
    /// eigen-equation residual (per grid point in residual.csv).
    #[cfg_attr(feature = "cli", arg(long))]
    pub strip: bool,
    /// Decimal digits of the working precision (8 to 1000; 16 or less: double precision where
    /// it suffices).
    #[cfg_attr(feature = "cli", arg(long, default_value_t = super::defaults::DIGITS, allow_negative_numbers = true))]
    pub digits: u32,
    /// Output directory.
    #[cfg_attr(feature = "cli", arg(long, default_value = "out/build"))]
    pub out: PathBuf,
    /// Replace existing outputs.
    #[cfg_attr(feature = "cli", arg(long = "force"))]
    pub replace: bool,
}

#[derive(Serialize)]
struct Options {
    level: Option<usize>,
    modulus: Option<String>,
    grid: String,
    grid_read: GridRecord,
    strip: bool,
    digits: u32,
}

/// The names of the files `build` writes.
pub fn build_files(strip: bool) -> Vec<&'static str> {
    if strip {
        vec![
            "psi.csv",
            "psi_up.csv",
            "psi_down.csv",
            "residual.csv",
            "psi.json",
        ]
    } else {
        vec!["psi.csv", "psi.json"]
    }
}

/// Builds the eigenfunction and writes `psi.csv` (with the strip: `psi_up.csv`, `psi_down.csv`,
/// `residual.csv`) and `psi.json` into the output directory; `progress` is told of the stages.
///
/// # Errors
/// See [`CommandError`]; an unwritable output directory and existing outputs are refused
/// (before computing; existing ones unless `replace`).
pub fn build(request: &BuildRequest, progress: Observer<'_>) -> Result<Outcome, CommandError> {
    let start = Instant::now();
    check_digits(request.digits)?;
    let sel = request.family.resolve()?;
    let grid = Grid::parse(&request.grid)?;
    let target = request.target.target(&sel, request.digits)?;
    let files = build_files(request.strip);
    let destination = Destination::prepare(&request.out, &files, Replace::asked(request.replace))?;
    let options = ProfileOptions {
        grid,
        strip: request.strip,
        digits: request.digits,
        allow_non_attractor: request.target.allow_non_attractor,
    };
    let p = profile::build_observed(&sel.laurent, &target, &options, progress)?;
    let elapsed = start.elapsed().as_secs_f64();
    let inputs = Inputs {
        family: request.family.inputs(&sel),
        options: Options {
            level: request.target.level,
            modulus: request.target.modulus.clone(),
            grid: request.grid.clone(),
            grid_read: GridRecord::new(&options.grid),
            strip: request.strip,
            digits: request.digits,
        },
    };
    let doc = Document::new(
        ProfileRecord::new(&p, sel.family.id, &files),
        inputs,
        Some(p.precision_bits),
        elapsed,
    );
    let json = pretty(&doc);
    let mut outputs: Vec<OutputFile> = csv::profile_files(&p, request.strip)
        .into_iter()
        .map(|(name, text)| (name.to_string(), text.into_bytes()))
        .collect();
    outputs.push(("psi.json".into(), json.clone().into_bytes()));
    destination.write(&outputs)?;
    Ok(Outcome {
        json,
        text: String::new(),
        wrote: Some(request.out.clone()),
        elapsed_s: elapsed,
        finding: None,
    })
}
