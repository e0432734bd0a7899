//! Coefficient lists read from text, e.g. `"(1,0)=1,(0,1)=1,(-1,-1)=1"`, to be checked against
//! the tempered coefficients ([`crate::curve::laurent::Laurent::with_coefficients`]).

use crate::curve::constant_terms::Term;
use crate::curve::laurent::LaurentError;
use crate::input::tokens::{tokenize, Token};
use crate::input::vertices::{expect, parse_integer, parse_point};

/// Parses `"(1,0)=1,(0,1)=1"` into terms; whitespace between tokens is ignored, but not
/// inside a number (`(1,0)=1 0` is refused, not read as 10).
///
/// # Errors
/// [`LaurentError::Parse`] naming the entry and the token that failed.
pub fn parse_coefficients(text: &str) -> Result<Vec<Term>, LaurentError> {
    let err = |reason: String| LaurentError::Parse {
        text: text.to_string(),
        reason,
    };
    let tokens = tokenize(text);
    if tokens.is_empty() {
        return Err(err("the list is empty".into()));
    }
    let mut rest = tokens.as_slice();
    let mut out = Vec::new();
    loop {
        let index = out.len() + 1;
        let entry = |e: String| err(format!("entry {index}: {e}"));
        let (point, after) = parse_point(rest).map_err(entry)?;
        let after = expect(after, "`=` after the point", |t| {
            matches!(t, Token::Equals(_))
        })
        .map_err(entry)?;
        let (c, after) = parse_integer(after, "coefficient").map_err(entry)?;
        out.push((point, c));
        match after {
            [] => return Ok(out),
            [Token::Comma(_), tail @ ..] => rest = tail,
            [other, ..] => {
                return Err(err(format!(
                    "after entry {index}: expected `,` or the end of the text, found {}",
                    other.describe()
                )))
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn coefficient_text() {
        let t = parse_coefficients("(1,0)=1, (0,1)=2,(-1,-1)=1").unwrap();
        assert_eq!(t, vec![([1, 0], 1), ([0, 1], 2), ([-1, -1], 1)]);
        for bad in [
            "",
            "(1,0)",
            "(1,0)=x",
            "(1)=1",
            "1,0=1",
            "(1,0=1",
            "(1,0)=1 0",
            "(1 0,0)=1",
            "(1,0)=1,",
            "(1,0)=1_0",
            "(1,0)==1",
        ] {
            assert!(parse_coefficients(bad).is_err(), "{bad:?}");
        }
    }
}
