//! Large fresh buffers, first touched on every core.
//!
//! On this project's virtual machines the first write to a fresh page costs
//! a kernel fault that clears it (about 5 microseconds a page): filling a
//! 100 MB buffer from one thread took longer than the arithmetic done in it
//! afterwards. Filling it in parallel halves that, and doing it once, up
//! front, keeps it out of the sequential loops that use the buffer.

use rayon::prelude::*;

/// A buffer of `len` default values, written on every core; None when the
/// memory cannot be had.
pub(crate) fn zeroed<T: Default + Copy + Send + Sync>(len: usize) -> Option<Vec<T>> {
    let mut v = Vec::new();
    v.try_reserve_exact(len).ok()?;
    v.par_extend(rayon::iter::repeat_n(T::default(), len));
    Some(v)
}

/// Copies `from` into `to` (equal lengths) on every core.
pub(crate) fn copy(to: &mut [f64], from: &[f64]) {
    const CHUNK: usize = 1 << 16;
    to.par_chunks_mut(CHUNK).zip(from.par_chunks(CHUNK)).for_each(|(t, f)| t.copy_from_slice(f));
}
