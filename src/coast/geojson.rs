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

/// The coast error for text that is not JSON.
fn json_error(e: &serde_json::Error) -> CoastError {
    CoastError::Json {
        line: e.line(),
        column: e.column(),
        // The parser appends the position to its message; the error shows it apart.
        message: e
            .to_string()
            .split(" at line")
            .next()
            .unwrap_or_default()
            .to_string(),
    }
}

/// The `features` array of a FeatureCollection.
fn feature_list(root: &Value) -> Result<&Vec<Value>, CoastError> {
    if root.get("type").and_then(Value::as_str) != Some("FeatureCollection") {
        return Err(CoastError::NotFeatureCollection {
            found: describe(root),
        });
    }
    root.get("features")
        .and_then(Value::as_array)
        .ok_or_else(|| CoastError::NotFeatureCollection {
            found: "a FeatureCollection without a \"features\" array".into(),
        })
}

/// Reads coast segments from GeoJSON text.
pub fn read_coast_geojson(text: &str) -> Result<Vec<CoastSegment>, CoastError> {
    if text.trim().is_empty() {
        return Err(CoastError::NotFeatureCollection {
            found: "an empty file".into(),
        });
    }
    let root: Value = serde_json::from_str(text).map_err(|e| json_error(&e))?;
    let features = feature_list(&root)?;
    let mut segments = Vec::with_capacity(features.len());
    let mut seen: HashMap<String, usize> = HashMap::new();
    for (k, feature) in features.iter().enumerate() {
        segments.push(FeatureReader::new(k + 1, feature).read(&mut seen)?);
    }
    if segments.is_empty() {
        return Err(CoastError::Empty);
    }
    Ok(segments)
}

/// One feature being turned into a coast segment.
struct FeatureReader<'a> {
    /// 1-based position in the `features` array.
    number: usize,
    /// ` ("id")` when the feature has a string id, else empty.
    label: String,
    feature: &'a Value,
    props: Option<&'a Map<String, Value>>,
}

impl<'a> FeatureReader<'a> {
    /// Prepares to read feature `number` (1-based).
    fn new(number: usize, feature: &'a Value) -> Self {
        let props = feature.get("properties").and_then(Value::as_object);
        let label = match props.and_then(|p| p.get("id")) {
            Some(Value::String(s)) => format!(" ({s:?})"),
            _ => String::new(),
        };
        Self {
            number,
            label,
            feature,
            props,
        }
    }

    /// An error about this feature.
    fn fail(&self, problem: String) -> CoastError {
        CoastError::Feature {
            number: self.number,
            label: self.label.clone(),
            problem,
        }
    }

    /// A property, `None` when absent.
    fn prop(&self, key: &str) -> Option<&'a Value> {
        self.props.and_then(|p| p.get(key))
    }

    /// The segment, with its id recorded in `seen` so a later feature cannot reuse it.
    fn read(&self, seen: &mut HashMap<String, usize>) -> Result<CoastSegment, CoastError> {
        let id = self.id()?;
        if let Some(first) = seen.insert(id.clone(), self.number) {
            return Err(self.fail(format!("id {id:?} is already used by feature {first}")));
        }
        let points = self.line()?;
        let sea = self.sea()?;
        let closure = self.closure()?;
        Ok(CoastSegment {
            id,
            name: self.text("name")?,
            points,
            sea,
            notes: self.text("notes")?,
            closure,
        })
    }

    /// The `id` property, or `seg-<n>` when there is none.
    fn id(&self) -> Result<String, CoastError> {
        match self.prop("id") {
            None | Some(Value::Null) => Ok(format!("seg-{}", self.number)),
            Some(Value::String(s)) if !s.trim().is_empty() => Ok(s.trim().to_string()),
            Some(other) => Err(self.fail(format!(
                "property \"id\" is {}: expected a non-empty string",
                describe(other)
            ))),
        }
    }

    /// The positions of the LineString geometry.
    fn line(&self) -> Result<Vec<LatLon>, CoastError> {
        let geometry = self
            .feature
            .get("geometry")
            .ok_or_else(|| self.fail("no \"geometry\": expected a LineString".into()))?;
        let kind = geometry.get("type").and_then(Value::as_str).unwrap_or("");
        if kind != "LineString" {
            return Err(self.fail(format!(
                "geometry is {}: expected a LineString",
                describe(geometry)
            )));
        }
        let coords = geometry
            .get("coordinates")
            .and_then(Value::as_array)
            .ok_or_else(|| self.fail("LineString without a \"coordinates\" array".into()))?;
        let points = coords
            .iter()
            .enumerate()
            .map(|(i, c)| {
                read_position(c).map_err(|p| self.fail(format!("coordinate {}: {p}", i + 1)))
            })
            .collect::<Result<Vec<_>, _>>()?;
        if !super::is_a_line(&points) {
            return Err(self.fail("a LineString needs at least two different positions".into()));
        }
        Ok(points)
    }

    /// A text property; empty when absent.
    fn text(&self, key: &str) -> Result<String, CoastError> {
        match self.prop(key) {
            None | Some(Value::Null) => Ok(String::new()),
            Some(Value::String(s)) => Ok(s.clone()),
            Some(other) => Err(self.fail(format!(
                "property {key:?} is {}: expected a string",
                describe(other)
            ))),
        }
    }

    /// A date property `YYYY-MM-DD`; `None` when absent or empty.
    fn date(&self, key: &str) -> Result<Option<NaiveDate>, CoastError> {
        let raw = self.text(key)?;
        if raw.is_empty() {
            return Ok(None);
        }
        NaiveDate::parse_from_str(&raw, "%Y-%m-%d")
            .map(Some)
            .map_err(|_| {
                self.fail(format!(
                    "property {key:?} is {raw:?}: expected a date YYYY-MM-DD"
                ))
            })
    }

    /// The `sea` property; `None` leaves the side to be found from the land.
    fn sea(&self) -> Result<Option<SeaSide>, CoastError> {
        match self.prop("sea") {
            Some(Value::String(s)) if s.eq_ignore_ascii_case("left") => Ok(Some(SeaSide::Left)),
            Some(Value::String(s)) if s.eq_ignore_ascii_case("right") => Ok(Some(SeaSide::Right)),
            None | Some(Value::Null) => Ok(None),
            Some(other) => Err(self.fail(format!(
                "property \"sea\" is {}: expected \"left\" or \"right\"",
                describe(other)
            ))),
        }
    }

    /// The closure to fishing, when the `closed` property is true.
    fn closure(&self) -> Result<Option<Closure>, CoastError> {
        let closed = match self.prop("closed") {
            None | Some(Value::Null | Value::Bool(false)) => false,
            Some(Value::Bool(true)) => true,
            Some(other) => {
                return Err(self.fail(format!(
                    "property \"closed\" is {}: expected true or false",
                    describe(other)
                )));
            }
        };
        if !closed {
            return Ok(None);
        }
        Ok(Some(Closure {
            reason: self.text("closed_reason")?,
            from: self.date("closed_from")?,
            to: self.date("closed_to")?,
        }))
    }
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
        .ok_or_else(|| match c.as_array() {
            Some(a) => format!(
                "an array of {} value{}: expected [longitude, latitude]",
                a.len(),
                if a.len() == 1 { "" } else { "s" }
            ),
            None => format!("{}: expected [longitude, latitude]", describe(c)),
        })?;
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

    /// An empty file (or one of blanks) is called empty, for the coast and for the
    /// scenario, not left to the JSON parser's "EOF while parsing a value".
    #[test]
    fn an_empty_file_is_called_empty() {
        for text in ["", " \n\t"] {
            assert_eq!(
                read_coast_geojson(text).unwrap_err().to_string(),
                "expected a GeoJSON FeatureCollection, found an empty file"
            );
            let e = crate::scenario::parse_scenario(text)
                .unwrap_err()
                .to_string();
            assert!(
                e.starts_with("the file is empty: expected a Shelfwind scenario"),
                "{e}"
            );
        }
    }

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
