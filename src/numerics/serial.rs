//! Serialization of numbers with every computed digit: MPFR values as decimal strings carrying
//! all the digits of their precision (enough to read back the same binary value), complex
//! numbers as `{"re", "im"}`, double-precision values as JSON numbers (shortest round-trip
//! representation). The one place where numbers of the results meet serde.
//!
//! Results serialize the values they hold at their working precision; which of those digits a
//! report *supports* (confirmed by a second solve, or within an error estimate) is decided by the
//! output layer ([`crate::output::decimal`]).

use crate::numerics::complex::CNum;
use num_complex::Complex64;
use rug::Float;
use serde::ser::{SerializeStruct, Serializer};

/// A real MPFR value as a decimal string with every digit of its precision (rug's round-trip
/// rendering in radix 10; `"nan"`, `"inf"`, `"-inf"` for the special values).
pub fn float_text(x: &Float) -> String {
    if x.is_nan() {
        return "nan".into();
    }
    if x.is_infinite() {
        return if x.is_sign_negative() { "-inf" } else { "inf" }.into();
    }
    x.to_string_radix(10, None)
}

/// serde `serialize_with` for a [`Float`]: [`float_text`].
pub fn float<S: Serializer>(x: &Float, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(&float_text(x))
}

/// serde `serialize_with` for a list of [`Float`]s.
pub fn floats<S: Serializer>(xs: &[Float], s: S) -> Result<S::Ok, S::Error> {
    s.collect_seq(xs.iter().map(float_text))
}

/// serde `serialize_with` for a [`CNum`] value: `{"re", "im"}`, decimal strings with every digit
/// of an MPFR value, JSON numbers for double precision.
pub fn complex<T: CNum, S: Serializer>(z: &T, s: S) -> Result<S::Ok, S::Error> {
    let mut st = s.serialize_struct("Complex", 2)?;
    if z.prec() <= 53 {
        st.serialize_field("re", &z.re_f64())?;
        st.serialize_field("im", &z.im_f64())?;
    } else {
        let (re, im) = z.decimal_parts();
        st.serialize_field("re", &re)?;
        st.serialize_field("im", &im)?;
    }
    st.end()
}

/// serde `serialize_with` for a [`Complex64`]: `{"re", "im"}` as JSON numbers.
pub fn complex64<S: Serializer>(z: &Complex64, s: S) -> Result<S::Ok, S::Error> {
    complex(z, s)
}

/// serde `serialize_with` for a line of samples: `[{"re", "im"} | null, …]` (null where a sample
/// is missing, e.g. on a pole).
pub fn complex64_line<S: Serializer>(line: &[Option<Complex64>], s: S) -> Result<S::Ok, S::Error> {
    #[derive(serde::Serialize)]
    struct C {
        re: f64,
        im: f64,
    }
    s.collect_seq(line.iter().map(|v| v.map(|v| C { re: v.re, im: v.im })))
}

/// serde `serialize_with` for a line of [`CNum`] samples: `[{"re", "im"} | null, …]` with every
/// digit of their precision.
pub fn complex_line<T: CNum, S: Serializer>(line: &[Option<T>], s: S) -> Result<S::Ok, S::Error> {
    struct Item<'a, T>(&'a T);
    impl<T: CNum> serde::Serialize for Item<'_, T> {
        fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
            complex(self.0, s)
        }
    }
    s.collect_seq(line.iter().map(|v| v.as_ref().map(Item)))
}

/// serde `serialize_with` for a list of [`Complex64`]: `[{"re", "im"}, …]`.
pub fn complex64_list<S: Serializer>(xs: &[Complex64], s: S) -> Result<S::Ok, S::Error> {
    let line: Vec<Option<Complex64>> = xs.iter().copied().map(Some).collect();
    complex64_line(&line, s)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_digit_of_the_precision_is_written() {
        // 1/3 at 200 bits: the text reads back to the same value (round trip), and carries about
        // 200·log₁₀2 ≈ 60 digits.
        let x = Float::with_val(200, 1) / 3u32;
        let t = float_text(&x);
        let back = Float::with_val(200, Float::parse(&t).unwrap());
        assert_eq!(back, x, "{t}");
        assert!(
            t.chars().filter(|c| c.is_ascii_digit()).count() >= 60,
            "{t}"
        );
        let json = serde_json::to_string(&{
            #[derive(serde::Serialize)]
            struct W {
                #[serde(serialize_with = "complex")]
                z: rug::Complex,
            }
            W {
                z: rug::Complex::with_val(100, (1.5, -0.25)),
            }
        })
        .unwrap();
        assert!(
            json.contains("\"re\":\"1.5") && json.contains("\"im\":\"-2.5"),
            "{json}"
        );
    }
}
