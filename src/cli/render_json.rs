//! The stable JSON shape of `stoik check --format json`.

use crate::diagnostic::{Applicability, Diagnostic, Severity};
use crate::syntax::line_index::Encoding;
use crate::workspace::Workspace;
use serde::Serialize;

/// The report, `{"diagnostics": [...], "summary": {...}}`, as pretty JSON,
/// byte for byte what `serde_json::to_writer_pretty` makes of it. The
/// diagnostics are converted and written on every core, a batch at a time,
/// so that a large report (some 90 bytes of JSON per reaction of a library
/// with a planted mistake in every hundredth) is never held whole.
pub fn write_report(
    out: &mut impl std::io::Write,
    diagnostics: &[Diagnostic],
    ws: &Workspace,
    summary: Summary,
) -> std::io::Result<()> {
    out.write_all(b"{\n  \"diagnostics\": [")?;
    for (b, batch) in diagnostics.chunks(BATCH).enumerate() {
        let texts = crate::parallel::map_in_order(batch, 64, |d| nested(&diagnostic(d, ws), 2));
        for (i, text) in texts.into_iter().enumerate() {
            if b > 0 || i > 0 {
                out.write_all(b",")?;
            }
            out.write_all(b"\n    ")?;
            out.write_all(text?.as_bytes())?;
        }
    }
    if !diagnostics.is_empty() {
        out.write_all(b"\n  ")?;
    }
    out.write_all(b"],\n  \"summary\": ")?;
    out.write_all(nested(&summary, 1)?.as_bytes())?;
    out.write_all(b"\n}")
}

/// Diagnostics converted at a time by [`write_report`].
const BATCH: usize = 4096;

/// `value` as pretty JSON for a place `depth` levels deep in a document:
/// every line after the first indented by two more spaces a level, as the
/// pretty writer indents (a JSON string holds no raw line break).
fn nested<T: Serialize>(value: &T, depth: usize) -> std::io::Result<String> {
    let text = serde_json::to_string_pretty(value).map_err(std::io::Error::other)?;
    Ok(text.replace('\n', &format!("\n{}", "  ".repeat(depth))))
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
    let a = f.index.position(&f.text, span.start(), Encoding::Utf32);
    let b = f.index.position(&f.text, span.end(), Encoding::Utf32);
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::config::Config;
    use crate::workspace::Overlay;

    /// The report as one value, for the pretty writer to write whole.
    #[derive(Serialize)]
    struct Whole {
        diagnostics: Vec<JsonDiagnostic>,
        summary: Summary,
    }

    fn both_ways(text: &str) -> (String, String, usize) {
        let dir = tempfile::tempdir().expect("a temporary folder");
        let path = dir.path().join("cases.stoik");
        std::fs::write(&path, text).expect("the file is written");
        let mut ws = Workspace::new(dir.path());
        ws.load(&path, &Overlay::default()).expect("the file loads");
        let analysis = crate::analysis::analyze_for_diagnostics(ws, &Config::default());
        let ws = &analysis.workspace;
        let summary = Summary {
            files: ws.files.len(),
            errors: 1,
            warnings: 2,
            infos: 3,
        };
        let whole = Whole {
            diagnostics: analysis
                .diagnostics
                .iter()
                .map(|d| diagnostic(d, ws))
                .collect(),
            summary,
        };
        let expected = serde_json::to_string_pretty(&whole).expect("serialized");
        let mut written = Vec::new();
        write_report(&mut written, &analysis.diagnostics, ws, summary).expect("written");
        let written = String::from_utf8(written).expect("UTF-8");
        (written, expected, analysis.diagnostics.len())
    }

    #[test]
    fn batches_write_what_the_pretty_writer_writes() {
        // Unbalanced equations (with fixes and help), a string with an
        // escaped line break, and enough of them to span several batches.
        let mut text = String::from("reaction q: H2 + O2 <=> H2O\n  source = \"a\\nb\"\n");
        for i in 0..(BATCH + 10) {
            text.push_str(&format!("reaction r{i}: H2 + O2 <=> H2O\n"));
        }
        let (written, expected, count) = both_ways(&text);
        assert!(count > BATCH, "{count} diagnostics");
        assert_eq!(written, expected);
    }

    #[test]
    fn an_empty_report_is_written_as_the_pretty_writer_writes_it() {
        let (written, expected, count) = both_ways("species H2\n");
        assert_eq!(count, 0);
        assert_eq!(written, expected);
    }
}
