//! Completion: keywords at the start of a line, attribute names by
//! statement, units after a number, and species (declared aliases, the
//! species the library already has, element symbols) in equations and
//! mixtures.

use super::snapshot::Snapshot;
use crate::syntax::ast::{Statement, StatementKind};
use crate::syntax::line_index::Encoding;
use tower_lsp_server::ls_types as lsp;

/// What kind of text the cursor is about to complete.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Context {
    Keyword,
    /// An attribute name of this statement kind (`None` when no statement).
    Attribute,
    Unit,
    UnitKind,
    Species,
    Nothing,
}

fn is_boundary(c: char) -> bool {
    c.is_whitespace() || matches!(c, '=' | ';' | ':' | '*' | '/' | '(' | '·' | ',')
}

/// The statement the cursor's line belongs to: the last one starting at
/// or before the line.
fn owner(statements: &[Statement], line: usize) -> Option<&Statement> {
    let i = statements.partition_point(|s| s.line <= line);
    statements.get(i.checked_sub(1)?)
}

/// Decide the context from the line text before the cursor.
pub fn context(prefix: &str, statement: Option<&Statement>) -> Context {
    let indented = prefix.starts_with([' ', '\t']);
    let trimmed = prefix.trim_start();
    if !indented && !trimmed.contains(char::is_whitespace) {
        return Context::Keyword;
    }
    // The part after the last `;` (attributes may follow a header).
    let (segment, after_semi) = match prefix.rfind(';') {
        Some(i) => (&prefix[i + 1..], true),
        None => (prefix, false),
    };
    let kind = statement.map(|s| &s.kind);
    if !indented && !after_semi {
        // Still on the header.
        return match kind {
            Some(StatementKind::Reaction { .. }) if prefix.contains(':') => Context::Species,
            Some(StatementKind::Species { .. }) if prefix.contains('=') => Context::Species,
            Some(StatementKind::Units) => unit_or_kind(segment),
            _ => Context::Nothing,
        };
    }
    if matches!(kind, Some(StatementKind::Units)) {
        return unit_or_kind(segment);
    }
    match segment.find('=') {
        None => Context::Attribute,
        Some(eq) => {
            let value = segment[eq + 1..].trim_start();
            // A unit follows a number and a space: `= 3.2 kJ/`.
            let starts_with_number =
                value.starts_with(|c: char| c.is_ascii_digit() || c == '-' || c == '.');
            if starts_with_number && value.contains(char::is_whitespace) {
                Context::Unit
            } else {
                Context::Nothing
            }
        }
    }
}

fn unit_or_kind(segment: &str) -> Context {
    let last = segment.rsplit(',').next().unwrap_or(segment);
    if last.contains('=') {
        Context::Unit
    } else {
        Context::UnitKind
    }
}

fn item(
    label: &str,
    kind: lsp::CompletionItemKind,
    detail: Option<String>,
    range: lsp::Range,
) -> lsp::CompletionItem {
    lsp::CompletionItem {
        label: label.to_string(),
        kind: Some(kind),
        detail,
        text_edit: Some(lsp::CompletionTextEdit::Edit(lsp::TextEdit {
            range,
            new_text: label.to_string(),
        })),
        ..Default::default()
    }
}

/// The completions at `p`.
pub fn completion(
    snap: &Snapshot,
    p: lsp::Position,
    encoding: Encoding,
) -> Vec<lsp::CompletionItem> {
    let text = snap.text(encoding);
    let source = snap.source();
    let offset = text.offset(p);
    let line = source.index.line_of(offset);
    let line_start = source.index.line_start(line);
    let prefix = &source.text[line_start..offset];
    let token_start = prefix
        .char_indices()
        .rev()
        .find(|(_, c)| is_boundary(*c))
        .map_or(0, |(i, c)| i + c.len_utf8());
    let word = &prefix[token_start..];
    let range = lsp::Range::new(text.position(line_start + token_start), p);
    let statement = owner(&source.syntax.statements, line);
    let ctx = context(prefix, statement);
    let keep = |label: &str| label.starts_with(word);
    let mut out = Vec::new();
    match ctx {
        Context::Keyword => {
            for k in crate::syntax::parser::KEYWORDS {
                if keep(k) {
                    out.push(item(k, lsp::CompletionItemKind::KEYWORD, None, range));
                }
            }
        }
        Context::Attribute => {
            let names: &[&str] = match statement.map(|s| &s.kind) {
                Some(StatementKind::Species { .. }) => crate::model::lower::SPECIES_ATTRIBUTES,
                Some(StatementKind::Reaction { .. }) => crate::model::lower::REACTION_ATTRIBUTES,
                Some(StatementKind::Mixture { .. }) => crate::model::lower::MIXTURE_ATTRIBUTES,
                _ => &[],
            };
            for n in names {
                if keep(n) {
                    out.push(item(n, lsp::CompletionItemKind::PROPERTY, None, range));
                }
            }
            if matches!(
                statement.map(|s| &s.kind),
                Some(StatementKind::Mixture { .. })
            ) {
                species_items(snap, word, range, &mut out);
            }
        }
        Context::Unit => {
            for u in crate::units::catalogue::known_names() {
                if keep(u) {
                    let detail = crate::units::catalogue::lookup(u).map(|x| x.dim.spell());
                    out.push(item(u, lsp::CompletionItemKind::UNIT, detail, range));
                }
            }
        }
        Context::UnitKind => {
            for k in crate::model::units_defaults::KINDS {
                if keep(k) {
                    out.push(item(k, lsp::CompletionItemKind::PROPERTY, None, range));
                }
            }
        }
        Context::Species => species_items(snap, word, range, &mut out),
        Context::Nothing => {}
    }
    out
}

fn species_items(
    snap: &Snapshot,
    word: &str,
    range: lsp::Range,
    out: &mut Vec<lsp::CompletionItem>,
) {
    let mut seen = std::collections::HashSet::new();
    if let Some(lib) = snap.library().map(|l| &l.library) {
        for s in &lib.species {
            let label = s.alias.clone().unwrap_or_else(|| s.name.to_string());
            if label.starts_with(word) && seen.insert(label.clone()) {
                let kind = if s.alias.is_some() {
                    lsp::CompletionItemKind::VARIABLE
                } else {
                    lsp::CompletionItemKind::VALUE
                };
                out.push(item(&label, kind, Some(s.formula.hill()), range));
            }
        }
    }
    // Element symbols complete the last symbol of a formula being typed
    // only at its start, where a whole symbol is wanted.
    for e in crate::chem::elements::ELEMENTS.iter() {
        if e.symbol.starts_with(word) && seen.insert(e.symbol.to_string()) {
            out.push(item(
                e.symbol,
                lsp::CompletionItemKind::CONSTANT,
                Some(e.name.to_string()),
                range,
            ));
        }
    }
}
