//! The scenario's wind files: adding one (read in the background; the forecast stays as
//! it was if it cannot be read), and the window that lists them: what each holds,
//! which segments take their wind from it, and the order in which they are tried.

use super::commands::Command;
use super::edit::Edit;
use super::messages::Subject;
use super::state::ShelfwindApp;
use crate::plan::Forecast;
use crate::wind::{SourceKind, SourceSpan};
use eframe::egui::{self, RichText};
use std::path::{Path, PathBuf};

impl ShelfwindApp {
    /// Adds a wind file to the scenario's list, once the plan made with it is ready.
    pub(super) fn add_wind_file(&mut self, path: PathBuf, ctx: &egui::Context) {
        self.forget(Subject::Forecast);
        if !path.exists() {
            self.error(
                Subject::Forecast,
                format!("The wind file was not added: no file at {}", path.display()),
            );
            return;
        }
        let known = self.wind_paths(&self.doc.scenario.wind_files);
        if known.iter().any(|p| same_file(p, &path)) {
            self.info(
                Subject::Forecast,
                format!("{} is already in the wind files.", path.display()),
            );
            return;
        }
        let mut files = self.doc.scenario.wind_files.clone();
        files.push(path);
        self.start_plan_job(ctx, Some(files));
    }
}

fn same_file(a: &Path, b: &Path) -> bool {
    match (a.canonicalize(), b.canonicalize()) {
        (Ok(a), Ok(b)) => a == b,
        _ => a == b,
    }
}

/// What a file holds, in a line: its kind, its times and its issue time.
fn span_text(span: Option<&SourceSpan>, tz: chrono_tz::Tz) -> String {
    let Some(span) = span else {
        return "not read: the files above cover every point".into();
    };
    let when = |t: chrono::DateTime<chrono::Utc>| {
        format!(
            "{} ({})",
            t.with_timezone(&tz).format("%a %-d %b %H:%M"),
            t.format("%H:%MZ")
        )
    };
    let kind = match span.kind {
        SourceKind::Grid => "grid".to_string(),
        SourceKind::Station(Some(p)) => {
            format!("station at {p}")
        }
        SourceKind::Station(None) => "station (no position: applies everywhere)".into(),
    };
    let times = span.times.map_or("no times".to_string(), |(a, b)| {
        format!("{} to {}, {} steps", when(a), when(b), span.steps)
    });
    let issued = span
        .issued
        .map(|t| format!("; issued {}", when(t)))
        .unwrap_or_default();
    format!("{kind}; {times}{issued}")
}

/// The names of the segments that take their wind from file `k`.
fn segments_from(forecast: &Forecast, names: &dyn Fn(&str) -> String, k: usize) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    let runs = forecast
        .ensemble
        .iter()
        .flat_map(|e| e.stretches.iter().flatten());
    for s in forecast.stretches.iter().chain(runs) {
        if s.wind_source == Some(k) {
            let name = names(&s.segment_id);
            if !out.contains(&name) {
                out.push(name);
            }
        }
    }
    out
}

/// The wind files window.
pub(super) fn wind_files_window(
    app: &mut ShelfwindApp,
    ctx: &egui::Context,
    commands: &mut Vec<Command>,
) {
    let mut open = true;
    let mut close = false;
    let mut scrolled = false;
    let files = app.doc.scenario.wind_files.clone();
    let forecast = app
        .stage_cache
        .as_ref()
        .map(super::jobs::StageCache::forecast);
    let scenario = &app.doc.scenario;
    let names = |id: &str| {
        scenario
            .segments
            .iter()
            .find(|c| c.id == id)
            .map_or_else(|| id.to_string(), |c| c.label().to_string())
    };
    egui::Window::new("Wind files")
        .open(&mut open)
        .default_width(620.0)
        .vscroll(true)
        .show(ctx, |ui| {
            ui.label("Each segment takes its wind from the first file below that covers it; a station file covers the segments it is the nearest station to. An ensemble file's members are each one run: the plan gives the odds over the runs.");
            let mut runs = scenario.wind_files_are_runs;
            if ui
                .checkbox(&mut runs, "Each file is one run (forecasts from several centres taken together)")
                .on_hover_text("The plan then counts how many of the files bring upwelling and leave a safe window, instead of taking each stretch's wind from the first file that covers it")
                .changed()
            {
                commands.push(Command::Edit(Edit::SetFilesAreRuns(runs)));
            }
            if let Some(fc) = &forecast {
                ui.label(RichText::new(match &fc.ensemble {
                    None => "Read as a single forecast: no odds.".to_string(),
                    Some(e) => format!(
                        "Read as an ensemble of {} runs: {}.",
                        e.members.len(),
                        e.members.iter().map(crate::wind::Member::label).collect::<Vec<_>>().join(", ")
                    ),
                }).strong());
            }
            ui.separator();
            for (k, f) in files.iter().enumerate() {
                ui.label(RichText::new(format!("{}. {}", k + 1, f.display())).strong());
                let read_path = app.wind_paths(std::slice::from_ref(f)).remove(0);
                if let Some(summary) = app.file_summaries.get(&read_path) {
                    let just_added = app.added_wind_file.as_ref() == Some(f);
                    let shown = egui::CollapsingHeader::new("What the file holds")
                        .id_salt(("wind file summary", k))
                        .default_open(just_added)
                        .show(ui, |ui| {
                            for line in summary.lines() {
                                ui.label(line);
                            }
                        });
                    if just_added && app.scroll_to_added {
                        shown.header_response.scroll_to_me(Some(egui::Align::Min));
                        scrolled = true;
                    }
                }
                // A wave forecast among the files: read for the sea state, not for wind
                // (its summary's "Uses:" line says so, as `shelfwind inspect` prints it).
                let waves_only = app.file_summaries.get(&read_path).is_some_and(|s| {
                    s.lines().any(|l| l.starts_with("Uses:") && l.contains("wave height"))
                        && !s.lines().any(|l| l.starts_with("Uses:") && l.contains("wind"))
                });
                if let (Some(fc), true) = (&forecast, waves_only) {
                    if fc.sources.get(k).and_then(Option::as_ref).is_none() {
                        ui.label("a wave forecast: read for the sea state on the way and at the stretches, not for wind");
                    }
                } else if let Some(fc) = &forecast {
                    ui.label(span_text(fc.sources.get(k).and_then(Option::as_ref), fc.time_zone));
                    let segs = segments_from(fc, &names, k);
                    ui.label(if segs.is_empty() {
                        "wind for no segment".to_string()
                    } else {
                        format!("wind for: {}", segs.join(", "))
                    });
                }
                ui.horizontal(|ui| {
                    let mut set = |list: Vec<PathBuf>| {
                        commands.push(Command::Edit(Edit::SetWindFiles(list)));
                    };
                    if ui.add_enabled(k > 0, egui::Button::new("Move up")).clicked() {
                        let mut list = files.clone();
                        list.swap(k, k - 1);
                        set(list);
                    }
                    if ui
                        .add_enabled(k + 1 < files.len(), egui::Button::new("Move down"))
                        .clicked()
                    {
                        let mut list = files.clone();
                        list.swap(k, k + 1);
                        set(list);
                    }
                    if ui.button("Remove").clicked() {
                        let mut list = files.clone();
                        list.remove(k);
                        set(list);
                    }
                });
                ui.separator();
            }
            if files.is_empty() {
                ui.label("No wind file yet.");
            }
            ui.horizontal(|ui| {
                if ui.button("Add a wind file…").clicked() {
                    commands.push(Command::AskFile(super::commands::FileAction::ImportWind));
                }
                close = ui.button("Close").clicked();
            });
        });
    if scrolled {
        app.scroll_to_added = false;
    }
    if !open || close {
        app.dialogs.show_wind_files = false;
    }
}
