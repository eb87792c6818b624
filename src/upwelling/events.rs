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
#[derive(Debug, Clone, PartialEq)]
pub struct UpwellingEvent {
    /// First time above the threshold.
    pub onset: DateTime<Utc>,
    /// Last time above the threshold.
    pub end: DateTime<Utc>,
    /// Hours from onset to end.
    pub duration_h: f64,
    /// Highest index, m^3/s per 100 m.
    pub peak_m3s_per_100m: f64,
    /// When the peak came.
    pub peak_time: DateTime<Utc>,
    /// Index integrated over the event, m^3/s per 100 m × days.
    pub integrated_m3s_per_100m_days: f64,
    /// Whether the event was still going at the end of the series.
    pub ongoing: bool,
}

/// A relaxation: from the end of an event until the next onset (or the series end).
#[derive(Debug, Clone, PartialEq)]
pub struct Relaxation {
    /// End of the event before.
    pub start: DateTime<Utc>,
    /// Onset of the next event, or the last time of the series.
    pub end: DateTime<Utc>,
}

fn hours(a: DateTime<Utc>, b: DateTime<Utc>) -> f64 {
    (b - a).num_seconds() as f64 / 3600.0
}

/// Finds the upwelling events of a series (times increasing). The integral uses the
/// trapezoid rule on the actual time steps.
#[must_use]
pub fn detect_events(
    times: &[DateTime<Utc>],
    index: &[f64],
    settings: &EventSettings,
) -> Vec<UpwellingEvent> {
    let n = times.len().min(index.len());
    let mut runs: Vec<(usize, usize)> = Vec::new();
    let mut k = 0;
    while k < n {
        if index[k] > settings.threshold_m3s_per_100m {
            let start = k;
            while k + 1 < n && index[k + 1] > settings.threshold_m3s_per_100m {
                k += 1;
            }
            match runs.last_mut() {
                Some(last) if hours(times[last.1], times[start]) <= settings.max_gap_h => {
                    last.1 = k;
                }
                _ => runs.push((start, k)),
            }
        }
        k += 1;
    }
    runs.into_iter()
        .filter(|&(a, b)| hours(times[a], times[b]) >= settings.min_duration_h)
        .map(|(a, b)| {
            let (peak_k, peak) = (a..=b)
                .map(|k| (k, index[k]))
                .fold((a, f64::MIN), |m, x| if x.1 > m.1 { x } else { m });
            let integrated = (a..b)
                .map(|k| 0.5 * (index[k] + index[k + 1]) * hours(times[k], times[k + 1]) / 24.0)
                .sum();
            UpwellingEvent {
                onset: times[a],
                end: times[b],
                duration_h: hours(times[a], times[b]),
                peak_m3s_per_100m: peak,
                peak_time: times[peak_k],
                integrated_m3s_per_100m_days: integrated,
                ongoing: b + 1 == n,
            }
        })
        .collect()
}

/// The relaxations after each finished event.
#[must_use]
pub fn relaxations(events: &[UpwellingEvent], series_end: DateTime<Utc>) -> Vec<Relaxation> {
    events
        .iter()
        .enumerate()
        .filter(|(_, e)| !e.ongoing)
        .map(|(k, e)| Relaxation {
            start: e.end,
            end: events.get(k + 1).map_or(series_end, |n| n.onset),
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
        assert_eq!(e[0].onset, t[10]);
        assert_eq!(e[0].end, t[57]);
        assert_abs_diff_eq!(e[0].duration_h, 47.0);
        assert_abs_diff_eq!(e[0].peak_m3s_per_100m, 100.0);
        assert!(!e[0].ongoing);
        // Trapezoid: 47 h mostly at 100 less the lull (two ramps down to 20 and back).
        let expected =
            (19.0 * 100.0 + 0.5 * 120.0 + 2.0 * 20.0 + 0.5 * 120.0 + 24.0 * 100.0) / 24.0;
        assert_abs_diff_eq!(e[0].integrated_m3s_per_100m_days, expected, epsilon = 1e-9);
        assert!(e[1].ongoing);
        assert_abs_diff_eq!(e[1].duration_h, 23.0);
        let r = relaxations(&e, *t.last().expect("times"));
        assert_eq!(r.len(), 1);
        assert_eq!((r[0].start, r[0].end), (t[57], e[1].onset));
    }

    #[test]
    fn cumulative_index() {
        assert_eq!(cumulative(&[1.0, -2.0, 5.0]), vec![1.0, -1.0, 4.0]);
    }
}
