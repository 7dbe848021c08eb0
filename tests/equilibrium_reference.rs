//! Compares stoik's equilibrium solver with reference compositions computed
//! by scipy (`tests/reference/gen_equilibrium.py`, which also verifies each
//! reference's residuals) for more than 100 random systems: gases at constant
//! volume and constant pressure, aqueous acid/base and complexation with
//! charged species (ideal and Davies), and solids that may be used up.

#![allow(clippy::unwrap_used)] // Tests may unwrap: a failure is the point.

use serde_json::Value;
use stoik::equilibrium::{ActivityModel, Phase, Problem, Reaction, Species, Vessel, solve};

/// Relative tolerance on every species amount.
const RELATIVE: f64 = 1e-6;
/// Absolute floor, as a fraction of the system's total initial amount: a
/// species whose amount is 1e-13 of the total or less (a solid just used up,
/// water's tiny change) is compared to that floor instead. Trace fluid
/// species far below it are still compared in ln n (see below).
const FLOOR: f64 = 1e-13;

fn problem_of(system: &Value) -> Problem {
    let species = system["species"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| Species {
            name: s["name"].as_str().unwrap().to_string(),
            phase: match s["phase"].as_str().unwrap() {
                "gas" => Phase::Gas,
                "solute" => Phase::Solute,
                _ => Phase::Condensed,
            },
            charge: s["charge"].as_i64().unwrap() as i32,
            initial_mol: s["initial_mol"].as_f64().unwrap(),
        })
        .collect();
    let reactions = system["reactions"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| Reaction {
            label: r["label"].as_str().unwrap().to_string(),
            stoich: r["stoich"]
                .as_array()
                .unwrap()
                .iter()
                .map(|p| (p[0].as_u64().unwrap() as usize, p[1].as_f64().unwrap()))
                .collect(),
            ln_k: r["ln_k"].as_f64().unwrap(),
        })
        .collect();
    let vessel = if let Some(v) = system["vessel"].get("constant_volume_l") {
        Vessel::ConstantVolume {
            volume_l: v.as_f64().unwrap(),
        }
    } else {
        Vessel::ConstantPressure {
            pressure_bar: system["vessel"]["constant_pressure_bar"].as_f64().unwrap(),
        }
    };
    Problem {
        species,
        reactions,
        temperature_k: system["temperature_k"].as_f64().unwrap(),
        vessel,
        activity: if system["activity"] == "davies" {
            ActivityModel::Davies
        } else {
            ActivityModel::Ideal
        },
    }
}

#[test]
fn matches_scipy_reference() {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/equilibrium_scipy.json"
    ))
    .unwrap();
    let data: Value = serde_json::from_str(&text).unwrap();
    let systems = data["systems"].as_array().unwrap();
    assert!(systems.len() >= 100);
    let mut failures = Vec::new();
    let mut vanished_cases = 0;
    let mut dependent_cases = 0;
    for system in systems {
        let name = system["name"].as_str().unwrap();
        let problem = problem_of(system);
        let solution = solve(&problem);
        if !solution.converged {
            failures.push(format!("{name}: not converged: {:?}", solution.why));
            continue;
        }
        let total: f64 = problem.species.iter().map(|s| s.initial_mol).sum();
        let expected = system["equilibrium_mol"].as_array().unwrap();
        let expected_ln = system["ln_equilibrium_mol"].as_array().unwrap();
        for (i, e) in expected.iter().enumerate() {
            let e = e.as_f64().unwrap();
            let got = solution.amounts_mol[i];
            let ok = (got - e).abs() <= RELATIVE * e.abs() + FLOOR * total;
            // Trace fluid species: their logs must agree too (relative 1e-6
            // in the amount is 1e-6 in ln n).
            let trace_ok = match expected_ln[i].as_f64() {
                Some(l) if problem.species[i].phase != Phase::Condensed => {
                    (solution.ln_amounts[i] - l).abs() <= RELATIVE
                }
                _ => true,
            };
            if !ok || !trace_ok {
                failures.push(format!(
                    "{name}: {} expected {e:e} mol, got {got:e}",
                    problem.species[i].name
                ));
            }
        }
        let vanished: Vec<usize> = system["vanished"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_u64().unwrap() as usize)
            .collect();
        if !vanished.is_empty() {
            vanished_cases += 1;
        }
        if solution.vanished != vanished {
            failures.push(format!(
                "{name}: vanished {:?}, expected {vanished:?}",
                solution.vanished
            ));
        }
        if system["has_dependent_reaction"] == true {
            dependent_cases += 1;
            if solution.left_out.len() != 1 {
                failures.push(format!(
                    "{name}: expected one dependent reaction left out, got {:?}",
                    solution.left_out
                ));
            }
        }
    }
    assert!(
        vanished_cases >= 5,
        "too few used-up solids: {vanished_cases}"
    );
    assert!(
        dependent_cases >= 5,
        "too few dependent sets: {dependent_cases}"
    );
    assert!(
        failures.is_empty(),
        "{} failures:\n{}",
        failures.len(),
        failures.join("\n")
    );
}
