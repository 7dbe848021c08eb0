//! Fixture files with inline expectations, driven by one helper.
//!
//! Every `tests/fixtures/**/*.stoik` file is checked as a library of its own.
//! A trailing comment `# expect: RULE[, RULE...]` lists exactly the rules whose
//! findings start on that line; every other line must have none. A file that
//! is only used by another fixture (named `*.part.stoik`) is checked through
//! its user.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use stoik::config::Config;
use stoik::workspace::{Overlay, Workspace};

fn fixture_files(dir: &Path, out: &mut Vec<PathBuf>) {
    let mut entries: Vec<_> = std::fs::read_dir(dir)
        .expect("fixture folder")
        .filter_map(Result::ok)
        .map(|e| e.path())
        .collect();
    entries.sort();
    for p in entries {
        if p.is_dir() {
            fixture_files(&p, out);
        } else if p.extension().is_some_and(|x| x == "stoik")
            && !p.to_string_lossy().ends_with(".part.stoik")
        {
            out.push(p);
        }
    }
}

/// Expected rules per 1-based line, read from `# expect:` comments.
fn expectations(text: &str) -> BTreeMap<usize, Vec<String>> {
    let mut map = BTreeMap::new();
    for (i, line) in text.lines().enumerate() {
        if let Some(pos) = line.find("# expect:") {
            let mut rules: Vec<String> = line[pos + 9..]
                .split(',')
                .map(|r| r.trim().to_string())
                .filter(|r| !r.is_empty())
                .collect();
            rules.sort();
            map.insert(i + 1, rules);
        }
    }
    map
}

#[test]
fn every_fixture_reports_exactly_its_expectations() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures");
    let mut files = Vec::new();
    fixture_files(&root, &mut files);
    assert!(files.len() >= 5, "too few fixtures found: {}", files.len());
    let config = Config::default();
    let mut failures = Vec::new();
    for path in &files {
        let mut ws = Workspace::new(&root);
        let id = ws
            .load(path, &Overlay::default())
            .expect("fixture readable");
        let text = ws.file(id).text.clone();
        let analysis = stoik::analysis::analyze(ws, &config);
        let mut actual: BTreeMap<usize, Vec<String>> = BTreeMap::new();
        for d in analysis.diagnostics.iter().filter(|d| d.file == id) {
            let f = analysis.workspace.file(d.file);
            let line = f.index.line_of(d.span.start()) + 1;
            actual.entry(line).or_default().push(d.rule.to_string());
        }
        for v in actual.values_mut() {
            v.sort();
        }
        let expected = expectations(&text);
        if actual != expected {
            let mut detail = String::new();
            for d in analysis.diagnostics.iter().filter(|d| d.file == id) {
                let f = analysis.workspace.file(d.file);
                detail.push_str(&format!(
                    "    line {}: [{}] {}\n",
                    f.index.line_of(d.span.start()) + 1,
                    d.rule,
                    d.message
                ));
            }
            failures.push(format!(
                "{}:\n  expected {:?}\n  actual   {:?}\n{}",
                path.strip_prefix(&root).unwrap_or(path).display(),
                expected,
                actual,
                detail
            ));
        }
    }
    assert!(
        failures.is_empty(),
        "fixture mismatches:\n{}",
        failures.join("\n")
    );
}
