//! Land and sea from the bundled land polygons, and the sea side of a drawn coast line.
//!
//! The bundled file is Natural Earth 4.1.0 land at 1:10m (public domain), converted to a
//! compact ring format described in `assets/README.md`. Rings live in the plane of
//! longitude and latitude (degrees, longitudes in −180..180, none crossing the
//! antimeridian); a point is on land when a ray from it toward +longitude crosses an odd
//! number of ring edges (the even-odd rule, so holes such as the Caspian Sea need no
//! winding order). The edges sit in an R-tree so that each test looks only at the edges
//! the ray can meet.

use std::fmt;
use std::hash::{Hash, Hasher};
use std::sync::OnceLock;
use std::sync::atomic::{AtomicU8, Ordering};

use rstar::{AABB, RTree, RTreeObject};

use super::{LatLon, SeaSide, destination, distance_m, initial_bearing_deg, midpoint};

/// The first eight bytes of a land file.
const MAGIC: &[u8; 8] = b"SWLAND01";

/// Coordinates in a land file are integers in units of 1e-5 degree.
const UNITS_PER_DEGREE: f64 = 100_000.0;

/// The bundled land file (Natural Earth 4.1.0 land, 1:10m; see `assets/README.md`).
const BUNDLED_LAND_FILE: &[u8] = include_bytes!("../../assets/land-10m.bin");

/// Land polygons with a spatial index of their edges, for land-or-sea tests.
pub struct Land {
    rings: Vec<Vec<LatLon>>,
    edges: RTree<Edge>,
    /// Land or sea over each cell of a 0.1° grid that no edge comes near, found on
    /// first use: a point in such a cell is what the cell's centre is, without casting
    /// a ray across a continent.
    cells: OnceLock<Vec<AtomicU8>>,
    /// A hash of every ring's points, to tell one land from another.
    fingerprint: u64,
}

/// The size of the cells whose land or sea is remembered, degrees.
const CELL_DEG: f64 = 0.1;
const CELLS_X: usize = 3600;
const CELLS_Y: usize = 1800;
/// A cell not yet looked at; all sea; all land; crossed or nearly touched by an edge.
const CELL_UNKNOWN: u8 = 0;
const CELL_SEA: u8 = 1;
const CELL_LAND: u8 = 2;
const CELL_MIXED: u8 = 3;
/// How near an edge's box may come to a cell for the cell to count as free of edges,
/// degrees: far above rounding, far below any coastline's detail.
const CELL_MARGIN_DEG: f64 = 1e-9;
/// How many cells east of a point near an edge are looked at for one free of edges.
const EAST_CELLS: usize = 30;

impl Default for Land {
    /// No land at all: every point is sea.
    fn default() -> Self {
        Land::from_rings(Vec::new())
    }
}

/// Why a land file could not be read.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum LandError {
    /// The file does not start with `SWLAND01`.
    #[error("land file: bad magic: expected SWLAND01")]
    BadMagic,
    /// The file ends in the middle of a value.
    #[error("land file: truncated at byte {offset}: expected {expected}")]
    Truncated {
        /// Byte offset where the missing value should start.
        offset: usize,
        /// What was expected there.
        expected: &'static str,
    },
    /// The ring count is zero.
    #[error("land file: no rings: expected at least one")]
    NoRings,
    /// A ring has fewer than three points.
    #[error("land file: ring {ring}: {count} points: expected at least 3")]
    TooFewPoints {
        /// Index of the ring, from 0.
        ring: u32,
        /// The point count written in the file.
        count: u32,
    },
    /// A varint runs past ten bytes or past 64 bits.
    #[error("land file: varint at byte {offset} too long: expected at most 64 bits")]
    VarintTooLong {
        /// Byte offset where the varint starts.
        offset: usize,
    },
    /// A point lies outside −180..180 longitude or −90..90 latitude.
    #[error(
        "land file: ring {ring}, point {point}: position out of range: expected longitude -180..180 and latitude -90..90 degrees"
    )]
    OutOfRange {
        /// Index of the ring, from 0.
        ring: u32,
        /// Index of the point in the ring, from 0.
        point: u32,
    },
    /// Bytes follow the last ring.
    #[error(
        "land file: {count} bytes after the last ring at byte {offset}: expected the end of the file"
    )]
    TrailingBytes {
        /// Byte offset just after the last ring.
        offset: usize,
        /// How many bytes follow.
        count: usize,
    },
}

/// One ring edge in the plane of longitude (x) and latitude (y), degrees.
struct Edge {
    a: [f64; 2],
    b: [f64; 2],
    /// The box of `a` and `b`, made once: building the index compares boxes millions
    /// of times.
    envelope: AABB<[f64; 2]>,
}

impl RTreeObject for Edge {
    type Envelope = AABB<[f64; 2]>;

    fn envelope(&self) -> Self::Envelope {
        self.envelope
    }
}

impl fmt::Debug for Land {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_struct("Land")
            .field("rings", &self.rings.len())
            .field("edges", &self.edges.size())
            .finish_non_exhaustive()
    }
}

impl Land {
    /// The bundled Natural Earth 4.1.0 land at 1:10m, parsed on first use and kept for
    /// the life of the program.
    ///
    /// # Panics
    /// The file is embedded in the binary at build time, not read from a user, and
    /// `the_bundled_file_parses_whole` checks it: a build whose land cannot be read is
    /// broken, and stops here rather than silently taking the whole world for sea.
    #[must_use]
    pub fn bundled() -> &'static Land {
        static BUNDLED: OnceLock<Land> = OnceLock::new();
        BUNDLED.get_or_init(|| {
            Land::from_bytes(BUNDLED_LAND_FILE)
                .expect("the bundled land file is checked by the_bundled_file_parses_whole")
        })
    }

    /// Reads a land file (format in `assets/README.md`). Any input is safe: damaged or
    /// hostile bytes give an error, never a panic or a huge allocation.
    pub fn from_bytes(bytes: &[u8]) -> Result<Land, LandError> {
        parse_rings(bytes, false).map(Land::from_rings)
    }

    /// Land from rings of (lat, lon) degrees, outer rings and holes alike (even-odd);
    /// the closing point is not repeated.
    pub(crate) fn from_rings(rings: Vec<Vec<LatLon>>) -> Land {
        let edges = rings
            .iter()
            .flat_map(|ring| {
                ring.iter().zip(ring.iter().cycle().skip(1)).map(|(a, b)| {
                    let (a, b) = ([a.lon_deg, a.lat_deg], [b.lon_deg, b.lat_deg]);
                    Edge {
                        a,
                        b,
                        envelope: AABB::from_corners(a, b),
                    }
                })
            })
            .collect();
        let mut h = std::collections::hash_map::DefaultHasher::new();
        for ring in &rings {
            ring.len().hash(&mut h);
            for p in ring {
                p.bits().hash(&mut h);
            }
        }
        Land {
            rings,
            edges: RTree::bulk_load(edges),
            cells: OnceLock::new(),
            fingerprint: h.finish(),
        }
    }

    /// A hash of the land's rings: equal for the same land.
    #[must_use]
    pub fn fingerprint(&self) -> u64 {
        self.fingerprint
    }

    /// Whether a position is on land. Longitudes outside −180..180 are wrapped; a
    /// non-finite position is not land.
    ///
    /// Counts the ring edges that a ray from the point toward +longitude (along its
    /// parallel, up to 180°) crosses: odd means land. Lakes are land in this data; the
    /// Caspian Sea is a hole, so sea. Points exactly on a ring edge may fall either way.
    #[must_use]
    pub fn is_land(&self, p: LatLon) -> bool {
        // No land (or no position): sea, without setting up the cells.
        if self.rings.is_empty() || !(p.lat_deg.is_finite() && p.lon_deg.is_finite()) {
            return false;
        }
        let lat = p.lat_deg;
        let lon = (p.lon_deg + 180.0).rem_euclid(360.0) - 180.0;
        let cells = self.cells.get_or_init(|| {
            (0..CELLS_X * CELLS_Y)
                .map(|_| AtomicU8::new(CELL_UNKNOWN))
                .collect()
        });
        let (ix, iy) = (
            cell_index(lon + 180.0, CELLS_X),
            cell_index(lat + 90.0, CELLS_Y),
        );
        match self.cell_state(cells, ix, iy) {
            CELL_SEA => false,
            CELL_LAND => true,
            _ => {
                // Near an edge: count the crossings only as far east as the first cell
                // free of edges (its west side is what the cell is), within a few
                // degrees; else the whole ray.
                for next in ix + 1..(ix + 1 + EAST_CELLS).min(CELLS_X) {
                    let state = self.cell_state(cells, next, iy);
                    if state != CELL_MIXED {
                        let x = next as f64 * CELL_DEG - 180.0;
                        return self.crossings_odd(lon, lat, Some(x)) != (state == CELL_LAND);
                    }
                }
                self.crossings_odd(lon, lat, None)
            }
        }
    }

    /// A cell's state, looked at on first use.
    fn cell_state(&self, cells: &[AtomicU8], ix: usize, iy: usize) -> u8 {
        let slot = &cells[iy * CELLS_X + ix];
        match slot.load(Ordering::Relaxed) {
            CELL_UNKNOWN => {
                let state = self.classify_cell(ix, iy);
                slot.store(state, Ordering::Relaxed);
                state
            }
            state => state,
        }
    }

    /// Whether a cell is all sea or all land (as its centre), or near an edge.
    fn classify_cell(&self, ix: usize, iy: usize) -> u8 {
        let (x0, y0) = (
            ix as f64 * CELL_DEG - 180.0 - CELL_MARGIN_DEG,
            iy as f64 * CELL_DEG - 90.0 - CELL_MARGIN_DEG,
        );
        let (x1, y1) = (
            x0 + CELL_DEG + 2.0 * CELL_MARGIN_DEG,
            y0 + CELL_DEG + 2.0 * CELL_MARGIN_DEG,
        );
        let cell = AABB::from_corners([x0, y0], [x1, y1]);
        if self
            .edges
            .locate_in_envelope_intersecting(&cell)
            .next()
            .is_some()
        {
            return CELL_MIXED;
        }
        if self.crossings_odd(0.5 * (x0 + x1), 0.5 * (y0 + y1), None) {
            CELL_LAND
        } else {
            CELL_SEA
        }
    }

    /// Whether a ray east from (`lon`, `lat`) crosses the rings' edges an odd number of
    /// times (land), or, with `to_lon`, the part of it up to that longitude.
    fn crossings_odd(&self, lon: f64, lat: f64, to_lon: Option<f64>) -> bool {
        let ray = AABB::from_corners([lon, lat], [to_lon.unwrap_or(180.0), lat]);
        let mut inside = false;
        for edge in self.edges.locate_in_envelope_intersecting(&ray) {
            let ([x0, y0], [x1, y1]) = (edge.a, edge.b);
            // Half-open in latitude, so a vertex on the ray counts once and a horizontal
            // edge not at all.
            if (y0 > lat) != (y1 > lat) {
                let x = x0 + (lat - y0) * (x1 - x0) / (y1 - y0);
                if x > lon && to_lon.is_none_or(|end| x <= end) {
                    inside = !inside;
                }
            }
        }
        inside
    }

    /// The rings (outer rings and holes alike, closing point not repeated), longitudes
    /// in −180..180; for drawing.
    #[must_use]
    pub fn rings(&self) -> &[Vec<LatLon>] {
        &self.rings
    }
}

/// Reads the rings of a land file; `allow_empty` admits a ring count of zero (a coast
/// pack of open sea). Any input is safe.
pub(crate) fn parse_rings(bytes: &[u8], allow_empty: bool) -> Result<Vec<Vec<LatLon>>, LandError> {
    let mut reader = Reader { bytes, offset: 0 };
    if reader.take(MAGIC.len()) != Some(MAGIC.as_slice()) {
        return Err(LandError::BadMagic);
    }
    let ring_count = reader.u32("the ring count")?;
    if ring_count == 0 && !allow_empty {
        return Err(LandError::NoRings);
    }
    // Every ring takes at least 10 bytes (a count and three points of two one-byte
    // varints), so the remaining length bounds what is worth reserving.
    let mut rings = Vec::with_capacity((ring_count as usize).min(reader.remaining() / 10));
    for ring in 0..ring_count {
        let count = reader.u32("a ring's point count")?;
        if count < 3 {
            return Err(LandError::TooFewPoints { ring, count });
        }
        let mut points = Vec::with_capacity((count as usize).min(reader.remaining() / 2));
        let (mut lon_units, mut lat_units) = (0_i64, 0_i64);
        for point in 0..count {
            let out_of_range = LandError::OutOfRange { ring, point };
            lon_units = lon_units
                .checked_add(reader.zigzag_varint("a longitude difference")?)
                .ok_or(out_of_range.clone())?;
            lat_units = lat_units
                .checked_add(reader.zigzag_varint("a latitude difference")?)
                .ok_or(out_of_range.clone())?;
            if lon_units.abs() > 180 * 100_000 || lat_units.abs() > 90 * 100_000 {
                return Err(out_of_range);
            }
            points.push(LatLon::new(
                lat_units as f64 / UNITS_PER_DEGREE,
                lon_units as f64 / UNITS_PER_DEGREE,
            ));
        }
        rings.push(points);
    }
    if reader.remaining() > 0 {
        return Err(LandError::TrailingBytes {
            offset: reader.offset,
            count: reader.remaining(),
        });
    }
    Ok(rings)
}

/// Writes rings as a land file (`SWLAND01`, see `assets/README.md`): positions rounded
/// to 1e-5 degree, repeated points (and a repeated closing point) dropped, rings left
/// with fewer than three points dropped. Positions must lie within −180..180 longitude
/// and −90..90 latitude (they are clamped). Zero rings are written as a count of 0,
/// which only a coast pack accepts.
#[must_use]
pub(crate) fn write_land_body(rings: &[Vec<LatLon>]) -> Vec<u8> {
    let to_units = |p: &LatLon| {
        (
            (p.lon_deg.clamp(-180.0, 180.0) * UNITS_PER_DEGREE).round() as i64,
            (p.lat_deg.clamp(-90.0, 90.0) * UNITS_PER_DEGREE).round() as i64,
        )
    };
    let mut kept: Vec<Vec<(i64, i64)>> = Vec::with_capacity(rings.len());
    for ring in rings {
        let mut units: Vec<(i64, i64)> = ring.iter().map(to_units).collect();
        units.dedup();
        while units.len() > 1 && units.first() == units.last() {
            units.pop();
        }
        if units.len() >= 3 {
            kept.push(units);
        }
    }
    let mut out = MAGIC.to_vec();
    out.extend_from_slice(&(kept.len() as u32).to_le_bytes());
    for ring in &kept {
        out.extend_from_slice(&(ring.len() as u32).to_le_bytes());
        let (mut px, mut py) = (0, 0);
        for &(x, y) in ring {
            write_zigzag_varint(&mut out, x - px);
            write_zigzag_varint(&mut out, y - py);
            (px, py) = (x, y);
        }
    }
    out
}

fn write_zigzag_varint(out: &mut Vec<u8>, v: i64) {
    let mut z = ((v << 1) ^ (v >> 63)) as u64;
    loop {
        let byte = (z & 0x7f) as u8;
        z >>= 7;
        if z == 0 {
            out.push(byte);
            return;
        }
        out.push(byte | 0x80);
    }
}

/// A cursor over the bytes of a land file.
struct Reader<'a> {
    bytes: &'a [u8],
    offset: usize,
}

impl<'a> Reader<'a> {
    fn remaining(&self) -> usize {
        self.bytes.len() - self.offset
    }

    fn take(&mut self, n: usize) -> Option<&'a [u8]> {
        let slice = self.bytes.get(self.offset..self.offset.checked_add(n)?)?;
        self.offset += n;
        Some(slice)
    }

    fn u32(&mut self, expected: &'static str) -> Result<u32, LandError> {
        let offset = self.offset;
        self.take(4)
            .and_then(|b| b.try_into().ok())
            .map(u32::from_le_bytes)
            .ok_or(LandError::Truncated { offset, expected })
    }

    /// A zigzag-encoded LEB128 varint.
    fn zigzag_varint(&mut self, expected: &'static str) -> Result<i64, LandError> {
        let start = self.offset;
        let mut value = 0_u64;
        let mut shift = 0_u32;
        loop {
            let byte =
                self.take(1)
                    .and_then(|b| b.first().copied())
                    .ok_or(LandError::Truncated {
                        offset: start,
                        expected,
                    })?;
            let bits = u64::from(byte & 0x7f);
            if shift >= 64 || (shift == 63 && bits > 1) {
                return Err(LandError::VarintTooLong { offset: start });
            }
            value |= bits << shift;
            if byte & 0x80 == 0 {
                break;
            }
            shift += 7;
        }
        // Zigzag: 0, -1, 1, -2, 2 … are stored as 0, 1, 2, 3, 4 …
        Ok((value >> 1).cast_signed() ^ -(value & 1).cast_signed())
    }
}

/// The outcome of looking for the sea side of a line.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SideFinding {
    /// The sea is clearly on this side, walking from the first point to the last.
    Sea(SeaSide),
    /// No clear side, and most probes found sea: the line is drawn at sea (or in a
    /// channel, or the votes were split); the user should say which side is the sea.
    BothSea,
    /// No clear side, and most probes found land: the line is drawn inland; the user
    /// should say which side is the sea.
    BothLand,
}

/// How far either side of a piece's midpoint the land is probed, metres.
///
/// The 1:10m land is accurate to a few hundred metres (its vertices are about 1.6 km
/// apart and quantized to a few hundred metres), and users draw roughly, often a little offshore or inland. Probes closer than about
/// 500 m would mostly measure drawing error; probes beyond about 10 km would cross
/// headlands, bays and narrow seas. Doubling from 0.5 to 8 km lets a line drawn up to a
/// few kilometres off the data's coast still find land on one side and sea on the other.
const PROBE_DISTANCES_M: [f64; 5] = [500.0, 1_000.0, 2_000.0, 4_000.0, 8_000.0];

/// Share of the decisive weight one side needs to be taken as the sea side.
const CLEAR_WIN_SHARE: f64 = 2.0 / 3.0;

/// Finds the sea side of a polyline (walking from first to last point) by probing the
/// land a short distance either side of each piece's midpoint.
///
/// Each piece between consecutive distinct points is probed at its midpoint,
/// perpendicular to the piece, 0.5, 1, 2, 4 and 8 km away on the left and on the right.
/// A probe pair with sea on exactly one side votes for that side, weighted by the
/// piece's length. The side with at least two thirds of the decisive weight is the sea
/// side. Otherwise (no decisive pair, or split votes) the answer is
/// [`SideFinding::BothSea`] or [`SideFinding::BothLand`] by the majority of all probes,
/// a tie counting as sea; a line with no piece of non-zero length is judged by its
/// first point alone.
#[must_use]
pub fn find_sea_side(land: &Land, points: &[LatLon]) -> SideFinding {
    let (mut left_weight_m, mut right_weight_m) = (0.0_f64, 0.0_f64);
    let (mut sea_probes, mut land_probes) = (0_usize, 0_usize);
    for pair in points.windows(2) {
        let (start, end) = (pair[0], pair[1]);
        let length_m = distance_m(start, end);
        if length_m.is_nan() || length_m <= 0.0 {
            continue;
        }
        let mid = midpoint(start, end);
        let along_deg = initial_bearing_deg(mid, end);
        for probe_m in PROBE_DISTANCES_M {
            let left_is_land = land.is_land(destination(mid, along_deg - 90.0, probe_m));
            let right_is_land = land.is_land(destination(mid, along_deg + 90.0, probe_m));
            for is_land in [left_is_land, right_is_land] {
                if is_land {
                    land_probes += 1;
                } else {
                    sea_probes += 1;
                }
            }
            match (left_is_land, right_is_land) {
                (false, true) => left_weight_m += length_m,
                (true, false) => right_weight_m += length_m,
                _ => {}
            }
        }
    }
    let decisive_m = left_weight_m + right_weight_m;
    if decisive_m > 0.0 {
        if left_weight_m >= CLEAR_WIN_SHARE * decisive_m {
            return SideFinding::Sea(SeaSide::Left);
        }
        if right_weight_m >= CLEAR_WIN_SHARE * decisive_m {
            return SideFinding::Sea(SeaSide::Right);
        }
    }
    let mostly_land = if sea_probes + land_probes == 0 {
        points.first().is_some_and(|&p| land.is_land(p))
    } else {
        land_probes > sea_probes
    };
    if mostly_land {
        SideFinding::BothLand
    } else {
        SideFinding::BothSea
    }
}

/// The cell of a coordinate counted from the grid's edge (degrees east of 180°W or
/// north of 90°S), within `0..count`.
fn cell_index(from_edge_deg: f64, count: usize) -> usize {
    let k = (from_edge_deg / CELL_DEG).floor();
    if k <= 0.0 {
        0
    } else {
        (k as usize).min(count - 1)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Writes a land file from rings of (lat, lon) in degrees, as given: unlike
    /// `write_land_body`, short or repeated rings are kept, so damaged files can be made.
    fn land_file(rings: &[&[(f64, f64)]]) -> Vec<u8> {
        let varint = write_zigzag_varint;
        let mut out = MAGIC.to_vec();
        out.extend_from_slice(&(rings.len() as u32).to_le_bytes());
        for ring in rings {
            out.extend_from_slice(&(ring.len() as u32).to_le_bytes());
            let (mut px, mut py) = (0, 0);
            for &(lat, lon) in *ring {
                let (x, y) = ((lon * 1e5).round() as i64, (lat * 1e5).round() as i64);
                varint(&mut out, x - px);
                varint(&mut out, y - py);
                (px, py) = (x, y);
            }
        }
        out
    }

    /// A 4° square island with a 2° square lake-hole in it, near (0, 0).
    fn island_with_hole() -> Vec<u8> {
        land_file(&[
            &[(0.0, 0.0), (0.0, 4.0), (4.0, 4.0), (4.0, 0.0)],
            &[(1.0, 1.0), (3.0, 1.0), (3.0, 3.0), (1.0, 3.0)],
        ])
    }

    #[test]
    fn the_bundled_file_parses_whole() {
        let land = Land::from_bytes(BUNDLED_LAND_FILE).expect("bundled land file");
        assert_eq!(land.rings().len(), 4042);
        assert_eq!(land.rings().iter().map(Vec::len).sum::<usize>(), 404_829);
        assert!(
            land.rings()
                .iter()
                .flatten()
                .all(|p| p.lon_deg.abs() <= 180.0 && p.lat_deg.abs() <= 90.0)
        );
    }

    #[test]
    fn a_small_file_round_trips_with_even_odd_holes() {
        let land = Land::from_bytes(&island_with_hole()).expect("valid file");
        assert_eq!(land.rings().len(), 2);
        assert_eq!(land.rings()[0][2], LatLon::new(4.0, 4.0));
        assert!(land.is_land(LatLon::new(0.5, 0.5)));
        assert!(!land.is_land(LatLon::new(2.0, 2.0)), "inside the hole");
        assert!(!land.is_land(LatLon::new(2.0, 5.0)), "east of the island");
        assert!(!land.is_land(LatLon::new(2.0, -1.0)), "west of the island");
        assert!(land.is_land(LatLon::new(0.5, 360.5)), "longitude wrapped");
        assert!(!land.is_land(LatLon::new(f64::NAN, 0.5)));
    }

    #[test]
    fn bad_magic_is_rejected_with_a_clear_message() {
        let mut bytes = island_with_hole();
        bytes[0] = b'X';
        let err = Land::from_bytes(&bytes).expect_err("bad magic");
        assert_eq!(err, LandError::BadMagic);
        assert_eq!(err.to_string(), "land file: bad magic: expected SWLAND01");
        assert_eq!(Land::from_bytes(b"").map(|_| ()), Err(LandError::BadMagic));
    }

    #[test]
    fn every_truncation_is_an_error() {
        let bytes = island_with_hole();
        for len in 0..bytes.len() {
            assert!(
                Land::from_bytes(&bytes[..len]).is_err(),
                "prefix of {len} bytes"
            );
        }
        let err = Land::from_bytes(&bytes[..14]).expect_err("truncated");
        assert_eq!(
            err.to_string(),
            "land file: truncated at byte 12: expected a ring's point count"
        );
        let bundled = Land::from_bytes(&BUNDLED_LAND_FILE[..BUNDLED_LAND_FILE.len() - 1]);
        assert!(matches!(bundled, Err(LandError::Truncated { .. })));
    }

    #[test]
    fn zero_rings_and_short_rings_are_rejected() {
        assert_eq!(
            Land::from_bytes(&land_file(&[])).map(|_| ()),
            Err(LandError::NoRings)
        );
        let two_points = land_file(&[&[(0.0, 0.0), (1.0, 1.0)]]);
        let err = Land::from_bytes(&two_points).expect_err("two points");
        assert_eq!(err, LandError::TooFewPoints { ring: 0, count: 2 });
        assert_eq!(
            err.to_string(),
            "land file: ring 0: 2 points: expected at least 3"
        );
    }

    #[test]
    fn huge_counts_overlong_varints_and_far_points_are_rejected() {
        let mut huge = MAGIC.to_vec();
        huge.extend_from_slice(&u32::MAX.to_le_bytes());
        huge.extend_from_slice(&u32::MAX.to_le_bytes());
        assert!(matches!(
            Land::from_bytes(&huge),
            Err(LandError::Truncated { offset: 16, .. })
        ));

        let mut overlong = MAGIC.to_vec();
        overlong.extend_from_slice(&1_u32.to_le_bytes());
        overlong.extend_from_slice(&3_u32.to_le_bytes());
        overlong.extend_from_slice(&[0xff; 11]);
        assert_eq!(
            Land::from_bytes(&overlong).map(|_| ()),
            Err(LandError::VarintTooLong { offset: 16 })
        );

        let far = land_file(&[&[(0.0, 0.0), (0.0, 180.5), (1.0, 0.0)]]);
        assert_eq!(
            Land::from_bytes(&far).map(|_| ()),
            Err(LandError::OutOfRange { ring: 0, point: 1 })
        );

        let mut trailing = island_with_hole();
        trailing.push(0);
        assert!(matches!(
            Land::from_bytes(&trailing),
            Err(LandError::TrailingBytes { count: 1, .. })
        ));
    }

    proptest! {
        #[test]
        fn from_bytes_never_panics(tail in proptest::collection::vec(any::<u8>(), 0..200)) {
            let mut bytes = MAGIC.to_vec();
            bytes.extend_from_slice(&tail);
            let _ = Land::from_bytes(&bytes);
        }
    }

    /// The remembered cells give every point the answer of the whole ray east: points
    /// along the demo coast (many in cells crossed by the coastline), across a small
    /// island with a lake, and spread over the globe (a fixed pseudo-random sequence).
    #[test]
    fn cells_answer_as_the_whole_ray_does() {
        let check = |land: &Land, p: LatLon| {
            let lon = (p.lon_deg + 180.0).rem_euclid(360.0) - 180.0;
            assert_eq!(
                land.is_land(p),
                land.crossings_odd(lon, p.lat_deg, None),
                "at {p:?}"
            );
        };
        let bundled = Land::bundled();
        for i in 0..200 {
            for j in 0..40 {
                let p = LatLon::new(36.0 + f64::from(i) * 0.017, -124.5 + f64::from(j) * 0.031);
                check(bundled, p);
            }
        }
        let mut x: u64 = 0x2545_f491_4f6c_dd1d;
        let mut next = || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            (x >> 11) as f64 / (1u64 << 53) as f64
        };
        for _ in 0..5_000 {
            let p = LatLon::new(next() * 180.0 - 90.0, next() * 360.0 - 180.0);
            check(bundled, p);
        }
        let island = Land::from_bytes(&island_with_hole()).expect("island");
        for i in 0..120 {
            for j in 0..120 {
                let p = LatLon::new(-1.0 + f64::from(i) * 0.05, -1.0 + f64::from(j) * 0.05);
                check(&island, p);
            }
        }
    }

    #[test]
    fn well_known_places_are_land_or_sea() {
        let land = Land::bundled();
        let places = [
            ("Madrid", 40.4168, -3.7038, true),
            ("Greenland ice sheet", 75.0, -40.0, true),
            (
                "Lake Superior: lakes are land in this data",
                47.7,
                -87.5,
                true,
            ),
            (
                "Lake Victoria: lakes are land in this data",
                -1.0,
                33.0,
                true,
            ),
            (
                "Lake Baikal: lakes are land in this data",
                53.5,
                108.0,
                true,
            ),
            ("Antarctic plateau", -80.0, 0.0, true),
            ("near the South Pole", -89.99, 10.0, true),
            (
                "Antarctica just west of the antimeridian",
                -85.0,
                179.9,
                true,
            ),
            (
                "Antarctica just east of the antimeridian",
                -85.0,
                -179.9,
                true,
            ),
            ("Chukotka, east of the antimeridian", 66.0, -172.0, true),
            (
                "Wrangel Island, west of the antimeridian",
                71.25,
                179.5,
                true,
            ),
            (
                "Wrangel Island, east of the antimeridian",
                71.2,
                -179.5,
                true,
            ),
            ("Vanua Levu, Fiji", -16.6, 179.3, true),
            ("North Atlantic, west of the Azores", 35.0, -40.0, false),
            (
                "Caspian Sea: a hole in Eurasia in this data",
                42.0,
                51.0,
                false,
            ),
            ("Black Sea", 43.0, 34.0, false),
            ("Mediterranean, Ionian Sea", 35.0, 18.0, false),
            ("Hudson Bay", 60.0, -85.0, false),
            ("central Pacific on the equator", 0.0, -150.0, false),
            ("Arctic Ocean near the North Pole", 89.0, 0.0, false),
        ];
        for (place, lat, lon, expected) in places {
            assert_eq!(land.is_land(LatLon::new(lat, lon)), expected, "{place}");
        }
    }

    fn line(points: &[(f64, f64)]) -> Vec<LatLon> {
        points
            .iter()
            .map(|&(lat, lon)| LatLon::new(lat, lon))
            .collect()
    }

    fn side_both_ways(points: &[(f64, f64)]) -> (SideFinding, SideFinding) {
        let forward = line(points);
        let backward: Vec<LatLon> = forward.iter().rev().copied().collect();
        (
            find_sea_side(Land::bundled(), &forward),
            find_sea_side(Land::bundled(), &backward),
        )
    }

    #[test]
    fn west_facing_atlantic_coast_of_portugal() {
        // North along the Atlantic coast: São Pedro de Moel, Figueira da Foz, Aveiro.
        let coast = [(39.82, -9.01), (40.15, -8.85), (40.60, -8.77)];
        assert_eq!(
            side_both_ways(&coast),
            (
                SideFinding::Sea(SeaSide::Left),
                SideFinding::Sea(SeaSide::Right)
            )
        );
        // A short line just north of Figueira da Foz, about 9 km.
        let short = line(&[(40.18, -8.89), (40.26, -8.87)]);
        assert_eq!(
            find_sea_side(Land::bundled(), &short),
            SideFinding::Sea(SeaSide::Left)
        );
        // The first line drawn about 1 km offshore.
        let offshore = line(&[(39.82, -9.022), (40.15, -8.862), (40.60, -8.782)]);
        assert_eq!(
            find_sea_side(Land::bundled(), &offshore),
            SideFinding::Sea(SeaSide::Left)
        );
    }

    #[test]
    fn east_facing_pacific_coast_of_new_south_wales() {
        // North from Port Macquarie past Crescent Head toward Nambucca Heads.
        let coast = [(-31.43, 152.95), (-31.09, 153.02), (-30.72, 153.02)];
        assert_eq!(
            side_both_ways(&coast),
            (
                SideFinding::Sea(SeaSide::Right),
                SideFinding::Sea(SeaSide::Left)
            )
        );
    }

    #[test]
    fn south_facing_algarve_coast() {
        // East along the south coast of Portugal: Lagos, Quarteira, Faro.
        let coast = [(37.10, -8.67), (37.08, -8.14), (37.01, -7.94)];
        assert_eq!(
            side_both_ways(&coast),
            (
                SideFinding::Sea(SeaSide::Right),
                SideFinding::Sea(SeaSide::Left)
            )
        );
    }

    #[test]
    fn enclosed_seas_adriatic_and_baltic() {
        // North-west along the Italian Adriatic coast: Pescara, Giulianova, Porto San
        // Giorgio, Ancona; the Adriatic lies to the north-east.
        let adriatic = [
            (42.51, 14.18),
            (42.85, 13.92),
            (43.18, 13.80),
            (43.57, 13.56),
        ];
        assert_eq!(
            side_both_ways(&adriatic),
            (
                SideFinding::Sea(SeaSide::Right),
                SideFinding::Sea(SeaSide::Left)
            )
        );
        // North along the Baltic coast of Latvia from Liepāja past Pāvilosta toward
        // Ventspils; the Baltic lies to the west.
        let baltic = [(56.64, 21.03), (56.93, 21.26), (57.24, 21.42)];
        assert_eq!(
            side_both_ways(&baltic),
            (
                SideFinding::Sea(SeaSide::Left),
                SideFinding::Sea(SeaSide::Right)
            )
        );
    }

    #[test]
    fn lines_in_open_sea_or_deep_inland_have_no_sea_side() {
        // Open North Atlantic, west of the Azores.
        let open_sea = [(35.0, -40.0), (35.1, -39.9), (35.2, -39.8)];
        assert_eq!(
            side_both_ways(&open_sea),
            (SideFinding::BothSea, SideFinding::BothSea)
        );
        // The Meseta around Madrid.
        let inland = [(40.2, -3.9), (40.6, -3.5)];
        assert_eq!(
            side_both_ways(&inland),
            (SideFinding::BothLand, SideFinding::BothLand)
        );
    }

    #[test]
    fn degenerate_lines_are_judged_by_their_point() {
        let land = Land::bundled();
        let madrid = LatLon::new(40.4168, -3.7038);
        assert_eq!(
            find_sea_side(land, &[madrid, madrid]),
            SideFinding::BothLand
        );
        assert_eq!(find_sea_side(land, &[]), SideFinding::BothSea);
    }
}
