//! Agreement digits: per level, the digits to which the attractor moduli agree with the
//! independent spectrum, as grouped bars with one style per family, each bar under its own cap.
//!
//! # Method
//! Within the group of a level each family has a bar of equal width (the group fills 0.8 of
//! the level spacing, with a gap between bars), filled with the family's series colour (the
//! palette's lightness steps keep the families apart in greyscale). Over each bar a dashed line
//! a little wider than the bar marks the cap of that level and family: the digits that the spectrum's
//! error estimate supports there. A bar reaching its cap is limited by the spectrum, not by the
//! attractor modulus.
//!
//! # Accuracy
//! Bar heights are the given digit counts; `tests/plot.rs` checks one bar per finite digit
//! count, one cap per finite cap, and the legend.
//!
//! # Errors
//! [`PlotError::NoSeries`], [`PlotError::LengthMismatch`], [`PlotError::TooFewPoints`].
//!
//! # References
//! None: a drawing convention.

use super::axes::{
    draw_axes, draw_grid, draw_legend, draw_title, legend_room, plot_rect, round_labelled, Axes,
    Corner, Frame, Key, LegendEntry, LineLook, Obstacles,
};
use super::data::check_series;
use super::style::series_style;
use super::svg::{Stroke, Svg};
use super::{PlotError, FIGURE_SIZE, INK};

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
    /// Per level, the digits the comparison supports (a dashed cap over the bar; NaN: none).
    pub caps: Vec<f64>,
}

impl AgreementBars {
    fn check(&self) -> Result<(), PlotError> {
        let plottable = self.digits.iter().filter(|d| d.is_finite()).count();
        check_series(&self.family, (self.levels.len(), self.caps.len()), 1, 1)?;
        let lengths = (self.levels.len(), self.digits.len());
        check_series(&self.family, lengths, plottable, 1)
    }
}

const GROUP_WIDTH: f64 = 0.8;
/// The caps are dashed finely: they are short, about as wide as a bar.
const CAP_DASH: &[f64] = &[4.0, 2.5];
const CAP_OVERHANG: f64 = 3.0;
const CAP_WIDTH: f64 = 2.0;

/// Legend entry of the caps.
pub(super) const CAP_LABEL: &str = "cap: spectrum's error estimate";

/// Agreement digits per level, grouped by family (see the module documentation).
///
/// # Errors
/// No families; a family with mismatched lengths or no finite digit count.
pub fn agreement_plot(title: Option<&str>, bars: &[AgreementBars]) -> Result<String, PlotError> {
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
    let all = bars
        .iter()
        .flat_map(|b| b.digits.iter().chain(&b.caps).copied())
        .filter(|v| v.is_finite());
    let highest = all.clone().fold(1.0, f64::max);
    let bottom = all.fold(0.0, f64::min) * 1.05;
    let has_caps = bars.iter().any(|b| b.caps.iter().any(|c| c.is_finite()));
    let top = legend_room(
        bottom,
        1.05 * highest,
        bars.len() + usize::from(has_caps),
        title.is_some(),
    );
    let axes = Axes {
        x_desc: "level n",
        y_desc: "agreement digits",
        x_ticks: levels.iter().map(|&l| (l as f64, l.to_string())).collect(),
        y_ticks: round_labelled(bottom, top, 6),
    };
    let area = (0.0, 0.0, FIGURE_SIZE.0 as f64, FIGURE_SIZE.1 as f64);
    let rect = plot_rect(area, title.is_some(), &axes.y_ticks, 0.0);
    let frame = Frame::new(rect, (first - 0.6)..(last + 0.6), bottom..top);
    let mut svg = Svg::new(FIGURE_SIZE);
    if let Some(title) = title {
        draw_title(&mut svg, area, title);
    }
    draw_grid(&mut svg, &frame, &axes);
    let mut obstacles = Obstacles::default();
    let cap_stroke = Stroke::dashed(INK, CAP_WIDTH, CAP_DASH);
    let mut legend = Vec::new();
    for (i, family) in bars.iter().enumerate() {
        draw_family(
            &mut svg,
            &frame,
            family,
            (i, bars.len()),
            &cap_stroke,
            &mut obstacles,
        );
        legend.push(LegendEntry {
            label: family.family.clone(),
            key: Key::Bar(series_style(i).colour),
        });
    }
    if has_caps {
        legend.push(LegendEntry {
            label: CAP_LABEL.into(),
            key: Key::Line(LineLook::plain(cap_stroke)),
        });
    }
    draw_axes(&mut svg, &frame, &axes);
    let corners = [Corner::UpperRight, Corner::UpperLeft];
    draw_legend(&mut svg, &frame, &legend, &corners, &obstacles);
    Ok(svg.finish())
}

/// The bars of one family and the cap over each.
fn draw_family(
    svg: &mut Svg,
    frame: &Frame,
    family: &AgreementBars,
    (index, families): (usize, usize),
    cap_stroke: &Stroke,
    obstacles: &mut Obstacles,
) {
    let colour = series_style(index).colour;
    let width = GROUP_WIDTH / families as f64;
    let left = -0.5 * GROUP_WIDTH + index as f64 * width;
    let zero = frame.y.at(0.0);
    svg.open_group("series", Some(&family.family));
    for ((&n, &d), &cap) in family.levels.iter().zip(&family.digits).zip(&family.caps) {
        // A gap of 0.02 level spacings between neighbouring bars keeps the groups legible.
        let (x0, x1) = (
            frame.x.at(n as f64 + left + 0.01),
            frame.x.at(n as f64 + left + width - 0.01),
        );
        if d.is_finite() {
            let y = frame.y.at(d);
            let bar = (x0, y.min(zero), x1 - x0, (y - zero).abs());
            svg.rect(bar, Some(colour), None);
            obstacles.add_box(bar);
        }
        if cap.is_finite() {
            // A lid a little wider than the bar: seen even where the bar reaches it.
            let y = frame.y.at(cap);
            let (c0, c1) = (x0 - CAP_OVERHANG, x1 + CAP_OVERHANG);
            svg.open_group("cap", None);
            svg.polyline(&[(c0, y), (c1, y)], cap_stroke);
            svg.close_group();
            obstacles.add_box((c0, y - 2.0, c1 - c0, 4.0));
        }
    }
    svg.close_group();
}
