//! The model settings window: every setting of the index, events, response, trips,
//! seasons and the sea check with its unit and default, edited as a draft and applied as one undoable step.

use super::commands::Command;
use super::edit::Edit;
use super::state::ShelfwindApp;
use crate::physics::{DragChoice, RHO_AIR_RANGE_KG_M3, RHO_WATER_RANGE_KG_M3};
use crate::plan::TripSettings;
use crate::scenario::ModelSettings;
use crate::upwelling::{CoverageSettings, EventSettings, ResponseSettings};
use eframe::egui::{self, RichText};

/// The heading of the section on the data seasons need, as other windows name it.
pub(super) const SEASONS_SECTION: &str = "Seasons";

/// One number with its range, unit and default, as a row of a three-column grid; true
/// when edited.
fn number(
    ui: &mut egui::Ui,
    label: &str,
    value: &mut f64,
    range: std::ops::RangeInclusive<f64>,
    unit: &str,
    default: f64,
) -> bool {
    let label = ui.label(label);
    let changed = ui
        .add(
            egui::DragValue::new(value)
                .range(range)
                .speed(0.05 * default.abs().max(0.1))
                .suffix(format!(" {unit}")),
        )
        .labelled_by(label.id)
        .changed();
    ui.label(RichText::new(format!("default {default}")).small().weak());
    ui.end_row();
    changed
}

/// A share kept as 0–1, shown and edited as a percentage.
fn share_percent(ui: &mut egui::Ui, label: &str, share: &mut f64, default_share: f64) {
    // Rounded so that the value shown is the same from frame to frame while typing
    // (0.85 × 100 is not exactly 85 in binary).
    let percent = |share: f64| (share * 100.0 * 1e6).round() / 1e6;
    let mut value = percent(*share);
    if number(
        ui,
        label,
        &mut value,
        0.0..=100.0,
        "%",
        percent(default_share),
    ) {
        *share = value / 100.0;
    }
}

/// Drag law, densities and stretch length.
fn physics_grid(ui: &mut egui::Ui, draft: &mut ModelSettings, d: &ModelSettings) {
    ui.label(RichText::new("Wind stress and transport").strong());
    egui::Grid::new("physics").num_columns(3).show(ui, |ui| {
        ui.label("Drag law");
        egui::ComboBox::from_id_salt("drag")
            .selected_text(draft.index.drag.name())
            .show_ui(ui, |ui| {
                for choice in [
                    DragChoice::default(),
                    DragChoice::LargePond1981,
                    DragChoice::Trenberth1990,
                    DragChoice::LargeYeager2009,
                ] {
                    ui.selectable_value(&mut draft.index.drag, choice, choice.name());
                }
            });
        ui.label(RichText::new("default: constant 1.3e-3").small().weak());
        ui.end_row();
        number(
            ui,
            "Air density",
            &mut draft.index.rho_air_kg_m3,
            RHO_AIR_RANGE_KG_M3,
            "kg/m³",
            d.index.rho_air_kg_m3,
        );
        number(
            ui,
            "Sea-water density",
            &mut draft.index.rho_water_kg_m3,
            RHO_WATER_RANGE_KG_M3,
            "kg/m³",
            d.index.rho_water_kg_m3,
        );
        number(
            ui,
            "Stretch length",
            &mut draft.stretch_length_nm,
            0.5..=100.0,
            "nm",
            d.stretch_length_nm,
        );
    });
}

/// Event detection thresholds.
fn events_grid(ui: &mut egui::Ui, e: &mut EventSettings, d: &EventSettings) {
    ui.label(RichText::new("Upwelling events").strong());
    egui::Grid::new("events").num_columns(3).show(ui, |ui| {
        number(
            ui,
            "Threshold",
            &mut e.threshold_m3s_per_100m,
            -1000.0..=5000.0,
            "m³/s per 100 m",
            d.threshold_m3s_per_100m,
        );
        number(
            ui,
            "Shortest event",
            &mut e.min_duration_h,
            0.0..=720.0,
            "h",
            d.min_duration_h,
        );
        number(
            ui,
            "Lulls bridged up to",
            &mut e.max_gap_h,
            0.0..=240.0,
            "h",
            d.max_gap_h,
        );
    });
}

/// The response model.
fn response_grid(ui: &mut egui::Ui, r: &mut ResponseSettings, d: &ResponseSettings) {
    ui.label(
        RichText::new("Biological response (a planning model: tune it to your catch records)")
            .strong(),
    );
    egui::Grid::new("response").num_columns(3).show(ui, |ui| {
        number(
            ui,
            "Bloom peaks after",
            &mut r.lag_peak_days,
            0.5..=30.0,
            "days",
            d.lag_peak_days,
        );
        number(
            ui,
            "Lag shape",
            &mut r.lag_shape,
            1.1..=20.0,
            "",
            d.lag_shape,
        );
        number(
            ui,
            "Optimum index",
            &mut r.optimum_m3s_per_100m,
            1.0..=2000.0,
            "m³/s per 100 m",
            d.optimum_m3s_per_100m,
        );
        number(
            ui,
            "Flushing scale",
            &mut r.flush_scale_m3s_per_100m,
            1.0..=10_000.0,
            "m³/s per 100 m",
            d.flush_scale_m3s_per_100m,
        );
        number(
            ui,
            "Long events from",
            &mut r.long_event_days,
            0.5..=60.0,
            "days",
            d.long_event_days,
        );
        number(
            ui,
            "Relaxation bonus",
            &mut r.relaxation_bonus,
            0.0..=1.0,
            "",
            d.relaxation_bonus,
        );
        number(
            ui,
            "Bonus fades over",
            &mut r.relaxation_window_days,
            0.5..=30.0,
            "days",
            d.relaxation_window_days,
        );
        number(
            ui,
            "Pumping band",
            &mut r.pumping_width_km,
            0.0..=100.0,
            "km",
            d.pumping_width_km,
        );
    });
}

/// Trip planning and scoring.
fn trip_grid(ui: &mut egui::Ui, t: &mut TripSettings, d: &TripSettings) {
    ui.label(RichText::new("Trips").strong());
    egui::Grid::new("trip").num_columns(3).show(ui, |ui| {
        number(
            ui,
            "Fishing day target",
            &mut t.target_fishing_hours,
            0.5..=24.0,
            "h",
            d.target_fishing_hours,
        );
        number(
            ui,
            "Fewest fishing hours",
            &mut t.min_fishing_hours,
            0.0..=24.0,
            "h",
            d.min_fishing_hours,
        );
        number(
            ui,
            "Distance weight",
            &mut t.distance_weight,
            0.0..=1.0,
            "",
            d.distance_weight,
        );
        number(
            ui,
            "Tie margin",
            &mut t.tie_margin_points,
            0.0..=50.0,
            "points",
            d.tie_margin_points,
        );
        ui.label("Working hours (local)");
        ui.horizontal(|ui| {
            ui.add(
                egui::DragValue::new(&mut t.day_start_hour)
                    .range(0..=23)
                    .suffix(":00"),
            );
            ui.label("to");
            ui.add(
                egui::DragValue::new(&mut t.day_end_hour)
                    .range(1..=24)
                    .suffix(":00"),
            );
        });
        ui.label(RichText::new("default 05:00 to 21:00").small().weak());
        ui.end_row();
    });
}

/// How much data a day, a month and a season need for the season view.
fn seasons_grid(ui: &mut egui::Ui, c: &mut CoverageSettings, d: &CoverageSettings) {
    ui.label(RichText::new(SEASONS_SECTION).strong());
    ui.label(
        RichText::new(
            "The least data each needs; a season with less is flagged and gets no metrics",
        )
        .small()
        .weak(),
    );
    egui::Grid::new("seasons").num_columns(3).show(ui, |ui| {
        share_percent(ui, "Day: hours with data", &mut c.min_day, d.min_day);
        share_percent(
            ui,
            "Monthly mean: days with data",
            &mut c.min_month,
            d.min_month,
        );
        share_percent(
            ui,
            "Season metrics: days with data",
            &mut c.min_year,
            d.min_year,
        );
    });
}

/// How the sea check reads a grid and when it calls an event confirmed.
fn sea_check_grid(
    ui: &mut egui::Ui,
    c: &mut crate::scenario::SstCheckSettings,
    d: &crate::scenario::SstCheckSettings,
) {
    ui.label(RichText::new("Sea-temperature check").strong());
    egui::Grid::new("sea check").num_columns(3).show(ui, |ui| {
        number(
            ui,
            "Cooling that confirms an event",
            &mut c.cooling_c,
            0.1..=10.0,
            "°C",
            d.cooling_c,
        );
        number(
            ui,
            "Grid read offshore of each segment",
            &mut c.probe_offshore_km,
            1.0..=50.0,
            "km",
            d.probe_offshore_km,
        );
    });
}

/// The model settings window: edits a draft, applied as one undoable step.
pub(super) fn settings_window(
    app: &mut ShelfwindApp,
    ctx: &egui::Context,
    commands: &mut Vec<Command>,
) {
    let draft = app
        .dialogs
        .settings_draft
        .get_or_insert_with(|| app.doc.scenario.settings.clone());
    let d = ModelSettings::default();
    let mut open = true;
    let mut apply = false;
    egui::Window::new("Model settings")
        .open(&mut open)
        .vscroll(true)
        .default_width(520.0)
        .show(ctx, |ui| {
            physics_grid(ui, draft, &d);
            ui.separator();
            events_grid(ui, &mut draft.events, &d.events);
            ui.separator();
            response_grid(ui, &mut draft.response, &d.response);
            ui.separator();
            trip_grid(ui, &mut draft.trip, &d.trip);
            ui.separator();
            seasons_grid(ui, &mut draft.seasons, &d.seasons);
            ui.separator();
            sea_check_grid(ui, &mut draft.sst_check, &d.sst_check);
            ui.separator();
            ui.horizontal(|ui| {
                if ui.button("Apply").clicked() {
                    apply = true;
                }
                if ui.button("Reset to defaults").clicked() {
                    *draft = ModelSettings::default();
                }
            });
        });
    if apply {
        commands.push(Command::Edit(Edit::SetSettings(draft.clone())));
    }
    if !open {
        app.dialogs.show_settings = false;
        app.dialogs.settings_draft = None;
    }
}
