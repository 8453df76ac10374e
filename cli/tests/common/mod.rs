//! Helpers shared by the command-line tests.
// Each test crate includes this module and uses part of it.
#![allow(dead_code)]

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

/// B_z on the axis of a uniformly magnetized cylinder (radius a, length L)
/// at distance z from its face: Br/2 [(z + L)/sqrt((z + L)^2 + a^2) -
/// z/sqrt(z^2 + a^2)] (E. P. Furlani, Permanent Magnet and
/// Electromechanical Devices, 2001, sec. 4.3; Derby and Olbert 2010).
pub fn cylinder_axis_field(br: f64, a: f64, l: f64, z: f64) -> f64 {
    let f = |u: f64| u / (u * u + a * a).sqrt();
    0.5 * br * (f(z + l) - f(z))
}

/// The side d (m) of the cylinder with L = D = d whose axial field at z
/// from its face is `b` (`cylinder_axis_field`), by bisection within
/// [5 mm, 100 mm], where the field rises with d.
pub fn cylinder_for_axis_field(br: f64, z: f64, b: f64) -> f64 {
    let (mut lo, mut hi) = (5e-3, 0.1);
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        if cylinder_axis_field(br, mid / 2.0, mid, z) < b {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

/// Runs `lodestone solve --quiet` on a case text in a fresh folder named
/// after `name`: the exit code, the terminal text, and the output folder
/// (the caller removes `dir`, its parent, when done).
pub fn solve_text(name: &str, text: &str) -> (Option<i32>, String, PathBuf) {
    solve_text_showing(name, text, false)
}

/// As `solve_text`, with the progress lines on stderr when `progress`.
pub fn solve_text_showing(name: &str, text: &str, progress: bool) -> (Option<i32>, String, PathBuf) {
    let dir = std::env::temp_dir().join(format!("lodestone-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let case = dir.join("case.toml");
    std::fs::write(&case, text).unwrap();
    let out = dir.join("out");
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_lodestone"))
        .args(["solve", case.to_str().unwrap(), "-o", out.to_str().unwrap()])
        .args((!progress).then_some("--quiet"))
        .output()
        .unwrap();
    let said = format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr));
    (o.status.code(), said, out)
}

/// A results.json map: values or errors by name.
pub type ValueMap = serde_json::Map<String, serde_json::Value>;

/// Solves a case text that must succeed (exit 0): its results.json
/// `values` and `errors`, the folder removed.
pub fn solved(name: &str, text: &str) -> (ValueMap, ValueMap) {
    let (code, said, out) = solve_text(name, text);
    assert_eq!(code, Some(0), "{said}");
    let j: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(out.join("results.json")).unwrap()).unwrap();
    let _ = std::fs::remove_dir_all(out.parent().unwrap());
    (j["values"].as_object().unwrap().clone(), j["errors"].as_object().cloned().unwrap_or_default())
}
