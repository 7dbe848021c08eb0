//! Fuzz target `format_roundtrip`: arbitrary bytes, read as UTF-8 with bad bytes
//! replaced, through [`stoik_fuzz::bodies::format_roundtrip`].
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    stoik_fuzz::bodies::format_roundtrip(&stoik_fuzz::text_of(data));
});
