//! Time the language server's work for a run of edits of the edit
//! benchmark's library (20,000 reactions in one file): each edit types or
//! deletes a `#` at the start of a line in the middle, applies the change
//! to the text, analyses it with the last snapshot to reuse and converts
//! the diagnostics. Prints the median and the fastest edit; the replaced
//! snapshot is freed outside the timing, as the server frees it on another
//! thread. With `STOIK_PROFILE=1` every edit also prints its phases. Run
//! it as `cargo run --release --example edit_timing -- [EDITS]` (40 edits
//! when none is given).

use std::collections::HashMap;
use std::path::{Path, PathBuf};
use std::time::Instant;
use stoik::config::Config;
use stoik::lsp::convert::RuleDocs;
use stoik::lsp::documents::{Change, apply};
use stoik::lsp::snapshot::{Snapshot, build_with};
use stoik::syntax::line_index::{Encoding, Position};

/// The allocator of the `stoik` binary.
#[global_allocator]
static ALLOCATOR: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() {
    let edits: usize = std::env::args()
        .nth(1)
        .and_then(|a| a.parse().ok())
        .unwrap_or(40);
    let path = PathBuf::from("/stoik-bench/big.stoik");
    let root = Path::new("/stoik-bench");
    let mut text = stoik::synthetic::edit_benchmark_library(20_000);
    let middle = text.lines().count() as u32 / 2;
    let docs = RuleDocs::default();
    let mut last: Option<Snapshot> = None;
    let mut millis = Vec::with_capacity(edits);
    for version in 2..edits as i32 + 2 {
        // Even versions type the `#`, odd ones delete it again.
        let typed = version % 2 == 0;
        let from = Position {
            line: middle,
            column: 0,
        };
        let to = Position {
            line: middle,
            column: u32::from(!typed),
        };
        let change = Change {
            range: Some((from, to)),
            text: if typed { "#" } else { "" }.to_string(),
        };
        let started = Instant::now();
        apply(&mut text, &change, Encoding::Utf16);
        let texts = HashMap::from([(path.clone(), text.clone())]);
        let Ok(snap) = build_with(
            &path,
            version,
            texts,
            root,
            Config::default(),
            None,
            last.as_ref(),
        ) else {
            eprintln!("error: the edited text could not be analysed");
            std::process::exit(2);
        };
        let diagnostics = stoik::lsp::server::document_diagnostics(&snap, Encoding::Utf16, &docs);
        std::hint::black_box(diagnostics.len());
        millis.push(started.elapsed().as_secs_f64() * 1e3);
        drop(last.replace(snap));
    }
    millis.sort_by(f64::total_cmp);
    match (millis.get(millis.len() / 2), millis.first()) {
        (Some(median), Some(fastest)) => println!(
            "{} edits: median {median:.1} ms, fastest {fastest:.1} ms",
            millis.len()
        ),
        _ => println!("no edits timed"),
    }
}
