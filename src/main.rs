//! The `stoik` binary: a thin shell over [`stoik::cli`].

/// mimalloc instead of the system allocator: the analysis makes many small
/// allocations, and on large libraries glibc's allocator spent a sixth of
/// the time in malloc and free and returned memory to the system only to
/// fault it in again.
#[global_allocator]
static ALLOCATOR: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() {
    std::process::exit(stoik::cli::main());
}
