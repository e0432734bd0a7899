//! Coefficient lists read from text, e.g. `"(1,0)=1,(0,1)=1,(-1,-1)=1"`, to be checked against
//! the tempered coefficients ([`crate::curve::laurent::Laurent::with_coefficients`]).

use crate::curve::constant_terms::Term;
use crate::curve::laurent::LaurentError;

/// Parses `"(1,0)=1,(0,1)=1"` into terms.
///
/// # Errors
/// [`LaurentError::Parse`] naming the offending piece.
pub fn parse_coefficients(text: &str) -> Result<Vec<Term>, LaurentError> {
    let err = |reason: String| LaurentError::Parse {
        text: text.to_string(),
        reason,
    };
    let compact: String = text.chars().filter(|c| !c.is_whitespace()).collect();
    if compact.is_empty() {
        return Err(err("the list is empty".into()));
    }
    let mut out = Vec::new();
    let mut rest = compact.as_str();
    while !rest.is_empty() {
        let body = rest
            .strip_prefix('(')
            .ok_or_else(|| err(format!("expected '(' at {rest:?}")))?;
        let close = body
            .find(')')
            .ok_or_else(|| err(format!("missing ')' in {rest:?}")))?;
        let coords: Vec<&str> = body[..close].split(',').collect();
        if coords.len() != 2 {
            return Err(err(format!(
                "a point needs two coordinates, got {:?}",
                &body[..close]
            )));
        }
        let parse_i = |s: &str| {
            s.parse::<i64>()
                .map_err(|_| err(format!("{s:?} is not an integer")))
        };
        let point = [parse_i(coords[0])?, parse_i(coords[1])?];
        let after = body[close + 1..]
            .strip_prefix('=')
            .ok_or_else(|| err(format!("expected '=' after {point:?}")))?;
        let end = after.find(',').unwrap_or(after.len());
        let c = parse_i(&after[..end])?;
        out.push((point, c));
        rest = after[end..].strip_prefix(',').unwrap_or(&after[end..]);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn coefficient_text() {
        let t = parse_coefficients("(1,0)=1, (0,1)=2,(-1,-1)=1").unwrap();
        assert_eq!(t, vec![([1, 0], 1), ([0, 1], 2), ([-1, -1], 1)]);
        for bad in ["", "(1,0)", "(1,0)=x", "(1)=1", "1,0=1", "(1,0=1"] {
            assert!(parse_coefficients(bad).is_err(), "{bad:?}");
        }
    }
}
