//! Arithmetic modulo the prime `p = 2⁶¹ − 1` on machine words.
//!
//! # Method
//! Residues are stored in `[0, p)`. Because `2⁶¹ ≡ 1 (mod p)`, a value reduces by adding its
//! bits above bit 61 to its low 61 bits: a product of two residues (below `2¹²²`) is one
//! u128 multiplication, one such fold and one conditional subtraction. Inverses are `a^{p−2}`
//! (as `a^{p−1} ≡ 1` for `a ≢ 0` modulo a prime) by binary exponentiation. Arbitrary-size
//! integers (possibly negative) reduce to the least non-negative residue.
//!
//! # Accuracy
//! Exact. Tested against the remainder of u128 arithmetic on values near the modulus and near
//! the top of u64, where the fold is exercised.
//!
//! # References
//! - OEIS A000043: 61 is an exponent of a Mersenne prime, so `2⁶¹ − 1` is prime.
//! - Reduction modulo a Mersenne number by shift and add: common practice.

use rug::Integer;

pub(super) const PRIME: u64 = (1 << 61) - 1;

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) struct Residue(pub(super) u64);

impl Residue {
    pub(super) fn new(value: u64) -> Self {
        // Any u64 is below 8·PRIME + 8: fold the top bits once, then one subtraction.
        let folded = (value & PRIME) + (value >> 61);
        Residue(if folded >= PRIME {
            folded - PRIME
        } else {
            folded
        })
    }

    pub(super) fn from_integer(value: &Integer) -> Self {
        let modulus = Integer::from(PRIME);
        Residue(Integer::from(value.modulo_ref(&modulus)).to_u64_wrapping())
    }

    pub(super) fn add(self, other: Self) -> Self {
        Residue::new(self.0 + other.0)
    }

    pub(super) fn sub(self, other: Self) -> Self {
        Residue::new(self.0 + PRIME - other.0)
    }

    pub(super) fn mul(self, other: Self) -> Self {
        // 2⁶¹ ≡ 1: the product (< 2¹²²) folds into its low 61 bits plus the rest (< 2⁶¹).
        let product = self.0 as u128 * other.0 as u128;
        Residue::new((product as u64 & PRIME) + (product >> 61) as u64)
    }

    pub(super) fn pow(self, mut exponent: u64) -> Self {
        let (mut base, mut result) = (self, Residue(1));
        while exponent > 0 {
            if exponent & 1 == 1 {
                result = result.mul(base);
            }
            base = base.mul(base);
            exponent >>= 1;
        }
        result
    }

    pub(super) fn inverse(self) -> Self {
        self.pow(PRIME - 2)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::curve::constant_terms::walks::WalkRing;

    #[test]
    fn residue_arithmetic_matches_u128_remainder() {
        // Values near the modulus and the top of u64, where the folding is exercised.
        let samples = [
            0,
            1,
            2,
            PRIME - 1,
            PRIME - 2,
            1 << 60,
            (1 << 61) + 5,
            u64::MAX / 3,
        ];
        for &a in &samples {
            for &b in &samples {
                let (ra, rb) = (Residue::new(a), Residue::new(b));
                let (ma, mb) = (a as u128 % PRIME as u128, b as u128 % PRIME as u128);
                assert_eq!(ra.0 as u128, ma);
                assert_eq!(ra.mul(rb).0 as u128, ma * mb % PRIME as u128);
                assert_eq!(ra.add(rb).0 as u128, (ma + mb) % PRIME as u128);
                assert_eq!(
                    ra.sub(rb).0 as u128,
                    (ma + PRIME as u128 - mb) % PRIME as u128
                );
            }
        }
        assert_eq!(Residue(12345).mul(Residue(12345).inverse()), Residue(1));
        assert_eq!(Residue::weight(-3).add(Residue(3)), Residue(0));
        assert_eq!(
            Residue::from_integer(&Integer::from(-1)),
            Residue(PRIME - 1)
        );
    }
}
