//! The app on an ensemble, as a skipper uses it: the list says how many runs agree, the
//! map colours by the chance of upwelling, the plots show the runs' spread, and "Each
//! file is one run" takes forecasts from several centres together (one undoable edit).
//! The odds are those worked by hand in `tests/ensemble.rs`.

mod common;
#[path = "common/ten_runs.rs"]
mod ten_runs;

use common::wait_for_plan;
use eframe::egui;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use shelfwind::app::{AppOptions, Colouring, Remembered, ShelfwindApp};
use shelfwind::scenario::save_scenario;
use std::path::{Path, PathBuf};
use ten_runs::{ten_run_scenario, three_centres};

fn fixture(rel: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/grib2")
        .join(rel)
}

/// The constructed scenario (`tests/common/ten_runs.rs`) with these wind files, saved
/// in `dir`.
fn scenario_file(dir: &Path, wind: Vec<PathBuf>) -> PathBuf {
    let path = dir.join("runs.shelfwind.json");
    save_scenario(&path, &ten_run_scenario(wind)).expect("saved");
    path
}

fn open(dir: &Path, scenario: PathBuf) -> Harness<'static, ShelfwindApp> {
    let options = AppOptions {
        storage_dir: Some(dir.to_path_buf()),
        native_dialogs: false,
        autosave_s: 3600.0,
    };
    let remembered = Remembered {
        cautions_accepted: true,
        ..Remembered::default()
    };
    let mut harness = Harness::builder()
        .with_size([1500.0, 1000.0])
        .build_eframe(move |cc| {
            ShelfwindApp::with_memory(&cc.egui_ctx, Some(scenario), options, remembered)
        });
    harness.run_steps(2);
    wait_for_plan(&mut harness);
    harness
}

/// Goes to the plan's day `n` (0-based) with the day switcher.
fn go_to_day(harness: &mut Harness<'static, ShelfwindApp>, n: usize) {
    for _ in 0..n {
        harness.get_by_label("Next day >").click();
        harness.run_steps(2);
    }
    assert_eq!(harness.state().view.day, n, "the day switcher moved");
}

#[test]
fn the_list_the_map_and_the_plots_show_how_many_runs_agree() {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = scenario_file(dir.path(), vec![fixture("ensemble_10_runs.grib2")]);
    let mut harness = open(dir.path(), path);
    let plan = harness.state().plan.clone().expect("plan");
    assert_eq!(plan.runs.len(), 10);
    harness.get_by_label("Ensemble of 10 runs: odds shown per stretch");
    let day2 = plan
        .days
        .iter()
        .position(|d| d.date.to_string() == "2027-06-02")
        .expect("2 June is planned");
    go_to_day(&mut harness, day2);
    harness.get_by_label_contains("Upwelling in 7 of 10 runs; window in 3 of 10");
    // The map coloured by the chance of upwelling, with its legend.
    harness.get_by_label("Chance of upwelling").click();
    harness.run_steps(2);
    assert_eq!(harness.state().view.colouring, Colouring::UpwellingOdds);
    // The plots of the top stretch carry the runs' band and median.
    harness
        .get_by_label_contains("Upwelling in 7 of 10 runs")
        .click();
    harness.run_steps(3);
    assert!(!harness.state().view.selected.is_empty());
    harness.get_by_label("Expected productivity (%), by day: mean of runs, 10–90 % bar");
}

#[test]
fn each_file_is_one_run_when_ticked_and_undo_takes_it_back() {
    let dir = tempfile::tempdir().expect("temp dir");
    // Three forecasts from "different centres": two blow 12 m/s from the north all of
    // 2 June, the third 2 m/s.
    let files = three_centres(dir.path());
    let path = scenario_file(dir.path(), files);
    let mut harness = open(dir.path(), path);
    harness.get_by_label("Single forecast: no odds");
    harness.get_by_label("File").click();
    harness.run_steps(2);
    harness.get_by_label("Wind files…").click();
    harness.run_steps(4);
    harness.get_by_label("Read as a single forecast: no odds.");
    harness
        .get_by_label("Each file is one run (forecasts from several centres taken together)")
        .click();
    harness.run_steps(2);
    assert!(harness.state().doc.scenario.wind_files_are_runs);
    wait_for_plan(&mut harness);
    let plan = harness.state().plan.clone().expect("plan");
    let labels: Vec<String> = plan
        .runs
        .iter()
        .map(shelfwind::wind::Member::label)
        .collect();
    assert_eq!(labels, ["file 1", "file 2", "file 3"]);
    harness.get_by_label("Ensemble of 3 runs: odds shown per stretch");
    harness.get_by_label("Read as an ensemble of 3 runs: file 1, file 2, file 3.");
    // The button is at the foot of the window, below its visible part: by keyboard.
    harness.get_by_label("Close").focus();
    harness.run_steps(1);
    harness.key_press(egui::Key::Enter);
    harness.run_steps(2);
    assert!(!harness.state().dialogs.show_wind_files);
    go_to_day(&mut harness, 1);
    harness.get_by_label_contains("Upwelling in 2 of 3 runs; window in 1 of 3");
    // One undoable edit: Ctrl+Z takes it back, and the plan is a single forecast again.
    harness.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    harness.run_steps(2);
    assert!(!harness.state().doc.scenario.wind_files_are_runs);
    wait_for_plan(&mut harness);
    assert!(harness.state().plan.as_ref().expect("plan").runs.is_empty());
    harness.get_by_label("Single forecast: no odds");
}
