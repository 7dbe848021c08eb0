//! Code actions: the fixes the checks attached to their findings, the
//! comments that silence a rule, and "fix all" for the safe fixes.

use super::convert::{Text, uri_of};
use super::navigation::statement_at;
use super::snapshot::Snapshot;
use crate::diagnostic::{Applicability, Diagnostic, Fix};
use crate::syntax::line_index::Encoding;
use std::collections::HashMap;
use tower_lsp_server::ls_types as lsp;

fn edit_of(snap: &Snapshot, fix: &Fix, encoding: Encoding) -> lsp::WorkspaceEdit {
    let ws = snap.workspace();
    let mut changes: HashMap<lsp::Uri, Vec<lsp::TextEdit>> = HashMap::new();
    for e in &fix.edits {
        let f = ws.file(e.file);
        let Some(uri) = uri_of(&f.path) else { continue };
        changes.entry(uri).or_default().push(lsp::TextEdit {
            range: Text::of(f, encoding).range(e.span),
            new_text: e.new_text.clone(),
        });
    }
    lsp::WorkspaceEdit {
        changes: Some(changes),
        ..Default::default()
    }
}

fn insert(
    snap: &Snapshot,
    offset: usize,
    text: String,
    encoding: Encoding,
) -> Option<lsp::WorkspaceEdit> {
    let uri = uri_of(&snap.path)?;
    let at = snap.text(encoding).position(offset);
    let mut changes = HashMap::new();
    changes.insert(
        uri,
        vec![lsp::TextEdit {
            range: lsp::Range::new(at, at),
            new_text: text,
        }],
    );
    Some(lsp::WorkspaceEdit {
        changes: Some(changes),
        ..Default::default()
    })
}

/// The line end the file uses (its first one), for inserted lines.
fn newline(text: &str) -> &'static str {
    match text.find(['\n', '\r']) {
        Some(i) if text[i..].starts_with("\r\n") => "\r\n",
        Some(i) if text[i..].starts_with('\r') => "\r",
        _ => "\n",
    }
}

fn overlaps(d: &Diagnostic, span: crate::span::Span) -> bool {
    d.span.start() <= span.end() && span.start() <= d.span.end()
}

/// The actions for `params.range` of the document.
pub fn code_actions(
    snap: &Snapshot,
    params: &lsp::CodeActionParams,
    encoding: Encoding,
) -> Vec<lsp::CodeActionOrCommand> {
    let text = snap.text(encoding);
    let span = text.span(params.range);
    let only = params.context.only.as_ref();
    let wants = |kind: &lsp::CodeActionKind| {
        only.is_none_or(|o| {
            o.iter().any(|k| {
                kind.as_str() == k.as_str()
                    || kind.as_str().starts_with(&format!("{}.", k.as_str()))
            })
        })
    };
    let source = snap.source();
    let nl = newline(&source.text);
    let docs = super::convert::RuleDocs::default();
    let mut out = Vec::new();
    let ours: Vec<&Diagnostic> = snap
        .analysis
        .diagnostics
        .iter()
        .filter(|d| d.file == snap.file)
        .collect();
    if wants(&lsp::CodeActionKind::QUICKFIX) {
        for d in ours.iter().filter(|d| overlaps(d, span)) {
            let lsp_diag = super::convert::diagnostic(snap.workspace(), d, encoding, &docs);
            for (i, fix) in d.fixes.iter().enumerate() {
                out.push(lsp::CodeActionOrCommand::CodeAction(lsp::CodeAction {
                    title: fix.title.clone(),
                    kind: Some(lsp::CodeActionKind::QUICKFIX),
                    diagnostics: Some(vec![lsp_diag.clone()]),
                    edit: Some(edit_of(snap, fix, encoding)),
                    is_preferred: Some(i == 0 && fix.applicability == Applicability::Safe),
                    ..Default::default()
                }));
            }
            if d.rule == "unused-suppression" {
                continue;
            }
            if let Some(s) = statement_at(&source.syntax.statements, d.span.start()) {
                let line_start = source.index.line_start(s.line);
                if let Some(edit) = insert(
                    snap,
                    line_start,
                    format!("# stoik: allow {}{nl}", d.rule),
                    encoding,
                ) {
                    out.push(lsp::CodeActionOrCommand::CodeAction(lsp::CodeAction {
                        title: format!("Allow `{}` for this statement", d.rule),
                        kind: Some(lsp::CodeActionKind::QUICKFIX),
                        diagnostics: Some(vec![lsp_diag.clone()]),
                        edit: Some(edit),
                        ..Default::default()
                    }));
                }
            }
            if let Some(edit) = insert(
                snap,
                0,
                format!("# stoik: allow-file {}{nl}", d.rule),
                encoding,
            ) {
                out.push(lsp::CodeActionOrCommand::CodeAction(lsp::CodeAction {
                    title: format!("Allow `{}` in this file", d.rule),
                    kind: Some(lsp::CodeActionKind::QUICKFIX),
                    diagnostics: Some(vec![lsp_diag]),
                    edit: Some(edit),
                    ..Default::default()
                }));
            }
        }
    }
    if wants(&lsp::CodeActionKind::SOURCE_FIX_ALL)
        && let Some(action) = fix_all(snap, &ours, encoding)
    {
        out.push(action);
    }
    out
}

/// Every safe fix of the document whose edits stay in the document and do
/// not overlap an edit already taken, as one action.
pub fn fix_all(
    snap: &Snapshot,
    diags: &[&Diagnostic],
    encoding: Encoding,
) -> Option<lsp::CodeActionOrCommand> {
    let mut taken: Vec<crate::span::Span> = Vec::new();
    let mut edits = Vec::new();
    for d in diags {
        let Some(fix) = d
            .fixes
            .iter()
            .find(|f| f.applicability == Applicability::Safe)
        else {
            continue;
        };
        if fix.edits.iter().any(|e| e.file != snap.file) {
            continue;
        }
        let clash = fix.edits.iter().any(|e| {
            taken
                .iter()
                .any(|t| e.span.start() < t.end() && t.start() < e.span.end() || e.span == *t)
        });
        if clash {
            continue;
        }
        for e in &fix.edits {
            taken.push(e.span);
            edits.push(e.clone());
        }
    }
    if edits.is_empty() {
        return None;
    }
    let fix = Fix {
        title: "Fix all safe problems".into(),
        applicability: Applicability::Safe,
        edits,
    };
    Some(lsp::CodeActionOrCommand::CodeAction(lsp::CodeAction {
        title: fix.title.clone(),
        kind: Some(lsp::CodeActionKind::SOURCE_FIX_ALL),
        edit: Some(edit_of(snap, &fix, encoding)),
        ..Default::default()
    }))
}
