//! Sparse Cholesky by faer: the symbolic analysis (fill-reducing ordering,
//! elimination tree, supernodes) is done once per pattern and reused for
//! every numeric factorization, which also reuses its value buffer.

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::sparse::linalg::cholesky::{factorize_symbolic_cholesky, LltRef, SymbolicCholesky, SymbolicCholeskyRaw, SymmetricOrdering};
use faer::sparse::{SparseColMatRef, SymbolicSparseColMatRef};
use faer::{Conj, MatMut, Par, Side};
use nalgebra_sparse::{pattern::SparsityPattern, CscMatrix};
use rayon::iter::{IntoParallelRefIterator, ParallelIterator};

/// Why a linear solve failed.
#[derive(Clone, Debug, PartialEq)]
pub enum LinearError {
    /// The matrix is not positive definite: a region without a reference
    /// potential, or a non-physical material.
    NotPositiveDefinite,
    /// The factor would not fit in memory.
    OutOfMemory,
}

/// How the symbolic analysis orders the elimination.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Elimination {
    /// The unknowns are already numbered in a fill-reducing order (made
    /// from the mesh by `ordering`): no permutation, so none is applied to
    /// the matrix at each numeric factorization.
    AsNumbered,
    /// The approximate minimum degree ordering of the matrix pattern.
    MinimumDegree,
}

/// A reusable factorization of one sparsity pattern.
pub struct CholeskySolver {
    /// With 32-bit indices: the factor's row indices are read at every
    /// substitution, and half their width is less memory traffic.
    symbolic: SymbolicCholesky<u32>,
    /// The matrix pattern's column offsets and row indices in 32 bits, as
    /// the numeric factorization reads them with the symbolic structure's index type.
    offsets: Vec<u32>,
    rows: Vec<u32>,
    /// Workspace of the numeric factorization, kept for the next one (its
    /// pages are then already mapped); sized for either precision.
    scratch: Option<MemBuffer>,
}

/// A pattern's column offsets and row indices in 32 bits; None when they do not fit.
fn narrowed(offsets: &[usize], rows: &[usize]) -> Option<(Vec<u32>, Vec<u32>)> {
    let narrow = |v: &[usize]| v.par_iter().map(|&x| u32::try_from(x).ok()).collect::<Option<Vec<u32>>>();
    Some((narrow(offsets)?, narrow(rows)?))
}

/// The factorization runs on one thread: on two cores faer's parallel
/// factorization measured slower than the sequential one.
const PAR: Par = Par::Seq;

/// The symbolic analysis's settings: the supernodal factorization from a
/// flop-to-entry ratio of 20 (faer's own choice starts at 40). The matrices
/// of 2D elements sit between the two from about 7 000 to 35 000 unknowns,
/// where faer chose the simplicial factorization: forced supernodal there,
/// factorization and solve took 25 to 40 % less time (18 000 and 34 000
/// unknowns, medians of 5 interleaved runs; 12 % more, 0.7 ms, at 7 000),
/// though the supernodes' padding stores 40 % more entries.
fn symbolic_params<'a>() -> faer::sparse::linalg::cholesky::CholeskySymbolicParams<'a> {
    faer::sparse::linalg::cholesky::CholeskySymbolicParams {
        supernodal_flop_ratio_threshold: faer::sparse::linalg::SupernodalThreshold(0.5),
        ..Default::default()
    }
}

impl CholeskySolver {
    /// Symbolic analysis of the lower triangle: elimination in the order
    /// the unknowns are numbered, or by the approximate minimum degree
    /// ordering of this pattern (P. R. Amestoy, T. A. Davis, I. S. Duff,
    /// SIAM J. Matrix Anal. Appl. 17(4), 1996). At 1e6 quadratic unknowns
    /// the mesh's ordering took 0.6 s of analysis against 2.5 s for AMD of
    /// the matrix, and its factor was 12 to 42 % smaller (tests/tests/ordering.rs). Geometric nested
    /// dissection (the straight cut with the smallest separator between 30
    /// and 70 % of each set) was tried: it factorized no faster than AMD and
    /// took longer to order.
    pub fn analyse(pattern: &SparsityPattern, elimination: Elimination) -> Result<CholeskySolver, LinearError> {
        let n = pattern.major_dim();
        let (offsets, rows) = narrowed(pattern.major_offsets(), pattern.minor_indices()).ok_or(LinearError::OutOfMemory)?;
        let symbolic = match elimination {
            Elimination::AsNumbered => {
                // Without a permutation faer reads the pattern as the upper
                // triangle whatever side it is told (faer 0.24), so it is
                // handed the transpose.
                let (t_offsets, t_rows) = transposed(n, &offsets, &rows);
                let view = SymbolicSparseColMatRef::new_checked(n, n, &t_offsets, None, &t_rows);
                factorize_symbolic_cholesky(view, Side::Upper, SymmetricOrdering::Identity, symbolic_params())
            }
            Elimination::MinimumDegree => {
                let view = SymbolicSparseColMatRef::new_checked(n, n, &offsets, None, &rows);
                factorize_symbolic_cholesky(view, Side::Lower, SymmetricOrdering::Amd, symbolic_params())
            }
        }
        .map_err(|_| LinearError::OutOfMemory)?;
        Ok(CholeskySolver {
            symbolic,
            offsets,
            rows,
            scratch: None,
        })
    }

    /// Entries the Cholesky factor stores (its fill, padding of the supernodes included).
    pub fn factor_entries(&self) -> usize {
        self.symbolic.len_val()
    }

    /// Numeric factorization of the current values in double precision;
    /// `reuse` hands back an earlier factor whose memory is taken over.
    pub fn factorize(&mut self, m: &CscMatrix<f64>, reuse: Option<Factor>) -> Result<Factor, LinearError> {
        let reused = match reuse {
            Some(Factor::Double(v)) => v,
            _ => Vec::new(),
        };
        let values = self.numeric(m.values(), reused)?;
        Ok(Factor::Double(values))
    }

    /// Numeric factorization of the current values rounded to single
    /// precision: a preconditioner (for conjugate gradients in double
    /// precision), with half the memory traffic and faster dense kernels.
    /// Fails like `factorize` when the rounded matrix is not positive definite.
    pub fn factorize_single(&mut self, m: &CscMatrix<f64>, reuse: Option<Factor>) -> Result<Factor, LinearError> {
        let reused = match reuse {
            Some(Factor::Single(v)) => v,
            _ => Vec::new(),
        };
        let rounded: Vec<f32> = m.values().par_iter().map(|&v| v as f32).collect();
        let values = self.numeric(&rounded, reused)?;
        Ok(Factor::Single(values))
    }

    /// The numeric factorization of the matrix with entries `entries` (on
    /// the analysed pattern) into `values` (reused when of the right length).
    fn numeric<T: faer::traits::ComplexField + Copy + Default + Send + Sync>(&mut self, entries: &[T], mut values: Vec<T>) -> Result<Vec<T>, LinearError> {
        let n = self.offsets.len() - 1;
        debug_assert_eq!(entries.len(), self.rows.len(), "values for another pattern than the analysed one");
        let a = SparseColMatRef::new(SymbolicSparseColMatRef::new_checked(n, n, &self.offsets, None, &self.rows), entries);
        let len = self.symbolic.len_val();
        // faer zero-fills the values itself: a reused buffer of the right length is taken as it is.
        // A fresh one is filled on every core: at 1e6 unknowns the first touch of its pages
        // took 40 % of a sequential factorization.
        if values.len() != len {
            values = crate::buffer::zeroed(len).ok_or(LinearError::OutOfMemory)?;
        }
        let mut buffer = match self.scratch.take() {
            Some(b) => b,
            // Enough for either precision, so that one buffer serves both.
            None => MemBuffer::try_new(
                self.symbolic
                    .factorize_numeric_llt_scratch::<f64>(PAR, Default::default())
                    .or(self.symbolic.factorize_numeric_llt_scratch::<f32>(PAR, Default::default())),
            )
            .map_err(|_| LinearError::OutOfMemory)?,
        };
        let outcome = self
            .symbolic
            .factorize_numeric_llt::<T>(
                &mut values,
                a,
                Side::Lower,
                Default::default(),
                PAR,
                MemStack::new(&mut buffer),
                Default::default(),
            )
            .map(|_| ());
        self.scratch = Some(buffer);
        outcome.map_err(|_| LinearError::NotPositiveDefinite)?;
        Ok(values)
    }

    /// Solves in place with `factor` (made by this solver): `rhs` becomes the
    /// solution (in double precision; a single-precision factor's solve is
    /// done on a rounded copy).
    pub fn solve(&self, factor: &Factor, rhs: &mut [f64]) {
        self.solve_in(factor, rhs, &mut Vec::new());
    }

    /// `solve`, with `rounded` holding a single-precision factor's rounded
    /// right-hand side, kept by the caller from one solve to the next (the
    /// conjugate-gradient iterations solve once each).
    pub fn solve_in(&self, factor: &Factor, rhs: &mut [f64], rounded: &mut Vec<f32>) {
        match factor {
            Factor::Double(values) => self.solve_with(values, rhs),
            Factor::Single(values) => {
                rounded.clear();
                rounded.extend(rhs.iter().map(|&v| v as f32));
                self.solve_with(values, rounded);
                rhs.iter_mut().zip(rounded.iter()).for_each(|(x, &y)| *x = f64::from(y));
            }
        }
    }

    /// The substitution: this project's own through a supernodal factor
    /// (`substitution`), faer's through a simplicial one.
    fn solve_with<T: faer::traits::ComplexField + Copy + crate::substitution::Real>(&self, values: &[T], rhs: &mut [T]) {
        let SymbolicCholeskyRaw::Supernodal(supernodal) = self.symbolic.raw() else {
            return self.faer_solve_with(values, rhs);
        };
        let mut work = Vec::new();
        match self.symbolic.perm() {
            None => crate::substitution::solve_in_place(supernodal, values, rhs, &mut work),
            Some(perm) => {
                // As faer applies it: x_i = b_fwd(i) before, b_i = x_inv(i) after.
                let (fwd, inv) = perm.arrays();
                let mut x: Vec<T> = fwd.iter().map(|&f| rhs[f as usize]).collect();
                crate::substitution::solve_in_place(supernodal, values, &mut x, &mut work);
                rhs.iter_mut().zip(inv).for_each(|(r, &i)| *r = x[i as usize]);
            }
        }
    }

    /// faer's substitution, whatever the factor's kind.
    fn faer_solve_with<T: faer::traits::ComplexField + Copy>(&self, values: &[T], rhs: &mut [T]) {
        let n = rhs.len();
        let mat = MatMut::from_column_major_slice_mut(rhs, n, 1);
        let scratch = self.symbolic.solve_in_place_scratch::<T>(1, PAR);
        let Ok(mut buffer) = MemBuffer::try_new(scratch) else {
            // The solve needs one column of workspace; without it the answer stays unknown.
            mat.col_mut(0).iter_mut().for_each(|v| *v = T::nan_impl());
            return;
        };
        LltRef::new(&self.symbolic, values).solve_in_place_with_conj(Conj::No, mat, PAR, MemStack::new(&mut buffer));
    }
}

/// The pattern of the transpose (upper triangle by columns), rows sorted.
fn transposed(n: usize, col_offsets: &[u32], row_indices: &[u32]) -> (Vec<u32>, Vec<u32>) {
    let mut offsets = vec![0u32; n + 1];
    for &r in row_indices {
        offsets[r as usize + 1] += 1;
    }
    for c in 0..n {
        offsets[c + 1] += offsets[c];
    }
    let mut fill = offsets.clone();
    let mut rows = vec![0u32; row_indices.len()];
    for c in 0..n {
        for &r in &row_indices[col_offsets[c] as usize..col_offsets[c + 1] as usize] {
            rows[fill[r as usize] as usize] = c as u32;
            fill[r as usize] += 1;
        }
    }
    (offsets, rows)
}

/// The numeric values of a factorization, used with the solver that made them.
pub enum Factor {
    /// In double precision: solves exactly.
    Double(Vec<f64>),
    /// Rounded to single precision: a preconditioner only.
    Single(Vec<f32>),
}

/// y = M x for a symmetric matrix held as its lower triangle by columns:
/// the pattern of `m` with entries `values` (the matrix's own, or another
/// set on the same pattern). Columns are split between threads, each adding
/// into its own copy of y.
pub fn symmetric_product(m: &CscMatrix<f64>, values: &[f64], x: &[f64]) -> Vec<f64> {
    use rayon::prelude::*;
    let n = m.ncols();
    let (offsets, rows) = (m.col_offsets(), m.row_indices());
    let parts = rayon::current_num_threads().clamp(1, 8);
    let columns = |range: std::ops::Range<usize>| {
        let mut y = vec![0.0; n];
        for c in range {
            // Rows are sorted and unique (a CSC invariant), so the diagonal,
            // if held, comes first and every later row is below it.
            let (mut start, end, xc) = (offsets[c], offsets[c + 1], x[c]);
            let mut sum = 0.0;
            if start < end && rows[start] == c {
                sum = values[start] * xc;
                start += 1;
            }
            for (&r, &v) in rows[start..end].iter().zip(&values[start..end]) {
                y[r] += v * xc;
                sum += v * x[r];
            }
            y[c] += sum;
        }
        y
    };
    if parts == 1 || n < 20_000 {
        return columns(0..n);
    }
    (0..parts)
        .into_par_iter()
        .map(|p| columns(p * n / parts..(p + 1) * n / parts))
        .reduce_with(|mut a, b| {
            a.iter_mut().zip(&b).for_each(|(x, y)| *x += y);
            a
        })
        .unwrap_or_else(|| vec![0.0; n])
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra_sparse::CooMatrix;

    fn lower_csc(n: usize, entries: &[(usize, usize, f64)]) -> CscMatrix<f64> {
        let mut coo = CooMatrix::new(n, n);
        entries.iter().for_each(|&(r, c, v)| coo.push(r, c, v));
        CscMatrix::from(&coo)
    }

    /// Against the product with the full symmetric matrix written out, on a
    /// small matrix with one column lacking its diagonal, and on a
    /// tridiagonal one large enough to be split between threads.
    #[test]
    fn symmetric_product_matches_the_full_matrix() {
        let entries = [(0, 0, 4.0), (2, 0, -1.5), (1, 1, 3.0), (3, 1, 0.5), (3, 2, 2.0), (3, 3, 5.0)];
        let m = lower_csc(4, &entries);
        let x = [1.0, -2.0, 0.5, 3.0];
        let mut full = [[0.0; 4]; 4];
        for &(r, c, v) in &entries {
            full[r][c] = v;
            full[c][r] = v;
        }
        let want: Vec<f64> = full.iter().map(|row| row.iter().zip(&x).map(|(a, b)| a * b).sum()).collect();
        assert_eq!(symmetric_product(&m, m.values(), &x), want);

        let n = 25_000;
        let diag = |i: usize| 2.0 + 1e-3 * i as f64;
        let mut tri = Vec::new();
        for i in 0..n {
            tri.push((i, i, diag(i)));
            if i + 1 < n {
                tri.push((i + 1, i, -1.0));
            }
        }
        let m = lower_csc(n, &tri);
        let x: Vec<f64> = (0..n).map(|i| (i as f64).sin()).collect();
        let y = symmetric_product(&m, m.values(), &x);
        for i in 0..n {
            let left = if i > 0 { x[i - 1] } else { 0.0 };
            let right = if i + 1 < n { x[i + 1] } else { 0.0 };
            let want = diag(i) * x[i] - left - right;
            assert!((y[i] - want).abs() <= 1e-12 * (1.0 + want.abs()), "row {i}: {} against {want}", y[i]);
        }
    }

    /// The lower triangle of a 9-point stencil on a k x k grid with a
    /// varying positive shift: symmetric positive definite, with supernodes
    /// of several columns (as element matrices have).
    fn grid_matrix(k: usize) -> CscMatrix<f64> {
        let id = |i: usize, j: usize| i * k + j;
        let mut entries = Vec::new();
        for i in 0..k {
            for j in 0..k {
                entries.push((id(i, j), id(i, j), 8.5 + ((i * 7 + j * 3) % 11) as f64 * 0.1));
                for (di, dj) in [(0, 1), (1, -1), (1, 0), (1, 1)] {
                    let (ni, nj) = (i + di, j as i64 + dj);
                    if ni < k && (0..k as i64).contains(&nj) {
                        entries.push((id(ni, nj as usize), id(i, j), -1.0));
                    }
                }
            }
        }
        lower_csc(k * k, &entries)
    }

    /// The project's substitution through a supernodal factor gives faer's
    /// answer (to rounding) in both elimination orders and both precisions,
    /// and solves the system (its residual at double precision's level).
    #[test]
    fn own_substitution_matches_faers() {
        let m = grid_matrix(120);
        let n = m.nrows();
        let b: Vec<f64> = (0..n).map(|i| (0.37 * i as f64).sin() + 0.1).collect();
        for elimination in [Elimination::AsNumbered, Elimination::MinimumDegree] {
            let mut solver = CholeskySolver::analyse(m.pattern(), elimination).unwrap();
            assert!(
                matches!(solver.symbolic.raw(), SymbolicCholeskyRaw::Supernodal(_)),
                "{elimination:?}: the test needs a supernodal factor"
            );
            let Factor::Double(values) = solver.factorize(&m, None).unwrap() else {
                unreachable!()
            };
            let (mut own, mut faer) = (b.clone(), b.clone());
            solver.solve_with(&values, &mut own);
            solver.faer_solve_with(&values, &mut faer);
            let scale = faer.iter().fold(0.0f64, |a, v| a.max(v.abs()));
            let apart = own.iter().zip(&faer).fold(0.0f64, |a, (x, y)| a.max((x - y).abs()));
            assert!(apart <= 1e-13 * scale, "{elimination:?}: own and faer's apart by {apart:e} of {scale:e}");
            let residual = symmetric_product(&m, m.values(), &own);
            let worst = residual.iter().zip(&b).fold(0.0f64, |a, (r, b)| a.max((r - b).abs()));
            assert!(worst <= 1e-12, "{elimination:?}: residual {worst:e}");

            let Factor::Single(values) = solver.factorize_single(&m, None).unwrap() else {
                unreachable!()
            };
            let rounded: Vec<f32> = b.iter().map(|&v| v as f32).collect();
            let (mut own, mut faer) = (rounded.clone(), rounded);
            solver.solve_with(&values, &mut own);
            solver.faer_solve_with(&values, &mut faer);
            let scale = faer.iter().fold(0.0f32, |a, v| a.max(v.abs()));
            let apart = own.iter().zip(&faer).fold(0.0f32, |a, (x, y)| a.max((x - y).abs()));
            assert!(apart <= 1e-5 * scale, "{elimination:?}, single: own and faer's apart by {apart:e} of {scale:e}");
        }
    }
}
