//! Lists import cycles between the modules of every crate in the workspace:
//! `cargo run --release -p validation --bin module-cycles`. Exits 1 when a
//! cycle exists (a module importing another that imports it back, directly
//! or round a loop), 0 when the graph of every crate is acyclic.

use std::path::Path;
use validation::module_graph::{cycles, edges, read_crate};

fn main() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("..");
    let mut found = 0;
    for krate in validation::module_graph::CRATES {
        let graph = edges(&read_crate(&root.join(krate).join("src")));
        let edge_count: usize = graph.values().map(|t| t.len()).sum();
        let cyc = cycles(&graph);
        println!("{krate}: {} modules, {edge_count} imports, {} cycles", graph.len(), cyc.len());
        for c in &cyc {
            println!("  cycle: {}", c.join(" <-> "));
        }
        if std::env::args().any(|a| a == "--edges") {
            for (m, t) in &graph {
                println!("  {m} -> {}", t.iter().cloned().collect::<Vec<_>>().join(", "));
            }
        }
        found += cyc.len();
    }
    std::process::exit(i32::from(found > 0));
}
