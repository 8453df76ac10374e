//! Refactoring guard: every example case's `values` in results.json equal
//! the kept baseline (tests/baseline/example-values.json) to a relative
//! 1e-12. A change meant to move results (new physics, a better mesh)
//! regenerates the baseline with `bash tests/baseline/bless.sh` and says
//! why in its commit; a refactor must leave it alone.

mod common;

use serde_json::Value;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::Command;

/// Relative agreement asked of every value.
const RELATIVE: f64 = 1e-12;

fn results_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for entry in std::fs::read_dir(dir).unwrap().flatten() {
        let p = entry.path();
        if p.is_dir() {
            results_files(&p, out);
        } else if p.file_name().is_some_and(|n| n == "results.json") {
            out.push(p);
        }
    }
}

#[test]
fn example_values_match_the_kept_baseline() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("..");
    let baseline: BTreeMap<String, BTreeMap<String, f64>> =
        serde_json::from_str(&std::fs::read_to_string(root.join("tests/baseline/example-values.json")).unwrap()).unwrap();
    let work = std::env::temp_dir().join(format!("lodestone-baseline-{}", std::process::id()));
    let mut seen = 0;
    let mut mismatches = Vec::new();
    let cases = common::example_cases();
    for case in &cases {
        let stem = case.file_stem().unwrap().to_string_lossy().into_owned();
        let out = work.join(&stem);
        let run = Command::new(env!("CARGO_BIN_EXE_lodestone"))
            .args(["solve", "--quiet", "--force", "-o"])
            .arg(&out)
            .arg(case)
            .output()
            .unwrap();
        assert!(run.status.code().is_some_and(|c| c <= 1), "{stem}: {}", String::from_utf8_lossy(&run.stderr));
        let mut files = Vec::new();
        results_files(&out, &mut files);
        for f in files {
            let key = f.parent().unwrap().strip_prefix(&work).unwrap().to_string_lossy().replace('\\', "/");
            let json: Value = serde_json::from_str(&std::fs::read_to_string(&f).unwrap()).unwrap();
            let values = json["values"].as_object().unwrap();
            let Some(expected) = baseline.get(&key) else {
                mismatches.push(format!("{key}: not in the baseline"));
                continue;
            };
            seen += 1;
            for (name, want) in expected {
                match values.get(name).and_then(Value::as_f64) {
                    None => mismatches.push(format!("{key}: {name} missing")),
                    Some(got) if (got - want).abs() > RELATIVE * got.abs().max(want.abs()) => {
                        mismatches.push(format!("{key}: {name} = {got:e}, baseline {want:e}"))
                    }
                    Some(_) => {}
                }
            }
            for name in values.keys().filter(|n| !expected.contains_key(*n)) {
                mismatches.push(format!("{key}: {name} is new"));
            }
            // Every value carries its unit from its type (sweep tables read it).
            for name in values.keys().filter(|n| json["units"].get(n.as_str()).and_then(Value::as_str).is_none()) {
                mismatches.push(format!("{key}: {name} has no typed unit"));
            }
        }
    }
    let _ = std::fs::remove_dir_all(&work);
    assert_eq!(seen, baseline.len(), "variants run against the baseline");
    assert!(mismatches.is_empty(), "{} differences:\n{}", mismatches.len(), mismatches.join("\n"));
}
