//! Benchmarks of the analysis on generated libraries (see
//! `stoik::synthetic`): lexing, parsing, the full check, the cycle check
//! alone, the formatter, `report` and `solve`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::path::PathBuf;
use stoik::config::Config;
use stoik::synthetic::{Recipe, generate};
use stoik::workspace::{Overlay, Workspace};

/// The allocator of the `stoik` binary, so that the figures are the ones
/// the command and the server give.
#[global_allocator]
static ALLOCATOR: mimalloc::MiMalloc = mimalloc::MiMalloc;

/// A generated library in memory, as an overlay rooted at a fixed path.
fn library(reactions: usize) -> (PathBuf, Overlay, String) {
    let g = generate(&Recipe {
        reactions,
        mistakes: 0.01,
        files: 4,
        seed: 7,
    });
    let root = PathBuf::from("/bench");
    let mut overlay = Overlay::default();
    let mut all = String::new();
    for (name, text) in &g.files {
        all.push_str(text);
        overlay.texts.insert(root.join(name), text.clone());
    }
    (root, overlay, all)
}

fn analyse(root: &std::path::Path, overlay: &Overlay) -> stoik::analysis::Analysis {
    let mut ws = Workspace::new(root);
    let _ = ws.load(&root.join("library.stoik"), overlay);
    stoik::analysis::analyze(ws, &Config::default())
}

fn benches(c: &mut Criterion) {
    let (root, overlay, text) = library(10_000);
    let mut group = c.benchmark_group("library_10k");
    group.sample_size(10);
    group.bench_function("lex", |b| b.iter(|| stoik::syntax::lexer::lex(&text).len()));
    group.bench_function("parse", |b| {
        b.iter(|| stoik::syntax::parse(&text).statements.len())
    });
    // The formatter parses once to find statements with errors, then
    // lays the rest out: it should cost little more than the parse.
    group.bench_function("format", |b| b.iter(|| stoik::format::format(&text).len()));
    group.bench_function("check", |b| {
        b.iter(|| analyse(&root, &overlay).diagnostics.len())
    });
    let analysis = analyse(&root, &overlay);
    let lib = &analysis.libraries[0].library;
    group.bench_function("cycle_finder", |b| {
        b.iter(|| {
            let mut finder = stoik::chem::cycles::CycleFinder::new();
            let mut dependent = 0;
            for (i, r) in lib.reactions.iter().enumerate() {
                let v: Vec<(u32, num_rational::Ratio<i64>)> =
                    r.net().iter().map(|&(s, x)| (s.0, x)).collect();
                if finder.add(i, &v).is_some() {
                    dependent += 1;
                }
            }
            dependent
        })
    });
    group.bench_function("report", |b| {
        b.iter(|| {
            lib.reactions
                .iter()
                .map(|r| stoik::report::row(&analysis.workspace, lib, r, Some(700.0)))
                .filter(|row| row.k.is_some())
                .count()
        })
    });
    group.finish();

    let mixture = "reaction a: H2(g) + I2(g) <=> 2 HI(g) ; K = 50 at 700 K\n\
        reaction b: N2O4(g) <=> 2 NO2(g) ; K = 0.15 at 700 K\n\
        mixture m\n  temperature = 700 K\n  H2(g) = 1 mol/L\n  I2(g) = 1 mol/L\n  HI(g) = 0 mol/L\n  N2O4(g) = 1 mol/L\n  NO2(g) = 0 mol/L\n";
    let root = PathBuf::from("/bench");
    let mut overlay = Overlay::default();
    overlay
        .texts
        .insert(root.join("m.stoik"), mixture.to_string());
    let mut ws = Workspace::new(&root);
    let _ = ws.load(&root.join("m.stoik"), &overlay);
    let analysis = stoik::analysis::analyze(ws, &Config::default());
    let lib = &analysis.libraries[0].library;
    c.bench_function("solve_small_mixture", |b| {
        b.iter(|| {
            stoik::solve::solve_mixture(&analysis.workspace, lib, &lib.mixtures[0])
                .map(|r| r.converged)
        })
    });
}

criterion_group!(library_benches, benches);
criterion_main!(library_benches);
