//! The day-by-day upwelling of one place: daily means of the index and of Ekman
//! pumping, the cumulative index, where each day stands in the events, and the lagged
//! response. One implementation, used by the plan and read by every face.

use super::{DayInput, DayResponse, ResponseSettings, UpwellingEvent, cumulative};
use crate::localtime::{local_midnight, local_noon};
use chrono::{DateTime, NaiveDate, Utc};
use chrono_tz::Tz;

/// Where a day (read at its local noon) stands in the upwelling events.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum EventPhase {
    /// No event under way and none finished before.
    Quiet,
    /// Inside an event.
    During {
        /// Index of the event in the event list.
        event: usize,
        /// Days from its onset to this day's noon.
        age_days: f64,
    },
    /// After a finished event, before the next.
    After {
        /// Index of the event in the event list.
        event: usize,
        /// Days from its end to this day's noon.
        days_since: f64,
    },
}

/// One local day of upwelling at one place.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct UpwellingDay {
    /// The local day.
    pub date: NaiveDate,
    /// Mean index over the hours with wind, m^3/s per 100 m (`None` without wind).
    pub mean_index_m3s_per_100m: Option<f64>,
    /// Mean Ekman pumping just offshore, m/s, where a grid gives it.
    pub mean_pumping_m_s: Option<f64>,
    /// Mean empirical Ekman layer depth, m: about how deep the water that comes up
    /// starts (`None` within 10° of the equator, where the formula does not hold).
    pub mean_ekman_depth_m: Option<f64>,
    /// Cumulative index from the first day, m^3/s per 100 m × days (days without wind
    /// add nothing).
    pub cumulative_m3s_per_100m_days: f64,
    /// Where the day stands in the events.
    pub phase: EventPhase,
    /// The response model's output.
    pub response: DayResponse,
}

fn days_between(a: DateTime<Utc>, b: DateTime<Utc>) -> f64 {
    (b - a).num_seconds() as f64 / 86_400.0
}

/// The phase of the moment `t`.
#[must_use]
pub fn phase_at(events: &[UpwellingEvent], t: DateTime<Utc>) -> EventPhase {
    if let Some(k) = events.iter().position(|e| e.onset <= t && t < e.end) {
        return EventPhase::During {
            event: k,
            age_days: days_between(events[k].onset, t),
        };
    }
    events
        .iter()
        .rposition(|e| !e.ongoing && e.end <= t)
        .map_or(EventPhase::Quiet, |k| EventPhase::After {
            event: k,
            days_since: days_between(events[k].end, t),
        })
}

fn mean(values: impl Iterator<Item = f64>) -> Option<f64> {
    let (sum, n) = values.fold((0.0, 0usize), |(s, n), v| (s + v, n + 1));
    (n > 0).then(|| sum / n as f64)
}

/// What the response model takes from a day: its mean index and pumping (0 without
/// them) and where it stands in `events`.
#[must_use]
pub fn day_input(
    (mean_index, mean_pumping): (Option<f64>, Option<f64>),
    phase: EventPhase,
    events: &[UpwellingEvent],
) -> DayInput {
    let length_days = |k: usize| events.get(k).map_or(0.0, |e| e.duration_h / 24.0);
    DayInput {
        index_m3s_per_100m: mean_index.unwrap_or(0.0),
        pumping_m_s: mean_pumping.unwrap_or(0.0),
        event_length_days: match phase {
            EventPhase::During { event, .. } => Some(length_days(event)),
            _ => None,
        },
        after_event: match phase {
            EventPhase::After { event, days_since } => Some((days_since, length_days(event))),
            _ => None,
        },
    }
}

impl UpwellingDay {
    /// What the response model took from this day, given the events of its place.
    #[must_use]
    pub fn input(&self, events: &[UpwellingEvent]) -> DayInput {
        day_input(
            (self.mean_index_m3s_per_100m, self.mean_pumping_m_s),
            self.phase,
            events,
        )
    }
}

/// An hourly-or-coarser series of one place, times increasing.
#[derive(Debug, Clone, Copy)]
pub struct HourlySeries<'a> {
    /// Valid times, UTC.
    pub times: &'a [DateTime<Utc>],
    /// Coastal upwelling index, m^3/s per 100 m.
    pub index_m3s_per_100m: &'a [f64],
    /// Ekman pumping just offshore, m/s, where a grid gives it.
    pub pumping_m_s: &'a [Option<f64>],
    /// Empirical Ekman layer depth, m, where it holds.
    pub ekman_depth_m: &'a [Option<f64>],
}

/// The upwelling of every local day in `days` (consecutive), from a series and the
/// events found in its index. Days are local days of `tz`, 23 or 25 hours long on
/// clock-change days.
#[must_use]
pub fn daily_upwelling(
    tz: Tz,
    days: &[NaiveDate],
    series: &HourlySeries<'_>,
    events: &[UpwellingEvent],
    settings: &ResponseSettings,
) -> Vec<UpwellingDay> {
    daily_upwelling_on(&local_days(tz, days), series, events, settings)
}

/// A local day: its date, its first and last instant (the next midnight) and its noon,
/// UTC.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LocalDay {
    /// The date.
    pub date: NaiveDate,
    /// Local midnight at its start.
    pub start: DateTime<Utc>,
    /// Local midnight at its end.
    pub end: DateTime<Utc>,
    /// Local noon.
    pub noon: DateTime<Utc>,
}

/// The local days of `tz` for each date in `days`: worked out once for many places.
#[must_use]
pub fn local_days(tz: Tz, days: &[NaiveDate]) -> Vec<LocalDay> {
    days.iter()
        .map(|&day| LocalDay {
            date: day,
            start: local_midnight(tz, day),
            end: local_midnight(tz, day.succ_opt().unwrap_or(day)),
            noon: local_noon(tz, day),
        })
        .collect()
}

/// As [`daily_upwelling`], on local days already worked out.
#[must_use]
pub fn daily_upwelling_on(
    days: &[LocalDay],
    series: &HourlySeries<'_>,
    events: &[UpwellingEvent],
    settings: &ResponseSettings,
) -> Vec<UpwellingDay> {
    let times = series.times;
    let mut means = Vec::with_capacity(days.len());
    let mut inputs = Vec::with_capacity(days.len());
    let mut phases = Vec::with_capacity(days.len());
    let mut pumping = Vec::with_capacity(days.len());
    let mut depth = Vec::with_capacity(days.len());
    for day in days {
        let (start, end) = (day.start, day.end);
        let a = times.partition_point(|t| *t < start);
        let b = times.partition_point(|t| *t < end);
        let mean_index = mean(series.index_m3s_per_100m[a..b].iter().copied());
        let mean_pumping = mean(series.pumping_m_s[a..b].iter().filter_map(|p| *p));
        depth.push(mean(series.ekman_depth_m[a..b].iter().filter_map(|p| *p)));
        let phase = phase_at(events, day.noon);
        inputs.push(day_input((mean_index, mean_pumping), phase, events));
        means.push(mean_index);
        pumping.push(mean_pumping);
        phases.push(phase);
    }
    let responses = settings.respond(&inputs);
    let cumulative = cumulative(
        &inputs
            .iter()
            .map(|d| d.index_m3s_per_100m)
            .collect::<Vec<_>>(),
    );
    (0..days.len())
        .map(|k| UpwellingDay {
            date: days[k].date,
            mean_index_m3s_per_100m: means[k],
            mean_pumping_m_s: pumping[k],
            mean_ekman_depth_m: depth[k],
            cumulative_m3s_per_100m_days: cumulative[k],
            phase: phases[k],
            response: responses[k],
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::upwelling::{EventSettings, detect_events};
    use approx::assert_abs_diff_eq;
    use chrono::Duration;

    /// Daily means over 23- and 25-hour local days: 14 March 2027 in Los Angeles has 23
    /// hours; a constant index keeps its value, and the cumulative index adds it once
    /// per day.
    #[test]
    fn means_over_a_short_day() {
        let tz: Tz = "America/Los_Angeles".parse().expect("zone");
        let d0: NaiveDate = "2027-03-13".parse().expect("date");
        let days: Vec<NaiveDate> = d0.iter_days().take(3).collect();
        let t0 = local_midnight(tz, d0);
        let times: Vec<_> = (0..71).map(|k| t0 + Duration::hours(k)).collect();
        // 10 on the 13th (24 h), 20 on the 14th (23 h), 30 on the 15th.
        let index: Vec<f64> = (0..71)
            .map(|k| match k {
                0..24 => 10.0,
                24..47 => 20.0,
                _ => 30.0,
            })
            .collect();
        let none = vec![None; 71];
        let series = HourlySeries {
            times: &times,
            index_m3s_per_100m: &index,
            pumping_m_s: &none,
            ekman_depth_m: &none,
        };
        let d = daily_upwelling(tz, &days, &series, &[], &ResponseSettings::default());
        let means: Vec<_> = d.iter().map(|x| x.mean_index_m3s_per_100m).collect();
        assert_eq!(means, vec![Some(10.0), Some(20.0), Some(30.0)]);
        assert_abs_diff_eq!(d[2].cumulative_m3s_per_100m_days, 60.0);
        assert_eq!(d[0].mean_pumping_m_s, None);
    }

    /// The relaxation phase, read at local noon: an event ending at 23:00 local one day
    /// is 13 hours old at the next day's noon.
    #[test]
    fn phase_after_an_event_ends_late() {
        let tz: Tz = "UTC".parse().expect("zone");
        let t0: DateTime<Utc> = "2027-05-01T00:00:00Z".parse().expect("time");
        let times: Vec<_> = (0..96).map(|k| t0 + Duration::hours(k)).collect();
        // Upwelling from 00:00 on 1 May to the end of 22:00 on 2 May (47 h).
        let index: Vec<f64> = (0..96).map(|k| if k < 47 { 100.0 } else { 0.0 }).collect();
        let events = detect_events(&times, &index, &EventSettings::default());
        assert_eq!(events.len(), 1);
        match phase_at(&events, local_noon(tz, "2027-05-03".parse().expect("date"))) {
            EventPhase::After { event, days_since } => {
                assert_eq!(event, 0);
                assert_abs_diff_eq!(days_since, 13.0 / 24.0, epsilon = 1e-9);
            }
            other => panic!("expected after, got {other:?}"),
        }
    }

    /// Issue 19, defect 4: the long-event penalty `exp(−(L − 5)/5)` uses the event's
    /// length L. A 10-day event at the optimum (dome 1) gives exp(−1) = 0.368 useful
    /// upwelling from its first day, not only after its fifth.
    #[test]
    fn long_events_are_penalised_from_their_first_day() {
        let tz: Tz = "UTC".parse().expect("zone");
        let d0: NaiveDate = "2027-05-01".parse().expect("date");
        let days: Vec<NaiveDate> = d0.iter_days().take(12).collect();
        let t0 = local_midnight(tz, d0);
        let times: Vec<_> = (0..288).map(|k| t0 + Duration::hours(k)).collect();
        let settings = ResponseSettings::default();
        let index: Vec<f64> = (0..288)
            .map(|k| {
                if (24..264).contains(&k) {
                    settings.optimum_m3s_per_100m
                } else {
                    0.0
                }
            })
            .collect();
        let events = detect_events(&times, &index, &EventSettings::default());
        assert_abs_diff_eq!(events[0].duration_h, 240.0);
        let none = vec![None; 288];
        let series = HourlySeries {
            times: &times,
            index_m3s_per_100m: &index,
            pumping_m_s: &none,
            ekman_depth_m: &none,
        };
        let d = daily_upwelling(tz, &days, &series, &events, &settings);
        assert_abs_diff_eq!(d[1].response.useful, (-1.0f64).exp(), epsilon = 1e-12);
        assert_abs_diff_eq!(d[9].response.useful, (-1.0f64).exp(), epsilon = 1e-12);
        assert_abs_diff_eq!(d[0].response.useful, 0.0);
    }
}
