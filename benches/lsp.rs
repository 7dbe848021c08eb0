//! Language-server speed on a generated 20,000-reaction library: the work
//! of one edit (apply the change, re-analyse the whole file, convert the
//! diagnostics) and the inlay hints of one screenful.
//!
//! The bars (DESIGN.md): edit-to-diagnostics under 50 ms, inlay hints for
//! a visible range under 10 ms.

use criterion::{Criterion, criterion_group, criterion_main};
use std::collections::HashMap;
use std::hint::black_box;
use std::path::{Path, PathBuf};
use stoik::config::Config;
use stoik::lsp::convert::RuleDocs;
use stoik::lsp::documents::{Change, apply};
use stoik::lsp::snapshot::build_with;
use stoik::syntax::line_index::{Encoding, Position};
use tower_lsp_server::ls_types as lsp;

/// An invented library: species with data, then reactions of a few shapes
/// with K, dH and rate constants, and a mixture at the end.
fn library(reactions: usize) -> String {
    let mut s = String::from("units energy = kJ/mol, temperature = K\n\n");
    for i in 0..50 {
        s.push_str(&format!(
            "species sp{i} = C{}H{}O(g)\n  dHf = -{}.5 kJ/mol\n  dGf = -{}.1 kJ/mol\n",
            i + 1,
            2 * i + 2,
            100 + i,
            80 + i
        ));
    }
    let shapes = [
        "CO(g) + H2O(g) <=> CO2(g) + H2(g)\n  K = 1.0e5 at 298.15 K\n  dH = -41.2 kJ/mol\n",
        "N2(g) + 3 H2(g) <=> 2 NH3(g)\n  Kc = 0.5 L^2/mol^2 at 700 K\n  dH = -92.2 kJ/mol\n",
        "CaCO3(s) <=> CaO(s) + CO2(g)\n  Kp = 1.2 bar at 1100 K\n",
        "2 NO2(g) -> N2O4(g)\n  k = arrhenius(A = 1.0e9 L/(mol*s), n = 0, Ea = 10 kJ/mol)\n",
        "Fe^3+(aq) + e- <=> Fe^2+(aq)\n  logK = 13.0\n",
    ];
    for i in 0..reactions {
        s.push_str(&format!("reaction r{i}: {}", shapes[i % shapes.len()]));
    }
    s.push_str("\nmixture feed\n  temperature = 800 K\n  CO(g) = 1 mol/L\n  H2O(g) = 1 mol/L\n  CO2(g) = 0 mol/L\n  H2(g) = 0 mol/L\n");
    s
}

fn bench(c: &mut Criterion) {
    let path = PathBuf::from("/stoik-bench/big.stoik");
    let root = Path::new("/stoik-bench");
    let text = library(20_000);
    let lines = text.lines().count() as u32;
    let docs = RuleDocs::default();
    let mut group = c.benchmark_group("lsp");
    group.sample_size(20);

    // One keystroke in the middle of the file, then the whole analysis.
    let mut version = 1;
    let mut doc = text.clone();
    group.bench_function("edit_to_diagnostics_20000_reactions", |b| {
        b.iter(|| {
            version += 1;
            let at = Position {
                line: lines / 2,
                column: 0,
            };
            let change = Change {
                range: Some((at, at)),
                text: if version % 2 == 0 { "#" } else { "" }.to_string(),
            };
            apply(&mut doc, &change, Encoding::Utf16);
            let mut texts = HashMap::new();
            texts.insert(path.clone(), doc.clone());
            let snap = build_with(&path, version, texts, root, Config::default(), None)
                .expect("the overlay serves the file");
            let diags = stoik::lsp::server::document_diagnostics(&snap, Encoding::Utf16, &docs);
            black_box(diags.len())
        })
    });

    let mut texts = HashMap::new();
    texts.insert(path.clone(), text.clone());
    let snap = build_with(&path, 1, texts, root, Config::default(), None).expect("snapshot");
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
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
