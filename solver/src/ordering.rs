//! Fill-reducing ordering of the unknowns from the mesh itself: the
//! approximate minimum degree ordering of the corner graph (a quarter of the
//! quadratic element's unknowns and a sixth of its matrix entries), each
//! edge-midpoint unknown then placed just before the first of its two
//! corners to be eliminated. Eliminating a corner together with the edges it
//! opens couples the same fan of triangles that the corner alone couples in
//! the linear graph, so the ordering keeps the corner graph's fill pattern.
//! The unknowns are then numbered in this order, so that the factorization
//! needs no permutation (faer would otherwise permute the matrix into a new
//! buffer at every numeric factorization: 9 % of a 1e6-unknown linear solve
//! in a profile, most of it page faults).

use crate::element::EDGES;
use crate::space::{Elements, NONE};
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::sparse::linalg::amd;
use faer::sparse::SymbolicSparseColMatRef;
use mesher::Mesh;
use rayon::slice::ParallelSliceMut;

/// Rank of every corner node (mesh node) in the AMD ordering of the corner
/// graph of the mesh and its exterior disk; `None` when the workspace could
/// not be had. Needs only the mesh, so it can run beside the element table's
/// construction.
pub fn corner_ranks(mesh: &Mesh) -> Option<Vec<u32>> {
    let exterior = mesh.exterior.iter().flat_map(|disk| disk.triangles.iter().map(|t| t.map(|l| disk.global[l])));
    let corners = || mesh.triangles.iter().copied().chain(exterior.clone());
    let n = corners().flatten().max().map_or(0, |m| m + 1);
    corner_order(corners(), n)
}

/// Renumbers the unknowns (`dof_of_node`, free nodes only) so that the k-th
/// is the k-th to be eliminated: each corner by its rank, each edge midpoint
/// just before the first of its two corners. Leaves the numbering as it is
/// when a corner has no rank.
pub fn number_for_elimination(els: &Elements, corner_rank: &[u32], dof_of_node: &mut [usize]) -> bool {
    let rank = |n: usize| corner_rank.get(n).map(|&r| r as u64);
    // Key of each unknown: twice its corner's rank (+3), or twice the rank of
    // the earlier of an edge's two corners (+2: the edge goes first), or 0
    // for a triangle's interior node.
    let (m, per_edge) = (els.order.n_nodes(), els.order.per_edge());
    let mut keyed: Vec<(u64, usize)> = Vec::with_capacity(dof_of_node.len());
    let mut seen = vec![false; dof_of_node.len()];
    for t in &els.nodes {
        for &n in &t[..3] {
            if !seen[n] && dof_of_node[n] != NONE {
                let Some(r) = rank(n) else { return false };
                keyed.push((2 * r + 3, n));
            }
            seen[n] = true;
        }
        for (k, [a, b]) in EDGES.iter().enumerate() {
            for &n in &t[3 + k * per_edge..3 + (k + 1) * per_edge] {
                if !seen[n] && dof_of_node[n] != NONE {
                    let (Some(ra), Some(rb)) = (rank(t[*a]), rank(t[*b])) else { return false };
                    keyed.push((2 * ra.min(rb) + 2, n));
                }
                seen[n] = true;
            }
        }
        // Interior nodes couple only within their triangle, whose nodes are
        // already coupled: eliminated first, they add no fill.
        for &n in &t[3 + 3 * per_edge..m] {
            if dof_of_node[n] != NONE {
                keyed.push((0, n));
            }
            seen[n] = true;
        }
    }
    if keyed.len() != dof_of_node.iter().filter(|&&d| d != NONE).count() {
        return false;
    }
    // Keys are unique (each holds its node), so the parallel sort gives the one order.
    keyed.par_sort_unstable();
    for (d, (_, n)) in keyed.into_iter().enumerate() {
        dof_of_node[n] = d;
    }
    true
}

/// Rank of every corner node in the AMD ordering of the corner graph.
fn corner_order(corners: impl Iterator<Item = [usize; 3]>, n: usize) -> Option<Vec<u32>> {
    let (offsets, rows) = corner_graph(corners, n);
    let graph = SymbolicSparseColMatRef::new_checked(n, n, &offsets, None, &rows);
    let mut perm = vec![0u32; n];
    let mut inverse = vec![0u32; n];
    let mut buffer = MemBuffer::try_new(amd::order_scratch::<u32>(n, rows.len())).ok()?;
    amd::order(&mut perm, &mut inverse, graph, Default::default(), MemStack::new(&mut buffer)).ok()?;
    Some(inverse)
}

/// The strictly lower triangle of the corner adjacency, by columns, sorted.
fn corner_graph(corners: impl Iterator<Item = [usize; 3]>, n: usize) -> (Vec<u32>, Vec<u32>) {
    let mut pairs: Vec<(u32, u32)> = Vec::with_capacity(3 * corners.size_hint().0);
    for t in corners {
        for [a, b] in EDGES {
            let (lo, hi) = (t[a].min(t[b]), t[a].max(t[b]));
            pairs.push((lo as u32, hi as u32));
        }
    }
    rayon::slice::ParallelSliceMut::par_sort_unstable(&mut pairs[..]);
    pairs.dedup();
    let mut offsets = vec![0u32; n + 1];
    for &(col, _) in &pairs {
        offsets[col as usize + 1] += 1;
    }
    for c in 0..n {
        offsets[c + 1] += offsets[c];
    }
    (offsets, pairs.into_iter().map(|(_, row)| row).collect())
}
