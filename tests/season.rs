//! Season analysis end to end: long records from many files joined in time, gaps
//! flagged, and the `season` command's outputs.

use chrono::{Duration, TimeZone, Utc};
use shelfwind::coast::{CoastSegment, LatLon, SeaSide, resolve_segments};
use shelfwind::physics::Wind;
use shelfwind::progress::Progress;
use shelfwind::wind::{
    GridField, WindSource, assign_wind_merged, encode_wind_message, load_sources,
};
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::Command;

fn shelfwind(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .args(args)
        .output()
        .expect("runs")
}

/// A coast with one north-running segment at 36°N, sea to the west.
fn coast(dir: &Path) -> PathBuf {
    let p = dir.join("coast.geojson");
    std::fs::write(
        &p,
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"west-reach","sea":"left"},"geometry":{"type":"LineString","coordinates":[[-122.0,35.95],[-122.0,36.05]]}}]}"#,
    )
    .expect("write");
    p
}

/// A station CSV, hourly, with the wind from a function of the day of year (None: gap).
fn station_csv(path: &Path, years: &[i32], wind_from_north_ms: impl Fn(i32, u32) -> Option<f64>) {
    let mut text = String::from("# invented record for the tests\ntime,u_ms,v_ms\n");
    for &y in years {
        let t0 = Utc
            .with_ymd_and_hms(y, 1, 1, 0, 0, 0)
            .single()
            .expect("date");
        let days = if y % 4 == 0 { 366 } else { 365 };
        for d in 0..days {
            if let Some(s) = wind_from_north_ms(y, d + 1) {
                for h in 0..24 {
                    let t = t0 + Duration::hours(i64::from(d) * 24 + h);
                    writeln!(text, "{},0,{}", t.format("%Y-%m-%dT%H:%M:%SZ"), -s).expect("string");
                }
            }
        }
    }
    std::fs::write(path, text).expect("write");
}

/// Hand-computed: a northerly of 10 m/s on days 121–240 of each year (upwelling of
/// 180.5 m³/s per 100 m at 36°N on a west-facing coast: REFERENCES.md worked check), a
/// southerly of 5 m/s otherwise (a quarter of that: −45.1, stress grows with the square
/// of the wind). Three years; 2026 loses 40 days in summer (coverage 89 %, flagged).
#[test]
fn season_command_on_a_station_record_with_a_gap() {
    let dir = tempfile::tempdir().expect("temp dir");
    let csv = dir.path().join("station.csv");
    station_csv(&csv, &[2025, 2026, 2027], |y, d| {
        if y == 2026 && (151..=190).contains(&d) {
            None
        } else if (121..=240).contains(&d) {
            Some(10.0)
        } else {
            Some(-5.0)
        }
    });
    let coast = coast(dir.path());
    let o = shelfwind(&[
        "season",
        coast.to_str().expect("utf-8"),
        "--wind",
        csv.to_str().expect("utf-8"),
        "--format",
        "csv",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = String::from_utf8(o.stdout).expect("utf-8");
    let rows: Vec<Vec<String>> = csv::Reader::from_reader(text.as_bytes())
        .records()
        .map(|r| r.expect("row").iter().map(String::from).collect())
        .collect();
    assert_eq!(rows.len(), 4, "three seasons and a climatology row");
    let col = |r: &Vec<String>, k: usize| r[k].clone();
    // 2025: transition at the end of day 120 (30 April), end day 240 (28 August),
    // length 120 days, total 120 × 180.5 = 21 660.
    assert_eq!(col(&rows[0], 3), "2025");
    assert_eq!(col(&rows[0], 8), "2025-04-30");
    assert_eq!(col(&rows[0], 9), "2025-08-28");
    assert_eq!(col(&rows[0], 10), "120");
    let total: f64 = col(&rows[0], 11).parse().expect("number");
    assert!((total - 21_660.0).abs() < 20.0, "{total}");
    assert_eq!(col(&rows[1], 3), "2026");
    assert_eq!(col(&rows[1], 6), "false");
    assert_eq!(col(&rows[1], 11), "", "no total for an incomplete season");
    assert!(col(&rows[1], rows[1].len() - 1).starts_with("incomplete: 89 % of days have data"));
    assert_eq!(col(&rows[3], 0), "climatology");
    assert_eq!(col(&rows[3], 15), "2", "the incomplete season is left out");
    // Lowering the coverage needed lets 2026 through, its gap filled by interpolation.
    let o = shelfwind(&[
        "season",
        coast.to_str().expect("utf-8"),
        "--wind",
        csv.to_str().expect("utf-8"),
        "--format",
        "csv",
        "--min-coverage",
        "85",
    ]);
    let text = String::from_utf8(o.stdout).expect("utf-8");
    assert!(
        text.lines()
            .nth(2)
            .expect("2026")
            .contains(",2026,2026-01-01,89.0,true,"),
        "{text}"
    );
    // The table names the method and the flag.
    let o = shelfwind(&[
        "season",
        coast.to_str().expect("utf-8"),
        "--wind",
        csv.to_str().expect("utf-8"),
        "--from",
        "2026",
        "--to",
        "2026",
    ]);
    let text = String::from_utf8(o.stdout).expect("utf-8");
    assert!(
        text.contains("Bograd et al. 2009") && text.contains("incomplete: 89 %"),
        "{text}"
    );
}

fn monthly_grib(path: &Path, month: u32, wind: Wind) {
    let reference = Utc
        .with_ymd_and_hms(2027, month, 1, 0, 0, 0)
        .single()
        .expect("date");
    let next = Utc
        .with_ymd_and_hms(2027, month + 1, 1, 0, 0, 0)
        .single()
        .expect("date");
    let steps = u32::try_from((next - reference).num_hours()).expect("hours");
    let mut bytes = Vec::new();
    for step in (0..steps).step_by(6) {
        for (parameter, value) in [(2, wind.u_m_s), (3, wind.v_m_s)] {
            bytes.extend(encode_wind_message(&GridField {
                lat_north_deg: 37.0,
                lon_west_deg: -123.0,
                step_deg: 0.5,
                ni: 5,
                nj: 5,
                parameter,
                reference,
                step_hours: step,
                values: &[value; 25],
            }));
        }
    }
    std::fs::write(path, bytes).expect("write");
}

/// Three monthly GRIB2 files, read in parallel and joined in time: every 6-hour step of
/// each month, in order, each from its own file.
#[test]
fn monthly_grib_files_are_joined_in_time() {
    let dir = tempfile::tempdir().expect("temp dir");
    let files: Vec<PathBuf> = (1..=3)
        .map(|m| dir.path().join(format!("wind-2027-{m:02}.grib2")))
        .collect();
    for (m, f) in files.iter().enumerate() {
        monthly_grib(f, m as u32 + 1, Wind::new(0.0, -(m as f64 + 1.0)));
    }
    // Given out of order: the join sorts by time.
    let sources =
        load_sources(&[files[2].clone(), files[0].clone(), files[1].clone()]).expect("load");
    assert!(
        sources
            .iter()
            .all(|s| matches!(s, WindSource::Grib2 { .. }))
    );
    let drawn = vec![CoastSegment {
        id: "a".into(),
        name: String::new(),
        points: vec![LatLon::new(35.9, -122.0), LatLon::new(36.1, -122.0)],
        sea: Some(SeaSide::Left),
        notes: String::new(),
        closure: None,
    }];
    let segments = resolve_segments(&drawn, &shelfwind::coast::Land::default()).expect("sides");
    let progress = Progress::new();
    let winds = assign_wind_merged(&sources, &segments, &progress).expect("covered");
    let w = &winds[0];
    assert_eq!(w.times.len(), (31 + 28 + 31) * 4);
    assert!(
        w.times
            .windows(2)
            .all(|p| p[1] - p[0] == Duration::hours(6))
    );
    assert!(
        (w.midpoint[0].v_m_s + 1.0).abs() < 0.01,
        "January from the January file"
    );
    assert!(
        (w.midpoint[(31 + 28) * 4].v_m_s + 3.0).abs() < 0.01,
        "March from the March file"
    );
    assert!((progress.fraction() - 1.0).abs() < 1e-6);
}

#[test]
fn a_bad_file_in_a_record_is_named() {
    let dir = tempfile::tempdir().expect("temp dir");
    let good = dir.path().join("wind-2027-01.grib2");
    monthly_grib(&good, 1, Wind::new(0.0, -5.0));
    let bad = dir.path().join("wind-2027-02.grib2");
    std::fs::write(&bad, b"GRIB\0\0\0\x02\0\0\0\0\0\0\x10\0").expect("write");
    let coast = coast(dir.path());
    let o = shelfwind(&[
        "season",
        coast.to_str().expect("utf-8"),
        "--wind",
        good.to_str().expect("utf-8"),
        bad.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(2));
    let e = String::from_utf8_lossy(&o.stderr);
    assert!(
        e.contains("message 1: cut short") && e.contains("wind-2027-02.grib2"),
        "{e}"
    );
}
