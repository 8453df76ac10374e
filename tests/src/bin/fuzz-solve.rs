//! Fuzz harness for the whole study: mutates the example cases as
//! `fuzz-case` does and solves each one's first variant at 1 % within
//! 30 000 triangles through the command's own path (reading, resolving,
//! meshing, the adaptive loop, post-processing, every output file made in
//! memory), catching panics. The reader's harness stops at the mesh; the
//! adaptive loop, the curved elements, the order step, the
//! post-processing and the pictures see mutated input only here. Crashing
//! inputs are written to tests/bad-cases/solve-*.toml for triage.
//! Usage: `cargo run --release -p validation --bin fuzz-solve -- SECONDS [SEED] [MAX_INPUTS]`

use std::collections::BTreeMap;
use std::path::Path;
use validation::random::fuzz;

/// Reads, meshes and solves one case text as `solve` would (its first
/// variant); whether it was refused or solved. Panics propagate.
fn fate(text: &str, dir: &Path) -> &'static str {
    // Relative file names (a DXF outline) resolve beside the examples.
    let solved = lodestone::run::load_text(&dir.join("fuzz.toml"), text.to_string()).and_then(|loaded| {
        let variants = lodestone::run::variants(&loaded, &BTreeMap::new())?;
        let Some(first) = variants.first() else {
            return Ok(());
        };
        let limits = lodestone::run::Limits {
            max_elements: Some(30_000),
            accuracy: Some(Some(0.01)),
        };
        lodestone::run::solve_variant(&loaded, first, &limits, &lodestone::progress::Progress::new(true)).map(|_| ())
    });
    if solved.is_ok() {
        "solved"
    } else {
        "refused"
    }
}

fn main() {
    let dir = Path::new(concat!(env!("CARGO_MANIFEST_DIR"), "/../cases"));
    let tally = fuzz("solve", |text| fate(text, dir));
    if tally.panics > 0 {
        std::process::exit(1);
    }
}
