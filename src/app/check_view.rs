//! The sea check: did the sea cool after the upwelling the tool computed? A period of
//! wind and a measured sea temperature are checked in the background
//! ([`crate::verify::verify_coast`]); the window shows every segment's hit rate, and for
//! the chosen segment a plain sentence, the daily index and the sea temperature on one
//! time axis (two scales) with its events marked confirmed or not, the correlation at
//! each lag, and the events one by one. The map can be coloured by hit rate.

use super::commands::Command;
use super::state::{Colouring, ShelfwindApp};
use super::tasks::{
    PROBLEM_COLOUR, ProgressJob, finished, paths_field, paths_in, start_job, start_row,
    tool_window_size,
};
use crate::coast::{Land, resolve_segments};
use crate::scenario::segment_names;
use crate::upwelling::{CheckSettings, EventCheck};
use crate::verify::{Verification, Verified, VerifyInput, summary, verify_coast};
use crate::wind::load_sources;
use chrono::NaiveDate;
use eframe::egui::{self, Color32, RichText};
use egui_plot::{
    AxisHints, Bar, BarChart, GridMark, HPlacement, HoverPosition, Line, Plot, PlotPoints, Polygon,
};
use std::collections::HashMap;
use std::sync::Arc;

const INDEX_COLOUR: Color32 = Color32::from_rgb(0, 90, 181);
const TEMP_COLOUR: Color32 = Color32::from_rgb(220, 50, 32);
const CONFIRMED: Color32 = Color32::from_rgb(0, 150, 110);
const NOT_CONFIRMED: Color32 = Color32::from_rgb(230, 140, 0);
const UNTOLD: Color32 = Color32::from_gray(150);
/// How strongly an event's days are shaded in the plot and its legend.
const EVENT_SHADE: f32 = 0.3;

/// Names of the plot's lines, as its legend and hover show them.
const INDEX_NAME: &str = "Daily index (left scale)";
const TEMP_NAME: &str = "Sea temperature (right scale)";
const EVENT_CONFIRMED: &str = "Event, sea cooled";
const EVENT_MISSED: &str = "Event, no cooling seen";
const EVENT_UNTOLD: &str = "Event, too little temperature to tell";

/// Height of the plot of the index and the temperature, points.
const PLOT_HEIGHT_PT: f32 = 260.0;
/// Height of the plot of the correlation by lag, points.
const LAG_PLOT_HEIGHT_PT: f32 = 180.0;

/// A finished check: every segment's, with names and hit rates.
#[derive(Debug)]
pub struct CheckResult {
    /// The check of each segment, in the coast's order.
    pub verification: Verification,
    /// Segment names, in the same order.
    pub names: Vec<String>,
    /// Confirmed events over events with data, per segment id (only segments with
    /// events to tell).
    pub hit_rates: HashMap<String, f64>,
}

impl CheckResult {
    fn new(verification: Verification, names: Vec<String>) -> Self {
        let hit_rates = verification
            .segments
            .iter()
            .filter_map(|v| {
                let (told, confirmed) = v.check.hits();
                (told > 0).then(|| (v.segment_id.clone(), confirmed as f64 / told as f64))
            })
            .collect();
        Self {
            verification,
            names,
            hit_rates,
        }
    }
}

/// A running check: its progress and its task.
type CheckJob = ProgressJob<CheckResult>;

/// The state of the sea-check window.
#[derive(Default)]
pub struct CheckView {
    /// Window shown.
    pub open: bool,
    /// Wind files of the period, one path per line.
    pub wind_text: String,
    /// Sea-temperature files, one path per line.
    pub sst_text: String,
    /// Numbers that mark a missing temperature in CSV files, comma-separated.
    pub missing_text: String,
    /// The last check.
    pub result: Option<Arc<CheckResult>>,
    /// The segment shown (its id).
    pub selected: Option<String>,
    /// Why the check did not run, shown under its button.
    pub message: Option<String>,
    /// Where the files were filled in from, shown under them.
    pub filled_from: Option<String>,
    /// The map's selection last followed.
    followed: Option<String>,
    job: Option<CheckJob>,
}

impl std::fmt::Debug for CheckView {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("CheckView")
            .field("open", &self.open)
            .field("selected", &self.selected)
            .finish_non_exhaustive()
    }
}

impl CheckView {
    /// A check is running.
    #[must_use]
    pub fn busy(&self) -> bool {
        self.job.is_some()
    }

    /// The hit rates of the last check, for the map.
    #[must_use]
    pub fn hit_rates(&self) -> Option<&HashMap<String, f64>> {
        self.result.as_deref().map(|r| &r.hit_rates)
    }

    fn poll(&mut self) {
        let Some(result) = finished(&mut self.job) else {
            return;
        };
        match result {
            Ok(r) => {
                let keep = self
                    .selected
                    .as_ref()
                    .is_some_and(|s| r.verification.segments.iter().any(|v| v.segment_id == *s));
                if !keep {
                    // The first segment with events to tell, else the first.
                    self.selected = r
                        .verification
                        .segments
                        .iter()
                        .find(|v| v.check.hits().0 > 0)
                        .or(r.verification.segments.first())
                        .map(|v| v.segment_id.clone());
                }
                self.message = None;
                self.result = Some(Arc::new(r));
            }
            Err(e) => {
                self.message = Some(format!("The check did not run; nothing changed.\n\n{e}"));
            }
        }
    }
}

/// Numbers typed comma-separated; the first that is not a number is named.
fn missing_codes(text: &str) -> Result<Vec<f64>, String> {
    text.split(',')
        .map(str::trim)
        .filter(|t| !t.is_empty())
        .map(|t| {
            t.parse::<f64>()
                .ok()
                .filter(|v| v.is_finite())
                .ok_or_else(|| {
                    format!(
                        "Missing-value codes: \"{t}\" is not a number; expected numbers separated by commas, such as 99, 999."
                    )
                })
        })
        .collect()
}

impl ShelfwindApp {
    /// The wind of a past period, as the tool windows fill it in: the season window's
    /// record, else the scenario's wind files.
    pub(super) fn record_wind_text(&self) -> String {
        if self.season.files_text.trim().is_empty() {
            self.doc
                .scenario
                .wind_files
                .iter()
                .map(|p| p.display().to_string())
                .collect::<Vec<_>>()
                .join("\n")
        } else {
            self.season.files_text.clone()
        }
    }

    /// Opens the sea-check window; empty file lists are filled in: with the demo's
    /// invented spring and buoys when they lie beside the scenario, else with the season
    /// window's record (or the scenario's forecast) for the wind.
    pub(super) fn open_check(&mut self) {
        let v = &mut self.check;
        v.open = true;
        if !v.wind_text.trim().is_empty() || !v.sst_text.trim().is_empty() {
            return;
        }
        let dir = self.doc.base_dir.clone();
        let demo_wind = dir.join(crate::scenario::DEMO_RECORD_WIND_FILE);
        if demo_wind.is_file()
            && crate::scenario::DEMO_BUOY_FILES
                .iter()
                .all(|f| dir.join(f).is_file())
        {
            v.wind_text = crate::scenario::DEMO_RECORD_WIND_FILE.to_string();
            v.sst_text = crate::scenario::DEMO_BUOY_FILES.join("\n");
            v.filled_from = Some(
                "Filled in with the demo's invented spring of wind and two invented buoys (synthetic, not measured)."
                    .into(),
            );
        } else {
            let wind = self.record_wind_text();
            self.check.wind_text = wind;
        }
    }

    fn start_check_job(&mut self, ctx: &egui::Context) {
        let (wind, sst) = (
            paths_in(&self.check.wind_text),
            paths_in(&self.check.sst_text),
        );
        let problem = if wind.is_empty() {
            Some("Give at least one wind file of the period, one path per line.".to_string())
        } else if sst.is_empty() {
            Some("Give at least one sea-temperature file, one path per line.".to_string())
        } else {
            None
        };
        let missing = match missing_codes(&self.check.missing_text) {
            Ok(m) if problem.is_none() => m,
            Ok(_) => {
                self.check.message = problem;
                return;
            }
            Err(e) => {
                self.check.message = Some(e);
                return;
            }
        };
        let scenario = self.doc.scenario.clone();
        let settings = scenario.settings.clone();
        let input = VerifyInput {
            sst_files: self.wind_paths(&sst),
            missing,
            probe_km: settings.sst_check.probe_offshore_km,
            cooling_c: settings.sst_check.cooling_c,
        };
        let wind = self.wind_paths(&wind);
        let land_model = self.land_model();
        let v = &mut self.check;
        start_job(
            (&mut v.job, &mut v.message),
            ("sea check", ctx),
            move |progress| {
                let land = land_model.as_deref().unwrap_or_else(|| Land::bundled());
                let segments =
                    resolve_segments(&scenario.segments, land).map_err(|e| e.to_string())?;
                let sources = load_sources(&wind).map_err(|e| e.to_string())?;
                let names = segment_names(Some(&scenario), &segments);
                let checked = verify_coast(&segments, &sources, &input, &settings, progress)?;
                Ok(CheckResult::new(checked, names))
            },
        );
    }
}

/// The sea-check window.
pub(super) fn check_window(
    app: &mut ShelfwindApp,
    ctx: &egui::Context,
    commands: &mut Vec<Command>,
) {
    app.check.poll();
    follow_map_selection(app);
    let mut open = app.check.open;
    let mut run = false;
    let settings = app.doc.scenario.settings.sst_check;
    let mut to_map = false;
    egui::Window::new("Sea check: did the sea cool after upwelling?")
        .open(&mut open)
        .default_size(tool_window_size(ctx, 980.0))
        .vscroll(true)
        .show(ctx, |ui| {
            let v = &mut app.check;
            run = files_ui(v, ui, settings);
            let Some(result) = v.result.clone() else {
                ui.label(
                    "Give a period of wind (a season or more) and a sea temperature measured \
                     on this coast: a buoy's or the boat's log (CSV or NMEA 0183), or a \
                     gridded analysis (GRIB2 or NetCDF). The check tells, per segment, how \
                     often the tool's upwelling events were followed by cooling, and after \
                     how many days the sea answered best.",
                );
                return;
            };
            ui.separator();
            ui.label(
                RichText::new(
                    "An estimate of how often the tool was right on this coast, not a proof: \
                     other things cool and warm the sea.",
                )
                .small()
                .weak(),
            );
            for w in &result.verification.warnings {
                ui.label(RichText::new(w).small().color(PROBLEM_COLOUR));
            }
            coast_ui(v, &result, ui, commands, &mut to_map);
            ui.separator();
            segment_ui(v, &result, ui);
        });
    app.check.open = open && !to_map;
    if run {
        app.start_check_job(ctx);
    }
}

/// The segment of the stretch chosen on the map, when that choice changes.
fn follow_map_selection(app: &mut ShelfwindApp) {
    let on_map = app.view.selected.first().map(|s| {
        s.rsplit_once('/')
            .map_or(s.as_str(), |(seg, _)| seg)
            .to_string()
    });
    if on_map != app.check.followed {
        if on_map.is_some() {
            app.check.selected.clone_from(&on_map);
        }
        app.check.followed = on_map;
    }
}

/// The files and the button that runs the check; true when clicked.
fn files_ui(
    v: &mut CheckView,
    ui: &mut egui::Ui,
    settings: crate::scenario::SstCheckSettings,
) -> bool {
    paths_field(
        ui,
        "Wind files of the period (GRIB2, NetCDF or CSV), one path per line",
        &mut v.wind_text,
        2,
    );
    paths_field(
        ui,
        "Sea-temperature files (CSV, NMEA 0183, GRIB2 or NetCDF), one path per line, preferred first",
        &mut v.sst_text,
        2,
    );
    if let Some(f) = &v.filled_from {
        ui.label(RichText::new(f).small().weak());
    }
    ui.horizontal(|ui| {
        let label = ui.label("Missing-value codes in CSV files");
        ui.add(
            egui::TextEdit::singleline(&mut v.missing_text)
                .hint_text("e.g. 99, 999")
                .desired_width(120.0),
        )
        .labelled_by(label.id);
    });
    ui.label(
        RichText::new(format!(
            "An event is confirmed by {} °C of cooling; a grid is read {} km offshore of each \
             segment (Edit > Model settings… > Sea-temperature check).",
            settings.cooling_c, settings.probe_offshore_km
        ))
        .small()
        .weak(),
    );
    start_row(
        ui,
        "Run the check",
        (
            v.job.as_ref().map(|(p, _)| &**p),
            "reading the wind and the sea",
        ),
        v.message.as_deref(),
    )
}

fn percent(rate: Option<f64>) -> String {
    rate.map_or_else(|| "–".to_string(), |r| format!("{:.0} %", r * 100.0))
}

/// The whole coast: a sentence, a row per segment (its name picks it), and the button
/// that colours the map by hit rate (and sets `to_map`, closing the window).
fn coast_ui(
    v: &mut CheckView,
    result: &CheckResult,
    ui: &mut egui::Ui,
    commands: &mut Vec<Command>,
    to_map: &mut bool,
) {
    let (told, confirmed) = result
        .verification
        .segments
        .iter()
        .map(|s| s.check.hits())
        .fold((0, 0), |a, b| (a.0 + b.0, a.1 + b.1));
    ui.horizontal_wrapped(|ui| {
        ui.label(
            RichText::new(format!(
                "Whole coast: {confirmed} of {told} upwelling events with sea-temperature data were followed by cooling."
            ))
            .strong(),
        );
        if ui
            .button("Show hit rates on the map")
            .on_hover_text("Colours the coast by hit rate and closes this window; the result is kept")
            .clicked()
        {
            commands.push(Command::SetColouring(Colouring::HitRate));
            *to_map = true;
        }
    });
    egui::Grid::new("check segments")
        .striped(true)
        .num_columns(6)
        .show(ui, |ui| {
            for h in [
                "Segment",
                "Days with both",
                "Events told",
                "Confirmed",
                "Hit rate",
                "Best lag (r)",
            ] {
                ui.label(RichText::new(h).strong());
            }
            ui.end_row();
            for (s, name) in result.verification.segments.iter().zip(&result.names) {
                let (told, confirmed) = s.check.hits();
                let chosen = v.selected.as_deref() == Some(s.segment_id.as_str());
                if ui.selectable_label(chosen, name).clicked() {
                    v.selected = Some(s.segment_id.clone());
                }
                ui.label(s.check.days.to_string());
                ui.label(told.to_string());
                ui.label(confirmed.to_string());
                ui.label(percent(result.hit_rates.get(&s.segment_id).copied()));
                ui.label(s.check.best.map_or_else(
                    || "–".to_string(),
                    |b| format!("{} d ({:.2})", b.lag_days, b.r),
                ));
                ui.end_row();
            }
        });
}

/// The chosen segment: its sentence, the two plots and its events.
fn segment_ui(v: &CheckView, result: &CheckResult, ui: &mut egui::Ui) {
    let settings = result.verification.settings;
    let Some((k, s)) = result
        .verification
        .segments
        .iter()
        .enumerate()
        .find(|(_, s)| Some(&s.segment_id) == v.selected.as_ref())
    else {
        ui.label("Pick a segment in the table or on the map.");
        return;
    };
    ui.label(RichText::new(&result.names[k]).heading());
    ui.label(summary(&s.check, &settings));
    if s.temp_daily.is_empty() {
        ui.label(
            RichText::new("No sea-temperature file covers this segment.").color(PROBLEM_COLOUR),
        );
    }
    series_plot_ui(s, ui);
    lag_plot_ui(s, ui);
    events_ui(&s.check.events, &settings, ui);
}

/// A plot with no pan or zoom, so the window scrolls over it.
pub(super) fn still_plot<'a>(id: &str, height: f32) -> Plot<'a> {
    Plot::new(id)
        .height(height)
        .allow_drag(false)
        .allow_zoom(false)
        .allow_scroll(false)
        .allow_boxed_zoom(false)
        .allow_axis_zoom_drag(false)
        .allow_double_click_reset(false)
}

/// How a legend entry is drawn.
#[derive(Clone, Copy)]
pub(super) enum Swatch {
    /// A short line.
    Line,
    /// A filled square.
    Fill,
}

/// A legend above a plot, so that it hides no data: a painted swatch and a name each.
pub(super) fn legend_row(ui: &mut egui::Ui, entries: &[(Swatch, &str, Color32)]) {
    ui.horizontal_wrapped(|ui| {
        for (swatch, name, colour) in entries {
            let (rect, _) = ui.allocate_exact_size(egui::vec2(16.0, 10.0), egui::Sense::hover());
            let shape = match swatch {
                Swatch::Line => egui::Rect::from_center_size(rect.center(), egui::vec2(16.0, 2.5)),
                Swatch::Fill => rect,
            };
            ui.painter().rect_filled(shape, 1.0, *colour);
            ui.label(RichText::new(*name).small());
            ui.add_space(8.0);
        }
    });
}

/// The next "nice" step (1, 2 or 5 times a power of ten) at or above `x`.
fn nice_step(x: f64) -> f64 {
    let x = x.max(1e-6);
    let power = 10f64.powf(x.log10().floor());
    [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| m * power)
        .find(|s| *s >= x * (1.0 - 1e-9))
        .unwrap_or(10.0 * power)
}

/// The index's scale (left) and the temperature's (right) on one plot: each grid line
/// falls on a round value of both.
#[derive(Clone, Copy, Debug, PartialEq)]
struct TwoScales {
    /// Lowest and highest index shown, multiples of `index_step`.
    index: (f64, f64),
    index_step: f64,
    /// Temperature at the lowest grid line, and per grid step.
    temp_low: f64,
    temp_step: f64,
}

impl TwoScales {
    /// Scales that hold `index` (with 0) and `temps`, in about four steps.
    fn fit(index: impl Iterator<Item = f64>, temps: impl Iterator<Item = f64>) -> Self {
        let range = |v: &mut dyn Iterator<Item = f64>| {
            v.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), x| {
                (a.min(x), b.max(x))
            })
        };
        let (lo, hi) = range(&mut index.chain([0.0]));
        let index_step = nice_step((hi - lo).max(10.0) / 4.0);
        let low = (lo / index_step).floor() * index_step;
        // At least four steps, so that the temperature's scale has room too.
        let index = (
            low,
            ((hi / index_step).ceil() * index_step).max(low + 4.0 * index_step),
        );
        let steps = ((index.1 - index.0) / index_step).round().max(1.0);
        let (t_lo, t_hi) = range(&mut temps.filter(|t| t.is_finite()));
        let (t_lo, t_hi) = if t_lo.is_finite() {
            (t_lo, t_hi)
        } else {
            (10.0, 20.0)
        };
        let mut temp_step = nice_step((t_hi - t_lo).max(0.4) / steps);
        let mut temp_low = (t_lo / temp_step).floor() * temp_step;
        while temp_low + steps * temp_step < t_hi {
            temp_step = nice_step(temp_step * 1.01);
            temp_low = (t_lo / temp_step).floor() * temp_step;
        }
        Self {
            index,
            index_step,
            temp_low,
            temp_step,
        }
    }

    fn of(s: &Verified) -> Self {
        Self::fit(
            s.index_daily.values().copied(),
            s.temp_daily.values().copied(),
        )
    }

    fn to_index_scale(self, t: f64) -> f64 {
        self.index.0 + (t - self.temp_low) / self.temp_step * self.index_step
    }

    fn to_temp(self, y: f64) -> f64 {
        self.temp_low + (y - self.index.0) / self.index_step * self.temp_step
    }

    /// The grid lines: every step of the index from the lowest to the highest shown.
    fn marks(self) -> Vec<GridMark> {
        let steps = ((self.index.1 - self.index.0) / self.index_step).round() as usize;
        (0..=steps)
            .map(|k| GridMark {
                value: self.index.0 + k as f64 * self.index_step,
                step_size: self.index_step,
            })
            .collect()
    }
}

/// The first day of both series.
fn first_day(s: &Verified) -> Option<NaiveDate> {
    let a = s.index_daily.keys().next();
    let b = s.temp_daily.keys().next();
    a.into_iter().chain(b).min().copied()
}

fn day_x(first: NaiveDate, d: NaiveDate) -> f64 {
    (d - first).num_days() as f64
}

/// The daily index and the sea temperature on one time axis, events shaded.
fn series_plot_ui(s: &Verified, ui: &mut egui::Ui) {
    let Some(first) = first_day(s) else {
        ui.label("No days to plot.");
        return;
    };
    let scales = TwoScales::of(s);
    let date_axis = AxisHints::new_x()
        .label("Date (UTC)")
        .formatter(move |mark, _| {
            first
                .checked_add_days(chrono::Days::new(mark.value.max(0.0) as u64))
                .map(|d| d.format("%-d %b").to_string())
                .unwrap_or_default()
        });
    let left = AxisHints::new_y().label("Index (m³/s per 100 m)");
    let decimals = usize::from(scales.temp_step < 1.0);
    let right = AxisHints::new_y()
        .label("Sea temperature (°C)")
        .placement(HPlacement::Right)
        .formatter(move |mark, _| format!("{:.*}", decimals, scales.to_temp(mark.value)));
    let plot = still_plot("check series", PLOT_HEIGHT_PT)
        .custom_x_axes(vec![date_axis])
        .custom_y_axes(vec![left, right])
        .include_y(scales.index.0)
        .include_y(scales.index.1)
        .y_grid_spacer(move |_| scales.marks())
        .label_formatter(move |pos| {
            let HoverPosition::NearDataPoint {
                plot_name,
                position,
                ..
            } = pos
            else {
                return None;
            };
            let day = first
                .checked_add_days(chrono::Days::new(position.x.floor().max(0.0) as u64))
                .map(|d| d.format("%-d %b %Y").to_string())
                .unwrap_or_default();
            Some(match *plot_name {
                TEMP_NAME => format!("{day}: {:.2} °C", scales.to_temp(position.y)),
                INDEX_NAME => format!("{day}: index {:.0} m³/s per 100 m", position.y),
                _ => day,
            })
        });
    ui.label(RichText::new("Index and sea temperature, day by day").strong());
    legend_row(
        ui,
        &[
            (Swatch::Line, INDEX_NAME, INDEX_COLOUR),
            (Swatch::Line, TEMP_NAME, TEMP_COLOUR),
            (
                Swatch::Fill,
                EVENT_CONFIRMED,
                CONFIRMED.gamma_multiply(EVENT_SHADE),
            ),
            (
                Swatch::Fill,
                EVENT_MISSED,
                NOT_CONFIRMED.gamma_multiply(EVENT_SHADE),
            ),
            (
                Swatch::Fill,
                EVENT_UNTOLD,
                UNTOLD.gamma_multiply(EVENT_SHADE),
            ),
        ],
    );
    plot.show(ui, |p| {
        for e in &s.check.events {
            let (name, colour) = event_look(e);
            let (x0, x1) = (day_x(first, e.onset), day_x(first, e.end) + 1.0);
            let (y0, y1) = scales.index;
            p.polygon(
                Polygon::new(
                    name,
                    PlotPoints::new(vec![[x0, y0], [x1, y0], [x1, y1], [x0, y1]]),
                )
                .fill_color(colour.gamma_multiply(EVENT_SHADE))
                .stroke(egui::Stroke::NONE)
                .allow_hover(false),
            );
        }
        let index: Vec<[f64; 2]> = s
            .index_daily
            .iter()
            .map(|(d, i)| [day_x(first, *d) + 0.5, *i])
            .collect();
        p.line(
            Line::new(INDEX_NAME, PlotPoints::new(index))
                .color(INDEX_COLOUR)
                .width(1.5),
        );
        let temp: Vec<[f64; 2]> = s
            .temp_daily
            .iter()
            .map(|(d, t)| [day_x(first, *d) + 0.5, scales.to_index_scale(*t)])
            .collect();
        p.line(
            Line::new(TEMP_NAME, PlotPoints::new(temp))
                .color(TEMP_COLOUR)
                .width(1.5),
        );
    });
}

/// An event's legend name and colour.
fn event_look(e: &EventCheck) -> (&'static str, Color32) {
    match e.confirmed {
        Some(true) => (EVENT_CONFIRMED, CONFIRMED),
        Some(false) => (EVENT_MISSED, NOT_CONFIRMED),
        None => (EVENT_UNTOLD, UNTOLD),
    }
}

/// Pearson's r of the index with the temperature anomaly at each lag; the best lag
/// with its 95 % interval.
fn lag_plot_ui(s: &Verified, ui: &mut egui::Ui) {
    ui.label(RichText::new("Correlation of the index with the sea's anomaly, by lag").strong());
    let best = s.check.best.map(|b| b.lag_days);
    let bars: Vec<Bar> = s
        .check
        .by_lag
        .iter()
        .filter_map(|l| {
            let r = l.r?;
            let colour = if Some(l.lag_days) == best {
                TEMP_COLOUR
            } else {
                INDEX_COLOUR
            };
            Some(
                Bar::new(l.lag_days as f64, r)
                    .width(0.7)
                    .fill(colour)
                    .name(format!(
                        "lag {} d: r = {r:.2} ({} days)",
                        l.lag_days, l.pairs
                    )),
            )
        })
        .collect();
    legend_row(
        ui,
        &[
            (Swatch::Fill, "r at each lag", INDEX_COLOUR),
            (Swatch::Fill, "the best lag", TEMP_COLOUR),
            (Swatch::Line, "its 95 % interval", Color32::BLACK),
        ],
    );
    let plot = still_plot("check lags", LAG_PLOT_HEIGHT_PT)
        .custom_x_axes(vec![AxisHints::new_x().label("Days after the wind")])
        .custom_y_axes(vec![AxisHints::new_y().label("Pearson's r")])
        .include_y(-1.0)
        .include_y(1.0)
        .include_x(-0.5)
        .include_x(10.5);
    plot.show(ui, |p| {
        p.bar_chart(BarChart::new("r at each lag (best in red)", bars));
        if let Some(b) = s.check.best {
            let x = b.lag_days as f64;
            p.line(
                Line::new(
                    "95 % interval at the best lag",
                    PlotPoints::new(vec![[x, b.interval.0], [x, b.interval.1]]),
                )
                .color(Color32::BLACK)
                .width(2.0),
            );
        }
    });
    ui.label(
        RichText::new("Negative r: the sea is colder after stronger upwelling, as expected.")
            .small()
            .weak(),
    );
}

/// The events one by one.
fn events_ui(events: &[EventCheck], settings: &CheckSettings, ui: &mut egui::Ui) {
    ui.label(
        RichText::new(format!(
            "Upwelling events (confirmed by {} °C of cooling within {} days of their end)",
            settings.cooling_c, settings.days_after_event
        ))
        .strong(),
    );
    if events.is_empty() {
        ui.label("No upwelling event in this period.");
        return;
    }
    let c = |x: Option<f64>| x.map_or_else(|| "–".to_string(), |v| format!("{v:.1} °C"));
    egui::Grid::new("check events")
        .striped(true)
        .num_columns(6)
        .show(ui, |ui| {
            for h in [
                "Onset",
                "End",
                "Sea before",
                "Largest cooling",
                "Reached on",
                "Result",
            ] {
                ui.label(RichText::new(h).strong());
            }
            ui.end_row();
            for e in events {
                let (name, colour) = event_look(e);
                ui.label(e.onset.format("%-d %b %Y").to_string());
                ui.label(e.end.format("%-d %b %Y").to_string());
                ui.label(c(e.before_c));
                ui.label(match e.cooling_c {
                    Some(x) if x <= 0.0 => "none (no colder day)".to_string(),
                    x => c(x),
                });
                ui.label(
                    e.seen_on
                        .map_or_else(|| "–".to_string(), |d| d.format("%-d %b").to_string()),
                );
                ui.label(RichText::new(name).color(colour));
                ui.end_row();
            }
        });
}

#[cfg(test)]
mod tests {
    use super::*;

    /// An index of −20 to 280 and a sea of 9.2 to 15.0 °C, worked by hand: index steps
    /// of 100 (300 / 4 = 75, rounded up to a nice step) from −100 to 300; four steps
    /// of 2 °C (5.8 / 4 = 1.45, rounded up) from 8 °C hold the sea, so the grid lines
    /// read −100, 0, 100, 200, 300 on the left and 8, 10, 12, 14, 16 °C on the right.
    #[test]
    fn both_scales_have_round_grid_lines() {
        let s = TwoScales::fit([-20.0, 280.0].into_iter(), [9.2, 15.0].into_iter());
        let marks: Vec<f64> = s.marks().iter().map(|m| m.value).collect();
        assert_eq!(marks, vec![-100.0, 0.0, 100.0, 200.0, 300.0]);
        let temps: Vec<f64> = marks.iter().map(|y| s.to_temp(*y)).collect();
        for (got, want) in temps.iter().zip([8.0, 10.0, 12.0, 14.0, 16.0]) {
            assert!((got - want).abs() < 1e-9, "{temps:?}");
        }
        assert!((s.to_index_scale(11.0) - 50.0).abs() < 1e-9);
    }

    /// A sea that barely changes still gets a scale of tenths, and a calm index still
    /// spans something.
    #[test]
    fn flat_series_get_a_usable_scale() {
        let s = TwoScales::fit([0.0].into_iter(), [12.0, 12.05].into_iter());
        assert!(s.index.1 > s.index.0);
        assert!(s.temp_step <= 0.2 && s.temp_step > 0.0, "{s:?}");
        assert!(s.to_temp(s.index.0) <= 12.0 && s.to_temp(s.index.1) >= 12.05);
    }
}
