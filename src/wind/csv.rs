//! CSV point series: a station, a buoy or a point forecast.
//!
//! Optional `#` comment lines, then a header. Accepted header names (case does not
//! matter; the README lists them too):
//! - time: `time`, `time_utc`, `datetime`, `timestamp` — RFC 3339 / ISO 8601 with `Z` or
//!   an offset (`2027-05-01T06:00:00Z`, `2027-05-01T08:00+02:00`, `2027-05-01 06:00Z`);
//! - components in m/s: `u_ms` / `u_m_s` and `v_ms` / `v_m_s`;
//! - or a speed with its unit in the name: `speed_ms` / `speed_m_s` / `wind_speed_ms`,
//!   `speed_kt` / `speed_kn` / `speed_knots`, `speed_kmh` / `speed_km_h`, with the
//!   direction the wind blows from: `direction_from_deg` / `dir_from_deg` /
//!   `wind_from_deg`;
//! - optional station position: `lat` / `latitude` and `lon` / `longitude`;
//! - optional sea state: significant wave height in metres `wave_height_m` / `hs_m` /
//!   `wvht_m`, and with it, optionally, a wave period in seconds `wave_period_s` /
//!   `tp_s` / `dpd_s`. An empty wave cell is a missing value: the row keeps its wind and
//!   its entry in [`PointSeries::waves`] is `None` (a period without a height is
//!   dropped). Heights must lie in 0–30 m and periods in 0–40 s (more is taken for a
//!   missing-value code such as 99, and refused).
//!
//! A file with wave columns and no wind column at all is a wave-only series: its
//! `series.times` holds the rows' times and `series.wind` is empty. A file with some but
//! not all of the wind columns is refused as before.

use super::{PointSeries, Wave, WindFileError, WindSeries};
use crate::coast::LatLon;
use crate::physics::{Wind, km_h_to_m_s, knots_to_m_s};
use chrono::{DateTime, NaiveDateTime, Utc};

const TIME: &[&str] = &["time", "time_utc", "datetime", "timestamp"];
const U: &[&str] = &["u_ms", "u_m_s"];
const V: &[&str] = &["v_ms", "v_m_s"];
const SPEED_MS: &[&str] = &["speed_ms", "speed_m_s", "wind_speed_ms"];
const SPEED_KT: &[&str] = &["speed_kt", "speed_kn", "speed_knots"];
const SPEED_KMH: &[&str] = &["speed_kmh", "speed_km_h"];
/// When a file has speeds in several units, the first unit here is the one read.
const SPEED_UNITS: [SpeedUnit; 3] = [
    SpeedUnit {
        names: SPEED_MS,
        to_m_s: |speed_m_s| speed_m_s,
        symbol: "m/s",
    },
    SpeedUnit {
        names: SPEED_KT,
        to_m_s: knots_to_m_s,
        symbol: "kt",
    },
    SpeedUnit {
        names: SPEED_KMH,
        to_m_s: km_h_to_m_s,
        symbol: "km/h",
    },
];
const DIRECTION: &[&str] = &["direction_from_deg", "dir_from_deg", "wind_from_deg"];
const LAT: &[&str] = &["lat", "latitude"];
const WAVE_HEIGHT: &[&str] = &["wave_height_m", "hs_m", "wvht_m"];
const WAVE_PERIOD: &[&str] = &["wave_period_s", "tp_s", "dpd_s"];
/// Largest significant wave height accepted, m: above any measured sea state (the
/// largest buoy records are near 20 m), so a larger number is a missing-value code.
const MAX_WAVE_HEIGHT_M: f64 = 30.0;
/// Largest wave period accepted, s: above the longest ocean swell periods (near 25 s).
const MAX_WAVE_PERIOD_S: f64 = 40.0;
const LON: &[&str] = &["lon", "longitude"];

/// How the wind is given in a file.
enum WindColumns {
    Components { u: usize, v: usize },
    SpeedDirection(SpeedColumns),
}

/// A unit a speed column can be given in.
struct SpeedUnit {
    /// Accepted column names.
    names: &'static [&'static str],
    to_m_s: fn(f64) -> f64,
    /// The unit as error messages write it.
    symbol: &'static str,
}

/// A speed column with its unit, and the column of the direction the wind blows from.
struct SpeedColumns {
    speed: usize,
    unit: &'static SpeedUnit,
    direction: usize,
}

/// The wave height column and the optional wave period column.
struct WaveColumns {
    height: usize,
    period: Option<usize>,
}

/// The columns named by the header, and the header's own line for errors about them.
struct Header {
    line: u64,
    names: Vec<String>,
    time: usize,
    /// `None` in a wave-only file.
    wind: Option<WindColumns>,
    waves: Option<WaveColumns>,
    position: Option<(usize, usize)>,
}

/// One data row.
struct Row {
    time: DateTime<Utc>,
    /// `None` in a wave-only file.
    wind: Option<Wind>,
    /// `None` where the wave height cell is empty or the file has no wave columns.
    wave: Option<Wave>,
    line: u64,
}

fn err(line: u64, problem: impl Into<String>) -> WindFileError {
    WindFileError::Csv {
        line,
        problem: problem.into(),
    }
}

/// Parses a time with a UTC offset; times without an offset are refused, since guessing
/// the zone could shift a whole forecast by hours.
pub(crate) fn parse_time(s: &str) -> Result<DateTime<Utc>, String> {
    let t = s.trim();
    let mut candidates = vec![t.to_string()];
    if t.len() > 10 && t.as_bytes()[10] == b' ' {
        candidates.push(format!("{}T{}", &t[..10], &t[11..]));
    }
    for c in &candidates {
        if let Ok(d) = DateTime::parse_from_rfc3339(c) {
            return Ok(d.with_timezone(&Utc));
        }
        let c = c
            .strip_suffix('Z')
            .or_else(|| c.strip_suffix('z'))
            .map_or_else(|| c.clone(), |s| format!("{s}+00:00"));
        for fmt in [
            "%Y-%m-%dT%H:%M%:z",
            "%Y-%m-%dT%H:%M:%S%:z",
            "%Y-%m-%dT%H:%M:%S%.f%:z",
        ] {
            if let Ok(d) = DateTime::parse_from_str(&c, fmt) {
                return Ok(d.with_timezone(&Utc));
            }
        }
    }
    let naive = candidates.iter().any(|c| {
        ["%Y-%m-%dT%H:%M:%S", "%Y-%m-%dT%H:%M"]
            .iter()
            .any(|f| NaiveDateTime::parse_from_str(c, f).is_ok())
    });
    if naive {
        Err(format!(
            "time {t:?} has no UTC offset: add Z for UTC or an offset such as +02:00"
        ))
    } else {
        Err(format!(
            "time {t:?} is not an RFC 3339 / ISO 8601 time: expected e.g. 2027-05-01T06:00:00Z"
        ))
    }
}

/// The column of a header (names lower-cased) with one of `names`.
pub(crate) fn find(headers: &[String], names: &[&str]) -> Option<usize> {
    headers.iter().position(|h| names.contains(&h.as_str()))
}

fn number(
    record: &csv::StringRecord,
    col: usize,
    name: &str,
    line: u64,
) -> Result<f64, WindFileError> {
    let raw = record.get(col).unwrap_or("").trim();
    let x: f64 = raw.parse().map_err(|_| {
        err(
            line,
            format!("column {name}: expected a number, found {raw:?}"),
        )
    })?;
    if x.is_finite() {
        Ok(x)
    } else {
        Err(err(
            line,
            format!("column {name}: expected a finite number, found {raw:?}"),
        ))
    }
}

/// The speed column of a header, with its unit.
fn speed_column(names: &[String]) -> Option<(usize, &'static SpeedUnit)> {
    SPEED_UNITS
        .iter()
        .find_map(|unit| find(names, unit.names).map(|c| (c, unit)))
}

/// The wind columns of a header: u and v, else a speed with a direction.
fn wind_columns(names: &[String]) -> Option<WindColumns> {
    if let (Some(u), Some(v)) = (find(names, U), find(names, V)) {
        return Some(WindColumns::Components { u, v });
    }
    let (speed, unit) = speed_column(names)?;
    let direction = find(names, DIRECTION)?;
    Some(WindColumns::SpeedDirection(SpeedColumns {
        speed,
        unit,
        direction,
    }))
}

/// The station position columns, which come as a pair or not at all.
fn position_columns(names: &[String], line: u64) -> Result<Option<(usize, usize)>, WindFileError> {
    match (find(names, LAT), find(names, LON)) {
        (Some(lat), Some(lon)) => Ok(Some((lat, lon))),
        (None, None) => Ok(None),
        _ => Err(err(
            line,
            "a station position needs both lat and lon columns",
        )),
    }
}

/// The wave columns of a header: a height with an optional period, or none.
fn wave_columns(names: &[String], line: u64) -> Result<Option<WaveColumns>, WindFileError> {
    match (find(names, WAVE_HEIGHT), find(names, WAVE_PERIOD)) {
        (Some(height), period) => Ok(Some(WaveColumns { height, period })),
        (None, None) => Ok(None),
        (None, Some(_)) => Err(err(
            line,
            format!(
                "a wave period column needs a wave height column: expected one of {}",
                WAVE_HEIGHT.join(", ")
            ),
        )),
    }
}

/// Whether any column names a part of the wind (a component, speed or direction).
fn any_wind_column(names: &[String]) -> bool {
    [U, V, SPEED_MS, SPEED_KT, SPEED_KMH, DIRECTION]
        .iter()
        .any(|group| find(names, group).is_some())
}

impl Header {
    /// Finds the time, wind, wave and position columns of the header record.
    fn parse(record: &csv::StringRecord) -> Result<Self, WindFileError> {
        let line = record.position().map_or(1, csv::Position::line);
        let names: Vec<String> = record.iter().map(str::to_ascii_lowercase).collect();
        let time = find(&names, TIME).ok_or_else(|| {
            err(
                line,
                format!(
                    "no time column: expected one of {} in the header",
                    TIME.join(", ")
                ),
            )
        })?;
        let waves = wave_columns(&names, line)?;
        let wind = wind_columns(&names);
        if wind.is_none() && (waves.is_none() || any_wind_column(&names)) {
            return Err(err(
                line,
                "no wind columns: expected u_ms and v_ms, or a speed (speed_ms, speed_kt or speed_kmh) with direction_from_deg",
            ));
        }
        let position = position_columns(&names, line)?;
        Ok(Self {
            line,
            names,
            time,
            wind,
            waves,
            position,
        })
    }

    /// The number in column `col` of a row, named by its header in errors.
    fn number(
        &self,
        record: &csv::StringRecord,
        col: usize,
        line: u64,
    ) -> Result<f64, WindFileError> {
        number(record, col, &self.names[col], line)
    }

    /// The wind of one row; `None` in a wave-only file.
    fn wind(&self, record: &csv::StringRecord, line: u64) -> Result<Option<Wind>, WindFileError> {
        match &self.wind {
            None => Ok(None),
            Some(WindColumns::Components { u, v }) => Ok(Some(Wind::new(
                self.number(record, *u, line)?,
                self.number(record, *v, line)?,
            ))),
            Some(WindColumns::SpeedDirection(columns)) => {
                self.speed_direction(record, columns, line).map(Some)
            }
        }
    }

    /// The number in wave column `col` of a row, `None` for an empty cell; refused
    /// below 0 (or at 0 unless `zero_ok`) and above `max`; `what` and `unit` name it in
    /// errors.
    fn wave_number(
        &self,
        record: &csv::StringRecord,
        col: usize,
        line: u64,
        (what, unit, zero_ok, max): (&str, &str, bool, f64),
    ) -> Result<Option<f64>, WindFileError> {
        if record.get(col).unwrap_or("").trim().is_empty() {
            return Ok(None);
        }
        let x = self.number(record, col, line)?;
        if x > max || x < 0.0 || (x == 0.0 && !zero_ok) {
            let low = if zero_ok { "0" } else { "more than 0" };
            return Err(err(
                line,
                format!(
                    "column {}: {what} {x} {unit} is out of range: expected {low} to {max} {unit} (leave the cell empty for a missing value)",
                    self.names[col]
                ),
            ));
        }
        Ok(Some(x))
    }

    /// The sea state of one row; `None` without wave columns or with an empty height.
    fn wave(&self, record: &csv::StringRecord, line: u64) -> Result<Option<Wave>, WindFileError> {
        let Some(columns) = &self.waves else {
            return Ok(None);
        };
        let height_m = self.wave_number(
            record,
            columns.height,
            line,
            ("wave height", "m", true, MAX_WAVE_HEIGHT_M),
        )?;
        let period_s = match columns.period {
            Some(col) => self.wave_number(
                record,
                col,
                line,
                ("wave period", "s", false, MAX_WAVE_PERIOD_S),
            )?,
            None => None,
        };
        Ok(height_m.map(|height_m| Wave { height_m, period_s }))
    }

    /// The wind of one row given as a speed and the direction it blows from.
    fn speed_direction(
        &self,
        record: &csv::StringRecord,
        columns: &SpeedColumns,
        line: u64,
    ) -> Result<Wind, WindFileError> {
        let speed = self.number(record, columns.speed, line)?;
        if speed < 0.0 {
            return Err(err(
                line,
                format!(
                    "column {}: speed {speed} {} is negative",
                    self.names[columns.speed], columns.unit.symbol
                ),
            ));
        }
        let direction_from_deg = self.number(record, columns.direction, line)?;
        if !(0.0..=360.0).contains(&direction_from_deg) {
            return Err(err(
                line,
                format!(
                    "column {}: direction {direction_from_deg} is out of range: expected 0 to 360 degrees",
                    self.names[columns.direction]
                ),
            ));
        }
        Ok(Wind::from_speed_direction(
            (columns.unit.to_m_s)(speed),
            direction_from_deg,
        ))
    }

    /// The station position of one row, when the file has position columns.
    fn station(
        &self,
        record: &csv::StringRecord,
        line: u64,
    ) -> Result<Option<LatLon>, WindFileError> {
        let Some((lat_col, lon_col)) = self.position else {
            return Ok(None);
        };
        let lat_deg = number(record, lat_col, "lat", line)?;
        let lon_deg = number(record, lon_col, "lon", line)?;
        if !(-90.0..=90.0).contains(&lat_deg) || !(-180.0..=360.0).contains(&lon_deg) {
            return Err(err(
                line,
                format!(
                    "station position {lat_deg}, {lon_deg} is out of range: expected lat −90..90, lon −180..360"
                ),
            ));
        }
        // Sources on a 0..360 grid put western longitudes above 180; the coast uses −180..180.
        let lon_deg = if lon_deg > 180.0 {
            lon_deg - 360.0
        } else {
            lon_deg
        };
        Ok(Some(LatLon::new(lat_deg, lon_deg)))
    }
}

/// Keeps the first station position seen and refuses a row placed elsewhere.
fn check_one_station(
    first: &mut Option<(LatLon, u64)>,
    here: LatLon,
    line: u64,
) -> Result<(), WindFileError> {
    let Some((first_pos, first_line)) = *first else {
        *first = Some((here, line));
        return Ok(());
    };
    if (first_pos.lat_deg - here.lat_deg).abs() > 1e-4
        || (first_pos.lon_deg - here.lon_deg).abs() > 1e-4
    {
        return Err(err(
            line,
            format!(
                "station position {}, {} differs from {}, {} on line {first_line}: one file holds one station",
                here.lat_deg, here.lon_deg, first_pos.lat_deg, first_pos.lon_deg
            ),
        ));
    }
    Ok(())
}

/// Orders the rows in time, refusing an empty file or a time given twice; returns the
/// wind series (without wind in a wave-only file) and the waves at its times.
fn into_series(
    mut rows: Vec<Row>,
    header_line: u64,
) -> Result<(WindSeries, Vec<Option<Wave>>), WindFileError> {
    if rows.is_empty() {
        return Err(err(header_line, "no data rows after the header"));
    }
    rows.sort_by_key(|r| (r.time, r.line));
    if let Some(w) = rows.windows(2).find(|w| w[0].time == w[1].time) {
        return Err(err(
            w[1].line,
            format!(
                "time {} repeats line {}",
                w[1].time.to_rfc3339_opts(chrono::SecondsFormat::Secs, true),
                w[0].line
            ),
        ));
    }
    let series = WindSeries {
        times: rows.iter().map(|r| r.time).collect(),
        wind: rows.iter().filter_map(|r| r.wind).collect(),
    };
    Ok((series, rows.iter().map(|r| r.wave).collect()))
}

/// Reads a CSV point series from text (wind, waves or both; see the module
/// documentation for the columns). Times are sorted; a repeated time is an error naming
/// both lines.
pub fn read_csv_series(text: &str) -> Result<PointSeries, WindFileError> {
    let mut reader = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .trim(csv::Trim::All)
        .flexible(false)
        .from_reader(text.as_bytes());
    let header = Header::parse(reader.headers().map_err(|e| csv_error(&e))?)?;
    let mut rows: Vec<Row> = Vec::new();
    let mut station: Option<(LatLon, u64)> = None;
    for result in reader.records() {
        let record = result.map_err(|e| csv_error(&e))?;
        let line = record.position().map_or(0, csv::Position::line);
        let time = parse_time(record.get(header.time).unwrap_or("")).map_err(|p| err(line, p))?;
        let wind = header.wind(&record, line)?;
        let wave = header.wave(&record, line)?;
        if let Some(here) = header.station(&record, line)? {
            check_one_station(&mut station, here, line)?;
        }
        rows.push(Row {
            time,
            wind,
            wave,
            line,
        });
    }
    let (series, waves) = into_series(rows, header.line)?;
    Ok(PointSeries {
        position: station.map(|s| s.0),
        series,
        waves: header.waves.is_some().then_some(waves),
    })
}

fn csv_error(e: &csv::Error) -> WindFileError {
    let (line, problem) = csv_problem(e);
    err(line, problem)
}

/// A CSV reader's error as the line it is on and what is wrong, in words.
pub(crate) fn csv_problem(e: &csv::Error) -> (u64, String) {
    let line = e.position().map_or(0, csv::Position::line);
    let problem = match e.kind() {
        csv::ErrorKind::UnequalLengths {
            expected_len, len, ..
        } => {
            format!("expected {expected_len} fields like the header, found {len}")
        }
        csv::ErrorKind::Utf8 { .. } => "not UTF-8 text".to_string(),
        _ => e.to_string(),
    };
    (line, problem)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn components_with_comments_and_unsorted_times() {
        let text = "# buoy 7, invented\ntime,u_ms,v_ms\n2027-05-01T06:00:00Z,1,2\n2027-05-01T00:00:00+02:00,3,-4\n";
        let s = read_csv_series(text).expect("valid");
        assert_eq!(s.position, None);
        assert_eq!(s.series.times[0].to_rfc3339(), "2027-04-30T22:00:00+00:00");
        assert_eq!(s.series.wind[0], Wind::new(3.0, -4.0));
        assert_eq!(s.series.wind[1], Wind::new(1.0, 2.0));
    }

    /// 20 kt from 270° is 10.2889 m/s toward the east (1 kt = 1852/3600 m/s; WMO "from").
    #[test]
    fn speed_in_knots_from_direction_with_station() {
        let text =
            "time_utc,lat,lon,speed_kt,direction_from_deg\n2027-05-01 06:00Z,36.5,-122.1,20,270\n";
        let s = read_csv_series(text).expect("valid");
        assert_eq!(s.position, Some(LatLon::new(36.5, -122.1)));
        assert_abs_diff_eq!(s.series.wind[0].u_m_s, 10.288_889, epsilon = 1e-5);
        assert_abs_diff_eq!(s.series.wind[0].v_m_s, 0.0, epsilon = 1e-9);
        let kmh = "time,speed_kmh,direction_from_deg\n2027-05-01T06:00Z,36,0\n";
        assert_abs_diff_eq!(
            read_csv_series(kmh).expect("valid").series.wind[0].v_m_s,
            -10.0,
            epsilon = 1e-9
        );
    }

    #[test]
    fn errors_name_the_line_and_the_expectation() {
        let e = |t: &str| read_csv_series(t).unwrap_err().to_string();
        assert_eq!(
            e("time,u_ms,v_ms\n2027-05-01T06:00Z,1,2\n2027-05-01T06:00Z,3,4\n"),
            "line 3: time 2027-05-01T06:00:00Z repeats line 2"
        );
        assert_eq!(
            e("time,u_ms,v_ms\n2027-05-01T06:00:00,1,2\n"),
            "line 2: time \"2027-05-01T06:00:00\" has no UTC offset: add Z for UTC or an offset such as +02:00"
        );
        assert_eq!(
            e("# c\ntime,speed_kt,direction_from_deg\n2027-05-01T06:00Z,abc,2\n"),
            "line 3: column speed_kt: expected a number, found \"abc\""
        );
        assert_eq!(
            e("time,speed_kt,direction_from_deg\n2027-05-01T06:00Z,5,400\n"),
            "line 2: column direction_from_deg: direction 400 is out of range: expected 0 to 360 degrees"
        );
        assert_eq!(
            e("time,speed\n2027-05-01T06:00Z,5\n"),
            "line 1: no wind columns: expected u_ms and v_ms, or a speed (speed_ms, speed_kt or speed_kmh) with direction_from_deg"
        );
        assert_eq!(
            e("time,u_ms,v_ms\n2027-05-01T06:00Z,1\n"),
            "line 2: expected 3 fields like the header, found 2"
        );
        assert_eq!(
            e("time,u_ms,v_ms\n"),
            "line 1: no data rows after the header"
        );
        assert_eq!(
            e("time,u_ms,v_ms\n2027-05-01T06:00Z,NaN,1\n"),
            "line 2: column u_ms: expected a finite number, found \"NaN\""
        );
    }
}
