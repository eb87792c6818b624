//! The table of the `index` command: one row per segment and valid time, sorted by
//! segment id then time.

use crate::upwelling::IndexSeries;
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
    let mut sorted: Vec<(usize, Option<u32>, &IndexSeries)> = runs
        .iter()
        .enumerate()
        .flat_map(|(k, (m, series))| series.iter().map(move |s| (k, *m, s)))
        .collect();
    sorted.sort_by(|a, b| a.2.segment_id.cmp(&b.2.segment_id).then(a.0.cmp(&b.0)));
    let mut out = Vec::new();
    for (_, member, s) in sorted {
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

/// Renders the rows as CSV or JSON text.
pub fn write_index(
    records: &[IndexRecord],
    format: IndexFormat,
) -> Result<Vec<u8>, std::io::Error> {
    match format {
        IndexFormat::Csv => {
            let mut w = csv::Writer::from_writer(Vec::new());
            // An ensemble's rows carry their run after the time; a single forecast's
            // columns stay as they always were.
            let runs = records.iter().any(|r| r.member.is_some());
            let member = |r: &IndexRecord| r.member.map(|m| m.to_string()).unwrap_or_default();
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
            w.write_record(&header)?;
            for r in records {
                let mut row = vec![r.segment_id.clone(), r.time_utc.clone()];
                if runs {
                    row.push(member(r));
                }
                w.write_record(row.into_iter().chain([
                    r.lat.to_string(),
                    r.lon.to_string(),
                    r.wind_speed_ms.to_string(),
                    r.wind_from_deg.map(|d| d.to_string()).unwrap_or_default(),
                    r.upwelling_index_m3s_per_100m.to_string(),
                    r.flag.clone(),
                ]))?;
            }
            w.into_inner()
                .map_err(|e| std::io::Error::other(e.to_string()))
        }
        IndexFormat::Json => {
            let mut bytes = serde_json::to_vec_pretty(records)?;
            bytes.push(b'\n');
            Ok(bytes)
        }
    }
}
