//! DXF sections (issue 20, point 3): a part read from a drawing with arcs
//! gives the results of the same outline written in the case, and a loop
//! with a 0.2 mm gap is refused with the entity and the gap named.

mod common;

use serde_json::Value;

fn line(h: &str, layer: &str, a: [f64; 2], b: [f64; 2]) -> String {
    format!("0\nLINE\n5\n{h}\n8\n{layer}\n10\n{}\n20\n{}\n11\n{}\n21\n{}\n", a[0], a[1], b[0], b[1])
}

fn arc(h: &str, layer: &str, c: [f64; 2], r: f64, from_deg: f64, to_deg: f64) -> String {
    format!(
        "0\nARC\n5\n{h}\n8\n{layer}\n10\n{}\n20\n{}\n40\n{r}\n50\n{from_deg}\n51\n{to_deg}\n",
        c[0], c[1]
    )
}

/// A drawing in millimetres ($INSUNITS 4) of a pole piece 20 x 5 mm with
/// its two upper corners rounded (radius 2), drawn as lines and arcs in no
/// particular order or direction; `gap` opens the left side by that much.
fn drawing(gap: f64) -> String {
    let l = "POLE";
    let body = [
        line("1A", l, [-10.0, 1.0], [10.0, 1.0]),
        line("1B", l, [10.0, 4.0], [10.0, 1.0]),
        arc("1C", l, [8.0, 4.0], 2.0, 0.0, 90.0),
        line("1D", l, [8.0, 6.0], [-8.0, 6.0]),
        arc("1E", l, [-8.0, 4.0], 2.0, 90.0, 180.0),
        line("1F", l, [-10.0, 1.0 + gap], [-10.0, 4.0]),
        // Another layer, which the part does not read.
        line("2A", "NOTES", [0.0, 20.0], [5.0, 20.0]),
    ]
    .concat();
    format!("0\nSECTION\n2\nHEADER\n9\n$INSUNITS\n70\n4\n0\nENDSEC\n0\nSECTION\n2\nENTITIES\n{body}0\nENDSEC\n0\nEOF\n")
}

const MAGNET: &str = "[[part]]\nname = \"magnet\"\nmaterial = \"N42\"\nrect = { from = [-10, -10], to = [10, 0] }\nmagnetization = \"+y\"\n";

fn case(pole: &str) -> String {
    format!(
        "[study]\ngeometry = \"planar\"\nunit = \"cm\"\ndepth = \"1 cm\"\naccuracy = \"0.05 %\"\n{}[[part]]\nname = \"pole\"\nmaterial = \"DC01\"\n{pole}\n\
         [[force]]\nname = \"pull\"\nparts = [\"pole\"]\n[[probe]]\nname = \"above\"\npoint = [0, 1.5]\n[output]\nvtk = false\nplots = false\nreport = false\n",
        MAGNET.replace("[-10, -10]", "[-1, -1]").replace("[10, 0]", "[1, 0]")
    )
}

/// Runs a case with the drawing beside it.
fn run(name: &str, text: &str, dxf: &str) -> (Option<i32>, String, std::path::PathBuf) {
    let dir = std::env::temp_dir().join(format!("lodestone-dxf-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    std::fs::write(dir.join("section.dxf"), dxf).unwrap();
    std::fs::write(dir.join("case.toml"), text).unwrap();
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_lodestone"))
        .args([
            "solve",
            "--quiet",
            dir.join("case.toml").to_str().unwrap(),
            "-o",
            dir.join("out").to_str().unwrap(),
        ])
        .output()
        .unwrap();
    (
        o.status.code(),
        format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr)),
        dir,
    )
}

fn results(dir: &std::path::Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(dir.join("out/results.json")).unwrap()).unwrap()
}

/// The drawing (in mm, read into a case in cm through $INSUNITS) against
/// the same outline written with centre arcs: pull and field agree within
/// the smaller of their two error estimates.
#[test]
fn a_drawn_section_gives_the_written_outlines_results() {
    let (code, said, dir) = run("drawn", &case("dxf = { file = \"section.dxf\", layer = \"POLE\" }"), &drawing(0.0));
    assert_eq!(code, Some(0), "{said}");
    let drawn = results(&dir);
    let _ = std::fs::remove_dir_all(&dir);
    let written_outline =
        "polygon = [[-1, 0.1], [1, 0.1], { at = [1, 0.4], center = [0.8, 0.4] }, [0.8, 0.6], { at = [-0.8, 0.6], center = [-0.8, 0.4] }, [-1, 0.4]]";
    let (code, said, out) = common::solve_text("dxf-written", &case(written_outline));
    assert_eq!(code, Some(0), "{said}");
    let written: Value = serde_json::from_str(&std::fs::read_to_string(out.join("results.json")).unwrap()).unwrap();
    let _ = std::fs::remove_dir_all(out.parent().unwrap());
    for name in ["force.pull.y", "probe.above.b"] {
        let (a, b) = (drawn["values"][name].as_f64().unwrap(), written["values"][name].as_f64().unwrap());
        let (ea, eb) = (drawn["errors"][name].as_f64().unwrap(), written["errors"][name].as_f64().unwrap());
        assert!((a - b).abs() <= ea.min(eb), "{name}: drawn {a}, written {b} (errors {ea}, {eb})");
        assert!(a.abs() > 0.0);
    }
}

/// A 0.2 mm gap in the loop is refused, naming the entity and the gap.
#[test]
fn a_gap_in_the_drawing_is_refused_with_the_entity_and_its_size() {
    let (code, said, dir) = run("gap", &case("dxf = { file = \"section.dxf\", layer = \"POLE\" }"), &drawing(0.2));
    let _ = std::fs::remove_dir_all(&dir);
    assert_eq!(code, Some(2), "{said}");
    assert!(said.contains("does not close") && said.contains("0.2000 mm"), "{said}");
    assert!(said.contains("handle 1") && said.contains("layer POLE"), "{said}");
    assert!(said.contains("case.toml:"), "{said}");
    // A layer with nothing on it names the layers that have entities.
    let (code, said, dir) = run("layer", &case("dxf = { file = \"section.dxf\", layer = \"POLES\" }"), &drawing(0.0));
    let _ = std::fs::remove_dir_all(&dir);
    assert_eq!(code, Some(2), "{said}");
    assert!(said.contains("NOTES, POLE"), "{said}");
}
