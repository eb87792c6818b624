//! The season view driven as a co-op manager uses it: opened from the menu, a wind
//! record typed in and analysed in the background, then the legends, the settings it
//! points to, and the exports of the table and the plots, with their messages shown
//! beside the export buttons.

#![cfg(feature = "gui")]

mod common;

use common::{app_harness, type_into, wait_until_within};
use eframe::egui;
use egui::accesskit::Role;
use egui_kittest::Harness;
use egui_kittest::kittest::{NodeT, Queryable};
use shelfwind::app::ShelfwindApp;
use std::path::Path;
use std::time::Duration;

const RECORD_FIELD: &str = "Wind record files (GRIB2, NetCDF or CSV), one path per line";
/// The Seasons window's title, which also names the window's node.
const WINDOW: &str = "Seasons: compare segments over years of wind";
/// Height of a window's title bar, points (at most).
const TITLE_BAR_PT: f32 = 30.0;

/// Steps the app until `done` holds (background work ends between frames).
fn wait_until(
    harness: &mut Harness<'static, ShelfwindApp>,
    what: &str,
    done: impl Fn(&ShelfwindApp) -> bool,
) {
    wait_until_within(harness, what, Duration::from_mins(3), done);
}

/// Two years of hourly northerlies at 10 m/s (no position: the record covers every
/// segment), as a CSV wind record.
fn write_record(dir: &Path) -> std::path::PathBuf {
    let csv = dir.join("record.csv");
    let mut text = String::from("time,speed_ms,direction_from_deg\n");
    let t0 = chrono::DateTime::parse_from_rfc3339("2025-01-01T00:00:00Z")
        .expect("time")
        .to_utc();
    for h in 0..(2 * 365 * 24) {
        let t = t0 + chrono::Duration::hours(h);
        text.push_str(&t.format("%Y-%m-%dT%H:%M:%SZ,10,0\n").to_string());
    }
    std::fs::write(&csv, text).expect("write the record");
    csv
}

/// The app with the Seasons window opened from the menu and the record analysed.
fn analysed(dir: &Path) -> Harness<'static, ShelfwindApp> {
    let mut harness = app_harness(dir);
    let record = write_record(dir);
    harness.get_by_label("Seasons").click();
    harness.run_steps(2);
    harness
        .get_by_label("Compare seasons of historical wind…")
        .click();
    harness.run_steps(3);
    // Before any analysis, the window says where the data needed is set.
    harness.get_by_label_contains("set in Edit > Model settings… > Seasons.");
    let path = record.to_str().expect("utf-8");
    type_into(&mut harness, Role::MultilineTextInput, RECORD_FIELD, path);
    assert_eq!(harness.state().season.files_text, path);
    harness.get_by_label("Analyse the record").click();
    wait_until(&mut harness, "the seasons", |a| {
        assert_eq!(a.season.record_message, None);
        a.season.result.is_some()
    });
    harness.run_steps(2);
    harness
}

/// Types `path` into the export field, clicks `button`, and waits for the outcome
/// shown under the buttons.
fn export(harness: &mut Harness<'static, ShelfwindApp>, path: &str, button: &str) -> String {
    harness.get_by_label(button).scroll_to_me();
    harness.run_steps(3);
    type_into(harness, Role::TextInput, "Export to", path);
    assert_eq!(harness.state().season.export_path, path);
    harness.get_by_label(button).click_accesskit();
    // The click clears the last outcome (or refuses at once).
    harness.run_steps(1);
    wait_until(harness, "the export's outcome", |a| {
        a.season.message.is_some()
    });
    harness.state().season.message.clone().expect("message")
}

/// The outcome is shown as a label right under the export buttons, and in the window's
/// sight once its scroll (animated) has come to rest.
fn assert_shown_by_the_buttons(harness: &mut Harness<'static, ShelfwindApp>, message: &str) {
    let window = harness.get_by_label(WINDOW).rect();
    let in_window =
        |r: egui::Rect| r.top() > window.top() + TITLE_BAR_PT && r.bottom() < window.bottom();
    for _ in 0..8 {
        if in_window(harness.get_by_label(message).rect()) {
            break;
        }
        harness.step();
    }
    let shown = harness.get_by_label(message).rect();
    assert!(
        in_window(shown),
        "the message {shown:?} is in the window {window:?}"
    );
    let button = harness.get_by_label("Table (CSV)").rect();
    assert!(
        shown.top() >= button.bottom() - 1.0 && shown.top() - button.bottom() < 40.0,
        "the message {shown:?} stands right under the buttons {button:?}"
    );
}

/// One legend entry per segment in each plot (its seasons share it; the season shows on
/// hover, checked next to the code); the mouse wheel over a plot scrolls the window and
/// leaves the plot still; the data settings the window points to are in the model
/// settings under "Seasons", as a percentage, and typing there changes the draft.
#[test]
fn legends_group_seasons_and_the_seasons_settings_exist() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = analysed(dir.path());
    let result = harness.state().season.result.clone().expect("result");
    let first = &result[0];
    assert_eq!(first.years.len(), 2, "two seasons");
    // The "Show" box, and one legend entry in each of the two plots.
    let boxes = harness
        .query_all_by_role_and_label(Role::CheckBox, &first.name)
        .count();
    assert_eq!(boxes, 3, "one legend entry per plot for {}", first.name);
    for y in &first.years {
        let per_season = format!("{} {}", first.name, y.year);
        assert!(
            harness.query_by_label(&per_season).is_none(),
            "no legend entry per season: {per_season}"
        );
    }
    harness.get_by_label_contains("Seasons run from 1 January to 31 December.");

    // The mouse wheel over a plot scrolls the window: the plot does not take it.
    let legend = |h: &Harness<'static, ShelfwindApp>| {
        h.query_all_by_role_and_label(Role::CheckBox, &first.name)
            .map(|n| n.rect())
            .max_by(|a, b| a.top().total_cmp(&b.top()))
            .expect("a legend entry")
    };
    // The plots' ids, as the season view names them.
    let bounds = |h: &Harness<'static, ShelfwindApp>| {
        ["season-cui", "season-months"].map(|id| {
            egui_plot::PlotMemory::load(&h.ctx, egui::Id::unique(("shelfwind season plot", id)))
                .map(|m| *m.bounds())
        })
    };
    let bounds_before = bounds(&harness);
    assert!(
        bounds_before.iter().all(Option::is_some),
        "both plots drawn"
    );
    let before = legend(&harness);
    let over_plot = before.center() + egui::vec2(200.0, 100.0);
    harness.hover_at(over_plot);
    harness.run_steps(2);
    harness.event(egui::Event::MouseWheel {
        unit: egui::MouseWheelUnit::Point,
        delta: egui::vec2(0.0, -120.0),
        phase: egui::TouchPhase::Move,
        source: egui::MouseWheelSource::Unknown,
        modifiers: egui::Modifiers::NONE,
    });
    harness.run_steps(6);
    let after = legend(&harness);
    assert!(
        after.top() < before.top() - 50.0,
        "the window scrolled under the wheel: legend from {before:?} to {after:?}"
    );
    assert_eq!(bounds(&harness), bounds_before, "the plots did not pan");
    harness.get_by_label_contains("(Edit > Model settings… > Seasons)");

    harness.get_by_label("Edit").click();
    harness.run_steps(2);
    harness.get_by_label("Model settings…").click();
    harness.run_steps(3);
    harness.get_by_role_and_label(Role::Label, "Seasons");
    let row = "Season metrics: days with data";
    harness.get_by_label(row).scroll_to_me();
    harness.run_steps(2);
    let shown = harness
        .get_by_role_and_label(Role::SpinButton, row)
        .accesskit_node()
        .numeric_value();
    assert!(
        shown.is_some_and(|v| (v - 90.0).abs() < 1e-9),
        "shown as a percentage: {shown:?}"
    );
    harness.get_by_role_and_label(Role::SpinButton, row).focus();
    harness.run_steps(2);
    harness
        .get_by_role_and_label(Role::SpinButton, row)
        .type_text("85");
    harness.run_steps(2);
    let draft = harness
        .state()
        .dialogs
        .settings_draft
        .clone()
        .expect("a draft");
    assert!(
        (draft.seasons.min_year - 0.85).abs() < 1e-12,
        "85 % typed: {}",
        draft.seasons.min_year
    );
    assert!(
        (harness.state().doc.scenario.settings.seasons.min_year - 0.9).abs() < 1e-12,
        "the scenario changes only on Apply"
    );
}

/// A table export into a folder that does not exist says so under the buttons, naming
/// the file typed.
#[test]
fn a_table_export_into_a_missing_folder_names_the_file() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = analysed(dir.path());
    let out = dir.path().join("no such folder").join("seasons.csv");
    let out = out.to_str().expect("utf-8");
    let message = export(&mut harness, out, "Table (CSV)");
    assert!(
        message.starts_with("The table was not written: "),
        "{message}"
    );
    assert!(
        message.ends_with(&format!(": {out}")),
        "names the file: {message}"
    );
    assert_shown_by_the_buttons(&mut harness, &message);
    assert!(!Path::new(out).exists());
    // Written once the path is right.
    let ok = dir.path().join("seasons.csv");
    let ok = ok.to_str().expect("utf-8");
    let message = export(&mut harness, ok, "Table (CSV)");
    assert_eq!(message, format!("Table written to {ok}"));
    assert_shown_by_the_buttons(&mut harness, &message);
}

/// A PNG export while the plots are scrolled out of view: they are brought into view
/// first, then the file is written, or the message under the buttons says clearly why
/// not (this harness has no renderer to take screenshots with), naming the file.
#[test]
fn a_png_export_with_the_plots_out_of_view_writes_or_says_why() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = analysed(dir.path());
    let name = harness.state().season.result.clone().expect("result")[0]
        .name
        .clone();
    // The legend entries are the lowest of the boxes of that name ("Show" is above).
    let legend_top = |h: &Harness<'static, ShelfwindApp>| {
        h.query_all_by_role_and_label(Role::CheckBox, &name)
            .map(|n| n.rect().top())
            .fold(f32::NEG_INFINITY, f32::max)
    };
    let out = dir.path().join("plots.png");
    let out_text = out.to_str().expect("utf-8");
    harness.get_by_label("Plots (PNG)").scroll_to_me();
    harness.run_steps(3);
    let window = harness.get_by_label(WINDOW).rect();
    assert!(
        legend_top(&harness) < window.top() + TITLE_BAR_PT,
        "the plots are scrolled out of view above the window's top"
    );
    type_into(&mut harness, Role::TextInput, "Export to", out_text);
    harness.get_by_label("Plots (PNG)").click_accesskit();
    // The click, the scroll asked for, the frame drawn scrolled: a few frames at most.
    let in_view = |top: f32| top > window.top() + TITLE_BAR_PT && top < window.bottom();
    let mut top = legend_top(&harness);
    for _ in 0..10 {
        if in_view(top) {
            break;
        }
        harness.step();
        top = legend_top(&harness);
    }
    assert!(
        in_view(top),
        "the plots were brought into view: legend at {top}, window {window:?}"
    );
    wait_until(&mut harness, "the plots' outcome", |a| {
        a.season.message.is_some()
    });
    let message = harness.state().season.message.clone().expect("message");
    if out.exists() {
        assert_eq!(message, format!("Plots written to {out_text}"));
        let bytes = std::fs::read(&out).expect("read");
        assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
    } else {
        assert!(
            message.starts_with("The plots were not written: "),
            "{message}"
        );
        assert!(message.ends_with(&format!(": {out_text}")), "{message}");
        assert!(
            !message.contains("Zero height"),
            "a clear reason: {message}"
        );
    }
    assert_shown_by_the_buttons(&mut harness, &message);
    // A name that is not a PNG's is refused at once, and the file is left alone.
    let csv = dir.path().join("seasons.csv");
    std::fs::write(&csv, "kept").expect("write");
    let csv_text = csv.to_str().expect("utf-8");
    let message = export(&mut harness, csv_text, "Plots (PNG)");
    assert_eq!(
        message,
        format!("The plots were not written: the file name must end in .png: {csv_text}")
    );
    assert_eq!(std::fs::read_to_string(&csv).expect("read"), "kept");
}
