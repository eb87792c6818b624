//! The desktop app driven through egui_kittest: widgets found by their labels and roles,
//! clicked and typed into, and the app's state checked after.

#![cfg(feature = "gui")]

mod common;

use common::{app_harness, wait_for_plan, wait_until_within};
use eframe::egui;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use shelfwind::app::ShelfwindApp;
use std::fmt::Write as _;
use std::path::PathBuf;
use std::time::{Duration, Instant};

/// Steps the app until `done` holds (background work ends between frames).
fn wait_until(
    harness: &mut Harness<'static, ShelfwindApp>,
    what: &str,
    done: impl Fn(&ShelfwindApp) -> bool,
) {
    wait_until_within(harness, what, Duration::from_mins(2), done);
}

/// Types into the path field of the file dialog in place of what it suggests (focus,
/// select all, then the text).
fn type_path(harness: &mut Harness<'static, ShelfwindApp>, text: &str) {
    common::type_into(harness, egui::accesskit::Role::TextInput, "File path", text);
}

fn fixture(rel: &str) -> String {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures")
        .join(rel)
        .display()
        .to_string()
}

#[test]
fn starts_on_the_demo_with_a_ranked_list_and_the_cautions() {
    let dir = tempfile::tempdir().expect("temp dir");
    let harness = app_harness(dir.path());
    let app = harness.state();
    let plan = app.plan.as_ref().expect("plan");
    assert!(!plan.days[0].ranked.is_empty());
    assert_eq!(plan.scenario_name, "North Reach Fishers' Co-op (demo)");
    // The ranked list shows its first stretch by name, and the cautions stay reachable.
    let first = &plan.stretches[plan.days[0].ranked[0].stretch].name;
    harness.get_by_label(&format!("Stretch {first}"));
    harness.get_by_label_contains("not a navigation aid");
    // When the forecast was issued, with the year (the demo's synthetic forecast is
    // dated May 2027, src/wind/demo.rs); its age follows, which moves with the clock.
    harness.get_by_label_contains("Forecast issued Mon 10 May 2027 00:00 local (07:00 UTC), ");
}

/// How the plan was made folds away above the list and opens on a click, with the ways
/// by sea and the waves' source; the issue time stays in sight.
#[test]
fn the_plans_notes_fold_away_and_open() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let routes = "Distances are by sea from Tern Harbour";
    assert_eq!(harness.query_all_by_label_contains(routes).count(), 0);
    harness.get_by_label("How this plan was made").click();
    harness.run_steps(3);
    harness.get_by_label_contains(routes);
    harness.get_by_label_contains("Waves at 28 stretches: from a wave forecast.");
    harness.get_by_label_contains("Forecast issued Mon 10 May 2027");
}

#[test]
fn selecting_a_ranked_stretch_shows_its_plots() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let plan = harness.state().plan.clone().expect("plan");
    let second = plan.stretches[plan.days[0].ranked[1].stretch].clone();
    harness
        .get_by_label(&format!("Stretch {}", second.name))
        .click();
    harness.run_steps(3);
    assert_eq!(harness.state().view.selected, vec![second.id.clone()]);
    harness.get_by_label(&format!("Plots: {}", second.name));
}

#[test]
fn drawing_a_segment_by_clicks_then_undo_and_redo() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let before = harness.state().doc.scenario.segments.len();
    harness.get_by_label("Draw segment").click();
    harness.run_steps(2);
    let map = harness.get_by_label("Map").rect();
    for (fx, fy) in [(0.3, 0.3), (0.35, 0.5), (0.4, 0.7)] {
        let pos = egui::pos2(map.left() + map.width() * fx, map.top() + map.height() * fy);
        harness.hover_at(pos);
        harness.run_steps(1);
        for pressed in [true, false] {
            harness.event(egui::Event::PointerButton {
                pos,
                button: egui::PointerButton::Primary,
                pressed,
                modifiers: egui::Modifiers::NONE,
            });
            harness.run_steps(1);
        }
        harness.run_steps(2);
    }
    harness.get_by_label("Finish segment").click();
    harness.run_steps(3);
    let after = &harness.state().doc.scenario.segments;
    assert_eq!(after.len(), before + 1);
    assert_eq!(after.last().expect("new").points.len(), 3);
    assert!(harness.state().doc.dirty);
    harness.get_by_label("Undo").click();
    harness.run_steps(3);
    assert_eq!(harness.state().doc.scenario.segments.len(), before);
    harness.get_by_label("Redo").click();
    harness.run_steps(3);
    assert_eq!(harness.state().doc.scenario.segments.len(), before + 1);
}

#[test]
fn a_damaged_wind_file_shows_the_error_and_keeps_the_forecast() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let wind_before = harness.state().doc.scenario.wind_files.clone();
    let ranked_before = harness.state().plan.as_ref().expect("plan").days[0]
        .ranked
        .len();
    harness.state_mut().send(shelfwind::app::Command::AskFile(
        shelfwind::app::FileAction::ImportWind,
    ));
    harness.run_steps(3);
    type_path(&mut harness, &fixture("grib2/truncated.grib2"));
    harness.get_by_label("Open").click();
    harness.run_steps(2);
    wait_for_plan(&mut harness);
    harness.get_by_label_contains("The wind file was not added; the forecast is as it was.");
    harness.get_by_label_contains("message 1: cut short");
    assert_eq!(harness.state().doc.scenario.wind_files, wind_before);
    assert_eq!(
        harness.state().plan.as_ref().expect("plan kept").days[0]
            .ranked
            .len(),
        ranked_before
    );
    harness.get_by_label("OK").click();
    harness.run_steps(2);
    assert!(harness.state().dialogs.messages.is_empty());
}

/// An export to a folder that does not exist says so, naming the user's file and no
/// temporary one; the next export of the same kind replaces the message.
#[test]
fn a_failed_export_names_the_users_file_and_is_replaced_by_the_next() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let bad = dir.path().join("no-such-folder").join("plan.csv");
    let export = |harness: &mut Harness<'static, ShelfwindApp>, path: &std::path::Path| {
        harness.state_mut().send(shelfwind::app::Command::AskFile(
            shelfwind::app::FileAction::ExportPlanCsv,
        ));
        harness.run_steps(3);
        type_path(harness, path.to_str().expect("utf-8"));
        harness.get_by_label("Save here").click();
        harness.run_steps(1);
        wait_until(harness, "the export", |a| !a.is_busy());
    };
    export(&mut harness, &bad);
    let text = harness
        .state()
        .error_about(shelfwind::app::Subject::Export)
        .expect("an error")
        .to_string();
    assert!(text.contains(&bad.display().to_string()), "{text}");
    assert!(text.contains("the folder does not exist"), "{text}");
    assert!(!text.contains(".shelfwind-"), "{text}");
    harness.get_by_label(&text);
    let good = dir.path().join("plan.csv");
    export(&mut harness, &good);
    assert!(good.exists());
    let messages = &harness.state().dialogs.messages;
    assert_eq!(messages.len(), 1, "{messages:?}");
    assert_eq!(messages[0].text, format!("Written to {}", good.display()));
}

#[test]
fn moving_the_time_slider_changes_the_shown_index() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    // The line under the time bar, as the app must show it for the selected stretch.
    let expected = |h: &Harness<'static, ShelfwindApp>| {
        let app = h.state();
        let plan = app.plan.as_ref().expect("plan");
        let s = plan
            .stretches
            .iter()
            .find(|s| s.id == app.view.selected[0])
            .expect("selected");
        let t = app.view.timeline[app.view.hour];
        let hour = s
            .hours
            .iter()
            .find(|x| x.time == t)
            .expect("wind at that hour");
        format!(
            "{} now: upwelling index {:.0} m³/s per 100 m",
            s.name, hour.index_m3s_per_100m
        )
    };
    let before = expected(&harness);
    harness.get_by_label_contains(&before);
    let hour = harness.state().view.hour;
    harness
        .get_by_label("Forecast time")
        .set_value_accesskit((hour + 60) as f64);
    harness.run_steps(3);
    assert_eq!(harness.state().view.hour, hour + 60);
    let after = expected(&harness);
    assert_ne!(after, before, "the index differs 60 hours later");
    harness.get_by_label_contains(&after);
    assert!(harness.query_by_label_contains(&before).is_none());
    // The arrow keys step one hour.
    harness.key_press(egui::Key::ArrowRight);
    harness.run_steps(2);
    assert_eq!(harness.state().view.hour, hour + 61);
}

#[test]
fn save_then_reopen_gives_the_same_scenario() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let path = dir.path().join("coop.shelfwind.json");
    harness.state_mut().send(shelfwind::app::Command::AskFile(
        shelfwind::app::FileAction::SaveScenarioAs,
    ));
    harness.run_steps(3);
    type_path(&mut harness, path.to_str().expect("utf-8"));
    harness.get_by_label("Save here").click();
    harness.run_steps(1);
    wait_until(&mut harness, "saved", |a| !a.is_busy());
    assert!(!harness.state().doc.dirty);
    let saved = harness.state().doc.scenario.clone();
    harness.state_mut().send(shelfwind::app::Command::OpenDemo);
    harness.run_steps(1);
    wait_until(&mut harness, "the demo", |a| !a.is_busy());
    assert_eq!(harness.state().doc.path, None);
    harness.state_mut().send(shelfwind::app::Command::File(
        shelfwind::app::FileAction::OpenScenario,
        path.clone(),
    ));
    harness.run_steps(1);
    wait_until(&mut harness, "the saved scenario", |a| a.doc.path.is_some());
    assert_eq!(harness.state().doc.path.as_deref(), Some(path.as_path()));
    assert_eq!(harness.state().doc.scenario, saved);
    wait_for_plan(&mut harness);
    assert!(
        harness.state().plan.is_some(),
        "the saved scenario finds its forecast"
    );
}

/// The season view: a station record typed in, analysed in the background, shown in
/// the metrics table, and the table exported as CSV.
#[test]
fn season_view_analyses_a_record_and_exports_the_table() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    // Two years of hourly northerlies at 10 m/s (no position: covers every segment).
    let csv = dir.path().join("record.csv");
    let mut text = String::from("time,speed_ms,direction_from_deg\n");
    let t0 = chrono::DateTime::parse_from_rfc3339("2025-01-01T00:00:00Z")
        .expect("time")
        .to_utc();
    for h in 0..(2 * 365 * 24) {
        let t = t0 + chrono::Duration::hours(h);
        text.push_str(&(t.format("%Y-%m-%dT%H:%M:%SZ").to_string() + ",10,0\n"));
    }
    std::fs::write(&csv, text).expect("write");
    harness.get_by_label("Seasons").click();
    harness.run_steps(2);
    harness
        .get_by_label("Compare seasons of historical wind…")
        .click();
    harness.run_steps(3);
    let field = harness.get_by_role_and_label(
        egui::accesskit::Role::MultilineTextInput,
        "Wind record files (GRIB2, NetCDF or CSV), one path per line",
    );
    field.focus();
    harness.run_steps(2);
    harness
        .get_by_role_and_label(
            egui::accesskit::Role::MultilineTextInput,
            "Wind record files (GRIB2, NetCDF or CSV), one path per line",
        )
        .type_text(csv.to_str().expect("utf-8"));
    harness.run_steps(2);
    harness.get_by_label("Analyse the record").click();
    let start = Instant::now();
    while harness.state().season.result.is_none() {
        harness.step();
        assert!(
            start.elapsed() < Duration::from_mins(3),
            "no seasons: {:?}",
            harness.state().season.record_message
        );
        std::thread::sleep(Duration::from_millis(20));
    }
    harness.run_steps(3);
    let result = harness.state().season.result.clone().expect("result");
    assert_eq!(result.len(), 12, "every demo segment");
    assert_eq!(result[0].years.len(), 2);
    assert!(result[0].years.iter().all(|y| y.complete));
    harness.get_by_label("Season metrics (Bograd et al. 2009); click a heading to sort");
    let out = dir.path().join("seasons.csv");
    // The export row is at the foot of the window: bring it into view first.
    harness.get_by_label("Table (CSV)").scroll_to_me();
    harness.run_steps(3);
    let export = harness.get_by_role_and_label(egui::accesskit::Role::TextInput, "Export to");
    export.focus();
    harness.run_steps(2);
    harness
        .get_by_role_and_label(egui::accesskit::Role::TextInput, "Export to")
        .type_text(out.to_str().expect("utf-8"));
    harness.run_steps(2);
    assert_eq!(
        harness.state().season.export_path,
        out.to_str().expect("utf-8")
    );
    harness.get_by_label("Table (CSV)").click_accesskit();
    wait_until(&mut harness, "the table written", |a| {
        a.season.message.is_some()
    });
    let written = std::fs::read_to_string(&out).expect("exported");
    assert_eq!(
        written.lines().count(),
        1 + 12 * 3,
        "two seasons and a climatology row per segment"
    );
}

/// Replaces the text of a labelled single-line field: focus, select all, type, Enter.
fn retype(harness: &mut Harness<'static, ShelfwindApp>, label: &str, text: &str) {
    harness
        .get_by_role_and_label(egui::accesskit::Role::TextInput, label)
        .focus();
    harness.run_steps(2);
    harness.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::A);
    harness.run_steps(1);
    harness
        .get_by_role_and_label(egui::accesskit::Role::TextInput, label)
        .type_text(text);
    harness.run_steps(2);
    harness.key_press(egui::Key::Enter);
    harness.run_steps(2);
}

fn field_value(
    harness: &Harness<'static, ShelfwindApp>,
    role: egui::accesskit::Role,
    label: &str,
) -> String {
    harness
        .get_by_role_and_label(role, label)
        .value()
        .unwrap_or_default()
}

/// Typing into every field of the segment editor keeps what was typed: in the
/// document after two frames, in the field on screen, and in the ranked list after the
/// re-rank; undo brings the old name back into the field.
#[test]
fn typing_in_the_segment_editor_keeps_the_text() {
    use egui::accesskit::Role;
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let seg = |a: &ShelfwindApp, id: &str| {
        a.doc
            .scenario
            .segments
            .iter()
            .find(|s| s.id == id)
            .cloned()
            .expect("segment")
    };
    let id = harness.state().doc.scenario.segments[0].id.clone();
    let old_name = seg(harness.state(), &id).name;
    let old_notes = seg(harness.state(), &id).notes;
    harness
        .state_mut()
        .send(shelfwind::app::Command::EditSegment(Some(id.clone())));
    harness.run_steps(3);
    assert_eq!(
        field_value(&harness, Role::TextInput, "Segment name"),
        old_name
    );
    retype(&mut harness, "Segment name", "Gannet Reach");
    assert_eq!(seg(harness.state(), &id).name, "Gannet Reach");
    assert_eq!(
        field_value(&harness, Role::TextInput, "Segment name"),
        "Gannet Reach"
    );
    // Notes: multi-line; focus moves away with a click on the name field.
    harness
        .get_by_role_and_label(Role::MultilineTextInput, "Notes")
        .focus();
    harness.run_steps(2);
    harness
        .get_by_role_and_label(Role::MultilineTextInput, "Notes")
        .type_text("kelp edge, mind the pots");
    harness.run_steps(2);
    harness
        .get_by_role_and_label(Role::TextInput, "Segment name")
        .focus();
    harness.run_steps(2);
    assert_eq!(
        seg(harness.state(), &id).notes,
        format!("{old_notes}kelp edge, mind the pots")
    );
    // A seasonal closure with its reason and dates.
    harness.get_by_label("Closed to fishing").click();
    harness.run_steps(3);
    retype(&mut harness, "Reason for the closure", "spawning season");
    retype(&mut harness, "Closed from", "2027-05-01");
    retype(&mut harness, "to", "2027-06-30");
    let c = seg(harness.state(), &id).closure.expect("closed");
    assert_eq!(c.reason, "spawning season");
    assert_eq!(c.from.map(|d| d.to_string()).as_deref(), Some("2027-05-01"));
    assert_eq!(c.to.map(|d| d.to_string()).as_deref(), Some("2027-06-30"));
    // A bad date is refused next to the field, and the closure keeps its dates.
    retype(&mut harness, "to", "30/06/2027");
    harness.get_by_label("\"30/06/2027\" is not a date: expected YYYY-MM-DD, e.g. 2027-05-31");
    let c = seg(harness.state(), &id).closure.expect("closed");
    assert_eq!(c.to.map(|d| d.to_string()).as_deref(), Some("2027-06-30"));
    // The new name reaches the plan; undo goes back one edit at a time (to, from,
    // reason, closed, notes, name) and the fields follow.
    wait_for_plan(&mut harness);
    let plan = harness.state().plan.clone().expect("plan");
    assert!(
        plan.stretches
            .iter()
            .any(|s| s.name.starts_with("Gannet Reach"))
    );
    let undo = |harness: &mut Harness<'static, ShelfwindApp>, n: usize| {
        for _ in 0..n {
            harness.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
            harness.run_steps(2);
        }
    };
    undo(&mut harness, 4);
    assert_eq!(seg(harness.state(), &id).closure, None);
    assert_eq!(seg(harness.state(), &id).name, "Gannet Reach");
    undo(&mut harness, 2);
    assert_eq!(seg(harness.state(), &id).notes, old_notes);
    assert_eq!(seg(harness.state(), &id).name, old_name);
    assert_eq!(
        field_value(&harness, Role::TextInput, "Segment name"),
        old_name
    );
}

/// Types the boat's optional wave and steepness limits, checks they are kept, then
/// empties both and checks they are gone.
fn optional_limits_are_kept_and_cleared(harness: &mut Harness<'static, ShelfwindApp>) {
    use egui::accesskit::Role;
    // The optional limits: a number is kept, an empty field means none.
    retype(harness, "Wave limit", "1.8");
    retype(harness, "Steepness limit", "0.05");
    {
        let boat = harness
            .state()
            .doc
            .scenario
            .vessels
            .last()
            .cloned()
            .expect("boat");
        assert_eq!(
            (boat.wave_limit_m, boat.steepness_limit_m_s2),
            (Some(1.8), Some(0.05))
        );
    }
    assert_eq!(
        field_value(harness, Role::TextInput, "Steepness limit"),
        "0.05"
    );
    // Emptied: select all, delete, Enter.
    for label in ["Steepness limit", "Wave limit"] {
        harness
            .get_by_role_and_label(Role::TextInput, label)
            .focus();
        harness.run_steps(2);
        harness.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::A);
        harness.run_steps(1);
        harness.key_press(egui::Key::Backspace);
        harness.run_steps(2);
        harness.key_press(egui::Key::Enter);
        harness.run_steps(2);
    }
    assert_eq!(
        harness
            .state()
            .doc
            .scenario
            .vessels
            .last()
            .expect("boat")
            .steepness_limit_m_s2,
        None
    );
    assert_eq!(
        harness
            .state()
            .doc
            .scenario
            .vessels
            .last()
            .expect("boat")
            .wave_limit_m,
        None
    );
}

/// A skipper sets up their own boat: added, named and given limits (wind, range, speed,
/// and the optional wave and steepness limits) by typing; a bad number is refused beside
/// its field; the plan is made for the new boat at once, and its higher wind limit works
/// Thursday's blow that keeps the small boat in.
#[test]
fn a_skipper_adds_their_own_boat_and_the_ranking_follows() {
    use egui::accesskit::Role;
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let thursday_before = harness.state().plan.as_ref().expect("plan").days[3]
        .ranked
        .len();
    assert_eq!(thursday_before, 0, "the small boat stays in on Thursday");
    harness.get_by_label("Boats and ports…").click();
    // A new window lays itself out unseen in its first frame.
    harness.run_steps(4);
    assert!(harness.state().view.boats.open, "the window opens");
    harness.get_by_label("Add a boat").click();
    harness.run_steps(2);
    retype(&mut harness, "Boat name", "Sea Swallow");
    retype(&mut harness, "Wind limit", "32");
    retype(&mut harness, "Range (one way)", "40");
    retype(&mut harness, "Cruising speed", "fast");
    harness.get_by_label("\"fast\" is not a number: expected a number from 1 to 60 kt");
    optional_limits_are_kept_and_cleared(&mut harness);
    assert_eq!(
        field_value(&harness, Role::TextInput, "Cruising speed"),
        "fast"
    );
    let boat = harness
        .state()
        .doc
        .scenario
        .vessels
        .last()
        .cloned()
        .expect("boat");
    assert_eq!(
        (
            boat.name.as_str(),
            boat.wind_limit_kt,
            boat.range_nm,
            boat.cruise_speed_kt
        ),
        ("Sea Swallow", 32.0, 40.0, 15.0)
    );
    wait_for_plan(&mut harness);
    let plan = harness.state().plan.clone().expect("plan");
    assert_eq!(plan.vessel.name, "Sea Swallow");
    assert!(
        !plan.days[3].ranked.is_empty(),
        "32 kt works some of the blow"
    );
    // The port: added, then its position typed.
    harness.get_by_label("Add a port").click();
    harness.run_steps(2);
    retype(&mut harness, "Port name", "Gull Steps");
    retype(&mut harness, "Latitude", "38.3");
    retype(&mut harness, "Longitude", "-123.05");
    let port = harness
        .state()
        .doc
        .scenario
        .ports
        .last()
        .cloned()
        .expect("port");
    assert_eq!(port.name, "Gull Steps");
    assert!((port.position.lat_deg - 38.3).abs() < 1e-12);
    assert!((port.position.lon_deg + 123.05).abs() < 1e-12);
    // Or placed by a click on the map: the port moves to where the click was, and the
    // position fields follow.
    harness
        .get_by_label("Place it on the map")
        .click_accesskit();
    harness.run_steps(2);
    assert!(matches!(
        harness.state().view.tool,
        shelfwind::app::Tool::PlacePort(3)
    ));
    let map = harness.get_by_label("Map").rect();
    let at = map.center() + egui::vec2(map.width() * 0.3, 20.0);
    harness.hover_at(at);
    harness.run_steps(1);
    for pressed in [true, false] {
        harness.event(egui::Event::PointerButton {
            pos: at,
            button: egui::PointerButton::Primary,
            pressed,
            modifiers: egui::Modifiers::NONE,
        });
        harness.run_steps(1);
    }
    harness.run_steps(2);
    let moved = harness
        .state()
        .doc
        .scenario
        .ports
        .last()
        .cloned()
        .expect("port");
    assert!(
        (moved.position.lat_deg - 38.3).abs() > 1e-3
            || (moved.position.lon_deg + 123.05).abs() > 1e-3,
        "{moved:?}"
    );
    let shown = field_value(&harness, Role::TextInput, "Latitude");
    let shown: f64 = shown.parse().expect("a number");
    assert!((shown - moved.position.lat_deg).abs() < 1e-3, "{shown}");
}

/// Redo answers both of its shortcuts, and neither undoes.
#[test]
fn redo_answers_ctrl_shift_z_and_ctrl_y() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let id = harness.state().doc.scenario.segments[0].id.clone();
    let name = |a: &ShelfwindApp| {
        a.doc
            .scenario
            .segments
            .iter()
            .find(|s| s.id == id)
            .map(|s| s.name.clone())
            .unwrap_or_default()
    };
    let old = name(harness.state());
    harness
        .state_mut()
        .send(shelfwind::app::Command::EditSegment(Some(id.clone())));
    harness.run_steps(3);
    retype(&mut harness, "Segment name", "Gannet Reach");
    // Click away from the field so the keys reach the app.
    harness.get_by_label("Where to go").click();
    harness.run_steps(2);
    for redo in [
        egui::Modifiers::COMMAND | egui::Modifiers::SHIFT,
        egui::Modifiers::COMMAND,
    ] {
        harness.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
        harness.run_steps(2);
        assert_eq!(name(harness.state()), old);
        let key = if redo.shift {
            egui::Key::Z
        } else {
            egui::Key::Y
        };
        harness.key_press_modifiers(redo, key);
        harness.run_steps(2);
        assert_eq!(name(harness.state()), "Gannet Reach", "{redo:?}");
    }
}

/// A station file is added beside the demo's grid: both are listed, and the grid still
/// gives the wind to the segments the station does not cover.
#[test]
fn a_station_file_is_added_beside_the_grid() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    // The demo's wind grid and its wave forecast.
    let grid = harness.state().doc.scenario.wind_files.clone();
    assert_eq!(grid.len(), 2);
    // A station near the north end of the demo coast, with a second station far off
    // so the north one covers only the segments nearest to it.
    let write = |name: &str, lat: f64, lon: f64| {
        let path = dir.path().join(name);
        let mut text = String::from("time,lat,lon,speed_kt,direction_from_deg\n");
        let t0 = chrono::DateTime::parse_from_rfc3339("2027-05-03T00:00:00Z")
            .expect("time")
            .to_utc();
        for h in 0..(14 * 24) {
            let t = t0 + chrono::Duration::hours(h);
            let _ = writeln!(
                text,
                "{},{lat},{lon},12,330",
                t.format("%Y-%m-%dT%H:%M:%SZ")
            );
        }
        std::fs::write(&path, text).expect("write");
        path
    };
    let north = write("north-buoy.csv", 38.9, -123.7);
    harness.state_mut().send(shelfwind::app::Command::File(
        shelfwind::app::FileAction::ImportWind,
        north.clone(),
    ));
    harness.run_steps(2);
    wait_for_plan(&mut harness);
    let files = harness.state().doc.scenario.wind_files.clone();
    assert_eq!(files.len(), 3, "{files:?}");
    assert_eq!(files[..2], grid[..]);
    assert_eq!(files[2], north);
    // The grid comes first, so it still gives the wind where it covers the coast.
    harness
        .state_mut()
        .send(shelfwind::app::Command::ShowWindFiles);
    harness.run_steps(3);
    harness.get_by_label(&format!("1. {}", grid[0].display()));
    harness.get_by_label(&format!("3. {}", north.display()));
    // The station gives no wind; the demo's wave forecast is named as such, not as a
    // file that gives no wind.
    assert_eq!(harness.get_all_by_label("wind for no segment").count(), 1);
    let waves_line =
        "a wave forecast: read for the sea state on the way and at the stretches, not for wind";
    harness.get_by_label(waves_line);
    let plan = harness.state().plan.clone().expect("plan");
    assert!(plan.stretches.iter().all(|s| s.wind_source == Some(0)));
    // Put the station first: as the only station it is the nearest to every segment,
    // so every stretch takes its wind, and the grid gives none.
    for k in [2, 1] {
        harness
            .get_all_by_label("Move up")
            .nth(k)
            .expect("a file")
            .click();
        harness.run_steps(2);
        wait_for_plan(&mut harness);
        harness.run_steps(2);
    }
    assert_eq!(harness.state().doc.scenario.wind_files[0], north);
    let plan = harness.state().plan.clone().expect("plan");
    assert!(plan.stretches.iter().all(|s| s.wind_source == Some(0)));
    assert_eq!(harness.get_all_by_label("wind for no segment").count(), 1);
    harness.get_by_label(waves_line);
}

/// Ctrl-click and Shift-click on the ranked list add to the selection; the side-by-side
/// table then shows the stretches' numbers beside their plots.
/// The names of the first `n` ranked stretches on the day shown.
fn ranked_names(harness: &Harness<'static, ShelfwindApp>, n: usize) -> Vec<String> {
    let plan = harness.state().plan.as_ref().expect("plan");
    plan.days[harness.state().view.day]
        .ranked
        .iter()
        .take(n)
        .map(|r| plan.stretches[r.stretch].name.clone())
        .collect()
}

#[test]
fn ctrl_and_shift_click_compare_stretches_side_by_side() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let names = ranked_names(&harness, 3);
    let plan = harness.state().plan.clone().expect("plan");
    let day = harness.state().view.day;
    harness
        .get_by_label(&format!("Stretch {}", names[0]))
        .click();
    harness.run_steps(2);
    assert_eq!(harness.state().view.selected.len(), 1);
    harness
        .get_by_label(&format!("Stretch {}", names[1]))
        .click_modifiers(egui::Modifiers::COMMAND);
    harness.run_steps(2);
    harness
        .get_by_label(&format!("Stretch {}", names[2]))
        .click_modifiers(egui::Modifiers::SHIFT);
    harness.run_steps(2);
    assert_eq!(harness.state().view.selected.len(), 3);
    harness.get_by_label("Side by side, on the chosen day");
    // Each chosen stretch heads a column, with its score as the list shows it.
    for (k, name) in names.iter().enumerate() {
        assert!(harness.get_all_by_label(name).count() >= 1, "{name}");
        let score = format!("{:.0}", plan.days[day].ranked[k].score);
        assert!(harness.get_all_by_label(&score).count() >= 1, "{score}");
    }
}

/// The units a skipper reads by: chosen in Edit > Units, used by the reasons at once,
/// and remembered.
#[test]
fn units_chosen_in_the_menu_reach_the_reasons() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    assert!(harness.query_all_by_label_contains("kt limit").count() > 0);
    for choice in ["m/s", "kilometres, km/h"] {
        harness.get_by_label("Edit").click();
        harness.run_steps(2);
        harness.get_by_label("Units").hover();
        harness.run_steps(3);
        harness.get_by_label(choice).click();
        harness.run_steps(3);
    }
    assert_eq!(
        harness.state().view.units.wind,
        shelfwind::export::units::WindUnit::MetresPerSecond
    );
    harness.key_press(egui::Key::Escape);
    harness.run_steps(3);
    assert!(harness.query_all_by_label_contains("m/s limit").count() > 0);
    assert!(harness.query_all_by_label_contains(" km from ").count() > 0);
    assert_eq!(harness.query_all_by_label_contains("kt limit").count(), 0);
}

/// The guide and the data sources are one click away in Help.
#[test]
fn the_guide_explains_the_colours_and_the_shortcuts() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    harness.get_by_label("Help").click();
    harness.run_steps(2);
    harness.get_by_label("Guide").click();
    harness.run_steps(4);
    harness.get_by_label_contains("Ctrl+Shift+Z or Ctrl+Y redo");
    harness.get_by_label_contains("blue is upwelling");
    harness.get_by_label("Help").click();
    harness.run_steps(2);
    harness.get_by_label("Data and licences").click();
    harness.run_steps(4);
    harness.get_by_label_contains("Natural Earth");
}

/// Export for the chart plotter: the stretches selected (Ctrl-click) as GPX waypoints,
/// with a route from the home port to each.
#[test]
fn the_selected_stretches_go_to_the_plotter_as_gpx() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let names = ranked_names(&harness, 2);
    harness
        .get_by_label(&format!("Stretch {}", names[0]))
        .click();
    harness.run_steps(2);
    harness
        .get_by_label(&format!("Stretch {}", names[1]))
        .click_modifiers(egui::Modifiers::COMMAND);
    harness.run_steps(2);
    harness.get_by_label("File").click();
    harness.run_steps(2);
    harness
        .get_by_label("Export GPX: the selected stretches…")
        .click();
    harness.run_steps(4);
    let out = dir.path().join("plotter.gpx");
    type_path(&mut harness, out.to_str().expect("utf-8"));
    harness.get_by_label("Save here").click();
    harness.run_steps(1);
    wait_until(&mut harness, "the GPX written", |a| !a.is_busy());
    let gpx = gpx::read(std::io::BufReader::new(
        std::fs::File::open(&out).expect("written"),
    ))
    .expect("reads as GPX");
    let waypoints: Vec<String> = gpx
        .waypoints
        .iter()
        .filter_map(|w| w.name.clone())
        .collect();
    assert_eq!(waypoints, names);
    assert_eq!(gpx.routes.len(), 2);
    assert_eq!(
        gpx.routes[0].points[0].name.as_deref(),
        Some("Tern Harbour")
    );
}

/// Adding a NetCDF wind file: the file is kept, and the wind files window opens on what
/// the file holds (the same text as `shelfwind inspect`), on screen.
#[test]
fn an_added_netcdf_file_is_described_in_the_wind_files_window() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let path = PathBuf::from(fixture("netcdf/wind_nc4_packed.nc"));
    harness.state_mut().send(shelfwind::app::Command::File(
        shelfwind::app::FileAction::ImportWind,
        path.clone(),
    ));
    harness.run_steps(2);
    wait_for_plan(&mut harness);
    harness.run_steps(3);
    assert_eq!(
        harness.state().doc.scenario.wind_files.last(),
        Some(&path),
        "the file is kept"
    );
    harness.get_by_label_contains("Wind file added:");
    // Every file of the list is described; the one just added is open.
    let files = harness.state().doc.scenario.wind_files.len();
    assert_eq!(
        harness.get_all_by_label("What the file holds").count(),
        files
    );
    harness.get_by_label("Format: NetCDF-4 (HDF5)");
    harness.get_by_label(
        "Uses: 10 m wind: u = eastward_wind_10m, v = northward_wind_10m (units \"m/s\", converted to m/s)",
    );
    let expected = shelfwind::wind::inspect_file(&path)
        .expect("readable")
        .to_text();
    assert_eq!(harness.state().file_summaries.get(&path), Some(&expected));
}

/// A NetCDF file without wind is refused; the message says what the file holds.
#[test]
fn a_netcdf_file_without_wind_is_refused_with_its_contents() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let before = harness.state().doc.scenario.wind_files.clone();
    harness.state_mut().send(shelfwind::app::Command::File(
        shelfwind::app::FileAction::ImportWind,
        PathBuf::from(fixture("netcdf/no_wind.nc")),
    ));
    harness.run_steps(2);
    wait_for_plan(&mut harness);
    harness.run_steps(2);
    harness.get_by_label_contains("The wind file was not added; the forecast is as it was.");
    harness
        .get_by_label_contains("the file has: sst (time, lat, lon; sea_surface_temperature; degC)");
    harness.get_by_label_contains("What the file holds:\nFormat: NetCDF");
    assert_eq!(harness.state().doc.scenario.wind_files, before);
}

/// A coast pack for the scenario: chosen from the File menu by typing its path, read in
/// the background and said to be in use; kept in the scenario; the bundled land again
/// from the File menu, and back with Undo.
#[test]
fn a_coast_pack_is_used_and_dropped_from_the_file_menu() {
    use shelfwind::coast::{PackBox, cut_pack, read_land_file};
    let dir = tempfile::tempdir().expect("temp dir");
    // A pack cut from the real GSHHG extract (tests/fixtures/coast_packs/README.md).
    let source = read_land_file(
        &std::fs::read(fixture("coast_packs/point-reyes-gshhg-f.b")).expect("fixture"),
    )
    .expect("GSHHG extract");
    let bbox = PackBox::new(-123.10, 37.65, -122.75, 38.35).expect("box");
    let pack_path = dir.path().join("reyes.swpack");
    std::fs::write(
        &pack_path,
        cut_pack(&source.rings, bbox, "GSHHG").0.to_bytes(),
    )
    .expect("write pack");
    let mut harness = app_harness(dir.path());
    harness.get_by_label("File").click();
    harness.run_steps(2);
    harness.get_by_label("Use a coast pack…").click();
    harness.run_steps(3);
    type_path(&mut harness, pack_path.to_str().expect("utf-8"));
    harness.get_by_label("Open").click();
    harness.run_steps(2);
    let said = format!("Coast pack in use: {}", pack_path.display());
    wait_until_within(
        &mut harness,
        "the coast pack read",
        Duration::from_mins(2),
        |app| app.dialogs.messages.iter().any(|m| m.text == said),
    );
    wait_for_plan(&mut harness);
    harness.get_by_label_contains(&said);
    assert_eq!(
        harness.state().doc.scenario.coast_pack,
        Some(pack_path.clone())
    );
    harness.get_by_label("File").click();
    harness.run_steps(2);
    harness.get_by_label("Use the bundled land only").click();
    harness.run_steps(3);
    assert_eq!(harness.state().doc.scenario.coast_pack, None);
    harness.get_by_label("Undo").click();
    harness.run_steps(3);
    assert_eq!(harness.state().doc.scenario.coast_pack, Some(pack_path));
}

/// Closing with unsaved changes and choosing Save: the path field suggests a whole path
/// (the demo was never saved), a name typed without an extension is saved as a
/// scenario file, and the app then closes, as it was asked to.
#[test]
fn save_when_closing_saves_then_closes() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let id = harness.state().doc.scenario.segments[0].id.clone();
    harness
        .state_mut()
        .send(shelfwind::app::Command::EditSegment(Some(id)));
    harness.run_steps(3);
    retype(&mut harness, "Segment name", "Puffin Rocks");
    assert!(harness.state().doc.dirty);
    // The window's close button, as the window system tells egui of it.
    harness
        .input_mut()
        .viewports
        .entry(egui::ViewportId::ROOT)
        .or_default()
        .events
        .push(egui::ViewportEvent::Close);
    harness.run_steps(3);
    harness.get_by_label("This scenario has changes that are not saved.");
    harness.get_by_label("Save").click();
    harness.run_steps(3);
    // The demo was never saved: a whole path is suggested, named after the scenario.
    let suggested = harness
        .state()
        .dialogs
        .path_prompt
        .as_ref()
        .expect("the path field")
        .text
        .clone();
    assert!(
        suggested.ends_with("north-reach-fishers-co-op-demo.shelfwind.json")
            && std::path::Path::new(&suggested).is_absolute(),
        "{suggested}"
    );
    let typed = dir.path().join("mine");
    type_path(&mut harness, typed.to_str().expect("utf-8"));
    harness.get_by_label("Save here").click();
    harness.run_steps(1);
    wait_until(&mut harness, "the save", |a| !a.is_busy());
    harness.run_steps(3);
    let saved = dir.path().join("mine.shelfwind.json");
    assert!(saved.exists(), "saved as a scenario file");
    assert!(
        std::fs::read_to_string(&saved)
            .expect("read")
            .contains("Puffin Rocks")
    );
    let app = harness.state();
    assert!(!app.doc.dirty);
    assert!(app.dialogs.quit_confirmed, "the app closes after saving");
    assert!(!app.dialogs.quit_after_save);
}

/// Ctrl+Z while typing in a field undoes the typing in the field (the field's own undo),
/// not an earlier edit of the scenario; once the field lets go, Ctrl+Z is the app's.
#[test]
fn ctrl_z_in_a_field_undoes_the_typing() {
    use egui::accesskit::Role;
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let id = harness.state().doc.scenario.segments[0].id.clone();
    harness
        .state_mut()
        .send(shelfwind::app::Command::EditSegment(Some(id.clone())));
    harness.run_steps(3);
    let before = field_value(&harness, Role::TextInput, "Segment name");
    harness
        .get_by_role_and_label(Role::TextInput, "Segment name")
        .focus();
    harness.run_steps(2);
    harness
        .get_by_role_and_label(Role::TextInput, "Segment name")
        .type_text(" North");
    harness.run_steps(2);
    assert_eq!(
        field_value(&harness, Role::TextInput, "Segment name"),
        format!("{before} North")
    );
    harness.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    harness.run_steps(2);
    assert_eq!(
        field_value(&harness, Role::TextInput, "Segment name"),
        before
    );
    assert!(
        !harness.state().doc.dirty,
        "no edit of the scenario was undone or made"
    );
}

/// "Segment…" on a ranked stretch opens its segment in the editor and chooses that
/// stretch, so the plots and the map follow the segment being edited.
#[test]
fn segment_button_chooses_the_stretch_it_edits() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let plan = harness.state().plan.clone().expect("plan");
    let second = plan.stretches[plan.days[harness.state().view.day].ranked[1].stretch].clone();
    harness
        .get_all_by_label("Segment…")
        .nth(1)
        .expect("the second stretch's button")
        .click();
    harness.run_steps(3);
    assert_eq!(harness.state().view.selected, vec![second.id.clone()]);
    assert_eq!(
        harness.state().view.editing.as_deref(),
        Some(second.segment_id.as_str())
    );
    harness.get_by_label(&format!("Plots: {}", second.name));
}
