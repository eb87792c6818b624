//! Tuned to our own water: the response model fitted to a co-op's catch log, with the
//! skill it gains measured honestly ([`fit`]), and `shelfwind calibrate`.
//!
//! The wind record is computed once through the plan's own pipeline (stretches, index,
//! events, daily inputs); each landing is matched to its stretches and day, and from
//! then on only the response model is re-run.

mod command;
mod fit;
mod log;

pub use command::{
    CalibrateArgs, CalibrateFormatArg, calibrate_scenario, calibrated_scenario, run_calibrate,
};

pub use fit::{
    BONUS_GRID, FLUSH_GRID, Fit, LAG_GRID, MAX_P, MIN_FOLD_ROWS, MIN_GAIN, OPTIMUM_GRID, Params,
    RANGE_RHO, Sample, Window, predict, spearman,
};
pub use log::{CatchLog, CatchLogError, CatchRow, EffortUnit, Place, read_catch_log};

use crate::coast::LatLon;
use crate::physics::NAUTICAL_MILE_M;
use crate::plan::{Forecast, StretchForecast};
use crate::upwelling::{DayInput, ResponseSettings};
use chrono::{Datelike, NaiveDate};
use std::collections::HashMap;

/// Choices of a calibration.
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrateOptions {
    /// Keep only this species (any case).
    pub species: Option<String>,
    /// Keep only this vessel (any case).
    pub vessel: Option<String>,
    /// A position further than this from every stretch is skipped, nm.
    pub max_distance_nm: f64,
    /// Skip (and count) landings at unknown places instead of refusing the log.
    pub skip_bad: bool,
    /// Shuffles of the permutation test.
    pub permutations: usize,
}

impl Default for CalibrateOptions {
    fn default() -> Self {
        Self {
            species: None,
            vessel: None,
            max_distance_nm: 3.0,
            skip_bad: false,
            permutations: 199,
        }
    }
}

/// How the log was cut for cross-validation.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FoldKind {
    /// One fold per season (calendar year; July to June south of the equator).
    Seasons,
    /// One fold per month: the log covers one season.
    Months,
}

impl FoldKind {
    /// The folds' name, plural.
    #[must_use]
    pub fn plural(self) -> &'static str {
        match self {
            Self::Seasons => "seasons",
            Self::Months => "months",
        }
    }
}

/// One landing used, as the results show it.
#[derive(Debug, Clone, PartialEq)]
pub struct Landing {
    /// Its line in the log.
    pub line: u64,
    /// The local day.
    pub date: NaiveDate,
    /// The stretch or segment it stands for.
    pub place: String,
    /// Catch per unit effort.
    pub cpue: f64,
}

/// A calibration: the fit, the landings behind it, and what was left out.
#[derive(Debug, Clone)]
pub struct Calibration {
    /// The fit and its skill.
    pub fit: Fit,
    /// The landings used, in the order of the fit's predictions.
    pub landings: Vec<Landing>,
    /// Landings left out (other species or vessels are not counted): line and why.
    pub skipped: Vec<(u64, String)>,
    /// Landings of other species or vessels.
    pub filtered_out: usize,
    /// What effort is counted in.
    pub effort_unit: EffortUnit,
    /// How the folds were cut.
    pub fold_kind: FoldKind,
    /// The response settings before.
    pub base: ResponseSettings,
}

impl Calibration {
    /// The calibrated settings, when the log supports a change.
    #[must_use]
    pub fn calibrated(&self) -> Option<ResponseSettings> {
        self.fit
            .supported()
            .then(|| self.fit.best.apply(&self.base))
    }

    /// The skill, as lines of a table: what, and its value (`None`: not measured).
    #[must_use]
    pub fn skill_rows(&self) -> Vec<(String, Option<f64>)> {
        let f = &self.fit;
        let folds = self.fold_kind.plural();
        vec![
            (
                "Current settings, whole log".to_string(),
                Some(f.default_rho),
            ),
            (
                format!("Current settings, left-out {folds}"),
                f.default_rho_folds,
            ),
            (
                "Fitted settings, whole log (in-sample)".to_string(),
                Some(f.best_rho),
            ),
            (
                format!("Fitted settings, cross-validated over {} {folds}", f.folds),
                f.cv_rho,
            ),
            (
                format!("Permutation p-value ({} shuffles)", f.permutations),
                f.p_value,
            ),
        ]
    }

    /// The verdict in one sentence.
    #[must_use]
    pub fn verdict(&self) -> String {
        let f = &self.fit;
        let folds = self.fold_kind.plural();
        match (f.cv_rho, f.default_rho_folds, f.p_value) {
            (Some(cv), Some(default), Some(p)) if f.supported() => format!(
                "The log supports a change: the fitted settings order this log's catch rates with ρ = {cv:.2} on {folds} they were not fitted to, against {default:.2} for the current settings, and only {:.1} % of shuffled logs did as well (p = {p:.3}).",
                p * 100.0
            ),
            (Some(cv), Some(default), Some(p)) => format!(
                "The log does not support a change; nothing is changed: the fitted settings reach ρ = {cv:.2} on left-out {folds} against {default:.2} for the current settings (a change needs a gain of {MIN_GAIN} or more), and shuffled logs did as well {:.0} % of the time (p = {p:.2}; a change needs p < {MAX_P}).",
                p * 100.0
            ),
            _ => format!(
                "The log does not support a change; nothing is changed: it is too short to test a fit on landings it was not fitted to (each season, or month, needs {MIN_FOLD_ROWS} landings, with {MIN_FOLD_ROWS} more elsewhere)."
            ),
        }
    }
}

/// Distance from `p` to a stretch's line, m (legs measured on a local flat map).
fn distance_to_line(p: LatLon, points: &[LatLon]) -> f64 {
    let k = p.lat_deg.to_radians().cos();
    let xy = |q: &LatLon| {
        (
            (q.lon_deg - p.lon_deg) * k * 111_195.0,
            (q.lat_deg - p.lat_deg) * 111_195.0,
        )
    };
    let leg = |a: (f64, f64), b: (f64, f64)| {
        let (dx, dy) = (b.0 - a.0, b.1 - a.1);
        let len2 = dx * dx + dy * dy;
        let t = if len2 > 0.0 {
            (-(a.0 * dx + a.1 * dy) / len2).clamp(0.0, 1.0)
        } else {
            0.0
        };
        (a.0 + t * dx).hypot(a.1 + t * dy)
    };
    match points {
        [] => f64::INFINITY,
        [one] => {
            let a = xy(one);
            a.0.hypot(a.1)
        }
        _ => points
            .windows(2)
            .map(|w| leg(xy(&w[0]), xy(&w[1])))
            .fold(f64::INFINITY, f64::min),
    }
}

/// The stretches a place stands for, and its label, or why none.
fn stretches_of(
    place: &Place,
    stretches: &[std::sync::Arc<StretchForecast>],
    max_m: f64,
) -> Result<(Vec<usize>, String), String> {
    match place {
        Place::Stretch(id) => stretches
            .iter()
            .position(|s| s.id == *id)
            .map(|k| (vec![k], id.clone()))
            .ok_or_else(|| format!("stretch \"{id}\" is not in the scenario")),
        Place::Segment(id) => {
            let all: Vec<usize> = (0..stretches.len())
                .filter(|&k| stretches[k].segment_id == *id)
                .collect();
            if all.is_empty() {
                Err(format!("segment \"{id}\" is not in the scenario"))
            } else {
                Ok((all, id.clone()))
            }
        }
        Place::Position(p) => {
            let (k, d) = stretches
                .iter()
                .enumerate()
                .map(|(k, s)| (k, distance_to_line(*p, &s.points)))
                .min_by(|a, b| a.1.total_cmp(&b.1))
                .ok_or("the scenario has no stretches")?;
            if d <= max_m {
                Ok((vec![k], stretches[k].id.clone()))
            } else {
                Err(format!(
                    "position {:.4}, {:.4} is {:.1} nm from the nearest stretch (more than {:.1} nm)",
                    p.lat_deg,
                    p.lon_deg,
                    d / NAUTICAL_MILE_M,
                    max_m / NAUTICAL_MILE_M
                ))
            }
        }
    }
}

/// The season a day falls in: its year, or south of the equator the year its July
/// starts.
fn season_of(date: NaiveDate, southern: bool) -> i32 {
    if southern && date.month() < 7 {
        date.year() - 1
    } else {
        date.year()
    }
}

/// Puts each sample in its fold, from its (season, month): a fold per season, or per
/// month when there is one season.
fn assign_folds(samples: &mut [Sample], seasons: &[(i32, u32)]) -> FoldKind {
    let mut distinct: Vec<i32> = seasons.iter().map(|s| s.0).collect();
    distinct.sort_unstable();
    distinct.dedup();
    let kind = if distinct.len() > 1 {
        FoldKind::Seasons
    } else {
        FoldKind::Months
    };
    let labels: Vec<(i32, u32)> = seasons
        .iter()
        .map(|&(season, month)| match kind {
            FoldKind::Seasons => (season, 0),
            FoldKind::Months => (season, month),
        })
        .collect();
    let mut order = labels.clone();
    order.sort_unstable();
    order.dedup();
    for (sample, label) in samples.iter_mut().zip(&labels) {
        sample.fold = order.binary_search(label).unwrap_or(0);
    }
    kind
}

/// Calibrates the response model of `forecast` (computed over the log's period with the
/// settings `base`) on `log`. Landings at unknown places are an error naming their line,
/// or skipped with `options.skip_bad`; landings on days without wind at their stretch
/// are always skipped and counted.
pub fn calibrate(
    forecast: &Forecast,
    log: &CatchLog,
    base: &ResponseSettings,
    options: &CalibrateOptions,
) -> Result<Calibration, String> {
    let matches = |want: &Option<String>, got: &Option<String>| {
        want.as_ref()
            .is_none_or(|w| got.as_ref().is_some_and(|g| g.eq_ignore_ascii_case(w)))
    };
    for (want, has, what) in [
        (
            &options.species,
            log.rows.iter().any(|r| r.species.is_some()),
            "species",
        ),
        (
            &options.vessel,
            log.rows.iter().any(|r| r.vessel.is_some()),
            "vessel",
        ),
    ] {
        if want.is_some() && !has {
            return Err(format!(
                "the log has no {what} column to filter on: remove the {what} filter or add the column"
            ));
        }
    }
    let day_index: HashMap<NaiveDate, usize> = forecast
        .days
        .iter()
        .enumerate()
        .map(|(k, d)| (*d, k))
        .collect();
    // Each stretch's daily inputs, worked out once.
    let inputs: Vec<Vec<DayInput>> = forecast
        .stretches
        .iter()
        .map(|s| s.days.iter().map(|d| d.input(&s.events)).collect())
        .collect();
    let mut skipped = log.skipped.clone();
    let mut filtered_out = 0;
    let mut landings = Vec::new();
    let mut samples = Vec::new();
    let mut places: HashMap<String, usize> = HashMap::new();
    let mut seasons: Vec<(i32, u32)> = Vec::new();
    for row in &log.rows {
        if !matches(&options.species, &row.species) || !matches(&options.vessel, &row.vessel) {
            filtered_out += 1;
            continue;
        }
        let (at, label) = match stretches_of(
            &row.place,
            &forecast.stretches,
            options.max_distance_nm * NAUTICAL_MILE_M,
        ) {
            Ok(found) => found,
            Err(why) if options.skip_bad || matches!(row.place, Place::Position(_)) => {
                skipped.push((row.line, why));
                continue;
            }
            Err(why) => return Err(format!("line {}: {why}", row.line)),
        };
        let day = day_index.get(&row.date).copied();
        let covered = day.is_some_and(|k| {
            at.iter().all(|&s| {
                forecast.stretches[s]
                    .days
                    .get(k)
                    .is_some_and(|d| d.mean_index_m3s_per_100m.is_some())
            })
        });
        let (Some(k), true) = (day, covered) else {
            skipped.push((
                row.line,
                format!(
                    "{}: no wind at {label} that day in the wind record",
                    row.date
                ),
            ));
            continue;
        };
        let windows = at
            .iter()
            .map(|&s| Window::of(&inputs[s][..=k], base))
            .collect();
        let next = places.len();
        let place = *places.entry(label.clone()).or_insert(next);
        let southern = at
            .iter()
            .any(|&s| forecast.stretches[s].centre.lat_deg < 0.0);
        seasons.push((season_of(row.date, southern), row.date.month()));
        samples.push(Sample {
            windows,
            cpue: row.cpue(),
            place,
            fold: 0,
        });
        landings.push(Landing {
            line: row.line,
            date: row.date,
            place: label,
            cpue: row.cpue(),
        });
    }
    if samples.len() < 3 {
        return Err(format!(
            "only {} landings could be matched to a stretch and a day with wind: give the wind record of the log's period (--wind)",
            samples.len()
        ));
    }
    let fold_kind = assign_folds(&mut samples, &seasons);
    Ok(Calibration {
        fit: fit::fit(&samples, base, options.permutations),
        landings,
        skipped,
        filtered_out,
        effort_unit: log.effort_unit,
        fold_kind,
        base: *base,
    })
}
