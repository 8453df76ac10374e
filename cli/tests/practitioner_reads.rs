//! What a practitioner reads (issue 23, points 3, 4 and 6): the hint for a
//! unit given to --set, sweep reports and `check` that lead with what the
//! case asks for and name variants by their parameters, and a progress
//! line whose counts agree with the summary's.

mod common;

use std::path::PathBuf;
use std::process::Command;

fn dir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("lodestone-reads-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn run(args: &[&str]) -> (i32, String, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_lodestone")).args(args).output().unwrap();
    (
        o.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

/// A bare disk swept over its thickness, asking for a point probe, then a
/// force, then an expectation on the probe (in that order).
const SWEPT: &str = "[study]\ngeometry = \"axisymmetric\"\nunit = \"mm\"\naccuracy = \"off\"\n\
    [params]\nt = 2\n[sweep]\nt = { from = 1, to = 3, steps = 3 }\n[mesh]\nsize = 2\n\
    [[part]]\nname = \"magnet\"\nmaterial = \"N42\"\nmagnetization = \"+z\"\nrect = { from = [0, 0], to = [5, \"t\"] }\n\
    [[part]]\nname = \"plate\"\nmaterial = \"DC01\"\nrect = { from = [0, \"t + 1\"], to = [10, \"t + 3\"] }\n\
    [[probe]]\nname = \"zfront\"\npoint = [0, \"t + 0.5\"]\n\
    [[force]]\nname = \"apull\"\nparts = [\"plate\"]\n\
    [[expect]]\nvalue = \"probe.zfront.bz\"\nmin = \"1 mT\"\n";

#[test]
fn a_unit_given_to_set_gets_the_plain_number_hint() {
    let d = dir("set");
    let case = d.join("case.toml");
    std::fs::write(&case, SWEPT).unwrap();
    let (code, _, err) = run(&[
        "solve",
        "--quiet",
        case.to_str().unwrap(),
        "--set",
        "t=4mm",
        "-o",
        d.join("out").to_str().unwrap(),
    ]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("plain number") && err.contains("--set t=4"), "{err}");
    let _ = std::fs::remove_dir_all(&d);
}

/// Solves the sweep `text` (`common::solve_text`, which must succeed):
/// its output folder and sweep-report.md.
fn solved_sweep(name: &str, text: &str) -> (PathBuf, String) {
    let (code, said, out) = common::solve_text(name, text);
    assert_eq!(code, Some(0), "{said}");
    let report = std::fs::read_to_string(out.join("sweep-report.md")).unwrap();
    (out, report)
}

/// The sweep's report shows each value with its estimated error, as the
/// summary and sweep.csv do, and its swept values to six digits (a
/// log-spaced step is not printed to the last bit).
#[test]
fn a_sweep_report_shows_each_value_with_its_error() {
    let text = SWEPT
        .replace("accuracy = \"off\"", "accuracy = \"1 %\"")
        .replace("[mesh]\nsize = 2\n", "")
        .replace("t = { from = 1, to = 3, steps = 3 }", "t = { from = 1, to = 3, steps = 3, spacing = \"log\" }");
    let (out, report) = solved_sweep("reads-sweep-errors", &text);
    let row = report.lines().find(|l| l.starts_with("| 1 |")).unwrap();
    // The probe's field and the force's components, each with its error.
    assert!(row.matches('\u{b1}').count() >= 3, "values without their errors: {row}");
    // The middle of a log sweep from 1 to 3 is sqrt(3) = 1.7320508...
    assert!(row.starts_with("| 1 | 1.73205 |"), "the swept value: {row}");
    let _ = std::fs::remove_dir_all(out.parent().unwrap());
}

#[test]
fn sweeps_lead_with_what_the_case_asks_for() {
    let (out, report) = solved_sweep("reads-sweep", SWEPT);
    let (d, case) = (out.parent().unwrap().to_path_buf(), out.parent().unwrap().join("case.toml"));
    let header = report.lines().find(|l| l.starts_with("| variant")).unwrap();
    let (probe, force) = (header.find("probe.zfront").unwrap(), header.find("force.apull").unwrap());
    assert!(probe < force, "columns not in the case's order: {header}");
    // Charts only of what is asked: the probe's values and the force's.
    let charts = std::fs::read_dir(&out)
        .unwrap()
        .flatten()
        .filter(|e| e.file_name().to_string_lossy().starts_with("sweep-"))
        .count()
        - 2;
    assert!((1..=8).contains(&charts), "{charts} charts");
    // Charts in engineering units: the field in mT, plain tick labels.
    let chart = std::fs::read_to_string(out.join("sweep-probe-zfront-bz.svg")).unwrap();
    assert!(chart.contains("probe.zfront.bz (mT)"), "the field chart is not in mT");
    let labels: Vec<&str> = chart
        .split('>')
        .filter_map(|t| t.split('<').next())
        .filter(|t| t.parse::<f64>().is_ok())
        .collect();
    assert!(labels.len() >= 4, "{labels:?}");
    assert!(labels.iter().all(|t| !t.contains('e')), "scientific notation in a chart: {labels:?}");
    // check names each variant by its parameters.
    let (code, stdout, err) = run(&["check", "--quiet", case.to_str().unwrap()]);
    assert_eq!(code, 0, "{stdout}{err}");
    for t in ["t = 1]", "t = 2]", "t = 3]"] {
        assert!(stdout.contains(t), "no variant named '{t}': {stdout}");
    }
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn the_progress_line_and_the_summary_count_alike() {
    let d = dir("counts");
    let case = d.join("case.toml");
    std::fs::write(&case, SWEPT.replace("[sweep]\nt = { from = 1, to = 3, steps = 3 }\n", "")).unwrap();
    let out = d.join("out");
    let (code, stdout, err) = run(&["solve", case.to_str().unwrap(), "-o", out.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let json: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(out.join("results.json")).unwrap()).unwrap();
    let triangles = json["mesh"]["elements"].as_u64().unwrap();
    let progress = err
        .lines()
        .rfind(|l| l.contains("corner nodes"))
        .unwrap_or_else(|| panic!("no progress line: {err}"));
    assert!(progress.contains(&format!("{triangles} triangles")), "{progress} against {triangles}");
    let summary = stdout.lines().find(|l| l.contains("mesh:")).unwrap();
    assert!(
        summary.contains(&format!("{} nodes (corners and edge midpoints)", json["mesh"]["nodes"])),
        "{summary}"
    );
    let _ = std::fs::remove_dir_all(&d);
}

/// Issue 21, point 5: a parameter picks the grade, so a sweep runs over
/// grades. The field at a point of a magnet this short scales with Br
/// (the demagnetizing field is far from every grade's knee; the recoil
/// permeabilities differ by under 1 %), so the field ratio of N52 to N35
/// follows their library Br ratio within 1 %; a pick outside the list is
/// refused where the material stands.
#[test]
fn a_parameter_picks_the_grade() {
    let d = dir("grades");
    let case = d.join("case.toml");
    let text = "[study]\ngeometry = \"axisymmetric\"\nunit = \"mm\"\naccuracy = \"off\"\n[params]\ng = 1\n[sweep]\ng = [1, 2]\n[mesh]\nsize = 2\n\
        [[part]]\nname = \"m\"\nmaterial = { pick = \"g\", from = [\"N35\", \"N52\"] }\nmagnetization = \"+z\"\nrect = { from = [0, 0], to = [5, 5] }\n\
        [[probe]]\nname = \"p\"\npoint = [0, 10]\n";
    std::fs::write(&case, text).unwrap();
    let out = d.join("out");
    let (code, _, err) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let b = |v: &str| -> f64 {
        let j: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(out.join(v).join("results.json")).unwrap()).unwrap();
        j["values"]["probe.p.b"].as_f64().unwrap()
    };
    let br = |name: &str| match study::materials::lookup(name).map(|e| e.material) {
        Some(study::materials::Material::Magnet(g)) => g.br_at(20.0),
        _ => panic!("{name} is not a magnet grade"),
    };
    let (ratio, want) = (b("variant-0001") / b("variant-0000"), br("N52") / br("N35"));
    assert!((ratio / want - 1.0).abs() < 0.01, "field ratio {ratio} against Br ratio {want}");
    std::fs::write(&case, text.replace("g = [1, 2]", "g = [3]")).unwrap();
    let (code, _, err) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", d.join("out2").to_str().unwrap()]);
    assert_ne!(code, 0);
    assert!(err.contains("picks no material") && err.contains("case.toml:13:12"), "{err}");
    let _ = std::fs::remove_dir_all(&d);
}

/// Issue 23, point 7: the reach's reference point is the user's where the
/// case gives one (`reach_from`, measured outwards along the axis): from a
/// magnet's face it is the reach from the centre less the 5 mm between
/// them, and the report says where it was measured from.
#[test]
fn the_reach_is_measured_from_the_point_the_case_gives() {
    let d = dir("reach");
    let case = d.join("case.toml");
    let text = "[study]\ngeometry = \"axisymmetric\"\nunit = \"mm\"\nREACH\n[[part]]\nname = \"m\"\nmaterial = \"N42\"\nmagnetization = \"+z\"\nrect = { from = [0, 0], to = [5, 10] }\n";
    let reach = |extra: &str, name: &str| -> (f64, String) {
        std::fs::write(&case, text.replace("REACH", extra)).unwrap();
        let out = d.join(name);
        let (code, _, err) = run(&["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()]);
        assert_eq!(code, 0, "{err}");
        let j: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(out.join("results.json")).unwrap()).unwrap();
        (
            j["values"]["reach.axis"].as_f64().unwrap(),
            std::fs::read_to_string(out.join("report.md")).unwrap(),
        )
    };
    let (centre, _) = reach("", "centre");
    let (face, report) = reach("reach_from = [0, 10]", "face");
    assert!(
        (centre - face - 0.005).abs() < 1e-4 * centre,
        "from the centre {centre} m, from the face {face} m"
    );
    assert!(report.contains("from (0, 10) mm, the case's reach_from"), "{report}");
    let _ = std::fs::remove_dir_all(&d);
}

/// A winding in saturating steel: the summary and the report give its
/// incremental inductance d(linkage)/dI beside the apparent one, each with
/// its error (they differ: the steel's differential permeability falls
/// below its secant one); a winding in air alone, whose two are one number,
/// shows it once.
#[test]
fn a_saturating_winding_shows_both_inductances() {
    let d = dir("inductances");
    let case = d.join("case.toml");
    let core = "[study]\ngeometry = \"axisymmetric\"\nunit = \"mm\"\n\
        [[part]]\nname = \"core\"\nmaterial = \"DC01\"\nrect = { from = [0, -10], to = [4, 10] }\n\
        [[part]]\nname = \"winding\"\nmaterial = \"copper\"\ncurrent = \"3000 A\"\nrect = { from = [5, -8], to = [9, 8] }\n\
        [[flux]]\nname = \"linkage\"\nwinding = \"winding\"\nturns = 300\n";
    for (text, distinct) in [(core.to_string(), true), (core.replace("material = \"DC01\"", "material = \"copper\""), false)] {
        std::fs::write(&case, text).unwrap();
        let out = d.join(if distinct { "steel" } else { "air" });
        let (code, stdout, err) = run(&["solve", case.to_str().unwrap(), "-o", out.to_str().unwrap(), "--quiet"]);
        assert_eq!(code, 0, "{err}");
        let line = stdout.lines().find(|l| l.contains("flux linkage:")).unwrap_or_else(|| panic!("{stdout}"));
        let report = std::fs::read_to_string(out.join("report.md")).unwrap();
        let row = report.lines().find(|l| l.starts_with("| linkage |")).unwrap_or_else(|| panic!("{report}"));
        assert!(
            line.contains(", inductance ") && report.contains("| incremental inductance |"),
            "{line}\n{report}"
        );
        eprintln!("{line}\n{row}");
        if distinct {
            assert!(line.contains(", incremental inductance ") && line.matches('\u{b1}').count() == 3, "{line}");
            assert!(row.matches('\u{b1}').count() == 3 && !row.ends_with("| - |"), "{row}");
        } else {
            assert!(!line.contains("incremental"), "{line}");
            assert!(row.ends_with("| - |"), "{row}");
        }
    }
    let _ = std::fs::remove_dir_all(&d);
}

/// A line probe of 100 000 samples on an axis took 6.7 minutes of
/// extraction after the last Newton line with nothing said. The samples'
/// extraction is announced on the progress lines from
/// `study::run::MANY_SAMPLES` together, and not below.
#[test]
fn a_long_line_probe_says_it_is_sampling() {
    let d = dir("sampling");
    let case = |points: usize| {
        format!(
            "[study]\ngeometry = \"axisymmetric\"\nunit = \"mm\"\naccuracy = \"off\"\n[mesh]\nsize = 2\n\
             [[part]]\nname = \"magnet\"\nmaterial = \"N42\"\nmagnetization = \"+z\"\nrect = {{ from = [0, 0], to = [5, 3] }}\n\
             [[probe]]\nname = \"axis\"\nline = {{ from = [0, 4], to = [0, 20], points = {points} }}\n"
        )
    };
    let many = study::run::MANY_SAMPLES;
    for (points, announced) in [(many, true), (many - 1, false)] {
        let file = d.join(format!("case-{points}.toml"));
        std::fs::write(&file, case(points)).unwrap();
        let out = d.join(format!("out-{points}"));
        let (code, said, err) = run(&["solve", file.to_str().unwrap(), "-o", out.to_str().unwrap()]);
        assert_eq!(code, 0, "{said}{err}");
        let line = format!("extracting the field at {points} line-probe samples");
        assert_eq!(err.contains(&line), announced, "{err}");
        assert!(said.contains(&format!("probe axis: {points} points")), "{said}");
    }
    let _ = std::fs::remove_dir_all(&d);
}
