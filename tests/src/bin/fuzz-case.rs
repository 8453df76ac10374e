//! Fuzz harness for the case reader: mutates the example cases for a given
//! number of seconds and feeds each through parse, resolve and meshing,
//! catching panics. Crashing inputs are written to tests/bad-cases/fuzz-*.toml
//! for triage. Usage: `cargo run --release -p validation --bin fuzz-case -- SECONDS [SEED] [MAX_INPUTS]`

use std::time::Instant;
use validation::random::{mutate, read_case, Rng};

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let seconds: f64 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(60.0);
    let seed: u64 = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(7);
    let max_inputs: u64 = args.get(3).and_then(|s| s.parse().ok()).unwrap_or(u64::MAX);
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/../cases");
    let seeds: Vec<String> = std::fs::read_dir(dir)
        .expect("cases folder")
        .flatten()
        .filter_map(|e| std::fs::read_to_string(e.path()).ok())
        .collect();
    std::panic::set_hook(Box::new(|_| {}));
    let mut rng = Rng::new(seed);
    let start = Instant::now();
    let (mut runs, mut accepted, mut crashes) = (0u64, 0u64, 0u64);
    while start.elapsed().as_secs_f64() < seconds && runs < max_inputs {
        let mut text = seeds[rng.below(seeds.len())].clone();
        for _ in 0..1 + rng.below(3) {
            text = mutate(&text, &mut rng);
        }
        runs += 1;
        match std::panic::catch_unwind(|| read_case(&text)) {
            Ok(true) => accepted += 1,
            Ok(false) => {}
            Err(_) => {
                crashes += 1;
                let path = format!("{}/../tests/bad-cases/fuzz-{crashes:03}.toml", env!("CARGO_MANIFEST_DIR"));
                let _ = std::fs::write(&path, &text);
                eprintln!("crash #{crashes} written to {path}");
            }
        }
    }
    println!(
        "fuzz-case: {runs} inputs in {:.0} s, {accepted} accepted, {crashes} panics (seed {seed})",
        start.elapsed().as_secs_f64()
    );
    if crashes > 0 {
        std::process::exit(1);
    }
}
