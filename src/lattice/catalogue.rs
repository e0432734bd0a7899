//! The 16 reflexive polygons up to GL₂(Z); 15 in canonical strip form.
//!
//! # Contents
//! One [`Family`] per GL₂(Z) class of reflexive polygons (convex lattice polygons whose only
//! interior lattice point is the origin). Fifteen classes have a strip form (every lattice
//! point has `m₂ ∈ {−1, 0, 1}`); the sixteenth, the triangle with 9 boundary points
//! (`P2*`), has lattice width 3, so it has none and is listed with `applicable: false`.
//!
//! # Ids
//! - Toric-surface labels where they apply: `P2`, `F0` (P¹×P¹), `F1`, `F2` (Hirzebruch
//!   surfaces), `dP2`, `dP3` (P² blown up at two and three points); their polar duals carry a
//!   star: `P2*`, `F0*`, `F1*`, `F2*`, `dP2*` (`dP3` is self-dual).
//! - The other five: a shape letter and the number of boundary points: `Q5`, `Q7`
//!   (quadrilaterals, dual to each other), and the self-dual `T6` (triangle), `Q6`
//!   (quadrilateral), `Pe6` (pentagon).
//!
//! # Vertices
//! For `F0`, `P2` and `dP3` the strip forms are fixed by the project:
//! `F0 = (1,0),(0,1),(−1,0),(0,−1)`, `P2 = (1,0),(0,1),(−1,−1)`,
//! `dP3 = (1,0),(1,1),(0,1),(−1,0),(−1,−1),(0,−1)`. Every applicable entry (these three
//! included) stores the strip form chosen by the rule of
//! [`Polygon::strip_form`](crate::lattice::polygon::Polygon::strip_form): symmetric under
//! `m₁ ↦ −m₁` if possible, then least `max |m₁|`, then least `Σ |m₁|` over the vertices,
//! then least sorted vertex list; the three fixed forms are exactly what the rule gives. The
//! table is data; the tests re-derive every entry (class list by brute force, strip forms
//! by the rule, duals by polar duality), so a wrong entry fails them. Vertices are listed
//! counter-clockwise starting at the vertex of least angle from the positive m₁-axis.
//!
//! # Errors
//! [`CatalogueError`]: unknown id, or a family the construction does not apply to.
//!
//! # References
//! "Lattice polygons and the number 12", Amer. Math. Monthly 107 (2000), 238–250: the 16
//! classes, polar duality and `B(Δ) + B(Δ*) = 12`. Toric labels: common practice.

use crate::lattice::polygon::{LatticePoint, Polygon};
use serde::Serialize;
use thiserror::Error;

/// Catalogue look-up failures.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
#[non_exhaustive]
pub enum CatalogueError {
    #[error("unknown family {id:?}; known ids: {known}")]
    UnknownFamily { id: String, known: String },
    #[error("family {id} is not applicable: {reason}")]
    NotApplicable {
        id: &'static str,
        reason: &'static str,
    },
}

/// One reflexive class.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Family {
    /// Short id used on the command line (`F0`, `P2`, `dP3`, …).
    pub id: &'static str,
    /// One line saying what the polygon is.
    pub description: &'static str,
    /// Vertices counter-clockwise; the canonical strip form when `applicable`.
    pub vertices: &'static [LatticePoint],
    /// Number of boundary lattice points.
    pub boundary_points: usize,
    /// Id of the dual polygon.
    pub dual: &'static str,
    /// Whether the construction applies (a strip form exists).
    pub applicable: bool,
    /// Why not, when not applicable.
    pub reason: Option<&'static str>,
}

impl Family {
    /// The polygon of the stored vertices.
    pub fn polygon(&self) -> Polygon {
        Polygon::from_points(self.vertices).expect("catalogue polygons are valid")
    }

    /// `Ok` if the construction applies to this family.
    ///
    /// # Errors
    /// [`CatalogueError::NotApplicable`] with the stored reason.
    pub fn check_applicable(&self) -> Result<(), CatalogueError> {
        match (self.applicable, self.reason) {
            (true, _) => Ok(()),
            (false, reason) => Err(CatalogueError::NotApplicable {
                id: self.id,
                reason: reason.unwrap_or("no strip form"),
            }),
        }
    }
}

const NO_STRIP_FORM: &str = "lattice width 3: no GL₂(Z) image lies in the strip m₂ ∈ {−1, 0, 1}, \
     so there is no strip form and the construction does not apply";

/// A family whose vertices are its canonical strip form.
const fn strip(
    id: &'static str,
    description: &'static str,
    vertices: &'static [LatticePoint],
    boundary_points: usize,
    dual: &'static str,
) -> Family {
    Family {
        id,
        description,
        vertices,
        boundary_points,
        dual,
        applicable: true,
        reason: None,
    }
}

static FAMILIES: [Family; 16] = [
    strip(
        "P2",
        "local P² (triangle, 3 boundary points)",
        &[[1, 0], [0, 1], [-1, -1]],
        3,
        "P2*",
    ),
    strip(
        "F0",
        "local F₀ = P¹×P¹ (square, 4 boundary points)",
        &[[1, 0], [0, 1], [-1, 0], [0, -1]],
        4,
        "F0*",
    ),
    strip(
        "F1",
        "local F₁, P² blown up at one point (quadrilateral, 4 boundary points)",
        &[[1, 0], [0, 1], [-1, -1], [0, -1]],
        4,
        "F1*",
    ),
    strip(
        "F2",
        "local F₂ (triangle, 4 boundary points)",
        &[[0, 1], [-1, -1], [1, -1]],
        4,
        "F2*",
    ),
    strip(
        "Q5",
        "quadrilateral, 5 boundary points",
        &[[0, 1], [-1, 0], [-1, -1], [1, -1]],
        5,
        "Q7",
    ),
    strip(
        "dP2",
        "local dP₂, P² blown up at two points (pentagon, 5 boundary points)",
        &[[1, 0], [0, 1], [-1, 0], [-1, -1], [0, -1]],
        5,
        "dP2*",
    ),
    strip(
        "T6",
        "triangle, 6 boundary points (self-dual)",
        &[[0, 1], [-2, -1], [1, -1]],
        6,
        "T6",
    ),
    strip(
        "Q6",
        "quadrilateral, 6 boundary points (self-dual)",
        &[[1, 1], [-1, 1], [-1, -1], [0, -1]],
        6,
        "Q6",
    ),
    strip(
        "Pe6",
        "pentagon, 6 boundary points (self-dual)",
        &[[1, 0], [0, 1], [-1, 0], [-1, -1], [1, -1]],
        6,
        "Pe6",
    ),
    strip(
        "dP3",
        "local dP₃, P² blown up at three points (hexagon, 6 boundary points, self-dual)",
        &[[1, 0], [1, 1], [0, 1], [-1, 0], [-1, -1], [0, -1]],
        6,
        "dP3",
    ),
    strip(
        "Q7",
        "quadrilateral, 7 boundary points",
        &[[1, 0], [0, 1], [-2, -1], [1, -1]],
        7,
        "Q5",
    ),
    strip(
        "dP2*",
        "dual of dP₂ (pentagon, 7 boundary points)",
        &[[1, 1], [0, 1], [-1, 0], [-1, -1], [1, -1]],
        7,
        "dP2",
    ),
    strip(
        "F0*",
        "dual of F₀ (square, 8 boundary points)",
        &[[1, 1], [-1, 1], [-1, -1], [1, -1]],
        8,
        "F0",
    ),
    strip(
        "F1*",
        "dual of F₁ (quadrilateral, 8 boundary points)",
        &[[1, 1], [0, 1], [-2, -1], [1, -1]],
        8,
        "F1",
    ),
    strip(
        "F2*",
        "dual of F₂ (triangle, 8 boundary points)",
        &[[0, 1], [-2, -1], [2, -1]],
        8,
        "F2",
    ),
    Family {
        id: "P2*",
        description: "dual of P² (triangle, 9 boundary points; lattice width 3, no strip form)",
        vertices: &[[-1, 2], [-1, -1], [2, -1]],
        boundary_points: 9,
        dual: "P2",
        applicable: false,
        reason: Some(NO_STRIP_FORM),
    },
];

/// All 16 families, by increasing number of boundary points.
pub fn all() -> &'static [Family] {
    &FAMILIES
}

/// The ids of all families, comma separated (for messages).
pub fn known_ids() -> String {
    FAMILIES.iter().map(|f| f.id).collect::<Vec<_>>().join(", ")
}

/// The family with this id, compared case-insensitively (`f0`, `DP3`, `p2*`).
///
/// # Errors
/// [`CatalogueError::UnknownFamily`], listing the known ids.
pub fn by_id(id: &str) -> Result<&'static Family, CatalogueError> {
    let wanted = id.trim();
    FAMILIES
        .iter()
        .find(|f| f.id.eq_ignore_ascii_case(wanted))
        .ok_or_else(|| CatalogueError::UnknownFamily {
            id: id.to_string(),
            known: known_ids(),
        })
}

/// [`by_id`], then [`Family::check_applicable`].
///
/// # Errors
/// [`CatalogueError::UnknownFamily`] or [`CatalogueError::NotApplicable`].
pub fn applicable_by_id(id: &str) -> Result<&'static Family, CatalogueError> {
    let family = by_id(id)?;
    family.check_applicable()?;
    Ok(family)
}

/// The family GL₂(Z)-equivalent to `polygon` (equal [`Polygon::normal_form`]), if any. A
/// translate of a reflexive polygon is not GL₂(Z)-equivalent to it, so it gives `None`.
pub fn identify(polygon: &Polygon) -> Option<&'static Family> {
    let form = polygon.normal_form();
    FAMILIES.iter().find(|f| f.polygon().normal_form() == form)
}
