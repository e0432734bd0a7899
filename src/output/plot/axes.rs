//! Chart machinery shared by the figures: the plot rectangle and its linear scales, axes with
//! ticks at given values, the title, legends whose keys are drawn by the same code as the
//! series they explain, and the placement of legends and labels away from the data.
//!
//! # Method
//! A chart is a [`Frame`]: a rectangle in nominal pixels and a linear scale on each axis. The
//! left label area is as wide as the widest vertical tick label (measured with the embedded
//! font) plus the axis description. Data are drawn clipped to the rectangle; markers are drawn
//! unclipped, so that a marker on the frame is whole. Legends and labels are placed at the
//! first of a list of candidate positions whose box meets no drawn data (segments of curves,
//! markers, bars), or, when every candidate meets some, at the one meeting fewest; head room
//! for a legend is made by raising the top of the value axis by the legend's share of the plot
//! height ([`legend_room`]).
//!
//! # Accuracy
//! Positions to 0.01 nominal px; text boxes are measured with DejaVu Sans, the font that
//! [`super::to_png`] and [`super::to_pdf`] embed (another sans-serif of a viewer differs by a
//! few per cent). `tests/plot.rs` checks that labels and legends do not meet the curves.
//!
//! # References
//! None: a drawing convention.

use super::numbers::tick_label;
use super::png::text_width;
use super::style::SeriesStyle;
use super::svg::{Anchor, Font, Marker, Rgb, Stroke, Svg};
use super::{
    GRID, INK, LABEL_SIZE, LEGEND_KEY, LEGEND_PADDING, LEGEND_ROW, MARGIN, MARKER_RADIUS,
    PLOT_HEIGHT, TICK_SIZE, TITLE_SIZE, X_LABEL_AREA,
};
use std::ops::Range;

/// A box in nominal px: left, top, width, height.
pub(super) type Rect = (f64, f64, f64, f64);

/// A linear map from data values `lo..hi` to pixels `from..to`.
#[derive(Debug, Clone, Copy)]
pub(super) struct Scale {
    pub(super) lo: f64,
    pub(super) hi: f64,
    from: f64,
    to: f64,
}

impl Scale {
    pub(super) fn at(&self, v: f64) -> f64 {
        self.from + (v - self.lo) / (self.hi - self.lo) * (self.to - self.from)
    }

    pub(super) fn contains(&self, v: f64) -> bool {
        let (a, b) = (self.lo.min(self.hi), self.lo.max(self.hi));
        (a - 1e-9 * (b - a)..=b + 1e-9 * (b - a)).contains(&v)
    }
}

/// The plot rectangle and its scales.
#[derive(Debug, Clone, Copy)]
pub(super) struct Frame {
    pub(super) x: Scale,
    pub(super) y: Scale,
    pub(super) rect: Rect,
}

impl Frame {
    /// A frame filling `rect` with data ranges `x` and `y` (y upwards).
    pub(super) fn new(rect: Rect, x: Range<f64>, y: Range<f64>) -> Self {
        let (l, t, w, h) = rect;
        Frame {
            x: Scale {
                lo: x.start,
                hi: x.end,
                from: l,
                to: l + w,
            },
            y: Scale {
                lo: y.start,
                hi: y.end,
                from: t + h,
                to: t,
            },
            rect,
        }
    }

    pub(super) fn at(&self, (x, y): (f64, f64)) -> (f64, f64) {
        (self.x.at(x), self.y.at(y))
    }

    pub(super) fn contains(&self, (x, y): (f64, f64)) -> bool {
        self.x.contains(x) && self.y.contains(y)
    }

    pub(super) fn left(&self) -> f64 {
        self.rect.0
    }
    pub(super) fn top(&self) -> f64 {
        self.rect.1
    }
    pub(super) fn right(&self) -> f64 {
        self.rect.0 + self.rect.2
    }
    pub(super) fn bottom(&self) -> f64 {
        self.rect.1 + self.rect.3
    }
}

pub(super) fn font(size: f64, anchor: Anchor) -> Font {
    Font {
        size,
        colour: INK,
        anchor,
        upright: false,
    }
}

/// The box of a text whose baseline starts, centres or ends at (x, y).
pub(super) fn text_box((x, y): (f64, f64), content: &str, size: f64, anchor: Anchor) -> Rect {
    let w = text_width(content, size);
    let left = match anchor {
        Anchor::Start => x,
        Anchor::Middle => x - 0.5 * w,
        Anchor::End => x - w,
    };
    (left, y - 0.80 * size, w, size)
}

/// The baseline that centres a line of text vertically on y (caps of DejaVu Sans: 0.73 em).
pub(super) fn centred_baseline(y: f64, size: f64) -> f64 {
    y + 0.36 * size
}

/// Height of the title band above the plot.
const TITLE_BAND: f64 = 34.0;
const TICK_LENGTH: f64 = 5.0;
const TICK_GAP: f64 = 4.0;
/// Between the vertical tick labels and the baseline of the upright axis description, which
/// descenders and subscripts (ψₙ) reach into.
const DESC_GAP: f64 = 14.0;

/// The plot rectangle of a chart on a canvas region `area`, with room for a title when
/// `titled`, for the vertical tick labels given, and `right` px kept free at the right.
pub(super) fn plot_rect(area: Rect, titled: bool, y_ticks: &[(f64, String)], right: f64) -> Rect {
    let (ax, ay, aw, ah) = area;
    let widest = y_ticks
        .iter()
        .map(|(_, s)| text_width(s, TICK_SIZE))
        .fold(0.0, f64::max);
    let left = ax + MARGIN + LABEL_SIZE + DESC_GAP + 4.0 + widest + TICK_LENGTH + TICK_GAP;
    let top = ay + MARGIN + if titled { TITLE_BAND } else { 0.0 };
    let bottom = ay + ah - X_LABEL_AREA;
    let r = ax + aw - MARGIN - right;
    (left, top, r - left, bottom - top)
}

/// The title, centred at the top of the canvas region.
pub(super) fn draw_title(svg: &mut Svg, area: Rect, title: &str) {
    let (x, y, w, _) = area;
    let baseline = y + MARGIN + 0.8 * TITLE_SIZE;
    svg.text(
        (x + 0.5 * w, baseline),
        title,
        &font(TITLE_SIZE, Anchor::Middle),
    );
}

/// Axis descriptions and labelled ticks of one chart.
pub(super) struct Axes<'f> {
    pub(super) x_desc: &'f str,
    pub(super) y_desc: &'f str,
    pub(super) x_ticks: Vec<(f64, String)>,
    pub(super) y_ticks: Vec<(f64, String)>,
}

/// Light grid lines at the ticks (drawn first, under the data).
pub(super) fn draw_grid(svg: &mut Svg, frame: &Frame, axes: &Axes<'_>) {
    let grid = Stroke::solid(GRID, 1.0);
    for (v, _) in axes.x_ticks.iter().filter(|t| frame.x.contains(t.0)) {
        let x = frame.x.at(*v);
        svg.polyline(&[(x, frame.top()), (x, frame.bottom())], &grid);
    }
    for (v, _) in axes.y_ticks.iter().filter(|t| frame.y.contains(t.0)) {
        let y = frame.y.at(*v);
        svg.polyline(&[(frame.left(), y), (frame.right(), y)], &grid);
    }
}

/// The left and bottom axis lines, tick marks, tick labels and axis descriptions.
pub(super) fn draw_axes(svg: &mut Svg, frame: &Frame, axes: &Axes<'_>) {
    let ink = Stroke::solid(INK, 1.0);
    let (l, b) = (frame.left(), frame.bottom());
    svg.polyline(&[(l, frame.top()), (l, b), (frame.right(), b)], &ink);
    for (v, label) in axes.x_ticks.iter().filter(|t| frame.x.contains(t.0)) {
        let x = frame.x.at(*v);
        svg.polyline(&[(x, b), (x, b + TICK_LENGTH)], &ink);
        let baseline = b + TICK_LENGTH + TICK_GAP + 0.8 * TICK_SIZE;
        svg.text((x, baseline), label, &font(TICK_SIZE, Anchor::Middle));
    }
    for (v, label) in axes.y_ticks.iter().filter(|t| frame.y.contains(t.0)) {
        let y = frame.y.at(*v);
        svg.polyline(&[(l - TICK_LENGTH, y), (l, y)], &ink);
        let at = (l - TICK_LENGTH - TICK_GAP, centred_baseline(y, TICK_SIZE));
        svg.text(at, label, &font(TICK_SIZE, Anchor::End));
    }
    let x_desc_baseline = b + X_LABEL_AREA - 11.0;
    svg.text(
        (0.5 * (l + frame.right()), x_desc_baseline),
        axes.x_desc,
        &font(LABEL_SIZE, Anchor::Middle),
    );
    let widest = axes
        .y_ticks
        .iter()
        .map(|(_, s)| text_width(s, TICK_SIZE))
        .fold(0.0, f64::max);
    let y_desc_baseline = l - TICK_LENGTH - TICK_GAP - widest - DESC_GAP;
    let upright = Font {
        upright: true,
        ..font(LABEL_SIZE, Anchor::Middle)
    };
    svg.text(
        (y_desc_baseline, 0.5 * (frame.top() + b)),
        axes.y_desc,
        &upright,
    );
}

/// About `count` ticks at round values (1, 2 or 5 times a power of ten) inside `lo..hi`.
pub(super) fn round_ticks(lo: f64, hi: f64, count: usize) -> Vec<f64> {
    let span = hi - lo;
    if !(span > 0.0) || !span.is_finite() {
        return vec![lo];
    }
    let raw = span / count.max(1) as f64;
    let power = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| m * power)
        .find(|s| span / s <= count as f64)
        .unwrap_or(10.0 * power);
    let first = (lo / step).ceil() as i64;
    let last = (hi / step).floor() as i64;
    (first..=last).map(|k| k as f64 * step).collect()
}

/// [`round_ticks`] with their labels.
pub(super) fn round_labelled(lo: f64, hi: f64, count: usize) -> Vec<(f64, String)> {
    round_ticks(lo, hi, count)
        .into_iter()
        .map(|v| (v, tick_label(&v)))
        .collect()
}

/// The top of a value axis from `lo` to `hi` raised so that a legend of `rows` rows fits
/// above the data in an upper corner of a single panel (`titled`: with its title band).
pub(super) fn legend_room(lo: f64, hi: f64, rows: usize, titled: bool) -> f64 {
    let height = PLOT_HEIGHT - if titled { TITLE_BAND } else { 0.0 };
    let legend = (rows as f64 * LEGEND_ROW + 2.0 * LEGEND_PADDING + LEGEND_INSET + 4.0) / height;
    lo + (hi - lo) / (1.0 - legend.min(0.6))
}

/// Whole units (decades, integers) between labelled ticks: about six labels over `span`.
pub(super) fn tick_step(span: f64) -> i32 {
    [1, 2, 5, 10, 20, 50]
        .into_iter()
        .find(|&s| span / s as f64 <= 7.0)
        .unwrap_or(100)
}

// ---------------------------------------------------------------------------------------------
// What is drawn, for placing legends and labels off it.

/// Drawn data in pixels: polylines and boxes (markers, bars, labels already placed).
#[derive(Debug, Default)]
pub(super) struct Obstacles {
    lines: Vec<Vec<(f64, f64)>>,
    boxes: Vec<Rect>,
}

impl Obstacles {
    pub(super) fn line(&mut self, pixels: Vec<(f64, f64)>) {
        self.lines.push(pixels);
    }

    pub(super) fn add_box(&mut self, r: Rect) {
        self.boxes.push(r);
    }

    /// How many segments and boxes meet the rectangle.
    pub(super) fn hits(&self, r: Rect) -> usize {
        let segments = self
            .lines
            .iter()
            .flat_map(|l| l.windows(2))
            .filter(|w| segment_meets(w[0], w[1], r))
            .count();
        let boxes = self.boxes.iter().filter(|b| boxes_meet(**b, r)).count();
        segments + boxes
    }
}

pub(super) fn boxes_meet(a: Rect, b: Rect) -> bool {
    a.0 < b.0 + b.2 && b.0 < a.0 + a.2 && a.1 < b.1 + b.3 && b.1 < a.1 + a.3
}

/// Whether the segment p–q meets the rectangle (parametric clipping).
fn segment_meets(p: (f64, f64), q: (f64, f64), (x, y, w, h): Rect) -> bool {
    let (dx, dy) = (q.0 - p.0, q.1 - p.1);
    let (mut t0, mut t1) = (0.0f64, 1.0f64);
    for (den, num) in [
        (-dx, p.0 - x),
        (dx, x + w - p.0),
        (-dy, p.1 - y),
        (dy, y + h - p.1),
    ] {
        if den == 0.0 {
            if num < 0.0 {
                return false;
            }
        } else {
            let t = num / den;
            if den < 0.0 {
                t0 = t0.max(t);
            } else {
                t1 = t1.min(t);
            }
            if t0 > t1 {
                return false;
            }
        }
    }
    true
}

/// The first candidate meeting nothing, or else the one meeting least.
pub(super) fn least_crowded(candidates: &[Rect], obstacles: &Obstacles) -> usize {
    let mut best = (usize::MAX, 0);
    for (i, c) in candidates.iter().enumerate() {
        let hits = obstacles.hits(*c);
        if hits == 0 {
            return i;
        }
        if hits < best.0 {
            best = (hits, i);
        }
    }
    best.1
}

/// `r` grown by `by` on every side.
pub(super) fn grown((x, y, w, h): Rect, by: f64) -> Rect {
    (x - by, y - by, w + 2.0 * by, h + 2.0 * by)
}

// ---------------------------------------------------------------------------------------------
// Series, keys and legends: one function draws a style on the data and in the legend.

/// How a curve is drawn and keyed: a stroke, optionally markers at chosen points.
#[derive(Debug, Clone, Copy)]
pub(super) struct LineLook {
    pub(super) stroke: Stroke,
    pub(super) marker: Option<(Marker, Rgb)>,
}

impl LineLook {
    pub(super) fn of(style: SeriesStyle, width: f64) -> Self {
        LineLook {
            stroke: Stroke::dashed(style.colour, width, style.dash),
            marker: Some((style.marker, style.colour)),
        }
    }

    pub(super) fn plain(stroke: Stroke) -> Self {
        LineLook {
            stroke,
            marker: None,
        }
    }
}

/// What a legend entry shows.
#[derive(Debug, Clone)]
pub(super) enum Key {
    Line(LineLook),
    /// A filled box (bars).
    Bar(Rgb),
    /// A filled dot.
    Dot(Rgb, f64),
    /// A short vertical tick.
    Tick(Stroke),
}

pub(super) struct LegendEntry {
    pub(super) label: String,
    pub(super) key: Key,
}

/// Where a legend may go, in order of preference.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Corner {
    UpperRight,
    UpperLeft,
    LowerRight,
    LowerLeft,
}

const LEGEND_INSET: f64 = 8.0;
const KEY_GAP: f64 = 8.0;

fn legend_size(entries: &[LegendEntry]) -> (f64, f64) {
    let widest = entries
        .iter()
        .map(|e| text_width(&e.label, TICK_SIZE))
        .fold(0.0, f64::max);
    (
        2.0 * LEGEND_PADDING + LEGEND_KEY + KEY_GAP + widest,
        2.0 * LEGEND_PADDING + entries.len() as f64 * LEGEND_ROW,
    )
}

/// The legend box at the first corner in `corners` where it meets no drawn data (else where it
/// meets least), drawn with its keys; returns its box.
pub(super) fn draw_legend(
    svg: &mut Svg,
    frame: &Frame,
    entries: &[LegendEntry],
    corners: &[Corner],
    obstacles: &Obstacles,
) -> Option<Rect> {
    if entries.is_empty() {
        return None;
    }
    let (w, h) = legend_size(entries);
    let boxes: Vec<Rect> = corners
        .iter()
        .map(|c| {
            let x = match c {
                Corner::UpperRight | Corner::LowerRight => frame.right() - LEGEND_INSET - w,
                Corner::UpperLeft | Corner::LowerLeft => frame.left() + LEGEND_INSET,
            };
            let y = match c {
                Corner::UpperRight | Corner::UpperLeft => frame.top() + LEGEND_INSET,
                Corner::LowerRight | Corner::LowerLeft => frame.bottom() - LEGEND_INSET - h,
            };
            (x, y, w, h)
        })
        .collect();
    let chosen = boxes[least_crowded(&boxes, obstacles)];
    svg.open_group("legend", None);
    let border = Stroke {
        opacity: 0.9,
        ..Stroke::solid(GRID, 1.0)
    };
    svg.rect(chosen, Some(super::svg::WHITE), Some(&border));
    for (i, e) in entries.iter().enumerate() {
        let y = chosen.1 + LEGEND_PADDING + (i as f64 + 0.5) * LEGEND_ROW;
        let x = chosen.0 + LEGEND_PADDING;
        svg.open_group("legend-key", Some(&e.label));
        draw_key(svg, &e.key, (x, y));
        svg.text(
            (x + LEGEND_KEY + KEY_GAP, centred_baseline(y, TICK_SIZE)),
            &e.label,
            &font(TICK_SIZE, Anchor::Start),
        );
        svg.close_group();
    }
    svg.close_group();
    Some(chosen)
}

/// A legend key starting at x, centred on y.
fn draw_key(svg: &mut Svg, key: &Key, (x, y): (f64, f64)) {
    match key {
        Key::Line(look) => {
            svg.polyline(&[(x, y), (x + LEGEND_KEY, y)], &look.stroke);
            if let Some((marker, colour)) = look.marker {
                svg.marker(marker, (x + 0.5 * LEGEND_KEY, y), MARKER_RADIUS, colour);
            }
        }
        Key::Bar(fill) => {
            let half = 6.0;
            svg.rect(
                (x + 4.0, y - half, LEGEND_KEY - 8.0, 2.0 * half),
                Some(*fill),
                None,
            );
        }
        Key::Dot(fill, r) => svg.circle((x + 0.5 * LEGEND_KEY, y), *r, Some(*fill), None),
        Key::Tick(stroke) => {
            let mid = x + 0.5 * LEGEND_KEY;
            svg.polyline(&[(mid, y - 7.0), (mid, y + 7.0)], stroke);
        }
    }
}

/// Draws a curve given as runs of data points (gaps between runs), clipped to the frame, with
/// markers at about `markers` evenly spaced abscissae (shifted by `phase` of a spacing, so that
/// the markers of different series do not coincide); records what it drew.
pub(super) fn draw_series(
    svg: &mut Svg,
    frame: &Frame,
    runs: &[Vec<(f64, f64)>],
    look: &LineLook,
    label: Option<&str>,
    (markers, phase): (usize, f64),
    obstacles: &mut Obstacles,
) {
    svg.open_group("series", label);
    svg.open_clip(frame.rect);
    for run in runs {
        let pixels: Vec<(f64, f64)> = run.iter().map(|&p| frame.at(p)).collect();
        svg.polyline(&pixels, &look.stroke);
        obstacles.line(clipped_to(frame, pixels));
    }
    svg.close_group();
    if let (Some((marker, colour)), true) = (look.marker, markers > 0) {
        for p in marker_points(frame, runs, markers, phase) {
            svg.marker(marker, p, MARKER_RADIUS, colour);
            obstacles.add_box(grown((p.0, p.1, 0.0, 0.0), MARKER_RADIUS));
        }
    }
    svg.close_group();
}

/// Pixels outside the frame do not hide anything: keep only points inside (with a margin).
fn clipped_to(frame: &Frame, pixels: Vec<(f64, f64)>) -> Vec<(f64, f64)> {
    let (l, t, w, h) = grown(frame.rect, 2.0);
    pixels
        .into_iter()
        .map(|(x, y)| (x.clamp(l, l + w), y.clamp(t, t + h)))
        .collect()
}

/// The data points nearest to `count` evenly spaced abscissae across the frame.
fn marker_points(
    frame: &Frame,
    runs: &[Vec<(f64, f64)>],
    count: usize,
    phase: f64,
) -> Vec<(f64, f64)> {
    let (lo, hi) = (frame.x.lo, frame.x.hi);
    let spacing = (hi - lo) / count as f64;
    let points: Vec<(f64, f64)> = runs.iter().flatten().copied().collect();
    (0..count)
        .filter_map(|k| {
            let target = lo + (k as f64 + 0.25 + 0.5 * phase.fract()) * spacing;
            let nearest = points
                .iter()
                .min_by(|a, b| (a.0 - target).abs().total_cmp(&(b.0 - target).abs()))?;
            ((nearest.0 - target).abs() <= 0.5 * spacing && frame.contains(*nearest))
                .then(|| frame.at(*nearest))
        })
        .collect()
}
