//! Coast segments in and out of a GeoJSON FeatureCollection (RFC 7946) of LineStrings.
//!
//! Feature property `id` (string) names the segment (default `seg-<n>`, n from 1);
//! property `sea` = `"left"` or `"right"` says on which side of the line, walking from
//! its first point to its last, the sea lies (absent: found from the land). Optional
//! properties: `name`, `notes`, and a closure to fishing as `closed` (true),
//! `closed_reason`, `closed_from` and `closed_to` (dates `YYYY-MM-DD`).

use super::{Closure, CoastSegment, LatLon, SeaSide};
use chrono::NaiveDate;
use serde_json::{Map, Value, json};
use std::collections::HashMap;

/// Why a coast file could not be read. The file path is added by the caller.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum CoastError {
    /// Not JSON at all.
    #[error("line {line}, column {column}: not valid JSON: {message}")]
    Json {
        /// 1-based line.
        line: usize,
        /// 1-based column.
        column: usize,
        /// What the JSON parser said.
        message: String,
    },
    /// JSON, but not a FeatureCollection.
    #[error("expected a GeoJSON FeatureCollection, found {found}")]
    NotFeatureCollection {
        /// What the top level was.
        found: String,
    },
    /// A feature that cannot be a coast segment.
    #[error("feature {number}{label}: {problem}")]
    Feature {
        /// 1-based position in the `features` array.
        number: usize,
        /// ` ("id")` when the feature has an id, else empty.
        label: String,
        /// What is wrong with it.
        problem: String,
    },
    /// No LineString features at all.
    #[error(
        "the FeatureCollection has no LineString features: expected at least one coast segment"
    )]
    Empty,
}

fn describe(v: &Value) -> String {
    match v {
        Value::Null => "null".into(),
        Value::Bool(_) => "a boolean".into(),
        Value::Number(_) => "a number".into(),
        Value::String(s) => format!("the string {s:?}"),
        Value::Array(_) => "an array".into(),
        Value::Object(o) => match o.get("type").and_then(Value::as_str) {
            Some(t) => format!("a {t} object"),
            None => "an object without \"type\"".into(),
        },
    }
}

/// Reads coast segments from GeoJSON text.
pub fn read_coast_geojson(text: &str) -> Result<Vec<CoastSegment>, CoastError> {
    let root: Value = serde_json::from_str(text).map_err(|e| CoastError::Json {
        line: e.line(),
        column: e.column(),
        message: e
            .to_string()
            .split(" at line")
            .next()
            .unwrap_or_default()
            .to_string(),
    })?;
    if root.get("type").and_then(Value::as_str) != Some("FeatureCollection") {
        return Err(CoastError::NotFeatureCollection {
            found: describe(&root),
        });
    }
    let features = root
        .get("features")
        .and_then(Value::as_array)
        .ok_or_else(|| CoastError::NotFeatureCollection {
            found: "a FeatureCollection without a \"features\" array".into(),
        })?;
    let mut segments = Vec::with_capacity(features.len());
    let mut seen: HashMap<String, usize> = HashMap::new();
    for (k, feature) in features.iter().enumerate() {
        let number = k + 1;
        let props = feature.get("properties").and_then(Value::as_object);
        let id_value = props.and_then(|p| p.get("id"));
        let label = match id_value {
            Some(Value::String(s)) => format!(" ({s:?})"),
            _ => String::new(),
        };
        let fail = |problem: String| CoastError::Feature {
            number,
            label: label.clone(),
            problem,
        };
        let id = match id_value {
            None | Some(Value::Null) => format!("seg-{number}"),
            Some(Value::String(s)) if !s.trim().is_empty() => s.trim().to_string(),
            Some(other) => {
                return Err(fail(format!(
                    "property \"id\" is {}: expected a non-empty string",
                    describe(other)
                )));
            }
        };
        if let Some(first) = seen.insert(id.clone(), number) {
            return Err(fail(format!(
                "id {id:?} is already used by feature {first}"
            )));
        }
        let geometry = feature
            .get("geometry")
            .ok_or_else(|| fail("no \"geometry\": expected a LineString".into()))?;
        let kind = geometry.get("type").and_then(Value::as_str).unwrap_or("");
        if kind != "LineString" {
            return Err(fail(format!(
                "geometry is {}: expected a LineString",
                describe(geometry)
            )));
        }
        let coords = geometry
            .get("coordinates")
            .and_then(Value::as_array)
            .ok_or_else(|| fail("LineString without a \"coordinates\" array".into()))?;
        let points = coords
            .iter()
            .enumerate()
            .map(|(i, c)| read_position(c).map_err(|p| fail(format!("coordinate {}: {p}", i + 1))))
            .collect::<Result<Vec<_>, _>>()?;
        let mut distinct = points.clone();
        distinct.dedup();
        if distinct.len() < 2 {
            return Err(fail(
                "a LineString needs at least two different positions".into(),
            ));
        }
        let text_prop = |key: &str| -> Result<String, CoastError> {
            match props.and_then(|p| p.get(key)) {
                None | Some(Value::Null) => Ok(String::new()),
                Some(Value::String(s)) => Ok(s.clone()),
                Some(other) => Err(fail(format!(
                    "property {key:?} is {}: expected a string",
                    describe(other)
                ))),
            }
        };
        let sea = match props.and_then(|p| p.get("sea")) {
            Some(Value::String(s)) if s.eq_ignore_ascii_case("left") => Some(SeaSide::Left),
            Some(Value::String(s)) if s.eq_ignore_ascii_case("right") => Some(SeaSide::Right),
            None | Some(Value::Null) => None,
            Some(other) => {
                return Err(fail(format!(
                    "property \"sea\" is {}: expected \"left\" or \"right\"",
                    describe(other)
                )));
            }
        };
        let date_prop = |key: &str| -> Result<Option<NaiveDate>, CoastError> {
            let raw = text_prop(key)?;
            if raw.is_empty() {
                return Ok(None);
            }
            NaiveDate::parse_from_str(&raw, "%Y-%m-%d")
                .map(Some)
                .map_err(|_| {
                    fail(format!(
                        "property {key:?} is {raw:?}: expected a date YYYY-MM-DD"
                    ))
                })
        };
        let closed = match props.and_then(|p| p.get("closed")) {
            None | Some(Value::Null | Value::Bool(false)) => false,
            Some(Value::Bool(true)) => true,
            Some(other) => {
                return Err(fail(format!(
                    "property \"closed\" is {}: expected true or false",
                    describe(other)
                )));
            }
        };
        let closure = if closed {
            Some(Closure {
                reason: text_prop("closed_reason")?,
                from: date_prop("closed_from")?,
                to: date_prop("closed_to")?,
            })
        } else {
            None
        };
        segments.push(CoastSegment {
            id,
            name: text_prop("name")?,
            points,
            sea,
            notes: text_prop("notes")?,
            closure,
        });
    }
    if segments.is_empty() {
        return Err(CoastError::Empty);
    }
    Ok(segments)
}

/// Writes coast segments as a GeoJSON FeatureCollection that [`read_coast_geojson`]
/// reads back to the same segments.
#[must_use]
pub fn write_coast_geojson(segments: &[CoastSegment]) -> String {
    let features: Vec<Value> = segments
        .iter()
        .map(|s| {
            let mut props = Map::new();
            props.insert("id".into(), json!(s.id));
            if !s.name.is_empty() {
                props.insert("name".into(), json!(s.name));
            }
            if let Some(sea) = s.sea {
                props.insert("sea".into(), json!(if sea == SeaSide::Left { "left" } else { "right" }));
            }
            if !s.notes.is_empty() {
                props.insert("notes".into(), json!(s.notes));
            }
            if let Some(c) = &s.closure {
                props.insert("closed".into(), json!(true));
                props.insert("closed_reason".into(), json!(c.reason));
                if let Some(d) = c.from {
                    props.insert("closed_from".into(), json!(d.to_string()));
                }
                if let Some(d) = c.to {
                    props.insert("closed_to".into(), json!(d.to_string()));
                }
            }
            let coords: Vec<Value> = s.points.iter().map(|p| json!([p.lon_deg, p.lat_deg])).collect();
            json!({"type": "Feature", "properties": props, "geometry": {"type": "LineString", "coordinates": coords}})
        })
        .collect();
    let mut text =
        serde_json::to_string_pretty(&json!({"type": "FeatureCollection", "features": features}))
            .unwrap_or_default();
    text.push('\n');
    text
}

/// A GeoJSON position `[lon, lat]` (RFC 7946 order), checked for range.
fn read_position(c: &Value) -> Result<LatLon, String> {
    let arr = c
        .as_array()
        .filter(|a| a.len() >= 2)
        .ok_or_else(|| format!("{}: expected [longitude, latitude]", describe(c)))?;
    let lon = arr[0].as_f64().ok_or("longitude is not a number")?;
    let lat = arr[1].as_f64().ok_or("latitude is not a number")?;
    if !(-90.0..=90.0).contains(&lat) {
        return Err(format!(
            "latitude {lat} is out of range −90..90 (GeoJSON positions are [longitude, latitude])"
        ));
    }
    if !(-180.0..=180.0).contains(&lon) {
        return Err(format!("longitude {lon} is out of range −180..180"));
    }
    Ok(LatLon::new(lat, lon))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn fc(features: &str) -> String {
        format!(r#"{{"type":"FeatureCollection","features":[{features}]}}"#)
    }

    const LINE: &str = r#"{"type":"Feature","properties":{"id":"north","sea":"left"},
        "geometry":{"type":"LineString","coordinates":[[-122.0,36.0],[-122.0,36.2]]}}"#;

    #[test]
    fn reads_ids_sides_and_default_names() {
        let second = r#"{"type":"Feature","properties":{"sea":"right"},
            "geometry":{"type":"LineString","coordinates":[[-122.0,36.2],[-122.1,36.4]]}}"#;
        let segs = read_coast_geojson(&fc(&format!("{LINE},{second}"))).expect("valid");
        assert_eq!(segs.len(), 2);
        assert_eq!(segs[0].id, "north");
        assert_eq!(segs[0].sea, Some(SeaSide::Left));
        assert_eq!(segs[0].points[1], LatLon::new(36.2, -122.0));
        assert_eq!(segs[1].id, "seg-2");
        assert_eq!(segs[1].sea, Some(SeaSide::Right));
    }

    #[test]
    fn missing_sea_is_left_to_the_land() {
        let no_sea = LINE.replace(r#","sea":"left""#, "");
        assert_eq!(
            read_coast_geojson(&fc(&no_sea)).expect("valid")[0].sea,
            None
        );
    }

    /// Export then import gives back exactly the same segments, every field and every
    /// coordinate bit for bit.
    #[test]
    fn round_trip_is_exact() {
        let segs = vec![
            CoastSegment {
                id: "a".into(),
                name: "Kelp Shelf".into(),
                points: vec![
                    LatLon::new(38.123_456_789_012_3, -123.000_000_000_1),
                    LatLon::new(38.2, -123.1),
                ],
                sea: Some(SeaSide::Left),
                notes: "rocky; \"quotes\" and ünïcode".into(),
                closure: Some(Closure {
                    reason: "marine reserve".into(),
                    from: NaiveDate::from_ymd_opt(2027, 5, 1),
                    to: None,
                }),
            },
            CoastSegment {
                id: "b".into(),
                name: String::new(),
                points: vec![
                    LatLon::new(0.1 + 0.2, 1.0 / 3.0),
                    LatLon::new(-45.5, 179.999_999),
                ],
                sea: None,
                notes: String::new(),
                closure: None,
            },
        ];
        let text = write_coast_geojson(&segs);
        assert_eq!(read_coast_geojson(&text).expect("reads back"), segs);
    }

    #[test]
    fn errors_name_the_feature_and_what_was_expected() {
        let bad_sea = LINE.replace(r#""sea":"left""#, r#""sea":"west""#);
        assert_eq!(
            read_coast_geojson(&fc(&bad_sea)).unwrap_err().to_string(),
            "feature 1 (\"north\"): property \"sea\" is the string \"west\": expected \"left\" or \"right\""
        );
        let bad_date = LINE.replace(
            r#""sea":"left""#,
            r#""closed":true,"closed_to":"31/05/2027""#,
        );
        assert_eq!(
            read_coast_geojson(&fc(&bad_date)).unwrap_err().to_string(),
            "feature 1 (\"north\"): property \"closed_to\" is \"31/05/2027\": expected a date YYYY-MM-DD"
        );
        let polygon = LINE.replace("LineString", "Polygon");
        assert_eq!(
            read_coast_geojson(&fc(&polygon)).unwrap_err().to_string(),
            "feature 1 (\"north\"): geometry is a Polygon object: expected a LineString"
        );
        let swapped = LINE.replace("[-122.0,36.0]", "[36.0,-122.0]");
        assert_eq!(
            read_coast_geojson(&fc(&swapped)).unwrap_err().to_string(),
            "feature 1 (\"north\"): coordinate 1: latitude -122 is out of range −90..90 (GeoJSON positions are [longitude, latitude])"
        );
        let dup = format!("{LINE},{LINE}");
        assert_eq!(
            read_coast_geojson(&fc(&dup)).unwrap_err().to_string(),
            "feature 2 (\"north\"): id \"north\" is already used by feature 1"
        );
        assert_eq!(
            read_coast_geojson("{\"type\":\"Feature\"}")
                .unwrap_err()
                .to_string(),
            "expected a GeoJSON FeatureCollection, found a Feature object"
        );
        let e = read_coast_geojson("{\n  \"type\": ,").unwrap_err();
        assert!(matches!(e, CoastError::Json { line: 2, .. }), "{e:?}");
        assert_eq!(read_coast_geojson(&fc("")).unwrap_err(), CoastError::Empty);
    }
}
