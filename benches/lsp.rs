//! Language-server speed on a generated 20,000-reaction library: the work
//! of one edit (apply the change, re-analyse the whole file with the syntax
//! trees of the last analysis to reuse, convert the diagnostics; the
//! replaced analysis is freed off that path, as the server does) and the
//! inlay hints of one screenful.
//!
//! The bars (DESIGN.md): edit-to-diagnostics under 50 ms, inlay hints for
//! a visible range under 10 ms.

use criterion::{Criterion, criterion_group, criterion_main};
use std::collections::HashMap;
use std::hint::black_box;
use std::path::{Path, PathBuf};
use std::sync::Arc;
use stoik::config::Config;
use stoik::lsp::convert::RuleDocs;
use stoik::lsp::documents::{Change, apply};
use stoik::lsp::snapshot::{Snapshot, build_with};
use stoik::syntax::line_index::{Encoding, Position};
use tower_lsp_server::ls_types as lsp;

/// The allocator of the `stoik` binary, so that the figures are the ones
/// the command and the server give.
#[global_allocator]
static ALLOCATOR: mimalloc::MiMalloc = mimalloc::MiMalloc;

/// The work of one edit: analyse the document with the texts of the edit
/// and the last snapshot to reuse, and convert its diagnostics.
fn analyse_edit(
    path: &Path,
    version: i32,
    texts: HashMap<PathBuf, String>,
    root: &Path,
    last: Option<&Snapshot>,
    docs: &RuleDocs,
) -> Arc<Snapshot> {
    let snap = build_with(path, version, texts, root, Config::default(), None, last)
        .expect("the overlay serves the files");
    let diags = stoik::lsp::server::document_diagnostics(&snap, Encoding::Utf16, docs);
    black_box(diags.len());
    Arc::new(snap)
}

fn bench(c: &mut Criterion) {
    let path = PathBuf::from("/stoik-bench/big.stoik");
    let root = Path::new("/stoik-bench");
    let text = stoik::synthetic::edit_benchmark_library(20_000);
    let lines = text.lines().count() as u32;
    let docs = RuleDocs::default();
    let mut group = c.benchmark_group("lsp");
    group.sample_size(20);

    // One keystroke in the middle of the file (a `#` typed, then deleted),
    // then the whole analysis.
    let mut version = 1;
    let mut last: Option<Arc<Snapshot>> = None;
    let mut doc = text.clone();
    group.bench_function("edit_to_diagnostics_20000_reactions", |b| {
        b.iter_with_large_drop(|| {
            version += 1;
            let at = Position {
                line: lines / 2,
                column: 0,
            };
            let change = if version % 2 == 0 {
                Change {
                    range: Some((at, at)),
                    text: "#".to_string(),
                }
            } else {
                let next = Position {
                    line: at.line,
                    column: 1,
                };
                Change {
                    range: Some((at, next)),
                    text: String::new(),
                }
            };
            apply(&mut doc, &change, Encoding::Utf16);
            let mut texts = HashMap::new();
            texts.insert(path.clone(), doc.clone());
            // The server keeps the new snapshot, whose trees the next edit
            // reuses, and frees the replaced one on another thread.
            let snap = analyse_edit(&path, version, texts, root, last.as_deref(), &docs);
            last.replace(snap)
        })
    });

    let mut texts = HashMap::new();
    texts.insert(path.clone(), text.clone());
    let snap = build_with(&path, 1, texts, root, Config::default(), None, None).expect("snapshot");
    let middle = lines / 2;
    let range = lsp::Range::new(
        lsp::Position::new(middle, 0),
        lsp::Position::new(middle + 60, 0),
    );
    group.bench_function("inlay_hints_60_lines", |b| {
        b.iter(|| {
            black_box(stoik::lsp::inlay_hints::inlay_hints(
                &snap,
                range,
                Encoding::Utf16,
            ))
        })
    });

    // The core's synthetic library (many consistent cycles, 1% planted
    // mistakes): the top file is edited, the files it uses come from the
    // same overlay.
    let generated = stoik::synthetic::generate(&stoik::synthetic::Recipe {
        reactions: 20_000,
        mistakes: 0.01,
        files: 1,
        seed: 7,
    });
    let files: Vec<(PathBuf, String)> = generated
        .files
        .iter()
        .map(|(p, t)| (root.join(p), t.clone()))
        .collect();
    let top = files[0].0.clone();
    let mut top_text = files[0].1.clone();
    let mut version = 1;
    let mut last: Option<Arc<Snapshot>> = None;
    group.bench_function("edit_to_diagnostics_synthetic_20000_reactions", |b| {
        b.iter_with_large_drop(|| {
            version += 1;
            let at = Position { line: 0, column: 0 };
            let change = Change {
                range: Some((at, at)),
                text: if version % 2 == 0 { "#\n" } else { "" }.to_string(),
            };
            if version % 2 == 0 {
                apply(&mut top_text, &change, Encoding::Utf16);
            } else {
                top_text = top_text.trim_start_matches("#\n").to_string();
            }
            let mut texts: HashMap<PathBuf, String> = files.iter().cloned().collect();
            texts.insert(top.clone(), top_text.clone());
            let snap = analyse_edit(&top, version, texts, root, last.as_deref(), &docs);
            last.replace(snap)
        })
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
