//! Bytes as a file on disk through what the app and CLI call on a file they are given:
//! `inspect` and the wind loader (GRIB2, NetCDF or CSV by content), the sea-temperature
//! file reader and the NetCDF sea-temperature reader. The file lives in memory
//! (`/dev/shm`) and is rewritten for each input.
#![no_main]

use libfuzzer_sys::fuzz_target;

#[path = "common/shm_file.rs"]
mod shm_file;
use shm_file::path;

fuzz_target!(|data: &[u8]| {
    let (ext, body) = match data.split_first() {
        Some((k, rest)) => (["grib2", "nc", "csv"][usize::from(*k) % 3], rest),
        None => ("csv", data),
    };
    let p = path(ext);
    if std::fs::write(&p, body).is_err() {
        return;
    }
    let _ = shelfwind::wind::inspect_file(&p);
    let _ = shelfwind::wind::load_sources(std::slice::from_ref(&p));
    let _ = shelfwind::sst::read_sst_file(&p, &[]);
    let _ = shelfwind::wind::sample_netcdf_sst(&p, &[(37.0, -123.0)]);
    let _ = std::fs::remove_file(&p);
});
