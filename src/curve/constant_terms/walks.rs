//! Closed walks: `[φⁿ]₀` for n = 0..=n_max by direct expansion, over any coefficient ring.
//!
//! # Method
//! `[φⁿ]₀` is the weighted number of closed walks of length n on Z² from the origin whose steps
//! are the exponents `m` of φ, each step weighted by its coefficient `c_m`. Dynamic programming
//! over lattice positions, `φ^{k+1} = φ·φ^k`, keeps only the positions in the box reachable in
//! k steps from which the origin can still be reached in the remaining steps of the horizon
//! (bounding-box pruning); two buffers on one grid covering every such box are swapped step by
//! step. The coefficient ring is generic ([`WalkRing`]): exact integers for the values
//! themselves, residues modulo the prime `2⁶¹ − 1` for the recurrence search.
//!
//! # Cost
//! With `T` terms in φ: O(T·n³) multiply-adds, on integers of O(n) bits (exact ring) or on
//! machine words (residues).
//!
//! # Accuracy
//! Exact in the ring. Tested against the binomial theorem (`[(x + 1/x)ⁿ]₀ = C(n, n/2)`), the
//! residues against the reduced exact values for a polynomial with negative coefficients, and
//! (`tests/constant_terms.rs`) against OEIS values and closed forms.
//!
//! # References
//! - OEIS A002894 (`x + 1/x + y + 1/y`: closed walks on the square lattice, `C(2k, k)²`),
//!   A002898 (the hexagon: closed walks on the triangular lattice), A000984 (central binomial
//!   coefficients, `x + 1/x`).

use super::residue::Residue;
use super::Term;
use rug::Integer;

/// The coefficient ring of the walk count: exact integers, or residues modulo the prime.
pub(super) trait WalkRing: Clone {
    type Weight: Copy;
    fn zero() -> Self;
    fn one() -> Self;
    fn is_zero(&self) -> bool;
    fn set_zero(&mut self);
    fn weight(c: i64) -> Self::Weight;
    /// `self += a·w`.
    fn add_mul(&mut self, a: &Self, w: Self::Weight);
}

impl WalkRing for Integer {
    type Weight = i64;
    fn zero() -> Self {
        Integer::new()
    }
    fn one() -> Self {
        Integer::from(1)
    }
    fn is_zero(&self) -> bool {
        Integer::is_zero(self)
    }
    fn set_zero(&mut self) {
        // Keeps the limb allocation for the next step, unlike `Integer::new()`.
        rug::Assign::assign(self, 0);
    }
    fn weight(c: i64) -> i64 {
        c
    }
    fn add_mul(&mut self, a: &Self, w: i64) {
        *self += a * w;
    }
}

/// An inclusive box `[x₀, x₁] × [y₀, y₁]` of lattice positions (empty when `x₀ > x₁`).
#[derive(Debug, Clone, Copy)]
struct Window {
    x: (i64, i64),
    y: (i64, i64),
}

impl Window {
    fn contains(&self, p: [i64; 2]) -> bool {
        (self.x.0..=self.x.1).contains(&p[0]) && (self.y.0..=self.y.1).contains(&p[1])
    }

    /// The positions, row by row.
    fn points(self) -> impl Iterator<Item = [i64; 2]> {
        (self.y.0..=self.y.1).flat_map(move |y| (self.x.0..=self.x.1).map(move |x| [x, y]))
    }
}

/// Positions after `k` of `horizon` steps that matter for some constant term up to the
/// horizon: reachable (inside `k·[lo, hi]`) and able to return (`−p ∈ (horizon−k)·[lo, hi]`).
fn walk_window(k: i64, horizon: i64, lo: [i64; 2], hi: [i64; 2]) -> Window {
    let rest = horizon - k;
    let axis = |i: usize| {
        (
            (k * lo[i]).max(-rest * hi[i]),
            (k * hi[i]).min(-rest * lo[i]),
        )
    };
    Window {
        x: axis(0),
        y: axis(1),
    }
}

/// The smallest box `[lo, hi]` holding the origin and every step.
fn step_box<W>(steps: &[([i64; 2], W)]) -> ([i64; 2], [i64; 2]) {
    let (mut lo, mut hi) = ([0i64; 2], [0i64; 2]);
    for (m, _) in steps {
        for i in 0..2 {
            lo[i] = lo[i].min(m[i]);
            hi[i] = hi[i].max(m[i]);
        }
    }
    (lo, hi)
}

/// Row-major storage for the box covering all windows.
struct Grid {
    bounds: Window,
    width: i64,
}

impl Grid {
    fn covering(windows: &[Window]) -> Self {
        let bounds = Window {
            x: (
                windows.iter().map(|w| w.x.0).min().unwrap_or(0),
                windows.iter().map(|w| w.x.1).max().unwrap_or(0),
            ),
            y: (
                windows.iter().map(|w| w.y.0).min().unwrap_or(0),
                windows.iter().map(|w| w.y.1).max().unwrap_or(0),
            ),
        };
        Grid {
            bounds,
            width: bounds.x.1 - bounds.x.0 + 1,
        }
    }

    fn index(&self, p: [i64; 2]) -> usize {
        ((p[1] - self.bounds.y.0) * self.width + (p[0] - self.bounds.x.0)) as usize
    }

    fn cells(&self) -> usize {
        self.index([self.bounds.x.1, self.bounds.y.1]) + 1
    }
}

/// `[φᵏ]₀` for k = 0..=n_max in the ring `R`.
pub(super) fn closed_walks<R: WalkRing>(terms: &[Term], n_max: usize) -> Vec<R> {
    let steps: Vec<([i64; 2], R::Weight)> = terms
        .iter()
        .filter(|(_, c)| *c != 0)
        .map(|&(m, c)| (m, R::weight(c)))
        .collect();
    let (lo, hi) = step_box(&steps);
    let horizon = n_max as i64;
    let windows: Vec<Window> = (0..=horizon)
        .map(|k| walk_window(k, horizon, lo, hi))
        .collect();
    let grid = Grid::covering(&windows);
    let mut current = vec![R::zero(); grid.cells()];
    let mut next = current.clone();
    let origin = grid.index([0, 0]);
    current[origin] = R::one();
    let mut out = Vec::with_capacity(n_max + 1);
    out.push(current[origin].clone());
    for k in 0..n_max {
        multiply_by_phi(
            &grid,
            &steps,
            &current,
            &mut next,
            windows[k],
            windows[k + 1],
        );
        std::mem::swap(&mut current, &mut next);
        out.push(current[origin].clone());
    }
    out
}

/// `next = φ·current`, read on `source` and written on `target` only.
fn multiply_by_phi<R: WalkRing>(
    grid: &Grid,
    steps: &[([i64; 2], R::Weight)],
    current: &[R],
    next: &mut [R],
    source: Window,
    target: Window,
) {
    for p in target.points() {
        next[grid.index(p)].set_zero();
    }
    for p in source.points() {
        let value = &current[grid.index(p)];
        if value.is_zero() {
            continue;
        }
        for &(m, w) in steps {
            let q = [p[0] + m[0], p[1] + m[1]];
            if target.contains(q) {
                next[grid.index(q)].add_mul(value, w);
            }
        }
    }
}

impl WalkRing for Residue {
    type Weight = Residue;
    fn zero() -> Self {
        Residue(0)
    }
    fn one() -> Self {
        Residue(1)
    }
    fn is_zero(&self) -> bool {
        self.0 == 0
    }
    fn set_zero(&mut self) {
        self.0 = 0;
    }
    fn weight(c: i64) -> Residue {
        let magnitude = Residue::new(c.unsigned_abs());
        if c < 0 {
            Residue(0).sub(magnitude)
        } else {
            magnitude
        }
    }
    fn add_mul(&mut self, a: &Self, w: Residue) {
        *self = self.add(a.mul(w));
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::curve::constant_terms::residue::PRIME;

    #[test]
    fn direct_expansion_of_x_plus_inverse_is_central_binomial() {
        // [ (x + 1/x)ⁿ ]₀ = C(n, n/2) for even n, 0 for odd n (binomial theorem).
        let u = closed_walks::<Integer>(&[([1, 0], 1), ([-1, 0], 1)], 30);
        for (n, value) in u.iter().enumerate() {
            let expected = if n % 2 == 0 {
                Integer::from(Integer::binomial_u(n as u32, n as u32 / 2))
            } else {
                Integer::new()
            };
            assert_eq!(*value, expected, "n = {n}");
        }
    }

    #[test]
    fn modular_walks_agree_with_exact_walks() {
        // Negative coefficients too: (x − 2 + 3/y)ⁿ, exact values reduced vs residues.
        let phi = [([1, 0], 1), ([0, 0], -2), ([0, -1], 3), ([-1, 1], 5)];
        let exact = closed_walks::<Integer>(&phi, 40);
        let modular = closed_walks::<Residue>(&phi, 40);
        assert!(exact.iter().any(|v| Integer::from(v.abs_ref()) > PRIME));
        for (e, m) in exact.iter().zip(&modular) {
            assert_eq!(Residue::from_integer(e), *m);
        }
    }
}
