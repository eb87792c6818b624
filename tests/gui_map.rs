//! The map as a skipper uses it, driven through egui_kittest: zoom buttons and the wheel,
//! the scale bar, the pointer's position, stretch names under the pointer, the selected
//! stretch, a steady view when a side panel opens, and the length of a segment being
//! drawn. Everything is read from what the map shows (its labels), not from its memory.

#![cfg(feature = "gui")]

mod common;

use eframe::egui;
use egui::accesskit::Role;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use shelfwind::app::{Command, ShelfwindApp};

/// The demo app with the first plan made and the map settled.
fn app_harness(dir: &std::path::Path) -> Harness<'static, ShelfwindApp> {
    let mut harness = common::app_harness(dir);
    settle(&mut harness);
    harness
}

/// Steps the app until the map has kept its place and size for a few frames (the panels
/// around it find their sizes over the first frames after the plan comes).
fn settle(harness: &mut Harness<'static, ShelfwindApp>) {
    let mut last = harness.get_by_label("Map").rect();
    let mut same = 0;
    for _ in 0..120 {
        harness.step();
        let rect = harness.get_by_label("Map").rect();
        same = if rect == last { same + 1 } else { 0 };
        last = rect;
        if same == 3 {
            return;
        }
    }
    panic!("the map never settled");
}

/// The text of the one label whose text starts with `prefix`, without the prefix.
fn label_after(harness: &Harness<'static, ShelfwindApp>, prefix: &str) -> String {
    let text = harness
        .get_by_label_contains(prefix)
        .value()
        .unwrap_or_default();
    text.strip_prefix(prefix)
        .unwrap_or_else(|| panic!("{text:?} does not start with {prefix:?}"))
        .to_string()
}

/// The scale bar's length, nautical miles.
fn scale_nm(harness: &Harness<'static, ShelfwindApp>) -> f64 {
    let text = label_after(harness, "Scale bar: ");
    text.strip_suffix(" nm")
        .and_then(|n| n.parse().ok())
        .unwrap_or_else(|| panic!("scale bar reads {text:?}"))
}

/// The position the map shows for the pointer at `pos`.
fn position_at(harness: &mut Harness<'static, ShelfwindApp>, pos: egui::Pos2) -> String {
    harness.hover_at(pos);
    harness.run_steps(2);
    label_after(harness, "Pointer at ")
}

/// A point of the map, as fractions of its width and height from the top left.
fn map_point(harness: &Harness<'static, ShelfwindApp>, fx: f32, fy: f32) -> egui::Pos2 {
    let map = harness.get_by_label("Map").rect();
    egui::pos2(map.left() + map.width() * fx, map.top() + map.height() * fy)
}

/// Centres the map on `at`, zooms in two steps and puts the pointer over it (the map's
/// middle).
fn hover_over(harness: &mut Harness<'static, ShelfwindApp>, at: shelfwind::coast::LatLon) {
    harness.state_mut().send(Command::CentreOn(at));
    harness.run_steps(2);
    click_zoom(harness, "Zoom in");
    click_zoom(harness, "Zoom in");
    let middle = map_point(harness, 0.5, 0.5);
    harness.hover_at(middle);
    harness.run_steps(2);
}

fn click_zoom(harness: &mut Harness<'static, ShelfwindApp>, label: &str) {
    harness.get_by_role_and_label(Role::Button, label).click();
    harness.run_steps(2);
}

#[test]
fn zoom_buttons_change_the_scale_bar() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let (before, before_text) = (scale_nm(&harness), label_after(&harness, "Scale bar: "));
    // Two steps in: a quarter of the distance per pixel, so a shorter round length.
    click_zoom(&mut harness, "Zoom in");
    click_zoom(&mut harness, "Zoom in");
    let zoomed_in = scale_nm(&harness);
    assert!(
        zoomed_in < before,
        "{zoomed_in} nm after zooming in from {before} nm"
    );
    click_zoom(&mut harness, "Zoom out");
    click_zoom(&mut harness, "Zoom out");
    assert_eq!(label_after(&harness, "Scale bar: "), before_text);
}

#[test]
fn the_pointer_position_shows_in_degrees_and_minutes() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    // The pointer over the ranked list, not the map: no position.
    let list = harness.get_by_label("Map").rect().left_center() - egui::vec2(100.0, 0.0);
    harness.hover_at(list);
    harness.run_steps(2);
    assert!(
        harness.query_by_label_contains("Pointer at ").is_none(),
        "a position while the pointer is off the map"
    );
    let at = map_point(&harness, 0.4, 0.4);
    let text = position_at(&mut harness, at);
    // e.g. 38°26.4'N 123°08.4'W
    let (lat, lon) = text.split_once(' ').expect("latitude and longitude");
    for (part, hemispheres) in [(lat, ['N', 'S']), (lon, ['E', 'W'])] {
        let (degrees, rest) = part.split_once('°').expect("degrees");
        let (minutes, hemisphere) = rest.split_once('\'').expect("minutes");
        assert!(degrees.parse::<u32>().is_ok(), "{text}");
        assert_eq!(minutes.len(), 4, "minutes as mm.m in {text}");
        assert!(minutes.parse::<f64>().is_ok_and(|m| m < 60.0), "{text}");
        assert!(
            hemispheres.iter().any(|h| hemisphere == h.to_string()),
            "{text}"
        );
    }
    // Another place reads differently.
    let elsewhere = map_point(&harness, 0.6, 0.7);
    assert_ne!(position_at(&mut harness, elsewhere), text);
}

#[test]
fn the_wheel_zooms_about_the_pointer() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let (pointer, other) = (
        map_point(&harness, 0.3, 0.35),
        map_point(&harness, 0.7, 0.7),
    );
    let other_before = position_at(&mut harness, other);
    let under_pointer = position_at(&mut harness, pointer);
    let scale_before = scale_nm(&harness);
    for _ in 0..6 {
        harness.event(egui::Event::MouseWheel {
            unit: egui::MouseWheelUnit::Line,
            delta: egui::vec2(0.0, 1.0),
            phase: egui::TouchPhase::Move,
            source: egui::MouseWheelSource::Wheel,
            modifiers: egui::Modifiers::NONE,
        });
        harness.run_steps(2);
    }
    harness.run_steps(30);
    assert!(
        scale_nm(&harness) < scale_before,
        "the wheel did not zoom in"
    );
    // The place under the pointer stays under it; places away from it move.
    assert_eq!(position_at(&mut harness, pointer), under_pointer);
    assert_ne!(position_at(&mut harness, other), other_before);
}

#[test]
fn the_view_stays_put_when_the_editor_opens() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let width_before = harness.get_by_label("Map").rect().width();
    let at = map_point(&harness, 0.25, 0.5);
    let before = position_at(&mut harness, at);
    let id = harness.state().doc.scenario.segments[0].id.clone();
    harness.state_mut().send(Command::EditSegment(Some(id)));
    harness.run_steps(3);
    assert!(
        harness.get_by_label("Map").rect().width() < width_before - 100.0,
        "the editor panel did not open"
    );
    assert_eq!(position_at(&mut harness, at), before);
    harness.state_mut().send(Command::EditSegment(None));
    harness.run_steps(3);
    assert_eq!(position_at(&mut harness, at), before);
}

#[test]
fn hovering_a_stretch_names_it_with_its_rank() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let plan = harness.state().plan.clone().expect("plan");
    let first = &plan.days[0].ranked[0];
    let stretch = &plan.stretches[first.stretch];
    hover_over(&mut harness, stretch.centre);
    let shown = harness
        .get_by_label_contains(&format!("{}\nrank ", stretch.name))
        .value()
        .unwrap_or_default();
    assert_eq!(
        shown,
        format!(
            "{}\nrank 1 of {}, score {:.0}",
            stretch.name,
            plan.days[0].ranked.len(),
            first.score
        )
    );
    // Away from the coast, no name.
    harness.hover_at(map_point(&harness, 0.5, 0.02));
    harness.run_steps(2);
    assert!(
        harness
            .query_by_label_contains(&format!("{}\nrank ", stretch.name))
            .is_none()
    );
}

/// Over a stretch left out on the day, the pointer shows why, in the list's words.
#[test]
fn hovering_a_stretch_left_out_tells_why() {
    use shelfwind::export::plan_text::excluded_text;
    use shelfwind::export::units::Units;
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let plan = harness.state().plan.clone().expect("plan");
    let left_out = plan.days[0]
        .excluded
        .first()
        .expect("the demo leaves some out");
    let stretch = &plan.stretches[left_out.stretch];
    hover_over(&mut harness, stretch.centre);
    let shown = harness
        .get_by_label_contains(&format!("{}\nleft out: ", stretch.name))
        .value()
        .unwrap_or_default();
    assert_eq!(
        shown,
        format!(
            "{}\nleft out: {}",
            stretch.name,
            excluded_text(&plan, left_out, Units::default())
        )
    );
}

#[test]
fn a_selected_stretch_is_named_on_the_map() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let plan = harness.state().plan.clone().expect("plan");
    let stretch = plan.stretches[plan.days[0].ranked[1].stretch].clone();
    let label = format!("Selected: {}", stretch.name);
    assert!(harness.query_by_label(&label).is_none());
    harness
        .get_by_label(&format!("Stretch {}", stretch.name))
        .click();
    harness.run_steps(2);
    harness.state_mut().send(Command::CentreOn(stretch.centre));
    harness.run_steps(2);
    harness.get_by_label(&label);
}

#[test]
fn a_segment_being_drawn_shows_its_length() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    harness.get_by_label("Draw segment").click();
    harness.run_steps(2);
    let hint = "Drawing a segment";
    assert!(
        !harness
            .get_by_label_contains(hint)
            .value()
            .unwrap_or_default()
            .contains(" nm"),
        "a length before any point"
    );
    for (fx, fy) in [(0.3, 0.3), (0.35, 0.5)] {
        let pos = map_point(&harness, fx, fy);
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
    let with_two = harness
        .get_by_label_contains(hint)
        .value()
        .unwrap_or_default();
    assert!(with_two.contains("(2 so far, "), "{with_two}");
    assert!(with_two.contains(" nm long)"), "{with_two}");
    // Moving the pointer on lengthens the line to it.
    let length = |text: &str| -> f64 {
        let after = text.split_once("so far, ").expect("length").1;
        after
            .split_once(" nm")
            .and_then(|(n, _)| n.parse().ok())
            .expect("a number")
    };
    harness.hover_at(map_point(&harness, 0.45, 0.8));
    harness.run_steps(2);
    let further = harness
        .get_by_label_contains(hint)
        .value()
        .unwrap_or_default();
    assert!(
        length(&further) > length(&with_two),
        "{with_two} / {further}"
    );
}

/// The graticule: its spacing is a round number of minutes or degrees, finer after
/// zooming in and back to the same after zooming out.
#[test]
fn the_graticule_follows_the_zoom() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = app_harness(dir.path());
    let minutes = |text: &str| -> f64 {
        if let Some(m) = text.strip_suffix('\'') {
            m.parse().expect("minutes")
        } else {
            60.0 * text
                .strip_suffix('°')
                .and_then(|d| d.parse::<f64>().ok())
                .unwrap_or_else(|| panic!("graticule reads {text:?}"))
        }
    };
    let before_text = label_after(&harness, "Graticule every ");
    let before = minutes(&before_text);
    assert!(
        [1.0, 2.0, 5.0, 10.0, 15.0, 20.0, 30.0, 60.0, 120.0, 300.0].contains(&before),
        "{before_text}"
    );
    click_zoom(&mut harness, "Zoom in");
    click_zoom(&mut harness, "Zoom in");
    let after = minutes(&label_after(&harness, "Graticule every "));
    assert!(after < before, "{after}' after zooming in from {before}'");
    click_zoom(&mut harness, "Zoom out");
    click_zoom(&mut harness, "Zoom out");
    assert_eq!(label_after(&harness, "Graticule every "), before_text);
}
