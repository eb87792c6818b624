//! PMTiles v3: a 127-byte header, a root directory, JSON metadata, leaf directories and
//! the tiles, addressed by a Hilbert-curve tile id. Directories and metadata are
//! compressed (gzip or none here). Read synchronously from the file, one tile at a time.

use super::{Bounds, PackError, PackInfo, TileFormat, TileStore};
use std::fs::File;
use std::io::{Read, Seek, SeekFrom};
use std::path::Path;

const HEADER_LEN: usize = 127;

/// One directory entry: a run of tiles (`run_length` > 0) or a leaf directory (0).
#[derive(Debug, Clone, Copy)]
struct Entry {
    tile_id: u64,
    offset: u64,
    length: u64,
    run_length: u64,
}

/// The parts of the header the reader needs.
#[derive(Debug, Clone, Copy)]
struct Header {
    root: (u64, u64),
    metadata: (u64, u64),
    leaves_offset: u64,
    tiles_offset: u64,
    internal_compression: u8,
    tile_compression: u8,
}

/// A PMTiles file.
pub struct PmTilesPack {
    file: File,
    /// The file's length in bytes: no part is read past it.
    size: u64,
    header: Header,
    root: Vec<Entry>,
    info: PackInfo,
}

/// The most a compressed part (a directory, the metadata or a tile) may unpack to: far
/// above any real one, and a bound on what a small damaged file can make the app allocate.
const MAX_UNPACKED_BYTES: u64 = 64 << 20;

fn damaged(what: impl Into<String>) -> PackError {
    PackError::Pmtiles(what.into())
}

fn u64_at(b: &[u8], at: usize) -> u64 {
    let mut v = [0u8; 8];
    v.copy_from_slice(&b[at..at + 8]);
    u64::from_le_bytes(v)
}

fn i32_at(b: &[u8], at: usize) -> i32 {
    let mut v = [0u8; 4];
    v.copy_from_slice(&b[at..at + 4]);
    i32::from_le_bytes(v)
}

/// Undoes a compression named by its PMTiles code.
fn decompress(code: u8, bytes: Vec<u8>) -> Result<Vec<u8>, PackError> {
    match code {
        0 | 1 => Ok(bytes),
        2 => {
            let mut out = Vec::new();
            flate2::read::GzDecoder::new(bytes.as_slice())
                .take(MAX_UNPACKED_BYTES + 1)
                .read_to_end(&mut out)
                .map_err(|e| damaged(format!("gzip data cannot be read: {e}")))?;
            if out.len() as u64 > MAX_UNPACKED_BYTES {
                return Err(damaged(format!(
                    "a part unpacks to more than {} MB",
                    MAX_UNPACKED_BYTES >> 20
                )));
            }
            Ok(out)
        }
        3 => Err(PackError::Compression("brotli")),
        4 => Err(PackError::Compression("zstd")),
        _ => Err(PackError::Compression("an unknown method")),
    }
}

/// The tile format of a header's tile type code.
fn tile_format(code: u8) -> Result<TileFormat, PackError> {
    match code {
        2 => Ok(TileFormat::Png),
        3 => Ok(TileFormat::Jpeg),
        1 => Err(PackError::UnsupportedTiles("vector tiles (MVT)".into())),
        4 => Err(PackError::UnsupportedTiles("WebP".into())),
        5 => Err(PackError::UnsupportedTiles("AVIF".into())),
        _ => Err(PackError::UnsupportedTiles(format!("of type {code}"))),
    }
}

fn varint(b: &mut &[u8]) -> Result<u64, PackError> {
    let mut value = 0u64;
    for shift in (0..64).step_by(7) {
        let (&byte, rest) = b
            .split_first()
            .ok_or_else(|| damaged("a directory ends in the middle of a number"))?;
        *b = rest;
        value |= u64::from(byte & 0x7f) << shift;
        if byte & 0x80 == 0 {
            return Ok(value);
        }
    }
    Err(damaged("a directory holds a number longer than 64 bits"))
}

/// Decodes a decompressed directory: the count, then tile ids (as differences), run
/// lengths, lengths and offsets (0: right after the previous entry, else offset + 1).
fn parse_directory(mut b: &[u8]) -> Result<Vec<Entry>, PackError> {
    let n = usize::try_from(varint(&mut b)?).unwrap_or(usize::MAX);
    if n > b.len() {
        return Err(damaged(
            "a directory says it has more entries than it holds",
        ));
    }
    let mut entries = vec![
        Entry {
            tile_id: 0,
            offset: 0,
            length: 0,
            run_length: 0
        };
        n
    ];
    let mut last_id = 0u64;
    for e in &mut entries {
        last_id = last_id.wrapping_add(varint(&mut b)?);
        e.tile_id = last_id;
    }
    for e in &mut entries {
        e.run_length = varint(&mut b)?;
    }
    for e in &mut entries {
        e.length = varint(&mut b)?;
    }
    for k in 0..n {
        let v = varint(&mut b)?;
        entries[k].offset = match (k, v) {
            (k, 0) if k > 0 => entries[k - 1].offset.saturating_add(entries[k - 1].length),
            _ => v.saturating_sub(1),
        };
    }
    Ok(entries)
}

/// The Hilbert-curve tile id of tile `x`, `y` (from the north) at zoom `z`.
fn tile_id(z: u8, mut x: u64, mut y: u64) -> u64 {
    let z = u32::from(z);
    let mut id = ((1u64 << (2 * z)) - 1) / 3;
    for a in (0..z).rev() {
        let s = 1u64 << a;
        let (rx, ry) = (u64::from(x & s > 0), u64::from(y & s > 0));
        id += ((3 * rx) ^ ry) << (2 * a);
        if ry == 0 {
            if rx == 1 {
                x = s - 1 - (x & (s - 1));
                y = s - 1 - (y & (s - 1));
            }
            std::mem::swap(&mut x, &mut y);
        }
    }
    id
}

/// The entry holding `id`: a run that covers it, or a leaf directory that may.
fn find(entries: &[Entry], id: u64) -> Option<Entry> {
    let k = entries
        .partition_point(|e| e.tile_id <= id)
        .checked_sub(1)?;
    let e = entries[k];
    (e.run_length == 0 || id - e.tile_id < e.run_length).then_some(e)
}

impl PmTilesPack {
    /// Opens the file, checks its header and reads its root directory and metadata.
    pub fn open(path: &Path) -> Result<Self, PackError> {
        let mut file = File::open(path)?;
        let size = file.metadata()?.len();
        let mut h = [0u8; HEADER_LEN];
        file.read_exact(&mut h).map_err(|_| {
            damaged(format!(
                "the file has {size} bytes, shorter than the {HEADER_LEN}-byte header"
            ))
        })?;
        if &h[..7] != b"PMTiles" || h[7] != 3 {
            return Err(damaged(format!(
                "expected PMTiles version 3, found version {}",
                h[7]
            )));
        }
        let header = Header {
            root: (u64_at(&h, 8), u64_at(&h, 16)),
            metadata: (u64_at(&h, 24), u64_at(&h, 32)),
            leaves_offset: u64_at(&h, 40),
            tiles_offset: u64_at(&h, 56),
            internal_compression: h[97],
            tile_compression: h[98],
        };
        let ends = [
            header.root.0.checked_add(header.root.1),
            header.metadata.0.checked_add(header.metadata.1),
            u64_at(&h, 40).checked_add(u64_at(&h, 48)),
            u64_at(&h, 56).checked_add(u64_at(&h, 64)),
        ];
        if let Some(end) = ends
            .into_iter()
            .map(|end| end.unwrap_or(u64::MAX))
            .max()
            .filter(|end| *end > size)
        {
            return Err(damaged(format!(
                "the file has {size} bytes; its header says it has {end}"
            )));
        }
        let format = tile_format(h[99])?;
        let mut pack = Self {
            file,
            size,
            header,
            root: Vec::new(),
            info: PackInfo {
                name: super::file_name(path),
                attribution: super::file_name(path),
                format,
                bounds: None,
                min_zoom: h[100],
                max_zoom: h[101],
            },
        };
        pack.root = pack.directory(header.root.0, header.root.1)?;
        pack.read_metadata()?;
        let e7 = |at| f64::from(i32_at(&h, at)) / 1e7;
        let (west_deg, south_deg, east_deg, north_deg) = (e7(102), e7(106), e7(110), e7(114));
        if west_deg < east_deg && south_deg < north_deg {
            pack.info.bounds = Some(Bounds {
                west_deg,
                south_deg,
                east_deg,
                north_deg,
            });
        }
        Ok(pack)
    }

    /// The `length` bytes from byte `offset`; a part that would run past the end of the
    /// file is refused before anything is allocated for it.
    fn read_at(&mut self, offset: u64, length: u64) -> Result<Vec<u8>, PackError> {
        if offset.checked_add(length).is_none_or(|end| end > self.size) {
            return Err(damaged(format!(
                "a part of {length} bytes at byte {offset} runs past the end of the file ({} bytes)",
                self.size
            )));
        }
        let length = usize::try_from(length).map_err(|_| damaged("a part is too long"))?;
        let mut out = vec![0u8; length];
        self.file.seek(SeekFrom::Start(offset))?;
        self.file.read_exact(&mut out).map_err(|_| {
            damaged(format!(
                "a part at byte {offset} runs past the end of the file"
            ))
        })?;
        Ok(out)
    }

    fn directory(&mut self, offset: u64, length: u64) -> Result<Vec<Entry>, PackError> {
        let bytes = self.read_at(offset, length)?;
        parse_directory(&decompress(self.header.internal_compression, bytes)?)
    }

    /// Takes the name and attribution from the JSON metadata, where given.
    fn read_metadata(&mut self) -> Result<(), PackError> {
        let (offset, length) = self.header.metadata;
        if length == 0 {
            return Ok(());
        }
        let bytes = decompress(
            self.header.internal_compression,
            self.read_at(offset, length)?,
        )?;
        let meta: serde_json::Value = serde_json::from_slice(&bytes)
            .map_err(|e| damaged(format!("the metadata is not JSON: {e}")))?;
        let text = |key: &str| {
            meta.get(key)
                .and_then(serde_json::Value::as_str)
                .map(str::trim)
                .filter(|s| !s.is_empty())
                .map(str::to_string)
        };
        if let Some(name) = text("name") {
            self.info.name = name;
        }
        if let Some(attribution) = text("attribution") {
            self.info.attribution = attribution;
        }
        Ok(())
    }
}

impl TileStore for PmTilesPack {
    fn info(&self) -> &PackInfo {
        &self.info
    }

    fn tile(&mut self, z: u8, x: u32, y: u32) -> Result<Option<Vec<u8>>, PackError> {
        if z > 26 || u64::from(x.max(y)) >= 1u64 << z {
            return Ok(None);
        }
        let id = tile_id(z, u64::from(x), u64::from(y));
        let mut entry = find(&self.root, id);
        // Leaf directories, at most three deep as the specification allows.
        for _ in 0..3 {
            match entry {
                Some(e) if e.run_length == 0 => {
                    let at = self.header.leaves_offset.saturating_add(e.offset);
                    let leaf = self.directory(at, e.length)?;
                    entry = find(&leaf, id);
                }
                _ => break,
            }
        }
        match entry {
            Some(e) if e.run_length > 0 => {
                let at = self.header.tiles_offset.saturating_add(e.offset);
                let bytes = self.read_at(at, e.length)?;
                decompress(self.header.tile_compression, bytes).map(Some)
            }
            _ => Ok(None),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tile_ids_follow_the_hilbert_curve() {
        // Values from the PMTiles v3 specification's examples and its reference code.
        assert_eq!(tile_id(0, 0, 0), 0);
        assert_eq!(tile_id(1, 0, 0), 1);
        assert_eq!(tile_id(1, 0, 1), 2);
        assert_eq!(tile_id(1, 1, 1), 3);
        assert_eq!(tile_id(1, 1, 0), 4);
        assert_eq!(tile_id(2, 0, 0), 5);
        assert_eq!(tile_id(12, 3423, 1763), 19_078_479);
    }

    #[test]
    fn a_run_covers_the_ids_after_its_first() {
        let e = |tile_id, run_length| Entry {
            tile_id,
            offset: 0,
            length: 1,
            run_length,
        };
        let entries = [e(5, 2), e(10, 1), e(20, 0)];
        assert_eq!(find(&entries, 6).map(|e| e.tile_id), Some(5));
        assert!(find(&entries, 7).is_none());
        assert!(find(&entries, 4).is_none());
        assert_eq!(find(&entries, 99).map(|e| e.tile_id), Some(20));
    }
}
