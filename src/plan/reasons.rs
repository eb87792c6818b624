//! The plain reasons that come with each rank: what the upwelling did, what the wind
//! allows, and what the trip costs. Times are local.

use super::{RankedStretch, StretchDay, StretchHour, StretchInfo};
use crate::coast::Closure;
use crate::scenario::{Port, Vessel};
use chrono::{DateTime, Duration, NaiveDate, Utc};
use chrono_tz::Tz;

fn hhmm(tz: Tz, t: DateTime<Utc>) -> String {
    t.with_timezone(&tz).format("%H:%M").to_string()
}

/// "3 h 30 min", "45 min".
#[must_use]
pub fn duration_text(minutes: f64) -> String {
    let m = minutes.round() as i64;
    match (m / 60, m % 60) {
        (0, m) => format!("{m} min"),
        (h, 0) => format!("{h} h"),
        (h, m) => format!("{h} h {m:02} min"),
    }
}

fn days_ago(days: f64) -> String {
    match days.floor() as i64 {
        i64::MIN..=0 => "today".into(),
        1 => "yesterday".into(),
        n => format!("{n} days ago"),
    }
}

fn days_text(days: f64) -> String {
    if days < 1.5 {
        let h = (days * 24.0).round().max(1.0) as i64;
        return if h == 1 {
            "1 hour".into()
        } else {
            format!("{h} hours")
        };
    }
    format!("{} days", days.round() as i64)
}

/// A wind speed against a limit: one decimal when whole knots would hide which side of
/// the limit it is on.
fn knots_vs(wind_kt: f64, limit_kt: f64) -> String {
    if (wind_kt.round() - limit_kt.round()).abs() < 1.0 {
        format!("{wind_kt:.1} kt")
    } else {
        format!("{wind_kt:.0} kt")
    }
}

pub(super) fn closed(c: &Closure) -> String {
    let s = format!(
        "closed to fishing: {}",
        if c.reason.is_empty() {
            "no reason given"
        } else {
            &c.reason
        }
    );
    let dates = match (c.from, c.to) {
        (Some(f), Some(t)) => format!(" ({} to {})", f.format("%-d %b"), t.format("%-d %b %Y")),
        (None, Some(t)) => format!(" (until {})", t.format("%-d %b %Y")),
        (Some(f), None) => format!(" (from {})", f.format("%-d %b %Y")),
        (None, None) => String::new(),
    };
    s + &dates
}

pub(super) fn never_safe(tz: Tz, working: &[&StretchHour], vessel: &Vessel) -> String {
    if working.iter().all(|h| h.route_max_wind_kt.is_none()) {
        return "no forecast for part of the way from port".into();
    }
    let worst = working
        .iter()
        .filter_map(|h| h.route_max_wind_kt.map(|w| (h.time, w)))
        .fold((working[0].time, 0.0), |m, x| if x.1 > m.1 { x } else { m });
    format!(
        "wind up to {} ({}): over this boat's {:.0} kt limit all day",
        knots_vs(worst.1, vessel.wind_limit_kt),
        hhmm(tz, worst.0),
        vessel.wind_limit_kt
    )
}

pub(super) fn window_too_short(
    tz: Tz,
    working: &[&StretchHour],
    a: usize,
    b: usize,
    steam_h: f64,
    vessel: &Vessel,
    min_fishing_h: f64,
) -> String {
    format!(
        "only {}–{} under this boat's {:.0} kt limit: too short for {} steaming each way and {:.0} h fishing",
        hhmm(tz, working[a].time),
        hhmm(tz, working[b].time + Duration::hours(1)),
        vessel.wind_limit_kt,
        duration_text(steam_h * 60.0),
        min_fishing_h
    )
}

fn upwelling_reason(
    date: NaiveDate,
    s: &StretchInfo,
    day: &StretchDay,
    noon: DateTime<Utc>,
) -> String {
    let days_between = |a: DateTime<Utc>, b: DateTime<Utc>| (b - a).num_seconds() as f64 / 86_400.0;
    let mean = day.mean_index_m3s_per_100m.unwrap_or(0.0);
    let productivity = format!(
        "expected productivity {:.0} %",
        100.0 * day.response.productivity
    );
    if let Some(e) = s.events.iter().find(|e| e.onset <= noon && noon <= e.end) {
        let age = days_between(e.onset, noon);
        if day.response.useful < 0.4 && mean > 0.0 {
            return format!(
                "strong upwelling for {} (peak {:.0} m³/s per 100 m): production flushed offshore; {productivity}",
                days_text(age),
                e.peak_m3s_per_100m
            );
        }
        return format!(
            "upwelling for {} so far: bloom building; {productivity}",
            days_text(age)
        );
    }
    if let Some(e) = s.events.iter().rev().find(|e| e.end < noon) {
        let since = days_between(e.end, noon);
        if since <= 4.0 {
            return format!(
                "upwelling for {} ended {}: bloom expected; {productivity}",
                days_text(e.duration_h / 24.0),
                days_ago(since)
            );
        }
    }
    let _ = date;
    if mean < 0.0 {
        return format!(
            "downwelling ({mean:.0} m³/s per 100 m): warm water held against the coast; {productivity}"
        );
    }
    if s.events.iter().any(|e| e.end < noon) {
        return format!("upwelling more than 4 days ago: bloom fading; {productivity}");
    }
    format!("no upwelling event in the forecast so far: little fresh production; {productivity}")
}

fn wind_reason(tz: Tz, r: &RankedStretch, working: &[&StretchHour], vessel: &Vessel) -> String {
    let limit = vessel.wind_limit_kt;
    let (from, to) = r.safe_window;
    let over: Vec<&&StretchHour> = working
        .iter()
        .filter(|h| h.route_max_wind_kt.is_none_or(|w| w > limit))
        .collect();
    if over.is_empty() {
        return format!(
            "wind under this boat's {limit:.0} kt limit all day (up to {:.0} kt)",
            r.max_wind_kt
        );
    }
    let after = over.iter().find(|h| h.time >= to);
    let before = over.iter().rev().find(|h| h.time < from);
    let describe = |h: &StretchHour| match h.route_max_wind_kt {
        Some(w) => format!("wind {} at {}", knots_vs(w, limit), hhmm(tz, h.time)),
        None => format!("no forecast at {}", hhmm(tz, h.time)),
    };
    match (before, after) {
        (_, Some(h)) => format!(
            "{}: over this boat's {limit:.0} kt limit after {}; back in by then",
            describe(h),
            hhmm(tz, to)
        ),
        (Some(h), None) => format!(
            "{}: over this boat's {limit:.0} kt limit until {}; go after that",
            describe(h),
            hhmm(tz, from)
        ),
        (None, None) => format!("safe {}–{} for this boat", hhmm(tz, from), hhmm(tz, to)),
    }
}

// The reasons draw on every part of the plan for one stretch and day.
#[allow(clippy::too_many_arguments)]
pub(super) fn ranked(
    tz: Tz,
    date: NaiveDate,
    s: &StretchInfo,
    day: &StretchDay,
    r: &RankedStretch,
    working: &[&StretchHour],
    vessel: &Vessel,
    port: &Port,
) -> Vec<String> {
    let noon = super::build::local_noon(tz, date);
    let mut distance = format!(
        "{:.0} nm from {}: {} each way, about {:.0} l of fuel",
        s.distance_nm,
        port.name,
        duration_text(r.steam_minutes),
        r.fuel_l
    );
    if s.crosses_land {
        distance.push_str(" (straight line crosses land: the way by sea is longer)");
    }
    vec![
        upwelling_reason(date, s, day, noon),
        wind_reason(tz, r, working, vessel),
        distance,
    ]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn durations_read_like_a_skipper_says_them() {
        assert_eq!(duration_text(210.0), "3 h 30 min");
        assert_eq!(duration_text(45.2), "45 min");
        assert_eq!(duration_text(120.0), "2 h");
        assert_eq!(duration_text(62.0), "1 h 02 min");
    }
}
