//! The reference dumps of the GRIB2 fixtures (`tests/fixtures/grib2/README.md`), read
//! by the tests that compare the readers with ecCodes.

// Each test file uses some of these; the others would warn as unused in that file.
#![allow(dead_code)]

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
    /// The `META` line: ecCodes' keys and values for the field.
    pub meta: BTreeMap<String, String>,
    /// Valid time.
    pub valid: DateTime<Utc>,
    /// Latitude, longitude (as the grid defines it), value (`None` = masked).
    pub points: Vec<(f64, f64, Option<f64>)>,
}

impl DumpField {
    /// ecCodes' short name of the field (`10u`, `swh`, …).
    pub fn short_name(&self) -> &str {
        &self.meta["shortName"]
    }

    /// The parameter number (Code Table 4.2).
    pub fn number(&self) -> u8 {
        self.meta["parameterNumber"].parse().expect("integer")
    }

    /// Half the packing step 2^E / 10^D: what the packing itself rounds to, so the
    /// largest honest difference between two decoders of the same bits (plus float32
    /// rounding).
    pub fn tolerance(&self) -> f64 {
        let e: i32 = self.meta["binaryScaleFactor"].parse().expect("E");
        let d: i32 = self.meta["decimalScaleFactor"].parse().expect("D");
        0.5 * 2f64.powi(e) / 10f64.powi(d) + 1e-6
    }

    /// The dumped value at a grid node, by position (longitudes compared modulo 360).
    pub fn at(&self, lat: f64, lon: f64) -> Option<f64> {
        self.points
            .iter()
            .find(|p| {
                let dlon = ((p.1 - lon).rem_euclid(360.0) + 180.0).rem_euclid(360.0) - 180.0;
                (p.0 - lat).abs() < 1e-6 && dlon.abs() < 1e-6
            })
            .expect("a grid node")
            .2
    }
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
            let d = NaiveDate::parse_from_str(&meta["validityDate"], "%Y%m%d").expect("date");
            let time: u32 = meta["validityTime"].parse().expect("integer time");
            let valid = d
                .and_hms_opt(time / 100, time % 100, 0)
                .expect("time")
                .and_utc();
            fields.push(DumpField {
                meta: std::mem::take(&mut meta),
                valid,
                points: std::mem::take(&mut points),
            });
        } else if !(line.starts_with("FIELD")
            || line.starts_with("RAW")
            || line.starts_with("POINTS"))
        {
            let cols: Vec<&str> = line.split(' ').collect();
            let value = (cols[2] != "missing").then(|| cols[2].parse().expect("value"));
            points.push((
                cols[0].parse().expect("lat"),
                cols[1].parse().expect("lon"),
                value,
            ));
        }
    }
    fields
}
