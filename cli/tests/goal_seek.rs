//! `[seek]` end to end: the smallest cylinder (L = D) that gives 5 mT at
//! 100 mm from its face, against the closed form's root.

mod common;

const CASE: &str = r#"
[study]
geometry = "axisymmetric"
unit = "mm"

[params]
d = 20

[materials.rigid]
br = "1.2 T"
mur = 1
description = "rigid magnet for the closed form"

[output]
vtk = false
plots = false
report = false

[[part]]
name = "magnet"
material = "rigid"
magnetization = "+z"
rect = { from = [0, 0], to = ["d / 2", "d"] }

[[probe]]
name = "sensor"
point = [0, "d + 100"]

[seek]
vary = "d"
range = [5, 100]
value = "probe.sensor.b"
target = "5 mT"
"#;

#[test]
fn the_smallest_cylinder_for_5_mt_at_100_mm_matches_the_closed_form() {
    let (code, text, out) = common::solve_text("seek", &CASE.replace("report = false\n", ""));
    assert_eq!(code, Some(0), "{text}");
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    assert!(
        report.contains("## Goal seek") && report.contains("reaches 5 mT"),
        "the report does not summarize the seek"
    );
    let json: serde_json::Value = serde_json::from_slice(&std::fs::read(out.join("seek.json")).unwrap()).unwrap();
    let (found, uncertainty) = (json["found"].as_f64().unwrap(), json["uncertainty"].as_f64().unwrap());
    let exact = 1e3 * common::cylinder_for_axis_field(1.2, 0.1, 5e-3);
    let e = (found - exact).abs() / exact;
    eprintln!("found d = {found} mm +- {uncertainty}, closed form {exact} mm, error {e:.2e}");
    assert!(e < 0.005, "{found} against {exact}");
    assert!(
        (found - exact).abs() <= 2.0 * uncertainty.max(1e-6 * exact),
        "the uncertainty {uncertainty} does not cover the error {}",
        (found - exact).abs()
    );
    assert!(json["evaluations"].as_array().unwrap().len() < 30);
    assert!(out.join("seek.csv").exists() && out.join("results.json").exists());
    // The case written out is the case at the answer (the seek's last full
    // solve is kept, not solved again): its value is the answer's.
    let results: serde_json::Value = serde_json::from_slice(&std::fs::read(out.join("results.json")).unwrap()).unwrap();
    assert_eq!(
        results["values"]["probe.sensor.b"].as_f64(),
        json["value"].as_f64(),
        "results.json is not the case at the answer"
    );
    let last = json["evaluations"].as_array().unwrap().iter().rev().find(|e| e["x"].as_f64() == Some(found));
    assert_eq!(
        last.and_then(|e| e["value"].as_f64()),
        json["value"].as_f64(),
        "the answer is not an evaluation's value"
    );
    assert!(std::fs::read_to_string(out.join("seek.svg")).unwrap().contains("target 5 mT"), "no seek chart");
    assert!(text.contains("seek: d = "), "{text}");
    // The answer with its uncertainty to the uncertainty's second digit, as
    // every value with its error is shown (not "37.383036 ± 1.47e-3").
    let line = text.lines().find(|l| l.contains("seek: d = ")).unwrap();
    let answer = line.split("seek: d = ").nth(1).unwrap().split(" gives").next().unwrap();
    let (x, e) = answer.split_once(" \u{b1} ").unwrap_or_else(|| panic!("no uncertainty: {line}"));
    assert!(!e.contains('e'), "scientific notation: {line}");
    let digits = |s: &str| s.split('.').nth(1).map_or(0, str::len);
    assert_eq!(digits(x), digits(e), "answer and uncertainty to different places: {line}");
    let _ = std::fs::remove_dir_all(out.parent().unwrap());
}

#[test]
fn a_target_out_of_reach_exits_1_and_says_what_was_seen() {
    let (code, text, out) = common::solve_text("seek-far", &CASE.replace("range = [5, 100]", "range = [5, 8]"));
    assert_eq!(code, Some(1), "{text}");
    assert!(text.contains("does not reach") && text.contains("widen seek.range"), "{text}");
    let _ = std::fs::remove_dir_all(out.parent().unwrap());
}
