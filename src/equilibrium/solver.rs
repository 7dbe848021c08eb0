//! The equilibrium solve: reduce the reactions to an independent set, find
//! which species can exist, then search the set of present condensed species
//! (an active set) and solve each candidate with Newton's method.
//!
//! A condensed species that is present has activity 1 and an unknown amount;
//! one that is absent has amount 0 and removes from the mass-action laws every
//! combination of reactions that involves it. The active set is right when
//! every present condensed amount is non-negative and no absent condensed
//! species could form, that is, Q ≥ K for its formation reaction written with
//! the species as a product (the complementarity conditions of Smith &
//! Missen, "Chemical Reaction Equilibrium Analysis", 1982, ch. 9 on
//! multiphase systems).

use std::collections::HashSet;

use nalgebra::{DMatrix, DVector};

use super::activity::{DAVIES_LIMIT_MOL_PER_L, activities};
use super::newton::{ACTION_TOLERANCE, Action, BALANCE_TOLERANCE, Balance, Failure, State, System};
use super::problem::{ActivityModel, Phase, Problem, Vessel, validate};
use super::solution::Solution;
use super::stoichiometry::{
    independent_reactions, independent_rows, least_squares, null_space, null_space_ordered,
    reachable,
};

/// Driving force (in ln units) below which an absent condensed species counts
/// as saturated rather than forming.
const SATURATION_TOLERANCE: f64 = 1e-9;

/// The most condensed species whose sets [`Solver::search_sets`] tries
/// one by one (2^12 sets), when the search that adds and drops one species
/// at a time cycles.
const MAX_SEARCHED_CONDENSED: usize = 12;

/// Solves the equilibrium of `problem`. Never panics: input it cannot give a
/// meaning gets a non-converged [`Solution`] whose `why` says what is wrong.
pub fn solve(problem: &Problem) -> Solution {
    if let Some(why) = validate(problem) {
        return Solution::unsolved(problem, why);
    }
    Solver::new(problem).run()
}

/// A basis of the quantities the kept reactions conserve, as rows over all
/// species. Species with small `ln_amounts` are eliminated first and
/// condensed species last, so that each conservation law is dominated by
/// abundant species and the trace ones follow from the mass-action laws.
fn conserved_quantities(
    problem: &Problem,
    kept_nu: &DMatrix<f64>,
    ln_amounts: &[f64],
) -> Vec<DVector<f64>> {
    let mut order: Vec<usize> = (0..problem.species.len()).collect();
    order.sort_by(|&a, &b| {
        let ca = problem.species[a].phase == Phase::Condensed;
        let cb = problem.species[b].phase == Phase::Condensed;
        ca.cmp(&cb)
            .then(ln_amounts[a].total_cmp(&ln_amounts[b]))
            .then(a.cmp(&b))
    });
    null_space_ordered(kept_nu, &order)
}

/// Formats a coefficient for a message: integers without a decimal point.
fn coefficient(c: f64) -> String {
    if (c - c.round()).abs() < 1e-9 {
        format!("{}", c.round())
    } else {
        format!("{c:.4}")
    }
}

struct Solver<'a> {
    problem: &'a Problem,
    /// The full stoichiometric matrix (input reactions × species).
    nu: DMatrix<f64>,
    /// Indices of the independent reactions.
    kept: Vec<usize>,
    left_out: Vec<(usize, String)>,
    /// Conserved quantities: rows over all species.
    conserved: Vec<DVector<f64>>,
    /// Species that take part in some kept reaction.
    reacting: Vec<bool>,
    /// Species that can be present at all.
    reach: Vec<bool>,
    initial: Vec<f64>,
}

impl<'a> Solver<'a> {
    fn new(problem: &'a Problem) -> Solver<'a> {
        let s = problem.species.len();
        let mut nu = DMatrix::zeros(problem.reactions.len(), s);
        for (r, rx) in problem.reactions.iter().enumerate() {
            for &(i, c) in &rx.stoich {
                nu[(r, i)] += c;
            }
        }
        let independent = independent_reactions(&nu);
        let label = |r: usize| problem.reactions[r].label.clone();
        let mut left_out = Vec::new();
        for &r in &independent.empty {
            left_out.push((
                r,
                "it changes nothing: every coefficient is zero".to_string(),
            ));
        }
        for (r, coefficients) in &independent.dropped {
            let terms: Vec<String> = coefficients
                .iter()
                .zip(&independent.kept)
                .filter(|(c, _)| c.abs() > 1e-9)
                .map(|(c, &k)| format!("{} × {}", coefficient(*c), label(k)))
                .collect();
            let combined: f64 = coefficients
                .iter()
                .zip(&independent.kept)
                .map(|(c, &k)| c * problem.reactions[k].ln_k)
                .sum();
            let own = problem.reactions[*r].ln_k;
            let mut why = String::from("a combination of ");
            for (i, t) in terms.iter().enumerate() {
                match (i, t.strip_prefix('-')) {
                    (0, _) => why.push_str(t),
                    (_, Some(rest)) => {
                        why.push_str(" − ");
                        why.push_str(rest);
                    }
                    (_, None) => {
                        why.push_str(" + ");
                        why.push_str(t);
                    }
                }
            }
            // Rounding in the data leaves small differences; the library's
            // cycle check judges those with the configured tolerance.
            if (own - combined).abs() > 1e-3 * own.abs().max(combined.abs()).max(1.0) {
                why.push_str(&format!(
                    "; its ln K ({own:.6}) disagrees with that combination ({combined:.6}), so it cannot hold with them"
                ));
            }
            left_out.push((*r, why));
        }
        let kept = independent.kept;
        let kept_nu = DMatrix::from_fn(kept.len(), s, |r, i| nu[(kept[r], i)]);
        let log_initial: Vec<f64> = problem.species.iter().map(|x| x.initial_mol.ln()).collect();
        let conserved = conserved_quantities(problem, &kept_nu, &log_initial);
        let reacting: Vec<bool> = (0..s)
            .map(|i| kept.iter().any(|&r| nu[(r, i)] != 0.0))
            .collect();
        let initial: Vec<f64> = problem.species.iter().map(|x| x.initial_mol).collect();
        let reach = reachable(&nu, &kept, &initial);
        Solver {
            problem,
            nu,
            kept,
            left_out,
            conserved,
            reacting,
            reach,
            initial,
        }
    }

    /// Improves the start for fluid species absent at the beginning: one
    /// pass over the kept reactions sets each such species that a reaction
    /// makes alone from species already valued to its mass-action value,
    /// held between 1e-30 and 1 times the typical amount `guess` × 1e3 (so a
    /// large K cannot start it above what the mixture holds).
    fn refine_start(&self, state: &mut State, guess: f64) {
        let problem = self.problem;
        let s = problem.species.len();
        let typical = (guess * 1e3).ln();
        let mut valued: Vec<bool> = (0..s)
            .map(|i| self.initial[i] > 0.0 || self.is_condensed(i))
            .collect();
        for &r in &self.kept {
            let fresh: Vec<usize> = (0..s)
                .filter(|&i| self.nu[(r, i)] != 0.0 && !valued[i])
                .collect();
            let [p] = fresh.as_slice() else { continue };
            let p = *p;
            if self.is_condensed(p) || !self.reach[p] {
                continue;
            }
            let act = activities(problem, &state.n, &state.ln_n);
            // ν_p ln a_p = ln K - Σ_{j≠p} ν_j ln a_j, and ln n_p = ln a_p - (ln a_p - ln n_p).
            let mut rest = problem.reactions[r].ln_k;
            for j in 0..s {
                let c = self.nu[(r, j)];
                if j != p && c != 0.0 && !self.is_condensed(j) {
                    rest -= c * act.ln_a[j];
                }
            }
            let ln_a = rest / self.nu[(r, p)];
            let ln_n = ln_a - (act.ln_a[p] - state.ln_n[p]);
            if ln_n.is_finite() {
                let y = ln_n.clamp(typical - 69.0, typical);
                state.ln_n[p] = y;
                state.n[p] = y.exp();
                valued[p] = true;
            }
        }
    }

    /// The total initial amount of the species that react, mol.
    fn amount_scale(&self) -> f64 {
        let total: f64 = (0..self.initial.len())
            .filter(|&i| self.reacting[i])
            .map(|i| self.initial[i])
            .sum();
        total.max(f64::MIN_POSITIVE)
    }

    fn is_condensed(&self, i: usize) -> bool {
        self.problem.species[i].phase == Phase::Condensed
    }

    fn run(mut self) -> Solution {
        let problem = self.problem;
        let s = problem.species.len();
        // Kept reactions that need a species nothing can make cannot run.
        let mut used = Vec::new();
        for &r in &self.kept {
            let missing: Vec<&str> = (0..s)
                .filter(|&i| self.nu[(r, i)] != 0.0 && !self.reach[i])
                .map(|i| problem.species[i].name.as_str())
                .collect();
            if missing.is_empty() {
                used.push(r);
            } else {
                self.left_out.push((
                    r,
                    format!(
                        "it cannot run in either direction: {} {} absent and no reaction forms {} from the mixture",
                        missing.join(", "),
                        if missing.len() == 1 { "is" } else { "are" },
                        if missing.len() == 1 { "it" } else { "them" }
                    ),
                ));
            }
        }
        self.left_out.sort_by_key(|(r, _)| *r);

        let mut state = State {
            n: self.initial.clone(),
            ln_n: self.initial.iter().map(|x| x.ln()).collect(),
        };
        let positive: Vec<f64> = self.initial.iter().copied().filter(|&x| x > 0.0).collect();
        let guess = 1e-3 * positive.iter().sum::<f64>() / positive.len().max(1) as f64;
        for i in 0..s {
            if self.reacting[i] && self.reach[i] && !self.is_condensed(i) && self.initial[i] == 0.0
            {
                state.set_amount(i, guess);
            }
            if !self.reach[i] {
                state.set_amount(i, 0.0);
            }
        }
        self.refine_start(&mut state, guess);
        // Every condensed species that can form starts present (at its
        // initial amount, possibly 0); the search removes the ones that come
        // out negative. Starting a product solid absent would force its
        // fluid co-products to zero, which the logarithmic unknowns cannot
        // represent.
        let present: Vec<bool> = (0..s).map(|i| self.reacting[i] && self.reach[i]).collect();
        let mut present = present;
        // The start every set of phases can fall back on (see below).
        let origin = state.clone();

        let mut converged_sets: HashSet<Vec<bool>> = HashSet::new();
        let mut retries = 0;
        let mut iterations = 0;
        let condensed_count = (0..s).filter(|&i| self.is_condensed(i)).count();
        let mut outcome: Result<Vec<Action>, String> =
            Err("the active-set search did not run".to_string());
        for _ in 0..(8 * condensed_count + 4) {
            for (i, &here) in present.iter().enumerate() {
                if self.is_condensed(i) && !here {
                    state.set_amount(i, 0.0);
                }
            }
            let actions = self.actions(&present);
            // A mass-action law among condensed species alone cannot hold
            // (too many condensed species for the phase rule): the reaction
            // runs until one of the species it consumes is gone.
            if let Some(a) = self.condensed_only(&actions) {
                if a.ln_k.abs() <= 1e-12 {
                    outcome = Err("a reaction among condensed species alone has K = 1, so their amounts are not fixed by equilibrium".to_string());
                    break;
                }
                let direction = a.ln_k.signum();
                let consumed = (0..s)
                    .filter(|&i| direction * a.coefficients[i] < 0.0)
                    .min_by(|&i, &j| {
                        let ri = state.n[i] / a.coefficients[i].abs();
                        let rj = state.n[j] / a.coefficients[j].abs();
                        ri.total_cmp(&rj)
                    });
                match consumed {
                    Some(i) => {
                        present[i] = false;
                        continue;
                    }
                    None => {
                        outcome = Err("a reaction among condensed species alone would make them without limit".to_string());
                        break;
                    }
                }
            }
            let mut system = self.system(&present, actions, &state);
            let before = state.clone();
            let mut result = system.solve_robust(&mut state);
            if matches!(result, Err(Failure::Stopped(_))) {
                // A start carried over from another set of phases can hold
                // in a phase now absent the only trace of a scarce species
                // (a solid that took all of it), which leaves Newton's
                // method too far from this set's root; the starting amounts
                // are a start that every set reaches.
                let mut fresh = origin.clone();
                for (i, &here) in present.iter().enumerate() {
                    if self.is_condensed(i) && !here {
                        fresh.set_amount(i, 0.0);
                    }
                }
                let retry = system.solve_robust(&mut fresh);
                if retry.is_ok() {
                    state = fresh;
                    result = retry;
                }
            }
            match result {
                Ok(k) => iterations += k,
                Err(Failure::Blocked(i)) => {
                    // The iterate that hit the bound need not be a good
                    // start for the new set; begin again from this attempt's.
                    present[i] = false;
                    state = before;
                    continue;
                }
                Err(Failure::Stopped(why)) => {
                    // Too many condensed species may leave the equations with
                    // no root at non-negative amounts that Newton can reach;
                    // drop the one the search depleted most and try again
                    // from where this attempt began (the saturation test
                    // below adds it back if it belongs).
                    let depleted = (0..s)
                        .filter(|&i| self.is_condensed(i) && present[i])
                        .min_by(|&i, &j| {
                            let ri = state.n[i] / before.n[i].max(f64::MIN_POSITIVE);
                            let rj = state.n[j] / before.n[j].max(f64::MIN_POSITIVE);
                            ri.total_cmp(&rj)
                        });
                    match depleted {
                        Some(i) if retries < 2 * condensed_count => {
                            retries += 1;
                            present[i] = false;
                            state = before;
                            continue;
                        }
                        _ => {
                            outcome = Err(why);
                            break;
                        }
                    }
                }
            }
            if !converged_sets.insert(present.clone()) {
                // Adding and dropping one species at a time came back to a
                // set it had left; every set of the condensed species is
                // tried instead, smallest first, for the one whose solution
                // keeps its species present and forms no other.
                match self.search_sets(&present, &origin) {
                    Some((set, found, actions, k)) => {
                        present = set;
                        state = found;
                        iterations += k;
                        outcome = Ok(actions);
                    }
                    None => {
                        outcome = Err(
                            "the set of present condensed species did not settle (it cycled)"
                                .to_string(),
                        );
                    }
                }
                break;
            }
            // A present condensed species with a negative amount is used up.
            let total: f64 = self.initial.iter().sum();
            let negative = (0..s)
                .filter(|&i| self.is_condensed(i) && present[i] && state.n[i] < -1e-13 * total)
                .min_by(|&i, &j| state.n[i].total_cmp(&state.n[j]));
            if let Some(i) = negative {
                present[i] = false;
                continue;
            }
            for (i, &here) in present.iter().enumerate() {
                if self.is_condensed(i) && here && state.n[i] < 0.0 {
                    state.set_amount(i, 0.0);
                }
            }
            // An absent condensed species that would form is added.
            let forming = (0..s)
                .filter(|&i| {
                    self.is_condensed(i) && self.reacting[i] && self.reach[i] && !present[i]
                })
                .filter_map(|i| self.driving_force(i, &present, &state).map(|d| (i, d)))
                .filter(|&(_, d)| d > SATURATION_TOLERANCE)
                .max_by(|a, b| a.1.total_cmp(&b.1));
            if let Some((i, _)) = forming {
                present[i] = true;
                continue;
            }
            outcome = Ok(system.actions);
            break;
        }
        if outcome.is_ok() {
            // Polish: with the conservation laws rebuilt around the
            // equilibrium amounts and scaled by their size there, species
            // that came out far below the abundant ones are resolved to full
            // relative precision. Repeated while the logs still move.
            let kept_nu = DMatrix::from_fn(self.kept.len(), s, |r, i| self.nu[(self.kept[r], i)]);
            for _ in 0..12 {
                self.conserved = conserved_quantities(problem, &kept_nu, &state.ln_n);
                let unknowns: Vec<usize> = (0..s).filter(|&i| present[i]).collect();
                let system = System {
                    problem,
                    actions: self.actions(&present),
                    balances: self.balances(&unknowns, &state, true),
                    unknowns,
                    amount_scale: self.amount_scale(),
                    homotopy: 1.0,
                    signed: false,
                };
                let mut polished = state.clone();
                let Ok(k) = system.solve(&mut polished) else {
                    break;
                };
                iterations += k;
                let moved = system
                    .unknowns
                    .iter()
                    .filter(|&&i| !self.is_condensed(i))
                    .map(|&i| (polished.ln_n[i] - state.ln_n[i]).abs())
                    .fold(0.0f64, f64::max);
                state = polished;
                if moved < 1e-12 {
                    break;
                }
            }
        }
        self.finish(state, present, used, iterations, outcome)
    }

    /// The equations of one set of present species, with the conservation
    /// laws taken at `state`.
    fn system(&self, present: &[bool], actions: Vec<Action>, state: &State) -> System<'a> {
        let unknowns: Vec<usize> = (0..present.len()).filter(|&i| present[i]).collect();
        let balances = self.balances(&unknowns, state, false);
        System {
            problem: self.problem,
            unknowns,
            actions,
            balances,
            amount_scale: self.amount_scale(),
            homotopy: 1.0,
            signed: false,
        }
    }

    /// The equilibrium found by trying every set of the condensed species
    /// that can form (up to [`MAX_SEARCHED_CONDENSED`] of them), fewest
    /// first, each from `origin`: the first set whose solution has no
    /// present condensed species below zero and no absent one that would
    /// form, the same tests the one-at-a-time search ends on. Each set is
    /// solved with its condensed amounts free to cross zero, since a solid
    /// that starts at zero may have to fall before it rises. `present`
    /// gives the fluid species.
    fn search_sets(
        &self,
        present: &[bool],
        origin: &State,
    ) -> Option<(Vec<bool>, State, Vec<Action>, usize)> {
        let s = self.problem.species.len();
        let candidates: Vec<usize> = (0..s)
            .filter(|&i| self.is_condensed(i) && self.reacting[i] && self.reach[i])
            .collect();
        if candidates.len() > MAX_SEARCHED_CONDENSED {
            return None;
        }
        let mut masks: Vec<u32> = (0..1u32 << candidates.len()).collect();
        masks.sort_by_key(|m| (m.count_ones(), *m));
        let total: f64 = self.initial.iter().sum();
        for mask in masks {
            let mut set = present.to_vec();
            for (bit, &i) in candidates.iter().enumerate() {
                set[i] = mask & (1 << bit) != 0;
            }
            let actions = self.actions(&set);
            if self.condensed_only(&actions).is_some() {
                continue;
            }
            let mut state = origin.clone();
            for (i, &here) in set.iter().enumerate() {
                if self.is_condensed(i) && !here {
                    state.set_amount(i, 0.0);
                }
            }
            let mut system = self.system(&set, actions, &state);
            // The set's root is judged by its signs below, wherever the
            // path to it went.
            system.signed = true;
            let Ok(k) = system.solve_robust(&mut state) else {
                continue;
            };
            let negative = candidates
                .iter()
                .any(|&i| set[i] && state.n[i] < -1e-13 * total);
            let forming = candidates.iter().any(|&i| {
                !set[i]
                    && self
                        .driving_force(i, &set, &state)
                        .is_some_and(|d| d > SATURATION_TOLERANCE)
            });
            if negative || forming {
                continue;
            }
            for &i in &candidates {
                if set[i] && state.n[i] < 0.0 {
                    state.set_amount(i, 0.0);
                }
            }
            return Some((set, state, system.actions, k));
        }
        None
    }

    /// The mass-action laws that must hold with this set of present species:
    /// a basis of the combinations of kept reactions that do not involve any
    /// absent species.
    fn actions(&self, present: &[bool]) -> Vec<Action> {
        let s = self.problem.species.len();
        let absent: Vec<usize> = (0..s)
            .filter(|&i| self.reacting[i] && !present[i])
            .collect();
        if absent.is_empty() {
            // Every kept reaction holds as it is.
            return self
                .kept
                .iter()
                .map(|&k| Action {
                    coefficients: self.nu.row(k).iter().copied().collect(),
                    ln_k: self.problem.reactions[k].ln_k,
                })
                .collect();
        }
        let m = DMatrix::from_fn(absent.len(), self.kept.len(), |z, r| {
            self.nu[(self.kept[r], absent[z])]
        });
        null_space(&m)
            .into_iter()
            .map(|alpha| {
                let mut coefficients = vec![0.0; s];
                let mut ln_k = 0.0;
                for (r, &a) in alpha.iter().enumerate() {
                    if a != 0.0 {
                        let k = self.kept[r];
                        ln_k += a * self.problem.reactions[k].ln_k;
                        for (i, c) in coefficients.iter_mut().enumerate() {
                            *c += a * self.nu[(k, i)];
                        }
                    }
                }
                // Absent species cancel exactly in theory; clear rounding.
                for &z in &absent {
                    coefficients[z] = 0.0;
                }
                Action { coefficients, ln_k }
            })
            .collect()
    }

    /// A combination of the mass-action laws in which no fluid species is
    /// left, if there is one: a reaction among present condensed species
    /// alone.
    fn condensed_only(&self, actions: &[Action]) -> Option<Action> {
        let s = self.problem.species.len();
        let fluid: Vec<usize> = (0..s).filter(|&i| !self.is_condensed(i)).collect();
        let m = DMatrix::from_fn(fluid.len(), actions.len(), |f, r| {
            actions[r].coefficients[fluid[f]]
        });
        let beta = null_space(&m).into_iter().next()?;
        let mut coefficients = vec![0.0; s];
        let mut ln_k = 0.0;
        for (r, a) in actions.iter().enumerate() {
            ln_k += beta[r] * a.ln_k;
            for (i, c) in coefficients.iter_mut().enumerate() {
                if self.is_condensed(i) {
                    *c += beta[r] * a.coefficients[i];
                }
            }
        }
        let largest = coefficients.iter().fold(0.0f64, |m, c| m.max(c.abs()));
        for c in coefficients.iter_mut() {
            if c.abs() <= 1e-9 * largest {
                *c = 0.0;
            }
        }
        Some(Action { coefficients, ln_k })
    }

    /// The conservation laws over the unknowns: independent restrictions of
    /// the conserved quantities to the unknown species. Each is scaled by its
    /// gross initial amount, or with `at_state` by its gross amount in
    /// `state` (for polishing, so that a law among trace species is held to
    /// their own size).
    fn balances(&self, unknowns: &[usize], state: &State, at_state: bool) -> Vec<Balance> {
        let restricted: Vec<DVector<f64>> = self
            .conserved
            .iter()
            .map(|row| DVector::from_iterator(unknowns.len(), unknowns.iter().map(|&i| row[i])))
            .collect();
        independent_rows(&restricted)
            .into_iter()
            .map(|k| {
                let row = &self.conserved[k];
                let mut total = 0.0;
                let mut gross = 0.0;
                for i in 0..row.len() {
                    if self.reacting[i] {
                        total += row[i] * self.initial[i];
                        gross += row[i].abs() * self.initial[i];
                    }
                }
                if gross == 0.0 || at_state {
                    gross = unknowns
                        .iter()
                        .map(|&i| row[i].abs() * state.n[i].abs())
                        .sum();
                }
                Balance {
                    coefficients: restricted[k].iter().copied().collect(),
                    total,
                    scale: gross.max(f64::MIN_POSITIVE),
                }
            })
            .collect()
    }

    /// ln K - ln Q of a reaction that forms one mol of the absent condensed
    /// species `c` from present species; positive means `c` would form.
    fn driving_force(&self, c: usize, present: &[bool], state: &State) -> Option<f64> {
        let s = self.problem.species.len();
        let absent: Vec<usize> = (0..s)
            .filter(|&i| self.reacting[i] && !present[i])
            .collect();
        let m = DMatrix::from_fn(absent.len(), self.kept.len(), |z, r| {
            self.nu[(self.kept[r], absent[z])]
        });
        let target = DVector::from_iterator(
            absent.len(),
            absent.iter().map(|&z| if z == c { 1.0 } else { 0.0 }),
        );
        let alpha = DVector::from_vec(least_squares(&m, &target)?);
        if (&m * &alpha - &target).norm() > 1e-8 {
            return None;
        }
        let act = activities(self.problem, &state.n, &state.ln_n);
        let mut ln_q = 0.0;
        let mut ln_k = 0.0;
        for (r, &a) in alpha.iter().enumerate() {
            let k = self.kept[r];
            ln_k += a * self.problem.reactions[k].ln_k;
            for (i, &here) in present.iter().enumerate() {
                let c = a * self.nu[(k, i)];
                if c != 0.0 && here && !self.is_condensed(i) {
                    ln_q += c * act.ln_a[i];
                }
            }
        }
        let d = (ln_k - ln_q) / ln_k.abs().max(1.0);
        d.is_finite().then_some(d)
    }

    fn finish(
        self,
        state: State,
        present: Vec<bool>,
        used: Vec<usize>,
        iterations: usize,
        outcome: Result<Vec<Action>, String>,
    ) -> Solution {
        let problem = self.problem;
        let s = problem.species.len();
        let act = activities(problem, &state.n, &state.ln_n);
        let mut amounts = state.n.clone();
        let mut ln_amounts = state.ln_n.clone();
        let mut ln_activities = act.ln_a.clone();
        for i in 0..s {
            if self.is_condensed(i) {
                if !present[i] && self.reacting[i] {
                    amounts[i] = 0.0;
                    ln_activities[i] = f64::NEG_INFINITY;
                }
                amounts[i] = amounts[i].max(0.0);
                ln_amounts[i] = amounts[i].ln();
                if amounts[i] == 0.0 {
                    ln_activities[i] = f64::NEG_INFINITY;
                }
            } else if amounts[i] == 0.0 && ln_amounts[i] == f64::NEG_INFINITY {
                ln_activities[i] = f64::NEG_INFINITY;
            }
        }
        let ln_q: Vec<f64> = (0..problem.reactions.len())
            .map(|r| {
                (0..s)
                    .filter(|&i| self.nu[(r, i)] != 0.0)
                    .map(|i| self.nu[(r, i)] * act.ln_a[i])
                    .sum()
            })
            .collect();
        let delta = DVector::from_iterator(s, (0..s).map(|i| amounts[i] - self.initial[i]));
        // Extents from the normal equations ν νᵀ ξ = ν Δn (the kept rows are
        // independent, so ν νᵀ is invertible).
        let kept_nu = DMatrix::from_fn(self.kept.len(), s, |r, i| self.nu[(self.kept[r], i)]);
        let normal = &kept_nu * kept_nu.transpose();
        let mut extents = vec![0.0; problem.reactions.len()];
        let solved = if self.kept.is_empty() {
            None
        } else {
            normal.lu().solve(&(&kept_nu * &delta))
        };
        if let Some(x) = solved {
            for (r, &k) in self.kept.iter().enumerate() {
                if used.contains(&k) {
                    extents[k] = x[r];
                }
            }
        }
        let vanished: Vec<usize> = (0..s)
            .filter(|&i| self.is_condensed(i) && self.initial[i] > 0.0 && amounts[i] == 0.0)
            .collect();
        let mut why = outcome.as_ref().err().map(|why| match problem.vessel {
            Vessel::ConstantPressure { .. } if (0..s).any(|i| self.is_condensed(i)) => format!(
                "{why}; at constant pressure this can mean that the gas phase would condense or vanish completely, which this solver does not model"
            ),
            _ => why.clone(),
        });
        if why.is_none() {
            why = self.verify(&amounts, &present, &ln_q, &used);
        }
        let mut warning = None;
        if problem.activity == ActivityModel::Davies {
            let t_c = problem.temperature_k - 273.15;
            if let Some(i) = act.ionic_strength
                && i > DAVIES_LIMIT_MOL_PER_L
            {
                warning = Some(format!(
                    "ionic strength {i:.3} mol/L is beyond the range where the Davies model is usually trusted (about 0.5 mol/L)"
                ));
            } else if !(0.0..=100.0).contains(&t_c) {
                warning = Some(format!(
                    "the Davies constant is carried outside 0-100 °C (here {t_c:.1} °C), where its water permittivity correlation holds"
                ));
            }
        }
        Solution {
            converged: why.is_none(),
            why,
            warning,
            amounts_mol: amounts,
            ln_amounts,
            ln_activities,
            extents,
            ln_q,
            used,
            left_out: self.left_out,
            vanished,
            ionic_strength: act.ionic_strength,
            activity_coefficients: act.gamma,
            iterations,
        }
    }

    /// Checks the converged criteria on the final amounts; returns what fails.
    fn verify(
        &self,
        amounts: &[f64],
        present: &[bool],
        ln_q: &[f64],
        used: &[usize],
    ) -> Option<String> {
        let problem = self.problem;
        let s = problem.species.len();
        for row in &self.conserved {
            let mut residual = 0.0;
            let mut gross = 0.0;
            for i in 0..s {
                residual += row[i] * (amounts[i] - self.initial[i]);
                gross += row[i].abs() * (amounts[i] + self.initial[i]);
            }
            if residual.abs() > BALANCE_TOLERANCE * gross.max(f64::MIN_POSITIVE) {
                return Some(format!(
                    "a conserved quantity is off by {:.3e} of its size",
                    residual.abs() / gross.max(f64::MIN_POSITIVE)
                ));
            }
        }
        for &r in used {
            let rx = &problem.reactions[r];
            let absent: Vec<usize> = (0..s)
                .filter(|&i| self.nu[(r, i)] != 0.0 && !present[i])
                .collect();
            let gap = ln_q[r] - rx.ln_k;
            let tolerance = ACTION_TOLERANCE * rx.ln_k.abs().max(1.0);
            match absent.as_slice() {
                [] if gap.is_nan() || gap.abs() > tolerance => {
                    return Some(format!(
                        "reaction {} is off equilibrium: ln Q - ln K = {gap:.3e}",
                        rx.label
                    ));
                }
                [c] => {
                    // With its condensed species gone, the reaction must not
                    // favour making it back.
                    let sense = self.nu[(r, *c)].signum();
                    if sense * gap < -tolerance - SATURATION_TOLERANCE * rx.ln_k.abs().max(1.0) {
                        return Some(format!(
                            "{} is reported used up, but reaction {} would form it (ln Q - ln K = {gap:.3e})",
                            problem.species[*c].name, rx.label
                        ));
                    }
                }
                _ => {}
            }
        }
        None
    }
}
