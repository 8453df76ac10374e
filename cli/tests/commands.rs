//! The command line end to end: sweeps, shards and merge, check with JUnit,
//! results left intact by failed and interrupted runs.

use std::path::{Path, PathBuf};
use std::process::Command;

fn exe() -> Command {
    Command::new(env!("CARGO_BIN_EXE_lodestone"))
}

fn cases() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases")
}

fn temp(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("lodestone-cli-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn run(cmd: &mut Command) -> (i32, String) {
    let out = cmd.output().expect("run");
    (
        out.status.code().unwrap_or(-1),
        format!("{}{}", String::from_utf8_lossy(&out.stdout), String::from_utf8_lossy(&out.stderr)),
    )
}

fn column(csv: &str, name: &str) -> Vec<f64> {
    let mut lines = csv.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let k = header
        .iter()
        .position(|h| h.starts_with(name))
        .unwrap_or_else(|| panic!("no column {name} in {header:?}"));
    lines.map(|l| l.split(',').nth(k).unwrap().parse().unwrap()).collect()
}

#[test]
fn gap_sweep_falls_monotonically_and_shards_merge_to_the_same_table() {
    // The example's sweep, with ten gap values at one plate thickness.
    let dir = temp("sweep");
    let text = std::fs::read_to_string(cases().join("holding-magnet-gap-sweep.toml"))
        .unwrap()
        .replace("steps = 5", "steps = 10")
        .replace("plate = [1, 4]", "plate = [4]");
    let case = dir.join("gap-sweep.toml");
    std::fs::write(&case, text).unwrap();
    let full = dir.join("full");
    let (code, text) = run(exe().args(["solve", "--quiet", case.to_str().unwrap(), "-o", full.to_str().unwrap()]));
    assert_eq!(code, 0, "{text}");
    let table = std::fs::read_to_string(full.join("sweep.csv")).unwrap();
    assert_eq!(table.lines().count(), 1 + 10, "{table}");
    let pull = column(&table, "force.pull.z");
    let gaps = column(&table, "gap");
    assert!(gaps.windows(2).all(|g| g[1] > g[0]));
    // Attraction (negative z) weakens as the gap grows.
    assert!(pull.windows(2).all(|p| p[1] > p[0]), "pull does not fall with the gap: {pull:?}");
    let header = table.lines().next().unwrap();
    assert!(header.contains("force.pull.z [N]") && header.contains("part.plate.b.max [T]"), "{header}");
    let mut shards = Vec::new();
    for k in 0..3 {
        let out = dir.join(format!("shard-{k}"));
        let (code, text) = run(exe().args([
            "solve",
            "--quiet",
            case.to_str().unwrap(),
            "-o",
            out.to_str().unwrap(),
            "--shard",
            &format!("{k}/3"),
        ]));
        assert_eq!(code, 0, "{text}");
        shards.push(out);
    }
    let merged = dir.join("merged");
    let mut cmd = exe();
    cmd.arg("merge");
    for s in &shards {
        cmd.arg(s);
    }
    let (code, text) = run(cmd.args(["-o", merged.to_str().unwrap()]));
    assert_eq!(code, 0, "{text}");
    assert_eq!(std::fs::read_to_string(merged.join("sweep.csv")).unwrap(), table);
    // A rerun skips whole variants.
    let (code, text) = run(exe().args(["solve", case.to_str().unwrap(), "-o", full.to_str().unwrap()]));
    assert_eq!(code, 0);
    assert!(text.contains("0 variants solved (10 already whole, 0 failed)"), "{text}");
    let _ = std::fs::remove_dir_all(&dir);
}

const CHECKED: &str = r#"
[study]
geometry = "axisymmetric"
unit = "mm"
[[part]]
name = "magnet"
material = "N42"
magnetization = "+z"
rect = { from = [0, 0], to = [5, 5] }
[[probe]]
name = "above"
point = [0, 10]
[[expect]]
value = "probe.above.bz"
min = "BOUND"
[[expect]]
value = "probe.above.b"
max = "1 T"
"#;

#[test]
fn check_passes_fails_and_writes_junit() {
    let dir = temp("check");
    let case = dir.join("case.toml");
    std::fs::write(&case, CHECKED.replace("BOUND", "1 mT")).unwrap();
    let junit = dir.join("report.xml");
    let (code, text) = run(exe().args(["check", "--quiet", case.to_str().unwrap(), "--junit", junit.to_str().unwrap()]));
    assert_eq!(code, 0, "{text}");
    assert!(std::fs::read_to_string(&junit).unwrap().contains("tests=\"2\" failures=\"0\""));
    std::fs::write(&case, CHECKED.replace("BOUND", "10 T")).unwrap();
    let (code, text) = run(exe().args(["check", "--quiet", case.to_str().unwrap(), "--junit", junit.to_str().unwrap()]));
    assert_eq!(code, 1, "{text}");
    assert!(text.contains("FAIL"), "{text}");
    let xml = std::fs::read_to_string(&junit).unwrap();
    assert!(
        xml.starts_with("<?xml") && xml.contains("tests=\"2\" failures=\"1\"") && xml.matches("<failure").count() == 1,
        "{xml}"
    );
    let _ = std::fs::remove_dir_all(&dir);
}

/// A small case solved once into `out`: (folder, case file, output folder, results.json bytes).
fn solved_once(name: &str) -> (PathBuf, PathBuf, PathBuf, Vec<u8>) {
    let dir = temp(name);
    let case = dir.join("case.toml");
    std::fs::write(&case, CHECKED.replace("BOUND", "1 mT")).unwrap();
    let out = dir.join("out");
    let (code, text) = run(exe().args(["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]));
    assert_eq!(code, 0, "{text}");
    let before = std::fs::read(out.join("results.json")).unwrap();
    (dir, case, out, before)
}

#[test]
fn a_failed_run_leaves_earlier_results_intact() {
    let (dir, case, out, before) = solved_once("intact");
    std::fs::write(&case, CHECKED.replace("BOUND", "1 mT").replace("N42", "N4")).unwrap();
    let (code, _) = run(exe().args(["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]));
    assert_eq!(code, 2);
    assert_eq!(std::fs::read(out.join("results.json")).unwrap(), before);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn an_interrupted_solve_leaves_earlier_results_byte_identical() {
    let (dir, case, out, before) = solved_once("sigint");
    // A much finer mesh makes the solve long enough to interrupt midway.
    std::fs::write(
        &case,
        CHECKED
            .replace("BOUND", "1 mT")
            .replace("[study]", "[mesh]\nsize = 0.02\nmax_elements = 5000000\n[study]"),
    )
    .unwrap();
    let mut child = exe()
        .args(["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()])
        .spawn()
        .unwrap();
    std::thread::sleep(std::time::Duration::from_millis(1000));
    let _ = Command::new("kill").args(["-INT", &child.id().to_string()]).status();
    // A shell that starts jobs in the background makes them ignore SIGINT; there, interrupt
    // with SIGKILL instead, which is harsher still.
    let mut status = None;
    for _ in 0..40 {
        std::thread::sleep(std::time::Duration::from_millis(50));
        if let Some(s) = child.try_wait().unwrap() {
            status = Some(s);
            break;
        }
    }
    let status = match status {
        Some(s) => s,
        None => {
            let _ = child.kill();
            child.wait().unwrap()
        }
    };
    // Killed by the signal, or ended by the interruption handler with 128 + SIGINT.
    assert!(
        status.code().is_none() || status.code() == Some(130),
        "the solve was not interrupted midway: {status:?}"
    );
    assert_eq!(std::fs::read(out.join("results.json")).unwrap(), before);
    let leftovers: Vec<_> = std::fs::read_dir(&out)
        .unwrap()
        .flatten()
        .filter(|e| e.file_name().to_string_lossy().contains("tmp"))
        .collect();
    assert!(leftovers.is_empty(), "partial files left: {leftovers:?}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn materials_lists_and_shows_entries() {
    let (code, text) = run(exe().args(["materials"]));
    assert_eq!(code, 0);
    assert!(
        text.contains("N42SH") && text.contains("low-carbon-steel") && text.contains("YXG28H") && text.contains("Y30BH"),
        "{text}"
    );
    let (code, text) = run(exe().args(["materials", "N42SH"]));
    assert_eq!(code, 0);
    assert!(text.contains("HcJ 1592 kA/m") && text.contains("source:"), "{text}");
    let dir = temp("mat");
    let svg = dir.join("curve.svg");
    let (code, _) = run(exe().args(["materials", "low-carbon-steel", "--plot", svg.to_str().unwrap()]));
    assert_eq!(code, 0);
    assert!(std::fs::read_to_string(&svg).unwrap().contains("<svg"));
    let (code, text) = run(exe().args(["materials", "N42XH"]));
    assert_eq!(code, 2);
    assert!(text.contains("did you mean"), "{text}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn face_field_of_a_lengthening_cylinder_approaches_half_the_remanence() {
    // Source: closed form at the centre of the face, B = Br/2 * L / sqrt(L^2 + R^2) (Furlani 2001,
    // sec. 4.3), within 0.5 % at each length; and (common practice) the gain from lengthening
    // saturates once L exceeds about twice the diameter.
    let dir = temp("length");
    let case = dir.join("length.toml");
    std::fs::write(
        &case,
        r#"
[study]
geometry = "axisymmetric"
unit = "mm"
[params]
length = 5
[sweep]
length = [2.5, 5, 10, 20, 40, 80]
[mesh]
size = 0.5
[materials.ideal]
br = "1.2 T"
mur = 1
[[part]]
name = "magnet"
material = "ideal"
magnetization = "+z"
rect = { from = [0, 0], to = [5, "length"] }
[[probe]]
name = "face"
point = [0, "length"]
"#,
    )
    .unwrap();
    let out = dir.join("out");
    let (code, text) = run(exe().args(["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]));
    assert_eq!(code, 0, "{text}");
    let table = std::fs::read_to_string(out.join("sweep.csv")).unwrap();
    let lengths = column(&table, "length");
    let bz = column(&table, "probe.face.bz");
    for (l, b) in lengths.iter().zip(&bz) {
        let exact = 0.6 * l / (l * l + 25.0).sqrt();
        assert!((b - exact).abs() < 0.005 * exact, "L = {l} mm: {b} T vs {exact} T");
    }
    // From L = 2D to L = 8D the face field grows by less than 6 %.
    assert!(bz[5] / bz[3] < 1.06, "{bz:?}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn non_convergence_exits_3_with_the_history_and_writes_the_last_iterate() {
    // Two Newton steps cannot bring the saturating pot magnet to 1e-8.
    let dir = temp("unconverged");
    let text = std::fs::read_to_string(cases().join("pot-magnet.toml")).unwrap();
    let case = dir.join("short.toml");
    std::fs::write(&case, format!("{text}\n[solver]\nmax_iterations = 2\n")).unwrap();
    let out = dir.join("out");
    let (code, text) = run(exe().args(["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]));
    assert_eq!(code, 3, "{text}");
    assert!(text.contains("did not converge in 2 iterations; residual history: 1.00e0 "), "{text}");
    let json = std::fs::read_to_string(out.join("results.json")).expect("the last iterate is written");
    assert!(json.contains("\"converged\": false"), "{json}");
    assert!(out.join("field.vtu").exists());
    let _ = std::fs::remove_dir_all(&dir);
}

/// A small study whose refinement stops at its element limit after two
/// meshes (10 424 triangles, the next would be 41 696), with expectations.
fn limited_case(expects: &str) -> String {
    format!(
        r#"[study]
title = "error bars"
geometry = "axisymmetric"
unit = "mm"
accuracy = "1 %"

[mesh]
max_elements = 20000

[output]
vtk = false
plots = false
report = false

[[part]]
name = "magnet"
material = "N42"
magnetization = "+z"
rect = {{ from = [0, 0], to = [5, 4] }}

[[probe]]
name = "front"
point = [0, 10]
{expects}"#
    )
}

#[test]
fn every_value_carries_its_error_and_a_bound_within_it_is_undecided() {
    let dir = temp("errors");
    let case = dir.join("c.toml");
    std::fs::write(&case, limited_case("").replace("report = false\n", "")).unwrap();
    let out = dir.join("out");
    let (code, text) = run(exe().args(["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]));
    assert_eq!(code, 0, "{text}");
    assert!(text.contains("|B| = ") && text.contains(" \u{b1} "), "summary without error bars: {text}");
    // The part's mean |B| and the magnet's margin too, in the summary and
    // in the report's tables, and the stray field's figures in the report.
    let with_error = |s: &str, head: &str| s.lines().any(|l| l.contains(head) && l.contains(" \u{b1} "));
    assert!(with_error(&text, "part magnet (N42): |B| mean"), "{text}");
    assert!(with_error(&text, "magnet magnet (N42 at 20 degC): margin"), "{text}");
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    // Its row in the parts table and in the magnets table.
    let rows = report.lines().filter(|l| l.starts_with("| magnet | N42 |") && l.contains(" \u{b1} ")).count();
    assert_eq!(rows, 2, "{report}");
    for stray in ["- reach along the axis", "- dipole moment", "- |B| falls to 0.5 mT", "- |H| at 2.1 m"] {
        assert!(with_error(&report, stray), "{stray}: {report}");
    }
    let json: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(out.join("results.json")).unwrap()).unwrap();
    let (values, errors) = (json["values"].as_object().unwrap(), json["errors"].as_object().unwrap());
    assert!(!errors.is_empty());
    for (k, e) in errors {
        assert!(values.contains_key(k), "error for a value that is not reported: {k}");
        assert!(e.as_f64().is_some_and(|e| e.is_finite() && e >= 0.0), "{k}: {e}");
    }
    let steps = json["adaptive"]["steps"].as_array().unwrap();
    assert_eq!(steps.len(), 2, "{steps:?}");
    let (v, e) = (values["probe.front.b"].as_f64().unwrap(), errors["probe.front.b"].as_f64().unwrap());
    assert!(e > 0.0 && e < 0.01 * v, "{v} +- {e}");
    // Three bounds around the value: within half the error (undecided),
    // three errors wide (pass), far away (fail).
    let bound = |lo: f64, hi: f64| format!("\n[[expect]]\nvalue = \"probe.front.b\"\nbetween = [\"{lo} T\", \"{hi} T\"]\n");
    for (lo, hi, exit, word) in [
        (v - 0.5 * e, v + 0.5 * e, 1, "UNDECIDED"),
        (v - 3.0 * e, v + 3.0 * e, 0, "pass"),
        (2.0 * v, 3.0 * v, 1, "FAIL"),
    ] {
        std::fs::write(&case, limited_case(&bound(lo, hi))).unwrap();
        let junit = dir.join("junit.xml");
        let (code, text) = run(exe().args(["check", "--quiet", case.to_str().unwrap(), "--junit", junit.to_str().unwrap()]));
        assert_eq!(code, exit, "{text}");
        assert!(text.contains(word), "no {word} in {text}");
        if word == "UNDECIDED" {
            let xml = std::fs::read_to_string(&junit).unwrap();
            assert!(xml.contains("estimated error") && xml.contains("max_elements"), "{xml}");
        }
    }
}

#[test]
fn accuracy_off_solves_the_mesh_as_given_without_estimates() {
    let dir = temp("accuracy-off");
    let case = dir.join("c.toml");
    std::fs::write(&case, limited_case("").replace("accuracy = \"1 %\"", "accuracy = \"off\"")).unwrap();
    let out = dir.join("out");
    let (code, text) = run(exe().args(["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]));
    assert_eq!(code, 0, "{text}");
    assert!(text.contains("accuracy: off"), "{text}");
    let json: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(out.join("results.json")).unwrap()).unwrap();
    assert!(json["errors"].as_object().unwrap().is_empty());
    assert!(json.get("adaptive").is_none());
}
