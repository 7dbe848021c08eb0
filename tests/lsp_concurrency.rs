//! A burst of edits: the server never publishes diagnostics for a version
//! older than one it already published, the last publication describes the
//! last text, and requests after the burst answer from the last text.

mod lsp_harness;
use lsp_harness::*;
use serde_json::json;

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn rapid_edits_never_yield_stale_diagnostics() {
    let mut c = Client::start(&[]).await;
    // A large-ish file so that analysis takes longer than the gap between
    // edits.
    let mut body = String::new();
    for n in 1..=2000 {
        body.push_str(&format!(
            "reaction d{n}: C{n}H{}(g) <=> C{n}H{}(g) + H2(g)\n  K = 1e-3 at 700 K\n",
            2 * n + 2,
            2 * n
        ));
    }
    c.open("a.stoik", &body).await;
    let last = 60;
    for v in 2..=last {
        // Each version has a different unbalanced coefficient, so the
        // message names the version's own text.
        let text = format!("{body}reaction bad: {v} H2(g) + O2(g) <=> H2O(g)\n");
        c.change_full("a.stoik", v, &text).await;
    }
    let d = c.diagnostics("a.stoik", last).await;
    let codes: Vec<&str> = d.iter().filter_map(|d| d["code"].as_str()).collect();
    assert_eq!(codes, ["element-balance"], "{}", d[0]["message"]);
    let msg = d[0]["message"].as_str().unwrap_or_default();
    // H: 2·60 = 120 on the left, 2 on the right.
    assert!(msg.contains("120 on the left"), "{msg}");
    let published: Vec<i64> = c
        .notifications
        .iter()
        .filter(|n| n["method"] == "textDocument/publishDiagnostics")
        .filter_map(|n| n["params"]["version"].as_i64())
        .collect();
    assert!(published.windows(2).all(|w| w[0] < w[1]), "{published:?}");
    // The edits were merged: far fewer analyses than edits.
    assert!(published.len() < last as usize, "{published:?}");
    // A request right after one more edit answers from that edit's text.
    let text = format!("{body}reaction bad: H2(g) + Cl2(g) <=> 2 HCl(g)\n");
    c.change_full("a.stoik", last + 1, &text).await;
    let at = text.find("HCl").expect("HCl");
    let h = c.hover_text("a.stoik", &text, at).await;
    assert!(h.contains("Cl 1"), "{h}");
    let d = c.diagnostics("a.stoik", last + 1).await;
    assert!(d.is_empty(), "{} findings", d.len());
    let r = c
        .request(
            "textDocument/documentSymbol",
            json!({"textDocument": {"uri": c.uri("a.stoik")}}),
        )
        .await;
    assert_eq!(r.as_array().map(Vec::len), Some(2001));
    c.shutdown().await;
}
