//! Benchmark of an ensemble through the whole pipeline: 20 runs (the control and 19
//! perturbed members, product template 4.1, one file) × 7 days of hourly wind on the
//! demo grid × the demo coast cut into about 2,300 stretches (as `rerank` cuts it), three
//! ports. Prints the time to read and sample every run, to compute each run's upwelling
//! and to rank with the odds, the peak memory, and the same for the control alone.
//! Run with `cargo bench --bench ensemble`.

#[path = "common/long_coast.rs"]
mod long_coast;
#[path = "common/memory.rs"]
mod memory;

use long_coast::long_demo_scenario;
use shelfwind::coast::{Land, resolve_segments};
use shelfwind::plan::{rank_plan, sample_forecast_conditions};
use shelfwind::progress::Progress;
use shelfwind::scenario::PlanChoice;
use shelfwind::wind::{
    DEMO_HOURS, DEMO_LAT_NORTH_DEG, DEMO_LON_WEST_DEG, DEMO_NI, DEMO_NJ, DEMO_STEP_DEG, GridField,
    Parameter, RunRule, demo_reference_time, demo_wind_field, encode_member_message, load_sources,
};
use std::path::Path;
use std::time::Instant;

const MEMBERS: u8 = 20;

fn ms(t: Instant) -> f64 {
    t.elapsed().as_secs_f64() * 1e3
}

/// Peak resident memory of this process so far, MB (Linux).
fn peak_mb() -> f64 {
    memory::peak_memory_kb().map_or(f64::NAN, |kb| kb as f64 / 1024.0)
}

/// Writes `members` runs of the demo wind, each scaled and shifted in time a little
/// (synthetic spread), every hour for 7 days.
fn write_ensemble(path: &Path, members: u8) {
    let issued = demo_reference_time();
    let mut out = Vec::new();
    for step in 0..=DEMO_HOURS {
        for m in 0..members {
            let scale = 0.75 + 0.025 * f64::from(m);
            let shift = f64::from(m % 5) - 2.0;
            let (mut u, mut v) = demo_wind_field(f64::from(step) + shift);
            for x in u.iter_mut().chain(v.iter_mut()) {
                *x *= scale;
            }
            let kind = if m == 0 { 1 } else { 3 };
            for (parameter, values) in [(2, &u), (3, &v)] {
                out.extend(encode_member_message(
                    &GridField {
                        lat_north_deg: DEMO_LAT_NORTH_DEG,
                        lon_west_deg: DEMO_LON_WEST_DEG,
                        step_deg: DEMO_STEP_DEG,
                        ni: DEMO_NI,
                        nj: DEMO_NJ,
                        parameter,
                        reference: issued,
                        step_hours: step,
                        values,
                    },
                    Parameter::Wind10m,
                    (kind, m, members),
                ));
            }
        }
    }
    std::fs::write(path, out).expect("write the ensemble");
}

fn main() {
    let dir = tempfile::tempdir().expect("temp dir");
    // The demo coast cut into 2,328 stretches (benches/common/long_coast.rs).
    let scenario = long_demo_scenario(8);
    let segments = resolve_segments(&scenario.segments, Land::bundled()).expect("sides");
    let tz = scenario.tz().expect("zone");
    let ports = scenario.port_positions();
    let geometry = scenario.forecast_geometry(&segments, &ports, Land::bundled());
    let request = scenario
        .plan_request(&PlanChoice {
            vessel_id: Some("little-auk"),
            port_id: Some("harrow-cove"),
            from: None,
            days: 7,
            now: chrono::Utc::now(),
        })
        .expect("request");
    let mut lines = Vec::new();
    for members in [1, MEMBERS] {
        let path = dir.path().join(format!("ensemble_{members}.grib2"));
        write_ensemble(&path, members);
        let mb = std::fs::metadata(&path).map_or(0, |m| m.len()) as f64 / 1e6;
        let t = Instant::now();
        let sources = load_sources(&[path]).expect("forecast");
        let conditions =
            sample_forecast_conditions(&geometry, &sources, RunRule::Members, &Progress::new())
                .expect("sampled");
        let sampled_ms = ms(t);
        let forecast = conditions.forecast(tz, &scenario.upwelling_settings());
        let upwelling_ms = ms(t) - sampled_ms;
        let plan = rank_plan(&forecast, &request).expect("plan");
        let total_ms = ms(t);
        let ranked: usize = plan.days.iter().map(|d| d.ranked.len()).sum();
        lines.push(format!(
            "{} run(s), {} stretches, 7 days ({mb:.1} MB file): {total_ms:.0} ms in all \
             (reading and sampling {sampled_ms:.0} ms, upwelling {upwelling_ms:.0} ms, ranking {:.0} ms); \
             {ranked} ranked entries; peak memory so far {:.0} MB",
            plan.runs.len().max(1),
            plan.stretches.len(),
            total_ms - sampled_ms - upwelling_ms,
            peak_mb()
        ));
        std::hint::black_box(plan);
    }
    for l in lines {
        println!("{l}");
    }
}
