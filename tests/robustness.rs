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
        assert!(d.span.start() <= d.span.end(), "{d:?}");
        assert!(d.span.end() <= f.text.len(), "span past the end: {d:?}");
        assert!(
            f.text.is_char_boundary(d.span.start()) && f.text.is_char_boundary(d.span.end()),
            "{d:?}"
        );
        for fix in &d.fixes {
            for e in &fix.edits {
                let g = analysis.workspace.file(e.file);
                assert!(
                    e.span.end() <= g.text.len()
                        && g.text.is_char_boundary(e.span.start())
                        && g.text.is_char_boundary(e.span.end())
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
    fn the_lexer_covers_every_byte_once(text in lexer_soup()) {
        let lexemes = stoik::syntax::lexer::lex(&text);
        let mut at = 0;
        for l in &lexemes {
            prop_assert_eq!(l.span.start(), at);
            prop_assert!(l.span.end() > l.span.start(), "an empty lexeme {:?}", l);
            prop_assert!(text.is_char_boundary(l.span.end()));
            at = l.span.end();
        }
        prop_assert_eq!(at, text.len());
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

/// The diagnostics of one rule, as (1-based line, message).
fn of_rule(d: &[stoik::diagnostic::Diagnostic], text: &str, rule: &str) -> Vec<(usize, String)> {
    let index = stoik::syntax::line_index::LineIndex::new(text);
    d.iter()
        .filter(|d| d.rule == rule)
        .map(|d| (index.line_of(d.span.start()) + 1, d.message.clone()))
        .collect()
}

/// Nested groups in a formula, a unit, a number and an argument list, each
/// `depth` deep, on one reaction each.
fn nested_library(depth: usize) -> String {
    let (open, close) = ("(".repeat(depth), ")".repeat(depth));
    format!(
        "reaction: {open}H{close} <=> H\n\
         reaction: H2(g) <=> 2 H(g)\n  Kc = 1 {open}mol{close}\n\
         reaction: O2(g) <=> 2 O(g)\n  K = {open}1{close}\n\
         reaction: N2(g) <=> 2 N(g)\n  kf = arrhenius{open}A = 1 1/s{close}\n"
    )
}

fn check_nesting(depth: usize) {
    let text = nested_library(depth);
    let d = analyse(&text);
    let syntax = of_rule(&d, &text, "syntax");
    assert!(
        syntax
            .iter()
            .any(|(l, m)| *l == 1 && m.contains("nested deeper")),
        "{syntax:?}"
    );
    assert!(
        syntax
            .iter()
            .any(|(l, m)| *l == 3 && m.contains("nest at most")),
        "{syntax:?}"
    );
    for line in [5, 7] {
        assert!(
            syntax.iter().any(|(l, _)| *l == line),
            "line {line}: {syntax:?}"
        );
    }
}

#[test]
fn deep_nesting_gets_a_diagnostic_not_a_stack_overflow() {
    check_nesting(100_000);
}

#[test]
fn a_million_nested_parentheses_get_a_diagnostic() {
    check_nesting(1_000_000);
}

/// One line of `bytes` bytes: a reaction of as many `H2(g)` terms as fit.
fn long_reaction(bytes: usize) -> (String, usize) {
    let terms = (bytes - 20) / 8;
    let mut text = String::with_capacity(bytes + 16);
    text.push_str("reaction: H2(g)");
    for _ in 1..terms {
        text.push_str(" + H2(g)");
    }
    text.push_str(" <=> H(g)\n");
    (text, terms)
}

fn check_long_reaction(bytes: usize) {
    let (text, terms) = long_reaction(bytes);
    assert!(text.len() >= bytes - 20 && !text[..text.len() - 1].contains('\n'));
    let d = analyse(&text);
    let balance = of_rule(&d, &text, "element-balance");
    // Every term brings 2 H; the right side has 1.
    let want = format!("H: {} on the left, 1 on the right", 2 * terms);
    assert!(
        balance.iter().any(|(_, m)| m.contains(&want)),
        "{balance:?}"
    );
}

#[test]
fn a_very_long_line_is_read() {
    check_long_reaction(1 << 20);
}

/// The issue's size, through the whole analysis.
#[test]
fn a_ten_megabyte_reaction_line_is_read() {
    check_long_reaction(10 << 20);
}

#[test]
fn ten_megabyte_lines_of_every_other_kind_are_read() {
    let mb10 = 10 << 20;
    // A comment, a word, an unclosed string and a number, each one line of
    // 10 MB, the string and the word not ASCII.
    let cases = [
        (
            format!(
                "# {}\nreaction: H2(g) <=> 2 H(g)\n  K = 2\n",
                "x".repeat(mb10)
            ),
            None,
        ),
        (
            format!("reaction: {} <=> H\n", "é".repeat(mb10 / 2)),
            Some("unknown-species"),
        ),
        (
            format!(
                "reaction: H2(g) <=> 2 H(g)\n  source = \"{}\n",
                "→".repeat(mb10 / 3)
            ),
            Some("syntax"),
        ),
        (
            format!("reaction: H2(g) <=> 2 H(g)\n  K = {}\n", "9".repeat(mb10)),
            Some("syntax"),
        ),
    ];
    for (text, rule) in cases {
        let d = analyse(&text);
        match rule {
            Some(rule) => assert!(d.iter().any(|d| d.rule == rule), "{rule}: {d:?}"),
            None => assert!(d.is_empty(), "{d:?}"),
        }
    }
}

#[test]
fn hostile_numbers_are_diagnosed() {
    // Each value on line 2 of a reaction gets an error there that names it.
    for (attribute, what) in [
        ("K = 0", "K must be positive"),
        ("K = -3", "K must be positive"),
        ("K = -0", "K must be positive"),
        ("K = 1e400", "`1e400` is out of range"),
        ("K = -1e400", "out of range"),
        ("K = nan", "`nan`"),
        ("K = NaN", "`NaN`"),
        ("K = inf", "`inf`"),
        ("K = -inf", "`-inf`"),
        ("K = Infinity", "`Infinity`"),
        ("Kc = 0 M", "positive"),
        ("logK = 1e400", "out of range"),
        ("logK = nan", "`nan`"),
        ("dH = nan kJ/mol", "`nan kJ/mol`"),
        ("dH = inf kJ/mol", "`inf kJ/mol`"),
        ("K = 3 at 1e400 K", "out of range"),
        ("K = 3 at nan K", "`at` needs a temperature"),
        ("K = 3 at -5 K", "absolute zero"),
        ("K = 3 at 0 K", "absolute zero"),
        (
            "kf = arrhenius(A = inf 1/s, n = 0, Ea = 8 kJ/mol)",
            "`inf 1/s`",
        ),
        ("kf = arrhenius(A = 1 1/s, n = nan, Ea = 8 kJ/mol)", "`nan`"),
        (
            "kf = arrhenius(A = 1 1/s, n = 0, Ea = 1e400 kJ/mol)",
            "out of range",
        ),
    ] {
        let text = format!("reaction: H2(g) <=> 2 H(g)\n  {attribute}\n");
        let d = analyse(&text);
        let on_line: Vec<_> = d
            .iter()
            .filter(|d| {
                d.severity == stoik::diagnostic::Severity::Error
                    && text[..d.span.start()].matches('\n').count() == 1
            })
            .collect();
        assert!(
            on_line.iter().any(|d| d.message.contains(what)),
            "`{attribute}`: {d:?}"
        );
    }
}

#[test]
fn a_mixture_with_hostile_numbers_is_not_solved() {
    let text = "reaction: H2(g) <=> 2 H(g)\n  K = 3\n\
                mixture m\n  temperature = nan K\n  volume = 0 L\n  H2(g) = 1e400 mol\n  H(g) = -1 mol\n";
    let d = analyse(text);
    let lines: Vec<usize> = d
        .iter()
        .map(|d| text[..d.span.start()].matches('\n').count() + 1)
        .collect();
    for line in [4, 6, 7] {
        assert!(lines.contains(&line), "line {line}: {d:?}");
    }
}

#[test]
fn coefficients_counts_and_charges_beyond_64_bits_are_diagnosed() {
    for (equation, what) in [
        ("18446744073709551616 H2(g) <=> H(g)", "too large"),
        ("99999999999999999999999 H2(g) <=> H(g)", "too large"),
        ("1/18446744073709551616 H2(g) <=> H(g)", "too large"),
        ("H18446744073709551617 <=> H", "64 bits"),
        ("(H4294967296)4294967296 <=> H", "64 bits"),
        ("Fe^99999999999999999999+ <=> Fe", "64 bits"),
        ("Fe^18446744073709551616- <=> Fe", "64 bits"),
    ] {
        let text = format!("reaction: {equation}\n");
        let d = analyse(&text);
        assert!(
            d.iter()
                .any(|d| d.rule == "syntax" && d.message.contains(what)),
            "`{equation}`: {d:?}"
        );
    }
    // Within 64 bits each, the sums are exact: 2 · (2^63 - 1) hydrogens,
    // and a product of two 2^32 factors.
    let text = "reaction: 9223372036854775807 H2(g) <=> H(g)\n";
    let d = analyse(text);
    assert!(
        d.iter()
            .any(|d| d.message.contains("H: 18446744073709551614 on the left")),
        "{d:?}"
    );
    let text = "reaction: 4294967296 H4294967296 <=> H2\n";
    let d = analyse(text);
    assert!(
        d.iter()
            .any(|d| d.message.contains("H: 18446744073709551616 on the left")),
        "{d:?}"
    );
}

/// A workspace folder with a stoik.toml and these files.
fn folder(files: &[(&str, &[u8])]) -> tempfile::TempDir {
    let dir = tempfile::tempdir().expect("temp dir");
    std::fs::write(dir.path().join("stoik.toml"), "").expect("stoik.toml");
    for (name, bytes) in files {
        let path = dir.path().join(name);
        if let Some(parent) = path.parent() {
            std::fs::create_dir_all(parent).expect("folders");
        }
        std::fs::write(path, bytes).expect("write");
    }
    dir
}

/// Load `top` of a folder from disk and analyse it.
fn analyse_on_disk(root: &Path, top: &str) -> stoik::analysis::Analysis {
    let mut ws = Workspace::new(root);
    ws.load(&root.join(top), &Overlay::default())
        .expect("readable");
    stoik::analysis::analyze(ws, &Config::default())
}

/// A diagnostic of the JSON report: file, line, rule, message.
type Reported = (String, u64, String, String);

/// `stoik check --format json` in `dir`: exit code, the diagnostics and
/// stderr.
fn check_json(dir: &Path, args: &[&str]) -> (i32, Vec<Reported>, String) {
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_stoik"))
        .arg("check")
        .args(args)
        .args(["--format", "json"])
        .current_dir(dir)
        .output()
        .expect("stoik runs");
    let code = out.status.code().unwrap_or(-1);
    let stderr = String::from_utf8_lossy(&out.stderr).into_owned();
    let diags = serde_json::from_slice::<serde_json::Value>(&out.stdout)
        .ok()
        .and_then(|v| v["diagnostics"].as_array().cloned())
        .unwrap_or_default()
        .iter()
        .map(|d| {
            (
                d["file"].as_str().unwrap_or_default().to_string(),
                d["line"].as_u64().unwrap_or_default(),
                d["rule"].as_str().unwrap_or_default().to_string(),
                d["message"].as_str().unwrap_or_default().to_string(),
            )
        })
        .collect();
    (code, diags, stderr)
}

#[test]
fn a_use_cycle_is_diagnosed_once_and_every_file_still_checked() {
    let dir = folder(&[
        ("a.stoik", b"use \"b.stoik\"\nreaction: H2(g) <=> H(g)\n"),
        ("b.stoik", b"use \"c.stoik\"\n"),
        ("c.stoik", b"use \"a.stoik\"\n"),
        ("self.stoik", b"use \"./self.stoik\"\n"),
    ]);
    let analysis = analyse_on_disk(dir.path(), "a.stoik");
    let cycles: Vec<_> = analysis
        .diagnostics
        .iter()
        .filter(|d| d.rule == "use-error")
        .collect();
    assert_eq!(cycles.len(), 1, "{cycles:?}");
    assert!(
        cycles[0].message.contains("closes a cycle") && cycles[0].message.contains("c.stoik"),
        "{}",
        cycles[0].message
    );
    assert!(
        analysis
            .diagnostics
            .iter()
            .any(|d| d.rule == "element-balance")
    );
    // Through the binary, on the whole folder: the self-use too.
    let (code, d, stderr) = check_json(dir.path(), &["."]);
    assert_eq!(code, 1, "{stderr}");
    let uses: Vec<_> = d.iter().filter(|d| d.2 == "use-error").collect();
    assert!(
        uses.iter()
            .any(|d| d.0.ends_with("self.stoik") && d.3.contains("cycle")),
        "{uses:?}"
    );
    assert!(
        uses.iter()
            .any(|d| d.3.contains("a.stoik -> b.stoik -> c.stoik -> a.stoik")),
        "{uses:?}"
    );
}

#[test]
fn a_use_reaching_outside_the_workspace_is_refused() {
    let outer = tempfile::tempdir().expect("temp dir");
    std::fs::write(outer.path().join("secret.stoik"), "reaction: X <=> Y\n").expect("write");
    let root = outer.path().join("ws");
    std::fs::create_dir_all(root.join("sub")).expect("folders");
    std::fs::write(root.join("stoik.toml"), "").expect("stoik.toml");
    let secret = outer.path().join("secret.stoik");
    let top = format!(
        "use \"../secret.stoik\"\nuse \"sub/../../secret.stoik\"\nuse \"{}\"\nuse \"/etc/passwd\"\n",
        secret.display()
    );
    std::fs::write(root.join("top.stoik"), &top).expect("write");
    let analysis = analyse_on_disk(&root, "top.stoik");
    let refused: Vec<usize> = analysis
        .diagnostics
        .iter()
        .filter(|d| d.rule == "use-error" && d.message.contains("outside the workspace"))
        .map(|d| top[..d.span.start()].matches('\n').count() + 1)
        .collect();
    assert_eq!(refused, [1, 2, 3, 4]);
    // Nothing outside was read.
    assert_eq!(analysis.workspace.files.len(), 1);
    let (code, d, stderr) = check_json(&root, &["top.stoik"]);
    assert_eq!(code, 1, "{stderr}");
    assert_eq!(
        d.iter()
            .filter(|d| d.3.contains("outside the workspace"))
            .count(),
        4,
        "{d:?}"
    );
}

#[test]
fn files_that_are_not_utf8_get_a_diagnostic_from_the_binary() {
    let utf16: Vec<u8> = "\u{feff}reaction: H2(g) <=> 2 H(g)\n"
        .encode_utf16()
        .flat_map(u16::to_le_bytes)
        .collect();
    let dir = folder(&[
        ("latin1.stoik", b"reaction: H2(g) <=> 2 H(g) # caf\xe9\n"),
        ("utf16.stoik", &utf16),
        ("cut.stoik", b"reaction: H2(g) <=> 2 H(g)\n# 25 \xc2"),
        (
            "binary.stoik",
            &[0u8, 159, 146, 150, 255, 254, 0, 10, 13, 0x80],
        ),
    ]);
    let (code, d, stderr) = check_json(dir.path(), &["."]);
    assert_eq!(code, 1, "{stderr}");
    for (file, line) in [
        ("latin1.stoik", 1),
        ("utf16.stoik", 1),
        ("cut.stoik", 2),
        ("binary.stoik", 1),
    ] {
        assert!(
            d.iter()
                .any(|d| d.0.ends_with(file) && d.1 == line && d.3.contains("not valid UTF-8")),
            "{file}: {d:?}"
        );
    }
}

/// Rewrite `path` in a loop until `stop`: whole versions, versions cut in
/// the middle of a character, an empty file, a removed file.
fn churn(
    path: PathBuf,
    versions: Vec<Vec<u8>>,
    stop: std::sync::Arc<std::sync::atomic::AtomicBool>,
) -> std::thread::JoinHandle<usize> {
    std::thread::spawn(move || {
        let mut n = 0usize;
        while !stop.load(std::sync::atomic::Ordering::Relaxed) {
            let v = &versions[n % versions.len()];
            match n % 7 {
                // Truncated in the middle, often inside a multi-byte
                // character.
                3 => std::fs::write(&path, &v[..v.len() / 2 + 1]),
                5 => std::fs::write(&path, b""),
                6 => std::fs::remove_file(&path),
                _ => std::fs::write(&path, v),
            }
            .ok();
            n += 1;
        }
        std::fs::write(&path, &versions[0]).ok();
        n
    })
}

/// Versions of a file with multi-byte characters everywhere.
fn churned_versions() -> Vec<Vec<u8>> {
    (0..4)
        .map(|k| {
            let mut t = String::from("# Température, °C → K\n");
            for i in 0..(50 * (k + 1)) {
                t.push_str(&format!(
                    "reaction r{i}: SO₄²⁻ + H⁺ ⇌ HSO₄⁻\n  K = {}e1 at 25 °C\n",
                    i + k + 1
                ));
            }
            t.into_bytes()
        })
        .collect()
}

#[test]
fn a_file_that_changes_while_it_is_read_gives_a_consistent_result() {
    use std::sync::Arc;
    use std::sync::atomic::{AtomicBool, Ordering};
    let versions = churned_versions();
    let dir = folder(&[
        ("top.stoik", b"use \"part.stoik\"\n"),
        ("part.stoik", &versions[0]),
    ]);
    let part = dir.path().join("part.stoik");
    let stop = Arc::new(AtomicBool::new(false));
    let writer = churn(part.clone(), versions.clone(), stop.clone());
    let (mut whole, mut cut, mut missing) = (0, 0, 0);
    let deadline = std::time::Instant::now() + std::time::Duration::from_secs(3);
    let mut rounds = 0;
    while rounds < 20 || std::time::Instant::now() < deadline && rounds < 400 {
        rounds += 1;
        let analysis = analyse_on_disk(dir.path(), "top.stoik");
        let ws = &analysis.workspace;
        // The diagnostics fit the texts that were read.
        for d in &analysis.diagnostics {
            let f = ws.file(d.file);
            assert!(d.span.end() <= f.text.len() && f.text.is_char_boundary(d.span.start()));
        }
        match ws.id_of(&part) {
            None => {
                // Removed at the moment it was read, or changing all the
                // time it was read: the `use` says so.
                missing += 1;
                assert!(
                    analysis
                        .diagnostics
                        .iter()
                        .any(|d| d.rule == "use-error" && d.message.contains("part.stoik")),
                    "{:?}",
                    analysis.diagnostics
                );
            }
            Some(id) => {
                // What was read is one version as it was written: whole,
                // cut (a cut inside a character reads as U+FFFD, with its
                // own diagnostic) or empty; never two versions spliced. A
                // read can also meet the writer paused between two pages
                // of one write, with the length and time of the file
                // unchanged around the read: it then holds the start of
                // that version, which is still no splice.
                let text = &ws.file(id).text;
                let start = text.strip_suffix('\u{fffd}').unwrap_or(text);
                assert!(
                    versions
                        .iter()
                        .any(|v| String::from_utf8_lossy(v).starts_with(start)),
                    "a read that is no written version nor the start of one: {} bytes",
                    text.len()
                );
                if versions.iter().any(|v| v.as_slice() == text.as_bytes()) {
                    whole += 1;
                } else {
                    cut += 1;
                }
                if text.contains('\u{fffd}') {
                    assert!(
                        analysis
                            .diagnostics
                            .iter()
                            .any(|d| d.message.contains("UTF-8"))
                    );
                }
            }
        }
    }
    stop.store(true, Ordering::Relaxed);
    let writes = writer.join().expect("the writer ran");
    assert!(
        writes > 0 && whole > 0,
        "{writes} writes, {whole} whole reads"
    );
    eprintln!("{rounds} reads during {writes} writes: {whole} whole, {cut} cut, {missing} missing");
}

#[test]
fn stoik_check_on_a_file_that_changes_while_it_is_read_never_panics() {
    use std::sync::Arc;
    use std::sync::atomic::{AtomicBool, Ordering};
    let versions = churned_versions();
    let dir = folder(&[("lib.stoik", &versions[0])]);
    let stop = Arc::new(AtomicBool::new(false));
    let writer = churn(dir.path().join("lib.stoik"), versions, stop.clone());
    let mut codes = std::collections::BTreeMap::new();
    for _ in 0..25 {
        let (code, _, stderr) = check_json(dir.path(), &["lib.stoik"]);
        assert!(!stderr.contains("panicked"), "{stderr}");
        // 0 or 1 with a report, or 2 with a message when the file was gone.
        assert!((0..=2).contains(&code), "exit {code}: {stderr}");
        if code == 2 {
            assert!(stderr.contains("lib.stoik"), "{stderr}");
        }
        *codes.entry(code).or_insert(0) += 1;
    }
    stop.store(true, Ordering::Relaxed);
    writer.join().expect("the writer ran");
    eprintln!("exit codes: {codes:?}");
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
