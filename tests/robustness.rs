//! No input makes the analysis panic, and every reported span lies on a
//! character boundary inside its file.

use proptest::prelude::*;
use std::path::{Path, PathBuf};
use stoik::config::Config;
use stoik::workspace::{Overlay, Workspace};

/// Analyse one in-memory file and check the span invariants.
fn analyse(text: &str) -> Vec<stoik::diagnostic::Diagnostic> {
    let root = PathBuf::from("/nonexistent-root");
    let path = root.join("input.stoik");
    let mut overlay = Overlay::default();
    overlay.texts.insert(path.clone(), text.to_string());
    let mut ws = Workspace::new(&root);
    let id = ws.load(&path, &overlay).expect("overlay file");
    let analysis = stoik::analysis::analyze(ws, &Config::default());
    for d in &analysis.diagnostics {
        let f = analysis.workspace.file(d.file);
        assert!(d.span.start <= d.span.end, "{d:?}");
        assert!(d.span.end <= f.text.len(), "span past the end: {d:?}");
        assert!(
            f.text.is_char_boundary(d.span.start) && f.text.is_char_boundary(d.span.end),
            "{d:?}"
        );
        for fix in &d.fixes {
            for e in &fix.edits {
                let g = analysis.workspace.file(e.file);
                assert!(
                    e.span.end <= g.text.len()
                        && g.text.is_char_boundary(e.span.start)
                        && g.text.is_char_boundary(e.span.end)
                );
            }
        }
    }
    let _ = id;
    analysis.diagnostics
}

/// Pieces of the notation, to build inputs that get past the first line.
fn fragment() -> impl Strategy<Value = String> {
    prop_oneof![
        Just("reaction: ".to_string()),
        Just("reaction r1: ".to_string()),
        Just("species ".to_string()),
        Just("mixture m\n".to_string()),
        Just("units energy = kJ/mol\n".to_string()),
        Just("use \"x.stoik\"\n".to_string()),
        Just(" <=> ".to_string()),
        Just(" -> ".to_string()),
        Just(" ⇌ ".to_string()),
        Just(" + ".to_string()),
        Just("\n  K = 3.2 at 298.15 K\n".to_string()),
        Just("\n  Kc = 1e-3 M\n".to_string()),
        Just("\n  dH = -41 kJ/mol\n".to_string()),
        Just("\n  kf = arrhenius(A = 1e13 1/s, n = 0, Ea = 80 kJ/mol)\n".to_string()),
        Just("\n  temperature = 25 °C\n".to_string()),
        Just("\n  H2(g) = 1 mol/L\n".to_string()),
        Just("2 H2O(g)".to_string()),
        Just("Fe^3+".to_string()),
        Just("SO₄²⁻".to_string()),
        Just("CuSO4·5H2O(s)".to_string()),
        Just("K4[Fe(CN)6]".to_string()),
        Just("e-".to_string()),
        Just("# stoik: allow element-balance\n".to_string()),
        Just("\r\n".to_string()),
        "[ -~]{0,12}",
        "\\PC{0,6}",
    ]
}

/// Text made of the characters where the lexer's patterns meet: arrows and
/// their pieces, quotes and escapes, comments, every space and line end.
fn lexer_soup() -> impl Strategy<Value = String> {
    let piece = prop_oneof![
        8 => prop::sample::select(vec![
            "<", ">", "=", "-", "<=>", "<->", "->", "\"", "\\", "#", "\n", "\r", "\r\n", " ",
            "\t", "\u{a0}", "\u{feff}", "⇌", "⇄", "→", "↔", "a", "H2", "é", "𝛥", ";", ":", ",",
        ])
        .prop_map(str::to_string),
        1 => "\\PC{0,8}",
        1 => any::<String>(),
    ];
    proptest::collection::vec(piece, 0..60).prop_map(|v| v.concat())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    #[test]
    fn the_lexer_reads_what_its_patterns_say(text in lexer_soup()) {
        let lexemes = stoik::syntax::lexer::lex(&text);
        prop_assert_eq!(lexemes, stoik::syntax::lexer::lex_with_logos(&text));
    }

    #[test]
    fn arbitrary_text_never_panics(text in "\\PC{0,200}") {
        analyse(&text);
    }

    #[test]
    fn notation_fragments_never_panic(parts in proptest::collection::vec(fragment(), 0..40)) {
        analyse(&parts.concat());
    }
}

#[test]
fn deep_nesting_gets_a_diagnostic_not_a_stack_overflow() {
    let depth = 100_000;
    let formula = format!("{}H{}", "(".repeat(depth), ")".repeat(depth));
    let text = format!("reaction: {formula} <=> H\n");
    let d = analyse(&text);
    assert!(
        d.iter()
            .any(|d| d.rule == "syntax" || d.rule == "unknown-element"),
        "{d:?}"
    );
    let units = format!(
        "reaction: H2(g) <=> 2 H(g)\n  Kc = 1 {}mol{}\n",
        "(".repeat(depth),
        ")".repeat(depth)
    );
    assert!(!analyse(&units).is_empty());
}

#[test]
fn a_very_long_line_is_read() {
    let mut text = String::from("reaction: ");
    for i in 0..50_000 {
        if i > 0 {
            text.push_str(" + ");
        }
        text.push_str("H2(g)");
    }
    text.push_str(" <=> H(g)\n");
    let d = analyse(&text);
    assert!(d.iter().any(|d| d.rule == "element-balance"));
}

#[test]
fn hostile_numbers_are_diagnosed() {
    for (value, what) in [
        ("0", "zero K"),
        ("-3", "negative K"),
        ("1e400", "K beyond f64"),
        ("nan", "NaN spelled out"),
        ("inf", "inf spelled out"),
    ] {
        let text = format!("reaction: H2(g) <=> 2 H(g)\n  K = {value}\n");
        let d = analyse(&text);
        assert!(!d.is_empty(), "{what} passed silently");
    }
    let big = "reaction: 99999999999999999999999 H2(g) <=> H(g)\n";
    assert!(analyse(big).iter().any(|d| d.rule == "syntax"));
    let count = "reaction: H99999999999999999999999 <=> H\n";
    assert!(!analyse(count).is_empty());
}

#[test]
fn a_file_that_is_not_utf8_gets_a_diagnostic() {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("bad.stoik");
    std::fs::write(&path, b"reaction: H2(g) <=> 2 H(g) # caf\xe9\n").expect("write");
    let mut ws = Workspace::new(dir.path());
    ws.load(&path, &Overlay::default()).expect("readable");
    let analysis = stoik::analysis::analyze(ws, &Config::default());
    let d: Vec<_> = analysis
        .diagnostics
        .iter()
        .filter(|d| d.rule == "syntax")
        .collect();
    assert_eq!(d.len(), 1, "{:?}", analysis.diagnostics);
    assert!(d[0].message.contains("UTF-8"));
}

#[test]
fn every_grammar_example_parses() {
    // The formal grammar's examples (grammar/examples) are valid notation.
    fn walk(dir: &Path, out: &mut Vec<PathBuf>) {
        for e in std::fs::read_dir(dir).expect("examples").flatten() {
            let p = e.path();
            if p.is_dir() {
                walk(&p, out);
            } else if p.extension().is_some_and(|x| x == "stoik") {
                out.push(p);
            }
        }
    }
    let mut files = Vec::new();
    walk(
        &Path::new(env!("CARGO_MANIFEST_DIR")).join("grammar/examples"),
        &mut files,
    );
    assert!(files.len() >= 6);
    for f in files {
        let text = std::fs::read_to_string(&f).expect("utf-8");
        let parsed = stoik::syntax::parse(&text);
        assert!(
            parsed.errors.is_empty(),
            "{}: {:?}",
            f.display(),
            parsed.errors
        );
    }
}
