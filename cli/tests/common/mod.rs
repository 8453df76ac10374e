//! Helpers shared by the command-line tests.

use std::path::{Path, PathBuf};

/// The example cases in cases/, sorted.
pub fn example_cases() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let mut cases: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .collect();
    cases.sort();
    cases
}
