//! Chart machinery shared by the figures: the SVG canvas, charts with the common margins,
//! axes with ticks at given values, legends and their keys, series colours, and curves drawn
//! as runs with gaps.
//!
//! # Method
//! plotters draws at whole pixels, so every figure is drawn at `SUPERSAMPLE` times its nominal
//! size and the SVG header is rewritten to the nominal width and height with a viewBox over the
//! drawing: lines and markers then sit on half nominal pixels. Axes are linear; [`Ticked`]
//! places labelled ticks at given values (levels, multiples of π, decades) and draws no
//! unlabelled light grid lines. Head room for a legend is made by raising the top of the value
//! axis by the legend's share of the plot height.
//!
//! # Accuracy
//! Positions are rounded to half a nominal pixel. `tests/plot.rs` parses every figure as XML and
//! checks its nominal size, axis descriptions, tick labels and legend entries.
//!
//! # References
//! - The `plotters` crate (SVG backend) does the drawing; no published method is involved.

use super::numbers::tick_label;
use super::{
    px, PlotError, FLOOR, FONT, GRID, INK, LABEL_SIZE, LEGEND_KEY, LEGEND_PADDING, LEGEND_ROW,
    MARGIN, PLOT_HEIGHT, SERIES, SUPERSAMPLE, THIN_WIDTH, TICK_SIZE, TITLE_SIZE, X_LABEL_AREA,
    Y_LABEL_AREA,
};
use plotters::coord::ranged1d::{AsRangedCoord, KeyPointHint, NoDefaultFormatting, ValueFormatter};
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::ops::Range;

/// Backend (pixel) coordinates, as plotters draws legend keys.
pub(super) type Pixel = (i32, i32);
pub(super) type Area<'b> = DrawingArea<SVGBackend<'b>, Shift>;
pub(super) type Chart<'a, 'b, X, Y> = ChartContext<'a, SVGBackend<'b>, Cartesian2d<X, Y>>;

/// A linear axis whose labelled ticks sit at given values (levels, multiples of π, decades)
/// rather than at the round numbers plotters would choose.
#[derive(Clone)]
pub(super) struct Ticked {
    linear: RangedCoordf64,
    ticks: Vec<f64>,
}

impl Ticked {
    pub(super) fn new(range: Range<f64>, ticks: impl IntoIterator<Item = f64>) -> Self {
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

pub(super) fn text(size: f64) -> TextStyle<'static> {
    (FONT, size).into_font().color(&INK)
}

/// A short horizontal line: the legend key of a line style.
pub(super) fn line_key(style: ShapeStyle) -> impl Fn(Pixel) -> PathElement<Pixel> {
    move |(x, y)| PathElement::new(vec![(x, y), (x + LEGEND_KEY, y)], style)
}

/// The top of a value axis from `lo` to `hi` raised so that a legend of `rows` rows fits
/// above the data in the upper corner.
pub(super) fn legend_room(lo: f64, hi: f64, rows: usize) -> f64 {
    let legend = (rows as u32 * LEGEND_ROW + LEGEND_PADDING) as f64 / PLOT_HEIGHT as f64;
    lo + (hi - lo) / (1.0 - legend.min(0.5))
}

pub(super) fn series_colour(index: usize) -> RGBColor {
    SERIES[index % SERIES.len()]
}

/// Runs `draw` on a white SVG canvas of `size` and returns the document.
pub(super) fn render_svg<F>(size: (u32, u32), draw: F) -> Result<String, PlotError>
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
pub(super) fn chart_on<'a, 'b, X, Y>(
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
pub(super) struct Axes<'f> {
    pub(super) x_desc: &'f str,
    pub(super) y_desc: &'f str,
    pub(super) x_ticks: &'f dyn Fn(&f64) -> String,
    pub(super) y_ticks: &'f dyn Fn(&f64) -> String,
}

pub(super) fn draw_axes<X, Y>(
    chart: &mut Chart<'_, '_, X, Y>,
    axes: &Axes<'_>,
) -> Result<(), PlotError>
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

pub(super) fn draw_legend<'a, 'b: 'a, X: Ranged, Y: Ranged>(
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

/// Draws the runs of one curve; the first run carries the legend entry, if any.
pub(super) fn draw_curve<X, Y>(
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

pub(super) const DASH: u32 = px(8);
pub(super) const DASH_GAP: u32 = px(6);

/// A dashed horizontal reference line (a precision floor or cap) across the chart at `y`.
pub(super) fn draw_reference_level<'a, 'b: 'a, X, Y>(
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
pub(super) fn dashed_key<'a, DB: DrawingBackend + 'a>(
    at: Pixel,
    style: ShapeStyle,
) -> impl IntoDynElement<'a, DB, Pixel> {
    let (dash, gap) = (DASH as i32, DASH_GAP as i32);
    let segment = move |from: i32| PathElement::new(vec![(from, 0), (from + dash, 0)], style);
    EmptyElement::at(at) + segment(0) + segment(dash + gap)
}

/// A legend entry for a line style, with no data drawn.
pub(super) fn legend_key<X: Ranged, Y: Ranged>(
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

/// Whole units (decades, integers) between labelled ticks: about six labels over `span`.
pub(super) fn tick_step(span: f64) -> i32 {
    [1, 2, 5, 10, 20, 50]
        .into_iter()
        .find(|&s| span / s as f64 <= 7.0)
        .unwrap_or(100)
}
