//! Bytes through the detailed-land reader of coast packs (Shapefile, GSHHG, GeoJSON).
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let _ = shelfwind::coast::read_land_file(data);
});
