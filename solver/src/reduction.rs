//! Sums over elements on every core that come out the same to the last bit
//! on every run: the terms are summed in fixed chunks, and the chunk sums in
//! order (a work-stealing reduction would pair them differently from run to
//! run, and a `check` rerun would see its results move in the last digit).

use rayon::prelude::*;

/// Terms summed in one piece: enough to keep a core busy between hand-overs.
const CHUNK: usize = 2048;

/// The sum over k in 0..n of `term(k)` (K components).
pub(crate) fn ordered_sum<const K: usize>(n: usize, term: impl Fn(usize) -> [f64; K] + Sync) -> [f64; K] {
    let pieces: Vec<[f64; K]> = (0..n.div_ceil(CHUNK))
        .into_par_iter()
        .map(|c| {
            let mut s = [0.0; K];
            for k in c * CHUNK..((c + 1) * CHUNK).min(n) {
                let t = term(k);
                (0..K).for_each(|i| s[i] += t[i]);
            }
            s
        })
        .collect();
    pieces.iter().fold([0.0; K], |mut s, p| {
        (0..K).for_each(|i| s[i] += p[i]);
        s
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Gauss: 1 + 2 + ... + n = n (n + 1) / 2, exact in floating point at this size.
    #[test]
    fn sums_every_term_once() {
        let n = 10 * CHUNK + 7;
        let [s, c] = ordered_sum(n, |k| [(k + 1) as f64, 1.0]);
        assert_eq!(s, (n * (n + 1) / 2) as f64);
        assert_eq!(c, n as f64);
        assert_eq!(ordered_sum::<1>(0, |_| [1.0]), [0.0]);
    }

    /// Terms that round differently in every grouping give the same bits on
    /// one thread and on all of them.
    #[test]
    fn same_bits_whatever_the_thread_count() {
        let n = 50 * CHUNK + 3;
        let term = |k: usize| [1.0 / (k as f64 + 1.0), (k as f64).sin()];
        let one = rayon::ThreadPoolBuilder::new().num_threads(1).build().expect("a one-thread pool");
        let alone = one.install(|| ordered_sum(n, term));
        let four = rayon::ThreadPoolBuilder::new().num_threads(4).build().expect("a four-thread pool");
        assert_eq!(alone.map(f64::to_bits), four.install(|| ordered_sum(n, term)).map(f64::to_bits));
        let sequential = (0..n).fold(0.0, |s, k| s + term(k)[0]);
        assert!((alone[0] - sequential).abs() < 1e-12 * sequential, "{} against {sequential}", alone[0]);
    }
}
