//! Stacked profiles: ψₙ(r) on ℝ for several levels, each on its own baseline.
//!
//! # Method
//! Horizontal axis r; level n is drawn on the baseline y = n: the real part of the phase-fixed
//! ψₙ as a solid line and ±|ψₙ| as a thin dashed envelope, both scaled so that max|ψₙ| reaches
//! [`PROFILE_HALF_HEIGHT`] above the baseline. Every level has the same two styles (the
//! baselines tell the levels apart), so the legend's two keys are exactly what is drawn. The
//! vertical tick labels name the levels ("n = 0", …); right of the plot, level with each
//! baseline, a label gives the modulus aₙ (six significant digits): outside the data it can
//! meet no curve, and every level's label stands in the same place.
//!
//! # Accuracy
//! Each curve is scaled by its own largest sampled |ψ|; positions to 0.01 px. `tests/plot.rs`
//! checks the level labels, the moduli, the legend, and that no label meets a curve.
//!
//! # Errors
//! [`PlotError::NoSeries`], [`PlotError::LengthMismatch`], [`PlotError::TooFewPoints`],
//! [`PlotError::ZeroProfile`], [`PlotError::DegenerateRange`].
//!
//! # References
//! None: a drawing convention.

use super::axes::{
    centred_baseline, draw_axes, draw_grid, draw_legend, draw_series, draw_title, font,
    legend_room, plot_rect, round_labelled, Axes, Corner, Frame, Key, LegendEntry, LineLook,
    Obstacles,
};
use super::data::{check_series, extent, finite_runs, padded, LINE_POINTS};
use super::numbers::significant;
use super::png::text_width;
use super::style::series_style;
use super::svg::{Anchor, Rgb, Stroke, Svg};
use super::{PlotError, FIGURE_SIZE, LINE_WIDTH, PROFILE_HALF_HEIGHT, THIN_WIDTH, TICK_SIZE};
use num_complex::Complex64;

/// Between the plot's right edge and the modulus labels.
const LABEL_GAP: f64 = 8.0;

/// The envelope: a muted slate, lighter than the real part, dashed.
const ENVELOPE: Rgb = Rgb(0x6f, 0x80, 0xa0);
const ENVELOPE_DASH: &[f64] = &[5.0, 3.0];

/// ψₙ sampled on ℝ at one level, normalized and phase-fixed by the caller.
#[derive(Debug, Clone, PartialEq)]
pub struct ProfileSeries {
    /// The level n; the curve is drawn on the baseline y = n.
    pub level: usize,
    /// The modulus aₙ, shown beside the curve.
    pub modulus: f64,
    /// Sample points on ℝ.
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

/// ψₙ on ℝ for several levels, each on its own baseline (see the module documentation).
/// `real_label` names the plotted real part in the legend (e.g. "Re ψ").
///
/// # Errors
/// [`PlotError::NoSeries`] for no series; a series with mismatched lengths, fewer than two
/// finite samples, or ψ ≡ 0; all samples at one r.
pub fn stacked_profiles(
    title: Option<&str>,
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
    let x = padded(r_extent, 0.01);
    let axes = Axes {
        x_desc: "r",
        y_desc: "level n (offset ψₙ)",
        x_ticks: round_labelled(x.start, x.end, 7),
        y_ticks: levels
            .iter()
            .map(|&l| (l, format!("n = {}", l.round())))
            .collect(),
    };
    let area = (0.0, 0.0, FIGURE_SIZE.0 as f64, FIGURE_SIZE.1 as f64);
    let moduli: Vec<String> = series
        .iter()
        .map(|s| format!("a = {}", significant(s.modulus, 6)))
        .collect();
    let widest = moduli
        .iter()
        .map(|m| text_width(m, TICK_SIZE))
        .fold(0.0, f64::max);
    let rect = plot_rect(area, title.is_some(), &axes.y_ticks, widest + LABEL_GAP);
    let frame = Frame::new(
        rect,
        x,
        bottom..legend_room(bottom, top, 2, title.is_some()),
    );
    let mut svg = Svg::new(FIGURE_SIZE);
    if let Some(title) = title {
        draw_title(&mut svg, area, title);
    }
    draw_grid(&mut svg, &frame, &axes);
    let real = LineLook::plain(Stroke::solid(series_style(0).colour, LINE_WIDTH));
    let envelope = LineLook::plain(Stroke::dashed(ENVELOPE, THIN_WIDTH, ENVELOPE_DASH));
    let mut obstacles = Obstacles::default();
    for (s, &peak) in series.iter().zip(&peaks) {
        let name = s.name();
        for sign in [1.0, -1.0] {
            let runs = s.offset_runs(peak, |v| sign * v.norm());
            let label = format!("{} {name}", if sign > 0.0 { "+|ψ|" } else { "−|ψ|" });
            draw_series(
                &mut svg,
                &frame,
                &runs,
                &envelope,
                Some(&label),
                (0, 0.0),
                &mut obstacles,
            );
        }
        let runs = s.offset_runs(peak, |v| v.re);
        let label = format!("{real_label} {name}");
        draw_series(
            &mut svg,
            &frame,
            &runs,
            &real,
            Some(&label),
            (0, 0.0),
            &mut obstacles,
        );
    }
    draw_axes(&mut svg, &frame, &axes);
    let legend = [
        LegendEntry {
            label: real_label.to_string(),
            key: Key::Line(real),
        },
        LegendEntry {
            label: "±|ψ|".into(),
            key: Key::Line(envelope),
        },
    ];
    let corners = [Corner::UpperRight, Corner::UpperLeft];
    draw_legend(&mut svg, &frame, &legend, &corners, &obstacles);
    svg.open_group("label", None);
    for (s, label) in series.iter().zip(&moduli) {
        let y = centred_baseline(frame.y.at(s.level as f64), TICK_SIZE);
        let at = (frame.right() + LABEL_GAP, y);
        svg.text(at, label, &font(TICK_SIZE, Anchor::Start));
    }
    svg.close_group();
    Ok(svg.finish())
}
