//! The sparsity pattern of the system matrix (lower triangle, by columns)
//! and the scatter map from element entries to matrix slots, built once per
//! mesh from the elements each unknown belongs to: every column is gathered
//! on its own, so the columns are split between threads.

use crate::element::MAX_NODES;
use crate::space::{Elements, NONE};
use nalgebra_sparse::pattern::SparsityPattern;
use rayon::prelude::*;
use std::sync::atomic::{AtomicU32, Ordering};

/// Marks an element entry that has no slot.
pub const NO_SLOT: u32 = u32::MAX;
/// The matrix would need more entries than a 32-bit slot addresses (or its
/// pattern could not be formed): the mesh is far too fine.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SystemTooLarge {
    /// Entries the matrix would have.
    pub entries: usize,
}

/// Columns handed to a thread at a time.
const COLUMN_CHUNK: usize = 4096;

/// The pattern of the `n` unknowns numbered by `dof_of_node`, and for element
/// e, node pair i <= j, the slot of the matrix value (NO_SLOT at a fixed
/// node): see `columns_and_slots`.
pub fn build_pattern(els: &Elements, dof_of_node: &[usize], n: usize) -> Result<(SparsityPattern, Vec<u32>), SystemTooLarge> {
    let m = els.order.n_nodes();
    if els.len() >= u32::MAX as usize {
        return Err(SystemTooLarge { entries: els.len() });
    }
    let dofs: Vec<[usize; MAX_NODES]> = (0..els.len()).into_par_iter().map(|e| element_dofs(els, dof_of_node, e)).collect();
    let (first, incident) = elements_of_unknowns(&dofs, m, n);
    let (offsets, indices, scatter) = columns_and_slots(&dofs, m, &first, &incident)?;
    drop((first, incident));
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

/// Element node pairs (i <= j) held by the scatter map per element of m nodes.
pub fn pairs(m: usize) -> usize {
    m * (m + 1) / 2
}

/// Index of node pair (i, j), i <= j, in the order `for i, for j in i..m`.
fn pair_index(i: usize, j: usize, m: usize) -> usize {
    i * m - i * (i.saturating_sub(1)) / 2 + (j - i)
}

/// Column offsets, row indices and the scatter map.
type ColumnsAndSlots = (Vec<usize>, Vec<usize>, Vec<u32>);

/// Each column's rows (the diagonal and the unknowns below it that share an
/// element), sorted, as offsets and row indices; and the scatter map: for
/// element e, node pair i <= j (in the order `for i, for j in i..m`), the
/// slot of the lower-triangle entry of its two unknowns (NO_SLOT at a fixed
/// node). An element matrix is symmetric, so the upper half of it needs no
/// slots of its own (36 slots an element took 151 MB at 1e6 unknowns, 21
/// take 88).
///
/// A pair's slot is found while its column is built, in that column's short
/// row list still in cache: searching the finished index array instead
/// (one random access into 56 MB a pair at 1e6 unknowns) took as long as
/// building the columns. Every pair belongs to exactly one column (that of
/// its smaller unknown), so the threads never write the same slot; the
/// slots are first counted from their chunk's start, then shifted by it.
fn columns_and_slots(dofs: &[[usize; MAX_NODES]], m: usize, first: &[usize], incident: &[u32]) -> Result<ColumnsAndSlots, SystemTooLarge> {
    let n = first.len() - 1;
    let stride = pairs(m);
    let local: Vec<AtomicU32> = (0..dofs.len() * stride).into_par_iter().map(|_| AtomicU32::new(NO_SLOT)).collect();
    let chunks: Vec<(Vec<usize>, Vec<usize>)> = (0..n.div_ceil(COLUMN_CHUNK))
        .into_par_iter()
        .map(|p| {
            let cols = p * COLUMN_CHUNK..((p + 1) * COLUMN_CHUNK).min(n);
            let mut lengths = Vec::with_capacity(cols.len());
            let mut rows = Vec::with_capacity(12 * cols.len());
            for c in cols {
                let start = rows.len();
                column_rows(dofs, m, c, &incident[first[c]..first[c + 1]], &mut rows);
                for &e in &incident[first[c]..first[c + 1]] {
                    record_slots(&dofs[e as usize][..m], c, &rows[start..], start, &local[e as usize * stride..][..stride]);
                }
                lengths.push(rows.len() - start);
            }
            (lengths, rows)
        })
        .collect();
    let mut offsets = Vec::with_capacity(n + 1);
    offsets.push(0);
    let mut chunk_start = Vec::with_capacity(chunks.len());
    let mut indices = Vec::with_capacity(chunks.iter().map(|(_, r)| r.len()).sum());
    for (lengths, rows) in chunks {
        chunk_start.push(indices.len());
        for l in lengths {
            offsets.push(offsets[offsets.len() - 1] + l);
        }
        indices.extend_from_slice(&rows);
    }
    // Every slot (a chunk's count included) is below the total, so none wrapped in 32 bits.
    if indices.len() >= NO_SLOT as usize {
        return Err(SystemTooLarge { entries: indices.len() });
    }
    let scatter = shift_slots(dofs, m, local, &chunk_start);
    Ok((offsets, indices, scatter))
}

/// Appends column c's rows to `rows`: c itself, then the unknowns below it
/// in the elements `incident` to it, sorted and without repeats.
fn column_rows(dofs: &[[usize; MAX_NODES]], m: usize, c: usize, incident: &[u32], rows: &mut Vec<usize>) {
    let start = rows.len();
    rows.push(c);
    for &e in incident {
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
}

/// The slots (counted from the chunk's start, `column` starting at
/// `column_start`) of the element pairs whose smaller unknown is c.
fn record_slots(d: &[usize], c: usize, column: &[usize], column_start: usize, slots: &[AtomicU32]) {
    let Some(i) = d.iter().position(|&k| k == c) else { return };
    for (j, &r) in d.iter().enumerate() {
        if r != NONE && r >= c {
            let at = column_start + column.binary_search(&r).unwrap_or(0);
            slots[pair_index(i.min(j), i.max(j), d.len())].store(at as u32, Ordering::Relaxed);
        }
    }
}

/// The scatter map with every slot shifted by its column's chunk start.
fn shift_slots(dofs: &[[usize; MAX_NODES]], m: usize, local: Vec<AtomicU32>, chunk_start: &[usize]) -> Vec<u32> {
    let stride = pairs(m);
    let mut out = vec![NO_SLOT; local.len()];
    out.par_chunks_mut(stride)
        .zip(dofs.par_iter())
        .zip(local.par_chunks(stride))
        .for_each(|((s, d), local)| {
            let mut k = 0;
            for i in 0..m {
                for j in i..m {
                    let at = local[k].load(Ordering::Relaxed);
                    if at != NO_SLOT {
                        s[k] = at + chunk_start[d[i].min(d[j]) / COLUMN_CHUNK] as u32;
                    }
                    k += 1;
                }
            }
        });
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The pair index is the position in the loop `for i, for j in i..m`
    /// that the assembly's scatter follows, for every element order.
    #[test]
    fn pair_index_follows_the_scatter_loop() {
        for m in [3, 6, 10, MAX_NODES] {
            let mut k = 0;
            for i in 0..m {
                for j in i..m {
                    assert_eq!(pair_index(i, j, m), k, "pair ({i}, {j}) of {m} nodes");
                    k += 1;
                }
            }
            assert_eq!(k, pairs(m));
        }
    }
}
