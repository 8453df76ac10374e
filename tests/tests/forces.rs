//! Forces, flux linkage, inductance and energy against closed forms.

use mesher::{OuterBoundary, Refinement, Symmetry};
use solver::post::force::force_on;
use validation::reference::*;
use validation::*;

const BR: f64 = 1.2;

/// Force on the upper of two coaxial magnets (radius a, length l) a gap apart; returns (F on upper, F on lower).
fn coaxial_pair(a: f64, l: f64, gap: f64, size: f64) -> (f64, f64) {
    let lower = magnet(rect(0.0, -l, a, 0.0), size, [0.0, BR]);
    let upper = magnet(rect(0.0, gap, a, gap + l), size, [0.0, BR]);
    let refine = vec![
        Refinement::Line {
            from: [0.0, 0.0],
            to: [a, 0.0],
            size: (gap / 3.0).min(size),
        },
        Refinement::Line {
            from: [0.0, gap],
            to: [a, gap],
            size: (gap / 3.0).min(size),
        },
    ];
    solve_with(Symmetry::Axisymmetric, vec![lower, upper], refine, OuterBoundary::Open, [0.0; 2], |sol| {
        (force_on(sol, &[1], [0.0; 2]).vector[1], force_on(sol, &[0], [0.0; 2]).vector[1])
    })
}

#[test]
fn coaxial_magnets_attract_as_the_charge_model_says() {
    // Source: J. Vokoun et al., J. Magn. Magn. Mater. 321 (2009) 3758 (Bessel-integral form of the
    // charge model), evaluated in tests/src/reference.rs; within 2 % for gaps 0.5 to 20 mm, two sizes.
    for (a, l) in [(0.005, 0.005), (0.01, 0.004)] {
        for gap in [0.0005, 0.002, 0.005, 0.02] {
            let (up, _) = coaxial_pair(a, l, gap, a / 8.0);
            let exact = coaxial_cylinders_force(BR, BR, a, a, l, l, gap);
            eprintln!("a {a} l {l} gap {gap}: fe {up} exact {exact} err {:.3}%", 100.0 * rel(-up, exact));
            record(
                "coaxial magnets attracting, gaps 0.5 to 20 mm",
                "Vokoun et al. 2009 (charge model)",
                0.02,
                rel(-up, exact),
            );
            assert!(rel(-up, exact) < 0.02, "a {a}, gap {gap}: {up} vs {exact}");
        }
    }
}

#[test]
fn forces_on_two_magnets_are_equal_and_opposite() {
    // Source: Newton's third law (action and reaction); within 1 %.
    let (up, down) = coaxial_pair(0.005, 0.005, 0.003, 0.0006);
    record("Newton's third law", "action and reaction", 0.01, rel(-down, up));
    assert!(rel(-down, up) < 0.01, "{up} vs {down}");
}

#[test]
fn magnet_over_a_permeable_plate_matches_its_image() {
    // Source: method of images for a highly permeable half space (e.g. Furlani 2001, sec. 3.6):
    // the force equals that between the magnet and its mirror image at twice the gap; within 3 %.
    let (a, l, gap, mu) = (0.005, 0.005, 0.002, 1e4);
    let plate = linear(rect(0.0, -0.03, 0.06, 0.0), 0.004, mu);
    let m = magnet(rect(0.0, gap, a, gap + l), 0.0006, [0.0, BR]);
    let refine = vec![Refinement::Line {
        from: [0.0, 0.0],
        to: [a, 0.0],
        size: gap / 3.0,
    }];
    let f = solve_with(Symmetry::Axisymmetric, vec![plate, m], refine, OuterBoundary::Open, [0.0; 2], |sol| {
        force_on(sol, &[1], [0.0; 2]).vector[1]
    });
    let exact = coaxial_cylinders_force(BR, BR, a, a, l, l, 2.0 * gap);
    record("magnet over a permeable plate", "method of images", 0.03, rel(-f, exact));
    assert!(rel(-f, exact) < 0.03, "{f} vs {exact}");
}

#[test]
fn planar_bar_magnets_attract_as_charged_sheets() {
    // Source: Furlani 2001 sec. 4.2 charged-sheet model, integrated numerically in the test; within 2 %.
    let (w, h, gap) = (0.005, 0.0025, 0.003);
    let y2 = 2.0 * h + gap;
    let lower = magnet(rect(-w, -h, w, h), 0.0005, [0.0, BR]);
    let upper = magnet(rect(-w, y2 - h, w, y2 + h), 0.0005, [0.0, BR]);
    let f = solve_with(Symmetry::Planar, vec![lower, upper], vec![], OuterBoundary::Open, [0.0; 2], |sol| {
        force_on(sol, &[1], [0.0; 2]).vector[1]
    });
    let exact = bar_pair_force_2d(BR, w, h, h, y2);
    record("planar bar magnets attracting", "Furlani 2001 charged sheets, integrated", 0.02, rel(f, exact));
    assert!(rel(f, exact) < 0.02, "{f} vs {exact}");
}

#[test]
fn long_solenoid_inductance_and_energy() {
    // Source: the ring mutual inductance in its Bessel form (Smythe 1968) integrated over the
    // winding's cross-section, whose thin limit is Nagaoka's coefficient (Nagaoka 1909; Grover
    // 1946; reference.rs tests it), within 0.1 % (1.3e-6 measured): the sheet itself is
    // t / (3 a) = 0.33 % above this 0.2 mm winding, which was the 0.36 % this check showed against
    // it. Stored energy W = L I^2 / 2 (energy of a linear inductor), within 0.5 %.
    let (a, t, l, turns, current) = (0.02, 0.0002, 0.2, 500.0, 2.0);
    let j = turns * current / (t * l);
    let winding = coil(rect(a - t / 2.0, -l / 2.0, a + t / 2.0, l / 2.0), 0.0001, j);
    let (lambda, energy) = solve_with(Symmetry::Axisymmetric, vec![winding], vec![], OuterBoundary::Open, [0.0; 2], |sol| {
        (
            solver::post::flux::winding_linkage(sol, &[(0, 1.0)], turns),
            solver::post::energy::stored_energy(sol).stored,
        )
    });
    let inductance = lambda / current;
    let exact = thick_coil_inductance(a - t / 2.0, a + t / 2.0, l, turns);
    record(
        "long solenoid inductance",
        "ring mutual inductance (Smythe 1968), integrated; thin limit Nagaoka 1909",
        0.001,
        rel(inductance, exact),
    );
    record(
        "solenoid energy = L I^2 / 2",
        "linear inductor energy",
        0.005,
        rel(energy, 0.5 * inductance * current * current),
    );
    assert!(rel(inductance, exact) < 0.001, "{inductance} vs {exact}");
    assert!(rel(energy, 0.5 * inductance * current * current) < 0.005, "{energy}");
}

#[test]
fn coaxial_line_inductance_per_length_and_energy() {
    // Source: Ramo, Whinnery and Van Duzer, Fields and Waves, 3rd ed., 1994 (coax with internal
    // inductance of both conductors), within 0.5 %; W = L' I^2 / 2 within 0.5 %.
    let (a, b, c, current) = (0.002, 0.006, 0.007, 10.0);
    let outer_j = -current / (std::f64::consts::PI * (c * c - b * b));
    let outer = coil(mesher::Shape::Circle { center: [0.0, 0.0], radius: c }, 0.0003, outer_j);
    let gap = linear(mesher::Shape::Circle { center: [0.0, 0.0], radius: b }, 0.0004, 1.0);
    // Later parts cover earlier ones: outer disk, then the gap, then the inner conductor.
    let inner = coil(
        mesher::Shape::Circle { center: [0.0, 0.0], radius: a },
        0.0003,
        current / (std::f64::consts::PI * a * a),
    );
    let (lambda, energy) = solve_with(Symmetry::Planar, vec![outer, gap, inner], vec![], OuterBoundary::Open, [0.0; 2], |sol| {
        (
            solver::post::flux::winding_linkage(sol, &[(2, 1.0), (0, -1.0)], 1.0),
            solver::post::energy::stored_energy(sol).stored,
        )
    });
    let inductance = lambda / current;
    let exact = coax_inductance_per_length(a, b, c);
    record(
        "coaxial line inductance per length",
        "Ramo, Whinnery, Van Duzer 1994",
        0.005,
        rel(inductance, exact),
    );
    assert!(rel(inductance, exact) < 0.005, "{inductance} vs {exact}");
    assert!(rel(energy, 0.5 * inductance * current * current) < 0.005, "{energy}");
}

const PLATE_CASE: &str = r#"
[study]
geometry = "axisymmetric"
unit = "mm"
[[part]]
name = "magnet"
material = "N42"
magnetization = "+z"
rect = { from = [0, 0], to = [10, 8] }
[[part]]
name = "plate"
material = "low-carbon-steel"
rect = { from = [0, 9], to = [30, 14] }
[[force]]
name = "pull"
parts = ["plate"]
"#;

#[test]
fn plate_force_is_mesh_independent() {
    // Source: discretization convergence: halving every element size changes the force on a plate
    // 1 mm from a magnet by less than 1 % (the Maxwell stress band method, Coulomb 1983).
    let coarse = solve_case_text(PLATE_CASE, &[]).values["force.pull.z"];
    let fine_case = PLATE_CASE.replace("[study]", "[mesh]\nsize = 0.75\n[study]");
    let fine = solve_case_text(&fine_case, &[]).values["force.pull.z"];
    record("plate force, default vs twice finer mesh", "mesh convergence", 0.01, rel(fine, coarse));
    assert!(rel(fine, coarse) < 0.01, "default {coarse} N, twice as fine {fine} N");
}

/// Torque about the origin (N m per metre) and force on a magnet of
/// remanence `br` (T, along `angle_deg` from x) in a uniform applied field
/// `b0` (T, along y), planar.
fn magnet_in_uniform_field(shape: mesher::Shape, size: f64, recoil: f64, angle_deg: f64, b0: f64) -> (f64, [f64; 2], f64) {
    let (s, c) = angle_deg.to_radians().sin_cos();
    let mut part = magnet(shape, size, [BR * c, BR * s]);
    part.law = solver::Law::Magnet {
        recoil_permeability: recoil,
        br: [BR * c, BR * s],
        knee: None,
        table: None,
    };
    solve_with(Symmetry::Planar, vec![part], vec![], OuterBoundary::Open, [0.0, b0], |sol| {
        let r = force_on(sol, &[0], [0.0; 2]);
        (r.torque, r.vector, sol.problem.mesh.part_areas_curved(1)[0])
    })
}

#[test]
fn magnet_in_a_uniform_field_feels_the_dipole_torque() {
    // Source: the torque on a magnetic moment in a uniform field, N = m x B (J. D. Jackson,
    // Classical Electrodynamics, 3rd ed., 1999, sec. 5.7), with m = Br A / mu0 per metre of depth
    // for a rigid magnet (mu_rec = 1), whatever its shape; the net force of a uniform field is
    // zero. For a round magnet with mu_rec > 1 the moment is that of M = (Br/mu0 + chi H0) /
    // (1 + chi/2) (transverse demagnetizing factor 1/2 of a circular cylinder, Jackson sec.
    // 5.11), whose induced part is along H0 and adds no torque. Within 1 % for the torque.
    let b0 = 0.05;
    let square = rect(-0.005, -0.005, 0.005, 0.005);
    for angle in [0.0f64, 30.0, 60.0, 150.0] {
        let (torque, force, area) = magnet_in_uniform_field(square.clone(), 0.0006, 1.0, angle, b0);
        let exact = BR * area / MU0 * b0 * angle.to_radians().cos();
        check_force("magnet torque in a uniform field", "N = m x B (Jackson 1999 sec. 5.7)", 0.01, torque, exact);
        // The net force of a uniform field vanishes: under 0.1 % of the torque over the half-width.
        let scale = BR * area / MU0 * b0 / 0.005;
        assert!(force[0].hypot(force[1]) < 1e-3 * scale, "{angle} deg: force {force:?}");
    }
    // Magnetized along the field: no torque (under 0.1 % of the perpendicular one).
    let (torque, _, area) = magnet_in_uniform_field(square, 0.0006, 1.0, 90.0, b0);
    assert!(torque.abs() < 1e-3 * BR * area / MU0 * b0, "parallel: {torque}");
    let chi = 0.05;
    let disk = mesher::Shape::Circle {
        center: [0.0, 0.0],
        radius: 0.005,
    };
    let (torque, _, area) = magnet_in_uniform_field(disk, 0.0006, 1.0 + chi, 0.0, b0);
    let exact = BR * area / MU0 * b0 / (1.0 + chi / 2.0);
    check_force("magnet torque in a uniform field", "N = m x B (Jackson 1999 sec. 5.7)", 0.01, torque, exact);
}

#[test]
fn torques_on_two_magnets_cancel_about_any_point() {
    // Source: the Maxwell stress tensor is symmetric, so the torque of everything inside a closed
    // surface about a point is the flux of r x T through it, which falls to zero at infinity for
    // magnets' fields (conservation of angular momentum in statics): the torques of two magnets on
    // each other about any common point are equal and opposite. Within 1 %.
    let at = |deg: f64| {
        let (s, c) = deg.to_radians().sin_cos();
        [BR * c, BR * s]
    };
    let left = magnet(rect(-0.013, -0.005, -0.003, 0.005), 0.0006, at(0.0));
    let right = magnet(rect(0.003, -0.002, 0.013, 0.008), 0.0006, at(70.0));
    let points = [[0.0, 0.0], [-0.008, 0.0], [0.02, -0.01]];
    let torques = solve_with(Symmetry::Planar, vec![left, right], vec![], OuterBoundary::Open, [0.0; 2], |sol| {
        points.map(|p| (force_on(sol, &[0], p).torque, force_on(sol, &[1], p).torque))
    });
    for (point, (t_left, t_right)) in points.iter().zip(torques) {
        let err = (t_left + t_right).abs() / t_left.abs().max(t_right.abs());
        eprintln!("about {point:?}: {t_left} and {t_right} ({:.3} %)", 100.0 * err);
        record("torques of two magnets cancel", "symmetric Maxwell stress (angular momentum)", 0.01, err);
        assert!(err < 0.01, "about {point:?}: {t_left} and {t_right}");
    }
}

#[test]
fn planar_bar_magnet_over_a_permeable_plate_matches_its_image() {
    // Source: method of images for a highly permeable half space (e.g. Furlani 2001, sec. 3.6):
    // a long bar magnetized across the surface is pulled as by its mirror image, a bar the same
    // way magnetized at twice its centre's height (Furlani 2001 sec. 4.2 charged sheets,
    // integrated in tests/src/reference.rs); within 3 %, as the axisymmetric check.
    let (w, h, gap, mu) = (0.005, 0.0025, 0.002, 1e4);
    let plate = linear(rect(-0.12, -0.06, 0.12, 0.0), 0.004, mu);
    let bar = magnet(rect(-w, gap, w, gap + 2.0 * h), 0.0005, [0.0, BR]);
    let f = solve_with(
        Symmetry::Planar,
        vec![plate, bar],
        face_line(-w, w, gap),
        OuterBoundary::Open,
        [0.0; 2],
        |sol| force_on(sol, &[1], [0.0; 2]).vector[1],
    );
    // Both are the pull on the upper bar along +y: negative, towards the plate.
    let exact = bar_pair_force_2d(BR, w, h, h, 2.0 * (gap + h));
    check_force("planar bar magnet over a permeable plate", "method of images", 0.03, f, exact);
}

#[test]
fn conductors_feel_the_lorentz_and_ampere_forces() {
    // Source: the force on a current in a field, F = I L x B, per metre of a straight conductor
    // in a uniform field (its own field gives no net force), and Ampere's force law between two
    // long parallel round conductors, F = mu0 I1 I2 / (2 pi d) per metre (e.g. Jackson 1999,
    // sec. 5.2); the current is J times the conductor's meshed area with its outline curved as the elements are. Within 1 %.
    let (radius, j, b0) = (0.002, 5e6, 0.1);
    let wire = |x: f64| coil(mesher::Shape::Circle { center: [x, 0.0], radius }, 0.0003, j);
    let (force, area) = solve_with(Symmetry::Planar, vec![wire(0.0)], vec![], OuterBoundary::Open, [0.0, b0], |sol| {
        (force_on(sol, &[0], [0.0; 2]).vector, sol.problem.mesh.part_areas_curved(1)[0])
    });
    // Current along +z, field along +y: F = I z x B0 y = -I B0 along x.
    let exact = -j * area * b0;
    eprintln!("wire in a field: {force:?} against {exact}");
    record("conductor in a uniform field", "F = I L x B", 0.01, rel(force[0], exact));
    assert!(rel(force[0], exact) < 0.01 && force[1].abs() < 0.01 * exact.abs(), "{force:?} vs {exact}");
    let d = 0.01;
    let (f_left, f_right, areas) = solve_with(Symmetry::Planar, vec![wire(0.0), wire(d)], vec![], OuterBoundary::Open, [0.0; 2], |sol| {
        (
            force_on(sol, &[0], [0.0; 2]).vector[0],
            force_on(sol, &[1], [0.0; 2]).vector[0],
            sol.problem.mesh.part_areas_curved(2),
        )
    });
    // Currents the same way attract: the right conductor is pulled towards -x.
    let exact = -MU0 * (j * areas[0]) * (j * areas[1]) / (2.0 * std::f64::consts::PI * d);
    eprintln!("parallel wires: {f_left} and {f_right} against {exact}");
    record("parallel conductors attracting", "Ampere's force law", 0.01, rel(f_right, exact));
    assert!(rel(f_right, exact) < 0.01 && rel(-f_left, exact) < 0.01, "{f_left}, {f_right} vs {exact}");
}

#[test]
fn bar_magnet_is_pushed_off_a_flux_parallel_wall_by_its_image() {
    // Source: method of images: a wall where the normal flux density vanishes (A = 0 on it)
    // mirrors magnetic surface charge with its own sign, so a bar magnetized across the wall
    // meets a reversed image at twice its centre's distance and is pushed off with the pull of
    // two like bars (Furlani 2001 sec. 4.2 charged sheets, integrated in tests/src/reference.rs);
    // the box's other walls are 40 bar widths away. Within 2 %, as the attracting pair.
    let (w, h, gap) = (0.005, 0.0025, 0.002);
    let bar = magnet(rect(-w, gap, w, gap + 2.0 * h), 0.0005, [0.0, BR]);
    let outer = OuterBoundary::FluxParallel {
        from_to: Some(([-0.2, 0.0], [0.2, 0.2])),
        sides: Default::default(),
    };
    let f = solve_with(Symmetry::Planar, vec![bar], face_line(-w, w, gap), outer, [0.0; 2], |sol| {
        force_on(sol, &[0], [0.0; 2]).vector[1]
    });
    let exact = -bar_pair_force_2d(BR, w, h, h, 2.0 * (gap + h));
    check_force("bar magnet by a flux-parallel wall", "method of images", 0.02, f, exact);
}

#[test]
fn a_magnet_against_the_box_is_flagged_as_unreliable() {
    // The stress band cannot close in air around a part drawn against a flux-parallel wall;
    // the force is flagged. A gap clears the flag.
    let outer = || OuterBoundary::FluxParallel {
        from_to: Some(([-0.05, 0.0], [0.05, 0.05])),
        sides: Default::default(),
    };
    let contact = |gap: f64| {
        let bar = magnet(rect(-0.005, gap, 0.005, gap + 0.005), 0.0008, [0.0, BR]);
        solve_with(Symmetry::Planar, vec![bar], vec![], outer(), [0.0; 2], |sol| {
            force_on(sol, &[0], [0.0; 2]).at_boundary
        })
    };
    assert!(contact(0.0), "against the wall");
    assert!(!contact(0.002), "2 mm off the wall");
}

#[test]
fn disk_magnet_is_pushed_off_a_flux_parallel_wall_by_its_image() {
    // Source: method of images as for the planar bar: the wall mirrors magnetic charge with its
    // own sign, so a disk magnetized along the axis meets a reversed image at twice its centre's
    // distance and is pushed off with the pull of two like coaxial disks (Vokoun et al. 2009,
    // charge model, tests/src/reference.rs); the box's other walls are 40 radii away. Within 2 %.
    let (a, l, gap) = (0.005, 0.005, 0.002);
    let disk = magnet(rect(0.0, -gap - l, a, -gap), 0.0005, [0.0, BR]);
    let outer = OuterBoundary::FluxParallel {
        from_to: Some(([0.0, -0.2], [0.2, 0.0])),
        sides: Default::default(),
    };
    let f = solve_with(Symmetry::Axisymmetric, vec![disk], face_line(0.0, a, gap), outer, [0.0; 2], |sol| {
        force_on(sol, &[0], [0.0; 2]).vector[1]
    });
    // The wall is above the disk: pushed off means pushed down, -z.
    let exact = -coaxial_cylinders_force(BR, BR, a, a, l, l, 2.0 * gap);
    check_force("disk magnet by a flux-parallel wall", "method of images", 0.02, f, exact);
}

#[test]
fn ring_coil_over_a_magnet_feels_the_lorentz_force() {
    // Source: the force on a current in a field, F = integral of J x B dV: on a ring winding about
    // the axis F_z = - integral of J B_r 2 pi r dA, B_r the magnet's own field (the winding's
    // self-field gives no net force), from Derby and Olbert 2010 (tests/src/reference.rs) by
    // Gauss-Legendre over the winding's section. Within 1 %.
    let (a, l, j) = (0.005, 0.005, 2e6);
    let (r0, r1, z0, z1) = (0.007, 0.009, 0.004, 0.006);
    let disk = magnet(rect(0.0, -l / 2.0, a, l / 2.0), 0.0005, [0.0, BR]);
    let ring = coil(rect(r0, z0, r1, z1), 0.0003, j);
    let f = solve_with(Symmetry::Axisymmetric, vec![disk, ring], vec![], OuterBoundary::Open, [0.0; 2], |sol| {
        force_on(sol, &[1], [0.0; 2]).vector[1]
    });
    let exact = validation::reference::ring_winding_force(BR, a, l, j, (r0, r1), (z0, z1));
    check_force("ring winding over a magnet", "F = J x B (Derby and Olbert 2010 field)", 0.01, f, exact);
}

#[test]
fn coupling_torque_is_the_coenergy_derivative() {
    // Source: the principle of virtual work: the torque on a body is the derivative of the
    // co-energy with its rotation at fixed sources (Woodson and Melcher 1968, ch. 3). Turning a
    // round magnet about its centre only turns its magnetization, so the mesh stays the same and
    // central differences of two solves 0.5 degrees apart give dW'/dtheta; a steel disk beside
    // the pair makes the field far from a dipole's. Within 1 %.
    let disk = |x: f64, y: f64, r: f64| mesher::Shape::Circle { center: [x, y], radius: r };
    let at = |deg: f64| {
        let (s, c) = deg.to_radians().sin_cos();
        [BR * c, BR * s]
    };
    let solve = |theta: f64, f: &dyn Fn(&solver::Solution) -> f64| {
        let driver = magnet(disk(-0.008, 0.0, 0.005), 0.0006, at(theta));
        let follower = magnet(disk(0.008, 0.0, 0.005), 0.0006, at(200.0));
        let steel = linear(disk(0.0, 0.012, 0.004), 0.0006, 500.0);
        solve_with(Symmetry::Planar, vec![driver, follower, steel], vec![], OuterBoundary::Open, [0.0; 2], f)
    };
    for theta in [30.0, 100.0] {
        let torque = solve(theta, &|sol| force_on(sol, &[0], [-0.008, 0.0]).torque);
        let coenergy = |t: f64| solve(t, &|sol| solver::post::energy::stored_energy(sol).coenergy);
        let h = 0.25f64;
        let derivative = (coenergy(theta + h) - coenergy(theta - h)) / (2.0 * h.to_radians());
        eprintln!(
            "coupling at {theta} deg: stress torque {torque}, co-energy derivative {derivative} ({:.3} %)",
            100.0 * rel(torque, derivative)
        );
        record(
            "coupling torque = co-energy derivative",
            "virtual work (Woodson and Melcher 1968)",
            0.01,
            rel(torque, derivative),
        );
        assert!(rel(torque, derivative) < 0.01, "{theta} deg: {torque} vs {derivative}");
    }
}

/// A refinement line along the face z (or y) = 0 from x0 to x1, a third of `gap` fine.
fn face_line(x0: f64, x1: f64, gap: f64) -> Vec<Refinement> {
    vec![Refinement::Line {
        from: [x0, 0.0],
        to: [x1, 0.0],
        size: gap / 3.0,
    }]
}

/// Prints, records and checks a computed force against its reference: the same sign and
/// within `tolerance` of it.
fn check_force(check: &str, source: &str, tolerance: f64, fe: f64, exact: f64) {
    eprintln!("{check}: fe {fe} exact {exact} err {:.3} %", 100.0 * rel(fe, exact));
    record(check, source, tolerance, rel(fe, exact));
    assert!(fe.signum() == exact.signum() && rel(fe, exact) < tolerance, "{check}: {fe} vs {exact}");
}
