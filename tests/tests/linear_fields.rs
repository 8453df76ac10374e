//! Linear magnetostatics against closed forms.

use mesher::{OuterBoundary, Refinement, Shape, Symmetry};
use solver::{solve, Law, Problem};
use validation::reference::cylinder_axis_bz;
use validation::{mesh, rel, spec};

#[test]
fn cylinder_on_axis_field_matches_charge_model() {
    // Source: Furlani 2001 / Derby & Olbert 2010, on-axis field of a cylinder.
    let (radius, length, br) = (0.005, 0.01, 1.2);
    let h = 0.0005;
    let s = spec(
        Symmetry::Axisymmetric,
        vec![(Shape::Rect { from: [0.0, 0.0], to: [radius, length] }, h)],
        vec![Refinement::Line { from: [0.0, length], to: [0.0, length + 8.0 * radius], size: h }],
        OuterBoundary::Open,
    );
    let m = mesh(&s);
    let problem = Problem::new(&m, vec![Law::Magnet { recoil_permeability: 1.0, br: [0.0, br] }], vec![0.0]);
    let sol = solve(&problem, &|_, _| {}).unwrap();
    eprintln!("nodes {} dofs {}", m.n_nodes(), sol.report.n_dofs);
    for k in 0..=16 {
        let z = length + 1e-6 + k as f64 * 0.5 * radius;
        let fe = sol.field_at([0.0, z]).unwrap().b[1];
        let exact = cylinder_axis_bz(br, radius, length, z);
        eprintln!("z {z:.4} fe {fe:.6} exact {exact:.6} err {:.4}%", 100.0 * rel(fe, exact));
    }
    let z = length + 2.0 * radius;
    let fe = sol.field_at([0.0, z]).unwrap().b[1];
    assert!(rel(fe, cylinder_axis_bz(br, radius, length, z)) < 0.005);
}
