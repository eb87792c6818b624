//! The built-in guide: what the colours, scores and reasons mean, the keyboard
//! shortcuts, the data and its licences, and the cautions.

use super::state::ShelfwindApp;
use crate::plan::CAUTIONS;
use eframe::egui::{self, RichText};

/// Which page of the guide is open.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum HelpPage {
    /// The guide is closed.
    #[default]
    Closed,
    /// What the app shows and how to use it.
    Guide,
    /// Where the data comes from, and its licences.
    Sources,
}

const GUIDE: &[(&str, &str)] = &[
    (
        "The map",
        "Each coast segment is cut into stretches about 5 nm long. Colour by \"Index now\" shows the coastal upwelling index at the chosen hour: blue is upwelling (cold, rich water brought up), orange-brown downwelling, light grey little either way. \"Expected productivity\" shows what the model expects of the chosen day. \"Safe for this boat\" shows whether the chosen boat can work each stretch that day. Grey arrows point downwind; purple arrows show the Ekman transport, the water moved by the wind, at right angles to it. Dashed red: closed to fishing.",
    ),
    (
        "Where to go",
        "The list on the left ranks the stretches for the chosen day, boat and home port. Score = 100 × expected productivity × the trip window × distance, and each part is shown when you hover the score. A tie (=2) means the scores lie within the tie margin of the first stretch of the group (3 points by default, on the unrounded scores). Every stretch carries its reasons: what the upwelling did, what the wind allows, what the trip costs. Stretches left out say why.",
    ),
    (
        "Expected productivity",
        "Blooms follow upwelling by days, and very strong or long upwelling flushes production offshore. The model is a planning estimate, not a promise of fish: tune it to your own catch records (Edit > Model settings).",
    ),
    (
        "Your boat and port",
        "Boats and ports… (top bar) adds your own boat with its cruising speed, fuel use, wind limit, wave limit and range, and your home port, typed or placed on the map. The plan keeps to the limits you set.",
    ),
    (
        "Wind files",
        "File > Add a wind file… adds a GRIB2 forecast (any usual grid), a NetCDF record or a CSV station record; File > Wind files… lists them, what each holds (format, grid, area, times, what is used) and which segments take their wind from it, and sets their order: each segment takes the first file that covers it.",
    ),
    (
        "Editing the coast",
        "Draw segment, click points on the map, double-click (or Enter) to finish. Click a segment's thin line to edit it: name, notes, closures with dates, the sea side, split, delete. Drag the yellow points, click a + to add one, right-click a point to remove it.",
    ),
    (
        "Keyboard",
        "Ctrl+Z undo; Ctrl+Shift+Z or Ctrl+Y redo; the Left and Right arrow keys step one hour; Enter finishes a segment being drawn; Esc stops drawing; Delete deletes the segment in the editor (it asks first). Ctrl-click or Shift-click stretches to compare them.",
    ),
];

/// The guide window.
pub(super) fn help_window(app: &mut ShelfwindApp, ctx: &egui::Context) {
    let mut open = app.view.help != HelpPage::Closed;
    let title = match app.view.help {
        HelpPage::Sources => "Data and licences",
        _ => "Guide",
    };
    egui::Window::new(title)
        .open(&mut open)
        .default_width(560.0)
        .vscroll(true)
        .show(ctx, |ui| match app.view.help {
            HelpPage::Sources => sources_ui(ui),
            _ => guide_ui(ui),
        });
    if !open {
        app.view.help = HelpPage::Closed;
    }
}

fn guide_ui(ui: &mut egui::Ui) {
    ui.label(RichText::new(CAUTIONS).strong());
    for (title, text) in GUIDE {
        ui.add_space(6.0);
        ui.label(RichText::new(*title).strong());
        ui.label(*text);
    }
}

fn sources_ui(ui: &mut egui::Ui) {
    ui.label(RichText::new("Land outline").strong());
    ui.label("Natural Earth 4.1.0, land at 1:10m, public domain; taken from the npm package world-atlas 2.0.2 (ISC licence). Bundled in the program.");
    ui.add_space(6.0);
    ui.label(RichText::new("Street map (optional, online)").strong());
    ui.label("Map tiles © OpenStreetMap contributors, under the Open Database License; fetched only when the street map is switched on, and kept on disk.");
    ui.add_space(6.0);
    ui.label(RichText::new("Map packs (optional, offline)").strong());
    ui.label("Map packs you add are yours: their terms are theirs, and their credit is shown on the map while one is the base map.");
    ui.add_space(6.0);
    ui.label(RichText::new("Demo").strong());
    ui.label("The demo co-op, its ports, boats, coast names and forecast are invented.");
    ui.add_space(6.0);
    ui.label(RichText::new("Methods").strong());
    ui.label("Coastal upwelling index (Bakun 1973); wind stress with the drag laws of Large & Pond 1981, Trenberth, Large & Olson 1990 and Large & Yeager 2009; season metrics (Bograd et al. 2009). The response model is this tool's planning heuristic.");
}
