//! Suppression comments: `# stoik: allow RULE[, RULE...]` for a statement and
//! `# stoik: allow-file RULE` for a file, and the report of those that
//! silence nothing.

use crate::diagnostic::Diagnostic;
use crate::span::{FileId, Span};
use crate::workspace::Workspace;

/// One rule named in one allow comment.
struct Allow {
    file: FileId,
    rule: String,
    /// The comment's span (where an unused suppression is reported).
    span: Span,
    /// Lines (0-based, inclusive) the allow covers; `None` for the whole file.
    lines: Option<(usize, usize)>,
    used: bool,
}

/// Every allow comment of a workspace.
pub struct Suppressions {
    allows: Vec<Allow>,
}

/// Parse the rule list of a comment text, if it is a suppression.
/// Returns whether it is file-wide and the rules with their byte offsets.
pub fn parse_comment(text: &str) -> Option<(bool, Vec<(usize, String)>)> {
    let body = text.strip_prefix('#')?.trim_start();
    let rest = body.strip_prefix("stoik:")?.trim_start();
    let (file_wide, list) = if let Some(r) = rest.strip_prefix("allow-file") {
        (true, r)
    } else if let Some(r) = rest.strip_prefix("allow") {
        (false, r)
    } else {
        return None;
    };
    // A second `#` ends the rule list (what follows is a remark).
    let list = list.split('#').next().unwrap_or("");
    let offset_of = |piece: &str| piece.as_ptr() as usize - text.as_ptr() as usize;
    let rules = list
        .split(',')
        .map(str::trim)
        .filter(|name| !name.is_empty())
        .map(|name| (offset_of(name), name.to_string()))
        .collect();
    Some((file_wide, rules))
}

pub fn collect(ws: &Workspace) -> Suppressions {
    let mut allows = Vec::new();
    for f in &ws.files {
        let statements = &f.syntax.statements;
        for c in &f.syntax.comments {
            let text = &f.text[c.span.range()];
            let Some((file_wide, rules)) = parse_comment(text) else {
                continue;
            };
            // Statements are in line order, so the one a comment belongs to
            // is found by binary search.
            let next = statements.partition_point(|s| s.line <= c.line);
            let lines = if file_wide {
                None
            } else if c.own_line {
                // The statement that starts on the next line with code.
                statements
                    .get(next)
                    .map(|s| (s.line, s.last_line))
                    .or(Some((c.line, c.line)))
            } else {
                next.checked_sub(1)
                    .and_then(|i| statements.get(i))
                    .filter(|s| s.line <= c.line && c.line <= s.last_line)
                    .map(|s| (s.line, s.last_line))
                    .or(Some((c.line, c.line)))
            };
            for (off, rule) in rules {
                allows.push(Allow {
                    file: f.id,
                    span: Span::new(c.span.start() + off, c.span.start() + off + rule.len()),
                    rule,
                    lines,
                    used: false,
                });
            }
        }
    }
    Suppressions { allows }
}

impl Suppressions {
    /// True when an allow covers this diagnostic, whose span starts on the
    /// 0-based `line`; the allow is then marked used.
    pub fn silences(&mut self, d: &Diagnostic, line: usize) -> bool {
        if d.rule == "unused-suppression" {
            return false;
        }
        let mut hit = false;
        for a in &mut self.allows {
            if a.file != d.file || a.rule != d.rule {
                continue;
            }
            let covered = match a.lines {
                None => true,
                Some((first, last)) => first <= line && line <= last,
            };
            if covered {
                a.used = true;
                hit = true;
            }
        }
        hit
    }

    /// The allows that silenced nothing, as `unused-suppression` findings.
    pub fn unused(&self, _ws: &Workspace) -> Vec<Diagnostic> {
        self.allows
            .iter()
            .filter(|a| !a.used)
            .map(|a| {
                if crate::rules::lookup(&a.rule).is_none() {
                    let d = Diagnostic::new(
                        "unused-suppression",
                        a.file,
                        a.span,
                        format!("there is no rule `{}`", a.rule),
                    );
                    match crate::rules::suggest(&a.rule) {
                        Some(s) => d.with_help(format!("did you mean `{s}`?")),
                        None => d.with_help("`stoik explain` lists the rules"),
                    }
                } else {
                    Diagnostic::new(
                        "unused-suppression",
                        a.file,
                        a.span,
                        format!("`allow {}` silences nothing here", a.rule),
                    )
                    .with_help("remove the rule from the comment")
                }
            })
            .collect()
    }
}
