//! How far a Monte Carlo percentile may lie from the true one: a
//! distribution-free confidence interval between two order statistics.
//!
//! Of n independent samples of a continuous value, the number below its
//! true q-quantile is binomial (n, q); so the l-th smallest sample lies at
//! or below the quantile with probability P(B >= l), and the u-th at or
//! above it with probability P(B <= u - 1). Taking the largest l and the
//! smallest u that leave at most 2.5 % on each side gives an interval that
//! holds the quantile with at least 95 % probability, whatever the value's
//! distribution (W. J. Conover, Practical Nonparametric Statistics, 3rd
//! ed., Wiley, 1999, section 3.2, from memory). Where (1 - q)^n or q^n is
//! above 2.5 %, the samples cannot bound that side at all: the 1st
//! percentile of 200 samples has no lower bound, and 368 samples are the
//! fewest that give one. Latin-hypercube samples are stratified rather
//! than independent; for a value monotone in each parameter their estimate
//! of the distribution function spreads no wider than that of independent
//! ones (M. D. McKay, R. J. Beckman, W. J. Conover, Technometrics 21,
//! 1979), and the tests below measure the coverage for both.

/// The two-sided confidence of the interval.
pub const CONFIDENCE: f64 = 0.95;

/// A confidence interval of a percentile; None at an end the samples
/// cannot bound.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Interval {
    /// The lower end, an order statistic.
    pub low: Option<f64>,
    /// The upper end, an order statistic.
    pub high: Option<f64>,
}

/// The interval of the q-quantile (0 < q < 1) from sorted samples.
pub fn quantile_interval(sorted: &[f64], q: f64) -> Interval {
    let (l, u) = ranks(sorted.len(), q);
    Interval {
        low: l.map(|l| sorted[l - 1]),
        high: u.map(|u| sorted[u - 1]),
    }
}

/// The ranks (1-based) of the interval's ends for n samples of the
/// q-quantile; None where no rank will do.
pub fn ranks(n: usize, q: f64) -> (Option<usize>, Option<usize>) {
    let tail = 0.5 * (1.0 - CONFIDENCE);
    let cdf = binomial_cdf(n, q);
    // cdf[k] = P(B <= k). Lower: the largest l with P(B <= l - 1) <= tail.
    let low = (1..=n).rev().find(|&l| cdf[l - 1] <= tail);
    // Upper: the smallest u with P(B <= u - 1) >= 1 - tail.
    let high = (1..=n).find(|&u| cdf[u - 1] >= 1.0 - tail);
    (low, high)
}

/// The fewest samples whose interval bounds the q-quantile on both sides.
pub fn fewest_samples(q: f64) -> usize {
    let tail = 0.5 * (1.0 - CONFIDENCE);
    let p = q.min(1.0 - q);
    // Both ends exist once (1 - p)^n <= tail.
    (tail.ln() / (1.0 - p).ln()).ceil() as usize
}

/// P(B <= k) for k = 0..=n, B binomial (n, q), summed in logarithms so
/// that no term underflows before it matters.
fn binomial_cdf(n: usize, q: f64) -> Vec<f64> {
    let (lq, lp) = (q.ln(), (1.0 - q).ln());
    let mut log_pmf = n as f64 * lp;
    let mut sum = 0.0;
    let mut out = Vec::with_capacity(n + 1);
    for k in 0..=n {
        if k > 0 {
            log_pmf += ((n - k + 1) as f64 / k as f64).ln() + lq - lp;
        }
        sum += log_pmf.exp();
        out.push(sum.min(1.0));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::tolerance::{latin_hypercube, Distribution, Rng, Spread};

    /// Hand values: P(B = 0) of 200 samples at q = 0.01 is 0.99^200 =
    /// 0.134, so the 1st percentile has no lower end; 0.99^368 = 0.0248.
    #[test]
    fn ranks_follow_the_binomial_tails() {
        assert_eq!(ranks(200, 0.01).0, None);
        assert_eq!(fewest_samples(0.01), 368);
        assert!(ranks(368, 0.01).0.is_some() && ranks(367, 0.01).0.is_none());
        // The median of 100: the ranks 40 and 61, symmetric about 50.5
        // (P(B <= 39) = 0.018 and P(B <= 40) = 0.028, from memory).
        assert_eq!(ranks(100, 0.5), (Some(40), Some(61)));
        let cdf = binomial_cdf(10, 0.3);
        assert!((cdf[2] - 0.382_783_1).abs() < 1e-6, "{}", cdf[2]);
        assert!((cdf[10] - 1.0).abs() < 1e-12);
    }

    /// Coverage measured: 2000 sets of samples of a value whose quantiles
    /// are known, independent and by Latin hypercube; the interval holds
    /// the true quantile in at least 95 % of the sets (less 1.5 % for the
    /// count's own scatter, three of its standard deviations).
    #[test]
    fn the_interval_holds_the_true_quantile_as_often_as_it_claims() {
        // A monotone value of two uniform parameters on [0, 1]: the sum.
        // Its distribution is triangular: P(S <= s) = s^2 / 2 below 1.
        let quantile = |q: f64| if q <= 0.5 { (2.0 * q).sqrt() } else { 2.0 - (2.0 * (1.0 - q)).sqrt() };
        let spread = |name: &str| Spread {
            name: name.into(),
            nominal: 0.5,
            half_width: 0.5,
            distribution: Distribution::Uniform,
        };
        let box_ = [spread("a"), spread("b")];
        let mut rng = Rng::new(11);
        for (n, q) in [(100, 0.5), (400, 0.99), (400, 0.01), (60, 0.9)] {
            let (mut held_iid, mut held_lhs) = (0, 0);
            let reps = 2000;
            for rep in 0..reps {
                let mut iid: Vec<f64> = (0..n).map(|_| rng.unit() + rng.unit()).collect();
                let mut lhs: Vec<f64> = latin_hypercube(&box_, n, 1000 + rep).iter().map(|p| p[0] + p[1]).collect();
                iid.sort_by(f64::total_cmp);
                lhs.sort_by(f64::total_cmp);
                let truth = quantile(q);
                let holds = |i: Interval| i.low.is_none_or(|l| l <= truth) && i.high.is_none_or(|h| h >= truth);
                held_iid += usize::from(holds(quantile_interval(&iid, q)));
                held_lhs += usize::from(holds(quantile_interval(&lhs, q)));
            }
            let floor = (CONFIDENCE - 0.015) * reps as f64;
            assert!(held_iid as f64 >= floor, "n {n}, q {q}: independent samples held it {held_iid} of {reps}");
            assert!(held_lhs as f64 >= floor, "n {n}, q {q}: Latin hypercube held it {held_lhs} of {reps}");
        }
    }
}
