//! ESRI Shapefile polygons (ESRI Shapefile Technical Description, July 1998): the main
//! file (`.shp`) alone is read, record after record; the index (`.shx`) and attributes
//! (`.dbf`) are not needed. Polygon, PolygonZ and PolygonM records are land; every part
//! is a ring (ESRI orders outer rings clockwise and holes anticlockwise; the even-odd
//! rule needs no order). Read here rather than through a crate so that every count in
//! the file is checked against the bytes that are really there before anything is
//! allocated.

use super::{LandFileError, LandFileFormat, finish_ring};
use crate::coast::LatLon;

const FORMAT: LandFileFormat = LandFileFormat::Shapefile;
const FILE_CODE: i32 = 9994;
const HEADER_BYTES: usize = 100;

/// A Shapefile starts with the big-endian file code 9994.
pub(super) fn looks_like(bytes: &[u8]) -> bool {
    bytes.get(..4).is_some_and(|b| b == FILE_CODE.to_be_bytes())
}

fn int_at(bytes: &[u8], offset: usize, big_endian: bool) -> Option<i32> {
    let b: [u8; 4] = bytes.get(offset..offset + 4)?.try_into().ok()?;
    Some(if big_endian {
        i32::from_be_bytes(b)
    } else {
        i32::from_le_bytes(b)
    })
}

fn f64_at(bytes: &[u8], offset: usize) -> Option<f64> {
    let b: [u8; 8] = bytes.get(offset..offset + 8)?.try_into().ok()?;
    Some(f64::from_le_bytes(b))
}

fn shape_name(t: i32) -> &'static str {
    match t {
        0 => "Null",
        1 | 11 | 21 => "Point",
        3 | 13 | 23 => "PolyLine",
        5 | 15 | 25 => "Polygon",
        8 | 18 | 28 => "MultiPoint",
        31 => "MultiPatch",
        _ => "unknown",
    }
}

pub(super) fn read(bytes: &[u8]) -> Result<Vec<Vec<LatLon>>, LandFileError> {
    let header_err =
        || LandFileError::bad(FORMAT, "byte 0", "the 100-byte file header is cut short");
    if bytes.len() < HEADER_BYTES {
        return Err(header_err());
    }
    let shape_type = int_at(bytes, 32, false).ok_or_else(header_err)?;
    if ![5, 15, 25].contains(&shape_type) {
        return Err(LandFileError::bad(
            FORMAT,
            "file header",
            format!(
                "shape type {shape_type} ({}): expected polygons (5, 15 or 25)",
                shape_name(shape_type)
            ),
        ));
    }
    let mut rings = Vec::new();
    let mut offset = HEADER_BYTES;
    let mut record = 0_usize;
    while offset < bytes.len() {
        record += 1;
        let place = format!("record {record} at byte {offset}");
        let (Some(_number), Some(words)) =
            (int_at(bytes, offset, true), int_at(bytes, offset + 4, true))
        else {
            return Err(LandFileError::bad(
                FORMAT,
                place,
                "record header cut short: expected 8 bytes",
            ));
        };
        let length = usize::try_from(words).ok().map(|w| w * 2);
        let content = length
            .and_then(|n| bytes.get(offset + 8..(offset + 8).checked_add(n)?))
            .ok_or_else(|| {
                LandFileError::bad(
                    FORMAT,
                    place.clone(),
                    format!("content length {words} words runs past the end of the file"),
                )
            })?;
        polygon_record(content, &place, &mut rings)?;
        offset += 8 + content.len();
    }
    Ok(rings)
}

/// One record's content: a null shape, or a polygon whose counts fit in the content.
fn polygon_record(
    content: &[u8],
    place: &str,
    rings: &mut Vec<Vec<LatLon>>,
) -> Result<(), LandFileError> {
    let bad = |problem: String| LandFileError::bad(FORMAT, place, problem);
    let shape = int_at(content, 0, false)
        .ok_or_else(|| bad("empty record: expected a shape type".into()))?;
    if shape == 0 {
        return Ok(());
    }
    if ![5, 15, 25].contains(&shape) {
        return Err(bad(format!(
            "shape type {shape} ({}): expected a polygon",
            shape_name(shape)
        )));
    }
    let (Some(parts), Some(points)) = (int_at(content, 36, false), int_at(content, 40, false))
    else {
        return Err(bad(
            "polygon record cut short: expected its part and point counts".into(),
        ));
    };
    let (Ok(parts), Ok(points)) = (usize::try_from(parts), usize::try_from(points)) else {
        return Err(bad(format!(
            "{parts} parts, {points} points: expected counts of 0 or more"
        )));
    };
    let points_at = 44 + 4 * parts.min(content.len());
    if points_at + 16 * points.min(content.len()) > content.len() {
        return Err(bad(format!(
            "{parts} parts and {points} points do not fit in a record of {} bytes",
            content.len()
        )));
    }
    let starts: Vec<usize> = (0..parts)
        .map(|k| {
            int_at(content, 44 + 4 * k, false)
                .and_then(|s| usize::try_from(s).ok())
                .unwrap_or(usize::MAX)
        })
        .collect();
    for (k, &start) in starts.iter().enumerate() {
        let end = starts.get(k + 1).copied().unwrap_or(points);
        if start > end || end > points {
            return Err(bad(format!(
                "part {k} starts at point {start}: expected increasing starts below {points}"
            )));
        }
        let ring: Vec<LatLon> = (start..end)
            .filter_map(|i| {
                let at = points_at + 16 * i;
                Some(LatLon::new(f64_at(content, at + 8)?, f64_at(content, at)?))
            })
            .collect();
        if let Some(ring) = finish_ring(FORMAT, &|| format!("{place}, part {k}"), ring)? {
            rings.push(ring);
        }
    }
    Ok(())
}
