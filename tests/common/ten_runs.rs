//! The constructed ensemble case shared by `tests/ensemble.rs` and
//! `tests/gui_ensemble.rs`: a north-south stretch at 37.0-37.1 N, 123 W, sea to the west,
//! a home port beside it, UTC days, a 20 kt skiff (the first boat) and a 30 kt cutter;
//! and three deterministic "centres" for a poor man's ensemble.

// Each test file uses some of these.
#![allow(dead_code)]

use shelfwind::coast::{CoastSegment, LatLon, SeaSide};
use shelfwind::plan::{Port, Vessel};
use shelfwind::scenario::Scenario;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// The scenario with these wind files.
pub fn ten_run_scenario(wind: Vec<PathBuf>) -> Scenario {
    let vessel = |id: &str, limit: f64| Vessel {
        id: id.into(),
        name: id.into(),
        cruise_speed_kt: 20.0,
        fuel_l_per_h: 20.0,
        wind_limit_kt: limit,
        wave_limit_m: None,
        steepness_limit_m_s2: None,
        range_nm: 30.0,
    };
    Scenario {
        name: "Ten runs".into(),
        time_zone: "UTC".into(),
        segments: vec![CoastSegment {
            id: "reach".into(),
            name: "Reach".into(),
            points: vec![LatLon::new(37.0, -123.0), LatLon::new(37.1, -123.0)],
            sea: Some(SeaSide::Left),
            notes: String::new(),
            closure: None,
        }],
        ports: vec![Port {
            id: "home".into(),
            name: "Home".into(),
            position: LatLon::new(37.05, -123.05),
        }],
        vessels: vec![vessel("skiff", 20.0), vessel("cutter", 30.0)],
        wind_files: wind,
        coast_pack: None,
        wind_files_are_runs: false,
        settings: shelfwind::scenario::ModelSettings::default(),
        notes: String::new(),
    }
}

/// Three forecasts from "different centres" written in `dir`: station series without
/// a position (they cover every point), hourly for three days from 1 June 2027, calm
/// but from 2 June 00 UTC to 3 June 00 UTC, when two blow 12 m/s from the north and the
/// third 2 m/s.
pub fn three_centres(dir: &Path) -> Vec<PathBuf> {
    [12.0, 12.0, 2.0]
        .iter()
        .enumerate()
        .map(|(k, strong)| {
            let path = dir.join(format!("centre_{k}.csv"));
            let mut text = String::from("time,u_ms,v_ms\n");
            for h in 0..72 {
                let t = chrono::DateTime::parse_from_rfc3339("2027-06-01T00:00:00Z")
                    .expect("time")
                    .to_utc()
                    + chrono::Duration::hours(h);
                let v = if (24..=48).contains(&h) { -strong } else { 0.0 };
                let _ = writeln!(
                    text,
                    "{},0,{v}",
                    t.to_rfc3339_opts(chrono::SecondsFormat::Secs, true)
                );
            }
            std::fs::write(&path, text).expect("write");
            path
        })
        .collect()
}
