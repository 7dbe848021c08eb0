//! The property each fuzz target checks on one input text. A broken
//! property panics, which is what the fuzzer and the tests look for.
//!
//! This file is shared: the fuzz crate compiles it as `stoik_fuzz::bodies`
//! and the main crate's `tests/fuzz_regressions.rs` includes it by path, so
//! it may only name `crate::support` (tests/format/support.rs) and `stoik`.

use crate::support::{comments, meaning, significant_tokens};
use std::path::PathBuf;
use stoik::config::Config;
use stoik::span::Span;
use stoik::syntax::ast::{Equation, SourceFile, StatementKind, ValueKind};
use stoik::syntax::lexer::{Token, lex};
use stoik::syntax::line_index::{Encoding, LineIndex, Position};
use stoik::workspace::{Overlay, Workspace};

/// A span lies inside `text` and on character boundaries.
fn assert_span(text: &str, span: Span, what: &str) {
    let (start, end) = (span.start(), span.end());
    assert!(start <= end, "{what}: span {start}..{end} runs backwards");
    assert!(
        end <= text.len(),
        "{what}: span {start}..{end} past the end"
    );
    assert!(
        text.is_char_boundary(start) && text.is_char_boundary(end),
        "{what}: span {start}..{end} splits a character"
    );
}

/// The lexer covers every byte with non-empty lexemes in order, each of the
/// shape its token promises, and the notation is line-shaped: lexing each line on
/// its own gives the same tokens.
pub fn lexer(text: &str) {
    let lexemes = lex(text);
    let mut at = 0;
    for l in &lexemes {
        assert_eq!(l.span.start(), at, "a gap or overlap before {l:?}");
        assert!(l.span.end() > l.span.start(), "an empty lexeme {l:?}");
        assert_span(text, l.span, "lexeme");
        let piece = &text[l.span.range()];
        match l.token {
            Token::Newline => assert!(matches!(piece, "\n" | "\r\n" | "\r"), "{piece:?}"),
            Token::Comment => {
                assert!(
                    piece.starts_with('#') && !piece.contains(['\n', '\r']),
                    "{piece:?}"
                )
            }
            Token::Space => assert!(
                piece
                    .chars()
                    .all(|c| matches!(c, ' ' | '\t' | '\u{feff}' | '\u{a0}')),
                "{piece:?}"
            ),
            Token::Str | Token::UnterminatedStr => {
                assert!(
                    piece.starts_with('"') && !piece.contains(['\n', '\r']),
                    "{piece:?}"
                )
            }
            Token::Word => assert!(!piece.contains([' ', '\t', '\n', '\r', '#']), "{piece:?}"),
            _ => {}
        }
        at = l.span.end();
    }
    assert_eq!(at, text.len(), "the lexemes stop before the end");
    // Line by line.
    let mut start = 0;
    let mut joined = Vec::with_capacity(lexemes.len());
    for (i, l) in lexemes.iter().enumerate() {
        if l.token == Token::Newline || i + 1 == lexemes.len() {
            let end = if l.token == Token::Newline {
                l.span.start()
            } else {
                l.span.end()
            };
            joined.extend(
                lex(&text[start..end])
                    .into_iter()
                    .map(|m| (m.token, m.span.start() + start, m.span.end() + start)),
            );
            if l.token == Token::Newline {
                joined.push((l.token, l.span.start(), l.span.end()));
            }
            start = l.span.end();
        }
    }
    let whole: Vec<_> = lexemes
        .iter()
        .map(|l| (l.token, l.span.start(), l.span.end()))
        .collect();
    assert_eq!(whole, joined, "lexing line by line differs");
}

fn check_equation(text: &str, eq: &Equation) {
    assert_span(text, eq.span, "equation");
    assert_span(text, eq.arrow.span, "arrow");
    for t in eq.left.iter().chain(&eq.right) {
        assert_span(text, t.span, "term");
        assert_span(text, t.species.span, "species");
        if let Some(c) = &t.coefficient {
            assert_span(text, c.span, "coefficient");
            assert!(*c.value.denom() > 0, "a coefficient with denominator {c:?}");
        }
    }
}

fn check_value(text: &str, kind: &ValueKind) {
    match kind {
        ValueKind::Quantity(q) => {
            let mut q = Some(q);
            while let Some(x) = q {
                assert_span(text, x.number_span, "number");
                if let Some(u) = &x.unit {
                    assert_span(text, u.span, "unit");
                }
                q = x.at.as_deref();
            }
        }
        ValueKind::Arrhenius(args) => {
            for a in args {
                assert_span(text, a.span, "argument");
                check_value(text, &a.value.kind);
            }
        }
        _ => {}
    }
}

/// Every span of the syntax tree lies in the text on character boundaries,
/// statements come in line order without sharing a line, and the parser
/// reads the same tree twice.
pub fn parser(text: &str) {
    let file: SourceFile = stoik::syntax::parse(text);
    let lines = LineIndex::new(text).line_count();
    let mut last_line: Option<usize> = None;
    for s in &file.statements {
        assert_span(text, s.span, "statement");
        assert_span(text, s.keyword, "keyword");
        assert!(s.line <= s.last_line && s.last_line < lines, "{s:?}");
        if let Some(prev) = last_line {
            assert!(s.line > prev, "two statements share line {}", s.line);
        }
        last_line = Some(s.last_line);
        for a in &s.attributes {
            assert_span(text, a.span, "attribute");
            assert_span(text, a.name.span, "attribute name");
            assert_span(text, a.value.span, "value");
            check_value(text, &a.value.kind);
        }
        match &s.kind {
            StatementKind::Reaction {
                label,
                equation: eq,
            } => {
                if let Some(l) = label {
                    assert_span(text, l.span, "label");
                }
                if let Some(eq) = eq {
                    check_equation(text, eq);
                }
            }
            StatementKind::Use { path: Some(p) } => assert_span(text, p.span, "use"),
            StatementKind::Species { alias, formula } => {
                for n in alias.iter().chain(formula) {
                    assert_span(text, n.span, "species name");
                }
            }
            StatementKind::Mixture { name: Some(n) } => assert_span(text, n.span, "mixture name"),
            _ => {}
        }
    }
    for c in &file.comments {
        assert_span(text, c.span, "comment");
        assert!(text[c.span.range()].starts_with('#'), "{c:?}");
    }
    for e in &file.errors {
        assert_span(text, e.span, "syntax error");
        assert!(!e.message.is_empty());
    }
    let again = stoik::syntax::parse(text);
    assert_eq!(
        format!("{file:?}"),
        format!("{again:?}"),
        "two parses differ"
    );
    // The equation reader of `stoik balance`, on the first line.
    let first = text.split(['\n', '\r']).next().unwrap_or_default();
    let (eq, errors) = stoik::syntax::parse_equation(first);
    if let Some(eq) = &eq {
        check_equation(first, eq);
    }
    for e in &errors {
        assert_span(first, e.span, "equation error");
    }
}

/// Analyse `text` as the only file of a workspace and check the span
/// invariants of every diagnostic, related location and fix.
pub fn analyse(text: &str) -> stoik::analysis::Analysis {
    let root = PathBuf::from("/nonexistent-root");
    let path = root.join("input.stoik");
    let mut overlay = Overlay::default();
    overlay.texts.insert(path.clone(), text.to_string());
    let mut ws = Workspace::new(&root);
    ws.load(&path, &overlay)
        .expect("the overlay holds the file");
    let analysis = stoik::analysis::analyze(ws, &Config::default());
    let ws = &analysis.workspace;
    for d in &analysis.diagnostics {
        let f = ws.file(d.file);
        assert_span(&f.text, d.span, d.rule);
        assert!(!d.message.is_empty(), "{d:?}");
        assert!(
            stoik::rules::RULES.iter().any(|r| r.id == d.rule),
            "an uncatalogued rule {}",
            d.rule
        );
        for r in &d.related {
            let g = ws.file(r.file);
            assert_span(&g.text, r.span, "related");
        }
        for fix in &d.fixes {
            for e in &fix.edits {
                let g = ws.file(e.file);
                assert_span(&g.text, e.span, "fix edit");
            }
        }
    }
    analysis
}

/// The whole analysis of one file: no panic, every diagnostic well placed
/// and renderable by the human and JSON renderers, the report of every
/// reaction and the solution of every mixture computed, and the text after
/// each of the first fixes analysed again without panic.
pub fn checker(text: &str) {
    let analysis = analyse(text);
    let ws = &analysis.workspace;
    let style = stoik::cli::render_human::Style { color: false };
    for d in &analysis.diagnostics {
        let human = stoik::cli::render_human::render(d, ws, style);
        assert!(human.contains(d.rule), "{human}");
        let json = stoik::cli::render_json::diagnostic(d, ws);
        assert!(json.line >= 1 && json.column >= 1);
        assert!((json.line, json.column) <= (json.end_line, json.end_column));
    }
    for lib in &analysis.libraries {
        for r in &lib.library.reactions {
            let _ = stoik::report::row(ws, &lib.library, r, None);
        }
        for m in &lib.library.mixtures {
            let _ = stoik::solve::mixture_diagnostics(&lib.library, m);
            let _ = stoik::solve::solve_mixture(ws, &lib.library, m);
        }
    }
    let fixes: Vec<_> = analysis
        .diagnostics
        .iter()
        .flat_map(|d| &d.fixes)
        .take(3)
        .collect();
    for fix in fixes {
        let mut edits: Vec<_> = fix.edits.iter().collect();
        edits.sort_by_key(|e| std::cmp::Reverse((e.span.start(), e.span.end())));
        let disjoint = edits
            .windows(2)
            .all(|w| w[1].span.end() <= w[0].span.start());
        if !disjoint || edits.iter().any(|e| e.file != edits[0].file) {
            continue;
        }
        let mut fixed = text.to_string();
        for e in edits {
            fixed.replace_range(e.span.range(), &e.new_text);
        }
        analyse(&fixed);
    }
}

/// The characters the lexer reads as spaces.
fn is_space(c: char) -> bool {
    matches!(c, ' ' | '\t' | '\u{a0}' | '\u{feff}')
}

/// The formatter is idempotent, keeps every non-layout token and every
/// comment, keeps what the parser reads, leaves no whitespace at line ends,
/// ends the file with a line end and writes one line-end style.
pub fn format_roundtrip(text: &str) {
    let once = stoik::format::format(text);
    let twice = stoik::format::format(&once);
    assert_eq!(twice, once, "not idempotent");
    assert_eq!(
        significant_tokens(text),
        significant_tokens(&once),
        "tokens"
    );
    assert_eq!(comments(text), comments(&once), "comments");
    assert_eq!(
        format!("{:?}", meaning(text)),
        format!("{:?}", meaning(&once)),
        "what the parser reads"
    );
    let lexemes = lex(&once);
    for (i, l) in lexemes.iter().enumerate() {
        let at_line_end = lexemes.get(i + 1).is_none_or(|n| n.token == Token::Newline);
        let piece = &once[l.span.range()];
        let bad = match l.token {
            Token::Space => !(l.span.start() == 0 && piece == "\u{feff}"),
            Token::Comment => piece.ends_with(is_space),
            _ => false,
        };
        assert!(!(at_line_end && bad), "whitespace at a line end: {piece:?}");
    }
    if !once.is_empty() {
        assert!(once.ends_with(['\n', '\r']), "no final line end");
    }
    let style = |t: &str| -> Vec<String> {
        lex(t)
            .into_iter()
            .filter(|l| l.token == Token::Newline)
            .map(|l| t[l.span.range()].to_string())
            .collect()
    };
    let first = style(text)
        .into_iter()
        .next()
        .unwrap_or_else(|| "\n".into());
    assert!(style(&once).iter().all(|s| *s == first), "mixed line ends");
}

/// The position of every character boundary (and of the middle of each
/// `\r\n`), counted by walking the text once: (offset, line, UTF-8, UTF-16
/// and UTF-32 columns).
fn expected_positions(text: &str) -> Vec<(usize, u32, [u32; 3])> {
    let mut out = Vec::with_capacity(text.len() + 1);
    let (mut line, mut cols) = (0u32, [0u32; 3]);
    let mut chars = text.char_indices().peekable();
    loop {
        let at = chars.peek().map(|(i, _)| *i).unwrap_or(text.len());
        out.push((at, line, cols));
        let Some((i, c)) = chars.next() else { break };
        match c {
            '\n' | '\r' => {
                if c == '\r' && chars.peek().map(|(_, n)| *n) == Some('\n') {
                    // The middle of a `\r\n` lies on the line the pair ends,
                    // one past its last character.
                    out.push((i + 1, line, cols.map(|k| k + 1)));
                    chars.next();
                }
                line += 1;
                cols = [0; 3];
            }
            _ => {
                cols[0] += c.len_utf8() as u32;
                cols[1] += c.len_utf16() as u32;
                cols[2] += 1;
            }
        }
    }
    out
}

/// Byte offsets and positions convert both ways in all three encodings:
/// every character boundary gets the position counted by hand and comes
/// back to itself (the middle of a `\r\n`, which no position names, comes
/// back to the line end before it); an offset inside a character moves to
/// its start; positions past a line's end or past the last line clamp.
pub fn positions(text: &str) {
    let index = LineIndex::new(text);
    let line_ends = {
        let b = text.as_bytes();
        let mut n = 0;
        let mut i = 0;
        while i < b.len() {
            if b[i] == b'\r' && b.get(i + 1) == Some(&b'\n') {
                i += 1;
            }
            if matches!(b[i], b'\n' | b'\r') {
                n += 1;
            }
            i += 1;
        }
        n
    };
    assert_eq!(index.line_count(), line_ends + 1);
    // Only walk the start of long texts: on a line that is not ASCII each
    // conversion counts from the line start, so a long line is quadratic.
    let limit = text.len().min(2048);
    let expected = expected_positions(text);
    for (k, enc) in [Encoding::Utf8, Encoding::Utf16, Encoding::Utf32]
        .into_iter()
        .enumerate()
    {
        let mut previous: Option<Position> = None;
        for &(offset, line, cols) in expected.iter().take_while(|e| e.0 <= limit) {
            let p = index.position(text, offset, enc);
            let want = Position {
                line,
                column: cols[k],
            };
            assert_eq!(p, want, "offset {offset} {enc:?}");
            if let Some(q) = previous {
                assert!(q < p, "positions do not grow at {offset}");
            }
            previous = Some(p);
            let mid_crlf = offset > 0
                && text.as_bytes()[offset - 1] == b'\r'
                && text.as_bytes().get(offset) == Some(&b'\n');
            let back = index.offset(text, p, enc);
            if mid_crlf {
                assert_eq!(back, offset - 1, "the middle of a CRLF at {offset}");
            } else {
                assert_eq!(back, offset, "round trip of {offset} through {p:?} {enc:?}");
            }
            assert_eq!(index.line_of(offset), line as usize);
            // An offset inside the character that starts here moves back.
            let mut inside = offset + 1;
            while inside < text.len() && !text.is_char_boundary(inside) {
                assert_eq!(
                    index.position(text, inside, enc),
                    p,
                    "inside a character at {inside}"
                );
                inside += 1;
            }
        }
        // Past the end of each line, and past the last line.
        for line in 0..index.line_count().min(64) {
            let range = index.line_range(text, line);
            let far = Position {
                line: line as u32,
                column: u32::MAX,
            };
            assert_eq!(index.offset(text, far, enc), range.end);
            assert!(range.start <= range.end && text.is_char_boundary(range.end));
            assert!(!text[range].contains(['\n', '\r']));
        }
        let beyond = Position {
            line: index.line_count() as u32,
            column: 0,
        };
        assert_eq!(index.offset(text, beyond, enc), text.len());
        assert_eq!(
            index.position(text, text.len() + 10, enc),
            index.position(text, text.len(), enc)
        );
    }
    // Positions inside a surrogate pair move to the character's start.
    for (i, c) in text.char_indices().take_while(|(i, _)| *i < limit) {
        if c.len_utf16() == 2 {
            let p = index.position(text, i, Encoding::Utf16);
            let inside = Position {
                line: p.line,
                column: p.column + 1,
            };
            assert_eq!(index.offset(text, inside, Encoding::Utf16), i);
        }
    }
}
