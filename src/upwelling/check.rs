//! Did the sea agree? The index a segment had against the sea temperature measured near
//! it (README, "Checking against the sea temperature"):
//! - daily means over UTC days of the index `I_d` and the temperature `T_d`;
//! - the anomaly `A_d = T_d −` the mean of `T` over the days `d−15 … d+15` with data;
//! - for each lag `L = 0 … 10` days, the Pearson correlation `r(L)` of `I_d` with
//!   `A_{d+L}` over the days where both exist (none below 10 pairs); the best lag has the
//!   most negative `r` (upwelling cools), with a 95 % interval from Fisher's z (Fisher
//!   1915);
//! - an upwelling event is *confirmed* when the lowest `T` from its onset day to 3 days
//!   after its end is at least `cooling_c` below `T` on the day before onset.

use super::UpwellingEvent;
use chrono::{DateTime, Days, NaiveDate, Utc};
use std::collections::BTreeMap;

/// Settings of the check.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CheckSettings {
    /// Cooling that confirms an event, °C.
    pub cooling_c: f64,
    /// Half-width of the window the anomaly is measured against, days.
    pub anomaly_half_window_days: u64,
    /// Longest lag tried, days.
    pub max_lag_days: usize,
    /// Fewest pairs for a correlation.
    pub min_pairs: usize,
    /// Days after an event's end in which its cooling may show.
    pub days_after_event: u64,
}

impl Default for CheckSettings {
    fn default() -> Self {
        Self {
            cooling_c: 0.5,
            anomaly_half_window_days: 15,
            max_lag_days: 10,
            min_pairs: 10,
            days_after_event: 3,
        }
    }
}

/// The correlation at one lag.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LagCorrelation {
    /// Days the temperature is taken after the index.
    pub lag_days: usize,
    /// Pearson's r, `None` with fewer pairs than the settings ask (or no spread).
    pub r: Option<f64>,
    /// Days where both exist.
    pub pairs: usize,
}

/// The lag at which the sea answered best.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BestLag {
    /// Days.
    pub lag_days: usize,
    /// Pearson's r there.
    pub r: f64,
    /// Its 95 % interval (Fisher z).
    pub interval: (f64, f64),
    /// Pairs behind it.
    pub pairs: usize,
}

/// One event, checked.
#[derive(Debug, Clone, PartialEq)]
pub struct EventCheck {
    /// UTC day of onset.
    pub onset: NaiveDate,
    /// UTC day of the end.
    pub end: NaiveDate,
    /// Temperature the day before onset, °C (`None`: no data that day).
    pub before_c: Option<f64>,
    /// Largest drop below it from the onset day to the days after the end, °C.
    pub cooling_c: Option<f64>,
    /// The first day the drop reached the setting, if it did.
    pub seen_on: Option<NaiveDate>,
    /// Confirmed, not confirmed, or `None` without data to tell.
    pub confirmed: Option<bool>,
}

/// The check of one segment.
#[derive(Debug, Clone, PartialEq)]
pub struct SegmentCheck {
    /// Days with both a daily index and a daily temperature.
    pub days: usize,
    /// The correlation at each lag, 0 to the longest.
    pub by_lag: Vec<LagCorrelation>,
    /// The most negative correlation, if any lag has one.
    pub best: Option<BestLag>,
    /// Every event, checked.
    pub events: Vec<EventCheck>,
}

impl SegmentCheck {
    /// Events with data to tell, and how many of them were confirmed.
    #[must_use]
    pub fn hits(&self) -> (usize, usize) {
        let told = self.events.iter().filter(|e| e.confirmed.is_some()).count();
        let confirmed = self
            .events
            .iter()
            .filter(|e| e.confirmed == Some(true))
            .count();
        (told, confirmed)
    }
}

/// Daily means over UTC days of a series (non-finite values skipped).
#[must_use]
pub fn daily_means(times: &[DateTime<Utc>], values: &[f64]) -> BTreeMap<NaiveDate, f64> {
    let mut sums: BTreeMap<NaiveDate, (f64, usize)> = BTreeMap::new();
    for (t, v) in times.iter().zip(values) {
        if v.is_finite() {
            let e = sums.entry(t.date_naive()).or_insert((0.0, 0));
            e.0 += v;
            e.1 += 1;
        }
    }
    sums.into_iter()
        .map(|(d, (s, n))| (d, s / n as f64))
        .collect()
}

/// Pearson's r of pairs; `None` for fewer than two pairs or no spread.
#[must_use]
pub fn pearson(pairs: &[(f64, f64)]) -> Option<f64> {
    let n = pairs.len() as f64;
    if pairs.len() < 2 {
        return None;
    }
    let (mx, my) = pairs
        .iter()
        .fold((0.0, 0.0), |(a, b), (x, y)| (a + x / n, b + y / n));
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (x, y) in pairs {
        sxy += (x - mx) * (y - my);
        sxx += (x - mx) * (x - mx);
        syy += (y - my) * (y - my);
    }
    (sxx > 0.0 && syy > 0.0).then(|| (sxy / (sxx * syy).sqrt()).clamp(-1.0, 1.0))
}

/// The 95 % interval of a correlation `r` from `n` pairs by Fisher's z transformation
/// (Fisher 1915): `tanh(atanh r ± 1.96 / sqrt(n − 3))`.
#[must_use]
pub fn fisher_interval(r: f64, n: usize) -> Option<(f64, f64)> {
    if n <= 3 {
        return None;
    }
    let z = r.clamp(-0.999_999_9, 0.999_999_9).atanh();
    let half = 1.959_964 / ((n - 3) as f64).sqrt();
    Some(((z - half).tanh(), (z + half).tanh()))
}

fn day_after(d: NaiveDate, n: u64) -> Option<NaiveDate> {
    d.checked_add_days(Days::new(n))
}

/// The temperature anomaly of each day with data (see the module documentation).
#[must_use]
pub fn anomalies(
    temp: &BTreeMap<NaiveDate, f64>,
    half_window_days: u64,
) -> BTreeMap<NaiveDate, f64> {
    temp.iter()
        .map(|(&d, &t)| {
            let from = d.checked_sub_days(Days::new(half_window_days)).unwrap_or(d);
            let to = day_after(d, half_window_days).unwrap_or(d);
            let (sum, n) = temp
                .range(from..=to)
                .fold((0.0, 0usize), |(s, n), (_, v)| (s + v, n + 1));
            (d, t - sum / n as f64)
        })
        .collect()
}

/// Checks one segment: its hourly index (times and values), its events, and the daily
/// temperature near it.
#[must_use]
pub fn check_segment(
    index: (&[DateTime<Utc>], &[f64]),
    events: &[UpwellingEvent],
    temp: &BTreeMap<NaiveDate, f64>,
    settings: &CheckSettings,
) -> SegmentCheck {
    let daily_index = daily_means(index.0, index.1);
    let anomaly = anomalies(temp, settings.anomaly_half_window_days);
    let by_lag: Vec<LagCorrelation> = (0..=settings.max_lag_days)
        .map(|lag| {
            let pairs: Vec<(f64, f64)> = daily_index
                .iter()
                .filter_map(|(d, i)| {
                    let later = day_after(*d, lag as u64)?;
                    anomaly.get(&later).map(|a| (*i, *a))
                })
                .collect();
            LagCorrelation {
                lag_days: lag,
                r: (pairs.len() >= settings.min_pairs)
                    .then(|| pearson(&pairs))
                    .flatten(),
                pairs: pairs.len(),
            }
        })
        .collect();
    let best = by_lag
        .iter()
        .filter_map(|l| l.r.map(|r| (l, r)))
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .and_then(|(l, r)| {
            Some(BestLag {
                lag_days: l.lag_days,
                r,
                interval: fisher_interval(r, l.pairs)?,
                pairs: l.pairs,
            })
        });
    SegmentCheck {
        days: daily_index.keys().filter(|d| temp.contains_key(d)).count(),
        by_lag,
        best,
        events: events
            .iter()
            .map(|e| check_event(e, temp, settings))
            .collect(),
    }
}

fn check_event(
    e: &UpwellingEvent,
    temp: &BTreeMap<NaiveDate, f64>,
    settings: &CheckSettings,
) -> EventCheck {
    let onset = e.onset.date_naive();
    // The end is the end of the last hour above the threshold: the day it falls in,
    // or the day before when it falls on midnight.
    let end = (e.end - chrono::Duration::seconds(1))
        .date_naive()
        .max(onset);
    let before_c = onset.pred_opt().and_then(|d| temp.get(&d).copied());
    let last = day_after(end, settings.days_after_event).unwrap_or(end);
    let window: Vec<(NaiveDate, f64)> = temp.range(onset..=last).map(|(d, t)| (*d, *t)).collect();
    let cooling_c = before_c.and_then(|b| window.iter().map(|(_, t)| b - t).reduce(f64::max));
    let seen_on = before_c.and_then(|b| {
        window
            .iter()
            .find(|(_, t)| b - t >= settings.cooling_c)
            .map(|(d, _)| *d)
    });
    EventCheck {
        onset,
        end,
        before_c,
        cooling_c,
        seen_on,
        // Not seen yet, with the record ending before the last day it could show:
        // nothing to tell.
        confirmed: cooling_c
            .map(|c| c >= settings.cooling_c)
            .filter(|&seen| seen || temp.range(last..).next().is_some()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Fisher's z interval, worked by hand: r = −0.5 from 28 pairs: z = atanh(−0.5) =
    /// −0.5493, half-width 1.96 / 5 = 0.3920, so tanh(−0.9413) = −0.7356 to
    /// tanh(−0.1573) = −0.1560.
    #[test]
    fn fisher_interval_by_hand() {
        let (lo, hi) = fisher_interval(-0.5, 28).expect("interval");
        assert!(
            (lo + 0.7356).abs() < 1e-3 && (hi + 0.1560).abs() < 1e-3,
            "{lo} {hi}"
        );
        assert_eq!(fisher_interval(0.3, 3), None);
    }

    /// An event near the end of the temperature record: cooling seen in time confirms
    /// it; no cooling with the record ending before its last day (3 days after its end)
    /// cannot be told; no cooling over a record that goes on is a miss.
    #[test]
    fn an_event_cut_off_by_the_end_of_the_record() {
        let day = |d: u32| NaiveDate::from_ymd_opt(2027, 6, d).expect("day");
        let at = |d: u32, h: u32| day(d).and_hms_opt(h, 0, 0).expect("time").and_utc();
        let event = UpwellingEvent {
            onset: at(10, 0),
            end: at(11, 12),
            duration_h: 36.0,
            peak_m3s_per_100m: 200.0,
            peak_time: at(11, 0),
            integrated_m3s_per_100m_days: 200.0,
            ongoing: false,
        };
        let settings = CheckSettings::default();
        let record = |last: u32, dip: f64| -> BTreeMap<NaiveDate, f64> {
            (1..=last)
                .map(|d| (day(d), if d >= 11 { 14.0 - dip } else { 14.0 }))
                .collect()
        };
        let cooled = check_event(&event, &record(12, 1.0), &settings);
        assert_eq!(cooled.confirmed, Some(true));
        assert_eq!(cooled.seen_on, Some(day(11)));
        assert_eq!(
            check_event(&event, &record(13, 0.0), &settings).confirmed,
            None
        );
        assert_eq!(
            check_event(&event, &record(14, 0.0), &settings).confirmed,
            Some(false)
        );
    }

    /// Pearson's r of a line is 1, of its mirror −1, of no spread none.
    #[test]
    fn pearson_of_lines() {
        let up: Vec<(f64, f64)> = (0..5)
            .map(|k| (f64::from(k), 2.0 * f64::from(k) + 1.0))
            .collect();
        let down: Vec<(f64, f64)> = up.iter().map(|(x, y)| (*x, -y)).collect();
        assert!((pearson(&up).expect("r") - 1.0).abs() < 1e-12);
        assert!((pearson(&down).expect("r") + 1.0).abs() < 1e-12);
        assert_eq!(pearson(&[(1.0, 2.0), (1.0, 3.0)]), None);
    }
}
