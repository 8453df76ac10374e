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
