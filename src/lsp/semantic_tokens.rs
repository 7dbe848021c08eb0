//! Semantic tokens: keywords, the parts of a formula (elements, counts,
//! charges, phase tags), arrows, numbers, units, strings and comments.
//!
//! The coarse classes come from the lexer; the fine ones from the syntax
//! tree, which knows which words are species, numbers and units.

use super::snapshot::Snapshot;
use crate::chem::formula::looks_like_formula;
use crate::span::Span;
use crate::syntax::ast::{Attribute, Quantity, StatementKind, ValueKind};
use crate::syntax::lexer::{Token, lex};
use crate::syntax::line_index::Encoding;
use tower_lsp_server::ls_types as lsp;

/// Token types in legend order.
pub const TYPES: &[&str] = &[
    "keyword", "element", "number", "charge", "phase", "arrow", "unit", "string", "comment",
    "property", "variable",
];

#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub enum Class {
    Keyword = 0,
    Element,
    Number,
    Charge,
    Phase,
    Arrow,
    Unit,
    Str,
    Comment,
    Property,
    Variable,
}

pub fn legend() -> lsp::SemanticTokensLegend {
    lsp::SemanticTokensLegend {
        token_types: TYPES
            .iter()
            .map(|t| lsp::SemanticTokenType::new(t))
            .collect(),
        token_modifiers: Vec::new(),
    }
}

fn is_superscript_charge(c: char) -> bool {
    matches!(
        c,
        '⁰' | '¹' | '²' | '³' | '⁴' | '⁵' | '⁶' | '⁷' | '⁸' | '⁹' | '⁺' | '⁻'
    )
}

fn is_count(c: char) -> bool {
    c.is_ascii_digit() || c == '.' || ('₀'..='₉').contains(&c)
}

/// Split a species token into classified pieces (offsets relative to it).
pub fn formula_pieces(text: &str) -> Vec<(Span, Class)> {
    let mut out = Vec::new();
    if !looks_like_formula(text) {
        out.push((Span::new(0, text.len()), Class::Variable));
        return out;
    }
    if matches!(text, "e-" | "hv" | "hν" | "M") {
        out.push((Span::new(0, text.len()), Class::Element));
        return out;
    }
    // The phase tag at the end.
    let mut body_end = text.len();
    for tag in ["(g)", "(l)", "(s)", "(aq)"] {
        if text.ends_with(tag) {
            body_end = text.len() - tag.len();
            out.push((Span::new(body_end, text.len()), Class::Phase));
            break;
        }
    }
    let body = &text[..body_end];
    // The charge: from `^`, or a trailing sign with digits after it, or
    // trailing superscripts.
    let mut charge_start = body.find('^').unwrap_or(body.len());
    if charge_start == body.len() {
        let trimmed = body.trim_end_matches(|c: char| c.is_ascii_digit());
        if trimmed.ends_with(['+', '-']) {
            charge_start = trimmed.len() - 1;
            // `Fe3+`: the digits of a monatomic shorthand belong to the charge.
            let before = &body[..charge_start];
            let digits = before.trim_end_matches(|c: char| c.is_ascii_digit());
            if trimmed.len() == body.len()
                && digits.len() < before.len()
                && digits.chars().filter(char::is_ascii_uppercase).count() == 1
                && digits.chars().all(|c| c.is_ascii_alphabetic())
            {
                charge_start = digits.len();
            }
        } else {
            let sup = body.trim_end_matches(is_superscript_charge);
            charge_start = sup.len();
        }
    }
    if charge_start < body.len() {
        out.push((Span::new(charge_start, body.len()), Class::Charge));
    }
    let core = &body[..charge_start];
    let mut chars = core.char_indices().peekable();
    while let Some((i, c)) = chars.next() {
        if c.is_ascii_uppercase() {
            let mut end = i + 1;
            while let Some((j, d)) = chars.peek().copied() {
                if d.is_ascii_lowercase() {
                    end = j + 1;
                    chars.next();
                } else {
                    break;
                }
            }
            out.push((Span::new(i, end), Class::Element));
        } else if is_count(c) {
            let mut end = i + c.len_utf8();
            while let Some((j, d)) = chars.peek().copied() {
                if is_count(d) {
                    end = j + d.len_utf8();
                    chars.next();
                } else {
                    break;
                }
            }
            out.push((Span::new(i, end), Class::Number));
        }
    }
    out.sort_by_key(|(s, _)| s.start());
    out
}

fn quantity(q: &Quantity, out: &mut Vec<(Span, Class)>) {
    out.push((q.number_span, Class::Number));
    if let Some(u) = &q.unit {
        out.push((u.span, Class::Unit));
    }
    if let Some(at) = &q.at {
        quantity(at, out);
    }
}

fn attribute(
    a: &Attribute,
    name_class: Class,
    units_statement: bool,
    out: &mut Vec<(Span, Class)>,
) {
    if name_class == Class::Element {
        for (s, c) in formula_pieces(&a.name.text) {
            out.push((s.offset(a.name.span.start()), c));
        }
    } else {
        out.push((a.name.span, name_class));
    }
    match &a.value.kind {
        ValueKind::Quantity(q) => quantity(q, out),
        ValueKind::Arrhenius(args) => {
            for arg in args {
                attribute(arg, Class::Property, false, out);
            }
        }
        ValueKind::Word(_) if units_statement => out.push((a.value.span, Class::Unit)),
        _ => {}
    }
}

/// Every classified span of a document, sorted, not overlapping.
pub fn classify(text: &str, syntax: &crate::syntax::ast::SourceFile) -> Vec<(Span, Class)> {
    let mut out = Vec::new();
    for l in lex(text) {
        let class = match l.token {
            Token::Comment => Class::Comment,
            Token::Str | Token::UnterminatedStr => Class::Str,
            Token::Reversible | Token::Forward | Token::Resonance => Class::Arrow,
            _ => continue,
        };
        out.push((l.span, class));
    }
    for s in &syntax.statements {
        out.push((s.keyword, Class::Keyword));
        let units = matches!(s.kind, StatementKind::Units);
        match &s.kind {
            StatementKind::Species { alias, formula } => {
                if let Some(a) = alias {
                    out.push((a.span, Class::Variable));
                }
                if let Some(f) = formula {
                    for (sp, c) in formula_pieces(&f.text) {
                        out.push((sp.offset(f.span.start()), c));
                    }
                }
            }
            StatementKind::Reaction { label, equation } => {
                if let Some(l) = label {
                    out.push((l.span, Class::Variable));
                }
                if let Some(eq) = equation {
                    // `<=>` written as `=` is not a lexer arrow.
                    if eq.arrow.kind == crate::syntax::ast::ArrowKind::Equals {
                        out.push((eq.arrow.span, Class::Arrow));
                    }
                    for t in eq.left.iter().chain(&eq.right) {
                        if let Some(c) = &t.coefficient {
                            out.push((c.span, Class::Number));
                        }
                        for (sp, c) in formula_pieces(&t.species.text) {
                            out.push((sp.offset(t.species.span.start()), c));
                        }
                    }
                }
            }
            StatementKind::Mixture { name: Some(n) } => out.push((n.span, Class::Variable)),
            _ => {}
        }
        for a in &s.attributes {
            let is_species = matches!(s.kind, StatementKind::Mixture { .. })
                && !crate::model::lower::MIXTURE_ATTRIBUTES.contains(&a.name.text.as_str());
            let class = if is_species {
                Class::Element
            } else {
                Class::Property
            };
            attribute(a, class, units, &mut out);
        }
    }
    out.retain(|(s, _)| !s.is_empty());
    out.sort_by_key(|(s, c)| (s.start(), std::cmp::Reverse(s.end()), *c));
    // Drop any span that starts inside the previous one.
    let mut clean: Vec<(Span, Class)> = Vec::with_capacity(out.len());
    for (s, c) in out {
        if clean.last().is_some_and(|(p, _)| s.start() < p.end()) {
            continue;
        }
        clean.push((s, c));
    }
    clean
}

/// The document's tokens in the protocol's relative encoding.
pub fn tokens(snap: &Snapshot, encoding: Encoding) -> lsp::SemanticTokens {
    let text = snap.text(encoding);
    let source = snap.source();
    let mut data = Vec::new();
    let (mut prev_line, mut prev_col) = (0u32, 0u32);
    for (span, class) in classify(&source.text, &source.syntax) {
        let a = text.position(span.start());
        let b = text.position(span.end());
        if a.line != b.line || b.character <= a.character {
            continue;
        }
        let delta_line = a.line - prev_line;
        let delta_start = if delta_line == 0 {
            a.character - prev_col
        } else {
            a.character
        };
        data.push(lsp::SemanticToken {
            delta_line,
            delta_start,
            length: b.character - a.character,
            token_type: class as u32,
            token_modifiers_bitset: 0,
        });
        prev_line = a.line;
        prev_col = a.character;
    }
    lsp::SemanticTokens {
        result_id: None,
        data,
    }
}
