//! NMEA 0183 logs from a boat's instruments: `MTW` (mean temperature of water, °C)
//! sentences take the time and position of the latest valid `RMC` (recommended minimum
//! data: time, status, position, date) before them in the log. Checksums (the XOR of the
//! characters between `$` and `*`) are verified; bad sentences are counted and skipped
//! with their line numbers. The log is taken as one station at the mean of the positions
//! its temperatures were read at (a boat working one ground).

use super::{SST_RANGE_C, SstError, SstSeries};
use crate::coast::LatLon;
use chrono::{DateTime, NaiveDate, NaiveTime, Utc};

/// What reading a log found besides the series.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct NmeaReport {
    /// Lines read.
    pub lines: usize,
    /// Temperatures used.
    pub temperatures: usize,
    /// Lines with a bad checksum or a damaged sentence, skipped.
    pub bad_lines: Vec<u64>,
    /// `MTW` sentences before any valid `RMC` (no time or position), skipped.
    pub without_fix: usize,
}

/// The checked body of a sentence (between `$`/`!` and `*`), or why not.
fn body(line: &str) -> Result<&str, &'static str> {
    let line = line.trim();
    let rest = line
        .strip_prefix('$')
        .or_else(|| line.strip_prefix('!'))
        .ok_or("not a sentence")?;
    let (body, sum) = rest.split_once('*').ok_or("no checksum")?;
    let want = u8::from_str_radix(sum.get(..2).ok_or("short checksum")?, 16)
        .map_err(|_| "bad checksum digits")?;
    let got = body.bytes().fold(0u8, |a, b| a ^ b);
    if got == want {
        Ok(body)
    } else {
        Err("checksum does not match")
    }
}

/// Degrees from NMEA `ddmm.mmmm` and a hemisphere letter.
fn degrees(value: &str, hemisphere: &str, degree_digits: usize) -> Option<f64> {
    let (d, m) = (value.get(..degree_digits)?, value.get(degree_digits..)?);
    let x = d.parse::<f64>().ok()? + m.parse::<f64>().ok()? / 60.0;
    match hemisphere {
        "N" | "E" => Some(x),
        "S" | "W" => Some(-x),
        _ => None,
    }
}

/// Time and position of an `RMC` sentence with status A (valid).
fn rmc(fields: &[&str]) -> Option<(DateTime<Utc>, LatLon)> {
    if fields.get(2) != Some(&"A") {
        return None;
    }
    let time = NaiveTime::parse_from_str(fields.get(1)?.get(..6)?, "%H%M%S").ok()?;
    let date = NaiveDate::parse_from_str(fields.get(9)?, "%d%m%y").ok()?;
    let lat = degrees(fields.get(3)?, fields.get(4)?, 2)?;
    let lon = degrees(fields.get(5)?, fields.get(6)?, 3)?;
    Some((date.and_time(time).and_utc(), LatLon::new(lat, lon)))
}

/// Reads the water temperatures of an NMEA 0183 log (see the module documentation).
pub fn read_nmea_log(text: &str) -> Result<(SstSeries, NmeaReport), SstError> {
    let mut report = NmeaReport::default();
    let mut fix: Option<(DateTime<Utc>, LatLon)> = None;
    let mut rows: Vec<(DateTime<Utc>, f64, LatLon)> = Vec::new();
    for (k, raw) in text.lines().enumerate() {
        let line = k as u64 + 1;
        report.lines += 1;
        let raw = raw.trim();
        if raw.is_empty() || raw.starts_with('#') {
            continue;
        }
        let Ok(body) = body(raw) else {
            report.bad_lines.push(line);
            continue;
        };
        let fields: Vec<&str> = body.split(',').collect();
        let kind = fields[0].get(2..).unwrap_or("");
        match kind {
            "RMC" => {
                if let Some(f) = rmc(&fields) {
                    fix = Some(f);
                }
            }
            "MTW" => {
                let value = fields.get(1).and_then(|v| v.parse::<f64>().ok());
                let unit_ok = fields.get(2).is_none_or(|u| u.is_empty() || *u == "C");
                let Some(c) = value.filter(|c| c.is_finite() && unit_ok) else {
                    report.bad_lines.push(line);
                    continue;
                };
                if !(SST_RANGE_C.0..=SST_RANGE_C.1).contains(&c) {
                    report.bad_lines.push(line);
                    continue;
                }
                match fix {
                    Some((t, p)) => rows.push((t, c, p)),
                    None => report.without_fix += 1,
                }
            }
            _ => {}
        }
    }
    // One temperature per fix time: the last read at it.
    rows.sort_by_key(|r| r.0);
    rows.dedup_by(|later, earlier| {
        if later.0 == earlier.0 {
            *earlier = *later;
            true
        } else {
            false
        }
    });
    report.temperatures = rows.len();
    if rows.is_empty() {
        return Err(SstError::File(format!(
            "no water temperature in the log: expected MTW sentences after a valid RMC ({} lines, {} bad, {} temperatures before any position fix)",
            report.lines,
            report.bad_lines.len(),
            report.without_fix
        )));
    }
    let n = rows.len() as f64;
    let (lat, lon) = rows.iter().fold((0.0, 0.0), |(a, b), r| {
        (a + r.2.lat_deg / n, b + r.2.lon_deg / n)
    });
    Ok((
        SstSeries {
            position: Some(LatLon::new(lat, lon)),
            times: rows.iter().map(|r| r.0).collect(),
            temps_c: rows.iter().map(|r| r.1).collect(),
        },
        report,
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A hand-written log, its checksums computed outside the project (Python's
    /// `functools.reduce` XOR over each body): a temperature before any fix, two good
    /// pairs, a sentence with a wrong checksum (00 where 11 is due).
    #[test]
    fn mtw_takes_the_latest_rmc_and_bad_checksums_are_skipped() {
        let log = "$IIMTW,15.1,C*16
$GPRMC,120000,A,3700.000,N,12300.000,W,5.0,180.0,010627,,*06
$IIMTW,14.8,C*1E
$IIMTW,13.0,C*00
$GPRMC,130000,A,3706.000,N,12306.000,W,5.0,180.0,010627,,*07
$IIMTW,14.2,C*14
";
        let (s, report) = read_nmea_log(log).expect("read");
        assert_eq!(s.temps_c, vec![14.8, 14.2]);
        assert_eq!(s.times[0].to_rfc3339(), "2027-06-01T12:00:00+00:00");
        let p = s.position.expect("position");
        assert!((p.lat_deg - 37.05).abs() < 1e-9 && (p.lon_deg + 123.05).abs() < 1e-9);
        assert_eq!(report.bad_lines, vec![4]);
        assert_eq!(report.without_fix, 1);
    }
}
