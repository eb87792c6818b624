//! The season view for co-op managers: a long wind record analysed in the background,
//! cumulative-index curves per season, monthly means side by side for several segments,
//! the metrics table sortable by column, and exports of the table (CSV) and the plots
//! (PNG), written in the background.
//!
//! The plots leave the mouse wheel and drags to the window, so the window scrolls over
//! them. A PNG export first brings the plots wholly into view, then asks the display for
//! a picture of that frame and cuts the plots out of it; if the plots cannot be shown
//! whole, or no picture comes, the export says so beside its buttons.

use super::settings_window::SEASONS_SECTION;
use super::state::ShelfwindApp;
use super::tasks::{PROBLEM_COLOUR, Task, paths_field, start_row};
use crate::atomic::write_atomic;
use crate::coast::{Land, resolve_segments};
use crate::export::{SeasonFormat, flag_text, render_seasons};
use crate::progress::Progress;
use crate::scenario::{record_settings, segment_names};
use crate::upwelling::{SegmentSeasons, analyse_record};
use crate::wind::load_sources;
use eframe::egui::{self, Color32, RichText};
use egui_plot::{
    AxisHints, Bar, BarChart, Corner, GridMark, HoverPosition, Legend, Line, Plot, PlotPoints,
};
use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::sync::mpsc::{Receiver, TryRecvError, channel};
use std::time::Duration;

const PALETTE: [Color32; 6] = [
    Color32::from_rgb(0, 90, 181),
    Color32::from_rgb(220, 50, 32),
    Color32::from_rgb(0, 150, 110),
    Color32::from_rgb(150, 80, 170),
    Color32::from_rgb(230, 140, 0),
    Color32::from_rgb(90, 90, 90),
];

/// Height of each plot, points.
const PLOT_HEIGHT_PT: f32 = 260.0;

/// How long scrolling the plots into view may take before a PNG export gives up, s.
const SCROLL_WAIT_S: f64 = 1.0;

/// How long the display may take to give its picture before a PNG export gives up, s.
const SCREENSHOT_WAIT_S: f64 = 5.0;

const MONTH_NAMES: [&str; 12] = [
    "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
];

/// Days in each month of a year without 29 February, January first.
const MONTH_DAYS: [u32; 12] = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

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
    /// The outcome of the last export (written, or why not), shown under the export
    /// buttons.
    pub message: Option<String>,
    /// Why the record was not analysed, shown under its button.
    pub record_message: Option<String>,
    /// Path for the exports.
    pub export_path: String,
    /// Whether the export message says it went well.
    message_tone: Tone,
    /// The export message is new: scroll it into view once.
    message_is_new: bool,
    /// A PNG export on its way to the screenshot.
    png: Option<PngExport>,
    /// An export being written: what was written, or why not.
    export: Option<Task<Result<String, String>>>,
    job: Option<SeasonJob>,
}

/// A running analysis: its progress and its task.
type SeasonJob = (Arc<Progress>, Task<Result<Vec<SegmentSeasons>, String>>);

/// A PNG export of the plots, from the click to the screenshot.
enum PngExport {
    /// The plots are being scrolled into view (asked at `since_s`, input time).
    Showing { path: PathBuf, since_s: f64 },
    /// The screenshot is asked for; `plots` is where the plots were on screen, points.
    Shooting {
        path: PathBuf,
        plots: egui::Rect,
        since_s: f64,
        rx: Receiver<Arc<egui::ColorImage>>,
    },
}

/// How an export went, for the colour of its message.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
enum Tone {
    /// Written.
    #[default]
    Done,
    /// Not written.
    Problem,
}

/// What an export writes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Export {
    /// The metrics table, as CSV.
    Table,
    /// The plots, as PNG.
    Plots,
}

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
        self.png.is_some() || self.job.is_some() || self.export.is_some()
    }

    /// Takes the results of finished background work.
    fn poll(&mut self) {
        if let Some(r) = self.export.as_ref().and_then(Task::poll) {
            self.export = None;
            self.tell(r.and_then(|r| r));
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
                self.record_message =
                    Some(format!("The record was not read; nothing changed.\n\n{e}"));
            }
        }
    }

    /// Shows an export's outcome under the export buttons.
    fn tell(&mut self, outcome: Result<String, String>) {
        self.message_tone = if outcome.is_ok() {
            Tone::Done
        } else {
            Tone::Problem
        };
        self.message = Some(match outcome {
            Ok(m) | Err(m) => m,
        });
        self.message_is_new = true;
    }

    fn start_export(&mut self, task: Result<Task<Result<String, String>>, String>) {
        match task {
            Ok(t) => self.export = Some(t),
            Err(e) => self.tell(Err(e)),
        }
    }

    /// Writes the table in the background, to the path typed.
    fn export_table(&mut self, result: &Arc<Vec<SegmentSeasons>>, ctx: &egui::Context) {
        let path = match export_target(&self.export_path, Export::Table) {
            Ok(p) => p,
            Err(e) => return self.tell(Err(e)),
        };
        self.message = None;
        let result = result.clone();
        let task = Task::spawn("seasons-csv", ctx, move || {
            let csv = render_seasons(&result, SeasonFormat::Csv);
            match write_atomic(&path, csv.as_bytes()) {
                Ok(()) => Ok(format!("Table written to {}", path.display())),
                Err(e) => Err(format!(
                    "The table was not written: {e}: {}",
                    path.display()
                )),
            }
        });
        self.start_export(task);
    }

    /// Starts a PNG export: the plots are brought into view first.
    fn export_plots(&mut self, now_s: f64) {
        match export_target(&self.export_path, Export::Plots) {
            Ok(path) => {
                self.message = None;
                self.png = Some(PngExport::Showing {
                    path,
                    since_s: now_s,
                });
            }
            Err(e) => self.tell(Err(e)),
        }
    }

    /// While a PNG export waits for the plots, scrolls them wholly into view.
    fn bring_plots_into_view(&self, ui: &egui::Ui, plots: egui::Rect) {
        if matches!(self.png, Some(PngExport::Showing { .. }))
            && !wholly_shown(plots, ui.clip_rect())
        {
            ui.scroll_to_rect_animation(
                plots,
                Some(egui::Align::TOP),
                egui::style::ScrollAnimation::none(),
            );
        }
    }

    /// Moves a PNG export on: asks for the screenshot once the plots are wholly on
    /// screen (`plots`: their rectangle and the visible part of the window this frame,
    /// if drawn), hands the picture to a task, or gives up with a message.
    fn advance_png(&mut self, ctx: &egui::Context, plots: Option<(egui::Rect, egui::Rect)>) {
        let now_s = ctx.input(|i| i.time);
        match self.png.take() {
            None => {}
            Some(PngExport::Showing { path, since_s }) => {
                let visible = |(rect, clip): (egui::Rect, egui::Rect)| {
                    wholly_shown(rect, clip.intersect(ctx.content_rect())).then_some(rect)
                };
                if let Some(rect) = plots.and_then(visible) {
                    self.png = Some(ask_screenshot(ctx, path, rect, now_s));
                } else if now_s - since_s > SCROLL_WAIT_S {
                    let why = if plots.is_some() {
                        "they do not fit on screen; make the window larger and try again"
                    } else {
                        "the Seasons window was closed or folded"
                    };
                    self.tell(Err(format!(
                        "The plots were not written: {why}: {}",
                        path.display()
                    )));
                } else {
                    self.png = Some(PngExport::Showing { path, since_s });
                    ctx.request_repaint();
                }
            }
            Some(PngExport::Shooting {
                path,
                plots,
                since_s,
                rx,
            }) => match rx.try_recv() {
                Ok(image) => {
                    let task = png_task(ctx, path, plots, image);
                    self.start_export(task);
                }
                Err(TryRecvError::Empty) if now_s - since_s <= SCREENSHOT_WAIT_S => {
                    self.png = Some(PngExport::Shooting {
                        path,
                        plots,
                        since_s,
                        rx,
                    });
                    ctx.request_repaint_after(Duration::from_millis(200));
                }
                Err(_) => self.tell(Err(format!(
                    "The plots were not written: the display gave no picture of the \
                     window; try again: {}",
                    path.display()
                ))),
            },
        }
    }
}

/// The rectangle is not empty and lies within `visible` (a point of rounding allowed).
fn wholly_shown(rect: egui::Rect, visible: egui::Rect) -> bool {
    rect.is_positive() && rect.is_finite() && visible.expand(1.0).contains_rect(rect)
}

/// Asks the display for a picture of this frame, in which the plots are at `plots`.
fn ask_screenshot(ctx: &egui::Context, path: PathBuf, plots: egui::Rect, now_s: f64) -> PngExport {
    let (tx, rx) = channel();
    let repaint = ctx.clone();
    ctx.send_viewport_cmd(egui::ViewportCommand::Screenshot(
        egui::ScreenshotCallback::new(move |image| {
            let _ = tx.send(image);
            repaint.request_repaint();
        }),
    ));
    ctx.request_repaint();
    PngExport::Shooting {
        path,
        plots,
        since_s: now_s,
        rx,
    }
}

/// Cuts the plots out of the picture, encodes and writes them, in the background.
fn png_task(
    ctx: &egui::Context,
    path: PathBuf,
    plots: egui::Rect,
    image: Arc<egui::ColorImage>,
) -> Result<Task<Result<String, String>>, String> {
    let pixels_per_point = ctx.pixels_per_point();
    Task::spawn("plots-png", ctx, move || {
        let written = crop_plots(&image, plots, pixels_per_point)
            .and_then(|plots| encode_png(&plots))
            .and_then(|png| write_atomic(&path, &png).map_err(|e| e.to_string()));
        match written {
            Ok(()) => Ok(format!("Plots written to {}", path.display())),
            Err(e) => Err(format!(
                "The plots were not written: {e}: {}",
                path.display()
            )),
        }
    })
}

/// The plots cut out of a screenshot; `plots` in points. An error when they are not
/// wholly on the picture.
fn crop_plots(
    image: &egui::ColorImage,
    plots: egui::Rect,
    pixels_per_point: f32,
) -> Result<egui::ColorImage, String> {
    let [width_px, height_px] = image.size;
    let px = |v: f32| (v * pixels_per_point).round().max(0.0) as usize;
    let (x0, y0) = (px(plots.min.x), px(plots.min.y));
    let (x1, y1) = (
        px(plots.max.x).min(width_px),
        px(plots.max.y).min(height_px),
    );
    // A pixel of rounding at each edge is allowed.
    let whole = plots.is_finite()
        && x1 > x0
        && y1 > y0
        && x1 - x0 + 2 >= px(plots.width())
        && y1 - y0 + 2 >= px(plots.height());
    if !whole {
        return Err("the plots were not wholly on screen".to_string());
    }
    Ok(image.region_by_pixels([x0, y0], [x1 - x0, y1 - y0]))
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

/// The file typed for an export, or why it cannot take this export.
fn export_target(text: &str, what: Export) -> Result<PathBuf, String> {
    let path = PathBuf::from(text.trim());
    let is_png = has_extension(&path, "png");
    match what {
        _ if text.trim().is_empty() => Err(match what {
            Export::Table => "Type the file to write the table to, e.g. seasons.csv".to_string(),
            Export::Plots => "Type the file to write the plots to, e.g. seasons.png".to_string(),
        }),
        Export::Table if is_png => Err(format!(
            "The table was not written: a .png name is for the plots; give a .csv name: {}",
            path.display()
        )),
        Export::Plots if !is_png => Err(format!(
            "The plots were not written: the file name must end in .png: {}",
            path.display()
        )),
        Export::Table | Export::Plots => Ok(path),
    }
}

fn has_extension(path: &Path, ext: &str) -> bool {
    path.extension()
        .is_some_and(|e| e.eq_ignore_ascii_case(ext))
}

impl ShelfwindApp {
    fn start_season_job(&mut self, ctx: &egui::Context) {
        let files = super::tasks::paths_in(&self.season.files_text);
        if files.is_empty() {
            self.season.record_message =
                Some("Give at least one wind file of the record, one path per line.".into());
            return;
        }
        let scenario = self.doc.scenario.clone();
        let files = self.wind_paths(&files);
        let progress = Arc::new(Progress::new());
        let worker = progress.clone();
        let land_model = self.land_model();
        let task = Task::spawn("seasons", ctx, move || {
            let land = land_model.as_deref().unwrap_or_else(|| Land::bundled());
            let segments = resolve_segments(&scenario.segments, land).map_err(|e| e.to_string())?;
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
                self.season.record_message = None;
                self.season.job = Some((progress, task));
            }
            Err(e) => self.season.record_message = Some(e),
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

/// Where the data needed per season is set, as the menus and the settings window name it.
fn settings_place() -> String {
    format!("Edit > Model settings… > {SEASONS_SECTION}")
}

/// The season window.
pub(super) fn season_window(app: &mut ShelfwindApp, ctx: &egui::Context) {
    app.season.poll();
    let mut open = app.season.open;
    let mut analyse = false;
    // The plots' rectangle and the visible part of the window, when drawn this frame.
    let mut plots_drawn = None;
    egui::Window::new("Seasons: compare segments over years of wind")
        .open(&mut open)
        .default_size([1000.0, 720.0])
        .vscroll(true)
        .show(ctx, |ui| {
            let v = &mut app.season;
            analyse = record_ui(v, ui);
            let Some(result) = v.result.clone() else {
                ui.label(format!(
                    "Seasons run from 1 January (1 July in the south). A season with too \
                     few days of data is flagged and gets no metrics; the data needed is \
                     set in {}.",
                    settings_place()
                ));
                return;
            };
            ui.separator();
            segment_choice_ui(v, &result, ui);
            let plots = ui.scope(|ui| season_plots_ui(v, &result, ui)).response.rect;
            v.bring_plots_into_view(ui, plots);
            plots_drawn = Some((plots, ui.clip_rect()));
            ui.separator();
            ui.label(
                RichText::new("Season metrics (Bograd et al. 2009); click a heading to sort")
                    .strong(),
            );
            ui.label(
                RichText::new(format!(
                    "Seasons with too little data get no metrics ({}).",
                    settings_place()
                ))
                .small()
                .weak(),
            );
            table_ui(v, &result, ui);
            ui.separator();
            export_ui(v, &result, ui);
        });
    app.season.open = open;
    app.season.advance_png(ctx, plots_drawn);
    if analyse {
        app.start_season_job(ctx);
    }
}

/// The record's files, and the button that analyses them; true when clicked.
fn record_ui(v: &mut SeasonView, ui: &mut egui::Ui) -> bool {
    paths_field(
        ui,
        "Wind record files (GRIB2, NetCDF or CSV), one path per line",
        &mut v.files_text,
        3,
    );
    start_row(
        ui,
        "Analyse the record",
        (v.job.as_ref().map(|(p, _)| &**p), "reading the record"),
        v.record_message.as_deref(),
    )
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
    let ticked = result
        .iter()
        .filter(|s| v.selected.contains(&s.segment_id))
        .count();
    if ticked > PALETTE.len() {
        ui.label(
            RichText::new(format!(
                "The plots show the first {} segments ticked.",
                PALETTE.len()
            ))
            .small()
            .weak(),
        );
    }
}

/// A segment in the plots: its seasons, its name in the legends, and its colour.
struct Shown<'a> {
    seg: &'a SegmentSeasons,
    name: String,
    colour: Color32,
}

/// The segments ticked, up to one per colour, in the table's order. Two segments of the
/// same name are told apart by their ids, since the legends group lines by name.
fn shown<'a>(v: &SeasonView, result: &'a [SegmentSeasons]) -> Vec<Shown<'a>> {
    let chosen: Vec<&SegmentSeasons> = result
        .iter()
        .filter(|s| v.selected.contains(&s.segment_id))
        .take(PALETTE.len())
        .collect();
    chosen
        .iter()
        .zip(PALETTE)
        .map(|(seg, colour)| {
            let twins = chosen.iter().filter(|o| o.name == seg.name).count() > 1;
            let name = if twins {
                format!("{} ({})", seg.name, seg.segment_id)
            } else {
                seg.name.clone()
            };
            Shown { seg, name, colour }
        })
        .collect()
}

/// How the month axis runs for the segments shown.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Months {
    /// Every segment shown is northern: seasons from January.
    FromJanuary,
    /// Every segment shown is southern: seasons from July.
    FromJuly,
    /// Both: monthly means by calendar month, the curves by day of season.
    Mixed,
}

impl Months {
    fn of(shown: &[Shown<'_>]) -> Self {
        let south = shown.iter().filter(|s| s.seg.southern).count();
        match south {
            0 => Self::FromJanuary,
            n if n == shown.len() => Self::FromJuly,
            _ => Self::Mixed,
        }
    }

    /// The first month on the axis, 0 = January.
    fn first(self) -> usize {
        if self == Self::FromJuly { 6 } else { 0 }
    }

    /// Where month `k` of a season (0-based, from the season's start) stands on the
    /// month axis, 0-based.
    fn slot(self, southern: bool, k: usize) -> usize {
        if self == Self::Mixed && southern {
            (k + 6) % 12
        } else {
            k
        }
    }

    /// The name of the month at `slot` on the axis.
    fn name(self, slot: usize) -> &'static str {
        MONTH_NAMES[(self.first() + slot) % 12]
    }

    /// How to read the axes.
    fn note(self) -> &'static str {
        match self {
            Self::FromJanuary => "Seasons run from 1 January to 31 December.",
            Self::FromJuly => {
                "Southern seasons run from 1 July to 30 June; the table names each by \
                 the year it starts in."
            }
            Self::Mixed => {
                "Northern seasons start on 1 January, southern ones on 1 July: the curves \
                 are drawn by day of season, the monthly means by calendar month."
            }
        }
    }
}

/// The first day of each month as day of season (1 = the season's first day), in a
/// season without 29 February; `first` is the season's first month, 0 = January.
fn month_starts(first: usize) -> [f64; 12] {
    let mut starts = [0.0; 12];
    let mut day = 1.0;
    for (k, start) in starts.iter_mut().enumerate() {
        *start = day;
        day += f64::from(MONTH_DAYS[(first + k) % 12]);
    }
    starts
}

/// Month names that fit `width_pt` per month: three letters, or one when narrow.
fn month_label(name: &str, width_pt: f32) -> String {
    if width_pt >= 30.0 {
        name.to_string()
    } else {
        name.chars().take(1).collect()
    }
}

/// The ticks of the day-of-season axis over a plot `width_pt` wide: the first of each
/// month, named, or day numbers when seasons start in different months. Returns the
/// ticks and the step between them, days.
fn day_ticks(months: Months, width_pt: f32) -> (Vec<(f64, String)>, f64) {
    let per_day_pt = width_pt / 370.0;
    if months == Months::Mixed {
        let step = [30, 60, 90, 120]
            .into_iter()
            .find(|s| *s as f32 * per_day_pt >= 32.0)
            .unwrap_or(120);
        let ticks = (1..=366 / step)
            .map(|k| (f64::from(k * step), (k * step).to_string()))
            .collect();
        return (ticks, f64::from(step));
    }
    let ticks = month_starts(months.first())
        .into_iter()
        .enumerate()
        .map(|(k, day)| (day, month_label(months.name(k), per_day_pt * 30.0)))
        .collect();
    (ticks, 30.0)
}

/// The ticks of the month axis over a plot `width_pt` wide: every month, named.
fn month_ticks(months: Months, width_pt: f32) -> Vec<(f64, String)> {
    (0..12)
        .map(|slot| {
            let label = month_label(months.name(slot), width_pt / 12.8);
            (slot as f64 + 1.0, label)
        })
        .collect()
}

/// A plot that leaves the mouse wheel and drags to the window (no pan, zoom or scroll),
/// with its legend in the top-left corner, where the curves and bars start low. Its id
/// is made from `id` alone, so that its memory (its bounds) can be found.
fn still_plot<'a>(id: &str) -> Plot<'a> {
    Plot::new(id)
        .id(egui::Id::unique(("shelfwind season plot", id)))
        .height(PLOT_HEIGHT_PT)
        .allow_drag(false)
        .allow_zoom(false)
        .allow_scroll(false)
        .allow_boxed_zoom(false)
        .allow_axis_zoom_drag(false)
        .allow_double_click_reset(false)
        .legend(
            Legend::default()
                .position(Corner::LeftTop)
                .text_style(egui::TextStyle::Small)
                .follow_insertion_order(true),
        )
}

/// The plot with these x ticks only, each with its label, and the axis title.
fn with_x_ticks<'a>(plot: Plot<'a>, title: &str, ticks: Vec<(f64, String)>, step: f64) -> Plot<'a> {
    let marks: Vec<GridMark> = ticks
        .iter()
        .map(|(x, _)| GridMark {
            value: *x,
            step_size: step,
        })
        .collect();
    let axis = AxisHints::new_x()
        .label(title)
        .label_spacing(16.0..=24.0)
        .formatter(move |mark, _| {
            ticks
                .iter()
                .find(|(x, _)| (x - mark.value).abs() < 1e-6)
                .map(|(_, label)| label.clone())
                .unwrap_or_default()
        });
    plot.x_grid_spacer(move |_| marks.clone())
        .custom_x_axes(vec![axis])
}

/// The top the y axis must reach so that a legend of `rows` entries at the top sits
/// above data spanning `low..=high`.
fn legend_headroom(low: f64, high: f64, rows: usize) -> f64 {
    let legend_pt = 10.0 + 14.0 * rows as f64;
    let share = (legend_pt / f64::from(PLOT_HEIGHT_PT - 30.0)).min(0.5);
    high + (high - low).max(1.0) * share / (1.0 - share)
}

/// The season of a segment's curve a hovered point belongs to (the curves of one segment
/// share a name), with the day and the value.
fn curve_hover(shown: &[Shown<'_>], pos: &HoverPosition<'_>) -> Option<String> {
    let HoverPosition::NearDataPoint {
        plot_name,
        position,
        index,
    } = pos
    else {
        return None;
    };
    let s = shown.iter().find(|s| s.name == *plot_name)?;
    let distance = |y: &crate::upwelling::SeasonYear| (y.cumulative[*index] - position.y).abs();
    let year = s
        .seg
        .years
        .iter()
        .filter(|y| y.cumulative.len() > *index)
        .min_by(|a, b| distance(a).total_cmp(&distance(b)))?;
    let date = year
        .season_start
        .checked_add_days(chrono::Days::new(*index as u64))?;
    Some(format!(
        "{plot_name}, season {}\n{}: {:.0} m³/s per 100 m × days",
        season_name(year.year, s.seg.southern),
        date.format("%-d %b %Y"),
        position.y
    ))
}

/// A season's name: its year, or both years for a southern season (July to June).
fn season_name(year: i32, southern: bool) -> String {
    if southern {
        format!("{year}/{:02}", (year + 1).rem_euclid(100))
    } else {
        year.to_string()
    }
}

/// Cumulative-index curves per season and monthly means, side by side.
fn season_plots_ui(v: &SeasonView, result: &[SegmentSeasons], ui: &mut egui::Ui) {
    let shown = shown(v, result);
    let months = Months::of(&shown);
    ui.columns(2, |cols| {
        cumulative_plot_ui(&shown, months, &mut cols[0]);
        monthly_plot_ui(&shown, months, &mut cols[1]);
    });
    ui.label(RichText::new(months.note()).small().weak());
}

/// Each season's cumulative index by day of season; one legend entry per segment, the
/// season on hover.
fn cumulative_plot_ui(shown: &[Shown<'_>], months: Months, ui: &mut egui::Ui) {
    ui.label(
        RichText::new("Cumulative index by season (m³/s per 100 m × days), by day of season")
            .strong(),
    );
    let (low, high) = shown
        .iter()
        .flat_map(|s| s.seg.years.iter().flat_map(|y| y.cumulative.iter()))
        .fold((0.0_f64, 0.0_f64), |(lo, hi), c| (lo.min(*c), hi.max(*c)));
    let (ticks, step) = day_ticks(months, ui.available_width() - 60.0);
    with_x_ticks(still_plot("season-cui"), "Day of season", ticks, step)
        .include_x(1.0)
        .include_x(366.0)
        .include_y(low)
        .include_y(legend_headroom(low, high, shown.len()))
        .label_formatter(|pos| curve_hover(shown, pos))
        .show(ui, |p| {
            for s in shown {
                for y in s.seg.years.iter().filter(|y| !y.cumulative.is_empty()) {
                    let pts: Vec<[f64; 2]> = y
                        .cumulative
                        .iter()
                        .enumerate()
                        .map(|(d, c)| [d as f64 + 1.0, *c])
                        .collect();
                    p.line(Line::new(s.name.clone(), PlotPoints::from(pts)).color(s.colour));
                }
            }
        });
}

/// Monthly means across complete seasons, one bar per segment and month.
fn monthly_plot_ui(shown: &[Shown<'_>], months: Months, ui: &mut egui::Ui) {
    ui.label(RichText::new("Monthly mean index across complete seasons (m³/s per 100 m)").strong());
    let (low, high) = shown
        .iter()
        .flat_map(|s| s.seg.climatology.monthly_mean.iter().flatten())
        .fold((0.0_f64, 0.0_f64), |(lo, hi), m| (lo.min(*m), hi.max(*m)));
    let ticks = month_ticks(months, ui.available_width() - 60.0);
    let width = 0.8 / shown.len().max(1) as f64;
    with_x_ticks(still_plot("season-months"), "Month", ticks, 1.0)
        .include_x(0.5)
        .include_x(12.5)
        .include_y(low)
        .include_y(legend_headroom(low, high, shown.len()))
        .show(ui, |p| {
            for (k, s) in shown.iter().enumerate() {
                let bars: Vec<Bar> = s
                    .seg
                    .climatology
                    .monthly_mean
                    .iter()
                    .enumerate()
                    .filter_map(|(m, mean)| {
                        let slot = months.slot(s.seg.southern, m);
                        let x = slot as f64 + 1.0 - 0.4 + width * (k as f64 + 0.5);
                        mean.map(|mean| {
                            Bar::new(x, mean).width(width * 0.9).name(format!(
                                "{}, {}",
                                s.name,
                                months.name(slot)
                            ))
                        })
                    })
                    .collect();
                p.bar_chart(
                    BarChart::new(s.name.clone(), bars)
                        .color(s.colour)
                        .element_formatter(Box::new(|bar, _| {
                            format!("{}\n{:.0} m³/s per 100 m", bar.name, bar.value)
                        })),
                );
            }
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
                ui.label(RichText::new(flag_text(year.flag.as_ref())).color(PROBLEM_COLOUR));
                ui.end_row();
            }
        });
}

/// Exports of the table (CSV) and the plots (PNG), written in the background; their
/// outcome right under the buttons.
fn export_ui(v: &mut SeasonView, result: &Arc<Vec<SegmentSeasons>>, ui: &mut egui::Ui) {
    ui.horizontal(|ui| {
        let label = ui.label("Export to");
        ui.add(
            egui::TextEdit::singleline(&mut v.export_path)
                .desired_width(360.0)
                .hint_text("/path/to/seasons.csv or .png"),
        )
        .labelled_by(label.id);
        let idle = v.export.is_none() && v.png.is_none();
        if ui
            .add_enabled(idle, egui::Button::new("Table (CSV)"))
            .clicked()
        {
            v.export_table(result, ui.ctx());
        }
        if ui
            .add_enabled(idle, egui::Button::new("Plots (PNG)"))
            .clicked()
        {
            v.export_plots(ui.input(|i| i.time));
        }
        if !idle {
            ui.spinner();
        }
    });
    if let Some(m) = &v.message {
        let colour = match v.message_tone {
            Tone::Done => ui.visuals().text_color(),
            Tone::Problem => PROBLEM_COLOUR,
        };
        let shown = ui.label(RichText::new(m).color(colour));
        // A PNG export scrolls up to the plots: come back to say how it went.
        if std::mem::take(&mut v.message_is_new) {
            shown.scroll_to_me(None);
        }
    }
}

#[cfg(test)]
#[allow(
    clippy::float_cmp,
    reason = "day numbers and steps are whole numbers, exact in f64"
)]
mod tests {
    use super::*;

    #[test]
    fn months_start_on_their_day_of_season() {
        let north = month_starts(0);
        assert_eq!(north[0], 1.0);
        assert_eq!(north[1], 32.0, "1 February");
        assert_eq!(north[11], 335.0, "1 December");
        let south = month_starts(6);
        assert_eq!(south[0], 1.0, "1 July");
        assert_eq!(south[6], 185.0, "1 January");
        assert_eq!(south[11], 336.0, "1 June");
    }

    #[test]
    fn every_month_is_named_in_season_order() {
        let names = |m: Months| -> Vec<String> {
            month_ticks(m, 600.0).into_iter().map(|(_, l)| l).collect()
        };
        assert_eq!(names(Months::FromJanuary)[0], "Jan");
        assert_eq!(names(Months::FromJanuary)[11], "Dec");
        assert_eq!(names(Months::FromJuly)[0], "Jul");
        assert_eq!(names(Months::FromJuly)[6], "Jan");
        assert_eq!(names(Months::FromJuly)[11], "Jun");
        assert_eq!(
            month_ticks(Months::FromJuly, 200.0)[0].1,
            "J",
            "narrow: one letter"
        );
        // Mixed: a southern season's first month (July) stands under "Jul".
        assert_eq!(Months::Mixed.name(Months::Mixed.slot(true, 0)), "Jul");
        assert_eq!(Months::Mixed.name(Months::Mixed.slot(false, 0)), "Jan");
    }

    #[test]
    fn the_day_axis_has_a_tick_per_month_or_spaced_day_numbers() {
        let (ticks, _) = day_ticks(Months::FromJuly, 440.0);
        assert_eq!(ticks.len(), 12);
        assert_eq!(ticks[6], (185.0, "Jan".to_string()));
        let (ticks, step) = day_ticks(Months::Mixed, 440.0);
        assert_eq!(step, 30.0);
        assert_eq!(ticks[0].1, "30");
        let (_, step) = day_ticks(Months::Mixed, 200.0);
        assert_eq!(step, 60.0, "fewer numbers on a narrow plot");
        let (ticks, step) = day_ticks(Months::Mixed, 120.0);
        assert_eq!((step, ticks.len()), (120.0, 3));
    }

    #[test]
    fn plots_off_the_picture_are_refused_not_cut_to_nothing() {
        let image = egui::ColorImage::filled([100, 80], Color32::WHITE);
        let inside = egui::Rect::from_min_max(egui::pos2(10.0, 10.0), egui::pos2(60.0, 40.0));
        let cut = crop_plots(&image, inside, 1.0).expect("inside");
        assert_eq!(cut.size, [50, 30]);
        assert_eq!(
            crop_plots(&image, inside, 2.0).err().as_deref(),
            Some("the plots were not wholly on screen")
        );
        let above = inside.translate(egui::vec2(0.0, -200.0));
        assert!(crop_plots(&image, above, 1.0).is_err());
        assert!(crop_plots(&image, egui::Rect::EVERYTHING, 1.0).is_err());
        assert!(crop_plots(&image, egui::Rect::NOTHING, 1.0).is_err());
    }

    #[test]
    fn exports_name_the_file_and_check_its_kind() {
        assert!(export_target("  ", Export::Table).is_err());
        assert_eq!(
            export_target("/tmp/a.csv", Export::Plots).err().as_deref(),
            Some("The plots were not written: the file name must end in .png: /tmp/a.csv")
        );
        assert!(export_target("/tmp/a.PNG", Export::Plots).is_ok());
        assert!(export_target("/tmp/a.png", Export::Table).is_err());
        assert_eq!(
            export_target(" /tmp/a.csv ", Export::Table),
            Ok(PathBuf::from("/tmp/a.csv"))
        );
    }

    #[test]
    fn hovering_a_curve_names_its_season() {
        use crate::upwelling::{EventSettings, analyse_seasons};
        // Two years of daily values: 1 a day in 2025, 3 a day in 2026.
        let t0 = chrono::DateTime::parse_from_rfc3339("2025-01-01T00:00:00Z")
            .expect("time")
            .to_utc();
        let times: Vec<_> = (0..730).map(|d| t0 + chrono::Duration::days(d)).collect();
        let index: Vec<f64> = (0..730).map(|d| if d < 365 { 1.0 } else { 3.0 }).collect();
        let coverage = crate::upwelling::CoverageSettings {
            min_day: 0.0,
            ..Default::default()
        };
        let (years, climatology) = analyse_seasons(
            &times,
            &index,
            false,
            None,
            &coverage,
            &EventSettings::default(),
        );
        let seg = SegmentSeasons {
            segment_id: "s1".into(),
            name: "Kelp Point".into(),
            southern: false,
            years,
            climatology,
        };
        let shown = [Shown {
            seg: &seg,
            name: seg.name.clone(),
            colour: PALETTE[0],
        }];
        let hover = |k: usize, index: usize| {
            let y = seg.years[k].cumulative[index];
            curve_hover(
                &shown,
                &HoverPosition::NearDataPoint {
                    plot_name: "Kelp Point",
                    position: egui_plot::PlotPoint::new(index as f64 + 1.0, y),
                    index,
                },
            )
        };
        let first = hover(0, 40).expect("hover text");
        assert!(
            first.starts_with("Kelp Point, season 2025\n10 Feb 2025: "),
            "{first}"
        );
        let second = hover(1, 40).expect("hover text");
        assert!(
            second.starts_with("Kelp Point, season 2026\n10 Feb 2026: "),
            "{second}"
        );
    }

    #[test]
    fn southern_seasons_are_named_by_both_years() {
        assert_eq!(season_name(2025, true), "2025/26");
        assert_eq!(season_name(1999, true), "1999/00");
        assert_eq!(season_name(2025, false), "2025");
    }
}
