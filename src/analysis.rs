//! The one analysis entry point the CLI and the language server share.
//!
//! Given a loaded [`Workspace`] and a [`Config`], it lowers every library
//! (a top file and what it uses), runs the checks, applies suppression
//! comments and configured severities, and returns the diagnostics together
//! with the models the computations need.

use crate::config::{Config, Level};
use crate::diagnostic::{Diagnostic, Severity};
use crate::model::Library;
use crate::span::{FileId, Span};
use crate::workspace::Workspace;
use rustc_hash::FxHashSet as HashSet;

/// A library and the file at its top.
pub struct LibraryResult {
    pub top: FileId,
    pub library: Library,
    /// What its checks saw and found, kept by the language server.
    pub checks: Option<crate::checks::ChecksMemo>,
}

/// Everything one analysis produced.
pub struct Analysis {
    pub workspace: Workspace,
    pub libraries: Vec<LibraryResult>,
    /// Final diagnostics: deduplicated, suppressed, at configured severity,
    /// sorted by file and position.
    pub diagnostics: Vec<Diagnostic>,
}

impl Analysis {
    /// The library whose closure holds `file`, preferring one topped by it.
    pub fn library_of(&self, file: FileId) -> Option<&LibraryResult> {
        self.libraries.iter().find(|l| l.top == file).or_else(|| {
            self.libraries
                .iter()
                .find(|l| l.library.files.contains(&file))
        })
    }
}

/// Analyse every library of a loaded workspace.
pub fn analyze(workspace: Workspace, config: &Config) -> Analysis {
    analyze_with(workspace, config, true, None)
}

/// [`analyze`] for the language server, which analyses a document again
/// after every edit: each library keeps its species numbering, and reuses
/// the numbering of the library with the same top file in `last` (the
/// last analysis) when the edit left it standing.
pub fn analyze_after(workspace: Workspace, config: &Config, last: Option<&Analysis>) -> Analysis {
    analyze_with(workspace, config, true, Some(last))
}

/// [`analyze`] for callers that need only the diagnostics and the models
/// (`stoik check`): the syntax trees are freed once every library is
/// lowered, which on a library of 10^5 reactions is a third of the memory.
/// Comments, texts and line indexes stay, for suppressions and positions.
pub fn analyze_for_diagnostics(workspace: Workspace, config: &Config) -> Analysis {
    analyze_with(workspace, config, false, None)
}

/// The analysis; `after` is `Some` when the libraries keep their species
/// numbering, with the last analysis whose numbering they may reuse.
fn analyze_with(
    mut workspace: Workspace,
    config: &Config,
    keep_syntax: bool,
    after: Option<Option<&Analysis>>,
) -> Analysis {
    let mut raw: Vec<Diagnostic> = workspace.diagnostics.clone();
    for f in &workspace.files {
        for e in &f.syntax.errors {
            let mut d = Diagnostic::new("syntax", f.id, e.span, e.message.clone());
            if let Some(h) = &e.help {
                d = d.with_help(h.clone());
            }
            raw.push(d);
        }
    }
    let mut libraries = Vec::new();
    // Each library's counterpart in the last analysis (same top file).
    let mut lasts: Vec<Option<&LibraryResult>> = Vec::new();
    for top in workspace.tops() {
        let files = workspace.closure(top);
        let clock = crate::checks::Phases::start();
        let path = &workspace.file(top).path;
        let last = after.flatten().and_then(|a| {
            a.libraries
                .iter()
                .find(|l| a.workspace.file(l.top).path == *path)
        });
        let (library, diags) = match after {
            None => crate::model::lower::lower(&workspace, &files, config),
            Some(_) => crate::model::lower::lower_after(
                &workspace,
                &files,
                config,
                last.map(|l| &l.library),
            ),
        };
        clock.mark("lowering");
        raw.extend(diags);
        libraries.push(LibraryResult {
            top,
            library,
            checks: None,
        });
        lasts.push(last);
    }
    // Suppressions are read while the statements they cover are still
    // there; `stoik check` frees the statements before the checks.
    let suppressions = crate::suppression::collect(&workspace);
    if !keep_syntax {
        for f in &mut workspace.files {
            f.syntax.statements = Vec::new();
        }
    }
    for (l, last) in libraries.iter_mut().zip(lasts) {
        if after.is_some() {
            let last = last.and_then(|l| l.checks.as_ref());
            let (diags, memo) = crate::checks::run_after(&workspace, &l.library, config, last);
            raw.extend(diags);
            l.checks = Some(memo);
        } else {
            raw.extend(crate::checks::run(&workspace, &l.library, config));
        }
    }
    let clock = crate::checks::Phases::start();
    let diagnostics = finish(&workspace, raw, suppressions, config);
    clock.mark("suppressions and severities");
    Analysis {
        workspace,
        libraries,
        diagnostics,
    }
}

/// Deduplicate, apply suppressions and severities, sort.
fn finish(
    ws: &Workspace,
    raw: Vec<Diagnostic>,
    mut suppressions: crate::suppression::Suppressions,
    config: &Config,
) -> Vec<Diagnostic> {
    let mut seen = HashSet::default();
    let mut list: Vec<Diagnostic> = raw
        .into_iter()
        .filter(|d| seen.insert((d.file, d.span, d.rule, d.message.clone())))
        .collect();
    let mut out = Vec::with_capacity(list.len());
    list.retain(|d| {
        let line = ws.file(d.file).index.line_of(d.span.start());
        !suppressions.silences(d, line)
    });
    list.extend(suppressions.unused(ws));
    for mut d in list {
        match config.level(d.rule) {
            Level::Off => continue,
            Level::On(sev) => {
                // A hint the checks chose stays a hint unless configured.
                if d.severity != Severity::Hint || config.rules.contains_key(d.rule) {
                    d.severity = sev;
                }
            }
        }
        out.push(d);
    }
    out.sort_by(|a, b| {
        (a.file, a.span.start(), a.span.end(), a.rule).cmp(&(
            b.file,
            b.span.start(),
            b.span.end(),
            b.rule,
        ))
    });
    out
}

/// The span of a whole line, for diagnostics about a line.
pub fn line_span(ws: &Workspace, file: FileId, line: usize) -> Span {
    let f = ws.file(file);
    Span::from(f.index.line_range(&f.text, line))
}
