//! Ranking the stretches for one boat and home port, day by day, from the forecast:
//! closures, range, the safe window inside the boat's wind limit, the score and the
//! typed reasons.

use super::forecast::{Forecast, Latitude, StretchForecast};
use super::reasons::{
    Exclusion, Odds, Reasons, Stopper, TripReason, UpwellingReason, WaveReason, WaveSource,
    WindReason,
};
use super::window::{Limits, Unsafe, WorkingHour, longest_safe_run, run_span};
use super::{Port, TripSettings, Vessel};
use crate::coast::{Closure, CoastSegment};
use crate::localtime::{local_day, local_time};
use crate::upwelling::{EventPhase, UpwellingDay};
use chrono::{DateTime, NaiveDate, Utc};
use chrono_tz::Tz;
use rayon::prelude::*;
use std::sync::Arc;

/// A stretch as one plan sees it: the forecast stretch, with the name and closure of
/// its segment and the way to it from the plan's port.
#[derive(Debug, Clone, PartialEq)]
pub struct StretchInfo {
    /// The stretch and its upwelling (shared with the forecast, never copied).
    pub forecast: Arc<StretchForecast>,
    /// Name to show: the segment's name, with `n/m` when it has several stretches.
    pub name: String,
    /// Closure, if the segment has one.
    pub closure: Option<Closure>,
    /// Great-circle distance from the home port to the centre, nm.
    pub distance_nm: f64,
    /// The way by sea from the port, `None` where none was found.
    pub route: Option<Arc<crate::coast::SeaRoute>>,
    /// Per hour of the forecast timeline, the strongest wind on the way and at the
    /// stretch, knots.
    route_max_wind_kt: super::forecast::HourlyValues,
    /// Per hour, the highest waves on the way and at the stretch, m.
    route_max_wave_m: super::forecast::HourlyValues,
    /// Per hour, the steepest sea on the way and at the stretch, m/s^2.
    route_max_steepness: super::forecast::HourlyValues,
    /// Where those wave heights come from.
    pub wave_source: WaveSource,
    timeline_start: Option<DateTime<Utc>>,
    /// The stretch in every run of an ensemble, in the order of [`Plan::runs`] (empty
    /// for a single forecast).
    pub runs: Vec<Arc<StretchForecast>>,
}

// A stretch in a plan *is* its forecast stretch plus what the plan adds; reading
// `s.hours` or `s.points` through it keeps every face simple.
impl std::ops::Deref for StretchInfo {
    type Target = StretchForecast;
    fn deref(&self) -> &StretchForecast {
        &self.forecast
    }
}

impl StretchInfo {
    /// Where hour `t` is on the forecast's hourly timeline.
    fn hour_index(&self, t: DateTime<Utc>) -> Option<usize> {
        usize::try_from((t - self.timeline_start?).num_hours()).ok()
    }

    /// The strongest wind on the way from port and at the stretch at hour `t`, knots.
    #[must_use]
    pub fn route_wind_kt(&self, t: DateTime<Utc>) -> Option<f64> {
        super::forecast::hourly_at(&self.route_max_wind_kt, self.hour_index(t)?)
    }

    /// The steepest sea on the way from port and at the stretch at hour `t`, the height
    /// over the period squared, m/s^2.
    #[must_use]
    pub fn route_steepness_m_s2(&self, t: DateTime<Utc>) -> Option<f64> {
        super::forecast::hourly_at(&self.route_max_steepness, self.hour_index(t)?)
    }

    /// The highest waves on the way from port and at the stretch at hour `t`, m.
    #[must_use]
    pub fn route_wave_m(&self, t: DateTime<Utc>) -> Option<f64> {
        super::forecast::hourly_at(&self.route_max_wave_m, self.hour_index(t)?)
    }
}

/// A stretch's place in a day's ranking.
#[derive(Debug, Clone, PartialEq)]
pub struct RankedStretch {
    /// Index into [`Plan::stretches`].
    pub stretch: usize,
    /// 1-based rank; tied stretches share the rank of the first of them.
    pub rank: usize,
    /// Within the tie margin of the stretch above.
    pub tied_with_above: bool,
    /// Score, 0–100.
    pub score: f64,
    /// Expected productivity, 0–1.
    pub productivity: f64,
    /// Share of a full fishing day the safe window allows, 0–1.
    pub window_factor: f64,
    /// Distance factor, 1 at the port to `1 − distance_weight` at the boat's range.
    pub distance_factor: f64,
    /// Start and end of the longest safe window within working hours.
    pub safe_window: (DateTime<Utc>, DateTime<Utc>),
    /// Fishing hours on the ground inside that window.
    pub fishing_hours: f64,
    /// Steaming time each way, minutes.
    pub steam_minutes: f64,
    /// Fuel for the round trip, litres.
    pub fuel_l: f64,
    /// Strongest wind at the stretch and on the way in working hours, knots.
    pub max_wind_kt: f64,
    /// Why it ranks here.
    pub reasons: Reasons,
}

/// A stretch left out of a day's ranking, and why.
#[derive(Debug, Clone, PartialEq)]
pub struct Excluded {
    /// Index into [`Plan::stretches`].
    pub stretch: usize,
    /// Why.
    pub exclusion: Exclusion,
}

/// One local day of the plan.
#[derive(Debug, Clone, PartialEq)]
pub struct DayPlan {
    /// The local day.
    pub date: NaiveDate,
    /// Ranked stretches, best first.
    pub ranked: Vec<RankedStretch>,
    /// Stretches left out, with the reason.
    pub excluded: Vec<Excluded>,
    /// Per stretch (in the order of [`Plan::stretches`]), what the runs of an ensemble
    /// say; empty for a single forecast, `None` where no run has the day.
    pub odds: Vec<Option<Odds>>,
}

/// Plan-wide notes: how the plan was made and what it did not check.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum PlanNote {
    /// Distances are by sea, keeping a clearance from the land outline.
    SeaRoutes {
        /// The clearance, nm.
        clearance_nm: f64,
    },
    /// Where the waves the plan checked come from: how many stretches were checked
    /// against a wave forecast, against an estimate of the wind sea only, and against
    /// nothing.
    WaveSources {
        /// Stretches checked against a wave forecast.
        forecast: usize,
        /// Stretches checked against an estimate of the local wind sea.
        estimate: usize,
        /// Stretches whose waves nothing tells.
        none: usize,
        /// The boat's wave limit, if set.
        limit_m: Option<f64>,
    },
    /// When the newest wind file was issued (GRIB2 files say), against when the plan
    /// was made: an old forecast, or one that does not reach today, is worth a look.
    Issued {
        /// The newest issue (reference) time among the wind files.
        issued: DateTime<Utc>,
        /// When the plan was made ("now" of the request).
        made: DateTime<Utc>,
        /// Whether the forecast's days include today (local).
        covers_today: bool,
    },
    /// Some stretches lie between 5° and 10° from the equator.
    NearEquator,
    /// The forecast is one run: no odds can be given.
    SingleForecast,
    /// The forecast is an ensemble of this many runs: scores are the runs' mean.
    Ensemble {
        /// Runs.
        runs: usize,
    },
}

/// Forecasts older than this are called old (two days: common practice is to plan on
/// the latest forecast, issued every 6 to 12 hours).
pub const OLD_FORECAST_HOURS: i64 = 48;

impl PlanNote {
    /// A note the skipper should not miss: a forecast issued long before the plan, after
    /// this computer's clock, or one that does not reach today; waves only estimated or
    /// not known somewhere; stretches near the equator.
    #[must_use]
    pub fn is_warning(&self) -> bool {
        match self {
            Self::WaveSources { estimate, none, .. } => *estimate > 0 || *none > 0,
            Self::NearEquator => true,
            Self::Issued {
                issued,
                made,
                covers_today,
            } => {
                issued > made
                    || (*made - *issued).num_hours() >= OLD_FORECAST_HOURS
                    || !covers_today
            }
            _ => false,
        }
    }
}

/// The whole plan.
#[derive(Debug, Clone, PartialEq)]
pub struct Plan {
    /// Scenario name.
    pub scenario_name: String,
    /// IANA time zone of local days and times.
    pub time_zone: Tz,
    /// The boat.
    pub vessel: Vessel,
    /// The home port.
    pub port: Port,
    /// Every stretch.
    pub stretches: Vec<StretchInfo>,
    /// The planned days.
    pub days: Vec<DayPlan>,
    /// Plan-wide notes.
    pub notes: Vec<PlanNote>,
    /// The runs of an ensemble forecast, control first (empty: a single forecast).
    pub runs: Vec<crate::wind::Member>,
}

/// Why no plan could be made.
#[derive(Debug, thiserror::Error)]
pub enum PlanError {
    /// Something in the scenario is missing or unknown.
    #[error("{0}")]
    Scenario(String),
    /// The forecast could not be made.
    #[error(transparent)]
    Forecast(#[from] super::ForecastError),
}

/// What to rank, for whom.
#[derive(Debug, Clone, Copy)]
pub struct PlanRequest<'a> {
    /// Scenario name, for the headings.
    pub scenario_name: &'a str,
    /// The drawn coast: segment names and closures.
    pub coast: &'a [CoastSegment],
    /// The boat.
    pub vessel: &'a Vessel,
    /// The home port (one of the ports the forecast was sampled for).
    pub port: &'a Port,
    /// Trip settings.
    pub trip: &'a TripSettings,
    /// First local day; today if the forecast covers it, else the day the newest
    /// forecast was issued, else its first day.
    pub from: Option<NaiveDate>,
    /// Number of days.
    pub days: usize,
    /// "Now", for the default first day.
    pub now: DateTime<Utc>,
}

/// The default first day: today when the forecast covers it; else the day the newest
/// forecast was issued (earlier steps are the recent past, which the response needs);
/// else the first day of the forecast.
fn first_day(forecast: &Forecast, now: DateTime<Utc>) -> Option<NaiveDate> {
    let tz = forecast.time_zone;
    let covered = |d: &NaiveDate| forecast.days.contains(d);
    Some(local_day(tz, now))
        .filter(covered)
        .or_else(|| {
            forecast
                .latest_reference
                .map(|t| local_day(tz, t))
                .filter(covered)
        })
        .or_else(|| forecast.days.first().copied())
}

/// Ranks the forecast's stretches for one boat and port, day by day. Fast: no file is
/// read and nothing of the upwelling is computed again.
pub fn rank_plan(forecast: &Forecast, req: &PlanRequest<'_>) -> Result<Plan, PlanError> {
    let routes = forecast
        .routes
        .iter()
        .find(|r| r.port == req.port.position)
        .ok_or_else(|| {
            PlanError::Scenario(format!(
                "port {:?} was added after the forecast was read: read it again",
                req.port.id
            ))
        })?;
    let mut stretches = stretch_infos(forecast, &forecast.stretches, routes, req);
    // Each run of an ensemble is ranked from its own stretches and ways.
    let runs: Vec<Vec<StretchInfo>> = match &forecast.ensemble {
        Some(e) => e
            .stretches
            .iter()
            .zip(&e.routes)
            .map(|(run, run_routes)| {
                let r = run_routes
                    .iter()
                    .find(|r| r.port == req.port.position)
                    .unwrap_or(routes);
                stretch_infos(forecast, run, r, req)
            })
            .collect(),
        None => Vec::new(),
    };
    for (k, s) in stretches.iter_mut().enumerate() {
        s.runs = runs.iter().map(|r| r[k].forecast.clone()).collect();
    }
    let from = req
        .from
        .or_else(|| first_day(forecast, req.now))
        .ok_or(PlanError::Forecast(super::ForecastError::NoWind))?;
    let ranker = DayRanker {
        tz: forecast.time_zone,
        vessel: req.vessel,
        trip: req.trip,
        relaxation_window_days: forecast.settings.response.relaxation_window_days,
        threshold_m3s_per_100m: forecast.settings.events.threshold_m3s_per_100m,
    };
    // Days are ranked independently: in parallel.
    let dates: Vec<NaiveDate> = (0..req.days.max(1))
        .filter_map(|k| from.checked_add_days(chrono::Days::new(k as u64)))
        .collect();
    let days = dates
        .into_par_iter()
        .map(|d| {
            if runs.is_empty() {
                ranker.rank_day(d, &stretches)
            } else {
                ranker.rank_day_runs(d, &runs)
            }
        })
        .collect();
    let mut notes: Vec<PlanNote> = forecast
        .latest_reference
        .map(|issued| PlanNote::Issued {
            issued,
            made: req.now,
            covers_today: forecast
                .days
                .contains(&local_day(forecast.time_zone, req.now)),
        })
        .into_iter()
        .collect();
    notes.push(PlanNote::SeaRoutes {
        clearance_nm: req.trip.sea_clearance_nm,
    });
    let count = |w: WaveSource| stretches.iter().filter(|s| s.wave_source == w).count();
    notes.push(PlanNote::WaveSources {
        forecast: count(WaveSource::Forecast),
        estimate: count(WaveSource::Estimate),
        none: count(WaveSource::None),
        limit_m: req.vessel.wave_limit_m,
    });
    if stretches
        .iter()
        .any(|s| s.latitude == Latitude::NearEquator)
    {
        notes.push(PlanNote::NearEquator);
    }
    notes.push(if runs.is_empty() {
        PlanNote::SingleForecast
    } else {
        PlanNote::Ensemble { runs: runs.len() }
    });
    Ok(Plan {
        scenario_name: req.scenario_name.to_string(),
        time_zone: forecast.time_zone,
        vessel: req.vessel.clone(),
        port: req.port.clone(),
        stretches,
        days,
        notes,
        runs: forecast
            .ensemble
            .as_ref()
            .map(|e| e.members.clone())
            .unwrap_or_default(),
    })
}

/// The stretches of one run as a plan for `req` sees them.
fn stretch_infos(
    forecast: &Forecast,
    run: &[Arc<StretchForecast>],
    routes: &super::PortRoutes,
    req: &PlanRequest<'_>,
) -> Vec<StretchInfo> {
    // The first drawn segment of each id (ids are unique in a valid scenario).
    let mut by_id: std::collections::HashMap<&str, &CoastSegment> =
        std::collections::HashMap::with_capacity(req.coast.len());
    for c in req.coast.iter().rev() {
        by_id.insert(c.id.as_str(), c);
    }
    run.par_iter()
        .enumerate()
        .map(|(k, s)| {
            let drawn = by_id.get(s.segment_id.as_str()).copied();
            let label = drawn.map_or(s.segment_id.as_str(), CoastSegment::label);
            let (n, count) = s.part;
            StretchInfo {
                forecast: s.clone(),
                name: if count > 1 {
                    format!("{label} {}/{count}", n + 1)
                } else {
                    label.to_string()
                },
                closure: drawn.and_then(|c| c.closure.clone()),
                distance_nm: routes.distance_nm[k],
                route: routes.routes[k].clone(),
                route_max_wind_kt: routes.max_wind_kt[k].clone(),
                route_max_wave_m: routes.max_wave_m[k].clone(),
                route_max_steepness: routes.max_steepness[k].clone(),
                wave_source: routes.wave_source[k],
                timeline_start: forecast.timeline.first().copied(),
                runs: Vec::new(),
            }
        })
        .collect()
}

/// The `q` quantile (0–1) of `values`, linear between order statistics (Hyndman and
/// Fan 1996, definition 7: the default of R and NumPy); `None` for no values.
#[must_use]
pub fn quantile(values: &[f64], q: f64) -> Option<f64> {
    let mut v: Vec<f64> = values.iter().copied().filter(|x| x.is_finite()).collect();
    if v.is_empty() {
        return None;
    }
    v.sort_by(f64::total_cmp);
    let h = (v.len() - 1) as f64 * q.clamp(0.0, 1.0);
    let lo = h.floor() as usize;
    let hi = (lo + 1).min(v.len() - 1);
    Some(v[lo] + (h - lo as f64) * (v[hi] - v[lo]))
}

/// A lagged response at least this strong (0–1) is worth naming as the bloom following
/// an event (a planning choice of this tool, not a published threshold).
const LAGGED_BLOOM: f64 = 0.2;

/// A local day and its working hours, from the wall-clock hours of the trip settings.
struct WorkDay {
    date: NaiveDate,
    start: DateTime<Utc>,
    end: DateTime<Utc>,
}

/// What ranking a day needs besides the stretches.
struct DayRanker<'a> {
    tz: Tz,
    vessel: &'a Vessel,
    trip: &'a TripSettings,
    relaxation_window_days: f64,
    /// The event threshold: a run's day with a mean index at or above it is a run with
    /// upwelling.
    threshold_m3s_per_100m: f64,
}

impl DayRanker<'_> {
    /// Ranks the stretches for one local day.
    fn rank_day(&self, date: NaiveDate, stretches: &[StretchInfo]) -> DayPlan {
        let work = self.work_day(date);
        let mut ranked = Vec::new();
        let mut excluded = Vec::new();
        // Stretches are judged in parallel too: seven days on two cores would leave
        // one core idle for the last day.
        let judged: Vec<Result<RankedStretch, Exclusion>> =
            stretches.par_iter().map(|s| self.judge(&work, s)).collect();
        for (k, j) in judged.into_iter().enumerate() {
            match j {
                Ok(mut r) => {
                    r.stretch = k;
                    ranked.push(r);
                }
                Err(exclusion) => excluded.push(Excluded {
                    stretch: k,
                    exclusion,
                }),
            }
        }
        self.day_plan(date, ranked, excluded, Vec::new())
    }

    /// A day's plan: the ranked stretches best first (ties to the earlier stretch),
    /// ties marked.
    fn day_plan(
        &self,
        date: NaiveDate,
        mut ranked: Vec<RankedStretch>,
        excluded: Vec<Excluded>,
        odds: Vec<Option<Odds>>,
    ) -> DayPlan {
        ranked.sort_by(|x, y| y.score.total_cmp(&x.score).then(x.stretch.cmp(&y.stretch)));
        self.mark_ties(&mut ranked);
        DayPlan {
            date,
            ranked,
            excluded,
            odds,
        }
    }

    /// Ranks the stretches for one local day from every run of an ensemble (README,
    /// "Ensembles"): each run is judged as a single forecast would be; a stretch is
    /// ranked when at least one run leaves it a window, by the runs' mean score (a run
    /// without a window scores 0), with the first such run's window, trip and reasons
    /// and the runs' mean productivity; else it is left out for the first run's reason.
    fn rank_day_runs(&self, date: NaiveDate, runs: &[Vec<StretchInfo>]) -> DayPlan {
        let work = self.work_day(date);
        let mut ranked = Vec::new();
        let mut excluded = Vec::new();
        let mut odds = Vec::new();
        let count = runs.first().map_or(0, Vec::len);
        for k in 0..count {
            let judged: Vec<Result<RankedStretch, Exclusion>> =
                runs.iter().map(|r| self.judge(&work, &r[k])).collect();
            let means: Vec<f64> = runs
                .iter()
                .filter_map(|r| r[k].day(date).and_then(|d| d.mean_index_m3s_per_100m))
                .collect();
            let productivity: Vec<f64> = runs
                .iter()
                .filter_map(|r| r[k].day(date))
                .filter(|d| d.mean_index_m3s_per_100m.is_some())
                .map(|d| d.response.productivity.clamp(0.0, 1.0))
                .collect();
            let these = (!productivity.is_empty()).then(|| Odds {
                runs: runs.len(),
                upwelling: means
                    .iter()
                    .filter(|m| **m >= self.threshold_m3s_per_100m)
                    .count(),
                window: judged.iter().filter(|j| j.is_ok()).count(),
                productivity_p10: quantile(&productivity, 0.1).unwrap_or(0.0),
                productivity_p90: quantile(&productivity, 0.9).unwrap_or(0.0),
            });
            odds.push(these);
            let mean_score =
                judged.iter().flatten().map(|r| r.score).sum::<f64>() / runs.len() as f64;
            let mut first_ok = None;
            let mut first_err = None;
            for j in judged {
                match j {
                    Ok(r) if first_ok.is_none() => first_ok = Some(r),
                    Err(e) if first_err.is_none() => first_err = Some(e),
                    _ => {}
                }
            }
            match (first_ok, first_err) {
                (Some(mut r), _) => {
                    r.stretch = k;
                    r.score = mean_score;
                    r.productivity = productivity.iter().sum::<f64>() / productivity.len() as f64;
                    r.reasons.productivity = r.productivity;
                    r.reasons.odds = these;
                    ranked.push(r);
                }
                (None, Some(exclusion)) => excluded.push(Excluded {
                    stretch: k,
                    exclusion,
                }),
                (None, None) => {}
            }
        }
        self.day_plan(date, ranked, excluded, odds)
    }

    /// A tie group is measured from its first member, so that a slow slide of scores
    /// does not chain every stretch into one tie.
    fn mark_ties(&self, ranked: &mut [RankedStretch]) {
        let mut rank = 0;
        let mut leader_score = f64::INFINITY;
        for (i, r) in ranked.iter_mut().enumerate() {
            let tied = i > 0 && (leader_score - r.score) < self.trip.tie_margin_points;
            if !tied {
                rank = i + 1;
                leader_score = r.score;
            }
            r.rank = rank;
            r.tied_with_above = tied;
        }
    }

    /// The working hours of a day: wall-clock local times, the same on clock-change
    /// days.
    fn work_day(&self, date: NaiveDate) -> WorkDay {
        WorkDay {
            date,
            start: local_time(self.tz, date, self.trip.day_start_hour),
            end: local_time(self.tz, date, self.trip.day_end_hour),
        }
    }

    /// The stretch's hours within the working hours of a day (its hours are in time
    /// order).
    fn working_hours(work: &WorkDay, s: &StretchInfo) -> Vec<WorkingHour> {
        let a = s.hours.partition_point(|h| h.time < work.start);
        let b = a + s.hours[a..].partition_point(|h| h.time < work.end);
        s.hours[a..b]
            .iter()
            .map(|h| {
                let k = s.hour_index(h.time);
                let at = |v: &[f32]| k.and_then(|k| super::forecast::hourly_at(v, k));
                WorkingHour {
                    time: h.time,
                    wind_kt: at(&s.route_max_wind_kt),
                    wave_m: at(&s.route_max_wave_m),
                    steepness_m_s2: at(&s.route_max_steepness),
                }
            })
            .collect()
    }

    /// Ranks one stretch on one day, or says why it is left out.
    fn judge(&self, work: &WorkDay, s: &StretchInfo) -> Result<RankedStretch, Exclusion> {
        let date = work.date;
        let vessel = self.vessel;
        if let Some(c) = s.closure.as_ref().filter(|c| c.applies_on(date)) {
            return Err(Exclusion::Closed(c.clone()));
        }
        if s.latitude == Latitude::TooClose {
            return Err(Exclusion::NearEquator {
                lat_deg: s.centre.lat_deg,
            });
        }
        if s.route.is_none() {
            return Err(Exclusion::NoSeaRoute);
        }
        if s.distance_nm > vessel.range_nm {
            return Err(Exclusion::BeyondRange {
                distance_nm: s.distance_nm,
                range_nm: vessel.range_nm,
            });
        }
        let working = Self::working_hours(work, s);
        let day = s
            .day(date)
            .filter(|d| d.mean_index_m3s_per_100m.is_some())
            .ok_or(Exclusion::NoForecast)?;
        if working.is_empty() {
            return Err(Exclusion::NoForecast);
        }
        let max_wind_kt = working.iter().filter_map(|h| h.wind_kt).fold(0.0, f64::max);
        let limits = Limits {
            wind_kt: vessel.wind_limit_kt,
            wave_m: vessel.wave_limit_m,
            steepness_m_s2: vessel.steepness_limit_m_s2,
        };
        let Some(run) = longest_safe_run(&working, &limits) else {
            return Err(never_safe(&working, &limits, s.wave_source));
        };
        let steam_h = s.distance_nm / vessel.cruise_speed_kt;
        let window = run_span(&working, run);
        let window_h = (run.1 - run.0 + 1) as f64;
        let fishing_hours = window_h - 2.0 * steam_h;
        if fishing_hours < self.trip.min_fishing_hours {
            return Err(Exclusion::WindowTooShort {
                window,
                limit_kt: vessel.wind_limit_kt,
                steam_h,
                min_fishing_h: self.trip.min_fishing_hours,
            });
        }
        let window_factor = (fishing_hours / self.trip.target_fishing_hours).min(1.0);
        let distance_factor =
            1.0 - self.trip.distance_weight * (s.distance_nm / vessel.range_nm).min(1.0);
        let productivity = day.response.productivity.clamp(0.0, 1.0);
        let trip = TripReason {
            distance_nm: s.distance_nm,
            steam_minutes: steam_h * 60.0,
            fuel_l: 2.0 * steam_h * vessel.fuel_l_per_h,
            straight_line: s.route.is_none(),
        };
        Ok(RankedStretch {
            stretch: 0,
            rank: 0,
            tied_with_above: false,
            score: 100.0 * productivity * window_factor * distance_factor,
            productivity,
            window_factor,
            distance_factor,
            safe_window: window,
            fishing_hours,
            steam_minutes: trip.steam_minutes,
            fuel_l: trip.fuel_l,
            max_wind_kt,
            reasons: Reasons {
                upwelling: self.upwelling_reason(s, day),
                productivity,
                wind: wind_reason(&working, window, &limits, max_wind_kt),
                waves: WaveReason {
                    max_m: working.iter().filter_map(|h| h.wave_m).reduce(f64::max),
                    source: s.wave_source,
                    limit_m: vessel.wave_limit_m,
                },
                trip,
                near_equator_lat_deg: (s.latitude == Latitude::NearEquator)
                    .then_some(s.centre.lat_deg),
                odds: None,
            },
        })
    }

    /// What the upwelling did, from the day's phase in the events: the same phase and
    /// relaxation window the response model scored.
    fn upwelling_reason(&self, s: &StretchForecast, day: &UpwellingDay) -> UpwellingReason {
        let mean = day.mean_index_m3s_per_100m.unwrap_or(0.0);
        match day.phase {
            EventPhase::During { event, age_days } => {
                if day.response.useful < 0.4 && mean > 0.0 {
                    UpwellingReason::Flushing {
                        age_days,
                        peak_m3s_per_100m: s.events[event].peak_m3s_per_100m,
                    }
                } else {
                    UpwellingReason::Building { age_days }
                }
            }
            EventPhase::After { event, days_since }
                if days_since <= self.relaxation_window_days =>
            {
                UpwellingReason::BloomExpected {
                    length_days: s.events[event].duration_h / 24.0,
                    ended: s.events[event].end,
                }
            }
            EventPhase::After { event, .. } if day.response.lagged >= LAGGED_BLOOM => {
                UpwellingReason::Lagged {
                    length_days: s.events[event].duration_h / 24.0,
                    ended: s.events[event].end,
                }
            }
            _ if mean < 0.0 => UpwellingReason::Downwelling {
                mean_m3s_per_100m: mean,
            },
            EventPhase::After { .. } => UpwellingReason::Fading {
                window_days: self.relaxation_window_days,
            },
            EventPhase::Quiet => UpwellingReason::NoEvent,
        }
    }
}

/// Why no hour of the day is safe: the wind when it is over its limit all day, else the
/// waves.
fn never_safe(working: &[WorkingHour], limits: &Limits, source: WaveSource) -> Exclusion {
    let worst = |f: &dyn Fn(&WorkingHour) -> Option<f64>| {
        working
            .iter()
            .filter_map(|h| f(h).map(|v| (h.time, v)))
            .fold(None, |m: Option<(DateTime<Utc>, f64)>, x| match m {
                Some(m) if m.1 >= x.1 => Some(m),
                _ => Some(x),
            })
    };
    let wind_blocks = working.iter().all(|h| {
        matches!(
            h.unsafe_for(limits),
            Some(Unsafe::Wind(_) | Unsafe::NoForecast)
        )
    });
    let waves_over = |w: &Option<(DateTime<Utc>, f64)>| {
        w.zip(limits.wave_m)
            .is_some_and(|((_, m), limit)| m > limit)
    };
    let waves = worst(&|h| h.wave_m);
    match (worst(&|h| h.wind_kt), waves) {
        (None, _) => Exclusion::NoRouteForecast,
        (Some((at, max_wind_kt)), _) if wind_blocks => Exclusion::OverWindLimit {
            max_wind_kt,
            at,
            limit_kt: limits.wind_kt,
        },
        (_, Some((at, max_wave_m))) if waves_over(&waves) => Exclusion::OverWaveLimit {
            max_wave_m,
            at,
            limit_m: limits.wave_m.unwrap_or(max_wave_m),
            source,
        },
        (Some((at, max_wind_kt)), _) => match (worst(&|h| h.steepness_m_s2), limits.steepness_m_s2)
        {
            (Some((at, ratio)), Some(limit)) if ratio > limit => {
                Exclusion::TooSteep { ratio, at, limit }
            }
            _ => Exclusion::OverWindLimit {
                max_wind_kt,
                at,
                limit_kt: limits.wind_kt,
            },
        },
    }
}

/// What the wind and the sea allow around the safe window.
fn wind_reason(
    working: &[WorkingHour],
    (from, to): (DateTime<Utc>, DateTime<Utc>),
    limits: &Limits,
    max_wind_kt: f64,
) -> WindReason {
    let stopper = |h: &WorkingHour| {
        h.unsafe_for(limits).map(|u| match u {
            Unsafe::NoForecast => Stopper::NoForecast,
            Unsafe::Wind(kt) => Stopper::Wind {
                kt,
                limit_kt: limits.wind_kt,
            },
            Unsafe::Waves(m) => Stopper::Waves {
                m,
                limit_m: limits.wave_m.unwrap_or(m),
            },
            Unsafe::Steep(ratio) => Stopper::Steep {
                ratio,
                limit: limits.steepness_m_s2.unwrap_or(ratio),
            },
        })
    };
    if let Some((h, stopper)) = working
        .iter()
        .filter(|h| h.time >= to)
        .find_map(|h| stopper(h).map(|s| (h, s)))
    {
        return WindReason::OverAfter {
            at: h.time,
            stopper,
            until: to,
        };
    }
    if let Some((h, stopper)) = working
        .iter()
        .rev()
        .filter(|h| h.time < from)
        .find_map(|h| stopper(h).map(|s| (h, s)))
    {
        return WindReason::OverUntil {
            at: h.time,
            stopper,
            from,
        };
    }
    WindReason::UnderAllDay {
        limit_kt: limits.wind_kt,
        max_wind_kt,
    }
}
