//! Constraints on the potential: the nodes held at zero reduced potential
//! (the symmetry axis, a flux-parallel box, the point at infinity of the
//! Kelvin disk). The function space numbers only the nodes left free.

use crate::element::{ElementOrder, EDGES};
use crate::space::Elements;
use mesher::{BoundaryTag, Mesh, Symmetry};

/// Which nodes are fixed (at zero reduced potential).
#[derive(Clone, Debug)]
pub struct Constraints {
    /// For every node: whether its potential is fixed at zero.
    pub fixed: Vec<bool>,
}

impl Constraints {
    /// The homogeneous Dirichlet conditions of a mesh: axis, outer box, infinity.
    pub fn of_mesh(mesh: &Mesh, els: &Elements) -> Constraints {
        Constraints { fixed: fixed_nodes(mesh, els) }
    }
}

/// Nodes held at zero reduced potential: the axis, a flux-parallel box, infinity.
fn fixed_nodes(mesh: &Mesh, els: &Elements) -> Vec<bool> {
    let mut fixed = vec![false; els.n_nodes];
    let mut fixed_edges: std::collections::HashSet<(usize, usize)> = std::collections::HashSet::new();
    for (edge, tag) in &mesh.boundary {
        if matches!(tag, BoundaryTag::Axis | BoundaryTag::Outer) {
            fixed[edge[0]] = true;
            fixed[edge[1]] = true;
            fixed_edges.insert((edge[0].min(edge[1]), edge[0].max(edge[1])));
        }
    }
    let axisym = mesh.symmetry == Symmetry::Axisymmetric;
    for e in 0..els.len() {
        let x = els.coords[e];
        for k in 0..3 {
            if axisym && x[k][0] <= 0.0 {
                fixed[els.nodes[e][k]] = true;
            }
        }
        if els.order == ElementOrder::Quadratic {
            for (k, [a, b]) in EDGES.iter().enumerate() {
                let (na, nb) = (els.nodes[e][*a], els.nodes[e][*b]);
                let on_axis = axisym && x[*a][0] <= 0.0 && x[*b][0] <= 0.0;
                if on_axis || (e < els.n_physical && fixed[na] && fixed[nb] && fixed_edges.contains(&(na.min(nb), na.max(nb)))) {
                    fixed[els.nodes[e][3 + k]] = true;
                }
            }
        }
    }
    if let Some(disk) = &mesh.exterior {
        fixed[disk.global[disk.infinity]] = true;
    }
    fixed
}
