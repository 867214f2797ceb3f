//! Test helper: the disk-cache folder given to the program under test
//! (`RIBBONMAP_CACHE_DIR`), a fresh folder under the target directory per
//! test process, so that no test reads or writes the user's cache folder.

use std::path::Path;
use std::sync::OnceLock;

/// The cache folder of this test process.
pub fn dir() -> &'static Path {
    static DIR: OnceLock<tempfile::TempDir> = OnceLock::new();
    DIR.get_or_init(|| {
        tempfile::Builder::new()
            .prefix("cache-")
            .tempdir_in(env!("CARGO_TARGET_TMPDIR"))
            .expect("a temporary cache folder")
    })
    .path()
}
