//! Upwelling events and relaxations in an index series, and the cumulative index.

use chrono::{DateTime, Utc};
use serde::{Deserialize, Serialize};

/// Thresholds of event detection; all editable in a scenario.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct EventSettings {
    /// Index above which the coast is upwelling, m^3/s per 100 m. A planning choice
    /// (common practice is a small positive threshold to ignore noise).
    pub threshold_m3s_per_100m: f64,
    /// Shortest event kept, hours. Wind events in eastern boundary upwelling typically
    /// last 3–4 days (Taylor et al. 2008); shorter blips are not events.
    pub min_duration_h: f64,
    /// Dips below the threshold shorter than this are bridged, hours (a lull of an
    /// afternoon does not end an event).
    pub max_gap_h: f64,
}

impl Default for EventSettings {
    fn default() -> Self {
        Self {
            threshold_m3s_per_100m: 50.0,
            min_duration_h: 18.0,
            max_gap_h: 6.0,
        }
    }
}

/// One upwelling event.
///
/// Each sample of the index stands for the interval from its time to the next sample
/// (the last of a series, or one before a gap, for as long as the step before it): so
/// `n` hourly values above the threshold make an event of `n` hours, as `n` hourly
/// values inside a boat's limit make a window of `n` hours.
#[derive(Debug, Clone, PartialEq)]
pub struct UpwellingEvent {
    /// Time of the first sample above the threshold.
    pub onset: DateTime<Utc>,
    /// End of the interval of the last sample above the threshold.
    pub end: DateTime<Utc>,
    /// Hours from onset to end.
    pub duration_h: f64,
    /// Highest index, m^3/s per 100 m.
    pub peak_m3s_per_100m: f64,
    /// When the peak came.
    pub peak_time: DateTime<Utc>,
    /// Index integrated over the event (each sample over its interval),
    /// m^3/s per 100 m × days.
    pub integrated_m3s_per_100m_days: f64,
    /// Whether the event was still going at the end of the series: its end is then the
    /// end of the series, and its length at least `duration_h`.
    pub ongoing: bool,
}

fn hours(a: DateTime<Utc>, b: DateTime<Utc>) -> f64 {
    (b - a).num_seconds() as f64 / 3600.0
}

/// The interval sample `k` stands for, hours: the shorter of the steps on either side
/// (so a gap in the record after it does not count as upwelling).
fn interval_h(times: &[DateTime<Utc>], k: usize) -> f64 {
    let before = k.checked_sub(1).map(|j| hours(times[j], times[k]));
    let after = times.get(k + 1).map(|t| hours(times[k], *t));
    match (before, after) {
        (Some(a), Some(b)) => a.min(b),
        (Some(x), None) | (None, Some(x)) => x,
        (None, None) => 0.0,
    }
}

/// Finds the upwelling events of a series (times increasing).
#[must_use]
pub fn detect_events(
    times: &[DateTime<Utc>],
    index: &[f64],
    settings: &EventSettings,
) -> Vec<UpwellingEvent> {
    let n = times.len().min(index.len());
    let end_of =
        |k: usize| times[k] + chrono::Duration::seconds((interval_h(times, k) * 3600.0) as i64);
    let mut runs: Vec<(usize, usize)> = Vec::new();
    let mut k = 0;
    while k < n {
        if index[k] > settings.threshold_m3s_per_100m {
            let start = k;
            while k + 1 < n && index[k + 1] > settings.threshold_m3s_per_100m {
                k += 1;
            }
            match runs.last_mut() {
                Some(last) if hours(end_of(last.1), times[start]) <= settings.max_gap_h => {
                    last.1 = k;
                }
                _ => runs.push((start, k)),
            }
        }
        k += 1;
    }
    runs.into_iter()
        .filter(|&(a, b)| hours(times[a], end_of(b)) >= settings.min_duration_h)
        .map(|(a, b)| {
            let (peak_k, peak) = (a..=b)
                .map(|k| (k, index[k]))
                .fold((a, f64::MIN), |m, x| if x.1 > m.1 { x } else { m });
            let integrated = (a..=b)
                .map(|k| index[k] * interval_h(times, k) / 24.0)
                .sum();
            UpwellingEvent {
                onset: times[a],
                end: end_of(b),
                duration_h: hours(times[a], end_of(b)),
                peak_m3s_per_100m: peak,
                peak_time: times[peak_k],
                integrated_m3s_per_100m_days: integrated,
                ongoing: b + 1 == n,
            }
        })
        .collect()
}

/// Running sum of daily values (the cumulative upwelling index, CUI, when the values are
/// daily means of the index), m^3/s per 100 m × days.
#[must_use]
pub fn cumulative(daily: &[f64]) -> Vec<f64> {
    daily
        .iter()
        .scan(0.0, |acc, x| {
            *acc += x;
            Some(*acc)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use chrono::Duration;

    fn hourly(values: &[f64]) -> Vec<DateTime<Utc>> {
        let t0 = DateTime::parse_from_rfc3339("2027-05-01T00:00:00Z")
            .expect("valid")
            .to_utc();
        (0..i64::try_from(values.len()).expect("short series"))
            .map(|k| t0 + Duration::hours(k))
            .collect()
    }

    /// A constructed series: 10 h calm, 48 h at 100 with a 3 h lull at 20, 10 h calm,
    /// a 6 h blip at 200 (too short), 24 h at 150 running to the end.
    #[test]
    fn events_on_a_constructed_series() {
        let mut v = vec![0.0; 10];
        v.extend(vec![100.0; 20]);
        v.extend(vec![20.0; 3]);
        v.extend(vec![100.0; 25]);
        v.extend(vec![0.0; 10]);
        v.extend(vec![200.0; 6]);
        v.extend(vec![0.0; 10]);
        v.extend(vec![150.0; 24]);
        let t = hourly(&v);
        let e = detect_events(&t, &v, &EventSettings::default());
        assert_eq!(e.len(), 2);
        // 48 hourly samples from hour 10 (the lull bridged) make 48 hours, ending at
        // the end of hour 57.
        assert_eq!(e[0].onset, t[10]);
        assert_eq!(e[0].end, t[58]);
        assert_abs_diff_eq!(e[0].duration_h, 48.0);
        assert_abs_diff_eq!(e[0].peak_m3s_per_100m, 100.0);
        assert!(!e[0].ongoing);
        // Each hour at its value: 45 h at 100 and the 3 h lull at 20, by hand.
        let expected = (45.0 * 100.0 + 3.0 * 20.0) / 24.0;
        assert_abs_diff_eq!(e[0].integrated_m3s_per_100m_days, expected, epsilon = 1e-9);
        assert!(e[1].ongoing);
        assert_abs_diff_eq!(e[1].duration_h, 24.0);
    }

    /// Issue 19: 18 hourly values above the threshold are an 18-hour event, which the
    /// 18-hour minimum keeps; 17 are not. Six-hourly values: 4 samples are 24 hours.
    #[test]
    fn n_samples_make_n_intervals() {
        let mut v = vec![0.0; 3];
        v.extend(vec![100.0; 18]);
        v.extend(vec![0.0; 3]);
        let t = hourly(&v);
        let e = detect_events(&t, &v, &EventSettings::default());
        assert_eq!(e.len(), 1);
        assert_abs_diff_eq!(e[0].duration_h, 18.0);
        let mut short = vec![0.0; 3];
        short.extend(vec![100.0; 17]);
        short.extend(vec![0.0; 3]);
        assert!(detect_events(&hourly(&short), &short, &EventSettings::default()).is_empty());
        let six: Vec<DateTime<Utc>> = hourly(&[0.0; 36]).into_iter().step_by(6).collect();
        let values = [0.0, 100.0, 100.0, 100.0, 100.0, 0.0];
        let e = detect_events(&six, &values, &EventSettings::default());
        assert_abs_diff_eq!(e[0].duration_h, 24.0);
    }

    #[test]
    fn cumulative_index() {
        assert_eq!(cumulative(&[1.0, -2.0, 5.0]), vec![1.0, -1.0, 4.0]);
    }
}
