//! A folder of tiles, `z/x/y.png` or `z/x/y.jpg` (XYZ scheme), with an optional
//! `attribution.txt` naming whom to credit.

use super::{Bounds, PackError, PackInfo, TileFormat, TileStore, tile_lat_deg, tile_lon_deg};
use std::path::{Path, PathBuf};

/// A tile folder.
pub struct FolderPack {
    root: PathBuf,
    extension: &'static str,
    info: PackInfo,
}

/// The entries of `dir` whose names are whole numbers, with those numbers.
fn numbered(dir: &Path) -> Result<Vec<(u32, PathBuf)>, PackError> {
    let mut out = Vec::new();
    for entry in std::fs::read_dir(dir)? {
        let path = entry?.path();
        let number = path
            .file_stem()
            .and_then(|s| s.to_str())
            .and_then(|s| s.parse::<u32>().ok());
        if let Some(n) = number {
            out.push((n, path));
        }
    }
    Ok(out)
}

/// The extension of the first tile file found in a zoom folder (`png` or `jpg`).
fn tile_extension(x_dirs: &[(u32, PathBuf)]) -> Result<Option<String>, PackError> {
    for (_, x_dir) in x_dirs.iter().filter(|(_, p)| p.is_dir()) {
        for (_, file) in numbered(x_dir)? {
            if let Some(ext) = file.extension().and_then(|e| e.to_str()) {
                return Ok(Some(ext.to_ascii_lowercase()));
            }
        }
    }
    Ok(None)
}

impl FolderPack {
    /// Opens a folder: finds its zoom levels, its tile format and, from the deepest
    /// level, the area it covers.
    pub fn open(root: &Path) -> Result<Self, PackError> {
        let zooms: Vec<(u32, PathBuf)> = numbered(root)?
            .into_iter()
            .filter(|(z, p)| *z <= 24 && p.is_dir())
            .collect();
        let mut levels = Vec::new();
        for (z, dir) in &zooms {
            let x_dirs = numbered(dir)?;
            if let Some(ext) = tile_extension(&x_dirs)? {
                levels.push((*z as u8, x_dirs, ext));
            }
        }
        levels.sort_by_key(|(z, _, _)| *z);
        let (Some(first), Some(last)) = (levels.first(), levels.last()) else {
            return Err(PackError::EmptyFolder);
        };
        let format = super::format_from_name(&last.2)?;
        let bounds = level_bounds(last.0, &last.1)?;
        let name = super::file_name(root);
        let attribution = std::fs::read_to_string(root.join("attribution.txt"))
            .ok()
            .map(|t| t.trim().to_string())
            .filter(|t| !t.is_empty())
            .unwrap_or_else(|| name.clone());
        Ok(Self {
            root: root.to_path_buf(),
            extension: match format {
                TileFormat::Png => "png",
                TileFormat::Jpeg => "jpg",
            },
            info: PackInfo {
                name,
                attribution,
                format,
                bounds,
                min_zoom: first.0,
                max_zoom: last.0,
            },
        })
    }
}

/// The area covered by the tiles of one zoom level.
fn level_bounds(z: u8, x_dirs: &[(u32, PathBuf)]) -> Result<Option<Bounds>, PackError> {
    let (mut x0, mut x1, mut y0, mut y1) = (u32::MAX, 0, u32::MAX, 0);
    for (x, dir) in x_dirs.iter().filter(|(_, p)| p.is_dir()) {
        for (y, _) in numbered(dir)? {
            (x0, x1, y0, y1) = (x0.min(*x), x1.max(*x), y0.min(y), y1.max(y));
        }
    }
    Ok((x0 <= x1 && y0 <= y1).then(|| Bounds {
        west_deg: tile_lon_deg(z, f64::from(x0)),
        east_deg: tile_lon_deg(z, f64::from(x1) + 1.0),
        north_deg: tile_lat_deg(z, f64::from(y0)),
        south_deg: tile_lat_deg(z, f64::from(y1) + 1.0),
    }))
}

impl TileStore for FolderPack {
    fn info(&self) -> &PackInfo {
        &self.info
    }

    fn tile(&mut self, z: u8, x: u32, y: u32) -> Result<Option<Vec<u8>>, PackError> {
        let extensions: &[&str] = match self.extension {
            "jpg" => &["jpg", "jpeg"],
            _ => &["png"],
        };
        for ext in extensions {
            let path = self.root.join(format!("{z}/{x}/{y}.{ext}"));
            match std::fs::read(&path) {
                Ok(bytes) => return Ok(Some(bytes)),
                Err(e) if e.kind() == std::io::ErrorKind::NotFound => {}
                Err(e) => return Err(e.into()),
            }
        }
        Ok(None)
    }
}
