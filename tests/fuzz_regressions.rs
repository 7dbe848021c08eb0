//! The fuzz targets' checks on the stable toolchain: every body of
//! `fuzz/src/bodies.rs` runs over every input the fuzzers ever crashed on
//! (`tests/fuzz_regressions/*.txt`, kept as found after minimising) and over
//! the seed corpus the fuzzers start from (the examples, the fixtures, the
//! grammar's examples and the formatter's cases, each also with CRLF and
//! lone-CR line ends). A crash input that panics again fails here, in every
//! `cargo test`, without cargo-fuzz.

#[path = "format/support.rs"]
mod support;

#[path = "../fuzz/src/bodies.rs"]
mod bodies;

use std::path::{Path, PathBuf};

fn files_under(dir: &Path, out: &mut Vec<PathBuf>) {
    let Ok(entries) = std::fs::read_dir(dir) else {
        return;
    };
    for e in entries.flatten() {
        let p = e.path();
        if p.is_dir() {
            files_under(&p, out);
        } else if p.extension().is_some_and(|x| x == "stoik" || x == "txt") {
            out.push(p);
        }
    }
}

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Every body on one input, naming the file and the target on failure.
fn run_all(name: &str, bytes: &[u8]) {
    let text = String::from_utf8_lossy(bytes);
    type Body = fn(&str);
    let targets: [(&str, Body); 5] = [
        ("lexer", bodies::lexer),
        ("parser", bodies::parser),
        ("checker", bodies::checker),
        ("format_roundtrip", bodies::format_roundtrip),
        ("positions", bodies::positions),
    ];
    for (target, body) in targets {
        let outcome = std::panic::catch_unwind(|| body(&text));
        assert!(outcome.is_ok(), "fuzz target `{target}` fails on {name}");
    }
}

#[test]
fn every_kept_crash_input_passes_every_target() {
    let mut files = Vec::new();
    files_under(&root().join("tests/fuzz_regressions"), &mut files);
    files.sort();
    assert!(!files.is_empty(), "no kept crash inputs found");
    for f in &files {
        let bytes = std::fs::read(f).expect("readable");
        run_all(&f.display().to_string(), &bytes);
    }
}

#[test]
fn the_seed_corpus_passes_every_target_in_every_line_end_style() {
    let mut files = Vec::new();
    for dir in [
        "examples",
        "tests/fixtures",
        "grammar/examples",
        "tests/format",
    ] {
        files_under(&root().join(dir), &mut files);
    }
    files.sort();
    assert!(files.len() >= 40, "only {} seed files", files.len());
    for f in &files {
        let text = std::fs::read_to_string(f).expect("UTF-8 seed");
        let name = f.display().to_string();
        run_all(&name, text.as_bytes());
        let crlf = text.replace("\r\n", "\n").replace('\n', "\r\n");
        run_all(&format!("{name} (CRLF)"), crlf.as_bytes());
        let cr = text.replace("\r\n", "\n").replace('\n', "\r");
        run_all(&format!("{name} (CR)"), cr.as_bytes());
    }
}

#[test]
fn the_mixture_that_gave_a_species_twice_is_diagnosed() {
    // The first crash the checker target found: the solver indexed past its
    // species list. The second amount is now an error of its own.
    let text = std::fs::read_to_string(
        root().join("tests/fuzz_regressions/checker-mixture-species-twice.txt"),
    )
    .expect("kept input");
    let analysis = bodies::analyse(&text);
    assert!(
        analysis
            .diagnostics
            .iter()
            .any(|d| d.rule == "mixture" && d.message.contains("`NH3(g)` is given twice")),
        "{:?}",
        analysis.diagnostics
    );
}
