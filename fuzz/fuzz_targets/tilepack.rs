//! Bytes as an offline map pack on disk through what the app calls on a pack it is
//! given: `tilepack::open_pack` (MBTiles through SQLite, or PMTiles, by the first bytes),
//! the pack's description, and tiles at every zoom it claims (up to the map's deepest, 30)
//! at its corners and at the middle of the area it says it covers. The first byte picks
//! the file's extension; the file lives in memory (`/dev/shm`).
#![no_main]

use libfuzzer_sys::fuzz_target;
use shelfwind::tilepack;

#[path = "common/shm_file.rs"]
mod shm_file;
use shm_file::path;

fuzz_target!(|data: &[u8]| {
    let (ext, body) = match data.split_first() {
        Some((k, rest)) => (["mbtiles", "pmtiles", "bin"][usize::from(*k) % 3], rest),
        None => ("bin", data),
    };
    let p = path(ext);
    if std::fs::write(&p, body).is_err() {
        return;
    }
    if let Ok(mut pack) = tilepack::open_pack(&p) {
        let info = pack.info().clone();
        let _ = format!("{info:?}");
        let middle = info.bounds.map(|b| {
            (
                (b.south_deg + b.north_deg) / 2.0,
                (b.west_deg + b.east_deg) / 2.0,
            )
        });
        for z in info.min_zoom..=info.max_zoom.min(30) {
            let last = (1u32 << z) - 1;
            let mut places = vec![(0, 0), (last, last)];
            if let Some((lat, lon)) = middle {
                let (x, y) = tilepack::tile_at(z, lat, lon);
                places.push((x as u32, y as u32));
            }
            for (x, y) in places {
                let _ = pack.tile(z, x, y);
            }
        }
    }
    let _ = std::fs::remove_file(&p);
});
