//! Degrees of freedom, the sparsity pattern (built once per mesh) and the
//! scatter map that puts each element entry straight into its slot of the
//! compressed lower triangle.

use crate::element::{element_system, ElementLoad, Placement};
use crate::material::Law;
use crate::problem::Problem;
use mesher::{BoundaryTag, Mesh, Region, Symmetry};
use nalgebra_sparse::{pattern::SparsityPattern, CscMatrix};
use rayon::prelude::*;

/// Marks a fixed node or an element entry that has no slot.
pub const NONE: usize = usize::MAX;

/// What an element is made of, as an index into the problem's laws.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum ElementKind {
    Air,
    Part(usize),
    Exterior,
}

/// The flat element table: physical triangles first, then the exterior disk.
#[derive(Clone, Debug)]
pub struct Elements {
    pub nodes: Vec<[usize; 3]>,
    pub coords: Vec<[[f64; 2]; 3]>,
    pub kinds: Vec<ElementKind>,
    pub n_physical: usize,
    pub exterior: Option<([f64; 2], f64)>,
}

impl Elements {
    pub fn from_mesh(mesh: &Mesh) -> Elements {
        let mut nodes = mesh.triangles.clone();
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
                nodes.push(t.map(|l| disk.global[l]));
                coords.push(t.map(|l| disk.mapped[l]));
                kinds.push(ElementKind::Exterior);
            }
            exterior = Some((disk.center, disk.radius));
        }
        Elements { nodes, coords, kinds, n_physical: mesh.triangles.len(), exterior }
    }

    pub fn placement(&self, e: usize) -> Placement {
        match (self.kinds[e], self.exterior) {
            (ElementKind::Exterior, Some((center, radius))) => Placement::Exterior { center, radius },
            _ => Placement::Physical,
        }
    }

    pub fn len(&self) -> usize {
        self.nodes.len()
    }

    pub fn is_empty(&self) -> bool {
        self.nodes.is_empty()
    }
}

/// The assembled linear system's structure, reused by every Newton step.
pub struct System {
    pub elements: Elements,
    pub dof_of_node: Vec<usize>,
    pub n_dofs: usize,
    /// Lower triangle of the tangent, compressed by columns.
    pub matrix: CscMatrix<f64>,
    /// For element e, entry (i, j): the slot in `matrix` values, or NONE.
    scatter: Vec<usize>,
    local_k: Vec<[[f64; 3]; 3]>,
    local_r: Vec<[f64; 3]>,
    air: Law,
}

/// Nodes held at zero reduced potential: the axis, a flux-parallel box, infinity.
fn fixed_nodes(mesh: &Mesh) -> Vec<bool> {
    let mut fixed = vec![false; mesh.n_nodes()];
    for (edge, tag) in &mesh.boundary {
        if matches!(tag, BoundaryTag::Axis | BoundaryTag::Outer) {
            fixed[edge[0]] = true;
            fixed[edge[1]] = true;
        }
    }
    if mesh.symmetry == Symmetry::Axisymmetric {
        for (n, p) in mesh.nodes.iter().enumerate().take(mesh.n_physical) {
            fixed[n] |= p[0] <= 0.0;
        }
    }
    if let Some(disk) = &mesh.exterior {
        fixed[disk.global[disk.infinity]] = true;
        if mesh.symmetry == Symmetry::Axisymmetric {
            for (l, p) in disk.mapped.iter().enumerate() {
                fixed[disk.global[l]] |= p[0] <= 0.0;
            }
        }
    }
    fixed
}

impl System {
    pub fn new(mesh: &Mesh) -> System {
        let elements = Elements::from_mesh(mesh);
        let fixed = fixed_nodes(mesh);
        let mut dof_of_node = vec![NONE; mesh.n_nodes()];
        let mut n_dofs = 0;
        for (n, f) in fixed.iter().enumerate() {
            if !f {
                dof_of_node[n] = n_dofs;
                n_dofs += 1;
            }
        }
        let (pattern, scatter) = build_pattern(&elements, &dof_of_node, n_dofs);
        let nnz = pattern.nnz();
        let matrix = CscMatrix::try_from_pattern_and_values(pattern, vec![0.0; nnz]).expect("pattern and values agree by construction");
        let n_el = elements.len();
        System { elements, dof_of_node, n_dofs, matrix, scatter, local_k: vec![[[0.0; 3]; 3]; n_el], local_r: vec![[0.0; 3]; n_el], air: Law::air() }
    }

    /// Fills the tangent and returns the residual at nodal potentials `a` (all nodes).
    pub fn assemble(&mut self, problem: &Problem, a: &[f64]) -> Vec<f64> {
        let symmetry = problem.mesh.symmetry;
        let els = &self.elements;
        let air = &self.air;
        self.local_k.par_iter_mut().zip(self.local_r.par_iter_mut()).enumerate().for_each(|(e, (k, r))| {
            let an = els.nodes[e].map(|n| a[n]);
            let load = element_load(els.kinds[e], problem, air);
            (*k, *r) = element_system(&els.coords[e], &an, symmetry, els.placement(e), load);
        });
        let values = self.matrix.values_mut();
        values.iter_mut().for_each(|v| *v = 0.0);
        let mut residual = vec![0.0; self.n_dofs];
        for e in 0..els.len() {
            let slots = &self.scatter[9 * e..9 * e + 9];
            let k = &self.local_k[e];
            for i in 0..3 {
                for j in 0..3 {
                    let s = slots[3 * i + j];
                    if s != NONE {
                        values[s] += k[i][j];
                    }
                }
                let d = self.dof_of_node[els.nodes[e][i]];
                if d != NONE {
                    residual[d] += self.local_r[e][i];
                }
            }
        }
        residual
    }
}

/// Law, current and background field of an element.
pub fn element_load<'a>(kind: ElementKind, problem: &'a Problem, air: &'a Law) -> ElementLoad<'a> {
    match kind {
        ElementKind::Air => ElementLoad { law: air, current_density: 0.0, background: problem.applied_field },
        ElementKind::Part(i) => ElementLoad { law: &problem.laws[i], current_density: problem.current_density[i], background: problem.applied_field },
        ElementKind::Exterior => ElementLoad { law: air, current_density: 0.0, background: [0.0, 0.0] },
    }
}

/// Column lists of the lower triangle, then the slot of each element entry.
fn build_pattern(els: &Elements, dof_of_node: &[usize], n: usize) -> (SparsityPattern, Vec<usize>) {
    let mut count = vec![1usize; n];
    for t in &els.nodes {
        for i in 0..3 {
            for j in 0..3 {
                let (di, dj) = (dof_of_node[t[i]], dof_of_node[t[j]]);
                if di != NONE && dj != NONE && di > dj {
                    count[dj] += 1;
                }
            }
        }
    }
    let mut start = vec![0usize; n + 1];
    for c in 0..n {
        start[c + 1] = start[c] + count[c];
    }
    let mut rows = vec![0usize; start[n]];
    let mut fill = start.clone();
    for c in 0..n {
        rows[fill[c]] = c;
        fill[c] += 1;
    }
    for t in &els.nodes {
        for i in 0..3 {
            for j in 0..3 {
                let (di, dj) = (dof_of_node[t[i]], dof_of_node[t[j]]);
                if di != NONE && dj != NONE && di > dj {
                    rows[fill[dj]] = di;
                    fill[dj] += 1;
                }
            }
        }
    }
    let mut offsets = Vec::with_capacity(n + 1);
    let mut indices = Vec::with_capacity(rows.len() / 2);
    offsets.push(0);
    for c in 0..n {
        let col = &mut rows[start[c]..start[c + 1]];
        col.sort_unstable();
        let mut last = NONE;
        for &r in col.iter() {
            if r != last {
                indices.push(r);
                last = r;
            }
        }
        offsets.push(indices.len());
    }
    let scatter = els
        .nodes
        .par_iter()
        .flat_map_iter(|t| {
            let mut s = [NONE; 9];
            for i in 0..3 {
                for j in 0..3 {
                    let (di, dj) = (dof_of_node[t[i]], dof_of_node[t[j]]);
                    if di != NONE && dj != NONE && di >= dj {
                        let col = &indices[offsets[dj]..offsets[dj + 1]];
                        s[3 * i + j] = offsets[dj] + col.binary_search(&di).unwrap_or(0);
                    }
                }
            }
            s
        })
        .collect();
    let pattern = SparsityPattern::try_from_offsets_and_indices(n, n, offsets, indices).expect("sorted unique indices by construction");
    (pattern, scatter)
}
