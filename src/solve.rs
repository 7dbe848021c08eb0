//! Mixtures to equilibrium problems and back.
//!
//! A `mixture` lists species with concentrations, partial pressures or
//! amounts. This module picks the reactions that take part (every
//! reversible, balanced reaction whose species are all in the mixture and
//! whose K is known or can be carried to the mixture's temperature), builds
//! the numeric [`crate::equilibrium::Problem`], solves it and reports the
//! result in the units the user wrote.

use crate::chem::formula::SpeciesKind;
use crate::diagnostic::Diagnostic;
use crate::equilibrium::{self, ActivityModel, Phase, Problem, Vessel};
use crate::model::{AmountKind, Library, Mixture};
use crate::reaction_k::{ReactionK, Standard, Unknown, standard_of};
use crate::units::constants::GAS_CONSTANT;
use crate::workspace::Workspace;
use serde::Serialize;

/// One species of a solved mixture.
#[derive(Clone, Debug, Serialize)]
pub struct SpeciesResult {
    pub name: String,
    pub initial: f64,
    pub equilibrium: f64,
    pub unit: &'static str,
    /// Activity coefficient (1 unless the Davies model is on).
    pub gamma: f64,
}

/// One reaction used in a solved mixture.
#[derive(Clone, Debug, Serialize)]
pub struct ReactionResult {
    pub label: String,
    /// Extent of reaction, mol.
    pub extent: f64,
    #[serde(rename = "K")]
    pub k: Option<f64>,
    #[serde(rename = "log10_K")]
    pub log10_k: f64,
    /// log10 of the reaction quotient at the start, when defined.
    #[serde(rename = "log10_Q_initial")]
    pub log10_q_initial: Option<f64>,
    /// Which way the reaction moved from the start: `forward`, `reverse` or `none`.
    pub direction: &'static str,
}

#[derive(Clone, Debug, Serialize)]
pub struct LeftOut {
    pub reaction: String,
    pub why: String,
}

/// The equilibrium of one mixture.
#[derive(Clone, Debug, Serialize)]
pub struct MixtureResult {
    pub name: String,
    #[serde(rename = "temperature_K")]
    pub temperature_k: f64,
    pub converged: bool,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub why: Option<String>,
    pub species: Vec<SpeciesResult>,
    pub reactions: Vec<ReactionResult>,
    pub left_out: Vec<LeftOut>,
    /// Condensed species used up at equilibrium.
    pub vanished: Vec<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub ph: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub ionic_strength: Option<f64>,
    pub warnings: Vec<String>,
}

fn reaction_name(ws: &Workspace, r: &crate::model::Reaction) -> String {
    match &r.label {
        Some(l) => l.clone(),
        None => format!(
            "line {}",
            ws.file(r.loc.file).index.line_of(r.loc.span.start()) + 1
        ),
    }
}

/// Problems that make a mixture unsolvable as written, as `mixture`
/// diagnostics (reported by `check` and by the language server).
pub fn mixture_diagnostics(lib: &Library, m: &Mixture) -> Vec<Diagnostic> {
    let mut out = Vec::new();
    let d = |msg: String| Diagnostic::new("mixture", m.loc.file, m.loc.span, msg);
    if m.temperature_k.is_none() {
        out.push(
            d(format!("mixture `{}` has no temperature", m.name))
                .with_help("add `temperature = 298.15 K` on an indented line"),
        );
    }
    if m.entries.is_empty() {
        out.push(d(format!("mixture `{}` lists no species", m.name)));
    }
    let has_amounts = m.entries.iter().any(|e| e.kind == AmountKind::Amount);
    let has_solutes = m
        .entries
        .iter()
        .any(|e| standard_of(lib, e.species) == Standard::Solute);
    if has_amounts && m.volume.is_none() && (m.pressure.is_none() || has_solutes) {
        out.push(
            d(format!(
                "mixture `{}` gives amounts in mol but no volume",
                m.name
            ))
            .with_help(
                "add `volume = 1 L`, or `pressure = 1 bar` for a gas mixture at constant pressure",
            ),
        );
    }
    for (i, e) in m.entries.iter().enumerate() {
        if let Some(first) = m.entries[..i].iter().find(|f| f.species == e.species) {
            out.push(
                Diagnostic::new(
                    "mixture",
                    e.loc.file,
                    e.loc.span,
                    format!("`{}` is given twice in mixture `{}`", e.name, m.name),
                )
                .with_related(first.loc.file, first.loc.span, "first given here")
                .with_help("keep one amount for each species"),
            );
        }
        let sp = lib.species(e.species);
        let std = standard_of(lib, e.species);
        if e.kind == AmountKind::Pressure && std != Standard::Gas {
            out.push(Diagnostic::new(
                "mixture",
                e.loc.file,
                e.loc.span,
                format!("`{}` is not a gas, so it has no partial pressure", e.name),
            ).with_help("give a solute as a concentration (mol/L) and a solid or liquid as an amount (mol)"));
        }
        if matches!(
            sp.formula.kind,
            SpeciesKind::Electron | SpeciesKind::Photon | SpeciesKind::ThirdBody
        ) {
            out.push(Diagnostic::new(
                "mixture",
                e.loc.file,
                e.loc.span,
                format!("`{}` cannot be part of a mixture", e.name),
            ));
        }
    }
    out
}

/// Solve one mixture of a library.
pub fn solve_mixture(ws: &Workspace, lib: &Library, m: &Mixture) -> Option<MixtureResult> {
    let t = m.temperature_k?;
    if !mixture_diagnostics(lib, m).is_empty() {
        return None;
    }
    // Vessel: constant pressure for a gas mixture given in amounts with a
    // pressure; otherwise constant volume (1 L when none is given).
    let all_gas_amounts = m
        .entries
        .iter()
        .all(|e| e.kind == AmountKind::Amount && standard_of(lib, e.species) != Standard::Solute);
    let (vessel, volume_m3) = match (m.pressure, m.volume) {
        (Some(p), None) if all_gas_amounts => (
            Vessel::ConstantPressure {
                pressure_bar: p / 1e5,
            },
            None,
        ),
        (_, Some(v)) => (
            Vessel::ConstantVolume {
                volume_l: v * 1000.0,
            },
            Some(v),
        ),
        _ => (Vessel::ConstantVolume { volume_l: 1.0 }, Some(1e-3)),
    };
    let mut species = Vec::new();
    let mut index_of = std::collections::HashMap::new();
    let mut units = Vec::new();
    for e in &m.entries {
        let sp = lib.species(e.species);
        let phase = match standard_of(lib, e.species) {
            Standard::Gas => Phase::Gas,
            Standard::Solute => Phase::Solute,
            Standard::Unity => Phase::Condensed,
        };
        let (n0, unit) = match (e.kind, volume_m3) {
            (AmountKind::Concentration, Some(v)) => (e.value * v, "mol/L"),
            (AmountKind::Concentration, None) => (e.value * 1e-3, "mol/L"),
            (AmountKind::Pressure, Some(v)) => (e.value * v / (GAS_CONSTANT * t), "bar"),
            (AmountKind::Pressure, None) => (0.0, "bar"),
            (AmountKind::Amount, _) => (e.value, "mol"),
        };
        // The first amount of a species counts (a second one is diagnosed).
        if index_of.contains_key(&e.species) {
            continue;
        }
        index_of.insert(e.species, species.len());
        units.push((e.kind, unit));
        species.push(equilibrium::Species {
            name: e.name.clone(),
            phase,
            charge: sp.formula.charge as i32,
            initial_mol: n0,
        });
    }
    let mut reactions = Vec::new();
    let mut used_labels = Vec::new();
    let mut left_out = Vec::new();
    for r in &lib.reactions {
        if !r.reversible() {
            continue;
        }
        let name = reaction_name(ws, r);
        let net = r.net();
        let relevant = net.iter().any(|(s, _)| index_of.contains_key(s));
        if !relevant {
            continue;
        }
        if !r.complete || !r.balanced {
            left_out.push(LeftOut {
                reaction: name,
                why: "the equation does not read or does not balance".into(),
            });
            continue;
        }
        let mut stoich = Vec::new();
        let mut missing = None;
        for (s, c) in net {
            let sp = lib.species(*s);
            if matches!(
                sp.formula.kind,
                SpeciesKind::Electron | SpeciesKind::Photon | SpeciesKind::ThirdBody
            ) {
                missing = Some(format!(
                    "`{}` takes no part in an equilibrium mixture",
                    sp.name
                ));
                break;
            }
            match index_of.get(s) {
                Some(&i) => stoich.push((i, *c.numer() as f64 / *c.denom() as f64)),
                None => {
                    missing = Some(format!("`{}` is not in the mixture", sp.name));
                    break;
                }
            }
        }
        if let Some(why) = missing {
            left_out.push(LeftOut {
                reaction: name,
                why,
            });
            continue;
        }
        let k = ReactionK::of(lib, r);
        match k.ln_k_at(t) {
            Ok(e) => {
                reactions.push(equilibrium::Reaction {
                    label: name.clone(),
                    stoich,
                    ln_k: e.ln_k,
                });
                used_labels.push(name);
            }
            Err(Unknown::NoData) => left_out.push(LeftOut {
                reaction: name,
                why: "it has no K".into(),
            }),
            Err(Unknown::NoTemperatureDependence { known_t }) => left_out.push(LeftOut {
                reaction: name,
                why: format!(
                    "K is known only at {} K and nothing carries it to {} K",
                    crate::checks::temperature(known_t),
                    crate::checks::temperature(t)
                ),
            }),
        }
    }
    let problem = Problem {
        species,
        reactions,
        temperature_k: t,
        vessel,
        activity: if m.davies {
            ActivityModel::Davies
        } else {
            ActivityModel::Ideal
        },
    };
    let solution = if problem.reactions.is_empty() {
        None
    } else {
        Some(equilibrium::solve(&problem))
    };
    let mut warnings = Vec::new();
    let involved: std::collections::HashSet<usize> = problem
        .reactions
        .iter()
        .flat_map(|r| r.stoich.iter().map(|(i, _)| *i))
        .collect();
    for (i, s) in problem.species.iter().enumerate() {
        if !involved.contains(&i) {
            warnings.push(format!(
                "`{}` takes part in no reaction used here; it stays as given",
                s.name
            ));
        }
    }
    let value_of = |i: usize, n: f64| -> f64 {
        let (kind, _) = units[i];
        match kind {
            AmountKind::Concentration => match problem.vessel {
                Vessel::ConstantVolume { volume_l } => n / volume_l,
                Vessel::ConstantPressure { .. } => n,
            },
            AmountKind::Pressure => match problem.vessel {
                Vessel::ConstantVolume { volume_l } => {
                    n * equilibrium::GAS_CONSTANT_L_BAR * t / volume_l
                }
                Vessel::ConstantPressure { .. } => n,
            },
            AmountKind::Amount => n,
        }
    };
    let initial: Vec<f64> = problem.species.iter().map(|s| s.initial_mol).collect();
    let (converged, why, amounts, gammas) = match &solution {
        Some(s) => (
            s.converged,
            s.why.clone(),
            s.amounts_mol.clone(),
            s.activity_coefficients.clone(),
        ),
        None => (
            false,
            Some("no reaction of the library applies to this mixture".to_string()),
            initial.clone(),
            vec![1.0; initial.len()],
        ),
    };
    if let Some(s) = &solution
        && let Some(w) = &s.warning
    {
        warnings.push(w.clone());
    }
    let species_out = problem
        .species
        .iter()
        .enumerate()
        .map(|(i, s)| SpeciesResult {
            name: s.name.clone(),
            initial: value_of(i, s.initial_mol),
            equilibrium: value_of(i, amounts.get(i).copied().unwrap_or(f64::NAN)),
            unit: units[i].1,
            gamma: gammas.get(i).copied().unwrap_or(1.0),
        })
        .collect();
    let mut reactions_out = Vec::new();
    if let Some(s) = &solution {
        for (i, r) in problem.reactions.iter().enumerate() {
            if let Some((_, why)) = s.left_out.iter().find(|(j, _)| *j == i) {
                left_out.push(LeftOut {
                    reaction: r.label.clone(),
                    why: why.clone(),
                });
                continue;
            }
            let extent = s.extents.get(i).copied().unwrap_or(0.0);
            let log10_k = r.ln_k / std::f64::consts::LN_10;
            let ln_q0 = initial_ln_q(&problem, r);
            // The extent says which way the reaction actually ran; coupled
            // reactions can move even when their own Q started at K.
            let total: f64 = problem
                .species
                .iter()
                .map(|s| s.initial_mol)
                .sum::<f64>()
                .max(f64::MIN_POSITIVE);
            let direction = if extent.abs() <= 1e-12 * total {
                "none"
            } else if extent > 0.0 {
                "forward"
            } else {
                "reverse"
            };
            reactions_out.push(ReactionResult {
                label: r.label.clone(),
                extent,
                k: Some(r.ln_k.exp()).filter(|k| k.is_finite() && *k > 0.0),
                log10_k,
                log10_q_initial: ln_q0.map(|q| q / std::f64::consts::LN_10),
                direction,
            });
        }
    }
    let ph = solution.as_ref().and_then(|s| {
        problem
            .species
            .iter()
            .position(|sp| {
                sp.phase == Phase::Solute && sp.charge == 1 && is_proton_name(lib, m, &sp.name)
            })
            .and_then(|i| s.ph_of(i))
    });
    Some(MixtureResult {
        name: m.name.clone(),
        temperature_k: t,
        converged,
        why,
        species: species_out,
        reactions: reactions_out,
        left_out,
        vanished: solution
            .as_ref()
            .map(|s| {
                s.vanished
                    .iter()
                    .map(|&i| problem.species[i].name.clone())
                    .collect()
            })
            .unwrap_or_default(),
        ph,
        ionic_strength: solution.as_ref().and_then(|s| s.ionic_strength),
        warnings,
    })
}

fn is_proton_name(lib: &Library, m: &Mixture, name: &str) -> bool {
    m.entries.iter().any(|e| {
        e.name == name && {
            let f = &lib.species(e.species).formula;
            f.charge == 1
                && f.composition.len() == 1
                && f.composition[0].0 == 1
                && *f.composition[0].1.numer() == 1
        }
    })
}

/// ln Q at the start, when every activity is positive.
fn initial_ln_q(p: &Problem, r: &equilibrium::Reaction) -> Option<f64> {
    let mut ln_q = 0.0;
    let gas_total: f64 = p
        .species
        .iter()
        .filter(|s| s.phase == Phase::Gas)
        .map(|s| s.initial_mol)
        .sum();
    for &(i, c) in &r.stoich {
        let s = &p.species[i];
        let ln_a = match (s.phase, p.vessel) {
            (Phase::Condensed, _) => {
                if s.initial_mol > 0.0 {
                    0.0
                } else {
                    return None;
                }
            }
            (_, _) if s.initial_mol <= 0.0 => return None,
            (Phase::Gas, Vessel::ConstantVolume { volume_l }) => {
                (s.initial_mol * equilibrium::GAS_CONSTANT_L_BAR * p.temperature_k / volume_l).ln()
            }
            (Phase::Gas, Vessel::ConstantPressure { pressure_bar }) => {
                (s.initial_mol / gas_total * pressure_bar).ln()
            }
            (Phase::Solute, Vessel::ConstantVolume { volume_l }) => (s.initial_mol / volume_l).ln(),
            (Phase::Solute, Vessel::ConstantPressure { .. }) => return None,
        };
        ln_q += c * ln_a;
    }
    Some(ln_q)
}
