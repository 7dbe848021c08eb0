//! Byte spans to protocol positions and back, paths to URIs, and stoik's
//! diagnostics to the protocol's.
//!
//! This is the only place that knows both sides; every handler converts
//! through it, with the position encoding negotiated at initialization.

use crate::diagnostic::{Diagnostic, Severity};
use crate::span::Span;
use crate::syntax::line_index::{Encoding, LineIndex, Position};
use crate::workspace::{SourceText, Workspace};
use std::path::{Path, PathBuf};
use tower_lsp_server::ls_types as lsp;

/// The encoding a client names, if stoik speaks it.
pub fn encoding_from_kind(kind: &lsp::PositionEncodingKind) -> Option<Encoding> {
    match kind.as_str() {
        "utf-8" => Some(Encoding::Utf8),
        "utf-16" => Some(Encoding::Utf16),
        "utf-32" => Some(Encoding::Utf32),
        _ => None,
    }
}

pub fn kind_from_encoding(encoding: Encoding) -> lsp::PositionEncodingKind {
    match encoding {
        Encoding::Utf8 => lsp::PositionEncodingKind::UTF8,
        Encoding::Utf16 => lsp::PositionEncodingKind::UTF16,
        Encoding::Utf32 => lsp::PositionEncodingKind::UTF32,
    }
}

/// Pick an encoding from what the client offers: UTF-8 first (no
/// conversion at all), then UTF-32, else the protocol's default UTF-16.
pub fn negotiate(offered: Option<&[lsp::PositionEncodingKind]>) -> Encoding {
    let offered: Vec<Encoding> = offered
        .unwrap_or_default()
        .iter()
        .filter_map(encoding_from_kind)
        .collect();
    for preferred in [Encoding::Utf8, Encoding::Utf32] {
        if offered.contains(&preferred) {
            return preferred;
        }
    }
    Encoding::Utf16
}

/// A text with its line index, the pair every conversion needs.
#[derive(Clone, Copy)]
pub struct Text<'a> {
    pub text: &'a str,
    pub index: &'a LineIndex,
    pub encoding: Encoding,
}

impl<'a> Text<'a> {
    pub fn of(source: &'a SourceText, encoding: Encoding) -> Self {
        Text {
            text: &source.text,
            index: &source.index,
            encoding,
        }
    }

    pub fn position(&self, offset: usize) -> lsp::Position {
        let p = self.index.position(self.text, offset, self.encoding);
        lsp::Position::new(p.line, p.column)
    }

    pub fn range(&self, span: Span) -> lsp::Range {
        lsp::Range::new(self.position(span.start()), self.position(span.end()))
    }

    pub fn offset(&self, position: lsp::Position) -> usize {
        self.index.offset(
            self.text,
            Position {
                line: position.line,
                column: position.character,
            },
            self.encoding,
        )
    }

    pub fn span(&self, range: lsp::Range) -> Span {
        let a = self.offset(range.start);
        let b = self.offset(range.end);
        Span::new(a.min(b), a.max(b))
    }
}

/// A protocol position as stoik's line index takes it.
pub fn position(p: lsp::Position) -> Position {
    Position {
        line: p.line,
        column: p.character,
    }
}

pub fn uri_of(path: &Path) -> Option<lsp::Uri> {
    lsp::Uri::from_file_path(path)
}

/// The normalised file path of a `file:` URI.
pub fn path_of(uri: &lsp::Uri) -> Option<PathBuf> {
    uri.to_file_path()
        .map(|p| crate::config::absolute(p.as_ref()))
}

pub fn severity(s: Severity) -> lsp::DiagnosticSeverity {
    match s {
        Severity::Error => lsp::DiagnosticSeverity::ERROR,
        Severity::Warning => lsp::DiagnosticSeverity::WARNING,
        Severity::Info => lsp::DiagnosticSeverity::INFORMATION,
        Severity::Hint => lsp::DiagnosticSeverity::HINT,
    }
}

/// Where the generated rule documents live, when they could be written.
#[derive(Clone, Debug, Default)]
pub struct RuleDocs {
    pub dir: Option<PathBuf>,
}

impl RuleDocs {
    /// Write one text file per rule (`stoik explain`'s text) under `dir`, so
    /// that a diagnostic can link to its rule. Gives up quietly (no links)
    /// when the folder cannot be written.
    pub fn generate(dir: PathBuf) -> RuleDocs {
        if std::fs::create_dir_all(&dir).is_err() {
            return RuleDocs { dir: None };
        }
        for rule in crate::rules::RULES {
            let body = format!("{}: {}\n\n{}\n", rule.id, rule.summary, rule.doc);
            let path = dir.join(format!("{}.txt", rule.id));
            if std::fs::read_to_string(&path).ok().as_deref() != Some(body.as_str())
                && std::fs::write(&path, body).is_err()
            {
                return RuleDocs { dir: None };
            }
        }
        RuleDocs { dir: Some(dir) }
    }

    pub fn href(&self, rule: &str) -> Option<lsp::Uri> {
        let dir = self.dir.as_ref()?;
        crate::rules::lookup(rule)?;
        uri_of(&dir.join(format!("{rule}.txt")))
    }
}

/// One stoik diagnostic in protocol form. The message carries the help line;
/// `data` carries the rule's summary and the number of fixes.
pub fn diagnostic(
    ws: &Workspace,
    d: &Diagnostic,
    encoding: Encoding,
    docs: &RuleDocs,
) -> lsp::Diagnostic {
    let file = ws.file(d.file);
    let text = Text::of(file, encoding);
    let mut message = d.message.clone();
    if let Some(help) = &d.help {
        message.push_str("\nhelp: ");
        message.push_str(help);
    }
    let related: Vec<lsp::DiagnosticRelatedInformation> = d
        .related
        .iter()
        .filter_map(|r| {
            let f = ws.file(r.file);
            Some(lsp::DiagnosticRelatedInformation {
                location: lsp::Location::new(uri_of(&f.path)?, Text::of(f, encoding).range(r.span)),
                message: r.message.clone(),
            })
        })
        .collect();
    let summary = crate::rules::lookup(d.rule).map(|r| r.summary);
    lsp::Diagnostic {
        range: text.range(d.span),
        severity: Some(severity(d.severity)),
        code: Some(lsp::NumberOrString::String(d.rule.to_string())),
        code_description: docs.href(d.rule).map(|href| lsp::CodeDescription { href }),
        source: Some("stoik".to_string()),
        message,
        related_information: (!related.is_empty()).then_some(related),
        tags: (d.rule == "unused-suppression").then(|| vec![lsp::DiagnosticTag::UNNECESSARY]),
        data: Some(serde_json::json!({
            "rule": d.rule,
            "summary": summary,
            "fixes": d.fixes.len(),
        })),
    }
}
