//! Coast packs: a user's detailed land (GeoJSON, ESRI Shapefile or GSHHG binary) cut to
//! a box, saved as a small `SWPACK01` file (see `docs/coast-packs.md`), and laid over
//! the bundled land with [`Land::with_pack`](super::Land::with_pack).
//!
//! Every reader returns land rings of (lat, lon) degrees, outer rings and holes alike,
//! to be read with the even-odd rule like the bundled land; the closing point is not
//! repeated.

mod compose;
mod geojson;
mod gshhg;
mod pack;
mod shapefile;

pub use pack::{CutSummary, Pack, PackBox, PackError, cut_pack};

use super::LatLon;

/// The formats of detailed land a pack can be cut from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LandFileFormat {
    /// GeoJSON Polygons and MultiPolygons (a FeatureCollection, a Feature or a bare
    /// geometry), longitude and latitude in degrees (RFC 7946).
    GeoJson,
    /// An ESRI Shapefile (`.shp`) of polygons in longitude and latitude degrees; the
    /// `.shx` and `.dbf` beside it are not needed.
    Shapefile,
    /// GSHHG binary polygons (`gshhs_f.b` and the other resolutions).
    Gshhg,
}

impl LandFileFormat {
    /// The format's name, for messages.
    #[must_use]
    pub fn name(self) -> &'static str {
        match self {
            LandFileFormat::GeoJson => "GeoJSON",
            LandFileFormat::Shapefile => "ESRI Shapefile",
            LandFileFormat::Gshhg => "GSHHG binary",
        }
    }
}

/// Land rings read from a detailed land file.
#[derive(Debug, Clone)]
pub struct LandSource {
    /// Which format the file was in.
    pub format: LandFileFormat,
    /// The rings, (lat, lon) degrees, even-odd; longitudes may run past 180 (GSHHG
    /// stores 0..360) and are brought into −180..180 when a pack is cut.
    pub rings: Vec<Vec<LatLon>>,
}

/// Why a detailed land file could not be read.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum LandFileError {
    /// Not one of the formats.
    #[error(
        "not a land file this tool reads: expected GeoJSON text, an ESRI Shapefile (.shp, file code 9994) or GSHHG binary polygons"
    )]
    Unrecognised,
    /// The file is one of the formats but something in it is wrong.
    #[error("{format}: {place}: {problem}")]
    Bad {
        /// The format's name.
        format: &'static str,
        /// Where: a byte offset, a record, a feature, a ring, a position.
        place: String,
        /// What was found and what was expected.
        problem: String,
    },
    /// The file holds no polygon at all.
    #[error("{format}: no land polygons: expected at least one polygon with 3 or more points")]
    NoLand {
        /// The format's name.
        format: &'static str,
    },
}

impl LandFileError {
    fn bad(format: LandFileFormat, place: impl Into<String>, problem: impl Into<String>) -> Self {
        LandFileError::Bad {
            format: format.name(),
            place: place.into(),
            problem: problem.into(),
        }
    }
}

/// Reads a detailed land file, recognised by its content: a Shapefile by its file
/// code 9994, GSHHG by a sane first record header, GeoJSON by text starting with `{`.
/// Any input is safe: an error, never a panic or an allocation larger than the input.
pub fn read_land_file(bytes: &[u8]) -> Result<LandSource, LandFileError> {
    let (format, rings) = if shapefile::looks_like(bytes) {
        (LandFileFormat::Shapefile, shapefile::read(bytes)?)
    } else if gshhg::looks_like(bytes) {
        (LandFileFormat::Gshhg, gshhg::read(bytes)?)
    } else if geojson::looks_like(bytes) {
        (LandFileFormat::GeoJson, geojson::read(bytes)?)
    } else {
        return Err(LandFileError::Unrecognised);
    };
    if rings.is_empty() {
        return Err(LandFileError::NoLand {
            format: format.name(),
        });
    }
    Ok(LandSource { format, rings })
}

/// Drops a repeated closing point and checks a ring's positions; `place` names the
/// ring for errors.
fn finish_ring(
    format: LandFileFormat,
    place: &dyn Fn() -> String,
    mut ring: Vec<LatLon>,
) -> Result<Option<Vec<LatLon>>, LandFileError> {
    for (k, p) in ring.iter().enumerate() {
        let ok = p.lat_deg.is_finite()
            && p.lon_deg.is_finite()
            && p.lat_deg.abs() <= 90.0
            && (-360.0..=360.0).contains(&p.lon_deg);
        if !ok {
            return Err(LandFileError::bad(
                format,
                format!("{}, position {k}", place()),
                format!(
                    "longitude {} latitude {}: expected degrees (longitude -180..360, latitude -90..90; is the file projected?)",
                    p.lon_deg, p.lat_deg
                ),
            ));
        }
    }
    ring.dedup();
    while ring.len() > 1 && ring.first() == ring.last() {
        ring.pop();
    }
    Ok((ring.len() >= 3).then_some(ring))
}
