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

#[test]
fn a_misspelled_expectation_is_refused_at_its_line_before_any_mesh() {
    // Every example case with one misspelled [[expect]] value appended: exit 2
    // at that table's line and column, and no output folder (nothing meshed).
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let work = std::env::temp_dir().join(format!("lodestone-typo-{}", std::process::id()));
    std::fs::create_dir_all(&work).unwrap();
    let mut names: Vec<PathBuf> = std::fs::read_dir(&cases).unwrap().flatten().map(|e| e.path()).collect();
    names.retain(|p| p.extension().is_some_and(|x| x == "toml"));
    names.sort();
    for case in names {
        let text = std::fs::read_to_string(&case).unwrap();
        let typo = format!("{text}\n\n[[expect]]\nvalue = \"force.pul.z\"\nmax = \"1 N\"\n");
        let line = typo.lines().position(|l| l.contains("force.pul.z")).unwrap() + 1;
        let path = work.join(case.file_name().unwrap());
        std::fs::write(&path, typo).unwrap();
        let out = work.join("out");
        let started = std::time::Instant::now();
        let (code, msg) = run(&["solve", "--quiet", "-o", out.to_str().unwrap(), path.to_str().unwrap()]);
        let seconds = started.elapsed().as_secs_f64();
        assert_clean(&msg);
        assert_eq!(code, 2, "{}: {msg}", case.display());
        assert!(msg.contains(&format!(":{line}:9")), "{}: no line {line} column 9 in {msg}", case.display());
        assert!(msg.contains("no value named 'force.pul.z'"), "{msg}");
        assert!(!out.exists(), "{}: an output folder was written", case.display());
        println!("{}: refused in {seconds:.3} s", case.display());
    }
    let _ = std::fs::remove_dir_all(&work);
}
