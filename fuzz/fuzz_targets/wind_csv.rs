//! Text through the CSV wind and wave series reader.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(text) = std::str::from_utf8(data) {
        let _ = shelfwind::wind::read_csv_series(text);
    }
});
