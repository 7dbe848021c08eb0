//! `stoik fmt`: canonical layout of `.stoik` files, rewritten in place or
//! checked for CI.
//!
//! The layout itself is [`crate::format`]; this file only reads and writes
//! files, and in `--check` mode says which files would change and shows the
//! start of each change.

use super::check::collect_files;
use super::{EXIT_FINDINGS, EXIT_OK, EXIT_USAGE};
use crate::format::format;
use std::io::{Read, Write};
use std::path::{Path, PathBuf};

/// How many changed lines of each side the `--check` diff shows.
const DIFF_LINES: usize = 8;

pub fn run(paths: &[PathBuf], check: bool) -> i32 {
    let default = [PathBuf::from(".")];
    let paths = if paths.is_empty() {
        &default[..]
    } else {
        paths
    };
    let files = match collect_files(paths) {
        Ok(f) => f,
        Err(e) => {
            eprintln!("error: {e}");
            return EXIT_USAGE;
        }
    };
    let mut failed = false;
    let mut changed = 0usize;
    let mut unchanged = 0usize;
    if paths.iter().any(|p| p.as_os_str() == "-") {
        // Standard input counts in the `--check` summary only: in place of a
        // file it rewrites, it writes the formatted text to standard output.
        match stdin(check) {
            Ok(true) if check => changed += 1,
            Ok(_) => {}
            Err(e) => {
                eprintln!("error: {e}");
                failed = true;
            }
        }
    }
    for path in &files {
        match file(path, check) {
            Ok(true) => changed += 1,
            Ok(false) => unchanged += 1,
            Err(e) => {
                eprintln!("error: {e}");
                failed = true;
            }
        }
    }
    let files_word = |n: usize| if n == 1 { "file" } else { "files" };
    if check {
        if changed > 0 {
            eprintln!(
                "{changed} {} would be reformatted, {unchanged} already formatted; run `stoik fmt` to rewrite them",
                files_word(changed)
            );
        }
    } else if changed > 0 {
        eprintln!(
            "{changed} {} reformatted, {unchanged} already formatted",
            files_word(changed)
        );
    }
    if failed {
        EXIT_USAGE
    } else if check && changed > 0 {
        EXIT_FINDINGS
    } else {
        EXIT_OK
    }
}

/// Format standard input to standard output (or only compare, under
/// `--check`); returns whether the text changes.
fn stdin(check: bool) -> Result<bool, String> {
    let mut bytes = Vec::new();
    std::io::stdin()
        .read_to_end(&mut bytes)
        .map_err(|e| format!("cannot read standard input: {e}"))?;
    let text = String::from_utf8(bytes)
        .map_err(|_| "standard input is not UTF-8 text; save it as UTF-8".to_string())?;
    let formatted = format(&text);
    let changed = formatted != text;
    if check {
        if changed {
            report_change(Path::new("<stdin>"), &text, &formatted);
        }
    } else {
        let mut out = std::io::stdout().lock();
        out.write_all(formatted.as_bytes())
            .and_then(|()| out.flush())
            .map_err(|e| format!("cannot write standard output: {e}"))?;
    }
    Ok(changed)
}

/// Format one file in place (or only compare, under `--check`); returns
/// whether the text changes.
fn file(path: &Path, check: bool) -> Result<bool, String> {
    let bytes = std::fs::read(path).map_err(|e| format!("{}: cannot read: {e}", path.display()))?;
    let text = String::from_utf8(bytes)
        .map_err(|_| format!("{}: not UTF-8 text; save it as UTF-8", path.display()))?;
    let formatted = format(&text);
    if formatted == text {
        return Ok(false);
    }
    if check {
        report_change(path, &text, &formatted);
    } else {
        std::fs::write(path, formatted.as_bytes())
            .map_err(|e| format!("{}: cannot write: {e}", path.display()))?;
        eprintln!("reformatted {}", path.display());
    }
    Ok(true)
}

/// Name a file that would change and show the first changed lines.
fn report_change(path: &Path, before: &str, after: &str) {
    let mut err = std::io::stderr().lock();
    let _ = writeln!(err, "would reformat {}", path.display());
    let _ = err.write_all(first_change(path, before, after).as_bytes());
}

/// A unified-style hunk from the first to the last changed line, cut to a
/// few lines per side.
fn first_change(path: &Path, before: &str, after: &str) -> String {
    let old: Vec<&str> = before.lines().collect();
    let new: Vec<&str> = after.lines().collect();
    let prefix = old.iter().zip(&new).take_while(|(a, b)| a == b).count();
    let suffix = old[prefix..]
        .iter()
        .rev()
        .zip(new[prefix..].iter().rev())
        .take_while(|(a, b)| a == b)
        .count();
    let old_mid = &old[prefix..old.len() - suffix];
    let new_mid = &new[prefix..new.len() - suffix];
    let mut out = format!(
        "--- {0}\n+++ {0} (formatted)\n@@ -{1},{2} +{3},{4} @@\n",
        path.display(),
        prefix + 1,
        old_mid.len(),
        prefix + 1,
        new_mid.len()
    );
    let show = |out: &mut String, sign: char, lines: &[&str]| {
        for line in lines.iter().take(DIFF_LINES) {
            out.push(sign);
            out.push_str(line);
            out.push('\n');
        }
        if lines.len() > DIFF_LINES {
            out.push_str(&format!("{sign} … {} more\n", lines.len() - DIFF_LINES));
        }
    };
    show(&mut out, '-', old_mid);
    show(&mut out, '+', new_mid);
    if old_mid.is_empty() && new_mid.is_empty() {
        out.push_str("  (only line ends or whitespace at line ends change)\n");
    }
    out
}
