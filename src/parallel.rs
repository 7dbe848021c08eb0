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
