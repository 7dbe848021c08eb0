//! The numeric equilibrium problem: species, reactions, vessel and activity
//! model, and the checks that reject input the solver cannot give a meaning.
//!
//! The lead's analysis turns a `mixture` of a reaction library into a
//! [`Problem`]; nothing here knows about the notation or its spans.

/// The phase of a species, which fixes how its activity is computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Phase {
    /// An ideal gas (standard state p° = 1 bar).
    Gas,
    /// A solute (standard state c° = 1 mol/L).
    Solute,
    /// A pure solid or liquid: activity 1 while any of it is present.
    Condensed,
}

/// One species of the mixture.
#[derive(Debug, Clone, PartialEq)]
pub struct Species {
    /// The name as the caller wants it reported (`H+` is recognised by [`crate::equilibrium::Solution::ph`]).
    pub name: String,
    pub phase: Phase,
    /// Charge number z, used by the Davies model and by the pH lookup.
    pub charge: i32,
    /// Amount at the start, in mol (zero allowed).
    pub initial_mol: f64,
}

/// One reaction: signed stoichiometric coefficients (products positive,
/// reactants negative) and its thermodynamic equilibrium constant as ln K.
#[derive(Debug, Clone, PartialEq)]
pub struct Reaction {
    pub label: String,
    /// Pairs of (species index, signed coefficient). A species may appear more
    /// than once; its coefficients are added.
    pub stoich: Vec<(usize, f64)>,
    /// Natural logarithm of the dimensionless thermodynamic K.
    pub ln_k: f64,
}

/// What the vessel holds fixed besides the temperature.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Vessel {
    /// Fixed volume in litres: gas activity n R T / (V p°), solute activity γ n / (V c°).
    ConstantVolume { volume_l: f64 },
    /// Fixed total pressure in bar for a gas mixture given as amounts: gas
    /// activity x P / p° with x the mole fraction among the gases. Solutes are
    /// not allowed here (they need a solution volume).
    ConstantPressure { pressure_bar: f64 },
}

/// How solute activity coefficients are computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ActivityModel {
    /// γ = 1 for every solute.
    Ideal,
    /// The Davies equation for charged solutes (neutral solutes keep γ = 1).
    Davies,
}

/// A complete equilibrium problem.
#[derive(Debug, Clone, PartialEq)]
pub struct Problem {
    pub species: Vec<Species>,
    pub reactions: Vec<Reaction>,
    pub temperature_k: f64,
    pub vessel: Vessel,
    pub activity: ActivityModel,
}

/// Checks the problem and returns the reason it cannot be solved, if any.
pub(crate) fn validate(problem: &Problem) -> Option<String> {
    if problem.species.is_empty() {
        return Some("the problem has no species".to_string());
    }
    if problem.reactions.is_empty() {
        return Some("the problem has no reactions, so the mixture stays as given".to_string());
    }
    if !problem.temperature_k.is_finite() || problem.temperature_k <= 0.0 {
        return Some(format!(
            "the temperature must be a positive number of kelvin, not {}",
            problem.temperature_k
        ));
    }
    match problem.vessel {
        Vessel::ConstantVolume { volume_l } => {
            if !volume_l.is_finite() || volume_l <= 0.0 {
                return Some(format!(
                    "the volume must be a positive number of litres, not {volume_l}"
                ));
            }
        }
        Vessel::ConstantPressure { pressure_bar } => {
            if !pressure_bar.is_finite() || pressure_bar <= 0.0 {
                return Some(format!(
                    "the pressure must be a positive number of bar, not {pressure_bar}"
                ));
            }
            if let Some(s) = problem.species.iter().find(|s| s.phase == Phase::Solute) {
                return Some(format!(
                    "solute {} needs a solution volume: use a constant-volume vessel",
                    s.name
                ));
            }
        }
    }
    for s in &problem.species {
        if !s.initial_mol.is_finite() {
            return Some(format!(
                "the initial amount of {} is not a finite number",
                s.name
            ));
        }
        if s.initial_mol < 0.0 {
            return Some(format!(
                "the initial amount of {} is negative ({} mol)",
                s.name, s.initial_mol
            ));
        }
    }
    if problem.species.iter().all(|s| s.initial_mol == 0.0) {
        return Some("every initial amount is zero: there is nothing to react".to_string());
    }
    for r in &problem.reactions {
        if !r.ln_k.is_finite() {
            return Some(format!(
                "reaction {} has no finite ln K ({})",
                r.label, r.ln_k
            ));
        }
        for &(i, c) in &r.stoich {
            if i >= problem.species.len() {
                return Some(format!(
                    "reaction {} names species number {i}, but there are only {}",
                    r.label,
                    problem.species.len()
                ));
            }
            if !c.is_finite() {
                return Some(format!(
                    "reaction {} has a coefficient for {} that is not a finite number",
                    r.label, problem.species[i].name
                ));
            }
        }
    }
    None
}
