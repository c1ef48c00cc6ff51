//! The RON study loader (properties in quenchless_profile::fuzzing, shared with the seed replay test).
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    if let Err(broken) = quenchless_profile::fuzzing::check_study(data) {
        panic!("{broken}");
    }
});
