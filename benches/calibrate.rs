//! Benchmark of the calibration: five seasons (2023–2027) of hourly wind for the demo
//! coast cut into about 50 stretches, a log of 2,000 landings spread over them from May
//! to September, and 199 shuffles. Run with `cargo bench --bench calibrate`; the
//! README's "Speed" gives the figure.

use shelfwind::calibrate::{CalibrateOptions, calibrate_scenario};
use shelfwind::coast::Land;
use shelfwind::progress::Progress;
use shelfwind::scenario::demo_scenario;
use shelfwind::synthetic::Lcg;
use shelfwind::wind::load_sources;
use std::fmt::Write as _;
use std::time::Instant;

fn main() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut rng = Lcg(3);
    // Five years of hourly wind: spells of 1–5 days, northerly or southerly.
    let mut text = String::from("time,speed_ms,direction_from_deg\n");
    let mut day = chrono::NaiveDate::from_ymd_opt(2023, 1, 1).expect("day");
    let end = chrono::NaiveDate::from_ymd_opt(2027, 12, 31).expect("day");
    while day <= end {
        let (len, speed, from) = if rng.next_unit() < 0.5 {
            (
                1 + (rng.next_unit() * 5.0) as u32,
                6.0 + 8.0 * rng.next_unit(),
                335.0,
            )
        } else {
            (
                1 + (rng.next_unit() * 5.0) as u32,
                1.0 + 4.0 * rng.next_unit(),
                210.0,
            )
        };
        for _ in 0..len {
            for h in 0..24 {
                let _ = writeln!(
                    text,
                    "{}T{h:02}:00:00Z,{speed:.2},{from}",
                    day.format("%Y-%m-%d")
                );
            }
            day = day.succ_opt().expect("next");
        }
    }
    let wind = dir.path().join("wind.csv");
    std::fs::write(&wind, &text).expect("wind");

    let mut scenario = demo_scenario().expect("demo");
    scenario.settings.stretch_length_nm = 2.8;
    let land = Land::bundled();
    let segments = shelfwind::coast::resolve_segments(&scenario.segments, land).expect("segments");
    let stretch_ids: Vec<String> = segments
        .iter()
        .flat_map(|s| {
            s.stretches(scenario.settings.stretch_length_nm * shelfwind::physics::NAUTICAL_MILE_M)
                .into_iter()
                .map(|p| p.id)
        })
        .collect();
    // Catches from a generator of their own: no link to the days or places.
    let mut catches = Lcg(17);
    let mut log = String::from("date,stretch_id,catch_kg,trips\n");
    for _ in 0..2000 {
        let year = 2023 + (rng.next_unit() * 5.0) as i32;
        let date = chrono::NaiveDate::from_ymd_opt(year, 5, 1).expect("day")
            + chrono::Duration::days((rng.next_unit() * 150.0) as i64);
        let id = &stretch_ids[(rng.next_unit() * stretch_ids.len() as f64) as usize];
        let _ = writeln!(
            log,
            "{date},{id},{:.1},1",
            20.0 + 200.0 * catches.next_unit()
        );
    }
    let log_path = dir.path().join("log.csv");
    std::fs::write(&log_path, log).expect("log");

    let start = Instant::now();
    let sources = load_sources(&[wind]).expect("wind");
    let c = calibrate_scenario(
        &scenario,
        land,
        &sources,
        &log_path,
        &CalibrateOptions::default(),
        &Progress::new(),
    )
    .expect("calibrated");
    let total = start.elapsed().as_secs_f64();
    println!(
        "calibrate: {} stretches, 5 seasons hourly, {} landings, {} folds, {} shuffles: {total:.1} s (cross-validated ρ {:?}, p {:?})",
        stretch_ids.len(),
        c.landings.len(),
        c.fit.folds,
        c.fit.permutations,
        c.fit.cv_rho,
        c.fit.p_value
    );
}
