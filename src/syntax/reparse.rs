//! Parsing a new version of a file by reusing the tree of the last one.
//!
//! An editor sends the whole analysis a new text on every keystroke, and a
//! keystroke changes one statement. Parsing a library of 20,000 reactions
//! again took a fifth of the time of such an edit, so the language server
//! hands the parser the text and tree it parsed last: the text is
//! compared from both ends, the statements wholly before and wholly after
//! the changed bytes are copied from the old tree (those after it moved by
//! the change in length and in lines), and only the statements between are
//! parsed. The result is exactly the tree a full parse gives (a property
//! test holds it to that), because the parser carries no state across a
//! statement header (the same fact that lets [`super::parse`] cut a large
//! file into pieces for several cores).

use super::ast::*;
use super::parser::{count_line_breaks, join, parse, parse_range};
use crate::span::Span;

/// Below this many statements to copy, one thread copies them all.
const PARALLEL_COPY: usize = 2048;

/// Parse `text`, reusing `old`, the tree of `old_text`.
pub fn reparse(old_text: &str, old: &SourceFile, text: &str) -> SourceFile {
    let (old_bytes, bytes) = (old_text.as_bytes(), text.as_bytes());
    let prefix = common_prefix(old_bytes, bytes);
    if prefix == old_bytes.len() && prefix == bytes.len() {
        return old.clone();
    }
    let limit = old_bytes.len().min(bytes.len()) - prefix;
    let suffix = common_suffix(old_bytes, bytes, limit);
    // The statements to parse again run from the last header before the
    // first changed byte to the first header whose line break and first
    // letter both lie in the unchanged end.
    let start = header_before(bytes, prefix);
    let end = header_from(bytes, bytes.len() - suffix + 1).unwrap_or(bytes.len());
    let old_end = end + old_bytes.len() - bytes.len();
    if start == 0 && end == bytes.len() {
        return parse(text);
    }
    let first_line = count_line_breaks(&text[..start]);
    let lines = count_line_breaks(&text[start..end]) as isize
        - count_line_breaks(&old_text[start..old_end]) as isize;
    let moved = Move {
        bytes: bytes.len() as isize - old_bytes.len() as isize,
        lines,
    };

    let before = Ranges::below(old, start);
    let after = Ranges::from(old, old_end);
    let copy_after = || {
        let mut tail = copy(old, after.statements.clone(), after.comments.clone(), moved);
        // With no unchanged header after the change, the part parsed again
        // runs to the end of the text, and so do its errors: one at the
        // very end (a coefficient with no species after it) is the old
        // text's, not the tail's.
        if end < bytes.len() {
            tail.errors = errors(old, old_end..usize::MAX, moved);
        }
        tail
    };
    let parse_between = || {
        let mut head = copy(
            old,
            before.statements.clone(),
            before.comments.clone(),
            Move::NONE,
        );
        head.errors = errors(old, 0..start, Move::NONE);
        (head, parse_range(text, start, end, first_line))
    };
    let ((head, middle), tail) = if after.statements.len() >= PARALLEL_COPY {
        crate::parallel::both(parse_between, copy_after)
    } else {
        (parse_between(), copy_after())
    };
    join(vec![head, middle, tail])
}

/// The length of the longest common start of `a` and `b`.
pub(crate) fn common_prefix(a: &[u8], b: &[u8]) -> usize {
    // Compared in blocks first: the slice comparison is vectorised.
    const BLOCK: usize = 256;
    let n = a.len().min(b.len());
    let mut at = 0;
    while at + BLOCK <= n && a[at..at + BLOCK] == b[at..at + BLOCK] {
        at += BLOCK;
    }
    while at < n && a[at] == b[at] {
        at += 1;
    }
    at
}

/// The length of the longest common end of `a` and `b`, at most `limit`.
pub(crate) fn common_suffix(a: &[u8], b: &[u8], limit: usize) -> usize {
    const BLOCK: usize = 256;
    let (la, lb) = (a.len(), b.len());
    let mut n = 0;
    while n + BLOCK <= limit && a[la - n - BLOCK..la - n] == b[lb - n - BLOCK..lb - n] {
        n += BLOCK;
    }
    while n < limit && a[la - n - 1] == b[lb - n - 1] {
        n += 1;
    }
    n
}

/// True when a statement header starts at `at`: the first byte of a line
/// that is an ASCII letter (the cut [`super::parse`] makes between pieces).
fn is_header(bytes: &[u8], at: usize) -> bool {
    at > 0 && bytes[at - 1] == b'\n' && bytes.get(at).is_some_and(u8::is_ascii_alphabetic)
}

/// The last header that starts before `changed` (its first letter is not
/// changed), or 0.
fn header_before(bytes: &[u8], changed: usize) -> usize {
    let mut upto = changed.min(bytes.len());
    while let Some(nl) = memchr::memrchr(b'\n', &bytes[..upto]) {
        if nl + 1 < changed && is_header(bytes, nl + 1) {
            return nl + 1;
        }
        upto = nl;
    }
    0
}

/// The first header that starts at or after `from`.
fn header_from(bytes: &[u8], from: usize) -> Option<usize> {
    let mut at = from.checked_sub(1)?;
    while at < bytes.len() {
        let nl = at + memchr::memchr(b'\n', &bytes[at..])?;
        if is_header(bytes, nl + 1) {
            return Some(nl + 1);
        }
        at = nl + 1;
    }
    None
}

/// Which statements and comments of a tree lie on one side of an offset.
struct Ranges {
    statements: std::ops::Range<usize>,
    comments: std::ops::Range<usize>,
}

impl Ranges {
    /// Those that start before `offset`.
    fn below(file: &SourceFile, offset: usize) -> Ranges {
        Ranges {
            statements: 0..file.statements.partition_point(|s| s.span.start() < offset),
            comments: 0..file.comments.partition_point(|c| c.span.start() < offset),
        }
    }

    /// Those that start at `offset` or after.
    fn from(file: &SourceFile, offset: usize) -> Ranges {
        Ranges {
            statements: file.statements.partition_point(|s| s.span.start() < offset)
                ..file.statements.len(),
            comments: file.comments.partition_point(|c| c.span.start() < offset)
                ..file.comments.len(),
        }
    }
}

/// Copies of some statements and comments of `file`, moved.
fn copy(
    file: &SourceFile,
    statements: std::ops::Range<usize>,
    comments: std::ops::Range<usize>,
    moved: Move,
) -> SourceFile {
    let mut out = SourceFile {
        statements: file.statements[statements].to_vec(),
        comments: file.comments[comments].to_vec(),
        errors: Vec::new(),
    };
    if moved != Move::NONE {
        for s in &mut out.statements {
            moved.statement(s);
        }
        for c in &mut out.comments {
            c.span = moved.span(c.span);
            c.line = moved.line(c.line);
        }
    }
    out
}

/// Copies of the errors of `file` that start in `starts`, moved.
fn errors(file: &SourceFile, starts: std::ops::Range<usize>, moved: Move) -> Vec<SyntaxError> {
    file.errors
        .iter()
        .filter(|e| starts.contains(&e.span.start()))
        .map(|e| SyntaxError {
            span: moved.span(e.span),
            ..e.clone()
        })
        .collect()
}

/// How far the text after a change moved: in bytes and in lines.
#[derive(Clone, Copy, PartialEq, Eq)]
struct Move {
    bytes: isize,
    lines: isize,
}

impl Move {
    const NONE: Move = Move { bytes: 0, lines: 0 };

    fn span(self, span: Span) -> Span {
        Span::new(
            span.start().wrapping_add_signed(self.bytes),
            span.end().wrapping_add_signed(self.bytes),
        )
    }

    fn line(self, line: usize) -> usize {
        line.wrapping_add_signed(self.lines)
    }

    fn name(self, name: &mut Name) {
        name.span = self.span(name.span);
    }

    // Every span and line of the tree is moved; the patterns name every
    // field, so that a field added to the tree cannot be forgotten here.
    fn statement(self, s: &mut Statement) {
        let Statement {
            kind,
            keyword,
            span,
            line,
            last_line,
            attributes,
        } = s;
        *keyword = self.span(*keyword);
        *span = self.span(*span);
        *line = self.line(*line);
        *last_line = self.line(*last_line);
        for a in attributes {
            self.attribute(a);
        }
        match kind {
            StatementKind::Units => {}
            StatementKind::Use { path } => {
                if let Some(StringLit { value: _, span }) = path {
                    *span = self.span(*span);
                }
            }
            StatementKind::Species { alias, formula } => {
                for n in [alias, formula].into_iter().flatten() {
                    self.name(n);
                }
            }
            StatementKind::Reaction { label, equation } => {
                if let Some(n) = label {
                    self.name(n);
                }
                if let Some(Equation {
                    left,
                    arrow,
                    right,
                    span,
                }) = equation
                {
                    *span = self.span(*span);
                    arrow.span = self.span(arrow.span);
                    for t in left.iter_mut().chain(right.iter_mut()) {
                        let Term {
                            coefficient,
                            species,
                            span,
                        } = t;
                        *span = self.span(*span);
                        self.name(species);
                        if let Some(Coefficient { value: _, span }) = coefficient {
                            *span = self.span(*span);
                        }
                    }
                }
            }
            StatementKind::Mixture { name } => {
                if let Some(n) = name {
                    self.name(n);
                }
            }
        }
    }

    fn attribute(self, a: &mut Attribute) {
        let Attribute { name, value, span } = a;
        *span = self.span(*span);
        self.name(name);
        let Value { kind, span } = value;
        *span = self.span(*span);
        match kind {
            ValueKind::Quantity(q) => self.quantity(q),
            ValueKind::Arrhenius(arguments) => {
                for a in arguments {
                    self.attribute(a);
                }
            }
            ValueKind::Text(_) | ValueKind::Word(_) | ValueKind::Missing => {}
        }
    }

    fn quantity(self, q: &mut Quantity) {
        let Quantity {
            number: _,
            number_span,
            unit,
            at,
        } = q;
        *number_span = self.span(*number_span);
        if let Some(n) = unit {
            self.name(n);
        }
        if let Some(at) = at {
            self.quantity(at);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::line_index::tests::boundary;
    use super::*;
    use proptest::prelude::*;

    /// Lines of the notation, good and broken, for the texts and the edits:
    /// the parser's, and some more.
    fn line() -> impl Strategy<Value = String> {
        prop_oneof![
            12 => super::super::parser::tests::line(),
            1 => Just("  k = arrhenius(A = 1e9 L/(mol*s), n = 0, Ea = 10 kJ/mol)".to_string()),
            1 => Just("use \"other.stoik\"".to_string()),
            1 => Just("reaction µ: Fe³⁺ + e⁻ ⇌ Fe²⁺".to_string()),
        ]
    }

    fn file() -> impl Strategy<Value = String> {
        super::super::parser::tests::file_of(line())
    }

    /// What an edit writes: a keystroke, a line, a line break, nothing.
    fn insertion() -> impl Strategy<Value = String> {
        prop_oneof![
            Just(String::new()),
            Just("#".to_string()),
            Just("\n".to_string()),
            Just("\r\n".to_string()),
            Just("r".to_string()),
            Just(" ".to_string()),
            Just("⇌".to_string()),
            line().prop_map(|l| l + "\n"),
            "[a-zA-Z =<>#:;\n0-9()+-]{0,12}",
        ]
    }

    proptest! {
        /// A reparse gives exactly the tree of a full parse, for any edit.
        #[test]
        fn reparsing_gives_the_tree_of_a_full_parse(
            old_text in file(),
            at in 0usize..4000,
            removed in 0usize..80,
            inserted in insertion(),
        ) {
            let start = boundary(&old_text, at);
            let end = boundary(&old_text, start + removed);
            let text = format!("{}{}{}", &old_text[..start], inserted, &old_text[end..]);
            let old = parse_range(&old_text, 0, old_text.len(), 0);
            let new = reparse(&old_text, &old, &text);
            let full = parse_range(&text, 0, text.len(), 0);
            prop_assert_eq!(format!("{:?}", new), format!("{:?}", full));
        }
    }

    /// A library long enough that the statements after the edit are copied
    /// on another thread.
    #[test]
    fn a_keystroke_in_a_long_library_reparses_like_a_full_parse() {
        let mut old_text = String::from("units energy = kJ/mol\n");
        for i in 0..3 * PARALLEL_COPY {
            old_text.push_str(&format!(
                "reaction r{i}: C{n}H{m}(g) <=> C{n}H{k}(g) + H2(g)\n  K = 1.0e-3 at 700 K # note\n",
                n = i + 1,
                m = 2 * i + 4,
                k = 2 * i + 2
            ));
        }
        let old = parse(&old_text);
        let middle = old_text.len() / 2;
        let line = middle + old_text[middle..].find("\nreaction").expect("a header") + 1;
        for edit in ["#", "reaction x: A <=> B\n", "\n\n"] {
            let text = format!("{}{}{}", &old_text[..line], edit, &old_text[line..]);
            let new = reparse(&old_text, &old, &text);
            assert_eq!(
                format!("{new:?}"),
                format!("{:?}", parse(&text)),
                "{edit:?}"
            );
        }
        let same = reparse(&old_text, &old, &old_text);
        assert_eq!(format!("{same:?}"), format!("{old:?}"));
    }

    /// An error at the very end of the old text belongs to the statement
    /// parsed again, not to an unchanged tail (found by the incremental
    /// analysis property test).
    #[test]
    fn an_error_at_the_end_of_the_text_is_not_copied_after_an_edit_there() {
        let head = "reaction a1: N2(g) + O2(g) <=> 2 NO(g)\n  K = 4e-31\n\
                    reaction: Xx(g) <=> propanol\nunits energy = kcal/mol\n";
        let old_text = format!("{head}reaction: Xx(g) <=2");
        let text = format!("{head}reaction: Xx(g)2");
        let new = reparse(&old_text, &parse(&old_text), &text);
        assert_eq!(format!("{new:?}"), format!("{:?}", parse(&text)));
    }

    #[test]
    fn headers_are_found_on_both_sides_of_a_change() {
        let text = b"reaction: A <=> B\n  K = 1\n# note\nreaction: B <=> C\n  K = 2\n";
        assert_eq!(header_before(text, 40), 33);
        assert_eq!(header_before(text, 33), 0);
        assert_eq!(header_from(text, 20), Some(33));
        assert_eq!(header_from(text, 34), None);
        assert_eq!(common_prefix(b"abcdef", b"abXdef"), 2);
        assert_eq!(common_suffix(b"abcdef", b"abXdef", 4), 3);
    }
}
