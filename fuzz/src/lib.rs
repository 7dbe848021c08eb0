//! What the fuzz targets check, as a library so that the same bodies also
//! run on the stable toolchain: `tests/fuzz_regressions.rs` in the main
//! crate includes `bodies.rs` and runs every body over the seed corpus and
//! the kept crash inputs.

#![forbid(unsafe_code)]

#[path = "../../tests/format/support.rs"]
pub mod support;

pub mod bodies;

/// The text a target reads from the fuzzer's bytes: UTF-8, with every bad
/// byte read as U+FFFD, as stoik reads a file that is not UTF-8.
pub fn text_of(data: &[u8]) -> std::borrow::Cow<'_, str> {
    String::from_utf8_lossy(data)
}
