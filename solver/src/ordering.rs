//! Fill-reducing ordering of the unknowns from the mesh itself: the
//! approximate minimum degree ordering of the corner graph (a quarter of the
//! quadratic element's unknowns and a sixth of its matrix entries), each
//! edge-midpoint unknown then placed just before the first of its two
//! corners to be eliminated. Eliminating a corner together with the edges it
//! opens couples the same fan of triangles that the corner alone couples in
//! the linear graph, so the ordering keeps the corner graph's fill pattern.

use crate::assembly::{Elements, NONE};
use crate::element::{ElementOrder, EDGES};
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::sparse::linalg::amd;
use faer::sparse::SymbolicSparseColMatRef;

/// `perm[k]` is the unknown eliminated k-th. `None` for linear elements
/// (their corner graph is the matrix graph: nothing to gain, and the fixed
/// corners it keeps made the factor 4 % larger) or when the workspace could
/// not be had; the caller then orders the assembled matrix instead.
pub fn fill_reducing_order(els: &Elements, dof_of_node: &[usize], n_dofs: usize) -> Option<Vec<usize>> {
    if els.order != ElementOrder::Quadratic {
        return None;
    }
    let n_corners = els.nodes.iter().flat_map(|t| t[..3].iter()).max().map_or(0, |&m| m + 1);
    let corner_rank = corner_order(els, n_corners)?;
    // Key of each unknown: twice its corner's rank (+1), or twice the rank of
    // the earlier of an edge's two corners (the edge goes first).
    let mut keyed: Vec<(u64, usize)> = Vec::with_capacity(n_dofs);
    let mut seen = vec![false; dof_of_node.len()];
    for t in &els.nodes {
        for &n in &t[..3] {
            if !seen[n] && dof_of_node[n] != NONE {
                keyed.push((2 * corner_rank[n] as u64 + 1, dof_of_node[n]));
            }
            seen[n] = true;
        }
        for (k, [a, b]) in EDGES.iter().enumerate() {
            let n = t[3 + k];
            if !seen[n] && dof_of_node[n] != NONE {
                let first = corner_rank[t[*a]].min(corner_rank[t[*b]]);
                keyed.push((2 * first as u64, dof_of_node[n]));
            }
            seen[n] = true;
        }
    }
    if keyed.len() != n_dofs {
        return None;
    }
    keyed.sort_unstable();
    Some(keyed.into_iter().map(|(_, d)| d).collect())
}

/// Rank of every corner node in the AMD ordering of the corner graph.
fn corner_order(els: &Elements, n: usize) -> Option<Vec<u32>> {
    let (offsets, rows) = corner_graph(els, n);
    let graph = SymbolicSparseColMatRef::new_checked(n, n, &offsets, None, &rows);
    let mut perm = vec![0u32; n];
    let mut inverse = vec![0u32; n];
    let mut buffer = MemBuffer::try_new(amd::order_scratch::<u32>(n, rows.len())).ok()?;
    amd::order(&mut perm, &mut inverse, graph, Default::default(), MemStack::new(&mut buffer)).ok()?;
    Some(inverse)
}

/// The strictly lower triangle of the corner adjacency, by columns, sorted.
fn corner_graph(els: &Elements, n: usize) -> (Vec<u32>, Vec<u32>) {
    let mut pairs: Vec<(u32, u32)> = Vec::with_capacity(3 * els.len());
    for t in &els.nodes {
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
