//! Tokens of the list syntaxes (`(1,0),(0,1)` and `(1,0)=1,(0,1)=2`): the delimiters
//! `(`, `)`, `,`, `=` and words between them, each with its 1-based character position.
//! Whitespace separates words, so `1 0` is two words (and an error of the grammar), never `10`.

/// A token with its 1-based character position.
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum Token {
    Open(usize),
    Close(usize),
    Comma(usize),
    Equals(usize),
    Word(usize, String),
}

impl Token {
    pub(crate) fn describe(&self) -> String {
        match self {
            Token::Open(at) => format!("`(` at character {at}"),
            Token::Close(at) => format!("`)` at character {at}"),
            Token::Comma(at) => format!("`,` at character {at}"),
            Token::Equals(at) => format!("`=` at character {at}"),
            Token::Word(at, w) => format!("`{w}` at character {at}"),
        }
    }
}

pub(crate) fn tokenize(text: &str) -> Vec<Token> {
    let mut tokens = Vec::new();
    let mut word: Option<(usize, String)> = None;
    for (i, c) in text.chars().enumerate() {
        let at = i + 1;
        let delimiter = match c {
            '(' => Some(Token::Open(at)),
            ')' => Some(Token::Close(at)),
            ',' => Some(Token::Comma(at)),
            '=' => Some(Token::Equals(at)),
            _ => None,
        };
        if delimiter.is_some() || c.is_whitespace() {
            tokens.extend(word.take().map(|(start, w)| Token::Word(start, w)));
            tokens.extend(delimiter);
        } else {
            word.get_or_insert_with(|| (at, String::new())).1.push(c);
        }
    }
    tokens.extend(word.map(|(start, w)| Token::Word(start, w)));
    tokens
}
