//! The 16 reflexive polygons up to GL₂(Z); 15 in canonical strip form.
//!
//! (Interface fixed; table to be filled in.)

use crate::polygon::{LatticePoint, Polygon};
use thiserror::Error;

/// Catalogue look-up failures.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
#[non_exhaustive]
pub enum CatalogueError {
    #[error("unknown family {id:?}; known ids: {known}")]
    UnknownFamily { id: String, known: String },
    #[error("family {id} is not applicable: {reason}")]
    NotApplicable { id: &'static str, reason: &'static str },
}

/// One reflexive class.
#[derive(Debug, Clone, PartialEq, Eq)]
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
    pub fn polygon(&self) -> Polygon {
        Polygon::from_points(self.vertices).expect("catalogue polygons are valid")
    }
}

pub fn all() -> &'static [Family] {
    todo!()
}

pub fn by_id(id: &str) -> Result<&'static Family, CatalogueError> {
    let _ = id;
    todo!()
}

pub fn identify(polygon: &Polygon) -> Option<&'static Family> {
    let _ = polygon;
    todo!()
}
