//! Residuals: the eigen-equation residual against r on a logarithmic axis.
//!
//! # Method
//! log₁₀ of each residual is drawn against r, one style per series (colour, dash pattern and
//! markers at nine abscissae, shifted between series), with the axis labelled in
//! powers of ten over whole decades; residuals below [`RESIDUAL_CLAMP`] are drawn at it and a
//! residual ≤ 0 or non-finite is a gap. An optional dashed horizontal line marks the precision
//! floor.
//!
//! # Accuracy
//! The axis spans whole decades enclosing the data with a quarter decade of margin;
//! `tests/plot.rs` checks the decade labels, the legend and the floor line.
//!
//! # Errors
//! [`PlotError::NoSeries`], [`PlotError::LengthMismatch`], [`PlotError::TooFewPoints`],
//! [`PlotError::DegenerateRange`].
//!
//! # References
//! None: a drawing convention.

use super::axes::{
    draw_axes, draw_grid, draw_legend, draw_series, draw_title, legend_room, plot_rect,
    round_labelled, tick_step, Axes, Corner, Frame, Key, LegendEntry, LineLook, Obstacles,
};
use super::data::{check_series, extent, finite_runs, padded, LINE_POINTS};
use super::numbers::{power_of_ten, scientific};
use super::style::series_style;
use super::svg::{Stroke, Svg};
use super::{PlotError, FIGURE_SIZE, FLOOR, LINE_WIDTH, RESIDUAL_CLAMP, THIN_WIDTH};

/// Markers a curve carries: enough to tell the series apart, few enough not to crowd.
const MARKERS: usize = 9;
/// The floor's dashes: longer than any series dash pattern.
const FLOOR_DASH: &[f64] = &[12.0, 5.0];

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

/// The residual against r (see the module documentation); `floor` adds the dashed line.
///
/// # Errors
/// No series; a series with mismatched lengths or fewer than two positive finite residuals;
/// all samples at one r.
pub fn residual_plot(
    title: Option<&str>,
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
    let hi = legend_room(lo, hi, series.len() + floor.iter().count(), title.is_some()).ceil();
    let step = tick_step(hi - lo);
    let decades = (lo as i32..=hi as i32).filter(|e| e % step == 0);
    let x = padded(r_extent, 0.01);
    let axes = Axes {
        x_desc: "r",
        y_desc: "relative residual",
        x_ticks: round_labelled(x.start, x.end, 7),
        y_ticks: decades.map(|e| (e as f64, power_of_ten(e))).collect(),
    };
    let area = (0.0, 0.0, FIGURE_SIZE.0 as f64, FIGURE_SIZE.1 as f64);
    let frame = Frame::new(
        plot_rect(area, title.is_some(), &axes.y_ticks, 0.0),
        x,
        lo..hi,
    );
    let mut svg = Svg::new(FIGURE_SIZE);
    if let Some(title) = title {
        draw_title(&mut svg, area, title);
    }
    draw_grid(&mut svg, &frame, &axes);
    let mut obstacles = Obstacles::default();
    let mut legend = Vec::new();
    if let Some(f) = floor {
        let stroke = Stroke::dashed(FLOOR, THIN_WIDTH, FLOOR_DASH);
        let look = LineLook::plain(stroke);
        let level = vec![vec![(frame.x.lo, f.log10()), (frame.x.hi, f.log10())]];
        let label = format!("floor {}", scientific(f));
        draw_series(
            &mut svg,
            &frame,
            &level,
            &look,
            Some(&label),
            (0, 0.0),
            &mut obstacles,
        );
        legend.push(LegendEntry {
            label,
            key: Key::Line(look),
        });
    }
    for (i, (s, runs)) in series.iter().zip(&runs).enumerate() {
        let look = LineLook::of(series_style(i), LINE_WIDTH);
        let phase = i as f64 / series.len() as f64;
        draw_series(
            &mut svg,
            &frame,
            runs,
            &look,
            Some(&s.label),
            (MARKERS, phase),
            &mut obstacles,
        );
        legend.push(LegendEntry {
            label: s.label.clone(),
            key: Key::Line(look),
        });
    }
    // Series first, then the floor, as the reader meets them in the data.
    legend.rotate_left(floor.iter().count());
    draw_axes(&mut svg, &frame, &axes);
    let corners = [
        Corner::UpperRight,
        Corner::UpperLeft,
        Corner::LowerRight,
        Corner::LowerLeft,
    ];
    draw_legend(&mut svg, &frame, &legend, &corners, &obstacles);
    Ok(svg.finish())
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
