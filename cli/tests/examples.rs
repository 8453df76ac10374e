//! The example cases are regression tests: `lodestone check cases/*.toml` passes.

use std::path::Path;
use std::process::Command;

#[test]
fn every_example_case_passes_check() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let mut cases: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .collect();
    cases.sort();
    assert!(cases.len() >= 8, "{} example cases", cases.len());
    let junit = std::env::temp_dir().join(format!("lodestone-examples-{}.xml", std::process::id()));
    let out = Command::new(env!("CARGO_BIN_EXE_lodestone"))
        .arg("check")
        .arg("--quiet")
        .args(&cases)
        .arg("--junit")
        .arg(&junit)
        .output()
        .unwrap();
    let text = format!("{}{}", String::from_utf8_lossy(&out.stdout), String::from_utf8_lossy(&out.stderr));
    assert_eq!(out.status.code(), Some(0), "{text}");
    let xml = std::fs::read_to_string(&junit).unwrap();
    assert!(xml.contains("failures=\"0\""), "{xml}");
    for case in &cases {
        let head = std::fs::read_to_string(case).unwrap();
        assert!(
            head.starts_with("# ") && head.contains("What to look at"),
            "{} lacks its header comment",
            case.display()
        );
    }
    let _ = std::fs::remove_file(junit);
}
