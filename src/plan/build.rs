//! Building the plan: wind along each stretch and the way to it, the index, events and
//! response per local day, the trip window, and the ranking.

use super::reasons;
use crate::coast::{Closure, Land, LatLon, Segment, destination, distance_m, initial_bearing_deg};
use crate::physics::{
    NAUTICAL_MILE_M, Wind, check_latitude, coriolis_parameter, ekman_transport, m_s_to_knots,
    upwelling_index_m3s_per_100m, wind_stress,
};
use crate::scenario::{Port, Scenario, Vessel};
use crate::upwelling::{DayInput, DayResponse, UpwellingEvent, detect_events};
use crate::wind::{WindError, WindSeries, WindSource, sample_points, sample_points_with};
use chrono::{DateTime, Duration, NaiveDate, TimeZone, Timelike, Utc};
use chrono_tz::Tz;

/// Why no plan could be made.
#[derive(Debug, thiserror::Error)]
pub enum PlanError {
    /// Something in the scenario is missing or unknown.
    #[error("{0}")]
    Scenario(String),
    /// Wind files.
    #[error(transparent)]
    Wind(#[from] WindError),
    /// No stretch has any wind.
    #[error("no wind file covers any stretch of the coast: give a forecast that covers it")]
    NoWind,
}

/// What to plan.
#[derive(Debug, Clone)]
pub struct PlanRequest<'a> {
    /// The scenario (settings, vessels, ports, closures).
    pub scenario: &'a Scenario,
    /// Its segments with sea sides resolved, in the scenario's order.
    pub segments: &'a [Segment],
    /// Vessel id; the first vessel when `None`.
    pub vessel_id: Option<&'a str>,
    /// Home port id; the first port when `None`.
    pub port_id: Option<&'a str>,
    /// First local day; today if the forecast covers it, else its first day.
    pub from: Option<NaiveDate>,
    /// Number of days.
    pub days: usize,
    /// "Now", for the default first day.
    pub now: DateTime<Utc>,
    /// Progress of reading the wind, and the Cancel button.
    pub progress: Option<std::sync::Arc<crate::progress::Progress>>,
}

/// The wind and index of a stretch in one hour.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StretchHour {
    /// The hour, UTC.
    pub time: DateTime<Utc>,
    /// Wind at the stretch centre.
    pub wind: Wind,
    /// Alongshore wind stress, N/m^2, positive with the coast on the right looking
    /// along the stretch's direction... see [`StretchInfo::alongshore_bearing_deg`].
    pub alongshore_stress_pa: f64,
    /// Coastal upwelling index, m^3/s per 100 m.
    pub index_m3s_per_100m: f64,
    /// Strongest wind on the way from port and at the stretch, knots (`None` if part of
    /// the way has no forecast).
    pub route_max_wind_kt: Option<f64>,
    /// Ekman pumping just offshore, m/s, where a grid gives it.
    pub pumping_m_s: Option<f64>,
    /// Ekman transport at the centre, toward east and north, m^2/s.
    pub transport_m2_s: (f64, f64),
}

/// One local day of a stretch.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StretchDay {
    /// The local day.
    pub date: NaiveDate,
    /// Mean index over the hours with wind, m^3/s per 100 m (`None` without wind).
    pub mean_index_m3s_per_100m: Option<f64>,
    /// Cumulative index from the first day, m^3/s per 100 m × days.
    pub cumulative_m3s_per_100m_days: f64,
    /// The response model's output.
    pub response: DayResponse,
}

/// A stretch and everything computed for it.
#[derive(Debug, Clone, PartialEq)]
pub struct StretchInfo {
    /// Stretch id, `<segment id>/<n>`.
    pub id: String,
    /// The segment's id.
    pub segment_id: String,
    /// Name to show: the segment's name, with `n/m` when it has several stretches.
    pub name: String,
    /// Its line.
    pub points: Vec<LatLon>,
    /// Length-weighted centre.
    pub centre: LatLon,
    /// Mean direction along the stretch, degrees true.
    pub alongshore_bearing_deg: f64,
    /// Mean offshore normal, degrees true.
    pub offshore_bearing_deg: f64,
    /// Great-circle distance from the home port to the centre, nm.
    pub distance_nm: f64,
    /// Whether that straight line crosses land (the way by sea is longer).
    pub crosses_land: bool,
    /// Closure, if the segment has one.
    pub closure: Option<Closure>,
    /// Hourly values (empty without wind).
    pub hours: Vec<StretchHour>,
    /// Daily values.
    pub days: Vec<StretchDay>,
    /// Upwelling events in the wind record.
    pub events: Vec<UpwellingEvent>,
}

impl StretchInfo {
    /// The hour at `t`, if the stretch has wind then. Hours are hourly, so the index is
    /// found by arithmetic first (one memory access on a long coast), by search after.
    #[must_use]
    pub fn hour_at(&self, t: DateTime<Utc>) -> Option<&StretchHour> {
        let first = self.hours.first()?;
        let guess = usize::try_from((t - first.time).num_hours()).ok()?;
        match self.hours.get(guess) {
            Some(h) if h.time == t => Some(h),
            _ => self
                .hours
                .binary_search_by_key(&t, |h| h.time)
                .ok()
                .map(|k| &self.hours[k]),
        }
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
    /// Two or three plain reasons.
    pub reasons: Vec<String>,
}

/// A stretch left out of a day's ranking, and why.
#[derive(Debug, Clone, PartialEq)]
pub struct Excluded {
    /// Index into [`Plan::stretches`].
    pub stretch: usize,
    /// Why, in plain words.
    pub reason: String,
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
    /// Plan-wide notes (what was not checked, how distances are measured).
    pub notes: Vec<String>,
}

/// Distance from the coast of the Ekman pumping probes, and their spacing, metres.
const PUMPING_OFFSHORE_M: f64 = 10_000.0;
const PUMPING_HALF_SPAN_M: f64 = 5_000.0;
/// Longest gap in a wind series bridged by interpolation in time, hours.
const MAX_WIND_GAP_H: f64 = 6.0;

fn mean_bearing(pairs: impl Iterator<Item = (f64, f64)>) -> f64 {
    let (mut x, mut y) = (0.0, 0.0);
    for (bearing, weight) in pairs {
        x += weight * bearing.to_radians().sin();
        y += weight * bearing.to_radians().cos();
    }
    crate::physics::bearing_deg(x.atan2(y).to_degrees())
}

/// Points where the wind is needed for one stretch: piece midpoints, centre, four
/// pumping probes, and the way from port.
struct Probes {
    pieces: std::ops::Range<usize>,
    centre: usize,
    pumping: [usize; 4],
    route: std::ops::Range<usize>,
}

/// Local midnight starting a day, as UTC (the earliest if the zone repeats it, the first
/// hour after if the zone skips it).
pub(crate) fn local_midnight(tz: Tz, day: NaiveDate) -> DateTime<Utc> {
    let naive = day.and_hms_opt(0, 0, 0).unwrap_or_default();
    tz.from_local_datetime(&naive)
        .earliest()
        .or_else(|| {
            tz.from_local_datetime(&(naive + Duration::hours(1)))
                .earliest()
        })
        .map_or_else(|| naive.and_utc(), |t| t.with_timezone(&Utc))
}

/// Local noon of a day, as UTC.
pub(super) fn local_noon(tz: Tz, day: NaiveDate) -> DateTime<Utc> {
    local_midnight(tz, day) + Duration::hours(12)
}

fn local_day(tz: Tz, t: DateTime<Utc>) -> NaiveDate {
    t.with_timezone(&tz).date_naive()
}

/// Builds the plan.
pub fn build_plan(req: &PlanRequest<'_>, sources: &[WindSource]) -> Result<Plan, PlanError> {
    let sc = req.scenario;
    let tz: Tz = sc
        .time_zone
        .parse()
        .map_err(|_| PlanError::Scenario(format!("time zone {:?} is unknown", sc.time_zone)))?;
    let pick = |kind: &str, id: Option<&str>, ids: Vec<&str>| -> Result<usize, PlanError> {
        match id {
            None if ids.is_empty() => Err(PlanError::Scenario(format!(
                "the scenario has no {kind}: add one"
            ))),
            None => Ok(0),
            Some(id) => ids.iter().position(|x| *x == id).ok_or_else(|| {
                PlanError::Scenario(format!(
                    "no {kind} {id:?} in the scenario: expected one of {}",
                    ids.join(", ")
                ))
            }),
        }
    };
    let vessel = sc.vessels[pick(
        "vessel",
        req.vessel_id,
        sc.vessels.iter().map(|v| v.id.as_str()).collect(),
    )?]
    .clone();
    let port = sc.ports[pick(
        "port",
        req.port_id,
        sc.ports.iter().map(|p| p.id.as_str()).collect(),
    )?]
    .clone();
    let settings = &sc.settings;
    let trip = settings.trip;

    // Stretches and the points where they need wind.
    let mut stretches: Vec<(Segment, StretchInfo)> = Vec::new();
    for seg in req.segments {
        let drawn = sc.segments.iter().find(|c| c.id == seg.id);
        let label = drawn.map_or(seg.id.as_str(), |c| c.label());
        let parts = seg.stretches(settings.stretch_length_nm * NAUTICAL_MILE_M);
        let count = parts.len();
        for (k, part) in parts.into_iter().enumerate() {
            let pieces = part.pieces();
            let centre = part.weighted_midpoint();
            let name = if count > 1 {
                format!("{label} {}/{count}", k + 1)
            } else {
                label.to_string()
            };
            let info = StretchInfo {
                id: part.id.clone(),
                segment_id: seg.id.clone(),
                name,
                points: part.points.clone(),
                centre,
                alongshore_bearing_deg: mean_bearing(
                    pieces
                        .iter()
                        .map(|p| (p.alongshore_bearing_deg, p.length_m)),
                ),
                offshore_bearing_deg: mean_bearing(
                    pieces.iter().map(|p| (p.offshore_bearing_deg, p.length_m)),
                ),
                distance_nm: distance_m(port.position, centre) / NAUTICAL_MILE_M,
                crosses_land: false,
                closure: drawn.and_then(|c| c.closure.clone()),
                hours: Vec::new(),
                days: Vec::new(),
                events: Vec::new(),
            };
            stretches.push((part, info));
        }
    }
    let land = Land::bundled();
    let mut points: Vec<LatLon> = Vec::new();
    let mut probes = Vec::with_capacity(stretches.len());
    for (part, info) in &mut stretches {
        let first = points.len();
        points.extend(part.pieces().iter().map(|p| p.midpoint));
        let pieces = first..points.len();
        let centre = points.len();
        points.push(info.centre);
        let off = destination(info.centre, info.offshore_bearing_deg, PUMPING_OFFSHORE_M);
        let p0 = points.len();
        for bearing in [90.0, 270.0, 0.0, 180.0] {
            points.push(destination(off, bearing, PUMPING_HALF_SPAN_M));
        }
        let route_start = points.len();
        let total_m = distance_m(port.position, info.centre);
        let steps = (total_m / (trip.route_step_nm * NAUTICAL_MILE_M)).ceil() as usize;
        let bearing = initial_bearing_deg(port.position, info.centre);
        for s in 0..steps {
            let p = destination(port.position, bearing, total_m * s as f64 / steps as f64);
            // The first kilometre is the harbour itself, often inside the land polygons.
            if s > 0 && distance_m(port.position, p) > 1500.0 && land.is_land(p) {
                info.crosses_land = true;
            }
            points.push(p);
        }
        probes.push(Probes {
            pieces,
            centre,
            pumping: [p0, p0 + 1, p0 + 2, p0 + 3],
            route: route_start..points.len(),
        });
    }
    let sampled = match &req.progress {
        Some(p) => sample_points_with(sources, &points, p)?,
        None => sample_points(sources, &points)?,
    };
    let winds = sampled.series;

    // The hourly timeline: every whole hour the wind covers.
    let covered_times = winds
        .iter()
        .flatten()
        .flat_map(|w| [w.times.first(), w.times.last()])
        .flatten();
    let (first, last) = covered_times.fold(
        (None, None),
        |(lo, hi): (Option<DateTime<Utc>>, Option<DateTime<Utc>>), t| {
            (
                Some(lo.map_or(*t, |x| x.min(*t))),
                Some(hi.map_or(*t, |x| x.max(*t))),
            )
        },
    );
    let (Some(first), Some(last)) = (first, last) else {
        return Err(PlanError::NoWind);
    };
    let first_hour = first
        .with_minute(0)
        .and_then(|t| t.with_second(0))
        .unwrap_or(first);
    let hours: Vec<DateTime<Utc>> = (0..=(last - first_hour).num_hours())
        .map(|k| first_hour + Duration::hours(k))
        .collect();

    let first_day = local_day(tz, first);
    let last_data_day = local_day(tz, last);
    let today = local_day(tz, req.now);
    // Default first day: today when the wind covers it; else the day the newest forecast
    // was issued (earlier steps are the recent past, which the response needs); else the
    // first day of the wind.
    let issued_day = sampled.latest_reference.map(|t| local_day(tz, t));
    let from = req
        .from
        .unwrap_or(if (first_day..=last_data_day).contains(&today) {
            today
        } else {
            issued_day
                .filter(|d| (first_day..=last_data_day).contains(d))
                .unwrap_or(first_day)
        });
    let plan_days: Vec<NaiveDate> = (0..req.days.max(1))
        .filter_map(|k| from.checked_add_days(chrono::Days::new(k as u64)))
        .collect();
    let last_day = plan_days.last().copied().unwrap_or(from).max(last_data_day);
    let all_days: Vec<NaiveDate> = first_day
        .iter_days()
        .take_while(|d| *d <= last_day)
        .collect();

    let at = |k: usize, t: DateTime<Utc>| {
        winds[k]
            .as_ref()
            .and_then(|w: &WindSeries| w.at(t, MAX_WIND_GAP_H))
    };
    for ((part, info), probe) in stretches.iter_mut().zip(&probes) {
        let pieces = part.pieces();
        let total_m: f64 = pieces.iter().map(|p| p.length_m).sum();
        if probe.pieces.clone().any(|k| winds[k].is_none())
            || check_latitude(info.centre.lat_deg).is_err()
        {
            continue;
        }
        let f_centre = coriolis_parameter(info.centre.lat_deg);
        for &t in &hours {
            let piece_winds: Option<Vec<Wind>> = probe.pieces.clone().map(|k| at(k, t)).collect();
            let (Some(piece_winds), Some(wind)) = (piece_winds, at(probe.centre, t)) else {
                continue;
            };
            let index = pieces
                .iter()
                .zip(&piece_winds)
                .map(|(p, w)| {
                    let tau = wind_stress(*w, &settings.index.drag, settings.index.rho_air_kg_m3);
                    let m = ekman_transport(
                        tau,
                        coriolis_parameter(p.midpoint.lat_deg),
                        settings.index.rho_water_kg_m3,
                    );
                    upwelling_index_m3s_per_100m(m, p.offshore_bearing_deg) * p.length_m / total_m
                })
                .sum();
            let tau = wind_stress(wind, &settings.index.drag, settings.index.rho_air_kg_m3);
            let m = ekman_transport(tau, f_centre, settings.index.rho_water_kg_m3);
            let along = info.alongshore_bearing_deg.to_radians();
            let alongshore_stress_pa = tau.x_pa * along.sin() + tau.y_pa * along.cos();
            let route_max_wind_kt = probe
                .route
                .clone()
                .map(|k| at(k, t).map(|w| m_s_to_knots(w.speed_m_s())))
                .chain(std::iter::once(Some(m_s_to_knots(wind.speed_m_s()))))
                .try_fold(0.0_f64, |m, w| w.map(|w| m.max(w)));
            let pumping_m_s = pumping_at(
                &probe.pumping.map(|k| at(k, t)),
                &points,
                &probe.pumping,
                settings,
                f_centre,
            );
            info.hours.push(StretchHour {
                time: t,
                wind,
                alongshore_stress_pa,
                index_m3s_per_100m: index,
                route_max_wind_kt,
                pumping_m_s,
                transport_m2_s: (m.x_m2_s, m.y_m2_s),
            });
        }
        let times: Vec<_> = info.hours.iter().map(|h| h.time).collect();
        let index: Vec<_> = info.hours.iter().map(|h| h.index_m3s_per_100m).collect();
        info.events = detect_events(&times, &index, &settings.events);
        info.days = daily(tz, &all_days, &info.hours, &info.events, settings);
    }
    if stretches.iter().all(|(_, s)| s.hours.is_empty()) {
        return Err(PlanError::NoWind);
    }
    let stretches: Vec<StretchInfo> = stretches.into_iter().map(|(_, s)| s).collect();
    let days = plan_days
        .iter()
        .map(|&d| rank_day(tz, d, &stretches, &vessel, &port, &trip))
        .collect();
    let mut notes = vec![format!(
        "Distances are great-circle from {} to each stretch's centre; where that line crosses land the way by sea is longer (marked).",
        port.name
    )];
    if let Some(w) = vessel.wave_limit_m {
        notes.push(format!("Wave limit {w} m not checked: the forecast has no wave height. Check the sea state yourself."));
    }
    Ok(Plan {
        scenario_name: sc.name.clone(),
        time_zone: tz,
        vessel,
        port,
        stretches,
        days,
        notes,
    })
}

/// Ekman pumping at a point offshore from four probes east, west, north and south of
/// it, by centred differences of `tau / f` (REFERENCES.md: `w_E = curl(tau/f)/rho_w`).
fn pumping_at(
    winds: &[Option<Wind>; 4],
    points: &[LatLon],
    idx: &[usize; 4],
    settings: &crate::scenario::ModelSettings,
    f_centre: f64,
) -> Option<f64> {
    let [Some(east), Some(west), Some(north), Some(south)] = *winds else {
        return None;
    };
    let tau = |wind: Wind| wind_stress(wind, &settings.index.drag, settings.index.rho_air_kg_m3);
    let f = |k: usize| coriolis_parameter(points[idx[k]].lat_deg);
    if f_centre.abs() < 1e-6 {
        return None;
    }
    let dx = distance_m(points[idx[1]], points[idx[0]]);
    let dy = distance_m(points[idx[3]], points[idx[2]]);
    let d_tauy_f_dx = (tau(east).y_pa / f(0) - tau(west).y_pa / f(1)) / dx;
    let d_taux_f_dy = (tau(north).x_pa / f(2) - tau(south).x_pa / f(3)) / dy;
    Some((d_tauy_f_dx - d_taux_f_dy) / settings.index.rho_water_kg_m3)
}

/// Daily means, cumulative index, and the response for every local day.
fn daily(
    tz: Tz,
    all_days: &[NaiveDate],
    hours: &[StretchHour],
    events: &[UpwellingEvent],
    settings: &crate::scenario::ModelSettings,
) -> Vec<StretchDay> {
    let mut inputs = Vec::with_capacity(all_days.len());
    let mut means = Vec::with_capacity(all_days.len());
    for &day in all_days {
        let in_day: Vec<&StretchHour> = hours
            .iter()
            .filter(|h| local_day(tz, h.time) == day)
            .collect();
        let mean = |f: &dyn Fn(&StretchHour) -> f64| {
            in_day.iter().map(|h| f(h)).sum::<f64>() / in_day.len() as f64
        };
        let mean_index = (!in_day.is_empty()).then(|| mean(&|h| h.index_m3s_per_100m));
        let with_pumping: Vec<f64> = in_day.iter().filter_map(|h| h.pumping_m_s).collect();
        let pumping = if with_pumping.is_empty() {
            0.0
        } else {
            with_pumping.iter().sum::<f64>() / with_pumping.len() as f64
        };
        let noon = local_noon(tz, day);
        let days_between =
            |a: DateTime<Utc>, b: DateTime<Utc>| (b - a).num_seconds() as f64 / 86_400.0;
        let event_age_days = events
            .iter()
            .find(|e| e.onset <= noon && noon <= e.end)
            .map(|e| days_between(e.onset, noon));
        let after_event = events
            .iter()
            .rev()
            .find(|e| e.end < noon && !e.ongoing)
            .map(|e| (days_between(e.end, noon), e.duration_h / 24.0));
        means.push(mean_index);
        inputs.push(DayInput {
            index_m3s_per_100m: mean_index.unwrap_or(0.0),
            pumping_m_s: pumping,
            event_age_days,
            after_event,
        });
    }
    let responses = settings.response.respond(&inputs);
    let mut cumulative = 0.0;
    all_days
        .iter()
        .zip(means)
        .zip(responses)
        .map(|((&date, mean), response)| {
            cumulative += mean.unwrap_or(0.0);
            StretchDay {
                date,
                mean_index_m3s_per_100m: mean,
                cumulative_m3s_per_100m_days: cumulative,
                response,
            }
        })
        .collect()
}

/// Ranks the stretches for one local day.
fn rank_day(
    tz: Tz,
    date: NaiveDate,
    stretches: &[StretchInfo],
    vessel: &Vessel,
    port: &Port,
    trip: &super::TripSettings,
) -> DayPlan {
    let start = local_midnight(tz, date) + Duration::hours(i64::from(trip.day_start_hour));
    let end = local_midnight(tz, date) + Duration::hours(i64::from(trip.day_end_hour));
    let mut ranked = Vec::new();
    let mut excluded = Vec::new();
    for (k, s) in stretches.iter().enumerate() {
        let exclude = |reason: String| Excluded { stretch: k, reason };
        if let Some(c) = s.closure.as_ref().filter(|c| c.applies_on(date)) {
            excluded.push(exclude(reasons::closed(c)));
            continue;
        }
        if s.distance_nm > vessel.range_nm {
            excluded.push(exclude(format!(
                "{:.0} nm from {}: beyond this boat's {:.0} nm range",
                s.distance_nm, port.name, vessel.range_nm
            )));
            continue;
        }
        let working: Vec<&StretchHour> = s
            .hours
            .iter()
            .filter(|h| h.time >= start && h.time < end)
            .collect();
        let Some(day) = s.days.iter().find(|d| d.date == date) else {
            excluded.push(exclude("no forecast for this day".into()));
            continue;
        };
        if working.is_empty() {
            excluded.push(exclude("no forecast for this day's working hours".into()));
            continue;
        }
        let steam_h = s.distance_nm / vessel.cruise_speed_kt;
        let ok = |h: &StretchHour| {
            h.route_max_wind_kt
                .is_some_and(|w| w <= vessel.wind_limit_kt)
        };
        // The longest run of consecutive safe hours.
        let mut best: Option<(usize, usize)> = None;
        let mut run_start = None;
        for (i, h) in working.iter().enumerate() {
            match (ok(h), run_start) {
                (true, None) => run_start = Some(i),
                (false, Some(a)) => {
                    if best.is_none_or(|(x, y)| i - 1 - a > y - x) {
                        best = Some((a, i - 1));
                    }
                    run_start = None;
                }
                _ => {}
            }
        }
        if let Some(a) = run_start {
            let b = working.len() - 1;
            if best.is_none_or(|(x, y)| b - a > y - x) {
                best = Some((a, b));
            }
        }
        let max_wind_kt = working
            .iter()
            .filter_map(|h| h.route_max_wind_kt)
            .fold(0.0, f64::max);
        let Some((a, b)) = best else {
            excluded.push(exclude(reasons::never_safe(tz, &working, vessel)));
            continue;
        };
        // A run of n safe hourly values spans n hours of weather (each value stands for
        // its hour).
        let window_h = (b - a + 1) as f64;
        let fishing_hours = window_h - 2.0 * steam_h;
        if fishing_hours < trip.min_fishing_hours {
            excluded.push(exclude(reasons::window_too_short(
                tz,
                &working,
                a,
                b,
                steam_h,
                vessel,
                trip.min_fishing_hours,
            )));
            continue;
        }
        let window_factor = (fishing_hours / trip.target_fishing_hours).min(1.0);
        let distance_factor =
            1.0 - trip.distance_weight * (s.distance_nm / vessel.range_nm).min(1.0);
        let productivity = day.response.productivity.clamp(0.0, 1.0);
        let score = 100.0 * productivity * window_factor * distance_factor;
        let safe_window = (working[a].time, working[b].time + Duration::hours(1));
        let mut r = RankedStretch {
            stretch: k,
            rank: 0,
            tied_with_above: false,
            score,
            productivity,
            window_factor,
            distance_factor,
            safe_window,
            fishing_hours,
            steam_minutes: steam_h * 60.0,
            fuel_l: 2.0 * steam_h * vessel.fuel_l_per_h,
            max_wind_kt,
            reasons: Vec::new(),
        };
        r.reasons = reasons::ranked(tz, date, s, day, &r, &working, vessel, port);
        ranked.push(r);
    }
    ranked.sort_by(|x, y| y.score.total_cmp(&x.score).then(x.stretch.cmp(&y.stretch)));
    // A tie group is measured from its first member, so that a slow slide of scores
    // does not chain every stretch into one tie.
    let mut rank = 0;
    let mut leader_score = f64::INFINITY;
    for (i, r) in ranked.iter_mut().enumerate() {
        let tied = i > 0 && (leader_score - r.score) < trip.tie_margin_points;
        if !tied {
            rank = i + 1;
            leader_score = r.score;
        }
        r.rank = rank;
        r.tied_with_above = tied;
    }
    DayPlan {
        date,
        ranked,
        excluded,
    }
}
