//! Linear dependence among reactions, found incrementally and exactly.
//!
//! A reaction is a sparse vector over species ids (products positive,
//! reactants negative). Reactions that combine to another listed reaction
//! (or to nothing) must have equilibrium constants that multiply out, which
//! is the Wegscheider condition; to check it one needs, for each reaction
//! that depends on earlier ones, the exact multipliers of that combination.
//! [`CycleFinder`] keeps a basis of the independent reactions seen so far
//! and answers that question one reaction at a time.
//!
//! The basis is kept in echelon form by insertion order: when basis vector
//! `k` was inserted it had been reduced against every older vector, so it
//! contains none of their pivot species. A new vector is reduced by
//! eliminating pivots in increasing basis order; subtracting vector `k` can
//! only bring in pivots of younger vectors, so each basis vector is used at
//! most once per reduction and the reduction always ends. Each basis vector
//! records how it was made (its reaction, its scale and the older vectors it
//! was reduced by) and carries the caller's value (ln K) through the same
//! combination, so a dependent reaction's predicted value comes out at once;
//! its multipliers in original reactions are expanded only on request.
//!
//! Complexity: adding a reaction costs O(Σ_k nnz(b_k)) rational operations
//! over the basis vectors `k` it touches. The pivot of a new basis vector is
//! its rarest species (fewest occurrences so far), a Markowitz-style choice
//! that keeps fill-in low. For sparse libraries whose sub-mechanisms share a
//! pool of common species the touched set stays bounded, so the total is
//! linear in the number of reactions; the worst case (dense random networks)
//! is O(r² · s) for r independent reactions over s species, as for any exact
//! elimination. Expanding a combination costs the number of basis vectors it
//! reaches. Numbers stay on `i64` rationals while they fit and move to big
//! rationals when they do not.
//!
//! Most reductions take a faster path with the same steps: the vector as
//! integer numerators over one denominator and each basis vector scaled to
//! integers, so that no step reduces a fraction, with what a reduction
//! reads of a basis vector packed apart from how the vector was made. At
//! 10^5 reactions the exact rational path spent most of its time reducing
//! fractions and waiting on memory; a vector whose numbers overflow goes
//! back to it.
//!
//! Reductions can also be made ahead of their turn, on every core, against
//! the basis as it stands ([`CycleFinder::reduce_ahead`]); adding the
//! reaction then only carries the reduction on through the vectors that
//! joined the basis since ([`CycleFinder::add_reduced`]). The answers are
//! those of adding one reaction at a time, bit for bit: a vector's
//! multipliers in the basis are unique, the echelon order means that a
//! younger vector never brings back the pivot of an older one, and the
//! predicted value is summed over the same vectors in the same order. In a
//! large library most reactions depend on earlier ones (three in four at
//! 10^5 reactions, eleven in twelve at 10^6), so most of the work moves
//! off the one core that adds.
//!
//! Most of those dependent reactions need no reduction at all. The finder
//! keeps potentials and fingerprints of the species (module `potentials`):
//! [`CycleFinder::spanned`] tells whether a vector lies in the span of the
//! basis, and [`CycleFinder::carried_value`] the value a reduction would
//! carry to it, each from one pass over the vector's few entries. A caller
//! that only needs to know that a cycle closes within a tolerance can
//! stop there, and reduce only the reactions that join the basis or may
//! miss.

use std::cmp::Reverse;
use std::collections::BinaryHeap;
#[cfg(test)]
use std::collections::HashMap;

use num_bigint::BigInt;
use num_rational::{BigRational, Ratio};
use num_traits::{CheckedAdd, CheckedMul, ToPrimitive, Zero};

use super::balance::big;

mod potentials;
use potentials::Potentials;

/// An exact rational that stays on machine integers while it fits and
/// moves to big integers when it does not, so that the common case (small
/// stoichiometric coefficients) avoids big-number arithmetic.
#[derive(Clone, Debug, PartialEq)]
enum Q {
    Small(Ratio<i64>),
    /// Boxed so that the common small case keeps `Q` at 24 bytes.
    Big(Box<BigRational>),
}

impl Q {
    fn from_big(b: BigRational) -> Q {
        match (b.numer().to_i64(), b.denom().to_i64()) {
            (Some(n), Some(d)) => Q::Small(Ratio::new_raw(n, d)),
            _ => Q::Big(Box::new(b)),
        }
    }

    /// A machine rational as kept here: reduced, denominator positive.
    fn from_ratio(r: &Ratio<i64>) -> Q {
        let (n, d) = (*r.numer(), *r.denom());
        if d == 1 {
            return Q::Small(*r);
        }
        if d > 0 && gcd_i64(n, d) == 1 {
            return Q::Small(*r);
        }
        Q::from_big(big(r))
    }

    fn to_big(&self) -> BigRational {
        match self {
            // Small values are kept reduced with a positive denominator, so
            // no gcd is needed.
            Q::Small(r) => BigRational::new_raw(BigInt::from(*r.numer()), BigInt::from(*r.denom())),
            Q::Big(b) => (**b).clone(),
        }
    }

    fn is_zero(&self) -> bool {
        match self {
            Q::Small(r) => r.is_zero(),
            Q::Big(b) => b.is_zero(),
        }
    }

    fn mul(&self, other: &Q) -> Q {
        if let (Q::Small(a), Q::Small(b)) = (self, other) {
            // Integers (the usual stoichiometric case) skip the gcds.
            if a.is_integer()
                && b.is_integer()
                && let Some(n) = a.numer().checked_mul(b.numer())
            {
                return Q::Small(Ratio::new_raw(n, 1));
            }
            if let Some(c) = a.checked_mul(b) {
                return Q::Small(c);
            }
        }
        Q::from_big(self.to_big() * other.to_big())
    }

    fn add(&self, other: &Q) -> Q {
        if let (Q::Small(a), Q::Small(b)) = (self, other) {
            if a.is_integer()
                && b.is_integer()
                && let Some(n) = a.numer().checked_add(b.numer())
            {
                return Q::Small(Ratio::new_raw(n, 1));
            }
            if let Some(c) = a.checked_add(b) {
                return Q::Small(c);
            }
        }
        Q::from_big(self.to_big() + other.to_big())
    }

    fn neg(&self) -> Q {
        match self {
            Q::Small(r) if *r.numer() != i64::MIN => Q::Small(-r),
            _ => Q::from_big(-self.to_big()),
        }
    }

    /// The reciprocal; only called on nonzero values.
    fn recip(&self) -> Q {
        match self {
            Q::Small(r) if *r.numer() != i64::MIN && !r.is_zero() => Q::Small(r.recip()),
            _ if self.is_zero() => Q::Small(Ratio::zero()),
            _ => Q::from_big(self.to_big().recip()),
        }
    }
}

/// Append a basis vector's entries scaled to integers (by the least common
/// multiple of their denominators) to `arena`, and return where they start,
/// how many there are and that multiple; `None`, with `arena` unchanged,
/// when a value does not fit or the arena would outgrow its `u32` indexes.
fn push_integers(arena: &mut Vec<(u32, i64)>, entries: &[(u32, Q)]) -> Option<(u32, u32, i64)> {
    let mut lcm: i64 = 1;
    for (_, x) in entries {
        let Q::Small(r) = x else {
            return None;
        };
        let d = *r.denom();
        let g = i64::try_from(gcd_i64(lcm, d)).ok()?;
        lcm = lcm.checked_mul(d / g)?;
    }
    let start = u32::try_from(arena.len()).ok()?;
    let len = u32::try_from(entries.len()).ok()?;
    start.checked_add(len)?;
    for (s, x) in entries {
        let value = match x {
            Q::Small(r) => i64::checked_mul(*r.numer(), lcm / r.denom()),
            Q::Big(_) => None,
        };
        let Some(value) = value else {
            arena.truncate(start as usize);
            return None;
        };
        arena.push((*s, value));
    }
    Some((start, len, lcm))
}

fn gcd_i64(a: i64, b: i64) -> u64 {
    let (mut a, mut b) = (a.unsigned_abs(), b.unsigned_abs());
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a
}

/// What a reduction reads of a basis vector, kept apart from how the
/// vector was made (in [`BasisVector`]) so that the vectors one reduction
/// visits, which are usually of nearly the same age, share cache lines.
#[derive(Clone, Copy)]
struct Pivoted {
    pivot: u32,
    /// The vector scaled to integers, for the reduction's fast path, is
    /// `integers[start..start + len]` of the finder: the entries times the
    /// least common multiple of their denominators, which is `denominator`
    /// (the pivot's integer). A vector with a value that does not fit a
    /// machine integer has no integer form: `denominator` is 0.
    start: u32,
    len: u32,
    denominator: i64,
    /// The caller's value (ln K) carried through the combination that made
    /// the vector.
    value: f64,
}

#[derive(Clone)]
struct BasisVector {
    /// Species coefficients, sorted by id; the pivot's coefficient is 1.
    entries: Vec<(u32, Q)>,
    /// How the vector was made: `scale · (reaction − Σ c_k b_k)` over the
    /// older basis vectors `b_k` it was reduced by. Keeping these few
    /// terms instead of the vector's full expansion in original reactions
    /// keeps the basis small and adding cheap; the expansion is computed
    /// only when a caller asks for it.
    reaction: usize,
    scale: Q,
    reduced_by: Vec<(u32, Q)>,
}

/// A reaction found to depend on earlier ones: `vector = Σ c_k b_k` over
/// basis vectors. [`CycleFinder::combination`] turns it into multipliers of
/// original reactions.
pub struct Dependence {
    used: Vec<(u32, Q)>,
    /// Σ m_i · value_i over the original reactions of the combination.
    pub predicted: f64,
}

impl Dependence {
    /// True for the zero vector (the combination is empty).
    pub fn is_trivial(&self) -> bool {
        self.used.is_empty()
    }
}

fn q_to_f64(q: &Q) -> f64 {
    match q {
        Q::Small(r) => *r.numer() as f64 / *r.denom() as f64,
        Q::Big(b) => b.to_f64().unwrap_or(f64::NAN),
    }
}

/// Incremental exact test for linear dependence among reactions.
#[derive(Default)]
pub struct CycleFinder {
    basis: Vec<BasisVector>,
    /// What reductions read of each basis vector, and the integer forms of
    /// the vectors one after another.
    pivoted: Vec<Pivoted>,
    integers: Vec<(u32, i64)>,
    /// The basis vector whose pivot each species is (`NONE` when none),
    /// indexed by species id.
    pivot_of: Vec<u32>,
    /// How many added reactions each species occurs in, by species id.
    occurrences: Vec<u32>,
    /// Scratch space reused from one `add` to the next, so that adding a
    /// reaction allocates little.
    scratch: Scratch,
    /// What a reaction in the span is worth, and whether it is in it,
    /// answered without a reduction.
    potentials: Potentials,
}

/// No basis vector.
const NONE: u32 = u32::MAX;

#[derive(Default)]
struct Scratch {
    /// The vector being reduced, dense by species id, and which ids are set.
    work: Vec<Option<Q>>,
    touched: Vec<u32>,
    heap: BinaryHeap<Reverse<usize>>,
    /// The fast path's vector as integer numerators over one denominator,
    /// the numerators dense by species id, and which ids it has set (a set
    /// id may have come back to zero).
    integers: Vec<i64>,
    denominator: i64,
    set: Vec<bool>,
    integer_touched: Vec<u32>,
}

/// What a reduction found: the basis vectors subtracted with their
/// multipliers, the value they predict, and what is left of the vector.
struct Reduction {
    used: Vec<(u32, Q)>,
    predicted: f64,
    rest: Vec<(u32, Q)>,
}

/// A reduction made ahead of its turn by [`CycleFinder::reduce_ahead`],
/// against the first `against` basis vectors.
pub struct Provisional {
    reduction: Reduction,
    against: usize,
}

/// Scratch space for reductions made ahead, one per core, kept from one
/// batch to the next.
#[derive(Default)]
pub struct Lookahead {
    scratches: Vec<Scratch>,
}

impl Scratch {
    fn slot(&mut self, s: u32) -> &mut Option<Q> {
        let i = s as usize;
        if i >= self.work.len() {
            self.work.resize(i + 1, None);
        }
        if self.work[i].is_none() {
            self.touched.push(s);
        }
        &mut self.work[i]
    }

    fn add_to(&mut self, s: u32, x: &Q) {
        let slot = self.slot(s);
        *slot = Some(match slot.take() {
            Some(old) => old.add(x),
            None => x.clone(),
        });
    }

    fn get(&self, s: u32) -> Option<&Q> {
        self.work
            .get(s as usize)
            .and_then(Option::as_ref)
            .filter(|q| !q.is_zero())
    }

    /// The next basis vector to subtract: the oldest one queued, taken once
    /// however many times it was queued.
    fn next_queued(&mut self, last: &mut Option<usize>) -> Option<usize> {
        while let Some(Reverse(k)) = self.heap.pop() {
            if *last != Some(k) {
                *last = Some(k);
                return Some(k);
            }
        }
        None
    }

    /// Add `x` to the fast path's entry `s`; `None` on overflow.
    fn add_integer(&mut self, s: u32, x: i64) -> Option<i64> {
        let i = s as usize;
        if i >= self.integers.len() {
            self.integers.resize(i + 1, 0);
            self.set.resize(i + 1, false);
        }
        if !self.set[i] {
            self.set[i] = true;
            self.integer_touched.push(s);
        }
        let sum = self.integers[i].checked_add(x)?;
        // The most negative integer has no negation; the exact path takes
        // a vector that reaches it.
        if sum == i64::MIN {
            return None;
        }
        self.integers[i] = sum;
        Some(sum)
    }

    /// Multiply every numerator and the denominator by `m`; `None` on
    /// overflow.
    fn scale_integers(&mut self, m: i64) -> Option<()> {
        for &s in &self.integer_touched {
            let x = &mut self.integers[s as usize];
            *x = x.checked_mul(m).filter(|&v| v != i64::MIN)?;
        }
        self.denominator = self.denominator.checked_mul(m)?;
        Some(())
    }

    fn integer(&self, s: u32) -> i64 {
        self.integers.get(s as usize).copied().unwrap_or(0)
    }

    /// The nonzero entries of the fast path's vector, clearing it.
    fn drain_integers(&mut self) -> Vec<(u32, Q)> {
        let d = std::mem::replace(&mut self.denominator, 1);
        // Sized exactly: the vector becomes a basis vector, kept to the
        // end, and a dependent reaction's empty rest allocates nothing.
        let nonzero = self
            .integer_touched
            .iter()
            .filter(|&&s| self.integers[s as usize] != 0)
            .count();
        let mut out = Vec::with_capacity(nonzero);
        for s in self.integer_touched.drain(..) {
            let i = s as usize;
            self.set[i] = false;
            let n = std::mem::take(&mut self.integers[i]);
            if n != 0 {
                out.push((s, Q::Small(Ratio::new(n, d))));
            }
        }
        out
    }

    /// The nonzero entries of the work vector, clearing it.
    fn drain(&mut self) -> Vec<(u32, Q)> {
        let nonzero = self
            .touched
            .iter()
            .filter(|&&s| self.work[s as usize].as_ref().is_some_and(|q| !q.is_zero()))
            .count();
        let mut out = Vec::with_capacity(nonzero);
        for s in self.touched.drain(..) {
            if let Some(q) = self.work[s as usize].take()
                && !q.is_zero()
            {
                out.push((s, q));
            }
        }
        out
    }
}

impl CycleFinder {
    pub fn new() -> Self {
        Self::default()
    }

    /// The number of independent reactions kept.
    pub fn rank(&self) -> usize {
        self.basis.len()
    }

    fn pivot_of(&self, s: u32) -> Option<usize> {
        match self.pivot_of.get(s as usize) {
            Some(&k) if k != NONE => Some(k as usize),
            _ => None,
        }
    }

    /// Whether `vector` lies in the span of the reactions added so far,
    /// told by a fingerprint instead of a reduction: `Some(false)` for
    /// certain, `Some(true)` but for a chance of 1 in 2^61 − 1 (see
    /// module `potentials`), `None` when the fingerprint cannot tell; an exact
    /// answer takes [`CycleFinder::add_valued`].
    pub fn spanned(&self, vector: &[(u32, Ratio<i64>)]) -> Option<bool> {
        self.potentials.spanned(vector)
    }

    /// For a vector in the span, the value the combination predicts (what
    /// [`Dependence::predicted`] would be, up to rounding) and the size of
    /// the numbers summed for it, to bound that rounding.
    pub fn carried_value(&self, vector: &[(u32, Ratio<i64>)]) -> (f64, f64) {
        self.potentials.value(vector)
    }

    /// Adds reaction `reaction` with species coefficients `vector`.
    ///
    /// When the vector is a linear combination of the independent
    /// reactions added before, returns that combination, `vector = Σ m_i
    /// r_i` as `(reaction id, m_i)` sorted by reaction id, and keeps the
    /// basis unchanged; a zero vector gives an empty combination. Otherwise
    /// the reaction joins the basis and `None` is returned. Repeated
    /// species ids in `vector` are summed.
    pub fn add(
        &mut self,
        reaction: usize,
        vector: &[(u32, Ratio<i64>)],
    ) -> Option<Vec<(usize, BigRational)>> {
        let dependence = self.add_valued(reaction, vector, 0.0)?;
        Some(
            self.expand(&dependence.used)
                .into_iter()
                .map(|(r, m)| (r, m.to_big()))
                .collect(),
        )
    }

    /// [`CycleFinder::add`] carrying a value per reaction (ln K), which
    /// combines like the vectors do: for a dependent reaction the value
    /// the combination predicts comes back at once, without expanding the
    /// combination; [`CycleFinder::combination`] expands it when needed.
    pub fn add_valued(
        &mut self,
        reaction: usize,
        vector: &[(u32, Ratio<i64>)],
        value: f64,
    ) -> Option<Dependence> {
        let mut scratch = std::mem::take(&mut self.scratch);
        let result = self.reduce_and_insert(&mut scratch, reaction, vector, value);
        self.scratch = scratch;
        result
    }

    /// The multipliers of original reactions, sorted by reaction id, of a
    /// dependence, as `f64`.
    pub fn combination(&self, dependence: &Dependence) -> Vec<(usize, f64)> {
        self.expand(&dependence.used)
            .iter()
            .map(|(r, m)| (*r, q_to_f64(m)))
            .collect()
    }

    /// The finder as it stood before reaction `reaction` was added, when
    /// reactions were added in increasing order: the basis vectors of the
    /// earlier reactions. Occurrence counts are not kept; the caller
    /// gives them back with [`CycleFinder::count`] for each earlier
    /// reaction it had added, so that the next pivots are chosen as before.
    pub fn before(&self, reaction: usize) -> CycleFinder {
        let kept = self.basis.partition_point(|b| b.reaction < reaction);
        let basis: Vec<BasisVector> = self.basis[..kept].to_vec();
        let pivoted: Vec<Pivoted> = self.pivoted[..kept].to_vec();
        let end = pivoted.last().map_or(0, |p| {
            (p.start as usize + p.len as usize).min(self.integers.len())
        });
        let mut pivot_of = vec![NONE; self.pivot_of.len()];
        for (k, p) in pivoted.iter().enumerate() {
            pivot_of[p.pivot as usize] = k as u32;
        }
        let integers = self.integers[..end].to_vec();
        let potentials = Potentials::rebuilt(&pivoted, &integers);
        CycleFinder {
            basis,
            pivoted,
            integers,
            pivot_of,
            occurrences: Vec::new(),
            scratch: Scratch::default(),
            potentials,
        }
    }

    /// Count the species of `vector` as adding it does, without adding it.
    pub fn count(&mut self, vector: &[(u32, Ratio<i64>)]) {
        for (s, c) in vector {
            if c.is_zero() {
                continue;
            }
            let i = *s as usize;
            if i >= self.occurrences.len() {
                self.occurrences.resize(i + 1, 0);
            }
            self.occurrences[i] += 1;
        }
    }

    fn reduce_and_insert(
        &mut self,
        scratch: &mut Scratch,
        reaction: usize,
        vector: &[(u32, Ratio<i64>)],
        value: f64,
    ) -> Option<Dependence> {
        self.count(vector);
        let Reduction {
            used,
            predicted,
            rest,
        } = self.reduce(scratch, vector);
        if rest.is_empty() {
            return Some(Dependence { used, predicted });
        }
        self.insert(rest, reaction, value, used, predicted);
        None
    }

    /// The reduction of `vector` against the basis as it stands.
    fn reduce(&self, scratch: &mut Scratch, vector: &[(u32, Ratio<i64>)]) -> Reduction {
        match self.reduce_on_integers(scratch, vector) {
            Some(reduction) => reduction,
            None => self.reduce_exactly(scratch, vector),
        }
    }

    /// Reduce each of `vectors` against the basis as it stands, on every
    /// core, for [`CycleFinder::add_reduced`] to finish in order.
    pub fn reduce_ahead(
        &self,
        ahead: &mut Lookahead,
        vectors: &[&[(u32, Ratio<i64>)]],
    ) -> Vec<Provisional> {
        // Below this many vectors a batch is reduced on this thread alone:
        // handing work to another core costs more than it saves.
        const ALONE: usize = 64;
        let runs = if vectors.len() < ALONE {
            1
        } else {
            crate::parallel::cores().max(1)
        };
        if ahead.scratches.len() < runs {
            ahead.scratches.resize_with(runs, Scratch::default);
        }
        let against = self.basis.len();
        crate::parallel::map_with_states(&mut ahead.scratches[..runs], vectors, |scratch, v| {
            Provisional {
                reduction: self.reduce(scratch, v),
                against,
            }
        })
    }

    /// [`CycleFinder::add_valued`] for a reaction whose reduction was made
    /// ahead by [`CycleFinder::reduce_ahead`] with this `vector`; reactions
    /// must still be added in order, and the answer is the one
    /// `add_valued` gives.
    pub fn add_reduced(
        &mut self,
        reaction: usize,
        vector: &[(u32, Ratio<i64>)],
        value: f64,
        provisional: Provisional,
    ) -> Option<Dependence> {
        self.count(vector);
        let Provisional {
            reduction:
                Reduction {
                    mut used,
                    mut predicted,
                    mut rest,
                },
            against,
        } = provisional;
        // What is left may hold pivots of vectors that joined the basis
        // after the reduction was made; only those are left to subtract.
        if !rest.is_empty() && self.basis.len() > against {
            let mut scratch = std::mem::take(&mut self.scratch);
            for (s, x) in rest {
                scratch.add_to(s, &x);
            }
            self.exact_steps(&mut scratch, against, &mut used, &mut predicted);
            rest = scratch.drain();
            self.scratch = scratch;
        }
        if rest.is_empty() {
            return Some(Dependence { used, predicted });
        }
        self.insert(rest, reaction, value, used, predicted);
        None
    }

    /// The reduction of `vector` on machine integers, the usual case: the
    /// vector is kept as integer numerators over one denominator and each
    /// basis vector as integers, so that no step reduces a fraction. Both
    /// paths subtract the same basis vectors in the same order, so they
    /// agree exactly; `None` (with the scratch space cleared) hands a
    /// vector this path cannot take, or one whose numbers overflow, to
    /// [`CycleFinder::reduce_exactly`].
    fn reduce_on_integers(
        &self,
        scratch: &mut Scratch,
        vector: &[(u32, Ratio<i64>)],
    ) -> Option<Reduction> {
        scratch.denominator = 1;
        let reduced = self.integer_steps(scratch, vector);
        if reduced.is_none() {
            scratch.drain_integers();
        }
        let (used, predicted) = reduced?;
        Some(Reduction {
            used,
            predicted,
            rest: scratch.drain_integers(),
        })
    }

    /// The steps of [`CycleFinder::reduce_on_integers`], leaving what is
    /// left of the vector in the scratch space.
    ///
    /// With the vector at `W / D` and a basis vector `b / p` (integers `b`,
    /// pivot integer `p`), subtracting `W[pivot] / D` times it gives
    /// `(p' W − w' b) / (D p')`, where `p' = p / g`, `w' = W[pivot] / g` and
    /// `g = gcd(p, W[pivot])`; with `p = 1`, the usual case, only `W`
    /// changes.
    fn integer_steps(
        &self,
        scratch: &mut Scratch,
        vector: &[(u32, Ratio<i64>)],
    ) -> Option<(Vec<(u32, Q)>, f64)> {
        for (s, c) in vector {
            if !c.is_integer() {
                return None;
            }
            scratch.add_integer(*s, *c.numer())?;
        }
        scratch.heap.clear();
        for &s in &scratch.integer_touched {
            if scratch.integer(s) != 0
                && let Some(k) = self.pivot_of(s)
            {
                scratch.heap.push(Reverse(k));
            }
        }
        let mut used: Vec<(u32, Q)> = Vec::new();
        let mut predicted = 0.0;
        let mut last = None;
        while let Some(k) = scratch.next_queued(&mut last) {
            let b = self.pivoted[k];
            let w = scratch.integer(b.pivot);
            if w == 0 {
                continue;
            }
            if b.denominator == 0 {
                return None;
            }
            // The multiplier, as the exact path has it: reduced, with a
            // positive denominator.
            let c = Ratio::new(w, scratch.denominator);
            let g = i64::try_from(gcd_i64(b.denominator, w)).ok()?;
            let (p, w) = (b.denominator / g, w / g);
            if p != 1 {
                scratch.scale_integers(p)?;
            }
            let minus_w = w.checked_neg()?;
            let values = &self.integers[b.start as usize..(b.start + b.len) as usize];
            for &(s, x) in values {
                let sum = scratch.add_integer(s, minus_w.checked_mul(x)?)?;
                if s != b.pivot && sum != 0 {
                    self.queue_if_younger(&mut scratch.heap, s, k);
                }
            }
            let c = Q::Small(c);
            predicted += q_to_f64(&c) * b.value;
            used.push((k as u32, c));
        }
        Some((used, predicted))
    }

    /// Queue the basis vector whose pivot is `s`, when it is younger than
    /// vector `k`, which just brought `s` in: subtracting `k` can only bring
    /// in pivots of younger vectors, which the reduction takes later.
    fn queue_if_younger(&self, heap: &mut BinaryHeap<Reverse<usize>>, s: u32, k: usize) {
        if let Some(j) = self.pivot_of(s)
            && j > k
        {
            heap.push(Reverse(j));
        }
    }

    /// The reduction of `vector` on exact rationals, for any vector.
    fn reduce_exactly(&self, scratch: &mut Scratch, vector: &[(u32, Ratio<i64>)]) -> Reduction {
        for (s, c) in vector {
            if !c.is_zero() {
                scratch.add_to(*s, &Q::from_ratio(c));
            }
        }
        // The basis vectors subtracted, with their multipliers.
        let mut used: Vec<(u32, Q)> = Vec::new();
        let mut predicted = 0.0;
        self.exact_steps(scratch, 0, &mut used, &mut predicted);
        Reduction {
            used,
            predicted,
            rest: scratch.drain(),
        }
    }

    /// The steps of [`CycleFinder::reduce_exactly`] on the vector in the
    /// scratch space, through basis vectors `from` and younger, adding to
    /// `used` and `predicted`.
    fn exact_steps(
        &self,
        scratch: &mut Scratch,
        from: usize,
        used: &mut Vec<(u32, Q)>,
        predicted: &mut f64,
    ) {
        scratch.heap.clear();
        for &s in &scratch.touched {
            if let Some(k) = self.pivot_of(s)
                && k >= from
            {
                scratch.heap.push(Reverse(k));
            }
        }
        let mut last = None;
        while let Some(k) = scratch.next_queued(&mut last) {
            let (b, pivot) = (&self.basis[k], self.pivoted[k].pivot);
            let Some(c) = scratch.get(pivot).cloned() else {
                continue;
            };
            let minus_c = c.neg();
            for (s, x) in &b.entries {
                scratch.add_to(*s, &minus_c.mul(x));
                if *s != pivot && scratch.get(*s).is_some() {
                    self.queue_if_younger(&mut scratch.heap, *s, k);
                }
            }
            *predicted += q_to_f64(&c) * self.pivoted[k].value;
            used.push((k as u32, c));
        }
    }

    /// Makes the nonzero rest of a reduction a basis vector.
    fn insert(
        &mut self,
        work: Vec<(u32, Q)>,
        reaction: usize,
        value: f64,
        mut used: Vec<(u32, Q)>,
        predicted: f64,
    ) {
        // The rarest species becomes the pivot (Markowitz-style: few later
        // reactions will contain it); ties go to the largest id, which in a
        // file read in order is the newest species.
        let (pivot, pivot_c) = work
            .iter()
            .min_by_key(|(s, _)| (self.occurrences[*s as usize], Reverse(*s)))
            .map(|(s, c)| (*s, c.clone()))
            .unwrap_or((0, Q::Small(Ratio::zero())));
        let scale = pivot_c.recip();
        let mut entries: Vec<(u32, Q)> =
            work.into_iter().map(|(s, c)| (s, c.mul(&scale))).collect();
        entries.sort_by_key(|(s, _)| *s);
        let p = pivot as usize;
        if p >= self.pivot_of.len() {
            self.pivot_of.resize(p + 1, NONE);
        }
        self.pivot_of[p] = u32::try_from(self.basis.len()).unwrap_or(NONE);
        let value = q_to_f64(&scale) * (value - predicted);
        // The integer form, unless it does not fit; a vector without one
        // starts where the next would, so that `before` can cut the arena.
        let (start, len, denominator) = push_integers(&mut self.integers, &entries).unwrap_or((
            u32::try_from(self.integers.len()).unwrap_or(u32::MAX),
            0,
            0,
        ));
        self.pivoted.push(Pivoted {
            pivot,
            start,
            len,
            denominator,
            value,
        });
        used.shrink_to_fit();
        self.basis.push(BasisVector {
            entries,
            reaction,
            scale,
            reduced_by: used,
        });
        self.potentials
            .joined(self.pivoted.len() - 1, &self.pivoted, &self.integers);
    }

    /// Σ c_k · b_k over basis vectors, in original reactions: sorted by
    /// reaction id, nonzero multipliers only. Each basis vector refers only
    /// to older ones, so taking the newest first visits each once.
    fn expand(&self, used: &[(u32, Q)]) -> Vec<(usize, Q)> {
        // Multipliers still to expand, by basis vector, and the order to
        // take them in: newest first (a max-heap of the pending indexes,
        // each pushed once, when its multiplier appears).
        let mut pending: rustc_hash::FxHashMap<u32, Q> = rustc_hash::FxHashMap::default();
        let mut order: BinaryHeap<u32> = BinaryHeap::new();
        fn add(
            pending: &mut rustc_hash::FxHashMap<u32, Q>,
            order: &mut BinaryHeap<u32>,
            k: u32,
            x: Q,
        ) {
            match pending.entry(k) {
                std::collections::hash_map::Entry::Occupied(mut slot) => {
                    let sum = slot.get().add(&x);
                    *slot.get_mut() = sum;
                }
                std::collections::hash_map::Entry::Vacant(slot) => {
                    slot.insert(x);
                    order.push(k);
                }
            }
        }
        for (k, c) in used {
            add(&mut pending, &mut order, *k, c.clone());
        }
        let mut out: Vec<(usize, Q)> = Vec::new();
        while let Some(k) = order.pop() {
            let Some(a) = pending.remove(&k) else {
                continue;
            };
            if a.is_zero() {
                continue;
            }
            let b = &self.basis[k as usize];
            // b = scale · (r − Σ c_j b_j), so a · b = t · r − Σ t c_j b_j.
            let t = a.mul(&b.scale);
            for (j, c) in &b.reduced_by {
                add(&mut pending, &mut order, *j, t.mul(c).neg());
            }
            out.push((b.reaction, t));
        }
        out.sort_by_key(|(r, _)| *r);
        let mut merged: Vec<(usize, Q)> = Vec::with_capacity(out.len());
        for (r, m) in out {
            match merged.last_mut() {
                Some((lr, lm)) if *lr == r => *lm = lm.add(&m),
                _ => merged.push((r, m)),
            }
        }
        merged.retain(|(_, m)| !m.is_zero());
        merged
    }
}

/// The canonical stoichiometry of a reaction: duplicates, reverses and
/// multiples share it. It is the primitive integer vector along the
/// reaction (coprime integers, the first one positive), on machine
/// integers when they fit and on big integers when they do not; the form is
/// a function of the vector alone, so equal vectors always meet.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub enum CanonicalKey {
    Small(Vec<(u32, i64)>),
    Big(Vec<(u32, BigInt)>),
}

impl CanonicalKey {
    pub fn is_empty(&self) -> bool {
        match self {
            CanonicalKey::Small(v) => v.is_empty(),
            CanonicalKey::Big(v) => v.is_empty(),
        }
    }
}

/// Normalises a reaction vector so that duplicates, reverses and multiples
/// share a key: species sorted by id, repeated ids summed, zeros dropped,
/// and the result scaled to its primitive integer form with the first
/// coefficient positive. Returns the key and the scale with `vector = scale
/// · key`; a negative scale means the reaction is written reversed relative
/// to the key. A vector with no nonzero coefficient has an empty key and
/// scale zero.
pub fn canonical_key(vector: &[(u32, Ratio<i64>)]) -> (CanonicalKey, BigRational) {
    match canonical_small(vector) {
        Some((key, first, lead)) => {
            // vector = first / key[0] · key.
            let scale = BigRational::new(
                BigInt::from(*first.numer()),
                BigInt::from(*first.denom()) * BigInt::from(lead),
            );
            (key, scale)
        }
        None => canonical_big(vector),
    }
}

/// The key of [`canonical_key`] alone, without building the scale: most
/// reactions meet no other, and only those that do need it.
pub fn canonical_form(vector: &[(u32, Ratio<i64>)]) -> CanonicalKey {
    match canonical_small(vector) {
        Some((key, _, _)) => key,
        None => canonical_big(vector).0,
    }
}

/// [`canonical_key`] on `i64`: the key, the first nonzero coefficient and
/// the key's first entry (`scale = first / lead`); `None` when a value does
/// not fit.
fn canonical_small(vector: &[(u32, Ratio<i64>)]) -> Option<(CanonicalKey, Ratio<i64>, i64)> {
    integer_net(vector).or_else(|| canonical_general(vector))
}

/// [`canonical_small`] of what a reaction's net vector nearly always is:
/// species in increasing order, each once, with a nonzero integer
/// coefficient. Its key is the vector divided by the gcd of the
/// coefficients, signed so that the first is positive, with no sorting,
/// merging or reducing of fractions. `None` for any other vector.
fn integer_net(vector: &[(u32, Ratio<i64>)]) -> Option<(CanonicalKey, Ratio<i64>, i64)> {
    let (_, first) = *vector.first()?;
    let mut g: i64 = 0;
    let mut last: Option<u32> = None;
    for (s, c) in vector {
        let n = *c.numer();
        if *c.denom() != 1 || n == 0 || n == i64::MIN || last.is_some_and(|l| l >= *s) {
            return None;
        }
        last = Some(*s);
        g = num_integer::gcd(g, n);
    }
    let unit = if first.numer() < &0 { -g } else { g };
    let ints: Vec<(u32, i64)> = vector.iter().map(|(s, c)| (*s, c.numer() / unit)).collect();
    let lead = ints[0].1;
    Some((CanonicalKey::Small(ints), first, lead))
}

/// [`canonical_small`] of any vector.
fn canonical_general(vector: &[(u32, Ratio<i64>)]) -> Option<(CanonicalKey, Ratio<i64>, i64)> {
    let mut v: Vec<(u32, Ratio<i64>)> = Vec::with_capacity(vector.len());
    for (s, c) in vector {
        if *c.denom() == 0 {
            // An unreduced zero denominator counts as zero, as in `big`.
            continue;
        }
        if *c.numer() == i64::MIN || *c.denom() == i64::MIN {
            // Reducing these could overflow; the big path takes them.
            return None;
        }
        v.push((*s, Ratio::new(*c.numer(), *c.denom())));
    }
    v.sort_unstable_by_key(|(s, _)| *s);
    let mut merged: Vec<(u32, Ratio<i64>)> = Vec::with_capacity(v.len());
    for (s, c) in v {
        match merged.last_mut() {
            Some((ls, lc)) if *ls == s => *lc = lc.checked_add(&c)?,
            _ => merged.push((s, c)),
        }
    }
    merged.retain(|(_, c)| !c.is_zero());
    let Some(first) = merged.first().map(|(_, c)| *c) else {
        return Some((CanonicalKey::Small(Vec::new()), Ratio::zero(), 1));
    };
    let mut lcm: i64 = 1;
    for (_, c) in &merged {
        let d = *c.denom();
        lcm = lcm.checked_mul(d / num_integer::gcd(lcm, d))?;
    }
    let mut ints: Vec<(u32, i64)> = Vec::with_capacity(merged.len());
    let mut g: i64 = 0;
    for (s, c) in &merged {
        let n = c.numer().checked_mul(&(lcm / c.denom()))?;
        g = num_integer::gcd(g, n);
        ints.push((*s, n));
    }
    let sign: i64 = if ints[0].1 < 0 { -1 } else { 1 };
    let unit = g.checked_mul(sign)?;
    for (_, n) in &mut ints {
        *n /= unit;
    }
    let lead = ints[0].1;
    Some((CanonicalKey::Small(ints), first, lead))
}

/// [`canonical_key`] on big integers.
fn canonical_big(vector: &[(u32, Ratio<i64>)]) -> (CanonicalKey, BigRational) {
    let mut v: Vec<(u32, BigRational)> = vector.iter().map(|(s, c)| (*s, big(c))).collect();
    v.sort_by_key(|(s, _)| *s);
    let mut merged: Vec<(u32, BigRational)> = Vec::with_capacity(v.len());
    for (s, c) in v {
        match merged.last_mut() {
            Some((ls, lc)) if *ls == s => *lc += c,
            _ => merged.push((s, c)),
        }
    }
    merged.retain(|(_, c)| !c.is_zero());
    let Some(first) = merged.first().map(|(_, c)| c.clone()) else {
        return (CanonicalKey::Small(Vec::new()), BigRational::zero());
    };
    let mut lcm = BigInt::from(1);
    for (_, c) in &merged {
        lcm = num_integer::Integer::lcm(&lcm, c.denom());
    }
    let mut ints: Vec<(u32, BigInt)> = merged
        .iter()
        .map(|(s, c)| (*s, c.numer() * (&lcm / c.denom())))
        .collect();
    let mut g = BigInt::zero();
    for (_, n) in &ints {
        g = num_integer::Integer::gcd(&g, n);
    }
    if ints[0].1 < BigInt::zero() {
        g = -g;
    }
    for (_, n) in &mut ints {
        *n = &*n / &g;
    }
    let scale = first / BigRational::from_integer(ints[0].1.clone());
    match ints
        .iter()
        .map(|(s, n)| n.to_i64().map(|n| (*s, n)))
        .collect::<Option<Vec<_>>>()
    {
        Some(small) => (CanonicalKey::Small(small), scale),
        None => (CanonicalKey::Big(ints), scale),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_traits::One;

    fn q(n: i64) -> Ratio<i64> {
        Ratio::from_integer(n)
    }

    fn bq(n: i64, d: i64) -> BigRational {
        BigRational::new(BigInt::from(n), BigInt::from(d))
    }

    /// Σ m_i r_i over the reactions stored in `all`.
    fn recombine(
        all: &[Vec<(u32, Ratio<i64>)>],
        combo: &[(usize, BigRational)],
    ) -> Vec<(u32, BigRational)> {
        let mut acc: HashMap<u32, BigRational> = HashMap::new();
        for (r, m) in combo {
            for (s, c) in &all[*r] {
                *acc.entry(*s).or_insert_with(BigRational::zero) += m * big(c);
            }
        }
        let mut v: Vec<(u32, BigRational)> =
            acc.into_iter().filter(|(_, c)| !c.is_zero()).collect();
        v.sort_by_key(|(s, _)| *s);
        v
    }

    fn normal(v: &[(u32, Ratio<i64>)]) -> Vec<(u32, BigRational)> {
        let mut acc: HashMap<u32, BigRational> = HashMap::new();
        for (s, c) in v {
            *acc.entry(*s).or_insert_with(BigRational::zero) += big(c);
        }
        let mut out: Vec<(u32, BigRational)> =
            acc.into_iter().filter(|(_, c)| !c.is_zero()).collect();
        out.sort_by_key(|(s, _)| *s);
        out
    }

    #[test]
    fn triangle_cycle() {
        // A <=> B, B <=> C, then A <=> C = r0 + r1 (common practice example).
        let (a, b, c) = (0, 1, 2);
        let mut f = CycleFinder::new();
        assert_eq!(f.add(0, &[(a, q(-1)), (b, q(1))]), None);
        assert_eq!(f.add(1, &[(b, q(-1)), (c, q(1))]), None);
        let combo = f.add(2, &[(a, q(-1)), (c, q(1))]);
        assert_eq!(combo, Some(vec![(0, bq(1, 1)), (1, bq(1, 1))]));
        // 2 C <=> 2 A is -2 (r0 + r1).
        let combo = f.add(3, &[(c, q(-2)), (a, q(2))]);
        assert_eq!(combo, Some(vec![(0, bq(-2, 1)), (1, bq(-2, 1))]));
        assert_eq!(f.rank(), 2);
        assert_eq!(f.add(4, &[]), Some(vec![]));
    }

    #[test]
    fn fractional_multipliers() {
        // 2 H2 + O2 -> 2 H2O, then H2 + 1/2 O2 -> H2O is half of it.
        let mut f = CycleFinder::new();
        assert_eq!(f.add(7, &[(0, q(-2)), (1, q(-1)), (2, q(2))]), None);
        let half = [(0, q(-1)), (1, Ratio::new(-1, 2)), (2, q(1))];
        assert_eq!(f.add(8, &half), Some(vec![(7, bq(1, 2))]));
    }

    /// A deterministic generator (splitmix64) so the test is repeatable.
    struct Rng(u64);
    impl Rng {
        fn next(&mut self) -> u64 {
            self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
            let mut z = self.0;
            z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            z ^ (z >> 31)
        }
        fn below(&mut self, n: u64) -> u64 {
            self.next() % n
        }
    }

    /// Reaction vectors, and whether each was built from earlier ones.
    pub(super) type Library = (Vec<Vec<(u32, Ratio<i64>)>>, Vec<bool>);

    /// Reactions shaped like a kinetics library of sub-mechanisms that
    /// share species: elementary steps (`A + B -> C + D`, `A -> B + C`,
    /// `2 A -> B`, coefficients 1 and sometimes 2) over species near a
    /// moving centre (a fuel's sub-mechanism) and, for a third of the
    /// participants, a small pool of common radicals and molecules. One
    /// reaction in five restates earlier ones: a reverse, a duplicate, a
    /// multiple or the net of two or three recent steps (a cycle).
    pub(super) fn library(n: usize, seed: u64) -> Library {
        const COMMON: u64 = 12;
        let mut rng = Rng(seed);
        let mut all: Vec<Vec<(u32, Ratio<i64>)>> = Vec::with_capacity(n);
        let mut derived = Vec::with_capacity(n);
        for i in 0..n {
            if i > 10 && rng.below(5) == 0 {
                let parts = 1 + rng.below(3) as usize;
                let mut v: Vec<(u32, Ratio<i64>)> = Vec::new();
                for _ in 0..parts {
                    let back = 1 + rng.below(i.min(30) as u64) as usize;
                    let m = [q(1), q(-1), q(2), Ratio::new(1, 2), q(-1)][rng.below(5) as usize];
                    v.extend(all[i - back].iter().map(|(s, c)| (*s, c * m)));
                }
                all.push(v);
                derived.push(true);
                continue;
            }
            let centre = COMMON + (i as u64 * 2) / 5;
            let pick = |rng: &mut Rng| {
                if rng.below(3) == 0 {
                    rng.below(COMMON) as u32
                } else {
                    (centre + rng.below(12)) as u32
                }
            };
            let (left, right) = [(2, 2), (1, 2), (2, 1), (1, 1), (2, 3)][rng.below(5) as usize];
            let mut v: Vec<(u32, Ratio<i64>)> = Vec::new();
            for j in 0..left + right {
                let c = if rng.below(10) == 0 { 2 } else { 1 };
                let s = pick(&mut rng);
                v.push((s, if j < left { q(-c) } else { q(c) }));
            }
            all.push(v);
            derived.push(false);
        }
        (all, derived)
    }

    #[test]
    fn twenty_thousand_sparse_reactions() {
        let (all, derived) = library(20_000, 42);
        let start = std::time::Instant::now();
        let mut f = CycleFinder::new();
        let results: Vec<Option<Vec<(usize, BigRational)>>> =
            all.iter().enumerate().map(|(i, v)| f.add(i, v)).collect();
        let elapsed = start.elapsed();
        eprintln!("20000 reactions added in {elapsed:?}, rank {}", f.rank());
        let mut dependent = 0;
        for (i, result) in results.iter().enumerate() {
            match result {
                Some(combo) => {
                    dependent += 1;
                    // Every tenth combination is rebuilt exactly (all of
                    // them would triple the test time).
                    if dependent % 10 == 0 {
                        assert_eq!(recombine(&all, combo), normal(&all[i]), "reaction {i}");
                    }
                    assert!(combo.iter().all(|(r, _)| *r < i && results[*r].is_none()));
                }
                None => assert!(!derived[i], "derived reaction {i} was called independent"),
            }
        }
        assert_eq!(dependent + f.rank(), all.len());
        // Debug builds on a shared two-core machine: generous, but catches
        // quadratic blow-up.
        assert!(elapsed.as_secs_f64() < 30.0, "took {elapsed:?}");
    }

    /// A finder taken back to before a reaction and given the counts of
    /// the earlier ones answers every later reaction as the finder that
    /// never stopped.
    #[test]
    fn resuming_before_a_reaction_answers_as_an_unbroken_run() {
        let (all, _) = library(3_000, 7);
        let mut whole = CycleFinder::new();
        let answers: Vec<_> = all
            .iter()
            .enumerate()
            .map(|(i, v)| whole.add(i, v))
            .collect();
        for from in [0, 1, 1_000, 2_999, 3_000] {
            let mut resumed = whole.before(from);
            for v in &all[..from] {
                resumed.count(v);
            }
            for (i, v) in all.iter().enumerate().skip(from) {
                assert_eq!(resumed.add(i, v), answers[i], "reaction {i} after {from}");
            }
            assert_eq!(resumed.rank(), whole.rank());
        }
    }

    /// Before each reaction is added, the fingerprint tells whether it
    /// depends on the earlier ones exactly as the reduction then finds,
    /// and the potentials carry the value the reduction predicts; so does
    /// a finder taken back to before a reaction.
    #[test]
    fn fingerprints_and_potentials_answer_as_the_reduction() {
        for seed in [3, 19, 2_024] {
            let (all, _) = library(3_000, seed);
            let values: Vec<f64> = (0..all.len())
                .map(|i| ((i * 7_919 + seed as usize) % 1_000) as f64 / 37.0 - 13.0)
                .collect();
            let mut finder = CycleFinder::new();
            let mut dependent = 0;
            for (i, v) in all.iter().enumerate() {
                let told = finder.spanned(v);
                let (carried, size) = finder.carried_value(v);
                let answer = finder.add_valued(i, v, values[i]);
                assert_eq!(told, Some(answer.is_some()), "reaction {i}, seed {seed}");
                if let Some(d) = answer {
                    dependent += 1;
                    let off = (carried - d.predicted).abs();
                    assert!(
                        off <= 1e-9 * (1.0 + size),
                        "reaction {i}: {carried} against {}",
                        d.predicted
                    );
                }
            }
            assert!(dependent > 500, "{dependent} dependent reactions");
            // Every reaction is in the span of the whole basis.
            assert!(all.iter().all(|v| finder.spanned(v) == Some(true)));
            let resumed = finder.before(1_500);
            let mut again = CycleFinder::new();
            for (i, v) in all.iter().enumerate().take(1_500) {
                again.add_valued(i, v, values[i]);
            }
            for v in &all[1_500..] {
                assert_eq!(resumed.spanned(v), again.spanned(v));
                assert_eq!(
                    resumed.carried_value(v).0.to_bits(),
                    again.carried_value(v).0.to_bits()
                );
            }
        }
    }

    /// What an answer says, bit for bit: the basis vectors subtracted with
    /// their multipliers, and the predicted value's bits.
    fn answer(d: &Option<Dependence>) -> Option<(Vec<(u32, Q)>, u64)> {
        d.as_ref().map(|d| (d.used.clone(), d.predicted.to_bits()))
    }

    /// Add `all` in batches of `batch`, each reduced ahead against the
    /// basis as it stood, and give every answer.
    fn add_in_batches(
        all: &[Vec<(u32, Ratio<i64>)>],
        values: &[f64],
        batch: usize,
    ) -> (CycleFinder, Vec<Option<Dependence>>) {
        let mut finder = CycleFinder::new();
        let mut ahead = Lookahead::default();
        let mut answers = Vec::with_capacity(all.len());
        for (b, chunk) in all.chunks(batch).enumerate() {
            let vectors: Vec<&[(u32, Ratio<i64>)]> = chunk.iter().map(Vec::as_slice).collect();
            let provisional = finder.reduce_ahead(&mut ahead, &vectors);
            for (j, p) in provisional.into_iter().enumerate() {
                let i = b * batch + j;
                answers.push(finder.add_reduced(i, &all[i], values[i], p));
            }
        }
        (finder, answers)
    }

    /// Reductions made ahead in batches, on every core, against the basis
    /// as it stood give the answers of adding one reaction at a time, bit
    /// for bit, and leave the same basis behind.
    #[test]
    fn reductions_made_ahead_answer_as_one_at_a_time() {
        let (all, _) = library(3_000, 11);
        let values: Vec<f64> = (0..all.len())
            .map(|i| ((i * 7_919) % 1_000) as f64 / 37.0 - 13.0)
            .collect();
        // A reaction after the last: the net of three earlier ones.
        let extra: Vec<(u32, Ratio<i64>)> = [10, 2_000, 2_999]
            .iter()
            .flat_map(|&i| all[i].iter().copied())
            .collect();
        for batch in [1, 5, 64, 700, 3_000] {
            let mut one = CycleFinder::new();
            let answers: Vec<Option<Dependence>> = all
                .iter()
                .enumerate()
                .map(|(i, v)| one.add_valued(i, v, values[i]))
                .collect();
            assert!(answers.iter().filter(|a| a.is_some()).count() > 500);
            let (mut finder, got) = add_in_batches(&all, &values, batch);
            assert_eq!(finder.rank(), one.rank(), "batches of {batch}");
            for (i, (a, b)) in answers.iter().zip(&got).enumerate() {
                assert_eq!(answer(a), answer(b), "reaction {i}, batches of {batch}");
                if let (Some(a), Some(b)) = (a, b) {
                    assert_eq!(one.combination(a), finder.combination(b));
                }
            }
            // The basis left behind answers a later reaction as the other.
            let (a, b) = (
                one.add_valued(3_000, &extra, 1.5),
                finder.add_valued(3_000, &extra, 1.5),
            );
            assert!(a.is_some());
            assert_eq!(answer(&a), answer(&b));
        }
    }

    /// The rank of the reactions' matrix over species `0..species`, from
    /// the nullspace routine of `balance`.
    fn rank_of(all: &[Vec<(u32, Ratio<i64>)>], species: u32) -> usize {
        let matrix: Vec<Vec<BigRational>> = (0..species)
            .map(|s| {
                all.iter()
                    .map(|v| v.iter().filter(|(x, _)| *x == s).map(|(_, c)| big(c)).sum())
                    .collect()
            })
            .collect();
        all.len() - crate::chem::balance::nullspace(matrix).len()
    }

    #[test]
    fn rank_agrees_with_dense_elimination() {
        // Cross-check on small dense-ish random sets: the rank kept equals
        // the rank of the matrix, from the nullspace routine of `balance`.
        for seed in 0..20 {
            let mut rng = Rng(seed);
            let n = 12 + rng.below(10) as usize;
            let species = 4 + rng.below(8) as u32;
            let all: Vec<Vec<(u32, Ratio<i64>)>> = (0..n)
                .map(|_| {
                    (0..2 + rng.below(4))
                        .map(|_| {
                            (
                                rng.below(u64::from(species)) as u32,
                                q(rng.below(7) as i64 - 3),
                            )
                        })
                        .collect()
                })
                .collect();
            let mut f = CycleFinder::new();
            for (i, v) in all.iter().enumerate() {
                if let Some(combo) = f.add(i, v) {
                    assert_eq!(recombine(&all, &combo), normal(v));
                }
            }
            assert_eq!(f.rank(), rank_of(&all, species), "seed {seed}");
        }
    }

    #[test]
    fn unreduced_and_degenerate_inputs() {
        // Callers may build ratios without reducing them; a zero
        // denominator counts as zero instead of panicking.
        let mut f = CycleFinder::new();
        assert_eq!(f.add(0, &[(1, Ratio::new_raw(2, 4)), (2, q(1))]), None);
        let combo = f.add(
            1,
            &[
                (1, Ratio::new_raw(-1, -2)),
                (2, q(1)),
                (3, Ratio::new_raw(5, 0)),
            ],
        );
        assert_eq!(combo, Some(vec![(0, BigRational::one())]));
        let (key, scale) = canonical_key(&[(4, Ratio::new_raw(3, 6)), (2, Ratio::new_raw(-2, 2))]);
        assert_eq!(key, CanonicalKey::Small(vec![(2, 2), (4, -1)]));
        assert_eq!(scale, bq(-1, 2));
    }

    #[test]
    fn canonical_keys() {
        let fwd = [(3, q(-1)), (1, q(-2)), (5, q(2))];
        let rev = [(5, q(-2)), (1, q(2)), (3, q(1))];
        let dbl = [(1, q(-4)), (3, q(-1)), (3, q(-1)), (5, q(4)), (9, q(0))];
        let (k1, s1) = canonical_key(&fwd);
        let (k2, s2) = canonical_key(&rev);
        let (k3, s3) = canonical_key(&dbl);
        assert_eq!(k1, k2);
        assert_eq!(k1, k3);
        assert_eq!(k1, CanonicalKey::Small(vec![(1, 2), (3, 1), (5, -2)]));
        assert_eq!((s1, s2, s3), (bq(-1, 1), bq(1, 1), bq(-2, 1)));
        assert_eq!(
            canonical_key(&[(1, q(1)), (1, q(-1))]),
            (CanonicalKey::Small(vec![]), BigRational::zero())
        );
        // Beyond 64 bits the key moves to big integers and still meets its
        // multiples: (2^62, 3) and (2^63, 6) scale to one key.
        let huge = [(1, q(1 << 62)), (2, Ratio::new(1, 1 << 62))];
        let twice = [(1, q(i64::MAX)), (2, Ratio::new(2, i64::MAX))];
        let (kh, _) = canonical_key(&huge);
        assert!(matches!(kh, CanonicalKey::Big(_)));
        let (kt, _) = canonical_key(&twice);
        assert!(matches!(kt, CanonicalKey::Big(_)));
        assert_ne!(kh, kt);
        let (kh2, sh2) = canonical_key(&[(1, q(-(1 << 62))), (2, Ratio::new(-1, 1 << 62))]);
        assert_eq!(kh, kh2);
        assert_eq!(sh2, -canonical_key(&huge).1);
    }

    /// Up to a dozen reactions over six species, with fractions and
    /// coefficients near and at the edge of 64 bits among the small ones.
    fn small_libraries() -> impl proptest::strategy::Strategy<Value = Vec<Vec<(u32, Ratio<i64>)>>> {
        use proptest::strategy::Strategy;
        proptest::collection::vec(
            proptest::collection::vec(
                (
                    0u32..6,
                    proptest::sample::select(vec![
                        (1i64, 1i64),
                        (-1, 1),
                        (2, 1),
                        (-3, 1),
                        (1, 2),
                        (-5, 3),
                        (1 << 40, 1),
                        (-(1 << 40), 1),
                        (3_037_000_499, 1),
                        (i64::MAX, 1),
                    ]),
                ),
                1..5,
            ),
            1..12,
        )
        .prop_map(|v| {
            v.iter()
                .map(|r| r.iter().map(|&(s, (n, d))| (s, Ratio::new(n, d))).collect())
                .collect()
        })
    }

    proptest::proptest! {
        /// Whichever path a reduction takes (machine integers over one
        /// denominator, or exact rationals when a value is a fraction or a
        /// product overflows), every combination rebuilds its reaction
        /// exactly and the rank is that of the matrix.
        #[test]
        fn both_reduction_paths_give_exact_combinations(
            all in small_libraries()
        ) {
            let mut f = CycleFinder::new();
            for (i, r) in all.iter().enumerate() {
                if let Some(combo) = f.add(i, r) {
                    proptest::prop_assert_eq!(recombine(&all, &combo), normal(r));
                }
            }
            proptest::prop_assert_eq!(f.rank(), rank_of(&all, 6));
        }

        /// Batches reduced ahead agree with one reaction at a time on
        /// either reduction path, fractions and overflows included.
        #[test]
        fn batches_reduced_ahead_agree_on_both_paths(
            all in small_libraries(),
            batch in 1usize..6,
        ) {
            let values: Vec<f64> = (0..all.len()).map(|i| i as f64 * 0.37 - 1.0).collect();
            let mut one = CycleFinder::new();
            let (finder, got) = add_in_batches(&all, &values, batch);
            for (i, r) in all.iter().enumerate() {
                let a = one.add_valued(i, r, values[i]);
                proptest::prop_assert_eq!(answer(&a), answer(&got[i]));
            }
            proptest::prop_assert_eq!(finder.rank(), one.rank());
        }

        /// The integer fast path gives the key, first coefficient and lead
        /// of the general reading, and declines every vector it cannot read.
        #[test]
        fn integer_nets_read_as_the_general_path_reads_them(
            v in proptest::collection::vec((0u32..8, -6i64..7, 1i64..4), 0..7)
        ) {
            let vector: Vec<(u32, Ratio<i64>)> = v
                .iter()
                .map(|&(s, n, d)| (s, Ratio::new(n, d)))
                .collect();
            let general = canonical_general(&vector);
            proptest::prop_assert_eq!(canonical_small(&vector), general.clone());
            if let Some(fast) = integer_net(&vector) {
                proptest::prop_assert_eq!(Some(fast), general);
            }
        }

        /// Net vectors as reactions have them (sorted species, integers).
        #[test]
        fn sorted_integer_nets_take_the_fast_path(
            v in proptest::collection::btree_map(0u32..40, -9i64..10, 1..7)
        ) {
            let vector: Vec<(u32, Ratio<i64>)> =
                v.iter().map(|(&s, &n)| (s, Ratio::from_integer(n))).collect();
            let fast = integer_net(&vector);
            proptest::prop_assert_eq!(fast.is_some(), v.values().all(|&n| n != 0));
            if fast.is_some() {
                proptest::prop_assert_eq!(fast, canonical_general(&vector));
            }
        }
    }
}
