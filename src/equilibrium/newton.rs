//! Newton–Raphson on the equilibrium equations in logarithmic form, for one
//! fixed set of present condensed species.
//!
//! The unknowns are ln n for every fluid species that takes part and n itself
//! for every present condensed species. The equations are the mass-action
//! laws Σ ν ln a = ln K of an independent set of reactions among the present
//! species and the conservation laws Σ c n = b of the quantities every
//! reaction leaves unchanged. Working in ln n keeps trace species at full
//! relative precision and K from 1e-300 to 1e300 within range. The step is
//! limited in ln n and globalised by a backtracking (Armijo) line search on
//! the squared residual (Smith & Missen, "Chemical Reaction Equilibrium
//! Analysis", Wiley 1982, ch. 6; Nocedal & Wright, "Numerical Optimization",
//! 2nd ed., §11.2 for the line search).

use nalgebra::{DMatrix, DVector};

use super::activity::{Activities, activities};
use super::problem::{Phase, Problem, Vessel};

/// The largest change of ln n in one step.
const MAX_LOG_STEP: f64 = 20.0;
/// The largest ln n allowed (keeps exp finite).
const MAX_LOG_AMOUNT: f64 = 700.0;
/// Iteration limit of one Newton solve.
const MAX_ITERATIONS: usize = 400;
/// Mass-action tolerance on |ln Q - ln K| / max(1, |ln K|) that counts as converged.
pub(crate) const ACTION_TOLERANCE: f64 = 1e-10;
/// Conservation tolerance relative to the gross amount of each conserved quantity.
pub(crate) const BALANCE_TOLERANCE: f64 = 1e-12;

/// A mass-action law: coefficients over all species and its ln K.
pub(crate) struct Action {
    pub coefficients: Vec<f64>,
    pub ln_k: f64,
}

/// A conservation law over the unknown species.
pub(crate) struct Balance {
    /// One coefficient per unknown (same order as `System::unknowns`).
    pub coefficients: Vec<f64>,
    /// The amount the unknowns must add up to.
    pub total: f64,
    /// The gross size of this quantity, for relative tolerances.
    pub scale: f64,
}

/// The square system for one active set.
pub(crate) struct System<'a> {
    pub problem: &'a Problem,
    /// Species indices of the unknowns.
    pub unknowns: Vec<usize>,
    pub actions: Vec<Action>,
    pub balances: Vec<Balance>,
    /// A typical amount of the system, mol, for weighing condensed amounts.
    pub amount_scale: f64,
    /// The fraction of each ln K in force (1 except during continuation).
    pub homotopy: f64,
    /// Whether condensed amounts may go below zero. The search for the
    /// active set solves each set as it stands and judges it by the signs
    /// of its root; a path that crosses zero on its way there says nothing
    /// about the set.
    pub signed: bool,
}

/// Why a Newton solve ended without a root.
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum Failure {
    /// This present condensed species is at 0 and the step would make it
    /// negative: it is used up, and the active set must change.
    Blocked(usize),
    /// The iteration failed, for the reason given.
    Stopped(String),
}

/// A factorised Newton matrix: LU, or SVD when LU finds it singular.
enum Linear {
    Lu(nalgebra::linalg::LU<f64, nalgebra::Dyn, nalgebra::Dyn>),
    Svd(
        nalgebra::linalg::SVD<f64, nalgebra::Dyn, nalgebra::Dyn>,
        f64,
    ),
}

impl Linear {
    fn new(jac: DMatrix<f64>) -> Linear {
        let lu = jac.clone().lu();
        if lu.is_invertible() {
            Linear::Lu(lu)
        } else {
            let svd = jac.svd(true, true);
            let largest = svd.singular_values.iter().cloned().fold(0.0, f64::max);
            Linear::Svd(svd, largest * 1e-14)
        }
    }

    fn solve(&self, rhs: &DVector<f64>) -> Option<DVector<f64>> {
        let x = match self {
            Linear::Lu(lu) => lu.solve(rhs)?,
            Linear::Svd(svd, eps) => svd.solve(rhs, *eps).ok()?,
        };
        x.iter().all(|v| v.is_finite()).then_some(x)
    }
}

/// Amounts of every species and their logarithms.
#[derive(Debug, Clone)]
pub(crate) struct State {
    pub n: Vec<f64>,
    pub ln_n: Vec<f64>,
}

impl State {
    /// Sets the amount of species `i` to `value`, keeping its log in step.
    pub(crate) fn set_amount(&mut self, i: usize, value: f64) {
        self.n[i] = value;
        self.ln_n[i] = value.ln();
    }

    fn set_log(&mut self, i: usize, ln_value: f64) {
        let y = ln_value.min(MAX_LOG_AMOUNT);
        self.ln_n[i] = y;
        self.n[i] = y.exp();
    }
}

/// Residual measures of a state: the largest relative mass-action error and
/// the largest relative conservation error.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Residual {
    pub action: f64,
    pub balance: f64,
}

impl Residual {
    pub(crate) fn within(&self, action: f64, balance: f64) -> bool {
        self.action <= action && self.balance <= balance
    }
}

impl System<'_> {
    fn is_fluid(&self, i: usize) -> bool {
        self.problem.species[i].phase != Phase::Condensed
    }

    /// The scaled residual vector and the activities it was computed from.
    fn residual(&self, state: &State) -> (DVector<f64>, Activities) {
        let act = activities(self.problem, &state.n, &state.ln_n);
        let m = self.actions.len() + self.balances.len();
        let mut f = DVector::zeros(m);
        for (r, a) in self.actions.iter().enumerate() {
            let ln_k = a.ln_k * self.homotopy;
            let mut s = -ln_k;
            for (i, &c) in a.coefficients.iter().enumerate() {
                if c != 0.0 && self.is_fluid(i) {
                    s += c * act.ln_a[i];
                }
            }
            f[r] = s / ln_k.abs().max(1.0);
        }
        for (k, b) in self.balances.iter().enumerate() {
            let mut s = -b.total;
            for (j, &i) in self.unknowns.iter().enumerate() {
                s += b.coefficients[j] * state.n[i];
            }
            f[self.actions.len() + k] = s / b.scale;
        }
        (f, act)
    }

    /// Residual measures of a state against the converged criteria.
    pub(crate) fn measure(&self, state: &State) -> Residual {
        let (f, _) = self.residual(state);
        let na = self.actions.len();
        let action = f.iter().take(na).fold(0.0f64, |m, x| m.max(x.abs()));
        let balance = f.iter().skip(na).fold(0.0f64, |m, x| m.max(x.abs()));
        Residual { action, balance }
    }

    fn jacobian(&self, state: &State, act: &Activities) -> DMatrix<f64> {
        let m = self.unknowns.len();
        let mut jac = DMatrix::zeros(self.actions.len() + self.balances.len(), m);
        let species = &self.problem.species;
        let volume = match self.problem.vessel {
            Vessel::ConstantVolume { volume_l } => volume_l,
            Vessel::ConstantPressure { .. } => 1.0,
        };
        let constant_pressure = matches!(self.problem.vessel, Vessel::ConstantPressure { .. });
        for (r, a) in self.actions.iter().enumerate() {
            let norm = (a.ln_k * self.homotopy).abs().max(1.0);
            let mut gas_sum = 0.0;
            let mut ion_sum = 0.0;
            for (i, &c) in a.coefficients.iter().enumerate() {
                match species[i].phase {
                    Phase::Gas => gas_sum += c,
                    Phase::Solute => ion_sum += c * f64::from(species[i].charge).powi(2),
                    Phase::Condensed => {}
                }
            }
            for (j, &i) in self.unknowns.iter().enumerate() {
                let mut d = 0.0;
                match species[i].phase {
                    Phase::Gas => {
                        d += a.coefficients[i];
                        if constant_pressure && act.gas_total > 0.0 {
                            d -= gas_sum * state.n[i] / act.gas_total;
                        }
                    }
                    Phase::Solute => {
                        d += a.coefficients[i];
                        let z2 = f64::from(species[i].charge).powi(2);
                        d += act.davies_slope * ion_sum * 0.5 * z2 * state.n[i] / volume;
                    }
                    Phase::Condensed => {}
                }
                jac[(r, j)] = d / norm;
            }
        }
        let offset = self.actions.len();
        for (k, b) in self.balances.iter().enumerate() {
            for (j, &i) in self.unknowns.iter().enumerate() {
                let c = b.coefficients[j];
                jac[(offset + k, j)] = if self.is_fluid(i) { c * state.n[i] } else { c } / b.scale;
            }
        }
        jac
    }

    /// The size of a step: ln n changes count as they are, condensed
    /// amounts relative to the system's amount scale.
    fn weighted_norm(&self, step: &DVector<f64>) -> f64 {
        let mut sum = 0.0;
        for (j, &i) in self.unknowns.iter().enumerate() {
            let v = if self.is_fluid(i) {
                step[j]
            } else {
                step[j] / self.amount_scale
            };
            sum += v * v;
        }
        sum.sqrt()
    }

    fn apply(&self, state: &State, step: &DVector<f64>, t: f64) -> State {
        let mut next = state.clone();
        for (j, &i) in self.unknowns.iter().enumerate() {
            if self.is_fluid(i) {
                next.set_log(i, state.ln_n[i] + t * step[j]);
            } else if self.signed {
                next.set_amount(i, state.n[i] + t * step[j]);
            } else {
                next.set_amount(i, (state.n[i] + t * step[j]).max(0.0));
            }
        }
        next
    }

    /// Runs Newton's method from `state`, and when that fails, follows the
    /// solution from ln K scaled to 0 (every K = 1, an easy problem) up to the
    /// full ln K in adaptive steps (parameter continuation; Allgower & Georg,
    /// "Introduction to Numerical Continuation Methods", SIAM 2003, ch. 1).
    pub(crate) fn solve_robust(&mut self, state: &mut State) -> Result<usize, Failure> {
        let start = state.clone();
        self.homotopy = 1.0;
        let why = match self.solve(state) {
            Ok(k) => return Ok(k),
            Err(Failure::Blocked(i)) => return Err(Failure::Blocked(i)),
            Err(Failure::Stopped(why)) => why,
        };
        *state = start;
        let mut iterations = 0;
        let mut lambda = 0.0;
        let mut step: f64 = 0.25;
        let mut attempts = 0;
        self.homotopy = 0.0;
        let result = loop {
            attempts += 1;
            if attempts > 200 {
                break Err(Failure::Stopped(why));
            }
            let mut trial = state.clone();
            match self.solve(&mut trial) {
                Ok(k) => {
                    iterations += k;
                    *state = trial;
                    if self.homotopy >= 1.0 {
                        break Ok(iterations);
                    }
                    lambda = self.homotopy;
                    step = (step * 2.0).min(0.5);
                }
                Err(Failure::Blocked(i)) => break Err(Failure::Blocked(i)),
                Err(Failure::Stopped(_)) => {
                    step *= 0.5;
                    if step < 1e-4 {
                        break Err(Failure::Stopped(why));
                    }
                }
            }
            self.homotopy = (lambda + step).min(1.0);
        };
        self.homotopy = 1.0;
        result
    }

    /// Runs Newton's method from `state`; returns the number of iterations
    /// or why it failed. `state` holds the last iterate either way.
    pub(crate) fn solve(&self, state: &mut State) -> Result<usize, Failure> {
        if self.actions.len() + self.balances.len() != self.unknowns.len() {
            return Err(Failure::Stopped(format!(
                "internal: {} equations for {} unknowns",
                self.actions.len() + self.balances.len(),
                self.unknowns.len()
            )));
        }
        if self.unknowns.is_empty() {
            return Ok(0);
        }
        let (mut f, mut act) = self.residual(state);
        let mut phi = 0.5 * f.norm_squared();
        if !phi.is_finite() {
            return Err(Failure::Stopped(
                "the starting point gives a residual that is not finite".to_string(),
            ));
        }
        if self.measure(state).within(1e-14, 1e-15) {
            return Ok(0);
        }
        let mut good_iterations = 0;
        let mut stalls = 0;
        for iteration in 1..=MAX_ITERATIONS {
            let jac = self.jacobian(state, &act);
            let rhs = -&f;
            let linear = Linear::new(jac);
            let Some(step) = linear.solve(&rhs) else {
                return Err(Failure::Stopped(
                    "the Newton system is singular".to_string(),
                ));
            };
            let mut largest_log = 0.0f64;
            for (j, &i) in self.unknowns.iter().enumerate() {
                if self.is_fluid(i) {
                    largest_log = largest_log.max(step[j].abs());
                }
            }
            let step_norm = self.weighted_norm(&step);
            let mut t = if largest_log > MAX_LOG_STEP {
                MAX_LOG_STEP / largest_log
            } else {
                1.0
            };
            // A present condensed amount may fall to 0 but not below: stop
            // the step there, and report a species already at 0 that the
            // step would take negative, so the caller can remove it.
            for (j, &i) in self.unknowns.iter().enumerate() {
                if !self.signed && !self.is_fluid(i) && step[j] < 0.0 {
                    if state.n[i] <= 0.0 {
                        return Err(Failure::Blocked(i));
                    }
                    t = t.min(state.n[i] / -step[j]);
                }
            }
            let mut accepted = None;
            let mut best: Option<(f64, State, DVector<f64>, Activities, f64)> = None;
            while t >= 1e-12 {
                let trial = self.apply(state, &step, t);
                let (ft, at) = self.residual(&trial);
                let pt = 0.5 * ft.norm_squared();
                if pt.is_finite() {
                    // Accept on a decrease of the squared residual (Armijo)
                    // or on the natural monotonicity test, which does not
                    // depend on how the equations are scaled: the simplified
                    // Newton correction at the trial point must shrink
                    // (Deuflhard, "Newton Methods for Nonlinear Problems",
                    // Springer 2004, §3.3).
                    let armijo = pt <= phi * (1.0 - 2e-4 * t);
                    let natural = !armijo
                        && linear.solve(&(-&ft)).is_some_and(|c| {
                            self.weighted_norm(&c) <= (1.0 - 0.25 * t) * step_norm
                        });
                    if armijo || natural {
                        accepted = Some((trial, ft, at, pt));
                        break;
                    }
                    if best.as_ref().is_none_or(|b| pt < b.0) {
                        best = Some((pt, trial, ft, at, t));
                    }
                }
                t *= 0.5;
            }
            let step_small = largest_log * t < 1e-14;
            match accepted {
                Some((trial, ft, at, pt)) => {
                    *state = trial;
                    f = ft;
                    act = at;
                    phi = pt;
                    stalls = 0;
                }
                None => {
                    // No decrease: the residual is at rounding level or the
                    // search is stuck. Take the best trial if it is no worse.
                    stalls += 1;
                    if let Some((pt, trial, ft, at, _)) = best
                        && pt <= phi
                    {
                        *state = trial;
                        f = ft;
                        act = at;
                        phi = pt;
                    }
                }
            }
            let r = self.measure(state);
            if r.within(1e-14, 1e-15) {
                return Ok(iteration);
            }
            if r.within(ACTION_TOLERANCE, BALANCE_TOLERANCE) {
                good_iterations += 1;
                if good_iterations >= 3 || stalls > 0 || step_small {
                    return Ok(iteration);
                }
            }
            if stalls >= 8 {
                return Err(Failure::Stopped(format!(
                    "Newton's method stalled after {iteration} iterations (largest mass-action error {:.3e}, conservation error {:.3e})",
                    r.action, r.balance
                )));
            }
        }
        let r = self.measure(state);
        Err(Failure::Stopped(format!(
            "Newton's method did not converge in {MAX_ITERATIONS} iterations (largest mass-action error {:.3e}, conservation error {:.3e})",
            r.action, r.balance
        )))
    }
}
