//! Benchmark of the desktop app: time to the first frame of the demo, and CPU time per
//! frame with 2,328 and 10,185 stretches on the map while stepping through the hours.
//! Goals (issue 18): first frame under 150 ms, under 8 ms per frame (median) at 10,000
//! stretches. Run with `cargo bench --bench app_frame`.
//!
//! The app is driven as its window drives it: a frame is the app's `ui` inside an egui
//! pass plus the tessellation of what it painted into triangles (the CPU half of a
//! frame; the upload and drawing on the graphics card are not counted). Accessibility
//! output is off, as in the app when no screen reader asks for it; the per-frame figure
//! through `egui_kittest` (which builds the accessibility tree every frame for its
//! queries) is printed too.

#[path = "common/long_coast.rs"]
mod long_coast;

use eframe::egui;
use egui_kittest::Harness;
use long_coast::long_demo_scenario;
use shelfwind::app::{AppOptions, Remembered, ShelfwindApp};
use shelfwind::scenario::{save_scenario, write_demo};
use std::time::{Duration, Instant};

/// The app in a window of its own: an egui context, eframe's frame and the app.
struct Window {
    ctx: egui::Context,
    frame: eframe::Frame,
    app: ShelfwindApp,
    /// Seconds since the window opened, as egui is told.
    clock: f64,
}

impl Window {
    fn open(path: Option<std::path::PathBuf>, options: AppOptions, memory: Remembered) -> Self {
        let ctx = egui::Context::default();
        let app = ShelfwindApp::with_memory(&ctx, path, options, memory);
        Self {
            ctx,
            frame: eframe::Frame::_new_kittest(),
            app,
            clock: 0.0,
        }
    }

    /// One frame with these input events; returns its CPU time.
    fn frame(&mut self, events: Vec<egui::Event>) -> Duration {
        self.clock += 1.0 / 60.0;
        let input = egui::RawInput {
            screen_rect: Some(egui::Rect::from_min_size(
                egui::Pos2::ZERO,
                egui::vec2(1500.0, 1000.0),
            )),
            time: Some(self.clock),
            events,
            ..Default::default()
        };
        let t = Instant::now();
        let (app, frame) = (&mut self.app, &mut self.frame);
        let output = self.ctx.run_ui(input, |ui| {
            eframe::App::logic(app, ui, frame);
            eframe::App::ui(app, ui, frame);
        });
        let triangles = self.ctx.tessellate(output.shapes, output.pixels_per_point);
        let spent = t.elapsed();
        std::hint::black_box(triangles);
        spent
    }

    /// Frames until the plan is ready; returns the time taken.
    fn wait_for_plan(&mut self) -> Duration {
        let start = Instant::now();
        while self.app.is_busy() || self.app.plan.is_none() {
            self.frame(Vec::new());
            std::thread::sleep(Duration::from_millis(5));
            assert!(start.elapsed() < Duration::from_mins(10), "no plan");
        }
        start.elapsed()
    }
}

/// A key pressed and let go.
fn key(key: egui::Key) -> Vec<egui::Event> {
    [true, false]
        .map(|pressed| egui::Event::Key {
            key,
            physical_key: None,
            pressed,
            repeat: false,
            modifiers: egui::Modifiers::NONE,
        })
        .to_vec()
}

/// Median and worst of frame times, ms.
fn median_worst(mut times: Vec<f64>) -> (f64, f64) {
    times.sort_by(f64::total_cmp);
    (times[times.len() / 2], times[times.len() - 1])
}

/// What a skipper who has used the app before has: the cautions read once.
fn returning_user() -> Remembered {
    Remembered {
        cautions_accepted: true,
        ..Remembered::default()
    }
}

fn main() {
    let dir = tempfile::tempdir().expect("temp dir");
    let options = AppOptions {
        storage_dir: Some(dir.path().to_path_buf()),
        native_dialogs: false,
        autosave_s: 3600.0,
    };

    // First frame of the demo, from creating the app (the land is triangulated and the
    // demo written and planned in the background).
    let t = Instant::now();
    let mut window = Window::open(None, options.clone(), Remembered::default());
    let created = t.elapsed();
    window.frame(Vec::new());
    let first_frame = t.elapsed();
    let plan_ready = window.wait_for_plan() + first_frame;
    println!(
        "demo: first frame {:.0} ms after start (the app made in {:.0} ms), ranked list ready after {:.0} ms",
        ms(first_frame),
        ms(created),
        ms(plan_ready)
    );

    // The demo coast cut into 2,328 and 10,185 stretches (benches/common/long_coast.rs).
    for copies in [8, 35] {
        frames_on_long_coast(copies, &dir.path().join(format!("long-{copies}")), &options);
    }
}

fn ms(d: Duration) -> f64 {
    d.as_secs_f64() * 1e3
}

/// The arrow key that steps the hour on frame `k`: forth and back, so every frame shows
/// another hour.
fn step_key(k: usize) -> egui::Key {
    if k.is_multiple_of(2) {
        egui::Key::ArrowRight
    } else {
        egui::Key::ArrowLeft
    }
}

fn frames_on_long_coast(copies: usize, dir: &std::path::Path, options: &AppOptions) {
    let scenario = long_demo_scenario(copies);
    let (scenario_path, _) = write_demo(dir).expect("demo files");
    save_scenario(&scenario_path, &scenario).expect("save");
    let frames: usize = std::env::var("FRAMES")
        .ok()
        .and_then(|f| f.parse().ok())
        .unwrap_or(60);

    let mut window = Window::open(
        Some(scenario_path.clone()),
        options.clone(),
        returning_user(),
    );
    window.frame(Vec::new());
    let planned = window.wait_for_plan();
    let stretches = window.app.plan.as_ref().map_or(0, |p| p.stretches.len());
    // A few frames to settle (fonts, the map framed, the land triangulated).
    for _ in 0..10 {
        window.frame(Vec::new());
        std::thread::sleep(Duration::from_millis(50));
    }
    let hour = window.app.view.hour;
    let mut times = Vec::with_capacity(frames);
    for k in 0..frames {
        times.push(ms(window.frame(key(step_key(k)))));
        let want = if k.is_multiple_of(2) { hour + 1 } else { hour };
        assert_eq!(window.app.view.hour, want, "the arrow keys step the hour");
    }
    let (median, worst) = median_worst(times);

    // The same through egui_kittest, which also builds the accessibility tree.
    let path = scenario_path.clone();
    let o = options.clone();
    let mut harness = Harness::builder()
        .with_size([1500.0, 1000.0])
        .build_eframe(move |cc| {
            ShelfwindApp::with_memory(&cc.egui_ctx, Some(path), o, returning_user())
        });
    harness.step();
    while harness.state().is_busy() || harness.state().plan.is_none() {
        harness.step();
        std::thread::sleep(Duration::from_millis(5));
    }
    let mut kittest = Vec::with_capacity(frames);
    for k in 0..frames {
        harness.key_press(step_key(k));
        let t = Instant::now();
        harness.step();
        kittest.push(ms(t.elapsed()));
    }
    let (kittest_median, _) = median_worst(kittest);
    println!(
        "{stretches} stretches (plan built in {:.1} s): median {median:.2} ms of CPU per frame, worst {worst:.2} ms (egui pass and tessellation); through egui_kittest with its accessibility tree, median {kittest_median:.2} ms",
        planned.as_secs_f64(),
    );
}
