//! What the cursor is on, and the names that can be followed: go to
//! definition, references and rename for species aliases and reaction
//! labels, across the files a document uses.

use super::convert::{Text, uri_of};
use super::snapshot::Snapshot;
use crate::chem::formula::looks_like_formula;
use crate::span::{FileId, Span};
use crate::syntax::ast::{Name, Statement, StatementKind, ValueKind};
use crate::syntax::line_index::Encoding;
use crate::workspace::Workspace;
use std::collections::HashMap;
use tower_lsp_server::ls_types as lsp;

/// The thing under the cursor.
#[derive(Clone, Copy, Debug)]
pub enum Item<'a> {
    /// A species as written: in an equation, a mixture line, or the
    /// formula or alias of a `species` statement.
    Species(&'a Name),
    /// The keyword, label or arrow of a reaction.
    Reaction(&'a Statement),
    /// A unit expression after a number.
    Unit(&'a Name),
    /// An attribute name (not a mixture species line).
    Attribute(&'a Statement, &'a Name),
}

/// The statement of a file that holds byte `offset`.
pub fn statement_at(statements: &[Statement], offset: usize) -> Option<&Statement> {
    let i = statements.partition_point(|s| s.span.start() <= offset);
    let s = statements.get(i.checked_sub(1)?)?;
    s.span.contains(offset).then_some(s)
}

fn hit(span: Span, offset: usize) -> bool {
    span.start() <= offset && offset <= span.end() && !span.is_empty()
}

fn unit_at(q: &crate::syntax::ast::Quantity, offset: usize) -> Option<&Name> {
    if let Some(u) = &q.unit
        && hit(u.span, offset)
    {
        return Some(u);
    }
    q.at.as_deref().and_then(|at| unit_at(at, offset))
}

/// Find the item at `offset` of the snapshot's document.
pub fn item_at(snap: &Snapshot, offset: usize) -> Option<Item<'_>> {
    let s = statement_at(&snap.source().syntax.statements, offset)?;
    match &s.kind {
        StatementKind::Species { alias, formula } => {
            for n in [alias, formula].into_iter().flatten() {
                if hit(n.span, offset) {
                    return Some(Item::Species(n));
                }
            }
        }
        StatementKind::Reaction { label, equation } => {
            if let Some(eq) = equation {
                for t in eq.left.iter().chain(&eq.right) {
                    if hit(t.species.span, offset) {
                        return Some(Item::Species(&t.species));
                    }
                }
                if hit(eq.arrow.span, offset) {
                    return Some(Item::Reaction(s));
                }
            }
            if hit(s.keyword, offset) || label.as_ref().is_some_and(|l| hit(l.span, offset)) {
                return Some(Item::Reaction(s));
            }
        }
        _ => {}
    }
    for a in &s.attributes {
        if hit(a.name.span, offset) {
            let is_species = matches!(s.kind, StatementKind::Mixture { .. })
                && !crate::model::lower::MIXTURE_ATTRIBUTES.contains(&a.name.text.as_str());
            return Some(if is_species {
                Item::Species(&a.name)
            } else {
                Item::Attribute(s, &a.name)
            });
        }
        match &a.value.kind {
            ValueKind::Quantity(q) => {
                if let Some(u) = unit_at(q, offset) {
                    return Some(Item::Unit(u));
                }
            }
            ValueKind::Arrhenius(args) => {
                for arg in args {
                    if let ValueKind::Quantity(q) = &arg.value.kind
                        && let Some(u) = unit_at(q, offset)
                    {
                        return Some(Item::Unit(u));
                    }
                }
            }
            _ => {}
        }
    }
    None
}

/// A name that can be followed.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Target {
    Alias(String),
    Label(String),
}

/// One place a target is written.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Occurrence {
    pub file: FileId,
    pub span: Span,
    pub declaration: bool,
}

/// Every place `target` is written in the workspace, declarations first.
pub fn occurrences(ws: &Workspace, target: &Target) -> Vec<Occurrence> {
    let mut out = Vec::new();
    for f in &ws.files {
        for s in &f.syntax.statements {
            let mut push = |n: &Name, declaration: bool| {
                out.push(Occurrence {
                    file: f.id,
                    span: n.span,
                    declaration,
                })
            };
            match (&s.kind, target) {
                (StatementKind::Species { alias: Some(a), .. }, Target::Alias(t))
                    if a.text == t =>
                {
                    push(a, true)
                }
                (StatementKind::Reaction { label: Some(l), .. }, Target::Label(t))
                    if l.text == t =>
                {
                    push(l, true)
                }
                (
                    StatementKind::Reaction {
                        equation: Some(eq), ..
                    },
                    Target::Alias(t),
                ) => {
                    for term in eq.left.iter().chain(&eq.right) {
                        if term.species.text == t {
                            push(&term.species, false);
                        }
                    }
                }
                (StatementKind::Mixture { .. }, Target::Alias(t)) => {
                    for a in &s.attributes {
                        if a.name.text == t {
                            push(&a.name, false);
                        }
                    }
                }
                _ => {}
            }
        }
    }
    out.sort_by_key(|o| (!o.declaration, o.file, o.span.start()));
    out
}

/// The followable name at `offset` of the document, with its span.
pub fn target_at(snap: &Snapshot, offset: usize) -> Option<(Target, Span)> {
    let s = statement_at(&snap.source().syntax.statements, offset)?;
    if let StatementKind::Reaction { label: Some(l), .. } = &s.kind
        && hit(l.span, offset)
    {
        return Some((Target::Label(l.text.to_string()), l.span));
    }
    match item_at(snap, offset)? {
        Item::Species(n) if !looks_like_formula(&n.text) => {
            let t = Target::Alias(n.text.to_string());
            let declared = occurrences(snap.workspace(), &t)
                .iter()
                .any(|o| o.declaration);
            declared.then_some((t, n.span))
        }
        _ => None,
    }
}

fn location(ws: &Workspace, o: &Occurrence, encoding: Encoding) -> Option<lsp::Location> {
    let f = ws.file(o.file);
    Some(lsp::Location::new(
        uri_of(&f.path)?,
        Text::of(f, encoding).range(o.span),
    ))
}

fn offset_of(snap: &Snapshot, p: lsp::Position, encoding: Encoding) -> usize {
    snap.text(encoding).offset(p)
}

pub fn definition(snap: &Snapshot, p: lsp::Position, encoding: Encoding) -> Option<lsp::Location> {
    let (target, _) = target_at(snap, offset_of(snap, p, encoding))?;
    let ws = snap.workspace();
    let decl = occurrences(ws, &target)
        .into_iter()
        .find(|o| o.declaration)?;
    location(ws, &decl, encoding)
}

pub fn references(
    snap: &Snapshot,
    p: lsp::Position,
    encoding: Encoding,
    with_declaration: bool,
) -> Option<Vec<lsp::Location>> {
    let (target, _) = target_at(snap, offset_of(snap, p, encoding))?;
    let ws = snap.workspace();
    Some(
        occurrences(ws, &target)
            .iter()
            .filter(|o| with_declaration || !o.declaration)
            .filter_map(|o| location(ws, o, encoding))
            .collect(),
    )
}

pub fn prepare_rename(
    snap: &Snapshot,
    p: lsp::Position,
    encoding: Encoding,
) -> Option<lsp::PrepareRenameResponse> {
    let (_, span) = target_at(snap, offset_of(snap, p, encoding))?;
    Some(lsp::PrepareRenameResponse::Range(
        snap.text(encoding).range(span),
    ))
}

/// Whether `name` may be an alias (NOTATION.md §2) or a label (§3).
fn valid_name(target: &Target, name: &str) -> Result<(), String> {
    let chars_ok = !name.is_empty()
        && name
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || c == '_' || c == '-');
    if !chars_ok {
        return Err(format!(
            "`{name}` is not a name: use letters, digits, `_` and `-`"
        ));
    }
    match target {
        Target::Alias(_) if looks_like_formula(name) => Err(format!(
            "`{name}` reads as a formula; an alias starts with a lowercase letter"
        )),
        Target::Label(_) if !name.starts_with(|c: char| c.is_ascii_alphabetic()) => {
            Err(format!("`{name}`: a label starts with a letter"))
        }
        _ => Ok(()),
    }
}

/// Rename the alias or label at `p` everywhere it is written. An invalid
/// new name or one already taken is refused with a message.
pub fn rename(
    snap: &Snapshot,
    p: lsp::Position,
    new_name: &str,
    encoding: Encoding,
) -> Result<Option<lsp::WorkspaceEdit>, String> {
    let Some((target, _)) = target_at(snap, offset_of(snap, p, encoding)) else {
        return Ok(None);
    };
    valid_name(&target, new_name)?;
    let ws = snap.workspace();
    let taken = match &target {
        Target::Alias(_) => Target::Alias(new_name.to_string()),
        Target::Label(_) => Target::Label(new_name.to_string()),
    };
    if taken != target && occurrences(ws, &taken).iter().any(|o| o.declaration) {
        return Err(format!("`{new_name}` is already declared"));
    }
    let mut changes: HashMap<lsp::Uri, Vec<lsp::TextEdit>> = HashMap::new();
    for o in occurrences(ws, &target) {
        let f = ws.file(o.file);
        let Some(uri) = uri_of(&f.path) else { continue };
        changes.entry(uri).or_default().push(lsp::TextEdit {
            range: Text::of(f, encoding).range(o.span),
            new_text: new_name.to_string(),
        });
    }
    Ok(Some(lsp::WorkspaceEdit {
        changes: Some(changes),
        ..Default::default()
    }))
}
