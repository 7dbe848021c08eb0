//! The formatter's safety check: does a rewritten statement still say the
//! same thing?
//!
//! Two texts mean the same when they have the same tokens apart from layout
//! (whitespace at a comment's end is layout) and the parser reads the same
//! statements, equations, attribute values and errors from them. Spans and
//! line numbers are left out of the comparison, since moving text is the
//! formatter's job. Inside unit and word values a run of spaces and tabs
//! counts as one space, because the unit reader treats any such run alike.

use super::layout::is_space;
use crate::syntax::ast::{Attribute, Quantity, SourceFile, StatementKind, Term, ValueKind};
use crate::syntax::lexer::{Token, lex};
use crate::syntax::parse;
use std::fmt::Write;

/// True when `after` has the tokens and the parsed meaning of `before`.
pub fn same_meaning(before: &str, after: &str) -> bool {
    same_tokens(before, after) && describe(&parse(before)) == describe(&parse(after))
}

/// Compare the non-layout tokens and their text.
fn same_tokens(before: &str, after: &str) -> bool {
    let significant = |text: &str| {
        lex(text)
            .into_iter()
            .filter(|l| !matches!(l.token, Token::Space | Token::Newline))
            .map(|l| {
                let piece = &text[l.span.range()];
                let piece = match l.token {
                    Token::Comment => piece.trim_end_matches(is_space),
                    _ => piece,
                };
                (l.token, piece.to_string())
            })
            .collect::<Vec<_>>()
    };
    significant(before) == significant(after)
}

/// A span-free account of everything the parser read.
fn describe(file: &SourceFile) -> String {
    let mut out = String::new();
    for s in &file.statements {
        match &s.kind {
            StatementKind::Units => out.push_str("units"),
            StatementKind::Use { path } => {
                let _ = write!(out, "use {:?}", path.as_ref().map(|p| &p.value));
            }
            StatementKind::Species { alias, formula } => {
                let _ = write!(
                    out,
                    "species {:?} {:?}",
                    alias.as_ref().map(|n| &n.text),
                    formula.as_ref().map(|n| &n.text)
                );
            }
            StatementKind::Reaction { label, equation } => {
                let _ = write!(out, "reaction {:?}", label.as_ref().map(|n| &n.text));
                if let Some(eq) = equation {
                    terms(&mut out, &eq.left);
                    let _ = write!(out, " {:?}", eq.arrow.kind);
                    terms(&mut out, &eq.right);
                }
            }
            StatementKind::Mixture { name } => {
                let _ = write!(out, "mixture {:?}", name.as_ref().map(|n| &n.text));
            }
        }
        attributes(&mut out, &s.attributes);
        out.push('\n');
    }
    for e in &file.errors {
        let _ = writeln!(out, "error {:?} {:?}", e.message, e.help);
    }
    out
}

fn terms(out: &mut String, terms: &[Term]) {
    for t in terms {
        let c = t.coefficient_value();
        let _ = write!(out, " {}/{} {:?}", c.numer(), c.denom(), t.species.text);
    }
}

fn attributes(out: &mut String, list: &[Attribute]) {
    for a in list {
        let _ = write!(out, " [{:?} = ", a.name.text);
        match &a.value.kind {
            ValueKind::Quantity(q) => quantity(out, q),
            ValueKind::Text(t) => {
                let _ = write!(out, "text {t:?}");
            }
            ValueKind::Arrhenius(args) => {
                out.push_str("arrhenius");
                attributes(out, args);
            }
            ValueKind::Word(w) => {
                let _ = write!(out, "word {:?}", squash(w));
            }
            ValueKind::Missing => out.push_str("missing"),
        }
        out.push(']');
    }
}

fn quantity(out: &mut String, q: &Quantity) {
    let _ = write!(
        out,
        "{:x} {:?}",
        q.number.to_bits(),
        q.unit.as_ref().map(|u| squash(&u.text))
    );
    if let Some(at) = &q.at {
        out.push_str(" at ");
        quantity(out, at);
    }
}

/// Runs of spaces and tabs as one space.
fn squash(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let mut in_run = false;
    for c in text.chars() {
        if c == ' ' || c == '\t' {
            if !in_run {
                out.push(' ');
            }
            in_run = true;
        } else {
            out.push(c);
            in_run = false;
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn layout_alone_keeps_meaning() {
        assert!(same_meaning(
            "reaction a:A<=>B\n K=1  at  298 K",
            "reaction a: A <=> B\n  K = 1 at 298 K"
        ));
    }

    #[test]
    fn a_changed_string_or_unit_is_caught() {
        assert!(!same_meaning(
            "species A\n  source = \"a\"  \"b\"",
            "species A\n  source = \"a\" \"b\""
        ));
        assert!(!same_meaning(
            "reaction: A <=> B\n  K = 1=2",
            "reaction: A <=> B\n  K = 1 = 2"
        ));
        assert!(!same_meaning("reaction: A <=> B # x", "reaction: A <=> B"));
    }
}
