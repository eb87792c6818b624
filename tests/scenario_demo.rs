//! The scenario document and the bundled demo, end to end: loading, migrating, saving,
//! the sea side from the land, and the demo's forecast through the index.

#![allow(clippy::float_cmp)] // Migrated values are copied, not computed: exact equality is the point.

use shelfwind::coast::{Land, SeaSide, read_coast_geojson, resolve_segments, write_coast_geojson};
use shelfwind::physics::m_s_to_knots;
use shelfwind::scenario::{
    DEMO_FORECAST_FILE, DEMO_SCENARIO_FILE, demo_scenario, load_scenario, parse_scenario,
    save_scenario, scenario_to_json,
};
use shelfwind::upwelling::index_series;
use shelfwind::wind::{
    WindSource, assign_wind, demo_forecast_grib2, demo_reference_time, demo_wind,
};
use std::path::PathBuf;
use std::process::Command;

fn repo(rel: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join(rel)
}

#[test]
fn committed_demo_forecast_is_what_the_generator_writes() {
    let committed = std::fs::read(repo(
        "demo-scenarios/north-reach/north-reach-forecast.grib2",
    ))
    .expect("committed");
    assert!(
        committed == demo_forecast_grib2(),
        "run: cargo run -- demo --out demo-scenarios/north-reach"
    );
}

/// Every demo segment is drawn without "sea"; walking north along a west-facing ocean
/// coast, the sea is on the left and the offshore normal points roughly west.
#[test]
fn demo_sea_sides_come_from_the_land() {
    let scenario = demo_scenario().expect("demo parses");
    assert!(scenario.segments.iter().all(|s| s.sea.is_none()));
    let segments = resolve_segments(&scenario.segments, Land::bundled()).expect("every side found");
    for s in &segments {
        assert_eq!(s.sea, SeaSide::Left, "{}", s.id);
        for p in s.pieces() {
            assert!(
                (200.0..330.0).contains(&p.offshore_bearing_deg),
                "{} offshore {}",
                s.id,
                p.offshore_bearing_deg
            );
        }
    }
}

/// The demo loads, every segment gets wind from the demo forecast, and each has both
/// upwelling (north-westerlies, days 2–5) and downwelling (southerlies, days 1 and 7).
#[test]
fn demo_index_has_upwelling_and_downwelling() {
    let scenario = demo_scenario().expect("demo parses");
    let segments = resolve_segments(&scenario.segments, Land::bundled()).expect("sides");
    let dir = tempfile::tempdir().expect("temp dir");
    let forecast = dir.path().join(DEMO_FORECAST_FILE);
    std::fs::write(&forecast, demo_forecast_grib2()).expect("write");
    let winds = assign_wind(&[WindSource::Grib2 { path: forecast }], &segments).expect("covered");
    assert_eq!(segments.len(), 12);
    for (s, w) in segments.iter().zip(&winds) {
        // Hourly: the past week of analyses, then 7 days of forecast.
        assert_eq!(w.times.len(), 168 + 169, "{}", s.id);
        assert_eq!(w.times[168], demo_reference_time());
        let idx = index_series(s, w, &scenario.settings.index).expect("mid-latitude");
        let max = idx
            .index_m3s_per_100m
            .iter()
            .copied()
            .fold(f64::MIN, f64::max);
        let min = idx
            .index_m3s_per_100m
            .iter()
            .copied()
            .fold(f64::MAX, f64::min);
        assert!(
            max > 300.0,
            "{}: strong upwelling in the blow, max {max}",
            s.id
        );
        assert!(
            min < -50.0,
            "{}: downwelling in the southerlies, min {min}",
            s.id
        );
        // Forecast day 4 (hours 72–96 after the past week) upwells; day 7 downwells.
        let mean = |a: usize, b: usize| {
            idx.index_m3s_per_100m[168 + a..168 + b].iter().sum::<f64>() / (b - a) as f64
        };
        assert!(mean(72, 96) > 250.0 && mean(144, 168) < 0.0, "{}", s.id);
    }
}

/// The rows (latitude, longitude east, value) that ecCodes' `grib_get_data` prints for
/// the messages matching `filter`; `None` (the test skipped) where it is not installed,
/// which CI does not allow.
fn grib_get_data(path: &std::path::Path, filter: &str) -> Option<Vec<Vec<f64>>> {
    let Ok(out) = Command::new("grib_get_data")
        .args(["-w", filter])
        .arg(path)
        .output()
    else {
        assert!(
            std::env::var_os("CI").is_none(),
            "grib_get_data is missing in CI: .ci/run installs libeccodes-tools"
        );
        eprintln!("skipped: grib_get_data (ecCodes) is not installed");
        return None;
    };
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).expect("utf-8");
    Some(
        text.lines()
            .skip(1)
            .map(|line| {
                line.split_whitespace()
                    .map(|x| x.parse().expect("number"))
                    .collect()
            })
            .collect(),
    )
}

/// ecCodes (Debian `libeccodes-tools`, `grib_get_data`) reads the generator's GRIB2 and
/// finds the generator's winds. CI installs it; elsewhere the test says it was skipped.
#[test]
fn eccodes_reads_the_demo_forecast() {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("f.grib2");
    std::fs::write(&path, demo_forecast_grib2()).expect("write");
    let Some(rows) = grib_get_data(&path, "step=84,shortName=10v") else {
        return;
    };
    let mut checked = 0;
    for cols in rows {
        let (lat, lon_e, v) = (cols[0], cols[1], cols[2]);
        let expected = demo_wind(lat, lon_e - 360.0, 84.0).v_m_s;
        assert!(
            (v - expected).abs() < 0.006,
            "{lat},{lon_e}: ecCodes {v}, generator {expected}"
        );
        checked += 1;
    }
    assert_eq!(checked, 13 * 14);
    // The blow: 30 kt and more over the grid at hour 84.
    assert!(m_s_to_knots(demo_wind(39.0, -124.0, 84.0).speed_m_s()) > 30.0);
}

#[test]
fn save_then_load_gives_the_same_scenario_and_keeps_a_backup() {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("coop.shelfwind.json");
    let mut scenario = demo_scenario().expect("demo");
    save_scenario(&path, &scenario).expect("saves");
    assert_eq!(load_scenario(&path).expect("loads"), scenario);
    scenario.name = "Renamed".into();
    save_scenario(&path, &scenario).expect("saves again");
    assert_eq!(load_scenario(&path).expect("loads").name, "Renamed");
    let backup = dir.path().join("coop.shelfwind.json.bak");
    assert_eq!(
        load_scenario(&backup).expect("backup loads").name,
        "North Reach Fishers' Co-op (demo)"
    );
    // An invalid scenario is never written.
    scenario.vessels[0].cruise_speed_kt = f64::NAN;
    let e = save_scenario(&path, &scenario).unwrap_err().to_string();
    assert!(
        e.starts_with("vessel 1 (\"little-auk\"): cruise_speed_kt NaN is out of range"),
        "{e}"
    );
    assert_eq!(
        load_scenario(&path).expect("still the last good one").name,
        "Renamed"
    );
}

#[test]
fn version_0_is_migrated() {
    let s = load_scenario(&repo("tests/fixtures/scenario/version0.json")).expect("migrates");
    assert_eq!(s.segments.len(), 2);
    assert_eq!(s.segments[0].points[0].lat_deg, 39.80);
    assert_eq!(s.segments[0].points[0].lon_deg, -8.95);
    assert_eq!(s.segments[0].sea, Some(SeaSide::Left));
    assert_eq!(s.segments[1].sea, None);
    assert_eq!(s.ports[0].position.lat_deg, 39.70);
    assert_eq!(s.vessels[0].cruise_speed_kt, 16.0);
    assert_eq!(s.vessels[0].fuel_l_per_h, 0.0);
    assert_eq!(s.settings.stretch_length_nm, 5.0);
    // Saved again, it is version 1.
    assert!(
        scenario_to_json(&s)
            .expect("json")
            .contains("\"version\": 1")
    );
}

#[test]
fn damaged_and_newer_files_are_clear_errors() {
    let good = scenario_to_json(&demo_scenario().expect("demo")).expect("json");
    let e = |t: &str| parse_scenario(t).unwrap_err().to_string();
    assert_eq!(
        e(&good.replace("\"version\": 1", "\"version\": 7")),
        "scenario version 7 is newer than this Shelfwind reads (up to 1): use a newer Shelfwind"
    );
    assert_eq!(
        e("{\"type\": \"FeatureCollection\"}"),
        "not a Shelfwind scenario: expected \"format\": \"shelfwind-scenario\""
    );
    let cut = &good[..good.len() / 2];
    assert!(e(cut).starts_with("line "), "{}", e(cut));
    let bad_speed = good.replacen(
        "\"cruise_speed_kt\": 18.0",
        "\"cruise_speed_kt\": \"fast\"",
        1,
    );
    let msg = e(&bad_speed);
    assert!(
        msg.starts_with("line ") && msg.contains("invalid type: string \"fast\", expected f64"),
        "{msg}"
    );
    let bad_zone = good.replace("America/Los_Angeles", "Pacific Time");
    assert_eq!(
        e(&bad_zone),
        "time_zone \"Pacific Time\" is not an IANA time zone name such as \"Europe/Lisbon\""
    );
    let dup = good.replace("\"id\": \"saltmere\"", "\"id\": \"harrow-cove\"");
    assert_eq!(
        e(&dup),
        "port id \"harrow-cove\" is used twice: ids must be unique"
    );
}

#[test]
fn coast_geojson_round_trip_of_the_demo_is_exact() {
    let s = demo_scenario().expect("demo");
    let text = write_coast_geojson(&s.segments);
    assert_eq!(read_coast_geojson(&text).expect("reads"), s.segments);
}

fn shelfwind(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .args(args)
        .output()
        .expect("runs")
}

/// The "done when": `shelfwind demo --out DIR` then `shelfwind index` on it;
/// the scenario's own wind file is used when none is given; and the same coast as GeoJSON
/// without "sea" gives the same table (its sides come from the land).
#[test]
fn demo_then_index_from_the_command_line() {
    let dir = tempfile::tempdir().expect("temp dir");
    let d = dir.path().to_str().expect("utf-8");
    let o = shelfwind(&["demo", "--out", d]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let scenario = dir.path().join(DEMO_SCENARIO_FILE);
    let forecast = dir.path().join(DEMO_FORECAST_FILE);
    let explicit = shelfwind(&[
        "index",
        "--coast",
        scenario.to_str().expect("utf-8"),
        "--wind",
        forecast.to_str().expect("utf-8"),
    ]);
    assert!(
        explicit.status.success(),
        "{}",
        String::from_utf8_lossy(&explicit.stderr)
    );
    assert_eq!(
        String::from_utf8_lossy(&explicit.stdout).lines().count(),
        1 + 12 * 337
    );
    let implicit = shelfwind(&["index", "--coast", scenario.to_str().expect("utf-8")]);
    assert_eq!(implicit.stdout, explicit.stdout);
    let geojson = dir.path().join("coast.geojson");
    std::fs::write(
        &geojson,
        write_coast_geojson(&demo_scenario().expect("demo").segments),
    )
    .expect("write");
    let from_geojson = shelfwind(&[
        "index",
        "--coast",
        geojson.to_str().expect("utf-8"),
        "--wind",
        forecast.to_str().expect("utf-8"),
    ]);
    assert!(
        from_geojson.status.success(),
        "{}",
        String::from_utf8_lossy(&from_geojson.stderr)
    );
    assert_eq!(from_geojson.stdout, explicit.stdout);
}

/// ecCodes reads the demo's wave forecast as significant wave height (short name `swh`,
/// discipline 10, category 0, number 3) and finds the generator's heights; the committed
/// file is what the generator writes.
#[test]
fn eccodes_reads_the_demo_waves() {
    use shelfwind::wind::{demo_wave_height_m, demo_waves_grib2};
    let committed = std::fs::read(repo("demo-scenarios/north-reach/north-reach-waves.grib2"))
        .expect("committed");
    assert!(
        committed == demo_waves_grib2(),
        "run: cargo run -- demo --out demo-scenarios/north-reach"
    );
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("w.grib2");
    std::fs::write(&path, &committed).expect("write");
    let Some(rows) = grib_get_data(&path, "step=36,shortName=swh") else {
        return;
    };
    let mut checked = 0;
    for cols in rows {
        let expected = demo_wave_height_m(cols[0], cols[1] - 360.0, 36.0);
        assert!(
            (cols[2] - expected).abs() < 0.006,
            "{cols:?}: generator {expected}"
        );
        checked += 1;
    }
    assert_eq!(checked, 13 * 14);
}
