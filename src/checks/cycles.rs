//! The Wegscheider condition: reactions whose equations combine to zero (or
//! to another reaction) must have ln K that combine the same way.
//!
//! Dependence is found exactly and incrementally with
//! [`crate::chem::cycles::CycleFinder`] over sparse reaction vectors, so the
//! check scales to libraries of 10^5 reactions and more. A reaction that
//! the finder's fingerprints place in the span of the earlier ones, and
//! whose ln K is within the tolerance of the value their potentials carry
//! by a wide margin, closes only passing cycles and is not reduced; every
//! other reaction is reduced exactly, and every failing cycle comes from
//! an exact reduction. All K are compared at one
//! reference temperature: the one at which the most reactions have a K.
//!
//! The language server checks a library again after every edit; it keeps
//! a [`CycleMemo`] of each check, and the next check resumes at the first
//! reaction the edit changed, from the finder as it stood before it.

use super::{Checked, Nets, k_text, number, temperature, tolerance};
use crate::chem::cycles::{CycleFinder, Dependence, Lookahead};
use crate::diagnostic::Diagnostic;
use crate::model::SpeciesId;
use crate::units::constants::STANDARD_TEMPERATURE;
use crate::workspace::Workspace;
use num_rational::Ratio;
use std::collections::{HashMap, HashSet};

/// The temperature the cycle check compares K at (the one at which the
/// most reactions have a K), with each reaction's ln K there.
fn reference_temperature(checked: &[&Checked]) -> (f64, Vec<Option<f64>>) {
    let mut counts: HashMap<u64, usize> = HashMap::new();
    for c in checked {
        for p in c.k.stated.iter().chain(&c.k.gibbs) {
            *counts.entry(p.t.to_bits()).or_default() += 1;
        }
    }
    let mut candidates: Vec<(u64, usize)> = counts.into_iter().collect();
    candidates.sort_by(|a, b| b.1.cmp(&a.1).then(a.0.cmp(&b.0)));
    let mut best: (f64, usize, Option<Vec<Option<f64>>>) = (STANDARD_TEMPERATURE, 0, None);
    let mut temps: Vec<f64> = candidates
        .iter()
        .take(3)
        .map(|(t, _)| f64::from_bits(*t))
        .collect();
    temps.push(STANDARD_TEMPERATURE);
    for t in temps {
        let values: Vec<Option<f64>> = checked
            .iter()
            .map(|c| c.k.ln_k_at(t).ok().map(|e| e.ln_k))
            .collect();
        let n = values.iter().filter(|v| v.is_some()).count();
        if n > best.1 {
            best = (t, n, Some(values));
        }
        // No later candidate can do better than every reaction.
        if best.1 == checked.len() {
            break;
        }
    }
    let (t, _, values) = best;
    (t, values.unwrap_or_else(|| vec![None; checked.len()]))
}

fn multiplier_text(m: f64) -> std::borrow::Cow<'static, str> {
    // The multipliers of most cycles are small integers: no formatting.
    const SMALL: [&str; 9] = ["-4", "-3", "-2", "-1", "0", "1", "2", "3", "4"];
    if m.fract() == 0.0 && m.abs() <= 4.0 {
        return SMALL[(m + 4.0) as usize].into();
    }
    let r = (m * 6.0).round();
    if (m * 6.0 - r).abs() < 1e-9 && m.fract() != 0.0 {
        let g = gcd(r.abs() as i64, 6);
        return format!("{}/{}", r as i64 / g, 6 / g).into();
    }
    number(m).into()
}

fn gcd(a: i64, b: i64) -> i64 {
    if b == 0 { a.max(1) } else { gcd(b, a % b) }
}

/// A cycle that does not close: `subject` equals `Σ m · member`, but its
/// ln K is not the combination of theirs. Indexes are into the reversible
/// reactions the check looked at.
#[derive(Clone)]
struct Failure {
    subject: usize,
    members: Vec<(usize, f64)>,
    ln_k: f64,
    predicted: f64,
}

impl Failure {
    /// How far off the K of `reaction` would have to be (in ln K) for this
    /// cycle to miss by `miss`, if that K were the only wrong one; `None`
    /// for a reaction not in the cycle.
    fn implied_error(&self, reaction: usize, miss: f64) -> Option<f64> {
        Some(miss / self.multiplier_of(reaction)?)
    }

    /// How an error in the ln K of `reaction` enters the cycle's miss: 1
    /// for the reaction that closes it, minus its multiplier for a member.
    fn multiplier_of(&self, reaction: usize) -> Option<f64> {
        self.participants()
            .find(|(j, _)| *j == reaction)
            .map(|(_, m)| m)
    }

    /// The reactions of the cycle, each with [`Failure::multiplier_of`].
    fn participants(&self) -> impl Iterator<Item = (usize, f64)> + '_ {
        std::iter::once((self.subject, 1.0)).chain(self.members.iter().map(|(j, m)| (*j, -m)))
    }

    /// The cycle solved for `reaction`: the members (with multipliers) it
    /// equals.
    fn solved_for(&self, reaction: usize) -> Vec<(usize, f64)> {
        if reaction == self.subject {
            return self.members.clone();
        }
        let m = self
            .members
            .iter()
            .find(|(j, _)| *j == reaction)
            .map_or(1.0, |(_, m)| *m);
        let mut terms = vec![(self.subject, 1.0 / m)];
        terms.extend(
            self.members
                .iter()
                .filter(|(j, _)| *j != reaction)
                .map(|(j, x)| (*j, -x / m)),
        );
        terms
    }
}

/// A K found wrong: the failing cycles its one error explains.
struct Culprit {
    reaction: usize,
    /// How far off its ln K is.
    error: f64,
    /// Failures this error alone accounts for, in failure order.
    explained: Vec<usize>,
    /// Other failures through this reaction whose miss it accounts for in
    /// part (another wrong K shares their cycle).
    shared: Vec<usize>,
}

/// How close (in ln K) two implied errors of one K must be to be the same
/// error: a factor of 1.05 in K, well above the rounding of K written to
/// three significant figures summed around a long cycle, well below the
/// spread of errors from unrelated mistakes.
const AGREEMENT: f64 = 0.05;

/// A run of agreeing errors must hold at least one in this many of the open
/// failing cycles through its reaction.
const SHARE: usize = 5;

/// Rounds of [`blame`] at most; each explains at least one failure, and
/// real libraries need a handful.
const BLAME_ROUNDS: usize = 64;

/// Which K to blame for the failing cycles.
///
/// One wrong K makes every cycle through it fail, so a library with a few
/// wrong constants can have thousands of failing cycles, few of which close
/// at the wrong reaction. If reaction `c` is the one wrong K of a cycle,
/// the cycle's miss fixes how far off that K is; a reaction whose K really
/// is wrong gets the same implied error from every failing cycle through
/// it, while a correct reaction that shares cycles with wrong ones gets
/// scattered values. So, round by round, the errors on which the most
/// failing cycles agree are accepted (largest first, each cycle corrected
/// once per round), every cycle through an accepted reaction is corrected
/// by its error, and what still misses goes to the next round. Cycles no
/// shared error explains are left to their closing reaction, as a single
/// cycle gives no reason to prefer any of its members.
fn blame(failures: &[Failure], reactions: usize, rel: f64) -> (Vec<Culprit>, Vec<usize>) {
    blame_rescanning(failures, reactions, rel, false)
}

/// [`blame`], taking every reaction again in every round when `every`
/// (for the tests, which hold the two to the same answer).
fn blame_rescanning(
    failures: &[Failure],
    reactions: usize,
    rel: f64,
    every: bool,
) -> (Vec<Culprit>, Vec<usize>) {
    let mut miss: Vec<f64> = failures.iter().map(|f| f.ln_k - f.predicted).collect();
    // Each failure's tolerance, computed once and kept beside the misses:
    // the rounds look both up for every cycle through every reaction, and
    // reading them from the failures themselves missed the caches on large
    // libraries.
    let tolerances: Vec<f64> = failures
        .iter()
        .map(|f| tolerance(f.predicted, rel))
        .collect();
    let open = |miss: &[f64], f: usize| miss[f].abs() > tolerances[f];
    let mut culprits: Vec<Culprit> = Vec::new();
    let through = Through::new(failures, reactions);
    let mut accepted = vec![false; reactions];
    // The reactions whose entries may differ from the last round's: every
    // one at first, then those through a cycle corrected in the last round.
    // Any other reaction has the runs it had then, and each of those was
    // accepted then or turned down for what still holds (too small, too
    // few, too close to zero, or its reaction accepted), so leaving it out
    // changes nothing.
    let mut scan: Vec<usize> = (0..reactions).collect();
    for _ in 0..BLAME_ROUNDS {
        // The reactions are taken in pieces on every core; each piece
        // finds its own runs, as a run never leaves its reaction.
        let pieces = through.pieces(&scan);
        let segments = crate::parallel::map_in_order(&pieces, 1, |piece| {
            Segment::of(piece, &through, &miss, &open, &accepted)
        });
        // (size, reaction, segment, start, end) of every run, in the order
        // of the reactions.
        let mut runs: Vec<(usize, usize, usize, usize, usize)> = Vec::new();
        for (k, segment) in segments.iter().enumerate() {
            runs.extend(
                segment
                    .runs
                    .iter()
                    .map(|&(a, b)| (b - a, segment.entries[a].0, k, a, b)),
            );
        }
        if runs.is_empty() {
            break;
        }
        // Largest first; among equals the later reaction, as a file is
        // usually extended at its end.
        runs.sort_by(|a, b| b.0.cmp(&a.0).then(b.1.cmp(&a.1)));
        let mut touched = vec![false; failures.len()];
        for (_, _, k, start, end) in runs {
            let run = &segments[k].entries[start..end];
            let c = run[0].0;
            if accepted[c] || run.iter().any(|&(_, _, f)| touched[f]) {
                continue;
            }
            accepted[c] = true;
            let error = run[run.len() / 2].1;
            let mut explained: Vec<usize> = run.iter().map(|&(_, _, f)| f).collect();
            explained.sort_unstable();
            let mut shared = Vec::new();
            for &(f, m) in through.of(c) {
                if !open(&miss, f) || touched[f] {
                    continue;
                }
                miss[f] -= m * error;
                touched[f] = true;
                if explained.binary_search(&f).is_err() {
                    shared.push(f);
                }
            }
            for &f in &explained {
                miss[f] = 0.0;
            }
            culprits.push(Culprit {
                reaction: c,
                error,
                explained,
                shared,
            });
        }
        let mut next = vec![false; reactions];
        for (f, failure) in failures.iter().enumerate() {
            if touched[f] {
                for (c, _) in failure.participants() {
                    next[c] = true;
                }
            }
        }
        scan.clear();
        scan.extend((0..reactions).filter(|&c| every || next[c]));
    }
    // A cycle still open that closes at an accepted reaction holds another
    // wrong K too; it goes with that reaction's finding rather than making
    // a second one on the same line.
    let by_reaction: HashMap<usize, usize> = culprits
        .iter()
        .enumerate()
        .map(|(i, c)| (c.reaction, i))
        .collect();
    let mut listed: HashSet<(usize, usize)> = culprits
        .iter()
        .enumerate()
        .flat_map(|(i, c)| c.shared.iter().map(move |&f| (i, f)))
        .collect();
    let mut unexplained = Vec::new();
    for f in (0..failures.len()).filter(|&f| open(&miss, f)) {
        match by_reaction.get(&failures[f].subject) {
            Some(&i) => {
                let c = &mut culprits[i];
                if c.explained.binary_search(&f).is_err() && listed.insert((i, f)) {
                    c.shared.push(f);
                }
            }
            None => unexplained.push(f),
        }
    }
    (culprits, unexplained)
}

/// About how many cycles pass through the reactions of one piece of a blame
/// round; a reaction through which more pass has a piece of its own.
const BLAME_PIECE: usize = 1 << 16;

/// What one round of [`blame`] finds in a piece of the reactions: the runs
/// of agreeing errors (ranges of `entries`), and the entries `(reaction,
/// implied error, failure)` of the reactions with a run, grouped by
/// reaction and sorted by error within a reaction. The entries of the other
/// reactions are not kept: in the first round of a large library they are
/// nearly all of them, and keeping them cost more memory than the rest of
/// the blame.
struct Segment {
    entries: Vec<(usize, f64, usize)>,
    runs: Vec<(usize, usize)>,
}

impl Segment {
    fn of(
        piece: &[usize],
        through: &Through,
        miss: &[f64],
        open: &(impl Fn(&[f64], usize) -> bool + Sync),
        accepted: &[bool],
    ) -> Segment {
        let mut segment = Segment {
            entries: Vec::new(),
            runs: Vec::new(),
        };
        // The entries of one reaction at a time.
        let mut own: Vec<(usize, f64, usize)> = Vec::new();
        for &c in piece {
            // A K has one error: a reaction is accepted once, with the
            // error most cycles agree on.
            if accepted[c] {
                continue;
            }
            own.clear();
            for &(f, m) in through.of(c) {
                if open(miss, f) {
                    own.push((c, miss[f] / m, f));
                }
            }
            // A run needs two cycles.
            if own.len() < 2 {
                continue;
            }
            own.sort_unstable_by(|a, b| a.1.total_cmp(&b.1).then(a.2.cmp(&b.2)));
            // Agreeing errors are runs in sorted order: a run starts at a
            // value and takes the following ones within AGREEMENT of it. A
            // run counts when it holds at least two cycles and a good
            // share of the open cycles through its reaction: a reaction
            // through which very many cycles pass (one early in a chain of
            // formations) can gather a few agreeing values by chance while
            // the rest scatter.
            let at = segment.entries.len();
            let before = segment.runs.len();
            let mut i = 0;
            while i < own.len() {
                let e0 = own[i].1;
                let mut end = i + 1;
                while end < own.len() && own[end].1 - e0 <= AGREEMENT {
                    end += 1;
                }
                let size = end - i;
                if size >= 2 && size * SHARE >= own.len() && e0.abs() > AGREEMENT {
                    segment.runs.push((at + i, at + end));
                }
                i = end;
            }
            if segment.runs.len() > before {
                segment.entries.extend_from_slice(&own);
            }
        }
        segment
    }
}

/// The failing cycles through each reaction, with the multiplier by which
/// an error in the reaction's ln K enters each one's miss
/// ([`Failure::multiplier_of`]), in failure order: one list per reaction,
/// laid end to end.
struct Through {
    starts: Vec<usize>,
    items: Vec<(usize, f64)>,
}

impl Through {
    fn new(failures: &[Failure], reactions: usize) -> Through {
        let mut starts = vec![0usize; reactions + 1];
        for failure in failures {
            for (c, _) in failure.participants() {
                starts[c + 1] += 1;
            }
        }
        for c in 0..reactions {
            starts[c + 1] += starts[c];
        }
        let mut next = starts.clone();
        let mut items = vec![(0, 0.0); starts[reactions]];
        for (f, failure) in failures.iter().enumerate() {
            for (c, m) in failure.participants() {
                items[next[c]] = (f, m);
                next[c] += 1;
            }
        }
        Through { starts, items }
    }

    fn of(&self, reaction: usize) -> &[(usize, f64)] {
        &self.items[self.starts[reaction]..self.starts[reaction + 1]]
    }

    /// `reactions` cut into runs of neighbours through which some
    /// [`BLAME_PIECE`] cycles pass in all, the last run shorter.
    fn pieces<'a>(&self, reactions: &'a [usize]) -> Vec<&'a [usize]> {
        let mut out = Vec::new();
        let (mut start, mut cycles) = (0, 0);
        for (i, &c) in reactions.iter().enumerate() {
            cycles += self.of(c).len();
            if cycles >= BLAME_PIECE {
                out.push(&reactions[start..=i]);
                (start, cycles) = (i + 1, 0);
            }
        }
        if start < reactions.len() {
            out.push(&reactions[start..]);
        }
        out
    }
}

/// The sizes of the batches of reactions reduced ahead of their turn: the
/// first, doubled from batch to batch up to the last.
const FIRST_BATCH: usize = 256;
const LAST_BATCH: usize = 1024;

/// What the check adds a reaction with: its net vector and its ln K at the
/// reference temperature (`None` when it is not added).
type Input<'a> = (&'a [(SpeciesId, Ratio<i64>)], Option<f64>);

/// What the cycle check of one analysis saw and found, kept by the
/// language server: the next analysis of an edited library starts the
/// check again at the first reaction whose vector or ln K differs, from
/// the finder as it stood before that reaction.
pub struct CycleMemo {
    /// The reference temperature and tolerance the check ran with.
    t: f64,
    rel: f64,
    /// Each reversible reaction's net vector and the ln K it was added
    /// with (`None` when it was not added).
    nets: Nets,
    values: Vec<Option<f64>>,
    finder: CycleFinder,
    /// The failing cycles found, in the order of their subjects.
    failures: Vec<Failure>,
}

/// Check every cycle of the reversible reactions of `checked`. With
/// `memory`, the check starts from the memo of the last analysis where it
/// still holds, and returns its own.
pub(super) fn check(
    ws: &Workspace,
    checked: &[Checked],
    rel: f64,
    memory: Option<Option<&CycleMemo>>,
    out: &mut Vec<Diagnostic>,
) -> Option<CycleMemo> {
    // Its steps, for `STOIK_PROFILE` (within the phase of the cycle check).
    let clock = super::Phases::start();
    let reversible: Vec<&Checked> = checked.iter().filter(|c| c.reaction.reversible()).collect();
    if reversible.len() < 3 {
        return None;
    }
    let (t, ln_k_at_t) = reference_temperature(&reversible);
    clock.mark("cycle reference temperature");
    // What each reaction is added with: its net vector and ln K.
    let inputs: Vec<Input> = reversible
        .iter()
        .zip(ln_k_at_t)
        .map(|(c, value)| {
            let net = c.reaction.net();
            (net, value.filter(|_| !net.is_empty()))
        })
        .collect();
    let keep = memory.is_some();
    let last = memory.flatten().filter(|m| m.t == t && m.rel == rel);
    let mut nets = Nets::default();
    let mut values = Vec::new();
    if keep {
        nets = Nets::with_capacity(reversible.len());
        values.reserve(reversible.len());
    }
    let mut ln_k: Vec<f64> = vec![f64::NAN; reversible.len()];
    let mut v: Vec<(u32, Ratio<i64>)> = Vec::new();
    // The reactions the last check saw alike: its finder and failures
    // stand for them, once the occurrences of their species are counted.
    let mut same = 0;
    let (mut finder, mut failures) = match last {
        Some(memo) => {
            for (i, &(net, value)) in inputs.iter().enumerate() {
                let alike = i < memo.values.len()
                    && memo.values[i].map(f64::to_bits) == value.map(f64::to_bits)
                    && memo.nets.same(i, net);
                if !alike {
                    break;
                }
                same = i + 1;
            }
            let mut finder = memo.finder.before(same);
            for (i, &(net, value)) in inputs.iter().take(same).enumerate() {
                if let Some(value) = value {
                    v.clear();
                    v.extend(net.iter().map(|&(s, x)| (s.0, x)));
                    finder.count(&v);
                    ln_k[i] = value;
                }
            }
            let failures = memo
                .failures
                .iter()
                .take_while(|f| f.subject < same)
                .cloned()
                .collect();
            (finder, failures)
        }
        None => (CycleFinder::new(), Vec::new()),
    };
    if keep {
        for &(net, value) in &inputs {
            nets.push(net);
            values.push(value);
        }
    }
    // The reactions still to add, with their ln K.
    let todo: Vec<(usize, f64)> = inputs
        .iter()
        .enumerate()
        .skip(same)
        .filter_map(|(i, &(_, value))| Some((i, value?)))
        .collect();
    // Reactions whose equation depends on earlier ones and whose ln K
    // misses the value carried through the elimination.
    let candidates = eliminate(&mut finder, &inputs, &todo, rel, &mut ln_k);
    clock.mark(&format!(
        "cycle elimination ({} reactions, {} independent)",
        inputs.len(),
        finder.rank()
    ));
    // Only a failing cycle is expanded into its members, on every core
    // once the finder is complete; the predicted value is taken again from
    // them, exactly as the message shows it.
    let expanded = crate::parallel::map_in_order(&candidates, 16, |(i, dependence, value)| {
        let members = finder.combination(dependence);
        // A single member is a duplicate, reverse or multiple: the pair
        // checks report those.
        if members.len() < 2 || members.iter().any(|(_, m)| !m.is_finite() || *m == 0.0) {
            return None;
        }
        let predicted: f64 = members.iter().map(|(j, m)| m * ln_k[*j]).sum();
        if (value - predicted).abs() <= tolerance(predicted, rel) {
            return None;
        }
        Some(Failure {
            subject: *i,
            members,
            ln_k: *value,
            predicted,
        })
    });
    failures.extend(expanded.into_iter().flatten());
    clock.mark("failing cycles expanded");
    let (culprits, unexplained) = blame(&failures, reversible.len(), rel);
    clock.mark("cycle blame");
    out.extend(crate::parallel::map_in_order(&culprits, 16, |culprit| {
        report(ws, &reversible, &ln_k, t, &failures, culprit)
    }));
    // A failing cycle no shared error explains is reported at the reaction
    // that closes it.
    out.extend(crate::parallel::map_in_order(&unexplained, 16, |&f| {
        let alone = Culprit {
            reaction: failures[f].subject,
            error: failures[f].ln_k - failures[f].predicted,
            explained: vec![f],
            shared: Vec::new(),
        };
        report(ws, &reversible, &ln_k, t, &failures, &alone)
    }));
    clock.mark(&format!(
        "cycle findings ({} blamed, {} left to their closing reactions)",
        culprits.len(),
        unexplained.len()
    ));
    keep.then_some(CycleMemo {
        t,
        rel,
        nets,
        values,
        finder,
        failures,
    })
}

/// Add the reactions `todo` (indexes into `inputs`, with their ln K) to
/// the finder in order, and give those that close a failing cycle, with
/// the dependence found and their ln K.
///
/// A reaction in the span of the basis whose ln K is, beyond doubt,
/// within the tolerance of the value its potentials carry closes a
/// passing cycle and needs no reduction (most of a large library). The
/// others go in batches: each is reduced ahead on every core against the
/// basis as it stood, then added in order and judged as the elimination
/// always judged them. The first batches are small, as nearly every early
/// reaction joins the basis and leaves the next one less to reduce ahead.
fn eliminate(
    finder: &mut CycleFinder,
    inputs: &[Input],
    todo: &[(usize, f64)],
    rel: f64,
    ln_k: &mut [f64],
) -> Vec<(usize, Dependence, f64)> {
    let mut candidates = Vec::new();
    let mut ahead = Lookahead::default();
    let mut flat: Vec<(u32, Ratio<i64>)> = Vec::new();
    let mut bounds: Vec<usize> = Vec::new();
    let mut batch = FIRST_BATCH;
    let mut done = 0;
    while done < todo.len() {
        let next = &todo[done..(done + batch).min(todo.len())];
        flat.clear();
        bounds.clear();
        bounds.push(0);
        for &(i, _) in next {
            flat.extend(inputs[i].0.iter().map(|&(s, x)| (s.0, x)));
            bounds.push(flat.len());
        }
        let vectors: Vec<&[(u32, Ratio<i64>)]> =
            bounds.windows(2).map(|w| &flat[w[0]..w[1]]).collect();
        // A vector in the span stays in it as the basis grows, and its
        // carried value stays what it is: one that passes beyond doubt is
        // settled now, and only the others are reduced ahead.
        let settled: Vec<bool> = vectors
            .iter()
            .zip(next)
            .map(|(v, &(_, value))| passes(finder, v, value, rel) == Some(true))
            .collect();
        let open: Vec<&[(u32, Ratio<i64>)]> = vectors
            .iter()
            .zip(&settled)
            .filter(|(_, s)| !**s)
            .map(|(v, _)| *v)
            .collect();
        let mut provisional = finder.reduce_ahead(&mut ahead, &open).into_iter();
        for ((&(i, value), v), &settled) in next.iter().zip(&vectors).zip(&settled) {
            ln_k[i] = value;
            let reduced = if settled { None } else { provisional.next() };
            // A reaction reduced ahead may have come into the span since.
            if settled || passes(finder, v, value, rel) == Some(true) {
                finder.count(v);
                continue;
            }
            let dependence = match reduced {
                Some(p) => finder.add_reduced(i, v, value, p),
                None => finder.add_valued(i, v, value),
            };
            let Some(dependence) = dependence else {
                continue;
            };
            if dependence.is_trivial()
                || !dependence.predicted.is_finite()
                || (value - dependence.predicted).abs() <= tolerance(dependence.predicted, rel)
            {
                continue;
            }
            candidates.push((i, dependence, value));
        }
        done += next.len();
        batch = (batch * 2).min(LAST_BATCH);
    }
    candidates
}

/// For a reaction `vector` with ln K `value`: `Some(true)` when it lies in
/// the span of the basis and closes a cycle that passes beyond doubt,
/// `Some(false)` when it lies in the span but may fail, `None` when it
/// may not lie in the span.
///
/// Beyond doubt means within the tolerance of the value its potentials
/// carry by a margin far wider than the rounding that may set that value
/// apart from the one an exact reduction carries (a few machine epsilons
/// times the size of the numbers summed), so that the reduction would
/// have judged the cycle alike.
fn passes(
    finder: &CycleFinder,
    vector: &[(u32, Ratio<i64>)],
    value: f64,
    rel: f64,
) -> Option<bool> {
    if finder.spanned(vector) != Some(true) {
        return None;
    }
    let (carried, size) = finder.carried_value(vector);
    let margin = 1e-6 * (1.0 + size + value.abs());
    Some(
        carried.is_finite()
            && size.is_finite()
            && (value - carried).abs() + margin * (1.0 + rel) <= tolerance(carried, rel),
    )
}

/// Most other failing cycles listed under one finding.
const LISTED_CYCLES: usize = 20;

/// One finding for the failing cycles blamed on the K of `culprit`: the
/// shortest of them written out, the others counted and pointed at.
fn report(
    ws: &Workspace,
    reversible: &[&Checked],
    ln_k: &[f64],
    t: f64,
    failures: &[Failure],
    blamed: &Culprit,
) -> Diagnostic {
    let culprit = blamed.reaction;
    // The cycle written out is the shortest one whose whole miss is this
    // K's error (a later round may have explained a cycle that also holds
    // another wrong K, whose own miss would confuse the message).
    let alone = |f: usize| {
        failures[f]
            .implied_error(culprit, failures[f].ln_k - failures[f].predicted)
            .is_some_and(|e| (e - blamed.error).abs() <= AGREEMENT)
    };
    let shown = blamed
        .explained
        .iter()
        .copied()
        .min_by_key(|&f| (!alone(f), failures[f].members.len(), f))
        .unwrap_or(blamed.explained[0]);
    let terms = failures[shown].solved_for(culprit);
    let predicted: f64 = terms.iter().map(|(j, m)| m * ln_k[*j]).sum();
    let actual = ln_k[culprit];
    let mut texts: Vec<String> = terms
        .iter()
        .map(|(j, m)| {
            format!(
                "{} × {}",
                multiplier_text(*m),
                reversible[*j].reaction.display_name(ws)
            )
        })
        .collect();
    texts.sort();
    let mut message = format!(
        "this reaction equals {}, so at {} K its K should be {}, but it is {}: the cycle fails by a factor of {}",
        texts.join(" + "),
        temperature(t),
        k_text(predicted),
        k_text(actual),
        k_text(actual - predicted)
    );
    let others = blamed.explained.len() - 1;
    if others > 0 {
        message.push_str(&format!(
            "; {others} more failing {} through this reaction {} by the same error in its K",
            cycles(others),
            if others == 1 { "misses" } else { "miss" },
        ));
    }
    if !blamed.shared.is_empty() {
        message.push_str(&format!(
            "; it accounts for part of the miss of {} more, which {} another wrong K",
            blamed.shared.len(),
            if blamed.shared.len() == 1 {
                "holds"
            } else {
                "hold"
            },
        ));
    }
    let r = reversible[culprit].reaction;
    let mut d = Diagnostic::new("cycle-inconsistent", r.loc.file, r.loc.span, message)
        .with_help("around a closed cycle the K multiply to 1 (Wegscheider); correct the K that is wrong or derive it from the others");
    d.related.reserve(terms.len() + LISTED_CYCLES);
    for (j, m) in &terms {
        let member = reversible[*j].reaction;
        let mut message = String::from("member of the cycle, multiplier ");
        message.push_str(&multiplier_text(*m));
        d.related.push(crate::diagnostic::Related {
            file: member.loc.file,
            span: member.loc.span,
            message,
        });
    }
    let others = blamed.explained.iter().chain(&blamed.shared);
    for &f in others.filter(|&&f| f != shown).take(LISTED_CYCLES) {
        let failure = &failures[f];
        let (at, note) = if failure.subject == culprit {
            (
                failure.members.first().map_or(culprit, |(j, _)| *j),
                "another failing cycle, which this reaction closes, passes here",
            )
        } else {
            (
                failure.subject,
                "another failing cycle through this reaction closes here",
            )
        };
        let other = reversible[at].reaction;
        d = d.with_related(other.loc.file, other.loc.span, note);
    }
    d
}

fn cycles(n: usize) -> &'static str {
    if n == 1 { "cycle" } else { "cycles" }
}

#[cfg(test)]
mod tests {
    use super::{BLAME_PIECE, Culprit, Failure, Input, Through, blame_rescanning, eliminate};
    use crate::chem::cycles::CycleFinder;
    use crate::model::SpeciesId;
    use num_rational::Ratio;

    /// A deterministic generator (splitmix64) so the cases are repeatable.
    struct Rng(u64);
    impl Rng {
        fn below(&mut self, n: u64) -> u64 {
            self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
            let mut z = self.0;
            z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            (z ^ (z >> 31)) % n
        }
    }

    /// Failing cycles over `reactions` reactions of which every seventh
    /// has a wrong ln K (errors 0.4 to 2.6): each cycle's miss is what its
    /// wrong members put in, and cycles through none are left out.
    fn failures(reactions: usize, cycles: usize, seed: u64) -> Vec<Failure> {
        let mut rng = Rng(seed);
        let error = |c: usize| (c % 7 == 3).then_some(0.4 + (c % 12) as f64 * 0.2);
        let mut out = Vec::new();
        for _ in 0..cycles {
            let subject = rng.below(reactions as u64) as usize;
            let mut members: Vec<(usize, f64)> = Vec::new();
            for _ in 0..2 + rng.below(4) {
                let j = rng.below(reactions as u64) as usize;
                if j != subject && members.iter().all(|(k, _)| *k != j) {
                    members.push((j, [1.0, -1.0, 2.0, 0.5][rng.below(4) as usize]));
                }
            }
            members.sort_by_key(|(j, _)| *j);
            let failure = Failure {
                subject,
                members,
                ln_k: 0.0,
                predicted: 0.0,
            };
            let miss: f64 = failure
                .participants()
                .filter_map(|(c, m)| Some(m * error(c)?))
                .sum();
            if miss.abs() > 1e-6 {
                out.push(Failure {
                    ln_k: miss,
                    ..failure
                });
            }
        }
        out
    }

    fn outcome(found: &(Vec<Culprit>, Vec<usize>)) -> Vec<String> {
        let mut lines: Vec<String> = found
            .0
            .iter()
            .map(|c| {
                format!(
                    "{} {} {:?} {:?}",
                    c.reaction,
                    c.error.to_bits(),
                    c.explained,
                    c.shared
                )
            })
            .collect();
        lines.push(format!("{:?}", found.1));
        lines
    }

    /// Taking again only the reactions through a cycle corrected in the
    /// last round blames as taking every reaction every round does.
    #[test]
    fn rounds_that_skip_unchanged_reactions_blame_alike() {
        for (reactions, cycles, seed) in [(30, 200, 1), (200, 3_000, 2), (1_000, 20_000, 3)] {
            let failures = failures(reactions, cycles, seed);
            let some = blame_rescanning(&failures, reactions, 1e-6, false);
            let every = blame_rescanning(&failures, reactions, 1e-6, true);
            assert!(some.0.len() > 2, "{} culprits", some.0.len());
            assert_eq!(outcome(&some), outcome(&every), "{reactions} reactions");
        }
    }

    /// The pieces of a round hold every reaction once, in order, and
    /// break where the cycles through them reach the bound.
    #[test]
    fn pieces_cover_the_reactions_in_order() {
        let failures = failures(5_000, 60_000, 4);
        let through = Through::new(&failures, 5_000);
        let scan: Vec<usize> = (0..5_000).filter(|c| c % 3 != 1).collect();
        let pieces = through.pieces(&scan);
        assert!(pieces.len() > 1);
        assert_eq!(pieces.concat(), scan);
        for piece in &pieces[..pieces.len() - 1] {
            let (last, before) = piece.split_last().unwrap_or((&0, &[]));
            let count = |cs: &[usize]| cs.iter().map(|&c| through.of(c).len()).sum::<usize>();
            assert!(
                count(before) < BLAME_PIECE
                    && count(before) + through.of(*last).len() >= BLAME_PIECE
            );
        }
    }

    /// Multipliers read as messages write numbers, and fractions of small
    /// denominators as fractions.
    #[test]
    fn multipliers_read_as_numbers_do() {
        for m in -10..=10 {
            let m = f64::from(m);
            assert_eq!(super::multiplier_text(m), super::number(m));
        }
        assert_eq!(super::multiplier_text(-0.0), "0");
        assert_eq!(super::multiplier_text(0.5), "1/2");
        assert_eq!(super::multiplier_text(-1.0 / 3.0), "-1/3");
        assert_eq!(super::multiplier_text(2.0 / 3.0), "2/3");
        assert_eq!(super::multiplier_text(0.3), "0.3");
    }

    /// A reaction's net vector, as the model gives it.
    type Net = Vec<(SpeciesId, Ratio<i64>)>;

    /// Reaction nets over a pool of species with ln K from invented species
    /// potentials: steps over species near a moving centre and a dozen
    /// common ones, one in four the net of two or three recent reactions
    /// (a cycle, with halves now and then), and one in twenty with an
    /// error of 3 to 6 in its ln K.
    fn library(n: usize, seed: u64) -> (Vec<Net>, Vec<f64>) {
        let mut rng = Rng(seed);
        let potential = |s: u32| ((s as u64 * 2_654_435_761) % 1_000) as f64 / 50.0 - 10.0;
        let mut nets: Vec<Net> = Vec::with_capacity(n);
        let mut values = Vec::with_capacity(n);
        for i in 0..n {
            let mut v: Vec<(u32, Ratio<i64>)> = Vec::new();
            if i > 10 && rng.below(4) == 0 {
                for _ in 0..2 + rng.below(2) {
                    let back = 1 + rng.below(i.min(40) as u64) as usize;
                    let m = [1, -1, 2][rng.below(3) as usize];
                    let m = if rng.below(8) == 0 {
                        Ratio::new(m, 2)
                    } else {
                        Ratio::from_integer(m)
                    };
                    v.extend(nets[i - back].iter().map(|&(s, c)| (s.0, c * m)));
                }
            } else {
                for j in 0..3 + rng.below(2) {
                    let s = if rng.below(3) == 0 {
                        rng.below(12) as u32
                    } else {
                        12 + (i as u32 * 2) / 5 + rng.below(10) as u32
                    };
                    v.push((s, Ratio::from_integer(if j < 2 { -1 } else { 1 })));
                }
            }
            v.sort_by_key(|(s, _)| *s);
            let mut net: Vec<(SpeciesId, Ratio<i64>)> = Vec::new();
            for (s, c) in v {
                match net.last_mut() {
                    Some((last, total)) if last.0 == s => *total += c,
                    _ => net.push((SpeciesId(s), c)),
                }
            }
            net.retain(|(_, c)| *c.numer() != 0);
            let mut value: f64 = net
                .iter()
                .map(|(s, c)| *c.numer() as f64 / *c.denom() as f64 * potential(s.0))
                .sum();
            if rng.below(20) == 0 {
                value += 3.0 + rng.below(4) as f64;
            }
            nets.push(net);
            values.push(value);
        }
        (nets, values)
    }

    /// The elimination with its shortcuts (reactions in the span that pass
    /// beyond doubt are not reduced; the rest are reduced ahead in batches)
    /// finds the failing cycles that reducing every reaction one at a time
    /// finds: the same reactions, predicted values and combinations, and
    /// the same basis left behind.
    #[test]
    fn shortcuts_find_the_failing_cycles_the_reduction_finds() {
        for seed in [1, 2, 3] {
            let (nets, values) = library(4_000, seed);
            let inputs: Vec<Input> = nets
                .iter()
                .zip(&values)
                .map(|(net, v)| (net.as_slice(), (!net.is_empty()).then_some(*v)))
                .collect();
            let todo: Vec<(usize, f64)> = inputs
                .iter()
                .enumerate()
                .filter_map(|(i, &(_, v))| Some((i, v?)))
                .collect();
            let mut fast = CycleFinder::new();
            let mut ln_k = vec![f64::NAN; inputs.len()];
            let got = eliminate(&mut fast, &inputs, &todo, 0.1, &mut ln_k);
            let mut slow = CycleFinder::new();
            let mut want = Vec::new();
            for &(i, value) in &todo {
                let v: Vec<(u32, Ratio<i64>)> = nets[i].iter().map(|&(s, c)| (s.0, c)).collect();
                let Some(d) = slow.add_valued(i, &v, value) else {
                    continue;
                };
                if !d.is_trivial()
                    && d.predicted.is_finite()
                    && (value - d.predicted).abs() > super::tolerance(d.predicted, 0.1)
                {
                    want.push((i, d, value));
                }
            }
            assert!(want.len() > 50, "{} failing cycles", want.len());
            assert_eq!(got.len(), want.len(), "seed {seed}");
            for ((i, a, _), (j, b, _)) in got.iter().zip(&want) {
                assert_eq!(i, j);
                assert_eq!(a.predicted.to_bits(), b.predicted.to_bits(), "reaction {i}");
                assert_eq!(fast.combination(a), slow.combination(b), "reaction {i}");
            }
            assert_eq!(fast.rank(), slow.rank());
            assert!(todo.iter().all(|&(i, v)| ln_k[i] == v));
        }
    }
}
