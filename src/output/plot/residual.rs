//! Residuals: the eigen-equation residual against r on a logarithmic axis.
//!
//! # Method
//! log₁₀ of each residual is drawn against r, one colour per series, with the axis labelled in
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
    chart_on, draw_axes, draw_curve, draw_legend, draw_reference_level, legend_room, render_svg,
    series_colour, tick_step, Axes, Ticked,
};
use super::data::{check_series, extent, finite_runs, padded, LINE_POINTS};
use super::numbers::{power_of_ten, scientific, tick_label};
use super::{PlotError, FIGURE_SIZE, LINE_WIDTH, RESIDUAL_CLAMP};
use plotters::prelude::*;

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
