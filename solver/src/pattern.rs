//! The sparsity pattern of the system matrix (lower triangle, by columns)
//! and the scatter map from element entries to matrix slots, built once per
//! mesh from the elements each unknown belongs to: every column is gathered
//! on its own, so the columns are split between threads.

use crate::assembly::{Elements, SystemTooLarge, NONE, NO_SLOT};
use crate::element::MAX_NODES;
use nalgebra_sparse::pattern::SparsityPattern;
use rayon::prelude::*;

/// Columns handed to a thread at a time.
const COLUMN_CHUNK: usize = 4096;

/// The pattern of the `n` unknowns numbered by `dof_of_node`, and for element
/// e, node pair i <= j, the slot of the matrix value (NO_SLOT at a fixed
/// node): see `scatter_map`.
pub fn build_pattern(els: &Elements, dof_of_node: &[usize], n: usize) -> Result<(SparsityPattern, Vec<u32>), SystemTooLarge> {
    let m = els.order.n_nodes();
    if els.len() >= u32::MAX as usize {
        return Err(SystemTooLarge { entries: els.len() });
    }
    let dofs: Vec<[usize; MAX_NODES]> = (0..els.len()).into_par_iter().map(|e| element_dofs(els, dof_of_node, e)).collect();
    let (first, incident) = elements_of_unknowns(&dofs, m, n);
    let (offsets, indices) = columns(&dofs, m, &first, &incident);
    drop((first, incident));
    if indices.len() >= NO_SLOT as usize {
        return Err(SystemTooLarge { entries: indices.len() });
    }
    let scatter = scatter_map(&dofs, m, &offsets, &indices);
    let entries = indices.len();
    let pattern = SparsityPattern::try_from_offsets_and_indices(n, n, offsets, indices).map_err(|_| SystemTooLarge { entries })?;
    Ok((pattern, scatter))
}

/// Free unknowns of element e's nodes, NONE where fixed.
fn element_dofs(els: &Elements, dof_of_node: &[usize], e: usize) -> [usize; MAX_NODES] {
    let mut d = [NONE; MAX_NODES];
    for (k, &n) in els.element_nodes(e).iter().enumerate() {
        d[k] = dof_of_node[n];
    }
    d
}

/// For unknown d, the elements holding it: `incident[first[d]..first[d + 1]]`.
fn elements_of_unknowns(dofs: &[[usize; MAX_NODES]], m: usize, n: usize) -> (Vec<usize>, Vec<u32>) {
    let mut first = vec![0usize; n + 1];
    for d in dofs {
        for &k in d[..m].iter().filter(|&&k| k != NONE) {
            first[k + 1] += 1;
        }
    }
    for c in 0..n {
        first[c + 1] += first[c];
    }
    let mut fill = first.clone();
    let mut incident = vec![0u32; first[n]];
    for (e, d) in dofs.iter().enumerate() {
        for &k in d[..m].iter().filter(|&&k| k != NONE) {
            incident[fill[k]] = e as u32;
            fill[k] += 1;
        }
    }
    (first, incident)
}

/// Each column's rows (the diagonal and the unknowns below it that share an
/// element), sorted, as offsets and row indices.
fn columns(dofs: &[[usize; MAX_NODES]], m: usize, first: &[usize], incident: &[u32]) -> (Vec<usize>, Vec<usize>) {
    let n = first.len() - 1;
    let chunks: Vec<(Vec<usize>, Vec<usize>)> = (0..n.div_ceil(COLUMN_CHUNK))
        .into_par_iter()
        .map(|p| {
            let cols = p * COLUMN_CHUNK..((p + 1) * COLUMN_CHUNK).min(n);
            let mut lengths = Vec::with_capacity(cols.len());
            let mut rows = Vec::with_capacity(12 * cols.len());
            for c in cols {
                let start = rows.len();
                rows.push(c);
                for &e in &incident[first[c]..first[c + 1]] {
                    rows.extend(dofs[e as usize][..m].iter().filter(|&&r| r != NONE && r > c));
                }
                rows[start + 1..].sort_unstable();
                let mut kept = start + 1;
                for i in start + 1..rows.len() {
                    if rows[i] != rows[kept - 1] {
                        rows[kept] = rows[i];
                        kept += 1;
                    }
                }
                rows.truncate(kept);
                lengths.push(kept - start);
            }
            (lengths, rows)
        })
        .collect();
    let mut offsets = Vec::with_capacity(n + 1);
    offsets.push(0);
    let mut indices = Vec::with_capacity(chunks.iter().map(|(_, r)| r.len()).sum());
    for (lengths, rows) in chunks {
        for l in lengths {
            offsets.push(offsets[offsets.len() - 1] + l);
        }
        indices.extend_from_slice(&rows);
    }
    (offsets, indices)
}

/// Element node pairs (i <= j) held by the scatter map per element.
pub const PAIRS: usize = MAX_NODES * (MAX_NODES + 1) / 2;

/// The slot of every element's node pairs i <= j (in the order `for i, for j
/// in i..m`), each the lower-triangle entry of its two unknowns: an element
/// matrix is symmetric, so the upper half of it needs no slots of its own
/// (36 slots an element took 151 MB at 1e6 unknowns, 21 take 88).
fn scatter_map(dofs: &[[usize; MAX_NODES]], m: usize, offsets: &[usize], indices: &[usize]) -> Vec<u32> {
    // An indexed collect writes every element's block in place (a flat_map
    // grew the vector piece by piece: half of this function's time at 1e6).
    let blocks: Vec<[u32; PAIRS]> = dofs
        .par_iter()
        .map(|d| {
            let mut s = [NO_SLOT; PAIRS];
            let mut k = 0;
            for i in 0..m {
                for j in i..m {
                    let (row, col) = (d[i].max(d[j]), d[i].min(d[j]));
                    if row != NONE {
                        let rows = &indices[offsets[col]..offsets[col + 1]];
                        s[k] = (offsets[col] + rows.binary_search(&row).unwrap_or(0)) as u32;
                    }
                    k += 1;
                }
            }
            s
        })
        .collect();
    blocks.into_flattened()
}
