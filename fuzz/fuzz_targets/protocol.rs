//! Fuzz target: any text as a protocol file must parse or be refused,
//! never panic.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(text) = std::str::from_utf8(data) {
        let _ = patternproof_protocol::Protocol::from_file_text(text);
    }
});
