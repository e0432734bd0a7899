//! Data checks and ranges shared by the figures: runs of finite points (non-finite values are
//! gaps), the length and plottable-point checks of a series, the extent of an axis and its
//! padding.
//!
//! # Accuracy
//! An axis whose values agree to 10⁻¹² of their magnitude has no extent and is refused; other
//! checks are exact counts. Each refusal is exercised in `tests/plot.rs`.
//!
//! # Errors
//! [`PlotError::LengthMismatch`], [`PlotError::TooFewPoints`], [`PlotError::DegenerateRange`].
//!
//! # References
//! None: bookkeeping only.

use super::PlotError;
use std::ops::Range;

/// Contiguous runs of points with finite coordinates: non-finite values are gaps.
pub(super) fn finite_runs(points: impl Iterator<Item = (f64, f64)>) -> Vec<Vec<(f64, f64)>> {
    let mut runs = vec![Vec::new()];
    for (x, y) in points {
        if x.is_finite() && y.is_finite() {
            runs.last_mut().expect("runs is never empty").push((x, y));
        } else if !runs.last().expect("runs is never empty").is_empty() {
            runs.push(Vec::new());
        }
    }
    runs.retain(|r| !r.is_empty());
    runs
}

/// A line needs two points; a bar chart one bar.
pub(super) const LINE_POINTS: usize = 2;

/// Checks that a series has as many abscissae as values and at least `needed` plottable
/// points.
pub(super) fn check_series(
    series: &str,
    (abscissae, values): (usize, usize),
    plottable: usize,
    needed: usize,
) -> Result<(), PlotError> {
    if abscissae != values {
        return Err(PlotError::LengthMismatch {
            series: series.to_string(),
            abscissae,
            values,
        });
    }
    if plottable < needed {
        return Err(PlotError::TooFewPoints {
            series: series.to_string(),
            plottable,
            needed,
        });
    }
    Ok(())
}

/// Smallest and largest finite value; an error if there is none or they coincide.
pub(super) fn extent(
    values: impl Iterator<Item = f64>,
    axis: &'static str,
) -> Result<(f64, f64), PlotError> {
    let (lo, hi) = values
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
            (lo.min(v), hi.max(v))
        });
    if lo > hi {
        return Err(PlotError::DegenerateRange {
            axis,
            value: f64::NAN,
        });
    }
    if hi - lo <= 1e-12 * hi.abs().max(lo.abs()).max(f64::MIN_POSITIVE) {
        return Err(PlotError::DegenerateRange { axis, value: lo });
    }
    Ok((lo, hi))
}

/// `lo..hi` widened by `fraction` of its length on both sides.
pub(super) fn padded((lo, hi): (f64, f64), fraction: f64) -> Range<f64> {
    let pad = fraction * (hi - lo);
    (lo - pad)..(hi + pad)
}
