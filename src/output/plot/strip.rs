//! The strip heat map: ψ on the strip |Im r| ≤ 2π, two panels stacked, each with a colour bar.
//!
//! # Method
//! The upper panel shows log₁₀|ψ| on a sequential scale (ink blue → sea green → sand) over the
//! range of the sampled values, the lower arg ψ on a cyclic scale (indigo at ±π, teal at −π/2,
//! pale sand at 0, brick at π/2). Colours between the stops are interpolated linearly in RGB.
//! Horizontal axis Re r, vertical axis Im r from −2π to 2π with ticks at the multiples of π.
//! Each grid value fills the cell reaching half way to its neighbours (at least one drawing
//! pixel wide and high); cells without a sampled value are neutral grey ([`MISSING_CELL`]).
//! Branch points are marked by crosses, poles by open circles, dark on a white halo.
//!
//! # Accuracy
//! A colour bar has 96 steps; cell edges are rounded to drawing pixels. `tests/plot.rs` counts
//! one cell per grid value and one grey cell per missing value.
//!
//! # Errors
//! [`PlotError::GridTooSmall`], [`PlotError::GridNotIncreasing`], [`PlotError::OutsideStrip`],
//! [`PlotError::GridRows`], [`PlotError::GridRowLength`], [`PlotError::NoSampledValue`],
//! [`PlotError::ZeroProfile`].
//!
//! # References
//! None: a drawing convention.

use super::axes::{chart_on, draw_axes, render_svg, text, Area, Axes, Chart, Ticked};
use super::data::extent;
use super::numbers::{pi_label, significant, tick_label};
use super::{
    px, PlotError, INK, LABEL_SIZE, MARGIN, MARKER_RADIUS, MISSING_CELL, STRIP_FIGURE_SIZE,
    SUPERSAMPLE, TICK_SIZE, TITLE_SIZE, X_LABEL_AREA, Y_LABEL_AREA,
};
use num_complex::Complex64;
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use std::f64::consts::PI;

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
