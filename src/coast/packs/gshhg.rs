//! GSHHG binary polygons (Wessel and Smith 1996; the layout of `gshhg.h` shipped with
//! GSHHG 2.x): records one after another, each a header of 11 big-endian int32 (id, n,
//! flag, west, east, south, north, area, area_full, container, ancestor) and n points of
//! two big-endian int32 (x = longitude, y = latitude) in micro-degrees. The level is
//! the low byte of the flag.
//!
//! Which rings are land: level 1 land, 2 lake, 3 island in a lake, 4 pond on such an
//! island. Each level lies inside one polygon of the level above, so a point inside a
//! level-k polygon is inside exactly k nested rings: under the even-odd rule levels 1
//! and 3 come out land and 2 and 4 water (lakes are water, unlike the bundled land),
//! with no need to sort rings into outers and holes. Level 5 (the Antarctic ice front)
//! is kept as land; level 6 (the Antarctic grounding line) is the same continent drawn a
//! second time, and would cancel it under even-odd, so it is passed over.

use super::{LandFileError, LandFileFormat, finish_ring};
use crate::coast::LatLon;

const FORMAT: LandFileFormat = LandFileFormat::Gshhg;
const HEADER_BYTES: usize = 44;
const MICRO: f64 = 1e-6;

struct Header {
    n: usize,
    level: u32,
}

fn header_at(bytes: &[u8], offset: usize) -> Option<(Header, [i32; 4])> {
    let word = |k: usize| -> Option<i32> {
        let b: [u8; 4] = bytes
            .get(offset + 4 * k..offset + 4 * k + 4)?
            .try_into()
            .ok()?;
        Some(i32::from_be_bytes(b))
    };
    let n = usize::try_from(word(1)?).ok()?;
    let level = (word(2)? & 0xff) as u32;
    Some((
        Header { n, level },
        [word(3)?, word(4)?, word(5)?, word(6)?],
    ))
}

/// A sane first record: a level 1 to 6, at least three points that fit in the file,
/// and an extent within −360..360 by −90..90 degrees, west ≤ east, south ≤ north.
pub(super) fn looks_like(bytes: &[u8]) -> bool {
    let Some((h, [west, east, south, north])) = header_at(bytes, 0) else {
        return false;
    };
    let fits =
        h.n.checked_mul(8)
            .and_then(|b| b.checked_add(HEADER_BYTES))
            .is_some_and(|b| b <= bytes.len());
    (1..=6).contains(&h.level)
        && h.n >= 3
        && fits
        && west <= east
        && south <= north
        && west >= -360_000_000
        && east <= 360_000_000
        && south >= -90_000_000
        && north <= 90_000_000
}

pub(super) fn read(bytes: &[u8]) -> Result<Vec<Vec<LatLon>>, LandFileError> {
    let mut rings = Vec::new();
    let mut offset = 0;
    let mut record = 0_usize;
    while offset < bytes.len() {
        let place = format!("record {record} at byte {offset}");
        let (h, _) = header_at(bytes, offset).ok_or_else(|| {
            LandFileError::bad(FORMAT, place.clone(), "header cut short: expected 44 bytes")
        })?;
        let points_at = offset + HEADER_BYTES;
        let end =
            h.n.checked_mul(8)
                .and_then(|b| b.checked_add(points_at))
                .filter(|&e| e <= bytes.len());
        let Some(end) = end else {
            return Err(LandFileError::bad(
                FORMAT,
                place,
                format!("{} points run past the end of the file", h.n),
            ));
        };
        if !(1..=6).contains(&h.level) {
            return Err(LandFileError::bad(
                FORMAT,
                place,
                format!("level {}: expected 1 to 6", h.level),
            ));
        }
        if h.level <= 5 {
            let ring = bytes[points_at..end]
                .chunks_exact(8)
                .map(|c| {
                    let x = i32::from_be_bytes([c[0], c[1], c[2], c[3]]);
                    let y = i32::from_be_bytes([c[4], c[5], c[6], c[7]]);
                    LatLon::new(f64::from(y) * MICRO, f64::from(x) * MICRO)
                })
                .collect();
            if let Some(ring) = finish_ring(FORMAT, &|| place.clone(), ring)? {
                rings.push(ring);
            }
        }
        offset = end;
        record += 1;
    }
    Ok(rings)
}
