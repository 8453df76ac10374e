//! The function space: the element table (corners, and edge midpoints for
//! quadratic elements, numbered once per mesh) of the element order asked
//! for. Constraints, the dof map, pattern, ordering and assembly read it;
//! it depends on none of them.

use crate::element::{ElementOrder, Placement, EDGES, MAX_NODES};
use mesher::{Mesh, Region};
use rayon::prelude::*;

/// Marks a fixed node.
pub const NONE: usize = usize::MAX;
/// What an element is made of.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum ElementKind {
    /// Air of the physical domain.
    Air,
    /// The part with this index.
    Part(usize),
    /// The Kelvin-mapped exterior.
    Exterior,
}

/// The flat element table: physical triangles first, then the exterior disk.
#[derive(Clone, Debug)]
pub struct Elements {
    /// Linear or quadratic.
    pub order: ElementOrder,
    /// Global node ids: corners, then edge midpoints (quadratic only).
    pub nodes: Vec<[usize; MAX_NODES]>,
    /// Corner coordinates in the element's own frame (mapped for the exterior).
    pub coords: Vec<[[f64; 2]; 3]>,
    /// What each element is.
    pub kinds: Vec<ElementKind>,
    /// Elements of the physical domain (they come first).
    pub n_physical: usize,
    /// Centre and radius of the Kelvin disk of an open study.
    pub exterior: Option<([f64; 2], f64)>,
    /// Total node count (mesh nodes plus edge midpoints).
    pub n_nodes: usize,
    /// Physical position of every node; exterior-only nodes keep their mapped position.
    pub positions: Vec<[f64; 2]>,
}

impl Elements {
    /// The element table of a mesh at an order: midpoints numbered once per edge.
    pub fn from_mesh(mesh: &Mesh, order: ElementOrder) -> Elements {
        let mut corners: Vec<[usize; 3]> = mesh.triangles.clone();
        let mut coords: Vec<[[f64; 2]; 3]> = mesh.triangles.iter().map(|t| t.map(|n| mesh.nodes[n])).collect();
        let mut kinds: Vec<ElementKind> = mesh
            .regions
            .iter()
            .map(|r| match r {
                Region::Air => ElementKind::Air,
                Region::Part(i) => ElementKind::Part(*i),
            })
            .collect();
        let mut exterior = None;
        if let Some(disk) = &mesh.exterior {
            for t in &disk.triangles {
                corners.push(t.map(|l| disk.global[l]));
                coords.push(t.map(|l| disk.mapped[l]));
                kinds.push(ElementKind::Exterior);
            }
            exterior = Some((disk.center, disk.radius));
        }
        let mut positions = mesh.nodes.clone();
        let nodes = match order {
            ElementOrder::Linear => corners.iter().map(|c| [c[0], c[1], c[2], NONE, NONE, NONE]).collect(),
            ElementOrder::Quadratic => add_midpoints(&corners, &coords, &mut positions),
        };
        Elements {
            order,
            nodes,
            coords,
            kinds,
            n_physical: mesh.triangles.len(),
            exterior,
            n_nodes: positions.len(),
            positions,
        }
    }

    /// Where element e lives.
    pub fn placement(&self, e: usize) -> Placement {
        match (self.kinds[e], self.exterior) {
            (ElementKind::Exterior, Some((center, radius))) => Placement::Exterior { center, radius },
            _ => Placement::Physical,
        }
    }

    /// Number of elements.
    pub fn len(&self) -> usize {
        self.nodes.len()
    }

    /// Whether there are none.
    pub fn is_empty(&self) -> bool {
        self.nodes.is_empty()
    }

    /// The element's nodes that exist (3 or 6).
    pub fn element_nodes(&self, e: usize) -> &[usize] {
        &self.nodes[e][..self.order.n_nodes()]
    }

    /// Nodal values of a global vector gathered for element e.
    pub fn gather(&self, e: usize, values: &[f64]) -> [f64; MAX_NODES] {
        let mut a = [0.0; MAX_NODES];
        for (k, &n) in self.element_nodes(e).iter().enumerate() {
            a[k] = values[n];
        }
        a
    }
}

/// Numbers the edge midpoints: one node per distinct edge, shared by the
/// triangles on both sides (rim edges join the domain and the exterior).
fn add_midpoints(corners: &[[usize; 3]], coords: &[[[f64; 2]; 3]], positions: &mut Vec<[f64; 2]>) -> Vec<[usize; MAX_NODES]> {
    let mut keys: Vec<(usize, usize, u32)> = Vec::with_capacity(3 * corners.len());
    for (e, c) in corners.iter().enumerate() {
        for (k, [a, b]) in EDGES.iter().enumerate() {
            let (lo, hi) = (c[*a].min(c[*b]), c[*a].max(c[*b]));
            keys.push((lo, hi, (3 * e + k) as u32));
        }
    }
    keys.par_sort_unstable();
    let mut mid = vec![NONE; 3 * corners.len()];
    let mut prev = (NONE, NONE);
    let mut id = positions.len();
    for &(lo, hi, slot) in &keys {
        if (lo, hi) != prev {
            prev = (lo, hi);
            id = positions.len();
            let e = slot as usize / 3;
            let [a, b] = EDGES[slot as usize % 3];
            let x = coords[e];
            // Physical elements come first, so a shared edge takes its physical midpoint.
            positions.push([0.5 * (x[a][0] + x[b][0]), 0.5 * (x[a][1] + x[b][1])]);
        }
        mid[slot as usize] = id;
    }
    corners
        .iter()
        .enumerate()
        .map(|(e, c)| [c[0], c[1], c[2], mid[3 * e], mid[3 * e + 1], mid[3 * e + 2]])
        .collect()
}
