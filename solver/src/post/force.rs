//! Total force on a set of parts by the Maxwell stress tensor in its
//! virtual-work form (J. L. Coulomb, IEEE Trans. Magn. 19(6), 1983):
//! F_i = - integral over air of T_ij dg/dx_j, with T = nu0 (B B^T - |B|^2 I / 2)
//! and g a weight that is 1 on the parts' nodes and falls linearly to 0
//! across a band of air a few elements wide around them (0 on every other
//! part). Any such g gives the exact force for the exact field; a band wider
//! than one element keeps the integral away from the field singularities at
//! the parts' corners and averages the discretization error. Where the
//! set touches another part, the interface closes the surface, with the
//! stress of a vanishing air gap (`contact.rs`).

use super::integrate::{element_sum, for_each_field_point};
use crate::solution::Solution;
use crate::space::ElementKind;
use crate::NU0;
use mesher::{BoundaryTag, Symmetry};

/// Force on a set of parts.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Force {
    /// Planar: [Fx, Fy] per metre of depth; axisymmetric: [0, Fz] in N.
    pub vector: [f64; 2],
    /// Planar only: torque about the given point, N m per metre of depth.
    pub torque: f64,
    /// True when the set touches another part: the force then includes the
    /// air-gap stress across the contact (`contact.rs`), the pull at contact.
    pub contact: bool,
    /// True when the set touches the outer boundary: no surface closes around
    /// it, and the value is not reliable.
    pub at_boundary: bool,
    /// The stress's gross pull: the integral of |T dg/dx| over the band (and
    /// the contact's pull), in the vector's units. Where pulls cancel in the
    /// net force (a plate midway between two magnets), the force's error is
    /// theirs, a share of this, not a share of the force.
    pub gross: f64,
}

/// Maxwell-stress force on the parts (a set) and torque about `torque_center` (planar), per metre of depth when planar.
pub fn force_on(solution: &Solution, parts: &[usize], torque_center: [f64; 2]) -> Force {
    let els = &solution.elements;
    let n_nodes = solution.reduced.len();
    let corners = |e: usize| [els.nodes[e][0], els.nodes[e][1], els.nodes[e][2]];
    let in_set = |k: ElementKind| matches!(k, ElementKind::Part(i) if parts.contains(&i));
    let mut in_set_node = vec![false; n_nodes];
    let mut other = vec![false; n_nodes];
    for e in 0..els.n_physical {
        let k = els.kinds[e];
        for n in corners(e) {
            if in_set(k) {
                in_set_node[n] = true;
            } else if k != ElementKind::Air {
                other[n] = true;
            }
        }
    }
    // Shared nodes are cheap to test; the interface edges are found only then.
    let touching = (0..n_nodes).any(|n| in_set_node[n] && other[n]);
    let mut weight = band_weight(solution, &in_set_node, &other, &in_set, touching);
    periodic_weight(solution, &mut weight);
    let across = touching
        .then(|| super::contact::interface_force(solution, &in_set, torque_center))
        .flatten()
        .map(|f| {
            let face = super::contact::band_face_term(solution, &weight, &in_set, torque_center);
            [f[0] + face[0], f[1] + face[1], f[2] + face[2]]
        });
    let contact = across.is_some();
    let at_boundary = touches_outer_boundary(solution, &in_set_node);
    let axisym = solution.symmetry() == Symmetry::Axisymmetric;
    let [fx, fy, mut torque, gross] = element_sum(els.n_physical, |e| {
        let mut sum = [0.0; 4];
        let g = corners(e).map(|n| weight[n]);
        if els.kinds[e] != ElementKind::Air || g.iter().all(|&v| v == 0.0) {
            return sum;
        }
        // g is linear in the reference triangle: its gradient is constant
        // on a straight element and follows the map on a curved one.
        let geom = els.geometry(e);
        let grad_at = |dn: [[f64; 2]; 3]| [0, 1].map(|k| g[0] * dn[0][k] + g[1] * dn[1][k] + g[2] * dn[2][k]);
        let straight = grad_at(crate::element::barycentric_gradients(&els.coords[e]).0);
        for_each_field_point(solution, e, |p| {
            let (b, op) = (p.b, p);
            let grad = if geom.is_curved() { grad_at(geom.gradients_at(p.lam).1) } else { straight };
            let half = 0.5 * (b[0] * b[0] + b[1] * b[1]);
            let t = [[b[0] * b[0] - half, b[0] * b[1]], [b[0] * b[1], b[1] * b[1] - half]];
            let tg = [0, 1].map(|i| -NU0 * (t[i][0] * grad[0] + t[i][1] * grad[1]) * op.weight);
            let arm = [op.x[0] - torque_center[0], op.x[1] - torque_center[1]];
            sum[0] += tg[0];
            sum[1] += tg[1];
            sum[2] += arm[0] * tg[1] - arm[1] * tg[0];
            sum[3] += if axisym { tg[1].abs() } else { tg[0].hypot(tg[1]) };
        });
        sum
    });
    let [cx, cy, ct] = across.unwrap_or([0.0; 3]);
    let mut f = [fx + cx, fy + cy];
    torque += ct;
    if axisym {
        f[0] = 0.0;
        torque = 0.0;
    }
    Force {
        vector: f,
        torque,
        contact,
        at_boundary,
        // About the axis a ring's radial pull cancels round it, as above.
        gross: gross + if axisym { cy.abs() } else { cx.hypot(cy) },
    }
}

/// Element layers the band spans at least.
const BAND_LAYERS: f64 = 3.0;
/// ... and at least this fraction of the set's extent: the self-field of the
/// set, whose stress integrates to zero, is weaker and smoother further out.
const BAND_FRACTION: f64 = 0.5;

/// g at every node: 1 on the set, 0 on other parts and outside the band,
/// and in air within the band (1 - d_s / width) d_o / (d_s + d_o), d_s and
/// d_o the distances to the set and to the nearest other part. Any
/// continuous g that is 1 on the set and 0 on the other parts gives the
/// force on the set; the second factor takes g to zero smoothly at another
/// part within the band. Without it (1 - d_s / width up to the other part,
/// then 0 on its nodes) g fell across the last layer of air elements at the
/// other part's surface and corners, where the field is singular: P2's pull
/// at a 5 mm gap then converged as h (errors 2.4e-6, 1.2e-6 at order 4 on
/// two nested meshes) whatever the element order. With `sharp_at_others`
/// (a set in contact with another part, whose interface stress is added
/// separately) the second factor is left out.
fn band_weight(solution: &Solution, in_set_node: &[bool], other: &[bool], in_set: &dyn Fn(ElementKind) -> bool, sharp_at_others: bool) -> Vec<f64> {
    let els = &solution.elements;
    let pos = &els.positions;
    let open_sides = open_side_edges(solution.problem.mesh);
    let boundary = region_boundary(els, &|k| in_set(k), &open_sides);
    let others = if sharp_at_others {
        Vec::new()
    } else {
        region_boundary(els, &|k| matches!(k, ElementKind::Part(_)) && !in_set(k), &open_sides)
    };
    let mut lengths: Vec<f64> = boundary.iter().map(|&(a, b)| dist(pos[a], pos[b])).collect();
    lengths.sort_by(f64::total_cmp);
    let (blo, bhi) = mesher::geometry::bbox(boundary.iter().map(|&(a, _)| pos[a]));
    let extent = (bhi[0] - blo[0]).max(bhi[1] - blo[1]).max(0.0);
    let wanted = (BAND_LAYERS * lengths.get(lengths.len() / 2).copied().unwrap_or(0.0)).max(BAND_FRACTION * extent);
    let grid = crate::segment_grid::SegmentGrid::new(boundary.iter().map(|&(a, b)| [pos[a], pos[b]]).collect());
    let other_grid = crate::segment_grid::SegmentGrid::new(others.iter().map(|&(a, b)| [pos[a], pos[b]]).collect());
    let width = within_domain(solution, &grid, wanted, in_set_node);
    let mut weight: Vec<f64> = in_set_node.iter().map(|&s| if s { 1.0 } else { 0.0 }).collect();
    if width <= 0.0 {
        return weight;
    }
    let (mut lo, mut hi) = ([f64::INFINITY; 2], [f64::NEG_INFINITY; 2]);
    for &(a, _) in &boundary {
        for k in 0..2 {
            lo[k] = lo[k].min(pos[a][k] - width);
            hi[k] = hi[k].max(pos[a][k] + width);
        }
    }
    // Air corner nodes inside the band's box, then their distance to the set (in parallel).
    let mut air_corner = vec![false; pos.len()];
    for e in (0..els.n_physical).filter(|&e| els.kinds[e] == ElementKind::Air) {
        els.nodes[e][..3].iter().for_each(|&n| air_corner[n] = true);
    }
    let candidates: Vec<usize> = (0..pos.len())
        .filter(|&n| {
            let p = pos[n];
            air_corner[n] && !in_set_node[n] && !other[n] && p[0] >= lo[0] && p[1] >= lo[1] && p[0] <= hi[0] && p[1] <= hi[1]
        })
        .collect();
    use rayon::prelude::*;
    let values: Vec<f64> = candidates
        .par_iter()
        .map(|&n| {
            let Some(d_s) = grid.nearest(pos[n], width) else { return 0.0 };
            let fade = other_grid.nearest(pos[n], 4.0 * width).map_or(1.0, |d_o| d_o / (d_s + d_o));
            (1.0 - d_s / width).max(0.0) * fade
        })
        .collect();
    for (n, v) in candidates.into_iter().zip(values) {
        weight[n] = v;
    }
    weight
}

/// True when a node of the set lies on the outer boundary (a flux-parallel
/// box drawn against a part): g cannot fall to 0 there, so no band closes
/// around the set in air. Symmetry planes and periodic sides do not count:
/// the set goes on beyond them.
fn touches_outer_boundary(solution: &Solution, in_set_node: &[bool]) -> bool {
    solution
        .problem
        .mesh
        .boundary
        .iter()
        .filter(|(_, tag)| matches!(tag, BoundaryTag::Rim | BoundaryTag::Outer))
        .any(|(e, _)| in_set_node[e[0]] || in_set_node[e[1]])
}

/// The band's width, no wider than the distance from the set to the outer
/// boundary (the rim of an open study, the box of a flux-parallel one). The
/// integral covers the physical domain only, so g must fall to 0 before the
/// rim: a band cut off there left the stress on the cut surface out (a
/// magnet's torque in a uniform field came out 11 % low when its band
/// reached the rim).
///
/// A symmetry plane bounds the band too, unless the set reaches it: a set
/// cut by the plane is half of a set whose band mirrors across it, so the
/// band may cross and the section's force is the exact share of the
/// whole's; a set clear of the plane would have its band enclose part of
/// its mirror image.
///
/// Periodic sides likewise: a set that reaches them (a back iron running
/// through the cell) has a band that runs on into the next cell, its weight
/// made the same on both sides (`periodic_weight`); a set clear of them has
/// its band stop short.
fn within_domain(solution: &Solution, set_boundary: &crate::segment_grid::SegmentGrid, wanted: f64, in_set_node: &[bool]) -> f64 {
    let mesh = solution.problem.mesh;
    let reaches = |kind: fn(&BoundaryTag) -> bool| mesh.boundary.iter().any(|(e, tag)| kind(tag) && (in_set_node[e[0]] || in_set_node[e[1]]));
    let cut_by_mirror = reaches(|t| matches!(t, BoundaryTag::Mirror { .. }));
    let through_cell = reaches(|t| matches!(t, BoundaryTag::Periodic { .. }));
    mesh.boundary
        .iter()
        .filter(|(_, tag)| match tag {
            BoundaryTag::Rim | BoundaryTag::Outer => true,
            BoundaryTag::Mirror { .. } => !cut_by_mirror,
            BoundaryTag::Periodic { .. } => !through_cell,
            _ => false,
        })
        .flat_map(|(edge, _)| *edge)
        .filter_map(|n| set_boundary.nearest(mesh.nodes[n], wanted))
        .fold(wanted, f64::min)
}

/// The mesh's edges on symmetry planes and periodic sides, by sorted corner pair.
fn open_side_edges(mesh: &mesher::Mesh) -> std::collections::HashSet<(usize, usize)> {
    mesh.boundary
        .iter()
        .filter(|(_, tag)| matches!(tag, BoundaryTag::Mirror { .. } | BoundaryTag::Periodic { .. }))
        .map(|(e, _)| (e[0].min(e[1]), e[0].max(e[1])))
        .collect()
}

/// The weight made periodic: each tied node takes its image's weight, so
/// that g is one continuous function over the repeated cells (a weight
/// that jumped at the seam would add the seam's stress to the force).
fn periodic_weight(solution: &Solution, weight: &mut [f64]) {
    if !solution.problem.mesh.boundary.iter().any(|(_, t)| matches!(t, BoundaryTag::Periodic { .. })) {
        return;
    }
    let ties = crate::constraints::Constraints::of_mesh(solution.problem.mesh, &solution.elements).ties;
    for (n, image, _) in ties {
        if n < weight.len() && image < weight.len() {
            weight[n] = weight[image];
        }
    }
}

/// The edges that bound a region (the elements whose kind passes `inside`):
/// edges of its elements that no other of its elements shares, less those
/// on a symmetry plane or periodic side (the region goes on beyond them, in
/// its mirror image or the next cell).
fn region_boundary(
    els: &crate::space::Elements,
    inside: &dyn Fn(ElementKind) -> bool,
    open_sides: &std::collections::HashSet<(usize, usize)>,
) -> Vec<(usize, usize)> {
    let mut edges: Vec<(usize, usize)> = Vec::new();
    for e in (0..els.n_physical).filter(|&e| inside(els.kinds[e])) {
        for [a, b] in crate::element::EDGES {
            let (na, nb) = (els.nodes[e][a], els.nodes[e][b]);
            edges.push((na.min(nb), na.max(nb)));
        }
    }
    edges.sort_unstable();
    edges.retain(|e| !open_sides.contains(e));
    let mut boundary = Vec::new();
    let mut i = 0;
    while i < edges.len() {
        let mut j = i + 1;
        while j < edges.len() && edges[j] == edges[i] {
            j += 1;
        }
        if j - i == 1 {
            boundary.push(edges[i]);
        }
        i = j;
    }
    boundary
}

fn dist(a: [f64; 2], b: [f64; 2]) -> f64 {
    (a[0] - b[0]).hypot(a[1] - b[1])
}
