//! The bad-input corpus (tests/bad-cases): every case exits with its code
//! and message, and nothing panics. Each `NAME.toml` has a `NAME.expect`:
//! the exit code on the first line, a fragment of the message on the second.

use std::path::{Path, PathBuf};
use std::process::Command;

fn corpus() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../tests/bad-cases")
}

fn run(args: &[&str]) -> (i32, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_lodestone")).args(args).output().expect("run lodestone");
    let text = format!("{}{}", String::from_utf8_lossy(&out.stdout), String::from_utf8_lossy(&out.stderr));
    (out.status.code().unwrap_or(-1), text)
}

fn assert_clean(text: &str) {
    assert!(
        !text.contains("panicked") && !text.contains("RUST_BACKTRACE") && !text.contains("stack backtrace"),
        "panic text in:\n{text}"
    );
}

#[test]
fn every_bad_case_gets_its_exit_code_and_message() {
    let mut cases: Vec<PathBuf> = std::fs::read_dir(corpus())
        .expect("corpus")
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .collect();
    cases.sort();
    assert!(cases.len() >= 60, "the corpus has {} cases", cases.len());
    let mut failures = Vec::new();
    for case in &cases {
        let expect = std::fs::read_to_string(case.with_extension("expect")).expect("expect file");
        let mut lines = expect.lines();
        let code: i32 = lines.next().and_then(|l| l.trim().parse().ok()).expect("exit code line");
        let fragment = lines.next().unwrap_or("").trim();
        let (got, text) = run(&["check", "--quiet", case.to_str().unwrap()]);
        assert_clean(&text);
        if got != code || !text.contains(fragment) {
            failures.push(format!("{}: exit {got} (want {code}), message:\n{text}\nwanted: {fragment}", case.display()));
        }
    }
    assert!(
        failures.is_empty(),
        "{} of {} cases failed:\n{}",
        failures.len(),
        cases.len(),
        failures.join("\n---\n")
    );
}

#[test]
fn errors_point_at_line_and_column() {
    let (code, text) = run(&["check", "--quiet", corpus().join("misspelled-material.toml").to_str().unwrap()]);
    assert_eq!(code, 2);
    assert!(text.contains("misspelled-material.toml:7:12"), "{text}");
    assert!(text.contains("^^^^^"), "{text}");
}

#[test]
fn a_directory_is_not_a_case() {
    let (code, text) = run(&["solve", corpus().to_str().unwrap()]);
    assert_clean(&text);
    assert_eq!(code, 2, "{text}");
    assert!(text.contains("is a directory"), "{text}");
}

#[test]
fn a_missing_file_is_reported() {
    let (code, text) = run(&["solve", "no/such/case.toml"]);
    assert_eq!(code, 2, "{text}");
    assert!(text.contains("cannot read the case file"), "{text}");
}

#[test]
fn an_unwritable_output_folder_is_reported_before_solving() {
    let case = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/pot-magnet.toml");
    let (code, text) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", "/dev/null/results"]);
    assert_clean(&text);
    assert_eq!(code, 2, "{text}");
    assert!(text.contains("cannot create the output folder"), "{text}");
}

#[test]
fn an_unknown_parameter_override_is_reported() {
    let case = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/pot-magnet.toml");
    let (code, text) = run(&["solve", "--quiet", case.to_str().unwrap(), "--set", "gapp=2", "-o", "/tmp/lodestone-never"]);
    assert_eq!(code, 2, "{text}");
    assert!(text.contains("did you mean 'gap'"), "{text}");
}
