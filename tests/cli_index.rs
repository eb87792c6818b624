//! `shelfwind index` end to end: the contract of DESIGN.md (columns, order, units, exit
//! status, one-line errors, no partial output) on the fixture files.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn fixture(rel: &str) -> String {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures")
        .join(rel)
        .display()
        .to_string()
}

fn shelfwind(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .args(args)
        .output()
        .expect("runs")
}

fn stdout(o: &Output) -> String {
    String::from_utf8(o.stdout.clone()).expect("utf-8")
}

fn stderr(o: &Output) -> String {
    String::from_utf8(o.stderr.clone()).expect("utf-8")
}

/// The Bakun (1973) index for a coast with the sea to the west (offshore bearing 270°)
/// written out from the published formulas, independent of the library:
/// `tau = rho_air C_D |U| U`, `M_x = tau_y / (rho_w f)`, `UI = 100 (M_x sin 270°)`.
fn index_sea_west(lat: f64, u: f64, v: f64) -> f64 {
    let tau_y = 1.22 * 1.3e-3 * u.hypot(v) * v;
    let f = 2.0 * 7.292_115e-5 * lat.to_radians().sin();
    -100.0 * tau_y / (1025.0 * f)
}

#[test]
fn csv_table_from_grib2_follows_the_contract() {
    let o = shelfwind(&[
        "index",
        "--coast",
        &fixture("coast/three_segments.geojson"),
        "--wind",
        &fixture("grib2/simple_hours.grib2"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = stdout(&o);
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(
        lines[0],
        "segment_id,time_utc,lat,lon,wind_speed_ms,wind_from_deg,upwelling_index_m3s_per_100m,flag"
    );
    assert_eq!(lines.len(), 1 + 3 * 3);
    let rows: Vec<Vec<&str>> = lines[1..].iter().map(|l| l.split(',').collect()).collect();
    let ids: Vec<&str> = rows.iter().map(|r| r[0]).collect();
    assert_eq!(
        ids,
        [
            "bent-shore",
            "bent-shore",
            "bent-shore",
            "east-facing",
            "east-facing",
            "east-facing",
            "north-bluff",
            "north-bluff",
            "north-bluff"
        ]
    );
    assert_eq!(rows[6][1], "2026-06-15T12:00:00Z");
    assert_eq!(rows[7][1], "2026-06-15T18:00:00Z");
    assert_eq!(rows[8][1], "2026-06-16T00:00:00Z");
    // north-bluff runs along 121.5°W from 36.0 to 36.4°N: midpoint 36.2°N. The fixture's
    // wind is linear in lat/lon (tests/fixtures/grib2/README.md), so bilinear
    // interpolation gives the formula's value there.
    for (row, h) in rows[6..].iter().zip([0.0_f64, 6.0, 12.0]) {
        let (lat, lon_e): (f64, f64) = (36.2, 238.5);
        let u = 5.0 + 0.5 * (lat - 35.0) + 0.2 * (lon_e - 235.0) + 0.1 * h;
        let v = -8.0 + 0.3 * (lon_e - 235.0) - 0.1 * h;
        let got: Vec<f64> = row[2..7]
            .iter()
            .map(|x| x.parse().expect("number"))
            .collect();
        assert!(
            (got[0] - 36.2).abs() < 1e-4 && (got[1] + 121.5).abs() < 1e-6,
            "{row:?}"
        );
        assert!((got[2] - u.hypot(v)).abs() < 1e-3, "speed {row:?}");
        let from = (-u).atan2(-v).to_degrees().rem_euclid(360.0);
        assert!((got[3] - from).abs() < 0.02, "direction {row:?} vs {from}");
        let expected = index_sea_west(lat, u, v);
        assert!(
            (got[4] - expected).abs() < 0.05,
            "index {row:?} vs {expected}"
        );
        // Northerly wind on a west-facing coast: upwelling.
        assert!(got[4] > 100.0);
        assert_eq!(row[7], "");
    }
}

#[test]
fn json_has_the_same_records() {
    let coast = fixture("coast/three_segments.geojson");
    let wind = fixture("grib2/complex_sd_minutes_s2n.grib2");
    let csv = stdout(&shelfwind(&["index", "--coast", &coast, "--wind", &wind]));
    let o = shelfwind(&[
        "index", "--coast", &coast, "--wind", &wind, "--format", "json",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let json: serde_json::Value = serde_json::from_str(&stdout(&o)).expect("valid JSON");
    let records = json.as_array().expect("array");
    assert_eq!(records.len(), csv.lines().count() - 1);
    let first_csv: Vec<&str> = csv.lines().nth(1).expect("row").split(',').collect();
    assert_eq!(records[0]["segment_id"], first_csv[0]);
    assert_eq!(records[0]["time_utc"], first_csv[1]);
    let index = records[0]["upwelling_index_m3s_per_100m"]
        .as_f64()
        .expect("number");
    assert_eq!(index.to_string(), first_csv[6]);
}

#[test]
fn drag_and_density_options_change_the_index_as_the_formula_says() {
    let coast = fixture("coast/three_segments.geojson");
    let wind = fixture("csv/components_no_position.csv");
    let base = stdout(&shelfwind(&["index", "--coast", &coast, "--wind", &wind]));
    let heavy = stdout(&shelfwind(&[
        "index",
        "--coast",
        &coast,
        "--wind",
        &wind,
        "--rho-air",
        "1.83",
        "--drag",
        "constant:0.0026",
    ]));
    let value = |t: &str| -> f64 {
        t.lines()
            .nth(1)
            .expect("row")
            .split(',')
            .nth(6)
            .expect("col")
            .parse()
            .expect("num")
    };
    // tau grows with rho_air × C_D: 1.5 × 2 = 3 times the stress, 3 times the index.
    assert!(
        (value(&heavy) - 3.0 * value(&base)).abs() < 0.01,
        "{} vs {}",
        value(&heavy),
        value(&base)
    );
    let lp = shelfwind(&[
        "index",
        "--coast",
        &coast,
        "--wind",
        &wind,
        "--drag",
        "large-pond-1981",
    ]);
    // At 10 m/s Large & Pond 1981 gives C_D = 1.2e-3: 12/13 of the constant law.
    assert!((value(&stdout(&lp)) - value(&base) * 12.0 / 13.0).abs() < 0.01);
    let bad = shelfwind(&[
        "index",
        "--coast",
        &coast,
        "--wind",
        &wind,
        "--rho-water",
        "10",
    ]);
    assert_eq!(bad.status.code(), Some(2));
    assert!(
        stderr(&bad).contains("sea-water density 10 kg/m^3 is out of range: expected 950 to 1100"),
        "{}",
        stderr(&bad)
    );
}

#[test]
fn station_series_in_knots_with_a_calm() {
    let o = shelfwind(&[
        "index",
        "--coast",
        &fixture("coast/three_segments.geojson"),
        "--wind",
        &fixture("csv/station_knots.csv"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = stdout(&o);
    let north: Vec<Vec<&str>> = text
        .lines()
        .filter(|l| l.starts_with("north-bluff"))
        .map(|l| l.split(',').collect())
        .collect();
    assert_eq!(north.len(), 3);
    // Sorted by time: 12:00Z, then 15:00+02:00 = 13:00Z (the calm), then 18:00Z.
    assert_eq!(north[0][1], "2026-06-15T12:00:00Z");
    assert_eq!(north[1][1], "2026-06-15T13:00:00Z");
    assert_eq!(north[1][4], "0");
    assert_eq!(north[1][5], "", "a calm has no direction");
    assert_eq!(north[1][6], "0");
    assert_eq!(north[0][5], "315");
    // 20 kt from the north = 10.289 m/s (1 kt = 1852/3600 m/s).
    assert_eq!(north[2][4], "10.289");
    assert_eq!(north[2][5], "0");
    let expected = index_sea_west(36.2, 0.0, -20.0 * 1852.0 / 3600.0);
    let got: f64 = north[2][6].parse().expect("number");
    assert!((got - expected).abs() < 0.05, "{got} vs {expected}");
}

#[test]
fn each_segment_takes_the_first_file_that_covers_it() {
    let dir = tempfile::tempdir().expect("temp dir");
    let coast = dir.path().join("coast.geojson");
    std::fs::write(
        &coast,
        r#"{"type":"FeatureCollection","features":[
        {"type":"Feature","properties":{"id":"inside","sea":"left"},"geometry":{"type":"LineString","coordinates":[[-121.5,36.0],[-121.5,36.4]]}},
        {"type":"Feature","properties":{"id":"far-north","sea":"left"},"geometry":{"type":"LineString","coordinates":[[-124.0,45.0],[-124.0,45.2]]}}]}"#,
    )
    .expect("write");
    let grib = fixture("grib2/simple_hours.grib2");
    let csv = fixture("csv/components_no_position.csv");
    let o = shelfwind(&[
        "index",
        "--coast",
        coast.to_str().expect("utf-8"),
        "--wind",
        &grib,
        "--wind",
        &csv,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = stdout(&o);
    assert_eq!(
        text.lines().filter(|l| l.starts_with("inside,")).count(),
        3,
        "three GRIB2 steps"
    );
    let far: Vec<&str> = text
        .lines()
        .filter(|l| l.starts_with("far-north,"))
        .collect();
    assert_eq!(far.len(), 2, "two CSV rows");
    assert!(far[0].contains(",10,0,"), "{}", far[0]);
    let only_grib = shelfwind(&[
        "index",
        "--coast",
        coast.to_str().expect("utf-8"),
        "--wind",
        &grib,
    ]);
    assert_eq!(only_grib.status.code(), Some(2));
    let e = stderr(&only_grib);
    assert!(
        e.starts_with(
            "shelfwind: segment \"far-north\" (near 45.100°N 124.000°W): no wind file covers it"
        ),
        "{e}"
    );
}

/// A wave forecast given as the only wind file (the demo's, which covers the coast but
/// holds wave heights alone): the message says the file has no wind, not only that no
/// file covers the segment.
#[test]
fn a_wave_file_alone_is_named_as_holding_no_wind() {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = dir.path().display().to_string();
    assert!(shelfwind(&["demo", "--out", &out]).status.success());
    let scenario = dir.path().join("north-reach.shelfwind.json");
    let waves = dir.path().join("north-reach-waves.grib2");
    let o = shelfwind(&[
        "index",
        "--coast",
        &scenario.display().to_string(),
        "--wind",
        &waves.display().to_string(),
    ]);
    assert_one_line_error(
        &o,
        &[
            "no wind file covers it (checked 1 file(s); north-reach-waves.grib2 holds no 10 m wind, only wave heights)",
            "°N 12",
            "°W)",
        ],
    );
}

fn assert_one_line_error(o: &Output, parts: &[&str]) {
    assert_eq!(o.status.code(), Some(2), "exit status");
    assert!(o.stdout.is_empty(), "no output on failure");
    let e = stderr(o);
    assert_eq!(e.lines().count(), 1, "one line: {e}");
    for p in parts {
        assert!(e.contains(p), "{e:?} should contain {p:?}");
    }
    assert!(!e.contains("panicked"), "{e}");
}

#[test]
fn bad_files_exit_2_with_the_file_and_place_and_write_nothing() {
    let coast = fixture("coast/three_segments.geojson");
    let dir = tempfile::tempdir().expect("temp dir");
    let out = dir.path().join("index.csv");
    let out_s = out.to_str().expect("utf-8");
    let cases: Vec<(String, Vec<&str>)> = vec![
        (
            fixture("grib2/truncated.grib2"),
            vec!["bad wind file: message 1: cut short", "truncated.grib2"],
        ),
        (
            fixture("grib2/garbage.grib2"),
            vec!["no GRIB message found", "garbage.grib2"],
        ),
        (
            fixture("grib2/edition1.grib"),
            vec!["message 1: is GRIB edition 1", "edition1.grib"],
        ),
        (
            fixture("grib2/no_10m_wind.grib2"),
            vec!["no 10 m wind in the file", "no_10m_wind.grib2"],
        ),
        (
            fixture("grib2/space_view.grib2"),
            vec![
                "message 1: 10 m wind on a space view grid (template 3.90)",
                "is not supported",
            ],
        ),
        (
            fixture("csv/duplicate_time.csv"),
            vec![
                "line 4: time 2026-06-15T13:00:00Z repeats line 3",
                "duplicate_time.csv",
            ],
        ),
        (
            "/no/such/file.csv".to_string(),
            vec!["cannot read the file", "/no/such/file.csv"],
        ),
    ];
    for (wind, parts) in cases {
        let o = shelfwind(&["index", "--coast", &coast, "--wind", &wind, "--out", out_s]);
        assert_one_line_error(&o, &parts);
        assert!(!out.exists(), "no partial output for {wind}");
    }
    // An existing output file is left as it was when the run fails.
    std::fs::write(&out, "previous result\n").expect("write");
    let o = shelfwind(&[
        "index",
        "--coast",
        &coast,
        "--wind",
        &fixture("grib2/truncated.grib2"),
        "--out",
        out_s,
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(
        std::fs::read_to_string(&out).expect("still there"),
        "previous result\n"
    );
    let leftovers: Vec<_> = std::fs::read_dir(dir.path()).expect("dir").collect();
    assert_eq!(leftovers.len(), 1, "no temporary files left behind");
    // And a good run replaces it whole.
    let o = shelfwind(&[
        "index",
        "--coast",
        &coast,
        "--wind",
        &fixture("grib2/simple_hours.grib2"),
        "--out",
        out_s,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(o.stdout.is_empty());
    assert_eq!(
        std::fs::read_to_string(&out)
            .expect("written")
            .lines()
            .count(),
        10
    );
}

#[test]
fn bad_coast_files_name_the_feature_and_the_file() {
    let dir = tempfile::tempdir().expect("temp dir");
    let coast = dir.path().join("drawn.geojson");
    std::fs::write(
        &coast,
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"cape"},"geometry":{"type":"LineString","coordinates":[[-121.5,36.0],[-121.5,36.4]]}}]}"#,
    )
    .expect("write");
    let o = shelfwind(&[
        "index",
        "--coast",
        coast.to_str().expect("utf-8"),
        "--wind",
        &fixture("grib2/simple_hours.grib2"),
    ]);
    // Without "sea" the side comes from the land; this line runs 40 km inland.
    assert_one_line_error(
        &o,
        &[
            "bad coast file: segment \"cape\": cannot tell the sea side from the bundled land polygons: both sides look like land",
            "drawn.geojson",
        ],
    );
    std::fs::write(
        &coast,
        "{\"type\": \"FeatureCollection\",\n \"features\": [,]}",
    )
    .expect("write");
    let o = shelfwind(&[
        "index",
        "--coast",
        coast.to_str().expect("utf-8"),
        "--wind",
        &fixture("grib2/simple_hours.grib2"),
    ]);
    assert_one_line_error(
        &o,
        &[
            "bad coast file: line 2, column",
            "not valid JSON",
            "drawn.geojson",
        ],
    );
}

#[test]
fn equatorial_segments_are_refused_and_near_equator_ones_flagged() {
    let dir = tempfile::tempdir().expect("temp dir");
    let wind = fixture("csv/components_no_position.csv");
    let write = |name: &str, lat: f64| -> PathBuf {
        let p = dir.path().join(name);
        let text = format!(
            r#"{{"type":"FeatureCollection","features":[{{"type":"Feature","properties":{{"id":"low","sea":"left"}},"geometry":{{"type":"LineString","coordinates":[[10.0,{lat}],[10.0,{}]]}}}}]}}"#,
            lat + 0.1
        );
        std::fs::write(&p, text).expect("write");
        p
    };
    let arg = |p: &Path| p.to_str().expect("utf-8").to_string();
    let refused = shelfwind(&[
        "index",
        "--coast",
        &arg(&write("a.geojson", 2.0)),
        "--wind",
        &wind,
    ]);
    assert_one_line_error(
        &refused,
        &["segment \"low\": latitude 2.05° is within 5° of the equator"],
    );
    let flagged = shelfwind(&[
        "index",
        "--coast",
        &arg(&write("b.geojson", 7.0)),
        "--wind",
        &wind,
    ]);
    assert!(flagged.status.success());
    assert!(
        stdout(&flagged)
            .lines()
            .nth(1)
            .expect("row")
            .ends_with(",near-equator")
    );
    assert!(stderr(&flagged).contains("warning"));
}

#[test]
fn help_lists_the_commands_and_unknown_options_exit_2() {
    let o = shelfwind(&["--help"]);
    assert!(o.status.success());
    assert!(stdout(&o).contains("index"));
    let o = shelfwind(&[
        "index",
        "--coast",
        "x",
        "--wind",
        "y",
        "--drag",
        "quadratic",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("unknown drag law \"quadratic\""),
        "{}",
        stderr(&o)
    );
}

/// A NetCDF file holding the same analytic wind as a GRIB2 file (both README.md files:
/// the same formula on the same 1° grid at 0, 6 and 12 h; the NetCDF written by PyPI
/// netCDF4, the GRIB2 by ecCodes) gives the same index; a NetCDF file without wind says
/// which variables it has.
#[test]
fn netcdf_and_grib2_of_the_same_field_give_the_same_index() {
    let coast = fixture("coast/three_segments.geojson");
    let run = |wind: &str| {
        let o = shelfwind(&["index", "--coast", &coast, "--wind", &fixture(wind)]);
        assert!(o.status.success(), "{wind}: {}", stderr(&o));
        stdout(&o)
    };
    let from_grib = run("grib2/simple_hours.grib2");
    let from_netcdf = run("netcdf/wind_classic.nc");
    let from_netcdf4 = run("netcdf/wind_nc4_packed.nc");
    assert_eq!(from_grib.lines().count(), 10);
    for other in [&from_netcdf, &from_netcdf4] {
        assert_eq!(other.lines().count(), from_grib.lines().count());
        for (a, b) in from_grib.lines().zip(other.lines()).skip(1) {
            let (a, b): (Vec<&str>, Vec<&str>) = (a.split(',').collect(), b.split(',').collect());
            assert_eq!(a[..4], b[..4], "same segment, time and place");
            // GRIB2 packs to 16 bits and the NetCDF-4 file to int16 with a scale factor:
            // a few mm/s apart at most.
            let (ia, ib): (f64, f64) = (a[6].parse().expect("index"), b[6].parse().expect("index"));
            assert!((ia - ib).abs() < 0.5, "{a:?} vs {b:?}");
        }
    }
    let o = shelfwind(&[
        "index",
        "--coast",
        &coast,
        "--wind",
        &fixture("netcdf/no_wind.nc"),
    ]);
    assert_one_line_error(
        &o,
        &[
            "bad wind file: no 10 m wind found",
            "the file has: sst (time, lat, lon; sea_surface_temperature; degC)",
            "no_wind.nc",
        ],
    );
}

/// `shelfwind inspect` on NetCDF: format, grid, area, times and the variables used.
#[test]
fn inspect_describes_a_netcdf_file() {
    let o = shelfwind(&["inspect", &fixture("netcdf/wind_nc4_packed.nc")]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = stdout(&o);
    for line in [
        "Format: NetCDF-4 (HDF5)",
        "Grid: latitude/longitude grid, 9 latitudes × 11 longitudes (lat and lon)",
        "Area: 31.000° to 39.000° latitude, -125.000° to -115.000° longitude",
        "Times: 2026-06-15 12:00 UTC to 2026-06-16 00:00 UTC (3 times, every 6 h)",
        "Uses: 10 m wind: u = eastward_wind_10m, v = northward_wind_10m (units \"m/s\", converted to m/s)",
    ] {
        assert!(text.lines().any(|l| l == line), "{line:?} in\n{text}");
    }
    let o = shelfwind(&["inspect", &fixture("netcdf/wind_uwnd_noleap.nc")]);
    assert!(stdout(&o).contains("Does not use: no usable 10 m wind: the time variable time has units \"days since 2026-01-01 00:00:00\": calendar \"noleap\" has no real dates"));
    let o = shelfwind(&["inspect", &fixture("grib2/garbage.grib2")]);
    assert_one_line_error(&o, &["bad wind file", "garbage.grib2"]);
    // A web page saved under a GRIB2 name: `inspect` says what `index` says of it, not
    // the CSV reader's complaint about a missing time column.
    let dir = tempfile::tempdir().expect("temp dir");
    let page = dir.path().join("page.grib2");
    std::fs::write(&page, "<html><body>Not found</body></html>\n").expect("write");
    let o = shelfwind(&["inspect", &page.display().to_string()]);
    assert_one_line_error(
        &o,
        &["no GRIB message found: expected a GRIB2 file", "page.grib2"],
    );
}

/// An ensemble (`grib2/ensemble_10_runs.grib2`, see `make_ensemble_runs.py`): a `member`
/// column after `time_utc` holds the perturbation number (control 0); rows go by
/// segment, run, time. At 2 June 12 UTC runs 0-6 blow 12 m/s from the north and runs 7-9
/// 2 m/s, so the index is the Bakun (1973) value for those winds.
#[test]
fn an_ensemble_gets_a_member_column_after_the_time() {
    let dir = tempfile::tempdir().expect("temp dir");
    let coast = dir.path().join("reach.geojson");
    std::fs::write(
        &coast,
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"reach","sea":"left"},"geometry":{"type":"LineString","coordinates":[[-123.0,37.0],[-123.0,37.1]]}}]}"#,
    )
    .expect("write coast");
    let o = shelfwind(&[
        "index",
        "--coast",
        &coast.display().to_string(),
        "--wind",
        &fixture("grib2/ensemble_10_runs.grib2"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = stdout(&o);
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(
        lines[0],
        "segment_id,time_utc,member,lat,lon,wind_speed_ms,wind_from_deg,upwelling_index_m3s_per_100m,flag"
    );
    // 10 runs × 25 steps (0 to 72 h every 3 h).
    assert_eq!(lines.len(), 1 + 10 * 25);
    let rows: Vec<Vec<&str>> = lines[1..].iter().map(|l| l.split(',').collect()).collect();
    let members: Vec<&str> = rows.iter().step_by(25).map(|r| r[2]).collect();
    assert_eq!(members, ["0", "1", "2", "3", "4", "5", "6", "7", "8", "9"]);
    for r in rows.iter().filter(|r| r[1] == "2027-06-02T12:00:00Z") {
        let member: u32 = r[2].parse().expect("member");
        let v = if member <= 6 { -12.0 } else { -2.0 };
        let lat: f64 = r[3].parse().expect("lat");
        let index: f64 = r[7].parse().expect("index");
        let expected = index_sea_west(lat, 0.0, v);
        assert!(
            (index - expected).abs() < 1e-3 * expected.abs() + 0.01,
            "member {member}: {index} vs {expected}"
        );
    }
    // Each file a run: the files are numbered from 1 in the order given.
    let o = shelfwind(&[
        "index",
        "--coast",
        &coast.display().to_string(),
        "--files-as-runs",
        "--wind",
        &fixture("grib2/ensemble_10_runs_split/run_03.grib2"),
        "--wind",
        &fixture("grib2/ensemble_10_runs_split/run_08.grib2"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = stdout(&o);
    let at_noon: Vec<(String, String)> = text
        .lines()
        .filter(|l| l.contains("2027-06-02T12:00:00Z"))
        .map(|l| {
            let f: Vec<&str> = l.split(',').collect();
            (f[2].to_string(), f[5].to_string())
        })
        .collect();
    assert_eq!(
        at_noon,
        [
            ("1".to_string(), "12".to_string()),
            ("2".to_string(), "2".to_string())
        ]
    );
}

/// A new user's slips, each told in plain words with the file named: a scenario that is
/// not there, an empty file, and a position with one number.
#[test]
fn a_new_users_slips_are_told_plainly() {
    let dir = tempfile::tempdir().expect("temp dir");
    let missing = dir.path().join("missing.json");
    let o = shelfwind(&["plan", &missing.display().to_string()]);
    assert_one_line_error(
        &o,
        &[
            "cannot read the scenario or coast file: no such file: ",
            "missing.json",
        ],
    );
    assert!(!stderr(&o).contains("os error"), "{}", stderr(&o));
    let empty = dir.path().join("empty.json");
    std::fs::write(&empty, "\n").expect("write");
    let o = shelfwind(&["plan", &empty.display().to_string()]);
    assert_one_line_error(
        &o,
        &[
            "expected a GeoJSON FeatureCollection, found an empty file",
            "empty.json",
        ],
    );
    let coast = dir.path().join("short.geojson");
    std::fs::write(
        &coast,
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a","sea":"left"},"geometry":{"type":"LineString","coordinates":[[-123.0,37.0],[-123.2]]}}]}"#,
    )
    .expect("write");
    let o = shelfwind(&[
        "index",
        "--coast",
        &coast.display().to_string(),
        "--wind",
        &fixture("grib2/garbage.grib2"),
    ]);
    assert_one_line_error(
        &o,
        &[
            "feature 1 (\"a\"): coordinate 2: an array of 1 value: expected [longitude, latitude]",
            "short.geojson",
        ],
    );
}
