//! The layout rules of the formatter, one source line at a time.
//!
//! The rules work on the lexer's tokens of each line: they decide the
//! whitespace between tokens, the indentation and where comments go, and
//! never touch the text of a token. [`super`] decides which statements these
//! rules may rewrite and checks the result.

use crate::span::Span;
use crate::syntax::lexer::{Lexeme, Token};

/// The indentation of attribute lines and indented comments.
const INDENT: &str = "  ";
/// The gap between code and a trailing comment on a header line, and the
/// least gap in an aligned run of attribute lines.
const COMMENT_GAP: usize = 2;

/// True for the characters the lexer reads as spaces.
pub fn is_space(c: char) -> bool {
    matches!(c, ' ' | '\t' | '\u{a0}' | '\u{feff}')
}

/// What a line holds, as far as layout cares.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum LineKind {
    /// Nothing but spaces.
    Blank,
    /// A comment and perhaps spaces, no code.
    Comment,
    /// Code starting at column 0: a statement header.
    Header,
    /// Indented code: attributes continuing the statement above.
    Continuation,
}

/// One line of the source: its lexemes and bytes, without the line end.
#[derive(Clone, Copy, Debug)]
pub struct SourceLine {
    /// Index of the line's first lexeme.
    pub lo: usize,
    /// Index one past the line's last lexeme (its line end excluded).
    pub hi: usize,
    /// Byte offset of the line's start.
    pub start: usize,
    /// Byte offset of the line's end, before the line end.
    pub end: usize,
    pub kind: LineKind,
}

impl SourceLine {
    fn lexemes<'l>(&self, all: &'l [Lexeme]) -> &'l [Lexeme] {
        &all[self.lo..self.hi]
    }

    /// True when the line starts with whitespace.
    fn indented(&self, text: &str, all: &[Lexeme]) -> bool {
        indents(text, self.lexemes(all))
    }
}

/// True when a line of these lexemes is indented: it starts with spaces
/// other than byte order marks (zero width, and no indentation to the
/// parser either).
fn indents(text: &str, lexemes: &[Lexeme]) -> bool {
    matches!(lexemes.first(), Some(l) if l.token == Token::Space
        && !text[l.span.range()].chars().all(|c| c == '\u{feff}'))
}

/// Cut the lexemes into lines and classify each one.
pub fn split_lines(text: &str, lexemes: &[Lexeme]) -> Vec<SourceLine> {
    let mut lines = Vec::with_capacity(text.len() / 24 + 1);
    let mut lo = 0;
    let mut start = 0;
    for (i, l) in lexemes.iter().enumerate() {
        if l.token == Token::Newline {
            lines.push(classify(text, lexemes, lo, i, start, l.span.start()));
            lo = i + 1;
            start = l.span.end();
        }
    }
    lines.push(classify(
        text,
        lexemes,
        lo,
        lexemes.len(),
        start,
        text.len(),
    ));
    lines
}

fn classify(
    text: &str,
    all: &[Lexeme],
    lo: usize,
    hi: usize,
    start: usize,
    end: usize,
) -> SourceLine {
    let lexemes = &all[lo..hi];
    let code = lexemes
        .iter()
        .any(|l| !matches!(l.token, Token::Space | Token::Comment));
    let comment = lexemes.iter().any(|l| l.token == Token::Comment);
    let indented = indents(text, lexemes);
    let kind = match (code, comment, indented) {
        (true, _, false) => LineKind::Header,
        (true, _, true) => LineKind::Continuation,
        (false, true, _) => LineKind::Comment,
        (false, false, _) => LineKind::Blank,
    };
    SourceLine {
        lo,
        hi,
        start,
        end,
        kind,
    }
}

/// A statement's lines as written, without whitespace at their ends.
pub fn verbatim_statement(
    text: &str,
    lines: &[SourceLine],
    all: &[Lexeme],
    newline: &str,
) -> String {
    let mut out = String::new();
    for (j, line) in lines.iter().enumerate() {
        if j > 0 {
            out.push_str(newline);
        }
        out.push_str(&text[line.start..content_end(text, line, all)]);
    }
    out
}

/// Where a line's text ends once whitespace at its end is removed: the
/// spaces after its last token and at the end of a trailing comment. An
/// unclosed string runs to the line end and is kept whole, spaces and all.
fn content_end(text: &str, line: &SourceLine, all: &[Lexeme]) -> usize {
    let mut lexemes = line.lexemes(all);
    if let [rest @ .., last] = lexemes
        && last.token == Token::Space
    {
        lexemes = rest;
    }
    match lexemes.last() {
        Some(l) if l.token == Token::Comment => l.span.start() + comment_text(text, l).len(),
        Some(l) => l.span.end(),
        None => line.start,
    }
}

/// A comment on a line of its own, at column 0 or indented by two.
pub fn free_comment_line(text: &str, line: &SourceLine, all: &[Lexeme]) -> String {
    let mut out = String::new();
    if line.indented(text, all) {
        out.push_str(INDENT);
    }
    if let Some(c) = line.lexemes(all).iter().find(|l| l.token == Token::Comment) {
        out.push_str(comment_text(text, c));
    }
    out
}

fn comment_text<'t>(text: &'t str, comment: &Lexeme) -> &'t str {
    text[comment.span.range()].trim_end_matches(is_space)
}

/// The attribute name of a line that reads `name = ...`.
fn attribute_name<'t>(text: &'t str, lexemes: &[Lexeme]) -> Option<&'t str> {
    let mut code = lexemes
        .iter()
        .filter(|l| !matches!(l.token, Token::Space | Token::Comment));
    match (code.next(), code.next()) {
        (Some(name), Some(eq)) if name.token == Token::Word && eq.token == Token::Eq => {
            Some(&text[name.span.range()])
        }
        _ => None,
    }
}

/// Where an attribute value lies, and whether a run of spaces and tabs in
/// it may become one space without a second look: a number with a unit and
/// a bare word read any such run alike, a string or `arrhenius(...)` may
/// not.
#[derive(Clone, Copy, Debug)]
pub struct ValueSpan {
    pub span: Span,
    pub squashable: bool,
}

/// A statement in canonical layout, and whether the rewrite changed the
/// spacing inside a value in a way only a second parse can clear.
pub struct Formatted {
    pub text: String,
    pub needs_check: bool,
}

/// What rendering one statement needs besides the line at hand.
struct Context<'t, 'v> {
    text: &'t str,
    /// The statement's value spans, in text order.
    values: &'v [ValueSpan],
    needs_check: bool,
}

impl Context<'_, '_> {
    /// Note a changed gap between two tokens. Outside values the parser
    /// reads tokens, not spaces, so any gap is safe there; inside a value
    /// only a run of blanks becoming one space is.
    fn gap_changed(&mut self, prev: Span, cur: Span, written: Option<&str>, new: &str) {
        let i = self
            .values
            .partition_point(|v| v.span.start() <= prev.start());
        let Some(v) = i.checked_sub(1).map(|i| self.values[i]) else {
            return;
        };
        if cur.end() > v.span.end() {
            return;
        }
        let blanks = written.is_some_and(|g| g.chars().all(|c| c == ' ' || c == '\t'));
        if !(v.squashable && blanks && new == " ") {
            self.needs_check = true;
        }
    }
}

/// One rendered line of code and its trailing comment, if any.
struct Rendered<'t> {
    code: String,
    comment: Option<&'t str>,
}

/// The canonical layout of one statement that parses without errors: its
/// header line first, then attribute, comment and blank lines.
pub fn format_statement(
    text: &str,
    lines: &[SourceLine],
    all: &[Lexeme],
    newline: &str,
    values: &[ValueSpan],
) -> Formatted {
    let mut cx = Context {
        text,
        values,
        needs_check: false,
    };
    // Runs of attribute lines that no blank line breaks share alignment.
    let mut runs: Vec<Vec<usize>> = Vec::new();
    let mut open = false;
    for (j, line) in lines.iter().enumerate() {
        match line.kind {
            LineKind::Continuation => {
                if !open {
                    runs.push(Vec::new());
                    open = true;
                }
                if let Some(run) = runs.last_mut() {
                    run.push(j);
                }
            }
            LineKind::Blank | LineKind::Header => open = false,
            LineKind::Comment => {}
        }
    }
    let mut rendered: Vec<Option<Rendered>> = lines.iter().map(|_| None).collect();
    let mut comment_column = vec![0usize; lines.len()];
    for run in &runs {
        let width = run
            .iter()
            .filter_map(|&j| attribute_name(text, lines[j].lexemes(all)))
            .map(|name| name.chars().count())
            .max()
            .unwrap_or(0);
        let mut column = 0;
        for &j in run {
            let lexemes = lines[j].lexemes(all);
            let pad = attribute_name(text, lexemes)
                .map(|name| width - name.chars().count())
                .unwrap_or(0);
            let mut code = String::from(INDENT);
            let comment = render_code(&mut cx, lexemes, false, pad, &mut code);
            if comment.is_some() {
                column = column.max(code.chars().count() + COMMENT_GAP);
            }
            rendered[j] = Some(Rendered { code, comment });
        }
        for &j in run {
            comment_column[j] = column;
        }
    }
    let mut out = String::with_capacity(lines.iter().map(|l| l.end - l.start + 2).sum());
    let mut blank = false;
    let mut first = true;
    for (j, line) in lines.iter().enumerate() {
        let mut start_line = |out: &mut String| {
            if !first {
                out.push_str(newline);
                if blank {
                    out.push_str(newline);
                }
            }
            first = false;
            blank = false;
        };
        match line.kind {
            LineKind::Blank => blank = true,
            LineKind::Comment => {
                start_line(&mut out);
                out.push_str(&free_comment_line(text, line, all));
            }
            LineKind::Header => {
                start_line(&mut out);
                let comment = render_code(&mut cx, line.lexemes(all), true, 0, &mut out);
                if let Some(c) = comment {
                    push_spaces(&mut out, COMMENT_GAP);
                    out.push_str(c);
                }
            }
            LineKind::Continuation => {
                start_line(&mut out);
                if let Some(r) = rendered[j].take() {
                    out.push_str(&r.code);
                    if let Some(c) = r.comment {
                        let width = r.code.chars().count();
                        push_spaces(&mut out, comment_column[j].saturating_sub(width).max(1));
                        out.push_str(c);
                    }
                }
            }
        }
    }
    Formatted {
        text: out,
        needs_check: cx.needs_check,
    }
}

fn push_spaces(out: &mut String, n: usize) {
    out.extend(std::iter::repeat_n(' ', n));
}

/// Append the code of one line in canonical spacing, the attribute name
/// padded by `name_pad` spaces; return the line's trailing comment.
fn render_code<'t>(
    cx: &mut Context<'t, '_>,
    lexemes: &[Lexeme],
    header: bool,
    name_pad: usize,
    out: &mut String,
) -> Option<&'t str> {
    let text = cx.text;
    let mut prev: Option<Lexeme> = None;
    let mut gap: Option<&str> = None;
    let mut comment = None;
    let mut count = 0usize;
    // The name's padding goes before the next separator, unless that is a
    // gap kept as written (it holds a no-break space or the like): padding
    // it would grow the gap on every pass.
    let mut pad = 0usize;
    for l in lexemes {
        let piece = &text[l.span.range()];
        match l.token {
            Token::Space => {
                if prev.is_some() {
                    gap = Some(piece);
                }
            }
            Token::Comment => comment = Some(comment_text(text, l)),
            Token::Newline => {}
            token => {
                if let Some(p) = prev {
                    let sep = separator(p.token, token, gap, header && count == 1);
                    if sep != gap.unwrap_or("") {
                        cx.gap_changed(p.span, l.span, gap, sep);
                    }
                    if !kept_as_written(gap) {
                        push_spaces(out, pad);
                    }
                    pad = 0;
                    out.push_str(sep);
                }
                out.push_str(piece);
                if count == 0 {
                    pad = name_pad;
                }
                prev = Some(*l);
                gap = None;
                count += 1;
            }
        }
    }
    comment
}

/// True for a gap that [`separator`] keeps exactly as written.
fn kept_as_written(gap: Option<&str>) -> bool {
    gap.is_some_and(|g| g.chars().any(|c| c != ' ' && c != '\t'))
}

/// The whitespace between two tokens of a line; `gap` is what was written
/// between them. `after_keyword` marks the gap after a header's keyword.
fn separator(prev: Token, cur: Token, gap: Option<&str>, after_keyword: bool) -> &str {
    use Token::*;
    // A gap holding a no-break space or a byte order mark is kept, but not
    // the blanks around it: they would add to the padding of an aligned
    // attribute name at every pass.
    if let Some(g) = gap
        && kept_as_written(gap)
    {
        return g.trim_matches([' ', '\t']);
    }
    let written = if gap.is_some() { " " } else { "" };
    // `<` and `>` are only tokens of their own in odd text such as a glued
    // `A->B` (`A-` then `>`), where joining is meaningful: keep it.
    let odd = |t: Token| matches!(t, Lt | Gt | Unknown | UnterminatedStr);
    if odd(prev) || odd(cur) {
        return written;
    }
    if matches!(cur, Colon | Comma) {
        return "";
    }
    let spaced = |t: Token| matches!(t, Semi | Eq | Reversible | Forward | Resonance);
    if after_keyword || spaced(prev) || spaced(cur) || matches!(prev, Colon | Comma) {
        return " ";
    }
    written
}
