//! Where the file-based targets write each input: in memory (`/dev/shm`) where there is
//! one, else the temporary folder; one file per fuzzing process and extension.

use std::path::PathBuf;

/// The file for this process's inputs with extension `ext`.
pub fn path(ext: &str) -> PathBuf {
    let dir = if std::path::Path::new("/dev/shm").is_dir() {
        PathBuf::from("/dev/shm")
    } else {
        std::env::temp_dir()
    };
    dir.join(format!("shelfwind-fuzz-{}.{ext}", std::process::id()))
}
