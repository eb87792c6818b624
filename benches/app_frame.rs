//! Benchmark of the desktop app: time to the first frame of the demo, and CPU time per
//! frame (outside rendering) with 2,328 and 10,185 stretches on the map. Goals (issue
//! 18): first frame under 150 ms, under 8 ms per frame (median) at 10,000 stretches.
//! Run with `cargo bench --bench app_frame`.

#[path = "common/long_coast.rs"]
mod long_coast;

use eframe::egui;
use egui_kittest::Harness;
use long_coast::long_demo_scenario;
use shelfwind::app::{AppOptions, ShelfwindApp};
use shelfwind::scenario::{save_scenario, write_demo};
use std::time::{Duration, Instant};

fn wait(harness: &mut Harness<'static, ShelfwindApp>) -> Duration {
    let start = Instant::now();
    while harness.state().is_busy() || harness.state().plan.is_none() {
        harness.step();
        std::thread::sleep(Duration::from_millis(5));
        assert!(start.elapsed() < Duration::from_mins(10), "no plan");
    }
    start.elapsed()
}

fn main() {
    let dir = tempfile::tempdir().expect("temp dir");
    let options = AppOptions {
        storage_dir: Some(dir.path().to_path_buf()),
        native_dialogs: false,
        autosave_s: 3600.0,
    };

    // First frame of the demo, from creating the app (land triangulation, demo written).
    let t = Instant::now();
    let o = options.clone();
    let mut harness = Harness::builder()
        .with_size([1500.0, 1000.0])
        .build_eframe(move |cc| {
            ShelfwindApp::with_memory(&cc.egui_ctx, None, o, shelfwind::app::Remembered::default())
        });
    harness.step();
    let first_frame = t.elapsed();
    let plan_ready = wait(&mut harness) + first_frame;
    println!(
        "demo: first frame {:.0} ms after start, ranked list ready after {:.0} ms",
        first_frame.as_secs_f64() * 1e3,
        plan_ready.as_secs_f64() * 1e3
    );

    // The demo coast cut into 2,328 and 10,185 stretches (benches/common/long_coast.rs).
    for copies in [8, 35] {
        frames_on_long_coast(copies, &dir.path().join(format!("long-{copies}")), &options);
    }
}

fn frames_on_long_coast(copies: usize, dir: &std::path::Path, options: &AppOptions) {
    let scenario = long_demo_scenario(copies);
    let (scenario_path, _) = write_demo(dir).expect("demo files");
    save_scenario(&scenario_path, &scenario).expect("save");
    let o = options.clone();
    let path = scenario_path.clone();
    let mut harness = Harness::builder()
        .with_size([1500.0, 1000.0])
        .build_eframe(move |cc| {
            ShelfwindApp::with_memory(
                &cc.egui_ctx,
                Some(path),
                o,
                shelfwind::app::Remembered::default(),
            )
        });
    harness.step();
    let planned = wait(&mut harness);
    let stretches = harness
        .state()
        .plan
        .as_ref()
        .map_or(0, |p| p.stretches.len());
    let frames: usize = std::env::var("FRAMES")
        .ok()
        .and_then(|f| f.parse().ok())
        .unwrap_or(60);
    let mut times = Vec::with_capacity(frames);
    for k in 0..frames {
        // Move through time so every frame recolours the coast.
        harness.key_press(if k % 2 == 0 {
            egui::Key::ArrowRight
        } else {
            egui::Key::ArrowLeft
        });
        let t = Instant::now();
        harness.step();
        times.push(t.elapsed().as_secs_f64() * 1e3);
    }
    times.sort_by(f64::total_cmp);
    let mean = times.iter().sum::<f64>() / times.len() as f64;
    println!(
        "{stretches} stretches (plan built in {:.1} s): {:.2} ms per frame on average, median {:.2} ms, worst {:.2} ms (CPU, without rendering)",
        planned.as_secs_f64(),
        mean,
        times[times.len() / 2],
        times[times.len() - 1]
    );
}
