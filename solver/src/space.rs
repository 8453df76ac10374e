//! The function space: the element table (corners, the nodes inside each
//! edge and inside each triangle, numbered once per mesh) of the element
//! order asked for. Constraints, the dof map, pattern, ordering and assembly read it;
//! it depends on none of them.

use crate::element::{ElementOrder, Placement, EDGES, MAX_NODES};
use crate::element_map::{CurvedEdge, ElementGeometry};
use mesher::{BoundaryTag, Mesh, Region};
use rayon::prelude::*;
use std::collections::HashMap;

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
    /// Order 1 to 4.
    pub order: ElementOrder,
    /// Global node ids: corners, then each edge's inner nodes, then the interior ones.
    pub nodes: Vec<[usize; MAX_NODES]>,
    /// Corner coordinates in the element's own frame (mapped for the exterior).
    pub coords: Vec<[[f64; 2]; 3]>,
    /// What each element is.
    pub kinds: Vec<ElementKind>,
    /// Elements of the physical domain (they come first).
    pub n_physical: usize,
    /// Centre and radius of the Kelvin disk of an open study.
    pub exterior: Option<([f64; 2], f64)>,
    /// Total node count (mesh nodes plus edge and interior nodes).
    pub n_nodes: usize,
    /// Physical position of every node; exterior-only nodes keep their mapped position.
    pub positions: Vec<[f64; 2]>,
    /// The edges that follow a circle (the Kelvin rim, round parts' outlines), by element.
    pub curves: Vec<CurvedEdge>,
    /// Element e's curved edges are `curves[curve_start[e]..curve_start[e + 1]]`;
    /// empty when no element is curved.
    pub curve_start: Vec<u32>,
}

impl Elements {
    /// The element table of a mesh at an order: edge nodes numbered once per edge.
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
        let (curves, curve_start) = curved_edges(mesh, &corners, &coords);
        let mut els = Elements {
            order,
            nodes: Vec::new(),
            coords,
            kinds,
            n_physical: mesh.triangles.len(),
            exterior,
            n_nodes: 0,
            positions: mesh.nodes.clone(),
            curves,
            curve_start,
        };
        let mut positions = std::mem::take(&mut els.positions);
        els.nodes = match order {
            ElementOrder::Linear => corners.iter().map(with_corners).collect(),
            _ => add_inner_nodes(&els, &corners, &mut positions),
        };
        els.n_nodes = positions.len();
        els.positions = positions;
        els
    }

    /// The geometry of element e: corners, and its curved edges.
    pub fn geometry(&self, e: usize) -> ElementGeometry<'_> {
        let curves = match (self.curve_start.get(e), self.curve_start.get(e + 1)) {
            (Some(&a), Some(&b)) => &self.curves[a as usize..b as usize],
            _ => &[],
        };
        ElementGeometry {
            corners: &self.coords[e],
            curves,
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

    /// The element's nodes that exist (3, 6, 10 or 15).
    pub fn element_nodes(&self, e: usize) -> &[usize] {
        &self.nodes[e][..self.order.n_nodes()]
    }

    /// The nodes inside edge k of element e (none for linear elements), from
    /// its first corner (`EDGES[k][0]`) to its second.
    pub fn edge_nodes(&self, e: usize, k: usize) -> &[usize] {
        let m = self.order.per_edge();
        &self.nodes[e][3 + k * m..3 + (k + 1) * m]
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

/// The element edges that follow a circle: physical edges on a round
/// part's outline (`Mesh::circles`) or on the Kelvin rim, and the exterior
/// disk's edges on the rim (the inversion fixes the circle point by point,
/// so both sides follow the same arc).
fn curved_edges(mesh: &Mesh, corners: &[[usize; 3]], coords: &[[[f64; 2]; 3]]) -> (Vec<CurvedEdge>, Vec<u32>) {
    let mut centre_of: HashMap<(usize, usize), [f64; 2]> = mesh.edges_on_circles(&mesh.circles).into_iter().map(|(k, c)| (k, c.center)).collect();
    if let Some(disk) = &mesh.exterior {
        for (e, tag) in &mesh.boundary {
            if *tag == BoundaryTag::Rim {
                centre_of.insert((e[0].min(e[1]), e[0].max(e[1])), disk.center);
            }
        }
    }
    if centre_of.is_empty() {
        return (Vec::new(), Vec::new());
    }
    let mut curves = Vec::new();
    let mut curve_start = Vec::with_capacity(corners.len() + 1);
    for (e, c) in corners.iter().enumerate() {
        curve_start.push(curves.len() as u32);
        for (k, [a, b]) in EDGES.iter().enumerate() {
            if let Some(&centre) = centre_of.get(&(c[*a].min(c[*b]), c[*a].max(c[*b]))) {
                curves.push(CurvedEdge::new(k, &coords[e], centre));
            }
        }
    }
    curve_start.push(curves.len() as u32);
    (curves, curve_start)
}

/// A node row holding the three corners only.
fn with_corners(c: &[usize; 3]) -> [usize; MAX_NODES] {
    let mut row = [NONE; MAX_NODES];
    row[..3].copy_from_slice(c);
    row
}

/// Numbers the nodes inside the edges, once per distinct edge and shared
/// by the triangles on both sides (rim edges join the domain and the
/// exterior), and those inside each triangle, placed by each element's map
/// (on the arc along a curved edge). An edge's nodes are numbered from its
/// lower corner id to its higher, so both triangles agree on them whichever
/// way each runs along the edge.
fn add_inner_nodes(els: &Elements, corners: &[[usize; 3]], positions: &mut Vec<[f64; 2]>) -> Vec<[usize; MAX_NODES]> {
    let order = els.order;
    let per_edge = order.per_edge();
    let p = order.degree() as f64;
    let mut keys: Vec<(usize, usize, u32)> = Vec::with_capacity(3 * corners.len());
    for (e, c) in corners.iter().enumerate() {
        for (k, [a, b]) in EDGES.iter().enumerate() {
            let (lo, hi) = (c[*a].min(c[*b]), c[*a].max(c[*b]));
            keys.push((lo, hi, (3 * e + k) as u32));
        }
    }
    keys.par_sort_unstable();
    // First node id of each element edge's run, numbered from lo to hi.
    let mut first = vec![NONE; 3 * corners.len()];
    let mut prev = (NONE, NONE);
    let mut id = positions.len();
    for &(lo, hi, slot) in &keys {
        if (lo, hi) != prev {
            prev = (lo, hi);
            id = positions.len();
            let e = slot as usize / 3;
            let [a, b] = EDGES[slot as usize % 3];
            // Physical elements come first, so a shared edge takes its physical position.
            let geom = els.geometry(e);
            for k in 1..=per_edge {
                let t = if corners[e][a] == lo { k as f64 / p } else { 1.0 - k as f64 / p };
                let mut lam = [0.0; 3];
                lam[a] = 1.0 - t;
                lam[b] = t;
                positions.push(geom.map(lam).0);
            }
        }
        first[slot as usize] = id;
    }
    let interior = 3 + 3 * per_edge..order.n_nodes();
    corners
        .iter()
        .enumerate()
        .map(|(e, c)| {
            let mut row = with_corners(c);
            for (k, [a, b]) in EDGES.iter().enumerate() {
                let forward = c[*a] < c[*b];
                for j in 0..per_edge {
                    // Local node j runs from corner a to b; the global run from lo to hi.
                    let g = if forward { j } else { per_edge - 1 - j };
                    row[3 + k * per_edge + j] = first[3 * e + k] + g;
                }
            }
            let geom = els.geometry(e);
            for j in interior.clone() {
                row[j] = positions.len();
                positions.push(geom.map(order.node_point(j)).0);
            }
            row
        })
        .collect()
}
