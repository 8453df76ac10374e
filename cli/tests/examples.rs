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

/// Every example a case's comments or the docs point a reader to (`cases/NAME.toml`, or a
/// bare `NAME.toml` in a case's own comments) is there: a pointer to a renamed example
/// leaves the reader with nothing to open.
#[test]
fn the_examples_named_in_comments_and_docs_exist() {
    // Case files a run writes into its results folder, which a case's comment may name.
    const WRITTEN: [&str; 1] = ["optimum"];
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("..");
    let mut missing = Vec::new();
    let mut texts: Vec<(std::path::PathBuf, bool)> = common::example_cases().into_iter().map(|c| (c, true)).collect();
    for doc in ["README.md", "DEVELOPERS.md"] {
        texts.push((root.join(doc), false));
    }
    for entry in std::fs::read_dir(root.join("docs")).unwrap() {
        let path = entry.unwrap().path();
        if path.extension().is_some_and(|e| e == "md" || e == "sh") {
            texts.push((path, false));
        }
    }
    for (file, is_case) in &texts {
        let text = std::fs::read_to_string(file).unwrap();
        for word in text.split(|c: char| !(c.is_ascii_alphanumeric() || "-_./".contains(c))) {
            let Some(stem) = word.strip_suffix(".toml") else { continue };
            let named = match stem.strip_prefix("cases/") {
                Some(name) if !name.contains("NAME") => Some(name),
                _ if *is_case && !stem.contains('/') && !WRITTEN.contains(&stem) => Some(stem),
                _ => None,
            };
            if let Some(name) = named {
                if !root.join("cases").join(format!("{name}.toml")).is_file() {
                    missing.push(format!("{}: {word}", file.display()));
                }
            }
        }
    }
    assert!(missing.is_empty(), "examples named but not in cases/: {missing:?}");
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
