//! Words for the plan's typed values: the reasons of each rank, why a stretch is left
//! out, and the plan's notes. The command line, the exports and the app all show these,
//! so they say the same thing everywhere. Times are local, in the plan's time zone.

use super::units::Units;
use crate::localtime::local_day;
use crate::plan::{
    Excluded, Exclusion, Odds, Plan, PlanNote, RankedStretch, Reasons, Stopper, TripReason,
    UpwellingReason, WaveReason, WaveSource, WindReason,
};
use chrono::{DateTime, NaiveDate, Utc};
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

/// How long ago, in local days, something that ended at `ended` is on `date`: an end
/// at 23:00 is "yesterday" the next day.
fn days_ago(tz: Tz, ended: DateTime<Utc>, date: NaiveDate) -> String {
    // `ended` closes an interval: an end at midnight belongs to the day before.
    let end_day = local_day(tz, ended - chrono::Duration::seconds(1));
    match (date - end_day).num_days() {
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

/// Why a stretch is left out, in a line.
#[must_use]
pub fn exclusion_text(e: &Exclusion, tz: Tz, port_name: &str, units: Units) -> String {
    match e {
        Exclusion::Closed(c) => {
            let reason = if c.reason.is_empty() {
                "no reason given"
            } else {
                &c.reason
            };
            let dates = match (c.from, c.to) {
                (Some(f), Some(t)) => {
                    format!(" ({} to {})", f.format("%-d %b"), t.format("%-d %b %Y"))
                }
                (None, Some(t)) => format!(" (until {})", t.format("%-d %b %Y")),
                (Some(f), None) => format!(" (from {})", f.format("%-d %b %Y")),
                (None, None) => String::new(),
            };
            format!("closed to fishing: {reason}{dates}")
        }
        Exclusion::NearEquator { lat_deg } => format!(
            "too close to the equator for Ekman theory (under 5°; centre at {lat_deg:.1}°): no upwelling index"
        ),
        Exclusion::BeyondRange {
            distance_nm,
            range_nm,
        } => format!(
            "{} from {port_name}: beyond this boat's {} range",
            units.distance(*distance_nm),
            units.distance(*range_nm)
        ),
        Exclusion::NoForecast => "no forecast for this day's working hours".into(),
        Exclusion::NoRouteForecast => "no forecast for part of the way from port".into(),
        Exclusion::TooSteep { ratio, at, limit } => format!(
            "a short, steep sea ({ratio:.3} m/s² height over period squared, {}): over this boat's {limit:.3} limit all day",
            hhmm(tz, *at)
        ),
        Exclusion::NoSeaRoute => format!("no way by sea from {port_name} within this boat's range"),
        Exclusion::OverWaveLimit {
            max_wave_m,
            at,
            limit_m,
            source,
        } => format!(
            "{} up to {max_wave_m:.1} m ({}): over this boat's {limit_m:.1} m limit all day",
            if *source == WaveSource::Estimate {
                "estimated wind sea"
            } else {
                "waves"
            },
            hhmm(tz, *at)
        ),
        Exclusion::OverWindLimit {
            max_wind_kt,
            at,
            limit_kt,
        } => format!(
            "wind up to {} ({}): over this boat's {} limit all day",
            units.wind_vs(*max_wind_kt, *limit_kt),
            hhmm(tz, *at),
            units.wind(*limit_kt)
        ),
        Exclusion::WindowTooShort {
            window,
            limit_kt,
            steam_h,
            min_fishing_h,
        } => format!(
            "only {}–{} under this boat's {} limit: too short for {} steaming each way and {min_fishing_h:.0} h fishing",
            hhmm(tz, window.0),
            hhmm(tz, window.1),
            units.wind(*limit_kt),
            duration_text(steam_h * 60.0),
        ),
    }
}

fn upwelling_text(r: &Reasons, tz: Tz, date: NaiveDate) -> String {
    let productivity = format!("expected productivity {:.0} %", 100.0 * r.productivity);
    match r.upwelling {
        UpwellingReason::Flushing {
            age_days,
            peak_m3s_per_100m,
        } => format!(
            "strong upwelling for {} (peak {peak_m3s_per_100m:.0} m³/s per 100 m): production flushed offshore; {productivity}",
            days_text(age_days)
        ),
        UpwellingReason::Building { age_days } => format!(
            "upwelling for {} so far: bloom building; {productivity}",
            days_text(age_days)
        ),
        UpwellingReason::BloomExpected { length_days, ended } => format!(
            "upwelling for {} ended {}: bloom expected; {productivity}",
            days_text(length_days),
            days_ago(tz, ended, date)
        ),
        UpwellingReason::Lagged { length_days, ended } => format!(
            "upwelling for {} ended {}: bloom expected (it follows upwelling by days); {productivity}",
            days_text(length_days),
            days_ago(tz, ended, date)
        ),
        UpwellingReason::Downwelling { mean_m3s_per_100m } => format!(
            "downwelling ({mean_m3s_per_100m:.0} m³/s per 100 m): warm water held against the coast; {productivity}"
        ),
        UpwellingReason::Fading { window_days } => format!(
            "upwelling more than {} ago: bloom fading; {productivity}",
            days_text(window_days)
        ),
        UpwellingReason::NoEvent => format!(
            "no upwelling event in the forecast so far: little fresh production; {productivity}"
        ),
    }
}

/// What stops the boat at an hour, in words: "wind 28 kt at 13:00: over this boat's
/// 25 kt limit" or "waves 1.8 m at 14:00: over this boat's 1.2 m limit".
fn stopper_text(stopper: Stopper, at: DateTime<Utc>, tz: Tz, units: Units) -> String {
    match stopper {
        Stopper::NoForecast => format!("no forecast at {}", hhmm(tz, at)),
        Stopper::Wind { kt, limit_kt } => format!(
            "wind {} at {}: over this boat's {} limit",
            units.wind_vs(kt, limit_kt),
            hhmm(tz, at),
            units.wind(limit_kt)
        ),
        Stopper::Steep { ratio, limit } => format!(
            "a short, steep sea ({ratio:.3} m/s² height over period squared) at {}: over this boat's {limit:.3} limit",
            hhmm(tz, at)
        ),
        Stopper::Waves { m, limit_m } => format!(
            "waves {m:.1} m at {}: over this boat's {limit_m:.1} m limit",
            hhmm(tz, at)
        ),
    }
}

fn wind_text(w: &WindReason, tz: Tz, units: Units) -> String {
    match *w {
        WindReason::UnderAllDay {
            limit_kt,
            max_wind_kt,
        } => format!(
            "wind under this boat's {} limit all day (up to {})",
            units.wind(limit_kt),
            units.wind(max_wind_kt)
        ),
        WindReason::OverAfter { at, stopper, until } => format!(
            "{} after {}; back in by then",
            stopper_text(stopper, at, tz, units),
            hhmm(tz, until)
        ),
        WindReason::OverUntil { at, stopper, from } => format!(
            "{} until {}; go after that",
            stopper_text(stopper, at, tz, units),
            hhmm(tz, from)
        ),
    }
}

/// The sea state, in words; an estimate is always called one.
fn wave_text(w: &WaveReason) -> Option<String> {
    let limit = w
        .limit_m
        .map(|l| format!(" (this boat's limit {l:.1} m)"))
        .unwrap_or_default();
    match (w.source, w.max_m) {
        (WaveSource::Forecast, Some(m)) => Some(format!("waves up to {m:.1} m{limit}")),
        (WaveSource::Estimate, Some(m)) => Some(format!(
            "waves: an estimate of the local wind sea only, up to {m:.1} m{limit}; swell unknown"
        )),
        _ => w
            .limit_m
            .map(|l| format!("wave limit {l:.1} m not checked: nothing tells the waves here")),
    }
}

fn trip_text(t: &TripReason, port_name: &str, units: Units) -> String {
    let mut s = format!(
        "{} from {port_name}: {} each way, about {} of fuel",
        units.distance(t.distance_nm),
        duration_text(t.steam_minutes),
        units.fuel(t.fuel_l)
    );
    if t.straight_line {
        s.push_str(" (straight line: no way by sea was measured)");
    }
    s
}

/// The reasons of a rank, one line each: the upwelling, the wind, the trip, and for a
/// stretch between 5° and 10° from the equator, a caution.
#[must_use]
pub fn reason_lines(
    r: &Reasons,
    tz: Tz,
    date: NaiveDate,
    port_name: &str,
    units: Units,
) -> Vec<String> {
    let mut lines = vec![
        upwelling_text(r, tz, date),
        wind_text(&r.wind, tz, units),
        trip_text(&r.trip, port_name, units),
    ];
    if let Some(w) = wave_text(&r.waves) {
        lines.insert(2, w);
    }
    if let Some(o) = &r.odds {
        lines.insert(0, odds_text(o));
    }
    if let Some(lat) = r.near_equator_lat_deg {
        lines.push(format!(
            "{lat:.1}° from the equator: the index is large and unreliable this close to it (under 10°)"
        ));
    }
    lines
}

/// The odds of an ensemble in words: "upwelling in 7 of 10 runs; window in 9 of 10;
/// productivity 0.31–0.62 (10th–90th percentile)".
#[must_use]
pub fn odds_text(o: &Odds) -> String {
    format!(
        "Upwelling in {} of {} runs; window in {} of {}; productivity {:.2}–{:.2} (10th–90th percentile of runs)",
        o.upwelling, o.runs, o.window, o.runs, o.productivity_p10, o.productivity_p90
    )
}

/// The reasons of a ranked stretch of a plan's day.
#[must_use]
pub fn ranked_lines(plan: &Plan, date: NaiveDate, r: &RankedStretch, units: Units) -> Vec<String> {
    reason_lines(&r.reasons, plan.time_zone, date, &plan.port.name, units)
}

/// Why a stretch of a plan is left out.
#[must_use]
pub fn excluded_text(plan: &Plan, e: &Excluded, units: Units) -> String {
    exclusion_text(&e.exclusion, plan.time_zone, &plan.port.name, units)
}

/// A plan-wide note (`tz`: the plan's time zone, for local times).
#[must_use]
pub fn note_text(n: &PlanNote, port_name: &str, tz: Tz) -> String {
    match n {
        PlanNote::Issued {
            issued,
            made,
            covers_today,
        } => issued_text(*issued, *made, *covers_today, tz),
        PlanNote::SeaRoutes { clearance_nm } => format!(
            "Distances are by sea from {port_name}, keeping {clearance_nm} nm from the land outline (a coarse outline, not a chart: check your chart); a stretch with no way by sea is left out."
        ),
        PlanNote::WaveSources {
            forecast,
            estimate,
            none,
            limit_m,
        } => {
            let limit = limit_m.map_or_else(
                || "This boat has no wave limit set: waves are shown, not checked".to_string(),
                |l| format!("Wave limit {l:.1} m"),
            );
            let count = |n: usize| {
                if n == 1 {
                    "1 stretch".to_string()
                } else {
                    format!("{n} stretches")
                }
            };
            let parts: Vec<String> = [
                (*forecast, "from a wave forecast"),
                (
                    *estimate,
                    "only an estimate of the local wind sea (no swell)",
                ),
                (*none, "nothing tells the waves"),
            ]
            .iter()
            .filter(|(k, _)| *k > 0)
            .map(|(k, what)| format!("{}: {what}", count(*k)))
            .collect();
            if parts.is_empty() {
                format!("{limit}. Check the sea state yourself.")
            } else {
                format!(
                    "{limit}. Waves at {}. Check the sea state yourself.",
                    parts.join("; ")
                )
            }
        }
        PlanNote::NearEquator => "Some stretches lie between 5° and 10° from the equator, where the upwelling index is large and unreliable.".into(),
        PlanNote::SingleForecast => "Single forecast: one run of one model, so no odds are given. An ensemble forecast shows how many runs agree.".into(),
        PlanNote::Ensemble { runs } => format!(
            "Ensemble of {runs} runs: each stretch's score is the runs' mean (a run without a safe window scores 0); the odds count the runs with upwelling and with a window."
        ),
    }
}

/// A day with nothing ranked, and why: how many stretches each reason left out, the
/// day's weather first and what holds every day (closures, range) last: "No stretch to
/// recommend this day: waves over this boat's limit at 4 stretches, closed to fishing
/// at 4, beyond this boat's range at 20."
#[must_use]
pub fn no_stretch_text(day: &crate::plan::DayPlan) -> String {
    const ORDER: [(&str, &str); 8] = [
        ("over_wave_limit", "waves over this boat's limit"),
        ("over_wind_limit", "wind over this boat's limit"),
        ("window_too_short", "safe window too short"),
        ("no_forecast", "no forecast for the day"),
        ("closed", "closed to fishing"),
        ("no_sea_route", "no way by sea"),
        ("beyond_range", "beyond this boat's range"),
        ("near_equator", "too near the equator"),
    ];
    let parts: Vec<String> = ORDER
        .iter()
        .filter_map(|(kind, words)| {
            let n = day
                .excluded
                .iter()
                .filter(|e| e.exclusion.kind() == *kind)
                .count();
            (n > 0).then_some((words, n))
        })
        .enumerate()
        .map(|(k, (words, n))| match (k, n) {
            (0, 1) => format!("{words} at 1 stretch"),
            (0, _) => format!("{words} at {n} stretches"),
            _ => format!("{words} at {n}"),
        })
        .collect();
    if parts.is_empty() {
        return "No stretch to recommend this day.".into();
    }
    format!("No stretch to recommend this day: {}.", parts.join(", "))
}

/// The plan's notes, as lines.
#[must_use]
pub fn notes(plan: &Plan) -> Vec<String> {
    plan.notes
        .iter()
        .map(|n| note_text(n, &plan.port.name, plan.time_zone))
        .collect()
}

/// When the forecast was issued, how long before the plan, and whether it reaches today.
fn issued_text(issued: DateTime<Utc>, made: DateTime<Utc>, covers_today: bool, tz: Tz) -> String {
    let when = |t: DateTime<Utc>| {
        format!(
            "{} local ({} UTC)",
            t.with_timezone(&tz).format("%a %-d %b %Y %H:%M"),
            t.format("%H:%M")
        )
    };
    let hours = (made - issued).num_minutes().div_euclid(60);
    let age = if issued > made {
        format!(
            ", later than this computer's clock ({}): check the clock or the file",
            when(made)
        )
    } else if hours < crate::plan::OLD_FORECAST_HOURS {
        format!(", {hours} h before this plan was made")
    } else {
        format!(
            ", {} days before this plan was made: look for a newer forecast",
            hours / 24
        )
    };
    let today = if covers_today {
        ""
    } else {
        " It does not cover today."
    };
    format!("Forecast issued {}{age}.{today}", when(issued))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The issue time in local time and UTC (Los Angeles keeps UTC−7 in May), the
    /// forecast's age in whole hours, then days past two days, and a clock behind the
    /// forecast named as such.
    #[test]
    fn the_issue_note_tells_the_forecasts_age() {
        let tz: Tz = "America/Los_Angeles".parse().expect("zone");
        let issued = DateTime::parse_from_rfc3339("2027-05-10T07:00:00Z")
            .expect("time")
            .to_utc();
        let text = |minutes: i64, covers_today| {
            issued_text(
                issued,
                issued + chrono::Duration::minutes(minutes),
                covers_today,
                tz,
            )
        };
        assert_eq!(
            text(330, true),
            "Forecast issued Mon 10 May 2027 00:00 local (07:00 UTC), 5 h before this plan was made."
        );
        assert_eq!(
            text(3 * 24 * 60 + 10, false),
            "Forecast issued Mon 10 May 2027 00:00 local (07:00 UTC), 3 days before this plan was made: look for a newer forecast. It does not cover today."
        );
        assert_eq!(
            text(-90, true),
            "Forecast issued Mon 10 May 2027 00:00 local (07:00 UTC), later than this computer's clock (Sun 9 May 2027 22:30 local (05:30 UTC)): check the clock or the file."
        );
    }

    /// The wave note names only the sources that were used.
    #[test]
    fn the_wave_note_leaves_out_empty_counts() {
        let note = |forecast, estimate, none| {
            note_text(
                &PlanNote::WaveSources {
                    forecast,
                    estimate,
                    none,
                    limit_m: Some(1.2),
                },
                "Home",
                chrono_tz::UTC,
            )
        };
        assert_eq!(
            note(28, 0, 0),
            "Wave limit 1.2 m. Waves at 28 stretches: from a wave forecast. Check the sea state yourself."
        );
        assert_eq!(
            note(0, 1, 2),
            "Wave limit 1.2 m. Waves at 1 stretch: only an estimate of the local wind sea (no swell); 2 stretches: nothing tells the waves. Check the sea state yourself."
        );
    }

    #[test]
    fn durations_read_like_a_skipper_says_them() {
        assert_eq!(duration_text(210.0), "3 h 30 min");
        assert_eq!(duration_text(45.2), "45 min");
        assert_eq!(duration_text(120.0), "2 h");
        assert_eq!(duration_text(62.0), "1 h 02 min");
    }

    /// Issue 19: an event that ended at 23:00 local is "yesterday" on the next day,
    /// not "today".
    #[test]
    fn an_event_ending_late_ended_yesterday() {
        let tz: Tz = "Europe/Lisbon".parse().expect("zone");
        // 23:00 WEST on 3 May 2027 is 22:00 UTC.
        let ended: DateTime<Utc> = "2027-05-03T22:00:00Z".parse().expect("time");
        let date: NaiveDate = "2027-05-04".parse().expect("date");
        assert_eq!(days_ago(tz, ended, date), "yesterday");
        assert_eq!(
            days_ago(tz, ended, "2027-05-03".parse().expect("date")),
            "today"
        );
    }
}
