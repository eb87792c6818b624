//! Seasons over long records: daily and monthly means of the index, the cumulative index
//! and the season metrics of Bograd et al. 2009 per year, event counts, and the
//! climatology across years. Gaps are counted and reported: a year without enough data
//! is flagged and gets no metrics, never averaged as if complete.
//!
//! Days are UTC days. Northern-hemisphere seasons run from 1 January; southern ones from
//! 1 July to 30 June (a design choice of this tool, so that the austral upwelling
//! season is not cut in two), labelled by the year they start in.

use super::{EventSettings, detect_events, season_metrics};
use chrono::{DateTime, Datelike, NaiveDate, Utc};
use serde::{Deserialize, Serialize};

/// How much data a day, a month and a year need.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct CoverageSettings {
    /// Share of a day its samples must cover for the day to count (0–1).
    pub min_day: f64,
    /// Share of a month's days that must count for its mean (0–1).
    pub min_month: f64,
    /// Share of a season's days that must count for its metrics (0–1).
    pub min_year: f64,
}

impl Default for CoverageSettings {
    fn default() -> Self {
        Self {
            min_day: 0.5,
            min_month: 0.8,
            min_year: 0.9,
        }
    }
}

/// The metrics of one segment in one season.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SeasonYear {
    /// Calendar year the season starts in.
    pub year: i32,
    /// First day of the season (1 January, or 1 July in the south).
    pub season_start: NaiveDate,
    /// Days in the season.
    pub days: usize,
    /// Days with enough data.
    pub covered_days: usize,
    /// `covered_days / days`.
    pub coverage: f64,
    /// Enough data for the metrics (coverage at least the setting).
    pub complete: bool,
    /// Mean daily index over the covered days, m^3/s per 100 m.
    pub mean_index: Option<f64>,
    /// Spring transition (minimum of the cumulative index), as a date.
    pub spring_transition: Option<NaiveDate>,
    /// End of the season (maximum of the cumulative index after it), as a date.
    pub season_end: Option<NaiveDate>,
    /// Days from spring transition to end.
    pub length_days: Option<usize>,
    /// Cumulative index gained from transition to end, m^3/s per 100 m × days.
    pub total_upwelling: Option<f64>,
    /// Days filled by linear interpolation for the cumulative index (complete years).
    pub filled_days: usize,
    /// Upwelling events in the season.
    pub event_count: usize,
    /// Mean event length, days.
    pub mean_event_days: Option<f64>,
    /// Monthly means in season order (January…, or July… in the south); `None` where a
    /// month has too little data.
    pub monthly_mean: Vec<Option<f64>>,
    /// Cumulative index by day of season (complete seasons only, gaps filled), m^3/s per
    /// 100 m × days.
    #[serde(skip)]
    pub cumulative: Vec<f64>,
    /// Why metrics are missing, if they are.
    pub flag: Option<SeasonFlag>,
}

/// Why a season has no metrics.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum SeasonFlag {
    /// Too few days have data.
    Incomplete {
        /// Share of the season's days with data, 0–1.
        coverage: f64,
        /// Share needed, 0–1.
        needed: f64,
    },
}

/// One segment's seasons and climatology.
#[derive(Debug, Clone, PartialEq)]
pub struct SegmentSeasons {
    /// Segment id.
    pub segment_id: String,
    /// Segment name (or id).
    pub name: String,
    /// Seasons start on 1 July (southern hemisphere).
    pub southern: bool,
    /// The seasons.
    pub years: Vec<SeasonYear>,
    /// Across complete seasons.
    pub climatology: Climatology,
}

/// What a long record's analysis needs besides the coast and the files.
#[derive(Debug, Clone, Copy)]
pub struct RecordSettings {
    /// The index: drag law and densities.
    pub index: super::IndexSettings,
    /// Event thresholds.
    pub events: EventSettings,
    /// Data needed per season.
    pub coverage: CoverageSettings,
    /// Only seasons from the first to the last year given.
    pub years: Option<(i32, i32)>,
}

/// Why a long record could not be analysed.
#[derive(Debug, thiserror::Error)]
pub enum RecordError {
    /// The wind files.
    #[error(transparent)]
    Wind(#[from] crate::wind::WindError),
    /// A segment too near the equator.
    #[error(transparent)]
    Upwelling(#[from] super::UpwellingError),
}

/// Seasons of every segment over a long wind record: the files read in parallel and
/// joined in time ([`crate::wind::map_wind_merged`]), then each segment's index and
/// seasons, on every core and one segment at a time (its hourly wind and index are
/// dropped once its seasons are made). `names` are the segments' names to show, in order.
pub fn analyse_record(
    segments: &[crate::coast::Segment],
    names: &[String],
    sources: &[crate::wind::WindSource],
    settings: &RecordSettings,
    progress: &crate::progress::Progress,
) -> Result<Vec<SegmentSeasons>, RecordError> {
    let seasons = crate::wind::map_wind_merged(sources, segments, progress, |i, wind| {
        super::index_series(&segments[i], &wind, &settings.index).map(|s| {
            segment_seasons(
                &names[i],
                &s,
                settings.years,
                &settings.coverage,
                &settings.events,
            )
        })
    })?;
    Ok(seasons.into_iter().collect::<Result<_, _>>()?)
}

/// Seasons of every segment from its index series (names beside them).
#[must_use]
pub fn analyse_segments(
    series: &[(String, super::IndexSeries)],
    years: Option<(i32, i32)>,
    coverage: &CoverageSettings,
    events: &EventSettings,
) -> Vec<SegmentSeasons> {
    use rayon::prelude::*;
    series
        .par_iter()
        .map(|(name, s)| segment_seasons(name, s, years, coverage, events))
        .collect()
}

/// One segment's seasons from its index series.
fn segment_seasons(
    name: &str,
    s: &super::IndexSeries,
    years: Option<(i32, i32)>,
    coverage: &CoverageSettings,
    events: &EventSettings,
) -> SegmentSeasons {
    let southern = s.midpoint.lat_deg < 0.0;
    let (years, climatology) = analyse_seasons(
        &s.times,
        &s.index_m3s_per_100m,
        southern,
        years,
        coverage,
        events,
    );
    SegmentSeasons {
        segment_id: s.segment_id.clone(),
        name: name.to_string(),
        southern,
        years,
        climatology,
    }
}

/// Mean and spread across complete years.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Climatology {
    /// Complete years used.
    pub years_used: usize,
    /// Mean daily index by day of season (index 0 = the season's first day), across
    /// years. Days are aligned by calendar date over 366 days: 29 February has a day of
    /// its own, averaged over leap years only, so 1 March is the same day every year.
    pub daily_mean: Vec<f64>,
    /// Standard deviation of the daily index across years, by day of season.
    pub daily_sd: Vec<f64>,
    /// Mean cumulative index by day of season.
    pub cumulative_mean: Vec<f64>,
    /// Monthly means across years, in season order, with their standard deviations.
    pub monthly_mean: Vec<Option<f64>>,
    /// Standard deviation of the monthly means across years.
    pub monthly_sd: Vec<Option<f64>>,
    /// Mean spring transition, day of season.
    pub mean_transition_day: Option<f64>,
    /// Mean season length, days.
    pub mean_length_days: Option<f64>,
    /// Mean total upwelling.
    pub mean_total: Option<f64>,
    /// Mean number of events per season.
    pub mean_event_count: Option<f64>,
}

fn hours(a: DateTime<Utc>, b: DateTime<Utc>) -> f64 {
    (b - a).num_seconds() as f64 / 3600.0
}

/// The typical time step of a record, hours (median spacing, held to 0.25–24 h).
fn typical_step_h(times: &[DateTime<Utc>]) -> f64 {
    let mut d: Vec<f64> = times
        .windows(2)
        .map(|w| hours(w[0], w[1]))
        .filter(|h| *h > 0.0)
        .collect();
    if d.is_empty() {
        return 24.0;
    }
    d.sort_by(f64::total_cmp);
    d[d.len() / 2].clamp(0.25, 24.0)
}

fn mean_sd(values: &[f64]) -> Option<(f64, f64)> {
    if values.is_empty() {
        return None;
    }
    let n = values.len() as f64;
    let mean = values.iter().sum::<f64>() / n;
    let var = if values.len() > 1 {
        values.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (n - 1.0)
    } else {
        0.0
    };
    Some((mean, var.sqrt()))
}

fn season_start(year: i32, southern: bool) -> Option<NaiveDate> {
    NaiveDate::from_ymd_opt(year, if southern { 7 } else { 1 }, 1)
}

/// Analyses one segment's index record by season.
///
/// `southern` selects seasons from 1 July. Years outside `from..=to` (when given) are
/// left out. Returns the seasons in order and the climatology of the complete ones.
#[must_use]
pub fn analyse_seasons(
    times: &[DateTime<Utc>],
    index: &[f64],
    southern: bool,
    years: Option<(i32, i32)>,
    coverage: &CoverageSettings,
    events: &EventSettings,
) -> (Vec<SeasonYear>, Climatology) {
    let step_h = typical_step_h(times);
    let (Some(first), Some(last)) = (times.first(), times.last()) else {
        return (Vec::new(), empty_climatology());
    };
    // Daily sums and counts by UTC day, by days from the earliest.
    let day0 = times.iter().min().unwrap_or(first).date_naive();
    let day_of = |d: NaiveDate| usize::try_from((d - day0).num_days()).ok();
    let mut by_day: Vec<(f64, usize)> = vec![
        (0.0, 0);
        day_of(times.iter().max().unwrap_or(last).date_naive())
            .map_or(0, |d| d + 1)
    ];
    for (t, v) in times.iter().zip(index) {
        if let Some(e) = day_of(t.date_naive()).and_then(|d| by_day.get_mut(d)) {
            e.0 += v;
            e.1 += 1;
        }
    }
    let day_mean = |d: NaiveDate| {
        day_of(d)
            .and_then(|d| by_day.get(d))
            .filter(|(_, n)| *n > 0)
            .and_then(|(sum, n)| {
                ((*n as f64 * step_h / 24.0) >= coverage.min_day).then(|| sum / *n as f64)
            })
    };
    let first_year = if southern && first.month() < 7 {
        first.year() - 1
    } else {
        first.year()
    };
    let last_year = if southern && last.month() < 7 {
        last.year() - 1
    } else {
        last.year()
    };
    let (lo, hi) = years.unwrap_or((first_year, last_year));
    let mut out = Vec::new();
    for year in lo.max(first_year)..=hi.min(last_year) {
        let (Some(start), Some(end)) = (
            season_start(year, southern),
            season_start(year + 1, southern),
        ) else {
            continue;
        };
        let days: Vec<NaiveDate> = start.iter_days().take_while(|d| *d < end).collect();
        let means: Vec<Option<f64>> = days.iter().map(|d| day_mean(*d)).collect();
        let covered: Vec<f64> = means.iter().flatten().copied().collect();
        let coverage_share = covered.len() as f64 / days.len() as f64;
        let complete = coverage_share >= coverage.min_year;
        // Events within the season, on the record itself.
        let (a, b) = (
            times.partition_point(|t| t.date_naive() < start),
            times.partition_point(|t| t.date_naive() < end),
        );
        let evs = detect_events(&times[a..b], &index[a..b], events);
        let mean_event_days =
            mean_sd(&evs.iter().map(|e| e.duration_h / 24.0).collect::<Vec<_>>()).map(|m| m.0);
        // Monthly means in season order.
        let mut monthly = Vec::with_capacity(12);
        for m in 0..12u32 {
            let month = (start.month0() + m) % 12 + 1;
            let in_month: Vec<&Option<f64>> = days
                .iter()
                .zip(&means)
                .filter(|(d, _)| d.month() == month)
                .map(|(_, v)| v)
                .collect();
            let got: Vec<f64> = in_month.iter().filter_map(|v| **v).collect();
            let ok = !in_month.is_empty()
                && got.len() as f64 / in_month.len() as f64 >= coverage.min_month;
            monthly.push(ok.then(|| got.iter().sum::<f64>() / got.len() as f64));
        }
        let mut year_out = SeasonYear {
            year,
            season_start: start,
            days: days.len(),
            covered_days: covered.len(),
            coverage: coverage_share,
            complete,
            mean_index: mean_sd(&covered).map(|m| m.0),
            spring_transition: None,
            season_end: None,
            length_days: None,
            total_upwelling: None,
            filled_days: 0,
            event_count: evs.len(),
            mean_event_days,
            monthly_mean: monthly,
            cumulative: Vec::new(),
            flag: None,
        };
        if complete {
            let (filled, n_filled) = fill_gaps(&means);
            if let Some(m) = season_metrics(&filled) {
                year_out.spring_transition = days.get(m.start_day - 1).copied();
                year_out.season_end = days.get(m.end_day - 1).copied();
                year_out.length_days = Some(m.length_days);
                year_out.total_upwelling = Some(m.total_m3s_per_100m_days);
            }
            year_out.filled_days = n_filled;
            year_out.cumulative = super::cumulative(&filled);
        } else {
            year_out.flag = Some(SeasonFlag::Incomplete {
                coverage: coverage_share,
                needed: coverage.min_year,
            });
        }
        out.push((year_out, means));
    }
    let climatology = climatology(&out);
    (out.into_iter().map(|(y, _)| y).collect(), climatology)
}

/// Fills missing days by linear interpolation between the nearest days with data (the
/// ends by the nearest value); returns the series and how many days were filled.
fn fill_gaps(values: &[Option<f64>]) -> (Vec<f64>, usize) {
    let known: Vec<(usize, f64)> = values
        .iter()
        .enumerate()
        .filter_map(|(k, v)| v.map(|v| (k, v)))
        .collect();
    let mut filled = 0;
    let out = values
        .iter()
        .enumerate()
        .map(|(k, v)| {
            if let Some(v) = v {
                return *v;
            }
            filled += 1;
            let next = known.partition_point(|(i, _)| *i < k);
            match (next.checked_sub(1).map(|p| known[p]), known.get(next)) {
                (Some((i0, v0)), Some(&(i1, v1))) => {
                    v0 + (v1 - v0) * (k - i0) as f64 / (i1 - i0) as f64
                }
                (Some((_, v0)), None) => v0,
                (None, Some(&(_, v1))) => v1,
                (None, None) => 0.0,
            }
        })
        .collect();
    (out, filled)
}

fn empty_climatology() -> Climatology {
    Climatology {
        years_used: 0,
        daily_mean: Vec::new(),
        daily_sd: Vec::new(),
        cumulative_mean: Vec::new(),
        monthly_mean: vec![None; 12],
        monthly_sd: vec![None; 12],
        mean_transition_day: None,
        mean_length_days: None,
        mean_total: None,
        mean_event_count: None,
    }
}

/// The day of season (0-based, 0–365) of `date` in a season starting `season_start`,
/// counted in a season that holds a 29 February, so every calendar date has one slot.
fn calendar_slot(season_start: NaiveDate, date: NaiveDate) -> Option<usize> {
    // A reference season with a leap day: from 1 January 2004, or from 1 July 2003.
    let southern = season_start.month() != 1;
    let ref_start = if southern {
        NaiveDate::from_ymd_opt(2003, 7, 1)?
    } else {
        NaiveDate::from_ymd_opt(2004, 1, 1)?
    };
    let year = if southern && date.month() >= 7 {
        2003
    } else {
        2004
    };
    let on_ref = NaiveDate::from_ymd_opt(year, date.month(), date.day())?;
    usize::try_from((on_ref - ref_start).num_days()).ok()
}

fn climatology(years: &[(SeasonYear, Vec<Option<f64>>)]) -> Climatology {
    let complete: Vec<&(SeasonYear, Vec<Option<f64>>)> =
        years.iter().filter(|(y, _)| y.complete).collect();
    if complete.is_empty() {
        return empty_climatology();
    }
    // Days are aligned by calendar date, not by count from the season start: 1 March is
    // the same day of season in every year, and 29 February has a day of its own,
    // averaged over the leap years only.
    let mut by_day: Vec<Vec<f64>> = vec![Vec::new(); 366];
    for (y, m) in &complete {
        for (d, v) in m.iter().enumerate() {
            let date = y.season_start + chrono::Days::new(d as u64);
            if let (Some(v), Some(slot)) = (v, calendar_slot(y.season_start, date)) {
                by_day[slot].push(*v);
            }
        }
    }
    let (mut daily_mean, mut daily_sd, mut cumulative_mean) = (Vec::new(), Vec::new(), Vec::new());
    let mut cum = 0.0;
    for vals in &by_day {
        let (m, s) = mean_sd(vals).unwrap_or((0.0, 0.0));
        daily_mean.push(m);
        daily_sd.push(s);
        cum += m;
        cumulative_mean.push(cum);
    }
    let month_stats: Vec<Option<(f64, f64)>> = (0..12)
        .map(|m| {
            mean_sd(
                &complete
                    .iter()
                    .filter_map(|(y, _)| y.monthly_mean[m])
                    .collect::<Vec<_>>(),
            )
        })
        .collect();
    let avg = |f: &dyn Fn(&SeasonYear) -> Option<f64>| {
        mean_sd(
            &complete
                .iter()
                .filter_map(|(y, _)| f(y))
                .collect::<Vec<_>>(),
        )
        .map(|m| m.0)
    };
    Climatology {
        years_used: complete.len(),
        daily_mean,
        daily_sd,
        cumulative_mean,
        monthly_mean: month_stats.iter().map(|m| m.map(|x| x.0)).collect(),
        monthly_sd: month_stats.iter().map(|m| m.map(|x| x.1)).collect(),
        mean_transition_day: avg(&|y| {
            y.spring_transition
                .map(|d| (d - y.season_start).num_days() as f64 + 1.0)
        }),
        mean_length_days: avg(&|y| y.length_days.map(|l| l as f64)),
        mean_total: avg(&|y| y.total_upwelling),
        mean_event_count: avg(&|y| Some(y.event_count as f64)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Issue 19: days of season aligned by date. 1 March is day 60 (0-based) of a
    /// January season in leap and common years alike; 29 February is day 59; in a July
    /// season (184 days from July to December, then 31 + 28), 29 February is day 243.
    #[test]
    fn days_of_season_are_aligned_by_date() {
        let d = |s: &str| s.parse::<NaiveDate>().expect("date");
        assert_eq!(calendar_slot(d("2027-01-01"), d("2027-03-01")), Some(60));
        assert_eq!(calendar_slot(d("2028-01-01"), d("2028-03-01")), Some(60));
        assert_eq!(calendar_slot(d("2028-01-01"), d("2028-02-29")), Some(59));
        assert_eq!(calendar_slot(d("2027-07-01"), d("2028-02-29")), Some(243));
        assert_eq!(calendar_slot(d("2026-07-01"), d("2027-03-01")), Some(244));
        assert_eq!(calendar_slot(d("2027-01-01"), d("2027-12-31")), Some(365));
    }
    use approx::assert_abs_diff_eq;
    use chrono::{Duration, TimeZone};

    /// Hourly series from 1 January of `year`, with a daily value from `f(day of year)`.
    fn hourly(
        year: i32,
        days: i64,
        f: impl Fn(i64) -> Option<f64>,
    ) -> (Vec<DateTime<Utc>>, Vec<f64>) {
        let t0 = Utc
            .with_ymd_and_hms(year, 1, 1, 0, 0, 0)
            .single()
            .expect("valid");
        let (mut t, mut v) = (Vec::new(), Vec::new());
        for d in 0..days {
            if let Some(x) = f(d + 1) {
                for h in 0..24 {
                    t.push(t0 + Duration::hours(d * 24 + h));
                    v.push(x);
                }
            }
        }
        (t, v)
    }

    /// The Bograd check of REFERENCES.md on a whole year of hourly data (2027, 365 days):
    /// −50 on days 1–90, +150 on days 91–270, −50 after: transition day 90 (31 March),
    /// end day 270 (27 September), length 180, total 27 000.
    #[test]
    fn bograd_check_on_an_hourly_year() {
        let (t, v) = hourly(2027, 365, |d| {
            Some(if (91..=270).contains(&d) {
                150.0
            } else {
                -50.0
            })
        });
        let (years, clim) = analyse_seasons(
            &t,
            &v,
            false,
            None,
            &CoverageSettings::default(),
            &EventSettings::default(),
        );
        assert_eq!(years.len(), 1);
        let y = &years[0];
        assert!(y.complete);
        assert_eq!(y.spring_transition, NaiveDate::from_ymd_opt(2027, 3, 31));
        assert_eq!(y.season_end, NaiveDate::from_ymd_opt(2027, 9, 27));
        assert_eq!(y.length_days, Some(180));
        assert_abs_diff_eq!(y.total_upwelling.expect("total"), 27_000.0);
        assert_eq!(y.event_count, 1, "one long event of 180 days");
        assert_abs_diff_eq!(y.monthly_mean[0].expect("January"), -50.0);
        assert_abs_diff_eq!(y.monthly_mean[5].expect("June"), 150.0);
        assert_eq!(clim.years_used, 1);
        assert_abs_diff_eq!(clim.mean_transition_day.expect("mean"), 90.0);
    }

    /// Three years, hand-computed: 2025 whole (+100 in June–August, −20 otherwise);
    /// 2026 with a 60-day gap in autumn (coverage 305/365 = 84 % < 90 %: flagged, no
    /// metrics, but its months with data keep their means); 2027 whole with a 10-day gap
    /// in January (filled by interpolation, 97 % coverage).
    #[test]
    fn gaps_are_flagged_and_never_averaged_as_complete() {
        let summer = |d: i64| {
            if (152..=243).contains(&d) {
                100.0
            } else {
                -20.0
            }
        };
        let mut t = Vec::new();
        let mut v = Vec::new();
        for (year, gap) in [(2025, None), (2026, Some(274..=333)), (2027, Some(11..=20))] {
            let (tt, vv) = hourly(year, 365, |d| {
                if gap
                    .as_ref()
                    .is_some_and(|g: &std::ops::RangeInclusive<i64>| g.contains(&d))
                {
                    None
                } else {
                    Some(summer(d))
                }
            });
            t.extend(tt);
            v.extend(vv);
        }
        let (years, clim) = analyse_seasons(
            &t,
            &v,
            false,
            None,
            &CoverageSettings::default(),
            &EventSettings::default(),
        );
        assert_eq!(years.len(), 3);
        assert!(years[0].complete && !years[1].complete && years[2].complete);
        assert_eq!(years[1].covered_days, 305);
        assert!(matches!(
            years[1].flag,
            Some(SeasonFlag::Incomplete { coverage, needed })
                if (coverage - 305.0 / 365.0).abs() < 1e-12 && (needed - 0.9).abs() < 1e-12
        ));
        assert_eq!(years[1].total_upwelling, None);
        assert_eq!(years[1].monthly_mean[10], None, "November has no data");
        assert_abs_diff_eq!(years[1].monthly_mean[6].expect("July"), 100.0);
        assert_eq!(years[2].filled_days, 10);
        // Days 152–243 at +100 (92 days): the transition is day 151 (31 May), the end
        // day 243 (31 August), total 92 × 100.
        for y in [&years[0], &years[2]] {
            assert_eq!(y.spring_transition.map(|d| d.ordinal()), Some(151));
            assert_eq!(y.season_end.map(|d| d.ordinal()), Some(243));
            assert_abs_diff_eq!(y.total_upwelling.expect("total"), 9200.0);
        }
        assert_eq!(
            clim.years_used, 2,
            "the incomplete year is left out of the climatology"
        );
        assert_abs_diff_eq!(clim.mean_total.expect("total"), 9200.0);
        assert_abs_diff_eq!(clim.monthly_sd[6].expect("sd"), 0.0);
    }

    #[test]
    fn southern_seasons_start_on_the_first_of_july() {
        let (t, v) = hourly(2026, 730, |_| Some(10.0));
        let (years, _) = analyse_seasons(
            &t,
            &v,
            true,
            None,
            &CoverageSettings::default(),
            &EventSettings::default(),
        );
        assert_eq!(
            years[0].season_start,
            NaiveDate::from_ymd_opt(2025, 7, 1).expect("date")
        );
        assert!(
            !years[0].complete,
            "only January–June of that season has data"
        );
        assert_eq!(
            years[1].season_start,
            NaiveDate::from_ymd_opt(2026, 7, 1).expect("date")
        );
        assert!(years[1].complete);
    }
}
