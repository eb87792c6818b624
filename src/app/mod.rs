//! The desktop app: a thin eframe face on the core. It draws the coast on a map
//! coloured by the forecast, lists the ranked stretches with their reasons, plots the
//! selected stretch, edits the coast with undo and redo, and imports and exports files.
//! It computes nothing of its own: the plan comes from [`crate::plan::build_plan`],
//! run in a background job.

mod base_map;
mod boats;
mod calibrate_view;
mod check_view;
mod coast_pack;
mod commands;
mod compare;
mod dialogs;
mod edit;
mod editor;
mod fields;
mod files;
mod graticule;
mod help;
mod jobs;
mod land_layer;
mod map;
mod messages;
mod pack_layer;
mod panels;
mod plots;
mod season_view;
mod settings_window;
mod state;
mod stretch_paint;
mod tasks;
mod wind_files;

pub use commands::{Command, FileAction};
pub use files::write_recovery;
pub use messages::{Message, Subject};
pub use state::{AppOptions, BaseLayer, Colouring, Remembered, SavedPack, ShelfwindApp, Tool};

use std::path::PathBuf;

/// The name under which eframe keeps the app's memory.
pub const APP_ID: &str = "shelfwind";

/// Starts the app on a scenario file, or on the last scenario, or on the bundled demo.
pub fn run(open: Option<PathBuf>) -> Result<(), String> {
    // walkers' tile client uses rustls without a crypto provider: give it ring.
    let _ = rustls::crypto::ring::default_provider().install_default();
    let options = eframe::NativeOptions {
        renderer: eframe::Renderer::Glow,
        viewport: eframe::egui::ViewportBuilder::default()
            .with_title("Shelfwind")
            .with_inner_size([1400.0, 900.0])
            .with_min_inner_size([900.0, 600.0])
            .with_drag_and_drop(true),
        ..Default::default()
    };
    eframe::run_native(
        APP_ID,
        options,
        Box::new(move |cc| {
            let app_options = AppOptions {
                storage_dir: eframe::storage_dir(APP_ID),
                ..AppOptions::default()
            };
            Ok(Box::new(ShelfwindApp::new(cc, open, app_options)))
        }),
    )
    .map_err(|e| format!("cannot start the app: {e}"))
}
