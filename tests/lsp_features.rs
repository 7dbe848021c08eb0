//! Every editor feature of the server, driven over the protocol.
//!
//! Numbers are checked against outside sources named beside each check.

mod lsp_harness;
use lsp_harness::*;
use serde_json::{Value, json};

/// R in J/(mol K), CODATA 2018 (exact since the 2019 SI).
const R: f64 = 8.314_462_618;

fn doc(c: &Client, name: &str) -> Value {
    json!({"uri": c.uri(name)})
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn hover_on_a_species_shows_composition_and_molar_mass() {
    let mut c = Client::start(&[]).await;
    let (text, at) = fixture(
        "species CO2(g)\n  dHf = -393.51 kJ/mol\n  source = \"tables\"\nreaction: C(s) + O2(g) <=> C$0O2(g)\n  K = 1e69\n",
    );
    c.open("a.stoik", &text).await;
    let h = c.hover_text("a.stoik", &text, at).await;
    assert!(h.contains("C 1, O 2"), "{h}");
    // CIAAW 2021 conventional weights: C 12.011, O 15.999, so CO2 44.009 g/mol.
    assert!(h.contains("44.009"), "{h}");
    assert!(h.contains("phase: gas"), "{h}");
    assert!(h.contains("ΔfH° = -393.51 kJ/mol"), "{h}");
    assert!(h.contains("source: tables"), "{h}");
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn hover_on_an_ion_shows_its_charge() {
    let mut c = Client::start(&[]).await;
    let (text, at) = fixture("reaction: Fe^3+(aq) + e- <=> Fe$0^2+(aq)\n");
    c.open("a.stoik", &text).await;
    let h = c.hover_text("a.stoik", &text, at).await;
    assert!(h.contains("charge: 2+"), "{h}");
    assert!(h.contains("aqueous"), "{h}");
    // CIAAW 2021: Fe 55.845 g/mol (electron mass ignored, common practice).
    assert!(h.contains("55.845"), "{h}");
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn hover_on_a_reaction_gives_the_k_expression_and_formation_energies() {
    // Formation data at 298.15 K from the NIST-JANAF tables as recalled
    // (from memory): CO(g) ΔfG° -137.16, ΔfH° -110.53; H2O(g) ΔfG° -228.58,
    // ΔfH° -241.83; CO2(g) ΔfG° -394.37, ΔfH° -393.51 kJ/mol.
    let (text, at) = fixture(
        "species CO(g)\n  dGf = -137.16 kJ/mol\n  dHf = -110.53 kJ/mol\n\
         species H2O(g)\n  dGf = -228.58 kJ/mol\n  dHf = -241.83 kJ/mol\n\
         species CO2(g)\n  dGf = -394.37 kJ/mol\n  dHf = -393.51 kJ/mol\n\
         reaction shift: CO(g) + H2O(g) <$0=> CO2(g) + H2(g)\n",
    );
    let mut c = Client::start(&[]).await;
    c.open("a.stoik", &text).await;
    let h = c.hover_text("a.stoik", &text, at).await;
    assert!(h.contains("K = a(CO2) · a(H2) / (a(CO) · a(H2O))"), "{h}");
    assert!(h.contains("Δn(gas) = 0"), "{h}");
    // ΔrG° = -394.37 - (-137.16 - 228.58) = -28.63 kJ/mol; ΔrH° = -41.15
    // kJ/mol, the textbook water-gas-shift values (about -28.6 and -41.2).
    assert!(h.contains("ΔrG° = -28.63 kJ/mol"), "{h}");
    assert!(h.contains("ΔrH° = -41.15 kJ/mol"), "{h}");
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn pure_condensed_phases_and_photons_stay_out_of_k() {
    let (text, at) = fixture(
        "reaction lime: CaCO3(s) <=$0> CaO(s) + CO2(g)\nreaction: 2 H2O(l) + hv <=> H2O2(aq) + H2(g)\n",
    );
    let mut c = Client::start(&[]).await;
    c.open("a.stoik", &text).await;
    let h = c.hover_text("a.stoik", &text, at).await;
    assert!(h.contains("`K = a(CO2)`"), "{h}");
    let at2 = text.find("hv").expect("hv") + 6;
    let h = c.hover_text("a.stoik", &text, at2).await;
    assert!(h.contains("`K = a(H2O2) · a(H2)`"), "{h}");
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn hover_on_a_unit_gives_its_si_form() {
    let (text, at) = fixture("reaction: H2(g) + I2(g) <=> 2 HI(g)\n  dH = -9.4 k$0cal/mol\n");
    let mut c = Client::start(&[]).await;
    c.open("a.stoik", &text).await;
    let h = c.hover_text("a.stoik", &text, at).await;
    // 1 kcal = 4184 J (thermochemical calorie, NIST SP 811).
    assert!(h.contains("**kcal/mol** = 4184 kg·m^2·s^-2·mol^-1"), "{h}");
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn inlay_hints_show_delta_n_the_k_expression_and_k_from_kc() {
    // Kc = 0.5 (mol/L)^-2 at 700 K for N2 + 3 H2 <=> 2 NH3, Δn(gas) = -2.
    let text = "reaction nh3: N2(g) + 3 H2(g) <=> 2 NH3(g)\n  Kc = 0.5 L^2/mol^2 at 700 K\n  dH = -92.2 kJ/mol\nmixture feed\n  temperature = 800 K\n  N2(g) = 1 mol/L\n  H2(g) = 3 mol/L\n  NH3(g) = 0 mol/L\n";
    let mut c = Client::start(&[]).await;
    c.open("a.stoik", text).await;
    let hints = c
        .request(
            "textDocument/inlayHint",
            json!({"textDocument": doc(&c, "a.stoik"), "range": {"start": {"line": 0, "character": 0}, "end": {"line": 9, "character": 0}}}),
        )
        .await;
    let labels: Vec<String> = hints
        .as_array()
        .expect("hints")
        .iter()
        .map(|h| h["label"].as_str().unwrap_or_default().to_string())
        .collect();
    assert!(
        labels.contains(&"Δn(gas) = -2; K = a(NH3)^2 / (a(N2) · a(H2)^3)".to_string()),
        "{labels:?}"
    );
    // K = Kc (c° R T / p°)^(-Δn)... written as K = Kp / p°^Δn with
    // Kp = Kc (RT)^Δn (Atkins, Physical Chemistry, the Kp-Kc relation),
    // c in mol/m3 and p° = 1e5 Pa.
    let kc_si = 0.5 * (1.0e-3f64).powi(2); // (L/mol)^2 = (1e-3 m3/mol)^2
    let k700 = kc_si * (R * 700.0).powi(-2) / (1.0e5f64).powi(-2);
    let want = format!("K(700 K) = {}", stoik::lsp::chemistry::number(k700));
    assert!(labels.contains(&want), "{labels:?} lacks {want}");
    // van 't Hoff with constant ΔH: ln K2 = ln K1 - ΔH/R (1/T2 - 1/T1).
    let k800 = (k700.ln() - (-92.2e3) / R * (1.0 / 800.0 - 1.0 / 700.0)).exp();
    let want = format!("K(800 K) = {}", stoik::lsp::chemistry::number(k800));
    assert!(labels.contains(&want), "{labels:?} lacks {want}");
    // Position: after the equation on line 0.
    let first = &hints[0];
    assert_eq!(first["position"], json!({"line": 0, "character": 42}));
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn inlay_hints_follow_stoik_toml_and_the_client_setting() {
    let mut c = Client::start(&[]).await;
    std::fs::write(c.path("stoik.toml"), "inlay-hints = false\n").expect("write");
    let text = "reaction: H2(g) + I2(g) <=> 2 HI(g)\n";
    c.open("a.stoik", text).await;
    let range = json!({"start": {"line": 0, "character": 0}, "end": {"line": 1, "character": 0}});
    let hints = c
        .request(
            "textDocument/inlayHint",
            json!({"textDocument": doc(&c, "a.stoik"), "range": range}),
        )
        .await;
    assert_eq!(hints, json!([]));
    c.notify(
        "workspace/didChangeConfiguration",
        json!({"settings": {"stoik": {"inlayHints": {"enable": true}}}}),
    )
    .await;
    let hints = c
        .request(
            "textDocument/inlayHint",
            json!({"textDocument": doc(&c, "a.stoik"), "range": range}),
        )
        .await;
    assert_eq!(hints.as_array().map(Vec::len), Some(1), "{hints}");
    c.shutdown().await;
}

async fn actions(c: &mut Client, name: &str, range: Value, only: Option<Value>) -> Vec<Value> {
    let mut context = json!({"diagnostics": []});
    if let Some(o) = only {
        context["only"] = o;
    }
    let u = c.uri(name);
    c.request(
        "textDocument/codeAction",
        json!({"textDocument": {"uri": u}, "range": range, "context": context}),
    )
    .await
    .as_array()
    .cloned()
    .unwrap_or_default()
}

fn edits_for(action: &Value, uri: &str) -> Vec<Value> {
    action["edit"]["changes"][uri]
        .as_array()
        .cloned()
        .unwrap_or_default()
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn the_balance_fix_applies_and_the_finding_goes_away() {
    let mut c = Client::start(&[]).await;
    let text = "reaction: Fe(s) + O2(g) -> Fe2O3(s)\n";
    c.open("a.stoik", text).await;
    let d = c.diagnostics("a.stoik", 1).await;
    assert!(d.iter().any(|d| d["code"] == "element-balance"), "{d:?}");
    let range = d[0]["range"].clone();
    let acts = actions(&mut c, "a.stoik", range, None).await;
    let fix = acts
        .iter()
        .find(|a| a["kind"] == "quickfix" && a["title"] == "balance the equation")
        .unwrap_or_else(|| panic!("a balance fix among {acts:?}"));
    let fixed = apply_edits(text, &edits_for(fix, &c.uri("a.stoik")));
    // 4 Fe + 3 O2 -> 2 Fe2O3, the classic rusting balance (DESIGN.md).
    assert_eq!(fixed, "reaction: 4 Fe(s) + 3 O2(g) -> 2 Fe2O3(s)\n");
    c.change_full("a.stoik", 2, &fixed).await;
    let d = c.diagnostics("a.stoik", 2).await;
    assert!(d.is_empty(), "{d:?}");
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn suppress_actions_insert_allow_comments_that_silence_the_rule() {
    let mut c = Client::start(&[]).await;
    let text = "units energy = kJ/mol\n\nreaction: H2(g) + O2(g) <=> H2O(g)\n  K = 3\n";
    c.open("a.stoik", text).await;
    let d = c.diagnostics("a.stoik", 1).await;
    let bal = d
        .iter()
        .find(|d| d["code"] == "element-balance")
        .expect("balance finding");
    let acts = actions(
        &mut c,
        "a.stoik",
        bal["range"].clone(),
        Some(json!(["quickfix"])),
    )
    .await;
    let allow = acts
        .iter()
        .find(|a| a["title"] == "Allow `element-balance` for this statement")
        .expect("statement suppression");
    let fixed = apply_edits(text, &edits_for(allow, &c.uri("a.stoik")));
    assert_eq!(
        fixed,
        "units energy = kJ/mol\n\n# stoik: allow element-balance\nreaction: H2(g) + O2(g) <=> H2O(g)\n  K = 3\n"
    );
    c.change_full("a.stoik", 2, &fixed).await;
    let d = c.diagnostics("a.stoik", 2).await;
    assert!(!d.iter().any(|d| d["code"] == "element-balance"), "{d:?}");
    let file_wide = acts
        .iter()
        .find(|a| a["title"] == "Allow `element-balance` in this file")
        .expect("file suppression");
    let fixed = apply_edits(text, &edits_for(file_wide, &c.uri("a.stoik")));
    assert!(fixed.starts_with("# stoik: allow-file element-balance\n"));
    c.change_full("a.stoik", 3, &fixed).await;
    let d = c.diagnostics("a.stoik", 3).await;
    assert!(!d.iter().any(|d| d["code"] == "element-balance"), "{d:?}");
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn fix_all_applies_the_safe_fixes() {
    let mut c = Client::start(&[]).await;
    let text = "reaction: N2O4(g) <-> 2 NO2(g)\nreaction: H2(g) + Cl2(g) <-> 2 HCl(g)\n";
    c.open("a.stoik", text).await;
    let d = c.diagnostics("a.stoik", 1).await;
    assert_eq!(
        d.iter().filter(|d| d["code"] == "resonance-arrow").count(),
        2,
        "{d:?}"
    );
    let all = json!({"start": {"line": 0, "character": 0}, "end": {"line": 2, "character": 0}});
    let acts = actions(&mut c, "a.stoik", all, Some(json!(["source.fixAll"]))).await;
    assert_eq!(acts.len(), 1, "{acts:?}");
    let fixed = apply_edits(text, &edits_for(&acts[0], &c.uri("a.stoik")));
    assert_eq!(
        fixed,
        "reaction: N2O4(g) <=> 2 NO2(g)\nreaction: H2(g) + Cl2(g) <=> 2 HCl(g)\n"
    );
    c.change_full("a.stoik", 2, &fixed).await;
    assert!(c.diagnostics("a.stoik", 2).await.is_empty());
    c.shutdown().await;
}

async fn complete(c: &mut Client, name: &str, text: &str, at: usize) -> Vec<String> {
    let u = c.uri(name);
    let r = c
        .request(
            "textDocument/completion",
            json!({"textDocument": {"uri": u}, "position": pos(text, at)}),
        )
        .await;
    r.as_array()
        .cloned()
        .unwrap_or_default()
        .iter()
        .map(|i| i["label"].as_str().unwrap_or_default().to_string())
        .collect()
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn completion_offers_keywords_attributes_units_and_species() {
    let mut c = Client::start(&[]).await;
    let base = "species ethanol = C2H5OH(l)\nreaction r: ethanol + 3 O2(g) -> 2 CO2(g) + 3 H2O(l)\n  dH = -1367 kJ/mol\n";
    let cases: &[(&str, &[&str], &[&str])] = &[
        ("rea$0", &["reaction"], &["units"]),
        ("reaction s: eth$0", &["ethanol"], &["reaction"]),
        ("reaction s: C$0", &["Cl", "Co", "CO2(g)"], &["ethanol"]),
        ("reaction t: A <=> B\n  K$0", &["K", "Kc", "Kp"], &["dHf"]),
        ("species X(g)\n  d$0", &["dHf", "dGf"], &["dH"]),
        (
            "reaction u: A <=> B\n  dH = -4 k$0",
            &["kJ", "kcal"],
            &["K", "mol"],
        ),
        (
            "reaction u: A <=> B\n  dH = -4 kJ/m$0",
            &["mol", "mL"],
            &["kJ"],
        ),
        ("reaction u: A <=> B\n  K = 4 at 25 deg$0", &["degC"], &[]),
        ("mixture m\n  temp$0", &["temperature"], &[]),
        ("mixture m\n  eth$0", &["ethanol"], &[]),
    ];
    for (i, (tail, want, not)) in cases.iter().enumerate() {
        let (text, at) = fixture(&format!("{base}{tail}"));
        let name = format!("c{i}.stoik");
        c.open(&name, &text).await;
        let got = complete(&mut c, &name, &text, at).await;
        for w in *want {
            assert!(got.iter().any(|g| g == w), "{tail}: {w} not in {got:?}");
        }
        for n in *not {
            assert!(!got.iter().any(|g| g == n), "{tail}: {n} in {got:?}");
        }
    }
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn definition_references_and_rename_follow_aliases_across_use_files() {
    let common = "species glucose = C6H12O6(s)\n  dHf = -1273.3 kJ/mol\n";
    let mut c = Client::start(&[("thermo/common.stoik", common)]).await;
    let (text, at) = fixture(
        "use \"thermo/common.stoik\"\nreaction burn: gluc$0ose + 6 O2(g) -> 6 CO2(g) + 6 H2O(l)\nmixture m\n  temperature = 310 K\n  glucose = 0.005 mol/L\n",
    );
    c.open("main.stoik", &text).await;
    let def = c
        .request(
            "textDocument/definition",
            json!({"textDocument": doc(&c, "main.stoik"), "position": pos(&text, at)}),
        )
        .await;
    assert_eq!(def["uri"], json!(c.uri("thermo/common.stoik")));
    assert_eq!(
        def["range"],
        json!({"start": {"line": 0, "character": 8}, "end": {"line": 0, "character": 15}})
    );
    let refs = c
        .request(
            "textDocument/references",
            json!({"textDocument": doc(&c, "main.stoik"), "position": pos(&text, at), "context": {"includeDeclaration": true}}),
        )
        .await;
    assert_eq!(refs.as_array().map(Vec::len), Some(3), "{refs}");
    let bad = c
        .request_raw(
            "textDocument/rename",
            json!({"textDocument": doc(&c, "main.stoik"), "position": pos(&text, at), "newName": "C6H12O6"}),
        )
        .await;
    assert!(
        bad["error"]["message"]
            .as_str()
            .is_some_and(|m| m.contains("formula")),
        "{bad}"
    );
    let edit = c
        .request(
            "textDocument/rename",
            json!({"textDocument": doc(&c, "main.stoik"), "position": pos(&text, at), "newName": "dextrose"}),
        )
        .await;
    let main = apply_edits(
        &text,
        edit["changes"][c.uri("main.stoik")]
            .as_array()
            .expect("main edits"),
    );
    let used = apply_edits(
        common,
        edit["changes"][c.uri("thermo/common.stoik")]
            .as_array()
            .expect("common edits"),
    );
    assert_eq!(main.matches("dextrose").count(), 2, "{main}");
    assert!(used.starts_with("species dextrose = C6H12O6(s)"), "{used}");
    // A reaction label: definition is the label itself, rename changes it.
    let at_label = text.find("burn").expect("label") + 1;
    let edit = c
        .request(
            "textDocument/rename",
            json!({"textDocument": doc(&c, "main.stoik"), "position": pos(&text, at_label), "newName": "combustion"}),
        )
        .await;
    let main = apply_edits(
        &text,
        edit["changes"][c.uri("main.stoik")]
            .as_array()
            .expect("edits"),
    );
    assert!(main.contains("reaction combustion: glucose"), "{main}");
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn symbols_folding_and_workspace_symbols() {
    let mut c = Client::start(&[]).await;
    let text = "species ethanol = C2H5OH(l)\nreaction shift: CO(g) + H2O(g) <=> CO2(g) + H2(g)\n  K = 1e5\n  dH = -41.2 kJ/mol\nreaction: H2(g) + I2(g) <=> 2 HI(g)\nmixture feed\n  temperature = 700 K\n  H2(g) = 1 mol/L\n";
    c.open("a.stoik", text).await;
    let syms = c
        .request(
            "textDocument/documentSymbol",
            json!({"textDocument": doc(&c, "a.stoik")}),
        )
        .await;
    let names: Vec<&str> = syms
        .as_array()
        .expect("symbols")
        .iter()
        .filter_map(|s| s["name"].as_str())
        .collect();
    assert_eq!(
        names,
        ["ethanol", "shift", "H2(g) + I2(g) <=> 2 HI(g)", "feed"]
    );
    let folds = c
        .request(
            "textDocument/foldingRange",
            json!({"textDocument": doc(&c, "a.stoik")}),
        )
        .await;
    let lines: Vec<(u64, u64)> = folds
        .as_array()
        .expect("folds")
        .iter()
        .map(|f| {
            (
                f["startLine"].as_u64().unwrap_or(0),
                f["endLine"].as_u64().unwrap_or(0),
            )
        })
        .collect();
    assert_eq!(lines, [(1, 3), (5, 7)]);
    let ws = c.request("workspace/symbol", json!({"query": "SHI"})).await;
    assert_eq!(ws.as_array().map(Vec::len), Some(1), "{ws}");
    assert_eq!(ws[0]["name"], "shift");
    c.shutdown().await;
}

/// Decode semantic tokens into (line, start, length, type name).
fn decode(tokens: &Value, legend: &[Value]) -> Vec<(u64, u64, u64, String)> {
    let data: Vec<u64> = tokens["data"]
        .as_array()
        .expect("data")
        .iter()
        .map(|v| v.as_u64().unwrap_or(0))
        .collect();
    let (mut line, mut col) = (0, 0);
    let mut out = Vec::new();
    for chunk in data.chunks(5) {
        if chunk[0] > 0 {
            line += chunk[0];
            col = chunk[1];
        } else {
            col += chunk[1];
        }
        let ty = legend[chunk[3] as usize]
            .as_str()
            .unwrap_or_default()
            .to_string();
        out.push((line, col, chunk[2], ty));
    }
    out
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn semantic_tokens_split_formulas_in_utf16_columns() {
    let mut c = Client::start(&[]).await;
    let text = "# 𝛥 demo\nreaction: Cu²⁺(aq) + 2 e- ⇌ Cu(s)\n  K = 3 at 25 °C\n";
    c.open("a.stoik", text).await;
    let legend = c.init["capabilities"]["semanticTokensProvider"]["legend"]["tokenTypes"]
        .as_array()
        .cloned()
        .expect("legend");
    let toks = c
        .request(
            "textDocument/semanticTokens/full",
            json!({"textDocument": doc(&c, "a.stoik")}),
        )
        .await;
    let got = decode(&toks, &legend);
    let want = [
        (0, 0, 9, "comment"), // `𝛥` is two UTF-16 units
        (1, 0, 8, "keyword"),
        (1, 10, 2, "element"), // Cu
        (1, 12, 2, "charge"),  // ²⁺
        (1, 14, 4, "phase"),   // (aq)
        (1, 21, 1, "number"),  // 2
        (1, 23, 2, "element"), // e-
        (1, 26, 1, "arrow"),   // ⇌
        (1, 28, 2, "element"),
        (1, 30, 3, "phase"),
        (2, 2, 1, "property"),
        (2, 6, 1, "number"),
        (2, 11, 2, "number"),
        (2, 14, 2, "unit"), // °C
    ];
    let want: Vec<(u64, u64, u64, String)> = want
        .iter()
        .map(|(a, b, l, t)| (*a, *b, *l, t.to_string()))
        .collect();
    assert_eq!(got, want);
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn pull_diagnostics_for_a_document_and_the_workspace() {
    let caps = json!({"textDocument": {"diagnostic": {"dynamicRegistration": false}}});
    let closed = "reaction: Na(s) + Cl2(g) -> NaCl(s)\n";
    let mut c = Client::start_with(caps, Value::Null, &[("closed.stoik", closed)]).await;
    assert!(c.init["capabilities"]["diagnosticProvider"].is_object());
    let text = "reaction: H2(g) + O2(g) <=> H2O(g)\n";
    c.open("a.stoik", text).await;
    let r = c
        .request(
            "textDocument/diagnostic",
            json!({"textDocument": doc(&c, "a.stoik")}),
        )
        .await;
    assert_eq!(r["kind"], "full");
    assert!(
        r["items"]
            .as_array()
            .is_some_and(|i| i.iter().any(|d| d["code"] == "element-balance"))
    );
    let w = c
        .request("workspace/diagnostic", json!({"previousResultIds": []}))
        .await;
    let items = w["items"].as_array().expect("items");
    let closed_report = items
        .iter()
        .find(|i| i["uri"] == json!(c.uri("closed.stoik")))
        .expect("closed file reported");
    assert!(closed_report["version"].is_null());
    assert!(
        closed_report["items"]
            .as_array()
            .is_some_and(|i| !i.is_empty())
    );
    let open_report = items
        .iter()
        .find(|i| i["uri"] == json!(c.uri("a.stoik")))
        .expect("open file reported");
    assert_eq!(open_report["version"], 1);
    // The server pushed nothing: the client pulls.
    assert!(
        !c.notifications
            .iter()
            .any(|n| n["method"] == "textDocument/publishDiagnostics")
    );
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn bad_requests_do_not_stop_the_server() {
    let mut c = Client::start(&[]).await;
    let text = "reaction: A\n";
    c.open("a.stoik", text).await;
    let h = c
        .hover("a.stoik", json!({"line": 9999, "character": 9999}))
        .await;
    assert!(h.is_null());
    let h = c
        .hover("missing.stoik", json!({"line": 0, "character": 0}))
        .await;
    assert!(h.is_null());
    let bad = c
        .request_raw(
            "textDocument/hover",
            json!({"textDocument": {"uri": "not a uri"}}),
        )
        .await;
    assert!(bad.get("error").is_some());
    let d = c.diagnostics("a.stoik", 1).await;
    assert!(!d.is_empty());
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn mixture_lines_get_their_equilibrium_amounts() {
    // N2O4 <=> 2 NO2 with K = 0.15 (invented); from 1 mol/L N2O4 at
    // 298.15 K. The check is the equilibrium condition itself, K = (c(NO2)
    // RT/p°)^2 / (c(N2O4) RT/p°) with c in mol/m3 (ideal gas), on the
    // numbers the hints show.
    let text = "reaction: N2O4(g) <=> 2 NO2(g)\n  K = 0.15 at 298.15 K\nmixture m\n  temperature = 298.15 K\n  N2O4(g) = 1 mol/L\n  NO2(g) = 0 mol/L\n";
    let mut c = Client::start(&[]).await;
    c.open("a.stoik", text).await;
    let hints = c
        .request(
            "textDocument/inlayHint",
            json!({"textDocument": doc(&c, "a.stoik"), "range": {"start": {"line": 0, "character": 0}, "end": {"line": 7, "character": 0}}}),
        )
        .await;
    let amount = |line: u64| -> f64 {
        let h = hints
            .as_array()
            .expect("hints")
            .iter()
            .find(|h| h["position"]["line"] == line)
            .unwrap_or_else(|| panic!("a hint on line {line}: {hints}"));
        let label = h["label"].as_str().unwrap_or_default();
        label
            .trim_start_matches("⇌ ")
            .split(' ')
            .next()
            .and_then(|x| x.parse().ok())
            .unwrap_or_else(|| panic!("a number in {label}"))
    };
    let (n2o4, no2) = (amount(4), amount(5));
    let a = |c_mol_per_l: f64| c_mol_per_l * 1000.0 * R * 298.15 / 1.0e5;
    let k = a(no2).powi(2) / a(n2o4);
    assert!(
        (k / 0.15 - 1.0).abs() < 2e-3,
        "K from the hints = {k} ({n2o4}, {no2})"
    );
    // Nitrogen is conserved: 2 c(N2O4) + c(NO2) = 2 mol/L.
    assert!((2.0 * n2o4 + no2 - 2.0).abs() < 2e-3, "{n2o4} {no2}");
    c.shutdown().await;
}

#[tokio::test(flavor = "multi_thread", worker_threads = 2)]
async fn formatting_gives_the_same_text_as_stoik_fmt() {
    let mut c = Client::start(&[]).await;
    let text = "reaction  shift:  CO(g) +   H2O(g)  <=>  CO2(g) + H2(g)\n   K=1e5   # note\n  dH   = -41.2 kJ/mol\n";
    c.open("f.stoik", text).await;
    let edits = c
        .request(
            "textDocument/formatting",
            json!({"textDocument": doc(&c, "f.stoik"), "options": {"tabSize": 2, "insertSpaces": true}}),
        )
        .await;
    let edits = edits
        .as_array()
        .unwrap_or_else(|| panic!("not edits: {edits}"));
    assert_eq!(edits.len(), 1, "{edits:?}");
    assert_eq!(
        edits[0]["new_text"]
            .as_str()
            .or(edits[0]["newText"].as_str()),
        Some(stoik::format::format(text).as_str())
    );
    assert_eq!(
        edits[0]["range"]["start"],
        json!({"line": 0, "character": 0})
    );
    // An already formatted document needs no edit.
    let formatted = stoik::format::format(text);
    c.open("g.stoik", &formatted).await;
    let none = c
        .request(
            "textDocument/formatting",
            json!({"textDocument": doc(&c, "g.stoik"), "options": {"tabSize": 2, "insertSpaces": true}}),
        )
        .await;
    assert!(
        none.is_null() || none.as_array().is_some_and(Vec::is_empty),
        "{none}"
    );
    c.shutdown().await;
}
