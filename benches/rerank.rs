//! Benchmark of the pipeline's stages on a long coast (2,328 and 10,185 stretches, the
//! demo coast cut finely and repeated, with the demo forecast: 7 days hourly): the full
//! build (read and sample the forecast, compute the upwelling, rank), the upwelling
//! again from the sampled conditions (a change of model settings), and ranking again
//! for another boat or port (no file read, nothing recomputed), then the process's peak
//! memory. The plans from the shortcuts must print as the full build's (CSV), byte for
//! byte. Goals (issue 18): 10,000 stretches built in under 2 s, re-ranked in under
//! 100 ms, under 1 GB. Run with `cargo bench --bench rerank`.

#[path = "common/long_coast.rs"]
mod long_coast;

use long_coast::long_demo_scenario;
use shelfwind::coast::{Land, resolve_segments};
use shelfwind::export::{PlanFormat, render_plan};
use shelfwind::plan::{forecast_key, rank_plan, sample_forecast_conditions};
use shelfwind::progress::Progress;
use shelfwind::scenario::{PlanChoice, write_demo};
use shelfwind::wind::load_sources;
use std::time::Instant;

fn ms(t: Instant) -> f64 {
    t.elapsed().as_secs_f64() * 1e3
}

#[path = "common/memory.rs"]
mod memory;

#[path = "common/cpu.rs"]
mod cpu;

fn main() {
    let dir = tempfile::tempdir().expect("temp dir");
    let (_, forecast) = write_demo(dir.path()).expect("demo files");
    // The demo coast cut into 2,328 and 10,185 stretches (benches/common/long_coast.rs).
    for copies in [8, 35] {
        measure(copies, &forecast);
    }
    println!(
        "peak memory {}",
        memory::peak_memory_kb().map_or_else(|| "unknown".into(), |kb| format!("{kb} kB"))
    );
}

fn measure(copies: usize, forecast: &std::path::Path) {
    let scenario = long_demo_scenario(copies);
    let segments = resolve_segments(&scenario.segments, Land::bundled()).expect("sides");
    let tz = scenario.tz().expect("zone");
    let ports = scenario.port_positions();
    let geometry = scenario.forecast_geometry(&segments, &ports, Land::bundled());
    let now = chrono::Utc::now();
    let choice = |vessel: &'static str| PlanChoice {
        vessel_id: Some(vessel),
        port_id: Some("harrow-cove"),
        from: None,
        days: 7,
        now,
    };

    let t = Instant::now();
    let cpu_before = cpu::cpu_seconds();
    let sources = load_sources(&[forecast.to_path_buf()]).expect("forecast");
    let conditions = sample_forecast_conditions(
        &geometry,
        &sources,
        shelfwind::wind::RunRule::Members,
        &Progress::new(),
    )
    .expect("sampled");
    let sampled_ms = ms(t);
    let forecast = conditions.forecast(tz, &scenario.upwelling_settings());
    let request = scenario
        .plan_request(&choice("little-auk"))
        .expect("request");
    let plan = rank_plan(&forecast, &request).expect("plan");
    let full_ms = ms(t);
    // Processor time on both cores: the wall clock here moves with the machine's other
    // guests, this much less.
    let full_cpu = cpu::cpu_seconds().zip(cpu_before).map_or_else(
        || "unknown".into(),
        |(b, a)| format!("{:.0} ms", (b - a) * 1e3),
    );
    let stretches = plan.stretches.len();

    // The shortcuts change no number: the plan made again from the sampled wind, and
    // ranked again for the first boat, print byte for byte as the full build's.
    let full = render_plan(&plan, PlanFormat::Csv);
    let same = |what: &str, other: &shelfwind::plan::Plan| {
        assert!(
            render_plan(other, PlanFormat::Csv) == full,
            "the plan {what} differs from the full build's"
        );
    };

    let runs = 5;
    let t = Instant::now();
    let mut again = None;
    for _ in 0..runs {
        drop(again.take());
        let forecast = conditions.forecast(tz, &scenario.upwelling_settings());
        again = Some(std::hint::black_box(
            rank_plan(&forecast, &request).expect("plan"),
        ));
    }
    let from_conditions_ms = ms(t) / f64::from(runs);
    same("from sampled conditions", &again.take().expect("a plan"));

    let mut rerank = Vec::new();
    for vessel in ["marrow-tide", "steady-hand", "little-auk"].repeat(3) {
        let request = scenario.plan_request(&choice(vessel)).expect("request");
        let t = Instant::now();
        let again = std::hint::black_box(rank_plan(&forecast, &request).expect("plan"));
        rerank.push(ms(t));
        if vessel == "little-auk" {
            same("ranked again", &again);
        }
    }
    rerank.sort_by(f64::total_cmp);
    // The app first tells whether its sampled conditions still fit the coast (the same
    // files, the same points): a hit, without finding the ways by sea again.
    let t = Instant::now();
    let key = forecast_key(&geometry);
    let check_ms = ms(t);
    assert!(conditions.fits(&conditions.sources, key, shelfwind::wind::RunRule::Members));
    println!(
        "{stretches} stretches, 7 days (plans from the shortcuts identical to the full build's, as CSV): full build {full_ms:.0} ms, processor time {full_cpu} (reading and sampling {sampled_ms:.0} ms); \
         from sampled conditions {from_conditions_ms:.0} ms ({:.1}x faster); \
         another boat re-ranked in {:.1} ms (median of {}, worst {:.1} ms) after {check_ms:.1} ms telling the cached conditions still fit",
        full_ms / from_conditions_ms,
        rerank[rerank.len() / 2],
        rerank.len(),
        rerank[rerank.len() - 1]
    );
}
