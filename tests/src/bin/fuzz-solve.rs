//! Fuzz harness for the whole study: mutates the example cases as
//! `fuzz-case` does and, for each one the reader accepts and meshes, solves
//! its first variant at 1 % within 30 000 triangles and makes every output
//! file in memory, catching panics. The reader's fuzzing stops at the mesh;
//! the adaptive loop, the curved elements, the order step, the
//! post-processing and the pictures see their inputs only here. Crashing
//! inputs are written to tests/bad-cases/solve-*.toml for triage.
//! Usage: `cargo run --release -p validation --bin fuzz-solve -- SECONDS [SEED] [MAX_INPUTS]`

use std::collections::BTreeMap;
use std::path::Path;
use validation::random::{fuzz, read_case};

/// What one mutated case came to.
enum Fate {
    Refused,
    Solved,
    Failed,
}

/// Reads, meshes and (when accepted) solves one case text; panics propagate.
fn fate(text: &str, dir: &Path) -> Fate {
    if !read_case(text) {
        return Fate::Refused;
    }
    // Relative file names (a DXF outline) resolve beside the examples.
    let Ok(loaded) = lodestone::run::load_text(&dir.join("fuzz.toml"), text.to_string()) else {
        return Fate::Refused;
    };
    let Ok(variants) = lodestone::run::variants(&loaded, &BTreeMap::new()) else {
        return Fate::Refused;
    };
    let Some(first) = variants.first() else {
        return Fate::Refused;
    };
    let limits = lodestone::run::Limits {
        max_elements: Some(30_000),
        accuracy: Some(Some(0.01)),
    };
    let progress = lodestone::progress::Progress::new(true);
    match lodestone::run::solve_variant(&loaded, first, &limits, &progress) {
        Ok(_) => Fate::Solved,
        Err(_) => Fate::Failed,
    }
}

fn main() {
    let dir = Path::new(concat!(env!("CARGO_MANIFEST_DIR"), "/../cases"));
    let tally = fuzz("solve", |text| match fate(text, dir) {
        Fate::Refused => "refused by the reader",
        Fate::Solved => "solved",
        Fate::Failed => "refused by the study",
    });
    if tally.panics > 0 {
        std::process::exit(1);
    }
}
