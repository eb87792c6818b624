//! The season view for co-op managers: a long wind record analysed in the background,
//! cumulative-index curves per season, monthly means side by side for several segments,
//! the metrics table sortable by column, and exports of the table (CSV) and the plots
//! (PNG), written in the background.

use super::state::ShelfwindApp;
use super::tasks::Task;
use crate::atomic::write_atomic;
use crate::coast::{Land, resolve_segments};
use crate::export::{SeasonFormat, flag_text, render_seasons};
use crate::progress::Progress;
use crate::scenario::{record_settings, segment_names};
use crate::upwelling::{SegmentSeasons, analyse_record};
use crate::wind::load_sources;
use eframe::egui::{self, Color32, RichText};
use egui_plot::{Bar, BarChart, Legend, Line, Plot, PlotPoints};
use std::path::PathBuf;
use std::sync::Arc;
use std::sync::mpsc::{Receiver, channel};

const PALETTE: [Color32; 6] = [
    Color32::from_rgb(0, 90, 181),
    Color32::from_rgb(220, 50, 32),
    Color32::from_rgb(0, 150, 110),
    Color32::from_rgb(150, 80, 170),
    Color32::from_rgb(230, 140, 0),
    Color32::from_rgb(90, 90, 90),
];

/// Table columns, for sorting.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SortBy {
    /// Segment, then season.
    #[default]
    Segment,
    /// Season year.
    Season,
    /// Spring transition (earliest first).
    Transition,
    /// Season length.
    Length,
    /// Total upwelling.
    Total,
    /// Number of events.
    Events,
}

/// The table's columns: heading, and the order a click on it sets (`None`: not sortable).
const COLUMNS: [(&str, Option<SortBy>); 9] = [
    ("Segment", Some(SortBy::Segment)),
    ("Season", Some(SortBy::Season)),
    ("Coverage", None),
    ("Spring transition", Some(SortBy::Transition)),
    ("End", None),
    ("Length (days)", Some(SortBy::Length)),
    ("Total", Some(SortBy::Total)),
    ("Events", Some(SortBy::Events)),
    ("Note", None),
];

/// The state of the season view.
#[derive(Default)]
pub struct SeasonView {
    /// Window shown.
    pub open: bool,
    /// The record's files, one path per line.
    pub files_text: String,
    /// The last analysis.
    pub result: Option<Arc<Vec<SegmentSeasons>>>,
    /// Segments shown in the plots.
    pub selected: Vec<String>,
    /// Table order.
    pub sort: SortBy,
    /// Descending order.
    pub descending: bool,
    /// A message (error or done).
    pub message: Option<String>,
    /// Path for the exports.
    pub export_path: String,
    /// The plots' rectangle, for the PNG export.
    plots_rect: Option<egui::Rect>,
    /// A PNG export waiting for its screenshot.
    pending_png: Option<(PathBuf, Receiver<Arc<egui::ColorImage>>)>,
    /// An export being written.
    export: Option<Task<String>>,
    job: Option<SeasonJob>,
}

/// A running analysis: its progress and its task.
type SeasonJob = (Arc<Progress>, Task<Result<Vec<SegmentSeasons>, String>>);

impl std::fmt::Debug for SeasonView {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("SeasonView")
            .field("open", &self.open)
            .field("files", &self.files_text)
            .finish_non_exhaustive()
    }
}

impl SeasonView {
    /// Work is pending even with the window closed.
    pub(super) fn pending_png_or_job(&self) -> bool {
        self.pending_png.is_some() || self.job.is_some() || self.export.is_some()
    }

    /// Takes the results of finished background work.
    fn poll(&mut self) {
        if let Some(r) = self.export.as_ref().and_then(Task::poll) {
            self.export = None;
            self.message = Some(r.unwrap_or_else(|e| e));
        }
        let Some(result) = self.job.as_ref().and_then(|(_, task)| task.poll()) else {
            return;
        };
        self.job = None;
        match result.and_then(|r| r) {
            Ok(r) => {
                if self.selected.is_empty() {
                    self.selected = r.iter().take(3).map(|s| s.segment_id.clone()).collect();
                }
                self.result = Some(Arc::new(r));
            }
            Err(e) => {
                self.message = Some(format!("The record was not read; nothing changed.\n\n{e}"));
            }
        }
    }
}

impl ShelfwindApp {
    fn start_season_job(&mut self, ctx: &egui::Context) {
        let files: Vec<PathBuf> = self
            .season
            .files_text
            .lines()
            .map(str::trim)
            .filter(|l| !l.is_empty())
            .map(PathBuf::from)
            .collect();
        if files.is_empty() {
            self.season.message =
                Some("Give at least one wind file of the record, one path per line.".into());
            return;
        }
        let scenario = self.doc.scenario.clone();
        let files = self.wind_paths(&files);
        let progress = Arc::new(Progress::new());
        let worker = progress.clone();
        let task = Task::spawn("seasons", ctx, move || {
            let segments =
                resolve_segments(&scenario.segments, Land::bundled()).map_err(|e| e.to_string())?;
            let sources = load_sources(&files).map_err(|e| e.to_string())?;
            let names = segment_names(Some(&scenario), &segments);
            analyse_record(
                &segments,
                &names,
                &sources,
                &record_settings(&scenario),
                &worker,
            )
            .map_err(|e| e.to_string())
        });
        match task {
            Ok(task) => {
                self.season.message = None;
                self.season.job = Some((progress, task));
            }
            Err(e) => self.season.message = Some(e),
        }
    }

    /// Crops the screenshot to the plots and hands encoding and writing to a task.
    fn take_screenshot(&mut self, ctx: &egui::Context) {
        let Some((path, rx)) = &self.season.pending_png else {
            return;
        };
        let Ok(image) = rx.try_recv() else { return };
        let path = path.clone();
        self.season.pending_png = None;
        let rect = self.season.plots_rect.unwrap_or(egui::Rect::EVERYTHING);
        let cropped = image.region(&rect, Some(ctx.pixels_per_point()));
        let task = Task::spawn("plots-png", ctx, move || {
            let result = encode_png(&cropped)
                .and_then(|png| write_atomic(&path, &png).map_err(|e| e.to_string()));
            match result {
                Ok(()) => format!("Plots written to {}", path.display()),
                Err(e) => format!("The plots were not written to {}: {e}", path.display()),
            }
        });
        self.season.start_export(task);
    }
}

/// A screenshot as PNG bytes.
fn encode_png(image: &egui::ColorImage) -> Result<Vec<u8>, String> {
    let [w, h] = image.size;
    let rgba: Vec<u8> = image.pixels.iter().flat_map(Color32::to_array).collect();
    let mut png = Vec::new();
    image::ImageBuffer::<image::Rgba<u8>, _>::from_raw(w as u32, h as u32, rgba)
        .ok_or_else(|| "the screenshot has an unexpected size".to_string())?
        .write_to(&mut std::io::Cursor::new(&mut png), image::ImageFormat::Png)
        .map_err(|e| e.to_string())?;
    Ok(png)
}

impl SeasonView {
    fn start_export(&mut self, task: Result<Task<String>, String>) {
        match task {
            Ok(t) => self.export = Some(t),
            Err(e) => self.message = Some(e),
        }
    }
}

fn sorted_rows(result: &[SegmentSeasons], sort: SortBy, descending: bool) -> Vec<(usize, usize)> {
    let mut rows: Vec<(usize, usize)> = result
        .iter()
        .enumerate()
        .flat_map(|(s, seg)| (0..seg.years.len()).map(move |y| (s, y)))
        .collect();
    let key = |&(s, y): &(usize, usize)| -> (f64, String) {
        let year = &result[s].years[y];
        let v = match sort {
            SortBy::Segment => 0.0,
            SortBy::Season => f64::from(year.year),
            SortBy::Transition => year
                .spring_transition
                .map_or(f64::INFINITY, |d| (d - year.season_start).num_days() as f64),
            SortBy::Length => year.length_days.map_or(f64::NEG_INFINITY, |l| l as f64),
            SortBy::Total => year.total_upwelling.unwrap_or(f64::NEG_INFINITY),
            SortBy::Events => year.event_count as f64,
        };
        (v, format!("{} {}", result[s].name, year.year))
    };
    rows.sort_by(|a, b| {
        let (ka, kb) = (key(a), key(b));
        ka.0.total_cmp(&kb.0).then(ka.1.cmp(&kb.1))
    });
    if descending {
        rows.reverse();
    }
    rows
}

/// The season window.
pub(super) fn season_window(app: &mut ShelfwindApp, ctx: &egui::Context) {
    app.season.poll();
    app.take_screenshot(ctx);
    let mut open = app.season.open;
    let mut analyse = false;
    egui::Window::new("Seasons: compare segments over years of wind")
        .open(&mut open)
        .default_size([1000.0, 720.0])
        .vscroll(true)
        .show(ctx, |ui| {
            let v = &mut app.season;
            analyse = record_ui(v, ui);
            let Some(result) = v.result.clone() else {
                ui.label("Seasons run from 1 January (1 July in the south). A season with too few days of data is flagged and gets no metrics (Model settings: seasons).");
                return;
            };
            ui.separator();
            segment_choice_ui(v, &result, ui);
            let plots = ui.scope(|ui| season_plots_ui(v, &result, ui));
            v.plots_rect = Some(plots.response.rect);
            ui.label(RichText::new("Months are numbered from the season start (1 = January, or July in the south).").small().weak());
            ui.separator();
            ui.label(RichText::new("Season metrics (Bograd et al. 2009); click a heading to sort").strong());
            table_ui(v, &result, ui);
            ui.separator();
            export_ui(v, &result, ui);
        });
    app.season.open = open;
    if analyse {
        app.start_season_job(ctx);
    }
}

/// The record's files, and the button that analyses them; true when clicked.
fn record_ui(v: &mut SeasonView, ui: &mut egui::Ui) -> bool {
    let label = ui.label("Wind record files (GRIB2 or CSV), one path per line");
    ui.add(
        egui::TextEdit::multiline(&mut v.files_text)
            .desired_rows(3)
            .desired_width(f32::INFINITY),
    )
    .labelled_by(label.id);
    let mut analyse = false;
    ui.horizontal(|ui| {
        if v.job.is_none() && ui.button("Analyse the record").clicked() {
            analyse = true;
        }
        if let Some((p, _)) = &v.job {
            ui.spinner();
            ui.add(
                egui::ProgressBar::new(p.fraction())
                    .desired_width(200.0)
                    .text("reading the record"),
            );
            if ui.button("Cancel").clicked() {
                p.cancel();
            }
        }
    });
    if let Some(m) = &v.message {
        ui.label(RichText::new(m).color(Color32::from_rgb(150, 40, 0)));
    }
    analyse
}

/// The segments to show in the plots.
fn segment_choice_ui(v: &mut SeasonView, result: &[SegmentSeasons], ui: &mut egui::Ui) {
    ui.horizontal_wrapped(|ui| {
        ui.label("Show:");
        for s in result {
            let mut on = v.selected.contains(&s.segment_id);
            if ui.checkbox(&mut on, &s.name).changed() {
                if on {
                    v.selected.push(s.segment_id.clone());
                } else {
                    v.selected.retain(|x| x != &s.segment_id);
                }
            }
        }
    });
}

/// Cumulative-index curves per season and monthly means, side by side.
fn season_plots_ui(v: &SeasonView, result: &[SegmentSeasons], ui: &mut egui::Ui) {
    let chosen: Vec<&SegmentSeasons> = result
        .iter()
        .filter(|s| v.selected.contains(&s.segment_id))
        .take(PALETTE.len())
        .collect();
    ui.columns(2, |cols| {
        cols[0].label(
            RichText::new("Cumulative index by season (m³/s per 100 m × days), by day of season")
                .strong(),
        );
        Plot::new("season-cui")
            .height(260.0)
            .legend(Legend::default())
            .show(&mut cols[0], |p| {
                for (k, s) in chosen.iter().enumerate() {
                    for y in s.years.iter().filter(|y| !y.cumulative.is_empty()) {
                        let pts: Vec<[f64; 2]> = y
                            .cumulative
                            .iter()
                            .enumerate()
                            .map(|(d, c)| [d as f64 + 1.0, *c])
                            .collect();
                        p.line(
                            Line::new(format!("{} {}", s.name, y.year), PlotPoints::from(pts))
                                .color(PALETTE[k]),
                        );
                    }
                }
            });
        cols[1].label(
            RichText::new("Monthly mean index across complete seasons (m³/s per 100 m)").strong(),
        );
        Plot::new("season-months")
            .height(260.0)
            .legend(Legend::default())
            .show(&mut cols[1], |p| {
                let width = 0.8 / chosen.len().max(1) as f64;
                for (k, s) in chosen.iter().enumerate() {
                    let bars: Vec<Bar> = s
                        .climatology
                        .monthly_mean
                        .iter()
                        .enumerate()
                        .filter_map(|(m, v)| {
                            v.map(|v| {
                                Bar::new(m as f64 + 1.0 - 0.4 + width * (k as f64 + 0.5), v)
                                    .width(width * 0.9)
                            })
                        })
                        .collect();
                    p.bar_chart(BarChart::new(s.name.clone(), bars).color(PALETTE[k]));
                }
            });
    });
}

/// The metrics table, sorted by the column clicked.
fn table_ui(v: &mut SeasonView, result: &[SegmentSeasons], ui: &mut egui::Ui) {
    egui::Grid::new("season-table")
        .striped(true)
        .show(ui, |ui| {
            for (label, key) in COLUMNS {
                let arrow = match key {
                    Some(k) if k == v.sort && v.descending => " v",
                    Some(k) if k == v.sort => " ^",
                    _ => "",
                };
                if ui
                    .button(RichText::new(format!("{label}{arrow}")).strong())
                    .clicked()
                    && let Some(key) = key
                {
                    if v.sort == key {
                        v.descending = !v.descending;
                    } else {
                        v.sort = key;
                        v.descending =
                            matches!(key, SortBy::Length | SortBy::Total | SortBy::Events);
                    }
                }
            }
            ui.end_row();
            let date = |d: Option<chrono::NaiveDate>| {
                d.map(|d| d.format("%-d %b").to_string())
                    .unwrap_or_default()
            };
            for (s, y) in sorted_rows(result, v.sort, v.descending) {
                let seg = &result[s];
                let year = &seg.years[y];
                ui.label(&seg.name);
                ui.label(year.year.to_string());
                ui.label(format!("{:.0} %", 100.0 * year.coverage));
                ui.label(date(year.spring_transition));
                ui.label(date(year.season_end));
                ui.label(year.length_days.map(|l| l.to_string()).unwrap_or_default());
                ui.label(
                    year.total_upwelling
                        .map(|t| format!("{t:.0}"))
                        .unwrap_or_default(),
                );
                ui.label(year.event_count.to_string());
                ui.label(
                    RichText::new(flag_text(year.flag.as_ref()))
                        .color(Color32::from_rgb(150, 40, 0)),
                );
                ui.end_row();
            }
        });
}

/// Exports of the table (CSV) and the plots (PNG), written in the background.
fn export_ui(v: &mut SeasonView, result: &Arc<Vec<SegmentSeasons>>, ui: &mut egui::Ui) {
    ui.horizontal(|ui| {
        let label = ui.label("Export to");
        ui.add(
            egui::TextEdit::singleline(&mut v.export_path)
                .desired_width(360.0)
                .hint_text("/path/to/seasons.csv or .png"),
        )
        .labelled_by(label.id);
        let path = PathBuf::from(v.export_path.trim());
        let ready = !v.export_path.trim().is_empty() && v.export.is_none();
        let csv = ui.button("Table (CSV)").clicked();
        let png = ui.button("Plots (PNG)").clicked();
        if csv && ready {
            let (result, path) = (result.clone(), path.clone());
            let task = Task::spawn("seasons-csv", ui.ctx(), move || {
                match write_atomic(&path, render_seasons(&result, SeasonFormat::Csv).as_bytes()) {
                    Ok(()) => format!("Table written to {}", path.display()),
                    Err(e) => format!("The table was not written: {e}: {}", path.display()),
                }
            });
            v.start_export(task);
        }
        if png && ready {
            let (tx, rx) = channel();
            let repaint = ui.ctx().clone();
            v.pending_png = Some((path, rx));
            ui.ctx()
                .send_viewport_cmd(egui::ViewportCommand::Screenshot(
                    egui::ScreenshotCallback::new(move |image| {
                        let _ = tx.send(image);
                        repaint.request_repaint();
                    }),
                ));
        }
        if v.export.is_some() {
            ui.spinner();
        }
    });
}
