//! Forward and back substitution through a supernodal Cholesky factor
//! L L^T, one right-hand side, in plain loops.
//!
//! Conjugate gradients preconditioned with an old or single-precision
//! factor substitute once per iteration. faer's substitution runs each
//! supernode through its general dense kernels (a triangular solve and a
//! matrix product sized for many right-hand sides); the supernodes of 2D
//! element matrices hold a few columns each, so the kernels' set-up
//! outweighed their arithmetic. Here each supernode's columns are walked
//! as contiguous slices (the factor stores a supernode column by column:
//! its dense diagonal block, then the rows of its pattern), which the
//! compiler vectorizes. The same operations as faer's, their sums taken in
//! another order: results agree to rounding (linear_system's tests).

use faer::sparse::linalg::cholesky::supernodal::SymbolicSupernodalCholesky;
use std::ops::{Add, Div, Mul, Sub};

/// The arithmetic the substitution needs (f32 and f64).
pub(crate) trait Real: Copy + Default + Add<Output = Self> + Mul<Output = Self> + Sub<Output = Self> + Div<Output = Self> {}

impl Real for f32 {}
impl Real for f64 {}

/// Solves L L^T x = b in place (`x` holds b on entry), in the factor's
/// own elimination order (a permutation, if any, is the caller's).
/// `work` is scratch, reused from one supernode to the next.
pub(crate) fn solve_in_place<T: Real>(symbolic: &SymbolicSupernodalCholesky<u32>, values: &[T], x: &mut [T], work: &mut Vec<T>) {
    forward(symbolic, values, x, work);
    backward(symbolic, values, x, work);
}

/// A supernode: its first column, its columns' count, its pattern (the
/// rows below its diagonal block) and its values (column-major, rows of
/// the diagonal block first).
struct Supernode<'a, T> {
    start: usize,
    ncols: usize,
    pattern: &'a [u32],
    values: &'a [T],
}

impl<'a, T> Supernode<'a, T> {
    fn of(symbolic: &'a SymbolicSupernodalCholesky<u32>, values: &'a [T], s: usize) -> Supernode<'a, T> {
        let node = symbolic.supernode(s);
        let start = node.start();
        let ncols = symbolic.supernode_end()[s] as usize - start;
        let offsets = symbolic.col_ptr_for_val();
        Supernode {
            start,
            ncols,
            pattern: node.pattern(),
            values: &values[offsets[s] as usize..offsets[s + 1] as usize],
        }
    }

    /// Rows of the supernode's block: its own columns, then its pattern.
    fn nrows(&self) -> usize {
        self.ncols + self.pattern.len()
    }

    /// Column j of the block, from its diagonal entry down.
    fn column_from_diagonal(&self, j: usize) -> &'a [T] {
        let rows = self.nrows();
        &self.values[j * rows + j..(j + 1) * rows]
    }
}

/// L y = b: each supernode's columns in turn; `w` holds the supernode's
/// unknowns, then the updates to the rows of its pattern.
fn forward<T: Real>(symbolic: &SymbolicSupernodalCholesky<u32>, values: &[T], x: &mut [T], w: &mut Vec<T>) {
    for s in 0..symbolic.n_supernodes() {
        let node = Supernode::of(symbolic, values, s);
        let (start, ncols) = (node.start, node.ncols);
        w.clear();
        w.extend_from_slice(&x[start..start + ncols]);
        w.resize(node.nrows(), T::default());
        for j in 0..ncols {
            let column = node.column_from_diagonal(j);
            let yj = w[j] / column[0];
            w[j] = yj;
            for (wi, &l) in w[j + 1..].iter_mut().zip(&column[1..]) {
                *wi = *wi - l * yj;
            }
        }
        x[start..start + ncols].copy_from_slice(&w[..ncols]);
        for (&row, &update) in node.pattern.iter().zip(&w[ncols..]) {
            let row = row as usize;
            x[row] = x[row] + update;
        }
    }
}

/// L^T x = y: the supernodes in reverse; `w` holds the supernode's
/// unknowns, then the (already solved) unknowns of its pattern's rows.
fn backward<T: Real>(symbolic: &SymbolicSupernodalCholesky<u32>, values: &[T], x: &mut [T], w: &mut Vec<T>) {
    for s in (0..symbolic.n_supernodes()).rev() {
        let node = Supernode::of(symbolic, values, s);
        let (start, ncols) = (node.start, node.ncols);
        w.clear();
        w.extend_from_slice(&x[start..start + ncols]);
        w.extend(node.pattern.iter().map(|&row| x[row as usize]));
        for j in (0..ncols).rev() {
            let column = node.column_from_diagonal(j);
            w[j] = (w[j] - dot(&column[1..], &w[j + 1..])) / column[0];
        }
        x[start..start + ncols].copy_from_slice(&w[..ncols]);
    }
}

/// The dot product of two slices of equal length, in four running sums so
/// that the compiler may vectorize it (one sum would fix the order of
/// every addition).
fn dot<T: Real>(a: &[T], b: &[T]) -> T {
    let mut lanes = [T::default(); 4];
    let (a4, b4) = (a.chunks_exact(4), b.chunks_exact(4));
    let (a_rest, b_rest) = (a4.remainder(), b4.remainder());
    for (x, y) in a4.zip(b4) {
        for k in 0..4 {
            lanes[k] = lanes[k] + x[k] * y[k];
        }
    }
    let tail = a_rest.iter().zip(b_rest).fold(T::default(), |s, (&x, &y)| s + x * y);
    (lanes[0] + lanes[1]) + (lanes[2] + lanes[3]) + tail
}
