//! Result folders tied to one run (issue class 3): a sweep's table holds
//! only the variants of the run that wrote it, merge refuses folders of
//! different runs and shards without results, a folder has one writer at a
//! time, a commit interrupted mid-way is rolled forward and a set never
//! keeps files of an earlier one, a failed variant is named while the good
//! ones get their table, and an edited B-H file is seen by the skip hash.

use lodestone::output::folder::OutputFolder;
use std::path::{Path, PathBuf};
use std::process::Command;

fn exe() -> Command {
    Command::new(env!("CARGO_BIN_EXE_lodestone"))
}

fn temp(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("lodestone-folders-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn run(args: &[&str]) -> (i32, String) {
    let out = exe().args(args).output().expect("run");
    (
        out.status.code().unwrap_or(-1),
        format!("{}{}", String::from_utf8_lossy(&out.stdout), String::from_utf8_lossy(&out.stderr)),
    )
}

/// A small planar magnet over a plate, swept over `gap` with `VALUES`.
fn sweep_case(geometry: &str, values: &str) -> String {
    let (direction, depth) = if geometry == "planar" { ("+y", "depth = \"10 mm\"\n") } else { ("+z", "") };
    format!(
        r#"
[study]
geometry = "{geometry}"
{depth}
[mesh]
size = 2

[params]
gap = 1

[sweep]
gap = {values}

[[part]]
name = "magnet"
material = "N42"
magnetization = "{direction}"
rect = {{ from = [0, 0], to = [5, 3] }}

[[part]]
name = "plate"
material = "low-carbon-steel"
rect = {{ from = [0, "3 + gap"], to = [8, "5 + gap"] }}

[[force]]
name = "pull"
parts = ["plate"]

[output]
vtk = false
plots = false
report = false
"#
    )
}

fn rows(csv: &Path) -> usize {
    std::fs::read_to_string(csv).unwrap().lines().count() - 1
}

#[test]
fn a_smaller_sweep_in_the_same_folder_tabulates_only_its_own_variants() {
    let dir = temp("smaller");
    let case = dir.join("case.toml");
    let out = dir.join("out");
    let o = out.to_str().unwrap();
    std::fs::write(&case, sweep_case("planar", "[1, 2, 3, 4]")).unwrap();
    let (code, text) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", o]);
    assert_eq!(code, 0, "{text}");
    assert_eq!(rows(&out.join("sweep.csv")), 4);
    std::fs::write(&case, sweep_case("planar", "[1, 2]")).unwrap();
    let (code, text) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", o]);
    assert_eq!(code, 0, "{text}");
    assert_eq!(rows(&out.join("sweep.csv")), 2, "{}", std::fs::read_to_string(out.join("sweep.csv")).unwrap());
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn merge_refuses_other_runs_and_shards_without_results() {
    let dir = temp("merge");
    let mut outs = Vec::new();
    for geometry in ["planar", "axisymmetric"] {
        let case = dir.join(format!("{geometry}.toml"));
        std::fs::write(&case, sweep_case(geometry, "[1, 2]")).unwrap();
        let out = dir.join(geometry);
        let (code, text) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]);
        assert_eq!(code, 0, "{text}");
        outs.push(out);
    }
    let merged = dir.join("merged");
    let (code, text) = run(&["merge", outs[0].to_str().unwrap(), outs[1].to_str().unwrap(), "-o", merged.to_str().unwrap()]);
    assert_eq!(code, 2, "{text}");
    assert!(text.contains("comes from another run"), "{text}");
    // A variant folder whose results are gone is named, not silently dropped.
    std::fs::remove_file(outs[0].join("variant-0001/results.json")).unwrap();
    let (code, text) = run(&["merge", outs[0].to_str().unwrap(), "-o", merged.to_str().unwrap()]);
    assert_eq!(code, 2, "{text}");
    assert!(text.contains("variant-0001") && text.contains("no whole results"), "{text}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_folder_has_one_writer_at_a_time() {
    let dir = temp("lock");
    let out = dir.join("out");
    let held = OutputFolder::open(&out).unwrap();
    let case = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/magnet-bare.toml");
    let (code, text) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]);
    assert_eq!(code, 2, "{text}");
    assert!(text.contains("another lodestone run is writing"), "{text}");
    drop(held);
    let (code, text) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]);
    assert_eq!(code, 0, "{text}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_set_is_committed_whole_and_replaces_the_previous_one() {
    let dir = temp("commit");
    let out = dir.join("out");
    {
        let f = OutputFolder::open(&out).unwrap();
        f.commit(Path::new(""), &vec![("a.txt".into(), b"one".to_vec()), ("old.txt".into(), b"one".to_vec())])
            .unwrap();
        f.commit(Path::new(""), &vec![("a.txt".into(), b"two".to_vec())]).unwrap();
    }
    assert_eq!(std::fs::read(out.join("a.txt")).unwrap(), b"two");
    assert!(!out.join("old.txt").exists(), "a file of the earlier set survived");
    // A commit stopped after its journal and one rename: the next opening rolls it forward.
    std::fs::write(out.join(".lodestone-tmp-1-a.txt"), b"three").unwrap();
    std::fs::write(out.join(".lodestone-tmp-1-b.txt"), b"three").unwrap();
    std::fs::write(out.join("b.txt"), b"three").unwrap();
    std::fs::remove_file(out.join(".lodestone-tmp-1-b.txt")).unwrap();
    std::fs::write(out.join(".lodestone-commit"), ".lodestone-tmp-1-a.txt\ta.txt\n.lodestone-tmp-1-b.txt\tb.txt\n").unwrap();
    drop(OutputFolder::open(&out).unwrap());
    assert_eq!(std::fs::read(out.join("a.txt")).unwrap(), b"three");
    assert_eq!(std::fs::read(out.join("b.txt")).unwrap(), b"three");
    assert!(!out.join(".lodestone-commit").exists());
    // Staged files without a journal belong to a run that never committed: cleared.
    std::fs::write(out.join(".lodestone-tmp-9-a.txt"), b"four").unwrap();
    drop(OutputFolder::open(&out).unwrap());
    assert_eq!(std::fs::read(out.join("a.txt")).unwrap(), b"three");
    assert!(!out.join(".lodestone-tmp-9-a.txt").exists());
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_failed_variant_is_named_and_the_others_get_their_table() {
    let dir = temp("failed");
    let case = dir.join("case.toml");
    let out = dir.join("out");
    // At gap = 2 the magnet's height 3 (gap - 2) is zero: that variant alone fails.
    std::fs::write(&case, sweep_case("planar", "[1, 2]").replace("to = [5, 3]", "to = [5, \"3 * (gap - 2)\"]")).unwrap();
    let (code, text) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]);
    assert_eq!(code, 2, "{text}");
    assert!(text.contains("variant variant-0001 (gap = 2) failed"), "{text}");
    assert_eq!(rows(&out.join("sweep.csv")), 1, "the good variant's table");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn an_edited_bh_file_is_solved_again() {
    let dir = temp("bhcsv");
    let case = dir.join("case.toml");
    let out = dir.join("out");
    let csv = dir.join("steel.csv");
    std::fs::write(&csv, "H,B\n0,0\n200,1.0\n1000,1.5\n10000,1.9\n100000,2.1\n").unwrap();
    let text = sweep_case("planar", "[1, 2]").replace("low-carbon-steel", "my-steel") + "\n[materials.my-steel]\nbh_csv = \"steel.csv\"\n";
    std::fs::write(&case, text).unwrap();
    let args = ["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()];
    let (code, t) = run(&args);
    assert_eq!(code, 0, "{t}");
    let (_, t) = run(&args);
    assert!(t.contains("0 variants solved (2 already whole"), "{t}");
    std::fs::write(&csv, "H,B\n0,0\n300,1.0\n1000,1.4\n10000,1.8\n100000,2.0\n").unwrap();
    let (code, t) = run(&args);
    assert_eq!(code, 0, "{t}");
    assert!(t.contains("2 variants solved (0 already whole"), "{t}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn junit_counts_broken_cases_and_unconverged_expectations_as_failures() {
    // Class 4: a case that cannot be read is a failed test (with only broken
    // cases the report said tests=0, failures=0), and an expectation that
    // holds on an unconverged solution fails.
    let dir = temp("junit");
    let broken = dir.join("broken.toml");
    std::fs::write(&broken, "[[part]]\nname = \"m\"\nmaterial = \"N4\"\n").unwrap();
    let junit = dir.join("report.xml");
    let (code, text) = run(&["check", "--quiet", broken.to_str().unwrap(), "--junit", junit.to_str().unwrap()]);
    assert_eq!(code, 2, "{text}");
    let xml = std::fs::read_to_string(&junit).unwrap();
    assert!(xml.contains("tests=\"1\" failures=\"1\""), "{xml}");
    assert!(xml.contains("unknown material"), "{xml}");
    // Saturating steel stopped after one Newton-Raphson iteration.
    let unconverged = dir.join("unconverged.toml");
    let case =
        sweep_case("planar", "[1]").replace("[params]", "[solver]\nmax_iterations = 1\n\n[params]") + "\n[[expect]]\nvalue = \"energy\"\nmin = \"0 J\"\n";
    std::fs::write(&unconverged, case).unwrap();
    let (code, text) = run(&["check", "--quiet", unconverged.to_str().unwrap(), "--junit", junit.to_str().unwrap()]);
    assert_eq!(code, 3, "{text}");
    assert!(text.contains("FAIL (not converged)") && text.contains("nothing was written"), "{text}");
    let xml = std::fs::read_to_string(&junit).unwrap();
    assert!(xml.contains("failures=\"1\"") && xml.contains("did not converge"), "{xml}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_mesh_below_the_asked_angle_is_reported() {
    // A 3-degree spike cannot be meshed with 28-degree triangles: the
    // results say so instead of staying silent.
    let dir = temp("angle");
    let case = dir.join("spike.toml");
    std::fs::write(
        &case,
        "[study]\ngeometry = \"planar\"\ndepth = \"10 mm\"\n[[part]]\nname = \"pole\"\nmaterial = \"low-carbon-steel\"\npolygon = [[0, 0], [20, 0], [0, 1]]\n[[part]]\nname = \"magnet\"\nmaterial = \"N42\"\nmagnetization = \"+y\"\nrect = { from = [0, -5], to = [20, -1] }\n[output]\nvtk = false\nplots = false\n",
    )
    .unwrap();
    let out = dir.join("out");
    let (code, text) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]);
    assert_eq!(code, 0, "{text}");
    let json = std::fs::read_to_string(out.join("results.json")).unwrap();
    assert!(json.contains("smallest angle is"), "{json}");
    let _ = std::fs::remove_dir_all(&dir);
}
