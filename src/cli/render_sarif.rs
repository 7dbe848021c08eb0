//! SARIF 2.1.0 output for code-scanning services.
//!
//! Carries what those services read: the rule metadata of every rule, 1-based
//! regions with Unicode code point columns, artifact URIs relative to the
//! workspace root (`%SRCROOT%`), related locations and fixes.

use super::render_json::region;
use crate::diagnostic::{Diagnostic, Severity};
use crate::rules::RULES;
use crate::workspace::Workspace;
use serde_json::{Value, json};

const SCHEMA: &str = "https://json.schemastore.org/sarif-2.1.0.json";

fn level(s: Severity) -> &'static str {
    match s {
        Severity::Error => "error",
        Severity::Warning => "warning",
        Severity::Info | Severity::Hint => "note",
    }
}

/// The URI of a file relative to the workspace root, percent-encoded.
fn relative_uri(ws: &Workspace, file: crate::span::FileId) -> String {
    let path = &ws.file(file).path;
    let rel = path.strip_prefix(&ws.root).unwrap_or(path);
    let text = rel
        .components()
        .map(|c| c.as_os_str().to_string_lossy().into_owned())
        .collect::<Vec<_>>()
        .join("/");
    encode_uri(&text)
}

fn encode_uri(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for b in text.bytes() {
        match b {
            b'A'..=b'Z' | b'a'..=b'z' | b'0'..=b'9' | b'-' | b'_' | b'.' | b'~' | b'/' => {
                out.push(b as char)
            }
            _ => out.push_str(&format!("%{b:02X}")),
        }
    }
    out
}

fn location(ws: &Workspace, file: crate::span::FileId, span: crate::span::Span) -> Value {
    let r = region(ws, file, span);
    json!({
        "physicalLocation": {
            "artifactLocation": { "uri": relative_uri(ws, file), "uriBaseId": "%SRCROOT%" },
            "region": {
                "startLine": r.line,
                "startColumn": r.column,
                "endLine": r.end_line,
                "endColumn": r.end_column,
            }
        }
    })
}

/// The whole SARIF log for a set of diagnostics.
pub fn render(diagnostics: &[Diagnostic], ws: &Workspace) -> Value {
    let rules: Vec<Value> = RULES
        .iter()
        .map(|r| {
            json!({
                "id": r.id,
                "name": r.id.split('-').map(capitalise).collect::<String>(),
                "shortDescription": { "text": r.summary },
                "fullDescription": { "text": first_paragraph(r.doc) },
                "help": { "text": r.doc },
                "defaultConfiguration": { "level": level(r.default_severity) },
            })
        })
        .collect();
    let results: Vec<Value> = diagnostics
        .iter()
        .map(|d| {
            let rule_index = RULES.iter().position(|r| r.id == d.rule).unwrap_or(0);
            let mut text = d.message.clone();
            if let Some(help) = &d.help {
                text.push_str(". Help: ");
                text.push_str(help);
            }
            let mut result = json!({
                "ruleId": d.rule,
                "ruleIndex": rule_index,
                "level": level(d.severity),
                "message": { "text": text },
                "locations": [location(ws, d.file, d.span)],
            });
            if !d.related.is_empty() {
                result["relatedLocations"] = Value::Array(
                    d.related
                        .iter()
                        .enumerate()
                        .map(|(i, rel)| {
                            let mut loc = location(ws, rel.file, rel.span);
                            loc["id"] = json!(i);
                            loc["message"] = json!({ "text": rel.message });
                            loc
                        })
                        .collect(),
                );
            }
            if !d.fixes.is_empty() {
                result["fixes"] = Value::Array(
                    d.fixes
                        .iter()
                        .map(|f| {
                            let changes: Vec<Value> = f
                                .edits
                                .iter()
                                .map(|e| {
                                    let r = region(ws, e.file, e.span);
                                    json!({
                                        "artifactLocation": { "uri": relative_uri(ws, e.file), "uriBaseId": "%SRCROOT%" },
                                        "replacements": [{
                                            "deletedRegion": {
                                                "startLine": r.line,
                                                "startColumn": r.column,
                                                "endLine": r.end_line,
                                                "endColumn": r.end_column,
                                            },
                                            "insertedContent": { "text": e.new_text },
                                        }]
                                    })
                                })
                                .collect();
                            json!({ "description": { "text": f.title }, "artifactChanges": changes })
                        })
                        .collect(),
                );
            }
            result
        })
        .collect();
    let root_uri = format!(
        "file://{}/",
        encode_uri(&ws.root.to_string_lossy()).trim_end_matches('/')
    );
    json!({
        "$schema": SCHEMA,
        "version": "2.1.0",
        "runs": [{
            "tool": {
                "driver": {
                    "name": "stoik",
                    "version": env!("CARGO_PKG_VERSION"),
                    "semanticVersion": env!("CARGO_PKG_VERSION"),
                    "rules": rules,
                }
            },
            "originalUriBaseIds": { "%SRCROOT%": { "uri": root_uri } },
            "columnKind": "unicodeCodePoints",
            "results": results,
        }]
    })
}

fn capitalise(word: &str) -> String {
    let mut c = word.chars();
    match c.next() {
        Some(f) => f.to_uppercase().collect::<String>() + c.as_str(),
        None => String::new(),
    }
}

fn first_paragraph(doc: &str) -> String {
    doc.split("\n\n").next().unwrap_or(doc).replace('\n', " ")
}
