//! The formatter shared by `stoik fmt` and the language server.
//!
//! A reaction library is read and reviewed as text, so one canonical layout
//! keeps diffs about chemistry instead of spaces. The formatter only moves
//! layout (spaces, indentation, blank lines, line ends); it never adds,
//! drops or reorders a token, and it never changes what the parser reads.
//!
//! # The canonical layout
//!
//! - A statement header starts at column 0. Tokens are separated by one
//!   space, with no space before `:` and `,` and one space after them:
//!   `reaction shift: CO(g) + H2O(g) <=> CO2(g) + H2(g)`. Arrows, `=` and `;`
//!   have one space on each side, so header attributes stay on the header as
//!   `reaction: A <=> B ; K = 3.2`. Two tokens written without a space between
//!   them (`2NH3` is one token; `"a"b` is two) stay joined, because a space
//!   could change what a value reads.
//! - Attribute lines are indented by two spaces. In a run of attribute lines
//!   of one statement that no blank line breaks, the first `=` of each line is
//!   aligned by padding the attribute name (`S   = 192.77 J/(mol*K)`); widths
//!   count characters.
//! - A comment after code on a header line is separated from it by two
//!   spaces. Comments after code on attribute lines of one run are aligned two
//!   columns after the longest such line of the run. A comment on a line of
//!   its own keeps whether it was indented: at column 0, or indented by two.
//!   A comment's text is kept exactly, except for whitespace at its end.
//! - Whitespace at line ends is removed; runs of blank lines become one blank
//!   line; blank lines at the start and end of the file are removed; a file
//!   with any content ends with one line end, an empty file stays empty.
//! - Every line end takes the style of the file's first line end (`\n`,
//!   `\r\n` or `\r`); a file without one gets `\n`. A byte order mark at the
//!   start of the file is kept.
//! - Non-breaking spaces and U+FEFF between two tokens are kept as written,
//!   because inside a value they are part of the text the value is read from.
//! - Unicode (`⇌`, `·`, `²`, `°C`), strings, numbers and units are untouched;
//!   an unclosed string runs to the line end and is kept whole, spaces and all.
//!
//! # What is left alone
//!
//! A statement (its header and the attribute lines that continue it) with a
//! syntax error is kept exactly as written, apart from whitespace at line
//! ends. Outside attribute values the parser reads tokens, not spaces, and
//! the rules never join or split a token, so spacing there is free. Inside a
//! value the text itself is read, so a rewrite that does more there than
//! turn a run of blanks in a number, unit or bare word into one space is
//! checked: the statement is parsed again, alone, before and after, and if
//! the two readings differ in any equation, attribute, value, error or
//! token, the statement is kept as written instead. The check is what lets
//! the layout rules stay simple without ever risking meaning.
//!
//! The work is linear in the size of the file: one lexing and parsing pass
//! for the whole file, and one more parse of each statement whose values
//! need the check.

mod layout;
mod meaning;

use crate::syntax::ast::{Statement, ValueKind};
use crate::syntax::lexer::{Lexeme, Token, lex};
use crate::syntax::parse;
use layout::{
    LineKind, SourceLine, ValueSpan, format_statement, free_comment_line, verbatim_statement,
};

/// The byte order mark that some editors put at the start of a file.
const BOM: char = '\u{feff}';

/// The canonical layout of a `.stoik` file. Never fails and never changes
/// meaning; `format(&format(t)) == format(t)`.
pub fn format(text: &str) -> String {
    let Some(rest) = text.strip_prefix(BOM) else {
        return format_body(text);
    };
    let mut out = String::with_capacity(text.len() + 4);
    out.push(BOM);
    // A line holding only the mark stays a line of its own, so that the
    // first statement does not move onto the line the mark indents.
    let first_line = rest.split(['\n', '\r']).next().unwrap_or("");
    if first_line.chars().all(layout::is_space) {
        out.push_str(newline_style(&lex(rest), rest));
    }
    out.push_str(&format_body(rest));
    out
}

/// True when `text` is already in canonical layout.
pub fn is_formatted(text: &str) -> bool {
    format(text) == text
}

/// The line end the file uses first, `\n` when it has none.
fn newline_style<'t>(lexemes: &[Lexeme], text: &'t str) -> &'t str {
    lexemes
        .iter()
        .find(|l| l.token == Token::Newline)
        .map(|l| &text[l.span.range()])
        .unwrap_or("\n")
}

/// Collects output lines, folding runs of blank lines into one.
struct Output<'n> {
    text: String,
    newline: &'n str,
    pending_blank: bool,
}

impl Output<'_> {
    fn blank(&mut self) {
        if !self.text.is_empty() {
            self.pending_blank = true;
        }
    }

    /// One or more lines (already joined with the file's line end).
    fn lines(&mut self, lines: &str) {
        if self.pending_blank {
            self.text.push_str(self.newline);
            self.pending_blank = false;
        }
        self.text.push_str(lines);
        self.text.push_str(self.newline);
    }
}

fn format_body(text: &str) -> String {
    let lexemes = lex(text);
    let newline = newline_style(&lexemes, text);
    let lines = layout::split_lines(text, &lexemes);
    let mut error_line = vec![false; lines.len()];
    let starts: Vec<usize> = lines.iter().map(|l| l.start).collect();
    let parsed = parse(text);
    let mut parsed_statements = parsed.statements.iter().peekable();
    for e in &parsed.errors {
        let line = starts
            .partition_point(|&s| s <= e.span.start())
            .saturating_sub(1);
        if let Some(flag) = error_line.get_mut(line) {
            *flag = true;
        }
    }
    let mut out = Output {
        text: String::with_capacity(text.len() + text.len() / 8 + 16),
        newline,
        pending_blank: false,
    };
    let mut i = 0;
    while i < lines.len() {
        let line = &lines[i];
        match line.kind {
            LineKind::Blank => {
                out.blank();
                i += 1;
            }
            LineKind::Comment => {
                out.lines(&free_comment_line(text, line, &lexemes));
                i += 1;
            }
            LineKind::Header | LineKind::Continuation => {
                let last = statement_end(&lines, i);
                let statement = &lines[i..=last];
                // A statement without a header (indented lines before the
                // first statement) is always an error.
                let broken =
                    line.kind == LineKind::Continuation || error_line[i..=last].iter().any(|&e| e);
                let rendered = if broken {
                    verbatim_statement(text, statement, &lexemes, newline)
                } else {
                    while parsed_statements.next_if(|s| s.line < i).is_some() {}
                    let values = parsed_statements
                        .next_if(|s| s.line == i)
                        .map(value_spans)
                        .unwrap_or_default();
                    let formatted = format_statement(text, statement, &lexemes, newline, &values);
                    let original = &text[statement[0].start..statement[statement.len() - 1].end];
                    if !formatted.needs_check
                        || formatted.text == original
                        || meaning::same_meaning(original, &formatted.text)
                    {
                        formatted.text
                    } else {
                        verbatim_statement(text, statement, &lexemes, newline)
                    }
                };
                out.lines(&rendered);
                i = last + 1;
            }
        }
    }
    out.text
}

/// The spans of a parsed statement's values, in text order.
fn value_spans(statement: &Statement) -> Vec<ValueSpan> {
    let mut spans: Vec<ValueSpan> = statement
        .attributes
        .iter()
        .map(|a| ValueSpan {
            span: a.value.span,
            squashable: matches!(a.value.kind, ValueKind::Quantity(_) | ValueKind::Word(_)),
        })
        .collect();
    spans.sort_by_key(|v| v.span.start());
    spans
}

/// The last line of the statement that starts at `first`: the last
/// attribute line before the next header.
fn statement_end(lines: &[SourceLine], first: usize) -> usize {
    let mut last = first;
    for (j, line) in lines.iter().enumerate().skip(first + 1) {
        match line.kind {
            LineKind::Header => break,
            LineKind::Continuation => last = j,
            LineKind::Blank | LineKind::Comment => {}
        }
    }
    last
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_header_gets_single_spaces() {
        assert_eq!(
            format("reaction   shift CO(g)  <=>   CO2(g)   \n  K =  1  "),
            // The `:` is missing, so the statement stays as written.
            "reaction   shift CO(g)  <=>   CO2(g)\n  K =  1\n"
        );
        assert_eq!(
            format("reaction   shift :CO(g) + H2O(g)  <=>   CO2(g) +  H2(g)"),
            "reaction shift: CO(g) + H2O(g) <=> CO2(g) + H2(g)\n"
        );
    }

    #[test]
    fn attribute_lines_are_indented_and_aligned() {
        let text = "species NH3(g)\n\tdHf=-45.90 kJ/mol # a\n    S = 192.77 J/(mol*K)    # b\n source  =  \"x\"\n";
        assert_eq!(
            format(text),
            "species NH3(g)\n  dHf    = -45.90 kJ/mol     # a\n  S      = 192.77 J/(mol*K)  # b\n  source = \"x\"\n"
        );
    }

    #[test]
    fn crlf_is_kept_and_blank_runs_fold() {
        let text = "\r\n\r\nunits energy = kJ/mol,temperature = K  \r\n\r\n\r\n\r\nuse \"a.stoik\"\r\n\r\n";
        assert_eq!(
            format(text),
            "units energy = kJ/mol, temperature = K\r\n\r\nuse \"a.stoik\"\r\n"
        );
    }

    #[test]
    fn an_empty_file_stays_empty() {
        assert_eq!(format(""), "");
        assert_eq!(format("\n \n\t\n"), "");
    }

    #[test]
    fn a_byte_order_mark_is_kept() {
        assert_eq!(format("\u{feff}# t\n"), "\u{feff}# t\n");
        assert_eq!(format("\u{feff}\n\nuse \"a\""), "\u{feff}\nuse \"a\"\n");
    }
}
