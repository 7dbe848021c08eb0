//! The syntax tree of one `.stoik` file.
//!
//! The tree keeps every piece of text with its byte span so that diagnostics,
//! the formatter and the language server can point back at what the user
//! wrote. Nothing here is interpreted yet: formulas are still text, numbers are
//! parsed but units are not.

use crate::span::Span;
use compact_str::CompactString;
use num_rational::Ratio;

/// A piece of source text with its span (a label, an alias, a species token).
///
/// The text is a [`CompactString`]: names are short (`H2O(g)`, `kJ/mol`,
/// `dH`), and a library of 10^5 reactions holds millions of them, which as
/// `String`s were each a heap allocation to make and to free.
#[derive(Clone, Debug, PartialEq)]
pub struct Name {
    pub text: CompactString,
    pub span: Span,
}

/// The parsed file: statements, comments and every syntax error.
#[derive(Clone, Debug, Default)]
pub struct SourceFile {
    pub statements: Vec<Statement>,
    pub comments: Vec<Comment>,
    pub errors: Vec<SyntaxError>,
}

/// A `#` comment, kept for suppressions and the formatter.
#[derive(Clone, Debug, PartialEq)]
pub struct Comment {
    pub span: Span,
    /// 0-based line number of the comment.
    pub line: usize,
    /// True when the comment is the only thing on its line.
    pub own_line: bool,
}

/// A syntax error with an optional suggestion.
#[derive(Clone, Debug, PartialEq)]
pub struct SyntaxError {
    pub span: Span,
    pub message: String,
    pub help: Option<String>,
}

/// One statement: its header line and the attribute lines that continue it.
#[derive(Clone, Debug)]
pub struct Statement {
    pub kind: StatementKind,
    pub keyword: Span,
    /// From the keyword to the end of the last attribute line.
    pub span: Span,
    /// 0-based line of the keyword.
    pub line: usize,
    /// 0-based last line that belongs to the statement.
    pub last_line: usize,
    pub attributes: Vec<Attribute>,
}

#[derive(Clone, Debug)]
pub enum StatementKind {
    /// `units energy = kJ/mol, temperature = K`: the attributes hold the defaults.
    Units,
    /// `use "path"`.
    Use { path: Option<StringLit> },
    /// `species [ALIAS =] FORMULA`.
    Species {
        alias: Option<Name>,
        formula: Option<Name>,
    },
    /// `reaction [LABEL]: EQUATION`.
    Reaction {
        label: Option<Name>,
        equation: Option<Equation>,
    },
    /// `mixture NAME`.
    Mixture { name: Option<Name> },
}

/// A string literal with its unescaped value.
#[derive(Clone, Debug, PartialEq)]
pub struct StringLit {
    pub value: String,
    pub span: Span,
}

/// `name = value`.
#[derive(Clone, Debug)]
pub struct Attribute {
    pub name: Name,
    pub value: Value,
    pub span: Span,
}

#[derive(Clone, Debug)]
pub struct Value {
    pub kind: ValueKind,
    pub span: Span,
}

#[derive(Clone, Debug)]
pub enum ValueKind {
    /// A number with an optional unit and an optional `at` temperature.
    Quantity(Quantity),
    /// A string literal.
    Text(String),
    /// `arrhenius(A = q, n = x, Ea = q)`.
    Arrhenius(Vec<Attribute>),
    /// A bare word or unit expression (`kJ/mol` in `units`, `davies`).
    Word(String),
    /// Nothing after `=` (an error has been reported).
    Missing,
}

/// A number as written, its unit text and its condition.
#[derive(Clone, Debug)]
pub struct Quantity {
    pub number: f64,
    pub number_span: Span,
    pub unit: Option<Name>,
    pub at: Option<Box<Quantity>>,
}

/// The kind of arrow between the two sides.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ArrowKind {
    Reversible,
    Forward,
    /// `=`, treated as reversible.
    Equals,
    /// `<->` or `↔`, which means resonance and is rejected.
    Resonance,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Arrow {
    pub kind: ArrowKind,
    pub span: Span,
}

/// `SIDE ARROW SIDE`.
#[derive(Clone, Debug)]
pub struct Equation {
    pub left: Vec<Term>,
    pub arrow: Arrow,
    pub right: Vec<Term>,
    pub span: Span,
}

/// A stoichiometric coefficient as written.
#[derive(Clone, Debug, PartialEq)]
pub struct Coefficient {
    pub value: Ratio<i64>,
    pub span: Span,
}

/// `[coefficient] species`.
#[derive(Clone, Debug)]
pub struct Term {
    pub coefficient: Option<Coefficient>,
    pub species: Name,
    pub span: Span,
}

impl Equation {
    /// The species of both sides as written, left to right.
    pub fn species_names(&self) -> Vec<&str> {
        self.left
            .iter()
            .chain(&self.right)
            .map(|t| t.species.text.as_str())
            .collect()
    }
}

impl Term {
    /// The coefficient, 1 when none is written.
    pub fn coefficient_value(&self) -> Ratio<i64> {
        self.coefficient
            .as_ref()
            .map(|c| c.value)
            .unwrap_or_else(|| Ratio::from_integer(1))
    }
}

impl Statement {
    /// The attribute with this name, if any (the first when repeated).
    pub fn attribute(&self, name: &str) -> Option<&Attribute> {
        self.attributes.iter().find(|a| a.name.text == name)
    }
}
