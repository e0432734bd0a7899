//! Timing of `[φⁿ]₀` for n ≤ 2000: the 16 reflexive polygons (binomial edge coefficients)
//! and the other polynomials of `tests/constant_terms.rs`.
//!
//! Run: `cargo run --release --example bench_constant_terms [n_max]`.

use regwave::curve::constant_terms::{constant_terms_direct, constant_terms_with_recurrence, Term};
use std::time::Instant;

/// φ with the boundary points of the polygon (vertices in cyclic order) as support and
/// coefficient C(ℓ, j) at the j-th lattice point of an edge of lattice length ℓ.
fn tempered(vertices: &[[i64; 2]]) -> Vec<Term> {
    let mut terms = Vec::new();
    for (i, v) in vertices.iter().enumerate() {
        let w = vertices[(i + 1) % vertices.len()];
        let (dx, dy) = (w[0] - v[0], w[1] - v[1]);
        let length = gcd(dx.abs(), dy.abs());
        let mut binomial = 1i64;
        for j in 0..length {
            terms.push(([v[0] + j * dx / length, v[1] + j * dy / length], binomial));
            binomial = binomial * (length - j) / (j + 1);
        }
    }
    terms
}

/// Interior lattice points from twice the area and the boundary count (lattice-polygon area
/// formula `A = I + B/2 − 1`).
fn interior_points(vertices: &[[i64; 2]]) -> i64 {
    let twice_area: i64 = (0..vertices.len())
        .map(|i| {
            let (v, w) = (vertices[i], vertices[(i + 1) % vertices.len()]);
            v[0] * w[1] - w[0] * v[1]
        })
        .sum();
    (twice_area.abs() - tempered(vertices).len() as i64 + 2) / 2
}

fn gcd(a: i64, b: i64) -> i64 {
    if b == 0 {
        a
    } else {
        gcd(b, a % b)
    }
}

/// The 16 reflexive polygons up to GL₂(Z), labelled by their number of boundary points
/// (vertex lists from memory; `main` checks each has exactly one interior lattice point).
fn reflexive_polygons() -> Vec<(&'static str, Vec<[i64; 2]>)> {
    vec![
        ("3: P2", vec![[1, 0], [0, 1], [-1, -1]]),
        ("4a: F0", vec![[1, 0], [0, 1], [-1, 0], [0, -1]]),
        ("4b: F1", vec![[1, 0], [0, 1], [-1, 0], [-1, -1]]),
        ("4c: triangle", vec![[-1, -1], [1, -1], [0, 1]]),
        (
            "5a: pentagon",
            vec![[1, 0], [1, 1], [0, 1], [-1, 0], [0, -1]],
        ),
        (
            "5b: quadrilateral",
            vec![[-1, -1], [1, -1], [0, 1], [-1, 0]],
        ),
        (
            "6a: hexagon dP3",
            vec![[1, 0], [1, 1], [0, 1], [-1, 0], [-1, -1], [0, -1]],
        ),
        (
            "6b: pentagon",
            vec![[-1, -1], [1, -1], [1, 0], [0, 1], [-1, 0]],
        ),
        (
            "6c: quadrilateral",
            vec![[-1, -1], [1, -1], [1, 0], [-1, 1]],
        ),
        ("6d: triangle", vec![[-1, -1], [2, -1], [-1, 1]]),
        (
            "7a: pentagon",
            vec![[-1, -1], [1, -1], [1, 0], [0, 1], [-1, 1]],
        ),
        (
            "7b: quadrilateral",
            vec![[-1, -1], [2, -1], [0, 1], [-1, 0]],
        ),
        ("8a: square", vec![[-1, -1], [1, -1], [1, 1], [-1, 1]]),
        (
            "8b: quadrilateral",
            vec![[-1, -1], [2, -1], [0, 1], [-1, 1]],
        ),
        ("8c: triangle", vec![[-1, -1], [3, -1], [-1, 1]]),
        ("9: triangle", vec![[2, -1], [-1, 2], [-1, -1]]),
    ]
}

/// Repetitions per polygon; the fastest is reported (the machine is shared).
const RUNS: usize = 3;

fn main() {
    let n_max: usize = std::env::args()
        .nth(1)
        .map_or(2000, |s| s.parse().expect("n_max"));
    let mut slowest = 0.0f64;
    for (name, vertices) in reflexive_polygons() {
        let phi = tempered(&vertices);
        let boundary: usize = name[..name.find(|c: char| !c.is_ascii_digit()).unwrap()]
            .parse()
            .unwrap();
        assert_eq!(phi.len(), boundary, "{name}: boundary points");
        assert_eq!(interior_points(&vertices), 1, "{name} is not reflexive");
        let mut best = f64::INFINITY;
        let mut result = None;
        for _ in 0..RUNS {
            let start = Instant::now();
            result = Some(constant_terms_with_recurrence(&phi, n_max));
            best = best.min(start.elapsed().as_secs_f64());
        }
        match result.unwrap() {
            Ok((rec, u)) => {
                slowest = slowest.max(best);
                println!(
                    "{name:<20} order {} degree {}  {:>7.1} ms  u_{n_max}: {} digits",
                    rec.order(),
                    rec.degree(),
                    1e3 * best,
                    u[n_max].to_string().len()
                );
                println!("    {rec}");
            }
            Err(e) => println!("{name:<20} error: {e}"),
        }
    }
    println!(
        "slowest polygon, n ≤ {n_max}: {:.1} ms (fastest of {RUNS} runs)",
        1e3 * slowest
    );
    let f0 = tempered(&reflexive_polygons()[1].1);
    let start = Instant::now();
    let _ = constant_terms_direct(&f0, 150);
    println!(
        "direct expansion of F0 to n = 150: {:.1} ms",
        1e3 * start.elapsed().as_secs_f64()
    );
}
