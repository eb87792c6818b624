//! Writing files so that a crash or an error never leaves half a file behind.

use std::fs::File;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Writes `bytes` to `path` atomically: into a temporary file in the same folder,
/// flushed to disk, then renamed over the target. On any error the target is left as
/// it was and the temporary file is removed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    write_atomic_with(path, |f| f.write_all(bytes))
}

/// Like [`write_atomic`], with the content written by `fill`; if `fill` fails, nothing
/// is renamed and the target is untouched.
pub fn write_atomic_with(
    path: &Path,
    fill: impl FnOnce(&mut File) -> std::io::Result<()>,
) -> std::io::Result<()> {
    write_via_temporary(path, fill).map_err(without_temporary_name)
}

/// The error without the name of the temporary file, which means nothing to the user:
/// the caller names the user's file.
fn without_temporary_name(e: std::io::Error) -> std::io::Error {
    use std::io::ErrorKind;
    if let Some(code) = e.raw_os_error() {
        return std::io::Error::from_raw_os_error(code);
    }
    if !e.to_string().contains(".shelfwind-") {
        return e;
    }
    let words = match e.kind() {
        ErrorKind::NotFound => "the folder does not exist".to_string(),
        ErrorKind::PermissionDenied => "permission denied".to_string(),
        kind => kind.to_string(),
    };
    std::io::Error::new(e.kind(), words)
}

fn write_via_temporary(
    path: &Path,
    fill: impl FnOnce(&mut File) -> std::io::Result<()>,
) -> std::io::Result<()> {
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    let mut tmp = tempfile::Builder::new()
        .prefix(".shelfwind-")
        .suffix(".tmp")
        .tempfile_in(dir)?;
    // Temporary files are private (0600); the saved file keeps the permissions of the
    // file it replaces, or gets the usual 0644 when new, so it can be shared.
    let permissions = match std::fs::metadata(path) {
        Ok(m) => Some(m.permissions()),
        Err(_) => new_file_permissions(),
    };
    if let Some(p) = permissions {
        tmp.as_file().set_permissions(p)?;
    }
    fill(tmp.as_file_mut())?;
    tmp.as_file().sync_all()?;
    tmp.persist(path).map_err(|e| e.error)?;
    Ok(())
}

#[cfg(unix)]
#[allow(clippy::unnecessary_wraps)] // The same signature as the other platforms'.
fn new_file_permissions() -> Option<std::fs::Permissions> {
    use std::os::unix::fs::PermissionsExt;
    Some(std::fs::Permissions::from_mode(0o644))
}

#[cfg(not(unix))]
fn new_file_permissions() -> Option<std::fs::Permissions> {
    None
}

/// The backup kept beside a saved file: `<name>.bak`.
#[must_use]
pub fn backup_path(path: &Path) -> PathBuf {
    let mut name = path.file_name().unwrap_or_default().to_os_string();
    name.push(".bak");
    path.with_file_name(name)
}

/// Saves like [`write_atomic_with`], first keeping the previous file (if any) as its
/// [`backup_path`].
pub fn save_with_backup(
    path: &Path,
    fill: impl FnOnce(&mut File) -> std::io::Result<()>,
) -> std::io::Result<()> {
    if let Ok(previous) = std::fs::read(path) {
        write_atomic(&backup_path(path), &previous)?;
    }
    write_atomic_with(path, fill)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A failed write names no temporary file: "the folder does not exist" for a
    /// missing folder, and the caller adds the user's path.
    #[test]
    fn errors_name_no_temporary_file() {
        let dir = tempfile::tempdir().expect("temp dir");
        let e = write_atomic(&dir.path().join("missing/plan.csv"), b"x").unwrap_err();
        assert_eq!(e.kind(), std::io::ErrorKind::NotFound);
        assert_eq!(e.to_string(), "the folder does not exist");
    }

    /// A failure half-way through writing (simulated) leaves the old file whole and no
    /// temporary file behind.
    #[test]
    fn failed_write_keeps_the_old_file() {
        let dir = tempfile::tempdir().expect("temp dir");
        let path = dir.path().join("coop.json");
        std::fs::write(&path, "old and whole").expect("write");
        let r = save_with_backup(&path, |f| {
            f.write_all(b"new but ha")?;
            Err(std::io::Error::other("disk full (simulated)"))
        });
        assert_eq!(r.unwrap_err().to_string(), "disk full (simulated)");
        assert_eq!(
            std::fs::read_to_string(&path).expect("read"),
            "old and whole"
        );
        let names: Vec<_> = std::fs::read_dir(dir.path())
            .expect("dir")
            .map(|e| e.expect("entry").file_name().into_string().expect("utf-8"))
            .collect();
        // The backup of the old file may be there; no temporary file is.
        assert!(
            names.len() <= 2 && names.iter().all(|n| n.starts_with("coop.json")),
            "{names:?}"
        );
        save_with_backup(&path, |f| f.write_all(b"new")).expect("saves");
        assert_eq!(std::fs::read_to_string(&path).expect("read"), "new");
        assert_eq!(
            std::fs::read_to_string(backup_path(&path)).expect("backup"),
            "old and whole"
        );
    }
}
