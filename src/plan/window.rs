//! The safe window of a day: the longest run of working hours in which the wind on the
//! way and at the stretch stays inside the boat's limit.

use chrono::{DateTime, Duration, Utc};

/// One working hour: its start and the strongest wind on the way then, knots (`None`
/// without a forecast for part of the way).
pub type WorkingHour = (DateTime<Utc>, Option<f64>);

/// The longest run of consecutive hours with wind at or under `limit_kt`, as indices
/// into `hours` (first, last); the earliest of equally long runs.
#[must_use]
pub fn longest_safe_run(hours: &[WorkingHour], limit_kt: f64) -> Option<(usize, usize)> {
    let mut best: Option<(usize, usize)> = None;
    let mut start = None;
    for i in 0..=hours.len() {
        let safe = hours
            .get(i)
            .is_some_and(|h| h.1.is_some_and(|w| w <= limit_kt));
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
    (hours[run.0].0, hours[run.1].0 + Duration::hours(1))
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
            .map(|(k, w)| {
                (
                    t0 + Duration::hours(i64::try_from(k).expect("small")),
                    Some(*w),
                )
            })
            .collect();
        assert_eq!(longest_safe_run(&hours, 20.0), Some((2, 3)));
        assert_eq!(run_span(&hours, (2, 3)).1, t0 + Duration::hours(4));
        assert_eq!(longest_safe_run(&hours, 5.0), None);
    }
}
