//! The stable JSON shape of `stoik check --format json`.

use crate::diagnostic::{Applicability, Diagnostic, Severity};
use crate::syntax::line_index::Encoding;
use crate::workspace::Workspace;
use serde::Serialize;

#[derive(Serialize)]
pub struct CheckReport<'a> {
    pub diagnostics: Diagnostics<'a>,
    pub summary: Summary,
}

/// The diagnostics of a report, converted one at a time as they are
/// written, so that a large report is never held twice in memory.
pub struct Diagnostics<'a> {
    pub diagnostics: &'a [Diagnostic],
    pub workspace: &'a Workspace,
}

impl Serialize for Diagnostics<'_> {
    fn serialize<S: serde::Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.collect_seq(
            self.diagnostics
                .iter()
                .map(|d| diagnostic(d, self.workspace)),
        )
    }
}

#[derive(Serialize, Default, Clone, Copy)]
pub struct Summary {
    pub files: usize,
    pub errors: usize,
    pub warnings: usize,
    pub infos: usize,
}

impl Summary {
    pub fn count(&mut self, severity: Severity) {
        match severity {
            Severity::Error => self.errors += 1,
            Severity::Warning => self.warnings += 1,
            Severity::Info | Severity::Hint => self.infos += 1,
        }
    }
}

/// A region in 1-based lines and 1-based Unicode-scalar columns.
#[derive(Serialize, Clone, Copy, PartialEq, Eq)]
pub struct Region {
    pub line: u32,
    pub column: u32,
    pub end_line: u32,
    pub end_column: u32,
}

#[derive(Serialize)]
pub struct JsonDiagnostic {
    pub file: String,
    pub line: u32,
    pub column: u32,
    pub end_line: u32,
    pub end_column: u32,
    pub severity: &'static str,
    pub rule: &'static str,
    pub message: String,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub help: Option<String>,
    pub related: Vec<JsonRelated>,
    pub fixes: Vec<JsonFix>,
}

#[derive(Serialize)]
pub struct JsonRelated {
    pub file: String,
    pub line: u32,
    pub column: u32,
    pub message: String,
}

#[derive(Serialize)]
pub struct JsonFix {
    pub title: String,
    pub applicability: Applicability,
    pub edits: Vec<JsonEdit>,
}

#[derive(Serialize)]
pub struct JsonEdit {
    pub file: String,
    pub line: u32,
    pub column: u32,
    pub end_line: u32,
    pub end_column: u32,
    pub new_text: String,
}

/// The 1-based region of a span of a file.
pub fn region(ws: &Workspace, file: crate::span::FileId, span: crate::span::Span) -> Region {
    let f = ws.file(file);
    let a = f.index.position(&f.text, span.start, Encoding::Utf32);
    let b = f.index.position(&f.text, span.end, Encoding::Utf32);
    Region {
        line: a.line + 1,
        column: a.column + 1,
        end_line: b.line + 1,
        end_column: b.column + 1,
    }
}

pub fn diagnostic(d: &Diagnostic, ws: &Workspace) -> JsonDiagnostic {
    let r = region(ws, d.file, d.span);
    JsonDiagnostic {
        file: ws.file(d.file).display.clone(),
        line: r.line,
        column: r.column,
        end_line: r.end_line,
        end_column: r.end_column,
        severity: d.severity.as_str(),
        rule: d.rule,
        message: d.message.clone(),
        help: d.help.clone(),
        related: d
            .related
            .iter()
            .map(|rel| {
                let rr = region(ws, rel.file, rel.span);
                JsonRelated {
                    file: ws.file(rel.file).display.clone(),
                    line: rr.line,
                    column: rr.column,
                    message: rel.message.clone(),
                }
            })
            .collect(),
        fixes: d
            .fixes
            .iter()
            .map(|f| JsonFix {
                title: f.title.clone(),
                applicability: f.applicability,
                edits: f
                    .edits
                    .iter()
                    .map(|e| {
                        let er = region(ws, e.file, e.span);
                        JsonEdit {
                            file: ws.file(e.file).display.clone(),
                            line: er.line,
                            column: er.column,
                            end_line: er.end_line,
                            end_column: er.end_column,
                            new_text: e.new_text.clone(),
                        }
                    })
                    .collect(),
            })
            .collect(),
    }
}
