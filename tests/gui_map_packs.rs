//! Offline map packs in the app, driven through egui_kittest: adding one by typing its
//! path, choosing it in the Base map list, its credit on the map, its note where it has
//! no tiles, packs that cannot be opened, and the choice remembered by the next run.

#![cfg(feature = "gui")]

mod common;

use eframe::egui;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use shelfwind::app::{BaseLayer, Command, Remembered, ShelfwindApp};
use std::collections::HashMap;
use std::path::PathBuf;
use std::time::Duration;

const CREDIT: &str = "Map credit: Invented tiles for Shelfwind's tests";
const NAME: &str = "Invented test pack";

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/tiles")
        .join(name)
}

/// File > Add a map pack…, the path typed, Open; steps until the pack is open or refused.
fn add_pack(harness: &mut Harness<'static, ShelfwindApp>, path: &std::path::Path) {
    harness.get_by_label("File").click();
    harness.run_steps(2);
    harness.get_by_label("Add a map pack…").click();
    harness.run_steps(4);
    let field = egui::accesskit::Role::TextInput;
    harness.get_by_role_and_label(field, "File path").focus();
    harness.run_steps(2);
    harness
        .get_by_role_and_label(field, "File path")
        .type_text(&path.display().to_string());
    harness.run_steps(2);
    harness.get_by_label("Open").click();
    harness.run_steps(2);
    wait_for_pack(harness);
}

/// Steps until no pack is being opened and the map has drawn what it can.
fn wait_for_pack(harness: &mut Harness<'static, ShelfwindApp>) {
    common::wait_until_within(harness, "the pack opened", Duration::from_secs(30), |app| {
        !app.is_busy()
    });
    harness.run_steps(4);
}

/// Chooses `label` in the Base map list.
fn choose_base_map(harness: &mut Harness<'static, ShelfwindApp>, label: &str) {
    harness.get_by_label("Base map").click();
    harness.run_steps(2);
    harness.get_by_label(label).click();
    harness.run_steps(2);
    wait_for_pack(harness);
}

#[test]
fn a_pack_added_by_its_path_becomes_the_base_map_with_its_credit() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = common::app_harness(dir.path());
    assert!(harness.query_by_label_contains("Map credit").is_none());
    let path = fixture("pack.mbtiles");
    add_pack(&mut harness, &path);
    assert_eq!(*harness.state().base_layer(), BaseLayer::Pack(path.clone()));
    assert_eq!(harness.state().map_packs().len(), 1);
    assert_eq!(harness.state().map_packs()[0].name, NAME);
    harness.get_by_label(CREDIT);
    harness.get_by_label_contains(&format!("Added the map pack \"{NAME}\""));
    // Back to the land outline, then the pack again by its name in the list.
    choose_base_map(&mut harness, "Land outline (offline)");
    assert_eq!(*harness.state().base_layer(), BaseLayer::BundledLand);
    assert!(harness.query_by_label(CREDIT).is_none());
    choose_base_map(&mut harness, NAME);
    assert_eq!(*harness.state().base_layer(), BaseLayer::Pack(path));
    harness.get_by_label(CREDIT);
}

#[test]
fn the_map_says_where_a_pack_has_no_tiles() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = common::app_harness(dir.path());
    add_pack(&mut harness, &fixture("pack.pmtiles"));
    let note =
        "This map pack has no tiles here (it covers 0.0°N to 85.1°N, 180.0°W to 0.0°E, zoom 1–2).";
    // The demo's coast is inside the pack (its zoom-2 tile, drawn larger): no note.
    assert!(harness.query_by_label(note).is_none());
    let south = shelfwind::coast::LatLon::new(-30.0, -120.0);
    harness.state_mut().send(Command::CentreOn(south));
    // The tiles are looked for in the pack's own thread.
    let start = std::time::Instant::now();
    while harness.query_by_label(note).is_none() {
        assert!(start.elapsed() < Duration::from_secs(30), "no note: {note}");
        harness.step();
        std::thread::sleep(Duration::from_millis(20));
    }
    harness.run_steps(2);
    harness.get_by_label(note);
}

#[test]
fn a_pack_that_cannot_be_opened_is_explained_and_the_base_map_stays() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = common::app_harness(dir.path());
    for (name, why) in [
        ("not-sqlite.mbtiles", "not a readable MBTiles file"),
        (
            "webp.pmtiles",
            "the tiles are WebP, which Shelfwind cannot draw",
        ),
    ] {
        let path = fixture(name);
        add_pack(&mut harness, &path);
        let message = harness
            .get_by_label_contains("The map pack was not opened")
            .value()
            .unwrap_or_default();
        assert!(message.contains(why), "{message}");
        assert!(message.contains(&path.display().to_string()), "{message}");
        assert_eq!(*harness.state().base_layer(), BaseLayer::BundledLand);
        assert!(harness.state().map_packs().is_empty());
    }
}

/// What eframe keeps between runs, in memory.
#[derive(Default)]
struct MemoryStorage(HashMap<String, String>);

impl eframe::Storage for MemoryStorage {
    fn get_string(&self, key: &str) -> Option<String> {
        self.0.get(key).cloned()
    }
    fn set_string(&mut self, key: &str, value: String) {
        self.0.insert(key.to_string(), value);
    }
    fn remove_string(&mut self, key: &str) {
        self.0.remove(key);
    }
    fn flush(&mut self) {}
}

#[test]
fn the_chosen_pack_and_the_list_are_remembered_by_the_next_run() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut harness = common::app_harness(dir.path());
    let (folder, pmtiles) = (fixture("folder"), fixture("pack.pmtiles"));
    add_pack(&mut harness, &pmtiles);
    add_pack(&mut harness, &folder);
    let mut storage = MemoryStorage::default();
    eframe::App::save(harness.state_mut(), &mut storage);
    drop(harness);
    let remembered: Remembered =
        eframe::get_value(&storage, eframe::APP_KEY).expect("the app's memory");
    let mut next = common::app_harness_remembering(dir.path(), remembered);
    wait_for_pack(&mut next);
    assert_eq!(*next.state().base_layer(), BaseLayer::Pack(folder));
    next.get_by_label(CREDIT);
    // Both packs are listed by name: the folder by its folder name.
    next.get_by_label("Base map").click();
    next.run_steps(2);
    next.get_by_label(NAME);
    next.get_by_label("folder");
}
