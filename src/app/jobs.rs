//! The background job that makes the plan, so the window never freezes; with progress
//! and a Cancel button. It keeps the stages' results: picking another boat, port or day,
//! renaming a segment or changing a closure ranks again from them without reading any
//! file; only new wind files or a change of coast geometry sample the wind again, and a
//! change of model settings recomputes the upwelling from the same samples. A failed job
//! leaves the previous plan (and forecast) in place.

use super::edit::Edit;
use super::messages::Subject;
use super::state::ShelfwindApp;
use crate::coast::{Land, resolve_segments};
use crate::plan::{
    Forecast, Plan, SampledConditions, UpwellingSettings, forecast_key, rank_plan,
    sample_forecast_conditions,
};
use crate::progress::Progress;
use crate::scenario::{PlanChoice, Scenario};
use crate::wind::{SourceIdentity, check_source, load_sources};
use chrono_tz::Tz;
use eframe::egui;
use std::path::PathBuf;
use std::sync::Arc;
use std::sync::mpsc::{Receiver, channel};

/// The stages' results kept between jobs.
#[derive(Clone)]
pub struct StageCache {
    conditions: Arc<SampledConditions>,
    tz: Tz,
    settings: UpwellingSettings,
    forecast: Arc<Forecast>,
}

impl StageCache {
    /// The forecast the plan was ranked from.
    pub(super) fn forecast(&self) -> std::sync::Arc<Forecast> {
        self.forecast.clone()
    }
}

/// What a job gives back.
type JobResult = Result<(Plan, StageCache), String>;

/// What wind files hold (`inspect`'s text), by path.
type Summaries = Vec<(PathBuf, String)>;

/// The summaries of the files not yet described.
fn summaries(paths: &[PathBuf]) -> Summaries {
    paths
        .iter()
        .filter_map(|p| {
            crate::wind::inspect_file(p)
                .ok()
                .map(|s| (p.clone(), s.to_text()))
        })
        .collect()
}

/// A running plan job.
pub struct PlanJob {
    /// Progress and cancel.
    pub progress: Arc<Progress>,
    /// What the job is for.
    pub label: String,
    /// The new wind files, when the job imports a forecast.
    pub new_wind_files: Option<Vec<PathBuf>>,
    rx: Receiver<(JobResult, Summaries)>,
}

/// Everything the job needs, copied from the app so the thread owns it.
struct JobInput {
    scenario: Scenario,
    winds: Vec<PathBuf>,
    vessel_id: Option<String>,
    port_id: Option<String>,
    cache: Option<StageCache>,
    /// A file being added, checked whole before the plan is made.
    new_file: Option<PathBuf>,
    /// Wind files whose contents are to be described.
    describe: Vec<PathBuf>,
    /// The land with the scenario's coast pack; `None`: the bundled land.
    land: Option<Arc<Land>>,
}

/// The conditions: from the cache when the files and the geometry are unchanged,
/// sampled afresh otherwise.
fn conditions(input: &JobInput, progress: &Progress) -> Result<Arc<SampledConditions>, String> {
    let scenario = &input.scenario;
    let land = input.land.as_deref().unwrap_or_else(|| Land::bundled());
    let segments = resolve_segments(&scenario.segments, land).map_err(|e| e.to_string())?;
    let ports = scenario.port_positions();
    let geometry = scenario.forecast_geometry(&segments, &ports, land);
    let identities = input
        .winds
        .iter()
        .map(|p| SourceIdentity::of(p))
        .collect::<Result<Vec<_>, _>>()
        .map_err(|e| e.to_string())?;
    if let Some(cache) = &input.cache
        && cache
            .conditions
            .fits(&identities, forecast_key(&geometry), scenario.run_rule())
    {
        return Ok(cache.conditions.clone());
    }
    let sources = load_sources(&input.winds).map_err(|e| e.to_string())?;
    sample_forecast_conditions(&geometry, &sources, scenario.run_rule(), progress)
        .map(Arc::new)
        .map_err(|e| e.to_string())
}

fn run_job(input: &JobInput, progress: &Progress) -> JobResult {
    if let Some(new) = &input.new_file {
        // A new file is read whole first: the files before it may cover every point.
        let sources = load_sources(std::slice::from_ref(new)).map_err(|e| e.to_string())?;
        for s in &sources {
            check_source(s, progress).map_err(|e| e.to_string())?;
        }
    }
    let scenario = &input.scenario;
    let tz = scenario.tz().map_err(|e| e.to_string())?;
    let settings = scenario.upwelling_settings();
    let conditions = conditions(input, progress)?;
    if progress.is_cancelled() {
        return Err("stopped".into());
    }
    let forecast = match &input.cache {
        Some(c)
            if Arc::ptr_eq(&c.conditions, &conditions) && c.tz == tz && c.settings == settings =>
        {
            c.forecast.clone()
        }
        _ => Arc::new(conditions.forecast(tz, &settings)),
    };
    let choice = PlanChoice {
        vessel_id: input.vessel_id.as_deref(),
        port_id: input.port_id.as_deref(),
        from: None,
        days: 7,
        now: chrono::Utc::now(),
    };
    let request = scenario.plan_request(&choice).map_err(|e| e.to_string())?;
    let plan = rank_plan(&forecast, &request).map_err(|e| e.to_string())?;
    Ok((
        plan,
        StageCache {
            conditions,
            tz,
            settings,
            forecast,
        },
    ))
}

impl ShelfwindApp {
    /// The wind files of the document, as paths to read.
    pub(super) fn wind_paths(&self, files: &[PathBuf]) -> Vec<PathBuf> {
        files
            .iter()
            .map(|f| {
                if f.is_absolute() {
                    f.clone()
                } else {
                    self.base_dir().join(f)
                }
            })
            .collect()
    }

    /// Starts computing the plan; with `new_wind`, trying a new forecast that replaces
    /// the document's only if it reads.
    pub(super) fn start_plan_job(&mut self, ctx: &egui::Context, new_wind: Option<Vec<PathBuf>>) {
        if let Some(job) = &self.job {
            job.progress.cancel();
        }
        self.plan_stale = false;
        let scenario = self.doc.scenario.clone();
        let files = new_wind
            .clone()
            .unwrap_or_else(|| scenario.wind_files.clone());
        let valid_vessel = |id: &Option<String>| {
            id.clone()
                .filter(|v| scenario.vessels.iter().any(|x| &x.id == v))
        };
        let valid_port = |id: &Option<String>| {
            id.clone()
                .filter(|v| scenario.ports.iter().any(|x| &x.id == v))
        };
        let input = JobInput {
            winds: self.wind_paths(&files),
            vessel_id: valid_vessel(&self.view.vessel_id),
            port_id: valid_port(&self.view.port_id),
            scenario,
            cache: self.stage_cache.clone(),
            new_file: new_wind.as_ref().and_then(|f| f.last().cloned()),
            describe: Vec::new(),
            land: self.land_model(),
        };
        let mut input = input;
        input.describe = input
            .winds
            .iter()
            .filter(|p| !self.file_summaries.contains_key(*p))
            .cloned()
            .collect();
        if input.scenario.segments.is_empty() {
            self.plan = None;
            self.plan_error =
                Some("No coast yet: draw a segment on the map or import a GeoJSON coast.".into());
            return;
        }
        let progress = Arc::new(Progress::new());
        let (tx, rx) = channel();
        let worker_progress = progress.clone();
        let repaint = ctx.clone();
        let label = match &new_wind {
            Some(f) => format!(
                "Reading {}",
                f.last()
                    .and_then(|p| p.file_name())
                    .map(|n| n.to_string_lossy().to_string())
                    .unwrap_or_default()
            ),
            None => "Reading the forecast and ranking the stretches".into(),
        };
        let spawned = std::thread::Builder::new()
            .name("shelfwind-plan".into())
            .spawn(move || {
                let result = run_job(&input, &worker_progress);
                let _ = tx.send((result, summaries(&input.describe)));
                repaint.request_repaint();
            });
        match spawned {
            Ok(_) => {
                self.job = Some(PlanJob {
                    progress,
                    label,
                    new_wind_files: new_wind,
                    rx,
                });
            }
            Err(e) => self.error(
                Subject::App,
                format!("Cannot start the background job: {e}"),
            ),
        }
    }

    /// Takes the job's result when it is ready.
    pub(super) fn poll_job(&mut self, _ctx: &egui::Context) {
        let Some(job) = &self.job else { return };
        let Ok((result, described)) = job.rx.try_recv() else {
            return;
        };
        self.file_summaries.extend(described);
        let Some(job) = self.job.take() else { return };
        let cancelled = job.progress.is_cancelled();
        match (result, job.new_wind_files) {
            (Ok((plan, cache)), new_wind) => {
                self.stage_cache = Some(cache);
                self.forget(Subject::Forecast);
                if let Some(files) = new_wind {
                    let added = files
                        .last()
                        .map(|f| f.display().to_string())
                        .unwrap_or_default();
                    self.added_wind_file = files.last().cloned();
                    self.edit(Edit::SetWindFiles(files));
                    // The edit marks the plan stale; this plan already uses the new files.
                    self.plan_stale = false;
                    self.info(
                        Subject::Forecast,
                        format!(
                            "Wind file added: {added}. The wind files window tells what it holds."
                        ),
                    );
                    self.dialogs.show_wind_files = true;
                    self.scroll_to_added = true;
                }
                self.install_plan(plan);
            }
            (Err(_), _) if cancelled => {}
            (Err(e), Some(files)) => {
                let holds = files
                    .last()
                    .and_then(|f| {
                        self.file_summaries
                            .get(&self.wind_paths(std::slice::from_ref(f))[0])
                    })
                    .map(|s| format!("\n\nWhat the file holds:\n{s}"))
                    .unwrap_or_default();
                self.error(
                    Subject::Forecast,
                    format!(
                        "The wind file was not added; the forecast is as it was.\n\n{e}{holds}"
                    ),
                );
            }
            (Err(e), None) => {
                self.plan_error = Some(e);
            }
        }
    }

    fn install_plan(&mut self, plan: Plan) {
        let mut timeline: Vec<_> = plan
            .stretches
            .iter()
            .flat_map(|s| s.hours.iter().map(|h| h.time))
            .collect();
        timeline.sort();
        timeline.dedup();
        let keep_time = self.view.timeline.get(self.view.hour).copied();
        let first_plan_day = plan.days.first().map(|d| d.date);
        self.view.timeline = timeline;
        self.plan_error = None;
        self.view.vessel_id = Some(plan.vessel.id.clone());
        self.view.port_id = Some(plan.port.id.clone());
        let ids: Vec<String> = plan.stretches.iter().map(|s| s.id.clone()).collect();
        self.view.selected.retain(|s| ids.contains(s));
        if self.view.selected.is_empty()
            && let Some(best) = plan
                .days
                .get(self.view.day.min(plan.days.len().saturating_sub(1)))
                .and_then(|d| d.ranked.first())
        {
            self.view.selected = vec![plan.stretches[best.stretch].id.clone()];
        }
        let tz = plan.time_zone;
        // The first plan of a document brings the plots panel, which shrinks the map:
        // frame the coast again.
        if self.plan.is_none() {
            self.view.fit_coast = true;
        }
        self.plan = Some(Arc::new(plan));
        match keep_time.and_then(|t| self.view.timeline.iter().position(|x| *x == t)) {
            Some(h) => self.set_hour(h),
            None => {
                // First plan: the first planned day at local noon.
                let noon = first_plan_day.map(|d| crate::localtime::local_noon(tz, d));
                let noon = self.view.timeline.iter().position(|t| Some(*t) == noon);
                self.view.day = 0;
                self.view.hour = noon.unwrap_or(0);
            }
        }
    }
}
