//! Tests of `regwave::lattice::polygon`: hull, lattice points, reflexivity, lattice width, normal form,
//! strip form, parsing, and every error path.

use regwave::input::vertices::parse_vertices;
use regwave::lattice::catalogue;
use regwave::lattice::polygon::{LatticePoint, Mat2, Polygon, PolygonError, MAX_COORDINATE};

/// xorshift64*: a small deterministic generator, so failures reproduce.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_f491_4f6c_dd1d)
    }
    fn below(&mut self, n: u64) -> u64 {
        self.next() % n
    }
    fn range(&mut self, lo: i64, hi: i64) -> i64 {
        lo + self.below((hi - lo + 1) as u64) as i64
    }
}

fn mul(a: &Mat2, b: &Mat2) -> Mat2 {
    let e = |i: usize, j: usize| a[i][0] * b[0][j] + a[i][1] * b[1][j];
    [[e(0, 0), e(0, 1)], [e(1, 0), e(1, 1)]]
}

fn det(m: &Mat2) -> i64 {
    m[0][0] * m[1][1] - m[0][1] * m[1][0]
}

/// A random element of GL₂(Z) as a word in the generators S = [[0,−1],[1,0]],
/// T^{±1} = [[1,±1],[0,1]] and the reflection R = [[1,0],[0,−1]] (they generate GL₂(Z):
/// common knowledge), with entries at most `max_entry`.
fn random_gl2(rng: &mut Rng, max_entry: i64) -> Mat2 {
    const GENERATORS: [Mat2; 4] = [
        [[0, -1], [1, 0]],
        [[1, 1], [0, 1]],
        [[1, -1], [0, 1]],
        [[1, 0], [0, -1]],
    ];
    loop {
        let mut m: Mat2 = [[1, 0], [0, 1]];
        for _ in 0..rng.range(1, 14) {
            m = mul(&m, &GENERATORS[rng.below(4) as usize]);
        }
        if m.iter().flatten().all(|x| x.abs() <= max_entry) {
            return m;
        }
    }
}

fn random_points(rng: &mut Rng, count: usize, radius: i64) -> Vec<LatticePoint> {
    (0..count)
        .map(|_| [rng.range(-radius, radius), rng.range(-radius, radius)])
        .collect()
}

/// The polygons among `trials` random point sets of 3..=`max_points` points in [−r, r]².
fn random_polygons(seed: u64, trials: usize, max_points: i64, radius: i64) -> Vec<Polygon> {
    let mut rng = Rng(seed);
    (0..trials)
        .filter_map(|_| {
            let count = rng.range(3, max_points) as usize;
            Polygon::from_points(&random_points(&mut rng, count, radius)).ok()
        })
        .collect()
}

fn sorted(mut v: Vec<LatticePoint>) -> Vec<LatticePoint> {
    v.sort_unstable();
    v
}

/// Strictly inside, by the sign of every edge cross product (independent of the library).
fn strictly_inside(vertices: &[LatticePoint], p: LatticePoint) -> bool {
    let n = vertices.len();
    (0..n).all(|i| {
        let (a, b) = (vertices[i], vertices[(i + 1) % n]);
        (b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0]) > 0
    })
}

/// Interior lattice points by testing every point of the bounding box.
fn naive_interior(p: &Polygon) -> Vec<LatticePoint> {
    let v = p.vertices();
    let (x0, x1) = (
        v.iter().map(|q| q[0]).min().unwrap(),
        v.iter().map(|q| q[0]).max().unwrap(),
    );
    let (y0, y1) = (
        v.iter().map(|q| q[1]).min().unwrap(),
        v.iter().map(|q| q[1]).max().unwrap(),
    );
    let mut out = Vec::new();
    for y in y0..=y1 {
        for x in x0..=x1 {
            if strictly_inside(v, [x, y]) {
                out.push([x, y]);
            }
        }
    }
    out
}

fn hexagon() -> Polygon {
    Polygon::from_points(&[[1, 0], [1, 1], [0, 1], [-1, 0], [-1, -1], [0, -1]]).unwrap()
}

#[test]
fn hull_from_messy_input_equals_clean() {
    let clean = hexagon();
    let mut messy = vec![
        [0, 0],
        [1, 1],
        [1, 0],
        [1, 0],
        [-1, -1],
        [0, 1],
        [0, -1],
        [-1, 0],
        [1, 1],
        [0, 0],
        [-1, 0],
    ];
    let mut rng = Rng(0x9e37_79b9_7f4a_7c15);
    for _ in 0..20 {
        // shuffle (Fisher–Yates) and compare
        for i in (1..messy.len()).rev() {
            messy.swap(i, rng.below(i as u64 + 1) as usize);
        }
        assert_eq!(Polygon::from_points(&messy).unwrap(), clean);
    }
    // Collinear boundary points (edge midpoints of the square F0*) are dropped as vertices.
    let square = Polygon::from_points(&[
        [1, 0],
        [-1, -1],
        [0, 1],
        [1, 1],
        [0, 0],
        [-1, 1],
        [1, -1],
        [0, -1],
        [-1, 0],
    ]);
    assert_eq!(
        square.unwrap().vertices(),
        &[[-1, -1], [1, -1], [1, 1], [-1, 1]]
    );
}

#[test]
fn hull_is_counter_clockwise_from_least_vertex_without_collinear_points() {
    for p in random_polygons(7, 500, 12, 4) {
        let v = p.vertices();
        let n = v.len();
        assert_eq!(
            v[0],
            *v.iter().min().unwrap(),
            "starts at the lexicographically least vertex"
        );
        for i in 0..n {
            let (a, b, c) = (v[i], v[(i + 1) % n], v[(i + 2) % n]);
            let turn = (b[0] - a[0]) * (c[1] - b[1]) - (b[1] - a[1]) * (c[0] - b[0]);
            assert!(turn > 0, "strict left turn at {b:?} in {v:?}");
        }
    }
}

#[test]
fn lattice_points_agree_with_pick_and_naive_count() {
    // Pick's theorem 2A = 2I + B − 2 (common knowledge) against two independent counts.
    for p in random_polygons(11, 400, 9, 6) {
        let interior = p.interior_points();
        assert_eq!(
            interior,
            naive_interior(&p),
            "row scan vs box scan for {:?}",
            p.vertices()
        );
        assert_eq!(
            interior.len() as u64,
            p.interior_count(),
            "Pick for {:?}",
            p.vertices()
        );
        let boundary = p.boundary_points();
        assert_eq!(boundary.len() as u64, p.boundary_count());
        assert_eq!(
            sorted(boundary.clone())
                .windows(2)
                .filter(|w| w[0] == w[1])
                .count(),
            0
        );
        assert!(boundary.iter().all(|&q| !strictly_inside(p.vertices(), q)));
    }
}

#[test]
fn edges_are_vertex_to_vertex_with_all_lattice_points() {
    let p = Polygon::from_points(&[[-1, -1], [2, -1], [-1, 2]]).unwrap();
    assert_eq!(
        p.edges(),
        vec![
            vec![[-1, -1], [0, -1], [1, -1], [2, -1]],
            vec![[2, -1], [1, 0], [0, 1], [-1, 2]],
            vec![[-1, 2], [-1, 1], [-1, 0], [-1, -1]],
        ]
    );
    assert_eq!(p.boundary_points().len(), 9);
    assert_eq!(p.interior_points(), vec![[0, 0]]);
    assert_eq!(p.twice_area(), 9);
}

/// Lattice width by exhaustive search over a box of functionals that provably contains every
/// f with w(f) ≤ w₀ = min(w(1,0), w(0,1)): with ê₁, ê₂ the primitive directions of the first
/// two edges, |f·ê₁|, |f·ê₂| ≤ w₀, and Cramer's rule bounds |f₁|, |f₂|.
fn brute_width(p: &Polygon) -> i64 {
    let v = p.vertices();
    let w = |f: [i64; 2]| {
        let vals = v.iter().map(|q| f[0] * q[0] + f[1] * q[1]);
        vals.clone().max().unwrap() - vals.min().unwrap()
    };
    let prim = |a: LatticePoint, b: LatticePoint| {
        let d = [b[0] - a[0], b[1] - a[1]];
        let g = gcd(d[0], d[1]);
        [d[0] / g, d[1] / g]
    };
    let (e1, e2) = (prim(v[0], v[1]), prim(v[1], v[2]));
    let dt = (e1[0] * e2[1] - e1[1] * e2[0]).abs();
    let w0 = w([1, 0]).min(w([0, 1]));
    let r1 = w0 * (e1[1].abs() + e2[1].abs()) / dt;
    let r2 = w0 * (e1[0].abs() + e2[0].abs()) / dt;
    let mut best = w0;
    for f1 in -r1..=r1 {
        for f2 in -r2..=r2 {
            if (f1, f2) != (0, 0) {
                best = best.min(w([f1, f2]));
            }
        }
    }
    best
}

fn gcd(a: i64, b: i64) -> i64 {
    if b == 0 {
        a.abs()
    } else {
        gcd(b, a % b)
    }
}

#[test]
fn lattice_width_matches_exhaustive_search() {
    for p in random_polygons(13, 300, 8, 7) {
        let (width, f) = p.lattice_width();
        let vals = p.vertices().iter().map(|q| f[0] * q[0] + f[1] * q[1]);
        assert_eq!(
            vals.clone().max().unwrap() - vals.min().unwrap(),
            width,
            "direction achieves it"
        );
        assert_eq!(gcd(f[0], f[1]), 1, "primitive direction");
        assert_eq!(width, brute_width(&p), "for {:?}", p.vertices());
    }
}

#[test]
fn lattice_width_of_known_polygons_and_of_large_images() {
    // Width 3 for the 9-point triangle, 2 for the others (docs/MATHEMATICS.md §1).
    let big = Polygon::from_points(&[[2, -1], [-1, 2], [-1, -1]]).unwrap();
    assert_eq!(big.lattice_width().0, 3);
    assert_eq!(hexagon().lattice_width().0, 2);
    // A GL₂(Z) image with coordinates near the bound keeps width 2 (reduction, not a box search).
    let m: Mat2 = [[121_393, 75_025], [196_418, 121_393]]; // Fibonacci entries, det −1
    let image = hexagon().try_transform(&m).unwrap();
    assert!(image.vertices().iter().flatten().any(|c| c.abs() > 300_000));
    assert_eq!(image.lattice_width().0, 2);
    assert_eq!(image.interior_points(), vec![[0, 0]]);
}

#[test]
fn transform_acts_on_column_vectors() {
    let p = Polygon::from_points(&[[1, 0], [0, 1], [-1, -1]]).unwrap();
    let shear: Mat2 = [[1, 2], [0, 1]]; // (m₁, m₂) ↦ (m₁ + 2 m₂, m₂)
    assert_eq!(
        sorted(p.transform(&shear).vertices().to_vec()),
        vec![[-3, -1], [1, 0], [2, 1]]
    );
    let flip: Mat2 = [[1, 0], [0, -1]];
    assert_eq!(p.transform(&flip).vertices(), &[[-1, 1], [0, -1], [1, 0]]);
}

#[test]
fn normal_form_is_invariant_under_random_gl2() {
    let mut rng = Rng(17);
    let mut polygons: Vec<Polygon> = catalogue::all().iter().map(|f| f.polygon()).collect();
    // Also non-reflexive ones, with non-primitive vertices, and ones not around the origin.
    polygons.push(Polygon::from_points(&[[2, 0], [0, 2], [-2, -2]]).unwrap());
    polygons.push(Polygon::from_points(&[[3, 1], [-2, 4], [-1, -3], [2, -2]]).unwrap());
    polygons.push(Polygon::from_points(&[[0, 0], [3, 1], [1, 2]]).unwrap());
    polygons.push(Polygon::from_points(&[[4, 4], [6, 5], [5, 7]]).unwrap());
    for p in &polygons {
        let form = p.normal_form();
        for _ in 0..40 {
            let m = random_gl2(&mut rng, 40);
            assert_eq!(
                p.transform(&m).normal_form(),
                form,
                "{:?} under {m:?}",
                p.vertices()
            );
        }
    }
}

#[test]
fn normal_form_separates_inequivalent_polygons() {
    let p2 = Polygon::from_points(&[[1, 0], [0, 1], [-1, -1]]).unwrap();
    let shifted = Polygon::from_points(&[[2, 0], [1, 1], [0, -1]]).unwrap();
    let doubled = Polygon::from_points(&[[2, 0], [0, 2], [-2, -2]]).unwrap();
    assert_ne!(p2.normal_form(), shifted.normal_form());
    assert_ne!(p2.normal_form(), doubled.normal_form());
    // Reflexive normal forms start at (1, 0) with the next vertex (b, d), 0 ≤ b < d.
    let form = hexagon().normal_form();
    assert_eq!(form[0], [1, 0]);
    assert!(0 <= form[1][0] && form[1][0] < form[1][1]);
}

#[test]
fn strip_form_of_random_images_lands_in_canonical_strip_form() {
    let mut rng = Rng(19);
    for family in catalogue::all().iter().filter(|f| f.applicable) {
        let canonical = family.polygon();
        for _ in 0..25 {
            let image = canonical.transform(&random_gl2(&mut rng, 25));
            let (m, strip) = image.strip_form().unwrap();
            assert_eq!(det(&m).abs(), 1);
            assert_eq!(
                image.transform(&m),
                strip,
                "returned matrix maps to the returned form"
            );
            assert!(strip.is_strip());
            assert_eq!(catalogue::identify(&strip).map(|f| f.id), Some(family.id));
            assert_eq!(strip, canonical, "the rule depends only on the class");
        }
    }
}

#[test]
fn strip_directions_are_exactly_the_functionals_with_values_in_minus_one_to_one() {
    // Exhaustive over |f_i| ≤ 6, which contains all such f for these small polygons.
    for family in catalogue::all() {
        let p = family.polygon();
        let mut expected = Vec::new();
        for f1 in -6..=6i64 {
            for f2 in -6..=6i64 {
                let vals: Vec<i64> = p.vertices().iter().map(|q| f1 * q[0] + f2 * q[1]).collect();
                if gcd(f1, f2) == 1 && vals.iter().all(|v| (-1..=1).contains(v)) {
                    expected.push([f1, f2]);
                }
            }
        }
        assert_eq!(p.strip_directions(), expected, "{}", family.id);
    }
}

#[test]
fn polar_dual_is_an_involution() {
    for family in catalogue::all() {
        let p = family.polygon();
        assert_eq!(
            p.polar_dual().unwrap().polar_dual().unwrap(),
            p,
            "{}",
            family.id
        );
    }
}

#[test]
fn parse_accepts_whitespace_and_signs() {
    let expected = vec![[1, 0], [0, 1], [-1, -1]];
    assert_eq!(parse_vertices("(1,0),(0,1),(-1,-1)").unwrap(), expected);
    assert_eq!(
        parse_vertices("  ( 1 , 0 ) ,\n(0,+1),\t(−1, -1) ").unwrap(),
        expected
    );
}

// ---- bad inputs: each returns an error, none panics ----

#[test]
fn collinear_points_are_degenerate() {
    let err = Polygon::from_points(&[[0, 0], [2, 2], [1, 1], [-3, -3]]).unwrap_err();
    assert_eq!(
        err,
        PolygonError::Degenerate {
            points: vec![[-3, -3], [0, 0], [1, 1], [2, 2]]
        }
    );
}

#[test]
fn too_few_points_are_degenerate() {
    for points in [
        vec![],
        vec![[1, 2]],
        vec![[1, 2], [3, 4]],
        vec![[1, 2], [1, 2], [3, 4], [1, 2]],
    ] {
        let err = Polygon::from_points(&points).unwrap_err();
        assert!(
            matches!(err, PolygonError::Degenerate { .. }),
            "{points:?}: {err}"
        );
    }
}

#[test]
fn non_convex_vertex_lists_are_hulled() {
    // A "star" listing: the hull is taken, no error.
    let p = Polygon::from_points(&[[2, 0], [0, 0], [0, 2], [1, 1], [-2, 0], [0, -2]]).unwrap();
    assert_eq!(p.vertices(), &[[-2, 0], [0, -2], [2, 0], [0, 2]]);
}

#[test]
fn two_interior_points_is_not_reflexive() {
    let p = Polygon::from_points(&[[-1, -1], [2, -1], [2, 1], [-1, 1]]).unwrap();
    assert_eq!(
        p.check_reflexive(),
        Err(PolygonError::NotReflexive {
            interior: vec![[0, 0], [1, 0]]
        })
    );
    let empty = Polygon::from_points(&[[0, 0], [1, 0], [0, 1]]).unwrap();
    assert_eq!(
        empty.check_reflexive(),
        Err(PolygonError::NotReflexive { interior: vec![] })
    );
}

#[test]
fn interior_point_off_origin_is_reported() {
    let p = Polygon::from_points(&[[3, 2], [2, 3], [1, 1]]).unwrap(); // P2 translated by (2, 2)
    assert_eq!(
        p.check_reflexive(),
        Err(PolygonError::InteriorNotOrigin { point: [2, 2] })
    );
    assert!(!p.is_reflexive());
}

#[test]
fn many_interior_points_are_counted_not_listed() {
    let p = Polygon::from_points(&[[-500, -500], [500, -500], [500, 500], [-500, 500]]).unwrap();
    assert_eq!(
        p.check_reflexive(),
        Err(PolygonError::TooManyInteriorPoints { count: 999 * 999 })
    );
}

#[test]
fn width_three_triangle_has_no_strip_form() {
    let p = Polygon::from_points(&[[2, -1], [-1, 2], [-1, -1]]).unwrap();
    assert!(p.is_reflexive());
    assert_eq!(p.strip_form(), Err(PolygonError::NoStripForm { width: 3 }));
    assert!(p.strip_directions().is_empty());
}

#[test]
fn malformed_vertex_text_is_a_parse_error() {
    let cases = [
        (
            "(1,0),(0,",
            "vertex 2: expected the second coordinate, found the end of the text",
        ),
        (
            "(a,b)",
            "vertex 1: the first coordinate `a` at character 2 is not an integer",
        ),
        ("", "no vertices given"),
        ("   ", "no vertices given"),
        (
            "(1,0,2)",
            "vertex 1: expected `)` after the second coordinate",
        ),
        (
            "(1,0)(0,1)",
            "after vertex 1: expected `,` or the end of the text, found `(` at character 6",
        ),
        (
            "(1,0),",
            "vertex 2: expected `(`, found the end of the text",
        ),
        ("1,0", "vertex 1: expected `(`, found `1` at character 1"),
        ("(99999999999999999999,0)", "is out of range"),
        (
            "(1;0)",
            "the first coordinate `1;0` at character 2 is not an integer",
        ),
    ];
    for (text, reason_start) in cases {
        match parse_vertices(text) {
            Err(PolygonError::Parse { text: t, reason }) => {
                assert_eq!(t, text);
                assert!(reason.contains(reason_start), "{text:?}: {reason}");
            }
            other => panic!("{text:?} gave {other:?}"),
        }
    }
}

#[test]
fn oversized_coordinates_are_rejected() {
    for bad in [MAX_COORDINATE + 1, -MAX_COORDINATE - 1, i64::MIN, i64::MAX] {
        let err = Polygon::from_points(&[[0, 0], [1, 0], [0, bad]]).unwrap_err();
        assert!(
            matches!(err, PolygonError::CoordinateTooLarge { .. }),
            "{err}"
        );
    }
    let p = hexagon();
    let huge: Mat2 = [[i64::MAX, 1], [1, 0]];
    assert!(matches!(
        p.try_transform(&huge),
        Err(PolygonError::CoordinateTooLarge { .. })
    ));
    let singular: Mat2 = [[1, 2], [2, 4]];
    assert!(matches!(
        p.try_transform(&singular),
        Err(PolygonError::Degenerate { .. })
    ));
}

#[test]
fn random_text_and_point_sets_never_panic() {
    let mut rng = Rng(23);
    let alphabet: Vec<char> = "(),-−+0123456789 a;\n".chars().collect();
    for _ in 0..5000 {
        let len = rng.below(24) as usize;
        let text: String = (0..len)
            .map(|_| alphabet[rng.below(alphabet.len() as u64) as usize])
            .collect();
        if let Ok(points) = parse_vertices(&text) {
            let _ = Polygon::from_points(&points);
        }
    }
    for _ in 0..2000 {
        let count = rng.below(8) as usize;
        let points = random_points(&mut rng, count, 3);
        if let Ok(p) = Polygon::from_points(&points) {
            let _ = (
                p.check_reflexive(),
                p.strip_form(),
                p.lattice_width(),
                p.normal_form(),
                p.polar_dual(),
            );
        }
    }
}
