//! The output folder: checked before the search, written atomically after it.
//!
//! Every file is first written in full to a temporary file in the output
//! folder (`.NAME.PID.partial`, flushed to disk); only when all of them are
//! written are they renamed over their final names, the plan file last, and
//! the outputs of an earlier run that the new one does not replace (a
//! `truck-9.csv` when the new plan has three trucks) removed. A run that
//! fails or is killed while writing leaves the old outputs as they were and
//! at most `.partial` files, which the next run clears away. Files of other
//! programs in the folder are never touched.

use std::fs::{self, File};
use std::io::{self, Write as _};
use std::path::{Path, PathBuf};

use arcwright::report::OutputFile;

use crate::AppError;

/// Whether `name` is one of the files the planner writes (so that a new
/// run may replace it): `plan.json`, `plan.geojson`, `plan.svg`,
/// `sheets.md`, `summary.txt` and `truck-N.csv`.
pub fn is_planner_output(name: &str) -> bool {
    matches!(
        name,
        "plan.json" | "plan.geojson" | "plan.svg" | "sheets.md" | "summary.txt"
    ) || name
        .strip_prefix("truck-")
        .and_then(|r| r.strip_suffix(".csv"))
        .is_some_and(|n| !n.is_empty() && n.bytes().all(|b| b.is_ascii_digit()))
}

/// Whether `name` is a temporary file of a planner run.
fn is_partial(name: &str) -> bool {
    name.starts_with('.')
        && name.ends_with(".partial")
        && is_planner_output(
            name[1..]
                .split('.')
                .take(2)
                .collect::<Vec<_>>()
                .join(".")
                .as_str(),
        )
}

fn write_err(path: &Path) -> impl FnOnce(io::Error) -> AppError + '_ {
    move |source| AppError::Write {
        path: path.to_path_buf(),
        source,
    }
}

/// Makes sure the plan can be written into `dir` before any search: the
/// folder exists (it is created when missing) and is a folder, and a file can
/// be created in it. Called before the search, so that a wrong `--out`
/// costs nothing.
///
/// # Errors
///
/// [`AppError::OutFolder`] naming the folder and the reason.
pub fn prepare_folder(dir: &Path) -> Result<(), AppError> {
    let bad = |reason: String| AppError::OutFolder {
        path: dir.to_path_buf(),
        reason,
    };
    match fs::metadata(dir) {
        Ok(m) if !m.is_dir() => {
            return Err(bad("it is a file, not a folder".into()));
        }
        Ok(_) => {}
        Err(_) => fs::create_dir_all(dir).map_err(|e| bad(format!("cannot create it: {e}")))?,
    }
    let probe = dir.join(format!(".planner-probe.{}.partial", std::process::id()));
    File::create(&probe)
        .and_then(|mut f| f.write_all(b"probe"))
        .map_err(|e| bad(format!("cannot write in it: {e}")))?;
    let _ = fs::remove_file(&probe);
    Ok(())
}

/// Writes `files` into `dir` atomically (see the module docs) with `write`
/// (which writes and flushes one temporary file), and returns the final
/// paths in the order given.
pub fn write_files_with(
    dir: &Path,
    files: &[OutputFile],
    write: impl Fn(&Path, &[u8]) -> io::Result<()>,
) -> Result<Vec<PathBuf>, AppError> {
    fs::create_dir_all(dir).map_err(write_err(dir))?;
    let existing: Vec<String> = fs::read_dir(dir)
        .map_err(write_err(dir))?
        .flatten()
        .filter(|e| e.file_type().is_ok_and(|t| t.is_file()))
        .filter_map(|e| e.file_name().into_string().ok())
        .collect();
    // Leftovers of runs that were killed while writing.
    for name in existing.iter().filter(|n| is_partial(n)) {
        let _ = fs::remove_file(dir.join(name));
    }
    let pid = std::process::id();
    let mut temps: Vec<(PathBuf, PathBuf)> = Vec::with_capacity(files.len());
    for f in files {
        let tmp = dir.join(format!(".{}.{pid}.partial", f.name));
        let done = dir.join(&f.name);
        temps.push((tmp.clone(), done));
        if let Err(source) = write(&tmp, f.contents.as_bytes()) {
            for (t, _) in &temps {
                let _ = fs::remove_file(t);
            }
            return Err(AppError::Write { path: tmp, source });
        }
    }
    // All new files are complete: now replace the old ones. Stale outputs
    // first, the plan file last.
    for name in existing.iter().filter(|n| is_planner_output(n)) {
        if !files.iter().any(|f| &f.name == name) {
            let path = dir.join(name);
            fs::remove_file(&path).map_err(write_err(&path))?;
        }
    }
    temps.sort_by_key(|(_, done)| done.ends_with("plan.json"));
    for (tmp, done) in &temps {
        fs::rename(tmp, done).map_err(write_err(done))?;
    }
    if let Ok(d) = File::open(dir) {
        let _ = d.sync_all();
    }
    Ok(files.iter().map(|f| dir.join(&f.name)).collect())
}

/// Writes one file in full and flushes it to disk.
pub fn write_synced(path: &Path, bytes: &[u8]) -> io::Result<()> {
    let mut f = File::create(path)?;
    f.write_all(bytes)?;
    f.sync_all()
}

/// [`write_files_with`] with [`write_synced`].
pub fn write_files(dir: &Path, files: &[OutputFile]) -> Result<Vec<PathBuf>, AppError> {
    write_files_with(dir, files, write_synced)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn temp_dir(name: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("arcwright-{name}-{}", std::process::id()));
        let _ = fs::remove_dir_all(&d);
        fs::create_dir_all(&d).unwrap();
        d
    }

    fn listing(dir: &Path) -> Vec<String> {
        let mut v: Vec<String> = fs::read_dir(dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().into_string().unwrap())
            .collect();
        v.sort();
        v
    }

    fn file(name: &str, contents: &str) -> OutputFile {
        OutputFile {
            name: name.into(),
            contents: contents.into(),
        }
    }

    #[test]
    fn planner_outputs_are_told_apart() {
        for n in [
            "plan.json",
            "plan.svg",
            "truck-1.csv",
            "truck-007.csv",
            "sheets.md",
        ] {
            assert!(is_planner_output(n), "{n}");
        }
        for n in [
            "notes.txt",
            "truck-.csv",
            "truck-a.csv",
            "plan.json.bak",
            "my-plan.json",
        ] {
            assert!(!is_planner_output(n), "{n}");
        }
        assert!(is_partial(".plan.json.123.partial"));
        assert!(is_partial(".truck-2.csv.9.partial"));
        assert!(!is_partial(".notes.txt.1.partial"));
    }

    #[test]
    fn a_new_run_replaces_only_planner_outputs() {
        let dir = temp_dir("replace");
        for n in [
            "truck-9.csv",
            "plan.svg",
            "notes.txt",
            ".plan.json.1.partial",
        ] {
            fs::write(dir.join(n), "old").unwrap();
        }
        let written =
            write_files(&dir, &[file("truck-1.csv", "new"), file("plan.json", "{}")]).unwrap();
        assert_eq!(
            written,
            vec![dir.join("truck-1.csv"), dir.join("plan.json")]
        );
        assert_eq!(listing(&dir), ["notes.txt", "plan.json", "truck-1.csv"]);
        assert_eq!(fs::read_to_string(dir.join("truck-1.csv")).unwrap(), "new");
        fs::remove_dir_all(&dir).unwrap();
    }

    /// A write failing half-way (a full disk, say) leaves the old outputs
    /// complete and in place, and no new file that looks complete.
    #[test]
    fn a_failed_write_leaves_the_old_outputs_untouched() {
        let dir = temp_dir("atomic");
        for n in ["plan.json", "summary.txt", "truck-1.csv", "truck-2.csv"] {
            fs::write(dir.join(n), format!("old {n}")).unwrap();
        }
        let before = listing(&dir);
        let new = [
            file("plan.json", "new plan"),
            file("summary.txt", "new summary"),
            file("truck-1.csv", "new truck"),
        ];
        let failing = |p: &Path, b: &[u8]| {
            if p.to_string_lossy().contains("truck-1") {
                // Half the bytes reach the disk, then the disk is full.
                fs::write(p, &b[..b.len() / 2])?;
                return Err(io::Error::other("no space left on device"));
            }
            write_synced(p, b)
        };
        let err = write_files_with(&dir, &new, failing).unwrap_err();
        assert!(err.to_string().contains("no space left"), "{err}");
        assert_eq!(listing(&dir), before);
        for n in &before {
            assert_eq!(fs::read_to_string(dir.join(n)).unwrap(), format!("old {n}"));
        }
        fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn the_folder_is_checked_before_anything_else() {
        let dir = temp_dir("prepare");
        let as_file = dir.join("out.txt");
        fs::write(&as_file, "x").unwrap();
        let e = prepare_folder(&as_file).unwrap_err().to_string();
        assert!(e.contains("out.txt") && e.contains("not a folder"), "{e}");
        let under_file = as_file.join("sub");
        let e = prepare_folder(&under_file).unwrap_err().to_string();
        assert!(e.contains("cannot create"), "{e}");
        let fresh = dir.join("a/b");
        prepare_folder(&fresh).unwrap();
        assert!(fresh.is_dir());
        assert!(listing(&fresh).is_empty(), "the probe file is removed");
        fs::remove_dir_all(&dir).unwrap();
    }
}
