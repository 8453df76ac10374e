//! Constraints on the potential: the nodes held at zero reduced potential
//! (the symmetry axis, a flux-parallel box or symmetry plane, the point at
//! infinity of the Kelvin disk), and the ties of periodic box sides, where
//! a node's potential is its image's on the opposite side (with its sign
//! turned across an anti-periodic pair). The dof map numbers the free
//! nodes that are tied to nothing; a tied node shares its image's unknown.

use crate::element::EDGES;
use crate::space::Elements;
use mesher::{BoundaryTag, Mesh, Symmetry};
use std::collections::{HashMap, HashSet};

/// Which nodes are fixed (at zero reduced potential) and which are tied.
#[derive(Clone, Debug)]
pub struct Constraints {
    /// For every node: whether its potential is fixed at zero.
    pub fixed: Vec<bool>,
    /// Tied nodes: (node, the node it repeats, sign); the second node is
    /// itself free and untied (chains are followed to their end).
    pub ties: Vec<(usize, usize, f64)>,
}

impl Constraints {
    /// The conditions of a mesh: axis, outer box, symmetry planes, infinity, periodic ties.
    pub fn of_mesh(mesh: &Mesh, els: &Elements) -> Constraints {
        let mut fixed = fixed_nodes(mesh, els);
        anchor_a_floating_potential(mesh, els, &mut fixed);
        let ties = periodic_ties(mesh, els, &mut fixed);
        Constraints { fixed, ties }
    }
}

/// Whether an edge's tag holds its potential at zero.
fn holds_zero(tag: &BoundaryTag) -> bool {
    matches!(tag, BoundaryTag::Axis | BoundaryTag::Outer | BoundaryTag::Mirror { flux_normal: false })
}

/// Nodes held at zero reduced potential: the axis, a flux-parallel box or
/// symmetry plane, infinity.
fn fixed_nodes(mesh: &Mesh, els: &Elements) -> Vec<bool> {
    let mut fixed = vec![false; els.n_nodes];
    let mut fixed_edges: HashSet<(usize, usize)> = HashSet::new();
    for (edge, tag) in &mesh.boundary {
        if holds_zero(tag) {
            fixed[edge[0]] = true;
            fixed[edge[1]] = true;
            fixed_edges.insert((edge[0].min(edge[1]), edge[0].max(edge[1])));
        }
    }
    // Zero potential on the line x = 0 throughout: the axis, or a planar
    // open disk cut there by a flux-parallel plane (its exterior's diameter
    // included, which the domain's edges do not reach).
    let cut_at_zero = mesh.exterior.is_some() && mesh.boundary.iter().any(|(_, t)| *t == BoundaryTag::Mirror { flux_normal: false });
    let axisym = mesh.symmetry == Symmetry::Axisymmetric || cut_at_zero;
    for e in 0..els.len() {
        let x = els.coords[e];
        for k in 0..3 {
            if axisym && x[k][0] <= 0.0 {
                fixed[els.nodes[e][k]] = true;
            }
        }
        for (k, [a, b]) in EDGES.iter().enumerate() {
            let (na, nb) = (els.nodes[e][*a], els.nodes[e][*b]);
            let on_axis = axisym && x[*a][0] <= 0.0 && x[*b][0] <= 0.0;
            if on_axis || (e < els.n_physical && fixed[na] && fixed[nb] && fixed_edges.contains(&(na.min(nb), na.max(nb)))) {
                for &n in els.edge_nodes(e, k) {
                    fixed[n] = true;
                }
            }
        }
    }
    if let Some(disk) = &mesh.exterior {
        fixed[disk.global[disk.infinity]] = true;
    }
    fixed
}

/// A planar box whose every side is flux-normal or periodic holds the
/// potential nowhere: it is fixed only up to a constant, which leaves the
/// system singular (it was refused as "not positive definite"). The field
/// is the curl of the potential and does not see the constant, so one
/// corner node is held at zero. An anti-periodic pair already excludes the
/// constant (it would have to equal its own negative). Where the currents
/// do not sum to zero there is no field at all; the study refuses that
/// case before it reaches the solver (`study::net_current`).
fn anchor_a_floating_potential(mesh: &Mesh, els: &Elements, fixed: &mut [bool]) {
    let anti = mesh.boundary.iter().any(|(_, t)| matches!(t, BoundaryTag::Periodic { anti: true, .. }));
    if fixed.iter().any(|&f| f) || anti || els.is_empty() {
        return;
    }
    // The lowest-numbered corner: the same point on every nested mesh,
    // whose refinement keeps the first mesh's nodes in their order.
    if let Some(&n) = els.nodes.iter().flat_map(|t| t[..3].iter()).min() {
        fixed[n] = true;
    }
}

/// The nodes (corners and the nodes inside edges) on each periodic side, by side index, with whether the pair is anti-periodic.
fn nodes_on_periodic_sides(mesh: &Mesh, els: &Elements) -> ([Vec<usize>; 4], bool) {
    let mut by_edge: HashMap<(usize, usize), u8> = HashMap::new();
    let mut anti = false;
    for (edge, tag) in &mesh.boundary {
        if let BoundaryTag::Periodic { side, anti: a } = tag {
            by_edge.insert((edge[0].min(edge[1]), edge[0].max(edge[1])), *side);
            anti |= *a;
        }
    }
    let mut on: [Vec<usize>; 4] = Default::default();
    if by_edge.is_empty() {
        return (on, anti);
    }
    for e in 0..els.n_physical {
        for (k, [a, b]) in EDGES.iter().enumerate() {
            let (na, nb) = (els.nodes[e][*a], els.nodes[e][*b]);
            if let Some(&side) = by_edge.get(&(na.min(nb), na.max(nb))) {
                let list = &mut on[side as usize];
                list.extend([na, nb]);
                list.extend_from_slice(els.edge_nodes(e, k));
            }
        }
    }
    for list in &mut on {
        list.sort_unstable();
        list.dedup();
    }
    (on, anti)
}

/// Ties of the right side to the left and the top to the bottom, matched
/// by position along the side; a node tied to a fixed one is fixed too.
fn periodic_ties(mesh: &Mesh, els: &Elements, fixed: &mut [bool]) -> Vec<(usize, usize, f64)> {
    let (on, anti) = nodes_on_periodic_sides(mesh, els);
    let sign = if anti { -1.0 } else { 1.0 };
    let mut parent: HashMap<usize, (usize, f64)> = HashMap::new();
    // (repeating side, repeated side, coordinate along them)
    for (from, to, along) in [(mesher::RIGHT, mesher::LEFT, 1), (mesher::TOP, mesher::BOTTOM, 0)] {
        let key = |n: &usize| els.positions[*n][along];
        let mut targets: Vec<usize> = on[to].clone();
        targets.sort_by(|a, b| key(a).total_cmp(&key(b)));
        let span = targets.last().map_or(0.0, |&n| key(&n)) - targets.first().map_or(0.0, |&n| key(&n));
        for &n in &on[from] {
            let t = key(&n);
            let i = targets.partition_point(|m| key(m) < t - 1e-9 * span);
            if let Some(&m) = targets.get(i).filter(|&&m| (key(&m) - t).abs() <= 1e-9 * span) {
                if m != n && !parent.contains_key(&n) {
                    parent.insert(n, (m, sign));
                }
            }
        }
    }
    let mut ties = Vec::with_capacity(parent.len());
    for (&n, &(mut root, mut s)) in &parent {
        while let Some(&(next, s2)) = parent.get(&root) {
            root = next;
            s *= s2;
        }
        if fixed[n] || fixed[root] {
            fixed[n] = true;
            fixed[root] = true;
        } else {
            ties.push((n, root, s));
        }
    }
    ties.retain(|&(n, root, _)| !fixed[n] && !fixed[root]);
    ties.sort_unstable_by_key(|t| t.0);
    ties
}
