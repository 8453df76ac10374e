//! Transforms and arrays of parts (issue 20, point 2): an array with a
//! per-copy turn of the magnetization gives exactly the parts typed by
//! hand, a Halbach row is one-sided, and a transformed part equals its
//! outline written out.

mod common;

use serde_json::Value;

fn values(name: &str, text: &str) -> common::ValueMap {
    common::solved(name, text).0
}

const HEAD: &str = "[study]\ngeometry = \"planar\"\nunit = \"mm\"\ndepth = \"10 mm\"\naccuracy = \"off\"\n[mesh]\nsize = 2\n[output]\nvtk = false\nplots = false\nreport = false\n";
const PROBES: &str = "[[probe]]\nname = \"above\"\npoint = [40, 20]\n[[probe]]\nname = \"below\"\npoint = [40, -10]\n";

/// Eight 10 mm blocks, each magnetization a quarter turn on from the one
/// before: the array and the same eight parts typed out give identical
/// results (every value equal to the bit); and the row is one-sided (Mallinson, "One-sided
/// fluxes - a magnetic curiosity?", IEEE Trans. Magn. 9(4), 1973: with
/// quarter-turn blocks the weak side keeps a small share of the field).
#[test]
fn a_halbach_row_is_one_line_and_one_sided() {
    let array = format!("{HEAD}[[part]]\nname = \"h\"\nmaterial = \"N42\"\nmagnetization = \"+y\"\nrect = {{ from = [0, 0], to = [10, 10] }}\narray = {{ count = 8, step = [10, 0], turn = \"90 deg\" }}\n{PROBES}");
    let mut typed = HEAD.to_string();
    for (k, m) in ["+y", "-x", "-y", "+x", "+y", "-x", "-y", "+x"].iter().enumerate() {
        typed += &format!(
            "[[part]]\nname = \"h-{}\"\nmaterial = \"N42\"\nmagnetization = \"{m}\"\nrect = {{ from = [{}, 0], to = [{}, 10] }}\n",
            k + 1,
            10 * k,
            10 * k + 10
        );
    }
    typed += PROBES;
    let (a, t) = (values("halbach-array", &array), values("halbach-typed", &typed));
    assert_eq!(
        a.keys().collect::<Vec<_>>(),
        t.keys().collect::<Vec<_>>(),
        "the array's parts differ from those typed out"
    );
    // Identical, to the bit: the copies' coordinates are rounded to the
    // case's decimal grid, so the meshes are the same.
    for k in t.keys() {
        assert_eq!(a[k], t[k], "{k}: the array and the typed parts differ");
    }
    let (up, down) = (a["probe.above.b"].as_f64().unwrap(), a["probe.below.b"].as_f64().unwrap());
    assert!(up.max(down) > 3.0 * up.min(down), "not one-sided: {up} T above, {down} T below");
}

/// A block moved, rotated a quarter turn about its corner, and mirrored:
/// the same fields and energy as its outline written out (within 1e-3: a
/// typed polygon and a rotated rectangle start their outlines at different
/// corners, so their meshes differ).
#[test]
fn a_transformed_part_equals_its_outline_written_out() {
    let base = format!("{HEAD}[[part]]\nname = \"plate\"\nmaterial = \"low-carbon-steel\"\nrect = {{ from = [-20, 25], to = [60, 28] }}\n[[force]]\nname = \"plate\"\nparts = [\"plate\"]\n{PROBES}");
    let moved = format!(
        "{base}[[part]]\nname = \"m\"\nmaterial = \"N42\"\nmagnetization = \"+x\"\nrect = {{ from = [0, 0], to = [20, 10] }}\ntransform = {{ rotate = \"90 deg\", about = [0, 0], move = [30, 0] }}\n"
    );
    // Rotated a quarter turn about the origin: corners (0,0) (0,20) (-10,20) (-10,0), then moved by 30 in x; +x turns to +y.
    let typed = format!("{base}[[part]]\nname = \"m\"\nmaterial = \"N42\"\nmagnetization = \"+y\"\npolygon = [[30, 0], [30, 20], [20, 20], [20, 0]]\n");
    let (a, t) = (values("transform", &moved), values("transform-typed", &typed));
    let same = |a: &serde_json::Map<String, Value>, what: &str| {
        for k in t.keys().filter(|k| k.starts_with("probe.") || k.ends_with("energy") || k.starts_with("force.")) {
            let (x, y) = (a[k].as_f64().unwrap(), t[k].as_f64().unwrap());
            // A component is held to its vector's size: a small one is all mesh noise.
            let size = |v: &str| t[v].as_f64().unwrap().abs();
            let scale = match k.split('.').collect::<Vec<_>>().as_slice() {
                ["force", f, ..] => size(&format!("force.{f}.magnitude")),
                ["probe", _, "h"] => y.abs(),
                ["probe", p, ..] => size(&format!("probe.{p}.b")),
                _ => y.abs(),
            };
            assert!((x - y).abs() <= 1e-3 * scale, "{what} {k}: {x} against {y}");
        }
    };
    same(&a, "rotated and moved:");
    let mirrored = format!(
        "{base}[[part]]\nname = \"m\"\nmaterial = \"N42\"\nmagnetization = \"-y\"\npolygon = [[20, 0], [20, -20], [30, -20], [30, 0]]\ntransform = {{ mirror = \"x\" }}\n"
    );
    let m = values("mirror", &mirrored);
    same(&m, "mirrored:");
}

#[test]
fn bad_patterns_are_refused_where_they_stand() {
    for (extra, want) in [
        ("array = { count = 0, step = [10, 0] }", "whole number from 1"),
        ("array = { count = 3 }", "give step"),
        ("transform = { mirror = \"z\" }", "is not an axis"),
        ("transform = { spin = 3 }", "spin"),
    ] {
        let text = format!("{HEAD}[[part]]\nname = \"h\"\nmaterial = \"N42\"\nmagnetization = \"+y\"\nrect = {{ from = [0, 0], to = [10, 10] }}\n{extra}\n");
        let (code, said, out) = common::solve_text("pattern-bad", &text);
        assert_eq!(code, Some(2), "{extra}: {said}");
        assert!(said.contains(want) && said.contains("case.toml:"), "{extra}: {said}");
        let _ = std::fs::remove_dir_all(out.parent().unwrap());
    }
}

/// A magnet that cuts a plate in two (a later part crossing an earlier
/// one's outline) meshes: it was refused as needing over a million
/// triangles whatever the limit, the crossing left next to a split point.
#[test]
fn a_part_that_cuts_another_in_two_meshes() {
    let text = format!("{HEAD}[[part]]\nname = \"plate\"\nmaterial = \"low-carbon-steel\"\nrect = {{ from = [-20, 15], to = [60, 18] }}\nmesh_size = 1\n[[part]]\nname = \"m\"\nmaterial = \"N42\"\nmagnetization = \"+y\"\nrect = {{ from = [20, 0], to = [30, 20] }}\n");
    let v = values("cut-plate", &text);
    assert!(v["part.plate.volume"].as_f64().unwrap() > 0.0 && v["part.m.volume"].as_f64().unwrap() > 0.0);
    // The plate keeps its two pieces outside the magnet: 80 x 3 mm less the 10 x 3 mm the magnet covers, 10 mm deep.
    let plate = v["part.plate.volume"].as_f64().unwrap();
    assert!((plate / (70e-3 * 3e-3 * 10e-3) - 1.0).abs() < 1e-9, "{plate}");
}
