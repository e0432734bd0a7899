//! The exact fit over Z of a recurrence shape found modulo the prime.
//!
//! # Method
//! The `U − 1` equations that were independent modulo the prime (hence independent over Q) are
//! reduced by fraction-free row reduction to reduced echelon form: with pivot `p` and previous
//! pivot `q`, every other row becomes `(p·row − row[c]·pivot_row)/q`. Every intermediate entry
//! is a minor of the matrix, so each division is exact and no entry grows beyond the size of a
//! minor. The null vector read off at the first free column is divided by the gcd of its
//! entries, signed so that the leading coefficient of the highest non-zero `p_j` is positive,
//! and the recurrence is checked exactly against every equation the terms allow.
//!
//! # Accuracy
//! Exact (arbitrary-size integers). Tested against an independent solve over Q, on
//! pseudo-random matrices with and without dependent rows (a wrong exact division would leave
//! a vector that is not in the nullspace), and with a free column in the middle.
//!
//! # Errors
//! [`RecurrenceError::Mismatch`] when the exact recurrence fails an equation.
//!
//! # References
//! - Fraction-free elimination with exact divisions by the previous pivot: common practice.
//! - "Differentiably finite power series", European J. Combin. 1 (1980) 175–188 (the
//!   recurrence being solved for).

use super::recurrence::{equation_row, Recurrence};
use super::search::Candidate;
use super::RecurrenceError;
use rug::Integer;

/// Solves the candidate's shape exactly on the equations independent modulo the prime,
/// normalizes, and checks the result on every equation `u` allows.
pub(super) fn exact_fit(
    u: &[Integer],
    candidate: &Candidate,
) -> Result<Recurrence, RecurrenceError> {
    let (order, degree) = (candidate.order, candidate.degree);
    let power = |n: usize, k: usize| Integer::from(Integer::u_pow_u(n as u32, k as u32));
    let times = |a: &Integer, b: &Integer| Integer::from(a * b);
    let matrix: Vec<Vec<Integer>> = candidate
        .independent_rows
        .iter()
        .map(|&n| equation_row(u, n, order, degree, power, times))
        .collect();
    let mut vector = null_vector(matrix, (order + 1) * (degree + 1));
    make_primitive(&mut vector);
    let recurrence = Recurrence {
        coeffs: vector.chunks(degree + 1).map(<[Integer]>::to_vec).collect(),
    };
    let recurrence = with_positive_leading_coefficient(recurrence);
    recurrence.check(u)?;
    Ok(recurrence)
}

/// A non-zero null vector of `matrix` (columns `columns`), which must have a free column.
///
/// Fraction-free reduction to reduced echelon form: with pivot `p` and previous pivot `q`,
/// every other row becomes `(p·row − row[c]·pivot_row)/q`; the division is exact because the
/// entries stay minors of the original matrix, and at the end every pivot equals the last one.
fn null_vector(mut matrix: Vec<Vec<Integer>>, columns: usize) -> Vec<Integer> {
    let mut previous = Integer::from(1);
    let mut pivot_columns = Vec::new();
    let mut free = None;
    for column in 0..columns {
        let row = pivot_columns.len();
        let Some(found) = (row..matrix.len()).find(|&i| !matrix[i][column].is_zero()) else {
            free.get_or_insert(column);
            continue;
        };
        matrix.swap(row, found);
        let pivot_row = matrix[row].clone();
        let pivot = &pivot_row[column];
        for (i, other) in matrix.iter_mut().enumerate() {
            if i == row {
                continue;
            }
            let factor = other[column].clone();
            for (entry, p) in other.iter_mut().zip(&pivot_row) {
                *entry *= pivot;
                *entry -= &factor * p;
                entry.div_exact_mut(&previous);
            }
        }
        previous = pivot.clone();
        pivot_columns.push(column);
    }
    let free = free.unwrap_or(columns - 1);
    let mut vector = vec![Integer::new(); columns];
    vector[free] = previous;
    for (row, &column) in pivot_columns.iter().enumerate() {
        vector[column] = -Integer::from(&matrix[row][free]);
    }
    vector
}

/// Divides by the gcd of the entries.
fn make_primitive(vector: &mut [Integer]) {
    let mut content = Integer::new();
    for entry in vector.iter() {
        content.gcd_mut(entry);
    }
    if !content.is_zero() && content != 1 {
        for entry in vector.iter_mut() {
            entry.div_exact_mut(&content);
        }
    }
}

/// Flips all signs unless the leading coefficient of the highest non-zero `p_j` is positive.
fn with_positive_leading_coefficient(mut recurrence: Recurrence) -> Recurrence {
    let leading = recurrence
        .coeffs
        .iter()
        .rev()
        .flat_map(|p| p.iter().rev())
        .find(|c| !c.is_zero());
    if leading.is_some_and(|c| c.is_negative()) {
        for c in recurrence.coeffs.iter_mut().flatten() {
            *c = -std::mem::take(c);
        }
    }
    recurrence
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::curve::constant_terms::tests::ints;
    use rug::Rational;

    #[test]
    fn null_vector_agrees_with_rational_solve() {
        // A 4×5 integer matrix of rank 4; the null vector is checked by multiplying back and
        // against the solution with the last unknown set to 1, solved over Q by substitution.
        let matrix = vec![
            ints(&[3, -1, 4, 1, -5]),
            ints(&[9, 2, -6, 5, 3]),
            ints(&[5, 8, 9, -7, 9]),
            ints(&[-3, 2, 3, 8, 4]),
        ];
        let vector = null_vector(matrix.clone(), 5);
        assert_null_vector(&matrix, &vector);
        assert!(!vector[4].is_zero());
        let solution = rational_solve_last_free(&matrix);
        for (v, s) in vector.iter().zip(&solution) {
            assert_eq!(Rational::from((v.clone(), vector[4].clone())), *s);
        }
    }

    /// `vector` is non-zero and every row of `matrix` is orthogonal to it.
    fn assert_null_vector(matrix: &[Vec<Integer>], vector: &[Integer]) {
        assert!(vector.iter().any(|v| !v.is_zero()), "zero vector");
        for (i, row) in matrix.iter().enumerate() {
            let dot: Integer = row
                .iter()
                .zip(vector)
                .map(|(a, b)| Integer::from(a * b))
                .sum();
            assert_eq!(dot, 0, "row {i}");
        }
    }

    /// Row reduction over Q with the last unknown fixed to 1 (an independent path).
    fn rational_solve_last_free(matrix: &[Vec<Integer>]) -> Vec<Rational> {
        let n = matrix.len();
        let mut a: Vec<Vec<Rational>> = matrix
            .iter()
            .map(|row| row.iter().map(|x| Rational::from(x.clone())).collect())
            .collect();
        for c in 0..n {
            let p = (c..n).find(|&i| a[i][c] != 0).unwrap();
            a.swap(c, p);
            let pivot_row = a[c].clone();
            for (i, row) in a.iter_mut().enumerate() {
                if i != c {
                    let f = Rational::from(&row[c] / &pivot_row[c]);
                    for (x, q) in row.iter_mut().zip(&pivot_row) {
                        *x -= Rational::from(&f * q);
                    }
                }
            }
        }
        let mut x: Vec<Rational> = (0..n)
            .map(|i| -Rational::from(&a[i][n] / &a[i][i]))
            .collect();
        x.push(Rational::from(1));
        x
    }

    #[test]
    fn null_vector_of_pseudo_random_matrices() {
        // k × (k+1) matrices with entries in [−50, 50], some with a dependent last row (then
        // the first free column is used): the result must be a non-zero null vector. A wrong
        // exact division would leave garbage, caught by the product.
        let mut state = 0x2545_f491_4f6c_dd1du64;
        let mut entry = || {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            Integer::from((state >> 33) as i64 % 101 - 50)
        };
        for k in 1..=16 {
            let mut matrix: Vec<Vec<Integer>> =
                (0..k).map(|_| (0..=k).map(|_| entry()).collect()).collect();
            if k % 3 == 0 {
                let combination: Vec<Integer> = matrix[0]
                    .iter()
                    .zip(&matrix[1])
                    .map(|(a, b)| Integer::from(a * 3) - b)
                    .collect();
                matrix[k - 1] = combination;
            }
            let vector = null_vector(matrix.clone(), k + 1);
            assert_null_vector(&matrix, &vector);
        }
    }

    #[test]
    fn null_vector_with_a_free_column_in_the_middle() {
        // Column 1 is twice column 0: the first free column is 1, null vector (2, −1, 0).
        let vector = null_vector(vec![ints(&[1, 2, 0]), ints(&[3, 6, 1])], 3);
        let mut v = vector.clone();
        make_primitive(&mut v);
        assert!(v == ints(&[2, -1, 0]) || v == ints(&[-2, 1, 0]), "{v:?}");
    }
}
