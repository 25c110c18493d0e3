//! Helpers shared by the integration tests (`mod common;` in each test file).

use std::path::PathBuf;

/// The public benchmark sets in `../shared/instances` (gdb, val, egl and
/// `reference.csv`), or `None` after printing the one SKIPPED line when they
/// are absent. `test` names the caller in that line.
///
/// ```ignore
/// let Some(dir) = common::shared_dir("solver::small_gdb") else { return };
/// ```
#[allow(dead_code)] // each test binary uses its own subset of these helpers
pub fn shared_dir(test: &str) -> Option<PathBuf> {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../shared/instances");
    if dir.join("reference.csv").is_file() {
        Some(dir)
    } else {
        println!(
            "SKIPPED {test}: the public benchmark sets are absent ({} has no reference.csv)",
            dir.display()
        );
        None
    }
}

/// One file of the public sets, such as `gdb/gdb1.dat`, or `None` after the
/// SKIPPED line of [`shared_dir`].
#[allow(dead_code)]
pub fn shared_file(test: &str, relative: &str) -> Option<PathBuf> {
    shared_dir(test).map(|d| d.join(relative))
}

/// The OpenStreetMap extract `../shared/osm/helsinki.osm.pbf` (© OpenStreetMap
/// contributors, ODbL 1.0), or `None` after printing the one SKIPPED line
/// when it is absent. `test` names the caller in that line.
#[allow(dead_code)]
pub fn shared_osm(test: &str) -> Option<PathBuf> {
    let file = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../shared/osm/helsinki.osm.pbf");
    if file.is_file() {
        Some(file)
    } else {
        println!(
            "SKIPPED {test}: the OpenStreetMap extract is absent ({} is not a file)",
            file.display()
        );
        None
    }
}
