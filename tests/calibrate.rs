//! `shelfwind calibrate` end to end on a synthetic catch log made from known response
//! parameters (README, "Calibrating on a catch log").
//!
//! Three seasons (April to July 2025–2027) of invented hourly wind for the demo coast,
//! northerly blows of 1–4 days between calm spells. The catch log's CPUE at eight
//! stretches, every other day from May to July, is the expected productivity of a
//! response with a lag peak of 8 days and an optimum of 120 m³/s per 100 m (the other
//! parameters at their defaults), plus a floor of 0.05, times log-normal noise (σ = 0.1).
//!
//! Expected before the run (the tolerances): the fit finds the lag peak within a day
//! (7–9 days) and the optimum within a step of the grid around 120 (100–150); the
//! cross-validated ρ beats the defaults' by 0.05 or more and p < 0.05, so the verdict is
//! *supported*, and `--out` writes the fitted settings with a record of the log. The
//! same CPUE shuffled across the log: *does not support a change*, and nothing is
//! written.

use serde_json::Value;
use shelfwind::coast::{Land, resolve_segments};
use shelfwind::plan::sample_forecast_conditions;
use shelfwind::progress::Progress;
use shelfwind::synthetic::Lcg;
use shelfwind::upwelling::ResponseSettings;
use shelfwind::wind::{RunRule, load_sources};
use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::Command;

const SEASONS: [i32; 3] = [2025, 2026, 2027];

fn day(year: i32, month: u32, d: u32) -> chrono::NaiveDate {
    chrono::NaiveDate::from_ymd_opt(year, month, d).expect("a day")
}

/// Hourly wind, April to July of each season: blows of 1–4 days from 340° at 7–14 m/s
/// between calm spells of 2–5 days from 200° at 2–4 m/s.
fn wind_csv(dir: &Path) -> PathBuf {
    let mut rng = Lcg(11);
    let mut text = String::from("time,speed_ms,direction_from_deg\n");
    for year in SEASONS {
        let mut d = day(year, 4, 1);
        let mut blowing = false;
        while d <= day(year, 7, 31) {
            let (len, speed, from) = if blowing {
                (
                    1 + (rng.next_unit() * 4.0) as u32,
                    7.0 + 7.0 * rng.next_unit(),
                    340.0,
                )
            } else {
                (
                    2 + (rng.next_unit() * 4.0) as u32,
                    2.0 + 2.0 * rng.next_unit(),
                    200.0,
                )
            };
            for _ in 0..len {
                for h in 0..24 {
                    let _ = writeln!(
                        text,
                        "{}T{h:02}:00:00Z,{speed:.2},{from}",
                        d.format("%Y-%m-%d")
                    );
                }
                d = d.succ_opt().expect("next day");
            }
            blowing = !blowing;
        }
    }
    let path = dir.join("wind.csv");
    std::fs::write(&path, text).expect("wind");
    path
}

/// The demo scenario with the three seasons' wind.
fn scenario(dir: &Path, wind: &Path) -> PathBuf {
    let mut s = shelfwind::scenario::demo_scenario().expect("demo");
    s.wind_files = vec![wind.to_path_buf()];
    let path = dir.join("coop.shelfwind.json");
    shelfwind::scenario::save_scenario(&path, &s).expect("save");
    path
}

/// The log's rows: (stretch id, date, CPUE) from the known response.
fn synthetic_rows(wind: &Path) -> Vec<(String, chrono::NaiveDate, f64)> {
    let mut s = shelfwind::scenario::demo_scenario().expect("demo");
    s.settings.response = ResponseSettings {
        lag_peak_days: 8.0,
        optimum_m3s_per_100m: 120.0,
        ..ResponseSettings::default()
    };
    let land = Land::bundled();
    let segments = resolve_segments(&s.segments, land).expect("segments");
    let sources = load_sources(&[wind.to_path_buf()]).expect("wind");
    let geometry = s.forecast_geometry(&segments, &[], land);
    let conditions =
        sample_forecast_conditions(&geometry, &sources, RunRule::Members, &Progress::new())
            .expect("conditions");
    let forecast = conditions.forecast(s.tz().expect("zone"), &s.upwelling_settings());
    let mut rng = Lcg(5);
    let mut rows = Vec::new();
    for stretch in forecast.stretches.iter().step_by(3).take(8) {
        for d in &stretch.days {
            let in_season = (5..=7).contains(&chrono::Datelike::month(&d.date));
            if in_season && chrono::Datelike::ordinal(&d.date) % 2 == 0 {
                let cpue = 50.0 * (0.05 + d.response.productivity) * (0.1 * rng.normal()).exp();
                rows.push((stretch.id.clone(), d.date, cpue));
            }
        }
    }
    rows
}

fn log_csv(dir: &Path, name: &str, rows: &[(String, chrono::NaiveDate, f64)]) -> PathBuf {
    let mut text = String::from("# synthetic landings\ndate,stretch_id,catch_kg,effort_h\n");
    for (id, date, cpue) in rows {
        // Four hours fished each day: catch = CPUE × 4.
        let _ = writeln!(text, "{date},{id},{:.3},4", cpue * 4.0);
    }
    let path = dir.join(name);
    std::fs::write(&path, text).expect("log");
    path
}

fn calibrate(scenario: &Path, log: &Path, out: &Path) -> Value {
    let o = Command::new(env!("CARGO_BIN_EXE_shelfwind"))
        .arg("calibrate")
        .arg(scenario)
        .arg("--catch")
        .arg(log)
        .args(["--format", "json", "--out"])
        .arg(out)
        .output()
        .expect("runs");
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    serde_json::from_slice(&o.stdout).expect("JSON")
}

#[test]
fn a_log_made_from_known_settings_gives_them_back_and_a_shuffled_one_changes_nothing() {
    let dir = tempfile::tempdir().expect("temp dir");
    let wind = wind_csv(dir.path());
    let scenario = scenario(dir.path(), &wind);
    let rows = synthetic_rows(&wind);
    assert!(rows.len() > 800, "{} landings", rows.len());

    let out = dir.path().join("calibrated.shelfwind.json");
    let json = calibrate(&scenario, &log_csv(dir.path(), "log.csv", &rows), &out);
    assert_eq!(json["fold_kind"], "seasons");
    assert_eq!(json["folds"], 3);
    let lag = json["fitted"]["lag_peak_days"].as_f64().expect("lag");
    let optimum = json["fitted"]["optimum_m3s_per_100m"]
        .as_f64()
        .expect("optimum");
    assert!((7.0..=9.0).contains(&lag), "lag {lag}: {json}");
    assert!(
        (100.0..=150.0).contains(&optimum),
        "optimum {optimum}: {json}"
    );
    assert_eq!(json["supported"], true, "{json}");
    let cv = json["rho_cross_validated"].as_f64().expect("cv");
    let default = json["rho_default_folds"].as_f64().expect("default");
    assert!(cv >= default + 0.05, "{cv} vs {default}");
    assert!(json["p_value"].as_f64().expect("p") < 0.05);
    let written = shelfwind::scenario::load_scenario(&out).expect("calibrated scenario");
    assert!((written.settings.response.lag_peak_days - lag).abs() < 1e-12);
    let record = written.settings.calibration.expect("a record of the log");
    assert_eq!(record.log, "log.csv");
    assert_eq!(record.landings, rows.len());

    // The same CPUE shuffled across the log carries no signal.
    let mut rng = Lcg(99);
    let mut shuffled = rows.clone();
    for i in (1..shuffled.len()).rev() {
        let j = (rng.next_unit() * (i + 1) as f64) as usize;
        let cpue = shuffled[i].2;
        shuffled[i].2 = shuffled[j].2;
        shuffled[j].2 = cpue;
    }
    let out = dir.path().join("not-written.shelfwind.json");
    let json = calibrate(
        &scenario,
        &log_csv(dir.path(), "shuffled.csv", &shuffled),
        &out,
    );
    assert_eq!(json["supported"], false, "{json}");
    assert!(
        json["verdict"]
            .as_str()
            .expect("verdict")
            .starts_with("The log does not support a change"),
        "{json}"
    );
    assert!(!out.exists(), "nothing is written");
}

/// Landings by position go to the nearest stretch within 3 nm, further ones are skipped
/// with their distance; a segment stands for its stretches; an unknown stretch is an
/// error naming its line, or skipped when asked; a species filter needs the column.
#[test]
fn landings_are_placed_on_the_coast_or_named() {
    use shelfwind::calibrate::{CalibrateOptions, calibrate, read_catch_log};
    use shelfwind::coast::destination;
    let dir = tempfile::tempdir().expect("temp dir");
    let mut text = String::from("time,speed_ms,direction_from_deg\n");
    for d in 1..=20 {
        for h in 0..24 {
            let _ = writeln!(text, "2027-05-{d:02}T{h:02}:00:00Z,{},340", 4 + d % 7);
        }
    }
    let wind = dir.path().join("wind.csv");
    std::fs::write(&wind, text).expect("wind");
    let s = shelfwind::scenario::demo_scenario().expect("demo");
    let land = Land::bundled();
    let segments = resolve_segments(&s.segments, land).expect("segments");
    let sources = load_sources(&[wind]).expect("wind");
    let conditions = sample_forecast_conditions(
        &s.forecast_geometry(&segments, &[], land),
        &sources,
        RunRule::Members,
        &Progress::new(),
    )
    .expect("conditions");
    let forecast = conditions.forecast(s.tz().expect("zone"), &s.upwelling_settings());
    let target = &forecast.stretches[4];
    let near = destination(target.centre, target.offshore_bearing_deg, 1852.0);
    let far = destination(target.centre, target.offshore_bearing_deg, 10.0 * 1852.0);
    let segment = &target.segment_id;
    let log = format!(
        "date,stretch_id,segment_id,lat,lon,catch_kg,effort_h\n\
         2027-05-10,,,{},{},10,2\n\
         2027-05-11,,,{},{},10,2\n\
         2027-05-12,,{segment},,,10,2\n\
         2027-05-13,{},,,,10,2\n\
         2027-05-14,nowhere/0,,,,10,2\n",
        near.lat_deg, near.lon_deg, far.lat_deg, far.lon_deg, target.id
    );
    let base = s.settings.response;
    let options = CalibrateOptions {
        permutations: 9,
        ..CalibrateOptions::default()
    };
    let read = read_catch_log(&log, false).expect("log");
    let e = calibrate(&forecast, &read, &base, &options).expect_err("unknown stretch");
    assert!(e.contains("line 6") && e.contains("\"nowhere/0\""), "{e}");
    let skipping = CalibrateOptions {
        skip_bad: true,
        ..options.clone()
    };
    let c = calibrate(&forecast, &read, &base, &skipping).expect("calibrated");
    let places: Vec<&str> = c.landings.iter().map(|l| l.place.as_str()).collect();
    assert_eq!(
        places,
        vec![target.id.as_str(), segment.as_str(), target.id.as_str()]
    );
    let lines: Vec<u64> = c.skipped.iter().map(|s| s.0).collect();
    assert_eq!(lines, vec![3, 6]);
    assert!(
        c.skipped[0].1.contains("nm from the nearest stretch"),
        "{:?}",
        c.skipped
    );
    let species = CalibrateOptions {
        species: Some("hake".into()),
        ..skipping
    };
    let e = calibrate(&forecast, &read, &base, &species).expect_err("no species column");
    assert!(e.contains("no species column"), "{e}");
}
