//! Lattice polygons: convex hull, lattice points, reflexivity, lattice width,
//! GL₂(Z) normal form and strip form.
//!
//! (Interface fixed; bodies to be filled in.)

use thiserror::Error;

/// A point of Z², `[m₁, m₂]`.
pub type LatticePoint = [i64; 2];

/// An integer 2×2 matrix, row-major, acting on column vectors: `m' = M m`.
pub type Mat2 = [[i64; 2]; 2];

/// Why a vertex list is not usable.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
#[non_exhaustive]
pub enum PolygonError {
    /// Fewer than three distinct points, or all points on one line.
    #[error("the points {points:?} do not span a polygon (fewer than three distinct points, or all on one line)")]
    Degenerate { points: Vec<LatticePoint> },
    /// The polygon does not have exactly one interior lattice point.
    #[error("not reflexive: a reflexive polygon has exactly one interior lattice point, this one has {} ({interior:?})", interior.len())]
    NotReflexive { interior: Vec<LatticePoint> },
    /// Exactly one interior point, but it is not the origin.
    #[error("the only interior lattice point is {point:?}, not the origin; translate the vertices by {:?}", [-point[0], -point[1]])]
    InteriorNotOrigin { point: LatticePoint },
    /// No GL₂(Z) image lies in the strip m₂ ∈ {−1, 0, 1}.
    #[error("no strip form: the lattice width is {width} (a strip form needs width 2), so the construction does not apply")]
    NoStripForm { width: i64 },
    /// Malformed `--vertices` text.
    #[error("cannot read vertices from {text:?}: {reason}; expected a list such as \"(1,0),(0,1),(-1,-1)\"")]
    Parse { text: String, reason: String },
}

/// A convex lattice polygon, vertices counter-clockwise without repeated or collinear points.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub struct Polygon {
    vertices: Vec<LatticePoint>,
}

impl Polygon {
    pub fn from_points(points: &[LatticePoint]) -> Result<Self, PolygonError> {
        let _ = points;
        todo!()
    }
    pub fn vertices(&self) -> &[LatticePoint] {
        &self.vertices
    }
    pub fn edges(&self) -> Vec<Vec<LatticePoint>> {
        todo!()
    }
    pub fn boundary_points(&self) -> Vec<LatticePoint> {
        todo!()
    }
    pub fn interior_points(&self) -> Vec<LatticePoint> {
        todo!()
    }
    pub fn check_reflexive(&self) -> Result<(), PolygonError> {
        todo!()
    }
    pub fn is_reflexive(&self) -> bool {
        self.check_reflexive().is_ok()
    }
    pub fn lattice_width(&self) -> (i64, [i64; 2]) {
        todo!()
    }
    pub fn transform(&self, m: &Mat2) -> Polygon {
        let _ = m;
        todo!()
    }
    pub fn normal_form(&self) -> Vec<LatticePoint> {
        todo!()
    }
    pub fn is_strip(&self) -> bool {
        todo!()
    }
    pub fn strip_form(&self) -> Result<(Mat2, Polygon), PolygonError> {
        todo!()
    }
}

/// Parses `"(1,0),(0,1),(-1,-1)"`.
pub fn parse_vertices(text: &str) -> Result<Vec<LatticePoint>, PolygonError> {
    let _ = text;
    todo!()
}
