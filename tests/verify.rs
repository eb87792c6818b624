//! `shelfwind verify` end to end on constructed cases whose answers are known before the
//! run: a sea that cools two days after each northerly blow, and a sea that ignores the
//! wind (README, "Checking against the sea temperature").

use serde_json::Value;
use shelfwind::synthetic::Lcg;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::Command;

const DAYS: usize = 120;

/// A north-south segment at 37 N, sea to the west, as a GeoJSON coast.
fn coast(dir: &Path) -> String {
    let path = dir.join("reach.geojson");
    std::fs::write(
        &path,
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"reach","sea":"left"},"geometry":{"type":"LineString","coordinates":[[-123.0,37.0],[-123.0,37.1]]}}]}"#,
    )
    .expect("coast");
    path.display().to_string()
}

/// Each day's northerly wind, m/s: calm (2), moderate (6) or a blow (12), at random.
fn northerlies(rng: &mut Lcg) -> Vec<f64> {
    (0..DAYS)
        .map(|_| match rng.next_unit() {
            x if x < 0.5 => 2.0,
            x if x < 0.75 => 6.0,
            _ => 12.0,
        })
        .collect()
}

/// Blows of one or two days (9 or 12 m/s) every eight days from day 3, calm (2 or
/// 4 m/s, under the event threshold) between: each blow is one event, and the days
/// before it are calm.
fn blows(rng: &mut Lcg) -> (Vec<f64>, usize) {
    let mut speeds = Vec::with_capacity(DAYS);
    let mut count = 0;
    for d in 0..DAYS {
        let in_block = d >= 3 && (d - 3) % 8 < 2;
        let first = d >= 3 && (d - 3) % 8 == 0;
        let second_blows =
            in_block && !first && speeds.last().is_some_and(|s| *s > 5.0) && rng.next_unit() < 0.5;
        if first || second_blows {
            count += usize::from(first);
            speeds.push(if rng.next_unit() < 0.5 { 9.0 } else { 12.0 });
        } else {
            speeds.push(if rng.next_unit() < 0.5 { 2.0 } else { 4.0 });
        }
    }
    (speeds, count)
}

fn day(d: usize) -> chrono::DateTime<chrono::Utc> {
    chrono::DateTime::parse_from_rfc3339("2027-04-01T00:00:00Z")
        .expect("start")
        .to_utc()
        + chrono::Duration::days(i64::try_from(d).expect("a day"))
}

/// Hourly wind from the north, the same all day.
fn wind_csv(dir: &Path, speeds: &[f64]) -> String {
    let mut text = String::from("time,u_ms,v_ms\n");
    for (d, s) in speeds.iter().enumerate() {
        for h in 0..24 {
            let t = day(d) + chrono::Duration::hours(h);
            let _ = writeln!(text, "{},0,{}", t.format("%Y-%m-%dT%H:%M:%SZ"), -s);
        }
    }
    let path = dir.join("wind.csv");
    std::fs::write(&path, text).expect("wind");
    path.display().to_string()
}

/// One temperature a day at noon.
fn sst_csv(dir: &Path, name: &str, temps: &[f64]) -> String {
    let mut text = String::from("# constructed\ntime,lat,lon,sst_c\n");
    for (d, t) in temps.iter().enumerate() {
        let at = day(d) + chrono::Duration::hours(12);
        let _ = writeln!(
            text,
            "{},37.05,-123.1,{t:.3}",
            at.format("%Y-%m-%dT%H:%M:%SZ")
        );
    }
    let path = dir.join(name);
    std::fs::write(&path, text).expect("sst");
    path.display().to_string()
}

fn verify(args: &[&str]) -> Value {
    let o = Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .arg("verify")
        .args(args)
        .args(["--format", "json"])
        .output()
        .expect("runs");
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    serde_json::from_slice(&o.stdout).expect("JSON")
}

/// The sea cools by 0.05 °C per (m/s)² of the northerly two days earlier (the index is
/// proportional to the wind speed squared, Bakun 1973), plus ±0.2 °C of noise.
/// Expected before the run: the best lag is 2 days with r below −0.8 and its interval
/// below 0; at lag 0 the correlation is much weaker; each blow is one event, and each is
/// confirmed: two days after onset the sea is at least 0.05 × (81 − 16) − 0.4 = 2.85 °C
/// colder than on the calm day before.
#[test]
fn a_sea_that_answers_after_two_days_is_found_at_lag_two() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut rng = Lcg(2027);
    let (speeds, count) = blows(&mut rng);
    let temps: Vec<f64> = (0..DAYS)
        .map(|d| {
            let blown = if d >= 2 { speeds[d - 2] } else { 2.0 };
            14.0 - 0.05 * blown * blown + 0.4 * (rng.next_unit() - 0.5)
        })
        .collect();
    let json = verify(&[
        &coast(dir.path()),
        "--wind",
        &wind_csv(dir.path(), &speeds),
        "--sst",
        &sst_csv(dir.path(), "buoy.csv", &temps),
    ]);
    let s = &json["segments"][0];
    assert_eq!(s["segment_id"], "reach");
    assert_eq!(s["best_lag_days"], 2, "{s}");
    let r = s["r_at_best_lag"].as_f64().expect("r");
    assert!(r < -0.8, "{r}");
    assert!(s["r_at_best_lag_95"][1].as_f64().expect("upper") < 0.0);
    let r0 = s["r_lag0"].as_f64().expect("r at lag 0");
    assert!(r0 > r + 0.3, "lag 0 {r0} vs best {r}");
    assert_eq!(s["r_by_lag"].as_array().expect("lags").len(), 11);
    let (told, confirmed) = (
        s["events"].as_u64().expect("events"),
        s["events_confirmed"].as_u64().expect("confirmed"),
    );
    assert_eq!(told as usize, count);
    assert_eq!(confirmed, told);
    // Asking for 8 °C of cooling confirms none: the most a blow can cool the sea here is
    // 0.05 × (144 − 4) + 0.4 = 7.4 °C.
    let strict = verify(&[
        &coast(dir.path()),
        "--wind",
        &dir.path().join("wind.csv").display().to_string(),
        "--sst",
        &dir.path().join("buoy.csv").display().to_string(),
        "--cooling-c",
        "8",
    ]);
    assert_eq!(strict["segments"][0]["events_confirmed"], 0);
    assert_eq!(strict["cooling_c"], 8.0);
}

/// A sea that ignores the wind: the correlation at lag 0 is near 0 and its interval
/// holds 0; the CSV has the contract's columns.
#[test]
fn a_sea_that_ignores_the_wind_shows_no_correlation() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut rng = Lcg(7);
    let speeds = northerlies(&mut rng);
    let mut other = Lcg(99);
    let temps: Vec<f64> = (0..DAYS)
        .map(|_| 14.0 + 2.0 * (other.next_unit() - 0.5))
        .collect();
    let coast = coast(dir.path());
    let wind = wind_csv(dir.path(), &speeds);
    let sst = sst_csv(dir.path(), "buoy.csv", &temps);
    let json = verify(&[&coast, "--wind", &wind, "--sst", &sst]);
    let s = &json["segments"][0];
    let r0 = s["r_lag0"].as_f64().expect("r at lag 0");
    assert!(r0.abs() < 0.3, "{r0}");
    // Its 95 % interval (Fisher z; the formula is checked by hand in the library's
    // tests) holds 0.
    let pairs = s["pairs_by_lag"][0].as_u64().expect("pairs") as usize;
    let (lo, hi) = shelfwind::upwelling::fisher_interval(r0, pairs).expect("interval");
    assert!(lo < 0.0 && hi > 0.0, "{lo} {hi}");
    let o = Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .args([
            "verify", &coast, "--wind", &wind, "--sst", &sst, "--format", "csv",
        ])
        .output()
        .expect("runs");
    let text = String::from_utf8(o.stdout).expect("utf-8");
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(
        lines[0],
        "segment_id,days,best_lag_days,r_at_best_lag,r_lag0,events,events_confirmed"
    );
    assert!(lines[1].starts_with("reach,120,"), "{}", lines[1]);
    // A bad temperature names the file and the line.
    let bad = dir.path().join("bad.csv");
    std::fs::write(
        &bad,
        "time,sst_c\n2027-04-01T00:00Z,14\n2027-04-02T00:00Z,999\n",
    )
    .expect("bad");
    let o = Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .args([
            "verify",
            &coast,
            "--wind",
            &wind,
            "--sst",
            &bad.display().to_string(),
        ])
        .output()
        .expect("runs");
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8(o.stderr).expect("utf-8");
    assert!(
        err.contains("bad.csv: line 3: sst_c 999 is 999.00 °C, outside"),
        "{err}"
    );
}

/// A gridded sea temperature (the ecCodes fixture of `tests/sst_grib.rs`, three daily
/// fields) is taken 10 km offshore of the segment: three days with both, too few to
/// correlate (fewer than 10), said so in the table.
#[test]
fn a_grib2_sea_temperature_is_read_at_the_probe() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut text = String::from("time,u_ms,v_ms\n");
    for h in 0..72 {
        let t = chrono::DateTime::parse_from_rfc3339("2027-06-01T00:00:00Z")
            .expect("start")
            .to_utc()
            + chrono::Duration::hours(h);
        let _ = writeln!(text, "{},0,-3", t.format("%Y-%m-%dT%H:%M:%SZ"));
    }
    let wind = dir.path().join("wind.csv");
    std::fs::write(&wind, text).expect("wind");
    let sst = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/grib2/sst_water_bitmap.grib2");
    let coast = coast(dir.path());
    let json = verify(&[
        &coast,
        "--wind",
        &wind.display().to_string(),
        "--sst",
        &sst.display().to_string(),
    ]);
    let s = &json["segments"][0];
    assert_eq!(s["days"], 3);
    assert!(s["best_lag_days"].is_null());
    assert!(
        s["summary"]
            .as_str()
            .expect("summary")
            .contains("too few days with both wind and sea temperature"),
        "{s}"
    );
}
