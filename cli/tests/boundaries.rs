//! `[[boundary]]` (issue 20, point 4): an array solved on one period with
//! periodic sides (and on half a period with anti-periodic ones) against
//! the Fourier series of the ideal array, and assemblies solved whole and
//! halved on a symmetry plane of each kind.

mod common;

use serde_json::Value;

fn values(name: &str, text: &str) -> common::ValueMap {
    common::solved(name, text).0
}

fn get(v: &serde_json::Map<String, Value>, name: &str) -> f64 {
    v[name].as_f64().unwrap_or_else(|| panic!("{name} missing"))
}

/// Period, thickness (mm) and remanence of the test array.
const LAMBDA: f64 = 20.0;
const THICK: f64 = 5.0;
const BR: f64 = 1.2;

/// Field above an infinite planar array of magnets of thickness t (top face
/// at y = 0), magnetized +y on 0 < x < lambda/2 and -y on lambda/2 < x <
/// lambda, recoil permeability 1: the magnetization's square wave in
/// Fourier series, each harmonic's surface charges on the two faces give
/// B_y = sum over odd n of (2 Br / (n pi)) (1 - exp(-n k t)) exp(-n k y) sin(n k x),
/// B_x the same with -cos, k = 2 pi / lambda (E. P. Furlani, Permanent
/// Magnet and Electromechanical Devices, Academic Press, 2001, ch. 4, the
/// charge model of periodic arrays; re-derived here).
fn fourier_field(x: f64, y: f64) -> [f64; 2] {
    let k = 2.0 * std::f64::consts::PI / LAMBDA;
    let mut b = [0.0; 2];
    for n in (1..2000).step_by(2) {
        let n = n as f64;
        let c = 2.0 * BR / (n * std::f64::consts::PI) * (1.0 - (-n * k * THICK).exp()) * (-n * k * y).exp();
        b[0] -= c * (n * k * x).cos();
        b[1] += c * (n * k * x).sin();
    }
    b
}

/// Heights from lambda/4 to lambda, at the middle of a +y magnet (B_y
/// largest) and over the joint of two magnets (B_x largest).
fn probes(x_joint: f64) -> (String, Vec<(String, [f64; 2])>) {
    let mut text = String::new();
    let mut at = Vec::new();
    for (i, y) in [0.25, 0.5, 0.75, 1.0].iter().map(|f| f * LAMBDA).enumerate() {
        for (tag, x) in [("mid", 0.25 * LAMBDA), ("joint", x_joint)] {
            let name = format!("{tag}{i}");
            text += &format!("[[probe]]\nname = \"{name}\"\npoint = [{x}, {y}]\n");
            at.push((name, [x, y]));
        }
    }
    (text, at)
}

fn array_case(width: f64, kind: &str, parts: &str, x_joint: f64) -> (String, Vec<(String, [f64; 2])>) {
    let (probe_text, at) = probes(x_joint);
    let text = format!(
        "[study]\ngeometry = \"planar\"\nboundary = \"flux-parallel\"\nbox = {{ from = [0, -65], to = [{width}, 60] }}\n\
         [materials.ideal]\nbr = \"{BR} T\"\nmur = 1.0\n{parts}\
         [[boundary]]\nkind = \"{kind}\"\nlines = [{{ from = [0, -65], to = [0, 60] }}, {{ from = [{width}, -65], to = [{width}, 60] }}]\n\
         {probe_text}[output]\nvtk = false\nplots = false\nreport = false\n"
    );
    (text, at)
}

fn magnet(name: &str, x0: f64, x1: f64, m: &str) -> String {
    format!("[[part]]\nname = \"{name}\"\nmaterial = \"ideal\"\nrect = {{ from = [{x0}, -{THICK}], to = [{x1}, 0] }}\nmagnetization = \"{m}\"\n")
}

/// Each probe's B against the series, within 0.1 % of |B| there.
fn assert_matches_series(v: &serde_json::Map<String, Value>, at: &[(String, [f64; 2])], what: &str) {
    for (name, [x, y]) in at {
        let exact = fourier_field(*x, *y);
        let got = [get(v, &format!("probe.{name}.bx")), get(v, &format!("probe.{name}.by"))];
        let scale = exact[0].hypot(exact[1]);
        let err = (got[0] - exact[0]).hypot(got[1] - exact[1]) / scale;
        assert!(
            err < 1e-3,
            "{what}: probe {name} at ({x}, {y}) mm: {got:?} T against {exact:?} T, error {err:.2e}"
        );
    }
}

#[test]
fn one_period_with_periodic_sides_matches_the_fourier_series() {
    let parts = magnet("up", 0.0, 0.5 * LAMBDA, "+y") + &magnet("down", 0.5 * LAMBDA, LAMBDA, "-y");
    let (text, at) = array_case(LAMBDA, "periodic", &parts, 0.5 * LAMBDA);
    assert_matches_series(&values("periodic-array", &text), &at, "one period");
}

#[test]
fn half_a_period_with_anti_periodic_sides_matches_the_fourier_series() {
    let parts = magnet("up", 0.0, 0.5 * LAMBDA, "+y");
    let (text, at) = array_case(0.5 * LAMBDA, "anti-periodic", &parts, 0.0);
    assert_matches_series(&values("anti-periodic-array", &text), &at, "half a period");
}

/// The period again on quartic elements graded at 2.0 and 3.0: the angle
/// refinement split an edge of the right side at a point a rounding error
/// off x = lambda, which the mesher did not count as on the side, so it
/// got no image on the left; the ties of the unmatched sides left the
/// system matrix not positive definite (mesher::periodic).
#[test]
fn periodic_sides_match_on_steeply_graded_quartic_meshes() {
    let parts = magnet("up", 0.0, 0.5 * LAMBDA, "+y") + &magnet("down", 0.5 * LAMBDA, LAMBDA, "-y");
    for grading in ["2.0", "3.0"] {
        let (text, at) = array_case(LAMBDA, "periodic", &parts, 0.5 * LAMBDA);
        let text = text.replace("[materials.ideal]", &format!("[mesh]\norder = 4\ngrading = {grading}\n[materials.ideal]"));
        assert_matches_series(&values("periodic-array-graded", &text), &at, &format!("one period, grading {grading}"));
    }
}

const OUTPUT: &str = "[output]\nvtk = false\nplots = false\nreport = false\n";

/// A magnet under a steel plate (the plate's pull), solved whole and as its
/// right half with the plane x = 0 flux-parallel (the magnetization +y lies
/// in the plane, so the potential is odd in x). The half's plate is cut by
/// the plane, so its force band crosses it; `scale_to_whole` doubles the
/// half's pull. Within 0.05 %.
#[test]
fn halving_on_a_flux_parallel_plane_keeps_the_force() {
    let case = |x0: f64, extra: &str| {
        format!(
            "[study]\ngeometry = \"planar\"\ndepth = \"20 mm\"\nboundary = \"flux-parallel\"\nbox = {{ from = [{}, -60], to = [60, 60] }}\naccuracy = \"0.02 %\"\n{extra}\
             [[part]]\nname = \"magnet\"\nmaterial = \"N42\"\nrect = {{ from = [{}, -10], to = [10, 0] }}\nmagnetization = \"+y\"\n\
             [[part]]\nname = \"plate\"\nmaterial = \"DC01\"\nrect = {{ from = [{}, 2], to = [20, 7] }}\n\
             [[force]]\nname = \"pull\"\nparts = [\"plate\"]\n{OUTPUT}",
            -60.0 * x0,
            -10.0 * x0,
            -20.0 * x0
        )
    };
    let whole = values("mirror-parallel-whole", &case(1.0, ""));
    let half_text = case(0.0, "scale_to_whole = true\n") + "[[boundary]]\nkind = \"flux-parallel\"\nline = { from = [0, -60], to = [0, 60] }\n";
    let half = values("mirror-parallel-half", &half_text);
    let (w, h) = (get(&whole, "force.pull.y"), get(&half, "force.pull.y"));
    assert!(w < -10.0, "the plate is pulled down: {w} N");
    assert!(((h - w) / w).abs() < 5e-4, "whole {w} N, half scaled to the whole {h} N");
    assert_eq!(get(&half, "force.pull.x"), 0.0, "the mirrored halves' sideways pulls cancel");
    let (ew, eh) = (get(&whole, "energy"), get(&half, "energy"));
    assert!(((eh - ew) / ew).abs() < 5e-4, "energy: whole {ew} J, half scaled {eh} J");
}

/// Two magnets magnetized +y attracting across a 2 mm gap, solved whole and
/// as the upper one above a flux-normal plane at the gap's middle (the
/// field is mirrored with B_x odd in y, so flux crosses the plane at right
/// angles: the plane acts as the other magnet). The upper magnet's pull,
/// within 0.05 %; its band stops short of the plane.
#[test]
fn halving_on_a_flux_normal_plane_keeps_the_force() {
    let magnet = |name: &str, y0: f64| {
        format!(
            "[[part]]\nname = \"{name}\"\nmaterial = \"N42\"\nrect = {{ from = [-10, {y0}], to = [10, {}] }}\nmagnetization = \"+y\"\n",
            y0 + 10.0
        )
    };
    let head = |y0: f64| {
        format!("[study]\ngeometry = \"planar\"\ndepth = \"20 mm\"\nboundary = \"flux-parallel\"\nbox = {{ from = [-60, {y0}], to = [60, 60] }}\naccuracy = \"0.02 %\"\n")
    };
    let tail = format!("[[force]]\nname = \"pull\"\nparts = [\"upper\"]\n{OUTPUT}");
    let whole = values(
        "mirror-normal-whole",
        &format!("{}{}{}{tail}", head(-60.0), magnet("lower", -11.0), magnet("upper", 1.0)),
    );
    let half = values(
        "mirror-normal-half",
        &format!(
            "{}{}{tail}[[boundary]]\nkind = \"flux-normal\"\nline = {{ from = [-60, 0], to = [60, 0] }}\n",
            head(0.0),
            magnet("upper", 1.0)
        ),
    );
    let (w, h) = (get(&whole, "force.pull.y"), get(&half, "force.pull.y"));
    assert!(w < -10.0, "the magnets attract: {w} N");
    assert!(((h - w) / w).abs() < 5e-4, "whole {w} N, half {h} N");
}

/// The open boundary cut by a symmetry plane on x = 0: the magnet under a
/// plate (magnetized +y: the plane is flux-parallel) and the same
/// magnetized +x (flux-normal), each solved whole in open space and as its
/// half x >= 0 with `scale_to_whole`: the pull, the energy and a field
/// probe agree within 0.05 %.
#[test]
fn the_open_boundary_cut_on_a_symmetry_plane_keeps_the_results() {
    for (m, kind) in [("+y", "flux-parallel"), ("+x", "flux-normal")] {
        let case = |x0: f64, extra: &str| {
            format!(
                "[study]\ngeometry = \"planar\"\ndepth = \"20 mm\"\naccuracy = \"0.02 %\"\n{extra}\
                 [[part]]\nname = \"magnet\"\nmaterial = \"N42\"\nrect = {{ from = [{}, -10], to = [10, 0] }}\nmagnetization = \"{m}\"\n\
                 [[part]]\nname = \"plate\"\nmaterial = \"DC01\"\nrect = {{ from = [{}, 2], to = [20, 7] }}\n\
                 [[force]]\nname = \"pull\"\nparts = [\"plate\"]\n[[probe]]\nname = \"far\"\npoint = [5, 40]\n{OUTPUT}",
                -10.0 * x0,
                -20.0 * x0
            )
        };
        let whole = values(&format!("open-whole-{kind}"), &case(1.0, ""));
        let half_text = case(0.0, "scale_to_whole = true\n") + &format!("[[boundary]]\nkind = \"{kind}\"\nline = {{ from = [0, -10], to = [0, 10] }}\n");
        let half = values(&format!("open-half-{kind}"), &half_text);
        for name in ["force.pull.y", "energy", "probe.far.b"] {
            let (w, h) = (get(&whole, name), get(&half, name));
            assert!(((h - w) / w).abs() < 5e-4, "{kind}: {name} whole {w}, half {h}");
        }
    }
}

/// A magnet under a plate inside a box whose four sides are flux-normal (a
/// closed shell of ideal iron), solved whole, where nothing holds the
/// potential (it is fixed only up to a constant, and the solve was refused
/// as "not positive definite"), and as its half x >= 0 with the plane x = 0
/// flux-parallel (a +y magnet's plane of symmetry), which holds it: the
/// pull and the energy (twice the half's) and a field probe agree within
/// 0.05 %.
#[test]
fn a_box_of_flux_normal_sides_keeps_the_results_of_its_half() {
    let case = |x0: f64, extra: &str| {
        let side = |from: [f64; 2], to: [f64; 2], kind: &str| format!("[[boundary]]\nkind = \"{kind}\"\nline = {{ from = {from:?}, to = {to:?} }}\n");
        let x0 = -60.0 * x0;
        format!(
            "[study]\ngeometry = \"planar\"\ndepth = \"20 mm\"\nboundary = \"flux-parallel\"\nbox = {{ from = [{x0}, -60], to = [60, 60] }}\naccuracy = \"0.02 %\"\n{extra}\
             [[part]]\nname = \"magnet\"\nmaterial = \"N42\"\nrect = {{ from = [{}, -10], to = [10, 0] }}\nmagnetization = \"+y\"\n\
             [[part]]\nname = \"plate\"\nmaterial = \"DC01\"\nrect = {{ from = [{}, 2], to = [20, 7] }}\n\
             [[force]]\nname = \"pull\"\nparts = [\"plate\"]\n[[probe]]\nname = \"side\"\npoint = [30, 0]\n{OUTPUT}{}{}{}{}",
            x0 / 6.0,
            x0 / 3.0,
            side([x0, -60.0], [60.0, -60.0], "flux-normal"),
            side([x0, 60.0], [60.0, 60.0], "flux-normal"),
            side([60.0, -60.0], [60.0, 60.0], "flux-normal"),
            side([x0, -60.0], [x0, 60.0], if x0 == 0.0 { "flux-parallel" } else { "flux-normal" }),
        )
    };
    let whole = values("floating-box-whole", &case(1.0, ""));
    let half = values("floating-box-half", &case(0.0, ""));
    // The half's plate and energy are half the whole's (the plate is cut by
    // the plane; `scale_to_whole` would also mirror across the three
    // flux-normal walls, which here are iron, not planes of symmetry).
    for (name, times) in [("force.pull.y", 2.0), ("energy", 2.0), ("probe.side.b", 1.0)] {
        let (w, h) = (get(&whole, name), times * get(&half, name));
        assert!(((h - w) / w).abs() < 5e-4, "{name}: whole {w}, half {h}");
    }
}

/// Mistakes in `[[boundary]]` are refused with a message that says what to do.
#[test]
fn boundary_mistakes_are_refused_clearly() {
    let part = "[[part]]\nname = \"m\"\nmaterial = \"N42\"\nrect = { from = [1, 1], to = [5, 5] }\nmagnetization = \"+y\"\n";
    let boxed = "[study]\ngeometry = \"planar\"\nboundary = \"flux-parallel\"\nbox = { from = [0, 0], to = [10, 10] }\n";
    let cases = [
        (
            format!("[study]\ngeometry = \"planar\"\n{part}[[boundary]]\nkind = \"flux-normal\"\nline = {{ from = [0, 0], to = [10, 0] }}\n"),
            "the open boundary is cut on the line x = 0",
        ),
        (
            format!("[study]\ngeometry = \"planar\"\n{part}[[boundary]]\nkind = \"periodic\"\nlines = [{{ from = [0, 0], to = [0, 10] }}, {{ from = [10, 0], to = [10, 10] }}]\n"),
            "cut by a symmetry plane only",
        ),
        (format!("{boxed}{part}[[boundary]]\nkind = \"flux-normal\"\nline = {{ from = [0, 0], to = [0, 5] }}\n"), "whole side of the box"),
        (
            format!("{boxed}{part}[[boundary]]\nkind = \"periodic\"\nlines = [{{ from = [0, 0], to = [0, 10] }}, {{ from = [0, 0], to = [10, 0] }}]\n"),
            "two opposite sides",
        ),
        (format!("{boxed}{part}[[boundary]]\nkind = \"flux-norml\"\nline = {{ from = [0, 0], to = [0, 10] }}\n"), "did you mean 'flux-normal'"),
        (format!("{boxed}scale_to_whole = true\n{part}"), "models the whole already"),
        (
            format!("{boxed}{part}[[boundary]]\nkind = \"flux-normal\"\nline = {{ from = [0, 0], to = [0, 10] }}\n[[boundary]]\nkind = \"flux-parallel\"\nline = {{ from = [0, 10], to = [0, 0] }}\n"),
            "named by two [[boundary]] tables",
        ),
    ];
    for (text, says) in cases {
        let (code, said, out) = common::solve_text("boundary-mistake", &text);
        let _ = std::fs::remove_dir_all(out.parent().unwrap());
        assert_eq!(code, Some(2), "{text}\n{said}");
        assert!(said.contains(says), "expected '{says}' in:\n{said}");
        assert!(said.contains("case.toml:"), "the message points into the file: {said}");
    }
}

/// The linear coupling of cases/ cut to one pole pair: its mover runs
/// through the periodic sides, so the force band runs on into the next
/// cell. Its thrust equals the derivative of the coenergy along the shift
/// (virtual work, the principle the stress tensor rests on: J. L. Coulomb,
/// IEEE Trans. Magn. 19(6), 1983), by a central difference over +-0.25 mm
/// (within 0.3 %: the difference's own error is of order h^2 F'''/6); and
/// the same coupling solved on two periods gives the same whole forces.
#[test]
fn a_periodic_cells_force_is_its_coenergys_derivative() {
    let case = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/../cases/linear-coupling-pole-pair.toml")).unwrap();
    let at = |s: f64| values(&format!("coupling-{s}"), &case.replace("shift = 2.5", &format!("shift = {s}")));
    let (mid, lo, hi) = (at(2.5), at(2.25), at(2.75));
    let thrust = get(&mid, "force.mover.x");
    let derivative = (get(&hi, "coenergy") - get(&lo, "coenergy")) / 0.5e-3;
    assert!(thrust < -100.0, "the mover is pulled back: {thrust} N");
    assert!(((derivative - thrust) / thrust).abs() < 3e-3, "thrust {thrust} N, dW'/dx {derivative} N");
    // Two periods, three cells of them: the mover's blocks repeated 20 mm on.
    let mut two = case
        .replace("to = [20, 20] }\nscale", "to = [40, 20] }\nscale")
        .replace("{ from = [20, -20], to = [20, 20] }", "{ from = [40, -20], to = [40, 20] }")
        .replace("cells = 6", "cells = 3");
    let second = [
        ("lower-iron2", "DC01", "[20, -9]", "[40, -5]", ""),
        ("lower-n2", "N42", "[20, -5]", "[30, -1]", "+y"),
        ("lower-s2", "N42", "[30, -5]", "[40, -1]", "-y"),
        ("upper-iron2", "DC01", "[20, 5]", "[40, 9]", ""),
        ("upper-a2", "N42", "[20, 1]", "[\"shift + 20\", 5]", "-y"),
        ("upper-b2", "N42", "[\"shift + 20\", 1]", "[\"shift + 30\", 5]", "+y"),
        ("upper-c2", "N42", "[\"shift + 30\", 1]", "[40, 5]", "-y"),
    ];
    let mut parts = String::new();
    for (name, material, from, to, m) in second {
        parts += &format!("[[part]]\nname = \"{name}\"\nmaterial = \"{material}\"\nrect = {{ from = {from}, to = {to} }}\n");
        if !m.is_empty() {
            parts += &format!("magnetization = \"{m}\"\n");
        }
    }
    two = two.replacen("[[boundary]]", &format!("{parts}[[boundary]]"), 1);
    two = two.replace(
        "parts = [\"upper-iron\", \"upper-a\", \"upper-b\", \"upper-c\"]",
        "parts = [\"upper-iron\", \"upper-a\", \"upper-b\", \"upper-c\", \"upper-iron2\", \"upper-a2\", \"upper-b2\", \"upper-c2\"]",
    );
    let both = values("coupling-two-periods", &two);
    for name in ["force.mover.x", "force.mover.y"] {
        let (one, two) = (get(&mid, name), get(&both, name));
        assert!(((one - two) / one).abs() < 1e-3, "{name}: one period {one} N, two periods {two} N");
    }
}
