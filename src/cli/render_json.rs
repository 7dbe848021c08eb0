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
            out.write_all(&text?)?;
        }
    }
    if !diagnostics.is_empty() {
        out.write_all(b"\n  ")?;
    }
    out.write_all(b"],\n  \"summary\": ")?;
    out.write_all(&nested(&summary, 1)?)?;
    out.write_all(b"\n}")
}

/// Diagnostics converted at a time by [`write_report`].
const BATCH: usize = 4096;

/// `value` as pretty JSON for a place `depth` levels deep in a document:
/// every line after the first indented by two more spaces a level, as the
/// pretty writer indents.
fn nested<T: Serialize>(value: &T, depth: usize) -> std::io::Result<Vec<u8>> {
    let mut out = Vec::with_capacity(1024);
    let mut writer = serde_json::Serializer::with_formatter(
        &mut out,
        Nested {
            depth,
            has_value: false,
        },
    );
    value
        .serialize(&mut writer)
        .map_err(std::io::Error::other)?;
    Ok(out)
}

/// The pretty layout of `serde_json`'s pretty writer (two spaces a level,
/// `": "` after a key), starting `depth` levels deep, so that a part of a
/// document is written indented where it stands instead of indented
/// after the fact.
struct Nested {
    depth: usize,
    has_value: bool,
}

impl Nested {
    fn indent<W: ?Sized + std::io::Write>(&self, w: &mut W) -> std::io::Result<()> {
        for _ in 0..self.depth {
            w.write_all(b"  ")?;
        }
        Ok(())
    }

    fn open<W: ?Sized + std::io::Write>(
        &mut self,
        w: &mut W,
        bracket: &[u8],
    ) -> std::io::Result<()> {
        self.depth += 1;
        self.has_value = false;
        w.write_all(bracket)
    }

    fn close<W: ?Sized + std::io::Write>(
        &mut self,
        w: &mut W,
        bracket: &[u8],
    ) -> std::io::Result<()> {
        self.depth -= 1;
        if self.has_value {
            w.write_all(b"\n")?;
            self.indent(w)?;
        }
        w.write_all(bracket)
    }

    fn item<W: ?Sized + std::io::Write>(&self, w: &mut W, first: bool) -> std::io::Result<()> {
        w.write_all(if first { b"\n" } else { b",\n" })?;
        self.indent(w)
    }
}

impl serde_json::ser::Formatter for Nested {
    fn begin_array<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.open(w, b"[")
    }

    fn end_array<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.close(w, b"]")
    }

    fn begin_array_value<W: ?Sized + std::io::Write>(
        &mut self,
        w: &mut W,
        first: bool,
    ) -> std::io::Result<()> {
        self.item(w, first)
    }

    fn end_array_value<W: ?Sized + std::io::Write>(&mut self, _: &mut W) -> std::io::Result<()> {
        self.has_value = true;
        Ok(())
    }

    fn begin_object<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.open(w, b"{")
    }

    fn end_object<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.close(w, b"}")
    }

    fn begin_object_key<W: ?Sized + std::io::Write>(
        &mut self,
        w: &mut W,
        first: bool,
    ) -> std::io::Result<()> {
        self.item(w, first)
    }

    fn begin_object_value<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        w.write_all(b": ")
    }

    fn end_object_value<W: ?Sized + std::io::Write>(&mut self, _: &mut W) -> std::io::Result<()> {
        self.has_value = true;
        Ok(())
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

/// A diagnostic as JSON, borrowing its texts from the diagnostic and the
/// workspace.
#[derive(Serialize)]
pub struct JsonDiagnostic<'a> {
    pub file: &'a str,
    pub line: u32,
    pub column: u32,
    pub end_line: u32,
    pub end_column: u32,
    pub severity: &'static str,
    pub rule: &'static str,
    pub message: &'a str,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub help: Option<&'a str>,
    pub related: Vec<JsonRelated<'a>>,
    pub fixes: Vec<JsonFix<'a>>,
}

#[derive(Serialize)]
pub struct JsonRelated<'a> {
    pub file: &'a str,
    pub line: u32,
    pub column: u32,
    pub message: &'a str,
}

#[derive(Serialize)]
pub struct JsonFix<'a> {
    pub title: &'a str,
    pub applicability: Applicability,
    pub edits: Vec<JsonEdit<'a>>,
}

#[derive(Serialize)]
pub struct JsonEdit<'a> {
    pub file: &'a str,
    pub line: u32,
    pub column: u32,
    pub end_line: u32,
    pub end_column: u32,
    pub new_text: &'a str,
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

pub fn diagnostic<'a>(d: &'a Diagnostic, ws: &'a Workspace) -> JsonDiagnostic<'a> {
    let r = region(ws, d.file, d.span);
    JsonDiagnostic {
        file: &ws.file(d.file).display,
        line: r.line,
        column: r.column,
        end_line: r.end_line,
        end_column: r.end_column,
        severity: d.severity.as_str(),
        rule: d.rule,
        message: &d.message,
        help: d.help.as_deref(),
        related: d
            .related
            .iter()
            .map(|rel| {
                // A related place is given by where it starts.
                let f = ws.file(rel.file);
                let at = f.index.position(&f.text, rel.span.start(), Encoding::Utf32);
                JsonRelated {
                    file: &f.display,
                    line: at.line + 1,
                    column: at.column + 1,
                    message: &rel.message,
                }
            })
            .collect(),
        fixes: d
            .fixes
            .iter()
            .map(|f| JsonFix {
                title: &f.title,
                applicability: f.applicability,
                edits: f
                    .edits
                    .iter()
                    .map(|e| {
                        let er = region(ws, e.file, e.span);
                        JsonEdit {
                            file: &ws.file(e.file).display,
                            line: er.line,
                            column: er.column,
                            end_line: er.end_line,
                            end_column: er.end_column,
                            new_text: &e.new_text,
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
    struct Whole<'a> {
        diagnostics: Vec<JsonDiagnostic<'a>>,
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
