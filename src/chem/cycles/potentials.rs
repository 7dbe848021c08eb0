//! Species potentials and fingerprints: whether a reaction lies in the span
//! of the basis, and the value the elimination would carry to it, without
//! reducing it.
//!
//! Every basis vector `b` satisfies `b · μ = value(b)` for the potentials
//! `μ` (real numbers per species: for ln K, what formation Gibbs energies
//! over −RT would be) and `b · y = 0` for the fingerprint `y` (residues per
//! species modulo the prime 2^61 − 1). Both are kept by solving each basis
//! vector's equation for its pivot; a species that is no pivot keeps a
//! potential of 0 and a fixed pseudo-random fingerprint. A reaction `v` in
//! the span is a combination `Σ c_k b_k`, so `v · μ = Σ c_k value(b_k)`,
//! the value an exact reduction carries to it (up to rounding), and
//! `v · y = 0`. A reaction outside the span has `v · y ≠ 0` unless the
//! fingerprint is orthogonal to it by chance: the fingerprint is spread
//! evenly over the residue vectors orthogonal to the basis (the free
//! species' values are pseudo-random, from a fixed seed, and the pivots'
//! follow from them linearly), so for each reaction that chance is
//! 1/(2^61 − 1), and a library of 10^6 reactions meets it with probability
//! below 10^-12 (the Schwartz–Zippel lemma for a linear form).
//!
//! Keeping them costs little: a new basis vector holds no pivot of an
//! older one (the echelon order), so its pivot is solved from species that
//! are no pivots. Only when its pivot was already held by older vectors
//! (rare: the pivot is the rarest species, usually one just met) do those
//! vectors' pivots move, and the vectors holding those, oldest last.

use super::{NONE, Pivoted};
use num_rational::Ratio;
use std::collections::BinaryHeap;

/// The Mersenne prime 2^61 − 1, the modulus of the fingerprints.
const P: u64 = (1 << 61) - 1;

/// The seed of the free species' fingerprints (any fixed value).
const SEED: u64 = 0x5D0F_1A7E_C0DE_2026;

/// `x` modulo `P`, for `x` below 2^122.
fn fold(x: u128) -> u64 {
    let r = (x as u64 & P) + (x >> 61) as u64;
    let r = if r >= P { r - P } else { r };
    if r >= P { r - P } else { r }
}

fn mul(a: u64, b: u64) -> u64 {
    fold(a as u128 * b as u128)
}

fn add(a: u64, b: u64) -> u64 {
    let s = a + b;
    if s >= P { s - P } else { s }
}

fn neg(a: u64) -> u64 {
    if a == 0 { 0 } else { P - a }
}

/// A machine integer as a residue.
fn residue(x: i64) -> u64 {
    let m = fold(u128::from(x.unsigned_abs()));
    if x < 0 { neg(m) } else { m }
}

/// The inverse of a nonzero residue (Fermat: `a^(P−2)`).
fn inverse(a: u64) -> u64 {
    let (mut base, mut e, mut out) = (a, P - 2, 1);
    while e > 0 {
        if e & 1 == 1 {
            out = mul(out, base);
        }
        base = mul(base, base);
        e >>= 1;
    }
    out
}

/// The fixed fingerprint of a species that is no pivot (splitmix64).
fn free(s: u32) -> u64 {
    let mut z = SEED ^ u64::from(s).wrapping_mul(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    fold(u128::from(z ^ (z >> 31)))
}

/// The potentials and fingerprints of the species under a basis.
#[derive(Clone, Default)]
pub(super) struct Potentials {
    /// Set when a basis vector has no integer form, or one that vanishes
    /// modulo `P`: from then on no question is answered here, and every
    /// reaction goes to the exact reduction.
    broken: bool,
    /// By species id; a species past the end has its free fingerprint
    /// and a potential of 0.
    fingerprint: Vec<u64>,
    potential: Vec<f64>,
    /// How many basis vectors hold each species.
    held: Vec<u32>,
    /// Which basis vectors hold each species other than as their pivot:
    /// made the first time a pivot was already held, kept from then on.
    holders: Option<Vec<Vec<u32>>>,
}

impl Potentials {
    fn fingerprint(&self, s: u32) -> u64 {
        self.fingerprint
            .get(s as usize)
            .copied()
            .unwrap_or_else(|| free(s))
    }

    fn potential(&self, s: u32) -> f64 {
        self.potential.get(s as usize).copied().unwrap_or(0.0)
    }

    /// Whether `vector` lies in the span of the basis: `Some(false)` for
    /// certain, `Some(true)` but for the chance the module speaks of,
    /// `None` when the fingerprints cannot tell (see `broken`, or numbers
    /// that do not fit).
    pub(super) fn spanned(&self, vector: &[(u32, Ratio<i64>)]) -> Option<bool> {
        if self.broken {
            return None;
        }
        // The vector scaled to integers: the question does not change.
        let mut lcm: i64 = 1;
        for (_, c) in vector {
            let d = *c.denom();
            if d != 1 {
                let g = i64::try_from(super::gcd_i64(lcm, d)).ok()?;
                lcm = lcm.checked_mul(d / g)?;
            }
        }
        if residue(lcm) == 0 {
            return None;
        }
        let mut sum = 0;
        for (s, c) in vector {
            let n = c.numer().checked_mul(lcm / c.denom())?;
            sum = add(sum, mul(residue(n), self.fingerprint(*s)));
        }
        Some(sum == 0)
    }

    /// `vector · μ`, the value carried to a vector in the span, and
    /// `Σ |c_s μ_s|`, the size of the numbers summed (its rounding error
    /// is a small multiple of the machine epsilon times that).
    pub(super) fn value(&self, vector: &[(u32, Ratio<i64>)]) -> (f64, f64) {
        let (mut sum, mut size) = (0.0, 0.0);
        for (s, c) in vector {
            let term = (*c.numer() as f64 / *c.denom() as f64) * self.potential(*s);
            sum += term;
            size += term.abs();
        }
        (sum, size)
    }

    /// Basis vector `k` (the newest of `pivoted`) has joined.
    pub(super) fn joined(&mut self, k: usize, pivoted: &[Pivoted], integers: &[(u32, i64)]) {
        if self.broken {
            return;
        }
        let b = pivoted[k];
        if b.denominator == 0 {
            self.broken = true;
            return;
        }
        let was_held = self.held.get(b.pivot as usize).is_some_and(|&n| n > 0);
        for &(s, _) in entries(&b, integers) {
            let i = s as usize;
            if i >= self.held.len() {
                self.held.resize(i + 1, 0);
            }
            self.held[i] += 1;
        }
        if was_held && self.holders.is_none() {
            self.holders = Some(holders(&pivoted[..k], integers));
        }
        if let Some(holders) = &mut self.holders {
            for &(s, _) in entries(&b, integers) {
                if s != b.pivot {
                    let i = s as usize;
                    if i >= holders.len() {
                        holders.resize_with(i + 1, Vec::new);
                    }
                    holders[i].push(k as u32);
                }
            }
        }
        if !self.solve(&b, integers) {
            return;
        }
        if was_held {
            self.settle_holders_of(b.pivot, k, pivoted, integers);
        }
    }

    /// The potentials of a basis made another way (cut back to its first
    /// vectors): each vector's pivot solved, the newest first.
    pub(super) fn rebuilt(pivoted: &[Pivoted], integers: &[(u32, i64)]) -> Potentials {
        let mut out = Potentials::default();
        for b in pivoted {
            if b.denominator == 0 {
                out.broken = true;
                return out;
            }
            for &(s, _) in entries(b, integers) {
                let i = s as usize;
                if i >= out.held.len() {
                    out.held.resize(i + 1, 0);
                }
                out.held[i] += 1;
            }
        }
        for b in pivoted.iter().rev() {
            if !out.solve(b, integers) {
                break;
            }
        }
        out
    }

    /// Solve `b`'s equations for its pivot; false (and broken) when its
    /// integers vanish modulo `P`.
    fn solve(&mut self, b: &Pivoted, integers: &[(u32, i64)]) -> bool {
        let den = residue(b.denominator);
        if den == 0 {
            self.broken = true;
            return false;
        }
        let (mut y, mut mu) = (0, 0.0);
        let scale = b.denominator as f64;
        for &(s, n) in entries(b, integers) {
            if s != b.pivot {
                y = add(y, mul(residue(n), self.fingerprint(s)));
                mu += (n as f64 / scale) * self.potential(s);
            }
        }
        let y = if den == 1 {
            neg(y)
        } else {
            neg(mul(y, inverse(den)))
        };
        let i = b.pivot as usize;
        if i >= self.fingerprint.len() {
            let from = self.fingerprint.len();
            self.fingerprint
                .extend((from..=i).map(|s| free(u32::try_from(s).unwrap_or(u32::MAX))));
            self.potential.resize(i + 1, 0.0);
        }
        self.fingerprint[i] = y;
        self.potential[i] = b.value - mu;
        true
    }

    /// Solve again the vectors older than `k` that hold `species`, and
    /// those that hold their pivots in turn, each once, the newest first
    /// (a vector's equation reads only younger pivots).
    fn settle_holders_of(
        &mut self,
        species: u32,
        k: usize,
        pivoted: &[Pivoted],
        integers: &[(u32, i64)],
    ) {
        let mut queue: BinaryHeap<u32> = BinaryHeap::new();
        let push = |queue: &mut BinaryHeap<u32>, holders: &Option<Vec<Vec<u32>>>, s: u32, below| {
            if let Some(list) = holders.as_ref().and_then(|h| h.get(s as usize)) {
                queue.extend(list.iter().copied().filter(|&j| (j as usize) < below));
            }
        };
        push(&mut queue, &self.holders, species, k);
        let mut last = NONE;
        while let Some(j) = queue.pop() {
            if j == last {
                continue;
            }
            last = j;
            let b = pivoted[j as usize];
            if !self.solve(&b, integers) {
                return;
            }
            push(&mut queue, &self.holders, b.pivot, j as usize);
        }
    }
}

/// The integer form of a basis vector.
fn entries<'a>(b: &Pivoted, integers: &'a [(u32, i64)]) -> &'a [(u32, i64)] {
    &integers[b.start as usize..(b.start + b.len) as usize]
}

/// Which of `pivoted` hold each species other than as their pivot.
fn holders(pivoted: &[Pivoted], integers: &[(u32, i64)]) -> Vec<Vec<u32>> {
    let mut out: Vec<Vec<u32>> = Vec::new();
    for (j, b) in pivoted.iter().enumerate() {
        for &(s, _) in entries(b, integers) {
            if s != b.pivot {
                let i = s as usize;
                if i >= out.len() {
                    out.resize_with(i + 1, Vec::new);
                }
                out[i].push(j as u32);
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The field arithmetic against u128 remainders (the definition).
    #[test]
    fn residues_multiply_add_and_invert_modulo_the_prime() {
        let p = u128::from(P);
        let samples = [
            0,
            1,
            2,
            3,
            P - 1,
            P - 2,
            1 << 60,
            123_456_789_012_345,
            free(7),
        ];
        for &a in &samples {
            for &b in &samples {
                assert_eq!(u128::from(mul(a, b)), u128::from(a) * u128::from(b) % p);
                assert_eq!(u128::from(add(a, b)), (u128::from(a) + u128::from(b)) % p);
            }
            if a != 0 {
                assert_eq!(mul(a, inverse(a)), 1, "{a}");
            }
            assert_eq!(add(a, neg(a)), 0);
        }
        assert_eq!(residue(-1), P - 1);
        assert_eq!(residue(i64::MIN), neg(fold(1u128 << 63)));
        assert_eq!(u128::from(residue(i64::MAX)), (i64::MAX as u128) % p);
    }

    /// `b · y` modulo `P` and `b · μ − value(b)` for every basis vector of
    /// `finder`.
    fn residuals(finder: &super::super::CycleFinder) -> Vec<(u64, f64)> {
        let p = &finder.potentials;
        finder
            .pivoted
            .iter()
            .map(|b| {
                let (mut y, mut mu) = (0, 0.0);
                for &(s, n) in entries(b, &finder.integers) {
                    y = add(y, mul(residue(n), p.fingerprint(s)));
                    mu += n as f64 / b.denominator as f64 * p.potential(s);
                }
                (y, mu - b.value)
            })
            .collect()
    }

    /// After every reaction of a library whose pivots are often species
    /// that older basis vectors already hold (a small pool of common
    /// species), every basis vector keeps both its equations, and a basis
    /// cut back has the potentials of one built up to the cut.
    #[test]
    fn every_basis_vector_keeps_its_equations() {
        let (all, _) = super::super::tests::library(2_000, 5);
        let mut finder = super::super::CycleFinder::new();
        for (i, v) in all.iter().enumerate() {
            finder.add_valued(i, v, (i % 17) as f64 * 1.25 - 9.0);
            if i % 97 == 0 || i + 1 == all.len() {
                for (k, (y, off)) in residuals(&finder).into_iter().enumerate() {
                    assert_eq!(y, 0, "vector {k} after reaction {i}");
                    assert!(off.abs() < 1e-9, "vector {k} after reaction {i}: {off}");
                }
            }
        }
        assert!(!finder.potentials.broken);
        assert!(
            finder.potentials.holders.is_some(),
            "no pivot was held by an older vector"
        );
        let cut = finder.before(1_000);
        for (y, off) in residuals(&cut) {
            assert_eq!(y, 0);
            assert!(off.abs() < 1e-9);
        }
    }
}
