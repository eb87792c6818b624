//! The sea check driven as a co-op manager uses it, on the demo's invented spring and
//! buoys (`src/sst/demo.rs`): opened from the menu with the files filled in, a bad
//! missing-value code refused, the check run in the background, the segment picked in
//! the table and on the map, the map coloured by hit rate, and a failed run that keeps
//! the last result.
//!
//! What is known of the demo by its construction: the north buoy's sea cools two days
//! after each blow, strongly (the segments north of about 39° N take it); the south
//! buoy's sea answers three days after, weakly and with more noise.

#![cfg(feature = "gui")]

mod common;

use common::{app_harness, type_into, wait_until_within};
use eframe::egui::accesskit::Role;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use shelfwind::app::{Colouring, ShelfwindApp};
use std::time::Duration;

const SST_FIELD: &str =
    "Sea-temperature files (CSV, NMEA 0183, GRIB2 or NetCDF), one path per line, preferred first";
const MISSING_FIELD: &str = "Missing-value codes in CSV files";

fn open_check(harness: &mut Harness<'static, ShelfwindApp>) {
    harness.get_by_label("Seasons").click();
    harness.run_steps(2);
    harness
        .get_by_label("Check against measured sea temperature…")
        .click();
    harness.run_steps(3);
}

fn run_check(harness: &mut Harness<'static, ShelfwindApp>) {
    harness.get_by_label("Run the check").click();
    harness.run_steps(1);
    wait_until_within(harness, "the check", Duration::from_mins(2), |a| {
        a.check.message.is_some() || !a.check.busy()
    });
}

fn hit_rate(app: &ShelfwindApp, segment: &str) -> f64 {
    app.check
        .hit_rates()
        .and_then(|h| h.get(segment))
        .copied()
        .expect("a hit rate")
}

#[test]
fn the_demo_spring_is_checked_segment_by_segment() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    open_check(&mut harness);
    assert_eq!(
        harness.state().check.wind_text,
        "north-reach-spring-wind.csv"
    );
    assert_eq!(
        harness.state().check.sst_text,
        "north-reach-buoy-north.csv\nnorth-reach-buoy-south.csv"
    );
    harness.get_by_label_contains("Filled in with the demo's invented spring");

    // A code that is not a number is named, and nothing runs.
    type_into(&mut harness, Role::TextInput, MISSING_FIELD, "99, x");
    assert_eq!(harness.state().check.missing_text, "99, x");
    harness.get_by_label("Run the check").click();
    harness.run_steps(2);
    harness.get_by_label_contains("\"x\" is not a number");
    assert!(harness.state().check.result.is_none());

    type_into(&mut harness, Role::TextInput, MISSING_FIELD, "99, 999");
    assert_eq!(harness.state().check.missing_text, "99, 999");
    assert_eq!(
        harness
            .get_by_role_and_label(Role::TextInput, MISSING_FIELD)
            .value()
            .unwrap_or_default(),
        "99, 999"
    );
    run_check(&mut harness);
    assert_eq!(harness.state().check.message, None);
    assert!(harness.state().check.result.is_some());
    harness.get_by_label_contains("Whole coast:");

    // The north buoy's segments: best two days after the wind, and a higher hit rate
    // than the south buoy's.
    harness.get_by_label("Rockfish Flats").click();
    harness.run_steps(2);
    assert_eq!(
        harness.state().check.selected.as_deref(),
        Some("rockfish-flats")
    );
    harness.get_by_label_contains("the sea responded best 2 days after the wind");
    harness.get_by_label("Gannet Reach").click();
    harness.run_steps(2);
    harness.get_by_label_contains("the sea responded best 3 days after the wind");
    let (north, south) = (
        hit_rate(harness.state(), "rockfish-flats"),
        hit_rate(harness.state(), "gannet-reach"),
    );
    assert!(north > 0.8 && south < north - 0.2, "{north} {south}");

    harness.get_by_label("Show hit rates on the map").click();
    harness.run_steps(2);
    assert_eq!(harness.state().view.colouring, Colouring::HitRate);
    assert!(
        !harness.state().check.open,
        "the window makes way for the map"
    );
    assert!(harness.state().check.result.is_some(), "the result is kept");
    // Back from the menu, it shows the same result.
    open_check(&mut harness);
    harness.get_by_label_contains("Whole coast:");
}

/// A stretch picked in the ranked list picks its segment in the check; a run that fails
/// says why and keeps the last result.
#[test]
fn the_check_follows_the_map_and_a_failed_run_keeps_the_last_result() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    open_check(&mut harness);
    run_check(&mut harness);
    let before = harness.state().check.result.clone().expect("a result");

    let plan = harness.state().plan.clone().expect("plan");
    let stretch = plan.stretches[plan.days[0].ranked[0].stretch].clone();
    // By its accessible action: the window may lie over the list.
    harness
        .get_by_label(&format!("Stretch {}", stretch.name))
        .click_accesskit();
    harness.run_steps(3);
    assert_eq!(
        harness.state().check.selected.as_deref(),
        Some(stretch.segment_id.as_str())
    );

    let missing = dir.path().join("no-such-buoy.csv");
    type_into(
        &mut harness,
        Role::MultilineTextInput,
        SST_FIELD,
        missing.to_str().expect("utf-8"),
    );
    run_check(&mut harness);
    let message = harness.state().check.message.clone().expect("a message");
    assert!(message.contains("nothing changed"), "{message}");
    assert!(message.contains("no-such-buoy.csv"), "{message}");
    harness.get_by_label_contains("The check did not run; nothing changed.");
    let after = harness.state().check.result.clone().expect("kept");
    assert!(std::sync::Arc::ptr_eq(&before, &after));
}

fn confirmed_on_the_coast(app: &ShelfwindApp) -> usize {
    app.check
        .result
        .as_ref()
        .expect("a result")
        .verification
        .segments
        .iter()
        .map(|s| s.check.hits().1)
        .sum()
}

/// The cooling that confirms an event is set in the model settings (typed, applied as
/// one undoable step); the check then asks for it: a stricter setting confirms fewer
/// events, and the window says which setting it used.
#[test]
fn a_stricter_cooling_set_in_the_settings_confirms_fewer_events() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    open_check(&mut harness);
    let wind = dir.path().join("demo").join("north-reach-spring-wind.csv");
    let wind = wind.to_str().expect("utf-8");
    type_into(
        &mut harness,
        Role::MultilineTextInput,
        "Wind files of the period (GRIB2, NetCDF or CSV), one path per line",
        wind,
    );
    assert_eq!(harness.state().check.wind_text, wind);
    run_check(&mut harness);
    let lenient = confirmed_on_the_coast(harness.state());
    harness.get_by_label_contains("An event is confirmed by 0.5 °C of cooling");

    harness.get_by_label("Edit").click();
    harness.run_steps(2);
    harness.get_by_label("Model settings…").click();
    harness.run_steps(3);
    let row = "Cooling that confirms an event";
    harness.get_by_label(row).scroll_to_me();
    harness.run_steps(2);
    type_into(&mut harness, Role::SpinButton, row, "2");
    let draft = harness
        .state()
        .dialogs
        .settings_draft
        .clone()
        .expect("a draft");
    assert!((draft.sst_check.cooling_c - 2.0).abs() < 1e-12, "{draft:?}");
    harness.get_by_label("Apply").click_accesskit();
    harness.run_steps(3);
    assert!((harness.state().doc.scenario.settings.sst_check.cooling_c - 2.0).abs() < 1e-12);

    harness.get_by_label_contains("An event is confirmed by 2 °C of cooling");
    run_check(&mut harness);
    let strict = confirmed_on_the_coast(harness.state());
    assert!(strict < lenient, "2 °C confirms {strict}, 0.5 °C {lenient}");
    assert!(
        (harness
            .state()
            .check
            .result
            .as_ref()
            .expect("result")
            .verification
            .settings
            .cooling_c
            - 2.0)
            .abs()
            < 1e-12
    );
}
