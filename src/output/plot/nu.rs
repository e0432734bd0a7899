//! ν(a): the higher normal function against ln a, with its attractors and the independent
//! eigenvalues.
//!
//! # Method
//! ν(a) is drawn as a line over ln a (the natural logarithm), faint horizontal lines at the
//! integers (at most 40 of them), the attractor crossings as filled dots, and the
//! independently computed eigenvalues as short ticks rising from the horizontal axis (they
//! should sit under the dots). Level n is the crossing ν = n + 1, so a dot at ν = k ≥ 1 is
//! labelled "n = k − 1", as levels are everywhere else; a crossing at ν ≤ 0 has no level and
//! is labelled "ν = k". Each label goes to the first of four places around its dot (up-left,
//! down-right, up-right, down-left) where it meets neither the curve, nor a dot, nor another
//! label.
//!
//! # Accuracy
//! Positions to 0.01 px; `tests/plot.rs` checks the crossing labels, one tick per eigenvalue,
//! and that no label meets the curve.
//!
//! # Errors
//! [`PlotError::LengthMismatch`], [`PlotError::TooFewPoints`], [`PlotError::DegenerateRange`].
//!
//! # References
//! None: a drawing convention.

use super::axes::{
    draw_axes, draw_grid, draw_legend, draw_series, draw_title, font, grown, least_crowded,
    plot_rect, round_labelled, text_box, tick_step, Axes, Corner, Frame, Key, LegendEntry,
    LineLook, Obstacles,
};
use super::data::{check_series, extent, finite_runs, padded, LINE_POINTS};
use super::numbers::{tick_label, typeset_minus};
use super::style::series_style;
use super::svg::{Anchor, Stroke, Svg};
use super::{PlotError, FIGURE_SIZE, FLOOR, LINE_WIDTH, MARKER_RADIUS, THIN_WIDTH, TICK_SIZE};
use std::ops::Range;

/// The higher normal function along a range of moduli, with the attractors found on it.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct NuCurve {
    /// ln a (the natural logarithm) at the samples.
    pub log_a: Vec<f64>,
    /// ν(a) at the samples; NaN where not computed (a gap).
    pub nu: Vec<f64>,
    /// Attractor moduli: (ln a, the integer ν there).
    pub crossings: Vec<(f64, i64)>,
    /// ln of the eigenvalues of the independent spectrum, marked on the horizontal axis.
    pub eigenvalues_log_a: Vec<f64>,
}

/// ν(a) against ln a with the attractors and the independent eigenvalues (see the module
/// documentation).
///
/// # Errors
/// Mismatched lengths or fewer than two finite samples of ν; all samples at one ln a or one ν.
pub fn nu_plot(title: Option<&str>, curve: &NuCurve) -> Result<String, PlotError> {
    let runs = finite_runs(curve.log_a.iter().copied().zip(curve.nu.iter().copied()));
    let plottable = runs.iter().map(Vec::len).sum();
    let lengths = (curve.log_a.len(), curve.nu.len());
    check_series("ν(a)", lengths, plottable, LINE_POINTS)?;
    let crossing_x = curve.crossings.iter().map(|c| c.0);
    let xs = runs.iter().flatten().map(|p| p.0);
    let x = extent(
        xs.chain(crossing_x)
            .chain(curve.eigenvalues_log_a.iter().copied()),
        "ln a",
    )?;
    let ys = runs.iter().flatten().map(|p| p.1);
    let y = padded(
        extent(ys.chain(curve.crossings.iter().map(|c| c.1 as f64)), "ν")?,
        0.08,
    );
    let step = tick_step(y.end - y.start);
    let integers = (y.start.ceil() as i32..=y.end.floor() as i32).filter(|k| k % step == 0);
    let x = padded(x, 0.03);
    let axes = Axes {
        x_desc: "ln a",
        y_desc: "ν(a)",
        x_ticks: round_labelled(x.start, x.end, 7),
        y_ticks: integers
            .map(|k| (k as f64, tick_label(&(k as f64))))
            .collect(),
    };
    let area = (0.0, 0.0, FIGURE_SIZE.0 as f64, FIGURE_SIZE.1 as f64);
    let frame = Frame::new(
        plot_rect(area, title.is_some(), &axes.y_ticks, 0.0),
        x,
        y.clone(),
    );
    let mut svg = Svg::new(FIGURE_SIZE);
    if let Some(title) = title {
        draw_title(&mut svg, area, title);
    }
    draw_grid(&mut svg, &frame, &axes);
    draw_integer_lines(&mut svg, &frame, &y);
    let mut obstacles = Obstacles::default();
    let look = LineLook::plain(Stroke::solid(series_style(0).colour, LINE_WIDTH));
    draw_series(
        &mut svg,
        &frame,
        &runs,
        &look,
        Some("ν(a)"),
        (0, 0.0),
        &mut obstacles,
    );
    let dot = series_style(1).colour;
    let tick = Stroke::solid(series_style(2).colour, 3.0);
    draw_eigenvalue_ticks(
        &mut svg,
        &frame,
        &curve.eigenvalues_log_a,
        &tick,
        &mut obstacles,
    );
    draw_crossings(&mut svg, &frame, &curve.crossings, &mut obstacles);
    draw_axes(&mut svg, &frame, &axes);
    let legend = [
        LegendEntry {
            label: "ν(a)".into(),
            key: Key::Line(look),
        },
        LegendEntry {
            label: "ν ∈ ℤ: attractor modulus".into(),
            key: Key::Dot(dot, MARKER_RADIUS),
        },
        LegendEntry {
            label: "independent spectrum".into(),
            key: Key::Tick(tick),
        },
    ];
    let corners = [
        Corner::UpperLeft,
        Corner::LowerRight,
        Corner::UpperRight,
        Corner::LowerLeft,
    ];
    draw_legend(&mut svg, &frame, &legend, &corners, &obstacles);
    Ok(svg.finish())
}

/// More integer lines than this would grey the plot: then only the labelled ticks have lines.
const MAX_INTEGER_LINES: i64 = 40;

/// Faint horizontal lines at the integers, where the attractors lie.
fn draw_integer_lines(svg: &mut Svg, frame: &Frame, y: &Range<f64>) {
    let (first, last) = (y.start.ceil() as i64, y.end.floor() as i64);
    if last - first > MAX_INTEGER_LINES {
        return;
    }
    let style = Stroke {
        opacity: 0.3,
        ..Stroke::solid(FLOOR, THIN_WIDTH)
    };
    for k in first..=last {
        let y = frame.y.at(k as f64);
        svg.polyline(&[(frame.left(), y), (frame.right(), y)], &style);
    }
}

/// The label of the crossing ν = k: the level n = k − 1 it belongs to.
fn crossing_label(k: i64) -> String {
    if k >= 1 {
        format!("n = {}", k - 1)
    } else {
        typeset_minus(format!("ν = {k}"))
    }
}

fn draw_crossings(
    svg: &mut Svg,
    frame: &Frame,
    crossings: &[(f64, i64)],
    obstacles: &mut Obstacles,
) {
    let colour = series_style(1).colour;
    let dots: Vec<((f64, f64), i64)> = crossings
        .iter()
        .filter(|c| frame.contains((c.0, c.1 as f64)))
        .map(|&(x, k)| (frame.at((x, k as f64)), k))
        .collect();
    svg.open_group("series", Some("ν ∈ ℤ: attractor modulus"));
    for &(p, _) in &dots {
        svg.circle(p, MARKER_RADIUS, Some(colour), None);
        obstacles.add_box(grown((p.0, p.1, 0.0, 0.0), MARKER_RADIUS + 1.0));
    }
    svg.close_group();
    let gap = MARKER_RADIUS + 3.0;
    for &((x, y), k) in &dots {
        let label = crossing_label(k);
        let places = [
            ((x - gap, y - gap), Anchor::End),
            ((x + gap, y + gap + 0.75 * TICK_SIZE), Anchor::Start),
            ((x + gap, y - gap), Anchor::Start),
            ((x - gap, y + gap + 0.75 * TICK_SIZE), Anchor::End),
        ];
        let boxes: Vec<_> = places
            .iter()
            .map(|&(at, anchor)| grown(text_box(at, &label, TICK_SIZE, anchor), 1.5))
            .collect();
        let best = least_crowded(&boxes, obstacles);
        let (at, anchor) = places[best];
        svg.open_group("label", None);
        svg.text(at, &label, &font(TICK_SIZE, anchor));
        svg.close_group();
        obstacles.add_box(boxes[best]);
    }
}

/// Short vertical ticks rising from the horizontal axis at the independent eigenvalues.
fn draw_eigenvalue_ticks(
    svg: &mut Svg,
    frame: &Frame,
    eigenvalues_log_a: &[f64],
    stroke: &Stroke,
    obstacles: &mut Obstacles,
) {
    // The round cap of the stroke would poke below the axis: start half a width above it.
    let bottom = frame.bottom() - 0.5 * stroke.width;
    let top = frame.bottom() - 0.06 * frame.rect.3;
    svg.open_group("series", Some("independent spectrum"));
    for &v in eigenvalues_log_a
        .iter()
        .filter(|v| v.is_finite() && frame.x.contains(**v))
    {
        let x = frame.x.at(v);
        svg.polyline(&[(x, bottom), (x, top)], stroke);
        obstacles.add_box((x - 2.0, top, 4.0, bottom - top));
    }
    svg.close_group();
}
