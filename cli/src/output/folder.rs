//! A result folder owned by one run: a lock taken for the whole command (a
//! second run on the same folder is refused, instead of the two deleting
//! each other's temporary files), and result sets committed whole. A
//! commit stages every file, writes a journal of the renames, renames
//! with interruptions held, removes the files of the folder's previous set
//! that the new one lacks, and records the set in a manifest. A journal
//! found on opening (the machine stopped mid-commit) is rolled forward
//! first, so a folder never shows two runs' files side by side.

use super::{remove_stale, stage, FileSet};
use std::fs::File;
use std::path::{Path, PathBuf};

/// The lock file of a result folder.
const LOCK: &str = ".lodestone.lock";
/// The journal of a commit in progress: one `temporary\ttarget` line a file.
const JOURNAL: &str = ".lodestone-commit";
/// The files of the set last committed to a folder, one name a line.
const MANIFEST: &str = ".lodestone-files";

/// An output folder, locked while this value lives.
pub struct OutputFolder {
    dir: PathBuf,
    _lock: File,
    /// The folder did not exist before this run: a run that commits
    /// nothing removes it again (a failed first run leaves no empty folder).
    created: bool,
}

impl OutputFolder {
    /// Creates (if needed) and locks the folder, finishing any interrupted
    /// commit and clearing temporary files of a dead run.
    pub fn open(dir: &Path) -> Result<OutputFolder, String> {
        let created = !dir.exists();
        std::fs::create_dir_all(dir).map_err(|e| format!("cannot create the output folder {}: {e}", dir.display()))?;
        let lock = File::options()
            .create(true)
            .truncate(false)
            .write(true)
            .open(dir.join(LOCK))
            .map_err(|e| format!("cannot write in the output folder {}: {e}", dir.display()))?;
        if !lock_within_grace(&lock) {
            return Err(format!(
                "another lodestone run is writing to {}; wait for it to finish or choose another folder with -o",
                dir.display()
            ));
        }
        let folder = OutputFolder {
            dir: dir.to_path_buf(),
            _lock: lock,
            created,
        };
        folder.recover(dir)?;
        Ok(folder)
    }

    /// The folder.
    pub fn path(&self) -> &Path {
        &self.dir
    }

    /// Rolls an interrupted commit forward in `set` and its variant folders,
    /// then clears stale temporary files.
    fn recover(&self, set: &Path) -> Result<(), String> {
        let journal = set.join(JOURNAL);
        if let Ok(text) = std::fs::read_to_string(&journal) {
            for line in text.lines() {
                if let Some((tmp, target)) = line.split_once('\t') {
                    let (tmp, target) = (set.join(tmp), set.join(target));
                    if tmp.exists() {
                        std::fs::rename(&tmp, &target).map_err(|e| format!("cannot finish the interrupted commit in {}: {e}", set.display()))?;
                    }
                }
            }
            let _ = std::fs::remove_file(&journal);
        }
        remove_stale(set);
        if set == self.dir.as_path() {
            for e in std::fs::read_dir(set).into_iter().flatten().flatten() {
                if e.path().is_dir() && e.file_name().to_string_lossy().starts_with("variant-") {
                    self.recover(&e.path())?;
                }
            }
        }
        Ok(())
    }

    /// Commits `files` as the whole result set of `sub` (the folder itself
    /// when empty): afterwards the set holds exactly these files.
    pub fn commit(&self, sub: &Path, files: &FileSet) -> Result<(), String> {
        let set = self.dir.join(sub);
        let staged = stage(&set, files)?;
        let rel = |p: &Path| p.strip_prefix(&set).map(Path::to_path_buf).unwrap_or_else(|_| p.to_path_buf());
        let journal: String = staged.iter().map(|(t, p)| format!("{}\t{}\n", rel(t).display(), rel(p).display())).collect();
        let manifest: String = files.iter().map(|(n, _)| format!("{}\n", n.display())).collect();
        let previous = std::fs::read_to_string(set.join(MANIFEST)).unwrap_or_default();
        super::write_all(&set, &vec![(JOURNAL.into(), journal.into_bytes())])?;
        crate::interrupt::uninterrupted(|| {
            for (tmp, target) in &staged {
                std::fs::rename(tmp, target).map_err(|e| format!("cannot move {} into place: {e}", target.display()))?;
            }
            for old in previous.lines().filter(|o| !files.iter().any(|(n, _)| n.as_path() == Path::new(o))) {
                let _ = std::fs::remove_file(set.join(old));
            }
            super::write_all(&set, &vec![(MANIFEST.into(), manifest.into_bytes())])?;
            std::fs::remove_file(set.join(JOURNAL)).map_err(|e| format!("cannot finish the commit in {}: {e}", set.display()))
        })
    }
}

/// How long a lock held by someone else is waited for before the folder
/// counts as another run's. A lock is released when the last copy of its
/// file descriptor closes; a process that forks a child (a test harness
/// running the binary, a Python program) lends its descriptors to the child
/// until the child's exec closes them, so a lock just dropped can look held
/// for that instant (cli/tests/result_folders.rs, reopening its own folder
/// while other tests started the binary, failed so once). A real run holds
/// it for its whole solve.
const LOCK_GRACE: std::time::Duration = std::time::Duration::from_millis(200);

/// Takes the lock, trying again within LOCK_GRACE while it is held.
fn lock_within_grace(lock: &File) -> bool {
    let start = std::time::Instant::now();
    loop {
        match lock.try_lock() {
            Ok(()) => return true,
            Err(std::fs::TryLockError::WouldBlock) if start.elapsed() < LOCK_GRACE => std::thread::sleep(std::time::Duration::from_millis(10)),
            Err(_) => return false,
        }
    }
}

impl Drop for OutputFolder {
    fn drop(&mut self) {
        if self.created && !self.dir.join(MANIFEST).exists() {
            let _ = std::fs::remove_file(self.dir.join(LOCK));
            // Only if nothing else is in it.
            let _ = std::fs::remove_dir(&self.dir);
        }
    }
}
