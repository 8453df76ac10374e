//! Outlines with arcs, fillets, chamfers and holes (issue 20, point 1).

mod common;

use serde_json::Value;

fn num(v: &serde_json::Map<String, Value>, name: &str) -> f64 {
    v.get(name).and_then(Value::as_f64).unwrap_or_else(|| panic!("{name} missing"))
}

const OUTPUT: &str = "[output]\nvtk = false\nplots = false\nreport = false\n";

/// A ring magnet (radii 10 and 20 mm, recoil permeability 1, magnetized
/// across) drawn as a circle with a circular hole. A uniformly magnetized
/// long cylinder has the demagnetizing factor 1/2, so outside it is a line
/// dipole of moment M pi R^2 and inside H = -M/2; the ring is the large
/// cylinder less the small one (superposition): outside
/// |B| = mu0 M (b^2 - a^2) / (2 r^2), and in the bore B = 0 (the
/// demagnetizing factor of the infinite cylinder: J. A. Osborn,
/// "Demagnetizing factors of the general ellipsoid", Phys. Rev. 67, 1945,
/// the limit of an infinitely long ellipsoid of circular section).
#[test]
fn a_ring_with_a_hole_is_a_line_dipole_outside_and_field_free_inside() {
    let ring = "[materials.ideal]\nbr = \"1.0 T\"\nmur = 1.0\n[[part]]\nname = \"ring\"\nmaterial = \"ideal\"\n\
                circle = { center = [0, 0], radius = 20 }\nholes = [{ circle = { center = [0, 0], radius = 10 } }]\nmagnetization = \"+x\"\n";
    let outside =
        format!("[study]\ngeometry = \"planar\"\n{ring}[[probe]]\nname = \"east\"\npoint = [30, 0]\n[[probe]]\nname = \"north\"\npoint = [0, 35]\n{OUTPUT}");
    let (v, e) = common::solved("ring-outside", &outside);
    for (name, r) in [("east", 30e-3), ("north", 35e-3)] {
        let exact = 1.0 * (20e-3f64.powi(2) - 10e-3f64.powi(2)) / (2.0 * r * r);
        let (got, err) = (num(&v, &format!("probe.{name}.b")), num(&e, &format!("probe.{name}.b")));
        assert!((got - exact).abs() < 1e-3 * exact, "{name}: {got} T against {exact} T");
        assert!(
            (got - exact).abs() <= 2.0 * err.max(1e-4 * exact),
            "{name}: the true error {} is within twice the estimate {err}",
            (got - exact).abs()
        );
    }
    // The bore's field is zero, so a relative accuracy means nothing there:
    // solve a fixed fine mesh and bound it against Br.
    let bore = format!("[study]\ngeometry = \"planar\"\naccuracy = \"off\"\n[mesh]\nsize = 0.5\n{ring}[[probe]]\nname = \"bore\"\npoint = [3, 2]\n{OUTPUT}");
    let (v, _) = common::solved("ring-bore", &bore);
    assert!(num(&v, "probe.bore.b") < 1e-4, "bore {} T", num(&v, "probe.bore.b"));
}

/// One filleted pole piece written three ways: `rect` with `fillet`, a
/// polygon with `{ at, fillet }` corners, and a polygon with the arcs
/// written out by their centres. The pull on it agrees within the error
/// estimates, and differs from the sharp piece's by more.
#[test]
fn a_fillet_is_the_same_written_three_ways() {
    let magnet = "[[part]]\nname = \"magnet\"\nmaterial = \"N42\"\nrect = { from = [-10, -10], to = [10, 0] }\nmagnetization = \"+y\"\n";
    let case = |shape: &str| {
        format!(
            "[study]\ngeometry = \"planar\"\ndepth = \"10 mm\"\naccuracy = \"0.05 %\"\n{magnet}[[part]]\nname = \"pole\"\nmaterial = \"DC01\"\n{shape}\n\
             [[force]]\nname = \"pull\"\nparts = [\"pole\"]\n{OUTPUT}"
        )
    };
    let forms = [
        "rect = { from = [-10, 1], to = [10, 6], fillet = 2 }".to_string(),
        "polygon = [{ at = [-10, 1], fillet = 2 }, { at = [10, 1], fillet = 2 }, { at = [10, 6], fillet = 2 }, { at = [-10, 6], fillet = 2 }]".to_string(),
        "polygon = [[-8, 1], { at = [8, 1], center = [8, 3] }, [10, 3], { at = [10, 4], center = [8, 4] }, [8, 6], \
         { at = [-8, 6], center = [-8, 4] }, [-10, 4], { at = [-10, 3], center = [-8, 3] }]"
            .to_string(),
    ];
    let pulls: Vec<(f64, f64)> = forms
        .iter()
        .enumerate()
        .map(|(k, f)| {
            let (v, e) = common::solved(&format!("fillet-{k}"), &case(f));
            (num(&v, "force.pull.y"), num(&e, "force.pull.y"))
        })
        .collect();
    for (k, &(f, e)) in pulls.iter().enumerate().skip(1) {
        let (f0, e0) = pulls[0];
        assert!((f - f0).abs() <= 2.0 * (e + e0), "form {k}: {f} N against {f0} N (errors {e}, {e0})");
    }
    let (sharp, es) = common::solved("fillet-sharp", &case("rect = { from = [-10, 1], to = [10, 6] }"));
    let (s, se) = (num(&sharp, "force.pull.y"), num(&es, "force.pull.y"));
    assert!(
        (s - pulls[0].0).abs() > 2.0 * (se + pulls[0].1),
        "the fillets change the pull: sharp {s} N, filleted {} N",
        pulls[0].0
    );
}

/// A chamfered rectangle equals the polygon of its cut corners.
#[test]
fn a_chamfer_is_the_polygon_of_its_cut_corners() {
    let case = |shape: &str| {
        format!(
            "[study]\ngeometry = \"axisymmetric\"\naccuracy = \"0.05 %\"\n[[part]]\nname = \"magnet\"\nmaterial = \"N42\"\nrect = {{ from = [0, -10], to = [10, 0] }}\nmagnetization = \"+z\"\n\
             [[part]]\nname = \"pole\"\nmaterial = \"DC01\"\n{shape}\n[[force]]\nname = \"pull\"\nparts = [\"pole\"]\n{OUTPUT}"
        )
    };
    let (a, ea) = common::solved("chamfer-rect", &case("rect = { from = [0, 1], to = [12, 6], chamfer = 1.5 }"));
    let (c, ec) = common::solved(
        "chamfer-polygon",
        &case("polygon = [[0, 2.5], [1.5, 1], [10.5, 1], [12, 2.5], [12, 4.5], [10.5, 6], [1.5, 6], [0, 4.5]]"),
    );
    let (fa, fc) = (num(&a, "force.pull.z"), num(&c, "force.pull.z"));
    assert!(
        (fa - fc).abs() <= 2.0 * (num(&ea, "force.pull.z") + num(&ec, "force.pull.z")),
        "rect {fa} N, polygon {fc} N"
    );
}

/// Outline mistakes are refused with the point and the reason.
#[test]
fn outline_mistakes_are_refused_clearly() {
    let head = "[study]\ngeometry = \"planar\"\n[[part]]\nname = \"m\"\nmaterial = \"N42\"\nrect = { from = [0, -5], to = [5, -1] }\nmagnetization = \"+y\"\n[[part]]\nname = \"p\"\nmaterial = \"DC01\"\n";
    let cases = [
        ("rect = { from = [0, 0], to = [10, 4], fillet = 3 }", "only 1.0000 of the shorter edge is free"),
        (
            "polygon = [[0, 0], { at = [5, 0], fillet = 1 }, [10, 0], [10, 5]]",
            "not a corner between two straight edges",
        ),
        (
            "polygon = [[0, 0], { at = [10, 0], center = [10, 3] }, [10, 7], [0, 5]]",
            "must lie on one circle",
        ),
        (
            "rect = { from = [0, 0], to = [10, 10] }\nholes = [{ circle = { center = [10, 5], radius = 2 } }]",
            "hole 1 is not inside the outline",
        ),
        (
            "polygon = [[0, 0], { at = [10, 0], bulge = 1, fillet = 1 }, [10, 5]]",
            "one of bulge, center, fillet or chamfer",
        ),
    ];
    for (shape, says) in cases {
        let (code, said, out) = common::solve_text("outline-mistake", &format!("{head}{shape}\n"));
        let _ = std::fs::remove_dir_all(out.parent().unwrap());
        assert_eq!(code, Some(2), "{shape}\n{said}");
        assert!(said.contains(says), "expected '{says}' in:\n{said}");
    }
}

/// A half ring (radii 10 and 20 mm, recoil permeability 1) magnetized
/// radially outwards, drawn with centre arcs. In the charge model its
/// outer face carries +M, its inner face -M and its volume -M/r; each
/// charge's line field at the centre, summed over the half turn, gives
/// B = (Br / pi) ln(b / a) along the half ring's axis of symmetry (the
/// two faces' shares cancel, the volume's remains; the charge model of
/// E. P. Furlani, Permanent Magnet and Electromechanical Devices, 2001,
/// ch. 4, integrated here). A uniformly magnetized half ring would give
/// a different field, so this checks each element's own direction.
#[test]
fn a_radially_magnetized_half_ring_gives_the_charge_models_field() {
    let text = format!(
        "[study]\ngeometry = \"planar\"\n[materials.ideal]\nbr = \"1.0 T\"\nmur = 1.0\n[[part]]\nname = \"arc\"\nmaterial = \"ideal\"\n\
         polygon = [{{ at = [20, 0], center = [0, 0] }}, [-20, 0], {{ at = [-10, 0], center = [0, 0], turn = \"cw\" }}, [10, 0]]\n\
         magnetization = {{ radial = \"outward\", center = [0, 0] }}\n[[probe]]\nname = \"centre\"\npoint = [0, 0]\n{OUTPUT}"
    );
    let (v, e) = common::solved("radial-half-ring", &text);
    let exact = 2f64.ln() / std::f64::consts::PI;
    let (by, bx, err) = (num(&v, "probe.centre.by"), num(&v, "probe.centre.bx"), num(&e, "probe.centre.b"));
    assert!((by - exact).abs() < 1e-3 * exact, "B_y {by} T against {exact} T");
    assert!(bx.abs() < 1e-3 * exact, "B_x {bx} T: the field lies on the axis of symmetry");
    assert!(
        (by - exact).abs() <= 2.0 * err.max(1e-4 * exact),
        "true error {} within twice the estimate {err}",
        (by - exact).abs()
    );
    // Inwards, the field turns round.
    let (v, _) = common::solved("radial-half-ring-in", &text.replace("\"outward\"", "\"inward\""));
    assert!((num(&v, "probe.centre.by") + exact).abs() < 1e-3 * exact);
}
