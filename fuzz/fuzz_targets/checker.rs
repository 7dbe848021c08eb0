//! Fuzz target `checker`: arbitrary bytes, read as UTF-8 with bad bytes
//! replaced, through [`stoik_fuzz::bodies::checker`].
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    stoik_fuzz::bodies::checker(&stoik_fuzz::text_of(data));
});
