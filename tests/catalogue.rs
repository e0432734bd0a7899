//! Tests of `regwave::lattice::catalogue`: the table is re-derived by brute force and checked entry by
//! entry (classes, strip forms, widths, duals, look-up).

use regwave::lattice::catalogue::{self, CatalogueError, Family};
use regwave::lattice::polygon::{LatticePoint, Polygon};
use std::collections::{BTreeMap, HashSet};
use std::sync::OnceLock;

/// Strictly inside the counter-clockwise polygon `v`, by edge cross products.
fn strictly_inside(v: &[LatticePoint], p: LatticePoint) -> bool {
    let n = v.len();
    (0..n).all(|i| {
        let (a, b) = (v[i], v[(i + 1) % n]);
        (b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0]) > 0
    })
}

/// Reflexive by direct search: the origin is strictly inside and no other lattice point of
/// the bounding box is (independent of the library's row scan and Pick count).
fn naive_reflexive(p: &Polygon) -> bool {
    let v = p.vertices();
    let lo = v.iter().flatten().min().copied().unwrap_or(0);
    let hi = v.iter().flatten().max().copied().unwrap_or(0);
    (lo..=hi)
        .flat_map(|x| (lo..=hi).map(move |y| [x, y]))
        .filter(|&q| strictly_inside(v, q))
        .eq(std::iter::once([0, 0]))
}

fn sorted(mut v: Vec<LatticePoint>) -> Vec<LatticePoint> {
    v.sort_unstable();
    v
}

/// GL₂(Z)-equivalence by direct search (independent of `normal_form`): some M ∈ GL₂(Z) maps
/// the first two vertices of `p` to two adjacent vertices of `q` (either order) and the
/// whole vertex set onto that of `q`.
fn naive_equivalent(p: &Polygon, q: &Polygon) -> bool {
    let (v, w) = (p.vertices(), q.vertices());
    if v.len() != w.len() {
        return false;
    }
    let (a, b) = (v[0], v[1]);
    let d = a[0] * b[1] - a[1] * b[0];
    if d == 0 {
        return false; // not reached for origin-centred polygons
    }
    let target = sorted(w.to_vec());
    let n = w.len();
    (0..n)
        .flat_map(|i| [(w[i], w[(i + 1) % n]), (w[(i + 1) % n], w[i])])
        .any(|(x, y)| {
            // M = [x y] · [a b]⁻¹, with [a b]⁻¹ = [[b₁, −b₀], [−a₁, a₀]] / d.
            let num = [
                [x[0] * b[1] - y[0] * a[1], -x[0] * b[0] + y[0] * a[0]],
                [x[1] * b[1] - y[1] * a[1], -x[1] * b[0] + y[1] * a[0]],
            ];
            if num.iter().flatten().any(|e| e % d != 0) {
                return false;
            }
            let m = num.map(|row| row.map(|e| e / d));
            let det = m[0][0] * m[1][1] - m[0][1] * m[1][0];
            let image = v.iter().map(|c| {
                [
                    m[0][0] * c[0] + m[0][1] * c[1],
                    m[1][0] * c[0] + m[1][1] * c[1],
                ]
            });
            det.abs() == 1 && sorted(image.collect()) == target
        })
}

/// Every convex lattice polygon with 3 to 6 vertices in the box [−r, r]² whose only interior
/// lattice point is the origin, grouped by normal form (class representative: first found).
/// At most 6 vertices suffice: a convex lattice polygon with exactly one interior lattice
/// point has at most 6 vertices (common knowledge of the trade).
struct Enumeration {
    classes: BTreeMap<Vec<LatticePoint>, Polygon>,
    polygons: Vec<Polygon>,
}

fn enumerate_reflexive(r: i64) -> Enumeration {
    let points: Vec<LatticePoint> = (-r..=r)
        .flat_map(|x| (-r..=r).map(move |y| [x, y]))
        .collect();
    let mut seen = HashSet::new();
    let mut found = Enumeration {
        classes: BTreeMap::new(),
        polygons: Vec::new(),
    };
    let mut chosen = Vec::with_capacity(6);
    subsets(&points, 0, &mut chosen, &mut |subset| {
        let Ok(p) = Polygon::from_points(subset) else {
            return;
        };
        // Count each polygon once, from its own vertex set.
        if p.vertices().len() == subset.len() && naive_reflexive(&p) && seen.insert(p.clone()) {
            found
                .classes
                .entry(p.normal_form())
                .or_insert_with(|| p.clone());
            found.polygons.push(p);
        }
    });
    found
}

/// Calls `visit` on every subset of `points[start..]` of size 3..=6 added to `chosen`.
fn subsets(
    points: &[LatticePoint],
    start: usize,
    chosen: &mut Vec<LatticePoint>,
    visit: &mut dyn FnMut(&[LatticePoint]),
) {
    if chosen.len() >= 3 {
        visit(chosen);
    }
    if chosen.len() == 6 {
        return;
    }
    for i in start..points.len() {
        chosen.push(points[i]);
        subsets(points, i + 1, chosen, visit);
        chosen.pop();
    }
}

fn small_box() -> &'static Enumeration {
    static CELL: OnceLock<Enumeration> = OnceLock::new();
    CELL.get_or_init(|| enumerate_reflexive(2))
}

fn assert_sixteen_classes(found: &Enumeration) {
    // 16 classes (source: "Lattice polygons and the number 12", Amer. Math. Monthly 107 (2000)).
    assert_eq!(found.classes.len(), 16);
    let mut counts: Vec<u64> = found.classes.values().map(|p| p.boundary_count()).collect();
    counts.sort_unstable();
    // Boundary-point counts of the 16 (same source).
    assert_eq!(counts, [3, 4, 4, 4, 5, 5, 6, 6, 6, 6, 7, 7, 8, 8, 8, 9]);
}

#[test]
fn brute_force_finds_sixteen_reflexive_classes() {
    assert_sixteen_classes(small_box());
}

/// Same re-derivation in [−3, 3]² (about 17 million vertex sets; tens of seconds in release).
/// Run with: `cargo test --release --test catalogue -- --ignored bigger_box`
#[test]
#[ignore]
fn brute_force_in_bigger_box_finds_the_same_sixteen() {
    let found = enumerate_reflexive(3);
    assert_sixteen_classes(&found);
    let small: Vec<&Vec<LatticePoint>> = small_box().classes.keys().collect();
    assert_eq!(found.classes.keys().collect::<Vec<_>>(), small);
}

#[test]
fn normal_form_classes_agree_with_direct_equivalence() {
    let found = small_box();
    for p in &found.polygons {
        let rep = &found.classes[&p.normal_form()];
        assert!(
            naive_equivalent(p, rep),
            "{:?} vs {:?}",
            p.vertices(),
            rep.vertices()
        );
    }
    let reps: Vec<&Polygon> = found.classes.values().collect();
    for (i, p) in reps.iter().enumerate() {
        for q in &reps[i + 1..] {
            assert!(
                !naive_equivalent(p, q),
                "{:?} ~ {:?}",
                p.vertices(),
                q.vertices()
            );
        }
    }
}

#[test]
fn table_equals_the_enumerated_classes() {
    let table: Vec<Vec<LatticePoint>> = {
        let mut forms: Vec<_> = catalogue::all()
            .iter()
            .map(|f| f.polygon().normal_form())
            .collect();
        forms.sort_unstable();
        forms
    };
    let enumerated: Vec<Vec<LatticePoint>> = small_box().classes.keys().cloned().collect();
    assert_eq!(table, enumerated);
    for family in catalogue::all() {
        let rep = &small_box().classes[&family.polygon().normal_form()];
        assert!(naive_equivalent(&family.polygon(), rep), "{}", family.id);
    }
}

#[test]
fn table_entries_are_pairwise_inequivalent_and_reflexive() {
    let all = catalogue::all();
    assert_eq!(all.len(), 16);
    for (i, f) in all.iter().enumerate() {
        assert!(naive_reflexive(&f.polygon()), "{}", f.id);
        for g in &all[i + 1..] {
            assert!(
                !naive_equivalent(&f.polygon(), &g.polygon()),
                "{} ~ {}",
                f.id,
                g.id
            );
            assert!(
                !f.id.eq_ignore_ascii_case(g.id),
                "ids differ case-insensitively"
            );
        }
    }
}

#[test]
fn applicable_entries_are_in_strip_form() {
    for family in catalogue::all().iter().filter(|f| f.applicable) {
        let p = family.polygon();
        let lattice_points = p.boundary_points().into_iter().chain(p.interior_points());
        assert!(
            lattice_points.into_iter().all(|q| (-1..=1).contains(&q[1])),
            "{}",
            family.id
        );
        assert!(p.is_strip());
        assert_eq!(p.lattice_width().0, 2, "{}", family.id);
    }
    assert_eq!(catalogue::all().iter().filter(|f| f.applicable).count(), 15);
}

#[test]
fn stored_strip_forms_are_the_canonical_choice() {
    for family in catalogue::all().iter().filter(|f| f.applicable) {
        let (_, canonical) = family.polygon().strip_form().unwrap();
        assert_eq!(canonical, family.polygon(), "{}", family.id);
    }
}

#[test]
fn project_strip_forms_are_exact() {
    // Fixed by the project brief (the later formulas assume them).
    let exact: [(&str, &[LatticePoint]); 3] = [
        ("F0", &[[1, 0], [0, 1], [-1, 0], [0, -1]]),
        ("P2", &[[1, 0], [0, 1], [-1, -1]]),
        ("dP3", &[[1, 0], [1, 1], [0, 1], [-1, 0], [-1, -1], [0, -1]]),
    ];
    for (id, vertices) in exact {
        assert_eq!(catalogue::by_id(id).unwrap().vertices, vertices);
    }
}

/// 0 for angles in [0, π), 1 for [π, 2π), measured from the positive m₁-axis.
fn half_plane(p: LatticePoint) -> u8 {
    u8::from(!(p[1] > 0 || (p[1] == 0 && p[0] > 0)))
}

#[test]
fn vertices_are_listed_counter_clockwise_from_least_angle() {
    for family in catalogue::all() {
        let v = family.vertices;
        let n = v.len();
        assert_eq!(
            sorted(v.to_vec()),
            sorted(family.polygon().vertices().to_vec()),
            "{}",
            family.id
        );
        for i in 0..n {
            let (a, b, c) = (v[i], v[(i + 1) % n], v[(i + 2) % n]);
            assert!(
                (b[0] - a[0]) * (c[1] - b[1]) - (b[1] - a[1]) * (c[0] - b[0]) > 0,
                "{}",
                family.id
            );
        }
        let first_is_least = v[1..].iter().all(|&p| {
            let (h0, h) = (half_plane(v[0]), half_plane(p));
            h0 < h || (h0 == h && v[0][0] * p[1] - v[0][1] * p[0] > 0)
        });
        assert!(first_is_least, "{}", family.id);
    }
}

#[test]
fn width_three_triangle_is_listed_as_not_applicable() {
    let family = catalogue::by_id("P2*").unwrap();
    let p = family.polygon();
    assert_eq!(
        sorted(p.vertices().to_vec()),
        sorted(vec![[2, -1], [-1, 2], [-1, -1]])
    );
    assert_eq!(p.lattice_width().0, 3);
    assert!(p.strip_form().is_err());
    assert!(!family.applicable);
    assert!(family.reason.is_some_and(|r| r.contains("strip form")));
    assert!(matches!(
        family.check_applicable(),
        Err(CatalogueError::NotApplicable { id: "P2*", .. })
    ));
    assert!(catalogue::applicable_by_id("p2*").is_err());
    assert_eq!(catalogue::all().iter().filter(|f| !f.applicable).count(), 1);
}

#[test]
fn duals_pair_up_with_twelve_boundary_points() {
    for family in catalogue::all() {
        let dual = family.polygon().polar_dual().unwrap();
        let found =
            catalogue::identify(&dual).expect("the dual of a reflexive polygon is reflexive");
        assert_eq!(found.id, family.dual, "dual of {}", family.id);
        // B(Δ) + B(Δ*) = 12 ("Lattice polygons and the number 12", Amer. Math. Monthly 107 (2000)).
        assert_eq!(
            family.boundary_points + found.boundary_points,
            12,
            "{}",
            family.id
        );
        assert_eq!(catalogue::by_id(family.dual).unwrap().dual, family.id);
    }
}

#[test]
fn boundary_counts_and_descriptions_match_the_polygons() {
    for family in catalogue::all() {
        let b = family.polygon().boundary_count();
        assert_eq!(family.boundary_points as u64, b, "{}", family.id);
        assert!(
            family.description.contains(&format!("{b} boundary points")),
            "{}",
            family.id
        );
        assert!(!family.description.contains('\n'));
    }
    let counts: Vec<usize> = catalogue::all().iter().map(|f| f.boundary_points).collect();
    assert!(
        counts.windows(2).all(|w| w[0] <= w[1]),
        "listed by boundary count"
    );
}

#[test]
fn by_id_is_case_insensitive() {
    for (text, id) in [
        ("f0", "F0"),
        ("DP3", "dP3"),
        ("p2*", "P2*"),
        (" Pe6 ", "Pe6"),
        ("dp2*", "dP2*"),
    ] {
        assert_eq!(catalogue::by_id(text).unwrap().id, id);
    }
}

#[test]
fn unknown_id_lists_the_known_ids() {
    let Err(CatalogueError::UnknownFamily { id, known }) = catalogue::by_id("F3") else {
        panic!("F3 is not a family");
    };
    assert_eq!(id, "F3");
    for family in catalogue::all() {
        assert!(known.split(", ").any(|k| k == family.id), "{}", family.id);
    }
}

#[test]
fn identify_finds_images_and_rejects_others() {
    let hexagon = catalogue::by_id("dP3").unwrap().polygon();
    let image = hexagon.transform(&[[2, 1], [1, 1]]);
    assert_eq!(
        catalogue::identify(&image).map(|f: &Family| f.id),
        Some("dP3")
    );
    let translated = Polygon::from_points(&[[2, 1], [1, 2], [0, 0]]).unwrap();
    assert_eq!(catalogue::identify(&translated), None);
    let two_interior = Polygon::from_points(&[[-1, -1], [2, -1], [2, 1], [-1, 1]]).unwrap();
    assert_eq!(catalogue::identify(&two_interior), None);
}
