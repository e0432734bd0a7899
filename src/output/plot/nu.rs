//! ν(a): the higher normal function against log a, with its attractors and the independent
//! eigenvalues.
//!
//! # Method
//! ν(a) is drawn as a line over log a, faint horizontal lines at the integers (at most 40 of
//! them), the attractor crossings ν = k as filled dots labelled "ν = k", and the independently
//! computed eigenvalues as short ticks rising from the horizontal axis (they should sit under
//! the dots).
//!
//! # Accuracy
//! Positions are rounded to half a nominal pixel; `tests/plot.rs` checks the crossing labels and
//! one tick per eigenvalue.
//!
//! # Errors
//! [`PlotError::LengthMismatch`], [`PlotError::TooFewPoints`], [`PlotError::DegenerateRange`].
//!
//! # References
//! None: a drawing convention.

use super::axes::{
    chart_on, draw_axes, draw_curve, draw_legend, render_svg, series_colour, text, tick_step, Axes,
    Chart, Ticked,
};
use super::data::{check_series, extent, finite_runs, padded, LINE_POINTS};
use super::numbers::{tick_label, typeset_minus};
use super::{
    px, PlotError, FIGURE_SIZE, FLOOR, LEGEND_KEY, LINE_WIDTH, MARKER_RADIUS, THIN_WIDTH, TICK_SIZE,
};
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use std::ops::Range;

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
