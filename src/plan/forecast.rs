//! The forecast of every stretch, before any boat or port is chosen: the stretches cut
//! from the coast, the wind sampled at the points they need (conditions), and their
//! upwelling hour by hour and day by day. A change of boat, port or day re-ranks from
//! here; only a change of wind files or coast geometry samples again, and a change of
//! model settings recomputes the upwelling from the same samples.

use super::WaveSource;
use super::seastate::FetchCache;
use crate::coast::{
    Land, LatLon, RouteSettings, SeaRoute, Segment, destination, distance_m, initial_bearing_deg,
    sea_routes,
};
use crate::localtime::local_day;
use crate::physics::{
    LatitudeCheck, NAUTICAL_MILE_M, ProbeStress, PumpingProbes, Wind, WindStress, check_latitude,
    coriolis_parameter, ekman_depth_empirical_m, ekman_pumping_with_f_m_s, ekman_transport,
    m_s_to_knots, wind_stress,
};
use crate::progress::Progress;
use crate::upwelling::{
    EventSettings, HourlySeries, IndexSettings, LocalDay, ResponseSettings, UpwellingDay,
    UpwellingEvent, daily_upwelling_on, detect_events, index_series, local_days,
};
use crate::wind::{
    Conditions, GroupWind, Member, PointGroup, PointSeries, RunRule, SegmentWind, SourceIdentity,
    SourceSpan, TimeStep, WindError, WindSource, WindTrack, forecast_runs, length_weighted_at,
    sample_run, sample_waves, time_step,
};
use chrono::{DateTime, Duration, NaiveDate, Timelike, Utc};
use chrono_tz::Tz;
use rayon::prelude::*;
use std::sync::Arc;

/// Distance from the coast of the Ekman pumping probes, and their spacing, metres.
const PUMPING_OFFSHORE_M: f64 = 10_000.0;
const PUMPING_HALF_SPAN_M: f64 = 5_000.0;
/// Longest gap in a wind series bridged by interpolation in time, hours.
const MAX_WIND_GAP_H: f64 = 6.0;
/// The way to a stretch ends this far off its centre, out to sea, metres: the drawn
/// coast line itself lies on the coarse land outline.
const TARGET_OFFSHORE_M: f64 = 500.0;

/// How close a stretch is to the equator, where Ekman theory fails.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Latitude {
    /// 10° or more from the equator.
    Fine,
    /// Between 5° and 10°: the index is large and unreliable.
    NearEquator,
    /// Within 5°: no index.
    TooClose,
}

/// The wind and index of a stretch in one hour. What follows from the wind alone (the
/// alongshore stress, the Ekman transport and depth) is worked out by the stretch when
/// asked ([`StretchForecast::alongshore_stress_pa`], [`StretchForecast::transport_m2_s`],
/// [`StretchForecast::ekman_depth_m`]): a long coast's hours are kept in half the
/// memory.
#[derive(Debug, Clone, Copy)]
pub struct StretchHour {
    /// The hour, UTC.
    pub time: DateTime<Utc>,
    /// Wind at the stretch centre.
    pub wind: Wind,
    /// Coastal upwelling index, m^3/s per 100 m (the length-weighted mean over the
    /// stretch's pieces, as `shelfwind index` computes it for a segment).
    pub index_m3s_per_100m: f64,
    /// Ekman pumping just offshore, m/s; NaN where no grid gives it (read it with
    /// [`StretchHour::pumping_m_s`]).
    pumping: f64,
}

impl StretchHour {
    /// Ekman pumping just offshore, m/s, where a grid gives it.
    #[must_use]
    pub fn pumping_m_s(&self) -> Option<f64> {
        (!self.pumping.is_nan()).then_some(self.pumping)
    }
}

impl PartialEq for StretchHour {
    /// Equal values, an hour without pumping equal to another without.
    fn eq(&self, other: &Self) -> bool {
        self.time == other.time
            && self.wind == other.wind
            && self.index_m3s_per_100m == other.index_m3s_per_100m
            && self.pumping_m_s() == other.pumping_m_s()
    }
}

/// A stretch of coast and its upwelling over the forecast.
#[derive(Debug, Clone, PartialEq)]
pub struct StretchForecast {
    /// Stretch id, `<segment id>/<n>`.
    pub id: String,
    /// The segment's id.
    pub segment_id: String,
    /// Which stretch of its segment (0-based), and how many the segment has.
    pub part: (usize, usize),
    /// Its line.
    pub points: Vec<LatLon>,
    /// Length-weighted centre.
    pub centre: LatLon,
    /// Mean direction along the stretch, degrees true.
    pub alongshore_bearing_deg: f64,
    /// Mean offshore normal, degrees true.
    pub offshore_bearing_deg: f64,
    /// How close to the equator it is.
    pub latitude: Latitude,
    /// Whether some wind file covers it.
    pub has_wind: bool,
    /// The wind file it takes its wind from (index in the list given), if any.
    pub wind_source: Option<usize>,
    /// Hourly values (empty without wind or too near the equator).
    pub hours: Vec<StretchHour>,
    /// Daily values over every day of the forecast.
    pub days: Vec<UpwellingDay>,
    /// Upwelling events in the wind record.
    pub events: Vec<UpwellingEvent>,
    /// The model settings its hours were worked out with.
    index: IndexSettings,
}

impl StretchForecast {
    /// The wind stress of an hour, N/m^2.
    fn stress(&self, h: &StretchHour) -> WindStress {
        wind_stress(h.wind, &self.index.drag, self.index.rho_air_kg_m3)
    }

    /// Alongshore wind stress in an hour, N/m^2, positive toward the stretch's
    /// alongshore bearing.
    #[must_use]
    pub fn alongshore_stress_pa(&self, h: &StretchHour) -> f64 {
        let tau = self.stress(h);
        let along = self.alongshore_bearing_deg.to_radians();
        tau.x_pa * along.sin() + tau.y_pa * along.cos()
    }

    /// Ekman transport at the centre in an hour, toward east and north, m^2/s.
    #[must_use]
    pub fn transport_m2_s(&self, h: &StretchHour) -> (f64, f64) {
        let f_centre = coriolis_parameter(self.centre.lat_deg);
        let m = ekman_transport(self.stress(h), f_centre, self.index.rho_water_kg_m3);
        (m.x_m2_s, m.y_m2_s)
    }

    /// Empirical Ekman layer depth at the centre in an hour, m (`None` within 10° of
    /// the equator).
    #[must_use]
    pub fn ekman_depth_m(&self, h: &StretchHour) -> Option<f64> {
        (self.latitude == Latitude::Fine)
            .then(|| ekman_depth_empirical_m(h.wind.speed_m_s(), self.centre.lat_deg))
    }

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

    /// The day `date`, if the forecast has it.
    #[must_use]
    pub fn day(&self, date: NaiveDate) -> Option<&UpwellingDay> {
        self.days.iter().find(|d| d.date == date)
    }
}

/// The way from one port to every stretch.
#[derive(Debug, Clone, PartialEq)]
pub struct PortRoutes {
    /// The port's position.
    pub port: LatLon,
    /// Per stretch: the distance by sea, nm (the great-circle distance where there is
    /// no way by sea).
    pub distance_nm: Vec<f64>,
    /// Per stretch: the way by sea, `None` where none was found.
    pub routes: Vec<Option<Arc<SeaRoute>>>,
    /// Per stretch, per hour of [`Forecast::timeline`]: the strongest wind on the way
    /// and at the stretch, knots; NaN where part of the way has no forecast.
    pub max_wind_kt: Vec<HourlyValues>,
    /// Per stretch, per hour: the highest significant waves on the way and at the
    /// stretch, m; NaN where nothing tells them.
    pub max_wave_m: Vec<HourlyValues>,
    /// Per stretch, per hour: the steepest sea on the way and at the stretch, the
    /// height over the period squared, m/s^2; NaN where no period is known.
    pub max_steepness: Vec<HourlyValues>,
    /// Per stretch: where those wave heights come from.
    pub wave_source: Vec<WaveSource>,
}

/// Values along the hourly timeline, NaN where there is none: 4 bytes an hour, as an
/// ensemble keeps a set per stretch, port and run.
pub type HourlyValues = Arc<[f32]>;

/// Hourly values from options (`None` becomes NaN).
fn hourly_values(v: &[Option<f64>]) -> HourlyValues {
    v.iter().map(|x| x.map_or(f32::NAN, |x| x as f32)).collect()
}

/// The value of an hour, `None` past the end or where it is NaN.
#[must_use]
pub fn hourly_at(v: &[f32], k: usize) -> Option<f64> {
    v.get(k).copied().filter(|x| !x.is_nan()).map(f64::from)
}

impl PortRoutes {
    /// Lays the hourly values on a longer timeline: `offset` hours after its start,
    /// `len` hours in all, NaN where this run has no hour.
    fn lay_on(&mut self, offset: usize, len: usize) {
        let lay = |v: &mut Vec<HourlyValues>| {
            for hours in v.iter_mut() {
                if offset == 0 && hours.len() == len {
                    continue;
                }
                let mut out = vec![f32::NAN; len];
                for (k, x) in hours.iter().enumerate() {
                    if let Some(slot) = out.get_mut(offset + k) {
                        *slot = *x;
                    }
                }
                *hours = out.into();
            }
        };
        lay(&mut self.max_wind_kt);
        lay(&mut self.max_wave_m);
        lay(&mut self.max_steepness);
    }
}

/// Model settings that the upwelling stage uses.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct UpwellingSettings {
    /// The index: drag law and densities.
    pub index: IndexSettings,
    /// Event thresholds.
    pub events: EventSettings,
    /// The response model.
    pub response: ResponseSettings,
}

/// What the conditions are sampled for: the coast geometry and the ports.
#[derive(Debug, Clone, Copy)]
pub struct ForecastGeometry<'a> {
    /// The segments, sea sides resolved.
    pub segments: &'a [Segment],
    /// Length of the stretches, nm.
    pub stretch_length_nm: f64,
    /// Positions of the home ports.
    pub ports: &'a [LatLon],
    /// Spacing of the points on the way from port, nm.
    pub route_step_nm: f64,
    /// How ways by sea are found (clearance from land, harbour allowance, longest way).
    pub route: RouteSettings,
    /// Land, for the ways by sea and the fetch.
    pub land: &'a Land,
}

/// Conditions sampled for a coast and its ports, with what identifies them.
#[derive(Debug, Clone)]
pub struct SampledConditions {
    /// The files sampled.
    pub sources: Vec<SourceIdentity>,
    /// The [`forecast_key`] of the coast and ports sampled for.
    pub geometry: u64,
    /// How the runs were made from the files.
    pub rule: RunRule,
    /// The stretches' geometry.
    stretches: Vec<StretchForecast>,
    /// Where each stretch's groups are.
    layout: Vec<StretchGroups>,
    /// Every whole hour the wind covers.
    pub timeline: Vec<DateTime<Utc>>,
    /// Each run's sampled wind and ways: one for a single forecast, else one per
    /// ensemble member, control first.
    runs: Vec<SampledRun>,
    stretch_pieces: Vec<Segment>,
}

/// One run's wind at the stretches (the ways' points are reduced to [`PortRoutes`] and
/// dropped, so memory grows with stretches × hours × runs).
#[derive(Debug, Clone)]
struct SampledRun {
    member: Option<Member>,
    conditions: Conditions,
    routes: Vec<PortRoutes>,
}

#[derive(Debug, Clone, Copy)]
struct StretchGroups {
    /// The group of the piece midpoints (with the centre as its extra point).
    pieces: usize,
    /// The group of the pumping probes, and where they are (east, west, north, south).
    pumping: usize,
    probes: [LatLon; 4],
}

/// The forecast of every stretch.
#[derive(Debug, Clone)]
pub struct Forecast {
    /// IANA time zone of local days.
    pub time_zone: Tz,
    /// Every stretch.
    pub stretches: Vec<Arc<StretchForecast>>,
    /// Every whole hour the wind covers, UTC.
    pub timeline: Vec<DateTime<Utc>>,
    /// The local days of the forecast.
    pub days: Vec<NaiveDate>,
    /// The ways from each port given.
    pub routes: Vec<PortRoutes>,
    /// The latest issue time among the GRIB2 files, if any.
    pub latest_reference: Option<DateTime<Utc>>,
    /// The settings the upwelling was computed with.
    pub settings: UpwellingSettings,
    /// What each wind file held (`None`: not read, the files before it covered all).
    pub sources: Vec<Option<SourceSpan>>,
    /// Every run of an ensemble (`None`: a single forecast). `stretches` and `routes`
    /// above are its first run's (the control where there is one).
    pub ensemble: Option<Arc<Ensemble>>,
}

/// The runs of an ensemble forecast, each computed through the same pipeline.
#[derive(Debug, Clone)]
pub struct Ensemble {
    /// The runs, control first.
    pub members: Vec<Member>,
    /// Per run, every stretch (in the order of [`Forecast::stretches`]).
    pub stretches: Vec<Vec<Arc<StretchForecast>>>,
    /// Per run, the ways from each port (in the order of [`Forecast::routes`]).
    pub routes: Vec<Vec<PortRoutes>>,
}

/// Why no forecast could be made.
#[derive(Debug, thiserror::Error)]
pub enum ForecastError {
    /// Wind files.
    #[error(transparent)]
    Wind(#[from] WindError),
    /// No stretch has any wind.
    #[error("no wind file covers any stretch of the coast: give a forecast that covers it")]
    NoWind,
}

fn mean_bearing(pairs: impl Iterator<Item = (f64, f64)>) -> f64 {
    let (mut x, mut y) = (0.0, 0.0);
    for (bearing, weight) in pairs {
        x += weight * bearing.to_radians().sin();
        y += weight * bearing.to_radians().cos();
    }
    crate::physics::bearing_deg(x.atan2(y).to_degrees())
}

/// Cuts the segments into stretches (geometry only).
fn cut_stretches(segments: &[Segment], stretch_length_nm: f64) -> Vec<(Segment, StretchForecast)> {
    let mut out = Vec::new();
    for seg in segments {
        let parts = seg.stretches(stretch_length_nm * NAUTICAL_MILE_M);
        let count = parts.len();
        for (k, part) in parts.into_iter().enumerate() {
            let pieces = part.pieces();
            let centre = part.weighted_midpoint();
            let latitude = match check_latitude(centre.lat_deg) {
                Err(_) => Latitude::TooClose,
                Ok(LatitudeCheck::NearEquator) => Latitude::NearEquator,
                Ok(_) => Latitude::Fine,
            };
            let info = StretchForecast {
                id: part.id.clone(),
                segment_id: seg.id.clone(),
                part: (k, count),
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
                latitude,
                has_wind: false,
                wind_source: None,
                hours: Vec::new(),
                days: Vec::new(),
                events: Vec::new(),
                index: IndexSettings::default(),
            };
            out.push((part, info));
        }
    }
    out
}

/// Points along a way, every `step_m` or less on each leg, the start first, the end
/// last, every turning point included.
fn along(points: &[LatLon], step_m: f64) -> Vec<LatLon> {
    let mut out = Vec::new();
    for w in points.windows(2) {
        let leg_m = distance_m(w[0], w[1]);
        let steps = (leg_m / step_m).ceil().max(1.0) as usize;
        let bearing = initial_bearing_deg(w[0], w[1]);
        out.extend((0..steps).map(|k| destination(w[0], bearing, leg_m * k as f64 / steps as f64)));
    }
    out.extend(points.last().copied());
    out
}

/// Per port and stretch: the groups of the way's points, in order, and the way by sea.
type RouteGroups = (Vec<usize>, Option<Arc<SeaRoute>>);

/// The four pumping probes offshore of a stretch (east, west, north, south), and their
/// group: grids only, since winds at different stations have no curl between them.
fn pumping_group(s: &StretchForecast) -> ([LatLon; 4], PointGroup) {
    let off = destination(s.centre, s.offshore_bearing_deg, PUMPING_OFFSHORE_M);
    let probes = [90.0, 270.0, 0.0, 180.0].map(|b| destination(off, b, PUMPING_HALF_SPAN_M));
    let group = PointGroup {
        grids_only: true,
        ..PointGroup::new(probes.to_vec(), off, None)
    };
    (probes, group)
}

/// Every whole hour from the first to the last time any group has.
fn hourly_timeline<'a>(groups: impl Iterator<Item = &'a GroupWind> + Clone) -> Vec<DateTime<Utc>> {
    let ends = groups
        .flat_map(|g| [g.times.first(), g.times.last()])
        .flatten();
    let (Some(first), Some(last)) = (ends.clone().min(), ends.max()) else {
        return Vec::new();
    };
    let first_hour = first
        .with_minute(0)
        .and_then(|t| t.with_second(0))
        .unwrap_or(*first);
    (0..=(*last - first_hour).num_hours())
        .map(|k| first_hour + Duration::hours(k))
        .collect()
}

/// Each hour of a timeline as a step on each set of times the groups were read on
/// (groups read from one file share their times): found once, not once per point and
/// hour.
struct Steps<'a> {
    timeline: &'a [DateTime<Utc>],
    on: Vec<StepsOn>,
}

/// A set of times and where each hour of the timeline falls on it.
type StepsOn = (Arc<[DateTime<Utc>]>, Vec<Option<TimeStep>>);

impl<'a> Steps<'a> {
    fn new<'g>(timeline: &'a [DateTime<Utc>], groups: impl Iterator<Item = &'g GroupWind>) -> Self {
        let mut on: Vec<StepsOn> = Vec::new();
        for g in groups {
            if !on.iter().any(|(times, _)| Arc::ptr_eq(times, &g.times)) {
                let steps = timeline
                    .iter()
                    .map(|&t| time_step(&g.times, t, MAX_WIND_GAP_H))
                    .collect();
                on.push((g.times.clone(), steps));
            }
        }
        Self { timeline, on }
    }

    /// Each hour of the timeline as a step on the times of `g` (a group given to
    /// [`Steps::new`]; empty for any other).
    fn of(&self, g: &GroupWind) -> &[Option<TimeStep>] {
        self.on
            .iter()
            .find(|(times, _)| Arc::ptr_eq(times, &g.times))
            .map_or(&[], |(_, steps)| steps.as_slice())
    }
}

/// The wind of one point's track at a step (`None` where the hour has no step).
fn wind_on(step: Option<TimeStep>, wind: &WindTrack) -> Option<Wind> {
    step?.wind_on(wind)
}

/// The points a coast and its ports need, in groups, and where each stretch's are.
struct Layout {
    cut: Vec<(Segment, StretchForecast)>,
    groups: Vec<PointGroup>,
    stretch_groups: Vec<StretchGroups>,
    /// Per port, per stretch: first route group, number of route points, and the way
    /// by sea.
    route_groups: Vec<RouteGroups>,
}

fn layout(geometry: &ForecastGeometry<'_>) -> Layout {
    let cut = cut_stretches(geometry.segments, geometry.stretch_length_nm);
    let mut groups = Vec::new();
    let mut stretch_groups = Vec::with_capacity(cut.len());
    for (part, s) in &cut {
        let (probes, pumping) = pumping_group(s);
        stretch_groups.push(StretchGroups {
            pieces: groups.len(),
            pumping: groups.len() + 1,
            probes,
        });
        groups.push(PointGroup::new(
            part.pieces().iter().map(|p| p.midpoint).collect(),
            s.centre,
            Some(s.centre),
        ));
        groups.push(pumping);
    }
    // The ways by sea from each port, to a point just off each stretch; their points
    // every `route_step_nm` are one group each.
    let mut route_groups = Vec::new();
    let targets: Vec<LatLon> = cut
        .iter()
        .map(|(_, s)| destination(s.centre, s.offshore_bearing_deg, TARGET_OFFSHORE_M))
        .collect();
    // Ways to neighbouring stretches share their first legs, and so the points on
    // them: a point is one group however many ways pass it (keyed by its position).
    let mut route_points: std::collections::HashMap<(u64, u64), usize> =
        std::collections::HashMap::new();
    // Each port's ways are found on their own (in parallel), then their points are
    // numbered in the ports' order.
    let per_port: Vec<Vec<Option<SeaRoute>>> = geometry
        .ports
        .par_iter()
        .map(|&port| sea_routes(geometry.land, port, &targets, &geometry.route))
        .collect();
    for ways in per_port {
        for way in ways {
            let pts = way.as_ref().map_or_else(Vec::new, |r| {
                along(&r.points, geometry.route_step_nm * NAUTICAL_MILE_M)
            });
            let at = pts
                .into_iter()
                .map(|p| {
                    *route_points.entry(p.bits()).or_insert_with(|| {
                        groups.push(PointGroup::point(p));
                        groups.len() - 1
                    })
                })
                .collect();
            route_groups.push((at, way.map(Arc::new)));
        }
    }
    Layout {
        cut,
        groups,
        stretch_groups,
        route_groups,
    }
}

/// What identifies the points a coast and its ports need: conditions sampled for an
/// equal key fit (see [`SampledConditions::fits`]). Made from what the points are
/// found from (the segments, the ports, the land, the settings), so telling whether a
/// cache still fits does not find the ways by sea again.
#[must_use]
pub fn forecast_key(geometry: &ForecastGeometry<'_>) -> u64 {
    use std::hash::{Hash, Hasher};
    let mut h = std::collections::hash_map::DefaultHasher::new();
    let points = |ps: &[LatLon], h: &mut std::collections::hash_map::DefaultHasher| {
        ps.len().hash(h);
        for p in ps {
            p.bits().hash(h);
        }
    };
    geometry.segments.len().hash(&mut h);
    for s in geometry.segments {
        s.id.hash(&mut h);
        s.sea.hash(&mut h);
        points(&s.points, &mut h);
    }
    points(geometry.ports, &mut h);
    let RouteSettings {
        clearance_m,
        harbour_allowance_m,
        max_length_m,
    } = geometry.route;
    for x in [
        geometry.stretch_length_nm,
        geometry.route_step_nm,
        clearance_m,
        harbour_allowance_m,
        max_length_m,
    ] {
        x.to_bits().hash(&mut h);
    }
    geometry.land.fingerprint().hash(&mut h);
    h.finish()
}

/// Samples the wind for a coast and its ports, each run of the forecast (`rule`: see
/// [`forecast_runs`]) in turn. A single forecast reads every file once; an ensemble
/// reads each file once per run, decoding only that run's fields.
pub fn sample_forecast_conditions(
    geometry: &ForecastGeometry<'_>,
    sources: &[WindSource],
    rule: RunRule,
    progress: &Progress,
) -> Result<SampledConditions, ForecastError> {
    let Layout {
        cut,
        groups,
        stretch_groups: layout,
        route_groups,
    } = self::layout(geometry);
    let identities = sources
        .iter()
        .map(|s| SourceIdentity::of(s.path()))
        .collect::<Result<Vec<_>, _>>()?;
    let fingerprint = forecast_key(geometry);
    let runs_of = forecast_runs(sources, rule)?;
    let members: Vec<Option<Member>> = if runs_of.members.is_empty() {
        vec![None]
    } else {
        runs_of.members.iter().copied().map(Some).collect()
    };
    let anchors: Vec<LatLon> = groups.iter().map(|g| g.anchor).collect();
    let waves = sample_waves(sources, &anchors, progress)?;
    let (stretch_pieces, stretches): (Vec<Segment>, Vec<StretchForecast>) = cut.into_iter().unzip();
    let n = stretches.len();
    // Runs are independent: they are read in parallel (sharing the fetch tables); each
    // run's ways' points are summed up in its routes and dropped before the next is
    // read, so memory grows with stretches × hours × runs.
    let fetch = FetchCache::new(geometry.land);
    let runs: Vec<(SampledRun, Vec<DateTime<Utc>>)> = members
        .into_par_iter()
        .map(|member| {
            let mut conditions =
                sample_run(sources, &groups, member.map(|m| (&runs_of, m)), progress)?;
            let timeline = hourly_timeline(conditions.groups.iter().flatten());
            let steps = Steps::new(&timeline, conditions.groups.iter().flatten());
            let routes = geometry
                .ports
                .iter()
                .enumerate()
                .map(|(p, &port)| {
                    port_routes(
                        port,
                        &stretches,
                        &layout,
                        &route_groups[p * n..(p + 1) * n],
                        (&conditions, &groups, &waves),
                        (&steps, &fetch),
                    )
                })
                .collect();
            // The stretches' own groups (two per stretch) are laid out first.
            conditions.groups.truncate(2 * n);
            Ok((
                SampledRun {
                    member,
                    conditions,
                    routes,
                },
                timeline,
            ))
        })
        .collect::<Result<_, WindError>>()?;
    if runs
        .iter()
        .all(|(r, _)| r.conditions.groups.iter().all(Option::is_none))
    {
        return Err(ForecastError::NoWind);
    }
    // Runs may cover different hours (forecasts from different centres): each run's
    // hourly values are laid on the hours of all of them.
    let first = runs.iter().filter_map(|(_, t)| t.first()).min().copied();
    let last = runs.iter().filter_map(|(_, t)| t.last()).max().copied();
    let timeline: Vec<DateTime<Utc>> = match (first, last) {
        (Some(a), Some(b)) => (0..=(b - a).num_hours())
            .map(|k| a + Duration::hours(k))
            .collect(),
        _ => Vec::new(),
    };
    let runs = runs
        .into_iter()
        .map(|(mut run, own)| {
            let offset = own.first().zip(first).map_or(0, |(t, a)| {
                usize::try_from((*t - a).num_hours()).unwrap_or(0)
            });
            for r in &mut run.routes {
                r.lay_on(offset, timeline.len());
            }
            run
        })
        .collect();
    Ok(SampledConditions {
        sources: identities,
        geometry: fingerprint,
        rule,
        stretches,
        layout,
        timeline,
        runs,
        stretch_pieces,
    })
}

/// A point's hourly wind speed (knots) and sea.
struct PointHours {
    knots: Vec<Option<f64>>,
    seas: Vec<Option<super::seastate::SeaAt>>,
    /// The sea is the wind sea estimated from the wind (no wave forecast there).
    estimated: bool,
}

/// The ways from one port: distance, land crossed, and the strongest wind on the way
/// each hour.
fn port_routes(
    port: LatLon,
    stretches: &[StretchForecast],
    layout: &[StretchGroups],
    route_groups: &[RouteGroups],
    (conditions, groups, waves): (&Conditions, &[PointGroup], &[Option<PointSeries>]),
    (steps, fetch): (&Steps<'_>, &FetchCache<'_>),
) -> PortRoutes {
    // The ways to neighbouring stretches share their first legs, and so the points on
    // them: each point's hourly wind and sea is worked out once (keyed by its position,
    // from the first group that needs it): the points of each way where they have wind,
    // then the stretch's centre.
    let mut seen: std::collections::HashMap<(u64, u64), usize> = std::collections::HashMap::new();
    let mut unique: Vec<(LatLon, HoursFrom)> = Vec::new();
    let mut index_of = |p: LatLon, from: HoursFrom| {
        *seen.entry(p.bits()).or_insert_with(|| {
            unique.push((p, from));
            unique.len() - 1
        })
    };
    let mut ways: Vec<(Vec<usize>, bool)> = Vec::with_capacity(stretches.len());
    for ((s, l), (at, _)) in stretches.iter().zip(layout).zip(route_groups) {
        let mut on_way: Vec<usize> = at
            .iter()
            .filter(|&&k| conditions.groups[k].is_some())
            .map(|&k| index_of(groups[k].anchor, HoursFrom::Point(k)))
            .collect();
        // A point of the way without wind leaves the whole way without a forecast.
        let complete = on_way.len() == at.len();
        on_way.push(index_of(s.centre, HoursFrom::Centre(l.pieces)));
        ways.push((on_way, complete));
    }
    // Each point's hours, in parallel.
    let hours: Vec<PointHours> = unique
        .par_iter()
        .map(|&(p, from)| point_hours(p, from, (conditions, waves), steps, fetch))
        .collect();
    let timeline = steps.timeline;
    let per_stretch = way_maxima(&ways, &hours, timeline.len());
    let mut out = PortRoutes {
        port,
        distance_nm: Vec::with_capacity(stretches.len()),
        routes: Vec::with_capacity(stretches.len()),
        max_wind_kt: Vec::with_capacity(stretches.len()),
        max_wave_m: Vec::with_capacity(stretches.len()),
        max_steepness: Vec::with_capacity(stretches.len()),
        wave_source: Vec::with_capacity(stretches.len()),
    };
    for ((s, (_, route)), way) in stretches.iter().zip(route_groups).zip(per_stretch) {
        out.distance_nm.push(
            route
                .as_ref()
                .map_or_else(|| distance_m(port, s.centre), |r| r.length_m)
                / NAUTICAL_MILE_M,
        );
        out.routes.push(route.clone());
        out.max_wind_kt.push(way.max_wind_kt);
        out.max_wave_m.push(way.max_wave_m);
        out.max_steepness.push(way.max_steepness);
        out.wave_source.push(way.wave_source);
    }
    out
}

/// Where a point on the way takes its wind from: a route point's own group, or a
/// stretch's centre (the extra point of its pieces' group).
#[derive(Debug, Clone, Copy)]
enum HoursFrom {
    Point(usize),
    Centre(usize),
}

impl HoursFrom {
    /// The group the point's wind is read from.
    fn group(self) -> usize {
        match self {
            Self::Point(k) | Self::Centre(k) => k,
        }
    }

    /// The point's series in that group.
    fn series(self, g: &GroupWind) -> Option<&WindTrack> {
        match self {
            Self::Point(_) => g.points.first(),
            Self::Centre(_) => g.extra.as_ref(),
        }
    }
}

/// The strongest wind and the sea on the way to one stretch, each hour.
struct StretchWay {
    max_wind_kt: HourlyValues,
    max_wave_m: HourlyValues,
    max_steepness: HourlyValues,
    wave_source: WaveSource,
}

/// The strongest wind, highest sea and steepest sea each hour along each way, its
/// points taken in order. Ways to neighbouring stretches share their first points, so a
/// way's running maxima are carried on from where it leaves the previous way (the same
/// values in the same order as taking the whole way again, so the same numbers).
fn way_maxima(ways: &[(Vec<usize>, bool)], hours: &[PointHours], len: usize) -> Vec<StretchWay> {
    /// Ways handed to one thread at a time, taken in order within it.
    const CHUNK: usize = 256;
    let start = Running {
        wind: vec![Some(0.0); len],
        high: vec![None; len],
        steep: vec![None; len],
        estimated: false,
    };
    // Taken in the order of their points, ways that share first points follow on.
    let mut order: Vec<usize> = (0..ways.len()).collect();
    order.sort_unstable_by(|&a, &b| ways[a].0.cmp(&ways[b].0));
    let mut out: Vec<(usize, StretchWay)> = order
        .par_chunks(CHUNK)
        .map(|chunk| {
            // The previous way's points and the maxima up to each of them.
            let mut stack: Vec<(usize, Running)> = Vec::new();
            chunk
                .iter()
                .map(|&w| {
                    let (on_way, complete) = &ways[w];
                    let shared = stack
                        .iter()
                        .zip(on_way)
                        .take_while(|((a, _), b)| a == *b)
                        .count();
                    stack.truncate(shared);
                    for &u in &on_way[shared..] {
                        let next = stack.last().map_or(&start, |(_, r)| r).then(&hours[u]);
                        stack.push((u, next));
                    }
                    let r = stack.last().map_or(&start, |(_, r)| r);
                    let way = StretchWay {
                        max_wind_kt: if *complete {
                            hourly_values(&r.wind)
                        } else {
                            vec![f32::NAN; len].into()
                        },
                        max_wave_m: hourly_values(&r.high),
                        max_steepness: hourly_values(&r.steep),
                        wave_source: if r.estimated {
                            WaveSource::Estimate
                        } else {
                            WaveSource::Forecast
                        },
                    };
                    (w, way)
                })
                .collect::<Vec<_>>()
        })
        .flatten_iter()
        .collect();
    out.sort_unstable_by_key(|(w, _)| *w);
    out.into_iter().map(|(_, way)| way).collect()
}

/// The maxima along a way up to one of its points.
#[derive(Clone)]
struct Running {
    /// The strongest wind, knots; none from the first point without wind on.
    wind: Vec<Option<f64>>,
    /// The highest sea, metres, over the points with a sea that hour.
    high: Vec<Option<f64>>,
    /// The steepest sea (height over period squared) over the points with both.
    steep: Vec<Option<f64>>,
    /// Some point's sea is estimated from the wind.
    estimated: bool,
}

impl Running {
    /// These maxima carried on to one more point.
    fn then(&self, p: &PointHours) -> Running {
        let sea = |k: usize| p.seas.get(k).copied().flatten();
        let carry = |m: Option<f64>, x: Option<f64>| match (m, x) {
            (Some(m), Some(x)) => Some(m.max(x)),
            (m, x) => m.or(x),
        };
        Running {
            wind: self
                .wind
                .iter()
                .enumerate()
                .map(|(k, m)| m.and_then(|m| p.knots.get(k).copied().flatten().map(|x| m.max(x))))
                .collect(),
            high: self
                .high
                .iter()
                .enumerate()
                .map(|(k, &m)| carry(m, sea(k).map(|x| x.0)))
                .collect(),
            steep: self
                .steep
                .iter()
                .enumerate()
                .map(|(k, &m)| carry(m, sea(k).and_then(|(h, t)| t.map(|t| h / (t * t)))))
                .collect(),
            estimated: self.estimated || p.estimated,
        }
    }
}

/// One point's hourly wind and its waves: forecast where a wave file covers the point,
/// else the wind sea estimated there.
fn point_hours(
    p: LatLon,
    from: HoursFrom,
    (conditions, waves): (&Conditions, &[Option<PointSeries>]),
    steps: &Steps<'_>,
    fetch: &FetchCache<'_>,
) -> PointHours {
    let k = from.group();
    let winds: Vec<Option<Wind>> = match conditions.groups[k].as_ref() {
        Some(g) => {
            let series = from.series(g);
            steps
                .of(g)
                .iter()
                .map(|&step| series.and_then(|s| wind_on(step, s)))
                .collect()
        }
        None => vec![None; steps.timeline.len()],
    };
    let (seas, estimated) = match waves[k].as_ref() {
        Some(series) => (
            steps
                .timeline
                .iter()
                .map(|&t| {
                    series
                        .wave_at(t, MAX_WIND_GAP_H)
                        .map(|w| (w.height_m, w.period_s))
                })
                .collect(),
            false,
        ),
        None => (fetch.wind_sea_m(p, &winds), true),
    };
    PointHours {
        knots: winds
            .iter()
            .map(|w| w.map(|w| m_s_to_knots(w.speed_m_s())))
            .collect(),
        seas,
        estimated,
    }
}

impl SampledConditions {
    /// Whether these conditions were sampled from the same files (unchanged on disk) at
    /// the same points as `geometry` would need.
    #[must_use]
    pub fn fits(&self, sources: &[SourceIdentity], geometry: u64, rule: RunRule) -> bool {
        self.sources == sources && self.geometry == geometry && self.rule == rule
    }

    /// Computes the upwelling of every stretch from the sampled wind.
    #[must_use]
    pub fn forecast(&self, tz: Tz, settings: &UpwellingSettings) -> Forecast {
        let days: Vec<NaiveDate> = match (self.timeline.first(), self.timeline.last()) {
            (Some(a), Some(b)) => local_day(tz, *a)
                .iter_days()
                .take_while(|d| *d <= local_day(tz, *b))
                .collect(),
            _ => Vec::new(),
        };
        let local = local_days(tz, &days);
        // Runs are independent, and so are stretches: all in parallel.
        let mut per_run: Vec<Vec<Arc<StretchForecast>>> = self
            .runs
            .par_iter()
            .map(|run| {
                let steps = Steps::new(&self.timeline, run.conditions.groups.iter().flatten());
                self.stretches
                    .par_iter()
                    .zip(&self.layout)
                    .zip(&self.stretch_pieces)
                    .map(|((s, l), part)| {
                        Arc::new(self.stretch_upwelling(
                            (&run.conditions, &steps),
                            s,
                            l,
                            part,
                            &local,
                            settings,
                        ))
                    })
                    .collect()
            })
            .collect();
        let first = &self.runs[0];
        let ensemble = (self.runs.len() > 1).then(|| {
            Arc::new(Ensemble {
                members: self.runs.iter().filter_map(|r| r.member).collect(),
                stretches: per_run.clone(),
                routes: self.runs.iter().map(|r| r.routes.clone()).collect(),
            })
        });
        // What each file held, from the first run that read it.
        let sources = (0..first.conditions.sources.len())
            .map(|k| {
                self.runs
                    .iter()
                    .find_map(|r| r.conditions.sources.get(k).cloned().flatten())
            })
            .collect();
        Forecast {
            time_zone: tz,
            stretches: per_run.swap_remove(0),
            timeline: self.timeline.clone(),
            days,
            routes: first.routes.clone(),
            latest_reference: self
                .runs
                .iter()
                .filter_map(|r| r.conditions.latest_reference)
                .max(),
            settings: *settings,
            sources,
            ensemble,
        }
    }

    fn stretch_upwelling(
        &self,
        (conditions, steps): (&Conditions, &Steps<'_>),
        s: &StretchForecast,
        l: &StretchGroups,
        part: &Segment,
        days: &[LocalDay],
        settings: &UpwellingSettings,
    ) -> StretchForecast {
        let mut s = s.clone();
        let Some(g) = conditions.groups[l.pieces].as_ref() else {
            return s;
        };
        s.has_wind = true;
        s.wind_source = Some(g.source);
        if s.latitude == Latitude::TooClose {
            return s;
        }
        // The stretch's wind on the hourly timeline, where every piece has it.
        let mut wind = SegmentWind {
            source: g.source,
            times: Vec::new(),
            pieces: vec![Vec::new(); g.points.len()],
            midpoint: Vec::new(),
        };
        let mut at = Vec::with_capacity(g.points.len());
        // The timeline's hour of each time kept.
        let mut hour_of = Vec::with_capacity(self.timeline.len());
        for (h, (&t, &step)) in self.timeline.iter().zip(steps.of(g)).enumerate() {
            at.clear();
            let complete = g
                .points
                .iter()
                .all(|p| wind_on(step, p).map(|w| at.push(w)).is_some());
            if !complete {
                continue;
            }
            let centre = g
                .extra
                .as_ref()
                .and_then(|e| wind_on(step, e))
                .unwrap_or_else(|| length_weighted_at(&part.pieces(), &at));
            wind.times.push(t);
            hour_of.push(h);
            for (p, &w) in wind.pieces.iter_mut().zip(&at) {
                p.push(w);
            }
            wind.midpoint.push(centre);
        }
        let Ok(series) = index_series(part, &wind, &settings.index) else {
            return s;
        };
        let probes = conditions.groups[l.pumping]
            .as_ref()
            .map(|p| Probes::new(p, steps.of(p), &l.probes));
        let idx = &settings.index;
        s.index = *idx;
        s.hours = series
            .times
            .iter()
            .zip(&series.wind)
            .zip(&series.index_m3s_per_100m)
            .zip(&hour_of)
            .map(|(((&time, &wind), &index), &h)| StretchHour {
                time,
                wind,
                index_m3s_per_100m: index,
                pumping: probes
                    .as_ref()
                    .and_then(|p| p.pumping_at(h, idx))
                    .unwrap_or(f64::NAN),
            })
            .collect();
        let pumping: Vec<Option<f64>> = s.hours.iter().map(StretchHour::pumping_m_s).collect();
        let depth: Vec<Option<f64>> = s.hours.iter().map(|h| s.ekman_depth_m(h)).collect();
        s.events = detect_events(&series.times, &series.index_m3s_per_100m, &settings.events);
        let hourly = HourlySeries {
            times: &series.times,
            index_m3s_per_100m: &series.index_m3s_per_100m,
            pumping_m_s: &pumping,
            ekman_depth_m: &depth,
        };
        s.days = daily_upwelling_on(days, &hourly, &s.events, &settings.response);
        s
    }
}

/// The Ekman pumping probes of one stretch, read from one grid: their wind, where each
/// hour falls on it, and their spacing.
struct Probes<'a> {
    wind: &'a GroupWind,
    steps: &'a [Option<TimeStep>],
    lat_deg: [f64; 4],
    /// The Coriolis parameter at each probe, 1/s.
    f: [f64; 4],
    dx_m: f64,
    dy_m: f64,
}

impl<'a> Probes<'a> {
    fn new(wind: &'a GroupWind, steps: &'a [Option<TimeStep>], probes: &[LatLon; 4]) -> Self {
        Self {
            wind,
            steps,
            lat_deg: probes.map(|p| p.lat_deg),
            f: probes.map(|p| coriolis_parameter(p.lat_deg)),
            dx_m: distance_m(probes[1], probes[0]),
            dy_m: distance_m(probes[3], probes[2]),
        }
    }

    /// Ekman pumping at hour `h` of the timeline.
    fn pumping_at(&self, h: usize, idx: &IndexSettings) -> Option<f64> {
        let step = *self.steps.get(h)?;
        let stress = |i: usize| -> Option<ProbeStress> {
            Some(ProbeStress {
                stress: wind_stress(
                    wind_on(step, &self.wind.points[i])?,
                    &idx.drag,
                    idx.rho_air_kg_m3,
                ),
                lat_deg: self.lat_deg[i],
            })
        };
        let p = PumpingProbes {
            east: stress(0)?,
            west: stress(1)?,
            north: stress(2)?,
            south: stress(3)?,
            dx_m: self.dx_m,
            dy_m: self.dy_m,
        };
        ekman_pumping_with_f_m_s(&p, self.f, idx.rho_water_kg_m3)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::wind::wind_at_time;

    /// The hours of a timeline found once per set of times give each series the wind
    /// the search per point and hour gives: on steps, between them, across a gap longer
    /// than the bridged six hours (none), and outside the series (none).
    #[test]
    fn steps_found_once_match_the_search_per_point() {
        let t0: DateTime<Utc> = "2027-05-11T00:00:00Z".parse().expect("time");
        let hours = [0, 3, 6, 15, 18];
        let times: Arc<[DateTime<Utc>]> = hours.iter().map(|&h| t0 + Duration::hours(h)).collect();
        let series: Vec<Wind> = (0..hours.len())
            .map(|k| Wind::new(k as f64, -2.0 * k as f64))
            .collect();
        // Whole numbers: the track keeps them in single precision.
        let track = WindTrack::new(series.clone());
        assert!(matches!(track, WindTrack::Single(_)));
        let group = GroupWind {
            source: 0,
            times: times.clone(),
            points: vec![track.clone()],
            extra: None,
        };
        let timeline: Vec<DateTime<Utc>> = (-2..22).map(|h| t0 + Duration::hours(h)).collect();
        let steps = Steps::new(&timeline, std::iter::once(&group));
        let on = steps.of(&group);
        assert_eq!(on.len(), timeline.len());
        for (&t, &step) in timeline.iter().zip(on) {
            assert_eq!(
                wind_on(step, &track),
                wind_at_time(&times, &series, t, MAX_WIND_GAP_H),
                "at {t}"
            );
        }
        // 01:00 is a third of the way from 00:00 to 03:00; 10:00 is in the nine-hour gap.
        assert_eq!(
            wind_on(on[3], &track),
            Some(Wind::new(1.0 / 3.0, -2.0 / 3.0))
        );
        assert_eq!(wind_on(on[12], &track), None);
    }

    /// The maxima carried on along ways that share their first points are those of
    /// each whole way taken point by point (the plain definition, written out here):
    /// wind none from a point without it, seas over the points that have one, the
    /// steepest only where a period is known, an incomplete way without wind.
    #[test]
    fn shared_way_maxima_match_each_whole_way() {
        let len = 5;
        // Point u's value at hour k, with gaps.
        let value = |u: usize, k: usize| ((u * 7 + k * 3) % 11) as f64 + 0.25 * u as f64;
        let hours: Vec<PointHours> = (0..9)
            .map(|u| PointHours {
                knots: (0..len)
                    .map(|k| ((u + k) % 6 != 5).then(|| value(u, k)))
                    .collect(),
                seas: (0..len)
                    .map(|k| {
                        ((u * k) % 4 != 3)
                            .then(|| (0.1 * value(u, k), (u % 3 != 0).then_some(2.0 + k as f64)))
                    })
                    .collect(),
                estimated: u == 4,
            })
            .collect();
        let ways: Vec<(Vec<usize>, bool)> = vec![
            (vec![0, 1, 2, 3], true),
            (vec![0, 1, 5], true),
            (vec![0, 1, 2, 6], false),
            (vec![7], true),
            (vec![0, 4, 8], true),
            (vec![0, 1, 2, 3, 8], true),
        ];
        let got = way_maxima(&ways, &hours, len);
        for ((on_way, complete), way) in ways.iter().zip(&got) {
            let points: Vec<&PointHours> = on_way.iter().map(|&u| &hours[u]).collect();
            for k in 0..len {
                let wind = if *complete {
                    points
                        .iter()
                        .try_fold(0.0_f64, |m, p| p.knots[k].map(|x| m.max(x)))
                } else {
                    None
                };
                let high = points
                    .iter()
                    .filter_map(|p| p.seas[k].map(|x| x.0))
                    .reduce(f64::max);
                let steep = points
                    .iter()
                    .filter_map(|p| p.seas[k].and_then(|(h, t)| t.map(|t| h / (t * t))))
                    .reduce(f64::max);
                assert_eq!(
                    hourly_at(&way.max_wind_kt, k),
                    wind.map(|x| f64::from(x as f32))
                );
                assert_eq!(
                    hourly_at(&way.max_wave_m, k),
                    high.map(|x| f64::from(x as f32))
                );
                assert_eq!(
                    hourly_at(&way.max_steepness, k),
                    steep.map(|x| f64::from(x as f32))
                );
            }
            let estimated = points.iter().any(|p| p.estimated);
            assert_eq!(way.wave_source == WaveSource::Estimate, estimated);
        }
        // Some hours have wind on a complete way, some not; the fourth point's
        // estimated sea marks only the way through it.
        assert!(got[0].max_wind_kt.iter().any(|x| !x.is_nan()));
        assert!(got[0].max_wind_kt.iter().any(|x| x.is_nan()));
        assert!(got[2].max_wind_kt.iter().all(|x| x.is_nan()));
        assert_eq!(got[4].wave_source, WaveSource::Estimate);
        assert_eq!(got[0].wave_source, WaveSource::Forecast);
    }

    /// The cache key changes with everything the sampled points are found from, and
    /// only with that: the same inputs give the same key.
    #[test]
    fn forecast_key_follows_what_the_points_come_from() {
        use crate::coast::SeaSide;
        let segments = vec![Segment {
            id: "reef".into(),
            points: vec![LatLon::new(38.0, -123.0), LatLon::new(38.1, -123.05)],
            sea: SeaSide::Left,
        }];
        let ports = vec![LatLon::new(38.05, -122.95)];
        let land = Land::default();
        let island = Land::from_rings(vec![vec![
            LatLon::new(38.2, -123.3),
            LatLon::new(38.2, -123.2),
            LatLon::new(38.3, -123.2),
        ]]);
        let base = ForecastGeometry {
            segments: &segments,
            stretch_length_nm: 1.0,
            ports: &ports,
            route_step_nm: 2.0,
            route: RouteSettings::default(),
            land: &land,
        };
        let key = forecast_key(&base);
        assert_eq!(key, forecast_key(&ForecastGeometry { ..base }));
        let mut moved = segments.clone();
        moved[0].points[1].lon_deg = -123.06;
        let mut renamed = segments.clone();
        renamed[0].id = "bank".into();
        let mut flipped = segments.clone();
        flipped[0].sea = SeaSide::Right;
        let other_port = vec![LatLon::new(38.05, -122.9)];
        let changed = [
            ForecastGeometry {
                segments: &moved,
                ..base
            },
            ForecastGeometry {
                segments: &renamed,
                ..base
            },
            ForecastGeometry {
                segments: &flipped,
                ..base
            },
            ForecastGeometry {
                ports: &other_port,
                ..base
            },
            ForecastGeometry {
                stretch_length_nm: 0.5,
                ..base
            },
            ForecastGeometry {
                route_step_nm: 1.0,
                ..base
            },
            ForecastGeometry {
                route: RouteSettings {
                    clearance_m: 100.0,
                    ..RouteSettings::default()
                },
                ..base
            },
            ForecastGeometry {
                land: &island,
                ..base
            },
        ];
        for (k, g) in changed.iter().enumerate() {
            assert_ne!(forecast_key(g), key, "change {k}");
        }
    }

    /// What a stretch works out from an hour's wind: a 10 m/s northerly on a coast
    /// running north at 38.4°N gives a stress of 0.1586 N/m^2 toward the south
    /// (REFERENCES.md, C_D 1.3e-3 and air 1.22 kg/m^3), so −0.1586 along the coast; an
    /// Ekman transport of tau / (rho f) = 0.1586 / (1025 × 9.059e-5) = 1.708 m^2/s to the
    /// right of the stress in the northern hemisphere, toward the west (Ekman 1905); a
    /// layer depth of 7.6 × 10 / sqrt(sin 38.4°) = 96.4 m (by hand); and no pumping where
    /// no grid gives it.
    #[test]
    fn an_hour_worked_out_from_its_wind() {
        let centre = LatLon::new(38.4, -123.2);
        let s = StretchForecast {
            id: "reef/0".into(),
            segment_id: "reef".into(),
            part: (0, 1),
            points: vec![centre],
            centre,
            alongshore_bearing_deg: 0.0,
            offshore_bearing_deg: 270.0,
            latitude: Latitude::Fine,
            has_wind: true,
            wind_source: Some(0),
            hours: Vec::new(),
            days: Vec::new(),
            events: Vec::new(),
            index: IndexSettings::default(),
        };
        let h = StretchHour {
            time: "2027-05-11T00:00:00Z".parse().expect("time"),
            wind: Wind::from_speed_direction(10.0, 0.0),
            index_m3s_per_100m: 0.0,
            pumping: f64::NAN,
        };
        assert!((s.alongshore_stress_pa(&h) + 0.1586).abs() < 5.1e-5);
        let (east, north) = s.transport_m2_s(&h);
        assert!((east + 1.708).abs() < 0.002, "{east}");
        assert!(north.abs() < 1e-12, "{north}");
        let depth = s.ekman_depth_m(&h).expect("depth");
        assert!((depth - 96.4).abs() < 0.1, "{depth}");
        assert_eq!(h.pumping_m_s(), None);
        assert_eq!(h, h);
        let tropical = StretchForecast {
            latitude: Latitude::NearEquator,
            ..s
        };
        assert_eq!(tropical.ekman_depth_m(&h), None);
    }
}
