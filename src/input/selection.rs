//! Turning a command-line selection into the mathematics: a catalogue id or a vertex list
//! (with optional coefficients) becomes the strip polygon and the tempered φ actually used;
//! level ranges `A..B` / `n` become inclusive ranges.
//!
//! # Conventions
//! A vertex list already in strip form is used as given; otherwise it is replaced by the strip
//! form [`Polygon::strip_form`] finds, and the GL₂(Z) matrix is reported. The spectrum does not
//! depend on that choice (GL₂(Z) acts by metaplectic unitaries or antiunitaries).
//!
//! # Errors
//! [`SelectionError`], wrapping the polygon, catalogue and coefficient errors, plus malformed
//! level ranges.

use crate::curve::laurent::{Laurent, LaurentError};
use crate::input::{coefficients, vertices};
use crate::lattice::catalogue::{self, CatalogueError, Family};
use crate::lattice::polygon::{Mat2, Polygon, PolygonError, MAX_REFLEXIVE_BOUNDARY};
use thiserror::Error;

/// A selection that cannot be used.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum SelectionError {
    #[error(transparent)]
    Polygon(#[from] PolygonError),
    #[error(transparent)]
    Catalogue(#[from] CatalogueError),
    #[error(transparent)]
    Laurent(#[from] LaurentError),
    /// Both a catalogue id and a vertex list were given.
    #[error("both a catalogue id and a vertex list were given; give one of them")]
    Ambiguous,
    /// Neither a catalogue id nor a vertex list was given.
    #[error("no family was given: a catalogue id or a vertex list is needed")]
    Missing,
    #[error("cannot read the level range {text:?}: {reason}; use A..B (inclusive, A ≤ B) or a single level n")]
    Levels { text: String, reason: String },
    #[error(
        "cannot read the modulus {text:?}: {reason}; give a finite decimal number such as 17.8466"
    )]
    Modulus { text: String, reason: String },
    #[error("the modulus {modulus} is not above the spectral threshold {threshold} (the minimum of phi on x, y > 0, compared at the working precision); eigenvalues and attractor moduli lie above it")]
    BelowThreshold { modulus: String, threshold: f64 },
}

/// The family and polynomial a command works on.
#[derive(Debug, Clone)]
pub struct Selection {
    /// The catalogue entry of the polygon's class.
    pub family: &'static Family,
    /// The strip polygon used.
    pub polygon: Polygon,
    /// The tempered φ on it.
    pub laurent: Laurent,
    /// The GL₂(Z) matrix applied to the user's vertices, if any.
    pub transform: Option<Mat2>,
}

/// Resolves `--family` / `--vertices` / `--coefficients`.
///
/// # Errors
/// See [`SelectionError`].
pub fn resolve(
    family: Option<&str>,
    vertices: Option<&str>,
    coefficients: Option<&str>,
) -> Result<Selection, SelectionError> {
    let (family, polygon, transform) = match (family, vertices) {
        (Some(_), Some(_)) => return Err(SelectionError::Ambiguous),
        (None, None) => return Err(SelectionError::Missing),
        (Some(id), None) => {
            let f = catalogue::by_id(id)?;
            if !f.applicable {
                return Err(CatalogueError::NotApplicable {
                    id: f.id,
                    reason: f.reason.unwrap_or("no strip form"),
                }
                .into());
            }
            (f, f.polygon(), None)
        }
        (None, Some(text)) => {
            let points = vertices::parse_vertices(text)?;
            // Fast path: too many distinct points for any reflexive polygon.
            let mut distinct = points.clone();
            distinct.sort_unstable();
            distinct.dedup();
            if distinct.len() > MAX_REFLEXIVE_BOUNDARY {
                return Err(PolygonError::TooManyPoints {
                    count: distinct.len(),
                }
                .into());
            }
            let p = Polygon::from_vertex_list(&points)?;
            p.check_reflexive()?;
            let (p, transform) = if p.is_strip() {
                (p, None)
            } else {
                let (m, q) = p.strip_form()?;
                (q, Some(m))
            };
            let f = catalogue::identify(&p).expect("every reflexive polygon is in the catalogue");
            (f, p, transform)
        }
    };
    let laurent = match coefficients {
        None => Laurent::tempered(&polygon),
        Some(text) => {
            let given = coefficients::parse_coefficients(text)?;
            let given = match transform {
                None => given,
                Some(m) => given
                    .into_iter()
                    .map(|(pt, c)| (apply(&m, pt), c))
                    .collect(),
            };
            Laurent::with_coefficients(&polygon, &given)?
        }
    };
    Ok(Selection {
        family,
        polygon,
        laurent,
        transform,
    })
}

fn apply(m: &Mat2, p: [i64; 2]) -> [i64; 2] {
    [
        m[0][0] * p[0] + m[0][1] * p[1],
        m[1][0] * p[0] + m[1][1] * p[1],
    ]
}
