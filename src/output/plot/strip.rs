//! The strip heat map: ψ on the strip |Im r| ≤ 2π, two panels stacked, each with a colour bar,
//! and a key to the markers.
//!
//! # Method
//! The upper panel shows log₁₀|ψ| on a sequential scale (ink blue → sea green → sand), its
//! colour range the 2nd to 98th percentile of the sampled values ([`PERCENTILES`]; values
//! beyond are drawn in the end colours, and the colour bar ends in a pointed cap on each side
//! where some are), so that a single near-zero sample does not wash out the rest. The lower
//! panel shows arg ψ on a cyclic scale (indigo at ±π, teal at −π/2, pale sand at 0, brick at
//! π/2). Colours between the stops are interpolated linearly in sRGB; the colour bars show the
//! scales in 128 steps. Horizontal axis Re r, vertical axis Im r from −2π to 2π with
//! ticks at the multiples of π.
//!
//! Each panel is one PNG image embedded in the SVG, of one image pixel for every 1.5 px of
//! the plot (the viewer's smoothing fills in between): at the centre of each image pixel ψ is interpolated
//! bilinearly between the four surrounding grid values (a complex interpolation: its modulus
//! and argument then give the colours, so zeros and the windings of the phase stay where the
//! samples put them). Where one of the four is unsampled the nearest grid value is used, and
//! where that is unsampled too the pixel is neutral grey ([`MISSING_CELL`]). Between the edge
//! grid values and the cell edges (half a spacing further) the edge values are extended.
//!
//! Branch points are marked by crosses, poles by open circles, dark on a white halo, drawn
//! after the frame so that a marker on the boundary lines Im r = ±2π is whole; a key under the
//! panels shows each kind of marker that appears.
//!
//! # Accuracy
//! The images show interpolated values between the grid values; the colour of a grid point is
//! exact to the 8-bit channel. `tests/plot.rs` checks one image per panel, the size of the
//! document, the grey of missing values and the key.
//!
//! # Errors
//! [`PlotError::GridTooSmall`], [`PlotError::GridNotIncreasing`], [`PlotError::OutsideStrip`],
//! [`PlotError::GridRows`], [`PlotError::GridRowLength`], [`PlotError::NoSampledValue`],
//! [`PlotError::ZeroProfile`], [`PlotError::ImageEncode`].
//!
//! # References
//! - Portable Network Graphics (PNG) Specification (Third Edition), W3C Recommendation, 2025
//!   (the image format); RFC 4648 (2006), base64 (its embedding as a data URL).

use super::axes::{
    centred_baseline, draw_axes, draw_title, font, plot_rect, round_labelled, Axes, Frame, Rect,
};
use super::numbers::pi_label;
use super::png::text_width;
use super::svg::{Anchor, Rgb, Stroke, Svg, WHITE};
use super::{PlotError, INK, LABEL_SIZE, MARGIN, MISSING_CELL, STRIP_FIGURE_SIZE, TICK_SIZE};
use num_complex::Complex64;
use std::f64::consts::PI;

/// The percentiles of log₁₀|ψ| that bound the colour range of the modulus panel.
pub const PERCENTILES: (f64, f64) = (0.02, 0.98);
/// Plot pixels per image pixel of the heat maps: the viewer's smoothing fills in between.
pub(super) const RASTER_PX: f64 = 1.5;

/// Sequential scale for log₁₀|ψ|, dark (small) to light (large).
const SEQUENTIAL: [Rgb; 5] = [
    Rgb(0x17, 0x1f, 0x3d),
    Rgb(0x2b, 0x52, 0x75),
    Rgb(0x3f, 0x8a, 0x86),
    Rgb(0x9c, 0xbd, 0x7e),
    Rgb(0xf4, 0xe9, 0xc8),
];

/// Cyclic scale for arg ψ on [−π, π]: the first stop is repeated at the end so that −π and π
/// get the same colour.
const CYCLIC: [Rgb; 5] = [
    Rgb(0x35, 0x3f, 0x86), // −π
    Rgb(0x2f, 0x94, 0x8c), // −π/2
    Rgb(0xef, 0xe4, 0xc4), // 0
    Rgb(0xbf, 0x4e, 0x3a), // π/2
    Rgb(0x35, 0x3f, 0x86), // π
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

fn interpolate(stops: &[Rgb], t: f64) -> Rgb {
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
    Rgb(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

/// A colour scale: a value range and the colour of a value in it.
struct ColourScale {
    range: (f64, f64),
    stops: &'static [Rgb],
}

impl ColourScale {
    fn colour(&self, v: f64) -> Rgb {
        let (lo, hi) = self.range;
        interpolate(self.stops, (v - lo) / (hi - lo))
    }
}

/// One panel of the strip map: what it shows, its colour scale and how a ψ value maps to it.
struct Panel {
    heading: String,
    scale: ColourScale,
    value: fn(Complex64) -> f64,
    ticks: Vec<(f64, String)>,
    /// Values below and above the colour range exist (pointed caps on the colour bar).
    beyond: (bool, bool),
}

fn log_modulus(v: Complex64) -> f64 {
    v.norm().log10()
}

fn phase(v: Complex64) -> f64 {
    v.arg()
}

/// The q-quantile of sorted values, interpolated linearly between order statistics.
fn quantile(sorted: &[f64], q: f64) -> f64 {
    let x = q * (sorted.len() - 1) as f64;
    let i = x.floor() as usize;
    let j = (i + 1).min(sorted.len() - 1);
    sorted[i] + (x - i as f64) * (sorted[j] - sorted[i])
}

/// The log₁₀|ψ| panel, its colour range the [`PERCENTILES`] of the sampled values.
fn modulus_panel(map: &StripMap) -> Result<Panel, PlotError> {
    let mut logs: Vec<f64> = map
        .sampled()
        .map(log_modulus)
        .filter(|v| v.is_finite())
        .collect();
    if logs.is_empty() {
        // Sampled values exist but none has a finite logarithm: ψ ≡ 0 on the grid.
        return Err(PlotError::ZeroProfile {
            series: "heat map".into(),
        });
    }
    logs.sort_by(f64::total_cmp);
    let (lo, hi) = (
        quantile(&logs, PERCENTILES.0),
        quantile(&logs, PERCENTILES.1),
    );
    let (first, last) = (logs[0], logs[logs.len() - 1]);
    let range = if hi - lo > 1e-9 * hi.abs().max(1.0) {
        (lo, hi)
    } else if last - first > 1e-9 * last.abs().max(1.0) {
        (first, last)
    } else {
        // A constant |ψ| still has a colour: centre it in a one-decade range.
        (first - 0.5, first + 0.5)
    };
    let zeros = map.sampled().any(|v| v.norm() == 0.0);
    Ok(Panel {
        heading: "log₁₀|ψ|, colours clipped at the 2nd and 98th percentiles".into(),
        scale: ColourScale {
            range,
            stops: &SEQUENTIAL,
        },
        value: log_modulus,
        ticks: round_labelled(range.0, range.1, 5),
        beyond: (first < range.0 || zeros, last > range.1),
    })
}

fn phase_panel() -> Panel {
    Panel {
        heading: "arg ψ, from −π to π".to_string(),
        scale: ColourScale {
            range: (-PI, PI),
            stops: &CYCLIC,
        },
        value: phase,
        ticks: (-2..=2)
            .map(|h| {
                let v = h as f64 * PI / 2.0;
                (v, pi_label(&v))
            })
            .collect(),
        beyond: (false, false),
    }
}

const COLOUR_BAR_WIDTH: f64 = 96.0;
const COLOUR_BAR_BAND: f64 = 16.0;
const COLOUR_BAR_STEPS: usize = 128;
const PANEL_HEADING: f64 = 26.0;
const KEY_ROW: f64 = 28.0;
const MARKER_SIZE: f64 = 5.5;

/// |ψ| and arg ψ on the strip (see the module documentation), with `title` above when given.
///
/// # Errors
/// Fewer than two grid values on an axis, grid values not increasing, Im r outside the strip,
/// rows of the wrong length, or no sampled finite value.
pub fn strip_heatmap(title: Option<&str>, map: &StripMap) -> Result<String, PlotError> {
    map.check()?;
    if map.sampled().next().is_none() {
        return Err(PlotError::NoSampledValue);
    }
    let panels = [modulus_panel(map)?, phase_panel()];
    let (w, h) = (STRIP_FIGURE_SIZE.0 as f64, STRIP_FIGURE_SIZE.1 as f64);
    let mut svg = Svg::new(STRIP_FIGURE_SIZE);
    let mut top = 0.0;
    if let Some(title) = title {
        draw_title(&mut svg, (0.0, 0.0, w, h), title);
        top = MARGIN + 28.0;
    }
    let kinds = marker_kinds(map);
    let key_height = if kinds.is_empty() { 0.0 } else { KEY_ROW };
    let panel_height = 0.5 * (h - top - key_height);
    let mut frames = Vec::new();
    for (k, panel) in panels.iter().enumerate() {
        let area = (0.0, top + k as f64 * panel_height, w, panel_height);
        frames.push(draw_panel(&mut svg, area, map, panel)?);
    }
    if !kinds.is_empty() {
        draw_key(&mut svg, &frames[1], &kinds, h - key_height);
    }
    Ok(svg.finish())
}

/// The markers that appear, as (kind, points) pairs.
fn marker_kinds(map: &StripMap) -> Vec<MarkerKind> {
    let two_pi = 2.0 * PI * (1.0 + 1e-12);
    let (re0, re1) = {
        let e = cell_edges(&map.re);
        (e[0], e[e.len() - 1])
    };
    let visible = |p: &&[f64; 2]| (re0..=re1).contains(&p[0]) && p[1].abs() <= two_pi;
    let mut kinds = Vec::new();
    if map.branch_points.iter().any(|p| visible(&p)) {
        kinds.push(MarkerKind::BranchPoint);
    }
    if map.poles.iter().any(|p| visible(&p)) {
        kinds.push(MarkerKind::Pole);
    }
    kinds
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum MarkerKind {
    BranchPoint,
    Pole,
}

impl MarkerKind {
    fn label(self) -> &'static str {
        match self {
            MarkerKind::BranchPoint => "branch point",
            MarkerKind::Pole => "pole of ψ",
        }
    }
}

/// One marker, dark on a white halo so that it shows on every colour of both scales; the
/// key draws its samples with this same function.
fn draw_marker(svg: &mut Svg, kind: MarkerKind, (x, y): (f64, f64)) {
    let s = MARKER_SIZE;
    for stroke in [Stroke::solid(WHITE, 4.0), Stroke::solid(INK, 2.0)] {
        match kind {
            MarkerKind::BranchPoint => {
                let d = format!(
                    "M{},{}L{},{}M{},{}L{},{}",
                    x - s,
                    y - s,
                    x + s,
                    y + s,
                    x - s,
                    y + s,
                    x + s,
                    y - s
                );
                svg.path(&d, &stroke);
            }
            MarkerKind::Pole => svg.circle((x, y), s, None, Some(&stroke)),
        }
    }
}

fn draw_panel(
    svg: &mut Svg,
    area: Rect,
    map: &StripMap,
    panel: &Panel,
) -> Result<Frame, PlotError> {
    let (ax, ay, aw, ah) = area;
    let strip = 2.0 * PI;
    let y_ticks: Vec<(f64, String)> = (-2..=2)
        .map(|k| {
            let v = k as f64 * PI;
            (v, pi_label(&v))
        })
        .collect();
    let body = (ax, ay + PANEL_HEADING, aw, ah - PANEL_HEADING);
    let rect = plot_rect(body, false, &y_ticks, COLOUR_BAR_WIDTH);
    let re_edges = cell_edges(&map.re);
    let x = re_edges[0]..re_edges[re_edges.len() - 1];
    let frame = Frame::new(rect, x.clone(), -strip..strip);
    svg.text(
        (frame.left(), ay + MARGIN + 0.8 * LABEL_SIZE),
        &panel.heading,
        &font(LABEL_SIZE, Anchor::Start),
    );
    let image = raster(map, panel, &frame)?;
    svg.open_group("heat-map", None);
    svg.png_image(frame.rect, &image);
    svg.close_group();
    let axes = Axes {
        x_desc: "Re r",
        y_desc: "Im r",
        x_ticks: round_labelled(x.start, x.end, 7),
        y_ticks,
    };
    draw_axes(svg, &frame, &axes);
    draw_colour_bar(svg, &frame, panel);
    svg.open_group("markers", None);
    for (kind, points) in [
        (MarkerKind::BranchPoint, &map.branch_points),
        (MarkerKind::Pole, &map.poles),
    ] {
        for p in points
            .iter()
            .filter(|p| frame.x.contains(p[0]) && frame.y.contains(p[1]))
        {
            draw_marker(svg, kind, frame.at((p[0], p[1])));
        }
    }
    svg.close_group();
    Ok(frame)
}

/// The key to the markers, centred under the plots.
fn draw_key(svg: &mut Svg, frame: &Frame, kinds: &[MarkerKind], top: f64) {
    let gap = 28.0;
    let widths: Vec<f64> = kinds
        .iter()
        .map(|k| 2.0 * MARKER_SIZE + 8.0 + text_width(k.label(), TICK_SIZE))
        .collect();
    let total = widths.iter().sum::<f64>() + gap * (kinds.len() - 1) as f64;
    let mut x = 0.5 * (frame.left() + frame.right()) - 0.5 * total;
    let y = top + 0.5 * KEY_ROW - 4.0;
    svg.open_group("marker-key", None);
    for (kind, width) in kinds.iter().zip(&widths) {
        svg.open_group("legend-key", Some(kind.label()));
        draw_marker(svg, *kind, (x + MARKER_SIZE, y));
        let at = (x + 2.0 * MARKER_SIZE + 8.0, centred_baseline(y, TICK_SIZE));
        svg.text(at, kind.label(), &font(TICK_SIZE, Anchor::Start));
        svg.close_group();
        x += width + gap;
    }
    svg.close_group();
}

/// A vertical colour bar right of the plot: the scale in small steps, pointed caps
/// where values lie beyond the range, ticks and labels on its right.
fn draw_colour_bar(svg: &mut Svg, frame: &Frame, panel: &Panel) {
    let (lo, hi) = panel.scale.range;
    let x0 = frame.right() + 14.0;
    let cap = 10.0;
    let (top, bottom) = (frame.top() + cap, frame.bottom() - cap);
    let n = panel.scale.stops.len();
    // Steps rather than an SVG gradient: every renderer and converter draws rectangles alike.
    let step = (bottom - top) / COLOUR_BAR_STEPS as f64;
    for i in 0..COLOUR_BAR_STEPS {
        let t = (i as f64 + 0.5) / COLOUR_BAR_STEPS as f64;
        let colour = interpolate(panel.scale.stops, t);
        // Each step overlaps the next by a hair, so that no seam of background shows.
        let y = bottom - (i + 1) as f64 * step;
        svg.rect((x0, y, COLOUR_BAR_BAND, step + 0.3), Some(colour), None);
    }
    let outline = Stroke::solid(INK, 0.75);
    svg.rect(
        (x0, top, COLOUR_BAR_BAND, bottom - top),
        None,
        Some(&outline),
    );
    let (below, above) = panel.beyond;
    let ends = [
        (below, bottom, bottom + cap, panel.scale.stops[0]),
        (above, top, top - cap, panel.scale.stops[n - 1]),
    ];
    for (present, base, tip, colour) in ends {
        if present {
            let d = format!(
                "M{},{}L{},{}L{},{}Z",
                x0,
                base,
                x0 + 0.5 * COLOUR_BAR_BAND,
                tip,
                x0 + COLOUR_BAR_BAND,
                base
            );
            svg.filled_path(&d, colour, &outline);
        }
    }
    let ink = Stroke::solid(INK, 1.0);
    let scale = |v: f64| bottom - (v - lo) / (hi - lo) * (bottom - top);
    let right = x0 + COLOUR_BAR_BAND;
    for (v, label) in panel.ticks.iter().filter(|t| (lo..=hi).contains(&t.0)) {
        let y = scale(*v);
        svg.polyline(&[(right, y), (right + 4.0, y)], &ink);
        let at = (right + 7.0, centred_baseline(y, TICK_SIZE));
        svg.text(at, label, &font(TICK_SIZE, Anchor::Start));
    }
}

/// Fractional index of `v` among increasing `centres`, clamped to the ends.
fn fractional_index(centres: &[f64], v: f64) -> f64 {
    let n = centres.len();
    if v <= centres[0] {
        return 0.0;
    }
    if v >= centres[n - 1] {
        return (n - 1) as f64;
    }
    let k = centres.partition_point(|&c| c <= v) - 1;
    k as f64 + (v - centres[k]) / (centres[k + 1] - centres[k])
}

/// ψ at fractional grid position (u along Re r, v along Im r): bilinear where the four
/// neighbours are sampled, else the nearest sampled value, else None.
fn sample(map: &StripMap, u: f64, v: f64) -> Option<Complex64> {
    let at = |j: usize, k: usize| map.values[j][k].filter(|z| z.is_finite());
    let (k0, j0) = (u.floor() as usize, v.floor() as usize);
    let (k1, j1) = (
        (k0 + 1).min(map.re.len() - 1),
        (j0 + 1).min(map.im.len() - 1),
    );
    let (fu, fv) = (u - k0 as f64, v - j0 as f64);
    match (at(j0, k0), at(j0, k1), at(j1, k0), at(j1, k1)) {
        (Some(a), Some(b), Some(c), Some(d)) => {
            Some((a * (1.0 - fu) + b * fu) * (1.0 - fv) + (c * (1.0 - fu) + d * fu) * fv)
        }
        _ => at(v.round() as usize, u.round() as usize),
    }
}

/// The panel's image: one pixel every [`RASTER_PX`] plot pixels, top row at Im r = 2π.
fn raster(map: &StripMap, panel: &Panel, frame: &Frame) -> Result<Vec<u8>, PlotError> {
    let (_, _, w, h) = frame.rect;
    let (width, height) = (
        (w / RASTER_PX).round().max(1.0) as u32,
        (h / RASTER_PX).round().max(1.0) as u32,
    );
    let mut rgb = Vec::with_capacity((3 * width * height) as usize);
    for row in 0..height {
        let im = frame.y.hi - (row as f64 + 0.5) / height as f64 * (frame.y.hi - frame.y.lo);
        let v = fractional_index(&map.im, im);
        for col in 0..width {
            let re = frame.x.lo + (col as f64 + 0.5) / width as f64 * (frame.x.hi - frame.x.lo);
            let u = fractional_index(&map.re, re);
            let colour = match sample(map, u, v) {
                Some(z) => panel.scale.colour((panel.value)(z)),
                None => MISSING_CELL,
            };
            rgb.extend([colour.0, colour.1, colour.2]);
        }
    }
    encode_rgb(&rgb, width, height)
}

/// 8-bit RGB PNG, adaptively filtered and compressed hard: it is embedded in every copy of
/// the SVG.
fn encode_rgb(rgb: &[u8], width: u32, height: u32) -> Result<Vec<u8>, PlotError> {
    let err = |e: png::EncodingError| PlotError::ImageEncode(e.to_string());
    let mut out = Vec::new();
    {
        let mut encoder = png::Encoder::new(&mut out, width, height);
        encoder.set_color(png::ColorType::Rgb);
        encoder.set_depth(png::BitDepth::Eight);
        encoder.set_compression(png::Compression::High);
        encoder.set_filter(png::Filter::Adaptive);
        let mut writer = encoder.write_header().map_err(err)?;
        writer.write_image_data(rgb).map_err(err)?;
        writer.finish().map_err(err)?;
    }
    Ok(out)
}
