//! GRIB2 bytes through every GRIB2 reader the app and CLI call: wind (single forecast
//! and ensemble members), waves, sea temperature, and the summary `inspect` prints.
#![no_main]

use libfuzzer_sys::fuzz_target;
use shelfwind::coast::LatLon;
use shelfwind::progress::Progress;
use std::io::Cursor;

fuzz_target!(|data: &[u8]| {
    let points = [LatLon::new(37.0, -123.0), LatLon::new(38.5, -123.4)];
    let _ = shelfwind::wind::sample_grib2(Cursor::new(data), &points);
    let _ = shelfwind::wind::sample_grib2_members(Cursor::new(data), &points);
    let _ = shelfwind::wind::sample_waves_grib2(data, &points, &Progress::new());
    let _ = shelfwind::wind::sample_sst_grib2(data, &points);
    let _ = shelfwind::wind::inspect_grib2(data);
});
