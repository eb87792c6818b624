//! The table of the `index` command: one row per segment and valid time, sorted by
//! segment id then time.

use crate::upwelling::IndexSeries;
use chrono::{DateTime, Utc};
use rayon::prelude::*;
use serde::Serialize;

/// Output format of the index table.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum IndexFormat {
    /// CSV with a header line.
    #[default]
    Csv,
    /// A JSON array of objects with the same fields as the CSV columns.
    Json,
}

/// One row of the index table.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IndexRecord {
    /// Segment id.
    pub segment_id: String,
    /// Valid time, RFC 3339 UTC, e.g. `2027-05-01T06:00:00Z`.
    pub time_utc: String,
    /// The run of an ensemble: the perturbation number (control 0), or the file's place
    /// from 1 when each file is a run; absent for a single forecast.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub member: Option<u32>,
    /// Latitude of the segment's length-weighted midpoint, degrees north.
    pub lat: f64,
    /// Longitude of the same point, degrees east.
    pub lon: f64,
    /// 10 m wind speed at that point, m/s.
    pub wind_speed_ms: f64,
    /// Direction the wind blows from, degrees true; empty (null) in a calm.
    pub wind_from_deg: Option<f64>,
    /// Coastal upwelling index, m^3/s per 100 m of coastline; positive is upwelling.
    pub upwelling_index_m3s_per_100m: f64,
    /// `near-equator` when the segment lies between 5° and 10° from the equator.
    pub flag: String,
}

fn round(x: f64, decimals: i32) -> f64 {
    let k = 10f64.powi(decimals);
    let r = (x * k).round() / k;
    // Avoid printing "-0".
    if r == 0.0 { 0.0 } else { r }
}

/// The rows for a set of index series, sorted by segment id then time.
#[must_use]
pub fn index_records(series: &[IndexSeries]) -> Vec<IndexRecord> {
    index_records_runs(&[(None, series)])
}

/// The rows for the index series of each run (`None`: a single forecast), sorted by
/// segment id, then run (in the order given), then time.
#[must_use]
pub fn index_records_runs(runs: &[(Option<u32>, &[IndexSeries])]) -> Vec<IndexRecord> {
    let mut out = Vec::new();
    for (member, s) in in_table_order(runs) {
        for (k, t) in s.times.iter().enumerate() {
            let w = s.wind[k];
            out.push(IndexRecord {
                segment_id: s.segment_id.clone(),
                time_utc: t.to_rfc3339_opts(chrono::SecondsFormat::Secs, true),
                member,
                lat: round(s.midpoint.lat_deg, 6),
                lon: round(s.midpoint.lon_deg, 6),
                wind_speed_ms: round(w.speed_m_s(), 3),
                wind_from_deg: w.direction_from_deg().map(|d| round(d, 2) % 360.0),
                upwelling_index_m3s_per_100m: round(s.index_m3s_per_100m[k], 3),
                flag: if s.near_equator {
                    "near-equator".into()
                } else {
                    String::new()
                },
            });
        }
    }
    out
}

/// Writes the index of each run (`None`: a single forecast) as CSV or JSON, rows sorted
/// by segment id, then run (in the order given), then time.
///
/// The CSV is written straight from the series, without a `String` per field: each
/// number is printed from its value scaled and rounded to the contract's decimals (lat
/// and lon 6, speed and index 3, direction 2) as an integer with the decimal point put
/// back and trailing zeros dropped. That is the same text as Rust's shortest round-trip
/// printing of the rounded value (`tests` below compare the two byte for byte). Chunks
/// of series are formatted on every core and written in order.
pub fn write_index(
    runs: &[(Option<u32>, &[IndexSeries])],
    format: IndexFormat,
    out: &mut impl std::io::Write,
) -> Result<(), std::io::Error> {
    match format {
        IndexFormat::Csv => write_index_csv(runs, out),
        IndexFormat::Json => {
            serde_json::to_writer_pretty(&mut *out, &index_records_runs(runs))?;
            out.write_all(b"\n")
        }
    }
}

/// The series in the table's order: by segment id, then run as given.
fn in_table_order<'a>(
    runs: &[(Option<u32>, &'a [IndexSeries])],
) -> Vec<(Option<u32>, &'a IndexSeries)> {
    let mut sorted: Vec<(usize, Option<u32>, &IndexSeries)> = runs
        .iter()
        .enumerate()
        .flat_map(|(k, (m, series))| series.iter().map(move |s| (k, *m, s)))
        .collect();
    sorted.sort_by(|a, b| a.2.segment_id.cmp(&b.2.segment_id).then(a.0.cmp(&b.0)));
    sorted.into_iter().map(|(_, m, s)| (m, s)).collect()
}

fn write_index_csv(
    runs: &[(Option<u32>, &[IndexSeries])],
    out: &mut impl std::io::Write,
) -> Result<(), std::io::Error> {
    // An ensemble's rows carry their run after the time; a single forecast's columns
    // stay as they always were.
    let with_runs = runs.iter().any(|(m, _)| m.is_some());
    let mut header = Vec::with_capacity(128);
    header.extend_from_slice(b"segment_id,time_utc,");
    if with_runs {
        header.extend_from_slice(b"member,");
    }
    header.extend_from_slice(
        b"lat,lon,wind_speed_ms,wind_from_deg,upwelling_index_m3s_per_100m,flag\n",
    );
    out.write_all(&header)?;
    // Each series' rows are formatted on their own: chunks of series on every core,
    // written in the table's order.
    let order = in_table_order(runs);
    let chunks: Vec<Vec<u8>> = order
        .par_chunks(64)
        .map(|chunk| {
            let rows: usize = chunk.iter().map(|(_, s)| s.times.len()).sum();
            let mut text = Vec::with_capacity(rows * 80);
            let mut times: (&[DateTime<Utc>], Vec<String>) = (&[], Vec::new());
            for &(member, s) in chunk {
                if times.0 != s.times.as_slice() {
                    times = (
                        &s.times,
                        s.times
                            .iter()
                            .map(|t| t.to_rfc3339_opts(chrono::SecondsFormat::Secs, true))
                            .collect(),
                    );
                }
                put_series_rows(&mut text, member, s, &times.1, with_runs);
            }
            text
        })
        .collect();
    for text in chunks {
        out.write_all(&text)?;
    }
    Ok(())
}

/// Appends the CSV rows of one series to `text` (`times`: its valid times as text).
fn put_series_rows(
    text: &mut Vec<u8>,
    member: Option<u32>,
    s: &IndexSeries,
    times: &[String],
    with_runs: bool,
) {
    // What every row of this series starts and ends with.
    let mut id = Vec::new();
    csv_field(&mut id, &s.segment_id);
    let mut place = vec![b','];
    put_fixed(&mut place, s.midpoint.lat_deg, 6);
    place.push(b',');
    put_fixed(&mut place, s.midpoint.lon_deg, 6);
    place.push(b',');
    let flag: &[u8] = if s.near_equator {
        b"near-equator\n"
    } else {
        b"\n"
    };
    for (k, time) in times.iter().enumerate() {
        text.extend_from_slice(&id);
        text.push(b',');
        text.extend_from_slice(time.as_bytes());
        if with_runs {
            text.push(b',');
            if let Some(m) = member {
                put_integer(text, i64::from(m));
            }
        }
        text.extend_from_slice(&place);
        let w = s.wind[k];
        put_fixed(text, w.speed_m_s(), 3);
        text.push(b',');
        if let Some(d) = w.direction_from_deg() {
            put_direction(text, d);
        }
        text.push(b',');
        put_fixed(text, s.index_m3s_per_100m[k], 3);
        text.push(b',');
        text.extend_from_slice(flag);
    }
}

/// A CSV field, quoted only when it must be (a comma, a quote or a line break in it), as
/// the `csv` crate's writer does.
fn csv_field(out: &mut Vec<u8>, text: &str) {
    if text.contains([',', '"', '\n', '\r']) {
        out.push(b'"');
        out.extend_from_slice(text.replace('"', "\"\"").as_bytes());
        out.push(b'"');
    } else {
        out.extend_from_slice(text.as_bytes());
    }
}

/// The largest scaled value printed as an integer: far below 2^53, so every decimal
/// with the given places is its own double and prints as itself.
const MAX_SCALED: f64 = 1e15;

/// `x` rounded to `decimals` places, printed as Rust prints the rounded `f64`.
fn put_fixed(out: &mut Vec<u8>, x: f64, decimals: i32) {
    let scaled = (x * 10f64.powi(decimals)).round();
    if scaled.is_finite() && scaled.abs() < MAX_SCALED {
        put_scaled(out, scaled as i64, decimals.unsigned_abs());
    } else {
        put_display(out, round(x, decimals));
    }
}

/// A direction in [0, 360) rounded to 2 places, 360 written as 0.
fn put_direction(out: &mut Vec<u8>, deg: f64) {
    let scaled = (deg * 100.0).round();
    if scaled.is_finite() && scaled.abs() < MAX_SCALED {
        put_scaled(out, (scaled as i64).rem_euclid(36_000), 2);
    } else {
        put_display(out, round(deg, 2) % 360.0);
    }
}

fn put_display(out: &mut Vec<u8>, x: f64) {
    use std::io::Write;
    let _ = write!(out, "{x}");
}

/// `n / 10^decimals` with the trailing zeros of its fraction dropped ("12.5", "-3",
/// "0.001"); zero is "0", never "-0".
fn put_scaled(out: &mut Vec<u8>, n: i64, decimals: u32) {
    let mut digits = [0u8; 24];
    let mut len = 0;
    let mut m = n.unsigned_abs();
    while m > 0 || len <= decimals as usize {
        digits[len] = b'0' + (m % 10) as u8;
        m /= 10;
        len += 1;
    }
    // digits[..len] holds the number backwards, at least one digit before the point.
    let mut last = 0;
    while last < decimals as usize && digits[last] == b'0' {
        last += 1;
    }
    if n < 0 {
        out.push(b'-');
    }
    for k in (decimals as usize..len).rev() {
        out.push(digits[k]);
    }
    if last < decimals as usize {
        out.push(b'.');
        for k in (last..decimals as usize).rev() {
            out.push(digits[k]);
        }
    }
}

fn put_integer(out: &mut Vec<u8>, n: i64) {
    put_scaled(out, n, 0);
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::coast::LatLon;
    use crate::physics::Wind;
    use crate::synthetic::Lcg;

    /// The table as written before the fast writer: a `String` per field through the
    /// `csv` crate and Rust's own float printing of the rounded values. The reference
    /// the fast writer must match byte for byte.
    fn reference_csv(records: &[IndexRecord]) -> Vec<u8> {
        let mut w = csv::Writer::from_writer(Vec::new());
        let runs = records.iter().any(|r| r.member.is_some());
        let mut header = vec!["segment_id", "time_utc"];
        if runs {
            header.push("member");
        }
        header.extend([
            "lat",
            "lon",
            "wind_speed_ms",
            "wind_from_deg",
            "upwelling_index_m3s_per_100m",
            "flag",
        ]);
        w.write_record(&header).expect("header");
        for r in records {
            let mut row = vec![r.segment_id.clone(), r.time_utc.clone()];
            if runs {
                row.push(r.member.map(|m| m.to_string()).unwrap_or_default());
            }
            row.extend([
                r.lat.to_string(),
                r.lon.to_string(),
                r.wind_speed_ms.to_string(),
                r.wind_from_deg.map(|d| d.to_string()).unwrap_or_default(),
                r.upwelling_index_m3s_per_100m.to_string(),
                r.flag.clone(),
            ]);
            w.write_record(row).expect("row");
        }
        w.into_inner().expect("bytes")
    }

    /// Values of every size and sign, exact halves, zeros, calms, a wind from due north
    /// (359.999° rounds to 360 and is written 0) and ids that need quoting.
    fn series(rng: &mut Lcg, n: usize) -> Vec<IndexSeries> {
        let t0 = DateTime::parse_from_rfc3339("2027-05-01T00:00:00Z")
            .expect("time")
            .to_utc();
        let times: Vec<DateTime<Utc>> = (0..40).map(|h| t0 + chrono::Duration::hours(h)).collect();
        let ids = ["north, outer", "say \"reef\"", "plain-7", "", "a\nb", "z"];
        (0..n)
            .map(|k| {
                let scale = 10f64.powi([-4, -3, -2, -1, 0, 1, 2, 3, 4][k % 9]);
                let value = |rng: &mut Lcg| (rng.next_unit() - 0.5) * scale;
                let wind: Vec<Wind> = (0..times.len())
                    .map(|t| match t % 7 {
                        0 => Wind::new(0.0, 0.0),
                        1 => Wind::new(-1e-6, 10.0),
                        2 => Wind::new(0.0, -7.0005),
                        _ => Wind::new(value(rng), value(rng)),
                    })
                    .collect();
                let index = (0..times.len())
                    .map(|t| match t % 5 {
                        0 => -0.0004,
                        1 => 2.0005,
                        2 => 0.125,
                        _ => value(rng) * 1e3,
                    })
                    .collect();
                IndexSeries {
                    segment_id: format!("{}{}", ids[k % ids.len()], k / ids.len()),
                    midpoint: LatLon::new(value(rng).clamp(-89.0, 89.0), value(rng) * 1e2),
                    times: times[..times.len() - k % 3].to_vec(),
                    wind,
                    index_m3s_per_100m: index,
                    near_equator: k % 4 == 0,
                }
            })
            .collect()
    }

    #[test]
    fn the_fast_csv_is_byte_for_byte_the_reference() {
        let mut rng = Lcg(11);
        // More series than one chunk formatted on its own (64): the chunks come back in order.
        let single = series(&mut rng, 150);
        let mut fast = Vec::new();
        write_index(&[(None, &single)], IndexFormat::Csv, &mut fast).expect("csv");
        let reference = reference_csv(&index_records(&single));
        assert_eq!(
            String::from_utf8_lossy(&fast),
            String::from_utf8_lossy(&reference)
        );
        // An ensemble: a member column, runs in the order given within each segment.
        let other = series(&mut rng, 60);
        let runs = [(Some(0), single.as_slice()), (Some(12), other.as_slice())];
        let mut fast = Vec::new();
        write_index(&runs, IndexFormat::Csv, &mut fast).expect("csv");
        let reference = reference_csv(&index_records_runs(&runs));
        assert_eq!(
            String::from_utf8_lossy(&fast),
            String::from_utf8_lossy(&reference)
        );
    }

    #[test]
    fn fixed_decimals_print_as_the_rounded_value() {
        let mut rng = Lcg(3);
        for k in 0..200_000 {
            let x = (rng.next_unit() - 0.5) * 10f64.powi(k % 14 - 5);
            for d in [2, 3, 6] {
                let mut fast = Vec::new();
                put_fixed(&mut fast, x, d);
                assert_eq!(
                    String::from_utf8(fast).expect("text"),
                    round(x, d).to_string(),
                    "{x} to {d} places"
                );
            }
        }
    }
}
