//! Sampling grids of real parts, read from text `R0:R1:N`, kept exact: the ends are the
//! rational numbers the decimal text denotes, and the k-th point is R0 + k·(R1 − R0)/(N − 1)
//! exactly, rounded only to the working precision of a computation ([`Grid::point`]) and
//! written back exactly ([`Grid::point_text`]). Double-precision work uses the same points
//! rounded to f64 ([`Grid::values`]).
//!
//! # Domain
//! Ends in the strict decimal syntax of [`crate::input::numbers`], |R| ≤ [`MAX_END`], R0 < R1,
//! 2 ≤ N ≤ [`MAX_POINTS`], and a step that separates neighbouring points in double precision.

use crate::input::numbers::decimal_syntax;
use rug::ops::Pow;
use rug::{Float, Integer, Rational};
use thiserror::Error;

/// A grid that cannot be used, with the reason.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum GridError {
    /// Malformed, empty, reversed, non-finite or with a point count out of range.
    #[error("{reason}")]
    Invalid { reason: String },
}

/// The largest |R0|, |R1| a grid may have (the parse domain; how far ψ can actually be sampled
/// is decided when the profile is planned, from its decay).
pub const MAX_END: f64 = 1e6;

/// The most points a grid may have.
pub const MAX_POINTS: usize = 1_000_000;

/// A regular grid `R0:R1:N` of real parts (N ≥ 2 points, R0 < R1).
#[derive(Debug, Clone, PartialEq)]
pub struct Grid {
    /// R0 rounded to f64.
    pub start: f64,
    /// R1 rounded to f64.
    pub end: f64,
    pub points: usize,
    /// R0 and R1 exactly.
    start_exact: Rational,
    end_exact: Rational,
}

impl Grid {
    /// Parses `R0:R1:N` (decimal ends, e.g. `-12:12:481` or `-1.5e1:15:7`).
    ///
    /// # Errors
    /// [`GridError::Invalid`] saying what is wrong (empty, reversed, too few points, malformed).
    pub fn parse(text: &str) -> Result<Grid, GridError> {
        Self::read(text).map_err(|reason| GridError::Invalid { reason })
    }

    /// The grid of `points` points from `start` to `end`, both taken exactly as the binary
    /// numbers they are.
    ///
    /// # Panics
    /// When an end is not finite, `start >= end` or `points < 2` (a programming error; text
    /// input goes through [`Grid::parse`]).
    pub fn new(start: f64, end: f64, points: usize) -> Grid {
        assert!(start.is_finite() && end.is_finite() && start < end && points >= 2);
        Grid {
            start,
            end,
            points,
            start_exact: Rational::from_f64(start).expect("finite"),
            end_exact: Rational::from_f64(end).expect("finite"),
        }
    }

    fn read(text: &str) -> Result<Grid, String> {
        let parts: Vec<&str> = text.trim().split(':').collect();
        if parts.len() != 3 {
            return Err(format!(
                "cannot read the grid {text:?}: use R0:R1:N, e.g. -12:12:481"
            ));
        }
        let num = |s: &str| {
            let t = decimal_syntax(s)
                .map_err(|why| format!("cannot read the grid {text:?}: {s:?}: {why}"))?;
            let f = t
                .parse::<f64>()
                .map_err(|_| format!("cannot read the grid {text:?}: {s:?} is not a number"))?;
            if !f.is_finite() || f.abs() > MAX_END {
                return Err(format!(
                    "the grid {text:?} has an end beyond ±{MAX_END:e}, far outside any reach of ψ"
                ));
            }
            let exact = decimal_rational(t)
                .ok_or_else(|| format!("cannot read the grid {text:?}: {s:?} is not a number"))?;
            Ok((f, exact))
        };
        let ((start, start_exact), (end, end_exact)) = (num(parts[0])?, num(parts[1])?);
        let points = parts[2].trim().parse::<usize>().map_err(|_| {
            format!(
                "cannot read the grid {text:?}: {:?} is not a point count",
                parts[2]
            )
        })?;
        if start_exact >= end_exact {
            return Err(format!(
                "the grid {text:?} is empty or reversed: R0 must be below R1"
            ));
        }
        if !(2..=MAX_POINTS).contains(&points) {
            return Err(format!(
                "the grid {text:?} needs between 2 and {MAX_POINTS} points"
            ));
        }
        // Neighbouring points must stay distinct in double precision.
        let step = (end - start) / (points - 1) as f64;
        if step <= 4.0 * f64::EPSILON * start.abs().max(end.abs()) {
            return Err(format!(
                "the grid {text:?} is too fine: its step {step:e} does not separate the points in double precision"
            ));
        }
        Ok(Grid {
            start,
            end,
            points,
            start_exact,
            end_exact,
        })
    }

    /// The grid values in double precision.
    pub fn values(&self) -> Vec<f64> {
        let h = (self.end - self.start) / (self.points - 1) as f64;
        (0..self.points)
            .map(|k| self.start + k as f64 * h)
            .collect()
    }

    /// The k-th point exactly.
    pub fn exact(&self, k: usize) -> Rational {
        let span = Rational::from(&self.end_exact - &self.start_exact);
        let step = span / Integer::from(self.points - 1);
        Rational::from(&self.start_exact + step * Integer::from(k))
    }

    /// The k-th point rounded to `bits` bits.
    pub fn point(&self, k: usize, bits: u32) -> Float {
        Float::with_val(bits, self.exact(k))
    }

    /// All points rounded to `bits` bits.
    pub fn points_at(&self, bits: u32) -> Vec<Float> {
        (0..self.points).map(|k| self.point(k, bits)).collect()
    }

    /// The k-th point as decimal text: exactly when its decimal expansion terminates (as for
    /// every grid whose step is a decimal fraction), else with `digits` significant digits.
    pub fn point_text(&self, k: usize, digits: u32) -> String {
        exact_decimal(&self.exact(k)).unwrap_or_else(|| {
            let x = Float::with_val(crate::precision::working_bits(digits as f64), self.exact(k));
            x.to_string_radix(10, Some(digits.max(1) as usize))
        })
    }
}

/// The rational number a decimal text denotes (`[-+]digits[.digits][e[-+]digits]`).
fn decimal_rational(text: &str) -> Option<Rational> {
    let (mantissa, exponent) = match text.find(['e', 'E']) {
        Some(i) => (&text[..i], text[i + 1..].parse::<i32>().ok()?),
        None => (text, 0),
    };
    let (sign, body) = match mantissa.strip_prefix('-') {
        Some(b) => (-1, b),
        None => (1, mantissa.strip_prefix('+').unwrap_or(mantissa)),
    };
    let (int, frac) = body.split_once('.').unwrap_or((body, ""));
    if int.is_empty() && frac.is_empty()
        || !int.chars().chain(frac.chars()).all(|c| c.is_ascii_digit())
        || exponent.unsigned_abs() > 10_000
    {
        return None;
    }
    let digits = Integer::from_str_radix(&format!("{int}{frac}0"), 10).ok()? / 10u32;
    let scale = exponent - frac.len() as i32;
    let value = if scale >= 0 {
        Rational::from(digits * Integer::from(10).pow(scale as u32))
    } else {
        Rational::from((digits, Integer::from(10).pow(scale.unsigned_abs())))
    };
    Some(value * sign)
}

/// The finite decimal expansion of `q`, if its denominator has no prime factor but 2 and 5.
fn exact_decimal(q: &Rational) -> Option<String> {
    let mut den = q.denom().clone();
    let (mut twos, mut fives) = (0u32, 0u32);
    while den.is_divisible_u(2) {
        den /= 2;
        twos += 1;
    }
    while den.is_divisible_u(5) {
        den /= 5;
        fives += 1;
    }
    if den != 1 {
        return None;
    }
    let places = twos.max(fives);
    let scaled = Integer::from(q.numer() * Integer::from(10).pow(places)) / q.denom();
    let negative = scaled < 0;
    let digits = scaled.abs().to_string();
    let places = places as usize;
    let text = if places == 0 {
        digits
    } else {
        let padded = format!("{digits:0>width$}", width = places + 1);
        let (i, f) = padded.split_at(padded.len() - places);
        format!("{i}.{f}")
    };
    Some(if negative { format!("-{text}") } else { text })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn points_are_exact_as_given() {
        let g = Grid::parse("-12:12:481").unwrap();
        assert_eq!(g.point_text(1, 40), "-11.95");
        assert_eq!(g.point_text(240, 40), "0");
        assert_eq!(g.values()[1], -11.95);
        // A step that is no decimal fraction is written with the digits asked for, and rounds to
        // the exact rational at any precision.
        let g = Grid::parse("0:1:4").unwrap();
        assert_eq!(g.exact(1), Rational::from((1, 3)));
        assert!(g
            .point_text(1, 30)
            .starts_with("3.33333333333333333333333333333e-1"));
        assert_eq!(
            g.point(2, 200),
            Float::with_val(200, Rational::from((2, 3)))
        );
        let g = Grid::parse("-1.5e1:0.25:2").unwrap();
        assert_eq!(g.point_text(0, 10), "-15");
        assert_eq!(g.point_text(1, 10), "0.25");
    }

    #[test]
    fn malformed_grids_are_refused() {
        for bad in [
            "",
            "1:2",
            "a:2:3",
            "2:1:3",
            "0:1:1",
            "0:1:x",
            "inf:1:3",
            "0:nan:3",
            "-1e308:1e308:3",
            "1e300:1e301:3",
            "-1 0:10:3",
            "0:1_0:3",
            "0:1:1000001",
            "1:1.0000000000000001:3",
            "0:1e99999999:3",
        ] {
            assert!(Grid::parse(bad).is_err(), "{bad:?}");
        }
    }
}
