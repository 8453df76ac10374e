//! Writing results: every file goes to a temporary name beside its target
//! and is renamed into place only when whole; a result folder's files are
//! committed as one set under the folder's lock (`folder.rs`), so a failed
//! or interrupted run never leaves half a file, never spoils earlier
//! results and never mixes two runs' files.

pub mod csv;
pub mod engineering;
pub mod fieldmap;
pub mod folder;
pub mod html;
pub mod pictures;
pub mod report;
pub mod svg;
pub mod vtk;

use std::io::Write;
use std::path::{Path, PathBuf};

/// Files to write, as (name inside the output folder, bytes).
pub type FileSet = Vec<(PathBuf, Vec<u8>)>;

const TMP_MARK: &str = ".lodestone-tmp-";

/// Writes every file of the set under `dir` (created if missing): each to
/// a temporary name first, then all renamed into place. For single files
/// beside the user's own (a JUnit report); result folders use
/// [`folder::OutputFolder`], which also makes the set whole as a unit.
pub fn write_all(dir: &Path, files: &FileSet) -> Result<(), String> {
    let staged = stage(dir, files)?;
    for (tmp, target) in &staged {
        std::fs::rename(tmp, target).map_err(|e| format!("cannot move {} into place: {e}", target.display()))?;
    }
    Ok(())
}

/// Writes every file to a temporary name beside its target: (temporary,
/// target) pairs, or nothing left behind on failure.
fn stage(dir: &Path, files: &FileSet) -> Result<Vec<(PathBuf, PathBuf)>, String> {
    std::fs::create_dir_all(dir).map_err(|e| format!("cannot create the output folder {}: {e}", dir.display()))?;
    let mut staged: Vec<(PathBuf, PathBuf)> = Vec::new();
    for (name, bytes) in files {
        let target = dir.join(name);
        if let Some(parent) = target.parent() {
            std::fs::create_dir_all(parent).map_err(|e| format!("cannot create {}: {e}", parent.display()))?;
        }
        let tmp = target.with_file_name(format!(
            "{TMP_MARK}{}-{}",
            std::process::id(),
            name.file_name().map_or_else(String::new, |n| n.to_string_lossy().into_owned())
        ));
        let written = std::fs::File::create(&tmp).and_then(|mut f| {
            f.write_all(bytes)?;
            f.sync_all()
        });
        if let Err(e) = written {
            let _ = std::fs::remove_file(&tmp);
            for (t, _) in &staged {
                let _ = std::fs::remove_file(t);
            }
            return Err(format!("cannot write {}: {e}", target.display()));
        }
        staged.push((tmp, target));
    }
    Ok(staged)
}

/// Writes one file atomically at `path` (its folder is created if missing).
pub fn write_file(path: &Path, bytes: Vec<u8>) -> Result<(), String> {
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .map_or_else(|| PathBuf::from("."), Path::to_path_buf);
    let name = path.file_name().map(PathBuf::from).ok_or_else(|| format!("{} names no file", path.display()))?;
    write_all(&dir, &vec![(name, bytes)])
}

/// Removes temporary files left by an interrupted run (only under the
/// folder's lock, so never another live run's).
fn remove_stale(dir: &Path) {
    if let Ok(entries) = std::fs::read_dir(dir) {
        for e in entries.flatten() {
            if e.file_name().to_string_lossy().starts_with(TMP_MARK) {
                let _ = std::fs::remove_file(e.path());
            }
        }
    }
}
