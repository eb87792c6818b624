//! Cutting a pack from detailed land, and the `SWPACK01` file (see
//! `docs/coast-packs.md`): the box, the source's credit, then a `SWLAND01` body.

use i_overlay::core::fill_rule::FillRule;
use i_overlay::core::overlay_rule::OverlayRule;
use i_overlay::float::single::SingleFloatOverlay;

use crate::coast::LatLon;
use crate::coast::land::{LandError, parse_rings, write_land_body};

/// The first eight bytes of a pack file.
const MAGIC: &[u8; 8] = b"SWPACK01";

/// The longest credit text kept in a pack, bytes.
const MAX_CREDIT_BYTES: usize = 4096;

/// The mean radius of the Earth (IUGG), km, for areas.
const EARTH_RADIUS_KM: f64 = 6371.0088;

/// A box of longitude and latitude, degrees: west < east (not across the
/// antimeridian), south < north.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PackBox {
    /// Western edge, degrees east, −180..180.
    pub west_deg: f64,
    /// Southern edge, degrees north, −90..90.
    pub south_deg: f64,
    /// Eastern edge, degrees east, greater than the western.
    pub east_deg: f64,
    /// Northern edge, degrees north, greater than the southern.
    pub north_deg: f64,
}

impl PackBox {
    /// A box from its edges, checked: finite, within −180..180 and −90..90, west < east,
    /// south < north.
    pub fn new(
        west_deg: f64,
        south_deg: f64,
        east_deg: f64,
        north_deg: f64,
    ) -> Result<PackBox, PackError> {
        let lon_ok = |x: f64| x.is_finite() && (-180.0..=180.0).contains(&x);
        let lat_ok = |y: f64| y.is_finite() && (-90.0..=90.0).contains(&y);
        if lon_ok(west_deg)
            && lon_ok(east_deg)
            && lat_ok(south_deg)
            && lat_ok(north_deg)
            && west_deg < east_deg
            && south_deg < north_deg
        {
            Ok(PackBox {
                west_deg,
                south_deg,
                east_deg,
                north_deg,
            })
        } else {
            Err(PackError::BadBox {
                west_deg,
                south_deg,
                east_deg,
                north_deg,
            })
        }
    }

    /// Whether a position lies in the box (edges included).
    #[must_use]
    pub fn contains(&self, p: LatLon) -> bool {
        (self.south_deg..=self.north_deg).contains(&p.lat_deg)
            && (self.west_deg..=self.east_deg).contains(&p.lon_deg)
    }

    /// Whether a ring's extent meets the box (edges included).
    pub(crate) fn meets_extent_of(&self, ring: &[LatLon]) -> bool {
        let (mut w, mut s, mut e, mut n) = (f64::MAX, f64::MAX, f64::MIN, f64::MIN);
        for p in ring {
            (w, e) = (w.min(p.lon_deg), e.max(p.lon_deg));
            (s, n) = (s.min(p.lat_deg), n.max(p.lat_deg));
        }
        w <= self.east_deg && e >= self.west_deg && s <= self.north_deg && n >= self.south_deg
    }

    /// The box as a contour in the plane (x = longitude + `shift_deg`, y = latitude).
    pub(crate) fn contour(&self, shift_deg: f64) -> Vec<[f64; 2]> {
        let (w, e) = (self.west_deg + shift_deg, self.east_deg + shift_deg);
        vec![
            [w, self.south_deg],
            [e, self.south_deg],
            [e, self.north_deg],
            [w, self.north_deg],
        ]
    }
}

/// Detailed land cut to a box, with the credit of its source.
#[derive(Debug, Clone)]
pub struct Pack {
    /// The box the pack covers.
    pub bbox: PackBox,
    /// Where the land comes from and its licence, as given when cut.
    pub credit: String,
    rings: Vec<Vec<LatLon>>,
}

/// What a cut kept.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CutSummary {
    /// Rings (outer rings and holes).
    pub rings: usize,
    /// Points in all rings.
    pub points: usize,
    /// Area of land in the box, km² (on the sphere, each ring's area in a plane scaled
    /// to its own mean latitude: good to a fraction of a percent over a box of a degree).
    pub land_area_km2: f64,
}

/// Why a pack cannot be made or read.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PackError {
    /// The box is not a box.
    #[error(
        "box W={west_deg},S={south_deg},E={east_deg},N={north_deg}: expected west < east within -180..180 and south < north within -90..90 degrees"
    )]
    BadBox {
        /// West, degrees.
        west_deg: f64,
        /// South, degrees.
        south_deg: f64,
        /// East, degrees.
        east_deg: f64,
        /// North, degrees.
        north_deg: f64,
    },
    /// The file does not start with `SWPACK01`.
    #[error("coast pack: bad magic: expected SWPACK01")]
    BadMagic,
    /// The header ends early or holds nonsense.
    #[error("coast pack: byte {offset}: expected {expected}")]
    Header {
        /// Byte offset.
        offset: usize,
        /// What was expected there.
        expected: &'static str,
    },
    /// The land body is damaged.
    #[error("coast pack: land body at byte {offset}: {source}")]
    Body {
        /// Byte offset where the body starts.
        offset: usize,
        /// What is wrong in it.
        source: LandError,
    },
    /// A ring of the body lies outside the pack's box.
    #[error("coast pack: ring {ring} leaves the box: expected land inside W,S,E,N")]
    OutsideBox {
        /// Index of the ring.
        ring: usize,
    },
}

/// Cuts land rings (even-odd, any longitudes) to a box: the intersection, rings closed
/// and valid, holes kept. Rings given in 0..360 longitude (GSHHG) are cut against the
/// box moved by ±360° too.
#[must_use]
pub fn cut_pack(rings: &[Vec<LatLon>], bbox: PackBox, credit: &str) -> (Pack, CutSummary) {
    let mut kept: Vec<Vec<LatLon>> = Vec::new();
    let mut area_km2 = 0.0;
    for shift in [0.0, 360.0, -360.0] {
        let shifted = PackBox {
            west_deg: bbox.west_deg + shift,
            east_deg: bbox.east_deg + shift,
            ..bbox
        };
        let subject: Vec<Vec<[f64; 2]>> = rings
            .iter()
            .filter(|r| shifted.meets_extent_of(r))
            .map(|r| r.iter().map(|p| [p.lon_deg, p.lat_deg]).collect())
            .collect();
        if subject.is_empty() {
            continue;
        }
        let shapes = subject.overlay(
            &bbox.contour(shift),
            OverlayRule::Intersect,
            FillRule::EvenOdd,
        );
        for shape in &shapes {
            for (k, contour) in shape.iter().enumerate() {
                let ring: Vec<LatLon> = contour
                    .iter()
                    .map(|&[x, y]| LatLon::new(y, (x - shift).clamp(bbox.west_deg, bbox.east_deg)))
                    .collect();
                let area = ring_area_km2(&ring);
                area_km2 += if k == 0 { area } else { -area };
                kept.push(ring);
            }
        }
    }
    // The stored positions are rounded to 1e-5 degree: keep what the file will hold.
    let pack = Pack::from_body_rings(bbox, credit, &kept);
    let summary = CutSummary {
        rings: pack.rings.len(),
        points: pack.rings.iter().map(Vec::len).sum(),
        land_area_km2: area_km2,
    };
    (pack, summary)
}

/// The area a ring encloses, km² (shoelace in a plane of degrees scaled by the cosine
/// of the ring's mean latitude).
fn ring_area_km2(ring: &[LatLon]) -> f64 {
    if ring.is_empty() {
        return 0.0;
    }
    let mean_lat = ring.iter().map(|p| p.lat_deg).sum::<f64>() / ring.len() as f64;
    let km_per_deg = EARTH_RADIUS_KM.to_radians();
    let x_scale = km_per_deg * mean_lat.to_radians().cos();
    let twice: f64 = ring
        .iter()
        .zip(ring.iter().cycle().skip(1))
        .map(|(a, b)| {
            a.lon_deg * x_scale * b.lat_deg * km_per_deg
                - b.lon_deg * x_scale * a.lat_deg * km_per_deg
        })
        .sum();
    (twice / 2.0).abs()
}

impl Pack {
    fn from_body_rings(bbox: PackBox, credit: &str, rings: &[Vec<LatLon>]) -> Pack {
        let body = write_land_body(rings);
        let rings = parse_rings(&body, true).unwrap_or_default();
        let mut credit = credit.to_string();
        while credit.len() > MAX_CREDIT_BYTES {
            credit.pop();
        }
        Pack {
            bbox,
            credit,
            rings,
        }
    }

    /// The land rings inside the box ((lat, lon) degrees, even-odd, closing point not
    /// repeated).
    #[must_use]
    pub fn rings(&self) -> &[Vec<LatLon>] {
        &self.rings
    }

    /// The pack as a `SWPACK01` file.
    #[must_use]
    pub fn to_bytes(&self) -> Vec<u8> {
        let mut out = MAGIC.to_vec();
        for v in [
            self.bbox.west_deg,
            self.bbox.south_deg,
            self.bbox.east_deg,
            self.bbox.north_deg,
        ] {
            out.extend_from_slice(&v.to_le_bytes());
        }
        out.extend_from_slice(&(self.credit.len() as u32).to_le_bytes());
        out.extend_from_slice(self.credit.as_bytes());
        out.extend_from_slice(&write_land_body(&self.rings));
        out
    }

    /// Reads a `SWPACK01` file. Any input is safe: damaged or hostile bytes give an
    /// error, never a panic or a huge allocation.
    pub fn from_bytes(bytes: &[u8]) -> Result<Pack, PackError> {
        if bytes.get(..8) != Some(MAGIC.as_slice()) {
            return Err(PackError::BadMagic);
        }
        let f64_at = |offset: usize| -> Result<f64, PackError> {
            bytes
                .get(offset..offset + 8)
                .and_then(|b| b.try_into().ok())
                .map(f64::from_le_bytes)
                .ok_or(PackError::Header {
                    offset,
                    expected: "a box edge (f64)",
                })
        };
        let [w, s, e, n] = [f64_at(8)?, f64_at(16)?, f64_at(24)?, f64_at(32)?];
        let bbox = PackBox::new(w, s, e, n).map_err(|_| PackError::Header {
            offset: 8,
            expected: "a box W,S,E,N with west < east and south < north in degrees",
        })?;
        let length = bytes
            .get(40..44)
            .and_then(|b| b.try_into().ok())
            .map(u32::from_le_bytes)
            .ok_or(PackError::Header {
                offset: 40,
                expected: "the credit's length (u32)",
            })? as usize;
        let credit = bytes
            .get(44..44 + length.min(MAX_CREDIT_BYTES + 1))
            .filter(|_| length <= MAX_CREDIT_BYTES)
            .and_then(|b| std::str::from_utf8(b).ok())
            .ok_or(PackError::Header {
                offset: 44,
                expected: "the credit: UTF-8 text of at most 4096 bytes",
            })?;
        let body_at = 44 + length;
        let rings = parse_rings(&bytes[body_at..], true).map_err(|source| PackError::Body {
            offset: body_at,
            source,
        })?;
        // Rounding to 1e-5 degree may put a point a hair outside the box.
        let slack = 1e-5;
        let grown = PackBox {
            west_deg: bbox.west_deg - slack,
            south_deg: bbox.south_deg - slack,
            east_deg: bbox.east_deg + slack,
            north_deg: bbox.north_deg + slack,
        };
        if let Some(ring) = rings
            .iter()
            .position(|r| !r.iter().all(|&p| grown.contains(p)))
        {
            return Err(PackError::OutsideBox { ring });
        }
        Ok(Pack {
            bbox,
            credit: credit.to_string(),
            rings,
        })
    }
}
