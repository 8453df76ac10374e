//! Carrying a solution to the mesh that `Mesh::refined` made from its mesh:
//! the coarse field evaluated at the fine nodes. The fine space holds the
//! coarse one (nested meshes, same order), so this is exact up to the rim
//! midpoints that refinement moves onto the circle; it serves as the first
//! guess of the fine solve.

use crate::element::{point_op, potential, shape_values, ElementOrder, MAX_NODES};
use crate::space::Elements;
use crate::Solution;

/// Parent barycentrics of the corners of the four children (the order of
/// `Mesh::refined`: three corner children, then the middle one).
const CHILD_CORNERS: [[[f64; 3]; 3]; 4] = [
    [[1.0, 0.0, 0.0], [0.5, 0.5, 0.0], [0.5, 0.0, 0.5]],
    [[0.5, 0.5, 0.0], [0.0, 1.0, 0.0], [0.0, 0.5, 0.5]],
    [[0.5, 0.0, 0.5], [0.0, 0.5, 0.5], [0.0, 0.0, 1.0]],
    [[0.5, 0.5, 0.0], [0.0, 0.5, 0.5], [0.5, 0.0, 0.5]],
];

/// Parent barycentrics of a child's node `j` (of an element of `order`).
fn node_in_parent(order: ElementOrder, child: usize, j: usize) -> [f64; 3] {
    let c = &CHILD_CORNERS[child];
    let l = order.node_point(j);
    [0, 1, 2].map(|i| l[0] * c[0][i] + l[1] * c[1][i] + l[2] * c[2][i])
}

/// The reduced potential of `coarse` at every node of `fine`, whose element
/// 4e + k is child k of the coarse element e; None when the tables do not
/// match that pattern (another order or another mesh). The shape values at
/// the children's nodes are the same in every parent (they depend on the
/// reference point only), so they are tabulated once: a point operator
/// per fine node, geometry and gradients included, had taken 8 ms of a
/// saturating study's 50 000-unknown second mesh.
pub fn to_refined(coarse: &Solution, fine: &Elements) -> Option<Vec<f64>> {
    let els = &coarse.elements;
    if fine.len() != 4 * els.len() || fine.order != els.order {
        return None;
    }
    let m = els.order.n_nodes();
    let table: Vec<[[f64; MAX_NODES]; MAX_NODES]> = (0..4)
        .map(|k| {
            let mut rows = [[0.0; MAX_NODES]; MAX_NODES];
            for (j, row) in rows.iter_mut().enumerate().take(m) {
                *row = shape_values(els.order, node_in_parent(els.order, k, j));
            }
            rows
        })
        .collect();
    let mut out = vec![0.0; fine.n_nodes];
    for e in 0..els.len() {
        let a: [f64; MAX_NODES] = els.gather(e, &coarse.reduced);
        for (k, rows) in table.iter().enumerate() {
            for (&node, n) in fine.element_nodes(4 * e + k).iter().zip(rows) {
                // Summed as `element::potential` sums, so the guess is the same to the bit.
                out[node] = (0..m).map(|i| n[i] * a[i]).sum();
            }
        }
    }
    Some(out)
}

/// The reduced potential of `coarse` at every node of `fine`, a mesh nested
/// in it by any pattern (the bisection of local refinement included): each
/// fine node is located in the coarse elements of its own side (physical,
/// or the exterior in mapped coordinates) and the coarse field evaluated
/// there. None when more than a thousandth of the nodes cannot be located
/// (not a refinement of the coarse mesh); a node that is not found keeps 0.
pub fn to_nested(coarse: &Solution, fine: &Elements) -> Option<Vec<f64>> {
    use crate::locate::Locator;
    let els = &coarse.elements;
    if fine.order != els.order {
        return None;
    }
    let physical = Locator::new(els);
    let exterior = Locator::over(els, els.n_physical..els.len());
    let mut out = vec![0.0; fine.n_nodes];
    let mut done = vec![false; fine.n_nodes];
    let mut missing = 0usize;
    for f in 0..fine.len() {
        let grid = if f < fine.n_physical { &physical } else { &exterior };
        for &node in fine.element_nodes(f) {
            if std::mem::replace(&mut done[node], true) {
                continue;
            }
            let p = fine.positions[node];
            let Some((e, lam)) = grid.containing(els, p).next() else {
                missing += 1;
                continue;
            };
            let op = point_op(els.geometry(e), els.order, coarse.symmetry(), els.placement(e), lam, 1.0);
            out[node] = potential(&op, &els.gather(e, &coarse.reduced));
        }
    }
    (missing * 1000 <= fine.n_nodes).then_some(out)
}
