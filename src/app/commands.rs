//! What the panels ask for. Panels draw and return commands; they are applied in one
//! place after drawing, where edits record their undo steps.

use super::edit::Edit;
use super::state::{BaseLayer, Colouring, ShelfwindApp, Tool};
use crate::coast::LatLon;
use eframe::egui;
use std::path::PathBuf;

/// What a file dialog is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileAction {
    /// Open a scenario.
    OpenScenario,
    /// Save the scenario under a new name.
    SaveScenarioAs,
    /// Import a wind file (GRIB2, NetCDF or CSV) as the scenario's forecast.
    ImportWind,
    /// Add coast segments from GeoJSON.
    ImportCoast,
    /// Write the coast as GeoJSON.
    ExportCoast,
    /// Write the plan as CSV.
    ExportPlanCsv,
    /// Write the plan as JSON.
    ExportPlanJson,
    /// Write the stretches with their scores as GeoJSON.
    ExportPlanGeoJson,
    /// Write each day's best three stretches as GPX for a chart plotter.
    ExportGpx,
    /// Write the stretches selected on the map or in the list as GPX.
    ExportGpxSelected,
    /// Write a printable trip sheet (HTML) for the chosen day.
    ExportTripSheet,
    /// Add an offline map pack (MBTiles, PMTiles or a tile folder) as a base map.
    AddMapPack,
    /// Use a coast pack (`shelfwind coast-pack`) for the scenario's land.
    UseCoastPack,
}

impl FileAction {
    /// The title of the dialog.
    #[must_use]
    pub fn title(self) -> &'static str {
        match self {
            FileAction::OpenScenario => "Open scenario",
            FileAction::SaveScenarioAs => "Save scenario as",
            FileAction::ImportWind => "Add a wind file (GRIB2, NetCDF or CSV)",
            FileAction::ImportCoast => "Import coast (GeoJSON)",
            FileAction::ExportCoast => "Export coast (GeoJSON)",
            FileAction::ExportPlanCsv => "Export plan (CSV)",
            FileAction::ExportPlanJson => "Export plan (JSON)",
            FileAction::ExportPlanGeoJson => "Export stretches (GeoJSON)",
            FileAction::ExportGpx => "Export each day's best three stretches (GPX)",
            FileAction::ExportGpxSelected => "Export the selected stretches (GPX)",
            FileAction::ExportTripSheet => "Export trip sheet (HTML)",
            FileAction::AddMapPack => "Add a map pack (file or folder)",
            FileAction::UseCoastPack => "Use a coast pack (made by shelfwind coast-pack)",
        }
    }

    /// Whether the file is written (save dialog) rather than read.
    #[must_use]
    pub fn writes(self) -> bool {
        !matches!(
            self,
            FileAction::OpenScenario
                | FileAction::ImportWind
                | FileAction::ImportCoast
                | FileAction::AddMapPack
                | FileAction::UseCoastPack
        )
    }

    /// Extensions offered, the first being the default.
    #[must_use]
    pub fn extensions(self) -> &'static [&'static str] {
        match self {
            FileAction::OpenScenario | FileAction::SaveScenarioAs | FileAction::ExportPlanJson => {
                &["json"]
            }
            FileAction::ImportWind => &["grib2", "grb2", "grib", "grb", "nc", "nc4", "csv"],
            FileAction::ImportCoast | FileAction::ExportCoast | FileAction::ExportPlanGeoJson => {
                &["geojson", "json"]
            }
            FileAction::ExportPlanCsv => &["csv"],
            FileAction::ExportGpx | FileAction::ExportGpxSelected => &["gpx"],
            FileAction::ExportTripSheet => &["html"],
            FileAction::AddMapPack => &["mbtiles", "pmtiles"],
            FileAction::UseCoastPack => &["swpack"],
        }
    }
}

/// Everything the UI can ask for.
#[derive(Debug, Clone, PartialEq)]
pub enum Command {
    /// Change the scenario (one undo step).
    Edit(Edit),
    /// Move a vertex while dragging (one undo step for the whole drag).
    DragVertex {
        /// Segment id.
        segment: String,
        /// Vertex index.
        index: usize,
        /// New position.
        to: LatLon,
    },
    /// The drag ended.
    EndDrag,
    /// Undo the last edit.
    Undo,
    /// Redo the last undone edit.
    Redo,
    /// Select a stretch; `add` keeps the others selected (for comparing).
    SelectStretch {
        /// Stretch id.
        id: String,
        /// Add to the selection.
        add: bool,
    },
    /// Clear the selection.
    ClearSelection,
    /// Open a segment in the editor.
    EditSegment(Option<String>),
    /// Centre the map on a position.
    CentreOn(LatLon),
    /// Choose the day.
    SetDay(usize),
    /// Choose the hour.
    SetHour(usize),
    /// Step the hour by this many.
    StepHour(i64),
    /// Play or pause.
    TogglePlay,
    /// Choose the colouring.
    SetColouring(Colouring),
    /// Choose the base layer.
    SetBaseLayer(BaseLayer),
    /// Choose the boat.
    SetVessel(String),
    /// Choose the home port.
    SetPort(String),
    /// Switch tool.
    SetTool(Tool),
    /// Add a point to the segment being drawn.
    AddDraftPoint(LatLon),
    /// Finish the segment being drawn.
    FinishDraft,
    /// Ask for a file for an action (dialog and path field).
    AskFile(FileAction),
    /// Do a file action on a path.
    File(FileAction, PathBuf),
    /// Save to the current file (or ask for one).
    Save,
    /// Open the bundled demo.
    OpenDemo,
    /// Restore the recovered scenario.
    Recover,
    /// Forget the recovered scenario.
    DiscardRecovery,
    /// Stop the running job.
    CancelJob,
    /// Show the wind files window.
    ShowWindFiles,
    /// Show the boats and ports window.
    ShowBoats,
    /// Close the app (after asking about unsaved changes).
    Quit,
}

impl ShelfwindApp {
    /// Applies one command.
    pub(super) fn apply(&mut self, command: Command, ctx: &egui::Context) {
        match command {
            Command::Edit(edit) => self.edit(edit),
            Command::DragVertex { segment, index, to } => self.drag_vertex(&segment, index, to),
            Command::EndDrag => self.end_drag(),
            Command::Undo => self.undo(),
            Command::Redo => self.redo(),
            Command::SelectStretch { id, add } => {
                if add {
                    if let Some(k) = self.view.selected.iter().position(|s| *s == id) {
                        self.view.selected.remove(k);
                    } else {
                        self.view.selected.push(id);
                    }
                } else {
                    self.view.selected = vec![id];
                }
            }
            Command::ClearSelection => self.view.selected.clear(),
            Command::EditSegment(id) => {
                self.view.editing = id;
                self.view.vertex_drag = None;
            }
            Command::CentreOn(p) => self.view.centre_on = Some(p),
            Command::SetDay(d) => self.set_day(d),
            Command::SetHour(h) => self.set_hour(h),
            Command::StepHour(by) => {
                let step = usize::try_from(by.unsigned_abs()).unwrap_or(usize::MAX);
                let h = if by < 0 {
                    self.view.hour.saturating_sub(step)
                } else {
                    self.view.hour.saturating_add(step)
                };
                self.set_hour(h);
            }
            Command::TogglePlay => {
                self.view.playing = !self.view.playing;
                self.view.last_play_step_s = ctx.input(|i| i.time);
            }
            Command::SetColouring(c) => self.view.colouring = c,
            Command::SetBaseLayer(b) => self.set_base_layer(b, ctx),
            Command::SetVessel(id) => {
                self.view.vessel_id = Some(id);
                self.plan_stale = true;
            }
            Command::SetPort(id) => {
                self.view.port_id = Some(id);
                self.plan_stale = true;
            }
            Command::SetTool(t) => self.view.tool = t,
            Command::AddDraftPoint(p) => match &mut self.view.tool {
                Tool::Draw { points } => points.push(p),
                Tool::PlacePort(k) => {
                    let k = *k;
                    self.view.tool = Tool::Select;
                    let mut ports = self.doc.scenario.ports.clone();
                    if let Some(port) = ports.get_mut(k) {
                        port.position = p;
                        self.view.boats.fields.clear();
                        self.edit(Edit::SetPorts(ports));
                    }
                }
                Tool::Select => {}
            },
            Command::FinishDraft => self.finish_draft(),
            Command::AskFile(action) => self.ask_file(action),
            Command::File(action, path) => self.file_action(action, &path, ctx),
            Command::Save => match self.doc.path.clone() {
                Some(path) => self.file_action(FileAction::SaveScenarioAs, &path, ctx),
                None => self.ask_file(FileAction::SaveScenarioAs),
            },
            Command::OpenDemo => self.open_demo(ctx),
            Command::Recover => self.recover(),
            Command::DiscardRecovery => self.discard_recovery(),
            Command::CancelJob => {
                if let Some(job) = &self.job {
                    job.progress.cancel();
                }
            }
            Command::ShowWindFiles => self.dialogs.show_wind_files = true,
            Command::ShowBoats => self.view.boats.open = true,
            Command::Quit => ctx.send_viewport_cmd(egui::ViewportCommand::Close),
        }
    }

    /// Sets the day, and moves the hour to that day's local noon when it lies elsewhere.
    pub(super) fn set_day(&mut self, day: usize) {
        let Some(plan) = &self.plan else { return };
        let day = day.min(plan.days.len().saturating_sub(1));
        self.view.day = day;
        if let Some(d) = plan.days.get(day) {
            let current = self
                .view
                .timeline
                .get(self.view.hour)
                .map(|t| t.with_timezone(&plan.time_zone).date_naive());
            if current != Some(d.date) {
                let noon = crate::localtime::local_noon(plan.time_zone, d.date);
                let noon = self.view.timeline.iter().position(|t| *t == noon);
                if let Some(h) = noon {
                    self.view.hour = h;
                }
            }
        }
    }

    /// Sets the hour, and the day to the hour's local day when the plan has it.
    pub(super) fn set_hour(&mut self, hour: usize) {
        self.view.hour = hour.min(self.view.timeline.len().saturating_sub(1));
        let Some(plan) = &self.plan else { return };
        if let Some(t) = self.view.timeline.get(self.view.hour) {
            let date = t.with_timezone(&plan.time_zone).date_naive();
            if let Some(d) = plan.days.iter().position(|d| d.date == date) {
                self.view.day = d;
            }
        }
    }

    pub(super) fn handle_keys(&mut self, ctx: &egui::Context) {
        let typing = ctx.egui_wants_keyboard_input();
        let (undo, redo, left, right, escape, enter, delete) = ctx.input_mut(|i| {
            // While a field has the keyboard its own undo takes Ctrl+Z (the typing is
            // not yet an edit of the scenario): the keys are left to it.
            // Ctrl+Shift+Z first: Ctrl+Z would match it too (egui matches modifiers
            // logically) and take it for undo.
            let redo = !typing
                && (i.consume_key(
                    egui::Modifiers::COMMAND | egui::Modifiers::SHIFT,
                    egui::Key::Z,
                ) || i.consume_key(egui::Modifiers::COMMAND, egui::Key::Y));
            let undo = !typing && !redo && i.consume_key(egui::Modifiers::COMMAND, egui::Key::Z);
            let keys =
                |i: &mut egui::InputState, k| !typing && i.consume_key(egui::Modifiers::NONE, k);
            (
                undo,
                redo,
                keys(i, egui::Key::ArrowLeft),
                keys(i, egui::Key::ArrowRight),
                keys(i, egui::Key::Escape),
                keys(i, egui::Key::Enter),
                keys(i, egui::Key::Delete),
            )
        });
        if redo {
            self.send(Command::Redo);
        } else if undo {
            self.send(Command::Undo);
        }
        if left {
            self.send(Command::StepHour(-1));
        }
        if right {
            self.send(Command::StepHour(1));
        }
        if escape {
            self.send(Command::SetTool(Tool::Select));
        }
        if enter && matches!(self.view.tool, Tool::Draw { .. }) {
            self.send(Command::FinishDraft);
        }
        if delete && let Some(id) = self.view.editing.clone() {
            self.dialogs.confirm_delete = Some(id);
        }
        if self.view.playing {
            let now = ctx.input(|i| i.time);
            if now - self.view.last_play_step_s > 0.25 {
                self.view.last_play_step_s = now;
                if self.view.hour + 1 >= self.view.timeline.len() {
                    self.view.playing = false;
                } else {
                    self.send(Command::StepHour(1));
                }
            }
        }
    }

    pub(super) fn handle_close(&mut self, ctx: &egui::Context) {
        if !ctx.input(|i| i.viewport().close_requested()) {
            return;
        }
        if self.doc.dirty && !self.dialogs.quit_confirmed {
            ctx.send_viewport_cmd(egui::ViewportCommand::CancelClose);
            self.dialogs.confirm_quit = true;
        } else if !self.doc.dirty {
            // A clean close: nothing to recover next time.
            self.discard_recovery();
        }
    }

    pub(super) fn handle_dropped_files(&mut self, ctx: &egui::Context) {
        let dropped: Vec<PathBuf> = ctx.input(|i| {
            i.raw
                .dropped_files
                .iter()
                .filter(|f| !f.path().as_os_str().is_empty())
                .map(|f| f.path().to_path_buf())
                .collect()
        });
        for path in dropped {
            let ext = path
                .extension()
                .and_then(|e| e.to_str())
                .unwrap_or("")
                .to_ascii_lowercase();
            let action = match ext.as_str() {
                "geojson" => FileAction::ImportCoast,
                "json" => FileAction::OpenScenario,
                "mbtiles" | "pmtiles" => FileAction::AddMapPack,
                _ => FileAction::ImportWind,
            };
            self.send(Command::File(action, path));
        }
    }
}
