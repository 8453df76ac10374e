//! Fuzz harness for the case reader: mutates the example cases for a given
//! number of seconds and feeds each through parse, resolve and meshing,
//! catching panics. Crashing inputs are written to tests/bad-cases/fuzz-*.toml
//! for triage. Usage: `cargo run --release -p validation --bin fuzz-case -- SECONDS [SEED] [MAX_INPUTS]`

use validation::random::{fuzz, read_case};

fn main() {
    let tally = fuzz("fuzz", |text| if read_case(text) { "accepted" } else { "refused" });
    if tally.panics > 0 {
        std::process::exit(1);
    }
}
