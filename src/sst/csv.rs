//! CSV sea-temperature series. `#` comment lines, then a header (any case):
//! - time: `time`, `time_utc`, `datetime`, `timestamp`, as the wind CSV reads it;
//! - temperature in °C: `sst_c`, `water_temp_c`, `wtmp_c`; or in kelvin: `sst_k`;
//! - optional position: `lat`/`latitude` and `lon`/`longitude` (one station per file).
//!
//! An empty temperature cell is a missing value; so is any number in `missing` (codes
//! such as 99 or 999 that some buoys write). Other values outside −2.5 to 40 °C are
//! refused with the line.

use super::{SST_RANGE_C, SstError, SstSeries};
use crate::coast::LatLon;
use crate::wind::find_column as find;

const TIME: &[&str] = &["time", "time_utc", "datetime", "timestamp"];
const CELSIUS: &[&str] = &["sst_c", "water_temp_c", "wtmp_c"];
const KELVIN: &[&str] = &["sst_k"];
const LAT: &[&str] = &["lat", "latitude"];
const LON: &[&str] = &["lon", "longitude"];

fn err(line: u64, problem: impl Into<String>) -> SstError {
    SstError::Line {
        line,
        problem: problem.into(),
    }
}

/// Reads a CSV sea-temperature series (see the module documentation).
pub fn read_sst_csv(text: &str, missing: &[f64]) -> Result<SstSeries, SstError> {
    let mut reader = ::csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .trim(::csv::Trim::All)
        .flexible(false)
        .from_reader(text.as_bytes());
    let header = reader.headers().map_err(|e| csv_error(&e))?.clone();
    let header_line = header.position().map_or(1, ::csv::Position::line);
    let names: Vec<String> = header.iter().map(str::to_ascii_lowercase).collect();
    let time = find(&names, TIME).ok_or_else(|| {
        err(
            header_line,
            format!(
                "no time column: expected one of {} in the header",
                TIME.join(", ")
            ),
        )
    })?;
    let (temp, kelvin) = match (find(&names, CELSIUS), find(&names, KELVIN)) {
        (Some(c), _) => (c, false),
        (None, Some(k)) => (k, true),
        (None, None) => {
            return Err(err(
                header_line,
                format!(
                    "no sea-temperature column: expected one of {} (°C) or sst_k (kelvin)",
                    CELSIUS.join(", ")
                ),
            ));
        }
    };
    let position = match (find(&names, LAT), find(&names, LON)) {
        (Some(a), Some(b)) => Some((a, b)),
        (None, None) => None,
        _ => {
            return Err(err(
                header_line,
                "a position needs both lat and lon columns",
            ));
        }
    };
    let mut rows: Vec<(chrono::DateTime<chrono::Utc>, f64, u64)> = Vec::new();
    let mut station: Option<LatLon> = None;
    for result in reader.records() {
        let record = result.map_err(|e| csv_error(&e))?;
        let line = record.position().map_or(0, ::csv::Position::line);
        let t =
            crate::wind::parse_time(record.get(time).unwrap_or("")).map_err(|p| err(line, p))?;
        let cell = record.get(temp).unwrap_or("");
        if let Some((a, b)) = position {
            let number = |col: usize, what: &str| -> Result<f64, SstError> {
                record
                    .get(col)
                    .unwrap_or("")
                    .parse::<f64>()
                    .ok()
                    .filter(|x| x.is_finite())
                    .ok_or_else(|| {
                        err(
                            line,
                            format!("{what} {:?} is not a number", record.get(col).unwrap_or("")),
                        )
                    })
            };
            let here = LatLon::new(number(a, "lat")?, number(b, "lon")?);
            match station {
                None => station = Some(here),
                Some(p)
                    if (p.lat_deg - here.lat_deg).abs() > 1e-6
                        || (p.lon_deg - here.lon_deg).abs() > 1e-6 =>
                {
                    return Err(err(
                        line,
                        "a second station position: one file holds one station's series",
                    ));
                }
                Some(_) => {}
            }
        }
        if cell.is_empty() {
            continue;
        }
        let value: f64 = cell
            .parse()
            .ok()
            .filter(|x: &f64| x.is_finite())
            .ok_or_else(|| err(line, format!("{} {cell:?} is not a number", names[temp])))?;
        if missing.iter().any(|m| (m - value).abs() < 1e-9) {
            continue;
        }
        let c = if kelvin { value - 273.15 } else { value };
        if !(SST_RANGE_C.0..=SST_RANGE_C.1).contains(&c) {
            return Err(err(
                line,
                format!(
                    "{} {cell} is {c:.2} °C, outside {} to {} °C: if it marks a missing value, name it as one (--sst-missing {value})",
                    names[temp], SST_RANGE_C.0, SST_RANGE_C.1
                ),
            ));
        }
        rows.push((t, c, line));
    }
    rows.sort_by_key(|r| r.0);
    if let Some(w) = rows.windows(2).find(|w| w[0].0 == w[1].0) {
        return Err(err(
            w[1].2,
            format!("a second value for the time of line {}", w[0].2),
        ));
    }
    if rows.is_empty() {
        return Err(SstError::File(
            "no sea temperature in the file: every temperature cell is empty or missing".into(),
        ));
    }
    Ok(SstSeries {
        position: station,
        times: rows.iter().map(|r| r.0).collect(),
        temps_c: rows.iter().map(|r| r.1).collect(),
    })
}

fn csv_error(e: &::csv::Error) -> SstError {
    let (line, problem) = crate::wind::csv_problem(e);
    err(line, problem)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn celsius_kelvin_missing_and_errors() {
        let text = "# buoy, invented\ntime,lat,lon,wtmp_c\n2027-06-01T00:00Z,37,-123,14.5\n2027-06-01T01:00Z,37,-123,\n2027-06-01T02:00Z,37,-123,99.0\n";
        let s = read_sst_csv(text, &[99.0]).expect("read");
        assert_eq!(s.temps_c, vec![14.5]);
        assert_eq!(s.position, Some(LatLon::new(37.0, -123.0)));
        let e = read_sst_csv(text, &[]).expect_err("99 without the option");
        assert!(
            e.to_string()
                .starts_with("line 5: wtmp_c 99.0 is 99.00 °C, outside"),
            "{e}"
        );
        let k = read_sst_csv("time,sst_k\n2027-06-01T00:00Z,288.15\n", &[]).expect("kelvin");
        assert!((k.temps_c[0] - 15.0).abs() < 1e-9);
        let e = read_sst_csv("time,speed_kt\n2027-06-01T00:00Z,3\n", &[]).expect_err("no column");
        assert!(
            e.to_string()
                .starts_with("line 1: no sea-temperature column"),
            "{e}"
        );
    }
}
