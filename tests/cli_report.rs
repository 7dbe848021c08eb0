//! `stoik report` through the real binary: the JSON shape of DESIGN.md and
//! the worked numbers, recomputed here from published data and CODATA.

use serde_json::Value;
use std::process::Command;

/// Molar gas constant, J/(mol·K) (CODATA 2018, exact).
const R: f64 = 8.314462618;
/// Standard pressure p° = 1 bar, Pa (IUPAC standard state).
const P_STD: f64 = 1.0e5;
/// Standard concentration c° = 1 mol/L, mol/m³.
const C_STD: f64 = 1.0e3;

fn report(text: &str, extra: &[&str]) -> (Option<i32>, Value) {
    let dir = tempfile::tempdir().expect("a temporary folder");
    std::fs::write(dir.path().join("lib.stoik"), text).expect("written");
    let o = Command::new(env!("CARGO_BIN_EXE_stoik"))
        .current_dir(dir.path())
        .args(["report", "lib.stoik", "--format", "json"])
        .args(extra)
        .output()
        .expect("the binary runs");
    let v = serde_json::from_slice(&o.stdout).unwrap_or(Value::Null);
    (o.status.code(), v)
}

fn close(actual: &Value, expected: f64, rel: f64) {
    let a = actual.as_f64().unwrap_or(f64::NAN);
    assert!(
        ((a - expected) / expected).abs() < rel,
        "{a} is not within {rel} of {expected}"
    );
}

/// Ammonia synthesis with the NBS Gibbs energy of formation of NH3(g),
/// -16.45 kJ/mol (Wagman et al. 1982, the NBS tables; from memory), and the
/// NBS enthalpy of formation -46.11 kJ/mol (same tables; from memory).
const AMMONIA: &str = "\
# Ammonia synthesis from NBS formation data (Wagman et al. 1982).
species NH3(g)
  dGf = -16.45 kJ/mol
  dHf = -46.11 kJ/mol
reaction synth: N2(g) + 3 H2(g) <=> 2 NH3(g)
";

#[test]
fn report_has_the_documented_shape() {
    let (code, v) = report(AMMONIA, &[]);
    assert_eq!(code, Some(0));
    let rows = v["reactions"].as_array().expect("reactions[]");
    assert_eq!(rows.len(), 1);
    let row = &rows[0];
    for key in [
        "label",
        "line",
        "equation",
        "delta_n_gas",
        "temperature_K",
        "K",
        "Kc",
        "Kp",
        "dG_kJ_per_mol",
        "dH_kJ_per_mol",
    ] {
        assert!(row.get(key).is_some(), "missing `{key}` in {row}");
    }
    assert_eq!(row["label"], "synth");
    assert_eq!(row["line"], 5);
    assert_eq!(row["equation"], "N2(g) + 3 H2(g) <=> 2 NH3(g)");
    assert_eq!(row["delta_n_gas"].as_f64(), Some(-2.0));
}

#[test]
fn ammonia_k_and_kc_at_298_from_nbs_gibbs_energy() {
    let (_, v) = report(AMMONIA, &[]);
    let row = &v["reactions"][0];
    let t = 298.15;
    close(&row["temperature_K"], t, 1e-12);
    // ΔrG° = 2 ΔfG°(NH3) = -32.90 kJ/mol; K = exp(-ΔrG°/RT).
    let k = (32.90e3 / (R * t)).exp();
    close(&row["K"], k, 1e-9);
    close(&row["dG_kJ_per_mol"], -32.90, 1e-9);
    close(&row["dH_kJ_per_mol"], -92.22, 1e-9);
    // Δn = -2, so Kp = K bar^-2 and Kc = K (c° R T / p°)^2 in (mol/L)^-2.
    close(&row["Kp"], k, 1e-9);
    let kc = k * (C_STD * R * t / P_STD).powi(2);
    close(&row["Kc"], kc, 1e-9);
    assert!((k - 5.8e5).abs() / 5.8e5 < 0.01, "K = {k}");
}

#[test]
fn a_given_temperature_carries_k_by_van_t_hoff() {
    let (code, v) = report(AMMONIA, &["--temperature", "500 K"]);
    assert_eq!(code, Some(0));
    let row = &v["reactions"][0];
    close(&row["temperature_K"], 500.0, 1e-12);
    // Constant ΔrH° = -92.22 kJ/mol (van 't Hoff):
    // ln K(T) = ln K(298.15) - ΔH/R (1/T - 1/298.15).
    let ln_k298 = 32.90e3 / (R * 298.15);
    let ln_k500 = ln_k298 - (-92.22e3 / R) * (1.0 / 500.0 - 1.0 / 298.15);
    close(&row["K"], ln_k500.exp(), 1e-6);
    // ΔrG°(T) = -R T ln K(T).
    close(&row["dG_kJ_per_mol"], -R * 500.0 * ln_k500 / 1e3, 1e-6);
}

#[test]
fn a_kp_in_bar_gives_k_and_kc() {
    // N2O4 ⇌ 2 NO2 with Kp = 0.15 bar at 298.15 K (from memory); Δn = 1.
    let text = "reaction dimer: N2O4(g) <=> 2 NO2(g)\n  Kp = 0.15 bar at 298.15 K\n";
    let (_, v) = report(text, &[]);
    let row = &v["reactions"][0];
    close(&row["K"], 0.15, 1e-12);
    close(&row["Kp"], 0.15, 1e-12);
    // Kc = Kp / (c° R T / p°) mol/L.
    close(&row["Kc"], 0.15 * P_STD / (C_STD * R * 298.15), 1e-9);
    close(
        &row["dG_kJ_per_mol"],
        -R * 298.15 * 0.15f64.ln() / 1e3,
        1e-9,
    );
    assert_eq!(row["dH_kJ_per_mol"], Value::Null);
}

#[test]
fn a_forward_only_reaction_has_no_k() {
    let (_, v) = report("reaction: 2 N2O5(g) -> 4 NO2(g) + O2(g)\n", &[]);
    let row = &v["reactions"][0];
    assert_eq!(row["K"], Value::Null);
    assert_eq!(row["Kc"], Value::Null);
    assert_eq!(row["label"], Value::Null);
    assert_eq!(row["delta_n_gas"].as_f64(), Some(3.0));
}

#[test]
fn a_bad_temperature_is_a_usage_error() {
    let (code, _) = report(AMMONIA, &["--temperature", "warm"]);
    assert_eq!(code, Some(2));
    let (code, _) = report(AMMONIA, &["--temperature", "5 bar"]);
    assert_eq!(code, Some(2));
}
