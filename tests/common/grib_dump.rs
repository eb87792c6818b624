//! The reference dumps of the GRIB2 fixtures (`tests/fixtures/grib2/README.md`), read
//! by the tests that compare the reader with ecCodes.

use chrono::{DateTime, NaiveDate, Utc};
use std::collections::BTreeMap;
use std::path::PathBuf;

fn dump_path(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/grib2")
        .join(format!("{name}.dump.txt"))
}

/// One field of a reference dump.
pub struct DumpField {
    pub short_name: String,
    pub valid: DateTime<Utc>,
    pub points: Vec<(f64, f64, Option<f64>)>,
}

/// Parses the dump format documented in `tests/fixtures/grib2/README.md`.
pub fn parse_dump(name: &str) -> Vec<DumpField> {
    let text = std::fs::read_to_string(dump_path(name)).expect("dump exists");
    let mut fields = Vec::new();
    let mut meta: BTreeMap<String, String> = BTreeMap::new();
    let mut points = Vec::new();
    for line in text.lines().filter(|l| !l.starts_with('#')) {
        if let Some(rest) = line.strip_prefix("META ") {
            meta = rest
                .split(' ')
                .filter_map(|kv| kv.split_once('='))
                .map(|(k, v)| (k.to_string(), v.to_string()))
                .collect();
        } else if line == "END" {
            let date = &meta["validityDate"];
            let time: u32 = meta["validityTime"].parse().expect("integer time");
            let d = NaiveDate::parse_from_str(date, "%Y%m%d").expect("date");
            let valid = d
                .and_hms_opt(time / 100, time % 100, 0)
                .expect("time")
                .and_utc();
            fields.push(DumpField {
                short_name: meta["shortName"].clone(),
                valid,
                points: std::mem::take(&mut points),
            });
        } else if line.starts_with("FIELD") || line.starts_with("RAW") || line.starts_with("POINTS")
        {
        } else {
            let cols: Vec<&str> = line.split(' ').collect();
            let value = if cols[2] == "missing" {
                None
            } else {
                Some(cols[2].parse().expect("value"))
            };
            points.push((
                cols[0].parse().expect("lat"),
                cols[1].parse().expect("lon"),
                value,
            ));
        }
    }
    fields
}
