//! Text through the sea-temperature readers: CSV series (with missing-value codes) and
//! NMEA 0183 logs.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(text) = std::str::from_utf8(data) {
        let _ = shelfwind::sst::read_sst_csv(text, &[99.0, 999.0]);
        let _ = shelfwind::sst::read_nmea_log(text);
    }
});
