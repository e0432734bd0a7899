//! Lattice polygons: convex hull, lattice points, reflexivity, lattice width,
//! GL₂(Z) normal form and strip form.
//!
//! # Conventions
//! - A point of Z² is `[m₁, m₂]`; a matrix `M` acts on column vectors, `m' = M m`.
//! - A [`Polygon`] is the convex hull of its input points. Its vertices are stored
//!   counter-clockwise, without repeated or collinear points, starting at the
//!   lexicographically smallest vertex (least m₁, then least m₂).
//! - Every coordinate satisfies `|c| ≤ MAX_COORDINATE` (= 10⁶). With that bound all
//!   cross products and twice the area stay below 10¹⁴, far inside `i64`; the few
//!   places that multiply derived quantities (normal form, lattice width, strip form)
//!   compute in `i128`.
//!
//! # Method
//! - Hull: monotone chain (sort, then lower and upper chains), dropping collinear points.
//! - Lattice points: an edge with displacement `d` has lattice length `g = gcd(d₁, d₂)` and
//!   `g + 1` lattice points. Interior points are found row by row from the strict edge
//!   inequalities (cost O(height · vertices + count)); their number also follows from
//!   Pick's theorem `2A = 2I + B − 2`, which [`Polygon::interior_count`] uses.
//! - Lattice width: the width `w(f) = max f − min f` over the polygon is a norm on the dual
//!   lattice; its shortest nonzero vector is found by the generalized Gauss reduction
//!   (see [`Polygon::lattice_width`] for the proof that it stops at a shortest vector).
//! - Normal form: lexicographically least image vertex sequence over the finitely many
//!   unimodular frames attached to (vertex, orientation) pairs ([`Polygon::normal_form`]).
//! - Strip form: the primitive functionals `f` with `f(Δ) ⊆ [−1, 1]` lie in an explicit
//!   finite set (25 candidates), and among all GL₂(Z) images with second row `f` a
//!   documented key picks one ([`Polygon::strip_form`]).
//!
//! # Accuracy
//! Exact integer arithmetic throughout; no floating point.
//!
//! # Errors
//! [`PolygonError`]: degenerate or oversized input, failed reflexivity (too many or too few
//! interior points, or an interior point off the origin), no strip form, unreadable text.
//!
//! # References
//! - "Lattice polygons and the number 12", Amer. Math. Monthly 107 (2000), 238–250: the 16
//!   reflexive polygons, polar duality, and `B(Δ) + B(Δ*) = 12`.
//! - "The generalized Gauss reduction algorithm", J. Algorithms 21 (1996), 565–578 (from
//!   memory): Gauss reduction for arbitrary norms in dimension 2; the part used here is
//!   proved in full in [`Polygon::lattice_width`].
//! - Pick's theorem, monotone-chain hull: common knowledge of the trade.

use serde::Serialize;
use thiserror::Error;

/// A point of Z², `[m₁, m₂]`.
pub type LatticePoint = [i64; 2];

/// An integer 2×2 matrix, row-major, acting on column vectors: `m' = M m`.
pub type Mat2 = [[i64; 2]; 2];

/// Largest absolute value of a coordinate accepted by [`Polygon::from_points`]; keeps every
/// product of two coordinate differences far from `i64` overflow.
pub const MAX_COORDINATE: i64 = 1_000_000;

/// The most boundary lattice points a reflexive polygon has: B(Δ) + B(Δ°) = 12 with B(Δ°) ≥ 3
/// ("Lattice polygons and the number 12", Amer. Math. Monthly 107 (2000)); attained by P2*.
pub const MAX_REFLEXIVE_BOUNDARY: usize = 9;

/// [`Polygon::check_reflexive`] lists the interior points of a non-reflexive polygon only
/// up to this many; beyond it the error carries the count alone.
pub const INTERIOR_LIST_LIMIT: u64 = 10_000;

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
    #[error("no strip form: the lattice width is {width} (a strip form needs width 2 about the origin), so the construction does not apply")]
    NoStripForm { width: i64 },
    /// Malformed `--vertices` text.
    #[error("cannot read vertices from {text:?}: {reason}; expected a list such as \"(1,0),(0,1),(-1,-1)\"")]
    Parse { text: String, reason: String },
    /// A coordinate (of the input, or of a computed image) exceeds [`MAX_COORDINATE`].
    #[error("the point {point:?} has a coordinate of absolute value above {bound}; coordinates are bounded so that exact 64-bit arithmetic cannot overflow")]
    CoordinateTooLarge { point: [i128; 2], bound: i64 },
    /// A vertex list with a point strictly inside the hull of the others: the list does not
    /// describe a convex polygon.
    #[error("the vertex list is not convex: {point:?} lies strictly inside the polygon spanned by the other points")]
    NotConvex { point: LatticePoint },
    /// More distinct points than any reflexive polygon has on its boundary.
    #[error("not reflexive: the list holds {count} distinct lattice points, but a reflexive polygon has at most {MAX_REFLEXIVE_BOUNDARY} boundary lattice points (and a vertex list only boundary points)")]
    TooManyPoints { count: usize },
    /// Not reflexive, with more interior points than [`INTERIOR_LIST_LIMIT`] (not listed).
    #[error("not reflexive: a reflexive polygon has exactly one interior lattice point, this one has {count} (too many to list)")]
    TooManyInteriorPoints { count: u64 },
}

/// A convex lattice polygon, vertices counter-clockwise without repeated or collinear points,
/// starting at the lexicographically smallest vertex.
#[derive(Debug, Clone, PartialEq, Eq, Hash, Serialize)]
pub struct Polygon {
    vertices: Vec<LatticePoint>,
}

impl Polygon {
    /// The convex hull of `points` (any order; duplicates, collinear and interior points are
    /// allowed and ignored).
    ///
    /// # Errors
    /// [`PolygonError::CoordinateTooLarge`] if a coordinate exceeds [`MAX_COORDINATE`];
    /// [`PolygonError::Degenerate`] (listing the distinct points) if the hull is not
    /// two-dimensional, including for empty input.
    ///
    /// ```
    /// use regwave::lattice::polygon::Polygon;
    /// let p = Polygon::from_points(&[[0, 1], [1, 0], [0, 0], [-1, -1], [1, 0]]).unwrap();
    /// assert_eq!(p.vertices(), &[[-1, -1], [1, 0], [0, 1]]);
    /// ```
    pub fn from_points(points: &[LatticePoint]) -> Result<Self, PolygonError> {
        if let Some(p) = points
            .iter()
            .find(|p| !within_bound(p[0]) || !within_bound(p[1]))
        {
            return Err(too_large([p[0] as i128, p[1] as i128]));
        }
        let mut distinct = points.to_vec();
        distinct.sort_unstable();
        distinct.dedup();
        let vertices = convex_hull(&distinct);
        if vertices.len() < 3 {
            return Err(PolygonError::Degenerate { points: distinct });
        }
        Ok(Polygon { vertices })
    }

    /// The convex polygon of a user's *vertex list*: any order, duplicates and points on the
    /// edges allowed, but a point strictly inside is an error (the list is then not the vertex
    /// list of a convex polygon).
    ///
    /// # Errors
    /// As [`Polygon::from_points`], and [`PolygonError::NotConvex`].
    pub fn from_vertex_list(points: &[LatticePoint]) -> Result<Self, PolygonError> {
        let p = Polygon::from_points(points)?;
        // O(points × vertices): a point is on the boundary iff it lies on one of the edges.
        let on_boundary = |q: &LatticePoint| {
            p.edge_pairs().any(|(a, b)| {
                let (d, e) = ([b[0] - a[0], b[1] - a[1]], [q[0] - a[0], q[1] - a[1]]);
                let along = d[0] * e[0] + d[1] * e[1];
                cross(d, e) == 0 && (0..=d[0] * d[0] + d[1] * d[1]).contains(&along)
            })
        };
        if let Some(q) = points.iter().find(|q| !on_boundary(q)) {
            return Err(PolygonError::NotConvex { point: *q });
        }
        Ok(p)
    }

    /// The vertices, counter-clockwise, starting at the lexicographically smallest.
    pub fn vertices(&self) -> &[LatticePoint] {
        &self.vertices
    }

    /// For each edge from vertex `i` to vertex `i + 1` (cyclically), its lattice points in
    /// order, both ends included.
    pub fn edges(&self) -> Vec<Vec<LatticePoint>> {
        self.edge_pairs()
            .map(|(a, b)| segment_points(a, b))
            .collect()
    }

    /// The boundary lattice points, counter-clockwise from the first vertex, each once.
    pub fn boundary_points(&self) -> Vec<LatticePoint> {
        self.edges()
            .into_iter()
            .flat_map(|mut edge| {
                edge.pop();
                edge
            })
            .collect()
    }

    /// The number `B` of boundary lattice points (sum of the lattice lengths of the edges).
    pub fn boundary_count(&self) -> u64 {
        self.edge_pairs()
            .map(|(a, b)| gcd(b[0] - a[0], b[1] - a[1]) as u64)
            .sum()
    }

    /// Twice the area, `Σ m_i × m_{i+1}` (shoelace formula; positive, vertices being
    /// counter-clockwise).
    pub fn twice_area(&self) -> i64 {
        self.edge_pairs().map(|(a, b)| cross(a, b)).sum()
    }

    /// The number `I` of interior lattice points, from Pick's theorem `2A = 2I + B − 2`.
    pub fn interior_count(&self) -> u64 {
        ((self.twice_area() - self.boundary_count() as i64 + 2) / 2) as u64
    }

    /// The interior lattice points, row by row (increasing m₂, then m₁).
    ///
    /// Cost O(height · vertices + count) time and O(count) memory.
    pub fn interior_points(&self) -> Vec<LatticePoint> {
        let (lo, hi) = self.range_of(|v| v[1]);
        let mut points = Vec::new();
        for y in lo + 1..hi {
            if let Some((x0, x1)) = self.interior_row(y) {
                points.extend((x0..=x1).map(|x| [x, y]));
            }
        }
        points
    }

    /// Checks that the origin is the only interior lattice point.
    ///
    /// # Errors
    /// [`PolygonError::InteriorNotOrigin`] if there is exactly one interior point elsewhere;
    /// [`PolygonError::NotReflexive`] (listing them) if there are none or several;
    /// [`PolygonError::TooManyInteriorPoints`] if more than [`INTERIOR_LIST_LIMIT`].
    pub fn check_reflexive(&self) -> Result<(), PolygonError> {
        match self.interior_count() {
            1 => match self.interior_points()[..] {
                [[0, 0]] => Ok(()),
                [point] => Err(PolygonError::InteriorNotOrigin { point }),
                // Pick's theorem and the row scan are both exact, so they agree; any
                // disagreement would still be reported, not hidden.
                ref other => Err(PolygonError::NotReflexive {
                    interior: other.to_vec(),
                }),
            },
            count if count > INTERIOR_LIST_LIMIT => {
                Err(PolygonError::TooManyInteriorPoints { count })
            }
            _ => Err(PolygonError::NotReflexive {
                interior: self.interior_points(),
            }),
        }
    }

    /// Whether [`Polygon::check_reflexive`] succeeds.
    pub fn is_reflexive(&self) -> bool {
        self.check_reflexive().is_ok()
    }

    /// The lattice width and a primitive dual direction achieving it:
    /// `min over primitive f ∈ Z² of (max f·m − min f·m)` over the polygon.
    ///
    /// # Method
    /// `w(f) = max f − min f` is a norm on R² (the polygon is two-dimensional) taking
    /// positive integer values on nonzero integer `f`. Generalized Gauss reduction: keep a
    /// basis `(b₁, b₂)` of Z² with `w(b₁) ≤ w(b₂)`; replace `b₂` by `r = b₂ − μ b₁` with
    /// `μ ∈ Z` minimizing `w` (a convex function of μ, minimized by bisection on its
    /// differences within `|μ| ≤ 2 w(b₂)/w(b₁)`, outside which `w(r) ≥ |μ| w(b₁) − w(b₂) > w(b₂)`);
    /// if `w(r) < w(b₁)` continue with `(r, b₁)`, else stop. `w(b₁)` strictly decreases
    /// through positive integers, so the loop ends.
    ///
    /// # Why the result is a shortest vector
    /// At the end `w(b₁) ≤ w(b₂) ≤ w(b₂ + μ b₁)` for all `μ ∈ Z` (with `b₂ := r`). Let
    /// `v = α b₁ + β b₂ ≠ 0`. If `β = 0`, `w(v) = |α| w(b₁) ≥ w(b₁)`. If `|β| = 1`,
    /// `w(v) = w(b₂ ± α b₁) ≥ w(b₂) ≥ w(b₁)`. If `|β| ≥ 2`, put `h(t) = w(t b₁ + b₂)`;
    /// for real `t` with nearest integer `n`, `h(t) ≥ h(n) − |t − n| w(b₁) ≥ w(b₂) − w(b₁)/2 ≥ w(b₁)/2`,
    /// so `w(v) = |β| h(α/β) ≥ w(b₁)`. This replaces a search over a finite box of `f`, whose
    /// size would grow with the coordinates.
    ///
    /// The direction returned is the `b₁` found, signed so that its first nonzero
    /// coordinate is positive; other directions may achieve the same width.
    pub fn lattice_width(&self) -> (i64, [i64; 2]) {
        let w = |f: [i128; 2]| self.width_along(f);
        let (mut b1, mut b2) = ([1i128, 0], [0i128, 1]);
        if w(b1) > w(b2) {
            std::mem::swap(&mut b1, &mut b2);
        }
        loop {
            let r = shortest_in_coset(&w, b1, b2);
            if w(r) >= w(b1) {
                break;
            }
            b2 = b1;
            b1 = r;
        }
        let sign = if b1[0] < 0 || (b1[0] == 0 && b1[1] < 0) {
            -1
        } else {
            1
        };
        // w(b₁) ≤ 2·10⁶ and |f·e| ≤ w(f) for the two primitive edge directions bound
        // |b₁| by 8·10¹², so the narrowing conversions are exact.
        (w(b1) as i64, [(sign * b1[0]) as i64, (sign * b1[1]) as i64])
    }

    /// The image `M Δ` (vertices re-hulled, so a matrix of determinant −1 is fine).
    ///
    /// # Panics
    /// If `M` is singular or the image leaves the coordinate bound; use
    /// [`Polygon::try_transform`] to get these as errors.
    pub fn transform(&self, m: &Mat2) -> Polygon {
        self.try_transform(m)
            .unwrap_or_else(|e| panic!("transform by {m:?} failed: {e}"))
    }

    /// The image `M Δ`, as a `Result`.
    ///
    /// # Errors
    /// [`PolygonError::CoordinateTooLarge`] if an image coordinate exceeds
    /// [`MAX_COORDINATE`]; [`PolygonError::Degenerate`] if `det M = 0`.
    pub fn try_transform(&self, m: &Mat2) -> Result<Polygon, PolygonError> {
        let wide = widen(m);
        let image = self
            .vertices
            .iter()
            .map(|&v| narrow(apply(&wide, v)))
            .collect::<Result<Vec<_>, _>>()?;
        Polygon::from_points(&image)
    }

    /// A GL₂(Z) normal form: `normal_form(MΔ) = normal_form(Δ)` for every `M ∈ GL₂(Z)`, and
    /// equal normal forms imply GL₂(Z)-equivalence (the origin is fixed, no translations).
    ///
    /// # Method
    /// For each vertex `v_i ≠ 0` and each direction of travel `s = ±1` with `v_i`, `v_{i+s}`
    /// linearly independent, there is exactly one `M ∈ GL₂(Z)` with `M v_i = (g, 0)`
    /// (`g = gcd(v_i)`, so non-primitive vertices are fine), `det M = s` (the image listing
    /// `M v_i, M v_{i+s}, M v_{i+2s}, …` is then counter-clockwise) and
    /// `M v_{i+s} = (b, d)` with `0 ≤ b < |d|`: the stabilizer of `(1, 0)` is
    /// `[[1, k], [0, ±1]]`, its sign is fixed by `det M = s` and `k` by `0 ≤ b < |d|`. The
    /// normal form is the lexicographically least of these image listings. Replacing Δ by
    /// `NΔ` maps each (vertex, direction) pair to one of `NΔ` with matrix `M N⁻¹`, so the set
    /// of listings, hence its least element, is unchanged. For an origin-centred polygon
    /// every pair qualifies and `d > 0`; in general at least one pair does (else all
    /// vertices would be on one line through the origin).
    ///
    /// The result lists vertices counter-clockwise; its coordinates can exceed
    /// [`MAX_COORDINATE`] (they stay below 2·10¹³: the triangles with vertices 0, `(g,0)`
    /// or 0, `(b,d)`, and any image vertex lie in the image of the hull of Δ and 0).
    pub fn normal_form(&self) -> Vec<LatticePoint> {
        let n = self.vertices.len();
        let mut best: Option<Vec<LatticePoint>> = None;
        for i in 0..n {
            for (step, orientation) in [(1, 1), (n - 1, -1)] {
                let next = self.vertices[(i + step) % n];
                let Some(m) = vertex_frame(self.vertices[i], next, orientation) else {
                    continue;
                };
                let listing: Vec<LatticePoint> = (0..n)
                    .map(|j| apply(&m, self.vertices[(i + j * step) % n]))
                    .map(|p| [p[0] as i64, p[1] as i64]) // exact: see the bound above
                    .collect();
                if best.as_ref().is_none_or(|b| listing < *b) {
                    best = Some(listing);
                }
            }
        }
        best.expect("a two-dimensional polygon has two consecutive independent vertices")
    }

    /// Whether every lattice point (boundary and interior) has `m₂ ∈ {−1, 0, 1}`;
    /// equivalently, every vertex does.
    pub fn is_strip(&self) -> bool {
        self.vertices.iter().all(|v| (-1..=1).contains(&v[1]))
    }

    /// The primitive functionals `f` with `f(Δ) ⊆ [−1, 1]`, i.e. the possible second rows of
    /// a matrix taking Δ to strip form, in increasing lexicographic order.
    ///
    /// # Method
    /// Let `ê₁`, `ê₂` be the primitive directions of the first two edges (not parallel). For
    /// such `f`, `f·ê` is the difference of two values in `[−1, 1]` divided by the lattice
    /// length, so `f·ê₁ = s` and `f·ê₂ = t` with `s, t ∈ {−2, …, 2}`; `(s, t)` determines `f`
    /// (Cramer's rule). Checking the 25 candidates is therefore exhaustive.
    pub fn strip_directions(&self) -> Vec<[i64; 2]> {
        let [a, b, c] = [0, 1, 2].map(|i| self.vertices[i % self.vertices.len()]);
        let (e1, e2) = (
            primitive([b[0] - a[0], b[1] - a[1]]),
            primitive([c[0] - b[0], c[1] - b[1]]),
        );
        let det = cross(e1, e2);
        let mut found = Vec::new();
        for s in -2..=2i64 {
            for t in -2..=2i64 {
                let num = [s * e2[1] - t * e1[1], t * e1[0] - s * e2[0]];
                if num[0] % det != 0 || num[1] % det != 0 {
                    continue;
                }
                let f = [num[0] / det, num[1] / det];
                let (lo, hi) = self.range_of(|v| f[0] * v[0] + f[1] * v[1]);
                if gcd(f[0], f[1]) == 1 && lo >= -1 && hi <= 1 {
                    found.push(f);
                }
            }
        }
        found.sort_unstable();
        found
    }

    /// A matrix `M ∈ GL₂(Z)` and the image `MΔ` in strip form, chosen canonically: the result
    /// depends only on the GL₂(Z) class of Δ.
    ///
    /// # Rule
    /// Among all images `MΔ` in strip form (every `M` whose second row is one of
    /// [`Polygon::strip_directions`]: `M = [[±g + k f], [f]]`, `k ∈ Z`), take the one with the
    /// least key, compared in this order:
    /// 1. symmetric under `m₁ ↦ −m₁` before not symmetric;
    /// 2. least `max |m₁|` over the vertices (small coordinates);
    /// 3. least `Σ |m₁|` over the vertices (centred in m₁);
    /// 4. least vertex list sorted lexicographically (a total order, so the choice is unique).
    ///
    /// Only finitely many shears need checking. For a base image (one `±g`), the shear `k`
    /// moves a top vertex `(a, 1)` to `a + k` and a bottom vertex `(a, −1)` to `a − k`, so
    /// their `|m₁|` are `|k − c|` for the *centres* `c = −a` (top) and `c = a` (bottom). A
    /// symmetric image needs the top (or bottom) vertices symmetric about 0, so its `k` is a
    /// mean of centres; and for `k` beyond all centres, stepping one towards them keeps
    /// `max |m₁|` or lowers it and strictly lowers `Σ |m₁|`. Hence every minimizer has `k`
    /// between the least and greatest centre, and that range is scanned.
    /// The scan costs O(range · vertices), the range being at most the m₁-extent of the top
    /// and bottom rows: a few for reflexive polygons, ≈ 0.4 s in release mode for the worst
    /// case at the coordinate bound (measured).
    ///
    /// # Errors
    /// [`PolygonError::NoStripForm`] (with the lattice width) if no strip form exists;
    /// [`PolygonError::CoordinateTooLarge`] if the chosen image leaves the coordinate bound.
    pub fn strip_form(&self) -> Result<(Mat2, Polygon), PolygonError> {
        let mut best: Option<(StripKey, [[i128; 2]; 2])> = None;
        for f in self.strip_directions() {
            for base in strip_bases(f) {
                self.scan_shears(&base, &mut best);
            }
        }
        let Some((_, m)) = best else {
            return Err(PolygonError::NoStripForm {
                width: self.lattice_width().0,
            });
        };
        let matrix = [narrow_row(m[0])?, narrow_row(m[1])?];
        Ok((matrix, self.try_transform(&matrix)?))
    }

    /// The polar dual `Δ* = {u : ⟨u, m⟩ ≥ −1 for all m ∈ Δ}` of a reflexive polygon: its
    /// vertices are the primitive inner normals of the edges of Δ (each edge of a reflexive
    /// polygon lies at lattice distance 1 from the origin). `B(Δ) + B(Δ*) = 12`.
    ///
    /// # Errors
    /// Those of [`Polygon::check_reflexive`].
    pub fn polar_dual(&self) -> Result<Polygon, PolygonError> {
        self.check_reflexive()?;
        let normals: Vec<LatticePoint> = self
            .edge_pairs()
            .map(|(a, b)| primitive([a[1] - b[1], b[0] - a[0]]))
            .collect();
        Polygon::from_points(&normals)
    }

    fn edge_pairs(&self) -> impl Iterator<Item = (LatticePoint, LatticePoint)> + '_ {
        let n = self.vertices.len();
        (0..n).map(move |i| (self.vertices[i], self.vertices[(i + 1) % n]))
    }

    /// Least and greatest value of a linear functional over the vertices.
    fn range_of(&self, f: impl Fn(LatticePoint) -> i64) -> (i64, i64) {
        let values = self.vertices.iter().map(|&v| f(v));
        let lo = values.clone().min().unwrap_or(0);
        (lo, values.max().unwrap_or(0))
    }

    /// `max f − min f` over the vertices, in `i128` (f may be large mid-reduction).
    fn width_along(&self, f: [i128; 2]) -> i128 {
        let values = self
            .vertices
            .iter()
            .map(|v| f[0] * v[0] as i128 + f[1] * v[1] as i128);
        values.clone().max().unwrap_or(0) - values.min().unwrap_or(0)
    }

    /// The m₁-range of interior lattice points on row `y`, from the strict inequalities
    /// `d × (p − a) > 0` of the counter-clockwise edges `a → a + d`.
    fn interior_row(&self, y: i64) -> Option<(i64, i64)> {
        let (mut lo, mut hi) = (i64::MIN, i64::MAX);
        for (a, b) in self.edge_pairs() {
            let d = [b[0] - a[0], b[1] - a[1]];
            // d₀(y − a₁) − d₁(x − a₀) > 0, i.e. d₁ x < rhs := d₁ a₀ + d₀ (y − a₁): for d₁ > 0
            // x ≤ ⌊(rhs − 1)/d₁⌋, for d₁ < 0 x ≥ ⌈(1 − rhs)/|d₁|⌉ = −⌊(rhs − 1)/|d₁|⌋.
            let rhs = d[1] * a[0] + d[0] * (y - a[1]);
            match d[1].signum() {
                0 if d[0] * (y - a[1]) <= 0 => return None,
                0 => {}
                1 => hi = hi.min((rhs - 1).div_euclid(d[1])),
                _ => lo = lo.max(-((rhs - 1).div_euclid(-d[1]))),
            }
        }
        (lo <= hi).then_some((lo, hi))
    }

    /// Scans the shears of one base strip image, keeping the best candidate in `best`.
    fn scan_shears(&self, base: &[[i128; 2]; 2], best: &mut Option<(StripKey, [[i128; 2]; 2])>) {
        let image: Vec<[i128; 2]> = self.vertices.iter().map(|&v| apply(base, v)).collect();
        // A shear by k sends a top vertex (a, 1) to a + k and a bottom one (a, −1) to a − k,
        // so |m₁| there is |k − c| for c in `centres`; outside their hull every such
        // distance, hence keys 2 and 3, strictly grows, while key 1 is unchanged or lost.
        let centres = image.iter().filter(|p| p[1] != 0).map(|p| -p[0] * p[1]);
        let (k_lo, k_hi) = (
            centres.clone().min().unwrap_or(0),
            centres.max().unwrap_or(0),
        );
        for k in k_lo..=k_hi {
            let m = [
                [base[0][0] + k * base[1][0], base[0][1] + k * base[1][1]],
                base[1],
            ];
            let key = StripKey::new(image.iter().map(|p| [p[0] + k * p[1], p[1]]).collect());
            if best.as_ref().is_none_or(|(b, _)| key < *b) {
                *best = Some((key, m));
            }
        }
    }
}

/// The comparison key of a candidate strip form (see [`Polygon::strip_form`]).
#[derive(Debug, PartialEq, Eq, PartialOrd, Ord)]
struct StripKey {
    not_symmetric: bool,
    max_abs: i128,
    sum_abs: i128,
    sorted: Vec<[i128; 2]>,
}

impl StripKey {
    fn new(mut vertices: Vec<[i128; 2]>) -> Self {
        vertices.sort_unstable();
        let mut mirror: Vec<[i128; 2]> = vertices.iter().map(|p| [-p[0], p[1]]).collect();
        mirror.sort_unstable();
        StripKey {
            not_symmetric: mirror != vertices,
            max_abs: vertices.iter().map(|p| p[0].abs()).max().unwrap_or(0),
            sum_abs: vertices.iter().map(|p| p[0].abs()).sum(),
            sorted: vertices,
        }
    }
}

/// The two matrices `[[±g], [f]]` with `det [[g], [f]] = 1`.
fn strip_bases(f: [i64; 2]) -> [[[i128; 2]; 2]; 2] {
    // g₁ f₂ − g₂ f₁ = 1 from x f₂ + y f₁ = 1.
    let (_, x, y) = ext_gcd(f[1] as i128, f[0] as i128);
    let f = [f[0] as i128, f[1] as i128];
    [[[x, -y], f], [[-x, y], f]]
}

/// The unique frame of [`Polygon::normal_form`] for the vertex `v`, followed by `next`, with
/// `det M = orientation`; `None` if `v`, `next` are linearly dependent.
fn vertex_frame(v: LatticePoint, next: LatticePoint, orientation: i128) -> Option<[[i128; 2]; 2]> {
    let g = gcd(v[0], v[1]) as i128;
    if g == 0 {
        return None;
    }
    let (p, q) = (v[0] as i128 / g, v[1] as i128 / g);
    let (_, x, y) = ext_gcd(p, q);
    let base = [[x, y], [-q, p]]; // det 1, sends v/g to (1, 0)
    let [b0, d0] = apply(&base, next);
    if d0 == 0 {
        return None;
    }
    let k = (b0.rem_euclid(d0.abs()) - b0) / d0;
    let row0 = [base[0][0] + k * base[1][0], base[0][1] + k * base[1][1]];
    Some([row0, [orientation * base[1][0], orientation * base[1][1]]])
}

/// Convex hull of sorted distinct points, counter-clockwise from the first, without collinear
/// points; fewer than three points back if the input is degenerate.
fn convex_hull(sorted: &[LatticePoint]) -> Vec<LatticePoint> {
    if sorted.len() < 3 {
        return sorted.to_vec();
    }
    let lower = half_hull(sorted.iter());
    let upper = half_hull(sorted.iter().rev());
    let mut hull: Vec<LatticePoint> = lower[..lower.len() - 1].to_vec();
    hull.extend_from_slice(&upper[..upper.len() - 1]);
    hull
}

/// One monotone chain, keeping only strict left turns.
fn half_hull<'a>(points: impl Iterator<Item = &'a LatticePoint>) -> Vec<LatticePoint> {
    let mut chain: Vec<LatticePoint> = Vec::new();
    for &p in points {
        while let [.., o, a] = chain[..] {
            if cross([a[0] - o[0], a[1] - o[1]], [p[0] - o[0], p[1] - o[1]]) > 0 {
                break;
            }
            chain.pop();
        }
        chain.push(p);
    }
    chain
}

/// The lattice points of the segment from `a` to `b`, in order, both ends included.
fn segment_points(a: LatticePoint, b: LatticePoint) -> Vec<LatticePoint> {
    let g = gcd(b[0] - a[0], b[1] - a[1]);
    let step = primitive([b[0] - a[0], b[1] - a[1]]);
    (0..=g)
        .map(|k| [a[0] + k * step[0], a[1] + k * step[1]])
        .collect()
}

/// `r = b₂ − μ b₁` with `μ ∈ Z` minimizing the convex function `w(b₂ − μ b₁)`.
fn shortest_in_coset(w: &impl Fn([i128; 2]) -> i128, b1: [i128; 2], b2: [i128; 2]) -> [i128; 2] {
    let at = |mu: i128| [b2[0] - mu * b1[0], b2[1] - mu * b1[1]];
    let bound = 2 * w(b2) / w(b1) + 1;
    let (mut lo, mut hi) = (-bound, bound);
    while lo < hi {
        let mid = lo + (hi - lo).div_euclid(2);
        if w(at(mid + 1)) >= w(at(mid)) {
            hi = mid;
        } else {
            lo = mid + 1;
        }
    }
    at(lo)
}

fn cross(a: LatticePoint, b: LatticePoint) -> i64 {
    a[0] * b[1] - a[1] * b[0]
}

fn gcd(a: i64, b: i64) -> i64 {
    let (mut a, mut b) = (a.abs(), b.abs());
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a
}

/// The primitive vector in the direction of a nonzero `v`.
fn primitive(v: LatticePoint) -> LatticePoint {
    let g = gcd(v[0], v[1]).max(1);
    [v[0] / g, v[1] / g]
}

/// `(g, x, y)` with `a x + b y = g = gcd(a, b) ≥ 0`.
fn ext_gcd(a: i128, b: i128) -> (i128, i128, i128) {
    let (mut r0, mut r1, mut x0, mut x1, mut y0, mut y1) = (a, b, 1, 0, 0, 1);
    while r1 != 0 {
        let q = r0.div_euclid(r1);
        (r0, r1) = (r1, r0 - q * r1);
        (x0, x1) = (x1, x0 - q * x1);
        (y0, y1) = (y1, y0 - q * y1);
    }
    if r0 < 0 {
        (-r0, -x0, -y0)
    } else {
        (r0, x0, y0)
    }
}

fn widen(m: &Mat2) -> [[i128; 2]; 2] {
    m.map(|row| row.map(i128::from))
}

fn apply(m: &[[i128; 2]; 2], v: LatticePoint) -> [i128; 2] {
    let (x, y) = (v[0] as i128, v[1] as i128);
    [m[0][0] * x + m[0][1] * y, m[1][0] * x + m[1][1] * y]
}

fn within_bound(c: i64) -> bool {
    c.checked_abs().is_some_and(|a| a <= MAX_COORDINATE)
}

fn too_large(point: [i128; 2]) -> PolygonError {
    PolygonError::CoordinateTooLarge {
        point,
        bound: MAX_COORDINATE,
    }
}

/// A computed point, back in `i64` if within the coordinate bound.
fn narrow(p: [i128; 2]) -> Result<LatticePoint, PolygonError> {
    let bound = MAX_COORDINATE as i128;
    if p[0].abs() > bound || p[1].abs() > bound {
        return Err(too_large(p));
    }
    Ok([p[0] as i64, p[1] as i64])
}

/// A matrix row back in `i64`; reported with the coordinate-bound error if it does not fit.
fn narrow_row(row: [i128; 2]) -> Result<[i64; 2], PolygonError> {
    match (i64::try_from(row[0]), i64::try_from(row[1])) {
        (Ok(a), Ok(b)) => Ok([a, b]),
        _ => Err(too_large(row)),
    }
}
