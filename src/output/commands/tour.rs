//! `tour`: the built-in demonstration — audits of F0, P2 and dP3 (levels 0..4, double precision
//! where it suffices) and one 40-digit eigenfunction with its residual, written as a report with
//! figures, the catalogue and the 40-digit samples.

use super::audit::{data_files, run_audit, Options as AuditOptions};
use super::build::build_files;
use super::{CommandError, FamilyRequest, Outcome};
use crate::checks::audit::Audit;
use crate::eigenfunction::profile::{self, Profile, ProfileOptions, Target};
use crate::input::grid::Grid;
use crate::input::selection::Selection;
use crate::lattice::catalogue;
use crate::output::figures::{FigureFormats, FigureOptions};
use crate::output::files::{Destination, OutputFile, Replace};
use crate::output::records::{
    families_document, pretty, AuditRecord, Document, GridRecord, Inputs, ProfileRecord, NOTE,
};
use crate::output::tables::families_table;
use crate::output::{csv, data, figures, markdown};
use crate::progress::{quiet, Counter, Observer, Stage};
use rayon::prelude::*;
use serde::Serialize;
use std::ops::RangeInclusive;
use std::path::PathBuf;
use std::time::Instant;

/// The audited families.
pub const TOUR_FAMILIES: [&str; 3] = ["F0", "P2", "dP3"];
/// The audited levels.
pub const TOUR_LEVELS: RangeInclusive<usize> = 0..=4;
/// The grid of the audits.
pub const TOUR_GRID: &str = "-12:12:241";
/// Digits of the audits (double precision where it suffices).
pub const TOUR_DIGITS: u32 = 16;
/// The high-precision eigenfunction: family, level, digits, grid.
pub const TOUR_HIGH: (&str, usize, u32, &str) = ("F0", 2, 40, "-10:10:201");

/// Where the tour writes.
#[derive(Debug, Clone)]
#[cfg_attr(feature = "cli", derive(clap::Args))]
pub struct TourRequest {
    /// Output directory.
    #[cfg_attr(feature = "cli", arg(long, default_value = "out/tour"))]
    pub out: PathBuf,
    /// Also write PNG versions of the figures.
    #[cfg_attr(feature = "cli", arg(long))]
    pub png: bool,
    /// Also write PDF versions of the figures (from the same SVG, with the embedded font).
    #[cfg_attr(feature = "cli", arg(long))]
    pub pdf: bool,
    /// Draw no titles into the figures (for captions in a paper).
    #[cfg_attr(feature = "cli", arg(long))]
    pub no_titles: bool,
    /// Replace existing files the tour did not write (its own earlier outputs, listed in
    /// `contents.txt`, are always refreshed).
    #[cfg_attr(feature = "cli", arg(long = "force"))]
    pub replace: bool,
}

/// The list of files the tour wrote (so that a re-run may refresh exactly those).
pub const CONTENTS: &str = "contents.txt";
/// The machine-dependent timings of the run, kept apart from the report (git-ignored).
pub const TIMINGS: &str = "timings.json";

#[derive(Serialize)]
struct HighInputs {
    family: &'static str,
    level: usize,
    digits: u32,
    grid: &'static str,
}

#[derive(Serialize)]
struct TourInputs {
    families: [&'static str; 3],
    levels: [usize; 2],
    grid: &'static str,
    digits: u32,
    high_precision: HighInputs,
}

#[derive(Serialize)]
struct HighOptions {
    level: usize,
    grid: &'static str,
    strip: bool,
    digits: u32,
}

type AuditDocument = Document<AuditRecord, Inputs<AuditOptions>>;
type ProfileDocument = Document<ProfileRecord, Inputs<HighOptions>>;

/// The machine-dependent part of a tour.
#[derive(Serialize)]
struct Timings {
    tool_version: &'static str,
    elapsed_s: f64,
    audits_s: std::collections::BTreeMap<&'static str, f64>,
    high_precision_s: f64,
}

#[derive(Serialize)]
struct TourRecord {
    audits: Vec<AuditDocument>,
    high_precision: ProfileDocument,
    all_matched: bool,
}

/// Runs the tour; `progress` is told when each family is audited and when the high-precision
/// eigenfunction is done.
///
/// # Errors
/// See [`CommandError`]; the output directory is checked for writability, and existing files
/// the tour did not write are refused, before computing (unless `replace`).
pub fn tour(request: &TourRequest, progress: Observer<'_>) -> Result<Outcome, CommandError> {
    let start = Instant::now();
    let replace = if request.replace {
        Replace::Everything
    } else {
        Replace::Listed(CONTENTS.into())
    };
    let fixed = ["report.md", "report.json", "families.json", "families.txt"];
    let destination = Destination::prepare(&request.out, &fixed, replace)?;
    let grid = Grid::parse(TOUR_GRID)?;
    let selections: Vec<Selection> = TOUR_FAMILIES
        .iter()
        .map(|id| FamilyRequest::catalogue(id).resolve())
        .collect::<Result<_, _>>()?;
    let stages = Counter::new(progress, TOUR_FAMILIES.len() + 1);
    let audits: Vec<(Audit, f64)> = selections
        .par_iter()
        .map(|sel| {
            let done = run_audit(sel, TOUR_LEVELS, TOUR_DIGITS, &grid, &quiet);
            stages.finished(Stage::FamilyAudited(sel.family.id));
            done
        })
        .collect::<Result<_, _>>()?;
    let high_start = Instant::now();
    let high_request = FamilyRequest::catalogue(TOUR_HIGH.0);
    let high_sel = high_request.resolve()?;
    let high = profile::build(
        &high_sel.laurent,
        &Target::Level(TOUR_HIGH.1),
        &ProfileOptions {
            grid: Grid::parse(TOUR_HIGH.3)?,
            strip: true,
            digits: TOUR_HIGH.2,
            allow_non_attractor: false,
        },
    )?;
    let high_elapsed = high_start.elapsed().as_secs_f64();
    stages.finished(Stage::HighPrecision);
    let strips: Vec<data::StripSample> = selections
        .iter()
        .zip(&audits)
        .map(|(sel, (audit, _))| data::strip_sample(&sel.laurent, audit))
        .collect::<Result<_, _>>()?;
    let options = FigureOptions {
        titles: !request.no_titles,
    };
    let figs = tour_figures(&audits, &strips, &high, &options)?;
    let elapsed = start.elapsed().as_secs_f64();
    let family_docs: Vec<AuditDocument> = selections
        .iter()
        .zip(&audits)
        .map(|(sel, (audit, t))| {
            let inputs = Inputs {
                family: FamilyRequest::catalogue(sel.family.id).inputs(sel),
                options: AuditOptions {
                    levels: [*TOUR_LEVELS.start(), *TOUR_LEVELS.end()],
                    digits: TOUR_DIGITS,
                    grid: TOUR_GRID.to_string(),
                    grid_read: GridRecord::new(&grid),
                },
            };
            let bits = AuditRecord::precision_bits(audit);
            Document::new(AuditRecord::new(sel.family.id, audit), inputs, bits, *t).untimed()
        })
        .collect();
    let high_files = build_files(true);
    let high_doc = Document::new(
        ProfileRecord::new(&high, TOUR_HIGH.0, &high_files),
        Inputs {
            family: high_request.inputs(&high_sel),
            options: HighOptions {
                level: TOUR_HIGH.1,
                grid: TOUR_HIGH.3,
                strip: true,
                digits: TOUR_HIGH.2,
            },
        },
        Some(high.precision_bits),
        high_elapsed,
    )
    .untimed();
    let high_json = pretty(&high_doc);
    let precision_bits = audits
        .iter()
        .flat_map(|a| a.0.levels.iter().map(|l| l.profile.precision_bits))
        .chain([high.precision_bits])
        .max();
    let doc = Document::new(
        TourRecord {
            audits: family_docs,
            high_precision: high_doc,
            all_matched: audits.iter().all(|a| a.0.unmatched.is_empty()),
        },
        TourInputs {
            families: TOUR_FAMILIES,
            levels: [*TOUR_LEVELS.start(), *TOUR_LEVELS.end()],
            grid: TOUR_GRID,
            digits: TOUR_DIGITS,
            high_precision: HighInputs {
                family: TOUR_HIGH.0,
                level: TOUR_HIGH.1,
                digits: TOUR_HIGH.2,
                grid: TOUR_HIGH.3,
            },
        },
        precision_bits,
        elapsed,
    )
    .noting(NOTE)
    .untimed();
    let json = pretty(&doc);
    let sections: Vec<(&str, &Audit, Option<f64>)> = TOUR_FAMILIES
        .iter()
        .copied()
        .zip(audits.iter())
        .map(|(f, (a, _))| (f, a, None))
        .collect();
    let mut md = markdown::tour_markdown(&sections, &high, TOUR_HIGH, None, None);
    md.push_str(markdown::COLUMNS_NOTE);
    md.push_str(&markdown::figure_links(&figures::captions(&figs)));
    let all = catalogue::all();
    let mut files: Vec<OutputFile> = vec![
        ("report.md".into(), md.clone().into_bytes()),
        ("report.json".into(), json.clone().into_bytes()),
        (
            "families.json".into(),
            pretty(&families_document(all, 0.0)).into_bytes(),
        ),
        ("families.txt".into(), families_table(all).into_bytes()),
    ];
    let formats = FigureFormats {
        png: request.png,
        pdf: request.pdf,
    };
    files.extend(figures::figure_files_in(&figs, &formats)?);
    for ((id, (audit, _)), strip) in TOUR_FAMILIES.iter().zip(&audits).zip(&strips) {
        files.extend(data_files(audit, strip).into_iter().map(|(name, bytes)| {
            let stem = name.trim_end_matches(".csv");
            (format!("{stem}-{}.csv", figures::file_id(id)), bytes)
        }));
    }
    let dir = format!("psi-{}-{}-{}digits", TOUR_HIGH.0, TOUR_HIGH.1, TOUR_HIGH.2);
    let mut samples = csv::profile_files(&high, true);
    samples.push(("psi.json", high_json));
    files.extend(
        samples
            .into_iter()
            .map(|(n, c)| (format!("{dir}/{n}"), c.into_bytes())),
    );
    let timings = Timings {
        tool_version: crate::TOOL_VERSION,
        elapsed_s: start.elapsed().as_secs_f64(),
        audits_s: TOUR_FAMILIES
            .iter()
            .zip(&audits)
            .map(|(id, (_, t))| (*id, *t))
            .collect(),
        high_precision_s: high_elapsed,
    };
    files.push((TIMINGS.into(), pretty(&timings).into_bytes()));
    let mut names: Vec<String> = files.iter().map(|f| f.0.clone()).collect();
    names.push(CONTENTS.into());
    names.sort();
    files.push((CONTENTS.into(), (names.join("\n") + "\n").into_bytes()));
    destination.write(&files)?;
    Ok(Outcome {
        json,
        text: md,
        wrote: Some(request.out.clone()),
        elapsed_s: elapsed,
        finding: None,
    })
}

/// The figures of the tour: each family's, the agreement across families, and the residual of
/// the high-precision eigenfunction.
fn tour_figures(
    audits: &[(Audit, f64)],
    strips: &[data::StripSample],
    high: &Profile,
    options: &FigureOptions,
) -> Result<Vec<figures::Figure>, CommandError> {
    let mut figs = Vec::new();
    for ((id, (audit, _)), strip) in TOUR_FAMILIES.iter().zip(audits).zip(strips) {
        figs.extend(figures::family_figures_from(id, audit, strip, options)?);
    }
    let pairs: Vec<(&str, &Audit)> = TOUR_FAMILIES
        .iter()
        .copied()
        .zip(audits.iter().map(|a| &a.0))
        .collect();
    figs.push(figures::agreement_with(&pairs, options)?);
    let mut high_fig = figures::residuals_with(
        &format!(
            "{} n = {}, {} digits",
            TOUR_HIGH.0, TOUR_HIGH.1, TOUR_HIGH.2
        ),
        &[high],
        options,
    )?;
    high_fig.name = format!("residual-{}-{}digits", TOUR_HIGH.0, TOUR_HIGH.2);
    figs.push(high_fig);
    Ok(figs)
}
