//! Tokens of the stoik notation.
//!
//! The notation is line-shaped, so the lexer only finds the coarse pieces a
//! line is made of: words, the punctuation that separates attributes, arrows,
//! strings, comments and line ends. Formulas, numbers and unit expressions are
//! read from the text of a word later, by the modules that own their grammar.

use crate::span::Span;
use logos::Logos;

/// One coarse token.
#[derive(Logos, Clone, Copy, Debug, PartialEq, Eq)]
pub enum Token {
    #[regex(r"#[^\n\r]*", allow_greedy = true)]
    Comment,
    #[regex(r"\r\n|\n|\r")]
    Newline,
    #[regex(r"[ \t\u{feff}\u{a0}]+")]
    Space,
    #[regex(r#""([^"\\\n\r]|\\[^\n\r])*""#)]
    Str,
    #[regex(r#""([^"\\\n\r]|\\[^\n\r])*"#, allow_greedy = true)]
    UnterminatedStr,
    #[token(";")]
    Semi,
    #[token(":")]
    Colon,
    #[token(",")]
    Comma,
    #[token("=")]
    Eq,
    #[token("<=>")]
    #[token("⇌")]
    #[token("⇄")]
    Reversible,
    #[token("->")]
    #[token("→")]
    Forward,
    #[token("<->")]
    #[token("↔")]
    Resonance,
    #[token("<")]
    Lt,
    #[token(">")]
    Gt,
    #[regex(r#"[^ \t\n\r\u{feff}\u{a0}#;:,="<>⇌⇄→↔]+"#)]
    Word,
    /// Bytes that form no token (never produced by well-formed text).
    Unknown,
}

/// A token with its byte span.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Lexeme {
    pub token: Token,
    pub span: Span,
}

/// Split `text` into lexemes covering every byte of it.
pub fn lex(text: &str) -> Vec<Lexeme> {
    let mut out = Vec::with_capacity(text.len() / 4 + 1);
    out.extend(lexemes(text));
    out
}

/// The lexemes of `text` one at a time, for callers that go line by line
/// and need not hold a whole file's tokens at once.
pub fn lexemes(text: &str) -> impl Iterator<Item = Lexeme> + '_ {
    let mut lexer = Token::lexer(text);
    std::iter::from_fn(move || {
        let result = lexer.next()?;
        let range = lexer.span();
        Some(Lexeme {
            token: result.unwrap_or(Token::Unknown),
            span: Span::new(range.start, range.end),
        })
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn kinds(text: &str) -> Vec<Token> {
        lex(text)
            .into_iter()
            .filter(|l| l.token != Token::Space)
            .map(|l| l.token)
            .collect()
    }

    #[test]
    fn a_reaction_header_splits_into_words_and_arrows() {
        use Token::*;
        assert_eq!(
            kinds("reaction shift: CO(g) + H2O(g) <=> CO2(g) + H2(g) ; K = 1e5 # note"),
            vec![
                Word, Word, Colon, Word, Word, Word, Reversible, Word, Word, Word, Semi, Word, Eq,
                Word, Comment
            ]
        );
    }

    #[test]
    fn unicode_arrows_and_charges_are_tokens() {
        use Token::*;
        assert_eq!(
            kinds("Cu²⁺ ⇌ Fe^3+ → ↔"),
            vec![Word, Reversible, Word, Forward, Resonance]
        );
    }

    #[test]
    fn every_byte_is_covered() {
        let text = "a\u{0}b \"open\n<>";
        let lexemes = lex(text);
        let mut at = 0;
        for l in &lexemes {
            assert_eq!(l.span.start(), at);
            at = l.span.end();
        }
        assert_eq!(at, text.len());
    }
}
