//! A long scripted editing session against the in-process server: seeded
//! random incremental edits (inserts, deletes and replacements, with text
//! outside ASCII and outside the Basic Multilingual Plane, and all three
//! line ends) with requests in between. Throughout, the server answers
//! every request, nothing panics, and its formatting answer shows that it
//! holds the same text as the client; memory stays flat; and the last
//! published diagnostics equal those of `stoik check --format json` and of
//! a fresh analysis of the final text.
//!
//! CI runs 1,000 edits in a debug build. The full soak of issue 6 is
//! `STOIK_SOAK_EDITS=10000 cargo test --release --test lsp_soak -- --nocapture`;
//! `STOIK_SOAK_SEED` picks another script; `STOIK_SOAK_DUMP=FILE` keeps the
//! text of the last edit sent in FILE, for a failing script.

mod lsp_harness;
use lsp_harness::*;
use serde_json::{Value, json};
use std::sync::atomic::{AtomicUsize, Ordering};
use stoik::syntax::line_index::{Encoding, LineIndex, Position};

/// SplitMix64: a small seeded generator, so that a failing script can be
/// run again from its seed.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }
    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
    fn chance(&mut self, percent: usize) -> bool {
        self.below(100) < percent
    }
}

/// What the random edits insert: pieces of the notation and characters
/// of every UTF-8 and UTF-16 width.
const PIECES: &[&str] = &[
    "reaction: ",
    "reaction r1: ",
    "species ",
    "mixture feed\n",
    "use \"b.stoik\"\n",
    "units energy = kJ/mol\n",
    "  temperature = 25 °C\n",
    "  pressure = 1 bar\n",
    "  H₂O(g) = 1 mol\n",
    "\n  K = 1.0e5 at 298.15 K\n",
    "\n  Kc = 3.2e-3 M\n",
    "  dH = -41.2 kJ/mol\n",
    "  kf = arrhenius(A = 1e13 1/s, n = 0, Ea = 80 kJ/mol)\n",
    "CO(g) + H2O(g) <=> CO2(g) + H2(g)",
    "N₂(g) + 3 H₂(g) ⇌ 2 NH₃(g)",
    "SO₄²⁻ + H⁺ → HSO₄⁻",
    "Fe³⁺ + e- ⇌ Fe²⁺",
    "CuSO4·5H2O(s)",
    " ⇌ ",
    " → ",
    " <=> ",
    " + ",
    "2 ",
    "1/2 ",
    "°",
    "⇌",
    "→",
    "₂",
    "⁺",
    "²⁻",
    "𝛥",
    "😀",
    "𝐇₂",
    "é",
    "\u{a0}",
    "\n",
    "\n",
    "\r\n",
    "\r",
    " ",
    "  ",
    "#",
    " # note ",
    "# stoik: allow element-balance\n",
    "\"",
    "=",
    ";",
    ":",
    "(",
    ")",
    "1e400",
    "nan",
];

const START: &str = "\
# A small invented library edited at random.
use \"b.stoik\"
units energy = kJ/mol

reaction shift: CO(g) + H2O(g) <=> CO2(g) + H2(g)
  K = 1.0e5 at 298.15 K
  dH = -41.2

reaction: N₂(g) + 3 H₂(g) ⇌ 2 NH₃(g)
  K = 6.0e5 at 25 °C

reaction: SO₄²⁻ + H⁺ ⇌ HSO₄⁻
  K = 98 at 298.15 K

reaction unbalanced: H2(g) + O2(g) <=> H2O(g)

mixture feed
  temperature = 700 K
  pressure = 150 bar
  N₂(g) = 1 mol
  H₂(g) = 3 mol
";

const USED: &str = "\
# Used by a.stoik from the disk.
species water = H2O(g); dHf = -241.8 kJ/mol
reaction: 2 H2(g) + O2(g) <=> 2 H2O(g)
  K = 1e80 at 298.15 K
";

/// Panics anywhere in the process, server threads included.
static PANICS: AtomicUsize = AtomicUsize::new(0);

fn count_panics() {
    let previous = std::panic::take_hook();
    std::panic::set_hook(Box::new(move |info| {
        PANICS.fetch_add(1, Ordering::SeqCst);
        previous(info);
    }));
}

/// Resident memory of this process in kB.
fn rss_kb() -> u64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines()
                .find_map(|l| l.strip_prefix("VmRSS:"))
                .and_then(|v| v.trim().trim_end_matches("kB").trim().parse().ok())
        })
        .unwrap_or(0)
}

/// A random character boundary of `text`, never between the two bytes of a
/// `\r\n` (no position names that place).
fn boundary(rng: &mut Rng, text: &str) -> usize {
    let mut at = rng.below(text.len() + 1);
    while !text.is_char_boundary(at) {
        at -= 1;
    }
    if at > 0 && text.as_bytes()[at - 1] == b'\r' && text.as_bytes().get(at) == Some(&b'\n') {
        at -= 1;
    }
    at
}

fn position(text: &str, offset: usize) -> Value {
    pos_in(text, offset, Encoding::Utf16)
}

/// One random change: its protocol form and the text after it.
fn random_change(rng: &mut Rng, text: &str) -> (Value, String) {
    let index = LineIndex::new(text);
    // Sometimes a position past the end of a line or of the file, which the
    // server clamps; the client clamps the same way.
    if rng.chance(3) {
        let line = rng.below(index.line_count() + 2) as u32;
        let far = Position {
            line,
            column: 500 + rng.below(50) as u32,
        };
        let at = index.offset(text, far, Encoding::Utf16);
        let piece = PIECES[rng.below(PIECES.len())];
        let mut after = text.to_string();
        after.insert_str(at, piece);
        let p = json!({"line": far.line, "character": far.column});
        return (
            json!({"range": {"start": p, "end": p}, "text": piece}),
            after,
        );
    }
    let a = boundary(rng, text);
    let b = boundary(rng, text);
    let (a, mut b) = (a.min(b), a.max(b));
    // Keep deletions short and the file at a few kilobytes.
    let long = text.len() > 6000;
    if b - a > 40 && !long {
        b = a;
    }
    if long && b == a {
        b = (a + 200).min(text.len());
        while !text.is_char_boundary(b) {
            b -= 1;
        }
        if b > 0 && text.as_bytes()[b - 1] == b'\r' && text.as_bytes().get(b) == Some(&b'\n') {
            b -= 1;
        }
    }
    let kind = rng.below(3);
    let (a, b) = if kind == 0 { (a, a) } else { (a, b) };
    let inserted = if kind == 1 {
        String::new()
    } else {
        (0..1 + rng.below(3))
            .map(|_| PIECES[rng.below(PIECES.len())])
            .collect()
    };
    let mut after = text.to_string();
    after.replace_range(a..b, &inserted);
    let change = json!({
        "range": {"start": position(text, a), "end": position(text, b)},
        "text": inserted,
    });
    (change, after)
}

/// A diagnostic reduced to what both outputs carry: UTF-16 range,
/// severity, rule, message with its help, number of fixes.
type Finding = ((u64, u64), (u64, u64), u64, String, String, usize);

fn from_protocol(d: &Value) -> Finding {
    let p = |v: &Value| {
        (
            v["line"].as_u64().unwrap_or(u64::MAX),
            v["character"].as_u64().unwrap_or(u64::MAX),
        )
    };
    (
        p(&d["range"]["start"]),
        p(&d["range"]["end"]),
        d["severity"].as_u64().unwrap_or(0),
        d["code"].as_str().unwrap_or_default().to_string(),
        d["message"].as_str().unwrap_or_default().to_string(),
        d["data"]["fixes"].as_u64().unwrap_or(0) as usize,
    )
}

/// `stoik check --format json` on the final text, in protocol terms.
fn from_check(dir: &std::path::Path, text: &str) -> Vec<Finding> {
    std::fs::write(dir.join("a.stoik"), text).expect("write the final text");
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_stoik"))
        .args(["check", "a.stoik", "--format", "json"])
        .current_dir(dir)
        .output()
        .expect("stoik check runs");
    assert!(
        matches!(out.status.code(), Some(0 | 1)),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let report: Value = serde_json::from_slice(&out.stdout).expect("JSON report");
    let index = LineIndex::new(text);
    // JSON columns are 1-based Unicode scalars; the protocol's are 0-based
    // UTF-16 units.
    let utf16 = |line: u64, column: u64| {
        let offset = index.offset(
            text,
            Position {
                line: line as u32 - 1,
                column: column as u32 - 1,
            },
            Encoding::Utf32,
        );
        let p = index.position(text, offset, Encoding::Utf16);
        (p.line as u64, p.column as u64)
    };
    report["diagnostics"]
        .as_array()
        .expect("diagnostics")
        .iter()
        .filter(|d| d["file"] == "a.stoik")
        .map(|d| {
            let severity = match d["severity"].as_str() {
                Some("error") => 1,
                Some("warning") => 2,
                Some("info") => 3,
                _ => 4,
            };
            let mut message = d["message"].as_str().unwrap_or_default().to_string();
            if let Some(help) = d["help"].as_str() {
                message.push_str("\nhelp: ");
                message.push_str(help);
            }
            (
                utf16(
                    d["line"].as_u64().unwrap_or(1),
                    d["column"].as_u64().unwrap_or(1),
                ),
                utf16(
                    d["end_line"].as_u64().unwrap_or(1),
                    d["end_column"].as_u64().unwrap_or(1),
                ),
                severity,
                d["rule"].as_str().unwrap_or_default().to_string(),
                message,
                d["fixes"].as_array().map(Vec::len).unwrap_or(0),
            )
        })
        .collect()
}

/// A fresh in-process analysis of the text, as the server renders it.
fn fresh(path: &std::path::Path, version: i32, text: &str) -> Vec<Value> {
    let texts = std::iter::once((path.to_path_buf(), text.to_string())).collect();
    let snap = stoik::lsp::snapshot::build(path, version, texts, None).expect("analysis");
    let docs = stoik::lsp::convert::RuleDocs::default();
    stoik::lsp::server::document_diagnostics(&snap, Encoding::Utf16, &docs)
        .into_iter()
        .map(|d| serde_json::to_value(d).expect("json"))
        .collect()
}

/// Published diagnostics without the links to the rule documents, which a
/// fresh analysis outside the server does not write.
fn without_links(mut d: Vec<Value>) -> Vec<Value> {
    for x in &mut d {
        if let Some(o) = x.as_object_mut() {
            o.remove("codeDescription");
        }
    }
    d
}

/// Keep only the last diagnostics publication of the notifications.
fn trim(notifications: &mut Vec<Value>) {
    let last = notifications
        .iter()
        .rev()
        .find(|n| n["method"] == "textDocument/publishDiagnostics")
        .cloned();
    notifications.clear();
    notifications.extend(last);
}

async fn one_request(c: &mut Client, rng: &mut Rng, text: &str) -> &'static str {
    let doc = json!({"uri": c.uri("a.stoik")});
    let at = position(text, boundary(rng, text));
    let end = position(text, text.len());
    let whole = json!({"start": {"line": 0, "character": 0}, "end": end});
    match rng.below(8) {
        0 => {
            c.request(
                "textDocument/hover",
                json!({"textDocument": doc, "position": at}),
            )
            .await;
            "hover"
        }
        1 => {
            let r = c
                .request(
                    "textDocument/inlayHint",
                    json!({"textDocument": doc, "range": whole}),
                )
                .await;
            assert!(r.is_null() || r.is_array(), "{r}");
            "inlay hints"
        }
        2 => {
            c.request(
                "textDocument/completion",
                json!({"textDocument": doc, "position": at}),
            )
            .await;
            "completion"
        }
        3 => {
            let r = c
                .request(
                    "textDocument/codeAction",
                    json!({"textDocument": doc, "range": {"start": at, "end": at},
                           "context": {"diagnostics": []}}),
                )
                .await;
            assert!(r.is_null() || r.is_array(), "{r}");
            "code actions"
        }
        4 | 5 => {
            // The formatting answer is computed from the server's text: it
            // must turn the client's text into the formatted client text.
            let r = c
                .request(
                    "textDocument/formatting",
                    json!({"textDocument": doc, "options": {"tabSize": 2, "insertSpaces": true}}),
                )
                .await;
            let edits = r.as_array().cloned().unwrap_or_default();
            assert_eq!(
                apply_edits(text, &edits),
                stoik::format::format(text),
                "the server's text differs from the client's"
            );
            "formatting"
        }
        6 => {
            let r = c
                .request(
                    "textDocument/semanticTokens/full",
                    json!({"textDocument": doc}),
                )
                .await;
            let n = r["data"].as_array().map(Vec::len).unwrap_or(0);
            assert_eq!(n % 5, 0, "{r}");
            "semantic tokens"
        }
        _ => {
            c.request("textDocument/documentSymbol", json!({"textDocument": doc}))
                .await;
            "symbols"
        }
    }
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn a_long_random_editing_session() {
    count_panics();
    let edits: usize = std::env::var("STOIK_SOAK_EDITS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(1000);
    let seed: u64 = std::env::var("STOIK_SOAK_SEED")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(6);
    let mut rng = Rng(seed);
    let started = std::time::Instant::now();
    let mut c = Client::start(&[("b.stoik", USED)]).await;
    let mut text = START.to_string();
    c.open("a.stoik", &text).await;
    let opened = c.diagnostics("a.stoik", 1).await;
    assert!(
        !opened.is_empty(),
        "the starting library has planted findings"
    );
    let rss_start = rss_kb();
    let mut rss_middle = 0;
    let mut version = 1;
    let mut requests = std::collections::BTreeMap::<&str, usize>::new();
    let mut longest = text.len();
    for n in 1..=edits {
        // One to three changes per notification, applied in order.
        let mut changes = Vec::new();
        for _ in 0..1 + usize::from(rng.chance(15)) + usize::from(rng.chance(5)) {
            let (change, after) = random_change(&mut rng, &text);
            changes.push(change);
            text = after;
        }
        version += 1;
        c.notify(
            "textDocument/didChange",
            json!({"textDocument": {"uri": c.uri("a.stoik"), "version": version},
                   "contentChanges": changes}),
        )
        .await;
        longest = longest.max(text.len());
        if let Some(dump) = std::env::var_os("STOIK_SOAK_DUMP") {
            // For a failing script: the text as of the last edit sent.
            std::fs::write(dump, &text).expect("dump");
        }
        if rng.chance(30) {
            let what = one_request(&mut c, &mut rng, &text).await;
            *requests.entry(what).or_default() += 1;
        }
        if rng.chance(1) {
            // Format on save: apply the server's formatting as an edit.
            let r = c
                .request(
                    "textDocument/formatting",
                    json!({"textDocument": {"uri": c.uri("a.stoik")},
                           "options": {"tabSize": 2, "insertSpaces": true}}),
                )
                .await;
            if let Some(edits) = r.as_array().filter(|e| !e.is_empty()) {
                text = apply_edits(&text, edits);
                version += 1;
                let changes: Vec<Value> = edits
                    .iter()
                    .map(|e| json!({"range": e["range"], "text": e["newText"]}))
                    .collect();
                c.notify(
                    "textDocument/didChange",
                    json!({"textDocument": {"uri": c.uri("a.stoik"), "version": version},
                           "contentChanges": changes}),
                )
                .await;
            }
        }
        // The harness keeps every notification; drop all but the last
        // publication as we go, so that only the server's memory is
        // measured.
        trim(&mut c.notifications);
        if n == edits / 2 {
            let published = c.diagnostics("a.stoik", version).await;
            assert_eq!(
                without_links(published),
                fresh(&c.path("a.stoik"), version, &text),
                "the middle diagnostics differ from a fresh analysis"
            );
            trim(&mut c.notifications);
            rss_middle = rss_kb();
        }
    }
    let published = c.diagnostics("a.stoik", version).await;
    let rss_end = rss_kb();
    let elapsed = started.elapsed();
    assert_eq!(PANICS.load(Ordering::SeqCst), 0, "something panicked");
    // Equal to a fresh analysis, as the server renders it.
    assert_eq!(
        without_links(published.clone()),
        fresh(&c.path("a.stoik"), version, &text),
        "the final diagnostics differ from a fresh analysis"
    );
    // Equal to `stoik check --format json` on the final text.
    // Paths in messages are shown relative to the current directory, which
    // is the workspace folder for stoik check and not for this test.
    let prefix = format!("{}/", c.dir.path().display());
    let mut from_server: Vec<Finding> = published
        .iter()
        .map(from_protocol)
        .map(|mut f| {
            f.4 = f.4.replace(&prefix, "");
            f
        })
        .collect();
    let mut from_cli = from_check(c.dir.path(), &text);
    from_server.sort();
    from_cli.sort();
    let only = |a: &[Finding], b: &[Finding]| -> Vec<Finding> {
        a.iter().filter(|x| !b.contains(x)).cloned().collect()
    };
    assert!(
        from_server == from_cli,
        "the final diagnostics differ from stoik check: only published {:?}, only from stoik check {:?}",
        only(&from_server, &from_cli),
        only(&from_cli, &from_server)
    );
    eprintln!(
        "soak: seed {seed}, {edits} edits ({version} versions) and {} requests {requests:?} in {:.1} s; \
         text {} bytes at the end, {longest} at most; {} diagnostics at the end; \
         RSS start {} MB, middle {} MB, end {} MB",
        requests.values().sum::<usize>(),
        elapsed.as_secs_f64(),
        text.len(),
        published.len(),
        rss_start / 1024,
        rss_middle / 1024,
        rss_end / 1024,
    );
    // Memory stays flat: the second half adds at most half again and 50 MB.
    assert!(
        rss_end <= rss_middle * 3 / 2 + 50 * 1024,
        "RSS grew from {rss_middle} kB to {rss_end} kB"
    );
    c.shutdown().await;
}
