//! Chemical equilibrium of a mixture under several simultaneous reactions.
//!
//! The lead's analysis turns a `mixture` into a [`Problem`] (species with
//! phases and initial amounts, reactions with ln K, the vessel and the
//! activity model) and calls [`solve`], which returns a [`Solution`].
//!
//! Method: the reactions are first reduced to an independent subset by
//! numerical rank; the others are reported with the combination they equal.
//! The equilibrium is then the solution of the mass-action laws of the
//! independent reactions together with the conservation of every quantity
//! those reactions leave unchanged (the stoichiometric formulation of Smith &
//! Missen, "Chemical Reaction Equilibrium Analysis: Theory and Algorithms",
//! Wiley 1982). It is solved by Newton–Raphson in the logarithms of the
//! amounts, with a bounded step and a backtracking line search, so that K
//! from 1e-300 to 1e300 and trace species keep full relative precision.
//! Pure condensed species are handled by an active set: a used-up solid is
//! removed, reported as 0, and the reactions it takes part in satisfy Q ≤ K
//! in the direction that would consume it. The Davies activity model is
//! opt-in for aqueous ions.

mod activity;
mod newton;
mod problem;
mod solution;
mod solver;
mod stoichiometry;

pub use activity::{DAVIES_LIMIT_MOL_PER_L, GAS_CONSTANT_L_BAR, davies_a, davies_gamma};
pub use problem::{ActivityModel, Phase, Problem, Reaction, Species, Vessel};
pub use solution::Solution;
pub use solver::solve;
#[cfg(test)]
mod tests;
