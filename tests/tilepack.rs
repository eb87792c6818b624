//! Map packs read back tile by tile: the fixtures' tile folder, MBTiles and PMTiles hold
//! the same tiles (written by Python's sqlite3 and PyPI pmtiles, see
//! tests/fixtures/tiles/README.md); the folder's files are the reference. Damaged and
//! unusable packs give errors that say what was expected.

#![cfg(feature = "gui")]

use shelfwind::tilepack::{TileFormat, open_pack};
use std::path::{Path, PathBuf};

fn fixture(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/tiles")
        .join(name)
}

/// The tiles the fixtures hold, as (z, x, y) with y from the north.
const TILES: [(u8, u32, u32); 5] = [(1, 0, 0), (2, 0, 0), (2, 1, 0), (2, 0, 1), (2, 1, 1)];

fn reference(z: u8, x: u32, y: u32) -> Vec<u8> {
    std::fs::read(fixture(&format!("folder/{z}/{x}/{y}.png"))).expect("reference tile")
}

fn check_pack(name: &str) {
    let mut pack = open_pack(&fixture(name)).unwrap_or_else(|e| panic!("{name}: {e}"));
    let info = pack.info().clone();
    assert_eq!(info.format, TileFormat::Png, "{name}");
    assert_eq!((info.min_zoom, info.max_zoom), (1, 2), "{name}");
    assert_eq!(
        info.attribution, "Invented tiles for Shelfwind's tests",
        "{name}"
    );
    let b = info.bounds.expect("bounds");
    assert!(
        (b.west_deg + 180.0).abs() < 1e-6 && b.east_deg.abs() < 1e-6,
        "{name}: {b:?}"
    );
    assert!(
        b.south_deg.abs() < 1e-6 && (b.north_deg - 85.0511).abs() < 1e-3,
        "{name}: {b:?}"
    );
    for (z, x, y) in TILES {
        let got = pack.tile(z, x, y).expect("readable").expect("a tile");
        assert!(got == reference(z, x, y), "{name}: tile {z}/{x}/{y}");
    }
    // Tiles the pack does not have: other places, zooms, and rows past the grid.
    for (z, x, y) in [
        (0, 0, 0),
        (1, 1, 1),
        (2, 3, 3),
        (2, 0, 2),
        (3, 0, 0),
        (1, 0, 7),
    ] {
        assert!(
            pack.tile(z, x, y).expect("readable").is_none(),
            "{name}: {z}/{x}/{y}"
        );
    }
}

#[test]
fn a_tile_folder_gives_its_files() {
    check_pack("folder");
}

/// Rows are stored from the south (TMS): tile 2/0/0 is row 3 in the file, so a reader
/// that did not flip them would find nothing, or the wrong tile.
#[test]
fn mbtiles_give_the_same_tiles_in_tms_order() {
    check_pack("pack.mbtiles");
    let pack = open_pack(&fixture("pack.mbtiles")).expect("pack");
    assert_eq!(pack.info().name, "Invented test pack");
}

#[test]
fn pmtiles_give_the_same_tiles() {
    check_pack("pack.pmtiles");
    let pack = open_pack(&fixture("pack.pmtiles")).expect("pack");
    assert_eq!(pack.info().name, "Invented test pack");
}

#[test]
fn a_folder_of_jpeg_tiles_is_read() {
    let mut pack = open_pack(&fixture("jpg-folder")).expect("pack");
    assert_eq!(pack.info().format, TileFormat::Jpeg);
    assert_eq!(pack.info().attribution, "jpg-folder");
    let bytes = pack.tile(0, 0, 0).expect("readable").expect("a tile");
    assert_eq!(
        bytes,
        std::fs::read(fixture("jpg-folder/0/0/0.jpg")).expect("file")
    );
}

fn error_of(path: &Path) -> String {
    match open_pack(path) {
        Ok(_) => panic!("{} opened", path.display()),
        Err(e) => e.to_string(),
    }
}

#[test]
fn damaged_and_unusable_packs_say_what_was_expected() {
    let cases = [
        (
            "not-sqlite.mbtiles",
            "not a readable MBTiles file: the file does not start like an SQLite database",
        ),
        (
            "no-tiles.mbtiles",
            "not an MBTiles file: an MBTiles file has a table named tiles, this SQLite file has none",
        ),
        (
            "truncated.pmtiles",
            "damaged PMTiles file: the file has 60 bytes, shorter than the 127-byte header",
        ),
        (
            "webp.pmtiles",
            "the tiles are WebP, which Shelfwind cannot draw: use a pack with PNG or JPEG tiles",
        ),
        (
            "README.md",
            "not a map pack: expected a tile folder (z/x/y.png or .jpg), an MBTiles file (SQLite) or a PMTiles file",
        ),
        (
            "no-such-pack.mbtiles",
            "cannot read the map pack: No such file or directory (os error 2)",
        ),
    ];
    for (name, want) in cases {
        assert_eq!(error_of(&fixture(name)), want, "{name}");
    }
    let empty = tempfile::tempdir().expect("temp dir");
    assert_eq!(
        error_of(empty.path()),
        "no tiles in this folder: expected files named z/x/y.png or z/x/y.jpg"
    );
}

/// A PMTiles file cut inside its tile data: the header says more than the file holds.
#[test]
fn a_pmtiles_file_cut_short_is_refused() {
    let bytes = std::fs::read(fixture("pack.pmtiles")).expect("fixture");
    let dir = tempfile::tempdir().expect("temp dir");
    let cut = dir.path().join("cut.pmtiles");
    std::fs::write(&cut, &bytes[..bytes.len() - 100]).expect("write");
    let error = error_of(&cut);
    assert_eq!(
        error,
        format!(
            "damaged PMTiles file: the file has {} bytes; its header says it has {}",
            bytes.len() - 100,
            bytes.len()
        )
    );
}
