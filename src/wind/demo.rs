//! The synthetic wind of the demo scenario: the past week and a seven-day forecast.
//!
//! Invented weather that tells a story a skipper would recognise. The past week (hourly
//! analyses, 3–9 May 2027): a moderate north-westerly upwelling event of about three
//! days, then light winds, so a bloom is due when the forecast starts. The forecast,
//! issued at local midnight (UTC−7) on 10 May 2027, hourly for seven days: a light
//! southerly; the wind veering north-west and building (upwelling starts again); a strong
//! north-westerly blow on days 4 and 5 too rough for the small boat; a relaxation with
//! light winds; and a turn to the south ahead of a front on day 7. The wind is a little
//! stronger offshore and to the north, so the field has curl, and it freshens in the
//! afternoons.

use super::{GridField, Parameter, encode_message, encode_wind_message};
use crate::physics::{Wind, knots_to_m_s};
use chrono::{DateTime, TimeZone, Utc};

/// First valid time of the demo forecast: local midnight (UTC−7) starting 10 May 2027.
#[must_use]
pub fn demo_reference_time() -> DateTime<Utc> {
    Utc.with_ymd_and_hms(2027, 5, 10, 7, 0, 0)
        .single()
        .unwrap_or_default()
}

/// Number of hourly forecast steps after the reference time (7 days).
pub const DEMO_HOURS: u32 = 168;
/// Hours of past analyses before the reference time (7 days).
pub const DEMO_PAST_HOURS: u32 = 168;
/// Northern edge of the demo grid, degrees north.
pub const DEMO_LAT_NORTH_DEG: f64 = 40.75;
/// Western edge of the demo grid, degrees east.
pub const DEMO_LON_WEST_DEG: f64 = -125.5;
/// Spacing of the demo grid, degrees.
pub const DEMO_STEP_DEG: f64 = 0.25;
/// Columns of the demo grid.
pub const DEMO_NI: usize = 13;
/// Rows of the demo grid.
pub const DEMO_NJ: usize = 14;

/// The story: (hour from the forecast's reference time, speed in knots, direction the
/// wind blows from).
const KEYFRAMES: &[(f64, f64, f64)] = &[
    (-168.0, 7.0, 200.0),
    (-156.0, 10.0, 300.0),
    (-144.0, 15.0, 320.0),
    (-100.0, 16.0, 320.0),
    (-86.0, 12.0, 320.0),
    (-74.0, 7.0, 310.0),
    (-60.0, 5.0, 280.0),
    (-24.0, 5.0, 230.0),
    (-6.0, 6.0, 190.0),
    (0.0, 7.0, 180.0),
    (18.0, 8.0, 200.0),
    (30.0, 14.0, 320.0),
    (42.0, 19.0, 325.0),
    (60.0, 21.0, 325.0),
    (72.0, 31.0, 330.0),
    (84.0, 33.0, 330.0),
    (96.0, 20.0, 325.0),
    (106.0, 10.0, 320.0),
    (116.0, 5.0, 310.0),
    (130.0, 5.0, 270.0),
    (140.0, 12.0, 190.0),
    (150.0, 16.0, 180.0),
    (168.0, 16.0, 175.0),
];

/// The demo wind at a place and hour (hours after [`demo_reference_time`]).
#[must_use]
pub fn demo_wind(lat_deg: f64, lon_deg: f64, hour: f64) -> Wind {
    let k = KEYFRAMES
        .windows(2)
        .position(|w| hour <= w[1].0)
        .unwrap_or(KEYFRAMES.len() - 2);
    let (a, b) = (KEYFRAMES[k], KEYFRAMES[k + 1]);
    let t = ((hour - a.0) / (b.0 - a.0)).clamp(0.0, 1.0);
    let speed_kt = a.1 + (b.1 - a.1) * t;
    let turn = ((b.2 - a.2 + 540.0) % 360.0) - 180.0;
    let from_deg = a.2 + turn * t;
    // Afternoon freshening, strongest around 15:00 local time.
    let diurnal = 1.0 + 0.15 * (std::f64::consts::TAU * (hour - 9.0) / 24.0).sin();
    // Stronger offshore (west) and to the north: curl in the field, as near real capes.
    let offshore = 1.0 + 0.12 * (-123.5 - lon_deg).clamp(-1.0, 2.0);
    let north = 1.0 + 0.04 * (lat_deg - 39.0);
    Wind::from_speed_direction(
        knots_to_m_s(speed_kt) * diurnal * offshore * north,
        from_deg,
    )
}

/// The demo wind over the demo grid at `hour`: u and v, m/s, row by row from the north
/// and west.
#[must_use]
pub fn demo_wind_field(hour: f64) -> (Vec<f64>, Vec<f64>) {
    let mut u = Vec::with_capacity(DEMO_NI * DEMO_NJ);
    let mut v = Vec::with_capacity(DEMO_NI * DEMO_NJ);
    for j in 0..DEMO_NJ {
        for i in 0..DEMO_NI {
            let lat = DEMO_LAT_NORTH_DEG - DEMO_STEP_DEG * j as f64;
            let lon = DEMO_LON_WEST_DEG + DEMO_STEP_DEG * i as f64;
            let w = demo_wind(lat, lon, hour);
            u.push(w.u_m_s);
            v.push(w.v_m_s);
        }
    }
    (u, v)
}

/// The demo wind as a GRIB2 file of 10 m u and v on a 0.25° grid around the demo coast:
/// hourly analyses of the past week (each its own reference time, step 0), then the
/// forecast issued at [`demo_reference_time`], hourly for seven days.
#[must_use]
pub fn demo_forecast_grib2() -> Vec<u8> {
    let issued = demo_reference_time();
    let mut out = Vec::new();
    let past = -i64::from(DEMO_PAST_HOURS)..0;
    let hours = past
        .map(|h| (h, issued + chrono::Duration::hours(h), 0))
        .chain((0..=DEMO_HOURS).map(|step| (i64::from(step), issued, step)));
    for (hour, reference, step) in hours {
        let (u, v) = demo_wind_field(hour as f64);
        for (parameter, values) in [(2, &u), (3, &v)] {
            out.extend(encode_wind_message(&GridField {
                lat_north_deg: DEMO_LAT_NORTH_DEG,
                lon_west_deg: DEMO_LON_WEST_DEG,
                step_deg: DEMO_STEP_DEG,
                ni: DEMO_NI,
                nj: DEMO_NJ,
                parameter,
                reference,
                step_hours: step,
                values,
            }));
        }
    }
    out
}

/// The demo's significant wave height, m, at a place and hour (hours after
/// [`demo_reference_time`], local midnight starting Monday 10 May): a low sea of
/// 0.6–0.9 m, a passing swell on Tuesday (1.8 m at noon, over 1.2 m from about 05:00 to
/// 19:00 local) while the wind is light, and the sea of Thursday's blow (about 3.4 m at
/// noon). Invented, like the rest of the demo.
#[must_use]
pub fn demo_wave_height_m(lat_deg: f64, _lon_deg: f64, hour: f64) -> f64 {
    let bump = |centre_h: f64, width_h: f64, height_m: f64| {
        height_m * (-((hour - centre_h) / width_h).powi(2)).exp()
    };
    0.6 + 0.1 * (lat_deg - 38.0).clamp(0.0, 3.0) + bump(36.0, 8.0, 1.2) + bump(84.0, 12.0, 2.8)
}

/// The demo's wave forecast as GRIB2 (significant height of combined wind waves and
/// swell, discipline 10, category 0, number 3) on the wind's grid, issued with it,
/// hourly for seven days.
#[must_use]
pub fn demo_waves_grib2() -> Vec<u8> {
    let issued = demo_reference_time();
    let mut out = Vec::new();
    for step in 0..=DEMO_HOURS {
        let mut values = Vec::with_capacity(DEMO_NI * DEMO_NJ);
        for j in 0..DEMO_NJ {
            for i in 0..DEMO_NI {
                let lat = DEMO_LAT_NORTH_DEG - DEMO_STEP_DEG * j as f64;
                let lon = DEMO_LON_WEST_DEG + DEMO_STEP_DEG * i as f64;
                values.push(demo_wave_height_m(lat, lon, f64::from(step)));
            }
        }
        out.extend(encode_message(
            &GridField {
                lat_north_deg: DEMO_LAT_NORTH_DEG,
                lon_west_deg: DEMO_LON_WEST_DEG,
                step_deg: DEMO_STEP_DEG,
                ni: DEMO_NI,
                nj: DEMO_NJ,
                parameter: 3,
                reference: issued,
                step_hours: step,
                values: &values,
            },
            Parameter::WaveHeight,
        ));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::physics::m_s_to_knots;

    #[test]
    fn the_story_has_a_past_event_a_blow_a_relaxation_and_a_turn() {
        let at = |h: f64| demo_wind(39.0, -123.8, h);
        let kt = |h: f64| m_s_to_knots(at(h).speed_m_s());
        let from = |h: f64| at(h).direction_from_deg().expect("wind");
        assert!(
            kt(-120.0) > 13.0 && (300.0..340.0).contains(&from(-120.0)),
            "an event last week"
        );
        assert!(kt(-40.0) < 7.0, "then light winds");
        assert!(
            from(6.0) > 170.0 && from(6.0) < 210.0,
            "the forecast starts southerly"
        );
        assert!(kt(84.0) > 30.0, "a blow on day 4: {}", kt(84.0));
        assert!(kt(120.0) < 8.0, "relaxation on day 6: {}", kt(120.0));
        assert!(
            (300.0..340.0).contains(&from(50.0)),
            "north-westerly on day 3"
        );
        assert!(
            from(160.0) < 200.0 && from(160.0) > 160.0,
            "southerly again on day 7"
        );
    }
}
