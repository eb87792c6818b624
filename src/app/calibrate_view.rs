//! Calibration on a catch log for co-op managers: a log and the wind of its period are
//! calibrated in the background ([`crate::calibrate::calibrate_scenario`]); the window
//! gives the verdict in one sentence, the skill, the fitted parameters with their
//! ranges, the catch rates against expected productivity (current and fitted settings),
//! and ρ against the lag peak; "Use these settings" applies a supported fit as one
//! undoable edit.

use super::check_view::{Swatch, legend_row, still_plot};
use super::commands::Command;
use super::edit::Edit;
use super::state::ShelfwindApp;
use super::tasks::{
    PROBLEM_COLOUR, ProgressJob, finished, paths_field, paths_in, start_job, start_row,
    tool_window_size,
};
use crate::calibrate::{
    CalibrateOptions, Calibration, Params, RANGE_RHO, calibrate_scenario, calibrated_scenario,
};
use crate::coast::Land;
use crate::wind::load_sources;
use eframe::egui::{self, Color32, RichText};
use egui_plot::{AxisHints, Line, PlotPoints, Points};
use std::path::PathBuf;
use std::sync::Arc;

const CURRENT: Color32 = Color32::from_gray(140);
const FITTED: Color32 = Color32::from_rgb(0, 90, 181);
const SUPPORTED: Color32 = Color32::from_rgb(0, 120, 80);
/// Height of each plot, points.
const PLOT_HEIGHT_PT: f32 = 240.0;

/// A finished calibration, with the log's name as the scenario will record it.
#[derive(Debug)]
pub struct CalibrateResult {
    /// The calibration.
    pub calibration: Calibration,
    /// The log's file name.
    pub log_name: String,
    /// The species kept, if filtered.
    pub species: Option<String>,
}

type CalibrateJob = ProgressJob<CalibrateResult>;

/// The state of the calibration window.
#[derive(Default)]
pub struct CalibrateView {
    /// Window shown.
    pub open: bool,
    /// The catch log's path.
    pub log_text: String,
    /// Wind files of the log's period, one path per line.
    pub wind_text: String,
    /// Keep only this species (empty: all).
    pub species_text: String,
    /// The last calibration.
    pub result: Option<Arc<CalibrateResult>>,
    /// Why the calibration did not run, shown under its button.
    pub message: Option<String>,
    /// Where the files were filled in from.
    pub filled_from: Option<String>,
    job: Option<CalibrateJob>,
}

impl std::fmt::Debug for CalibrateView {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("CalibrateView")
            .field("open", &self.open)
            .field("log", &self.log_text)
            .finish_non_exhaustive()
    }
}

impl CalibrateView {
    /// A calibration is running.
    #[must_use]
    pub fn busy(&self) -> bool {
        self.job.is_some()
    }

    fn poll(&mut self) {
        let Some(result) = finished(&mut self.job) else {
            return;
        };
        match result {
            Ok(r) => {
                self.message = None;
                self.result = Some(Arc::new(r));
            }
            Err(e) => {
                self.message = Some(format!(
                    "The log was not calibrated; nothing changed.\n\n{e}"
                ));
            }
        }
    }
}

impl ShelfwindApp {
    /// Opens the calibration window; empty fields are filled in: with the demo's
    /// invented catch log and spring when they lie beside the scenario, else the wind
    /// with the season window's record or the scenario's forecast.
    pub(super) fn open_calibrate(&mut self) {
        let v = &mut self.calibrate;
        v.open = true;
        if !v.log_text.trim().is_empty() || !v.wind_text.trim().is_empty() {
            return;
        }
        let dir = self.doc.base_dir.clone();
        let (log, wind) = (
            crate::scenario::DEMO_CATCH_LOG_FILE,
            crate::scenario::DEMO_RECORD_WIND_FILE,
        );
        if dir.join(log).is_file() && dir.join(wind).is_file() {
            v.log_text = log.to_string();
            v.wind_text = wind.to_string();
            v.filled_from = Some(
                "Filled in with the demo's invented catch log and spring of wind (synthetic, not a real fleet's)."
                    .into(),
            );
        } else {
            let wind = self.record_wind_text();
            self.calibrate.wind_text = wind;
        }
    }

    fn start_calibrate_job(&mut self, ctx: &egui::Context) {
        let log = self.calibrate.log_text.trim().to_string();
        let wind = paths_in(&self.calibrate.wind_text);
        if log.is_empty() || wind.is_empty() {
            self.calibrate.message = Some(
                "Give the catch log and at least one wind file of its period, one path per line."
                    .into(),
            );
            return;
        }
        let log_path = self.wind_paths(&[PathBuf::from(&log)]).remove(0);
        let wind = self.wind_paths(&wind);
        let species =
            Some(self.calibrate.species_text.trim().to_string()).filter(|s| !s.is_empty());
        let options = CalibrateOptions {
            species: species.clone(),
            ..CalibrateOptions::default()
        };
        let scenario = self.doc.scenario.clone();
        let land_model = self.land_model();
        let v = &mut self.calibrate;
        start_job(
            (&mut v.job, &mut v.message),
            ("calibration", ctx),
            move |progress| {
                let land = land_model.as_deref().unwrap_or_else(|| Land::bundled());
                let sources = load_sources(&wind).map_err(|e| e.to_string())?;
                let calibration =
                    calibrate_scenario(&scenario, land, &sources, &log_path, &options, progress)?;
                Ok(CalibrateResult {
                    calibration,
                    log_name: log_path
                        .file_name()
                        .map_or_else(String::new, |n| n.to_string_lossy().into_owned()),
                    species,
                })
            },
        );
    }
}

/// The calibration window.
pub(super) fn calibrate_window(
    app: &mut ShelfwindApp,
    ctx: &egui::Context,
    commands: &mut Vec<Command>,
) {
    app.calibrate.poll();
    let mut open = app.calibrate.open;
    let mut run = false;
    let scenario = app.doc.scenario.clone();
    egui::Window::new("Calibrate on a catch log")
        .open(&mut open)
        .default_size(tool_window_size(ctx, 900.0))
        .vscroll(true)
        .show(ctx, |ui| {
            let v = &mut app.calibrate;
            run = inputs_ui(v, ui);
            let Some(result) = v.result.clone() else {
                ui.label(
                    "Give the co-op's landings (CSV: date, stretch_id or segment_id or lat and \
                     lon, catch_kg, effort_h or trips) and the wind of their period. The \
                     response settings are fitted to how well they order the catch rates, \
                     tested on seasons they were not fitted to and against shuffled logs; \
                     nothing changes unless the log supports it.",
                );
                return;
            };
            ui.separator();
            result_ui(&result, &scenario, ui, commands);
        });
    app.calibrate.open = open;
    if run {
        app.start_calibrate_job(ctx);
    }
}

/// The log, the wind, the species, and the button; true when clicked.
fn inputs_ui(v: &mut CalibrateView, ui: &mut egui::Ui) -> bool {
    ui.horizontal(|ui| {
        let label = ui.label("Catch log (CSV)");
        ui.add(egui::TextEdit::singleline(&mut v.log_text).desired_width(f32::INFINITY))
            .labelled_by(label.id);
    });
    paths_field(
        ui,
        "Wind files of the log's period (GRIB2, NetCDF or CSV), one path per line",
        &mut v.wind_text,
        2,
    );
    ui.horizontal(|ui| {
        let label = ui.label("Species (empty: all)");
        ui.add(egui::TextEdit::singleline(&mut v.species_text).desired_width(160.0))
            .labelled_by(label.id);
    });
    if let Some(f) = &v.filled_from {
        ui.label(RichText::new(f).small().weak());
    }
    start_row(
        ui,
        "Calibrate",
        (
            v.job.as_ref().map(|(p, _)| &**p),
            "reading the wind and fitting",
        ),
        v.message.as_deref(),
    )
}

/// The verdict, the numbers, the button and the plots.
fn result_ui(
    r: &CalibrateResult,
    scenario: &crate::scenario::Scenario,
    ui: &mut egui::Ui,
    commands: &mut Vec<Command>,
) {
    let c = &r.calibration;
    let f = &c.fit;
    let colour = if f.supported() {
        SUPPORTED
    } else {
        PROBLEM_COLOUR
    };
    ui.label(RichText::new(c.verdict()).strong().color(colour));
    ui.label(
        RichText::new(
            "A fit says how well the tool ordered past days on this coast; it is not a promise of fish.",
        )
        .small()
        .weak(),
    );
    ui.label(format!(
        "{} landings used (catch per {}); {} skipped, {} of other species or vessels.",
        c.landings.len(),
        c.effort_unit.name(),
        c.skipped.len(),
        c.filtered_out
    ));
    let opt = |x: Option<f64>| x.map_or_else(|| "–".to_string(), |v| format!("{v:.3}"));
    egui::Grid::new("calibration skill")
        .striped(true)
        .show(ui, |ui| {
            for (what, value) in c.skill_rows() {
                ui.label(what);
                ui.label(opt(value));
                ui.end_row();
            }
        });
    params_ui(c, ui);
    let applied = calibrated_scenario(scenario, c, &r.log_name, r.species.as_deref());
    ui.horizontal(|ui| {
        let button = ui.add_enabled(applied.is_some(), egui::Button::new("Use these settings"));
        let button = if applied.is_some() {
            button.on_hover_text("Applies the fitted settings as one step (Ctrl+Z undoes it)")
        } else {
            button.on_disabled_hover_text("The log does not support a change")
        };
        if button.clicked()
            && let Some(s) = applied
        {
            commands.push(Command::Edit(Edit::SetSettings(s.settings)));
        }
        if let Some(record) = &scenario.settings.calibration {
            ui.label(
                RichText::new(format!(
                    "The scenario's settings were calibrated on {} on {}.",
                    record.log, record.calibrated_on
                ))
                .small()
                .weak(),
            );
        }
    });
    ui.columns(2, |cols| {
        scatter_ui(c, &mut cols[0]);
        lag_ui(c, &mut cols[1]);
    });
}

/// Each parameter: current, fitted, and the range within [`RANGE_RHO`] of the best.
fn params_ui(c: &Calibration, ui: &mut egui::Ui) {
    let f = &c.fit;
    let now = Params::of(&c.base);
    egui::Grid::new("calibration parameters")
        .striped(true)
        .show(ui, |ui| {
            for h in [
                "Parameter",
                "Current",
                "Fitted",
                &format!("Range within {RANGE_RHO} of the best ρ"),
            ] {
                ui.label(RichText::new(h).strong());
            }
            ui.end_row();
            for (name, a, b, (lo, hi)) in [
                (
                    "Lag to the response's peak (days)",
                    now.lag_peak_days,
                    f.best.lag_peak_days,
                    f.ranges[0],
                ),
                (
                    "Optimum index (m³/s per 100 m)",
                    now.optimum_m3s_per_100m,
                    f.best.optimum_m3s_per_100m,
                    f.ranges[1],
                ),
                (
                    "Flush scale (m³/s per 100 m)",
                    now.flush_scale_m3s_per_100m,
                    f.best.flush_scale_m3s_per_100m,
                    f.ranges[2],
                ),
                (
                    "Relaxation bonus",
                    now.relaxation_bonus,
                    f.best.relaxation_bonus,
                    f.ranges[3],
                ),
            ] {
                ui.label(name);
                ui.label(format!("{a}"));
                ui.label(format!("{b}"));
                ui.label(format!("{lo} to {hi}"));
                ui.end_row();
            }
        });
}

/// Catch rate against expected productivity, current and fitted.
fn scatter_ui(c: &Calibration, ui: &mut egui::Ui) {
    ui.label(RichText::new("Catch rate against expected productivity").strong());
    legend_row(
        ui,
        &[
            (Swatch::Fill, "current settings", CURRENT),
            (Swatch::Fill, "fitted settings", FITTED),
        ],
    );
    let points = |pred: &[f64]| -> Vec<[f64; 2]> {
        pred.iter()
            .zip(&c.landings)
            .map(|(p, l)| [p * 100.0, l.cpue])
            .collect()
    };
    let unit = format!("Catch (kg per {})", c.effort_unit.name());
    still_plot("calibration scatter", PLOT_HEIGHT_PT)
        .custom_x_axes(vec![AxisHints::new_x().label("Expected productivity (%)")])
        .custom_y_axes(vec![AxisHints::new_y().label(unit)])
        .include_x(0.0)
        .include_y(0.0)
        .show(ui, |p| {
            p.points(
                Points::new(
                    "current settings",
                    PlotPoints::new(points(&c.fit.predicted_default)),
                )
                .color(CURRENT)
                .radius(2.0),
            );
            p.points(
                Points::new(
                    "fitted settings",
                    PlotPoints::new(points(&c.fit.predicted_best)),
                )
                .color(FITTED)
                .radius(2.0),
            );
        });
}

/// The best ρ on the whole log for each lag peak.
fn lag_ui(c: &Calibration, ui: &mut egui::Ui) {
    ui.label(RichText::new("Skill against the lag peak").strong());
    legend_row(
        ui,
        &[
            (Swatch::Line, "best ρ with that lag (whole log)", FITTED),
            (Swatch::Fill, "current lag", CURRENT),
        ],
    );
    let line: Vec<[f64; 2]> = c.fit.lag_profile.iter().map(|(l, r)| [*l, *r]).collect();
    let now = c.base.lag_peak_days;
    let (lo, hi) = c
        .fit
        .lag_profile
        .iter()
        .fold((0.0f64, 0.0f64), |(a, b), (_, r)| (a.min(*r), b.max(*r)));
    still_plot("calibration lags", PLOT_HEIGHT_PT)
        .custom_x_axes(vec![
            AxisHints::new_x().label("Lag to the response's peak (days)"),
        ])
        .custom_y_axes(vec![AxisHints::new_y().label("Spearman's ρ")])
        .include_y(lo)
        .include_y(hi)
        .show(ui, |p| {
            p.line(
                Line::new("best ρ", PlotPoints::new(line))
                    .color(FITTED)
                    .width(2.0),
            );
            p.line(
                Line::new("current lag", PlotPoints::new(vec![[now, lo], [now, hi]]))
                    .color(CURRENT)
                    .width(1.5),
            );
        });
}
