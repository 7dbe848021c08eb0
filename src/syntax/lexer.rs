//! Tokens of the stoik notation.
//!
//! The notation is line-shaped, so the lexer only finds the coarse pieces a
//! line is made of: words, the punctuation that separates attributes, arrows,
//! strings, comments and line ends. Formulas, numbers and unit expressions are
//! read from the text of a word later, by the modules that own their grammar.
//!
//! The token patterns are written once, as logos patterns on [`Token`], and
//! [`lex`] is a hand-written loop that reads exactly those patterns. The
//! code logos generates steps through a multi-byte character by calling the
//! next state, so without optimisation (debug builds, the test suite) a
//! token of some 30,000 non-ASCII characters overflowed the stack; the loop
//! here uses no recursion at all. [`lex_with_logos`] stays as the reference
//! the loop is tested and fuzzed against.

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

/// The characters of [`Token::Space`].
fn is_space(c: char) -> bool {
    matches!(c, ' ' | '\t' | '\u{feff}' | '\u{a0}')
}

/// The characters a [`Token::Word`] cannot hold.
fn ends_word(c: char) -> bool {
    matches!(
        c,
        ' ' | '\t'
            | '\n'
            | '\r'
            | '\u{feff}'
            | '\u{a0}'
            | '#'
            | ';'
            | ':'
            | ','
            | '='
            | '"'
            | '<'
            | '>'
            | '⇌'
            | '⇄'
            | '→'
            | '↔'
    )
}

/// Split `text` into lexemes covering every byte of it: the longest match
/// of the patterns on [`Token`] at each place, read without recursion.
pub fn lex(text: &str) -> Vec<Lexeme> {
    let mut out = Vec::with_capacity(text.len() / 4 + 1);
    let bytes = text.as_bytes();
    let mut at = 0;
    while let Some(c) = text[at..].chars().next() {
        let rest = &text[at..];
        let start = at;
        // The end of a run of characters that satisfy `keep`.
        let run = |from: usize, keep: &dyn Fn(char) -> bool| {
            text[from..]
                .char_indices()
                .find(|&(_, c)| !keep(c))
                .map_or(text.len(), |(i, _)| from + i)
        };
        let token = match c {
            '#' => {
                at = run(at, &|c| c != '\n' && c != '\r');
                Token::Comment
            }
            '\r' if bytes.get(at + 1) == Some(&b'\n') => {
                at += 2;
                Token::Newline
            }
            '\n' | '\r' => {
                at += 1;
                Token::Newline
            }
            c if is_space(c) => {
                at = run(at, &is_space);
                Token::Space
            }
            '"' => {
                // `"` then characters other than `"`, `\` and line ends, or
                // `\` with any character but a line end; closed by `"`.
                at += 1;
                loop {
                    match bytes.get(at) {
                        Some(b'"') => {
                            at += 1;
                            break Token::Str;
                        }
                        Some(b'\\') => match text[at + 1..].chars().next() {
                            Some(e) if e != '\n' && e != '\r' => at += 1 + e.len_utf8(),
                            _ => break Token::UnterminatedStr,
                        },
                        Some(b'\n' | b'\r') | None => break Token::UnterminatedStr,
                        Some(_) => {
                            at = run(at, &|c| !matches!(c, '"' | '\\' | '\n' | '\r'));
                        }
                    }
                }
            }
            ';' | ':' | ',' | '=' => {
                at += 1;
                match c {
                    ';' => Token::Semi,
                    ':' => Token::Colon,
                    ',' => Token::Comma,
                    _ => Token::Eq,
                }
            }
            '<' if rest.starts_with("<=>") => {
                at += 3;
                Token::Reversible
            }
            '<' if rest.starts_with("<->") => {
                at += 3;
                Token::Resonance
            }
            '<' | '>' => {
                at += 1;
                if c == '<' { Token::Lt } else { Token::Gt }
            }
            '⇌' | '⇄' | '→' | '↔' => {
                at += c.len_utf8();
                match c {
                    '→' => Token::Forward,
                    '↔' => Token::Resonance,
                    _ => Token::Reversible,
                }
            }
            '-' if rest.starts_with("->") => {
                at += 2;
                Token::Forward
            }
            _ => {
                at = run(at, &|c| !ends_word(c));
                Token::Word
            }
        };
        out.push(Lexeme {
            token,
            span: Span::new(start, at),
        });
    }
    out
}

/// The same split done by the lexer logos generates from the patterns on
/// [`Token`]: the reference [`lex`] is tested and fuzzed against. Its code
/// recurses once per multi-byte character of a token, so an unoptimised
/// build can overflow the stack on a long non-ASCII token; use [`lex`].
#[doc(hidden)]
pub fn lex_with_logos(text: &str) -> Vec<Lexeme> {
    let mut out = Vec::with_capacity(text.len() / 4 + 1);
    let mut lexer = Token::lexer(text);
    while let Some(result) = lexer.next() {
        let range = lexer.span();
        let token = result.unwrap_or(Token::Unknown);
        out.push(Lexeme {
            token,
            span: Span::new(range.start, range.end),
        });
    }
    out
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
    fn the_loop_reads_what_the_patterns_say() {
        for text in [
            "a->b -> c<->d <=> e<=f <-g ⇌⇄→↔ <<=>> --> ->>",
            "\"esc\\\"aped\" \"open \\\n\"x\\\r\n\"\\é\" \"\\",
            "x\u{a0}\u{feff}\t y # c ⇌ \"q\r\rz;:,=#\n",
            "Cu²⁺ + SO₄²⁻ = CuSO4·5H2O(s) ; K = 1e5 at 25 °C",
            "",
            "\\",
            "-",
            "<",
            "<-",
            "<=",
        ] {
            assert_eq!(lex(text), lex_with_logos(text), "{text:?}");
        }
    }

    #[test]
    fn a_long_non_ascii_token_does_not_overflow_the_stack() {
        // Each of these overflowed the stack of a debug build through the
        // generated lexer's recursion.
        let n = 200_000;
        for text in [
            format!("# {}", "é".repeat(n)),
            format!("\"{}", "→".repeat(n)),
            format!("\"{}\"", "°".repeat(n)),
            "Δ".repeat(n),
            "\u{a0}".repeat(n),
        ] {
            let lexemes = lex(&text);
            assert!(lexemes.len() <= 2, "{}", lexemes.len());
            assert_eq!(lexemes.last().map(|l| l.span.end), Some(text.len()));
        }
    }

    #[test]
    fn every_byte_is_covered() {
        let text = "a\u{0}b \"open\n<>";
        let lexemes = lex(text);
        let mut at = 0;
        for l in &lexemes {
            assert_eq!(l.span.start, at);
            at = l.span.end;
        }
        assert_eq!(at, text.len());
    }
}
