//! Reading coast segments from a GeoJSON FeatureCollection (RFC 7946) of LineStrings.
//!
//! Feature property `id` (string) names the segment (default `seg-<n>`, n from 1);
//! property `sea` = `"left"` or `"right"` says on which side of the line, walking from
//! its first point to its last, the sea lies.

use super::{LatLon, SeaSide, Segment};
use serde_json::Value;
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
pub fn read_coast_geojson(text: &str) -> Result<Vec<Segment>, CoastError> {
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
        let sea = match props.and_then(|p| p.get("sea")) {
            Some(Value::String(s)) if s.eq_ignore_ascii_case("left") => SeaSide::Left,
            Some(Value::String(s)) if s.eq_ignore_ascii_case("right") => SeaSide::Right,
            None | Some(Value::Null) => {
                return Err(fail(
                    "no \"sea\" property: expected \"left\" or \"right\" (the side of the sea, walking from the first point to the last)"
                        .into(),
                ));
            }
            Some(other) => {
                return Err(fail(format!(
                    "property \"sea\" is {}: expected \"left\" or \"right\"",
                    describe(other)
                )));
            }
        };
        segments.push(Segment { id, points, sea });
    }
    if segments.is_empty() {
        return Err(CoastError::Empty);
    }
    Ok(segments)
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
        assert_eq!(segs[0].sea, SeaSide::Left);
        assert_eq!(segs[0].points[1], LatLon::new(36.2, -122.0));
        assert_eq!(segs[1].id, "seg-2");
        assert_eq!(segs[1].sea, SeaSide::Right);
    }

    #[test]
    fn errors_name_the_feature_and_what_was_expected() {
        let no_sea = LINE.replace(r#","sea":"left""#, "");
        assert_eq!(
            read_coast_geojson(&fc(&no_sea)).unwrap_err().to_string(),
            "feature 1 (\"north\"): no \"sea\" property: expected \"left\" or \"right\" (the side of the sea, walking from the first point to the last)"
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
