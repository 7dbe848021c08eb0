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
//! also stores its expression in terms of the original reactions, so the
//! combination of a dependent reaction comes out directly.
//!
//! Complexity: adding a reaction costs O(Σ_k (nnz(b_k) + nnz(combo_k)))
//! rational operations over the basis vectors `k` it touches, plus a sort of
//! the combination terms. The pivot of a new basis vector is its rarest
//! species (fewest occurrences so far), a Markowitz-style choice that keeps
//! fill-in low. For sparse libraries whose sub-mechanisms share a pool of
//! common species the touched set and the stored combinations stay bounded
//! (about 50 reactions each in the test below, which adds 20,000 reactions
//! in about 4 s in a debug build on a shared two-core machine), so the total
//! is linear in the number of reactions; the worst case (dense random networks) is
//! O(r² · s) for r independent reactions over s species, as for any exact
//! elimination. Numbers stay on `i64` rationals while they fit and move to
//! big rationals when they do not; combinations are summed as `i128`
//! numerators over a common denominator when that fits.

use std::cmp::Reverse;
use std::collections::{BinaryHeap, HashMap};

use num_bigint::BigInt;
use num_rational::{BigRational, Ratio};
use num_traits::{CheckedAdd, CheckedMul, ToPrimitive, Zero};

use super::balance::big;

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

/// A fast multiplicative hasher for small integer keys (the keys are our
/// own species and reaction ids, so hash flooding is not a concern).
#[derive(Default, Clone, Copy)]
struct IdHasher(u64);

impl std::hash::Hasher for IdHasher {
    fn finish(&self) -> u64 {
        self.0
    }

    fn write(&mut self, bytes: &[u8]) {
        for b in bytes {
            self.0 =
                (self.0.rotate_left(5) ^ u64::from(*b)).wrapping_mul(0x51_7c_c1_b7_27_22_0a_95);
        }
    }

    fn write_u32(&mut self, n: u32) {
        self.write_u64(u64::from(n));
    }

    fn write_u64(&mut self, n: u64) {
        self.0 = (self.0.rotate_left(5) ^ n).wrapping_mul(0x51_7c_c1_b7_27_22_0a_95);
    }

    fn write_usize(&mut self, n: usize) {
        self.write_u64(n as u64);
    }
}

type IdMap<K, V> = HashMap<K, V, std::hash::BuildHasherDefault<IdHasher>>;

struct BasisVector {
    pivot: u32,
    /// Species coefficients, sorted by id; the pivot's coefficient is 1.
    entries: Vec<(u32, Q)>,
    /// This vector as a combination of original reactions, sorted by id.
    combination: Combination,
}

/// The multipliers of a basis vector in terms of original reactions,
/// sorted by reaction id. Only one form is stored, which keeps the basis
/// small: integer numerators over one common denominator when that fits in
/// `i64` (the fast path of `expand`), exact rationals otherwise.
enum Combination {
    Scaled(i64, Vec<(usize, i64)>),
    Exact(Vec<(usize, Q)>),
}

impl Combination {
    fn new(terms: Vec<(usize, Q)>) -> Combination {
        match scale_combination(&terms) {
            Some((den, numerators)) => Combination::Scaled(den, numerators),
            None => Combination::Exact(terms),
        }
    }

    /// Appends `c · m` for every term `m` of the combination to `out`.
    fn push_times(&self, c: &Q, out: &mut Vec<(usize, Q)>) {
        match self {
            Combination::Scaled(den, numerators) => out.extend(numerators.iter().map(|(r, y)| {
                // The common denominator is positive, so `Ratio::new`
                // leaves the value reduced with a positive denominator.
                (*r, c.mul(&Q::Small(Ratio::new(*y, *den))))
            })),
            Combination::Exact(terms) => out.extend(terms.iter().map(|(r, y)| (*r, c.mul(y)))),
        }
    }
}

/// A combination as integer numerators over a common denominator.
fn scale_combination(combination: &[(usize, Q)]) -> Option<(i64, Vec<(usize, i64)>)> {
    let mut den: i64 = 1;
    for (_, m) in combination {
        let Q::Small(m) = m else { return None };
        let d = *m.denom();
        den = den.checked_mul(d / num_integer::gcd(den, d))?;
    }
    let mut out = Vec::with_capacity(combination.len());
    for (r, m) in combination {
        let Q::Small(m) = m else { return None };
        out.push((*r, m.numer().checked_mul(&(den / m.denom()))?));
    }
    Some((den, out))
}

/// Incremental exact test for linear dependence among reactions.
#[derive(Default)]
pub struct CycleFinder {
    basis: Vec<BasisVector>,
    pivot_of: IdMap<u32, usize>,
    /// How many added reactions each species occurs in.
    occurrences: IdMap<u32, u32>,
}

impl CycleFinder {
    pub fn new() -> Self {
        Self::default()
    }

    /// The number of independent reactions kept.
    pub fn rank(&self) -> usize {
        self.basis.len()
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
        let mut work: IdMap<u32, Q> = IdMap::default();
        for (s, c) in vector {
            if c.is_zero() {
                continue;
            }
            *self.occurrences.entry(*s).or_insert(0) += 1;
            let slot = work.entry(*s).or_insert(Q::Small(Ratio::zero()));
            *slot = slot.add(&Q::from_big(big(c)));
        }
        work.retain(|_, c| !c.is_zero());
        let mut heap: BinaryHeap<Reverse<usize>> = work
            .keys()
            .filter_map(|s| self.pivot_of.get(s).map(|&k| Reverse(k)))
            .collect();
        // The basis vectors subtracted, with their multipliers.
        let mut used: Vec<(usize, Q)> = Vec::new();
        let mut last = None;
        while let Some(Reverse(k)) = heap.pop() {
            if last == Some(k) {
                continue;
            }
            last = Some(k);
            let b = &self.basis[k];
            let Some(c) = work.get(&b.pivot).cloned() else {
                continue;
            };
            let minus_c = c.neg();
            for (s, x) in &b.entries {
                let slot = work.entry(*s).or_insert(Q::Small(Ratio::zero()));
                *slot = slot.add(&minus_c.mul(x));
                if slot.is_zero() {
                    work.remove(s);
                } else if *s != b.pivot
                    && let Some(&j) = self.pivot_of.get(s)
                    && j > k
                {
                    heap.push(Reverse(j));
                }
            }
            used.push((k, c));
        }
        let used = self.expand(&used);
        if work.is_empty() {
            return Some(used.into_iter().map(|(r, m)| (r, m.to_big())).collect());
        }
        // The rarest species becomes the pivot (Markowitz-style: few later
        // reactions will contain it); ties go to the largest id, which in a
        // file read in order is the newest species.
        let pivot = work
            .keys()
            .copied()
            .min_by_key(|s| (self.occurrences.get(s).copied().unwrap_or(0), Reverse(*s)))
            .unwrap_or(0);
        let scale = work.get(&pivot).map_or(Q::Small(Ratio::zero()), Q::recip);
        let mut entries: Vec<(u32, Q)> =
            work.into_iter().map(|(s, c)| (s, c.mul(&scale))).collect();
        entries.sort_by_key(|(s, _)| *s);
        let minus_scale = scale.neg();
        let mut combination: Vec<(usize, Q)> = used
            .into_iter()
            .map(|(r, m)| (r, m.mul(&minus_scale)))
            .filter(|(_, m)| !m.is_zero())
            .collect();
        combination.push((reaction, scale));
        combination.sort_by_key(|(r, _)| *r);
        combination.dedup_by(|b, a| {
            if a.0 == b.0 {
                a.1 = a.1.add(&b.1);
                true
            } else {
                false
            }
        });
        combination.retain(|(_, m)| !m.is_zero());
        self.pivot_of.insert(pivot, self.basis.len());
        self.basis.push(BasisVector {
            pivot,
            entries,
            combination: Combination::new(combination),
        });
        None
    }

    /// `expand` on integers: every term c_k · y_kr is brought over the
    /// common denominator L = lcm_k(den(c_k) · D_k) and summed as an `i128`.
    /// Returns `None` (and the caller takes the rational path) when a value
    /// does not fit.
    fn expand_scaled(&self, used: &[(usize, Q)]) -> Option<Vec<(usize, Q)>> {
        let mut l: i128 = 1;
        for (k, c) in used {
            let (Q::Small(c), Combination::Scaled(d, _)) = (c, &self.basis[*k].combination) else {
                return None;
            };
            let den = i128::from(*c.denom()).checked_mul(i128::from(*d))?;
            l = l.checked_mul(den / num_integer::gcd(l, den))?;
            if l > i128::from(i64::MAX) {
                return None;
            }
        }
        let total: usize = used
            .iter()
            .map(|(k, _)| match &self.basis[*k].combination {
                Combination::Scaled(_, numerators) => numerators.len(),
                Combination::Exact(terms) => terms.len(),
            })
            .sum();
        let mut terms: Vec<(usize, i128)> = Vec::with_capacity(total);
        for (k, c) in used {
            let (Q::Small(c), Combination::Scaled(d, numerators)) =
                (c, &self.basis[*k].combination)
            else {
                return None;
            };
            let factor = i128::from(*c.numer())
                .checked_mul(l / (i128::from(*c.denom()) * i128::from(*d)))?;
            for (r, y) in numerators {
                terms.push((*r, factor.checked_mul(i128::from(*y))?));
            }
        }
        terms.sort_unstable_by_key(|(r, _)| *r);
        let mut out: Vec<(usize, Q)> = Vec::with_capacity(terms.len());
        let mut i = 0;
        while i < terms.len() {
            let r = terms[i].0;
            let mut sum: i128 = 0;
            while i < terms.len() && terms[i].0 == r {
                sum = sum.checked_add(terms[i].1)?;
                i += 1;
            }
            if sum != 0 {
                let g = num_integer::gcd(sum, l);
                let (n, d) = (i64::try_from(sum / g).ok()?, i64::try_from(l / g).ok()?);
                out.push((r, Q::Small(Ratio::new_raw(n, d))));
            }
        }
        Some(out)
    }

    /// Σ c_k · combination_k over the used basis vectors, as a sorted list
    /// of original reactions with nonzero multipliers.
    fn expand(&self, used: &[(usize, Q)]) -> Vec<(usize, Q)> {
        if let Some(out) = self.expand_scaled(used) {
            return out;
        }
        let mut terms: Vec<(usize, Q)> = Vec::new();
        for (k, c) in used {
            self.basis[*k].combination.push_times(c, &mut terms);
        }
        terms.sort_unstable_by_key(|(r, _)| *r);
        let mut out: Vec<(usize, Q)> = Vec::with_capacity(terms.len());
        for (r, m) in terms {
            match out.last_mut() {
                Some((lr, lm)) if *lr == r => *lm = lm.add(&m),
                _ => out.push((r, m)),
            }
        }
        out.retain(|(_, m)| !m.is_zero());
        out
    }
}

/// Normalises a reaction vector so that duplicates, reverses and multiples
/// share a key: species sorted by id, repeated ids summed, zeros dropped,
/// and everything divided by the first coefficient. Returns the key and the
/// scale with `vector = scale · key`; a negative scale means the reaction is
/// written reversed relative to the key. A vector with no nonzero
/// coefficient has an empty key and scale zero.
pub fn canonical_key(vector: &[(u32, Ratio<i64>)]) -> (Vec<(u32, BigRational)>, BigRational) {
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
    let Some(scale) = merged.first().map(|(_, c)| c.clone()) else {
        return (merged, BigRational::zero());
    };
    let inv = scale.recip();
    for (_, c) in &mut merged {
        *c *= &inv;
    }
    (merged, scale)
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
    type Library = (Vec<Vec<(u32, Ratio<i64>)>>, Vec<bool>);

    /// Reactions shaped like a kinetics library of sub-mechanisms that
    /// share species: elementary steps (`A + B -> C + D`, `A -> B + C`,
    /// `2 A -> B`, coefficients 1 and sometimes 2) over species near a
    /// moving centre (a fuel's sub-mechanism) and, for a third of the
    /// participants, a small pool of common radicals and molecules. One
    /// reaction in five restates earlier ones: a reverse, a duplicate, a
    /// multiple or the net of two or three recent steps (a cycle).
    fn library(n: usize, seed: u64) -> Library {
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
            let matrix: Vec<Vec<BigRational>> = (0..species)
                .map(|s| {
                    all.iter()
                        .map(|v| v.iter().filter(|(x, _)| *x == s).map(|(_, c)| big(c)).sum())
                        .collect()
                })
                .collect();
            let nullity = crate::chem::balance::nullspace(matrix).len();
            assert_eq!(f.rank(), n - nullity, "seed {seed}");
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
        assert_eq!(key, vec![(2, BigRational::one()), (4, bq(-1, 2))]);
        assert_eq!(scale, bq(-1, 1));
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
        assert_eq!(
            k1,
            vec![(1, BigRational::one()), (3, bq(1, 2)), (5, bq(-1, 1))]
        );
        assert_eq!((s1, s2, s3), (bq(-2, 1), bq(2, 1), bq(-4, 1)));
        assert_eq!(
            canonical_key(&[(1, q(1)), (1, q(-1))]),
            (vec![], BigRational::zero())
        );
    }
}
