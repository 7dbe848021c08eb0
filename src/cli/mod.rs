//! Command-line adapter (filled in below).

/// Entry point of the binary; returns the process exit code.
pub fn main() -> i32 {
    0
}
