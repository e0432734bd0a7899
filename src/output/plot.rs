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

use num_complex::Complex64;
use plotters::coord::ranged1d::{AsRangedCoord, KeyPointHint, NoDefaultFormatting, ValueFormatter};
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use resvg::{tiny_skia, usvg};
use std::f64::consts::PI;
use std::ops::Range;
use std::sync::{Arc, OnceLock};
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

/// Sequential scale for log₁₀|ψ|, dark (small) to light (large).
const SEQUENTIAL: [RGBColor; 5] = [
    RGBColor(0x17, 0x1f, 0x3d),
    RGBColor(0x2b, 0x52, 0x75),
    RGBColor(0x3f, 0x8a, 0x86),
    RGBColor(0x9c, 0xbd, 0x7e),
    RGBColor(0xf4, 0xe9, 0xc8),
];

/// Cyclic scale for arg ψ on [−π, π]: the first stop is repeated at the end so that −π and π
/// get the same colour.
const CYCLIC: [RGBColor; 5] = [
    RGBColor(0x35, 0x3f, 0x86), // −π
    RGBColor(0x2f, 0x94, 0x8c), // −π/2
    RGBColor(0xef, 0xe4, 0xc4), // 0
    RGBColor(0xbf, 0x4e, 0x3a), // π/2
    RGBColor(0x35, 0x3f, 0x86), // π
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

/// Backend (pixel) coordinates, as plotters draws legend keys.
type Pixel = (i32, i32);
type Area<'b> = DrawingArea<SVGBackend<'b>, Shift>;
type Chart<'a, 'b, X, Y> = ChartContext<'a, SVGBackend<'b>, Cartesian2d<X, Y>>;

/// A linear axis whose labelled ticks sit at given values (levels, multiples of π, decades)
/// rather than at the round numbers plotters would choose.
#[derive(Clone)]
struct Ticked {
    linear: RangedCoordf64,
    ticks: Vec<f64>,
}

impl Ticked {
    fn new(range: Range<f64>, ticks: impl IntoIterator<Item = f64>) -> Self {
        let inside = |t: &f64| (range.start..=range.end).contains(t);
        let ticks = ticks.into_iter().filter(inside).collect();
        Ticked {
            linear: range.into(),
            ticks,
        }
    }
}

impl Ranged for Ticked {
    type FormatOption = NoDefaultFormatting;
    type ValueType = f64;

    fn map(&self, value: &f64, limit: (i32, i32)) -> i32 {
        self.linear.map(value, limit)
    }

    fn key_points<Hint: KeyPointHint>(&self, hint: Hint) -> Vec<f64> {
        // Only the given ticks: no unlabelled light grid lines between them.
        if hint.weight().allow_light_points() {
            Vec::new()
        } else {
            self.ticks.clone()
        }
    }

    fn range(&self) -> Range<f64> {
        self.linear.range()
    }
}

impl ValueFormatter<f64> for Ticked {
    fn format(value: &f64) -> String {
        tick_label(value)
    }
}

fn text(size: f64) -> TextStyle<'static> {
    (FONT, size).into_font().color(&INK)
}

/// A short horizontal line: the legend key of a line style.
fn line_key(style: ShapeStyle) -> impl Fn(Pixel) -> PathElement<Pixel> {
    move |(x, y)| PathElement::new(vec![(x, y), (x + LEGEND_KEY, y)], style)
}

/// The top of a value axis from `lo` to `hi` raised so that a legend of `rows` rows fits
/// above the data in the upper corner.
fn legend_room(lo: f64, hi: f64, rows: usize) -> f64 {
    let legend = (rows as u32 * LEGEND_ROW + LEGEND_PADDING) as f64 / PLOT_HEIGHT as f64;
    lo + (hi - lo) / (1.0 - legend.min(0.5))
}

fn series_colour(index: usize) -> RGBColor {
    SERIES[index % SERIES.len()]
}

/// Runs `draw` on a white SVG canvas of `size` and returns the document.
fn render_svg<F>(size: (u32, u32), draw: F) -> Result<String, PlotError>
where
    F: FnOnce(&Area<'_>) -> Result<(), PlotError>,
{
    let drawn = (px(size.0), px(size.1));
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, drawn).into_drawing_area();
        root.fill(&WHITE)?;
        draw(&root)?;
        root.present()?;
    }
    let viewbox = format!("viewBox=\"0 0 {} {}\"", drawn.0, drawn.1);
    let drawn_size = format!(
        "<svg width=\"{}\" height=\"{}\" {viewbox}",
        drawn.0, drawn.1
    );
    let nominal_size = format!("<svg width=\"{}\" height=\"{}\" {viewbox}", size.0, size.1);
    Ok(svg.replacen(&drawn_size, &nominal_size, 1))
}

/// A chart with the common margins and label areas, titled unless `title` is empty.
fn chart_on<'a, 'b, X, Y>(
    area: &'a Area<'b>,
    title: &str,
    x: X,
    y: Y,
) -> Result<Chart<'a, 'b, X::CoordDescType, Y::CoordDescType>, PlotError>
where
    X: AsRangedCoord,
    Y: AsRangedCoord,
{
    let mut builder = ChartBuilder::on(area);
    builder
        .margin(MARGIN)
        .x_label_area_size(X_LABEL_AREA)
        .y_label_area_size(Y_LABEL_AREA);
    if !title.is_empty() {
        builder.caption(title, text(TITLE_SIZE));
    }
    Ok(builder.build_cartesian_2d(x, y)?)
}

/// Axis descriptions and tick formatting of one chart.
struct Axes<'f> {
    x_desc: &'f str,
    y_desc: &'f str,
    x_ticks: &'f dyn Fn(&f64) -> String,
    y_ticks: &'f dyn Fn(&f64) -> String,
}

fn draw_axes<X, Y>(chart: &mut Chart<'_, '_, X, Y>, axes: &Axes<'_>) -> Result<(), PlotError>
where
    X: Ranged<ValueType = f64> + ValueFormatter<f64>,
    Y: Ranged<ValueType = f64> + ValueFormatter<f64>,
{
    chart
        .configure_mesh()
        .x_desc(axes.x_desc)
        .y_desc(axes.y_desc)
        .axis_desc_style(text(LABEL_SIZE))
        .label_style(text(TICK_SIZE))
        .x_label_formatter(axes.x_ticks)
        .y_label_formatter(axes.y_ticks)
        .x_labels(7)
        .y_labels(7)
        .bold_line_style(GRID.stroke_width(SUPERSAMPLE))
        .light_line_style(TRANSPARENT)
        .axis_style(INK.stroke_width(SUPERSAMPLE))
        .set_all_tick_mark_size(px(5))
        .draw()?;
    Ok(())
}

fn draw_legend<'a, 'b: 'a, X: Ranged, Y: Ranged>(
    chart: &mut Chart<'a, 'b, X, Y>,
    position: SeriesLabelPosition,
) -> Result<(), PlotError> {
    chart
        .configure_series_labels()
        .position(position)
        .label_font(text(TICK_SIZE))
        .margin(px(8))
        .legend_area_size(px(30))
        .background_style(WHITE.mix(0.9))
        .border_style(GRID.stroke_width(SUPERSAMPLE))
        .draw()?;
    Ok(())
}

// ---------------------------------------------------------------------------------------------
// Numbers as text.

/// Minus sign U+2212 instead of the hyphen, as typeset mathematics has it.
fn typeset_minus(s: String) -> String {
    s.replace('-', "−")
}

/// A tick value with at most four decimals and no trailing zeros.
fn tick_label(v: &f64) -> String {
    let s = format!("{:.4}", v);
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" {
        return "0".into();
    }
    typeset_minus(s.to_string())
}

/// `x` with `digits` significant digits, plainly written (scientific outside 1e-4..1e9).
fn significant(x: f64, digits: usize) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let magnitude = x.abs().log10().floor() as i32;
    let s = if (-4..9).contains(&magnitude) {
        let decimals = (digits as i32 - 1 - magnitude).max(0) as usize;
        format!("{:.*}", decimals, x)
    } else {
        format!("{:.*e}", digits.saturating_sub(1), x)
    };
    typeset_minus(s)
}

/// 10 to an integer power with superscript digits, e.g. "10⁻⁴⁰".
fn power_of_ten(exponent: i32) -> String {
    const SUPERSCRIPT: [char; 10] = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];
    let digits: String = exponent
        .unsigned_abs()
        .to_string()
        .bytes()
        .map(|b| SUPERSCRIPT[(b - b'0') as usize])
        .collect();
    let sign = if exponent < 0 { "⁻" } else { "" };
    format!("10{sign}{digits}")
}

/// A positive value as a power of ten ("10⁻⁴⁰") when it is one, else with three digits.
fn scientific(x: f64) -> String {
    let exponent = x.log10().round();
    if (x.log10() - exponent).abs() < 1e-9 {
        power_of_ten(exponent as i32)
    } else {
        significant(x, 3)
    }
}

/// Labels of the multiples of π/2 between −2π and 2π.
fn pi_label(v: &f64) -> String {
    let halves = (2.0 * v / PI).round() as i32;
    let s = match halves {
        0 => "0".to_string(),
        h if h % 2 == 0 && h.abs() == 2 => "π".to_string(),
        h if h % 2 == 0 => format!("{}π", h.abs() / 2),
        h if h.abs() == 1 => "π/2".to_string(),
        h => format!("{}π/2", h.abs()),
    };
    if halves < 0 {
        format!("−{s}")
    } else {
        s
    }
}

// ---------------------------------------------------------------------------------------------
// Data checks and ranges.

/// Contiguous runs of points with finite coordinates: non-finite values are gaps.
fn finite_runs(points: impl Iterator<Item = (f64, f64)>) -> Vec<Vec<(f64, f64)>> {
    let mut runs = vec![Vec::new()];
    for (x, y) in points {
        if x.is_finite() && y.is_finite() {
            runs.last_mut().expect("runs is never empty").push((x, y));
        } else if !runs.last().expect("runs is never empty").is_empty() {
            runs.push(Vec::new());
        }
    }
    runs.retain(|r| !r.is_empty());
    runs
}

/// A line needs two points; a bar chart one bar.
const LINE_POINTS: usize = 2;

/// Checks that a series has as many abscissae as values and at least `needed` plottable
/// points.
fn check_series(
    series: &str,
    (abscissae, values): (usize, usize),
    plottable: usize,
    needed: usize,
) -> Result<(), PlotError> {
    if abscissae != values {
        return Err(PlotError::LengthMismatch {
            series: series.to_string(),
            abscissae,
            values,
        });
    }
    if plottable < needed {
        return Err(PlotError::TooFewPoints {
            series: series.to_string(),
            plottable,
            needed,
        });
    }
    Ok(())
}

/// Smallest and largest finite value; an error if there is none or they coincide.
fn extent(values: impl Iterator<Item = f64>, axis: &'static str) -> Result<(f64, f64), PlotError> {
    let (lo, hi) = values
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
            (lo.min(v), hi.max(v))
        });
    if lo > hi {
        return Err(PlotError::DegenerateRange {
            axis,
            value: f64::NAN,
        });
    }
    if hi - lo <= 1e-12 * hi.abs().max(lo.abs()).max(f64::MIN_POSITIVE) {
        return Err(PlotError::DegenerateRange { axis, value: lo });
    }
    Ok((lo, hi))
}

/// `lo..hi` widened by `fraction` of its length on both sides.
fn padded((lo, hi): (f64, f64), fraction: f64) -> Range<f64> {
    let pad = fraction * (hi - lo);
    (lo - pad)..(hi + pad)
}

/// Draws the runs of one curve; the first run carries the legend entry, if any.
fn draw_curve<X, Y>(
    chart: &mut Chart<'_, '_, X, Y>,
    runs: Vec<Vec<(f64, f64)>>,
    style: ShapeStyle,
    legend: Option<&str>,
) -> Result<(), PlotError>
where
    X: Ranged<ValueType = f64>,
    Y: Ranged<ValueType = f64>,
{
    for (i, run) in runs.into_iter().enumerate() {
        let drawn = chart.draw_series(LineSeries::new(run, style))?;
        if let (0, Some(label)) = (i, legend) {
            drawn.label(label).legend(line_key(style));
        }
    }
    Ok(())
}

const DASH: u32 = px(8);
const DASH_GAP: u32 = px(6);

/// A dashed horizontal reference line (a precision floor or cap) across the chart at `y`.
fn draw_reference_level<'a, 'b: 'a, X, Y>(
    chart: &mut Chart<'a, 'b, X, Y>,
    y: f64,
    legend: &str,
) -> Result<(), PlotError>
where
    X: Ranged<ValueType = f64>,
    Y: Ranged<ValueType = f64>,
{
    let style = FLOOR.stroke_width(THIN_WIDTH);
    let x = chart.x_range();
    let line = DashedLineSeries::new([(x.start, y), (x.end, y)], DASH, DASH_GAP, style);
    chart
        .draw_series(line)?
        .label(legend)
        .legend(move |p| dashed_key(p, style));
    Ok(())
}

/// The legend key of a dashed line: two dashes.
fn dashed_key<'a, DB: DrawingBackend + 'a>(
    at: Pixel,
    style: ShapeStyle,
) -> impl IntoDynElement<'a, DB, Pixel> {
    let (dash, gap) = (DASH as i32, DASH_GAP as i32);
    let segment = move |from: i32| PathElement::new(vec![(from, 0), (from + dash, 0)], style);
    EmptyElement::at(at) + segment(0) + segment(dash + gap)
}

// ---------------------------------------------------------------------------------------------
// 1. Stacked profiles.

/// ψₙ sampled on R at one level, normalized and phase-fixed by the caller.
#[derive(Debug, Clone, PartialEq)]
pub struct ProfileSeries {
    /// The level n; the curve is drawn on the baseline y = n.
    pub level: usize,
    /// The modulus aₙ, shown beside the curve.
    pub modulus: f64,
    /// Sample points on R.
    pub r: Vec<f64>,
    /// ψₙ(r); NaN where not sampled (a gap in the curves).
    pub values: Vec<Complex64>,
}

impl ProfileSeries {
    fn name(&self) -> String {
        format!("n = {}", self.level)
    }

    /// Largest |ψ| over the finite samples, after checking the series can be drawn.
    fn peak(&self) -> Result<f64, PlotError> {
        let finite = |(r, v): (&f64, &Complex64)| r.is_finite() && v.is_finite();
        let plottable = self
            .r
            .iter()
            .zip(&self.values)
            .filter(|p| finite(*p))
            .count();
        let lengths = (self.r.len(), self.values.len());
        check_series(&self.name(), lengths, plottable, LINE_POINTS)?;
        let peak = self
            .values
            .iter()
            .filter(|v| v.is_finite())
            .map(|v| v.norm())
            .fold(0.0, f64::max);
        if peak == 0.0 {
            return Err(PlotError::ZeroProfile {
                series: self.name(),
            });
        }
        Ok(peak)
    }

    /// Runs of (r, n + s·f(ψ)) with s scaling the peak to [`PROFILE_HALF_HEIGHT`].
    fn offset_runs(&self, peak: f64, f: impl Fn(Complex64) -> f64) -> Vec<Vec<(f64, f64)>> {
        let scale = PROFILE_HALF_HEIGHT / peak;
        let base = self.level as f64;
        finite_runs(
            self.r
                .iter()
                .zip(&self.values)
                .map(|(&r, &v)| (r, base + scale * f(v))),
        )
    }
}

/// ψₙ on R for several levels, each on its own baseline (see the module documentation).
/// `real_label` names the plotted real part in the legend (e.g. "Re ψ").
///
/// # Errors
/// [`PlotError::NoSeries`] for no series; a series with mismatched lengths, fewer than two
/// finite samples, or ψ ≡ 0; all samples at one r.
pub fn stacked_profiles(
    family: &str,
    series: &[ProfileSeries],
    real_label: &str,
) -> Result<String, PlotError> {
    if series.is_empty() {
        return Err(PlotError::NoSeries {
            figure: "stacked profiles",
        });
    }
    let peaks = series
        .iter()
        .map(ProfileSeries::peak)
        .collect::<Result<Vec<_>, _>>()?;
    let r_extent = extent(series.iter().flat_map(|s| s.r.iter().copied()), "r")?;
    let levels: Vec<f64> = series.iter().map(|s| s.level as f64).collect();
    let (lo, hi) = levels
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &l| {
            (a.min(l), b.max(l))
        });
    // Room below the lowest envelope, and above the highest for the legend's two rows.
    let (bottom, top) = (lo - 0.65, hi + PROFILE_HALF_HEIGHT + 0.1);
    let y = Ticked::new(bottom..legend_room(bottom, top, 2), levels);
    let title = format!("{family}: eigenfunctions on R");
    render_svg(FIGURE_SIZE, |root| {
        let mut chart = chart_on(root, &title, padded(r_extent, 0.01), y)?;
        let level_tick = |v: &f64| format!("n = {}", v.round());
        draw_axes(
            &mut chart,
            &Axes {
                x_desc: "r",
                y_desc: "level n (offset ψₙ)",
                x_ticks: &tick_label,
                y_ticks: &level_tick,
            },
        )?;
        for (i, (s, &peak)) in series.iter().zip(&peaks).enumerate() {
            let legend = (i == 0).then_some((real_label, "±|ψ|"));
            draw_profile(&mut chart, s, peak, series_colour(i), legend)?;
        }
        draw_legend(&mut chart, SeriesLabelPosition::UpperRight)
    })
}

/// One level: the envelope ±|ψ| thin and light, Re ψ on top, the modulus label at the left.
fn draw_profile(
    chart: &mut Chart<'_, '_, RangedCoordf64, Ticked>,
    s: &ProfileSeries,
    peak: f64,
    colour: RGBColor,
    legend: Option<(&str, &str)>,
) -> Result<(), PlotError> {
    let envelope = colour.mix(0.45).stroke_width(THIN_WIDTH);
    let envelope_legend = INK.mix(0.45).stroke_width(THIN_WIDTH);
    for sign in [1.0, -1.0] {
        let runs = s.offset_runs(peak, |v| sign * v.norm());
        draw_curve(chart, runs, envelope, None)?;
    }
    let real = s.offset_runs(peak, |v| v.re);
    draw_curve(chart, real, colour.stroke_width(LINE_WIDTH), None)?;
    if let Some((real_label, envelope_label)) = legend {
        // The legend explains line styles, not levels: draw its keys in ink, off the data.
        legend_key(chart, real_label, INK.stroke_width(LINE_WIDTH))?;
        legend_key(chart, envelope_label, envelope_legend)?;
    }
    // Just above the baseline at the left end, where ψ has decayed.
    let x = chart.x_range();
    let at = (x.start + 0.015 * (x.end - x.start), s.level as f64 + 0.04);
    let label = format!("a = {}", significant(s.modulus, 6));
    let style = text(TICK_SIZE).pos(Pos::new(HPos::Left, VPos::Bottom));
    chart.draw_series(std::iter::once(Text::new(label, at, style)))?;
    Ok(())
}

/// A legend entry for a line style, with no data drawn.
fn legend_key<X: Ranged, Y: Ranged>(
    chart: &mut Chart<'_, '_, X, Y>,
    label: &str,
    style: ShapeStyle,
) -> Result<(), PlotError> {
    chart
        .draw_series(std::iter::empty::<PathElement<(X::ValueType, Y::ValueType)>>())?
        .label(label)
        .legend(line_key(style));
    Ok(())
}

// ---------------------------------------------------------------------------------------------
// 2. The strip heat map.

/// ψ sampled on a grid of the strip |Im r| ≤ 2π.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct StripMap {
    /// Re r of the grid columns, strictly increasing.
    pub re: Vec<f64>,
    /// Im r of the grid rows, strictly increasing, inside [−2π, 2π].
    pub im: Vec<f64>,
    /// `values[j][k]` = ψ(`re[k]` + i·`im[j]`); None (or a non-finite value) where not sampled.
    pub values: Vec<Vec<Option<Complex64>>>,
    /// Poles of ψ, as [Re r, Im r], marked by open circles.
    pub poles: Vec<[f64; 2]>,
    /// Branch points, as [Re r, Im r], marked by crosses.
    pub branch_points: Vec<[f64; 2]>,
}

impl StripMap {
    fn check(&self) -> Result<(), PlotError> {
        check_grid_axis("Re r", &self.re)?;
        check_grid_axis("Im r", &self.im)?;
        let strip = 2.0 * PI * (1.0 + 1e-12);
        if let Some(&value) = self.im.iter().find(|v| v.abs() > strip) {
            return Err(PlotError::OutsideStrip { value });
        }
        if self.values.len() != self.im.len() {
            return Err(PlotError::GridRows {
                expected: self.im.len(),
                found: self.values.len(),
            });
        }
        let expected = self.re.len();
        match self.values.iter().position(|row| row.len() != expected) {
            Some(row) => Err(PlotError::GridRowLength {
                expected,
                row,
                found: self.values[row].len(),
            }),
            None => Ok(()),
        }
    }

    /// The sampled finite values.
    fn sampled(&self) -> impl Iterator<Item = Complex64> + '_ {
        self.values
            .iter()
            .flatten()
            .filter_map(|v| v.filter(|v| v.is_finite()))
    }
}

fn check_grid_axis(axis: &'static str, values: &[f64]) -> Result<(), PlotError> {
    if values.len() < 2 {
        return Err(PlotError::GridTooSmall {
            axis,
            count: values.len(),
        });
    }
    match values
        .windows(2)
        .position(|w| w[1].partial_cmp(&w[0]) != Some(std::cmp::Ordering::Greater))
    {
        Some(i) => Err(PlotError::GridNotIncreasing { axis, index: i + 1 }),
        None => Ok(()),
    }
}

/// Cell edges: half way between neighbours, half a spacing beyond the ends.
fn cell_edges(centres: &[f64]) -> Vec<f64> {
    let n = centres.len();
    let mut edges = Vec::with_capacity(n + 1);
    edges.push(centres[0] - 0.5 * (centres[1] - centres[0]));
    edges.extend(centres.windows(2).map(|w| 0.5 * (w[0] + w[1])));
    edges.push(centres[n - 1] + 0.5 * (centres[n - 1] - centres[n - 2]));
    edges
}

fn interpolate(stops: &[RGBColor], t: f64) -> RGBColor {
    let t = if t.is_finite() {
        t.clamp(0.0, 1.0)
    } else {
        0.0
    };
    let x = t * (stops.len() - 1) as f64;
    let i = (x.floor() as usize).min(stops.len() - 2);
    let f = x - i as f64;
    let mix = |a: u8, b: u8| (a as f64 + f * (b as f64 - a as f64)).round() as u8;
    let (a, b) = (stops[i], stops[i + 1]);
    RGBColor(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

/// A colour scale: a value range and the colour of a value in it.
struct ColourScale {
    range: (f64, f64),
    stops: &'static [RGBColor],
}

impl ColourScale {
    fn colour(&self, v: f64) -> RGBColor {
        let (lo, hi) = self.range;
        interpolate(self.stops, (v - lo) / (hi - lo))
    }
}

/// One panel of the strip map: what it shows, its colour scale and how a ψ value maps to it.
struct Panel {
    quantity: &'static str,
    heading: String,
    scale: ColourScale,
    value: fn(Complex64) -> f64,
    ticks: Vec<f64>,
    tick_label: fn(&f64) -> String,
}

fn log_modulus(v: Complex64) -> f64 {
    v.norm().log10()
}

fn phase(v: Complex64) -> f64 {
    v.arg()
}

/// The log₁₀|ψ| panel, its colour range set by the sampled values (|ψ| = 0 drawn at the bottom).
fn modulus_panel(map: &StripMap) -> Result<Panel, PlotError> {
    let logs = map.sampled().map(log_modulus);
    let range = match extent(logs, "log₁₀|ψ|") {
        Ok(range) => range,
        // A constant |ψ| still has a colour: centre it in a one-decade range.
        Err(PlotError::DegenerateRange { value, .. }) => (value - 0.5, value + 0.5),
        // Sampled values exist but none has a finite logarithm: ψ ≡ 0 on the grid.
        Err(_) => {
            return Err(PlotError::ZeroProfile {
                series: "heat map".into(),
            })
        }
    };
    Ok(Panel {
        quantity: "log₁₀|ψ|",
        heading: format!(
            "log₁₀|ψ|, from {} to {}",
            significant(range.0, 3),
            significant(range.1, 3)
        ),
        scale: ColourScale {
            range,
            stops: &SEQUENTIAL,
        },
        value: log_modulus,
        ticks: RangedCoordf64::from(range.0..range.1).key_points(6),
        tick_label,
    })
}

fn phase_panel() -> Panel {
    Panel {
        quantity: "arg ψ",
        heading: "arg ψ, from −π to π".to_string(),
        scale: ColourScale {
            range: (-PI, PI),
            stops: &CYCLIC,
        },
        value: phase,
        ticks: (-2..=2).map(|h| h as f64 * PI / 2.0).collect(),
        tick_label: pi_label,
    }
}

/// |ψ| and arg ψ on the strip (see the module documentation); `title` heads the figure.
///
/// # Errors
/// Fewer than two grid values on an axis, grid values not increasing, Im r outside the strip,
/// rows of the wrong length, or no sampled finite value.
pub fn strip_heatmap(title: &str, map: &StripMap) -> Result<String, PlotError> {
    map.check()?;
    if map.sampled().next().is_none() {
        return Err(PlotError::NoSampledValue);
    }
    let panels = [modulus_panel(map)?, phase_panel()];
    render_svg(STRIP_FIGURE_SIZE, |root| {
        let body = match title {
            "" => root.clone(),
            _ => root.titled(title, text(TITLE_SIZE))?,
        };
        for (area, panel) in body.split_evenly((2, 1)).iter().zip(&panels) {
            draw_panel(area, map, panel)?;
        }
        Ok(())
    })
}

const COLOUR_BAR_WIDTH: u32 = px(118);
const COLOUR_BAR_STEPS: usize = 96;
const PANEL_HEADING: u32 = px(26);

fn draw_panel(area: &Area<'_>, map: &StripMap, panel: &Panel) -> Result<(), PlotError> {
    area.draw(&Text::new(
        panel.heading.clone(),
        ((Y_LABEL_AREA + MARGIN) as i32, px(4) as i32),
        text(LABEL_SIZE),
    ))?;
    let body = area.margin(PANEL_HEADING, 0, 0, 0);
    let (width, _) = body.dim_in_pixel();
    let (main, bar) = body.split_horizontally(width - COLOUR_BAR_WIDTH);
    draw_cells(&main, map, panel)?;
    draw_colour_bar(&bar, panel)
}

/// The heat map proper: one rectangle per grid value, then the markers.
fn draw_cells(area: &Area<'_>, map: &StripMap, panel: &Panel) -> Result<(), PlotError> {
    let re_edges = cell_edges(&map.re);
    let strip = 2.0 * PI;
    let im_edges: Vec<f64> = cell_edges(&map.im)
        .into_iter()
        .map(|e| e.clamp(-strip, strip))
        .collect();
    let x = re_edges[0]..re_edges[re_edges.len() - 1];
    let y = Ticked::new(-strip..strip, (-2..=2).map(|k| k as f64 * PI));
    let mut chart = chart_on(area, "", x, y)?;
    draw_axes(
        &mut chart,
        &Axes {
            x_desc: "Re r",
            y_desc: "Im r",
            x_ticks: &tick_label,
            y_ticks: &pi_label,
        },
    )?;
    let cells = map.values.iter().enumerate().flat_map(|(j, row)| {
        let (re_edges, im_edges) = (&re_edges, &im_edges);
        row.iter().enumerate().map(move |(k, v)| {
            let corners = [
                (re_edges[k], im_edges[j]),
                (re_edges[k + 1], im_edges[j + 1]),
            ];
            (corners, *v)
        })
    });
    // Cells narrower than a pixel would vanish when plotters rounds their corners: draw each
    // at least one pixel wide and high in backend coordinates instead.
    for (corners, value) in cells {
        let fill = match value.filter(|v| v.is_finite()) {
            Some(v) => panel.scale.colour((panel.value)(v)),
            None => MISSING_CELL,
        };
        // backend_coord is absolute, the area draws relative to its own corner.
        let (x0, y0) = area.get_base_pixel();
        let [a, b] = corners.map(|c| {
            let (x, y) = chart.backend_coord(&c);
            (x - x0, y - y0)
        });
        let ul = (a.0.min(b.0), a.1.min(b.1));
        let br = (a.0.max(b.0).max(ul.0 + 1), a.1.max(b.1).max(ul.1 + 1));
        area.draw(&Rectangle::new([ul, br], fill.filled()))?;
    }
    draw_markers(&mut chart, map)
}

/// Branch points as crosses and poles as open circles, dark on a white halo so that they show
/// on every colour of both scales.
fn draw_markers(
    chart: &mut Chart<'_, '_, RangedCoordf64, Ticked>,
    map: &StripMap,
) -> Result<(), PlotError> {
    let (x, y) = (chart.x_range(), chart.y_range());
    let inside = |points: &[[f64; 2]]| -> Vec<(f64, f64)> {
        let visible = |p: &&[f64; 2]| x.contains(&p[0]) && (y.start..=y.end).contains(&p[1]);
        points
            .iter()
            .filter(visible)
            .map(|p| (p[0], p[1]))
            .collect()
    };
    let (branch, poles) = (inside(&map.branch_points), inside(&map.poles));
    for (colour, width) in [(WHITE, px(4)), (INK, px(2))] {
        let style = colour.stroke_width(width);
        let size = MARKER_RADIUS;
        chart.draw_series(branch.iter().map(|&p| Cross::new(p, size, style)))?;
        chart.draw_series(poles.iter().map(|&p| Circle::new(p, size, style)))?;
    }
    Ok(())
}

/// A vertical colour bar over the panel's range with its tick labels and quantity.
fn draw_colour_bar(area: &Area<'_>, panel: &Panel) -> Result<(), PlotError> {
    let (lo, hi) = panel.scale.range;
    let mut chart = ChartBuilder::on(area)
        .margin_top(MARGIN)
        .margin_bottom(MARGIN + X_LABEL_AREA)
        .margin_left(px(10))
        .margin_right(px(4))
        .set_label_area_size(LabelAreaPosition::Right, COLOUR_BAR_WIDTH - px(40))
        .build_cartesian_2d(0.0..1.0, Ticked::new(lo..hi, panel.ticks.clone()))?;
    chart
        .configure_mesh()
        .disable_mesh()
        .disable_x_axis()
        .y_desc(panel.quantity)
        .axis_desc_style(text(LABEL_SIZE))
        .label_style(text(TICK_SIZE))
        .y_label_formatter(&panel.tick_label)
        .axis_style(INK.stroke_width(SUPERSAMPLE))
        .set_all_tick_mark_size(px(5))
        .draw()?;
    let step = (hi - lo) / COLOUR_BAR_STEPS as f64;
    chart.draw_series((0..COLOUR_BAR_STEPS).map(|i| {
        let v = lo + (i as f64 + 0.5) * step;
        let y0 = lo + i as f64 * step;
        Rectangle::new(
            [(0.0, y0), (1.0, y0 + step)],
            panel.scale.colour(v).filled(),
        )
    }))?;
    Ok(())
}

// ---------------------------------------------------------------------------------------------
// 3. Residuals.

/// Residual of the eigen-equation along R for one level (or one method).
#[derive(Debug, Clone, PartialEq)]
pub struct ResidualSeries {
    /// Legend entry, e.g. "n = 2".
    pub label: String,
    /// Sample points on R.
    pub r: Vec<f64>,
    /// Relative residual; NaN or ≤ 0 where not available (a gap).
    pub residual: Vec<f64>,
}

impl ResidualSeries {
    /// Runs of (r, log₁₀ residual), the residual clamped below at [`RESIDUAL_CLAMP`].
    fn log_runs(&self) -> Vec<Vec<(f64, f64)>> {
        finite_runs(self.r.iter().zip(&self.residual).map(|(&r, &e)| {
            let log = if e > 0.0 {
                e.max(RESIDUAL_CLAMP).log10()
            } else {
                f64::NAN
            };
            (r, log)
        }))
    }

    fn check(&self) -> Result<(), PlotError> {
        let plottable = self.log_runs().iter().map(Vec::len).sum();
        let lengths = (self.r.len(), self.residual.len());
        check_series(&self.label, lengths, plottable, LINE_POINTS)
    }
}

/// Whole units (decades, integers) between labelled ticks: about six labels over `span`.
fn tick_step(span: f64) -> i32 {
    [1, 2, 5, 10, 20, 50]
        .into_iter()
        .find(|&s| span / s as f64 <= 7.0)
        .unwrap_or(100)
}

/// The residual against r (see the module documentation); `floor` adds the dashed line.
///
/// # Errors
/// No series; a series with mismatched lengths or fewer than two positive finite residuals;
/// all samples at one r.
pub fn residual_plot(
    title: &str,
    series: &[ResidualSeries],
    floor: Option<f64>,
) -> Result<String, PlotError> {
    if series.is_empty() {
        return Err(PlotError::NoSeries {
            figure: "residual plot",
        });
    }
    series.iter().try_for_each(ResidualSeries::check)?;
    let runs: Vec<_> = series.iter().map(ResidualSeries::log_runs).collect();
    let r_extent = extent(series.iter().flat_map(|s| s.r.iter().copied()), "r")?;
    let floor = floor.filter(|f| *f > 0.0 && f.is_finite());
    let logs = runs.iter().flatten().flatten().map(|p| p.1);
    let (lo, hi) = log_extent(logs.chain(floor.map(f64::log10)));
    let hi = legend_room(lo, hi, series.len() + floor.iter().count()).ceil();
    let step = tick_step(hi - lo);
    let ticks = (lo as i32..=hi as i32).filter(|e| e % step == 0);
    let y = Ticked::new(lo..hi, ticks.map(f64::from));
    render_svg(FIGURE_SIZE, |root| {
        let mut chart = chart_on(root, title, padded(r_extent, 0.01), y)?;
        let decade = |v: &f64| power_of_ten(v.round() as i32);
        draw_axes(
            &mut chart,
            &Axes {
                x_desc: "r",
                y_desc: "relative residual",
                x_ticks: &tick_label,
                y_ticks: &decade,
            },
        )?;
        for (i, (s, runs)) in series.iter().zip(runs).enumerate() {
            let style = series_colour(i).stroke_width(LINE_WIDTH);
            draw_curve(&mut chart, runs, style, Some(&s.label))?;
        }
        if let Some(f) = floor {
            let label = format!("floor {}", scientific(f));
            draw_reference_level(&mut chart, f.log10(), &label)?;
        }
        draw_legend(&mut chart, SeriesLabelPosition::UpperRight)
    })
}

/// Whole decades enclosing the finite values, at least one decade apart; the caller guarantees
/// there is a finite value.
fn log_extent(logs: impl Iterator<Item = f64>) -> (f64, f64) {
    let (lo, hi) = logs
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
            (a.min(v), b.max(v))
        });
    let (lo, hi) = ((lo - 0.25).floor(), (hi + 0.25).ceil());
    (lo, hi.max(lo + 1.0))
}

// ---------------------------------------------------------------------------------------------
// 4. ν(a).

/// The higher normal function along a range of moduli, with the attractors found on it.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct NuCurve {
    /// log a at the samples.
    pub log_a: Vec<f64>,
    /// ν(a) at the samples; NaN where not computed (a gap).
    pub nu: Vec<f64>,
    /// Attractor moduli: (log a, the integer ν there).
    pub crossings: Vec<(f64, i64)>,
    /// log of the eigenvalues of the independent spectrum, marked on the horizontal axis.
    pub eigenvalues_log_a: Vec<f64>,
}

/// ν(a) against log a with the attractors and the independent eigenvalues (see the module
/// documentation).
///
/// # Errors
/// Mismatched lengths or fewer than two finite samples of ν; all samples at one log a or one ν.
pub fn nu_plot(family: &str, curve: &NuCurve) -> Result<String, PlotError> {
    let runs = finite_runs(curve.log_a.iter().copied().zip(curve.nu.iter().copied()));
    let plottable = runs.iter().map(Vec::len).sum();
    let lengths = (curve.log_a.len(), curve.nu.len());
    check_series("ν(a)", lengths, plottable, LINE_POINTS)?;
    let crossing_x = curve.crossings.iter().map(|c| c.0);
    let xs = runs.iter().flatten().map(|p| p.0);
    let x = extent(
        xs.chain(crossing_x)
            .chain(curve.eigenvalues_log_a.iter().copied()),
        "log a",
    )?;
    let ys = runs.iter().flatten().map(|p| p.1);
    let y = padded(
        extent(ys.chain(curve.crossings.iter().map(|c| c.1 as f64)), "ν")?,
        0.08,
    );
    let step = tick_step(y.end - y.start);
    let integers = (y.start.ceil() as i32..=y.end.floor() as i32).filter(|k| k % step == 0);
    let y_axis = Ticked::new(y.clone(), integers.map(f64::from));
    let title = format!("{family}: higher normal function ν(a)");
    render_svg(FIGURE_SIZE, |root| {
        let mut chart = chart_on(root, &title, padded(x, 0.03), y_axis)?;
        draw_axes(
            &mut chart,
            &Axes {
                x_desc: "log a",
                y_desc: "ν(a)",
                x_ticks: &tick_label,
                y_ticks: &tick_label,
            },
        )?;
        draw_integer_lines(&mut chart, &y)?;
        let style = series_colour(0).stroke_width(LINE_WIDTH);
        draw_curve(&mut chart, runs, style, Some("ν(a)"))?;
        draw_crossings(&mut chart, &curve.crossings)?;
        draw_eigenvalue_ticks(&mut chart, &curve.eigenvalues_log_a)?;
        draw_legend(&mut chart, SeriesLabelPosition::UpperLeft)
    })
}

/// More integer lines than this would grey the plot: then only the labelled ticks have lines.
const MAX_INTEGER_LINES: i64 = 40;

/// Faint horizontal lines at the integers, where the attractors lie.
fn draw_integer_lines(
    chart: &mut Chart<'_, '_, RangedCoordf64, Ticked>,
    y: &Range<f64>,
) -> Result<(), PlotError> {
    let x = chart.x_range();
    let style = FLOOR.mix(0.25).stroke_width(THIN_WIDTH);
    let (first, last) = (y.start.ceil() as i64, y.end.floor() as i64);
    if last - first > MAX_INTEGER_LINES {
        return Ok(());
    }
    let integers = (first..=last).map(|k| k as f64);
    chart.draw_series(integers.map(|k| PathElement::new(vec![(x.start, k), (x.end, k)], style)))?;
    Ok(())
}

fn draw_crossings(
    chart: &mut Chart<'_, '_, RangedCoordf64, Ticked>,
    crossings: &[(f64, i64)],
) -> Result<(), PlotError> {
    let colour = series_colour(1);
    let dots = crossings
        .iter()
        .map(|&(x, k)| Circle::new((x, k as f64), MARKER_RADIUS, colour.filled()));
    chart
        .draw_series(dots)?
        .label("ν ∈ Z (attractor)")
        .legend(move |p| Circle::new(p, MARKER_RADIUS, colour.filled()));
    // Up and to the left of the dot: ν grows with a, so the curve leaves that corner free.
    let style = text(TICK_SIZE).pos(Pos::new(HPos::Right, VPos::Bottom));
    let offset = (-(px(6) as i32), -(px(4) as i32));
    let labels = crossings.iter().map(|&(x, k)| {
        let label = typeset_minus(format!("ν = {k}"));
        EmptyElement::at((x, k as f64)) + Text::new(label, offset, style.clone())
    });
    chart.draw_series(labels)?;
    Ok(())
}

/// Short vertical ticks rising from the horizontal axis at the independent eigenvalues.
fn draw_eigenvalue_ticks(
    chart: &mut Chart<'_, '_, RangedCoordf64, Ticked>,
    eigenvalues_log_a: &[f64],
) -> Result<(), PlotError> {
    let y = chart.y_range();
    let (bottom, top) = (y.start, y.start + 0.06 * (y.end - y.start));
    let style = series_colour(3).stroke_width(px(3));
    let ticks = eigenvalues_log_a
        .iter()
        .filter(|v| v.is_finite())
        .map(|&x| PathElement::new(vec![(x, bottom), (x, top)], style));
    chart
        .draw_series(ticks)?
        .label("independent spectrum")
        .legend(move |(x, y)| {
            let (mid, half) = (x + LEGEND_KEY / 2, px(7) as i32);
            PathElement::new(vec![(mid, y - half), (mid, y + half)], style)
        });
    Ok(())
}

// ---------------------------------------------------------------------------------------------
// 5. Agreement digits.

/// Digits of agreement between the attractor moduli and the independent spectrum, per level,
/// for one family.
#[derive(Debug, Clone, PartialEq)]
pub struct AgreementBars {
    /// Legend entry.
    pub family: String,
    /// The levels compared.
    pub levels: Vec<usize>,
    /// Agreement digits per level; NaN where not compared (no bar).
    pub digits: Vec<f64>,
    /// The precision that bounds the comparison, in digits (dashed line).
    pub cap: f64,
}

impl AgreementBars {
    fn check(&self) -> Result<(), PlotError> {
        let plottable = self.digits.iter().filter(|d| d.is_finite()).count();
        let lengths = (self.levels.len(), self.digits.len());
        check_series(&self.family, lengths, plottable, 1)
    }
}

const GROUP_WIDTH: f64 = 0.8;

/// Agreement digits per level, grouped by family (see the module documentation).
///
/// # Errors
/// No families; a family with mismatched lengths or no finite digit count.
pub fn agreement_plot(bars: &[AgreementBars]) -> Result<String, PlotError> {
    if bars.is_empty() {
        return Err(PlotError::NoSeries {
            figure: "agreement plot",
        });
    }
    bars.iter().try_for_each(AgreementBars::check)?;
    let mut levels: Vec<usize> = bars.iter().flat_map(|b| b.levels.iter().copied()).collect();
    levels.sort_unstable();
    levels.dedup();
    let (first, last) = (levels[0] as f64, levels[levels.len() - 1] as f64);
    let x = Ticked::new(
        (first - 0.6)..(last + 0.6),
        levels.iter().map(|&l| l as f64),
    );
    let finite = |v: &f64| v.is_finite();
    let all = bars
        .iter()
        .flat_map(|b| b.digits.iter().copied().chain([b.cap]));
    let highest = all.clone().filter(finite).fold(1.0, f64::max);
    let bottom = all.filter(finite).fold(0.0, f64::min) * 1.05;
    let caps = distinct_caps(bars).len();
    let top = legend_room(bottom, 1.05 * highest, bars.len() + caps);
    render_svg(FIGURE_SIZE, |root| {
        let mut chart = chart_on(
            root,
            "agreement with the independent spectrum",
            x,
            bottom..top,
        )?;
        let level_tick = |v: &f64| format!("{}", v.round());
        draw_axes(
            &mut chart,
            &Axes {
                x_desc: "level n",
                y_desc: "agreement digits",
                x_ticks: &level_tick,
                y_ticks: &tick_label,
            },
        )?;
        for (i, family) in bars.iter().enumerate() {
            draw_family_bars(&mut chart, family, i, bars.len())?;
        }
        draw_caps(&mut chart, bars)?;
        draw_legend(&mut chart, SeriesLabelPosition::UpperRight)
    })
}

fn draw_family_bars(
    chart: &mut Chart<'_, '_, Ticked, RangedCoordf64>,
    family: &AgreementBars,
    index: usize,
    families: usize,
) -> Result<(), PlotError> {
    let colour = series_colour(index);
    let width = GROUP_WIDTH / families as f64;
    let left = -0.5 * GROUP_WIDTH + index as f64 * width;
    let rects = family
        .levels
        .iter()
        .zip(&family.digits)
        .filter(|(_, d)| d.is_finite())
        .map(|(&n, &d)| {
            let x0 = n as f64 + left;
            // A hairline of white between neighbouring bars keeps the groups legible.
            Rectangle::new([(x0 + 0.01, 0.0), (x0 + width - 0.01, d)], colour.filled())
        });
    chart
        .draw_series(rects)?
        .label(family.family.as_str())
        .legend(move |(x, y)| {
            let half = px(6) as i32;
            Rectangle::new([(x, y - half), (x + LEGEND_KEY, y + half)], colour.filled())
        });
    Ok(())
}

fn distinct_caps(bars: &[AgreementBars]) -> Vec<f64> {
    let mut caps: Vec<f64> = bars
        .iter()
        .map(|b| b.cap)
        .filter(|c| c.is_finite())
        .collect();
    caps.sort_by(f64::total_cmp);
    caps.dedup();
    caps
}

/// One dashed line per distinct cap, labelled once.
fn draw_caps<'a, 'b: 'a>(
    chart: &mut Chart<'a, 'b, Ticked, RangedCoordf64>,
    bars: &[AgreementBars],
) -> Result<(), PlotError> {
    for cap in distinct_caps(bars) {
        // One decimal at most: the cap is a digit count, not a measured value to quote finely.
        let shown = if (cap - cap.round()).abs() < 0.05 {
            format!("{:.0}", cap.round())
        } else {
            format!("{cap:.1}")
        };
        let label = format!("cap {shown} digits");
        draw_reference_level(chart, cap, &label)?;
    }
    Ok(())
}

// ---------------------------------------------------------------------------------------------
// PNG.

const EMBEDDED_FAMILY: &str = "DejaVu Sans";

/// The embedded font, loaded once: DejaVu Sans (the figures use one face) standing in for every
/// generic family, so that no system font is consulted.
fn embedded_fonts() -> Arc<usvg::fontdb::Database> {
    static FONTS: OnceLock<Arc<usvg::fontdb::Database>> = OnceLock::new();
    FONTS
        .get_or_init(|| {
            let mut db = usvg::fontdb::Database::new();
            let face = dejavu::sans::regular();
            db.load_font_source(usvg::fontdb::Source::Binary(Arc::new(face)));
            db.set_sans_serif_family(EMBEDDED_FAMILY);
            db.set_serif_family(EMBEDDED_FAMILY);
            db.set_monospace_family(EMBEDDED_FAMILY);
            Arc::new(db)
        })
        .clone()
}

/// Rasterizes an SVG document (one of this module's figures, or any SVG) to PNG bytes of the
/// given width, the height following the document's aspect ratio, on a white background.
///
/// # Errors
/// A side of 0 or above [`MAX_PNG_SIDE`] pixels, an SVG that does not parse, or a failed
/// encoding.
pub fn to_png(svg: &str, width: u32) -> Result<Vec<u8>, PlotError> {
    let size_error = |height| PlotError::PngSize {
        width,
        height,
        max: MAX_PNG_SIDE,
    };
    if width == 0 || width > MAX_PNG_SIDE {
        return Err(size_error(0));
    }
    let options = usvg::Options {
        font_family: EMBEDDED_FAMILY.to_string(),
        fontdb: embedded_fonts(),
        ..Default::default()
    };
    let tree =
        usvg::Tree::from_str(svg, &options).map_err(|e| PlotError::SvgParse(e.to_string()))?;
    let size = tree.size();
    let scale = width as f32 / size.width();
    let height = (size.height() * scale).round().max(1.0) as u32;
    if height > MAX_PNG_SIDE {
        return Err(size_error(height));
    }
    let mut pixmap = tiny_skia::Pixmap::new(width, height).ok_or(size_error(height))?;
    pixmap.fill(tiny_skia::Color::WHITE);
    let transform = tiny_skia::Transform::from_scale(scale, scale);
    resvg::render(&tree, transform, &mut pixmap.as_mut());
    pixmap
        .encode_png()
        .map_err(|e| PlotError::PngEncode(e.to_string()))
}
