//! Work side by side on the machine's cores, on one pool of threads kept
//! for the life of the process.
//!
//! The language server analyses a document again after every keystroke,
//! and each analysis splits its longer steps in two. Starting threads for
//! every step cost more than the thread start itself: each new thread's
//! allocator heap began on pages the system had to zero again. The pool's
//! threads and their heaps outlive the analyses.

use rayon::prelude::*;

/// Run `a` and `b` side by side and return both results. A panic in
/// either is raised again here, once both have finished.
pub fn both<A, B, RA, RB>(a: A, b: B) -> (RA, RB)
where
    A: FnOnce() -> RA + Send,
    B: FnOnce() -> RB + Send,
    RA: Send,
    RB: Send,
{
    rayon::join(a, b)
}

/// `f` over `items`, results in order, on every core for runs of at least
/// `min` items at a time.
pub fn map_in_order<'a, T: Sync, R: Send>(
    items: &'a [T],
    min: usize,
    f: impl Fn(&'a T) -> R + Sync + Send,
) -> Vec<R> {
    items.par_iter().with_min_len(min.max(1)).map(f).collect()
}

/// How many threads the pool runs.
pub fn cores() -> usize {
    rayon::current_num_threads()
}

/// `f` over `items`, results in order, in one run of neighbouring items per
/// state of `states`, side by side; each run has its state (scratch space,
/// say) to itself. With no state there is nothing to run `f` with, and the
/// result is empty: callers give at least one.
pub fn map_with_states<T: Sync, S: Send, R: Send>(
    states: &mut [S],
    items: &[T],
    f: impl Fn(&mut S, &T) -> R + Sync + Send,
) -> Vec<R> {
    if states.len() < 2 {
        return match states.first_mut() {
            Some(state) => items.iter().map(|x| f(state, x)).collect(),
            None => Vec::new(),
        };
    }
    let run = items.len().div_ceil(states.len()).max(1);
    let runs: Vec<Vec<R>> = states
        .par_iter_mut()
        .zip(items.par_chunks(run))
        .map(|(state, chunk)| chunk.iter().map(|x| f(state, x)).collect())
        .collect();
    runs.into_iter().flatten().collect()
}
