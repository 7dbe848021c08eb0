//! Worked cases with named sources, extreme cases, and a property test that
//! the solver never panics.

use super::*;

fn species(name: &str, phase: Phase, charge: i32, initial_mol: f64) -> Species {
    Species {
        name: name.to_string(),
        phase,
        charge,
        initial_mol,
    }
}

fn reaction(label: &str, stoich: &[(usize, f64)], k: f64) -> Reaction {
    Reaction {
        label: label.to_string(),
        stoich: stoich.to_vec(),
        ln_k: k.ln(),
    }
}

fn aqueous(species: Vec<Species>, reactions: Vec<Reaction>, activity: ActivityModel) -> Problem {
    Problem {
        species,
        reactions,
        temperature_k: 298.15,
        vessel: Vessel::ConstantVolume { volume_l: 1.0 },
        activity,
    }
}

/// Water (55.5 mol in 1 L), H+, OH-, and an acid HA with its base A-.
fn acid_problem(acid: f64, base: f64, ka: f64, activity: ActivityModel) -> Problem {
    aqueous(
        vec![
            species("H2O", Phase::Condensed, 0, 55.5),
            species("H+", Phase::Solute, 1, 0.0),
            species("OH-", Phase::Solute, -1, 0.0),
            species("CH3COOH", Phase::Solute, 0, acid),
            species("CH3COO-", Phase::Solute, -1, base),
            species("Na+", Phase::Solute, 1, base),
        ],
        vec![
            reaction("acid", &[(3, -1.0), (1, 1.0), (4, 1.0)], ka),
            reaction("water", &[(0, -1.0), (1, 1.0), (2, 1.0)], 1.0e-14),
        ],
        activity,
    )
}

#[test]
fn acetic_acid_ph() {
    // CRC Handbook of Chemistry and Physics, "Dissociation constants of
    // organic acids and bases": acetic acid Ka = 1.75e-5 at 25 °C; the
    // textbook answer for 0.1 M is pH ≈ 2.88.
    let p = acid_problem(0.1, 0.0, 1.75e-5, ActivityModel::Ideal);
    let s = solve(&p);
    assert!(s.converged, "{:?}", s.why);
    let ph = s.ph(&p).unwrap();
    assert!((ph - 2.88).abs() < 0.005, "pH {ph}");
    // Exact check: the quadratic x² / (0.1 - x) = Ka (water negligible).
    let ka: f64 = 1.75e-5;
    let x = (-ka + (ka * ka + 4.0 * ka * 0.1).sqrt()) / 2.0;
    assert!((s.amounts_mol[4] - x).abs() / x < 1e-6);
}
