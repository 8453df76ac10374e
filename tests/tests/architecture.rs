//! Architecture invariants, checked on the sources (DEVELOPERS.md):
//! no import loops between modules of any crate; the libraries do no I/O;
//! the command line holds no physics; no production file is over 600 lines.

use std::path::{Path, PathBuf};
use validation::module_graph::{cycles, edges, read_crate, CRATES};

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("..")
}

fn sources(dir: &Path, out: &mut Vec<PathBuf>) {
    for e in std::fs::read_dir(dir).into_iter().flatten().flatten() {
        let p = e.path();
        if p.is_dir() {
            sources(&p, out);
        } else if p.extension().is_some_and(|x| x == "rs") {
            out.push(p);
        }
    }
}

/// Production code of every source file of a crate: each file up to its first `#[cfg(test)]`.
fn production(krate: &str) -> Vec<(PathBuf, String)> {
    let mut files = Vec::new();
    sources(&root().join(krate).join("src"), &mut files);
    files
        .into_iter()
        .map(|f| {
            let text = std::fs::read_to_string(&f).unwrap();
            // Comments may name what is absent ("no clap here"); only code counts.
            let prod = text
                .split("#[cfg(test)]")
                .next()
                .unwrap_or("")
                .lines()
                .filter(|l| !l.trim_start().starts_with("//"))
                .collect::<Vec<_>>()
                .join("\n");
            (f, prod)
        })
        .collect()
}

#[test]
fn no_module_imports_one_that_imports_it_back() {
    for krate in CRATES {
        let dir = root().join(krate).join("src");
        if !dir.exists() {
            continue;
        }
        let graph = edges(&read_crate(&dir));
        // Every crate but the one-module Python layer has several modules:
        // fewer means the reader missed them.
        let least = if *krate == "python" { 1 } else { 4 };
        assert!(graph.len() >= least, "{krate}: {} modules read", graph.len());
        let found = cycles(&graph);
        assert!(found.is_empty(), "{krate}: import cycles {found:?}");
    }
}

#[test]
fn the_cycle_finder_finds_a_loop() {
    // The checker itself must be able to fail: a three-module loop and a facade.
    let mut modules = std::collections::BTreeMap::new();
    modules.insert(String::new(), "mod a; mod b; mod c; pub use a::Thing;".to_string());
    modules.insert("a".to_string(), "use crate::b::X; pub struct Thing;".to_string());
    modules.insert("b".to_string(), "use super::c::{Y, Z};".to_string());
    modules.insert("c".to_string(), "fn f() { crate::a::g(); }".to_string());
    let found = cycles(&edges(&modules));
    assert_eq!(found.len(), 1, "{found:?}");
    assert_eq!(found[0].len(), 3);
    modules.insert("c".to_string(), "fn f() { crate::Thing; }".to_string());
    assert_eq!(cycles(&edges(&modules)).len(), 1, "a path through the root's re-export reaches a");
    modules.insert("c".to_string(), "fn f() {}".to_string());
    assert!(cycles(&edges(&modules)).is_empty());
}

#[test]
fn the_libraries_touch_no_files_and_no_terminal() {
    let banned = [
        "std::fs",
        "println!",
        "eprintln!",
        "print!(",
        "eprint!(",
        "clap",
        "serde_json",
        "std::io::stdout",
        "std::io::stderr",
    ];
    for krate in ["mesher", "solver", "study"] {
        for (file, text) in production(krate) {
            for b in banned {
                assert!(!text.contains(b), "{}: contains {b}", file.display());
            }
        }
    }
}

#[test]
fn the_command_line_holds_no_physics() {
    // Element kernels, quadrature, constants of nature and material curves
    // belong to solver and study; cli only reads, writes and prints.
    let banned = [
        "solver::element",
        "for_each_point",
        "quadrature",
        "MU0",
        "NU0",
        "BhCurve",
        "integrate::",
        "ElementKind",
    ];
    for (file, text) in production("cli") {
        for b in banned {
            assert!(!text.contains(b), "{}: contains {b}", file.display());
        }
    }
}

#[test]
fn no_production_file_is_over_600_lines() {
    for krate in ["mesher", "solver", "study", "cli"] {
        let mut files = Vec::new();
        sources(&root().join(krate).join("src"), &mut files);
        for f in files {
            let n = std::fs::read_to_string(&f).unwrap().lines().count();
            assert!(n <= 600, "{}: {n} lines", f.display());
        }
    }
}
