//! `audit`: a family's attractor moduli matched both ways against the independent spectrum, every
//! level's eigenfunction checked, written as Markdown, JSON and figures.

use super::{CommandError, FamilyRequest, Outcome};
use crate::checks::audit::{self, Audit, AuditOptions};
use crate::input::grid::Grid;
use crate::input::numbers::parse_levels;
use crate::input::selection::Selection;
use crate::output::data;
use crate::output::files::{file_stem, Destination, OutputFile, Replace};
use crate::output::markdown::{audit_markdown, COLUMNS_NOTE};
use crate::output::records::{pretty, AuditRecord, Document, GridRecord, Inputs};
use crate::precision::check_digits;
use crate::progress::Observer;
use crate::TOOL_VERSION;
use serde::Serialize;
use std::ops::RangeInclusive;
use std::path::PathBuf;
use std::time::Instant;

/// What to audit and where to write it.
#[derive(Debug, Clone)]
#[cfg_attr(feature = "cli", derive(clap::Args))]
pub struct AuditRequest {
    #[cfg_attr(feature = "cli", command(flatten))]
    pub family: FamilyRequest,
    /// Levels: an inclusive range A..B or one level n.
    #[cfg_attr(feature = "cli", arg(long, default_value = super::defaults::LEVELS, allow_hyphen_values = true))]
    pub levels: String,
    /// Decimal digits (8 to 1000; 16 or less: double precision where it suffices).
    #[cfg_attr(feature = "cli", arg(long, default_value_t = super::defaults::DIGITS, allow_negative_numbers = true))]
    pub digits: u32,
    /// Grid of real parts R0:R1:N for the residual and the profiles.
    #[cfg_attr(
        feature = "cli",
        arg(long, default_value = super::defaults::GRID, allow_hyphen_values = true)
    )]
    pub grid: String,
    /// Output directory (default out/audit-FAMILY, with `*` of a dual written `-dual`).
    #[cfg_attr(feature = "cli", arg(long))]
    pub out: Option<PathBuf>,
    /// Replace existing outputs.
    #[cfg_attr(feature = "cli", arg(long = "force"))]
    pub replace: bool,
    /// Also write PNG versions of the figures.
    #[cfg_attr(feature = "cli", arg(long))]
    pub png: bool,
    /// Also write PDF versions of the figures (from the same SVG, with the embedded font).
    #[cfg_attr(feature = "cli", arg(long))]
    pub pdf: bool,
    /// Draw no titles into the figures (for captions in a paper).
    #[cfg_attr(feature = "cli", arg(long))]
    pub no_titles: bool,
}

impl AuditRequest {
    /// The formats of the figures asked for.
    #[cfg(feature = "figures")]
    fn formats(&self) -> crate::output::figures::FigureFormats {
        crate::output::figures::FigureFormats {
            png: self.png,
            pdf: self.pdf,
        }
    }
}

/// The names of every file an audit of `family` writes: the report, the tables and (feature
/// `figures`) the figures.
fn audit_files(family: &str, request: &AuditRequest) -> Vec<String> {
    let names = ["audit.md", "audit.json"]
        .iter()
        .chain(&DATA_FILES)
        .map(|n| n.to_string());
    #[cfg(feature = "figures")]
    let names = names.chain(crate::output::figures::audit_figure_names(
        family,
        &request.formats(),
    ));
    #[cfg(not(feature = "figures"))]
    let _ = (family, request);
    names.collect()
}

#[derive(Serialize)]
pub(crate) struct Options {
    pub levels: [usize; 2],
    pub digits: u32,
    pub grid: String,
    pub grid_read: GridRecord,
}

/// Relative perturbation of the level-0 modulus for the negative control.
pub const PERTURBATION: f64 = 1e-6;
/// Bases of the independent spectrum of an audit: solved at the first, checked at the second.
pub const SPECTRUM_BASES: (usize, usize) = (200, 300);

/// Runs the audit of one family and returns it with its wall time.
///
/// # Errors
/// See [`CommandError`].
pub(crate) fn run_audit(
    sel: &Selection,
    levels: RangeInclusive<usize>,
    digits: u32,
    grid: &Grid,
    progress: Observer<'_>,
) -> Result<(Audit, f64), CommandError> {
    let start = Instant::now();
    let options = AuditOptions {
        levels,
        digits,
        grid: grid.clone(),
        perturbation: PERTURBATION,
        spectrum_basis: SPECTRUM_BASES.0,
        spectrum_max_basis: SPECTRUM_BASES.1,
    };
    let audit = audit::run(&sel.laurent, &options, progress)?;
    Ok((audit, start.elapsed().as_secs_f64()))
}

/// The names of the tidy tables of an audit, in the order [`data_files`] gives them.
pub(crate) const DATA_FILES: [&str; 4] = ["levels.csv", "profiles.csv", "nu_scan.csv", "strip.csv"];

/// The tidy tables behind the figures and the report (see [`crate::output::data`]).
pub(crate) fn data_files(audit: &Audit, strip: &data::StripSample) -> Vec<OutputFile> {
    let tables = [
        data::levels(&audit.levels),
        data::profiles(&audit.levels),
        data::nu_scan(audit),
        data::strip(&strip.re, &strip.im, &strip.values),
    ];
    DATA_FILES
        .iter()
        .zip(tables)
        .map(|(name, table)| (name.to_string(), table.into_bytes()))
        .collect()
}

/// The finding of an audit with unmatched levels.
pub(crate) fn unmatched(family: &str, audit: &Audit) -> Option<CommandError> {
    if audit.unmatched.is_empty() {
        return None;
    }
    let list: Vec<String> = audit
        .unmatched
        .iter()
        .map(|u| {
            format!(
                "{} {:.12} (label {}, nearest {:.12})",
                u.kind.replace('_', " "),
                u.value,
                u.label,
                u.nearest
            )
        })
        .collect();
    Some(CommandError::Unmatched {
        family: family.to_string(),
        list: list.join("; "),
    })
}

/// Audits the family, writes `audit.md`, `audit.json` and the figures; an unmatched level is the
/// outcome's finding (the outputs are written first).
///
/// # Errors
/// See [`CommandError`]; existing outputs are refused (before computing) unless `replace`.
pub fn audit(request: &AuditRequest, progress: Observer<'_>) -> Result<Outcome, CommandError> {
    check_digits(request.digits)?;
    let sel = request.family.resolve()?;
    let levels = parse_levels(&request.levels)?;
    crate::eigenfunction::profile::check_level_reach(&levels)?;
    let grid = Grid::parse(&request.grid)?;
    let id = sel.family.id;
    let out = request
        .out
        .clone()
        .unwrap_or_else(|| PathBuf::from(format!("out/audit-{}", file_stem(id))));
    let destination = Destination::prepare(
        &out,
        &audit_files(id, request),
        Replace::asked(request.replace),
    )?;
    let (audit, elapsed) = run_audit(&sel, levels.clone(), request.digits, &grid, progress)?;
    let inputs = Inputs {
        family: request.family.inputs(&sel),
        options: Options {
            levels: [*levels.start(), *levels.end()],
            digits: request.digits,
            grid: request.grid.clone(),
            grid_read: GridRecord::new(&grid),
        },
    };
    let doc = Document::new(
        AuditRecord::new(id, &audit),
        inputs,
        AuditRecord::precision_bits(&audit),
        elapsed,
    );
    let json = pretty(&doc);
    let mut md = format!(
        "# regwave audit: {id}\n\nGenerated by `regwave audit` (regwave {TOOL_VERSION}). Numerical evidence, not proofs.\n\n"
    );
    md.push_str(&audit_markdown(id, &audit, request.digits, Some(elapsed)));
    md.push_str(COLUMNS_NOTE);
    let strip = data::strip_sample(&sel.laurent, &audit)?;
    let mut files: Vec<OutputFile> = Vec::new();
    #[cfg(feature = "figures")]
    {
        use crate::output::figures::{self, FigureOptions};
        let options = FigureOptions {
            titles: !request.no_titles,
        };
        let mut figs = figures::family_figures_from(id, &audit, &strip, &options)?;
        figs.push(figures::agreement_with(&[(id, &audit)], &options)?);
        md.push_str(&crate::output::markdown::figure_links(&figures::captions(
            &figs,
        )));
        files.extend(figures::figure_files_in(&figs, &request.formats())?);
    }
    files.extend(data_files(&audit, &strip));
    files.insert(0, ("audit.json".into(), json.clone().into_bytes()));
    files.insert(0, ("audit.md".into(), md.clone().into_bytes()));
    destination.write(&files)?;
    Ok(Outcome {
        json,
        text: md,
        wrote: Some(out),
        elapsed_s: elapsed,
        finding: unmatched(id, &audit),
    })
}
