//! The bad-input corpus (tests/bad-cases): every case exits with its code
//! and message, and nothing panics. Each `NAME.toml` has a `NAME.expect`:
//! the exit code on the first line, a fragment of the message on the second.

mod common;

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
    let work = std::env::temp_dir().join(format!("lodestone-typo-{}", std::process::id()));
    std::fs::create_dir_all(work.join("sections")).unwrap();
    // The drawings the examples read, beside the copies.
    let sections = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/sections");
    for f in std::fs::read_dir(&sections).unwrap().flatten() {
        std::fs::copy(f.path(), work.join("sections").join(f.file_name())).unwrap();
    }
    for case in common::example_cases() {
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

#[test]
fn resource_guards_refuse_before_any_work() {
    // Class 5 (issue 22), cases too large to keep in the corpus: more parts
    // than the cap, a FIFO as the case, /dev/zero as the case.
    let dir = std::env::temp_dir().join(format!("lodestone-guards-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let mut text = String::from("[study]\ngeometry = \"planar\"\ndepth = 1\n");
    for i in 0..10_001 {
        text += &format!(
            "[[part]]\nname = \"p{i}\"\nmaterial = \"N42\"\nmagnetization = \"+y\"\nrect = {{ from = [{}, 0], to = [{}, 1] }}\n",
            2 * i,
            2 * i + 1
        );
    }
    let many = dir.join("many.toml");
    std::fs::write(&many, text).unwrap();
    let started = std::time::Instant::now();
    let (code, msg) = run(&["check", "--quiet", many.to_str().unwrap()]);
    assert_eq!(code, 2, "{msg}");
    assert!(msg.contains("at most 10000"), "{msg}");
    println!("10 001 parts refused in {:.2} s", started.elapsed().as_secs_f64());
    #[cfg(unix)]
    {
        let fifo = dir.join("case.fifo");
        let made = Command::new("mkfifo").arg(&fifo).status().is_ok_and(|s| s.success());
        if made {
            let (code, msg) = run(&["check", "--quiet", fifo.to_str().unwrap()]);
            assert_eq!(code, 2, "{msg}");
            assert!(msg.contains("not a regular file"), "{msg}");
        }
        let (code, msg) = run(&["solve", "--quiet", "/dev/zero", "-o", dir.join("out").to_str().unwrap()]);
        assert_eq!(code, 2, "{msg}");
        assert!(msg.contains("not a regular file"), "{msg}");
        assert!(!dir.join("out").exists(), "a failed first run left a folder");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn shards_beyond_the_sweep_and_file_size_limits_get_messages() {
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let pot = cases.join("pot-magnet.toml");
    let (code, msg) = run(&["solve", "--quiet", pot.to_str().unwrap(), "--shard", "1/2"]);
    assert_clean(&msg);
    assert_eq!(code, 2, "{msg}");
    assert!(msg.contains("has no [sweep]"), "{msg}");
    let sweep = cases.join("holding-magnet-gap-sweep.toml");
    let (code, msg) = run(&["solve", "--quiet", sweep.to_str().unwrap(), "--shard", "15/20"]);
    assert_clean(&msg);
    assert_eq!(code, 2, "{msg}");
    assert!(msg.contains("has none"), "{msg}");
    #[cfg(unix)]
    {
        // `ulimit -f` (blocks of 512 bytes here: 100 is 50 KiB): the field file
        // cannot be written; a message and exit 2, not death by SIGXFSZ.
        let out = std::env::temp_dir().join(format!("lodestone-ulimit-{}", std::process::id()));
        let script = format!(
            "ulimit -f 100; exec '{}' solve --quiet '{}' -o '{}'",
            env!("CARGO_BIN_EXE_lodestone"),
            pot.display(),
            out.display()
        );
        let o = Command::new("sh").arg("-c").arg(&script).output().unwrap();
        let text = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(2), "{text}");
        assert!(text.contains("cannot write"), "{text}");
        let _ = std::fs::remove_dir_all(&out);
    }
}

#[test]
#[cfg(unix)]
fn a_closed_output_pipe_ends_the_run_quietly() {
    // `lodestone check ... | head -2`: the pipe closes early; println! panicked on it.
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/holding-magnet-gap-sweep.toml");
    let script = format!("'{}' check --quiet '{}' | head -1", env!("CARGO_BIN_EXE_lodestone"), cases.display());
    let o = Command::new("sh").arg("-c").arg(&script).output().unwrap();
    let err = String::from_utf8_lossy(&o.stderr);
    assert_clean(&err);
    assert!(!err.contains("Broken pipe"), "{err}");
}
