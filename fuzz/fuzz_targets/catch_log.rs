//! Text through the catch-log reader, refusing and skipping bad rows.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(text) = std::str::from_utf8(data) {
        let _ = shelfwind::calibrate::read_catch_log(text, false);
        let _ = shelfwind::calibrate::read_catch_log(text, true);
    }
});
