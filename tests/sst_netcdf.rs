//! Sea temperature from NetCDF against netCDF4's own values: a real NOAA daily OI SST
//! analysis (Debian `r-cran-stars`' `reduced.nc`, NetCDF-3 classic, packed, land as fill;
//! source and licence in `tests/fixtures/netcdf/README.md`) and a NetCDF-4 packed,
//! compressed file in kelvin written by PyPI netCDF4 (`make_sst_fixtures.py`).

use shelfwind::wind::sample_netcdf_sst;
use std::path::PathBuf;

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/netcdf")
        .join(name)
}

/// At grid nodes the value is netCDF4's (`stars_reduced.nc.ref.txt`: 14.70 °C at 35 N
/// 236 E, 22.56 °C at 29 S 200 E; 39 N 260 E is land, a fill value): no sea value there.
#[test]
fn the_real_noaa_analysis_gives_netcdf4s_values_at_its_nodes() {
    let s = sample_netcdf_sst(
        &fixture("stars_reduced.nc"),
        &[(35.0, -124.0), (-29.0, 200.0), (39.0, -100.0)],
    )
    .expect("read");
    let (times, per_point) = (s.times, s.points);
    assert_eq!(times.len(), 1);
    assert_eq!(times[0].date_naive().to_string(), "1981-12-31");
    assert!(
        (per_point[0][0] - 14.70).abs() < 1e-4,
        "{}",
        per_point[0][0]
    );
    assert!(
        (per_point[1][0] - 22.56).abs() < 1e-4,
        "{}",
        per_point[1][0]
    );
    assert!(per_point[2][0].is_nan(), "land: {}", per_point[2][0]);
}

/// Kelvin to °C, unpacked as netCDF4 unpacks it; between two nodes, linear; next to the
/// land, the nearest sea node within one grid step (README, "Checking against the sea
/// temperature"): at -122.4 E (0.4 of the way from the -122.50 node to the land node at
/// -122.25) the -122.50 node's value; at -122.2 E, between two land nodes and 1.2 steps
/// from the sea, none.
#[test]
#[allow(clippy::needless_range_loop)] // k indexes the times of three series
fn a_packed_compressed_netcdf4_file_in_kelvin() {
    let reference: Vec<(usize, f64, f64)> =
        std::fs::read_to_string(fixture("sst_nc4_packed.nc.ref.txt"))
            .expect("ref")
            .lines()
            .filter(|l| !l.starts_with('#'))
            .map(|l| {
                let f: Vec<&str> = l.split_whitespace().collect();
                (
                    f[0].parse().expect("time"),
                    f[1].parse().expect("lon"),
                    f[2].parse().expect("value"),
                )
            })
            .collect();
    let at = |k: usize, lon: f64| {
        reference
            .iter()
            .find(|r| r.0 == k && (r.1 - lon).abs() < 1e-6)
            .map(|r| r.2 - 273.15)
            .expect("in the reference")
    };
    let s = sample_netcdf_sst(
        &fixture("sst_nc4_packed.nc"),
        &[
            (37.0, -123.0),
            (37.0, -122.875),
            (37.0, -122.4),
            (37.0, -122.2),
        ],
    )
    .expect("read");
    let (times, per_point) = (s.times, s.points);
    assert_eq!(times.len(), 3);
    for k in 0..3 {
        let (sea, between, by_land) = (per_point[0][k], per_point[1][k], per_point[2][k]);
        assert!((sea - at(k, -123.0)).abs() < 1e-4);
        let mid = f64::midpoint(at(k, -123.0), at(k, -122.75));
        assert!((between - mid).abs() < 1e-4, "{between} vs {mid}");
        assert!((by_land - at(k, -122.5)).abs() < 1e-4, "{by_land}");
        assert!(per_point[3][k].is_nan(), "{}", per_point[3][k]);
    }
}
