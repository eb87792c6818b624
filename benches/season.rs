//! Benchmark of long records: 100 segments × 40 years of hourly station wind from CSV
//! (through `analyse_record`, as `shelfwind season` and the app's season window), and
//! 100 segments × one year of hourly GRIB2 on a 0.25° regional grid in twelve monthly
//! files (read in parallel). Run with `cargo bench --bench season`.

use chrono::{Datelike, Duration, TimeZone, Utc};
use shelfwind::coast::{LatLon, SeaSide, Segment, destination};
use shelfwind::physics::Wind;
use shelfwind::progress::Progress;
use shelfwind::upwelling::{
    CoverageSettings, EventSettings, IndexSettings, RecordSettings, analyse_record,
    analyse_seasons, index_series,
};
use shelfwind::wind::{GridField, assign_wind_merged, encode_wind_message, load_sources};
use std::fmt::Write as _;
use std::time::Instant;

#[path = "common/memory.rs"]
mod memory;

fn segments(n: usize) -> Vec<Segment> {
    (0..n)
        .map(|k| {
            let a = LatLon::new(
                31.0 + 8.0 * k as f64 / n as f64,
                -121.0 - (k % 5) as f64 * 0.4,
            );
            let b = destination(a, 345.0, 4000.0);
            let c = destination(b, 335.0, 4000.0);
            Segment {
                id: format!("seg-{k:03}"),
                points: vec![a, b, c],
                sea: SeaSide::Left,
            }
        })
        .collect()
}

fn story(hour: i64) -> Wind {
    let day = (hour / 24) % 365;
    let seasonal = ((day as f64 - 80.0) / 365.0 * std::f64::consts::TAU).sin();
    Wind::from_speed_direction(
        7.0 + 3.0 * seasonal + (hour % 13) as f64 * 0.2,
        if seasonal > 0.0 { 330.0 } else { 190.0 },
    )
}

fn analyse(segs: &[Segment], winds: &[shelfwind::wind::SegmentWind]) -> usize {
    let mut seasons = 0;
    for (s, w) in segs.iter().zip(winds) {
        let idx = index_series(s, w, &IndexSettings::default()).expect("mid-latitude");
        let (years, _) = analyse_seasons(
            &idx.times,
            &idx.index_m3s_per_100m,
            false,
            None,
            &CoverageSettings::default(),
            &EventSettings::default(),
        );
        seasons += years.len();
    }
    seasons
}

/// The process's peak resident memory (Linux), as text.
fn peak_memory() -> String {
    memory::peak_memory_kb().map_or_else(|| "unknown".into(), |kb| format!("{kb} kB"))
}

fn main() {
    let dir = tempfile::tempdir().expect("temp dir");

    // 40 years of hourly station wind.
    let csv = dir.path().join("station.csv");
    let t0 = Utc
        .with_ymd_and_hms(1985, 1, 1, 0, 0, 0)
        .single()
        .expect("date");
    let hours = (Utc
        .with_ymd_and_hms(2025, 1, 1, 0, 0, 0)
        .single()
        .expect("date")
        - t0)
        .num_hours();
    let mut text = String::with_capacity(hours as usize * 40);
    text.push_str("time,u_ms,v_ms\n");
    for h in 0..hours {
        let w = story(h);
        let _ = writeln!(
            text,
            "{},{:.2},{:.2}",
            (t0 + Duration::hours(h)).format("%Y-%m-%dT%H:%M:%SZ"),
            w.u_m_s,
            w.v_m_s
        );
    }
    std::fs::write(&csv, &text).expect("write");
    let segs = segments(100);
    let names: Vec<String> = segs.iter().map(|s| s.id.clone()).collect();
    let start = Instant::now();
    let sources = load_sources(std::slice::from_ref(&csv)).expect("csv");
    let read_s = start.elapsed().as_secs_f64();
    let record = RecordSettings {
        index: IndexSettings::default(),
        events: EventSettings::default(),
        coverage: CoverageSettings::default(),
        years: None,
    };
    let out = analyse_record(&segs, &names, &sources, &record, &Progress::new()).expect("seasons");
    let seasons: usize = out.iter().map(|s| s.years.len()).sum();
    let total_s = start.elapsed().as_secs_f64();
    println!(
        "csv: 100 segments × 40 years hourly ({hours} rows, {} MB): read {read_s:.1} s, index and {seasons} seasons analysed, {total_s:.1} s in all; peak memory {}",
        text.len() / 1_000_000,
        peak_memory()
    );

    // One year of hourly GRIB2, 0.25° over 10° × 10°, twelve monthly files.
    let (ni, nj, step) = (41usize, 41usize, 0.25);
    let mut files = Vec::new();
    let mut bytes_total = 0;
    for month in 1..=12u32 {
        let reference = Utc
            .with_ymd_and_hms(2027, month, 1, 0, 0, 0)
            .single()
            .expect("date");
        let next = if month == 12 {
            Utc.with_ymd_and_hms(2028, 1, 1, 0, 0, 0)
        } else {
            Utc.with_ymd_and_hms(2027, month + 1, 1, 0, 0, 0)
        }
        .single()
        .expect("date");
        let mut bytes = Vec::new();
        for h in 0..u32::try_from((next - reference).num_hours()).expect("hours") {
            let hour_of_year = i64::from(reference.ordinal0()) * 24 + i64::from(h);
            let base = story(hour_of_year);
            for (parameter, comp) in [(2u8, base.u_m_s), (3, base.v_m_s)] {
                let values: Vec<f64> = (0..ni * nj)
                    .map(|k| comp * (1.0 + 0.01 * (k % ni) as f64))
                    .collect();
                bytes.extend(encode_wind_message(&GridField {
                    lat_north_deg: 40.0,
                    lon_west_deg: -127.0,
                    step_deg: step,
                    ni,
                    nj,
                    parameter,
                    reference,
                    step_hours: h,
                    values: &values,
                }));
            }
        }
        let path = dir.path().join(format!("wind-2027-{month:02}.grib2"));
        bytes_total += bytes.len();
        std::fs::write(&path, bytes).expect("write");
        files.push(path);
    }
    let segs = segments(100);
    let start = Instant::now();
    let sources = load_sources(&files).expect("grib");
    let winds = assign_wind_merged(&sources, &segs, &Progress::new()).expect("covered");
    let read_s = start.elapsed().as_secs_f64();
    let seasons = analyse(&segs, &winds);
    println!(
        "grib2: 100 segments × 1 year hourly, 0.25° grid of {ni} × {nj}, 12 files ({} MB, {} messages): read {read_s:.1} s, {:.1} s with the index and {seasons} seasons",
        bytes_total / 1_000_000,
        8760 * 2,
        start.elapsed().as_secs_f64()
    );
}
