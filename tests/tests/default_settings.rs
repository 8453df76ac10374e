//! Checks with exact answers run as a user would run them: a case with no
//! mesh key and the default `[study] accuracy` (0.1 %). Each value must be
//! within 0.1 % of its closed form and within twice its own error
//! estimate, and the estimate at most 20 times the true error or below a
//! tenth of the target (the estimate is a claim too). The hand-meshed
//! versions of these checks (linear_fields.rs, forces.rs) test the solver
//! apart from the refinement; these test what a case file gets.

use validation::reference::{bar_field_2d, bar_pair_force_2d, cylinder_axis_bz, thick_solenoid_axis_bz};
use validation::{assert_honest, check_at_default, record_estimated, solve_case_text};

const TARGET: f64 = validation::DEFAULT_TARGET;
const OUTPUT: &str = "[output]\nvtk = false\nplots = false\nreport = false\ncsv = false\n";

/// The head of a planar case 1 m deep with a rigid magnet material
/// (Br 1.2 T, recoil permeability 1) and no files but results.json.
fn planar_rigid_head(title: &str) -> String {
    format!(
        "[study]\ntitle = \"{title}\"\ngeometry = \"planar\"\nunit = \"mm\"\ndepth = \"1 m\"\n\
         [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet\"\n{OUTPUT}"
    )
}

/// A long bar magnet (20 x 10 mm, Br 1.2 T, recoil permeability 1) in the
/// plane: B at three points outside it against the two charged sheets of
/// its poles (E. P. Furlani, Permanent Magnet and Electromechanical
/// Devices, 2001, sec. 4.2).
#[test]
fn planar_bar_field_at_default_settings() {
    let (w, h) = (0.01, 0.005);
    let head = planar_rigid_head("bar");
    let mut text = format!("{head}[[part]]\nname = \"bar\"\nmaterial = \"rigid\"\nmagnetization = \"+y\"\nrect = {{ from = [-10, -5], to = [10, 5] }}\n");
    let points = [[0.0, 8.0], [14.0, 3.0], [25.0, 20.0]];
    for (i, p) in points.iter().enumerate() {
        text += &format!("[[probe]]\nname = \"p{i}\"\npoint = [{}, {}]\n", p[0], p[1]);
    }
    let r = solve_case_text(&text, &[]);
    let what = "planar bar magnet B at default settings, within its error";
    for (i, p) in points.iter().enumerate() {
        let b = bar_field_2d(1.2, w, h, p[0] * 1e-3, p[1] * 1e-3);
        let magnitude = b[0].hypot(b[1]);
        check_at_default(what, "Furlani 2001, charged sheets", &r, &format!("probe.p{i}.b"), magnitude, magnitude);
        // A component is held to honesty and to the target only: one can be
        // exact by chance where the field's error is not (at (14, 3) mm B_x was
        // within 9e-7 of |B| while B_y was 2.3e-4 off), and its estimate is
        // then sized by the field's error, not by its own.
        for (k, axis) in ["bx", "by"].iter().enumerate() {
            let name = format!("probe.p{i}.{axis}");
            let (v, e) = (r.values[&name], r.errors[&name]);
            let truth = (v - b[k]).abs();
            assert!(
                truth <= TARGET * magnitude && truth <= 2.0 * e,
                "{name}: true {truth:e}, estimate {e:e}, |B| {magnitude}"
            );
            record_estimated(what, "Furlani 2001, charged sheets", TARGET, truth / magnitude, e / magnitude);
        }
    }
}

/// A line probe at default settings: the peak and the mean of |B| over 101
/// points 3 mm above a long flat bar (80 x 10 mm, Br 1.2 T, recoil
/// permeability 1) against its charged sheets at the same points (Furlani
/// 2001 sec. 4.2). A line is read in the elements that hold its points;
/// it is sized by its distance to the parts (`lower::line_probe_size`:
/// 1.5 mm here, where a twentieth of the bar is 4 mm).
#[test]
fn planar_bar_line_probe_at_default_settings() {
    let head = planar_rigid_head("bar line");
    let text = format!(
        "{head}[[part]]\nname = \"bar\"\nmaterial = \"rigid\"\nmagnetization = \"+y\"\nrect = {{ from = [-40, -5], to = [40, 5] }}\n\
         [[probe]]\nname = \"over\"\nline = {{ from = [-50, 8], to = [50, 8], points = 101 }}\n"
    );
    let r = solve_case_text(&text, &[]);
    let magnitudes: Vec<f64> = (0..101)
        .map(|i| {
            let b = bar_field_2d(1.2, 0.04, 0.005, (-50.0 + i as f64) * 1e-3, 8e-3);
            b[0].hypot(b[1])
        })
        .collect();
    let peak = magnitudes.iter().copied().fold(0.0, f64::max);
    let mean = magnitudes.iter().sum::<f64>() / magnitudes.len() as f64;
    let what = "planar bar line probe, peak and mean of |B|, at default settings, within its error";
    check_at_default(what, "Furlani 2001, charged sheets", &r, "probe.over.b.max", peak, peak);
    check_at_default(what, "Furlani 2001, charged sheets", &r, "probe.over.b.mean", mean, mean);
}

/// Two long bars (20 x 10 mm, Br 1.2 T, recoil permeability 1) magnetized
/// alike, 2 mm apart: the pull per metre against the charge model
/// integrated over the upper bar's faces (Furlani 2001 sec. 4.2).
#[test]
fn planar_bar_pair_pull_at_default_settings() {
    let head = planar_rigid_head("bars");
    let text = format!(
        "{head}[[part]]\nname = \"lower\"\nmaterial = \"rigid\"\nmagnetization = \"+y\"\nrect = {{ from = [-10, -5], to = [10, 5] }}\n\
         [[part]]\nname = \"upper\"\nmaterial = \"rigid\"\nmagnetization = \"+y\"\nrect = {{ from = [-10, 7], to = [10, 17] }}\n\
         [[force]]\nname = \"pull\"\nparts = [\"upper\"]\n"
    );
    let r = solve_case_text(&text, &[]);
    let exact = bar_pair_force_2d(1.2, 0.01, 0.005, 0.005, 0.012);
    check_at_default(
        "planar bar magnets attracting at default settings, within its error",
        "Furlani 2001 charged sheets, integrated",
        &r,
        "force.pull.y",
        exact,
        exact.abs(),
    );
}

/// A thick solenoid (radii 10 and 15 mm, length 30 mm, 1e7 A/m2) in air:
/// B_z on its axis at its centre, its end and beyond (D. B. Montgomery,
/// Solenoid Magnet Design, 1969, ch. 1).
#[test]
fn thick_solenoid_axis_field_at_default_settings() {
    let mut text = format!(
        "[study]\ntitle = \"solenoid\"\ngeometry = \"axisymmetric\"\nunit = \"mm\"\n{OUTPUT}\
         [[part]]\nname = \"winding\"\nmaterial = \"air\"\ncurrent_density = \"1e7 A/m2\"\nrect = {{ from = [10, -15], to = [15, 15] }}\n"
    );
    let zs = [0.0, 15.0, 40.0];
    for (i, z) in zs.iter().enumerate() {
        text += &format!("[[probe]]\nname = \"z{i}\"\npoint = [0, {z}]\n");
    }
    let r = solve_case_text(&text, &[]);
    for (i, z) in zs.iter().enumerate() {
        let exact = thick_solenoid_axis_bz(1e7, 0.01, 0.015, 0.03, z * 1e-3);
        check_at_default(
            "thick solenoid on-axis B_z at default settings, within its error",
            "Montgomery 1969",
            &r,
            &format!("probe.z{i}.bz"),
            exact,
            exact.abs(),
        );
    }
}

/// A permeable body in a uniform field B0 is uniformly magnetized: inside
/// a sphere B = 3 mu_r / (mu_r + 2) B0, inside a long round cylinder
/// across its axis B = 2 mu_r / (mu_r + 1) B0 (J. D. Jackson, Classical
/// Electrodynamics, 3rd ed., 1999, sec. 5.11 and problem 5.29 in 2D).
#[test]
fn permeable_sphere_and_cylinder_in_a_uniform_field_at_default_settings() {
    let mu_r: f64 = 100.0;
    for (geometry, applied, exact, axis) in [
        ("axisymmetric", "\"0.1 T\"", 3.0 * mu_r / (mu_r + 2.0) * 0.1, "bz"),
        ("planar", "[\"0 T\", \"0.1 T\"]", 2.0 * mu_r / (mu_r + 1.0) * 0.1, "by"),
    ] {
        let depth = if geometry == "planar" { "depth = \"1 m\"\n" } else { "" };
        let text = format!(
            "[study]\ntitle = \"permeable body\"\ngeometry = \"{geometry}\"\nunit = \"mm\"\n{depth}applied_field = {applied}\n\
             [materials.soft]\nmur = {mu_r}\ndescription = \"linear soft material\"\n{OUTPUT}\
             [[part]]\nname = \"body\"\nmaterial = \"soft\"\ncircle = {{ center = [0, 0], radius = 10 }}\n\
             [[probe]]\nname = \"inside\"\npoint = [0, 4]\n"
        );
        let r = solve_case_text(&text, &[]);
        check_at_default(
            "permeable sphere and cylinder in a uniform field at default settings, within its error",
            "Jackson 3rd ed. sec. 5.11",
            &r,
            &format!("probe.inside.{axis}"),
            exact,
            exact,
        );
    }
}

/// The axial field of rigid cylinders from a thin disk to a long rod
/// (length over diameter 0.1, 1 and 4; Br 1.2 T): B_z one radius above
/// the face (E. P. Derby, S. Olbert, Am. J. Phys. 78, 2010).
#[test]
fn cylinder_axis_field_from_disk_to_rod_at_default_settings() {
    for l_over_d in [0.1, 1.0, 4.0] {
        let radius = 5.0;
        let length = 2.0 * radius * l_over_d;
        let text = format!(
            "[study]\ntitle = \"cylinder\"\ngeometry = \"axisymmetric\"\nunit = \"mm\"\n\
             [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet\"\n{OUTPUT}\
             [[part]]\nname = \"magnet\"\nmaterial = \"rigid\"\nmagnetization = \"+z\"\nrect = {{ from = [0, 0], to = [{radius}, {length}] }}\n\
             [[probe]]\nname = \"above\"\npoint = [0, {}]\n",
            length + radius
        );
        let r = solve_case_text(&text, &[]);
        let exact = cylinder_axis_bz(1.2, radius * 1e-3, length * 1e-3, (length + radius) * 1e-3);
        check_at_default(
            "cylinder on-axis B_z, L/D 0.1 to 4, at default settings, within its error",
            "Derby & Olbert 2010",
            &r,
            "probe.above.bz",
            exact,
            exact,
        );
    }
}

/// The global energy-norm estimate against an exact field energy: a
/// uniformly magnetized sphere (Br 1.2 T, radius 10 mm, recoil
/// permeability one) and a long round bar across its axis store W = mu0 N M^2 V / 2 with
/// demagnetizing factors N = 1/3 and 1/2 (J. A. Osborn, Demagnetizing
/// factors of the general ellipsoid, Phys. Rev. 67, 1945). The field's
/// error in the energy norm is sqrt(2 |W_h - W|) (Galerkin: the
/// functional's error is half the squared error norm), relative to
/// sqrt(2 W); it must lie within twice the estimate, and the estimate
/// within 20 times it.
#[test]
fn energy_norm_estimate_against_the_exact_energy_of_round_magnets() {
    let mu0 = 4e-7 * std::f64::consts::PI;
    let m = 1.2 / mu0;
    for (geometry, n, volume) in [
        ("axisymmetric", 1.0 / 3.0, 4.0 / 3.0 * std::f64::consts::PI * 1e-6),
        ("planar", 0.5, std::f64::consts::PI * 1e-4),
    ] {
        let depth = if geometry == "planar" { "depth = \"1 m\"\n" } else { "" };
        let text = format!(
            "[study]\ntitle = \"round magnet\"\ngeometry = \"{geometry}\"\nunit = \"mm\"\n{depth}\
             [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet\"\n{OUTPUT}\
             [[part]]\nname = \"ball\"\nmaterial = \"rigid\"\nmagnetization = \"+{}\"\ncircle = {{ center = [0, 0], radius = 10 }}\n",
            if geometry == "planar" { "y" } else { "z" }
        );
        let r = solve_case_text(&text, &[]);
        let exact = 0.5 * mu0 * n * m * m * volume;
        let w = r.values["energy"];
        let truth = ((w - exact).abs() / exact).sqrt();
        let estimate = r.adaptive.as_ref().and_then(|a| a.energy_norm).expect("an energy-norm estimate");
        eprintln!("{geometry}: energy {w:.9e} exact {exact:.9e}; energy norm true {truth:.2e} estimated {estimate:.2e}");
        assert!((w - exact).abs() <= TARGET * exact, "{geometry}: energy {w} against {exact}");
        assert!(truth <= 2.0 * estimate, "{geometry}: true {truth:e} more than twice the estimate {estimate:e}");
        assert!(
            estimate <= 20.0 * truth,
            "{geometry}: estimate {estimate:e} more than 20 times the true {truth:e}"
        );
        // The table records the energy (its error is the squared energy norm's half).
        record_estimated(
            "field energy of round magnets at default settings, within its error (and the energy norm within its estimate)",
            "demagnetizing factors 1/3 and 1/2 (Osborn 1945)",
            TARGET,
            (w - exact).abs() / exact,
            r.errors["energy"] / exact,
        );
    }
}

/// Two long round conductors (radius 2 mm, 1 kA each, the same way, 10 mm
/// apart) attract with mu0 I^2 / (2 pi d) per metre, exactly: the field
/// outside a round conductor is a line current's (Ampere's force law; J. D.
/// Jackson, Classical Electrodynamics, 3rd ed., 1999, sec. 5.2). A rigid
/// round magnet (Br 1.2 T, radius 5 mm, recoil permeability one) magnetized
/// at 30 degrees to a uniform 0.1 T field feels the torque m x B0 with
/// m = Br A / mu0 per metre (Jackson sec. 5.7).
#[test]
fn conductor_pull_and_magnet_torque_at_default_settings() {
    let mu0 = 4e-7 * std::f64::consts::PI;
    let text = format!(
        "[study]\ntitle = \"conductors\"\ngeometry = \"planar\"\nunit = \"mm\"\ndepth = \"1 m\"\n{OUTPUT}\
         [[part]]\nname = \"left\"\nmaterial = \"air\"\ncurrent = \"1000 A\"\ncircle = {{ center = [-5, 0], radius = 2 }}\n\
         [[part]]\nname = \"right\"\nmaterial = \"air\"\ncurrent = \"1000 A\"\ncircle = {{ center = [5, 0], radius = 2 }}\n\
         [[force]]\nname = \"pull\"\nparts = [\"right\"]\n"
    );
    let r = solve_case_text(&text, &[]);
    let exact = -mu0 * 1e6 / (2.0 * std::f64::consts::PI * 0.01);
    check_at_default(
        "parallel conductors attracting at default settings, within its error",
        "Ampere's force law",
        &r,
        "force.pull.x",
        exact,
        exact.abs(),
    );

    // One of them alone in a uniform 0.1 T field along +y: F = I L x B0,
    // -I B0 along x per metre (current out of the plane), whatever its shape.
    let text = format!(
        "[study]\ntitle = \"conductor in a field\"\ngeometry = \"planar\"\nunit = \"mm\"\ndepth = \"1 m\"\napplied_field = [\"0 T\", \"0.1 T\"]\n{OUTPUT}\
         [[part]]\nname = \"wire\"\nmaterial = \"air\"\ncurrent = \"1000 A\"\ncircle = {{ center = [0, 0], radius = 2 }}\n\
         [[force]]\nname = \"push\"\nparts = [\"wire\"]\n"
    );
    let r = solve_case_text(&text, &[]);
    check_at_default(
        "conductor in a uniform field at default settings, within its error",
        "F = I L x B",
        &r,
        "force.push.x",
        -100.0,
        100.0,
    );

    let text = format!(
        "[study]\ntitle = \"torque\"\ngeometry = \"planar\"\nunit = \"mm\"\ndepth = \"1 m\"\napplied_field = [\"0.1 T\", \"0 T\"]\n\
         [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet\"\n{OUTPUT}\
         [[part]]\nname = \"magnet\"\nmaterial = \"rigid\"\nmagnetization = \"30 deg\"\ncircle = {{ center = [0, 0], radius = 5 }}\n\
         [[force]]\nname = \"turn\"\nparts = [\"magnet\"]\n"
    );
    let r = solve_case_text(&text, &[]);
    let m = 1.2 / mu0 * std::f64::consts::PI * 25e-6;
    // m at 30 degrees, B0 along +x: the torque m x B0 is -m B0 sin 30 about +z.
    let exact = -m * 0.1 * 0.5;
    check_at_default(
        "magnet torque in a uniform field at default settings, within its error",
        "N = m x B (Jackson 1999 sec. 5.7)",
        &r,
        "force.turn.torque",
        exact,
        exact.abs(),
    );
}

/// Action and reaction: the forces on two magnets of unlike size, offset and
/// magnetized at an angle to each other, cancel exactly (Newton's third law
/// for magnetostatic forces between bodies in air; J. D. Jackson, Classical
/// Electrodynamics, 3rd ed., 1999, sec. 5.7). Each comes from its own
/// stress band, so their discretization errors differ, and the sum, whose
/// exact value is zero, must lie within twice the sum of their estimates.
#[test]
fn forces_on_two_magnets_cancel_within_their_errors_at_default_settings() {
    let head = planar_rigid_head("third law");
    let text = format!(
        "{head}[[part]]\nname = \"big\"\nmaterial = \"rigid\"\nmagnetization = \"+y\"\nrect = {{ from = [-10, -5], to = [10, 5] }}\n\
         [[part]]\nname = \"small\"\nmaterial = \"rigid\"\nmagnetization = \"30 deg\"\nrect = {{ from = [4, 8], to = [12, 12] }}\n\
         [[force]]\nname = \"on_big\"\nparts = [\"big\"]\n[[force]]\nname = \"on_small\"\nparts = [\"small\"]\n"
    );
    let r = solve_case_text(&text, &[]);
    let scale = r.values["force.on_small.magnitude"];
    for axis in ["x", "y"] {
        assert_cancel(
            "Newton's third law at default settings, within the forces' errors",
            "action and reaction (Jackson 1999 sec. 5.7)",
            &r,
            [&format!("force.on_big.{axis}"), &format!("force.on_small.{axis}")],
            scale,
        );
    }
}

/// Two values whose exact sum is zero (action and reaction): the sum within
/// twice the sum of their estimates and within the target of `scale`;
/// recorded for the validation table under `check` with its `source`.
fn assert_cancel(check: &str, source: &str, r: &study::Results, [a, b]: [&str; 2], scale: f64) {
    let term = |n: &str| (n.to_string(), r.values[n], r.errors[n], 1.0);
    assert_vanishes(check, source, &[term(a), term(b)], scale);
}

/// Values whose combination sum of c v is exactly zero, each given as
/// (name, value, its estimated error, c): the combination within twice
/// the sum of |c| times the estimates, and within the target of `scale`;
/// recorded for the validation table under `check` with its `source`.
fn assert_vanishes(check: &str, source: &str, terms: &[(String, f64, f64, f64)], scale: f64) {
    let sum: f64 = terms.iter().map(|(_, v, _, c)| c * v).sum();
    let estimate: f64 = terms.iter().map(|(_, _, e, c)| c.abs() * e).sum();
    let names: Vec<&str> = terms.iter().map(|(n, ..)| n.as_str()).collect();
    eprintln!("{check}: {names:?}: combination {sum:e}, estimates {estimate:e}, scale {scale:e}");
    assert!(
        sum.abs() <= 2.0 * estimate,
        "{names:?} miss vanishing by {sum:e} against estimates {estimate:e}"
    );
    assert!(sum.abs() <= TARGET * scale, "{names:?}: {sum:e} against {scale}");
    record_estimated(check, source, TARGET, sum.abs() / scale, estimate / scale);
}

/// Superposition: in a linear study (rigid magnets, no steel) B of two
/// magnets is the sum of B of each alone. Two long bars (10 x 10 mm, Br
/// 1.2 T, one along +y, one along +x) 10 mm apart, B at two points: the
/// three studies are meshed and refined each on its own, so the sum holds
/// only within their errors. The hand-meshed check (linear_fields.rs)
/// solves the three on one mesh.
#[test]
fn superposition_of_two_magnets_at_default_settings() {
    let bars = [("left", "+y", "[-15, -5], to = [-5, 5]"), ("right", "+x", "[5, -5], to = [15, 5]")];
    let case = |which: &[usize]| {
        let mut text = format!(
            "[study]\ntitle = \"superposition\"\ngeometry = \"planar\"\nunit = \"mm\"\ndepth = \"1 m\"\n\
             [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet\"\n{OUTPUT}"
        );
        for &i in which {
            let (name, dir, at) = bars[i];
            text += &format!("[[part]]\nname = \"{name}\"\nmaterial = \"rigid\"\nmagnetization = \"{dir}\"\nrect = {{ from = {at} }}\n");
        }
        text += "[[probe]]\nname = \"between\"\npoint = [0, 2]\n[[probe]]\nname = \"above\"\npoint = [3, 12]\n";
        solve_case_text(&text, &[])
    };
    let (both, left, right) = (case(&[0, 1]), case(&[0]), case(&[1]));
    for probe in ["between", "above"] {
        let scale = both.values[&format!("probe.{probe}.b")];
        for axis in ["bx", "by"] {
            let name = format!("probe.{probe}.{axis}");
            let term = |r: &study::Results, c: f64| (name.clone(), r.values[&name], r.errors[&name], c);
            assert_vanishes(
                "superposition of two magnets at default settings, within their errors",
                "linearity",
                &[term(&both, 1.0), term(&left, -1.0), term(&right, -1.0)],
                scale,
            );
        }
    }
}

/// Angular momentum in statics: the Maxwell stress tensor is symmetric, so
/// the torques of two magnets on each other about any common point are
/// equal and opposite (the stress tensor and the conservation laws: J. D.
/// Jackson, Classical Electrodynamics, 3rd ed., 1999, ch. 6). Two bars
/// magnetized at 0 and 70 degrees, offset; each torque comes from its own
/// stress band, so the sum, whose exact value is zero, must lie within
/// twice the sum of their estimates, about the origin and about a point
/// far to one side.
#[test]
fn torques_on_two_magnets_cancel_within_their_errors_at_default_settings() {
    for about in ["[0, 0]", "[20, -10]"] {
        let head = planar_rigid_head("torques");
        let text = format!(
            "{head}[[part]]\nname = \"left\"\nmaterial = \"rigid\"\nmagnetization = \"0 deg\"\nrect = {{ from = [-13, -5], to = [-3, 5] }}\n\
             [[part]]\nname = \"right\"\nmaterial = \"rigid\"\nmagnetization = \"70 deg\"\nrect = {{ from = [3, -2], to = [13, 8] }}\n\
             [[force]]\nname = \"on_left\"\nparts = [\"left\"]\ntorque_about = {about}\n\
             [[force]]\nname = \"on_right\"\nparts = [\"right\"]\ntorque_about = {about}\n"
        );
        let r = solve_case_text(&text, &[]);
        let (a, b) = ("force.on_left.torque", "force.on_right.torque");
        assert_cancel(
            "torques of two magnets cancel at default settings, within their errors",
            "symmetric Maxwell stress, angular momentum (Jackson 1999 ch. 6)",
            &r,
            [a, b],
            r.values[a].abs().max(r.values[b].abs()),
        );
    }
}

/// A coaxial line (inner conductor of radius 2 mm, return shell from 6 to
/// 7 mm, 10 A, planar, 1 m long): its field energy against L' I^2 / 2 with
/// the inductance per length of a coax with both conductors' internal
/// inductance (S. Ramo, J. R. Whinnery, T. Van Duzer, Fields and Waves in
/// Communication Electronics, 3rd ed., 1994), and its flux linkage, whose
/// inductance is the same L'. The field outside the shell is zero, so the
/// open boundary adds nothing.
#[test]
fn coaxial_line_energy_and_linkage_at_default_settings() {
    let (a, b, c, current) = (0.002, 0.006, 0.007, 10.0);
    let text = format!(
        "[study]\ntitle = \"coax\"\ngeometry = \"planar\"\nunit = \"mm\"\ndepth = \"1 m\"\n{OUTPUT}\
         [[part]]\nname = \"shell\"\nmaterial = \"copper\"\ncurrent = \"-10 A\"\ncircle = {{ center = [0, 0], radius = 7 }}\n\
         holes = [{{ circle = {{ center = [0, 0], radius = 6 }} }}]\n\
         [[part]]\nname = \"core\"\nmaterial = \"copper\"\ncurrent = \"10 A\"\ncircle = {{ center = [0, 0], radius = 2 }}\n\
         [[flux]]\nname = \"loop\"\nwinding = [\"core\", \"shell\"]\nturns = 1\n"
    );
    let r = solve_case_text(&text, &[]);
    let inductance = validation::reference::coax_inductance_per_length(a, b, c);
    let energy = 0.5 * inductance * current * current;
    check_at_default(
        "coaxial line energy and linkage at default settings, within its error",
        "Ramo, Whinnery, Van Duzer 1994",
        &r,
        "energy",
        energy,
        energy,
    );
    check_at_default(
        "coaxial line energy and linkage at default settings, within its error",
        "Ramo, Whinnery, Van Duzer 1994",
        &r,
        "flux.loop",
        inductance * current,
        inductance * current,
    );
}

/// A linear inductor's field energy is half its flux linkage times its
/// current, W = L I^2 / 2 = lambda I / 2: a solenoid in air (radii 20 and
/// 22 mm, 100 mm long, 1000 ampere-turns in 100 turns, so 10 A). Its
/// linkage is also held against the winding's exact inductance
/// (`thick_coil_inductance`). Energy and
/// linkage are integrals of one solution, each with its own estimate; the
/// combination, exactly zero, must lie within their errors. The hand-meshed
/// check (forces.rs) holds the same on a given mesh.
#[test]
fn solenoid_energy_is_half_its_linkage_times_its_current_at_default_settings() {
    let (ampere_turns, turns) = (1000.0, 100.0);
    let text = format!(
        "[study]\ntitle = \"solenoid\"\ngeometry = \"axisymmetric\"\nunit = \"mm\"\n{OUTPUT}\
         [[part]]\nname = \"coil\"\nmaterial = \"copper\"\ncurrent = \"{ampere_turns} A\"\nrect = {{ from = [20, -50], to = [22, 50] }}\n\
         [[flux]]\nname = \"linkage\"\nwinding = \"coil\"\nturns = {turns}\n"
    );
    let r = solve_case_text(&text, &[]);
    let current = ampere_turns / turns;
    // The linkage itself against the winding's exact inductance.
    let inductance = validation::reference::thick_coil_inductance(0.02, 0.022, 0.1, turns);
    check_at_default(
        "solenoid inductance at default settings, within its error",
        "ring mutual inductance, Bessel form (Smythe 1968), integrated over the winding",
        &r,
        "flux.linkage",
        inductance * current,
        inductance * current,
    );
    let term = |name: &str, c: f64| (name.to_string(), r.values[name], r.errors[name], c);
    assert_vanishes(
        "solenoid energy = L I^2 / 2 at default settings, within their errors",
        "linear inductor energy",
        &[term("energy", 1.0), term("flux.linkage", -0.5 * current)],
        r.values["energy"],
    );
}

/// The same solenoid beside a rigid magnet (Br 1.2 T, recoil permeability
/// one, a disk on the axis past the winding's end): the magnet adds its own
/// linkage, but with a permeability of one it leaves the winding's own
/// field as in air, so by superposition d(linkage)/dI is still the
/// winding's exact inductance (`thick_coil_inductance`). A magnet in the
/// study sends the incremental inductance through the field's response on
/// the tangent (`solver::source_response`), which this holds, with its
/// estimate, to the exact value.
#[test]
fn incremental_inductance_beside_a_rigid_magnet_at_default_settings() {
    let (ampere_turns, turns) = (1000.0, 100.0);
    let text = format!(
        "[study]\ntitle = \"solenoid and magnet\"\ngeometry = \"axisymmetric\"\nunit = \"mm\"\n{OUTPUT}\
         [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet for superposition\"\n\
         [[part]]\nname = \"coil\"\nmaterial = \"copper\"\ncurrent = \"{ampere_turns} A\"\nrect = {{ from = [20, -50], to = [22, 50] }}\n\
         [[part]]\nname = \"magnet\"\nmaterial = \"rigid\"\nmagnetization = \"+z\"\nrect = {{ from = [0, 60], to = [10, 70] }}\n\
         [[flux]]\nname = \"linkage\"\nwinding = \"coil\"\nturns = {turns}\n"
    );
    let r = solve_case_text(&text, &[]);
    let inductance = validation::reference::thick_coil_inductance(0.02, 0.022, 0.1, turns);
    check_at_default(
        "incremental inductance beside a rigid magnet at default settings, within its error",
        "superposition; ring mutual inductance, Bessel form (Smythe 1968), integrated over the winding",
        &r,
        "flux.linkage.incremental_inductance",
        inductance,
        inductance,
    );
    // Premise: the magnet does add to the linkage, so the linkage alone is not L I.
    let own = r.values["flux.linkage"] - inductance * ampere_turns / turns;
    assert!(
        own.abs() > 0.01 * inductance * ampere_turns / turns,
        "the magnet's share of the linkage: {own} Wb"
    );
}

/// A saturating study: a ring core (10 to 20 mm radius) of a smooth
/// saturating law around a straight conductor (3 mm radius), planar, 1 m
/// deep, at ampere-turns from the linear range to deep saturation. By
/// Ampere's law H = NI / (2 pi r) in the core whatever the material, so
/// the flux through a radial cut of the core is the integral of B(H(r)) dr
/// (`toroidal_core_flux`). The law is given as a 400-point table; the
/// solver's monotone cubic through it stays within 1e-5 of the law
/// (nonlinear.rs checks it), far below the target.
#[test]
fn saturating_ring_core_flux_at_default_settings() {
    use validation::reference::{arctan_saturation_b, arctan_saturation_table, toroidal_core_flux};
    let table: Vec<String> = arctan_saturation_table().iter().map(|[h, b]| format!("[{h:e}, {b:e}]")).collect();
    for ni in [30.0, 300.0, 3000.0, 30000.0] {
        let text = format!(
            "[study]\ntitle = \"ring core\"\ngeometry = \"planar\"\nunit = \"mm\"\ndepth = \"1 m\"\n{OUTPUT}\
             [materials.core]\nbh = [{}]\ndescription = \"arctangent test law\"\n\
             [[part]]\nname = \"core\"\nmaterial = \"core\"\ncircle = {{ center = [0, 0], radius = 20 }}\n\
             holes = [{{ circle = {{ center = [0, 0], radius = 10 }} }}]\n\
             [[part]]\nname = \"wire\"\nmaterial = \"copper\"\ncurrent = \"{ni} A\"\ncircle = {{ center = [0, 0], radius = 3 }}\n\
             [[flux]]\nname = \"cut\"\nline = {{ from = [10, 0], to = [20, 0] }}\n",
            table.join(", ")
        );
        let r = solve_case_text(&text, &[]);
        let exact = toroidal_core_flux(arctan_saturation_b, ni, 0.01, 0.02);
        let (v, e) = (r.values["flux.cut"].abs(), r.errors["flux.cut"]);
        let what = "saturating ring core flux at default settings, NI 30 to 30 000 A, within its error";
        assert_honest(&format!("{what}: NI {ni}"), v, e, exact, exact, TARGET);
        record_estimated(what, "Ampere's law", TARGET, (v - exact).abs() / exact, e / exact);
    }
}

/// Rigid round magnets (Br 1.2 T, radius 10 mm, recoil permeability one)
/// from a thin disk to a long rod, L/D 0.1 to 4: the field energy
/// W = mu0 N M^2 V / 2 with the magnetometric demagnetizing factor N of a
/// cylinder (D.-X. Chen, J. A. Brug, R. B. Goldfarb, Demagnetizing factors
/// for cylinders, IEEE Trans. Magn. 27(4), 1991; `cylinder_demag_factor`).
#[test]
fn cylinder_field_energy_at_default_settings() {
    let mu0 = 4e-7 * std::f64::consts::PI;
    let (a, m) = (0.01, 1.2 / mu0);
    for ratio in [0.1, 0.5, 1.0, 2.0, 4.0] {
        let l = 2.0 * a * ratio;
        let text = format!(
            "[study]\ntitle = \"cylinder\"\ngeometry = \"axisymmetric\"\nunit = \"mm\"\n\
             [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet\"\n{OUTPUT}\
             [[part]]\nname = \"magnet\"\nmaterial = \"rigid\"\nmagnetization = \"+z\"\nrect = {{ from = [0, 0], to = [10, {}] }}\n",
            l * 1e3
        );
        let r = solve_case_text(&text, &[]);
        let n = validation::reference::cylinder_demag_factor(a, l);
        let exact = 0.5 * mu0 * n * m * m * std::f64::consts::PI * a * a * l;
        check_at_default(
            "cylinder field energy, L/D 0.1 to 4, at default settings, within its error",
            "demagnetizing factors (Chen, Brug, Goldfarb 1991)",
            &r,
            "energy",
            exact,
            exact,
        );
    }
}

/// A long bar magnet (10 mm across the plane x = 0, 5 mm thick along x,
/// Br 1.2 T, recoil permeability one) 2 mm from a symmetry plane on x = 0
/// that cuts the open boundary, magnetized along x. By the method of
/// images a flux-parallel plane (A = 0) mirrors magnetic charge with its
/// own sign, so the bar is pushed off by a reversed image; a flux-normal
/// plane mirrors it with the opposite sign, so the bar is pulled on by a
/// like image: either way with the force between two bars at twice the
/// centre's distance, from the charged sheets (Furlani 2001 sec. 4.2,
/// integrated in `bar_pair_force_2d`).
#[test]
fn bar_magnet_by_a_symmetry_plane_at_default_settings() {
    let (w, h, gap) = (0.005, 0.0025, 0.002);
    // bar_pair_force_2d: the pull on the second bar along the line of centres (negative: towards the first).
    let pair = validation::reference::bar_pair_force_2d(1.2, w, h, h, 2.0 * (gap + h));
    for (kind, exact) in [("flux-parallel", -pair), ("flux-normal", pair)] {
        let head = planar_rigid_head("bar by a plane");
        let text = format!(
            "{head}[[part]]\nname = \"bar\"\nmaterial = \"rigid\"\nmagnetization = \"+x\"\nrect = {{ from = [2, -5], to = [7, 5] }}\n\
             [[force]]\nname = \"push\"\nparts = [\"bar\"]\n\
             [[boundary]]\nkind = \"{kind}\"\nline = {{ from = [0, -10], to = [0, 10] }}\n"
        );
        let r = solve_case_text(&text, &[]);
        check_at_default(
            "bar magnet by a symmetry plane at default settings, within its error",
            "method of images; Furlani 2001 charged sheets, integrated",
            &r,
            "force.push.x",
            exact,
            exact.abs(),
        );
    }
}

/// A disk magnet (radius 5 mm, 5 mm long, Br 1.2 T, recoil permeability
/// one, magnetized along the axis) 2 mm below the top side of a
/// flux-parallel box (z = 0; the box reaches 200 mm, 40 radii, out and
/// down). By the method of images a flux-parallel plane mirrors magnetic
/// charge with its own sign, so the disk is pushed off by a reversed image;
/// named flux-normal, the side mirrors it with the opposite sign and the
/// disk is pulled on by a like image: either way with the pull of two
/// coaxial disks 4 mm apart (J. Vokoun et al., J. Magn. Magn. Mater. 321,
/// 2009, charge model; `coaxial_cylinders_force`). The far walls' images
/// lie 400 mm off and change the force by about (14 / 400)^4, 1.5e-6.
#[test]
fn disk_magnet_by_a_symmetry_plane_at_default_settings() {
    let pair = validation::reference::coaxial_cylinders_force(1.2, 1.2, 0.005, 0.005, 0.005, 0.005, 0.004);
    let top = "line = { from = [0, 0], to = [200, 0] }";
    for (named, exact) in [(String::new(), -pair), (format!("[[boundary]]\nkind = \"flux-normal\"\n{top}\n"), pair)] {
        let text = format!(
            "[study]\ntitle = \"disk by a plane\"\ngeometry = \"axisymmetric\"\nunit = \"mm\"\n\
             boundary = \"flux-parallel\"\nbox = {{ from = [0, -200], to = [200, 0] }}\n\
             [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet\"\n{OUTPUT}\
             [[part]]\nname = \"disk\"\nmaterial = \"rigid\"\nmagnetization = \"+z\"\nrect = {{ from = [0, -7], to = [5, -2] }}\n\
             [[force]]\nname = \"push\"\nparts = [\"disk\"]\n{named}"
        );
        let r = solve_case_text(&text, &[]);
        check_at_default(
            "disk magnet by a symmetry plane at default settings, within its error",
            "method of images; Vokoun et al. 2009 (charge model)",
            &r,
            "force.push.z",
            exact,
            exact.abs(),
        );
    }
}

/// A rigid disk magnet (radius 5 mm, 5 mm long, Br 1.2 T) 2 mm above a
/// linear half space of relative permeability 1000. By the method of
/// images a magnetic charge q outside a half space of permeability mu sees
/// its mirror image of strength -(mu - 1)/(mu + 1) q (J. D. Jackson,
/// Classical Electrodynamics, 3rd ed., 1999, sec. 4.4, the dielectric half
/// space, with epsilon for mu in the scalar potential), so the pull is
/// (mu - 1)/(mu + 1) times that of two coaxial disks 4 mm apart (J. Vokoun
/// et al., J. Magn. Magn. Mater. 321, 2009, charge model;
/// `coaxial_cylinders_force`): 0.2 % less than over an ideal plane, twice
/// the target. The half space fills the box's lower half; the box's far
/// walls lie 200 mm off, and their images change the force by about
/// (14 / 400)^4, 1.5e-6. The hand-meshed check (forces.rs) has a finite
/// plate and a 3 % tolerance.
#[test]
fn magnet_over_a_permeable_half_space_at_default_settings() {
    let mu = 1000.0;
    let r = over_a_half_space(
        "geometry = \"axisymmetric\"\n",
        mu,
        [
            "from = [0, -200], to = [200, 200]",
            "from = [0, -200], to = [200, 0]",
            "from = [0, 2], to = [5, 7]",
        ],
        "+z",
    );
    let pair = validation::reference::coaxial_cylinders_force(1.2, 1.2, 0.005, 0.005, 0.005, 0.005, 0.004);
    let exact = -(mu - 1.0) / (mu + 1.0) * pair;
    check_at_default(
        "magnet over a permeable half space at default settings, within its error",
        "method of images (Jackson 1999 sec. 4.4); Vokoun et al. 2009 (charge model)",
        &r,
        "force.pull.z",
        exact,
        exact.abs(),
    );
}

/// A rigid magnet (magnetized `up`) above a linear half space of relative
/// permeability `mu` that fills the lower half of a flux-parallel box:
/// the box, the half space and the magnet as rectangles' corners; the
/// force on the magnet is `force.pull`.
fn over_a_half_space(geometry: &str, mu: f64, [frame, plate, magnet]: [&str; 3], up: &str) -> study::Results {
    let text = format!(
        "[study]\ntitle = \"magnet over a half space\"\n{geometry}unit = \"mm\"\n\
         boundary = \"flux-parallel\"\nbox = {{ {frame} }}\n\
         [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet\"\n\
         [materials.soft]\nmur = {mu}\ndescription = \"linear permeable half space\"\n{OUTPUT}\
         [[part]]\nname = \"plate\"\nmaterial = \"soft\"\nrect = {{ {plate} }}\n\
         [[part]]\nname = \"magnet\"\nmaterial = \"rigid\"\nmagnetization = \"{up}\"\nrect = {{ {magnet} }}\n\
         [[force]]\nname = \"pull\"\nparts = [\"magnet\"]\n"
    );
    solve_case_text(&text, &[])
}

/// The planar counterpart: a long rigid bar (10 x 5 mm, Br 1.2 T) 2 mm
/// above a linear half space of relative permeability 1000 is pulled as by
/// its image scaled by (mu - 1)/(mu + 1) (Jackson 1999 sec. 4.4, as above),
/// a bar the same way magnetized whose centre lies 2 (2 + 2.5) mm below its
/// own (Furlani 2001 sec. 4.2 charged sheets, integrated:
/// `bar_pair_force_2d`). The box's walls lie 500 mm off; in the plane a
/// pair's pull falls as the cube of the distance, so their images change
/// it by about (9 / 1000)^3, 7e-7. The hand-meshed check (forces.rs) has a
/// finite plate and a 3 % tolerance.
#[test]
fn planar_bar_over_a_permeable_half_space_at_default_settings() {
    let mu = 1000.0;
    let r = over_a_half_space(
        "geometry = \"planar\"\ndepth = \"1 m\"\n",
        mu,
        [
            "from = [-500, -500], to = [500, 500]",
            "from = [-500, -500], to = [500, 0]",
            "from = [-5, 2], to = [5, 7]",
        ],
        "+y",
    );
    let exact = (mu - 1.0) / (mu + 1.0) * bar_pair_force_2d(1.2, 0.005, 0.0025, 0.0025, 2.0 * (0.002 + 0.0025));
    check_at_default(
        "planar bar over a permeable half space at default settings, within its error",
        "method of images (Jackson 1999 sec. 4.4); Furlani 2001 charged sheets, integrated",
        &r,
        "force.pull.y",
        exact,
        exact.abs(),
    );
}

/// A ring winding (r 7 to 9 mm, z 4 to 6 mm, 2 A/mm^2) beside a rigid
/// disk magnet (radius 5 mm, 5 mm long, Br 1.2 T, centred at z = 0): the
/// axial force on the winding, F_z = - integral of J B_r 2 pi r dA with the
/// magnet's exact field (Derby and Olbert 2010; `ring_winding_force`).
#[test]
fn ring_winding_force_at_default_settings() {
    let text = format!(
        "[study]\ntitle = \"winding\"\ngeometry = \"axisymmetric\"\nunit = \"mm\"\n\
         [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet\"\n{OUTPUT}\
         [[part]]\nname = \"disk\"\nmaterial = \"rigid\"\nmagnetization = \"+z\"\nrect = {{ from = [0, -2.5], to = [5, 2.5] }}\n\
         [[part]]\nname = \"ring\"\nmaterial = \"copper\"\ncurrent_density = \"2 A/mm2\"\nrect = {{ from = [7, 4], to = [9, 6] }}\n\
         [[force]]\nname = \"lorentz\"\nparts = [\"ring\"]\n"
    );
    let r = solve_case_text(&text, &[]);
    let exact = validation::reference::ring_winding_force(1.2, 0.005, 0.005, 2e6, (0.007, 0.009), (0.004, 0.006));
    check_at_default(
        "ring winding over a magnet at default settings, within its error",
        "F = J x B (Derby and Olbert 2010 field)",
        &r,
        "force.lorentz.z",
        exact,
        exact.abs(),
    );
}
