//! The app's state: the document (what is saved), and the runtime state (view,
//! selection, jobs, dialogs, map memory) kept apart from it.

use super::commands::Command;
use super::files::{PathPrompt, Recovery};
use super::jobs::PlanJob;
use super::land_layer::LandMesh;
use crate::coast::{Land, LatLon};
use crate::plan::Plan;
use crate::scenario::Scenario;
use chrono::{DateTime, Utc};
use eframe::egui;
use serde::{Deserialize, Serialize};
use std::path::PathBuf;
use std::sync::Arc;

/// What the stretches on the map are coloured by.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
pub enum Colouring {
    /// The score of the chosen day, as the ranked list shows it.
    #[default]
    DayScore,
    /// The upwelling index at the chosen time.
    IndexNow,
    /// Expected productivity on the chosen day.
    Productivity,
    /// Whether the chosen boat can work the stretch on the chosen day.
    SafeForBoat,
    /// The share of an ensemble's runs with upwelling at the stretch on the chosen day.
    UpwellingOdds,
    /// The share of the segment's upwelling events the sea check found followed by
    /// cooling.
    HitRate,
}

/// The map's base layer.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize, Default)]
pub enum BaseLayer {
    /// The bundled land polygons: offline, at every zoom.
    #[default]
    BundledLand,
    /// OpenStreetMap tiles, downloaded when shown and cached on disk.
    OnlineTiles,
    /// An offline map pack (tile folder, MBTiles or PMTiles) over the bundled land.
    Pack(PathBuf),
}

/// A map pack the user added: where it is and what it is called.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SavedPack {
    /// Its file or folder.
    pub path: PathBuf,
    /// Its name, as the Base map list shows it.
    pub name: String,
}

/// What the app remembers between runs (eframe storage).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, Default)]
pub struct Remembered {
    /// The last scenario opened or saved.
    pub last_scenario: Option<PathBuf>,
    /// Map centre (lat, lon) and zoom.
    pub map_view: Option<(f64, f64, f64)>,
    /// The cautions were read and accepted once.
    pub cautions_accepted: bool,
    /// Plots panel shown.
    pub show_plots: bool,
    /// Colouring.
    pub colouring: Colouring,
    /// Base layer.
    pub base_layer: BaseLayer,
    /// Vessel and port last chosen.
    pub vessel_id: Option<String>,
    /// Home port last chosen.
    pub port_id: Option<String>,
    /// Units of what is shown.
    #[serde(default)]
    pub units: crate::export::units::Units,
    /// The map packs added, in the order added.
    #[serde(default)]
    pub map_packs: Vec<SavedPack>,
}

/// How the app was started: where it keeps its memory and whether native dialogs are
/// tried (tests turn them off).
#[derive(Debug, Clone, PartialEq)]
pub struct AppOptions {
    /// Folder for the recovery file and the tile cache.
    pub storage_dir: Option<PathBuf>,
    /// Try the system's file dialogs (the path field is always there too).
    pub native_dialogs: bool,
    /// Seconds between autosaves of unsaved changes to the recovery file.
    pub autosave_s: f64,
}

impl Default for AppOptions {
    fn default() -> Self {
        Self {
            storage_dir: None,
            native_dialogs: true,
            autosave_s: 30.0,
        }
    }
}

/// The scenario being worked on.
#[derive(Debug, Clone, PartialEq)]
pub struct Document {
    /// The scenario.
    pub scenario: Scenario,
    /// Where it is saved; `None` for the bundled demo or a new scenario.
    pub path: Option<PathBuf>,
    /// Folder against which relative wind file paths are read.
    pub base_dir: PathBuf,
    /// Changed since the last save.
    pub dirty: bool,
}

/// The drawing or editing tool.
#[derive(Debug, Clone, PartialEq, Default)]
pub enum Tool {
    /// Click to select.
    #[default]
    Select,
    /// Click to add points to a new segment.
    Draw {
        /// The points so far.
        points: Vec<LatLon>,
    },
    /// Click to place a home port (by index) on the map.
    PlacePort(usize),
}

/// A vertex being dragged.
#[derive(Debug, Clone, PartialEq)]
pub struct VertexDrag {
    /// Segment id.
    pub segment: String,
    /// Vertex index.
    pub index: usize,
}

/// Runtime view state: never saved with the scenario.
#[derive(Debug, Clone, PartialEq, Default)]
#[allow(clippy::struct_excessive_bools)] // Independent view switches, not a state machine.
pub struct View {
    /// Colouring of the stretches.
    pub colouring: Colouring,
    /// Chosen day (index into the plan's days).
    pub day: usize,
    /// Chosen hour (index into [`View::timeline`]).
    pub hour: usize,
    /// Every hour the plan has wind for.
    pub timeline: Vec<DateTime<Utc>>,
    /// Selected stretch ids; the first one is the main selection.
    pub selected: Vec<String>,
    /// Segment open in the editor.
    pub editing: Option<String>,
    /// Drawing or selecting.
    pub tool: Tool,
    /// Chosen vessel id.
    pub vessel_id: Option<String>,
    /// Chosen home port id.
    pub port_id: Option<String>,
    /// Playing through time.
    pub playing: bool,
    /// When the last play step was taken (egui time, seconds).
    pub last_play_step_s: f64,
    /// Show the plots panel.
    pub show_plots: bool,
    /// Show the map's legend.
    pub show_legend: bool,
    /// The layout was fitted to the screen's size (small screens start without plots
    /// and legend, which the user can switch on).
    pub fitted_to_screen: bool,
    /// Base layer of the map.
    pub base_layer: BaseLayer,
    /// Handles of the edited segment drawn last frame, for starting drags before the
    /// map pans.
    pub handles: Vec<super::map::Handle>,
    /// A vertex being dragged.
    pub vertex_drag: Option<VertexDrag>,
    /// Centre the map here on the next frame.
    pub centre_on: Option<LatLon>,
    /// Frame the whole coast and the ports on the next frame.
    pub fit_coast: bool,
    /// List every ranked stretch, not only the first ones.
    pub show_all_ranked: bool,
    /// The segment editor's fields as typed.
    pub segment_draft: super::editor::SegmentDraft,
    /// The boats and ports window.
    pub boats: super::boats::BoatsView,
    /// The guide's page, if open.
    pub help: super::help::HelpPage,
    /// Units of what is shown.
    pub units: crate::export::units::Units,
    /// The words of the plan's day, kept between frames.
    pub plan_words: super::panels::PlanWords,
    /// The runs' spread of the plotted stretches, kept between frames.
    pub run_bands: super::plots::RunBands,
}

/// Dialogs and messages.
#[derive(Debug, Default)]
#[allow(clippy::struct_excessive_bools)] // Independent windows, each open or closed.
pub struct Dialogs {
    /// The path field for opening, saving, importing and exporting.
    pub path_prompt: Option<PathPrompt>,
    /// What the app tells the user, newest first.
    pub messages: Vec<super::messages::Message>,
    /// Asking to confirm deleting this segment.
    pub confirm_delete: Option<String>,
    /// Asking about unsaved changes before closing.
    pub confirm_quit: bool,
    /// The user chose to close without saving.
    pub quit_confirmed: bool,
    /// "Save" was chosen when closing: close once the scenario is saved (a cancelled or
    /// failed save keeps the app open and forgets this).
    pub quit_after_save: bool,
    /// Offering to restore unsaved changes from the last session.
    pub recovery: Option<Recovery>,
    /// The cautions window.
    pub show_cautions: bool,
    /// The settings window.
    pub show_settings: bool,
    /// The wind files window.
    pub show_wind_files: bool,
    /// Settings being edited in the window, applied as one step.
    pub settings_draft: Option<crate::scenario::ModelSettings>,
}

/// What reading a coast pack gives: the land with the pack, and its drawing.
pub(super) type CoastPackResult = Result<(crate::coast::Land, LandMesh), String>;

/// The app.
pub struct ShelfwindApp {
    /// The document.
    pub doc: Document,
    pub(super) undo: Vec<Scenario>,
    pub(super) redo: Vec<Scenario>,
    /// Scenario as it was when the current vertex drag started (one undo step per drag).
    pub(super) drag_start: Option<Scenario>,
    /// The latest plan, if any.
    pub plan: Option<Arc<Plan>>,
    /// Why the latest plan could not be made.
    pub plan_error: Option<String>,
    /// What each wind file holds (`shelfwind inspect`'s text), by the path read.
    pub file_summaries: std::collections::BTreeMap<PathBuf, String>,
    /// The wind file added last, whose summary the wind files window opens on.
    pub(super) added_wind_file: Option<PathBuf>,
    /// The wind files window is yet to scroll to the file just added.
    pub(super) scroll_to_added: bool,
    pub(super) job: Option<PlanJob>,
    /// The stages' results, for ranking again without reading files.
    pub(super) stage_cache: Option<super::jobs::StageCache>,
    /// The plan must be computed again (the document or the boat changed).
    pub(super) plan_stale: bool,
    /// View state.
    pub view: View,
    /// Dialogs.
    pub dialogs: Dialogs,
    pub(super) map_memory: walkers::MapMemory,
    pub(super) tiles: Option<walkers::HttpTiles>,
    /// The open map pack, if one has been chosen.
    pub(super) pack: Option<super::pack_layer::PackTiles>,
    /// A map pack being opened: its path and the opened pack, or why not.
    pub(super) pack_task: Option<super::base_map::PackTask>,
    /// The land drawn on the map, once triangulated in the background.
    pub(super) land: Option<Arc<LandMesh>>,
    /// The plan's stretches as last placed and painted on the map.
    pub(super) stretch_paint: super::stretch_paint::StretchPaint,
    pub(super) land_task: Option<super::tasks::Task<LandMesh>>,
    /// The bundled land with the scenario's coast pack over it, once read.
    pub(super) packed_land: Option<super::coast_pack::PackedLand>,
    /// Reading the coast pack (the land and its drawing).
    pub(super) coast_pack_task: Option<super::tasks::Task<CoastPackResult>>,
    /// The coast pack being read.
    pub(super) coast_pack_reading: Option<PathBuf>,
    /// A coast pack that could not be used (not tried again until it changes).
    pub(super) coast_pack_failed: Option<PathBuf>,
    /// Opening, saving, importing or exporting a file.
    pub(super) file_task: Option<(
        super::messages::Subject,
        super::tasks::Task<super::files::FileResult>,
    )>,
    /// Writing the recovery file.
    pub(super) autosave_task: Option<super::tasks::Task<Result<(), String>>>,
    /// Why unsaved changes could not be kept in the recovery file, if they could not.
    pub recovery_problem: Option<String>,
    pub(super) remembered: Remembered,
    pub(super) options: AppOptions,
    pub(super) last_autosave_s: f64,
    pub(super) commands: Vec<Command>,
    /// The season view (co-op managers).
    pub season: super::season_view::SeasonView,
    /// The check against measured sea temperature.
    pub check: super::check_view::CheckView,
    /// The calibration on a catch log.
    pub calibrate: super::calibrate_view::CalibrateView,
}

impl ShelfwindApp {
    /// The app on a scenario (a file, the last one, or the demo), with the given options.
    #[must_use]
    pub fn new(
        cc: &eframe::CreationContext<'_>,
        open: Option<PathBuf>,
        options: AppOptions,
    ) -> Self {
        let remembered: Remembered = cc
            .storage
            .and_then(|s| eframe::get_value(s, eframe::APP_KEY))
            .unwrap_or_default();
        Self::with_memory(&cc.egui_ctx, open, options, remembered)
    }

    /// Like [`ShelfwindApp::new`], with the memory given (for tests).
    #[must_use]
    pub fn with_memory(
        ctx: &egui::Context,
        open: Option<PathBuf>,
        options: AppOptions,
        remembered: Remembered,
    ) -> Self {
        super::panels::style(ctx);
        // Until the scenario (or the demo) has been read in the background.
        let opening = Scenario {
            name: String::new(),
            time_zone: "UTC".into(),
            segments: Vec::new(),
            ports: Vec::new(),
            vessels: Vec::new(),
            wind_files: Vec::new(),
            coast_pack: None,
            wind_files_are_runs: false,
            settings: crate::scenario::ModelSettings::default(),
            notes: String::new(),
        };
        let mut app = Self {
            doc: Document {
                scenario: opening,
                path: None,
                base_dir: PathBuf::new(),
                dirty: false,
            },
            undo: Vec::new(),
            redo: Vec::new(),
            drag_start: None,
            plan: None,
            plan_error: None,
            file_summaries: std::collections::BTreeMap::new(),
            added_wind_file: None,
            scroll_to_added: false,
            job: None,
            stage_cache: None,
            plan_stale: true,
            view: View {
                colouring: remembered.colouring,
                show_plots: true,
                show_legend: true,
                base_layer: remembered.base_layer.clone(),
                vessel_id: remembered.vessel_id.clone(),
                port_id: remembered.port_id.clone(),
                units: remembered.units,
                ..View::default()
            },
            dialogs: Dialogs {
                show_cautions: !remembered.cautions_accepted,
                ..Dialogs::default()
            },
            map_memory: walkers::MapMemory::default(),
            tiles: None,
            pack: None,
            pack_task: None,
            land: None,
            stretch_paint: super::stretch_paint::StretchPaint::default(),
            packed_land: None,
            coast_pack_task: None,
            coast_pack_reading: None,
            coast_pack_failed: None,
            land_task: super::tasks::Task::spawn("land", ctx, || LandMesh::new(Land::bundled()))
                .ok(),
            file_task: None,
            autosave_task: None,
            recovery_problem: None,
            remembered,
            options,
            last_autosave_s: 0.0,
            commands: Vec::new(),
            season: super::season_view::SeasonView::default(),
            check: super::check_view::CheckView::default(),
            calibrate: super::calibrate_view::CalibrateView::default(),
        };
        let _ = app.map_memory.set_zoom(9.0);
        if let Some((lat, lon, zoom)) = app.remembered.map_view {
            app.map_memory.center_at(walkers::lat_lon(lat, lon));
            let _ = app.map_memory.set_zoom(zoom);
        }
        // Open what was asked, or the last scenario; the demo otherwise.
        let to_open = open.or_else(|| app.remembered.last_scenario.clone().filter(|p| p.exists()));
        app.open_at_start(ctx, to_open);
        app.dialogs.recovery = super::files::find_recovery(&app.options, app.doc.path.as_deref());
        // The base map chosen last time: its tiles or pack are made ready.
        app.send(super::commands::Command::SetBaseLayer(
            app.view.base_layer.clone(),
        ));
        app
    }

    /// The centre of the coast, for framing the map.
    pub(super) fn coast_centre(&self) -> Option<LatLon> {
        LatLon::weighted_mean(
            self.doc
                .scenario
                .segments
                .iter()
                .flat_map(|s| s.points.iter().map(|p| (*p, 1.0))),
        )
    }

    /// Whether a plan job, file work or the opening of a map pack is under way.
    #[must_use]
    pub fn is_busy(&self) -> bool {
        self.job.is_some()
            || self.plan_stale
            || self.file_task.is_some()
            || self.pack_task.is_some()
    }

    /// Queues a command, applied after drawing.
    pub fn send(&mut self, command: Command) {
        self.commands.push(command);
    }
}

impl eframe::App for ShelfwindApp {
    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
        let ctx = ui.ctx().clone();
        self.poll_job(&ctx);
        self.poll_file_task();
        self.poll_pack_task(&ctx);
        self.poll_coast_pack(&ctx);
        if let Some(mesh) = self.land_task.as_ref().and_then(super::tasks::Task::poll) {
            self.land_task = None;
            // A coast pack's land, drawn meanwhile, stays.
            if self.packed_land.is_none() {
                self.land = mesh.ok().map(Arc::new);
            }
        }
        self.handle_close(&ctx);
        self.handle_dropped_files(&ctx);
        self.handle_keys(&ctx);
        self.autosave(&ctx);
        let mut commands = std::mem::take(&mut self.commands);
        super::panels::all_ui(self, ui, &mut commands);
        for c in commands {
            self.apply(c, &ctx);
        }
        if self.plan_stale && self.job.is_none() && self.file_task.is_none() {
            self.start_plan_job(&ctx, None);
        }
        let working = self.job.is_some()
            || self.file_task.is_some()
            || self.land_task.is_some()
            || self.pack_task.is_some()
            || self.coast_pack_task.is_some();
        if working || self.view.playing || self.map_memory.animating() {
            ctx.request_repaint_after(std::time::Duration::from_millis(100));
        }
    }

    fn save(&mut self, storage: &mut dyn eframe::Storage) {
        let mut r = self.remembered.clone();
        r.last_scenario.clone_from(&self.doc.path);
        r.colouring = self.view.colouring;
        r.base_layer = self.view.base_layer.clone();
        r.vessel_id.clone_from(&self.view.vessel_id);
        r.port_id.clone_from(&self.view.port_id);
        r.units = self.view.units;
        r.show_plots = self.view.show_plots;
        if let Some(p) = self.map_memory.detached() {
            r.map_view = Some((p.y(), p.x(), self.map_memory.zoom()));
        }
        eframe::set_value(storage, eframe::APP_KEY, &r);
    }
}
