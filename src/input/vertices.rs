//! Vertex lists read from text, e.g. `"(1,0),(0,1),(-1,-1)"`: a tokenizer and a small
//! recursive-descent parser that names the vertex and the token that failed.

use crate::input::tokens::{tokenize, Token};
use crate::lattice::polygon::{LatticePoint, PolygonError};

/// Parses a vertex list such as `"(1,0),(0,1),(-1,-1)"`; whitespace anywhere between tokens
/// is ignored, signs `+`, `-` and `−` (U+2212) are accepted.
///
/// # Errors
/// [`PolygonError::Parse`] naming the vertex and the token that failed (empty text, missing
/// or extra coordinates, non-integers, out-of-range integers, missing separators).
///
/// ```
/// use regwave::input::vertices::parse_vertices;
/// assert_eq!(parse_vertices(" (1,0), (0, 1),(-1,-1) ").unwrap(), vec![[1, 0], [0, 1], [-1, -1]]);
/// assert!(parse_vertices("(1,0,2)").is_err());
/// ```
pub fn parse_vertices(text: &str) -> Result<Vec<LatticePoint>, PolygonError> {
    parse_list(&tokenize(text)).map_err(|reason| PolygonError::Parse {
        text: text.to_string(),
        reason,
    })
}

fn parse_list(tokens: &[Token]) -> Result<Vec<LatticePoint>, String> {
    if tokens.is_empty() {
        return Err("no vertices given (the text is empty)".to_string());
    }
    let mut rest = tokens;
    let mut points = Vec::new();
    loop {
        let index = points.len() + 1;
        let (point, after) = parse_point(rest).map_err(|e| format!("vertex {index}: {e}"))?;
        points.push(point);
        match after {
            [] => return Ok(points),
            [Token::Comma(_), tail @ ..] => rest = tail,
            [other, ..] => {
                return Err(format!(
                    "after vertex {index}: expected `,` or the end of the text, found {}",
                    other.describe()
                ))
            }
        }
    }
}

/// `( integer , integer )`, returning the point and the remaining tokens.
pub(crate) fn parse_point(tokens: &[Token]) -> Result<(LatticePoint, &[Token]), String> {
    let rest = expect(tokens, "`(`", |t| matches!(t, Token::Open(_)))?;
    let (x, rest) = parse_integer(rest, "first coordinate")?;
    let rest = expect(rest, "`,` after the first coordinate", |t| {
        matches!(t, Token::Comma(_))
    })?;
    let (y, rest) = parse_integer(rest, "second coordinate")?;
    let rest = expect(
        rest,
        "`)` after the second coordinate (a vertex has two coordinates)",
        |t| matches!(t, Token::Close(_)),
    )?;
    Ok(([x, y], rest))
}

pub(crate) fn expect<'a>(
    tokens: &'a [Token],
    what: &str,
    ok: impl Fn(&Token) -> bool,
) -> Result<&'a [Token], String> {
    match tokens {
        [t, rest @ ..] if ok(t) => Ok(rest),
        [t, ..] => Err(format!("expected {what}, found {}", t.describe())),
        [] => Err(format!("expected {what}, found the end of the text")),
    }
}

/// An integer word (signs `+`, `-`, `−`), named `which` in messages.
pub(crate) fn parse_integer<'a>(
    tokens: &'a [Token],
    which: &str,
) -> Result<(i64, &'a [Token]), String> {
    match tokens {
        [Token::Word(at, w), rest @ ..] => {
            let normalized = w.replacen('−', "-", 1);
            let value = normalized.parse::<i64>().map_err(|e| match e.kind() {
                std::num::IntErrorKind::PosOverflow | std::num::IntErrorKind::NegOverflow => {
                    format!("the {which} `{w}` at character {at} is out of range")
                }
                _ => format!("the {which} `{w}` at character {at} is not an integer"),
            })?;
            Ok((value, rest))
        }
        [t, ..] => Err(format!("expected the {which}, found {}", t.describe())),
        [] => Err(format!("expected the {which}, found the end of the text")),
    }
}
