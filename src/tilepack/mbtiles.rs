//! MBTiles: an SQLite file with a `metadata` table (name, value) and a `tiles` table whose
//! rows count from the south (TMS): `tile_row = 2^z − 1 − y`.

use super::{Bounds, PackError, PackInfo, TileStore};
use rusqlite::{Connection, OpenFlags, OptionalExtension};
use std::collections::HashMap;
use std::path::Path;

/// An MBTiles file opened read-only.
pub struct MbTiles {
    db: Connection,
    info: PackInfo,
}

fn sql(e: &rusqlite::Error) -> PackError {
    PackError::Sqlite(e.to_string())
}

/// The `metadata` table as a map; empty when the table is missing (it is optional in
/// practice, though the specification asks for it).
fn read_metadata(db: &Connection) -> Result<HashMap<String, String>, PackError> {
    if !has_table(db, "metadata")? {
        return Ok(HashMap::new());
    }
    let mut statement = db
        .prepare("SELECT name, value FROM metadata")
        .map_err(|e| sql(&e))?;
    let rows = statement
        .query_map([], |r| {
            Ok((r.get::<_, String>(0)?, r.get::<_, Option<String>>(1)?))
        })
        .map_err(|e| sql(&e))?;
    let mut out = HashMap::new();
    for row in rows {
        let (name, value) = row.map_err(|e| sql(&e))?;
        out.insert(name, value.unwrap_or_default());
    }
    Ok(out)
}

fn has_table(db: &Connection, name: &str) -> Result<bool, PackError> {
    db.query_row(
        "SELECT 1 FROM sqlite_master WHERE name = ?1 AND type IN ('table', 'view')",
        [name],
        |_| Ok(()),
    )
    .optional()
    .map(|r| r.is_some())
    .map_err(|e| sql(&e))
}

/// `bounds` as `west,south,east,north` degrees.
fn parse_bounds(text: &str) -> Option<Bounds> {
    let v: Vec<f64> = text
        .split(',')
        .map(|s| s.trim().parse::<f64>())
        .collect::<Result<_, _>>()
        .ok()?;
    let [west_deg, south_deg, east_deg, north_deg] = v[..] else {
        return None;
    };
    [west_deg, south_deg, east_deg, north_deg]
        .iter()
        .all(|x| x.is_finite())
        .then_some(Bounds {
            west_deg,
            south_deg,
            east_deg,
            north_deg,
        })
}

impl MbTiles {
    /// Opens the file read-only and reads its metadata; the zoom range comes from the
    /// tiles when the metadata does not give it.
    pub fn open(path: &Path) -> Result<Self, PackError> {
        let flags = OpenFlags::SQLITE_OPEN_READ_ONLY | OpenFlags::SQLITE_OPEN_NO_MUTEX;
        let db = Connection::open_with_flags(path, flags).map_err(|e| sql(&e))?;
        if !has_table(&db, "tiles")? {
            return Err(PackError::NoTilesTable);
        }
        let meta = read_metadata(&db)?;
        let (low, high): (Option<u8>, Option<u8>) = db
            .query_row(
                "SELECT MIN(zoom_level), MAX(zoom_level) FROM tiles",
                [],
                |r| Ok((r.get(0)?, r.get(1)?)),
            )
            .map_err(|e| sql(&e))?;
        let zoom = |key: &str, found: Option<u8>| {
            meta.get(key).and_then(|v| v.trim().parse().ok()).or(found)
        };
        let (Some(min_zoom), Some(max_zoom)) = (zoom("minzoom", low), zoom("maxzoom", high)) else {
            return Err(PackError::Sqlite("the tiles table is empty".into()));
        };
        let format = super::format_from_name(meta.get("format").map_or("png", String::as_str))?;
        let name = meta
            .get("name")
            .filter(|n| !n.trim().is_empty())
            .cloned()
            .unwrap_or_else(|| super::file_name(path));
        let attribution = meta
            .get("attribution")
            .filter(|a| !a.trim().is_empty())
            .cloned()
            .unwrap_or_else(|| super::file_name(path));
        let info = PackInfo {
            name,
            attribution,
            format,
            bounds: meta.get("bounds").and_then(|b| parse_bounds(b)),
            min_zoom,
            max_zoom,
        };
        Ok(Self { db, info })
    }
}

impl TileStore for MbTiles {
    fn info(&self) -> &PackInfo {
        &self.info
    }

    fn tile(&mut self, z: u8, x: u32, y: u32) -> Result<Option<Vec<u8>>, PackError> {
        let rows = 1u32.checked_shl(u32::from(z)).unwrap_or(0);
        let Some(tms_row) = rows.checked_sub(1).and_then(|n| n.checked_sub(y)) else {
            return Ok(None);
        };
        self.db
            .prepare_cached(
                "SELECT tile_data FROM tiles WHERE zoom_level = ?1 AND tile_column = ?2 AND tile_row = ?3",
            )
            .and_then(|mut s| s.query_row((z, x, tms_row), |r| r.get(0)).optional())
            .map_err(|e| sql(&e))
    }
}
