//! Position encodings (UTF-16 by default, UTF-8 and UTF-32 when offered),
//! the three line ends, and incremental edits over wide characters.

mod lsp_harness;
use lsp_harness::*;
use serde_json::{Value, json};
use stoik::syntax::line_index::Encoding;

fn caps(encodings: &[&str]) -> Value {
    json!({"general": {"positionEncodings": encodings}})
}

/// A line where the finding follows °, µ, ⇌, subscripts, Greek and a
/// character outside the BMP.
const WIDE: &str = "reaction r: H₂(g) + I₂(g) ⇌ 2 HI(g) ; source = \"°µ αβ 𝛥\" ; Kx = 3\n";

async fn unknown_attribute_range(encodings: &[&str]) -> (Value, Value) {
    let mut c = Client::start_with(caps(encodings), Value::Null, &[]).await;
    c.open("a.stoik", WIDE).await;
    let d = c.diagnostics("a.stoik", 1).await;
    let found = d
        .iter()
        .find(|d| d["code"] == "unknown-attribute")
        .unwrap_or_else(|| panic!("unknown-attribute in {d:?}"))["range"]
        .clone();
    let enc = c.init["capabilities"]["positionEncoding"].clone();
    c.shutdown().await;
    (enc, found)
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn each_encoding_counts_columns_its_own_way() {
    let at = WIDE.find("Kx").expect("Kx");
    for (offered, name, enc) in [
        (&[][..], "utf-16", Encoding::Utf16),
        (&["utf-16"][..], "utf-16", Encoding::Utf16),
        (&["utf-8", "utf-16"][..], "utf-8", Encoding::Utf8),
        (&["utf-32", "utf-16"][..], "utf-32", Encoding::Utf32),
    ] {
        let (negotiated, range) = unknown_attribute_range(offered).await;
        assert_eq!(negotiated, json!(name));
        assert_eq!(range["start"], pos_in(WIDE, at, enc), "{name}");
        assert_eq!(range["end"], pos_in(WIDE, at + 2, enc), "{name}");
    }
    // Spot-check the columns by hand: 59 scalar values precede `Kx`;
    // `𝛥` is the one character taking 2 UTF-16 units (60 in all), and
    // ₂ ₂ ⇌ ° µ α β 𝛥 take 3, 3, 3, 2, 2, 2, 2, 4 bytes (72 in all).
    let prefix = &WIDE[..at];
    assert_eq!(prefix.chars().count(), 59);
    assert_eq!(prefix.encode_utf16().count(), 60);
    assert_eq!(prefix.len(), 72);
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn crlf_and_lone_cr_line_ends_place_findings_on_the_right_line() {
    for nl in ["\n", "\r\n", "\r"] {
        let text = format!("# head{nl}reaction: H2(g) + O2(g) <=> H2O(g){nl}");
        let mut c = Client::start(&[]).await;
        c.open("a.stoik", &text).await;
        let d = c.diagnostics("a.stoik", 1).await;
        assert_eq!(
            d[0]["range"]["start"],
            json!({"line": 1, "character": 10}),
            "{nl:?}"
        );
        c.shutdown().await;
    }
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn incremental_edits_after_wide_characters_land_in_place() {
    let mut c = Client::start(&[]).await;
    let text = "# 𝛥 µ °\nreaction: H₂(g) + O₂(g) ⇌ H₂O(g)\n";
    c.open("a.stoik", text).await;
    let d = c.diagnostics("a.stoik", 1).await;
    assert!(d.iter().any(|d| d["code"] == "element-balance"));
    // Insert "2 " before H₂O and before H₂ (UTF-16 positions), in one
    // didChange with two changes applied in order.
    let h2o = text.find("H₂O").expect("H2O");
    let h2 = text.find("H₂(").expect("H2");
    let u = c.uri("a.stoik");
    c.notify(
        "textDocument/didChange",
        json!({"textDocument": {"uri": u, "version": 2}, "contentChanges": [
            {"range": {"start": pos(text, h2o), "end": pos(text, h2o)}, "text": "2 "},
            {"range": {"start": pos(text, h2), "end": pos(text, h2)}, "text": "2 "},
        ]}),
    )
    .await;
    let d = c.diagnostics("a.stoik", 2).await;
    assert!(d.is_empty(), "{d:?}");
    c.shutdown().await;
}
