//! The figures of an audit or a profile: the data of [`crate::checks::audit`] and [`crate::eigenfunction::profile`]
//! laid out for [`crate::output::plot`]. Pure: returns SVG documents with file stems and captions, and
//! the files to write (with PNG versions on request).
//!
//! # Conventions
//! - Profiles: with a reality rule k the real function e^{−ikr²/(8π)}ψ is drawn (its real part
//!   and ±|ψ|), so that the zeros are visible; without one the phase-fixed ψ (real and positive
//!   where |ψ| is largest on the grid) — its real part then shows oscillation, not zeros.
//! - The strip map marks the branch points with their 2πi translates inside |Im r| ≤ 2π and the
//!   poles of ψ on the boundary lines.
//! - Residuals are per grid point, relative to max|ψ| on the grid, with the working precision of
//!   each level as the floor line when all levels share it.
//! - Titles: [`FigureOptions::titles`] draws each figure's title into it; without, the figure
//!   is untitled and its caption (which says everything the title did) goes under it in the
//!   report, as journals set figures.
//! - Files: every figure as SVG, and from the same document PNG and PDF on request
//!   ([`FigureFormats`]).

use crate::checks::audit::Audit;
use crate::curve::laurent::Laurent;
use crate::eigenfunction::phase;
use crate::eigenfunction::profile::{Profile, ProfileError};
use crate::output::data::{self, StripSample};
use crate::output::files::OutputFile;
use crate::output::plot::{
    self, AgreementBars, NuCurve, PlotError, ProfileSeries, ResidualSeries, StripMap,
};
use crate::precision::unit_roundoff;
use num_complex::Complex64;

/// How the figures are drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct FigureOptions {
    /// Draw a title into each figure (else the caption alone names it).
    pub titles: bool,
}

impl Default for FigureOptions {
    fn default() -> Self {
        FigureOptions { titles: true }
    }
}

impl FigureOptions {
    fn title(&self, title: String) -> Option<String> {
        self.titles.then_some(title)
    }
}

/// Which files [`figure_files_in`] writes besides each figure's SVG.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct FigureFormats {
    /// A PNG of [`PNG_WIDTH`] px.
    pub png: bool,
    /// A vector PDF with the embedded font.
    pub pdf: bool,
}

impl FigureFormats {
    /// The file extensions written for each figure, in order.
    fn extensions(&self) -> impl Iterator<Item = &'static str> {
        std::iter::once("svg")
            .chain(self.png.then_some("png"))
            .chain(self.pdf.then_some("pdf"))
    }
}

/// One figure: its file stem, SVG document and a caption for reports.
#[derive(Debug, Clone)]
pub struct Figure {
    pub name: String,
    pub svg: String,
    pub caption: String,
}

/// The legend of the drawn real part under the reality rule `rule`.
fn real_label(rule: Option<i64>) -> String {
    match rule {
        Some(0) => "Re ψ".into(),
        Some(-1) => "Re e^(i r²/8π) ψ".into(),
        Some(1) => "Re e^(−i r²/8π) ψ".into(),
        Some(k) if k < 0 => format!("Re e^({} i r²/8π) ψ", -k),
        Some(k) => format!("Re e^(−{k} i r²/8π) ψ"),
        None => "Re ψ (phase fixed at the peak)".into(),
    }
}

/// Stacked profiles ψ_n(r) on ℝ of several levels of one family, titled.
///
/// # Errors
/// See [`PlotError`].
pub fn profiles(family: &str, levels: &[&Profile]) -> Result<Figure, PlotError> {
    profiles_with(family, levels, &FigureOptions::default())
}

/// [`profiles`] drawn as `options` say.
///
/// # Errors
/// See [`PlotError`].
pub fn profiles_with(
    family: &str,
    levels: &[&Profile],
    options: &FigureOptions,
) -> Result<Figure, PlotError> {
    let rule = levels.first().and_then(|p| p.rule);
    let series: Vec<ProfileSeries> = levels
        .iter()
        .map(|p| ProfileSeries {
            level: p.level.unwrap_or(0),
            modulus: p.modulus.to_f64(),
            r: p.grid.clone(),
            values: p
                .grid
                .iter()
                .zip(&p.real_line)
                .map(|(&r, v)| match (v, p.rule) {
                    (Some(v), Some(k)) => v * phase::reality_factor(k, r),
                    (Some(v), None) => *v,
                    (None, _) => Complex64::new(f64::NAN, f64::NAN),
                })
                .collect(),
        })
        .collect();
    Ok(Figure {
        name: stem("profiles", family),
        svg: plot::stacked_profiles(
            options
                .title(format!("{family}: eigenfunctions on ℝ"))
                .as_deref(),
            &series,
            &real_label(rule),
        )?,
        caption: format!(
            "{family}: eigenfunctions on ℝ, level n drawn on the baseline n ({}, solid; ±|ψ|, dashed).",
            real_label(rule)
        ),
    })
}

/// The eigen-equation residual against r for several levels, titled.
///
/// # Errors
/// See [`PlotError`] (no level with a residual).
pub fn residuals(family: &str, levels: &[&Profile]) -> Result<Figure, PlotError> {
    residuals_with(family, levels, &FigureOptions::default())
}

/// [`residuals`] drawn as `options` say.
///
/// # Errors
/// See [`PlotError`] (no level with a residual).
pub fn residuals_with(
    family: &str,
    levels: &[&Profile],
    options: &FigureOptions,
) -> Result<Figure, PlotError> {
    let series: Vec<ResidualSeries> = levels
        .iter()
        .filter_map(|p| {
            let res = p.residual.as_ref()?;
            Some(ResidualSeries {
                label: match p.level {
                    Some(n) => format!("n = {n}"),
                    None => "ψ".into(),
                },
                r: p.grid.clone(),
                residual: res
                    .per_point
                    .iter()
                    .map(|v| v.unwrap_or(f64::NAN))
                    .collect(),
            })
        })
        .collect();
    let bits: Vec<u32> = levels.iter().map(|p| p.precision_bits).collect();
    let floor =
        (!bits.is_empty() && bits.iter().all(|&b| b == bits[0])).then(|| unit_roundoff(bits[0]));
    Ok(Figure {
        name: stem("residual", family),
        svg: plot::residual_plot(
            options
                .title(format!("{family}: eigen-equation residual"))
                .as_deref(),
            &series,
            floor,
        )?,
        caption: format!(
            "{family}: |A ψ(r−2πi) + C ψ(r+2πi) − (B+a) ψ(r)| / max|ψ| per grid point, each value integrated along its own route{}.",
            if floor.is_some() { "; dashed: the unit roundoff of the working precision" } else { "" }
        ),
    })
}

/// ν(a) against ln a with the integer crossings and the independent eigenvalues, titled.
///
/// # Errors
/// See [`PlotError`].
pub fn nu(family: &str, audit: &Audit) -> Result<Figure, PlotError> {
    nu_with(family, audit, &FigureOptions::default())
}

/// [`nu`] drawn as `options` say.
///
/// # Errors
/// See [`PlotError`].
pub fn nu_with(family: &str, audit: &Audit, options: &FigureOptions) -> Result<Figure, PlotError> {
    let curve = NuCurve {
        log_a: audit.scan.log_a.clone(),
        nu: audit.scan.nu.clone(),
        crossings: audit.scan.crossings.clone(),
        eigenvalues_log_a: audit
            .eigenvalues_in_window
            .iter()
            .map(|e| e.value.to_f64().ln())
            .collect(),
    };
    Ok(Figure {
        name: stem("nu", family),
        svg: plot::nu_plot(
            options
                .title(format!("{family}: higher normal function ν(a)"))
                .as_deref(),
            &curve,
        )?,
        caption: format!(
            "{family}: the higher normal function ν(a) against ln a; dots where ν is an integer (attractor moduli, level n at ν = n + 1), ticks at the independent eigenvalues."
        ),
    })
}

/// Agreement digits of the attractor moduli with the independent spectrum, per level and
/// family, titled.
///
/// # Errors
/// See [`PlotError`].
pub fn agreement(audits: &[(&str, &Audit)]) -> Result<Figure, PlotError> {
    agreement_with(audits, &FigureOptions::default())
}

/// [`agreement`] drawn as `options` say.
///
/// # Errors
/// See [`PlotError`].
pub fn agreement_with(
    audits: &[(&str, &Audit)],
    options: &FigureOptions,
) -> Result<Figure, PlotError> {
    let bars: Vec<AgreementBars> = audits
        .iter()
        .map(|(family, a)| AgreementBars {
            family: family.to_string(),
            levels: a.levels.iter().map(|l| l.level).collect(),
            digits: a.levels.iter().map(|l| l.agreement_digits).collect(),
            caps: a.levels.iter().map(|l| l.agreement_cap).collect(),
        })
        .collect();
    let names: Vec<&str> = audits.iter().map(|a| a.0).collect();
    Ok(Figure {
        name: if names.len() == 1 {
            stem("agreement", names[0])
        } else {
            "agreement".into()
        },
        svg: plot::agreement_plot(
            options
                .title("agreement with the independent spectrum".into())
                .as_deref(),
            &bars,
        )?,
        caption: format!(
            "Digits on which attractor moduli and independent eigenvalues agree, per level n ({}); dashed over each bar: the digits the spectrum's error estimate supports at that level.{}",
            names.join(", "),
            if agreement_limited_by_spectrum(audits) {
                " Every bar reaches its cap: the comparison is limited by the spectrum's error estimate, not by the attractor moduli."
            } else {
                ""
            }
        ),
    })
}

/// Agreement digits closer than this to their cap count as at the cap.
const AT_CAP: f64 = 0.05;

/// Whether every compared level agrees to its cap: the agreement figure then shows only the
/// spectrum's error estimate (a report may leave it out and say so).
pub fn agreement_limited_by_spectrum(audits: &[(&str, &Audit)]) -> bool {
    let compared: Vec<_> = audits
        .iter()
        .flat_map(|(_, a)| &a.levels)
        .filter(|l| l.agreement_digits.is_finite() && l.agreement_cap.is_finite())
        .collect();
    !compared.is_empty()
        && compared
            .iter()
            .all(|l| l.agreement_digits >= l.agreement_cap - AT_CAP)
}

/// |ψ| and arg ψ over the strip |Im r| ≤ 2π from sampled lines (see [`crate::eigenfunction::profile::strip_map`]), titled.
///
/// # Errors
/// See [`PlotError`].
pub fn strip(
    family: &str,
    p: &Profile,
    re: &[f64],
    im: &[f64],
    values: Vec<Vec<Option<Complex64>>>,
) -> Result<Figure, PlotError> {
    strip_with(family, p, (re, im), values, &FigureOptions::default())
}

/// [`strip`] drawn as `options` say; the grid is (Re r, Im r).
///
/// # Errors
/// See [`PlotError`].
pub fn strip_with(
    family: &str,
    p: &Profile,
    (re, im): (&[f64], &[f64]),
    values: Vec<Vec<Option<Complex64>>>,
    options: &FigureOptions,
) -> Result<Figure, PlotError> {
    let two_pi = 2.0 * std::f64::consts::PI;
    let branch_points = p
        .branch_points
        .iter()
        .flat_map(|b| (-1..=1).map(move |k| [b[0], b[1] + k as f64 * two_pi]))
        .filter(|b| b[1].abs() <= two_pi + 1e-9 && b[0] >= re[0] && b[0] <= re[re.len() - 1])
        .collect();
    let map = StripMap {
        re: re.to_vec(),
        im: im.to_vec(),
        values,
        poles: p.poles.iter().map(|q| q.at).collect(),
        branch_points,
    };
    let level = p.level.map(|n| format!(", n = {n}")).unwrap_or_default();
    Ok(Figure {
        name: stem("strip", family),
        svg: plot::strip_heatmap(
            options
                .title(format!("{family}{level}: ψ over the strip"))
                .as_deref(),
            &map,
        )?,
        caption: format!(
            "{family}{level}: log₁₀|ψ| (colours clipped at its 2nd and 98th percentiles) and arg ψ on |Im r| ≤ 2π (double precision, interpolated between grid values); crosses: branch points, circles: poles of ψ."
        ),
    })
}

/// A family id usable in a file name ("F0*" → "F0-dual").
pub fn file_id(family: &str) -> String {
    crate::output::files::file_stem(family)
}

/// Why the figures of an audit could not be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum FiguresError {
    #[error(transparent)]
    Plot(#[from] PlotError),
    #[error(transparent)]
    Profile(#[from] ProfileError),
}

/// The per-family figures of an audit: profiles, residuals, ν(a), and the strip map of the
/// middle audited level; titled.
///
/// # Errors
/// See [`FiguresError`].
pub fn family_figures(
    family: &str,
    laurent: &Laurent,
    audit: &Audit,
) -> Result<Vec<Figure>, FiguresError> {
    family_figures_with(family, laurent, audit, &FigureOptions::default())
}

/// [`family_figures`] drawn as `options` say.
///
/// # Errors
/// See [`FiguresError`].
pub fn family_figures_with(
    family: &str,
    laurent: &Laurent,
    audit: &Audit,
    options: &FigureOptions,
) -> Result<Vec<Figure>, FiguresError> {
    let strip = data::strip_sample(laurent, audit)?;
    Ok(family_figures_from(family, audit, &strip, options)?)
}

/// [`family_figures_with`] with the strip map already sampled ([`data::strip_sample`]).
///
/// # Errors
/// See [`PlotError`].
pub fn family_figures_from(
    family: &str,
    audit: &Audit,
    strip: &StripSample,
    options: &FigureOptions,
) -> Result<Vec<Figure>, PlotError> {
    let profiles: Vec<&Profile> = audit.levels.iter().map(|l| &l.profile).collect();
    let chosen = &audit.levels[strip.level_index].profile;
    Ok(vec![
        profiles_with(family, &profiles, options)?,
        residuals_with(family, &profiles, options)?,
        nu_with(family, audit, options)?,
        strip_with(
            family,
            chosen,
            (&strip.re, &strip.im),
            strip.values.clone(),
            options,
        )?,
    ])
}

/// The SVG files of the figures, and their PNG versions when asked.
///
/// # Errors
/// See [`PlotError`] (the PNG rendering).
pub fn figure_files(figures: &[Figure], png: bool) -> Result<Vec<OutputFile>, PlotError> {
    figure_files_in(figures, &FigureFormats { png, pdf: false })
}

/// The SVG files of the figures, and from the same documents PNG and PDF files as `formats`
/// asks ("name.svg", "name.png", "name.pdf" for each figure, in that order).
///
/// # Errors
/// See [`PlotError`] (the PNG rendering or the PDF conversion).
pub fn figure_files_in(
    figures: &[Figure],
    formats: &FigureFormats,
) -> Result<Vec<OutputFile>, PlotError> {
    let mut out = Vec::new();
    for f in figures {
        for extension in formats.extensions() {
            let bytes = match extension {
                "png" => plot::to_png(&f.svg, PNG_WIDTH)?,
                "pdf" => plot::to_pdf(&f.svg)?,
                _ => f.svg.clone().into_bytes(),
            };
            out.push((format!("{}.{extension}", f.name), bytes));
        }
    }
    Ok(out)
}

/// The kinds of figure of a one-family audit, as their file stems begin.
const AUDIT_FIGURES: [&str; 5] = ["profiles", "residual", "nu", "strip", "agreement"];

/// A figure's file stem: its kind and the family (`profiles-F0-dual`).
fn stem(kind: &str, family: &str) -> String {
    format!("{kind}-{}", file_id(family))
}

/// The file names of the figures of a one-family audit ([`family_figures_from`] and
/// [`agreement_with`]) in `formats`: known before computing, so that existing files are refused
/// before the work.
pub fn audit_figure_names(family: &str, formats: &FigureFormats) -> Vec<String> {
    AUDIT_FIGURES
        .iter()
        .flat_map(|kind| {
            formats
                .extensions()
                .map(move |e| format!("{}.{e}", stem(kind, family)))
        })
        .collect()
}

/// Width of PNG figures in pixels.
pub const PNG_WIDTH: u32 = 1280;

/// Names and captions, for [`crate::output::markdown::figure_links`].
pub fn captions(figures: &[Figure]) -> Vec<(String, String)> {
    figures
        .iter()
        .map(|f| (f.name.clone(), f.caption.clone()))
        .collect()
}
