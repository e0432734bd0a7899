//! Sampling grids of real parts, read from text `R0:R1:N`.

use thiserror::Error;

/// A grid that cannot be used, with the reason.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum GridError {
    /// Malformed, empty, reversed, non-finite or with a point count out of range.
    #[error("{reason}")]
    Invalid { reason: String },
}

/// A regular grid `R0:R1:N` of real parts (N ≥ 2 points, R0 < R1).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Grid {
    pub start: f64,
    pub end: f64,
    pub points: usize,
}

impl Grid {
    /// Parses `R0:R1:N`.
    ///
    /// # Errors
    /// [`GridError::Invalid`] saying what is wrong (empty, reversed, too few points, malformed).
    pub fn parse(text: &str) -> Result<Grid, GridError> {
        Self::read(text).map_err(|reason| GridError::Invalid { reason })
    }

    fn read(text: &str) -> Result<Grid, String> {
        let parts: Vec<&str> = text.trim().split(':').collect();
        if parts.len() != 3 {
            return Err(format!(
                "cannot read the grid {text:?}: use R0:R1:N, e.g. -12:12:481"
            ));
        }
        let num = |s: &str| {
            s.trim()
                .parse::<f64>()
                .map_err(|_| format!("cannot read the grid {text:?}: {s:?} is not a number"))
        };
        let (start, end) = (num(parts[0])?, num(parts[1])?);
        let points = parts[2].trim().parse::<usize>().map_err(|_| {
            format!(
                "cannot read the grid {text:?}: {:?} is not a point count",
                parts[2]
            )
        })?;
        if !start.is_finite() || !end.is_finite() {
            return Err(format!("the grid {text:?} has a non-finite end"));
        }
        if start >= end {
            return Err(format!(
                "the grid {text:?} is empty or reversed: R0 must be below R1"
            ));
        }
        if !(2..=1_000_000).contains(&points) {
            return Err(format!(
                "the grid {text:?} needs between 2 and 1000000 points"
            ));
        }
        Ok(Grid { start, end, points })
    }

    /// The grid values.
    pub fn values(&self) -> Vec<f64> {
        let h = (self.end - self.start) / (self.points - 1) as f64;
        (0..self.points)
            .map(|k| self.start + k as f64 * h)
            .collect()
    }
}
