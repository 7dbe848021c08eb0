//! Human-readable diagnostics: the source line with the span marked, the
//! rule id and a help line.

use crate::diagnostic::{Diagnostic, Severity};
use crate::syntax::line_index::Encoding;
use crate::workspace::Workspace;
use std::fmt::Write as _;

/// ANSI styling, or none.
#[derive(Clone, Copy)]
pub struct Style {
    pub color: bool,
}

impl Style {
    fn paint(&self, code: &str, text: &str) -> String {
        if self.color {
            format!("\x1b[{code}m{text}\x1b[0m")
        } else {
            text.to_string()
        }
    }
    fn severity(&self, s: Severity) -> String {
        let code = match s {
            Severity::Error => "1;31",
            Severity::Warning => "1;33",
            Severity::Info => "1;36",
            Severity::Hint => "1;32",
        };
        self.paint(code, s.as_str())
    }
}

/// Render one diagnostic as a block of lines.
pub fn render(d: &Diagnostic, ws: &Workspace, style: Style) -> String {
    let file = ws.file(d.file);
    let text = &file.text;
    let start = file.index.position(text, d.span.start(), Encoding::Utf32);
    let end = file.index.position(text, d.span.end(), Encoding::Utf32);
    let mut out = String::new();
    let _ = writeln!(
        out,
        "{}{} {}",
        style.severity(d.severity),
        style.paint("1", &format!("[{}]:", d.rule)),
        style.paint("1", &d.message)
    );
    let line_no = start.line as usize + 1;
    let gutter = line_no.to_string().len().max(2);
    let pad = " ".repeat(gutter);
    let _ = writeln!(
        out,
        "{pad}{} {}:{}:{}",
        style.paint("1;34", "-->"),
        file.display,
        line_no,
        start.column + 1
    );
    let range = file.index.line_range(text, start.line as usize);
    let line_text = &text[range.clone()];
    let (shown, offset_chars) = window(line_text, start.column as usize);
    let _ = writeln!(out, "{pad} {}", style.paint("1;34", "|"));
    let _ = writeln!(
        out,
        "{} {} {}",
        style.paint("1;34", &format!("{line_no:>gutter$}")),
        style.paint("1;34", "|"),
        shown.replace('\t', " ")
    );
    let caret_start = start.column as usize - offset_chars;
    let caret_len = if end.line == start.line {
        (end.column.saturating_sub(start.column) as usize).max(1)
    } else {
        (line_text.chars().count() - start.column as usize).max(1)
    };
    let caret_len = caret_len.min(shown.chars().count().saturating_sub(caret_start).max(1));
    let marker_color = match d.severity {
        Severity::Error => "1;31",
        Severity::Warning => "1;33",
        _ => "1;36",
    };
    let _ = writeln!(
        out,
        "{pad} {} {}{}",
        style.paint("1;34", "|"),
        " ".repeat(caret_start),
        style.paint(marker_color, &"^".repeat(caret_len))
    );
    for r in &d.related {
        let rf = ws.file(r.file);
        let p = rf.index.position(&rf.text, r.span.start(), Encoding::Utf32);
        let _ = writeln!(
            out,
            "{pad} {} note: {} ({}:{}:{})",
            style.paint("1;34", "="),
            r.message,
            rf.display,
            p.line + 1,
            p.column + 1
        );
    }
    if let Some(help) = &d.help {
        let _ = writeln!(out, "{pad} {} help: {}", style.paint("1;34", "="), help);
    }
    for fix in &d.fixes {
        let _ = writeln!(out, "{pad} {} fix: {}", style.paint("1;34", "="), fix.title);
    }
    out
}

/// A window of at most 120 characters of a long line around `column`, and
/// how many characters were cut from its start.
fn window(line: &str, column: usize) -> (String, usize) {
    const WIDTH: usize = 120;
    let count = line.chars().count();
    if count <= WIDTH {
        return (line.to_string(), 0);
    }
    let start = column.saturating_sub(40).min(count.saturating_sub(WIDTH));
    (line.chars().skip(start).take(WIDTH).collect(), start)
}

/// The closing summary line.
pub fn summary(files: usize, errors: usize, warnings: usize, infos: usize) -> String {
    let plural = |n: usize, w: &str| {
        if n == 1 {
            format!("{n} {w}")
        } else {
            format!("{n} {w}s")
        }
    };
    format!(
        "checked {}: {}, {}, {}",
        plural(files, "file"),
        plural(errors, "error"),
        plural(warnings, "warning"),
        plural(infos, "info")
    )
}
