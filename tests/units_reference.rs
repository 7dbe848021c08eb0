//! Checks stoik's unit parser against pint, an independent unit library.
//!
//! The reference values are in `tests/reference/data/units_pint.json`,
//! written by `tests/reference/gen_units.py` with pint (PyPI); CI reruns that
//! script with `--check` so the data cannot drift from pint.

use proptest::prelude::*;
use serde_json::Value;
use stoik::thermo::{ln_k_from_kc, ln_k_from_kp, ln_kc_molar_from_ln_k, ln_kp_bar_from_ln_k};
use stoik::units::{Dimension, parse_number, parse_unit};

const PINT: &str = include_str!("reference/data/units_pint.json");

fn data() -> Value {
    serde_json::from_str(PINT).expect("units_pint.json is valid JSON")
}

fn rel_close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol * a.abs().max(b.abs())
}

#[test]
fn every_unit_matches_pint_factor_and_dimension() {
    let data = data();
    let rows = data["units"].as_array().expect("units array");
    assert!(rows.len() >= 60, "the reference list shrank");
    for row in rows {
        let text = row["unit"].as_str().expect("unit text");
        let unit = parse_unit(text).unwrap_or_else(|e| panic!("{text}: {e}"));
        // pint (PyPI), via gen_units.py: SI factor of the expression.
        let factor = row["factor"].as_f64().expect("factor");
        assert!(
            rel_close(unit.factor, factor, 1e-9),
            "{text}: stoik {} vs pint {factor}",
            unit.factor
        );
        let offset = row["offset"].as_f64().expect("offset");
        assert!((unit.offset - offset).abs() <= 1e-9, "{text}: offset");
        let d = &row["dim"];
        let exp = |k: &str| d[k].as_i64().expect("exponent") as i32;
        let dim = Dimension::new(
            exp("mass"),
            exp("length"),
            exp("time"),
            exp("amount"),
            exp("temperature"),
        );
        assert_eq!(unit.dim, dim, "{text}: dimension");
    }
}

#[test]
fn kc_to_k_factor_matches_pint() {
    // pint (PyPI), via gen_units.py: (c° R T / p°)^Δn with pint's exact R.
    let data = data();
    for row in data["kc_to_k"].as_array().expect("kc_to_k array") {
        let t = row["t"].as_f64().expect("t");
        let dn = row["dn_gas"].as_f64().expect("dn");
        let factor = row["kc_molar_to_k"].as_f64().expect("factor");
        // Kc = 1 (mol/L)^Δn, in SI (mol/m^3)^Δn.
        let ln_kc_si = dn * 1000f64.ln();
        let ln_k = ln_k_from_kc(ln_kc_si, dn, 0.0, t);
        assert!(
            rel_close(ln_k.exp(), factor, 1e-9),
            "T = {t}, Δn = {dn}: stoik {} vs pint {factor}",
            ln_k.exp()
        );
        assert!(ln_kc_molar_from_ln_k(ln_k, dn, 0.0, t).abs() < 1e-9);
    }
}

#[test]
fn n2o4_kc_from_kp_hand_value() {
    // N2O4 ⇌ 2 NO2 at 298.15 K: K = Kp = 0.148 bar gives
    // Kc = Kp/(RT) = 0.148/24.7896 = 5.970e-3 mol/L, with RT in L·bar/mol
    // from R = 0.083 144 626 L·bar/(K·mol) (CODATA 2018 R in those units).
    let ln_k = ln_k_from_kp(0.148f64.ln() + 1e5f64.ln(), 1.0, 0.0);
    assert!((ln_kp_bar_from_ln_k(ln_k, 1.0, 0.0) - 0.148f64.ln()).abs() < 1e-12);
    let kc = ln_kc_molar_from_ln_k(ln_k, 1.0, 0.0, 298.15).exp();
    assert!((kc - 0.148 / (0.083_144_626 * 298.15)).abs() < 1e-9);
    assert!((kc - 5.970e-3).abs() < 1e-6);
}

#[test]
fn dimension_spelling_of_parsed_units() {
    // Common practice: the units chemists quote K and k in.
    for (text, spelled) in [
        ("cm3/(molecule*s)", "L/(mol*s)"),
        ("M^-1*s^-1", "L/(mol*s)"),
        ("(mol/L)^2", "(mol/L)^2"),
        ("M^-1", "L/mol"),
        ("kcal/mol", "J/mol"),
        ("cal/(mol*K)", "J/(mol*K)"),
        ("atm^2", "bar^2"),
        ("1/s", "1/s"),
    ] {
        assert_eq!(parse_unit(text).expect(text).dim.spell(), spelled, "{text}");
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    #[test]
    fn parse_unit_never_panics_and_spans_are_on_char_boundaries(text in "\\PC{0,40}") {
        if let Err(e) = parse_unit(&text) {
            prop_assert!(e.span.start <= e.span.end && e.span.end <= text.len());
            prop_assert!(text.is_char_boundary(e.span.start));
            prop_assert!(text.is_char_boundary(e.span.end));
            prop_assert!(!e.message.is_empty());
        }
    }

    #[test]
    fn parse_number_never_panics_and_accepts_only_finite_values(text in "\\PC{0,30}") {
        match parse_number(&text) {
            Ok(x) => prop_assert!(x.is_finite()),
            Err(e) => {
                prop_assert!(e.span.start <= e.span.end && e.span.end <= text.len());
                prop_assert!(text.is_char_boundary(e.span.start));
                prop_assert!(text.is_char_boundary(e.span.end));
            }
        }
    }

    #[test]
    fn numbers_round_trip(x in any::<f64>().prop_filter("finite", |x| x.is_finite())) {
        // Rust's shortest round-trip formatting of f64 is the reference.
        prop_assert_eq!(parse_number(&format!("{x:e}")), Ok(x));
    }

    #[test]
    fn unit_like_text_never_panics(text in "[a-zA-Z°µμ·*/^()0-9 +−-]{0,60}") {
        if let Err(e) = parse_unit(&text) {
            prop_assert!(e.span.end <= text.len());
            prop_assert!(text.is_char_boundary(e.span.start));
            prop_assert!(text.is_char_boundary(e.span.end));
        }
    }

    #[test]
    fn parsed_units_have_finite_positive_factors(
        parts in proptest::collection::vec(
            prop_oneof![Just("mol"), Just("L"), Just("cm3"), Just("kJ"), Just("s"), Just("K"), Just("bar"), Just("M")],
            1..5),
        powers in proptest::collection::vec(-3i32..4, 6),
        divide in proptest::collection::vec(any::<bool>(), 6),
    ) {
        let mut text = String::new();
        for (i, p) in parts.iter().enumerate() {
            if i > 0 {
                text.push(if divide[i] { '/' } else { '*' });
            }
            text.push_str(p);
            if powers[i] != 0 && powers[i] != 1 {
                text.push_str(&format!("^{}", powers[i]));
            }
        }
        let unit = parse_unit(&text);
        prop_assert!(unit.is_ok(), "{}: {:?}", text, unit);
        let unit = unit.expect("checked above");
        prop_assert!(unit.factor.is_finite() && unit.factor > 0.0);
    }
}
