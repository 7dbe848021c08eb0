//! The demo library under `examples/` through the real binary: the correct
//! files are clean, and `examples/flawed/` shows each planted mistake exactly
//! where its `# planted:` comment says, one finding per rule of the catalogue.

use serde_json::Value;
use std::collections::BTreeMap;
use std::path::Path;
use std::process::Command;

fn check_examples() -> Value {
    let o = Command::new(env!("CARGO_BIN_EXE_stoik"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .args(["check", "--format", "json", "examples"])
        .output()
        .expect("the binary runs");
    assert_eq!(o.status.code(), Some(1), "the flawed part has errors");
    serde_json::from_slice(&o.stdout).expect("JSON")
}

/// The 1-based line ranges that follow each `# planted:` comment, up to the
/// next blank line: the planted mistake's finding must start inside one.
fn planted_regions(text: &str) -> Vec<(usize, usize)> {
    let lines: Vec<&str> = text.lines().collect();
    let mut out = Vec::new();
    for (i, line) in lines.iter().enumerate() {
        if line.trim_start().starts_with("# planted:") {
            let start = i + 2;
            let mut end = start;
            while end < lines.len() && !lines[end].trim().is_empty() {
                end += 1;
            }
            out.push((start, end));
        }
    }
    out
}

#[test]
fn the_correct_library_is_clean() {
    let v = check_examples();
    let outside: Vec<&Value> = v["diagnostics"]
        .as_array()
        .expect("diagnostics[]")
        .iter()
        .filter(|d| !d["file"].as_str().is_some_and(|f| f.contains("flawed/")))
        .collect();
    assert!(outside.is_empty(), "findings outside flawed/: {outside:?}");
}

#[test]
fn each_planted_mistake_is_found_where_it_is_planted() {
    let v = check_examples();
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut by_file: BTreeMap<String, Vec<(usize, String)>> = BTreeMap::new();
    for d in v["diagnostics"].as_array().expect("diagnostics[]") {
        let file = d["file"].as_str().expect("file").to_string();
        let line = d["line"].as_u64().expect("line") as usize;
        let rule = d["rule"].as_str().expect("rule").to_string();
        by_file.entry(file).or_default().push((line, rule));
    }
    let mut rules_found: BTreeMap<String, usize> = BTreeMap::new();
    for entry in std::fs::read_dir(root.join("examples/flawed")).expect("flawed/") {
        let path = entry.expect("entry").path();
        if path.extension().is_none_or(|x| x != "stoik") {
            continue;
        }
        let text = std::fs::read_to_string(&path).expect("readable");
        let name = format!(
            "examples/flawed/{}",
            path.file_name().expect("a name").to_string_lossy()
        );
        let found = by_file.remove(&name).unwrap_or_default();
        for (start, end) in planted_regions(&text) {
            let inside: Vec<&(usize, String)> = found
                .iter()
                .filter(|(l, _)| (start..=end).contains(l))
                .collect();
            assert_eq!(
                inside.len(),
                1,
                "{name}:{start}-{end} should hold one finding, has {inside:?}"
            );
            *rules_found.entry(inside[0].1.clone()).or_default() += 1;
        }
        let planted = planted_regions(&text);
        for (line, rule) in &found {
            assert!(
                planted.iter().any(|(s, e)| (s..=e).contains(&line)),
                "{name}:{line}: `{rule}` was not planted"
            );
        }
    }
    assert!(by_file.is_empty(), "findings in other files: {by_file:?}");
    // One planted mistake per rule of the catalogue, each found once.
    for rule in stoik::rules::RULES {
        assert_eq!(
            rules_found.get(rule.id),
            Some(&1),
            "rule `{}` should be planted exactly once",
            rule.id
        );
    }
    assert_eq!(rules_found.len(), stoik::rules::RULES.len());
}

#[test]
fn the_plant_mixtures_solve() {
    let o = Command::new(env!("CARGO_BIN_EXE_stoik"))
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .args(["solve", "--format", "json", "examples/aqueous/acids.stoik"])
        .output()
        .expect("the binary runs");
    assert_eq!(o.status.code(), Some(0));
    let v: Value = serde_json::from_slice(&o.stdout).expect("JSON");
    let rinse = &v["mixtures"][0];
    assert_eq!(rinse["name"], "rinse-tank");
    // 0.10 mol/L acetic acid with pK = 4.757 (CRC Handbook): exact quadratic.
    let ka = 10f64.powf(-4.757);
    let x = (-ka + (ka * ka + 4.0 * ka * 0.10).sqrt()) / 2.0;
    let h = rinse["species"]
        .as_array()
        .expect("species[]")
        .iter()
        .find(|s| s["name"] == "H^+(aq)")
        .and_then(|s| s["equilibrium"].as_f64())
        .expect("H+");
    assert!((h - x).abs() / x < 1e-6, "{h} vs {x}");
    // The buffer tank holds equal acid and base: pH = pK (Henderson-Hasselbalch).
    let buffer = &v["mixtures"][1];
    let ph = buffer["ph"].as_f64().expect("a pH");
    assert!((ph - 4.757).abs() < 1e-3, "pH = {ph}");
}
