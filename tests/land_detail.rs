//! The bundled 1:10m land against the 1:50m land it replaced (kept as a test fixture,
//! `tests/fixtures/land/land-50m.bin`; both Natural Earth 4.1.0, see `assets/README.md`),
//! on a real place where the coarser outline cannot see the coast.

use shelfwind::coast::{Land, LatLon, SeaSide, SideFinding, find_sea_side};

fn land_50m() -> Land {
    let bytes = std::fs::read(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/fixtures/land/land-50m.bin"
    ))
    .expect("fixture");
    Land::from_bytes(&bytes).expect("valid")
}

/// Pacific Grove, on the north shore of the Monterey Peninsula, California, east of Point
/// Pinos. The 1:50m outline has no peninsula here (its coast runs about 3 km to the
/// south-east), so a segment drawn along the shore finds sea on both sides; the 1:10m
/// outline has the peninsula, and the sea to the north, on the left walking east-south-east.
#[test]
fn pacific_grove_shore_has_its_sea_side_only_at_1_10m() {
    let shore = [LatLon::new(36.626, -121.93), LatLon::new(36.615, -121.905)];
    assert_eq!(
        find_sea_side(Land::bundled(), &shore),
        SideFinding::Sea(SeaSide::Left)
    );
    assert_eq!(find_sea_side(&land_50m(), &shore), SideFinding::BothSea);
    // The town itself (36.615 N, 121.92 W) is land only in the finer outline.
    let town = LatLon::new(36.615, -121.92);
    assert!(Land::bundled().is_land(town));
    assert!(!land_50m().is_land(town));
}

/// Tomales Bay, California: a narrow inlet (1–2 km wide) behind the Point Reyes
/// peninsula. Off Inverness (38.10 N, 122.85 W) the 1:10m outline has water where the
/// 1:50m outline has land.
#[test]
fn tomales_bay_off_inverness_is_water_only_at_1_10m() {
    let bay = LatLon::new(38.10, -122.85);
    assert!(!Land::bundled().is_land(bay));
    assert!(land_50m().is_land(bay));
}
