//! The scenario file: JSON with a format name and a version number; older versions are
//! migrated on load, newer ones refused; saves are atomic and keep a backup.

use super::Scenario;
use crate::atomic::save_with_backup;
use serde_json::{Value, json};
use std::io::Write;
use std::path::{Path, PathBuf};

/// The `format` value of a scenario file.
pub const FORMAT_NAME: &str = "shelfwind-scenario";
/// The version this build writes.
pub const FORMAT_VERSION: u32 = 1;

/// Why a scenario could not be read or written.
#[derive(Debug, thiserror::Error)]
pub enum ScenarioError {
    /// The file could not be read or written.
    #[error("{0}")]
    Io(#[from] std::io::Error),
    /// Not JSON, or JSON of the wrong shape.
    #[error("line {line}, column {column}: {message}")]
    Json {
        /// 1-based line.
        line: usize,
        /// 1-based column.
        column: usize,
        /// What was wrong.
        message: String,
    },
    /// JSON, but not a scenario.
    #[error("not a Shelfwind scenario: expected \"format\": \"{FORMAT_NAME}\"")]
    NotScenario,
    /// Written by a newer Shelfwind.
    #[error(
        "scenario version {found} is newer than this Shelfwind reads (up to {FORMAT_VERSION}): use a newer Shelfwind"
    )]
    NewerVersion {
        /// The version found.
        found: u64,
    },
    /// A value out of range, a duplicate id, and so on.
    #[error("{0}")]
    Invalid(String),
    /// A problem with a file, with its path.
    #[error("{source}: {}", path.display())]
    File {
        /// The file.
        path: PathBuf,
        /// What went wrong.
        source: Box<ScenarioError>,
    },
}

fn json_error(e: &serde_json::Error) -> ScenarioError {
    let message = e.to_string();
    let message = message
        .split(" at line ")
        .next()
        .unwrap_or_default()
        .to_string();
    ScenarioError::Json {
        line: e.line(),
        column: e.column(),
        message,
    }
}

/// Whether some text looks like a scenario file (for telling it from GeoJSON).
#[must_use]
pub fn is_scenario_text(text: &str) -> bool {
    /// Only the format is kept: the rest of the document is checked as JSON and
    /// skipped without building it (a long coast's GeoJSON is read again just after).
    #[derive(serde::Deserialize)]
    struct Head {
        #[serde(default)]
        format: Option<Value>,
    }
    serde_json::from_str::<Head>(text)
        .ok()
        .and_then(|h| h.format)
        .is_some_and(|f| f.as_str() == Some(FORMAT_NAME))
}

/// Version 0 (the first draft layout) to version 1: `coast` became `segments` with
/// points as `{lat_deg, lon_deg}` objects instead of `[lon, lat]` pairs; ports' `lat`
/// and `lon` became `position`; `boats` became `vessels`, `speed_kt` became
/// `cruise_speed_kt`, and fuel use (unknown in version 0) starts at 0 l/h.
fn migrate_v0(mut v: Value) -> Value {
    let pair = |p: &Value| json!({"lat_deg": p.get(1).cloned().unwrap_or(Value::Null), "lon_deg": p.get(0).cloned().unwrap_or(Value::Null)});
    if let Some(Value::Array(coast)) = v.get_mut("coast").map(Value::take) {
        let segments: Vec<Value> = coast
            .into_iter()
            .map(|mut s| {
                if let Some(Value::Array(points)) = s.get_mut("points").map(Value::take) {
                    s["points"] = Value::Array(points.iter().map(pair).collect());
                }
                s
            })
            .collect();
        v["segments"] = Value::Array(segments);
    }
    // Entries that are not objects are left as they are, for validation to name.
    if let Some(Value::Array(ports)) = v.get_mut("ports") {
        for p in ports.iter_mut() {
            if let Value::Object(port) = p {
                let lat = port.get("lat").cloned().unwrap_or(Value::Null);
                let lon = port.get("lon").cloned().unwrap_or(Value::Null);
                port.insert("position".into(), json!({"lat_deg": lat, "lon_deg": lon}));
            }
        }
    }
    if let Some(Value::Array(boats)) = v.get_mut("boats").map(Value::take) {
        let vessels: Vec<Value> = boats
            .into_iter()
            .map(|mut b| {
                if let Value::Object(boat) = &mut b {
                    let speed = boat.get("speed_kt").cloned().unwrap_or(Value::Null);
                    boat.insert("cruise_speed_kt".into(), speed);
                    boat.entry("fuel_l_per_h").or_insert(json!(0.0));
                }
                b
            })
            .collect();
        v["vessels"] = Value::Array(vessels);
    }
    v
}

/// The largest scenario file read, bytes: a co-op's coast of a thousand segments with
/// long notes takes well under a megabyte.
pub const MAX_SCENARIO_BYTES: u64 = 16 * 1024 * 1024;

fn too_large(len: u64) -> ScenarioError {
    ScenarioError::Invalid(format!(
        "the file is {:.1} MB, larger than the {} MB a scenario may be",
        len as f64 / 1_048_576.0,
        MAX_SCENARIO_BYTES / 1_048_576
    ))
}

/// Parses scenario text: checks the format and version, migrates older versions and
/// validates every value. Text over [`MAX_SCENARIO_BYTES`] is refused unread.
pub fn parse_scenario(text: &str) -> Result<Scenario, ScenarioError> {
    if text.len() as u64 > MAX_SCENARIO_BYTES {
        return Err(too_large(text.len() as u64));
    }
    if text.trim().is_empty() {
        return Err(ScenarioError::Invalid(format!(
            "the file is empty: expected a Shelfwind scenario (JSON with \"format\": \"{FORMAT_NAME}\")"
        )));
    }
    let value: Value = serde_json::from_str(text).map_err(|e| json_error(&e))?;
    if value.get("format").and_then(Value::as_str) != Some(FORMAT_NAME) {
        return Err(ScenarioError::NotScenario);
    }
    let version = value
        .get("version")
        .and_then(Value::as_u64)
        .ok_or_else(|| {
            ScenarioError::Invalid("\"version\" is missing or not a whole number".into())
        })?;
    let scenario: Scenario = match version {
        0 => serde_json::from_value(migrate_v0(value))
            .map_err(|e| ScenarioError::Invalid(format!("after migrating from version 0: {e}")))?,
        1 => serde_json::from_str(text).map_err(|e| json_error(&e))?,
        found => return Err(ScenarioError::NewerVersion { found }),
    };
    scenario.validate().map_err(ScenarioError::Invalid)?;
    Ok(scenario)
}

/// The JSON text of a scenario, as saved.
pub fn scenario_to_json(scenario: &Scenario) -> Result<String, ScenarioError> {
    let mut v =
        serde_json::to_value(scenario).map_err(|e| ScenarioError::Invalid(e.to_string()))?;
    let mut out = serde_json::Map::new();
    out.insert("format".into(), json!(FORMAT_NAME));
    out.insert("version".into(), json!(FORMAT_VERSION));
    if let Value::Object(fields) = v.take() {
        out.extend(fields);
    }
    let mut text = serde_json::to_string_pretty(&Value::Object(out))
        .map_err(|e| ScenarioError::Invalid(e.to_string()))?;
    text.push('\n');
    Ok(text)
}

/// Reads a scenario file.
pub fn load_scenario(path: &Path) -> Result<Scenario, ScenarioError> {
    let wrap = |source: ScenarioError| ScenarioError::File {
        path: path.to_path_buf(),
        source: Box::new(source),
    };
    let len = std::fs::metadata(path).map_err(|e| wrap(e.into()))?.len();
    if len > MAX_SCENARIO_BYTES {
        return Err(wrap(too_large(len)));
    }
    let bytes = std::fs::read(path).map_err(|e| wrap(e.into()))?;
    let text = String::from_utf8(bytes)
        .map_err(|_| wrap(ScenarioError::Invalid("not UTF-8 text".into())))?;
    parse_scenario(&text).map_err(wrap)
}

/// Saves a scenario: validated first, written whole or not at all, the previous file
/// kept as `<name>.bak`.
pub fn save_scenario(path: &Path, scenario: &Scenario) -> Result<(), ScenarioError> {
    let wrap = |source: ScenarioError| ScenarioError::File {
        path: path.to_path_buf(),
        source: Box::new(source),
    };
    scenario
        .validate()
        .map_err(|e| wrap(ScenarioError::Invalid(e)))?;
    let text = scenario_to_json(scenario).map_err(wrap)?;
    save_with_backup(path, |f| f.write_all(text.as_bytes())).map_err(|e| wrap(e.into()))
}
