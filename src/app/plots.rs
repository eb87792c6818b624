//! Plots of the selected stretches (several overlay for comparison), and the settings
//! window.

use super::commands::Command;
use super::edit::Edit;
use super::state::ShelfwindApp;
use crate::physics::{DragChoice, m_s_to_knots};
use crate::plan::{Plan, StretchInfo};
use crate::scenario::ModelSettings;
use eframe::egui::{self, Color32, RichText};
use egui_plot::{Bar, BarChart, HLine, Legend, Line, Plot, PlotPoints, Points, Span, VLine};

const PALETTE: [Color32; 4] = [
    Color32::from_rgb(0, 90, 181),
    Color32::from_rgb(220, 50, 32),
    Color32::from_rgb(0, 150, 110),
    Color32::from_rgb(150, 80, 170),
];

fn hours_since(t0: chrono::DateTime<chrono::Utc>, t: chrono::DateTime<chrono::Utc>) -> f64 {
    (t - t0).num_seconds() as f64 / 3600.0
}

/// The plots panel.
pub(super) fn plots_ui(app: &mut ShelfwindApp, ui: &mut egui::Ui, _commands: &mut Vec<Command>) {
    let Some(plan) = app.plan.clone() else { return };
    let Some(&t0) = app.view.timeline.first() else {
        return;
    };
    let chosen: Vec<&StretchInfo> = app
        .view
        .selected
        .iter()
        .filter_map(|id| plan.stretches.iter().find(|s| &s.id == id))
        .take(PALETTE.len())
        .collect();
    if chosen.is_empty() {
        ui.label("Select a stretch in the list or on the map to see its plots.");
        return;
    }
    let names: Vec<String> = chosen.iter().map(|s| s.name.clone()).collect();
    ui.label(RichText::new(format!("Plots: {}", names.join(", "))).strong());
    let now_x = app
        .view
        .timeline
        .get(app.view.hour)
        .map(|t| hours_since(t0, *t));
    let tz = plan.time_zone;
    let x_fmt = move |mark: egui_plot::GridMark, _range: &std::ops::RangeInclusive<f64>| {
        let t = t0 + chrono::Duration::minutes((mark.value * 60.0) as i64);
        let local = t.with_timezone(&tz);
        if chrono::Timelike::hour(&local) == 0 {
            local.format("%a %-d").to_string()
        } else {
            local.format("%H:%M").to_string()
        }
    };
    let limit = plan.vessel.wind_limit_kt;
    let unsafe_spans = unsafe_runs(&plan, chosen[0], t0);
    let link = egui::Id::unique("shelfwind-plots-x");
    let height = ((ui.available_height() - 80.0) / 2.0).max(90.0);
    let several = chosen.len() > 1;
    // The title (with units) above each plot, rather than a vertical axis label that
    // small plots clip.
    let plot = |ui: &mut egui::Ui, id: &str, title: &str| {
        ui.label(RichText::new(title).strong());
        let p = Plot::new(id.to_string())
            .height(height)
            .x_axis_formatter(x_fmt)
            .x_grid_spacer(egui_plot::uniform_grid_spacer(|_| [6.0, 24.0, 168.0]))
            .link_axis(link, [true, false])
            .link_cursor(link, [true, false])
            .allow_scroll(false);
        if several {
            p.legend(Legend::default())
        } else {
            p
        }
    };
    let decorate = |p: &mut egui_plot::PlotUi<'_>, shade: bool| {
        if shade {
            for (a, b) in &unsafe_spans {
                p.span(
                    Span::new("", *a..=*b).fill(Color32::from_rgba_unmultiplied(197, 27, 125, 40)),
                );
            }
        }
        if let Some(x) = now_x {
            p.vline(VLine::new("chosen time", x).color(Color32::from_gray(60)));
        }
    };
    let series = |s: &StretchInfo, f: &dyn Fn(&crate::plan::StretchHour) -> f64| -> Vec<[f64; 2]> {
        s.hours
            .iter()
            .map(|h| [hours_since(t0, h.time), f(h)])
            .collect()
    };
    ui.columns(3, |cols| {
        plot(
            &mut cols[0],
            "wind",
            "Wind speed (kt); shaded: over the boat's limit",
        )
        .show(&mut cols[0], |p| {
            decorate(p, true);
            p.hline(
                HLine::new(format!("boat's limit {limit:.0} kt"), limit)
                    .color(Color32::from_rgb(197, 27, 125)),
            );
            for (k, s) in chosen.iter().enumerate() {
                p.line(
                    Line::new(
                        s.name.clone(),
                        PlotPoints::from(series(s, &|h| m_s_to_knots(h.wind.speed_m_s()))),
                    )
                    .color(PALETTE[k]),
                );
            }
        });
        plot(&mut cols[1], "direction", "Wind from (degrees true)")
            .include_y(0.0)
            .include_y(360.0)
            .show(&mut cols[1], |p| {
                decorate(p, false);
                for (k, s) in chosen.iter().enumerate() {
                    let pts: Vec<[f64; 2]> = s
                        .hours
                        .iter()
                        .filter_map(|h| {
                            h.wind
                                .direction_from_deg()
                                .map(|d| [hours_since(t0, h.time), d])
                        })
                        .collect();
                    p.points(
                        Points::new(s.name.clone(), PlotPoints::from(pts))
                            .color(PALETTE[k])
                            .radius(1.5),
                    );
                }
            });
        plot(&mut cols[2], "stress", "Alongshore wind stress (N/m²)").show(&mut cols[2], |p| {
            decorate(p, false);
            for (k, s) in chosen.iter().enumerate() {
                p.line(
                    Line::new(
                        s.name.clone(),
                        PlotPoints::from(series(s, &|h| h.alongshore_stress_pa)),
                    )
                    .color(PALETTE[k]),
                );
            }
        });
    });
    ui.columns(3, |cols| {
        plot(&mut cols[0], "index", "Upwelling index (m³/s per 100 m)").show(&mut cols[0], |p| {
            decorate(p, true);
            p.hline(HLine::new("0", 0.0).color(Color32::from_gray(120)));
            for (k, s) in chosen.iter().enumerate() {
                p.line(
                    Line::new(
                        s.name.clone(),
                        PlotPoints::from(series(s, &|h| h.index_m3s_per_100m)),
                    )
                    .color(PALETTE[k]),
                );
            }
        });
        plot(
            &mut cols[1],
            "cumulative",
            "Cumulative index (m³/s per 100 m × days)",
        )
        .show(&mut cols[1], |p| {
            decorate(p, false);
            for (k, s) in chosen.iter().enumerate() {
                let pts: Vec<[f64; 2]> = s
                    .days
                    .iter()
                    .map(|d| [noon_x(&plan, d.date, t0), d.cumulative_m3s_per_100m_days])
                    .collect();
                p.line(Line::new(s.name.clone(), PlotPoints::from(pts)).color(PALETTE[k]));
            }
        });
        plot(
            &mut cols[2],
            "productivity",
            "Expected productivity (%), by day",
        )
        .include_y(0.0)
        .include_y(100.0)
        .show(&mut cols[2], |p| {
            decorate(p, false);
            let width = 20.0 / chosen.len() as f64;
            for (k, s) in chosen.iter().enumerate() {
                let bars: Vec<Bar> = s
                    .days
                    .iter()
                    .map(|d| {
                        Bar::new(
                            noon_x(&plan, d.date, t0) - 10.0 + width * (k as f64 + 0.5),
                            100.0 * d.response.productivity,
                        )
                        .width(width * 0.9)
                    })
                    .collect();
                p.bar_chart(BarChart::new(s.name.clone(), bars).color(PALETTE[k]));
            }
        });
    });
}

fn noon_x(plan: &Plan, date: chrono::NaiveDate, t0: chrono::DateTime<chrono::Utc>) -> f64 {
    hours_since(t0, crate::localtime::local_noon(plan.time_zone, date))
}

/// Runs of hours over the boat's wind limit (at the stretch or on the way), as x ranges.
fn unsafe_runs(plan: &Plan, s: &StretchInfo, t0: chrono::DateTime<chrono::Utc>) -> Vec<(f64, f64)> {
    let mut runs: Vec<(f64, f64)> = Vec::new();
    for h in &s.hours {
        if s.route_wind_kt(h.time)
            .is_none_or(|w| w > plan.vessel.wind_limit_kt)
        {
            let x = hours_since(t0, h.time);
            match runs.last_mut() {
                Some(last) if (x - last.1) <= 1.01 => last.1 = x + 1.0,
                _ => runs.push((x, x + 1.0)),
            }
        }
    }
    runs
}

fn number(
    ui: &mut egui::Ui,
    label: &str,
    value: &mut f64,
    range: std::ops::RangeInclusive<f64>,
    unit: &str,
    default: f64,
) {
    ui.label(label);
    ui.add(
        egui::DragValue::new(value)
            .range(range)
            .speed(0.05 * default.abs().max(0.1))
            .suffix(format!(" {unit}")),
    );
    ui.label(RichText::new(format!("default {default}")).small().weak());
    ui.end_row();
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
            ui.label(RichText::new("Wind stress and transport").strong());
            egui::Grid::new("physics").num_columns(3).show(ui, |ui| {
                ui.label("Drag law");
                egui::ComboBox::from_id_salt("drag")
                    .selected_text(draft.index.drag.to_string())
                    .show_ui(ui, |ui| {
                        for choice in [
                            DragChoice::default(),
                            DragChoice::LargePond1981,
                            DragChoice::Trenberth1990,
                            DragChoice::LargeYeager2009,
                        ] {
                            ui.selectable_value(&mut draft.index.drag, choice, choice.to_string());
                        }
                    });
                ui.label(RichText::new("default constant 1.3e-3").small().weak());
                ui.end_row();
                number(
                    ui,
                    "Air density",
                    &mut draft.index.rho_air_kg_m3,
                    0.5..=2.0,
                    "kg/m³",
                    d.index.rho_air_kg_m3,
                );
                number(
                    ui,
                    "Sea-water density",
                    &mut draft.index.rho_water_kg_m3,
                    950.0..=1100.0,
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
            ui.separator();
            ui.label(RichText::new("Upwelling events").strong());
            egui::Grid::new("events").num_columns(3).show(ui, |ui| {
                number(
                    ui,
                    "Threshold",
                    &mut draft.events.threshold_m3s_per_100m,
                    -1000.0..=5000.0,
                    "m³/s per 100 m",
                    d.events.threshold_m3s_per_100m,
                );
                number(
                    ui,
                    "Shortest event",
                    &mut draft.events.min_duration_h,
                    0.0..=720.0,
                    "h",
                    d.events.min_duration_h,
                );
                number(
                    ui,
                    "Lulls bridged up to",
                    &mut draft.events.max_gap_h,
                    0.0..=240.0,
                    "h",
                    d.events.max_gap_h,
                );
            });
            ui.separator();
            ui.label(
                RichText::new(
                    "Biological response (a planning model: tune it to your catch records)",
                )
                .strong(),
            );
            let r = &mut draft.response;
            let dr = d.response;
            egui::Grid::new("response").num_columns(3).show(ui, |ui| {
                number(
                    ui,
                    "Bloom peaks after",
                    &mut r.lag_peak_days,
                    0.5..=30.0,
                    "days",
                    dr.lag_peak_days,
                );
                number(
                    ui,
                    "Lag shape",
                    &mut r.lag_shape,
                    1.1..=20.0,
                    "",
                    dr.lag_shape,
                );
                number(
                    ui,
                    "Optimum index",
                    &mut r.optimum_m3s_per_100m,
                    1.0..=2000.0,
                    "m³/s per 100 m",
                    dr.optimum_m3s_per_100m,
                );
                number(
                    ui,
                    "Flushing scale",
                    &mut r.flush_scale_m3s_per_100m,
                    1.0..=10_000.0,
                    "m³/s per 100 m",
                    dr.flush_scale_m3s_per_100m,
                );
                number(
                    ui,
                    "Long events from",
                    &mut r.long_event_days,
                    0.5..=60.0,
                    "days",
                    dr.long_event_days,
                );
                number(
                    ui,
                    "Relaxation bonus",
                    &mut r.relaxation_bonus,
                    0.0..=1.0,
                    "",
                    dr.relaxation_bonus,
                );
                number(
                    ui,
                    "Bonus fades over",
                    &mut r.relaxation_window_days,
                    0.5..=30.0,
                    "days",
                    dr.relaxation_window_days,
                );
                number(
                    ui,
                    "Pumping band",
                    &mut r.pumping_width_km,
                    0.0..=100.0,
                    "km",
                    dr.pumping_width_km,
                );
            });
            ui.separator();
            ui.label(RichText::new("Trips").strong());
            let t = &mut draft.trip;
            let dt = d.trip;
            egui::Grid::new("trip").num_columns(3).show(ui, |ui| {
                number(
                    ui,
                    "Fishing day target",
                    &mut t.target_fishing_hours,
                    0.5..=24.0,
                    "h",
                    dt.target_fishing_hours,
                );
                number(
                    ui,
                    "Fewest fishing hours",
                    &mut t.min_fishing_hours,
                    0.0..=24.0,
                    "h",
                    dt.min_fishing_hours,
                );
                number(
                    ui,
                    "Distance weight",
                    &mut t.distance_weight,
                    0.0..=1.0,
                    "",
                    dt.distance_weight,
                );
                number(
                    ui,
                    "Tie margin",
                    &mut t.tie_margin_points,
                    0.0..=50.0,
                    "points",
                    dt.tie_margin_points,
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
