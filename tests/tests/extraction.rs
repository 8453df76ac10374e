//! The flux density at a point extracted from a ball around it
//! (`solver::post::extraction`), against closed forms: far more accurate
//! than B read in the one element that holds the point, faster convergence
//! on nested meshes, both components about the axis, and no extraction
//! where the field is not harmonic. Also the pictures' point search along
//! a row, against the plain search.

use mesher::{OuterBoundary, Refinement, Symmetry};
use solver::element::ElementOrder;
use solver::post::extraction::extracted_b;
use validation::reference::{bar_field_2d, cylinder_field};
use validation::{coil, linear, log_log_slope, magnet, rect, solve_nested, solve_with};

fn open() -> OuterBoundary {
    OuterBoundary::Open
}

/// The largest error of two components against an exact vector, relative to its magnitude.
fn worst(b: [f64; 2], exact: [f64; 2]) -> f64 {
    let scale = exact[0].hypot(exact[1]);
    (b[0] - exact[0]).abs().max((b[1] - exact[1]).abs()) / scale
}

/// A long bar magnet (Br 1 T, 20 x 10 mm) in the plane, B at a point 4 mm
/// beside its corner (E. P. Furlani, Permanent Magnet and Electromechanical
/// Devices, 2001, sec. 4.2, charged sheets), on nested meshes of quadratic
/// elements: the extracted value is closer than the element's on every
/// mesh, converges at least as h^3 where the element's goes as h^2
/// (measured slopes in the output), and its ball keeps clear of the magnet.
#[test]
fn a_planar_field_beside_a_bar_converges_faster_extracted() {
    let at = [0.014, 0.009];
    let exact = bar_field_2d(1.0, 0.01, 0.005, at[0], at[1]);
    let clearance = (at[0] - 0.01).hypot(at[1] - 0.005);
    let rows = solve_nested(
        ElementOrder::Quadratic,
        Symmetry::Planar,
        vec![magnet(rect(-0.01, -0.005, 0.01, 0.005), 0.002, [0.0, 1.0])],
        vec![Refinement::Point { at, size: 0.002 }],
        4,
        |sol| {
            let point = sol.field_at(at).unwrap().b;
            let ex = extracted_b(sol, at).expect("the point is in air");
            let (b, rho) = (ex.b, ex.radius);
            assert!(rho <= 0.9 * clearance + 1e-12, "ball {rho} reaches past 0.9 of {clearance}");
            ((sol.elements.len() as f64).sqrt(), worst(point, exact), worst(b, exact))
        },
    );
    assert_faster(&rows);
}

/// The slopes of the element's and the extracted errors against the square
/// root of the element count (rows: that root, the element's error, the
/// extracted error): the extracted one closer everywhere and falling at
/// least as h^3.
fn assert_faster(rows: &[(f64, f64, f64)]) {
    let n: Vec<f64> = rows.iter().map(|e| e.0).collect();
    let point: Vec<f64> = rows.iter().map(|e| e.1).collect();
    let ball: Vec<f64> = rows.iter().map(|e| e.2).collect();
    let (sp, sb) = (-log_log_slope(&n, &point), -log_log_slope(&n, &ball));
    eprintln!("element {point:?} slope {sp:.2}; extracted {ball:?} slope {sb:.2}");
    assert!(sb >= 3.0, "extracted slope {sb}");
    assert!(ball.iter().zip(&point).all(|(b, p)| b < p), "{ball:?} against {point:?}");
}

/// A rigid cylinder about the axis (Br 1.2 T, radius 5 mm, length 10 mm),
/// B_r and B_z off the axis beside its top corner (N. Derby, S. Olbert,
/// Cylindrical magnets and ideal solenoids, Am. J. Phys. 78, 2010): both
/// components extracted (B_r from the ring weight times cos phi) at least
/// ten times closer than the element's.
#[test]
fn both_components_about_the_axis_are_ten_times_closer_extracted() {
    let at = [0.008, 0.008];
    let exact = cylinder_field(1.2, 0.005, 0.005, at[0], at[1]);
    solve_with(
        Symmetry::Axisymmetric,
        vec![magnet(rect(0.0, -0.005, 0.005, 0.005), 0.001, [0.0, 1.2])],
        vec![Refinement::Point { at, size: 0.001 }],
        open(),
        [0.0, 0.0],
        |sol| {
            let point = sol.field_at(at).unwrap().b;
            let ex = extracted_b(sol, at).expect("the point is in air");
            let (b, rho) = (ex.b, ex.radius);
            let (e_point, e_ball) = (worst(point, exact), worst(b, exact));
            eprintln!("element {e_point:.2e}, extracted {e_ball:.2e} (ball {rho:.2e} m), B {b:?} against {exact:?}");
            assert!(e_ball * 10.0 <= e_point, "extracted {e_ball:e} against the element's {e_point:e}");
            assert!(e_ball < 1e-4, "{e_ball:e}");
        },
    );
}

/// On nested meshes (quadratic elements) the element's B at a point in the
/// air above a cylinder converges as h^2; the extracted one, from a ball
/// the geometry bounds, at least as h^3 (measured slopes in the output).
#[test]
fn the_extracted_field_converges_faster_than_the_elements() {
    let at = [0.0, 0.009];
    let exact = cylinder_field(1.2, 0.005, 0.005, at[0], at[1]);
    let errors = solve_nested(
        ElementOrder::Quadratic,
        Symmetry::Axisymmetric,
        vec![magnet(rect(0.0, -0.005, 0.005, 0.005), 0.002, [0.0, 1.2])],
        vec![Refinement::Point { at, size: 0.002 }],
        4,
        |sol| {
            let point = sol.field_at(at).unwrap().b;
            let b = extracted_b(sol, at).expect("the point is in air").b;
            let n = sol.elements.len() as f64;
            (n, (point[1] - exact[1]).abs() / exact[1], (b[1] - exact[1]).abs() / exact[1])
        },
    );
    let rows: Vec<(f64, f64, f64)> = errors.iter().map(|e| (e.0.sqrt(), e.1, e.2)).collect();
    assert_faster(&rows);
}

/// No extraction inside a magnet, inside iron, or inside a winding (the
/// field is not harmonic there, or not vacuum's), nor where the ball would
/// have no room (a point on a magnet's face).
#[test]
fn no_extraction_where_the_field_is_not_harmonic() {
    solve_with(
        Symmetry::Planar,
        vec![
            magnet(rect(-0.01, -0.005, 0.01, 0.005), 0.002, [0.0, 1.0]),
            linear(rect(-0.01, 0.01, 0.01, 0.015), 0.002, 1000.0),
            coil(rect(0.02, -0.005, 0.03, 0.005), 0.002, 1e6),
        ],
        Vec::new(),
        open(),
        [0.0, 0.0],
        |sol| {
            for at in [[0.0, 0.0], [0.0, 0.012], [0.025, 0.0], [0.0, 0.005]] {
                assert!(extracted_b(sol, at).is_none(), "extracted at {at:?}");
            }
            assert!(extracted_b(sol, [0.0, 0.0075]).is_some(), "a point in the air between them");
        },
    );
}

/// A point probe on a steel face has no room for a ball: it is read in an
/// element, and on the face in the air-side one, where a sensor sits. There
/// H = B / mu0 (the constitutive law of air; in the steel element H would
/// be B / (mu0 mu_r), a thousand times smaller here). The probe lies on
/// the plate's top face, held by a steel element below it and an air
/// element above (without the vacuum side's preference the steel one was
/// read: |H| mu0 / |B| came out 1e-3).
#[test]
fn a_probe_on_a_steel_face_reads_the_air_side() {
    let text = "[study]\ntitle = \"face\"\ngeometry = \"planar\"\nunit = \"mm\"\ndepth = \"1 m\"\naccuracy = \"off\"\n\
        [materials.rigid]\nbr = \"1.2 T\"\nmur = 1\ndescription = \"rigid magnet\"\n\
        [materials.soft]\nmur = 1000\ndescription = \"linear steel\"\n\
        [output]\nvtk = false\nplots = false\nreport = false\ncsv = false\n\
        [[part]]\nname = \"plate\"\nmaterial = \"soft\"\nrect = { from = [-30, -10], to = [30, 0] }\n\
        [[part]]\nname = \"magnet\"\nmaterial = \"rigid\"\nmagnetization = \"+y\"\nrect = { from = [-5, 3], to = [5, 8] }\n\
        [[probe]]\nname = \"face\"\npoint = [12, 0]\n";
    let r = validation::solve_case_text(text, &[]);
    let (b, h) = (r.values["probe.face.b"], r.values["probe.face.h"]);
    let mu0 = 4e-7 * std::f64::consts::PI;
    assert!(b > 1e-3, "no field at the face: {b} T");
    assert!((h * mu0 / b - 1.0).abs() < 1e-9, "|H| mu0 / |B| = {} at the face (1 in air)", h * mu0 / b);
}

/// A picture samples B and the potential along rows, each search starting
/// from the previous sample's element (`Solution::b_and_potential_near`):
/// over a grid crossing a round magnet (curved elements), a steel block,
/// the air between and the domain's edge, every sample equals the plain
/// search's to the bit, outside points included.
#[test]
fn the_row_search_from_the_last_element_finds_what_the_plain_search_finds() {
    let parts = vec![
        magnet(
            mesher::Shape::Circle {
                center: [0.0, 0.0],
                radius: 0.005,
            },
            0.001,
            [0.0, 1.2],
        ),
        linear(rect(0.008, -0.004, 0.016, 0.004), 0.001, 1000.0),
    ];
    let (checked, inside) = solve_nested(ElementOrder::Cubic, Symmetry::Planar, parts, vec![], 1, |sol| {
        let (mut checked, mut inside) = (0, 0);
        for j in 0..120 {
            let mut hint = None;
            for i in 0..160 {
                // Steps of 0.37 mm, under the parts' 1 mm elements: most samples stay in the
                // previous one's element, the rest cross into another.
                let p = [-0.03 + 0.00037 * i as f64, 0.022 - 0.00037 * j as f64];
                let hinted = sol.b_and_potential_near(p, &mut hint);
                assert_eq!(hinted, sol.b_and_potential_at(p), "sample ({i}, {j}) at {p:?}");
                checked += 1;
                inside += usize::from(hinted.is_some());
            }
        }
        (checked, inside)
    })[0];
    // Both kinds of sample were met: thousands inside, the rest past the domain's rim.
    assert!(inside > checked / 4 && inside < checked, "{inside} of {checked} samples inside the mesh");
}
