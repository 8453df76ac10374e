//! Sparse Cholesky by faer with AMD ordering: the symbolic analysis is done
//! once per pattern and reused for every numeric factorization.

use faer::linalg::solvers::Solve;
use faer::sparse::linalg::solvers::{Llt, SymbolicLlt};
use faer::sparse::{SparseColMatRef, SymbolicSparseColMatRef};
use faer::{MatMut, Side};
use nalgebra_sparse::CscMatrix;

/// Why a linear solve failed.
#[derive(Clone, Debug, PartialEq)]
pub enum LinearError {
    /// The matrix is not positive definite: a region without a reference
    /// potential, or a non-physical material.
    NotPositiveDefinite,
    OutOfMemory,
}

/// A reusable factorization of one sparsity pattern.
pub struct CholeskySolver {
    symbolic: SymbolicLlt<usize>,
}

fn view(m: &CscMatrix<f64>) -> SparseColMatRef<'_, usize, f64> {
    let n = m.nrows();
    let sym = SymbolicSparseColMatRef::new_checked(n, n, m.col_offsets(), None, m.row_indices());
    SparseColMatRef::new(sym, m.values())
}

impl CholeskySolver {
    /// Symbolic analysis (fill-reducing ordering and elimination tree) of the lower triangle.
    pub fn analyse(m: &CscMatrix<f64>) -> Result<CholeskySolver, LinearError> {
        faer::set_global_parallelism(faer::Par::Seq);
        let symbolic = SymbolicLlt::try_new(view(m).symbolic(), Side::Lower).map_err(|_| LinearError::OutOfMemory)?;
        Ok(CholeskySolver { symbolic })
    }

    /// Numeric factorization of the current values.
    pub fn factorize(&self, m: &CscMatrix<f64>) -> Result<Factor, LinearError> {
        let llt = Llt::try_new_with_symbolic(self.symbolic.clone(), view(m), Side::Lower).map_err(|_| LinearError::NotPositiveDefinite)?;
        Ok(Factor { llt })
    }
}

/// A numeric factorization ready to solve.
pub struct Factor {
    llt: Llt<usize, f64>,
}

impl Factor {
    /// Solves in place: `rhs` becomes the solution.
    pub fn solve(&self, rhs: &mut [f64]) {
        let n = rhs.len();
        let mat = MatMut::from_column_major_slice_mut(rhs, n, 1);
        self.llt.solve_in_place(mat);
    }
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
            let mut sum = 0.0;
            for (&r, &v) in rows[offsets[c]..offsets[c + 1]].iter().zip(&values[offsets[c]..offsets[c + 1]]) {
                if r == c {
                    sum += v * x[c];
                } else {
                    y[r] += v * x[c];
                    sum += v * x[r];
                }
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
