//! The demo's record of the past: an invented spring of wind on the demo coast (120
//! days, hourly, one series for the whole coast), the sea temperature of two invented
//! buoys, and an invented catch log. All synthetic, nothing measured:
//! - the north buoy's sea cools clearly two days after each northerly blow; the south
//!   buoy's sea answers weakly, three days after, with more noise and a gap of ten days;
//! - the catch per hour at each segment follows the blows of 6 to 10 days before, with
//!   noise: a log with some signal to calibrate on (not the tool's own model).

use crate::synthetic::Lcg;
use chrono::{DateTime, Duration, TimeZone, Utc};
use std::fmt::Write as _;

/// File name of the demo's spring wind record.
pub const DEMO_RECORD_WIND_FILE: &str = "north-reach-spring-wind.csv";
/// File names of the demo's two buoys, north first.
pub const DEMO_BUOY_FILES: [&str; 2] = ["north-reach-buoy-north.csv", "north-reach-buoy-south.csv"];

/// File name of the demo's catch log.
pub const DEMO_CATCH_LOG_FILE: &str = "north-reach-catch-log.csv";

/// Days in the record.
const DAYS: usize = 120;

/// The record's first midnight, UTC.
fn start() -> DateTime<Utc> {
    Utc.with_ymd_and_hms(2027, 3, 1, 0, 0, 0)
        .single()
        .unwrap_or_default()
}

/// `d` days, as a duration.
fn day(d: usize) -> Duration {
    Duration::days(i64::try_from(d).unwrap_or(0))
}

/// Each day's wind: speed (m/s) and the direction it blows from (degrees true). Calm
/// spells of 2–5 days from the south-west alternate with northerly blows of 1–4 days.
fn daily_wind() -> Vec<(f64, f64)> {
    let mut rng = Lcg(38);
    let mut out = Vec::with_capacity(DAYS);
    let mut blowing = false;
    while out.len() < DAYS {
        let (len, speed, from) = if blowing {
            (
                1.0 + 4.0 * rng.next_unit(),
                8.0 + 5.0 * rng.next_unit(),
                330.0,
            )
        } else {
            (
                2.0 + 4.0 * rng.next_unit(),
                2.0 + 2.5 * rng.next_unit(),
                220.0,
            )
        };
        for _ in 0..(len as usize) {
            out.push((speed * (0.9 + 0.2 * rng.next_unit()), from));
        }
        blowing = !blowing;
    }
    out.truncate(DAYS);
    out
}

/// The spring wind record as CSV (`time,u_ms,v_ms`, no position: the whole coast).
#[must_use]
pub fn demo_record_wind_csv() -> String {
    let mut text = String::from(
        "# Invented spring wind for the Shelfwind demo (synthetic, not measured)\ntime,u_ms,v_ms\n",
    );
    for (d, (speed, from)) in daily_wind().into_iter().enumerate() {
        for h in 0..24 {
            // Stronger in the afternoon, as sea breezes add to the wind.
            let hour = f64::from(h);
            let s = speed * (1.0 + 0.15 * ((hour - 9.0) / 24.0 * std::f64::consts::TAU).sin());
            let t = start() + day(d) + Duration::hours(i64::from(h));
            let (u, v) = (-s * from.to_radians().sin(), -s * from.to_radians().cos());
            let _ = writeln!(text, "{},{u:.2},{v:.2}", t.format("%Y-%m-%dT%H:%MZ"));
        }
    }
    text
}

/// A buoy's record as CSV (`time,lat,lon,sst_c`), twice a day; `north` picks the buoy.
#[must_use]
pub fn demo_buoy_csv(north: bool) -> String {
    let winds = daily_wind();
    // Equatorward push of each day: the square of the northerly component, m²/s².
    let push: Vec<f64> = winds
        .iter()
        .map(|(s, from)| (s * from.to_radians().cos()).max(0.0).powi(2))
        .collect();
    let (lat, lon, lag, gain, noise, seed) = if north {
        (39.75, -123.95, 2, 0.022, 0.3, 1)
    } else {
        (38.60, -123.45, 3, 0.004, 1.6, 2)
    };
    let mut rng = Lcg(seed);
    let mut text = String::from(
        "# Invented buoy for the Shelfwind demo (synthetic, not measured)\ntime,lat,lon,sst_c\n",
    );
    for d in 0..DAYS {
        let drive = |k: usize| d.checked_sub(k).map_or(0.0, |i| push[i]);
        let cooled = gain * (drive(lag) + 0.5 * drive(lag + 1));
        for h in [6, 18] {
            let t = start() + day(d) + Duration::hours(h);
            let gap = !north && (60..70).contains(&d);
            let value = 12.0 + 0.025 * d as f64 - cooled + noise * (rng.next_unit() - 0.5);
            if gap {
                let _ = writeln!(text, "{},{lat},{lon},", t.format("%Y-%m-%dT%H:%MZ"));
            } else {
                let _ = writeln!(
                    text,
                    "{},{lat},{lon},{value:.2}",
                    t.format("%Y-%m-%dT%H:%MZ")
                );
            }
        }
    }
    text
}

/// The catch log as CSV (`date,segment_id,catch_kg,effort_h,species`): every third day
/// from 15 March at each of `segments`, catch per hour rising with the northerly blows
/// of 6 to 10 days before, times log-normal noise.
#[must_use]
pub fn demo_catch_log_csv(segments: &[&str]) -> String {
    let winds = daily_wind();
    let push: Vec<f64> = winds
        .iter()
        .map(|(s, from)| (s * from.to_radians().cos()).max(0.0).powi(2))
        .collect();
    let mut noise = Lcg(4);
    let mut text = String::from(
        "# Invented landings for the Shelfwind demo (synthetic, not a real fleet's)\ndate,segment_id,catch_kg,effort_h,species\n",
    );
    for d in (14..DAYS).step_by(3) {
        let drive = (6..=10).map(|k| push[d - k]).sum::<f64>() / 5.0 / 100.0;
        for id in segments {
            let hours = 4.0 + (noise.next_unit() * 5.0).floor();
            let per_hour = 12.0 * (0.3 + drive.min(1.5)) * (0.2 * noise.normal()).exp();
            let date = (start() + day(d)).date_naive();
            let _ = writeln!(text, "{date},{id},{:.1},{hours},rockfish", per_hour * hours);
        }
    }
    text
}
