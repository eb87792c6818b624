//! Writing files so that a crash or an error never leaves half a file behind.

use std::io::Write;
use std::path::Path;

/// Writes `bytes` to `path` atomically: into a temporary file in the same folder,
/// flushed to disk, then renamed over the target. On any error the target is left as
/// it was and the temporary file is removed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    let mut tmp = tempfile::Builder::new()
        .prefix(".shelfwind-")
        .suffix(".tmp")
        .tempfile_in(dir)?;
    tmp.write_all(bytes)?;
    tmp.as_file().sync_all()?;
    tmp.persist(path).map_err(|e| e.error)?;
    Ok(())
}
