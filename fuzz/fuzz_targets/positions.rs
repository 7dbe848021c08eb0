//! Fuzz target `positions`: arbitrary bytes, read as UTF-8 with bad bytes
//! replaced, through [`stoik_fuzz::bodies::positions`].
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    stoik_fuzz::bodies::positions(&stoik_fuzz::text_of(data));
});
