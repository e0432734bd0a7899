//! The search modulo the prime `2⁶¹ − 1` for the least shape `(order, degree)` of a recurrence
//! satisfied by a sequence.
//!
//! # Method
//! For each `(r, d)` in lexicographic order (least order first, then least degree), the
//! `U = (r+1)(d+1)` unknown coefficients of `p₀, …, p_r` must satisfy one linear equation per n
//! (the rows of `recurrence::equation_row`). The rank modulo the prime is built up one
//! equation at a time in echelon form, stopping as soon as it is full. Full rank modulo the
//! prime implies full rank over Q (a minor that is non-zero modulo p is a non-zero integer),
//! so ruling a shape out is certain. A shape is accepted only when its nullspace modulo the
//! prime is one-dimensional on at least `2U + 20` equations ([`required_terms`]); the
//! equations that were independent there are kept for the exact solve. The search stops at the
//! first shape it can neither rule out nor accept, so that the answer is always the least one.
//! On a walk count, the residues are computed in stages of growing length, each stage resuming
//! the search where the previous one ran short.
//!
//! # Cost
//! At most `E·U²` word operations per tested `(r, d)` for `E` equations (less once the rank is
//! full).
//!
//! # Accuracy
//! Ruling out is exact. Acceptance modulo the prime is a candidate only: it is confirmed
//! exactly over Z by the caller (a wrong candidate shows up as `Ambiguous` or `Mismatch`).
//!
//! # Errors
//! [`RecurrenceError::Ambiguous`] when the first fitting shape leaves a nullspace of dimension
//! above one; [`RecurrenceError::NotFound`] when a walk count fits no shape in the range.
//!
//! # References
//! - "Differentiably finite power series", European J. Combin. 1 (1980) 175–188 (a
//!   P-recursive sequence satisfies a recurrence of some finite order and degree).
//! - Ruling out by the rank modulo a prime: common practice.

use super::recurrence::equation_row;
use super::residue::Residue;
use super::walks::closed_walks;
use super::{required_terms, RecurrenceError, Term};

/// The `(order, degree)` pairs in search order: least order first, then least degree.
pub(super) fn search_pairs(max_order: usize, max_degree: usize) -> Vec<(usize, usize)> {
    (0..=max_order)
        .flat_map(|r| (0..=max_degree).map(move |d| (r, d)))
        .collect()
}

/// A recurrence shape whose system has a one-dimensional nullspace modulo the prime, with
/// the equations (values of n) that were independent there.
#[derive(Debug, Clone)]
pub(super) struct Candidate {
    pub(super) order: usize,
    pub(super) degree: usize,
    pub(super) independent_rows: Vec<usize>,
}

pub(super) enum Search {
    Found(Candidate),
    Exhausted,
    /// `pairs[next]` needs more terms than given (all earlier pairs failed).
    Short {
        next: usize,
    },
}

/// Tests `pairs` in order on the residues `u`, stopping at the first fit.
pub(super) fn search_modular(
    u: &[Residue],
    pairs: &[(usize, usize)],
) -> Result<Search, RecurrenceError> {
    search_modular_from(u, pairs, 0)
}

fn search_modular_from(
    u: &[Residue],
    pairs: &[(usize, usize)],
    start: usize,
) -> Result<Search, RecurrenceError> {
    for (i, &(order, degree)) in pairs.iter().enumerate().skip(start) {
        let unknowns = (order + 1) * (degree + 1);
        let independent_rows = independent_equations(u, order, degree);
        // Full rank on some equations rules the shape out for good (full rank modulo the
        // prime implies full rank over Q); accepting a fit needs all `2U + 20` equations.
        if independent_rows.len() == unknowns {
            continue;
        }
        if u.len() < required_terms(order, degree) {
            return Ok(Search::Short { next: i });
        }
        match unknowns - independent_rows.len() {
            1 => {
                return Ok(Search::Found(Candidate {
                    order,
                    degree,
                    independent_rows,
                }))
            }
            dimension => {
                return Err(RecurrenceError::Ambiguous {
                    order,
                    degree,
                    dimension,
                })
            }
        }
    }
    Ok(Search::Exhausted)
}

/// The equations (values of n) that raise the rank modulo the prime, in increasing n,
/// stopping once the rank is full.
fn independent_equations(u: &[Residue], order: usize, degree: usize) -> Vec<usize> {
    let unknowns = (order + 1) * (degree + 1);
    let power = |n: usize, k: usize| Residue::new(n as u64).pow(k as u64);
    let mut echelon = EchelonModP::default();
    let mut independent_rows = Vec::new();
    for n in 0..u.len().saturating_sub(order) {
        if echelon.insert(equation_row(u, n, order, degree, power, |a, b| a.mul(*b))) {
            independent_rows.push(n);
            if independent_rows.len() == unknowns {
                break;
            }
        }
    }
    independent_rows
}

/// The search on the walk count modulo the prime, lengthening the computed sequence in
/// stages of growth 5/4 (each stage recomputes with its own pruning horizon, which costs
/// less in total than extending one unpruned expansion).
pub(super) fn search_walks_modular(
    terms: &[Term],
    max_order: usize,
    max_degree: usize,
) -> Result<Candidate, RecurrenceError> {
    const FIRST_STAGE: usize = 64;
    let pairs = search_pairs(max_order, max_degree);
    let most = required_terms(max_order, max_degree);
    let mut length = FIRST_STAGE.min(most);
    let mut start = 0;
    loop {
        let residues = closed_walks::<Residue>(terms, length - 1);
        match search_modular_from(&residues, &pairs, start)? {
            Search::Found(candidate) => return Ok(candidate),
            Search::Exhausted => {
                return Err(RecurrenceError::NotFound {
                    max_order,
                    max_degree,
                    terms: length,
                })
            }
            Search::Short { next } => {
                let (order, degree) = pairs[next];
                start = next;
                length = required_terms(order, degree).max((length + length / 4).min(most));
            }
        }
    }
}

/// Rows in echelon form modulo the prime, each with its pivot column (pivot entry 1).
#[derive(Default)]
struct EchelonModP {
    rows: Vec<(usize, Vec<Residue>)>,
}

impl EchelonModP {
    /// Reduces `row` by the stored rows; stores it and returns true if it is independent.
    fn insert(&mut self, mut row: Vec<Residue>) -> bool {
        for (pivot, basis) in &self.rows {
            let factor = row[*pivot];
            if factor.0 != 0 {
                for (entry, b) in row.iter_mut().zip(basis) {
                    *entry = entry.sub(factor.mul(*b));
                }
            }
        }
        let Some(pivot) = row.iter().position(|e| e.0 != 0) else {
            return false;
        };
        let scale = row[pivot].inverse();
        for entry in row.iter_mut() {
            *entry = entry.mul(scale);
        }
        self.rows.push((pivot, row));
        true
    }
}
