//! Document and workspace symbols (reactions, species, mixtures), and the
//! whole-workspace diagnostic report for clients that pull it.

use super::convert::{self, RuleDocs, Text, uri_of};
use super::snapshot::Snapshot;
use crate::analysis::analyze;
use crate::config::{Config, find_root};
use crate::syntax::ast::StatementKind;
use crate::syntax::line_index::Encoding;
use crate::workspace::{Overlay, SourceText, Workspace};
use std::collections::HashMap;
use std::path::PathBuf;
use tower_lsp_server::ls_types as lsp;

/// One symbol of a file: name, kind, whole statement and name spans.
struct Found {
    name: String,
    detail: Option<String>,
    kind: lsp::SymbolKind,
    span: crate::span::Span,
    name_span: crate::span::Span,
}

fn found(f: &SourceText) -> Vec<Found> {
    let mut out = Vec::new();
    for s in &f.syntax.statements {
        match &s.kind {
            StatementKind::Reaction { label, equation } => {
                let eq_text = equation
                    .as_ref()
                    .map(|e| f.text[e.span.range()].to_string());
                let (name, name_span) = match (label, &eq_text) {
                    (Some(l), _) => (l.text.to_string(), l.span),
                    (None, Some(t)) => (t.clone(), equation.as_ref().map_or(s.keyword, |e| e.span)),
                    (None, None) => continue,
                };
                out.push(Found {
                    name,
                    detail: if label.is_some() { eq_text } else { None },
                    kind: lsp::SymbolKind::EVENT,
                    span: s.span,
                    name_span,
                });
            }
            StatementKind::Species { alias, formula } => {
                let Some(n) = alias.as_ref().or(formula.as_ref()) else {
                    continue;
                };
                out.push(Found {
                    name: n.text.to_string(),
                    detail: alias
                        .as_ref()
                        .and(formula.as_ref())
                        .map(|f| f.text.to_string()),
                    kind: lsp::SymbolKind::CONSTANT,
                    span: s.span,
                    name_span: n.span,
                });
            }
            StatementKind::Mixture { name: Some(n) } => out.push(Found {
                name: n.text.to_string(),
                detail: Some("mixture".into()),
                kind: lsp::SymbolKind::STRUCT,
                span: s.span,
                name_span: n.span,
            }),
            _ => {}
        }
    }
    out
}

#[allow(deprecated)] // `deprecated` is a required field of the protocol type.
pub fn document_symbols(snap: &Snapshot, encoding: Encoding) -> Vec<lsp::DocumentSymbol> {
    let text = snap.text(encoding);
    found(snap.source())
        .into_iter()
        .map(|s| lsp::DocumentSymbol {
            name: s.name,
            detail: s.detail,
            kind: s.kind,
            tags: None,
            deprecated: None,
            range: text.range(s.span),
            selection_range: text.range(s.name_span),
            children: None,
        })
        .collect()
}

/// Symbols matching `query` (a case-insensitive substring) in every file
/// the open documents' analyses read, each file once.
#[allow(deprecated)]
pub fn workspace_symbols(
    snaps: &[std::sync::Arc<Snapshot>],
    query: &str,
    encoding: Encoding,
) -> Vec<lsp::SymbolInformation> {
    let q = query.to_lowercase();
    let mut seen = std::collections::HashSet::new();
    let mut out = Vec::new();
    for snap in snaps {
        for f in &snap.workspace().files {
            if !seen.insert(f.path.clone()) {
                continue;
            }
            let Some(uri) = uri_of(&f.path) else { continue };
            let text = Text::of(f, encoding);
            for s in found(f) {
                if !s.name.to_lowercase().contains(&q) {
                    continue;
                }
                out.push(lsp::SymbolInformation {
                    name: s.name,
                    kind: s.kind,
                    tags: None,
                    deprecated: None,
                    location: lsp::Location::new(uri.clone(), text.range(s.name_span)),
                    container_name: Some(f.display.clone()),
                });
            }
        }
    }
    out
}

/// Every `*.stoik` file below `dir` (ignore files respected).
fn stoik_files(dir: &std::path::Path) -> Vec<PathBuf> {
    ignore::WalkBuilder::new(dir)
        .build()
        .filter_map(|e| e.ok())
        .filter(|e| e.file_type().is_some_and(|t| t.is_file()))
        .map(|e| e.into_path())
        .filter(|p| p.extension().is_some_and(|x| x == "stoik"))
        .collect()
}

/// The diagnostics of every file of every root folder and open document,
/// from one analysis per root (as `stoik check` would do it).
pub fn workspace_reports(
    roots: &[PathBuf],
    texts: HashMap<PathBuf, String>,
    versions: &HashMap<PathBuf, i32>,
    encoding: Encoding,
    docs: &RuleDocs,
) -> Vec<lsp::WorkspaceDocumentDiagnosticReport> {
    let mut by_root: HashMap<PathBuf, Vec<PathBuf>> = HashMap::new();
    for r in roots {
        by_root.entry(r.clone()).or_default().extend(stoik_files(r));
    }
    for p in texts.keys() {
        by_root.entry(find_root(p)).or_default().push(p.clone());
    }
    let overlay = Overlay { texts };
    let mut out = Vec::new();
    let mut reported = std::collections::HashSet::new();
    for (root, mut files) in by_root {
        files.sort();
        files.dedup();
        let config = Config::load(&root).unwrap_or_default();
        let mut ws = Workspace::new(&root);
        for f in &files {
            // An unreadable file is skipped; its own open document (if any)
            // reports the problem.
            let _ = ws.load(f, &overlay);
        }
        let analysis = analyze(ws, &config);
        let ws = &analysis.workspace;
        for f in &ws.files {
            if !reported.insert(f.path.clone()) {
                continue;
            }
            let Some(uri) = uri_of(&f.path) else { continue };
            let items = analysis
                .diagnostics
                .iter()
                .filter(|d| d.file == f.id)
                .map(|d| convert::diagnostic(ws, d, encoding, docs))
                .collect();
            out.push(lsp::WorkspaceDocumentDiagnosticReport::Full(
                lsp::WorkspaceFullDocumentDiagnosticReport {
                    uri,
                    version: versions.get(&f.path).map(|v| i64::from(*v)),
                    full_document_diagnostic_report: lsp::FullDocumentDiagnosticReport {
                        result_id: None,
                        items,
                    },
                },
            ));
        }
    }
    out
}
