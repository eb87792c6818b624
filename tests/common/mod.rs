//! What the GUI tests share: the app on the bundled demo, with the cautions accepted and
//! the first plan made, and stepping until background work ends.

// Each test file uses some of these; the others would warn as unused in that file.
#![allow(dead_code)]

use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use shelfwind::app::{AppOptions, Remembered, ShelfwindApp};
use std::path::Path;
use std::time::{Duration, Instant};

/// The app at 1500×1000 on the bundled demo, remembering nothing, its files in `dir`;
/// the cautions accepted and the first plan made.
pub fn app_harness(dir: &Path) -> Harness<'static, ShelfwindApp> {
    app_harness_remembering(dir, Remembered::default())
}

/// Like [`app_harness`], remembering what an earlier run saved (the cautions are
/// accepted here unless that run accepted them).
pub fn app_harness_remembering(
    dir: &Path,
    remembered: Remembered,
) -> Harness<'static, ShelfwindApp> {
    let options = AppOptions {
        storage_dir: Some(dir.to_path_buf()),
        native_dialogs: false,
        autosave_s: 3600.0,
    };
    let accepted = remembered.cautions_accepted;
    let mut harness = Harness::builder()
        .with_size([1500.0, 1000.0])
        .build_eframe(move |cc| ShelfwindApp::with_memory(&cc.egui_ctx, None, options, remembered));
    harness.run_steps(2);
    if !accepted {
        // The cautions show at first start; accept them.
        harness.get_by_label("I understand").click();
        harness.run_steps(2);
    }
    wait_for_plan(&mut harness);
    harness
}

/// Steps the app until its background job has finished (the plan is read in a thread).
pub fn wait_for_plan(harness: &mut Harness<'static, ShelfwindApp>) {
    let start = Instant::now();
    loop {
        harness.step();
        if !harness.state().is_busy() && harness.state().plan.is_some() {
            break;
        }
        assert!(
            start.elapsed() < Duration::from_mins(2),
            "the plan never came"
        );
        std::thread::sleep(Duration::from_millis(20));
    }
    harness.run_steps(3);
}

/// Steps the app until `done` holds (background work ends between frames), failing
/// after `limit`.
pub fn wait_until_within(
    harness: &mut Harness<'static, ShelfwindApp>,
    what: &str,
    limit: Duration,
    done: impl Fn(&ShelfwindApp) -> bool,
) {
    let start = Instant::now();
    while !done(harness.state()) {
        harness.step();
        assert!(start.elapsed() < limit, "never: {what}");
        std::thread::sleep(Duration::from_millis(20));
    }
    harness.run_steps(2);
}

/// Focuses a labelled field, selects what it holds, types `text`, and steps two frames
/// so that what was typed can be checked.
pub fn type_into(
    harness: &mut Harness<'static, ShelfwindApp>,
    role: eframe::egui::accesskit::Role,
    label: &str,
    text: &str,
) {
    harness.get_by_role_and_label(role, label).focus();
    harness.run_steps(2);
    harness.key_press_modifiers(eframe::egui::Modifiers::COMMAND, eframe::egui::Key::A);
    harness.run_steps(1);
    harness.get_by_role_and_label(role, label).type_text(text);
    harness.run_steps(2);
}
