//! Offline raster map packs read tile by tile: a folder of `z/x/y.png` or `.jpg` files
//! (XYZ scheme), an MBTiles file (SQLite, rows in TMS order) or a PMTiles v3 archive.
//! Each gives its description ([`PackInfo`]) and the stored bytes of a tile addressed in
//! the XYZ scheme (y from the north). No GUI type: the app turns the bytes into pictures.

mod folder;
mod mbtiles;
mod pmtiles;

use std::path::Path;

/// The picture format of a pack's tiles; only formats the app can draw.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TileFormat {
    /// PNG.
    Png,
    /// JPEG.
    Jpeg,
}

/// The area a pack covers, degrees (west and east longitudes, south and north latitudes).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bounds {
    /// Western edge, degrees east.
    pub west_deg: f64,
    /// Southern edge, degrees north.
    pub south_deg: f64,
    /// Eastern edge, degrees east.
    pub east_deg: f64,
    /// Northern edge, degrees north.
    pub north_deg: f64,
}

/// What a pack says of itself.
#[derive(Debug, Clone, PartialEq)]
pub struct PackInfo {
    /// Its name (from its metadata, else the file or folder name).
    pub name: String,
    /// Whom to credit for its tiles (from its metadata or `attribution.txt`, else the file
    /// or folder name).
    pub attribution: String,
    /// The format of its tiles.
    pub format: TileFormat,
    /// The area it covers, if it says or can be found.
    pub bounds: Option<Bounds>,
    /// Lowest zoom with tiles.
    pub min_zoom: u8,
    /// Highest zoom with tiles.
    pub max_zoom: u8,
}

/// Why a pack cannot be read. The path is added by the caller.
#[derive(Debug, thiserror::Error)]
pub enum PackError {
    /// The file or folder could not be read.
    #[error("cannot read the map pack: {0}")]
    Io(#[from] std::io::Error),
    /// Neither a tile folder, nor SQLite, nor PMTiles.
    #[error(
        "not a map pack: expected a tile folder (z/x/y.png or .jpg), an MBTiles file (SQLite) or a PMTiles file"
    )]
    NotAPack,
    /// The MBTiles file could not be read by SQLite.
    #[error("not a readable MBTiles file: {0}")]
    Sqlite(String),
    /// An SQLite file that is not MBTiles.
    #[error(
        "not an MBTiles file: an MBTiles file has a table named tiles, this SQLite file has none"
    )]
    NoTilesTable,
    /// A folder without tiles.
    #[error("no tiles in this folder: expected files named z/x/y.png or z/x/y.jpg")]
    EmptyFolder,
    /// Tiles in a format the app cannot draw.
    #[error("the tiles are {0}, which Shelfwind cannot draw: use a pack with PNG or JPEG tiles")]
    UnsupportedTiles(String),
    /// A PMTiles file whose header, directories or metadata are damaged.
    #[error("damaged PMTiles file: {0}")]
    Pmtiles(String),
    /// Parts compressed in a way the app cannot undo.
    #[error(
        "the PMTiles file is compressed with {0}, which Shelfwind cannot read (expected gzip or none)"
    )]
    Compression(&'static str),
}

/// A pack opened for reading.
pub trait TileStore: Send {
    /// What the pack says of itself.
    fn info(&self) -> &PackInfo;

    /// The stored bytes of tile `x`, `y` (XYZ: y counted from the north) at zoom `z`, or
    /// `None` when the pack has no such tile.
    fn tile(&mut self, z: u8, x: u32, y: u32) -> Result<Option<Vec<u8>>, PackError>;
}

/// Opens a pack: a folder, or a file recognised by its first bytes.
pub fn open_pack(path: &Path) -> Result<Box<dyn TileStore>, PackError> {
    if path.is_dir() {
        return Ok(Box::new(folder::FolderPack::open(path)?));
    }
    let mut head = [0u8; 16];
    let n = std::io::Read::read(&mut std::fs::File::open(path)?, &mut head)?;
    match &head[..n] {
        h if h.starts_with(b"SQLite format 3\0") => Ok(Box::new(mbtiles::MbTiles::open(path)?)),
        h if h.starts_with(b"PMTiles") => Ok(Box::new(pmtiles::PmTilesPack::open(path)?)),
        _ if has_extension(path, "mbtiles") => Err(PackError::Sqlite(
            "the file does not start like an SQLite database".into(),
        )),
        _ if has_extension(path, "pmtiles") => Err(PackError::Pmtiles(
            "the file does not start with \"PMTiles\"".into(),
        )),
        _ => Err(PackError::NotAPack),
    }
}

fn has_extension(path: &Path, ext: &str) -> bool {
    path.extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case(ext))
}

/// The format named by a pack's metadata or a file extension (`png`, `jpg`, `webp`…).
fn format_from_name(name: &str) -> Result<TileFormat, PackError> {
    match name.trim().to_ascii_lowercase().as_str() {
        "png" => Ok(TileFormat::Png),
        "jpg" | "jpeg" => Ok(TileFormat::Jpeg),
        "webp" => Err(PackError::UnsupportedTiles("WebP".into())),
        "pbf" | "mvt" => Err(PackError::UnsupportedTiles("vector tiles (MVT)".into())),
        other => Err(PackError::UnsupportedTiles(format!("\"{other}\""))),
    }
}

/// The file or folder name, for packs that do not name themselves.
fn file_name(path: &Path) -> String {
    path.file_stem().or(path.file_name()).map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    )
}

/// The longitude of the west edge of tile column `x` at zoom `z`, degrees east.
#[must_use]
pub fn tile_lon_deg(z: u8, x: f64) -> f64 {
    x / 2f64.powi(i32::from(z)) * 360.0 - 180.0
}

/// The latitude of the north edge of tile row `y` (from the north) at zoom `z`, degrees
/// north (Web Mercator).
#[must_use]
pub fn tile_lat_deg(z: u8, y: f64) -> f64 {
    let n = std::f64::consts::PI * (1.0 - 2.0 * y / 2f64.powi(i32::from(z)));
    n.sinh().atan().to_degrees()
}

/// The tile column and row (from the north) holding a position at zoom `z`, unclamped
/// (longitudes past ±180° give columns outside the grid; latitudes are clamped to the
/// Web Mercator limit).
#[must_use]
pub fn tile_at(z: u8, lat_deg: f64, lon_deg: f64) -> (f64, f64) {
    let n = 2f64.powi(i32::from(z));
    let lat = lat_deg.clamp(-85.0511, 85.0511).to_radians();
    let x = (lon_deg + 180.0) / 360.0 * n;
    let y = (1.0 - lat.tan().asinh() / std::f64::consts::PI) / 2.0 * n;
    (x, y)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn tile_edges_and_positions_agree() {
        assert_relative_eq!(tile_lon_deg(2, 1.0), -90.0);
        assert_relative_eq!(tile_lat_deg(1, 1.0), 0.0, epsilon = 1e-12);
        assert_relative_eq!(tile_lat_deg(0, 0.0), 85.051_128_779_806_6, epsilon = 1e-9);
        let (x, y) = tile_at(2, 38.3, -123.0);
        assert_eq!((x.floor(), y.floor()), (0.0, 1.0));
        assert_relative_eq!(tile_lat_deg(2, y), 38.3, epsilon = 1e-9);
        assert_relative_eq!(tile_lon_deg(2, x), -123.0, epsilon = 1e-9);
    }
}
