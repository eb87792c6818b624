//! GeoJSON (RFC 7946) land: Polygons and MultiPolygons in a FeatureCollection, a
//! Feature, a GeometryCollection or a bare geometry. Holes are kept as rings (the
//! even-odd rule makes them water); other geometries (points, lines) are passed over.

use serde_json::Value;

use super::{LandFileError, LandFileFormat, finish_ring};
use crate::coast::LatLon;

const FORMAT: LandFileFormat = LandFileFormat::GeoJson;

/// GeoJSON is text whose first non-blank character opens an object.
pub(super) fn looks_like(bytes: &[u8]) -> bool {
    let bytes = bytes.strip_prefix(b"\xef\xbb\xbf").unwrap_or(bytes);
    bytes.iter().find(|b| !b.is_ascii_whitespace()) == Some(&b'{')
}

pub(super) fn read(bytes: &[u8]) -> Result<Vec<Vec<LatLon>>, LandFileError> {
    let bytes = bytes.strip_prefix(b"\xef\xbb\xbf").unwrap_or(bytes);
    let value: Value = serde_json::from_slice(bytes).map_err(|e| {
        LandFileError::bad(
            FORMAT,
            format!("line {}, column {}", e.line(), e.column()),
            format!("{e}: expected JSON text"),
        )
    })?;
    let mut rings = Vec::new();
    match kind(&value) {
        "FeatureCollection" => {
            let features = value
                .get("features")
                .and_then(Value::as_array)
                .ok_or_else(|| {
                    LandFileError::bad(FORMAT, "the FeatureCollection", "no \"features\" array")
                })?;
            for (i, feature) in features.iter().enumerate() {
                feature_rings(feature, &format!("feature {i}"), &mut rings)?;
            }
        }
        "Feature" => feature_rings(&value, "the feature", &mut rings)?,
        _ => geometry_rings(&value, "the geometry", &mut rings, 0)?,
    }
    Ok(rings)
}

fn kind(value: &Value) -> &str {
    value.get("type").and_then(Value::as_str).unwrap_or("")
}

fn feature_rings(
    feature: &Value,
    place: &str,
    rings: &mut Vec<Vec<LatLon>>,
) -> Result<(), LandFileError> {
    if kind(feature) != "Feature" {
        return Err(LandFileError::bad(
            FORMAT,
            place,
            "expected an object of type \"Feature\"",
        ));
    }
    match feature.get("geometry") {
        None | Some(Value::Null) => Ok(()),
        Some(geometry) => geometry_rings(geometry, place, rings, 0),
    }
}

fn geometry_rings(
    geometry: &Value,
    place: &str,
    rings: &mut Vec<Vec<LatLon>>,
    depth: usize,
) -> Result<(), LandFileError> {
    let coordinates = geometry.get("coordinates");
    match kind(geometry) {
        "Polygon" => polygon_rings(coordinates, place, rings),
        "MultiPolygon" => {
            let polygons = coordinates.and_then(Value::as_array).ok_or_else(|| {
                LandFileError::bad(
                    FORMAT,
                    place,
                    "MultiPolygon without a \"coordinates\" array",
                )
            })?;
            for (k, polygon) in polygons.iter().enumerate() {
                polygon_rings(Some(polygon), &format!("{place}, polygon {k}"), rings)?;
            }
            Ok(())
        }
        // RFC 7946 advises against nesting collections; one level is read.
        "GeometryCollection" if depth == 0 => {
            let members = geometry.get("geometries").and_then(Value::as_array);
            for (k, member) in members.into_iter().flatten().enumerate() {
                geometry_rings(member, &format!("{place}, geometry {k}"), rings, 1)?;
            }
            Ok(())
        }
        "Point" | "MultiPoint" | "LineString" | "MultiLineString" => Ok(()),
        other => Err(LandFileError::bad(
            FORMAT,
            place,
            format!("geometry type {other:?}: expected Polygon or MultiPolygon"),
        )),
    }
}

fn polygon_rings(
    coordinates: Option<&Value>,
    place: &str,
    rings: &mut Vec<Vec<LatLon>>,
) -> Result<(), LandFileError> {
    let polygon = coordinates.and_then(Value::as_array).ok_or_else(|| {
        LandFileError::bad(FORMAT, place, "Polygon without a \"coordinates\" array")
    })?;
    for (r, ring) in polygon.iter().enumerate() {
        let ring_place = || format!("{place}, ring {r}");
        let positions = ring.as_array().ok_or_else(|| {
            LandFileError::bad(FORMAT, ring_place(), "expected an array of positions")
        })?;
        let mut points = Vec::with_capacity(positions.len());
        for (k, position) in positions.iter().enumerate() {
            let xy = position
                .as_array()
                .and_then(|a| Some((a.first()?.as_f64()?, a.get(1)?.as_f64()?)));
            let Some((lon, lat)) = xy else {
                return Err(LandFileError::bad(
                    FORMAT,
                    format!("{}, position {k}", ring_place()),
                    "expected [longitude, latitude] numbers",
                ));
            };
            points.push(LatLon::new(lat, lon));
        }
        if let Some(ring) = finish_ring(FORMAT, &ring_place, points)? {
            rings.push(ring);
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bare_feature_and_collection_forms_are_read() {
        let square = r#"{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}"#;
        assert_eq!(read(square.as_bytes()).expect("bare").len(), 1);
        let feature = format!(r#"{{"type":"Feature","properties":{{}},"geometry":{square}}}"#);
        assert_eq!(read(feature.as_bytes()).expect("feature")[0].len(), 4);
        let collection = format!(
            r#"{{"type":"GeometryCollection","geometries":[{square},{{"type":"Point","coordinates":[0,0]}}]}}"#
        );
        assert_eq!(read(collection.as_bytes()).expect("collection").len(), 1);
    }

    #[test]
    fn errors_name_the_place() {
        let err = read(br#"{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Polygon","coordinates":[[[0,0],[1,"x"],[1,1],[0,0]]]}}]}"#)
            .expect_err("bad position");
        assert_eq!(
            err.to_string(),
            "GeoJSON: feature 0, ring 0, position 1: expected [longitude, latitude] numbers"
        );
        let err = read(b"{\n\"type\": ").expect_err("truncated");
        assert!(
            err.to_string().starts_with("GeoJSON: line 2, column"),
            "{err}"
        );
        let err = read(br#"{"type":"Polygon","coordinates":[[[0,0],[500000,0],[1,1],[0,0]]]}"#)
            .expect_err("projected");
        assert!(
            err.to_string()
                .contains("ring 0, position 1: longitude 500000"),
            "{err}"
        );
    }
}
