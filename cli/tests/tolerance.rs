//! `[tolerance]` end to end: Br uniform within +-3 % on a bare magnet.

mod common;

use common::cylinder_axis_field as axis_field;

fn case(method: &str) -> String {
    format!(
        r#"
[study]
geometry = "axisymmetric"
unit = "mm"

[params]
kbr = 1.0

[materials.rigid]
br = "1.2 * kbr T"
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
rect = {{ from = [0, 0], to = [5, 10] }}

[[probe]]
name = "front"
point = [0, 20]

[tolerance]
{method}
spread = {{ kbr = {{ plus_minus = "3 %" }} }}
"#
    )
}

/// Solves a tolerance case: tolerance.json and the terminal text. The
/// field is linear in Br, so its percentiles are Br's.
fn run(name: &str, text: &str) -> (serde_json::Value, String) {
    let (code, text, out) = common::solve_text(&format!("tol-{name}"), text);
    assert_eq!(code, Some(0), "{text}");
    let json = serde_json::from_slice(&std::fs::read(out.join("tolerance.json")).unwrap()).unwrap();
    assert!(out.join("tolerance.csv").exists() && out.join("results.json").exists());
    let _ = std::fs::remove_dir_all(out.parent().unwrap());
    (json, text)
}

#[test]
fn percentiles_of_a_field_follow_a_uniform_br_spread() {
    let (json, text) = run("mc", &case("method = \"monte-carlo\"\nsamples = 50"));
    let s = &json["statistics"]["probe.front.b"];
    let nominal = axis_field(1.2, 0.005, 0.01, 0.01);
    // Br uniform on [0.97, 1.03] of nominal: its 1st and 99th percentiles.
    for (key, k) in [("p1", 0.97 + 0.06 * 0.01), ("p99", 0.97 + 0.06 * 0.99), ("p50", 1.0)] {
        let got = s[key].as_f64().unwrap();
        let exact = nominal * k;
        let e = (got - exact).abs() / exact;
        eprintln!("{key}: {got:.6e} T against {exact:.6e} T, error {e:.2e}");
        assert!(e < 0.005, "{key}: {got} against {exact}\n{text}");
    }
    assert!(text.contains("tolerance: 50 samples"), "{text}");
}

#[test]
fn corners_bound_a_monotone_value() {
    let (json, _) = run("corners", &case("method = \"corners\""));
    let s = &json["statistics"]["probe.front.b"];
    let nominal = axis_field(1.2, 0.005, 0.01, 0.01);
    assert!((s["min"].as_f64().unwrap() / (0.97 * nominal) - 1.0).abs() < 0.005);
    assert!((s["max"].as_f64().unwrap() / (1.03 * nominal) - 1.0).abs() < 0.005);
    assert_eq!(json["method"]["worst_case_not_at_a_corner"].as_array().unwrap().len(), 0);
}

/// `[[expect]] statistic`: the field's 99th percentile over Br uniform
/// +-3 % is the nominal field times 1 + 0.03 (2 x 0.99 - 1) = 1.0294 (the
/// field is linear in Br); a bound just under it fails, in `solve` (exit 1)
/// and in `check`. A bound just over it is undecided: 50 samples cannot
/// bound the 99th percentile from above at 95 % (0.99^50 = 0.61 of sets have
/// no sample above it), and the verdict says how many would. The median's
/// interval from 50 samples (order statistics 18 and 33, about 0.991 and
/// 1.009 of nominal) lies below 1.02 of nominal: pass. A statistic with no
/// [tolerance] table is refused where it stands.
#[test]
fn expectations_bound_a_statistic_over_the_samples() {
    let nominal = axis_field(1.2, 0.005, 0.01, 0.01);
    let p99 = nominal * (1.0 + 0.03 * (2.0 * 0.99 - 1.0));
    let with_statistic = |statistic: &str, bound: f64| {
        format!(
            "{}\n[[expect]]\nvalue = \"probe.front.b\"\nstatistic = \"{statistic}\"\nmax = \"{} mT\"\n",
            case("method = \"monte-carlo\"\nsamples = 50").replace("report = false\n", ""),
            bound * 1e3
        )
    };
    let with = |bound: f64| with_statistic("p99", bound);
    let (code, text, out) = common::solve_text("tol-stat-pass", &with_statistic("p50", nominal * 1.02));
    assert_eq!(code, Some(0), "{text}");
    assert!(text.contains("probe.front.b p50") && text.contains("(pass)"), "{text}");
    let json: serde_json::Value = serde_json::from_slice(&std::fs::read(out.join("tolerance.json")).unwrap()).unwrap();
    assert_eq!(json["expect"][0]["verdict"], "pass");
    let range = &json["expect"][0]["ranges"][0];
    let (lo, hi) = (range[0].as_f64().unwrap(), range[1].as_f64().unwrap());
    assert!(lo < nominal && nominal < hi && hi < nominal * 1.012 && lo > nominal * 0.988, "{range}");
    let interval = &json["statistics"]["probe.front.b"]["interval_95"]["p99"];
    assert!(interval[0].is_f64() && interval[1].is_null(), "{interval}");
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    assert!(
        report.contains("## Tolerances") && report.contains("| probe.front.b |") && report.contains("95 % intervals"),
        "the report has no tolerance table"
    );
    let _ = std::fs::remove_dir_all(out.parent().unwrap());
    let (code, text, out) = common::solve_text("tol-stat-undecided", &with(p99 * 1.005));
    assert_eq!(code, Some(1), "{text}");
    assert!(text.contains("(UNDECIDED)") && text.contains("at least 368"), "{text}");
    let _ = std::fs::remove_dir_all(out.parent().unwrap());
    let (code, text, out) = common::solve_text("tol-stat-fail", &with(p99 * 0.995));
    assert_eq!(code, Some(1), "{text}");
    assert!(text.contains("(FAIL)"), "{text}");
    // check runs the samples too.
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_lodestone"))
        .args(["check", "--quiet", out.parent().unwrap().join("case.toml").to_str().unwrap()])
        .output()
        .unwrap();
    let said = String::from_utf8_lossy(&o.stdout);
    assert_eq!(o.status.code(), Some(1), "{said}");
    assert!(said.contains("tolerance samples") && said.contains("FAIL"), "{said}");
    let _ = std::fs::remove_dir_all(out.parent().unwrap());
    // Without a [tolerance] table: refused at the key.
    let plain = with(p99).replace(
        "[tolerance]\nmethod = \"monte-carlo\"\nsamples = 50\nspread = { kbr = { plus_minus = \"3 %\" } }\n",
        "",
    );
    let (code, text, out) = common::solve_text("tol-stat-none", &plain);
    assert_eq!(code, Some(2), "{text}");
    assert!(text.contains("has none") && text.contains("case.toml:"), "{text}");
    let _ = std::fs::remove_dir_all(out.parent().unwrap());
}

/// Issue 21, point 4: tolerance samples shard (`--shard K/N`), gather
/// (`merge`) and resume: the shards' samples, merged and finished by a
/// plain `solve`, give the statistics of one unsharded run bit for bit,
/// and a run over a folder that holds every sample solves none again.
#[test]
fn samples_shard_merge_and_resume() {
    let dir = std::env::temp_dir().join(format!("lodestone-tol-shard-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let file = dir.join("case.toml");
    std::fs::write(&file, case("method = \"monte-carlo\"\nsamples = 8")).unwrap();
    let run = |args: &[&str]| {
        let o = std::process::Command::new(env!("CARGO_BIN_EXE_lodestone")).args(args).output().unwrap();
        assert_eq!(o.status.code(), Some(0), "{args:?}: {}", String::from_utf8_lossy(&o.stderr));
        String::from_utf8_lossy(&o.stderr).into_owned()
    };
    let (c, d) = (file.to_str().unwrap(), |n: &str| dir.join(n).to_str().unwrap().to_string());
    run(&["solve", "--quiet", c, "-o", &d("whole")]);
    run(&["solve", "--quiet", c, "-o", &d("a"), "--shard", "0/2"]);
    run(&["solve", "--quiet", c, "-o", &d("b"), "--shard", "1/2"]);
    assert!(!dir.join("a/tolerance.json").exists(), "a shard wrote statistics of half the samples");
    run(&["merge", &d("a"), &d("b"), "-o", &d("merged")]);
    let progress = run(&["solve", c, "-o", &d("merged")]);
    assert!(!progress.contains("tolerance sample"), "samples solved again: {progress}");
    let stats = |n: &str| -> serde_json::Value {
        let j: serde_json::Value = serde_json::from_slice(&std::fs::read(dir.join(n).join("tolerance.json")).unwrap()).unwrap();
        j["statistics"].clone()
    };
    assert_eq!(stats("merged"), stats("whole"));
    let again = run(&["solve", c, "-o", &d("whole")]);
    assert!(!again.contains("tolerance sample"), "a finished run solved its samples again: {again}");
    let _ = std::fs::remove_dir_all(&dir);
}
