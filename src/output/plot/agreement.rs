//! Agreement digits: per level, the digits to which the attractor moduli agree with the
//! independent spectrum, as grouped bars with one colour per family.
//!
//! # Method
//! Within the group of a level each family has a bar of equal width (the group fills 0.8 of
//! the level spacing, with a hairline between bars); a dashed line marks each distinct
//! precision cap, labelled once with at most one decimal.
//!
//! # Accuracy
//! Bar heights are the given digit counts, rounded to drawing pixels; `tests/plot.rs` checks one
//! bar per finite digit count and the legend.
//!
//! # Errors
//! [`PlotError::NoSeries`], [`PlotError::LengthMismatch`], [`PlotError::TooFewPoints`].
//!
//! # References
//! None: a drawing convention.

use super::axes::{
    chart_on, draw_axes, draw_legend, draw_reference_level, legend_room, render_svg, series_colour,
    Axes, Chart, Ticked,
};
use super::data::check_series;
use super::numbers::tick_label;
use super::{px, PlotError, FIGURE_SIZE, LEGEND_KEY};
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;

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
