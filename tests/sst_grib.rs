//! Sea temperature from GRIB2 against ecCodes: `tests/fixtures/grib2/
//! make_sst_fixtures.py` writes water temperature with land masked by a bit-map, and
//! `grib_get_data -m missing` dumps it (`sst_water_bitmap.grib2.dump.txt`).

use shelfwind::coast::LatLon;
use shelfwind::wind::sample_sst_grib2;
use std::path::PathBuf;

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/grib2")
        .join(name)
}

/// Per message, ecCodes' value (K) at (lat, lon east), `None` where missing.
fn dump_value(message: usize, lat: f64, lon: f64) -> Option<f64> {
    let text = std::fs::read_to_string(fixture("sst_water_bitmap.grib2.dump.txt")).expect("dump");
    let block = text
        .split("Latitude Longitude Value")
        .filter(|b| !b.trim().is_empty())
        .nth(message)
        .expect("message");
    block.lines().find_map(|l| {
        let f: Vec<&str> = l.split_whitespace().collect();
        let at = |k: usize| f.get(k).and_then(|x| x.parse::<f64>().ok());
        if (at(0)? - lat).abs() < 1e-6 && (at(1)? - lon).abs() < 1e-6 {
            Some(f[2].parse::<f64>().ok())
        } else {
            None
        }
    })?
}

/// A point on a grid node takes ecCodes' value there (in °C); a point in a cell with a
/// masked (land) corner takes the nearest sea value within one grid step (README,
/// "Checking against the sea temperature"): at 237.7 E, 0.8 steps from the sea node at
/// 237.5 E, that node's value as ecCodes gives it; at 237.8 E, among the land columns
/// and 1.2 steps from the sea, none.
#[test]
fn water_temperature_at_sea_and_next_to_the_land_matches_eccodes() {
    let file = std::fs::File::open(fixture("sst_water_bitmap.grib2")).expect("fixture");
    let points = [
        LatLon::new(37.0, -123.0),
        LatLon::new(37.0, -122.3),
        LatLon::new(37.0, -122.2),
    ];
    let s = sample_sst_grib2(std::io::BufReader::new(file), &points)
        .expect("read")
        .expect("a sea temperature");
    assert_eq!(s.times.len(), 3);
    assert_eq!(s.times[1].to_rfc3339(), "2027-06-02T00:00:00+00:00");
    assert_eq!(
        dump_value(0, 37.0, 237.75),
        None,
        "the land column is masked"
    );
    for step in 0..3 {
        let at_sea = dump_value(step, 37.0, 237.0).expect("sea") - 273.15;
        let nearest = dump_value(step, 37.0, 237.5).expect("sea") - 273.15;
        assert!(
            (s.points[0][step] - at_sea).abs() < 1e-4,
            "{} vs {at_sea}",
            s.points[0][step]
        );
        assert!(
            (s.points[1][step] - nearest).abs() < 1e-4,
            "{} vs {nearest}",
            s.points[1][step]
        );
        assert!(s.points[2][step].is_nan(), "{}", s.points[2][step]);
    }
}
