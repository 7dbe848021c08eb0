//! `stoik check`: lint files and folders for people and for CI.

use super::render_human::{self, Style};
use super::render_json::{self, Summary};
use super::{EXIT_FINDINGS, EXIT_OK, EXIT_USAGE, Format};
use crate::config::{Config, absolute, find_root};
use crate::diagnostic::Severity;
use crate::workspace::{Overlay, Workspace};
use std::io::{IsTerminal, Read, Write};
use std::path::{Path, PathBuf};

/// Gather the `.stoik` files named by the command line, folders walked
/// recursively with `.gitignore` honoured, in a stable order.
pub fn collect_files(paths: &[PathBuf]) -> Result<Vec<PathBuf>, String> {
    let mut out = Vec::new();
    for p in paths {
        if p.as_os_str() == "-" {
            continue;
        }
        if p.is_dir() {
            let mut found: Vec<PathBuf> = ignore::WalkBuilder::new(p)
                .build()
                .filter_map(Result::ok)
                .filter(|e| e.file_type().is_some_and(|t| t.is_file()))
                .map(|e| e.into_path())
                .filter(|p| p.extension().is_some_and(|x| x == "stoik"))
                .collect();
            found.sort();
            out.extend(found);
        } else if p.exists() {
            out.push(p.clone());
        } else {
            return Err(format!("{}: no such file or folder", p.display()));
        }
    }
    Ok(out)
}

pub fn run(
    paths: &[PathBuf],
    format: Format,
    deny_warnings: bool,
    stdin_name: Option<&Path>,
) -> i32 {
    // `--stdin-filename` alone means the text comes from standard input.
    let default = if stdin_name.is_some() {
        [PathBuf::from("-")]
    } else {
        [PathBuf::from(".")]
    };
    let paths = if paths.is_empty() {
        &default[..]
    } else {
        paths
    };
    let reads_stdin = paths.iter().any(|p| p.as_os_str() == "-");
    let anchor = paths
        .iter()
        .find(|p| p.as_os_str() != "-")
        .cloned()
        .or_else(|| stdin_name.map(Path::to_path_buf))
        .unwrap_or_else(|| PathBuf::from("."));
    let root = find_root(&anchor);
    let config = match Config::load(&root) {
        Ok(c) => c,
        Err(e) => {
            eprintln!("error: {e}");
            return EXIT_USAGE;
        }
    };
    let files = match collect_files(paths) {
        Ok(f) => f,
        Err(e) => {
            eprintln!("error: {e}");
            return EXIT_USAGE;
        }
    };
    super::pages::fit_to_input(&files);
    let mut overlay = Overlay::default();
    let stdin_path = absolute(stdin_name.unwrap_or(Path::new("<stdin>")));
    if reads_stdin {
        let mut bytes = Vec::new();
        if let Err(e) = std::io::stdin().read_to_end(&mut bytes) {
            eprintln!("error: cannot read standard input: {e}");
            return EXIT_USAGE;
        }
        overlay.texts.insert(
            stdin_path.clone(),
            String::from_utf8_lossy(&bytes).into_owned(),
        );
    }
    let progress = std::io::stderr().is_terminal() && files.len() > 20;
    let clock = crate::checks::Phases::start();
    let mut ws = Workspace::new(&root);
    ws.preparse(&files, &overlay);
    let total = files.len();
    for (i, f) in files.iter().enumerate() {
        if progress && i % 10 == 0 {
            eprint!("\rreading {i}/{total} files");
        }
        if let Err(e) = ws.load(f, &overlay) {
            eprintln!("error: {}: {}", e.path.display(), e.error);
            return EXIT_USAGE;
        }
    }
    if reads_stdin {
        match ws.load(&stdin_path, &overlay) {
            Ok(id) => {
                if stdin_name.is_none() {
                    ws.files[id.0 as usize].display = "<stdin>".into();
                }
            }
            Err(e) => {
                eprintln!("error: {}: {}", e.path.display(), e.error);
                return EXIT_USAGE;
            }
        }
    }
    if progress {
        eprint!("\rchecking {total} files        \r");
    }
    clock.mark("reading and parsing");
    let analysis = crate::analysis::analyze_for_diagnostics(ws, &config);
    let ws = &analysis.workspace;
    let mut summary = Summary {
        files: ws.files.len(),
        ..Summary::default()
    };
    for d in &analysis.diagnostics {
        summary.count(d.severity);
    }
    // Buffered, so that pretty JSON is not written a line at a time.
    let mut out = std::io::BufWriter::new(std::io::stdout().lock());
    let written = match format {
        Format::Human => {
            let style = Style {
                color: super::use_color(),
            };
            let mut text = String::new();
            // Rendered on every core, then joined in order.
            let rendered = crate::parallel::map_in_order(&analysis.diagnostics, 64, |d| {
                render_human::render(d, ws, style)
            });
            for r in rendered {
                text.push_str(&r);
                text.push('\n');
            }
            text.push_str(&render_human::summary(
                summary.files,
                summary.errors,
                summary.warnings,
                summary.infos,
            ));
            text.push('\n');
            out.write_all(text.as_bytes())
        }
        Format::Json => render_json::write_report(&mut out, &analysis.diagnostics, ws, summary)
            .and_then(|_| writeln!(out)),
        Format::Sarif => {
            let log = super::render_sarif::render(&analysis.diagnostics, ws);
            serde_json::to_writer_pretty(&mut out, &log)
                .map_err(std::io::Error::other)
                .and_then(|_| writeln!(out))
        }
    };
    let written = written.and_then(|()| out.flush());
    clock.mark("report written");
    if let Err(e) = written
        && e.kind() != std::io::ErrorKind::BrokenPipe
    {
        eprintln!("error: cannot write the report: {e}");
        return EXIT_USAGE;
    }
    let failing = analysis.diagnostics.iter().any(|d| {
        d.severity == Severity::Error || (deny_warnings && d.severity == Severity::Warning)
    });
    // The process ends right after this; freeing the models of a large
    // library one allocation at a time would only delay the exit, so the
    // operating system takes the memory back instead.
    std::mem::forget(analysis);
    if failing { EXIT_FINDINGS } else { EXIT_OK }
}
