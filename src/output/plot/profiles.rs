//! Stacked profiles: ψₙ(r) on R for several levels, each on its own baseline.
//!
//! # Method
//! Horizontal axis r; level n is drawn on the baseline y = n: the real part of the phase-fixed
//! ψₙ as a line and ±|ψₙ| as a thin envelope, both scaled so that max|ψₙ| reaches
//! [`PROFILE_HALF_HEIGHT`] above the baseline. The vertical tick labels name the levels
//! ("n = 0", …), a label per curve gives its modulus aₙ (six significant digits). The legend
//! explains the two line styles, in ink.
//!
//! # Accuracy
//! Each curve is scaled by its own largest sampled |ψ|; positions are rounded to half a nominal
//! pixel. `tests/plot.rs` checks the level labels, the moduli and the legend.
//!
//! # Errors
//! [`PlotError::NoSeries`], [`PlotError::LengthMismatch`], [`PlotError::TooFewPoints`],
//! [`PlotError::ZeroProfile`], [`PlotError::DegenerateRange`].
//!
//! # References
//! None: a drawing convention.

use super::axes::{
    chart_on, draw_axes, draw_curve, draw_legend, legend_key, legend_room, render_svg,
    series_colour, text, Axes, Chart, Ticked,
};
use super::data::{check_series, extent, finite_runs, padded, LINE_POINTS};
use super::numbers::{significant, tick_label};
use super::{PlotError, FIGURE_SIZE, INK, LINE_WIDTH, PROFILE_HALF_HEIGHT, THIN_WIDTH, TICK_SIZE};
use num_complex::Complex64;
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// ψₙ sampled on R at one level, normalized and phase-fixed by the caller.
#[derive(Debug, Clone, PartialEq)]
pub struct ProfileSeries {
    /// The level n; the curve is drawn on the baseline y = n.
    pub level: usize,
    /// The modulus aₙ, shown beside the curve.
    pub modulus: f64,
    /// Sample points on R.
    pub r: Vec<f64>,
    /// ψₙ(r); NaN where not sampled (a gap in the curves).
    pub values: Vec<Complex64>,
}

impl ProfileSeries {
    fn name(&self) -> String {
        format!("n = {}", self.level)
    }

    /// Largest |ψ| over the finite samples, after checking the series can be drawn.
    fn peak(&self) -> Result<f64, PlotError> {
        let finite = |(r, v): (&f64, &Complex64)| r.is_finite() && v.is_finite();
        let plottable = self
            .r
            .iter()
            .zip(&self.values)
            .filter(|p| finite(*p))
            .count();
        let lengths = (self.r.len(), self.values.len());
        check_series(&self.name(), lengths, plottable, LINE_POINTS)?;
        let peak = self
            .values
            .iter()
            .filter(|v| v.is_finite())
            .map(|v| v.norm())
            .fold(0.0, f64::max);
        if peak == 0.0 {
            return Err(PlotError::ZeroProfile {
                series: self.name(),
            });
        }
        Ok(peak)
    }

    /// Runs of (r, n + s·f(ψ)) with s scaling the peak to [`PROFILE_HALF_HEIGHT`].
    fn offset_runs(&self, peak: f64, f: impl Fn(Complex64) -> f64) -> Vec<Vec<(f64, f64)>> {
        let scale = PROFILE_HALF_HEIGHT / peak;
        let base = self.level as f64;
        finite_runs(
            self.r
                .iter()
                .zip(&self.values)
                .map(|(&r, &v)| (r, base + scale * f(v))),
        )
    }
}

/// ψₙ on R for several levels, each on its own baseline (see the module documentation).
/// `real_label` names the plotted real part in the legend (e.g. "Re ψ").
///
/// # Errors
/// [`PlotError::NoSeries`] for no series; a series with mismatched lengths, fewer than two
/// finite samples, or ψ ≡ 0; all samples at one r.
pub fn stacked_profiles(
    family: &str,
    series: &[ProfileSeries],
    real_label: &str,
) -> Result<String, PlotError> {
    if series.is_empty() {
        return Err(PlotError::NoSeries {
            figure: "stacked profiles",
        });
    }
    let peaks = series
        .iter()
        .map(ProfileSeries::peak)
        .collect::<Result<Vec<_>, _>>()?;
    let r_extent = extent(series.iter().flat_map(|s| s.r.iter().copied()), "r")?;
    let levels: Vec<f64> = series.iter().map(|s| s.level as f64).collect();
    let (lo, hi) = levels
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &l| {
            (a.min(l), b.max(l))
        });
    // Room below the lowest envelope, and above the highest for the legend's two rows.
    let (bottom, top) = (lo - 0.65, hi + PROFILE_HALF_HEIGHT + 0.1);
    let y = Ticked::new(bottom..legend_room(bottom, top, 2), levels);
    let title = format!("{family}: eigenfunctions on R");
    render_svg(FIGURE_SIZE, |root| {
        let mut chart = chart_on(root, &title, padded(r_extent, 0.01), y)?;
        let level_tick = |v: &f64| format!("n = {}", v.round());
        draw_axes(
            &mut chart,
            &Axes {
                x_desc: "r",
                y_desc: "level n (offset ψₙ)",
                x_ticks: &tick_label,
                y_ticks: &level_tick,
            },
        )?;
        for (i, (s, &peak)) in series.iter().zip(&peaks).enumerate() {
            let legend = (i == 0).then_some((real_label, "±|ψ|"));
            draw_profile(&mut chart, s, peak, series_colour(i), legend)?;
        }
        draw_legend(&mut chart, SeriesLabelPosition::UpperRight)
    })
}

/// One level: the envelope ±|ψ| thin and light, Re ψ on top, the modulus label at the left.
fn draw_profile(
    chart: &mut Chart<'_, '_, RangedCoordf64, Ticked>,
    s: &ProfileSeries,
    peak: f64,
    colour: RGBColor,
    legend: Option<(&str, &str)>,
) -> Result<(), PlotError> {
    let envelope = colour.mix(0.45).stroke_width(THIN_WIDTH);
    let envelope_legend = INK.mix(0.45).stroke_width(THIN_WIDTH);
    for sign in [1.0, -1.0] {
        let runs = s.offset_runs(peak, |v| sign * v.norm());
        draw_curve(chart, runs, envelope, None)?;
    }
    let real = s.offset_runs(peak, |v| v.re);
    draw_curve(chart, real, colour.stroke_width(LINE_WIDTH), None)?;
    if let Some((real_label, envelope_label)) = legend {
        // The legend explains line styles, not levels: draw its keys in ink, off the data.
        legend_key(chart, real_label, INK.stroke_width(LINE_WIDTH))?;
        legend_key(chart, envelope_label, envelope_legend)?;
    }
    // Just above the baseline at the left end, where ψ has decayed.
    let x = chart.x_range();
    let at = (x.start + 0.015 * (x.end - x.start), s.level as f64 + 0.04);
    let label = format!("a = {}", significant(s.modulus, 6));
    let style = text(TICK_SIZE).pos(Pos::new(HPos::Left, VPos::Bottom));
    chart.draw_series(std::iter::once(Text::new(label, at, style)))?;
    Ok(())
}
