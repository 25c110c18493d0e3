//! Helpers shared by the integration tests (`mod common;` in each test file).

use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

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

/// The planner binary, built with the profile of this test (so that
/// `cargo test` and `cargo test --release` reuse what they compiled): it
/// sits in `examples/` beside the `deps/` folder of the test executable.
/// Built once per test run when missing or out of date (a targeted
/// `cargo test --test planner` does not build examples).
#[allow(dead_code)] // used by the tests that drive the planner
pub fn planner_exe() -> &'static Path {
    static EXE: OnceLock<PathBuf> = OnceLock::new();
    EXE.get_or_init(|| {
        let me = std::env::current_exe().unwrap();
        let profile_dir = me.parent().unwrap().parent().unwrap().to_path_buf();
        let profile = if profile_dir.file_name().is_some_and(|n| n == "release") {
            "release"
        } else {
            "test"
        };
        let status = Command::new(env!("CARGO"))
            .args([
                "build",
                "--quiet",
                "--profile",
                profile,
                "--example",
                "planner",
            ])
            .current_dir(env!("CARGO_MANIFEST_DIR"))
            .status()
            .unwrap();
        assert!(status.success());
        let exe = profile_dir
            .join("examples/planner")
            .with_extension(std::env::consts::EXE_EXTENSION);
        assert!(exe.exists(), "{} not built", exe.display());
        exe
    })
}
