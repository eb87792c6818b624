//! Files: the path field (always there, with the system's file dialog as a helper when
//! the desktop has one), open, save, import, export, and the recovery file that keeps
//! unsaved changes through a crash.

use super::commands::{Command, FileAction};
use super::edit::Edit;
use super::messages::Subject;
use super::state::{AppOptions, ShelfwindApp};
use super::tasks::Task;
use crate::atomic::write_atomic;
use crate::coast::{CoastSegment, read_coast_geojson, write_coast_geojson};
use crate::export::{PlanFormat, render_plan};
use crate::scenario::{
    Scenario, demo_scenario, load_scenario, parse_scenario, save_scenario, scenario_to_json,
    write_demo,
};
use eframe::egui;
use std::path::{Path, PathBuf};
use std::sync::mpsc::{Receiver, channel};

/// The path field of a file action.
pub struct PathPrompt {
    /// What the file is for.
    pub action: FileAction,
    /// The path typed or picked.
    pub text: String,
    /// A note, e.g. that the system dialog could not open.
    pub note: Option<String>,
    /// The system dialog running in the background, if any.
    pub native: Option<(Receiver<Option<PathBuf>>, f64)>,
}

impl std::fmt::Debug for PathPrompt {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("PathPrompt")
            .field("action", &self.action)
            .field("text", &self.text)
            .finish_non_exhaustive()
    }
}

/// Unsaved changes found from a session that did not end cleanly.
#[derive(Debug, Clone, PartialEq)]
pub struct Recovery {
    /// The recovery file.
    pub path: PathBuf,
    /// The scenario's name in it.
    pub name: String,
}

fn recovery_path(options: &AppOptions) -> Option<PathBuf> {
    options
        .storage_dir
        .as_ref()
        .map(|d| d.join("recovery.shelfwind.json"))
}

/// The recovery file, if the last session left one.
pub(super) fn find_recovery(options: &AppOptions, _current: Option<&Path>) -> Option<Recovery> {
    let path = recovery_path(options)?;
    let text = std::fs::read_to_string(&path).ok()?;
    let scenario = parse_scenario(&text).ok()?;
    Some(Recovery {
        path,
        name: scenario.name,
    })
}

/// What a file task gives back; applied on the UI thread when it arrives.
pub enum FileOutcome {
    /// A scenario to work on: read from a file, or the bundled demo written out.
    Opened {
        /// The scenario.
        scenario: Scenario,
        /// Its file (none for the demo).
        path: Option<PathBuf>,
        /// The folder its wind files are read against.
        base_dir: PathBuf,
        /// Something to tell the user (a file that could not be opened instead).
        note: Option<String>,
    },
    /// Coast segments read from a GeoJSON file.
    Coast(Vec<CoastSegment>),
    /// The scenario as saved to `path` (wind files relative to it).
    Saved {
        /// The scenario as written.
        scenario: Scenario,
        /// Where.
        path: PathBuf,
    },
    /// A file was written: what to tell the user.
    Written(String),
}

/// A file task's result: the outcome, or what went wrong (nothing has changed).
pub type FileResult = Result<FileOutcome, String>;

/// Where the demo's files go: the app's folder, or a temporary one.
fn demo_dir(options: &AppOptions) -> PathBuf {
    match &options.storage_dir {
        Some(d) => d.join("demo"),
        None => std::env::temp_dir().join(format!("shelfwind-demo-{}", std::process::id())),
    }
}

/// Writes the demo's files (the forecast is made here) and returns the demo scenario.
fn write_demo_files(dir: PathBuf, note: Option<String>) -> FileResult {
    let scenario = demo_scenario().map_err(|e| format!("the bundled demo cannot be read: {e}"))?;
    write_demo(&dir)
        .map_err(|e| format!("cannot write the demo forecast to {}: {e}", dir.display()))?;
    Ok(FileOutcome::Opened {
        scenario,
        path: None,
        base_dir: dir,
        note,
    })
}

/// Reads a scenario file.
fn read_scenario_file(path: PathBuf) -> FileResult {
    let scenario = load_scenario(&path)
        .map_err(|e| format!("The scenario was not opened; nothing changed.\n\n{e}"))?;
    let base_dir = path.parent().map(Path::to_path_buf).unwrap_or_default();
    Ok(FileOutcome::Opened {
        scenario,
        path: Some(path),
        base_dir,
        note: None,
    })
}

/// Reads a GeoJSON coast.
fn read_coast_file(path: &Path) -> FileResult {
    let limit = crate::scenario::MAX_SCENARIO_BYTES;
    if let Ok(m) = std::fs::metadata(path)
        && m.len() > limit
    {
        return Err(format!(
            "The coast was not imported; nothing changed.\n\nthe file is {:.1} MB, larger than the {} MB a coast may be: {}",
            m.len() as f64 / 1_048_576.0,
            limit / 1_048_576,
            path.display()
        ));
    }
    let text = std::fs::read_to_string(path)
        .map_err(|e| format!("The coast was not imported: {e}: {}", path.display()))?;
    read_coast_geojson(&text)
        .map(FileOutcome::Coast)
        .map_err(|e| {
            format!(
                "The coast was not imported; nothing changed.\n\n{e}: {}",
                path.display()
            )
        })
}

/// Writes bytes made by `make` to `path`, whole or not at all.
fn write_file(path: &Path, make: impl FnOnce() -> String, done: &str) -> FileResult {
    write_atomic(path, make().as_bytes())
        .map(|()| FileOutcome::Written(format!("{done} {}", path.display())))
        .map_err(|e| format!("{} was not written: {e}", path.display()))
}

impl ShelfwindApp {
    /// The folder relative wind files are read against.
    pub(super) fn base_dir(&self) -> PathBuf {
        self.doc.base_dir.clone()
    }

    /// Runs file work in the background; one file task at a time. Messages on the
    /// same subject are dismissed: this action supersedes them.
    fn start_file_task(
        &mut self,
        subject: Subject,
        ctx: &egui::Context,
        work: impl FnOnce() -> FileResult + Send + 'static,
    ) {
        if let Some((_, t)) = &self.file_task {
            let text = format!(
                "Still busy with the last file ({}): try again in a moment.",
                t.name
            );
            self.error(subject, text);
            return;
        }
        self.forget(subject);
        let name = match subject {
            Subject::Scenario => "scenario",
            Subject::Coast => "coast",
            Subject::Export => "export",
            _ => "file",
        };
        match Task::spawn(name, ctx, work) {
            Ok(t) => self.file_task = Some((subject, t)),
            Err(e) => self.error(subject, e),
        }
    }

    /// Opens the bundled demo (its forecast written to the app's folder, or a temporary
    /// one, so it can be read like any other file).
    pub(super) fn open_demo(&mut self, ctx: &egui::Context) {
        let dir = demo_dir(&self.options);
        self.start_file_task(Subject::Scenario, ctx, move || write_demo_files(dir, None));
    }

    /// Opens a scenario at start: the file asked for, or the demo when it cannot be
    /// read (saying why).
    pub(super) fn open_at_start(&mut self, ctx: &egui::Context, path: Option<PathBuf>) {
        let dir = demo_dir(&self.options);
        self.start_file_task(Subject::Scenario, ctx, move || match path {
            Some(p) => read_scenario_file(p).or_else(|e| write_demo_files(dir, Some(e))),
            None => write_demo_files(dir, None),
        });
    }

    fn replace_document(&mut self, scenario: Scenario, path: Option<PathBuf>, base_dir: PathBuf) {
        self.doc = super::state::Document {
            scenario,
            path,
            base_dir,
            dirty: false,
        };
        self.undo.clear();
        self.redo.clear();
        self.plan = None;
        self.plan_stale = true;
        self.view.selected.clear();
        self.view.editing = None;
        self.view.day = 0;
        self.view.timeline.clear();
        self.view.fit_coast = true;
    }

    /// Takes a finished file task's result; on failure nothing has changed.
    pub(super) fn poll_file_task(&mut self) {
        let Some((subject, result)) = self
            .file_task
            .as_ref()
            .and_then(|(subject, t)| t.poll().map(|r| (*subject, r)))
        else {
            return;
        };
        self.file_task = None;
        match result.and_then(|r| r) {
            Ok(FileOutcome::Opened {
                scenario,
                path,
                base_dir,
                note,
            }) => {
                if path.is_some() {
                    self.remembered.last_scenario.clone_from(&path);
                }
                self.replace_document(scenario, path, base_dir);
                if let Some(note) = note {
                    self.error(Subject::Scenario, note);
                }
            }
            Ok(FileOutcome::Coast(segments)) => {
                let n = segments.len();
                self.edit(Edit::AddSegments(segments));
                self.info(Subject::Coast, format!("Imported {n} segment(s)."));
            }
            Ok(FileOutcome::Saved { scenario, path }) => {
                let mut current = self.doc.scenario.clone();
                current.wind_files.clone_from(&scenario.wind_files);
                if current == scenario {
                    self.doc.scenario = scenario;
                    self.doc.base_dir = path.parent().map(Path::to_path_buf).unwrap_or_default();
                    self.doc.path = Some(path.clone());
                    self.doc.dirty = false;
                    self.remembered.last_scenario = Some(path.clone());
                    self.discard_recovery();
                    self.info(Subject::Scenario, format!("Saved {}", path.display()));
                    if std::mem::take(&mut self.dialogs.quit_after_save) {
                        self.dialogs.quit_confirmed = true;
                        self.send(Command::Quit);
                    }
                } else {
                    // Changes came in while saving: they would be lost by closing now.
                    self.dialogs.quit_after_save = false;
                    self.info(
                        Subject::Scenario,
                        format!(
                            "Saved {}; the changes made while saving are not saved yet.",
                            path.display()
                        ),
                    );
                }
            }
            Ok(FileOutcome::Written(info)) => self.info(subject, info),
            Err(e) => {
                self.dialogs.quit_after_save = false;
                self.error(subject, e);
            }
        }
    }

    /// Shows the path field (and tries the system dialog alongside).
    pub(super) fn ask_file(&mut self, action: FileAction) {
        let suggested = match action {
            FileAction::SaveScenarioAs => Some(self.doc.path.clone().unwrap_or_else(|| {
                self.typing_dir()
                    .join(format!("{}.shelfwind.json", slug(&self.doc.scenario.name)))
            })),
            _ => None,
        }
        .map(|p| p.display().to_string());
        let mut prompt = PathPrompt {
            action,
            text: suggested.unwrap_or_default(),
            note: None,
            native: None,
        };
        if self.options.native_dialogs {
            prompt.native = Some((spawn_native_dialog(action, &self.base_dir()), 0.0));
        }
        self.dialogs.path_prompt = Some(prompt);
    }

    /// Polls the system dialog: a quick empty answer means it could not open here.
    pub(super) fn poll_native_dialog(&mut self, now_s: f64) -> Option<Command> {
        let prompt = self.dialogs.path_prompt.as_mut()?;
        let (rx, started) = prompt.native.as_mut()?;
        if *started == 0.0 {
            *started = now_s;
        }
        let answer = rx.try_recv().ok()?;
        let quick = now_s - *started < 0.5;
        prompt.native = None;
        match answer {
            Some(path) => {
                let action = prompt.action;
                self.dialogs.path_prompt = None;
                Some(Command::File(action, path))
            }
            None if quick => {
                prompt.note = Some("The system file dialog could not open on this desktop: type the file's path here instead.".into());
                None
            }
            None => None,
        }
    }

    /// Does a file action in the background, reporting errors without losing anything.
    /// The folder a typed name without a folder goes in: the scenario's, else the home
    /// folder (never the folder the app happened to start in, which the user cannot see).
    pub(super) fn typing_dir(&self) -> PathBuf {
        self.doc
            .path
            .as_ref()
            .and_then(|p| p.parent())
            .filter(|d| d.is_absolute())
            .map(Path::to_path_buf)
            .or_else(|| std::env::home_dir().filter(|h| h.is_dir()))
            .or_else(|| std::env::current_dir().ok())
            .unwrap_or_default()
    }

    pub(super) fn file_action(&mut self, action: FileAction, path: &Path, ctx: &egui::Context) {
        self.dialogs.path_prompt = None;
        let path = typed_path(path, action, &self.typing_dir());
        match action {
            FileAction::OpenScenario => {
                self.start_file_task(Subject::Scenario, ctx, move || read_scenario_file(path));
            }
            FileAction::SaveScenarioAs => self.save_as(path, ctx),
            FileAction::ImportWind => self.add_wind_file(path, ctx),
            FileAction::AddMapPack => self.open_pack(path, ctx),
            FileAction::UseCoastPack => self.use_coast_pack(Some(path)),
            FileAction::ImportCoast => {
                self.start_file_task(Subject::Coast, ctx, move || read_coast_file(&path));
            }
            FileAction::ExportCoast => {
                let segments = self.doc.scenario.segments.clone();
                self.start_file_task(Subject::Export, ctx, move || {
                    write_file(&path, || write_coast_geojson(&segments), "Coast written to")
                });
            }
            FileAction::ExportPlanCsv
            | FileAction::ExportPlanJson
            | FileAction::ExportPlanGeoJson
            | FileAction::ExportGpx
            | FileAction::ExportGpxSelected
            | FileAction::ExportTripSheet => self.export_plan(action, path, ctx),
        }
    }

    fn export_plan(&mut self, action: FileAction, path: PathBuf, ctx: &egui::Context) {
        let Some(plan) = self.plan.clone() else {
            self.error(
                Subject::Export,
                "There is no plan to export yet: the forecast is still being read, or it failed.",
            );
            return;
        };
        let (day, units) = (self.view.day, self.view.units);
        let selected: Vec<usize> = self
            .view
            .selected
            .iter()
            .filter_map(|id| plan.stretches.iter().position(|s| &s.id == id))
            .collect();
        if action == FileAction::ExportGpxSelected && selected.is_empty() {
            self.error(
                Subject::Export,
                "No stretch is selected: click one in the list or on the map (Ctrl-click for more), then export.",
            );
            return;
        }
        let land_model = self.land_model();
        self.start_file_task(Subject::Export, ctx, move || {
            write_file(
                &path,
                || match action {
                    FileAction::ExportPlanCsv => render_plan(&plan, PlanFormat::Csv),
                    FileAction::ExportPlanJson => render_plan(&plan, PlanFormat::Json),
                    FileAction::ExportPlanGeoJson => render_plan(&plan, PlanFormat::GeoJson),
                    FileAction::ExportGpx => render_plan(&plan, PlanFormat::Gpx),
                    FileAction::ExportGpxSelected => {
                        crate::export::gpx_of_stretches(&plan, &selected)
                    }
                    _ => crate::export::trip_sheet_html(
                        &plan,
                        land_model
                            .as_deref()
                            .unwrap_or_else(|| crate::coast::Land::bundled()),
                        day,
                        units,
                    ),
                },
                "Written to",
            )
        });
    }

    fn save_as(&mut self, path: PathBuf, ctx: &egui::Context) {
        // Wind files are kept relative to the scenario when they sit beside it.
        let mut scenario = self.doc.scenario.clone();
        let dir = path.parent().map(Path::to_path_buf).unwrap_or_default();
        scenario.wind_files = self
            .wind_paths(&scenario.wind_files)
            .into_iter()
            .map(|p| p.strip_prefix(&dir).map(Path::to_path_buf).unwrap_or(p))
            .collect();
        self.start_file_task(Subject::Scenario, ctx, move || {
            save_scenario(&path, &scenario)
                .map(|()| FileOutcome::Saved { scenario, path })
                .map_err(|e| format!("The scenario was not saved: {e}"))
        });
    }

    /// Writes unsaved changes to the recovery file every so often, in the background;
    /// a failure shows in the status line.
    pub(super) fn autosave(&mut self, ctx: &egui::Context) {
        if let Some(r) = self.autosave_task.as_ref().and_then(Task::poll) {
            self.autosave_task = None;
            self.recovery_problem = r.and_then(|r| r).err();
        }
        let now = ctx.input(|i| i.time);
        if !self.doc.dirty
            || now - self.last_autosave_s < self.options.autosave_s
            || self.autosave_task.is_some()
        {
            return;
        }
        self.last_autosave_s = now;
        let Some(path) = recovery_path(&self.options) else {
            return;
        };
        let scenario = self.doc.scenario.clone();
        match Task::spawn("recovery", ctx, move || write_recovery(&path, &scenario)) {
            Ok(t) => self.autosave_task = Some(t),
            Err(e) => self.recovery_problem = Some(e),
        }
    }

    pub(super) fn recover(&mut self) {
        if let Some(r) = self.dialogs.recovery.take() {
            match load_scenario(&r.path) {
                Ok(s) => {
                    let before = std::mem::replace(&mut self.doc.scenario, s);
                    self.undo.push(before);
                    self.doc.dirty = true;
                    self.plan_stale = true;
                    self.view.fit_coast = true;
                }
                Err(e) => {
                    self.error(
                        Subject::Scenario,
                        format!("The recovered changes cannot be read: {e}"),
                    );
                }
            }
        }
    }

    pub(super) fn discard_recovery(&mut self) {
        self.dialogs.recovery = None;
        if let Some(p) = recovery_path(&self.options) {
            let _ = std::fs::remove_file(p);
        }
    }
}

/// Writes `scenario` as the recovery file at `path`, whole or not at all (public for the
/// kill test in `tests/crash_safe.rs`).
pub fn write_recovery(path: &Path, scenario: &Scenario) -> Result<(), String> {
    let text = scenario_to_json(scenario).map_err(|e| e.to_string())?;
    if let Some(dir) = path.parent() {
        std::fs::create_dir_all(dir)
            .map_err(|e| format!("cannot keep unsaved changes in {}: {e}", dir.display()))?;
    }
    write_atomic(path, text.as_bytes())
        .map_err(|e| format!("cannot keep unsaved changes in {}: {e}", path.display()))
}

fn spawn_native_dialog(action: FileAction, dir: &Path) -> Receiver<Option<PathBuf>> {
    let (tx, rx) = channel();
    let dir = dir.to_path_buf();
    let _ = std::thread::Builder::new()
        .name("shelfwind-file-dialog".into())
        .spawn(move || {
            let dialog = rfd::FileDialog::new()
                .set_title(action.title())
                .set_directory(&dir)
                .add_filter(action.title(), action.extensions())
                .add_filter("All files", &["*"]);
            let picked = if action.writes() {
                dialog.save_file()
            } else {
                dialog.pick_file()
            };
            let _ = tx.send(picked);
        });
    rx
}

/// A typed path made whole: a name without a folder goes in `dir`, and a file written
/// without an extension gets the action's (`.shelfwind.json` for a scenario).
fn typed_path(path: &Path, action: FileAction, dir: &Path) -> PathBuf {
    let mut path = if path.is_absolute() || path.parent().is_some_and(|p| !p.as_os_str().is_empty())
    {
        path.to_path_buf()
    } else {
        dir.join(path)
    };
    if action.writes() && path.extension().is_none() {
        let ext = match action {
            FileAction::SaveScenarioAs => "shelfwind.json",
            other => other.extensions()[0],
        };
        path.set_extension(ext);
    }
    path
}

/// A file name from a scenario's name: lower-case letters and digits, words joined by
/// dashes ("North Reach Fishers' Co-op (demo)" gives "north-reach-fishers-co-op-demo").
fn slug(name: &str) -> String {
    let words: Vec<String> = name
        .split(|c: char| !c.is_alphanumeric())
        .filter(|w| !w.is_empty())
        .map(str::to_lowercase)
        .collect();
    if words.is_empty() {
        "scenario".into()
    } else {
        words.join("-")
    }
}
