use solver::assembly::System;
use solver::linear_system::CholeskySolver;
#[test]
fn dbg() {
    let loaded = lodestone::run::load(std::path::Path::new("/tmp/lin.toml")).unwrap();
    let v = lodestone::run::variants(&loaded, &Default::default()).unwrap();
    let model = lodestone::run::resolve(&loaded, &v[0].params, &Default::default()).unwrap();
    let mesh = mesher::build_mesh(&lodestone::study::mesh_spec(&model)).unwrap();
    let problem = lodestone::study::problem(&model, &mesh).unwrap();
    let mut sys = System::new(&mesh, problem.order);
    let a0 = vec![0.0; sys.dof_of_node.len()];
    let r = sys.assemble(&problem, &a0);
    let chol = CholeskySolver::analyse(&sys.matrix).unwrap();
    let f = chol.factorize(&sys.matrix).unwrap();
    let mut x: Vec<f64> = r.iter().map(|v| -v).collect();
    f.solve(&mut x);
    // y = K x using the lower triangle symmetrically
    let m = &sys.matrix;
    let mut y = vec![0.0; x.len()];
    for c in 0..m.ncols() { let col = m.col(c); for (&rr, &v) in col.row_indices().iter().zip(col.values()) { y[rr] += v * x[c]; if rr != c { y[c] += v * x[rr]; } } }
    let res: f64 = y.iter().zip(&r).map(|(a, b)| (a + b).powi(2)).sum::<f64>().sqrt();
    let rn: f64 = r.iter().map(|v| v*v).sum::<f64>().sqrt();
    eprintln!("linear residual {:e} of {:e}", res, rn);
    let mut a = a0.clone();
    for (n, &d) in sys.dof_of_node.iter().enumerate() { if d != usize::MAX { a[n] = x[d]; } }
    let r2 = sys.assemble(&problem, &a);
    let rn2: f64 = r2.iter().map(|v| v*v).sum::<f64>().sqrt();
    eprintln!("newton residual {:e}", rn2);
    // find largest residual entries
    let mut idx: Vec<usize> = (0..r2.len()).collect(); idx.sort_by(|&i, &j| r2[j].abs().partial_cmp(&r2[i].abs()).unwrap());
    for &i in idx.iter().take(5) { let node = sys.dof_of_node.iter().position(|&d| d == i).unwrap(); eprintln!("dof {i} node {node} pos {:?} r {:e} phys {}", sys.elements.positions[node], r2[i], node < mesh.n_physical); }
}
#[test]
fn dbg2() {
    let loaded = lodestone::run::load(std::path::Path::new("/tmp/lin.toml")).unwrap();
    let v = lodestone::run::variants(&loaded, &Default::default()).unwrap();
    let model = lodestone::run::resolve(&loaded, &v[0].params, &Default::default()).unwrap();
    let mesh = mesher::build_mesh(&lodestone::study::mesh_spec(&model)).unwrap();
    let els = solver::assembly::Elements::from_mesh(&mesh, solver::element::ElementOrder::Quadratic);
    for e in 0..els.len() { let n = els.nodes[e]; if n.contains(&4278) || n.contains(&2808) || n.contains(&4289) { eprintln!("el {e} phys {} nodes {:?} coords {:?}", e < els.n_physical, n, els.coords[e]); } }
    let d = mesh.exterior.as_ref().unwrap();
    eprintln!("n_physical {} ext local {} rim-ish", mesh.n_physical, d.mapped.len());
}
