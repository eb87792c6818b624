//! Calibration driven as a co-op manager uses it, on the demo's invented catch log and
//! spring (`src/scenario/demo_record.rs`: catch rates that follow the blows of 6 to 10
//! days before): opened from the menu with the files filled in, a species filter that
//! keeps nothing refused, the log calibrated, the fit applied as one undoable step, and
//! a missing log that keeps the last result.

#![cfg(feature = "gui")]

mod common;

use common::{app_harness, type_into, wait_until_within};
use eframe::egui;
use eframe::egui::accesskit::Role;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use shelfwind::app::ShelfwindApp;
use std::time::Duration;

const SPECIES: &str = "Species (empty: all)";

fn calibrate(harness: &mut Harness<'static, ShelfwindApp>) {
    harness.get_by_label("Calibrate").click();
    harness.run_steps(1);
    wait_until_within(harness, "the calibration", Duration::from_mins(3), |a| {
        !a.calibrate.busy()
    });
}

#[test]
fn the_demo_log_is_calibrated_and_its_settings_applied_and_undone() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    harness.get_by_label("Seasons").click();
    harness.run_steps(2);
    harness.get_by_label("Calibrate on a catch log…").click();
    harness.run_steps(3);
    assert_eq!(
        harness.state().calibrate.log_text,
        "north-reach-catch-log.csv"
    );
    assert_eq!(
        harness.state().calibrate.wind_text,
        "north-reach-spring-wind.csv"
    );
    harness.get_by_label_contains("Filled in with the demo's invented catch log");

    // A species the log does not have leaves nothing to fit.
    type_into(&mut harness, Role::TextInput, SPECIES, "hake");
    assert_eq!(harness.state().calibrate.species_text, "hake");
    calibrate(&mut harness);
    let message = harness.state().calibrate.message.clone().expect("refused");
    assert!(message.contains("only 0 landings"), "{message}");
    harness.get_by_label_contains("The log was not calibrated; nothing changed.");
    assert!(harness.state().calibrate.result.is_none());

    type_into(&mut harness, Role::TextInput, SPECIES, "rockfish");
    assert_eq!(harness.state().calibrate.species_text, "rockfish");
    calibrate(&mut harness);
    let result = harness
        .state()
        .calibrate
        .result
        .clone()
        .expect("calibrated");
    let fitted = result.calibration.fit.best;
    assert!(result.calibration.fit.supported());
    harness.get_by_label_contains("The log supports a change");
    harness.get_by_label_contains("cross-validated over 4 months");

    harness.get_by_label("Use these settings").click();
    harness.run_steps(3);
    let settings = &harness.state().doc.scenario.settings;
    assert!((settings.response.lag_peak_days - fitted.lag_peak_days).abs() < 1e-12);
    assert!((settings.response.optimum_m3s_per_100m - fitted.optimum_m3s_per_100m).abs() < 1e-12);
    let record = settings.calibration.clone().expect("a record of the log");
    assert_eq!(record.log, "north-reach-catch-log.csv");
    assert_eq!(record.species.as_deref(), Some("rockfish"));
    harness.get_by_label_contains(
        "The scenario's settings were calibrated on north-reach-catch-log.csv",
    );

    harness.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    harness.run_steps(3);
    let settings = &harness.state().doc.scenario.settings;
    assert!(
        (settings.response.lag_peak_days - 5.0).abs() < 1e-12,
        "undone"
    );
    assert!(settings.calibration.is_none());

    // A log that is not there: the message names it, and the last result stays.
    type_into(
        &mut harness,
        Role::TextInput,
        "Catch log (CSV)",
        "no-such-log.csv",
    );
    assert_eq!(harness.state().calibrate.log_text, "no-such-log.csv");
    calibrate(&mut harness);
    let message = harness.state().calibrate.message.clone().expect("refused");
    assert!(message.contains("no-such-log.csv"), "{message}");
    let kept = harness.state().calibrate.result.clone().expect("kept");
    assert!(std::sync::Arc::ptr_eq(&result, &kept));
}
