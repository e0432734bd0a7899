//! Figures of the eigenfunctions and their checks, as SVG documents, PNG bytes and PDF bytes.
//! Pure drawing: every function takes plain data and returns the document; the binary writes
//! the files.
//!
//! # Figures
//! - [`stacked_profiles`]: ψₙ(r) on ℝ for several levels. Horizontal axis r; level n is drawn
//!   on the baseline y = n: the real part of the phase-fixed ψₙ as a solid line and ±|ψₙ| as a
//!   thin dashed envelope, both scaled so that max|ψₙ| reaches [`PROFILE_HALF_HEIGHT`] above
//!   the baseline. The vertical tick labels name the levels ("n = 0", …), a label per curve
//!   gives its modulus aₙ (six significant digits), placed where it meets no curve.
//! - [`strip_heatmap`]: ψ on the strip |Im r| ≤ 2π, two panels stacked: log₁₀|ψ| on a
//!   sequential scale (ink blue → sea green → sand) clipped to the 2nd–98th percentile of the
//!   sampled values, and arg ψ on a cyclic scale (indigo at ±π, teal at −π/2, pale sand at 0,
//!   brick at π/2), each with a colour bar. Each panel is one embedded PNG image. Horizontal
//!   axis Re r, vertical axis Im r from −2π to 2π with ticks at the multiples of π. Branch
//!   points are marked by crosses, poles by open circles, with a key.
//! - [`residual_plot`]: eigen-equation residual against r on a logarithmic axis (powers of ten),
//!   one style per series (colour, dash pattern and marker), an optional dashed horizontal line
//!   at the precision floor.
//! - [`nu_plot`]: the higher normal function ν(a) against ln a, faint lines at the integers,
//!   the attractor crossings ν = n + 1 as filled dots labelled by the level n, and the
//!   independently computed eigenvalues as short ticks on the horizontal axis (they should sit
//!   under the dots).
//! - [`agreement_plot`]: agreement digits with the independent spectrum per level, grouped
//!   bars with one style per family, and over each bar a dashed cap: the digits that the
//!   spectrum's error estimate supports at that level.
//!
//! Every figure takes an optional title: journals set titles as captions, so `None` leaves the
//! figure untitled (the figure's caption then carries what the title said).
//!
//! # Layout
//! One private submodule per figure (`profiles`, `strip`, `residual`, `nu`, `agreement`), the
//! SVG writer (`svg`), the series styles (`style`), the shared chart machinery (`axes`),
//! numbers as text (`numbers`), data checks and ranges (`data`), rasterization (`png`) and
//! conversion to PDF (`pdf`); their public items are re-exported here.
//!
//! # Conventions
//! Single panels are [`FIGURE_SIZE`] (640 × 420 px), the strip map [`STRIP_FIGURE_SIZE`]; text is
//! at least 14 px, data lines 2 px wide, on a white background. Text is emitted as SVG
//! `<text>` in the generic `sans-serif` family, minus signs as U+2212, the sets of integers
//! and reals as ℤ and ℝ, the natural logarithm as ln. Series are told apart by colour,
//! lightness, dash pattern and marker together ([`series_style`]: the palette keeps its
//! colours apart in greyscale and under the common colour-vision deficiencies; the module
//! `style` says how it was chosen); a legend key is drawn by the same code, with the same
//! stroke, dash and marker, as the series it names.
//!
//! # PNG and PDF
//! [`to_png`] rasterizes any of these SVG documents with `resvg` (pure Rust) at a requested
//! width; [`to_pdf`] converts them to vector PDF with `svg2pdf`. Text is set in DejaVu Sans,
//! embedded through the `dejavu` crate (Bitstream Vera font licence; DejaVu changes are in the
//! public domain; the licence text ships with that crate), so no system font or font library is
//! needed.
//!
//! # Example
//! ```
//! use regwave::output::plot::{agreement_plot, to_pdf, to_png, AgreementBars};
//!
//! let bars = [AgreementBars {
//!     family: "F0".into(),
//!     levels: vec![0, 1, 2],
//!     digits: vec![29.4, 28.9, 28.1],
//!     caps: vec![30.0, 29.5, 29.0],
//! }];
//! let svg = agreement_plot(None, &bars)?;
//! assert!(svg.contains("agreement digits"));
//! let png = to_png(&svg, 1280)?;
//! assert_eq!(&png[1..4], b"PNG");
//! assert!(to_pdf(&svg)?.starts_with(b"%PDF-"));
//! # Ok::<(), regwave::output::plot::PlotError>(())
//! ```
//!
//! # Errors
//! Degenerate input returns a [`PlotError`] and never panics: no series, a series whose
//! abscissae and values differ in length, a series with fewer than two plottable points, an
//! axis whose values are all equal, a heat map without a sampled value. Non-finite values inside
//! a series are gaps in its line; a residual ≤ 0 is a gap too (it has no logarithm).

mod agreement;
mod axes;
mod data;
mod nu;
mod numbers;
mod pdf;
mod png;
mod profiles;
mod residual;
mod strip;
mod style;
mod svg;

pub use agreement::{agreement_plot, AgreementBars};
pub use nu::{nu_plot, NuCurve};
pub use pdf::to_pdf;
pub use png::to_png;
pub use profiles::{stacked_profiles, ProfileSeries};
pub use residual::{residual_plot, ResidualSeries};
pub use strip::{strip_heatmap, StripMap, PERCENTILES};
pub use style::{series_style, SeriesStyle};
pub use svg::{Marker, Rgb};

use thiserror::Error;

/// Size in pixels of the single-panel figures.
pub const FIGURE_SIZE: (u32, u32) = (640, 420);
/// Size in pixels of the two-panel strip heat map.
pub const STRIP_FIGURE_SIZE: (u32, u32) = (640, 860);
/// Height above its baseline that max|ψₙ| reaches in [`stacked_profiles`] (levels are 1 apart).
pub const PROFILE_HALF_HEIGHT: f64 = 0.42;
/// Residuals below this are drawn at it: a logarithmic axis needs a finite bottom.
pub const RESIDUAL_CLAMP: f64 = 1e-60;
/// Longest side of a PNG [`to_png`] renders (the pixmap is held in memory, four bytes a pixel).
pub const MAX_PNG_SIDE: u32 = 8192;
/// Fill of heat-map cells without a sampled value.
pub const MISSING_CELL: Rgb = Rgb(0xa8, 0xa8, 0xa8);

/// Failed preconditions of the figures and of rasterization.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum PlotError {
    /// The figure was given nothing to draw.
    #[error("{figure}: no data series given")]
    NoSeries { figure: &'static str },
    /// A series has a different number of abscissae and values.
    #[error("series `{series}`: {abscissae} abscissae but {values} values")]
    LengthMismatch {
        series: String,
        abscissae: usize,
        values: usize,
    },
    /// Too few finite points (or positive residuals) to draw a series: all NaN, or one point.
    #[error("series `{series}`: {plottable} plottable points, at least {needed} needed")]
    TooFewPoints {
        series: String,
        plottable: usize,
        needed: usize,
    },
    /// ψ is zero wherever it was sampled: no scale, no logarithm.
    #[error("series `{series}`: ψ vanishes at every sampled point, nothing to scale")]
    ZeroProfile { series: String },
    /// All values on an axis coincide.
    #[error("axis {axis}: every value equals {value}, the axis has no extent")]
    DegenerateRange { axis: &'static str, value: f64 },
    /// A heat-map axis has fewer than two grid values (cells need neighbours for their size).
    #[error("axis {axis}: {count} grid values, at least 2 are needed")]
    GridTooSmall { axis: &'static str, count: usize },
    /// Heat-map grid values are not strictly increasing (or not numbers).
    #[error("axis {axis}: grid values must increase strictly (index {index})")]
    GridNotIncreasing { axis: &'static str, index: usize },
    /// A heat-map row lies outside the strip the figure shows.
    #[error("heat map: Im r = {value} lies outside the strip |Im r| ≤ 2π")]
    OutsideStrip { value: f64 },
    /// The heat map has a different number of rows than Im r values.
    #[error("heat map: {expected} rows expected (one per Im r), {found} given")]
    GridRows { expected: usize, found: usize },
    /// A heat-map row has a different number of values than Re r values.
    #[error("heat map: {expected} values a row expected (one per Re r), row {row} has {found}")]
    GridRowLength {
        expected: usize,
        row: usize,
        found: usize,
    },
    /// Every heat-map cell is unsampled.
    #[error("heat map: no cell holds a sampled finite value")]
    NoSampledValue,
    /// The raster image of a heat map could not be encoded.
    #[error("heat-map image encoding failed: {0}")]
    ImageEncode(String),
    /// The document given to [`to_png`] is not SVG that resvg can read.
    #[error("the SVG document could not be read: {0}")]
    SvgParse(String),
    /// The PNG asked for is empty or too large.
    #[error("PNG of {width} × {height} px: each side must lie in 1..={max}")]
    PngSize { width: u32, height: u32, max: u32 },
    /// The PNG encoder failed.
    #[error("PNG encoding failed: {0}")]
    PngEncode(String),
    /// svg2pdf could not convert the document.
    #[error("PDF conversion failed: {0}")]
    PdfConversion(String),
}

// ---------------------------------------------------------------------------------------------
// Look: palette, fonts, sizes (nominal px).

const INK: Rgb = Rgb(0x23, 0x27, 0x33);
const GRID: Rgb = Rgb(0xe2, 0xe4, 0xe8);
const FLOOR: Rgb = Rgb(0x6b, 0x6f, 0x7a);

const FONT: &str = "sans-serif";

const TICK_SIZE: f64 = 14.5;
const LABEL_SIZE: f64 = 16.0;
const TITLE_SIZE: f64 = 17.5;
/// Data lines.
const LINE_WIDTH: f64 = 2.0;
/// Envelopes, reference and integer lines.
const THIN_WIDTH: f64 = 1.5;
const MARKER_RADIUS: f64 = 4.5;
const LEGEND_KEY: f64 = 30.0;
const MARGIN: f64 = 14.0;
const X_LABEL_AREA: f64 = 58.0;
/// Height of one legend row and the legend's padding, for the head room above the data.
const LEGEND_ROW: f64 = 22.0;
const LEGEND_PADDING: f64 = 8.0;
/// Plot height of an untitled single panel: the figure less tick labels and margins.
const PLOT_HEIGHT: f64 = FIGURE_SIZE.1 as f64 - X_LABEL_AREA - MARGIN;
