//! Figures of the eigenfunctions and their checks, as SVG documents and PNG bytes. Pure drawing:
//! every function takes plain data and returns the document; the binary writes the files.
//!
//! # Figures
//! - [`stacked_profiles`]: ψₙ(r) on R for several levels. Horizontal axis r; level n is drawn
//!   on the baseline y = n: the real part of the phase-fixed ψₙ as a line and ±|ψₙ| as a thin
//!   envelope, both scaled so that max|ψₙ| reaches [`PROFILE_HALF_HEIGHT`] above the baseline.
//!   The vertical tick labels name the levels ("n = 0", …), a label per curve gives its modulus
//!   aₙ (six significant digits).
//! - [`strip_heatmap`]: ψ on the strip |Im r| ≤ 2π, two panels stacked: log₁₀|ψ| on a
//!   sequential scale (ink blue → sea green → sand) and arg ψ on a cyclic scale (indigo at ±π,
//!   teal at −π/2, pale sand at 0, brick at π/2), each with a colour bar. Horizontal axis Re r,
//!   vertical axis Im r from −2π to 2π with ticks at the multiples of π. Each grid value fills
//!   the cell reaching half way to its neighbours; cells without a sampled value are neutral
//!   grey. Branch points are marked by crosses, poles by open circles.
//! - [`residual_plot`]: eigen-equation residual against r on a logarithmic axis (powers of ten),
//!   one colour per series, an optional dashed horizontal line at the precision floor.
//! - [`nu_plot`]: the higher normal function ν(a) against log a, faint lines at the integers,
//!   the attractor crossings ν = k as filled dots, and the independently computed eigenvalues
//!   as short ticks on the horizontal axis (they should sit under the dots).
//! - [`agreement_plot`]: agreement digits with the independent spectrum per level, grouped
//!   bars with one colour per family, and a dashed line at each precision cap.
//!
//! # Layout
//! One private submodule per figure (`profiles`, `strip`, `residual`, `nu`, `agreement`), the
//! shared chart machinery (`axes`), numbers as text (`numbers`), data checks and ranges
//! (`data`), and rasterization (`png`); their public items are re-exported here.
//!
//! # Conventions
//! Single panels are [`FIGURE_SIZE`] (640 × 420 px), the strip map [`STRIP_FIGURE_SIZE`]; text is
//! at least 14 px, lines at least 1.5 px wide, on a white background. Text is emitted as SVG
//! `<text>` in the generic `sans-serif` family, minus signs as U+2212.
//!
//! # PNG
//! [`to_png`] rasterizes any of these SVG documents with `resvg` (pure Rust) at a requested
//! width. Text is set in DejaVu Sans, embedded through the `dejavu` crate (Bitstream Vera font
//! licence; DejaVu changes are in the public domain; the licence text ships with that crate),
//! so no system font or font library is needed.
//!
//! # Example
//! ```
//! use regwave::output::plot::{agreement_plot, to_png, AgreementBars};
//!
//! let bars = [AgreementBars {
//!     family: "F0".into(),
//!     levels: vec![0, 1, 2],
//!     digits: vec![29.4, 28.9, 28.1],
//!     cap: 30.0,
//! }];
//! let svg = agreement_plot(&bars)?;
//! assert!(svg.contains("agreement digits"));
//! let png = to_png(&svg, 1280)?;
//! assert_eq!(&png[1..4], b"PNG");
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
mod png;
mod profiles;
mod residual;
mod strip;

pub use agreement::{agreement_plot, AgreementBars};
pub use nu::{nu_plot, NuCurve};
pub use png::to_png;
pub use profiles::{stacked_profiles, ProfileSeries};
pub use residual::{residual_plot, ResidualSeries};
pub use strip::{strip_heatmap, StripMap};

use plotters::prelude::{DrawingAreaErrorKind, RGBColor};
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
pub const MISSING_CELL: RGBColor = RGBColor(0xa8, 0xa8, 0xa8);

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
    /// plotters reported a failure while drawing.
    #[error("drawing failed: {0}")]
    Drawing(String),
    /// The document given to [`to_png`] is not SVG that resvg can read.
    #[error("the SVG document could not be read: {0}")]
    SvgParse(String),
    /// The PNG asked for is empty or too large.
    #[error("PNG of {width} × {height} px: each side must lie in 1..={max}")]
    PngSize { width: u32, height: u32, max: u32 },
    /// The PNG encoder failed.
    #[error("PNG encoding failed: {0}")]
    PngEncode(String),
}

impl<E: std::error::Error + Send + Sync> From<DrawingAreaErrorKind<E>> for PlotError {
    fn from(e: DrawingAreaErrorKind<E>) -> Self {
        PlotError::Drawing(e.to_string())
    }
}

// ---------------------------------------------------------------------------------------------
// Look: palette, fonts, sizes.

const INK: RGBColor = RGBColor(0x23, 0x27, 0x33);
const GRID: RGBColor = RGBColor(0xe2, 0xe4, 0xe8);
const FLOOR: RGBColor = RGBColor(0x6b, 0x6f, 0x7a);

/// Series colours: distinguishable, of similar weight on white, none of them grey.
const SERIES: [RGBColor; 7] = [
    RGBColor(0x1f, 0x5f, 0x8b), // deep sea blue
    RGBColor(0xc2, 0x5b, 0x2a), // burnt orange
    RGBColor(0x3c, 0x8d, 0x5a), // moss green
    RGBColor(0x8a, 0x3b, 0x7e), // plum
    RGBColor(0xb8, 0x93, 0x1c), // ochre
    RGBColor(0x2a, 0x9d, 0xa4), // lagoon
    RGBColor(0x7a, 0x4a, 0x2e), // walnut
];

const FONT: &str = "sans-serif";

// plotters places everything at whole pixels: the figures are drawn at SUPERSAMPLE times their
// nominal size and the SVG viewBox maps that back, so lines and markers sit on half pixels.
// Every length below is in drawing pixels (nominal pixels × SUPERSAMPLE).
const SUPERSAMPLE: u32 = 2;

const fn px(nominal: u32) -> u32 {
    nominal * SUPERSAMPLE
}

// plotters writes size / 1.24 into the SVG: these give 14.5, 16.1 and 17.7 nominal px.
const TICK_SIZE: f64 = 18.0 * SUPERSAMPLE as f64;
const LABEL_SIZE: f64 = 20.0 * SUPERSAMPLE as f64;
const TITLE_SIZE: f64 = 22.0 * SUPERSAMPLE as f64;
/// Data lines: 2 nominal px.
const LINE_WIDTH: u32 = 4;
/// Envelopes, reference and integer lines: 1.5 nominal px.
const THIN_WIDTH: u32 = 3;
const MARKER_RADIUS: u32 = px(5);
const LEGEND_KEY: i32 = px(22) as i32;
const MARGIN: u32 = px(14);
const X_LABEL_AREA: u32 = px(52);
const Y_LABEL_AREA: u32 = px(78);
/// Height of one legend row and the legend's padding, for the head room above the data.
const LEGEND_ROW: u32 = px(23);
const LEGEND_PADDING: u32 = px(20);
/// Nominal plot height of a single panel: the figure less title, tick labels and margins.
const PLOT_HEIGHT: u32 = px(FIGURE_SIZE.1 - 130);
