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
use std::time::Instant;
use validation::random::{mutate, read_case, Rng};

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
    let args: Vec<String> = std::env::args().collect();
    let seconds: f64 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(60.0);
    let seed: u64 = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(7);
    let max_inputs: u64 = args.get(3).and_then(|s| s.parse().ok()).unwrap_or(u64::MAX);
    let dir = Path::new(concat!(env!("CARGO_MANIFEST_DIR"), "/../cases"));
    let seeds: Vec<String> = std::fs::read_dir(dir)
        .expect("cases folder")
        .flatten()
        .filter(|e| e.path().extension().is_some_and(|x| x == "toml"))
        .filter_map(|e| std::fs::read_to_string(e.path()).ok())
        .collect();
    std::panic::set_hook(Box::new(|_| {}));
    let mut rng = Rng::new(seed);
    let start = Instant::now();
    let (mut runs, mut solved, mut failed, mut crashes) = (0u64, 0u64, 0u64, 0u64);
    while start.elapsed().as_secs_f64() < seconds && runs < max_inputs {
        let mut text = seeds[rng.below(seeds.len())].clone();
        for _ in 0..1 + rng.below(3) {
            text = mutate(&text, &mut rng);
        }
        runs += 1;
        match std::panic::catch_unwind(|| fate(&text, dir)) {
            Ok(Fate::Solved) => solved += 1,
            Ok(Fate::Failed) => failed += 1,
            Ok(Fate::Refused) => {}
            Err(_) => {
                crashes += 1;
                let path = format!("{}/../tests/bad-cases/solve-{crashes:03}.toml", env!("CARGO_MANIFEST_DIR"));
                let _ = std::fs::write(&path, &text);
                eprintln!("crash #{crashes} written to {path}");
            }
        }
    }
    println!(
        "fuzz-solve: {runs} inputs in {:.0} s, {solved} solved, {failed} refused by the study, {crashes} panics (seed {seed})",
        start.elapsed().as_secs_f64()
    );
    if crashes > 0 {
        std::process::exit(1);
    }
}
