//! `stoik balance` through the real binary: the smallest integer
//! coefficients, the JSON shape, and clear failures for equations without a
//! unique balance.

use serde_json::Value;
use std::process::{Command, Output};

fn balance(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_stoik"))
        .arg("balance")
        .args(args)
        .output()
        .expect("the binary runs")
}

fn stdout(o: &Output) -> String {
    String::from_utf8(o.stdout.clone()).expect("UTF-8")
}

const FERRO: &str = "K4[Fe(CN)6] + KMnO4 + H2SO4 -> KHSO4 + Fe2(SO4)3 + MnSO4 + HNO3 + CO2 + H2O";

#[test]
fn potassium_ferrocyanide_and_permanganate() {
    // Coefficients checked with sympy: the nullspace of the element matrix
    // (K, Fe, C, N, Mn, O, H, S by nine species, products negated) is one
    // vector, which scaled to the smallest integers is
    // [10, 122, 299, 162, 5, 122, 60, 60, 188] (sympy nullspace).
    let o = balance(&[FERRO]);
    assert_eq!(o.status.code(), Some(0));
    assert_eq!(
        stdout(&o).trim(),
        "10 K4[Fe(CN)6] + 122 KMnO4 + 299 H2SO4 -> 162 KHSO4 + 5 Fe2(SO4)3 + 122 MnSO4 + 60 HNO3 + 60 CO2 + 188 H2O"
    );
}

#[test]
fn json_gives_balanced_coefficients_and_unique() {
    let o = balance(&["--format", "json", FERRO]);
    assert_eq!(o.status.code(), Some(0));
    let v: Value = serde_json::from_slice(&o.stdout).expect("JSON");
    assert_eq!(v["unique"], true);
    // The same sympy nullspace vector as above.
    assert_eq!(
        v["coefficients"],
        serde_json::json!([10, 122, 299, 162, 5, 122, 60, 60, 188])
    );
    assert!(
        v["balanced"]
            .as_str()
            .expect("a string")
            .starts_with("10 K4[Fe(CN)6] + 122 KMnO4")
    );
    // The example of DESIGN.md: 4 Fe + 3 O2 -> 2 Fe2O3 (Fe: 4 = 2·2, O: 6 = 2·3).
    let iron = balance(&["--format", "json", "Fe + O2 -> Fe2O3"]);
    let v: Value = serde_json::from_slice(&iron.stdout).expect("JSON");
    assert_eq!(
        v,
        serde_json::json!({"balanced": "4 Fe + 3 O2 -> 2 Fe2O3", "coefficients": [4, 3, 2], "unique": true})
    );
}

#[test]
fn ions_and_electrons_balance_charge_too() {
    // MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O: O 4 = 4, H 8 = 8, charge
    // -1 + 8 - 5 = +2 (common practice, any textbook half reaction).
    let o = balance(&["MnO4^- + H^+ + e- -> Mn^2+ + H2O"]);
    assert_eq!(o.status.code(), Some(0));
    assert_eq!(stdout(&o).trim(), "MnO4^- + 8 H^+ + 5 e- -> Mn^2+ + 4 H2O");
}

#[test]
fn a_non_unique_case_says_so_and_exits_1() {
    // H2 + O2 -> H2O + H2O2 has a two-dimensional nullspace (sympy nullspace):
    // water and peroxide can form in any ratio.
    let o = balance(&["H2 + O2 -> H2O + H2O2"]);
    assert_eq!(o.status.code(), Some(1));
    let text = stdout(&o);
    assert!(text.contains("no unique balance"), "{text}");
    assert!(text.contains("2 independent balances"), "{text}");
    let j = balance(&["--format", "json", "H2 + O2 -> H2O + H2O2"]);
    assert_eq!(j.status.code(), Some(1));
    let v: Value = serde_json::from_slice(&j.stdout).expect("JSON");
    assert_eq!(v["unique"], false);
    assert_eq!(v["balanced"], Value::Null);
}

#[test]
fn an_impossible_case_names_the_element_and_exits_1() {
    let o = balance(&["H2 + O2 -> CO2"]);
    assert_eq!(o.status.code(), Some(1));
    let text = stdout(&o);
    assert!(text.contains("no balance exists"), "{text}");
    assert!(text.contains("H occurs only on the left"), "{text}");
}

#[test]
fn a_bad_formula_is_a_usage_error_with_a_suggestion() {
    let o = balance(&["H2 + CL2 -> HCl"]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("`CL2`") && err.contains("Cl2"), "{err}");
}
