//! The safe window of a day: the longest run of working hours in which the wind on the
//! way and at the stretch stays inside the boat's limit.

use chrono::{DateTime, Duration, Utc};

/// One working hour: its start, and the strongest wind and the highest waves on the
/// way and at the stretch then.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct WorkingHour {
    /// Start of the hour, UTC.
    pub time: DateTime<Utc>,
    /// Strongest wind, knots (`None` without a forecast for part of the way).
    pub wind_kt: Option<f64>,
    /// Highest significant wave height, m (`None` where nothing tells it).
    pub wave_m: Option<f64>,
    /// Steepest sea, height over period squared, m/s^2 (`None` without a period).
    pub steepness_m_s2: Option<f64>,
}

/// The limits a boat keeps to.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Limits {
    /// Wind, knots.
    pub wind_kt: f64,
    /// Significant wave height, m, if the skipper set one.
    pub wave_m: Option<f64>,
    /// Steepness (height over period squared), m/s^2, if the skipper set one.
    pub steepness_m_s2: Option<f64>,
}

/// What makes an hour unsafe, if anything.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Unsafe {
    /// No wind forecast for part of the way.
    NoForecast,
    /// The wind is over the limit (knots).
    Wind(f64),
    /// The waves are over the limit (metres).
    Waves(f64),
    /// The sea is steeper than the limit (height over period squared, m/s^2).
    Steep(f64),
}

impl WorkingHour {
    /// Why this hour is unsafe under `limits`, or `None` when it is safe. Waves that
    /// nothing tells do not block (the plan says they were not checked).
    #[must_use]
    pub fn unsafe_for(&self, limits: &Limits) -> Option<Unsafe> {
        match self.wind_kt {
            None => return Some(Unsafe::NoForecast),
            Some(w) if w > limits.wind_kt => return Some(Unsafe::Wind(w)),
            _ => {}
        }
        match (self.wave_m, limits.wave_m) {
            (Some(h), Some(limit)) if h > limit => return Some(Unsafe::Waves(h)),
            _ => {}
        }
        match (self.steepness_m_s2, limits.steepness_m_s2) {
            (Some(x), Some(limit)) if x > limit => Some(Unsafe::Steep(x)),
            _ => None,
        }
    }
}

/// The longest run of consecutive hours inside the limits, as indices into `hours`
/// (first, last); the earliest of equally long runs.
#[must_use]
pub fn longest_safe_run(hours: &[WorkingHour], limits: &Limits) -> Option<(usize, usize)> {
    let mut best: Option<(usize, usize)> = None;
    let mut start = None;
    for i in 0..=hours.len() {
        let safe = hours.get(i).is_some_and(|h| h.unsafe_for(limits).is_none());
        match (safe, start) {
            (true, None) => start = Some(i),
            (false, Some(a)) => {
                if best.is_none_or(|(x, y)| i - 1 - a > y - x) {
                    best = Some((a, i - 1));
                }
                start = None;
            }
            _ => {}
        }
    }
    best
}

/// Start and end of a run of hourly values: `n` values stand for `n` hours.
#[must_use]
pub fn run_span(hours: &[WorkingHour], run: (usize, usize)) -> (DateTime<Utc>, DateTime<Utc>) {
    (hours[run.0].time, hours[run.1].time + Duration::hours(1))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn longest_run_prefers_the_longest_then_the_earliest() {
        let t0: DateTime<Utc> = "2027-05-01T05:00:00Z".parse().expect("time");
        let winds = [10.0, 30.0, 10.0, 10.0, 30.0, 10.0, 10.0];
        let hours: Vec<WorkingHour> = winds
            .iter()
            .enumerate()
            .map(|(k, w)| WorkingHour {
                time: t0 + Duration::hours(i64::try_from(k).expect("small")),
                wind_kt: Some(*w),
                wave_m: Some(if k == 6 { 2.0 } else { 0.5 }),
                // 0.5 m at 3 s in hour 5: 0.056 m/s^2, steep for a 0.04 limit.
                steepness_m_s2: Some(if k == 5 { 0.5 / 9.0 } else { 0.01 }),
            })
            .collect();
        let wind_only = Limits {
            wind_kt: 20.0,
            wave_m: None,
            steepness_m_s2: None,
        };
        assert_eq!(longest_safe_run(&hours, &wind_only), Some((2, 3)));
        assert_eq!(run_span(&hours, (2, 3)).1, t0 + Duration::hours(4));
        let calm = Limits {
            wind_kt: 5.0,
            wave_m: None,
            steepness_m_s2: None,
        };
        assert_eq!(longest_safe_run(&hours, &calm), None);
        // With a 1.2 m wave limit the last hour (2 m) is out: the runs are 2–3 and 5.
        let both = Limits {
            wind_kt: 20.0,
            wave_m: Some(1.2),
            steepness_m_s2: None,
        };
        assert_eq!(longest_safe_run(&hours, &both), Some((2, 3)));
        assert_eq!(hours[6].unsafe_for(&both), Some(Unsafe::Waves(2.0)));
        assert_eq!(hours[5].unsafe_for(&both), None);
        let steep = Limits {
            steepness_m_s2: Some(0.04),
            ..both
        };
        assert!(matches!(
            hours[5].unsafe_for(&steep),
            Some(Unsafe::Steep(_))
        ));
    }
}
