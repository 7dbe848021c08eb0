//! Which memory pages a large check asks the system for.
//!
//! With transparent huge pages, the allocator's arena is backed by 2 MB
//! pages, which are zeroed and mapped with one fault each instead of 512.
//! That pays for heaps of a few hundred megabytes, but a check of 10^6
//! reactions holds almost 2 GB, and on the machine the performance figures
//! come from the kernel then spent 4 to 6 s of system time compacting
//! memory to find free huge pages, against 2 to 3 s with ordinary pages
//! (README, performance). So above [`LARGE_INPUT`] bytes of input the
//! process gives huge pages up. Nothing else changes: the output is the
//! same either way.

use std::path::PathBuf;

/// Input size above which ordinary pages are asked for; the heap of a check
/// is some twenty times its input.
const LARGE_INPUT: u64 = 32 << 20;

/// Ask for ordinary pages when `files` hold more than [`LARGE_INPUT`]
/// bytes. A failure (an old kernel, another system) leaves the default.
pub fn fit_to_input(files: &[PathBuf]) {
    let total: u64 = files
        .iter()
        .filter_map(|f| std::fs::metadata(f).ok())
        .map(|m| m.len())
        .sum();
    if total > LARGE_INPUT {
        ordinary_pages();
    }
}

#[cfg(target_os = "linux")]
fn ordinary_pages() {
    let _ = rustix::thread::disable_transparent_huge_pages(true);
}

#[cfg(not(target_os = "linux"))]
fn ordinary_pages() {}
