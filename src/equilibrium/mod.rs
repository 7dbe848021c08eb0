//! Chemical equilibrium of a mixture under several simultaneous reactions.
//!
//! The lead's analysis turns a `mixture` into a [`Problem`] (species with
//! phases and initial amounts, reactions with ln K, the vessel and the
//! activity model) and calls [`solve`], which returns a [`Solution`].
//!
//! Method (the stoichiometric formulation of Smith & Missen, "Chemical
//! Reaction Equilibrium Analysis: Theory and Algorithms", Wiley 1982):
//!
//! 1. The reactions are reduced to an independent subset by numerical rank
//!    (Gram–Schmidt, relative tolerance 1e-9); each dropped one is reported
//!    with the combination of kept ones it equals, and whether its K agrees.
//! 2. A linear programme decides which species can exist at all (a species
//!    absent at the start that no combination of reactions can make without
//!    consuming something absent stays at 0, and reactions that need it are
//!    left out with the reason).
//! 3. The equilibrium solves the mass-action laws of the independent
//!    reactions with the conservation of every quantity they leave unchanged,
//!    by Newton–Raphson in ln n (condensed amounts in n), with a bounded step
//!    and a line search that accepts on Armijo decrease or Deuflhard's
//!    natural monotonicity test; when Newton fails it follows the solution
//!    from every K = 1 up to the given K (continuation in ln K). A final
//!    pass rebuilds the conservation laws around the result so that trace
//!    species (and K from 1e-300 to 1e300) keep full relative precision.
//! 4. Pure condensed species form an active set: present ones have activity 1
//!    and an amount that may not go negative; one that is used up is removed,
//!    reported as 0 and listed in `vanished`, and its reactions satisfy Q ≤ K
//!    in the direction that would consume it; an absent one that would form
//!    (Q < K for its formation) is added back. Combinations of reactions
//!    among condensed species alone (too many solids for the phase rule) are
//!    resolved by using up the limiting one.
//!
//! The Davies activity model is opt-in for aqueous ions ([`davies_gamma`]).
//! Known limit: at constant pressure, a gas phase that would condense
//! completely (or a single gas whose activity is then fixed at P/p°) is
//! reported as not converged rather than solved.

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
