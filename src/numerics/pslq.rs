//! Integer relations among real numbers by the PSLQ algorithm, in MPFR arithmetic: given
//! x₁, …, xₙ (to some precision), find integers m₁, …, mₙ, not all zero, with Σ mⱼ xⱼ ≈ 0, or
//! a lower bound on the norm of any such relation.
//!
//! # Method
//! The two-level-free ("one-level") PSLQ iteration: the lower trapezoidal matrix H of the
//! orthogonal complement of x, kept size-reduced against its diagonal (Hermite reduction), rows
//! exchanged at the index m maximizing γ^m |H_mm| (γ = 2/√3 + a margin) and the corner restored
//! by a Givens rotation, with the integer matrices A, B = A⁻¹ updated alongside. A relation
//! appears as a column of B when an entry of y = x·B falls below the detection threshold. While
//! no relation is found, 1/max|H_jj| bounds the Euclidean norm of every relation from below,
//! which turns "no relation found" into a statement.
//!
//! # Domain and accuracy
//! n ≥ 2 inputs, none zero, at a common precision of `prec` bits. A relation is reported only
//! when |x·m| is below 2^(−prec + guard) relative to max|xⱼ| and the norm stays below
//! `max_norm`; a relation with coefficients of d digits needs about n·d digits of precision
//! (common practice: the inputs must be known to more digits than the relation holds in all).
//! Every reported relation is verified by recomputing Σ mⱼ xⱼ at the input precision.
//!
//! # References
//! "Analysis of PSLQ, an integer relation finding algorithm", Math. Comp. 68 (1999) 351–369;
//! "Parallel integer relation detection: techniques and applications", Math. Comp. 70 (2001)
//! 1719–1736 (the one-level variant). See `docs/REFERENCES.md`.

use rug::{Float, Integer};

/// What the search found.
#[derive(Debug, Clone, PartialEq)]
pub enum Relation {
    /// Integers m with Σ mⱼ xⱼ ≈ 0 (primitive, first non-zero entry positive), and the
    /// residual |Σ mⱼ xⱼ| / max|xⱼ| at the input precision.
    Found {
        coefficients: Vec<Integer>,
        residual: f64,
    },
    /// No relation of Euclidean norm below `norm_bound` exists (within the input precision).
    None { norm_bound: f64 },
}

/// Searches for an integer relation among `x` with Euclidean norm at most `max_norm`, at the
/// precision of the inputs; `guard_bits` of the precision are treated as noise.
///
/// # Panics
/// If fewer than two inputs are given.
///
/// ```
/// use regwave::numerics::pslq::{integer_relation, Relation};
/// use rug::{float::Constant, Float};
/// // ζ(2) = π²/6, with ζ(2) = Σ 1/k² summed independently to 200 bits.
/// let prec = 200;
/// let pi2 = Float::with_val(prec, Constant::Pi).square();
/// let zeta2 = Float::with_val(prec, 2u32).zeta();
/// match integer_relation(&[pi2, zeta2], 1e6, 16) {
///     Relation::Found { coefficients, .. } => assert_eq!(coefficients, [1, -6]),
///     other => panic!("{other:?}"),
/// }
/// ```
pub fn integer_relation(x: &[Float], max_norm: f64, guard_bits: u32) -> Relation {
    assert!(
        x.len() >= 2,
        "an integer relation needs at least two numbers"
    );
    let n = x.len();
    let prec = x.iter().map(Float::prec).min().unwrap_or(53);
    let f = |v: f64| Float::with_val(prec, v);
    let scale = x
        .iter()
        .map(|v| Float::with_val(prec, v.abs_ref()))
        .fold(Float::new(prec), |a, b| if b > a { b } else { a });
    if scale == 0 {
        return Relation::None { norm_bound: 0.0 };
    }
    // A zero entry is a relation by itself.
    if let Some(j) = x.iter().position(|v| v.is_zero()) {
        let mut m = vec![Integer::new(); n];
        m[j] = Integer::from(1);
        return Relation::Found {
            coefficients: m,
            residual: 0.0,
        };
    }
    // y is x scaled to unit norm: an entry below 2^(guard − prec) is zero to the precision.
    let threshold = Float::with_val(prec, 1u32) >> (prec as i32 - guard_bits as i32);
    let gamma = Float::with_val(prec, 4u32) / 3u32;
    let gamma = gamma.sqrt() + f(1e-3);

    // Initialization: partial norms s_k, the normalized y, and H.
    let mut s = vec![Float::new(prec); n];
    let mut acc = Float::new(prec);
    for k in (0..n).rev() {
        acc += Float::with_val(prec, x[k].square_ref());
        s[k] = Float::with_val(prec, acc.sqrt_ref());
    }
    let t = s[0].clone();
    let mut y: Vec<Float> = x.iter().map(|v| Float::with_val(prec, v / &t)).collect();
    for v in &mut s {
        *v /= &t;
    }
    let mut h = vec![vec![Float::new(prec); n - 1]; n];
    for i in 0..n {
        for j in 0..(n - 1).min(i + 1) {
            if i == j {
                h[i][j] = Float::with_val(prec, &s[j + 1] / &s[j]);
            } else {
                let d = Float::with_val(prec, &s[j] * &s[j + 1]);
                h[i][j] = -Float::with_val(prec, &y[i] * &y[j]) / d;
            }
        }
    }
    let mut a: Vec<Vec<Integer>> = identity(n);
    let mut b: Vec<Vec<Integer>> = identity(n);
    reduce(&mut h, &mut y, &mut a, &mut b, 1, n, prec, &threshold);

    let max_iterations = 200 * n * n + 1000;
    for _ in 0..max_iterations {
        // Exchange at the m maximizing γ^m |H_mm|.
        let mut best = (0usize, Float::new(prec));
        let mut power = gamma.clone();
        for (i, row) in h.iter().enumerate().take(n - 1) {
            let v = Float::with_val(prec, row[i].abs_ref()) * &power;
            if v > best.1 {
                best = (i, v);
            }
            power *= &gamma;
        }
        let m = best.0;
        y.swap(m, m + 1);
        a.swap(m, m + 1);
        h.swap(m, m + 1);
        for row in &mut b {
            row.swap(m, m + 1);
        }
        if m + 1 < n - 1 {
            // Restore the lower trapezoidal shape with a Givens rotation on columns m, m+1.
            let t0 = Float::with_val(prec, h[m][m].square_ref())
                + Float::with_val(prec, h[m][m + 1].square_ref());
            let t0 = t0.sqrt();
            let t1 = Float::with_val(prec, &h[m][m] / &t0);
            let t2 = Float::with_val(prec, &h[m][m + 1] / &t0);
            for row in h.iter_mut().skip(m) {
                let (t3, t4) = (row[m].clone(), row[m + 1].clone());
                row[m] = Float::with_val(prec, &t1 * &t3) + Float::with_val(prec, &t2 * &t4);
                row[m + 1] = Float::with_val(prec, &t1 * &t4) - Float::with_val(prec, &t2 * &t3);
            }
        }
        reduce(&mut h, &mut y, &mut a, &mut b, m + 1, n, prec, &threshold);

        // A relation: the column of B where y has vanished.
        let vanished = (0..n)
            .filter(|&j| Float::with_val(prec, y[j].abs_ref()) < threshold)
            .map(|j| (0..n).map(|i| b[i][j].clone()).collect::<Vec<Integer>>())
            .min_by(|u, v| norm_f64(u).total_cmp(&norm_f64(v)));
        if let Some(column) = vanished {
            let norm = norm_f64(&column);
            if norm <= max_norm {
                let coefficients = primitive(column);
                let residual = relation_residual(x, &coefficients, &scale);
                // Verified at the input precision: rounding of the inputs allows about
                // norm · 2^(guard − prec).
                let allowed = (1.0 + norm) * 2f64.powi(guard_bits as i32 - prec as i32);
                if residual <= allowed {
                    return Relation::Found {
                        coefficients,
                        residual,
                    };
                }
            }
            return Relation::None {
                norm_bound: max_norm,
            };
        }
        // The bound on the norm of any relation.
        let largest = h
            .iter()
            .enumerate()
            .take(n - 1)
            .map(|(i, row)| row[i].to_f64().abs())
            .fold(0.0, f64::max);
        let bound = 1.0 / largest;
        if bound > max_norm || !bound.is_finite() {
            return Relation::None { norm_bound: bound };
        }
        // The integer entries outgrew what the precision can support.
        if a.iter()
            .flatten()
            .any(|v| v.significant_bits() + guard_bits >= prec)
        {
            return Relation::None { norm_bound: bound };
        }
    }
    let largest = (0..n - 1)
        .map(|i| h[i][i].to_f64().abs())
        .fold(0.0, f64::max);
    Relation::None {
        norm_bound: 1.0 / largest,
    }
}

/// Hermite size reduction of rows `from..n` of H against its diagonal, with y, A, B updated.
#[allow(clippy::too_many_arguments)]
fn reduce(
    h: &mut [Vec<Float>],
    y: &mut [Float],
    a: &mut [Vec<Integer>],
    b: &mut [Vec<Integer>],
    from: usize,
    n: usize,
    prec: u32,
    tiny: &Float,
) {
    for i in from.max(1)..n {
        for j in (0..i.min(n - 1)).rev() {
            // A vanishing diagonal entry means the relation is already there: nothing to
            // reduce against (reducing would only inflate the integers).
            if Float::with_val(prec, h[j][j].abs_ref()) < *tiny {
                continue;
            }
            let q = Float::with_val(prec, &h[i][j] / &h[j][j]);
            let q = q.round();
            if q.is_zero() {
                continue;
            }
            let t = q.to_integer().expect("finite");
            let yj = Float::with_val(prec, &y[j]);
            y[j] = yj + Float::with_val(prec, &q * &y[i]);
            for k in 0..=j {
                let hjk = h[j][k].clone();
                h[i][k] -= Float::with_val(prec, &q * &hjk);
            }
            for k in 0..n {
                let ajk = a[j][k].clone();
                a[i][k] -= Integer::from(&t * &ajk);
                let bki = b[k][i].clone();
                b[k][j] += Integer::from(&t * &bki);
            }
        }
    }
}

fn identity(n: usize) -> Vec<Vec<Integer>> {
    (0..n)
        .map(|i| (0..n).map(|j| Integer::from(u8::from(i == j))).collect())
        .collect()
}

fn norm_f64(v: &[Integer]) -> f64 {
    v.iter()
        .map(|c| {
            let c = c.to_f64();
            c * c
        })
        .sum::<f64>()
        .sqrt()
}

/// The relation divided by the gcd of its entries, first non-zero entry positive.
fn primitive(mut v: Vec<Integer>) -> Vec<Integer> {
    let g = v.iter().fold(Integer::new(), |g, c| g.gcd(c));
    if g > 1 {
        for c in &mut v {
            *c /= &g;
        }
    }
    if v.iter().find(|c| **c != 0).is_some_and(|c| *c < 0) {
        for c in &mut v {
            *c = -c.clone();
        }
    }
    v
}

/// |Σ mⱼ xⱼ| / max|xⱼ| at the input precision.
fn relation_residual(x: &[Float], m: &[Integer], scale: &Float) -> f64 {
    let prec = scale.prec();
    let mut sum = Float::new(prec + 64);
    for (xj, mj) in x.iter().zip(m) {
        sum += Float::with_val(prec + 64, xj * mj);
    }
    (sum.abs() / scale).to_f64()
}

#[cfg(test)]
mod tests {
    use super::*;
    use rug::float::Constant;
    use rug::ops::Pow;

    fn found(r: Relation) -> Vec<i64> {
        match r {
            Relation::Found { coefficients, .. } => {
                coefficients.iter().map(|c| c.to_i64().unwrap()).collect()
            }
            other => panic!("no relation: {other:?}"),
        }
    }

    #[test]
    fn logarithms_of_products() {
        // log 2 + log 3 − log 6 = 0 (handbook identity).
        let p = 256;
        let l = |k: u32| Float::with_val(p, k).ln();
        assert_eq!(
            found(integer_relation(&[l(2), l(3), l(6)], 1e6, 20)),
            [1, 1, -1]
        );
        // 3 log 2 + 2 log 3 − log 72 = 0.
        assert_eq!(
            found(integer_relation(&[l(72), l(2), l(3)], 1e6, 20)),
            [1, -3, -2]
        );
    }

    #[test]
    fn an_algebraic_number() {
        // α = 2^{1/3} + 1 satisfies (α − 1)³ = 2: α³ − 3α² + 3α − 3 = 0 (by expansion).
        let p = 300;
        let alpha = Float::with_val(p, 2u32).cbrt() + 1u32;
        let powers: Vec<Float> = (0..4)
            .map(|k| Float::with_val(p, alpha.clone().pow(k as u32)))
            .collect();
        assert_eq!(found(integer_relation(&powers, 1e6, 20)), [3, -3, 3, -1]);
    }

    #[test]
    fn pi_squared_and_catalan_have_no_small_relation() {
        // The negative companion: π², Catalan's constant and 1 are not known to satisfy any
        // integer relation; at 300 bits none of norm below 1e20 is found, and the bound says so.
        let p = 300;
        let pi2 = Float::with_val(p, Constant::Pi).square();
        let catalan = Float::with_val(p, Constant::Catalan);
        let one = Float::with_val(p, 1u32);
        match integer_relation(&[pi2, catalan, one], 1e20, 20) {
            Relation::None { norm_bound } => assert!(norm_bound > 1e20, "{norm_bound}"),
            other => panic!("a spurious relation: {other:?}"),
        }
        // A relation that holds only to a few digits is not reported at full precision.
        let pi = Float::with_val(p, Constant::Pi);
        let approx = Float::with_val(p, 355u32) / 113u32;
        match integer_relation(&[pi, approx], 1e9, 20) {
            Relation::None { .. } => {}
            other => panic!("a spurious relation: {other:?}"),
        }
    }
}
