//! Coast packs: the three readers on their fixtures, cutting a pack, laying it over the
//! bundled land, and the command line end to end. The fixtures and where they come
//! from are in `tests/fixtures/coast_packs/README.md`; the invented shapes' positions
//! are those written in its `make_fixtures.py`.

use std::path::PathBuf;
use std::process::Command;

use shelfwind::coast::{
    Land, LandFileFormat, LatLon, Pack, PackBox, RouteSettings, SeaSide, SideFinding, cut_pack,
    distance_m, find_sea_side, read_land_file, sea_routes,
};

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/coast_packs")
        .join(name)
}

fn read(name: &str) -> Vec<u8> {
    std::fs::read(fixture(name)).expect("fixture")
}

/// The box of the GSHHG extract (`make_fixtures.py`, `POINT_REYES_BOX`).
fn point_reyes_box() -> PackBox {
    PackBox::new(-123.10, 37.65, -122.75, 38.35).expect("box")
}

fn point_reyes_pack() -> Pack {
    let source = read_land_file(&read("point-reyes-gshhg-f.b")).expect("GSHHG extract");
    cut_pack(
        &source.rings,
        point_reyes_box(),
        "GSHHG 2.3 full resolution",
    )
    .0
}

/// Land made of a pack alone (over no land at all).
fn pack_land(name: &str) -> Land {
    let source = read_land_file(&read(name)).expect("fixture reads");
    let bbox = PackBox::new(-141.0, 39.0, -139.0, 41.0).expect("box");
    Land::default().with_pack(&cut_pack(&source.rings, bbox, "invented").0)
}

/// Southeast Farallon Island (the GSHHG extract's polygon 1 spans 37.6915..37.7042 N,
/// 123.0097..122.9997 W; the island lies at about 37.70 N 123.00 W on any chart of the
/// Gulf of the Farallones).
const SE_FARALLON: LatLon = LatLon {
    lat_deg: 37.698,
    lon_deg: -123.005,
};

#[test]
fn geojson_islands_and_harbour_are_read_with_their_holes() {
    let islands = read_land_file(&read("islands.geojson")).expect("islands");
    assert_eq!(islands.format, LandFileFormat::GeoJson);
    // Kestrel Island with its lagoon, and the two Wren Rocks.
    assert_eq!(islands.rings.len(), 4);
    let land = pack_land("islands.geojson");
    assert!(land.is_land(LatLon::new(40.02, -140.05)), "Kestrel Island");
    assert!(!land.is_land(LatLon::new(40.07, -140.05)), "the lagoon");
    assert!(!land.is_land(LatLon::new(40.045, -139.96)), "the inlet");
    assert!(
        land.is_land(LatLon::new(40.01, -139.89)),
        "the larger Wren Rock"
    );
    assert!(
        !land.is_land(LatLon::new(40.01, -139.87)),
        "between the rocks"
    );

    let harbour = read_land_file(&read("harbour.geojson")).expect("harbour");
    assert_eq!(harbour.rings.len(), 1);
    let land = pack_land("harbour.geojson");
    assert!(land.is_land(LatLon::new(40.22, -140.015)), "the shore");
    assert!(!land.is_land(LatLon::new(40.23, -140.004)), "the basin");
    assert!(
        land.is_land(LatLon::new(40.2455, -140.005)),
        "the breakwater"
    );
    assert!(!land.is_land(LatLon::new(40.2455, -139.999)), "the mouth");
}

#[test]
fn shapefile_islands_read_from_the_shp_alone() {
    // Only the .shp bytes are given: the .shx and .dbf beside it are not needed.
    let islands = read_land_file(&read("islands.shp")).expect("islands.shp");
    assert_eq!(islands.format, LandFileFormat::Shapefile);
    assert_eq!(islands.rings.len(), 4);
    let from_geojson = read_land_file(&read("islands.geojson")).expect("geojson");
    let points = |rings: &[Vec<LatLon>]| rings.iter().map(Vec::len).sum::<usize>();
    assert_eq!(points(&islands.rings), points(&from_geojson.rings));
    let land = pack_land("islands.shp");
    assert!(land.is_land(LatLon::new(40.02, -140.05)), "Kestrel Island");
    assert!(!land.is_land(LatLon::new(40.07, -140.05)), "the lagoon");

    let mut cut = read("islands.shp");
    cut.truncate(cut.len() - 10);
    let err = read_land_file(&cut).expect_err("cut short");
    assert!(
        err.to_string()
            .starts_with("ESRI Shapefile: record 2 at byte 368: content length"),
        "{err}"
    );
}

#[test]
fn gshhg_extract_reads_the_farallones_and_the_point_reyes_coast() {
    let source = read_land_file(&read("point-reyes-gshhg-f.b")).expect("GSHHG");
    assert_eq!(source.format, LandFileFormat::Gshhg);
    // The mainland piece, Southeast Farallon, West End, two more Farallon rocks and a
    // rock off Bodega Head (the six records `make_fixtures.py` printed).
    assert_eq!(source.rings.len(), 6);
    assert_eq!(source.rings[0].len(), 593);
    let pack = point_reyes_pack();
    let land = Land::default().with_pack(&pack);
    assert!(land.is_land(SE_FARALLON));
    assert!(land.is_land(LatLon::new(38.10, -122.90)), "Inverness Ridge");
    assert!(
        !land.is_land(LatLon::new(38.10, -123.05)),
        "the Pacific off Point Reyes Beach"
    );

    let mut bad = read("point-reyes-gshhg-f.b");
    bad[11] = 9; // level 9 in the first record's flag
    assert!(read_land_file(&bad).is_err());
    let err = read_land_file(&read("point-reyes-gshhg-f.b")[..4800]).expect_err("cut");
    assert!(err.to_string().starts_with("GSHHG binary: record"), "{err}");
}

#[test]
fn a_cut_pack_holds_closed_rings_inside_its_box_and_round_trips() {
    let source = read_land_file(&read("point-reyes-gshhg-f.b")).expect("GSHHG");
    let small = PackBox::new(-123.05, 37.68, -122.95, 38.0).expect("box");
    let (pack, summary) = cut_pack(&source.rings, small, "GSHHG");
    assert!(summary.rings >= 3, "the Farallon islets and the mainland");
    for ring in pack.rings() {
        assert!(ring.len() >= 3);
        assert_ne!(ring.first(), ring.last(), "closing point not repeated");
        assert!(ring.iter().all(|&p| small.contains(p)), "inside the box");
    }
    let bytes = pack.to_bytes();
    let back = Pack::from_bytes(&bytes).expect("reads back");
    assert_eq!(back.rings(), pack.rings());
    assert_eq!(back.credit, "GSHHG");
    for len in 0..bytes.len() {
        assert!(Pack::from_bytes(&bytes[..len]).is_err(), "prefix of {len}");
    }
    // Southeast Farallon is about 0.4 km² (GSHHG polygon 1: 0.0100° by 0.0127°, an
    // irregular outline): the land in the box is some km² of mainland plus the islets.
    assert!(summary.land_area_km2 > 0.3, "{summary:?}");
}

#[test]
fn with_pack_answers_inside_the_box_and_the_bundled_land_outside() {
    let bundled = Land::bundled();
    let land = bundled.with_pack(&point_reyes_pack());
    assert!(
        !bundled.is_land(SE_FARALLON),
        "Natural Earth 1:10m has no Farallones"
    );
    assert!(land.is_land(SE_FARALLON), "the pack has");
    for (place, p) in [
        ("San Francisco (bundled land)", LatLon::new(37.77, -122.43)),
        (
            "Petaluma (bundled, outside the box)",
            LatLon::new(38.23, -122.64),
        ),
        ("Inverness Ridge (pack)", LatLon::new(38.10, -122.90)),
        ("Gulf of the Farallones (both)", LatLon::new(37.80, -122.80)),
        ("open Pacific (outside)", LatLon::new(37.5, -123.5)),
    ] {
        assert_eq!(land.is_land(p), bundled.is_land(p), "{place}");
    }
}

#[test]
fn the_sea_side_of_a_farallon_shore_comes_from_the_pack() {
    // North along the east shore of Southeast Farallon (GSHHG points 37.6964 N
    // 123.0000 W to 37.7018 N 123.0014 W): the island to the west, the sea east.
    let shore = [
        LatLon::new(37.6964, -122.9998),
        LatLon::new(37.7018, -123.0012),
    ];
    let land = Land::bundled().with_pack(&point_reyes_pack());
    assert_eq!(
        find_sea_side(&land, &shore),
        SideFinding::Sea(SeaSide::Right)
    );
    assert_eq!(find_sea_side(Land::bundled(), &shore), SideFinding::BothSea);
}

#[test]
fn ways_by_sea_round_the_pack_island_and_cross_the_box_edge_over_water() {
    let land = Land::bundled().with_pack(&point_reyes_pack());
    let settings = RouteSettings {
        clearance_m: 200.0,
        ..RouteSettings::default()
    };
    // West to east across Southeast Farallon: the pack makes the way bend round it.
    let (from, to) = (LatLon::new(37.698, -123.06), LatLon::new(37.698, -122.95));
    let straight = distance_m(from, to);
    let bundled = sea_routes(Land::bundled(), from, &[to], &settings)[0]
        .clone()
        .expect("way");
    assert!(
        (bundled.length_m - straight).abs() < 1.0,
        "no island in Natural Earth"
    );
    let round = sea_routes(&land, from, &[to], &settings)[0]
        .clone()
        .expect("way");
    assert!(round.length_m > straight + 50.0, "{} m", round.length_m);
    assert!(round.points.iter().all(|&p| !land.is_land(p)));
    // Open water across the south and west edges of the box: nothing is in the way.
    for (from, to) in [
        (LatLon::new(37.60, -122.90), LatLon::new(37.70, -122.90)),
        (LatLon::new(38.10, -123.20), LatLon::new(38.10, -123.05)),
    ] {
        let way = sea_routes(&land, from, &[to], &settings)[0]
            .clone()
            .expect("way");
        assert!((way.length_m - distance_m(from, to)).abs() < 1.0, "{way:?}");
    }
}

#[test]
fn command_line_cuts_a_pack_and_index_uses_it() {
    let dir = tempfile::tempdir().expect("tmp");
    let pack = dir.path().join("point-reyes.swpack");
    let out = Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .args(["coast-pack", "--from"])
        .arg(fixture("point-reyes-gshhg-f.b"))
        .args(["--bbox", "-123.1,37.65,-122.75,38.35", "--out"])
        .arg(&pack)
        .output()
        .expect("runs");
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(stdout.contains("read 6 rings"), "{stdout}");
    assert!(stdout.contains("(GSHHG binary)"), "{stdout}");

    let coast = dir.path().join("farallon.geojson");
    std::fs::write(
        &coast,
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"se-farallon-east"},"geometry":{"type":"LineString","coordinates":[[-122.9998,37.6964],[-123.0012,37.7018]]}}]}"#,
    )
    .expect("coast");
    let wind = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/csv/components_no_position.csv");
    let index = |land: Option<&PathBuf>| {
        let mut c = Command::new(env!("CARGO_BIN_EXE_shelfwind"));
        c.arg("index")
            .arg("--coast")
            .arg(&coast)
            .arg("--wind")
            .arg(&wind);
        if let Some(p) = land {
            c.arg("--land").arg(p);
        }
        c.output().expect("runs")
    };
    let without = index(None);
    assert_eq!(without.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&without.stderr).contains("both sides look like sea"));
    let with = index(Some(&pack));
    assert!(
        with.status.success(),
        "{}",
        String::from_utf8_lossy(&with.stderr)
    );
    // A 10 m/s wind from the north along a coast facing east (offshore about 80°):
    // Ekman transport to the right of the wind, west, onto the coast: downwelling, a
    // negative index (Bakun 1973 sign convention).
    let text = String::from_utf8_lossy(&with.stdout);
    let first: Vec<&str> = text.lines().nth(1).expect("a row").split(',').collect();
    let index_value: f64 = first[6].parse().expect("number");
    assert!(index_value < 0.0, "{text}");

    std::fs::write(dir.path().join("bad.swpack"), b"SWPACK01 not really").expect("write");
    let bad = index(Some(&dir.path().join("bad.swpack")));
    let err = String::from_utf8_lossy(&bad.stderr);
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(
        err.starts_with("shelfwind: bad coast pack: coast pack: byte"),
        "{err}"
    );
    assert!(err.trim_end().ends_with("bad.swpack"), "{err}");
}
