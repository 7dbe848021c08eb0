//! The statement layer: lines of tokens into a [`SourceFile`].
//!
//! The notation is line-oriented (a statement starts at column 0, indented
//! lines continue it), so the statement layer is a small hand-written parser
//! over the lexer's tokens. It never fails: every problem becomes a
//! [`SyntaxError`] with a span and parsing resumes at the next line, so every
//! error of a file is reported at once.

use super::ast::*;
use super::lexer::{Lexeme, Token, lex, lexemes};
use super::value::parse_value;
use crate::span::Span;
use compact_str::CompactString;
use num_rational::Ratio;

/// The statement keywords, in the order the reference lists them.
pub const KEYWORDS: &[&str] = &["units", "use", "species", "reaction", "mixture"];

/// Parse a whole file. Never fails; errors are in [`SourceFile::errors`].
///
/// A large file is cut before statement headers into one piece per core and
/// the pieces are parsed side by side: a header line resets all the state
/// the parser carries from line to line, so the pieces give exactly the
/// statements, comments and errors of one pass, in the same order.
pub fn parse(text: &str) -> SourceFile {
    parse_in_pieces(text, PIECE_MIN_BYTES, crate::parallel::cores())
}

/// Files smaller than this are parsed in one piece.
const PIECE_MIN_BYTES: usize = 256 * 1024;

fn parse_in_pieces(text: &str, piece_min: usize, workers: usize) -> SourceFile {
    let wanted = (text.len() / piece_min.max(1)).clamp(1, workers);
    let cuts = header_cuts(text, wanted);
    if cuts.len() < 2 {
        return parse_range(text, 0, text.len(), 0);
    }
    // Each piece's start, end and first line (counted as the lexer does).
    let mut ranges = Vec::with_capacity(cuts.len());
    let mut line = 0usize;
    let mut at = 0usize;
    for (i, &cut) in cuts.iter().enumerate() {
        line += count_line_breaks(&text[at..cut]);
        let end = cuts.get(i + 1).copied().unwrap_or(text.len());
        ranges.push((cut, end, line, count_headers(&text[cut..end])));
        at = cut;
    }
    // The first piece makes room for every statement, since the others are
    // appended to it.
    let all = ranges.iter().map(|r| r.3).sum();
    if let Some(first) = ranges.first_mut() {
        first.3 = all;
    }
    let pieces = crate::parallel::map_in_order(&ranges, 1, |&(start, end, line, room)| {
        parse_range_with_room(text, start, end, line, room)
    });
    join(pieces)
}

/// The trees of consecutive pieces of one text as one tree.
pub(super) fn join(pieces: Vec<SourceFile>) -> SourceFile {
    let statements = pieces.iter().map(|p| p.statements.len()).sum::<usize>();
    let comments = pieces.iter().map(|p| p.comments.len()).sum::<usize>();
    let mut pieces = pieces.into_iter();
    // The first piece's vectors are kept and the others appended to them.
    let mut file = pieces.next().unwrap_or_default();
    file.statements
        .reserve_exact(statements - file.statements.len());
    file.comments.reserve_exact(comments - file.comments.len());
    for piece in pieces {
        file.statements.extend(piece.statements);
        file.comments.extend(piece.comments);
        file.errors.extend(piece.errors);
    }
    file
}

/// Up to `pieces` start offsets (the first is 0), each other one the start
/// of a line that begins with an ASCII letter: a statement header.
fn header_cuts(text: &str, pieces: usize) -> Vec<usize> {
    let bytes = text.as_bytes();
    let mut cuts = vec![0];
    for k in 1..pieces {
        let from = (text.len() * k / pieces).max(cuts[cuts.len() - 1] + 1);
        let found = bytes
            .get(from..)
            .unwrap_or_default()
            .windows(2)
            .position(|w| w[0] == b'\n' && w[1].is_ascii_alphabetic())
            .map(|i| from + i + 1);
        match found {
            Some(cut) if cut < text.len() => cuts.push(cut),
            _ => break,
        }
    }
    cuts
}

/// Line breaks as the lexer counts them: `\r\n`, `\n` and a lone `\r`.
pub(super) fn count_line_breaks(text: &str) -> usize {
    let bytes = text.as_bytes();
    if memchr::memchr(b'\r', bytes).is_none() {
        return memchr::memchr_iter(b'\n', bytes).count();
    }
    let mut n = 0;
    for (i, b) in bytes.iter().enumerate() {
        match b {
            b'\n' => n += 1,
            b'\r' if bytes.get(i + 1) != Some(&b'\n') => n += 1,
            _ => {}
        }
    }
    n
}

/// Parse `text[start..end]`, a run of whole lines starting at line
/// `first_line`, with spans into the whole text.
pub(super) fn parse_range(text: &str, start: usize, end: usize, first_line: usize) -> SourceFile {
    parse_range_with_room(
        text,
        start,
        end,
        first_line,
        count_headers(&text[start..end]),
    )
}

/// [`parse_range`] with room made for `room` statements.
fn parse_range_with_room(
    text: &str,
    start: usize,
    end: usize,
    first_line: usize,
    room: usize,
) -> SourceFile {
    // Sized once: a large file's statements grown by doubling were copied
    // some three times over into memory fresh from the system.
    let mut file = SourceFile::default();
    file.statements.reserve_exact(room);
    let mut parser = Parser {
        text,
        file,
        current: None,
        skipping: false,
        scratch: Vec::new(),
    };
    // One line's lexemes at a time: a file's tokens are never all held.
    let mut line: Vec<Lexeme> = Vec::new();
    let mut line_no = first_line;
    for mut lexeme in lexemes(&text[start..end]) {
        lexeme.span = lexeme.span.offset(start);
        if lexeme.token == Token::Newline {
            parser.line(&line, line_no);
            line.clear();
            line_no += 1;
        } else {
            line.push(lexeme);
        }
    }
    parser.line(&line, line_no);
    parser.finish_statement();
    parser.file.comments.shrink_to_fit();
    parser.file
}

/// Lines that begin with an ASCII letter, as a statement's header does: room
/// for the statements of a text (a header after a byte order mark is not
/// counted; the vector then grows).
fn count_headers(text: &str) -> usize {
    let bytes = text.as_bytes();
    let first = usize::from(bytes.first().is_some_and(u8::is_ascii_alphabetic));
    first
        + memchr::memchr_iter(b'\n', bytes)
            .filter(|&i| bytes.get(i + 1).is_some_and(u8::is_ascii_alphabetic))
            .count()
}

struct Parser<'t> {
    text: &'t str,
    file: SourceFile,
    current: Option<Statement>,
    /// True after a broken header: its continuation lines are skipped.
    skipping: bool,
    /// The tokens of the line being read, without spaces and comments.
    scratch: Vec<Lexeme>,
}

/// Parse one equation on its own (for `stoik balance`), with errors.
pub fn parse_equation(text: &str) -> (Option<Equation>, Vec<SyntaxError>) {
    let lexemes: Vec<Lexeme> = lex(text)
        .into_iter()
        .filter(|l| l.token != Token::Space)
        .collect();
    let mut parser = Parser {
        text,
        file: SourceFile::default(),
        current: None,
        skipping: false,
        scratch: Vec::new(),
    };
    let eq = parser.equation(&lexemes, Span::empty(0));
    (eq, parser.file.errors)
}

impl<'t> Parser<'t> {
    fn error(&mut self, span: Span, message: impl Into<String>, help: Option<String>) {
        self.file.errors.push(SyntaxError {
            span,
            message: message.into(),
            help,
        });
    }

    fn slice(&self, span: Span) -> &'t str {
        &self.text[span.range()]
    }

    fn finish_statement(&mut self) {
        if let Some(mut statement) = self.current.take() {
            // Vectors grown by pushing keep room for more; a library holds
            // a hundred thousand statements, so the room is given back.
            statement.attributes.shrink_to_fit();
            if let StatementKind::Reaction {
                equation: Some(eq), ..
            } = &mut statement.kind
            {
                eq.left.shrink_to_fit();
                eq.right.shrink_to_fit();
            }
            self.file.statements.push(statement);
        }
    }

    fn line(&mut self, lexemes: &[Lexeme], line_no: usize) {
        // A byte order mark (U+FEFF, zero width) is no indentation.
        let indented = matches!(lexemes.first(), Some(l) if l.token == Token::Space
            && !self.text[l.span.range()].chars().all(|c| c == '\u{feff}'));
        // The buffer is reused from line to line.
        let mut tokens = std::mem::take(&mut self.scratch);
        tokens.clear();
        for l in lexemes {
            match l.token {
                Token::Space => {}
                Token::Comment => {
                    let own_line = tokens.is_empty();
                    self.file.comments.push(Comment {
                        span: l.span,
                        line: line_no,
                        own_line,
                    });
                }
                _ => tokens.push(*l),
            }
        }
        if !tokens.is_empty() {
            if indented {
                self.continuation(&tokens, line_no);
            } else {
                self.finish_statement();
                self.skipping = false;
                self.header(&tokens, line_no);
            }
        }
        self.scratch = tokens;
    }

    fn continuation(&mut self, tokens: &[Lexeme], line_no: usize) {
        if self.skipping {
            return;
        }
        let attributes = self.attributes(tokens, false);
        match self.current.as_mut() {
            Some(statement) => {
                if let Some(last) = tokens.last() {
                    statement.span = statement.span.cover(last.span);
                }
                statement.last_line = line_no;
                // Most statements have a few attribute lines: the first
                // line's vector is taken as it is and a few more are added
                // exactly, so that the shrinking when the statement ends
                // has nothing to copy; longer runs grow as usual.
                if statement.attributes.is_empty() {
                    statement.attributes = attributes;
                } else {
                    if statement.attributes.len() < 4 {
                        statement.attributes.reserve_exact(attributes.len());
                    }
                    statement.attributes.extend(attributes);
                }
            }
            None => {
                let span = tokens[0].span.cover(tokens[tokens.len() - 1].span);
                self.error(
                    span,
                    "an indented line continues a statement, but no statement comes before it",
                    Some(
                        "start the statement at column 0 with a keyword such as `reaction`".into(),
                    ),
                );
            }
        }
    }

    fn header(&mut self, tokens: &[Lexeme], line_no: usize) {
        let first = tokens[0];
        let keyword = self.slice(first.span);
        let end = tokens[tokens.len() - 1].span.end();
        let rest = &tokens[1..];
        let (kind, attributes) = match (first.token, keyword) {
            (Token::Word, "units") => (StatementKind::Units, self.attributes(rest, true)),
            (Token::Word, "use") => self.use_header(first.span, rest),
            (Token::Word, "species") => self.species_header(first.span, rest),
            (Token::Word, "reaction") => self.reaction_header(first.span, rest),
            (Token::Word, "mixture") => self.mixture_header(first.span, rest),
            _ => {
                self.unknown_statement(first.span, keyword, tokens);
                self.skipping = true;
                return;
            }
        };
        self.current = Some(Statement {
            kind,
            keyword: first.span,
            span: Span::new(first.span.start(), end),
            line: line_no,
            last_line: line_no,
            attributes,
        });
    }

    fn unknown_statement(&mut self, span: Span, word: &str, tokens: &[Lexeme]) {
        let lower = word.to_lowercase();
        let nearest = KEYWORDS
            .iter()
            .map(|k| (strsim::levenshtein(k, &lower), *k))
            .min()
            .filter(|(d, _)| *d <= 2)
            .map(|(_, k)| k);
        let help = match nearest {
            Some(k) => Some(format!("did you mean `{k}`?")),
            None if tokens.iter().any(|t| {
                matches!(
                    t.token,
                    Token::Reversible | Token::Forward | Token::Resonance
                )
            }) =>
            {
                Some("write a reaction as `reaction: A + B <=> C`".to_string())
            }
            None if tokens.iter().any(|t| t.token == Token::Eq) => Some(
                "indent an attribute line so that it continues the statement above".to_string(),
            ),
            None => Some(
                "statements start with `units`, `use`, `species`, `reaction` or `mixture`".into(),
            ),
        };
        self.error(
            span,
            format!("`{}` does not start a statement", truncate(word, 40)),
            help,
        );
    }

    fn use_header(&mut self, keyword: Span, rest: &[Lexeme]) -> (StatementKind, Vec<Attribute>) {
        let mut path = None;
        match rest.first() {
            Some(l) if l.token == Token::Str => {
                path = Some(StringLit {
                    value: unescape(self.slice(l.span)),
                    span: l.span,
                });
                if let Some(extra) = rest.get(1) {
                    let span = extra.span.cover(rest[rest.len() - 1].span);
                    self.error(span, "unexpected text after the `use` path", None);
                }
            }
            Some(l) if l.token == Token::UnterminatedStr => {
                self.error(
                    l.span,
                    "this string is not closed",
                    Some("add the closing `\"`".into()),
                );
            }
            Some(l) => {
                let span = l.span.cover(rest[rest.len() - 1].span);
                self.error(
                    span,
                    "`use` takes a path in double quotes",
                    Some(format!("write `use \"{}\"`", self.slice(span))),
                );
            }
            None => self.error(
                keyword,
                "`use` needs a path",
                Some("write `use \"other.stoik\"`".into()),
            ),
        }
        (StatementKind::Use { path }, Vec::new())
    }

    fn species_header(
        &mut self,
        keyword: Span,
        rest: &[Lexeme],
    ) -> (StatementKind, Vec<Attribute>) {
        let (head, attrs) = split_at_semi(rest);
        let attributes = attrs.map(|a| self.attributes(a, false)).unwrap_or_default();
        let word = |l: &Lexeme| l.token == Token::Word;
        let (alias, formula) = match head {
            [f] if word(f) => (None, Some(self.name(f.span))),
            [a, e, f] if word(a) && e.token == Token::Eq && word(f) => {
                (Some(self.name(a.span)), Some(self.name(f.span)))
            }
            [] => {
                self.error(
                    keyword,
                    "`species` needs a formula",
                    Some("write `species NH3(g)` or `species ethanol = C2H5OH(l)`".into()),
                );
                (None, None)
            }
            [a, e] if word(a) && e.token == Token::Eq => {
                self.error(
                    e.span,
                    "a formula must follow `=`",
                    Some(format!("write `species {} = FORMULA`", self.slice(a.span))),
                );
                (Some(self.name(a.span)), None)
            }
            _ => {
                let span = head[0].span.cover(head[head.len() - 1].span);
                self.error(
                    span,
                    "expected a formula, or an alias, `=` and a formula",
                    Some("put further data on indented lines below, or after `;`".into()),
                );
                (None, None)
            }
        };
        (StatementKind::Species { alias, formula }, attributes)
    }

    fn reaction_header(
        &mut self,
        keyword: Span,
        rest: &[Lexeme],
    ) -> (StatementKind, Vec<Attribute>) {
        let (head, attrs) = split_at_semi(rest);
        let attributes = attrs.map(|a| self.attributes(a, false)).unwrap_or_default();
        let colon = head.iter().position(|l| l.token == Token::Colon);
        let (label, eq_tokens) = match colon {
            Some(0) => (None, &head[1..]),
            Some(1) if head[0].token == Token::Word => {
                let label = self.name(head[0].span);
                self.check_label(&label);
                (Some(label), &head[2..])
            }
            Some(i) => {
                let span = head[0].span.cover(head[i - 1].span);
                self.error(
                    span,
                    "a reaction label is one word of letters, digits, `_` and `-`",
                    Some("write `reaction LABEL: EQUATION`".into()),
                );
                (None, &head[i + 1..])
            }
            None => {
                // `reaction flare H2 + Cl2 -> 2 HCl`: a label with its colon
                // forgotten, when the second word is no `+` or arrow.
                let labelled = head.len() >= 3
                    && head[0].token == Token::Word
                    && head[1].token == Token::Word
                    && self.slice(head[1].span) != "+"
                    && coefficient_prefix(self.slice(head[0].span)) == 0
                    && self
                        .slice(head[0].span)
                        .chars()
                        .next()
                        .is_some_and(|c| c.is_lowercase());
                if labelled {
                    let label = self.name(head[0].span);
                    self.error(
                        Span::empty(label.span.end()),
                        format!(
                            "expected `:` after the label `{}`",
                            truncate(&label.text, 30)
                        ),
                        Some(format!(
                            "write `reaction {}: ...`",
                            truncate(&label.text, 30)
                        )),
                    );
                    (Some(label), &head[1..])
                } else {
                    self.error(
                        Span::empty(keyword.end()),
                        "expected `:` before the equation",
                        Some("write `reaction: A <=> B` or `reaction LABEL: A <=> B`".into()),
                    );
                    (None, head)
                }
            }
        };
        let equation = if eq_tokens.is_empty() {
            let at = head.last().map(|l| l.span).unwrap_or(keyword);
            self.error(
                Span::empty(at.end()),
                "the reaction has no equation",
                Some("write the equation after `:`, for example `reaction: A <=> B`".into()),
            );
            None
        } else {
            self.equation(eq_tokens, keyword)
        };
        (StatementKind::Reaction { label, equation }, attributes)
    }

    fn check_label(&mut self, label: &Name) {
        let ok = label.text.chars().next().is_some_and(|c| c.is_alphabetic())
            && label
                .text
                .chars()
                .all(|c| c.is_alphanumeric() || c == '_' || c == '-');
        if !ok {
            self.error(
                label.span,
                "a reaction label starts with a letter and has only letters, digits, `_` and `-`",
                None,
            );
        }
    }

    fn mixture_header(
        &mut self,
        keyword: Span,
        rest: &[Lexeme],
    ) -> (StatementKind, Vec<Attribute>) {
        let (head, attrs) = split_at_semi(rest);
        let attributes = attrs.map(|a| self.attributes(a, false)).unwrap_or_default();
        let name = match head {
            [n] if n.token == Token::Word => Some(self.name(n.span)),
            [] => {
                self.error(
                    keyword,
                    "a mixture needs a name",
                    Some("write `mixture feed`".into()),
                );
                None
            }
            _ => {
                let span = head[0].span.cover(head[head.len() - 1].span);
                self.error(
                    span,
                    "a mixture name is one word",
                    Some("put its contents on indented lines below".into()),
                );
                None
            }
        };
        (StatementKind::Mixture { name }, attributes)
    }

    fn name(&self, span: Span) -> Name {
        Name {
            text: CompactString::from(self.slice(span)),
            span,
        }
    }

    /// `name = value` items separated by `;` (and by `,` when `commas`).
    fn attributes(&mut self, tokens: &[Lexeme], commas: bool) -> Vec<Attribute> {
        let is_sep = |t: Token| t == Token::Semi || (commas && t == Token::Comma);
        let mut out = Vec::with_capacity(tokens.iter().filter(|l| is_sep(l.token)).count() + 1);
        for item in tokens.split(|l| is_sep(l.token)) {
            if item.is_empty() {
                continue;
            }
            if let Some(attribute) = self.attribute(item) {
                out.push(attribute);
            }
        }
        out
    }

    fn attribute(&mut self, item: &[Lexeme]) -> Option<Attribute> {
        let whole = item[0].span.cover(item[item.len() - 1].span);
        let name_tok = item[0];
        if name_tok.token != Token::Word {
            self.error(
                name_tok.span,
                format!(
                    "expected an attribute name, found `{}`",
                    truncate(self.slice(name_tok.span), 20)
                ),
                Some("write `name = value`".into()),
            );
            return None;
        }
        let name = self.name(name_tok.span);
        match item.get(1) {
            Some(l) if l.token == Token::Eq => {}
            Some(l) => {
                self.error(
                    l.span,
                    format!("expected `=` after `{}`", truncate(&name.text, 30)),
                    Some(format!("write `{} = value`", truncate(&name.text, 30))),
                );
                return None;
            }
            None => {
                self.error(
                    Span::empty(name.span.end()),
                    format!("`{}` needs `= value`", truncate(&name.text, 30)),
                    None,
                );
                return None;
            }
        }
        let value_tokens = &item[2..];
        let value = if value_tokens.is_empty() {
            self.error(
                Span::empty(item[1].span.end()),
                format!("`{}` has no value after `=`", truncate(&name.text, 30)),
                None,
            );
            Value {
                kind: ValueKind::Missing,
                span: Span::empty(item[1].span.end()),
            }
        } else {
            if let Some(bad) = value_tokens
                .iter()
                .find(|l| !matches!(l.token, Token::Word | Token::Str | Token::Comma | Token::Eq))
            {
                let message = match bad.token {
                    Token::UnterminatedStr => "this string is not closed".to_string(),
                    _ => format!(
                        "unexpected `{}` in a value",
                        truncate(self.slice(bad.span), 20)
                    ),
                };
                self.error(bad.span, message, None);
                return None;
            }
            let span = value_tokens[0]
                .span
                .cover(value_tokens[value_tokens.len() - 1].span);
            match parse_value(self.slice(span), span.start()) {
                Ok(v) => v,
                Err(e) => {
                    self.file.errors.push(e);
                    return None;
                }
            }
        };
        Some(Attribute {
            name,
            value,
            span: whole,
        })
    }

    /// Parse the tokens of an equation.
    fn equation(&mut self, tokens: &[Lexeme], anchor: Span) -> Option<Equation> {
        // Glued `A->B` lexes as `A-` then `>`: split the `-` back off.
        let mut items: Vec<Lexeme> = Vec::with_capacity(tokens.len());
        let mut i = 0;
        while i < tokens.len() {
            let t = tokens[i];
            if t.token == Token::Word
                && self.slice(t.span).ends_with('-')
                && t.span.len() > 1
                && matches!(tokens.get(i + 1), Some(n) if n.token == Token::Gt && n.span.start() == t.span.end())
            {
                items.push(Lexeme {
                    token: Token::Word,
                    span: Span::new(t.span.start(), t.span.end() - 1),
                });
                items.push(Lexeme {
                    token: Token::Forward,
                    span: Span::new(t.span.end() - 1, t.span.end() + 1),
                });
                i += 2;
                continue;
            }
            items.push(t);
            i += 1;
        }
        let arrows: Vec<usize> = items
            .iter()
            .enumerate()
            .filter(|(_, l)| {
                matches!(
                    l.token,
                    Token::Reversible | Token::Forward | Token::Resonance | Token::Eq
                )
            })
            .map(|(i, _)| i)
            .collect();
        let span = match (items.first(), items.last()) {
            (Some(a), Some(b)) => a.span.cover(b.span),
            _ => Span::empty(anchor.end()),
        };
        let Some(&at) = arrows.first() else {
            self.error(
                span,
                "an equation needs an arrow between its two sides",
                Some("use `<=>` for an equilibrium or `->` for a forward-only reaction".into()),
            );
            return None;
        };
        if let Some(&second) = arrows.get(1) {
            self.error(
                items[second].span,
                "an equation has one arrow; this is a second one",
                Some("write each step as a reaction of its own".into()),
            );
            return None;
        }
        let arrow_lex = items[at];
        let kind = match arrow_lex.token {
            Token::Reversible => ArrowKind::Reversible,
            Token::Forward => ArrowKind::Forward,
            Token::Resonance => ArrowKind::Resonance,
            _ => ArrowKind::Equals,
        };
        let arrow = Arrow {
            kind,
            span: arrow_lex.span,
        };
        let left = self.side(&items[..at], arrow.span, "left");
        let right = self.side(&items[at + 1..], arrow.span, "right");
        let (left, right) = (left?, right?);
        Some(Equation {
            left,
            arrow,
            right,
            span,
        })
    }

    fn side(&mut self, items: &[Lexeme], arrow: Span, which: &str) -> Option<Vec<Term>> {
        if items.is_empty() {
            let at = if which == "left" {
                arrow.start()
            } else {
                arrow.end()
            };
            self.error(
                Span::empty(at),
                format!("the {which} side of the equation is empty"),
                None,
            );
            return None;
        }
        // One term per joining `+`, and one more.
        let joins = items
            .iter()
            .filter(|l| l.token == Token::Word && self.slice(l.span) == "+")
            .count();
        let mut terms = Vec::with_capacity(joins + 1);
        let mut ok = true;
        let mut i = 0;
        let mut expect_term = true;
        while i < items.len() {
            let l = items[i];
            let text = self.slice(l.span);
            if l.token != Token::Word {
                self.error(
                    l.span,
                    format!("unexpected `{}` in an equation", truncate(text, 20)),
                    None,
                );
                return None;
            }
            if text.starts_with('+') && text.len() > 1 {
                self.error(
                    Span::new(l.span.start(), l.span.start() + 1),
                    "the `+` that joins two terms needs whitespace on both sides",
                    Some("write `A + B`; a `+` touching a formula is read as a charge".into()),
                );
                ok = false;
                i += 1;
                continue;
            }
            if expect_term {
                if text == "+" {
                    self.error(l.span, "a `+` with no term before it", None);
                    ok = false;
                    i += 1;
                    continue;
                }
                match self.term(items, &mut i) {
                    Some(term) => terms.push(term),
                    None => ok = false,
                }
                expect_term = false;
            } else {
                if text == "+" {
                    expect_term = true;
                    i += 1;
                    if i == items.len() {
                        self.error(l.span, "a `+` with no term after it", None);
                        ok = false;
                    }
                    continue;
                }
                let prev = items[i - 1].span;
                self.error(
                    Span::new(prev.end(), l.span.start()),
                    "expected ` + ` between two terms",
                    Some(format!(
                        "write `{} + {}`; a `+` touching a formula is read as a charge",
                        truncate(self.slice(prev), 20),
                        truncate(text, 20)
                    )),
                );
                ok = false;
                expect_term = true;
            }
        }
        ok.then_some(terms)
    }

    /// A term starting at `items[*i]`, with a separate or glued coefficient.
    fn term(&mut self, items: &[Lexeme], i: &mut usize) -> Option<Term> {
        let l = items[*i];
        let text = self.slice(l.span);
        *i += 1;
        let split = coefficient_prefix(text);
        if split == text.len() {
            // A bare coefficient: the species is the next word.
            let coefficient = self.coefficient(text, l.span)?;
            match items.get(*i) {
                Some(n) if n.token == Token::Word && self.slice(n.span) != "+" => {
                    *i += 1;
                    Some(Term {
                        coefficient: Some(coefficient),
                        species: self.name(n.span),
                        span: l.span.cover(n.span),
                    })
                }
                _ => {
                    self.error(
                        Span::empty(l.span.end()),
                        format!(
                            "the coefficient `{}` has no species after it",
                            truncate(text, 20)
                        ),
                        None,
                    );
                    None
                }
            }
        } else if split > 0 {
            let cspan = Span::new(l.span.start(), l.span.start() + split);
            let coefficient = self.coefficient(&text[..split], cspan)?;
            Some(Term {
                coefficient: Some(coefficient),
                species: Name {
                    text: CompactString::from(&text[split..]),
                    span: Span::new(cspan.end(), l.span.end()),
                },
                span: l.span,
            })
        } else {
            Some(Term {
                coefficient: None,
                species: self.name(l.span),
                span: l.span,
            })
        }
    }

    fn coefficient(&mut self, text: &str, span: Span) -> Option<Coefficient> {
        match parse_coefficient(text) {
            Ok(value) if *value.numer() == 0 => {
                self.error(
                    span,
                    "a coefficient of zero",
                    Some("leave the species out instead".into()),
                );
                None
            }
            Ok(value) => Some(Coefficient { value, span }),
            Err(message) => {
                self.error(span, message, None);
                None
            }
        }
    }
}

fn split_at_semi(tokens: &[Lexeme]) -> (&[Lexeme], Option<&[Lexeme]>) {
    match tokens.iter().position(|l| l.token == Token::Semi) {
        Some(i) => (&tokens[..i], Some(&tokens[i + 1..])),
        None => (tokens, None),
    }
}

/// Length of the leading coefficient of a word (`2`, `1/2`, `0.5`), 0 if none.
pub fn coefficient_prefix(text: &str) -> usize {
    let bytes = text.as_bytes();
    let digits = |from: usize| {
        let mut j = from;
        while j < bytes.len() && bytes[j].is_ascii_digit() {
            j += 1;
        }
        j
    };
    let mut end = digits(0);
    if end == 0 {
        return 0;
    }
    if end < bytes.len() && (bytes[end] == b'.' || bytes[end] == b'/') {
        let after = digits(end + 1);
        if after > end + 1 {
            end = after;
        }
    }
    end
}

/// The exact value of a coefficient: an integer, a decimal or a fraction.
pub fn parse_coefficient(text: &str) -> Result<Ratio<i64>, String> {
    let too_big = || format!("the coefficient `{}` is too large", truncate(text, 30));
    if let Some((n, d)) = text.split_once('/') {
        let n: i64 = n.parse().map_err(|_| too_big())?;
        let d: i64 = d.parse().map_err(|_| too_big())?;
        if d == 0 {
            return Err("a coefficient cannot divide by zero".into());
        }
        return Ok(Ratio::new(n, d));
    }
    if let Some((whole, frac)) = text.split_once('.') {
        if frac.len() > 17 {
            return Err(too_big());
        }
        let scale = 10i64.pow(frac.len() as u32);
        let w: i64 = whole.parse().map_err(|_| too_big())?;
        let f: i64 = frac.parse().map_err(|_| too_big())?;
        let n = w
            .checked_mul(scale)
            .and_then(|x| x.checked_add(f))
            .ok_or_else(too_big)?;
        return Ok(Ratio::new(n, scale));
    }
    text.parse::<i64>()
        .map(Ratio::from_integer)
        .map_err(|_| too_big())
}

/// The value of a string literal without its quotes and escapes.
pub fn unescape(literal: &str) -> String {
    let inner = literal
        .strip_prefix('"')
        .unwrap_or(literal)
        .strip_suffix('"')
        .unwrap_or(literal);
    let mut out = String::with_capacity(inner.len());
    let mut chars = inner.chars();
    while let Some(c) = chars.next() {
        if c == '\\' {
            match chars.next() {
                Some('n') => out.push('\n'),
                Some('t') => out.push('\t'),
                Some(other) => out.push(other),
                None => {}
            }
        } else {
            out.push(c);
        }
    }
    out
}

/// At most `max` characters of `s`, with an ellipsis when cut.
pub fn truncate(s: &str, max: usize) -> String {
    match s.char_indices().nth(max) {
        Some((i, _)) => format!("{}…", &s[..i]),
        None => s.to_string(),
    }
}

#[cfg(test)]
pub(super) mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Lines of the notation, good and broken.
    pub(in crate::syntax) fn line() -> impl Strategy<Value = String> {
        prop_oneof![
            Just("reaction r1: H2(g) + Cl2(g) <=> 2 HCl(g)".to_string()),
            Just("reaction: A <=> B ; K = 3".to_string()),
            Just("  K = 1.0e-3 at 700 K".to_string()),
            Just("  dH = 12 kJ/mol # trailing".to_string()),
            Just("species water = H2O(l)".to_string()),
            Just("# a comment on its own line".to_string()),
            Just("   # an indented comment".to_string()),
            Just("  ".to_string()),
            Just(String::new()),
            Just("\u{feff}units energy = kJ/mol".to_string()),
            Just("reaction broken <=>".to_string()),
            Just("  orphan = 1".to_string()),
            Just("mixture feed".to_string()),
            Just("  H2(g) = 1 mol/L".to_string()),
            Just("  \"open string".to_string()),
            "[a-z =<>#:;,\"0-9()+-]{0,30}",
        ]
    }

    fn file() -> impl Strategy<Value = String> {
        file_of(line())
    }

    /// Files of up to 60 lines drawn from `line`, with every kind of line
    /// end.
    pub(in crate::syntax) fn file_of(
        line: impl Strategy<Value = String>,
    ) -> impl Strategy<Value = String> {
        proptest::collection::vec(
            (line, prop_oneof![Just("\n"), Just("\r\n"), Just("\r")]),
            0..60,
        )
        .prop_map(|lines| lines.into_iter().map(|(l, e)| l + e).collect())
    }

    proptest! {
        #[test]
        fn pieces_parse_like_one_pass(text in file(), workers in 2usize..6) {
            let whole = parse_range(&text, 0, text.len(), 0);
            let pieces = parse_in_pieces(&text, 1, workers);
            prop_assert_eq!(format!("{:?}", pieces), format!("{:?}", whole));
        }
    }

    #[test]
    fn cuts_fall_before_headers() {
        let text = "reaction: A <=> B\n  K = 1\n# note\nreaction: B <=> C\n  K = 2\n";
        let cuts = header_cuts(text, 2);
        assert_eq!(cuts.len(), 2);
        assert!(text[cuts[1]..].starts_with("reaction: B"));
        assert_eq!(count_line_breaks("a\r\nb\rc\n"), 3);
    }
}
