//! Files: the path field (always there, with the system's file dialog as a helper when
//! the desktop has one), open, save, import, export, and the recovery file that keeps
//! unsaved changes through a crash.

use super::commands::{Command, FileAction};
use super::edit::Edit;
use super::state::{AppOptions, ShelfwindApp};
use crate::atomic::write_atomic;
use crate::coast::{read_coast_geojson, write_coast_geojson};
use crate::export::{PlanFormat, render_plan};
use crate::scenario::{load_scenario, parse_scenario, save_scenario, scenario_to_json, write_demo};
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

impl ShelfwindApp {
    /// The folder relative wind files are read against.
    pub(super) fn base_dir(&self) -> PathBuf {
        self.doc.base_dir.clone()
    }

    /// Opens the bundled demo (its forecast written to the app's folder, or a temporary
    /// one, so it can be read like any other file).
    pub(super) fn open_demo(&mut self) {
        let dir = match &self.options.storage_dir {
            Some(d) => d.join("demo"),
            None => std::env::temp_dir().join(format!("shelfwind-demo-{}", std::process::id())),
        };
        match (crate::scenario::demo_scenario(), write_demo(&dir)) {
            (Ok(scenario), Ok(_)) => {
                self.replace_document(scenario, None, dir);
            }
            (Err(e), _) => {
                self.dialogs.error = Some(format!("the bundled demo cannot be read: {e}"));
            }
            (_, Err(e)) => {
                self.dialogs.error = Some(format!(
                    "cannot write the demo forecast to {}: {e}",
                    dir.display()
                ));
            }
        }
    }

    fn replace_document(
        &mut self,
        scenario: crate::scenario::Scenario,
        path: Option<PathBuf>,
        base_dir: PathBuf,
    ) {
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

    /// Opens a scenario file; on failure the current scenario stays.
    pub(super) fn open_scenario(&mut self, path: &Path) {
        match load_scenario(path) {
            Ok(s) => {
                let dir = path.parent().map(Path::to_path_buf).unwrap_or_default();
                self.replace_document(s, Some(path.to_path_buf()), dir);
                self.remembered.last_scenario = Some(path.to_path_buf());
            }
            Err(e) => {
                self.dialogs.error = Some(format!(
                    "The scenario was not opened; nothing changed.\n\n{e}"
                ));
            }
        }
    }

    /// Shows the path field (and tries the system dialog alongside).
    pub(super) fn ask_file(&mut self, action: FileAction) {
        let suggested = match action {
            FileAction::SaveScenarioAs => self.doc.path.as_ref().map(|p| p.display().to_string()),
            _ => None,
        };
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

    /// Does a file action, reporting errors without losing anything.
    pub(super) fn file_action(&mut self, action: FileAction, path: &Path, ctx: &egui::Context) {
        self.dialogs.path_prompt = None;
        let result: Result<Option<String>, String> = match action {
            FileAction::OpenScenario => {
                self.open_scenario(path);
                Ok(None)
            }
            FileAction::SaveScenarioAs => self.save_as(path),
            FileAction::ImportWind => {
                if path.exists() {
                    self.start_plan_job(ctx, Some(vec![path.to_path_buf()]));
                    Ok(None)
                } else {
                    Err(format!(
                        "The forecast was not imported: no file at {}",
                        path.display()
                    ))
                }
            }
            FileAction::ImportCoast => std::fs::read_to_string(path)
                .map_err(|e| format!("The coast was not imported: {e}: {}", path.display()))
                .and_then(|text| {
                    read_coast_geojson(&text).map_err(|e| {
                        format!(
                            "The coast was not imported; nothing changed.\n\n{e}: {}",
                            path.display()
                        )
                    })
                })
                .map(|segments| {
                    let n = segments.len();
                    self.edit(Edit::AddSegments(segments));
                    Some(format!("Imported {n} segment(s)."))
                }),
            FileAction::ExportCoast => write_atomic(
                path,
                write_coast_geojson(&self.doc.scenario.segments).as_bytes(),
            )
            .map(|()| Some(format!("Coast written to {}", path.display())))
            .map_err(|e| format!("cannot write {}: {e}", path.display())),
            FileAction::ExportPlanCsv
            | FileAction::ExportPlanJson
            | FileAction::ExportPlanGeoJson
            | FileAction::ExportGpx
            | FileAction::ExportTripSheet => self.export_plan(action, path),
        };
        match result {
            Ok(Some(info)) => self.dialogs.info = Some(info),
            Ok(None) => {}
            Err(e) => self.dialogs.error = Some(e),
        }
    }

    fn export_plan(&self, action: FileAction, path: &Path) -> Result<Option<String>, String> {
        let Some(plan) = &self.plan else {
            return Err(
                "There is no plan to export yet: the forecast is still being read, or it failed."
                    .into(),
            );
        };
        let text = match action {
            FileAction::ExportPlanCsv => render_plan(plan, PlanFormat::Csv),
            FileAction::ExportPlanJson => render_plan(plan, PlanFormat::Json),
            FileAction::ExportPlanGeoJson => render_plan(plan, PlanFormat::GeoJson),
            FileAction::ExportGpx => render_plan(plan, PlanFormat::Gpx),
            _ => crate::export::trip_sheet_html(plan, crate::coast::Land::bundled(), self.view.day),
        };
        write_atomic(path, text.as_bytes())
            .map(|()| Some(format!("Written to {}", path.display())))
            .map_err(|e| format!("cannot write {}: {e}", path.display()))
    }

    fn save_as(&mut self, path: &Path) -> Result<Option<String>, String> {
        // Wind files are kept relative to the scenario when they sit beside it.
        let mut scenario = self.doc.scenario.clone();
        let dir = path.parent().map(Path::to_path_buf).unwrap_or_default();
        scenario.wind_files = self
            .wind_paths(&scenario.wind_files)
            .into_iter()
            .map(|p| p.strip_prefix(&dir).map(Path::to_path_buf).unwrap_or(p))
            .collect();
        save_scenario(path, &scenario).map_err(|e| format!("The scenario was not saved: {e}"))?;
        self.doc.scenario = scenario;
        self.doc.path = Some(path.to_path_buf());
        self.doc.base_dir = dir;
        self.doc.dirty = false;
        self.remembered.last_scenario = Some(path.to_path_buf());
        self.discard_recovery();
        Ok(Some(format!("Saved {}", path.display())))
    }

    /// Writes unsaved changes to the recovery file every so often.
    pub(super) fn autosave(&mut self, ctx: &egui::Context) {
        let now = ctx.input(|i| i.time);
        if !self.doc.dirty || now - self.last_autosave_s < self.options.autosave_s {
            return;
        }
        self.last_autosave_s = now;
        self.write_recovery();
    }

    /// Writes the recovery file now.
    pub fn write_recovery(&self) {
        if let (Some(path), Ok(text)) = (
            recovery_path(&self.options),
            scenario_to_json(&self.doc.scenario),
        ) {
            if let Some(dir) = path.parent() {
                let _ = std::fs::create_dir_all(dir);
            }
            let _ = write_atomic(&path, text.as_bytes());
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
                    self.dialogs.error = Some(format!("the recovered changes cannot be read: {e}"));
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
