//! The result of an equilibrium solve and the quantities a caller derives
//! from it (pH, concentrations, partial pressures).

use super::activity::GAS_CONSTANT_L_BAR;
use super::problem::{Phase, Problem, Vessel};

/// The equilibrium composition, or as far as the solver got and why it
/// stopped. Every vector indexed by species has one entry per species of the
/// problem; every vector indexed by reaction has one entry per input reaction.
#[derive(Debug, Clone, PartialEq)]
pub struct Solution {
    /// True when every reaction that holds satisfies |ln Q - ln K| ≤ 1e-10 ·
    /// max(1, |ln K|), every conserved quantity is kept to 1e-12 of its gross
    /// amount, and every vanished condensed species is undersaturated.
    pub converged: bool,
    /// Why the solve did not converge (or could not start).
    pub why: Option<String>,
    /// A caution about the result that does not stop it (Davies beyond its range).
    pub warning: Option<String>,
    /// Equilibrium amounts, mol (the initial amounts when the solve could not start).
    pub amounts_mol: Vec<f64>,
    /// Natural logs of the amounts: exact for trace species whose amount
    /// underflows to 0 in `amounts_mol`; -inf for a species that is absent.
    pub ln_amounts: Vec<f64>,
    /// Natural logs of the activities; 0 for a present condensed species and
    /// -inf for an absent one.
    pub ln_activities: Vec<f64>,
    /// Extent of each input reaction, mol; 0 for a reaction left out.
    pub extents: Vec<f64>,
    /// ln Q of each input reaction at the result, with activity 1 for every
    /// condensed species (so for a reaction of a vanished solid it says how
    /// far from saturation the rest of the mixture is).
    pub ln_q: Vec<f64>,
    /// Input reactions that form the independent set the solve used.
    pub used: Vec<usize>,
    /// Input reactions left out, with the reason.
    pub left_out: Vec<(usize, String)>,
    /// Condensed species present at the start and used up at equilibrium.
    pub vanished: Vec<usize>,
    /// Ionic strength, mol/L, when the problem has solutes.
    pub ionic_strength: Option<f64>,
    /// Activity coefficient of each species (1 for everything but ions under Davies).
    pub activity_coefficients: Vec<f64>,
    /// Newton iterations over all active sets.
    pub iterations: usize,
}

impl Solution {
    /// A solution that could not start: the initial amounts, and why.
    pub(crate) fn unsolved(problem: &Problem, why: String) -> Solution {
        let n: Vec<f64> = problem.species.iter().map(|s| s.initial_mol).collect();
        Solution {
            converged: false,
            why: Some(why),
            warning: None,
            ln_amounts: n.iter().map(|x| x.ln()).collect(),
            ln_activities: vec![f64::NAN; n.len()],
            amounts_mol: n,
            extents: vec![0.0; problem.reactions.len()],
            ln_q: vec![f64::NAN; problem.reactions.len()],
            used: Vec::new(),
            left_out: Vec::new(),
            vanished: Vec::new(),
            ionic_strength: None,
            activity_coefficients: vec![1.0; problem.species.len()],
            iterations: 0,
        }
    }

    /// The index of the hydrogen ion: a solute named `H+`, `H^+`, `H+(aq)`
    /// or `H^+(aq)` with charge +1.
    pub fn hydrogen_ion(problem: &Problem) -> Option<usize> {
        problem.species.iter().position(|s| {
            s.phase == Phase::Solute
                && s.charge == 1
                && matches!(s.name.as_str(), "H+" | "H^+" | "H+(aq)" | "H^+(aq)")
        })
    }

    /// pH = -log10 a(H+), when the problem has a hydrogen ion (see
    /// [`Solution::hydrogen_ion`]).
    pub fn ph(&self, problem: &Problem) -> Option<f64> {
        Self::hydrogen_ion(problem).and_then(|i| self.ph_of(i))
    }

    /// pH taken from the species at `index`.
    pub fn ph_of(&self, index: usize) -> Option<f64> {
        let ln_a = *self.ln_activities.get(index)?;
        ln_a.is_finite().then(|| -ln_a / std::f64::consts::LN_10)
    }

    /// Concentration of a species in mol/L (constant-volume vessels only).
    pub fn concentration_mol_per_l(&self, problem: &Problem, index: usize) -> Option<f64> {
        match problem.vessel {
            Vessel::ConstantVolume { volume_l } => Some(self.amounts_mol.get(index)? / volume_l),
            Vessel::ConstantPressure { .. } => None,
        }
    }

    /// Partial pressure of a gas in bar: n R T / V at constant volume, x P at
    /// constant pressure.
    pub fn partial_pressure_bar(&self, problem: &Problem, index: usize) -> Option<f64> {
        let s = problem.species.get(index)?;
        if s.phase != Phase::Gas {
            return None;
        }
        let n = *self.amounts_mol.get(index)?;
        match problem.vessel {
            Vessel::ConstantVolume { volume_l } => {
                Some(n * GAS_CONSTANT_L_BAR * problem.temperature_k / volume_l)
            }
            Vessel::ConstantPressure { pressure_bar } => {
                let total: f64 = problem
                    .species
                    .iter()
                    .zip(&self.amounts_mol)
                    .filter(|(s, _)| s.phase == Phase::Gas)
                    .map(|(_, &x)| x)
                    .sum();
                (total > 0.0).then(|| n / total * pressure_bar)
            }
        }
    }
}
