//! What a formatted file must keep, computed straight from the lexer and
//! the parser so that the tests do not lean on the formatter's own check.

#![allow(dead_code)]

use stoik::syntax::ast::{Quantity, SourceFile, StatementKind, ValueKind};
use stoik::syntax::lexer::{Token, lex};
use stoik::syntax::parse;

/// The characters the lexer reads as spaces.
fn is_space(c: char) -> bool {
    matches!(c, ' ' | '\t' | '\u{a0}' | '\u{feff}')
}

/// Every token that is not layout, with its text. Whitespace at the end of
/// a comment is layout: the formatter removes whitespace at line ends.
pub fn significant_tokens(text: &str) -> Vec<(Token, String)> {
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
        .collect()
}

/// The text of every comment, in order.
pub fn comments(text: &str) -> Vec<String> {
    let file = parse(text);
    file.comments
        .iter()
        .map(|c| text[c.span.range()].trim_end_matches(is_space).to_string())
        .collect()
}

/// A value as the later stages read it.
#[derive(Debug, PartialEq)]
pub enum Read {
    Quantity {
        number: f64,
        unit: Option<String>,
        at: Option<Box<Read>>,
    },
    Text(String),
    Arrhenius(Vec<(String, Read)>),
    Word(String),
    Missing,
}

/// One statement: its kind and names, its equation, its attributes.
#[derive(Debug, PartialEq)]
pub struct StatementMeaning {
    pub head: String,
    /// (coefficient numerator, denominator, species) per term, left then right.
    pub left: Vec<(i64, i64, String)>,
    pub arrow: Option<String>,
    pub right: Vec<(i64, i64, String)>,
    pub attributes: Vec<(String, Read)>,
}

/// Unit text with runs of blanks read as one, as the unit reader does.
fn unit_text(text: &str) -> String {
    text.split([' ', '\t'])
        .filter(|p| !p.is_empty())
        .collect::<Vec<_>>()
        .join(" ")
}

fn quantity(q: &Quantity) -> Read {
    Read::Quantity {
        number: q.number,
        unit: q.unit.as_ref().map(|u| unit_text(&u.text)),
        at: q.at.as_ref().map(|a| Box::new(quantity(a))),
    }
}

fn value(kind: &ValueKind) -> Read {
    match kind {
        ValueKind::Quantity(q) => quantity(q),
        ValueKind::Text(t) => Read::Text(t.clone()),
        ValueKind::Arrhenius(args) => Read::Arrhenius(
            args.iter()
                .map(|a| (a.name.text.to_string(), value(&a.value.kind)))
                .collect(),
        ),
        ValueKind::Word(w) => Read::Word(unit_text(w)),
        ValueKind::Missing => Read::Missing,
    }
}

/// The statements of a file and the messages of its syntax errors.
pub fn meaning(text: &str) -> (Vec<StatementMeaning>, Vec<String>) {
    let file: SourceFile = parse(text);
    let statements = file
        .statements
        .iter()
        .map(|s| {
            let mut m = StatementMeaning {
                head: String::new(),
                left: Vec::new(),
                arrow: None,
                right: Vec::new(),
                attributes: s
                    .attributes
                    .iter()
                    .map(|a| (a.name.text.to_string(), value(&a.value.kind)))
                    .collect(),
            };
            let text_of = |n: &Option<stoik::syntax::ast::Name>| {
                n.as_ref().map(|n| n.text.to_string()).unwrap_or_default()
            };
            m.head = match &s.kind {
                StatementKind::Units => "units".into(),
                StatementKind::Use { path } => format!(
                    "use {}",
                    path.as_ref().map(|p| p.value.clone()).unwrap_or_default()
                ),
                StatementKind::Species { alias, formula } => {
                    format!("species {} = {}", text_of(alias), text_of(formula))
                }
                StatementKind::Reaction { label, equation } => {
                    if let Some(eq) = equation {
                        let terms = |ts: &[stoik::syntax::ast::Term]| {
                            ts.iter()
                                .map(|t| {
                                    let c = t.coefficient_value();
                                    (*c.numer(), *c.denom(), t.species.text.to_string())
                                })
                                .collect::<Vec<_>>()
                        };
                        m.left = terms(&eq.left);
                        m.right = terms(&eq.right);
                        m.arrow = Some(format!("{:?}", eq.arrow.kind));
                    }
                    format!("reaction {}", text_of(label))
                }
                StatementKind::Mixture { name } => format!("mixture {}", text_of(name)),
            };
            m
        })
        .collect();
    let errors = file.errors.iter().map(|e| e.message.clone()).collect();
    (statements, errors)
}
