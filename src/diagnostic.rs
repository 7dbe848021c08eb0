//! The one diagnostic type every check produces and every renderer consumes.
//!
//! The CLI (human, JSON, SARIF) and the language server render this same value;
//! neither invents findings of its own.

use crate::span::{FileId, Span};
use serde::Serialize;

/// How serious a finding is. Ordered from least to most severe.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    Hint,
    Info,
    Warning,
    Error,
}

impl Severity {
    pub fn as_str(self) -> &'static str {
        match self {
            Severity::Hint => "hint",
            Severity::Info => "info",
            Severity::Warning => "warning",
            Severity::Error => "error",
        }
    }

    pub fn parse(s: &str) -> Option<Severity> {
        match s {
            "hint" => Some(Severity::Hint),
            "info" => Some(Severity::Info),
            "warning" | "warn" => Some(Severity::Warning),
            "error" => Some(Severity::Error),
            _ => None,
        }
    }
}

/// How safe it is to apply a fix without looking at it.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Applicability {
    /// Keeps the meaning the author intended; may be applied in bulk.
    Safe,
    /// Changes data (for example a K value); a person should confirm it.
    Unsafe,
}

/// One replacement of a byte range of one file.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct TextEdit {
    pub file: FileId,
    pub span: Span,
    pub new_text: String,
}

/// A machine-applicable repair carried by a diagnostic.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Fix {
    pub title: String,
    pub applicability: Applicability,
    pub edits: Vec<TextEdit>,
}

/// A secondary location that explains a finding (the other reaction of a
/// reverse pair, the members of a cycle).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Related {
    pub file: FileId,
    pub span: Span,
    pub message: String,
}

/// A finding: a rule, where it fired, what it says and how to repair it.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Diagnostic {
    pub rule: &'static str,
    pub severity: Severity,
    pub file: FileId,
    pub span: Span,
    pub message: String,
    /// A short suggestion shown under the source excerpt.
    pub help: Option<String>,
    pub related: Vec<Related>,
    pub fixes: Vec<Fix>,
}

impl Diagnostic {
    /// A diagnostic at the rule's default severity.
    pub fn new(rule: &'static str, file: FileId, span: Span, message: impl Into<String>) -> Self {
        let severity = crate::rules::lookup(rule)
            .map(|r| r.default_severity)
            .unwrap_or(Severity::Error);
        Diagnostic {
            rule,
            severity,
            file,
            span,
            message: message.into(),
            help: None,
            related: Vec::new(),
            fixes: Vec::new(),
        }
    }

    pub fn with_help(mut self, help: impl Into<String>) -> Self {
        self.help = Some(help.into());
        self
    }

    pub fn with_related(mut self, file: FileId, span: Span, message: impl Into<String>) -> Self {
        self.related.push(Related {
            file,
            span,
            message: message.into(),
        });
        self
    }

    pub fn with_fix(mut self, fix: Fix) -> Self {
        self.fixes.push(fix);
        self
    }

    pub fn with_severity(mut self, severity: Severity) -> Self {
        self.severity = severity;
        self
    }
}
