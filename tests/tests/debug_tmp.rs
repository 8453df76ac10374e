use mesher::{OuterBoundary, Refinement, Shape, Symmetry};
use solver::{solve, Law, Problem};
use validation::reference::cylinder_axis_bz;
use validation::{mesh, rel, spec};
fn run(h: f64, outer: OuterBoundary) {
    let (radius, length, br) = (0.005, 0.01, 1.2);
    let s = spec(Symmetry::Axisymmetric, vec![(Shape::Rect { from: [0.0, 0.0], to: [radius, length] }, h)],
        vec![Refinement::Line { from: [0.0, length], to: [0.0, length + 8.0 * radius], size: h }], outer);
    let m = mesh(&s);
    let problem = Problem::new(&m, vec![Law::Magnet { recoil_permeability: 1.0, br: [0.0, br] }], vec![0.0]);
    let sol = solve(&problem, &|_, _| {}).unwrap();
    let mut line = format!("h {h} dofs {} :", sol.report.n_dofs);
    for k in [0, 1, 2, 4, 8, 16] {
        let z = length + 1e-6 + k as f64 * 0.5 * radius;
        let fe = sol.field_at([0.0, z]).unwrap().b[1];
        let (e, lam) = sol.element_at([1e-4, z]).unwrap();
        let el = sol.element_b_at(e, lam)[1];
        let exact = cylinder_axis_bz(br, radius, length, z);
        line += &format!(" {:.2}/{:.2}", 100.0 * (fe - exact) / exact, 100.0 * (el - exact) / exact);
    }
    let _ = rel(1.0, 1.0);
    eprintln!("{line}");
}
#[test]
fn dbg() {
    run(0.002, OuterBoundary::Open);
    run(0.001, OuterBoundary::Open);
    run(0.0005, OuterBoundary::Open);
    run(0.00025, OuterBoundary::Open);
    run(0.0005, OuterBoundary::FluxParallel { from_to: Some(([0.0, -1.0], [1.0, 1.0])) });
}
