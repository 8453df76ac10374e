//! The example cases are regression tests: `lodestone check cases/*.toml` passes.

mod common;

use std::path::Path;
use std::process::Command;

#[test]
fn every_example_case_passes_check() {
    let cases = common::example_cases();
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

#[test]
fn the_readme_tour_runs_as_written() {
    // The README's TOML block is the tour's case: it must solve and meet its expectation.
    let readme = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("../README.md")).unwrap();
    let block = readme
        .split("```toml\n")
        .nth(1)
        .and_then(|b| b.split("```").next())
        .expect("a toml block in README.md");
    let dir = std::env::temp_dir().join(format!("lodestone-tour-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let case = dir.join("disk.toml");
    std::fs::write(&case, block).unwrap();
    let out = Command::new(env!("CARGO_BIN_EXE_lodestone"))
        .arg("check")
        .arg("--quiet")
        .arg(&case)
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    let _ = std::fs::remove_dir_all(&dir);
}
