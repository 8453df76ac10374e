//! Tolerance studies: parameter samples within their spreads (corners, or
//! Monte Carlo by Latin-hypercube sampling) and the statistics of each value
//! over them. Numerics only: the cli solves each sample and writes files.

mod interval;

pub use interval::{fewest_samples, quantile_interval, Interval, CONFIDENCE};

use crate::model::{Bound, Statistic};
use crate::results::Verdict;

/// How a parameter spreads about its nominal value.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Distribution {
    /// Uniform over nominal +- half_width.
    Uniform,
    /// Normal with the half width as three standard deviations (common
    /// practice for a "+-" tolerance on a normally spread quantity).
    Normal,
}

/// One parameter's spread.
#[derive(Clone, Debug, PartialEq)]
pub struct Spread {
    /// Parameter name.
    pub name: String,
    /// Nominal value.
    pub nominal: f64,
    /// Half width of the tolerance band (same unit as the parameter).
    pub half_width: f64,
    /// Its distribution.
    pub distribution: Distribution,
}

/// The statistics of one value over the samples.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Statistics {
    /// Smallest.
    pub min: f64,
    /// 1st percentile.
    pub p1: f64,
    /// Median.
    pub p50: f64,
    /// 99th percentile.
    pub p99: f64,
    /// Largest.
    pub max: f64,
    /// Numerical error of every figure above: the largest estimated error
    /// of the samples (None where a sample's value has no estimate).
    /// It bounds every order statistic's error, so the percentiles' too:
    /// if no computed value is further than E from its exact one, at least
    /// n - k + 1 computed values lie at or above the exact k-th smallest
    /// less E (those whose exact values lie at or above it), so the
    /// computed k-th smallest does too; and the same from above.
    pub error: Option<f64>,
    /// The 95 % intervals of p1, p50 and p99 that the sampling leaves
    /// (Monte Carlo only; `quantile_interval`), before the numerical error.
    pub intervals: Option<[Interval; 3]>,
    /// The number of samples.
    pub samples: usize,
}

/// A small deterministic generator (SplitMix64, G. Steele, D. Lea and
/// C. Flood, OOPSLA 2014), so a tolerance study repeats to the bit.
pub struct Rng(u64);

impl Rng {
    /// A generator from a seed.
    pub fn new(seed: u64) -> Rng {
        Rng(seed)
    }

    /// The next 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Uniform in [0, 1).
    pub fn unit(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }

    fn below(&mut self, n: usize) -> usize {
        (self.unit() * n as f64) as usize % n.max(1)
    }
}

/// The standard normal quantile by P. J. Acklam's rational approximation
/// (An algorithm for computing the inverse normal cumulative distribution
/// function, 2003; relative error below 1.2e-9, ample for sampling).
pub fn normal_quantile(p: f64) -> f64 {
    const A: [f64; 6] = [
        -3.969_683_028_665_376e1,
        2.209_460_984_245_205e2,
        -2.759_285_104_469_687e2,
        1.383_577_518_672_69e2,
        -3.066_479_806_614_716e1,
        2.506_628_277_459_239,
    ];
    const B: [f64; 5] = [
        -5.447_609_879_822_406e1,
        1.615_858_368_580_409e2,
        -1.556_989_798_598_866e2,
        6.680_131_188_771_972e1,
        -1.328_068_155_288_572e1,
    ];
    const C: [f64; 6] = [
        -7.784_894_002_430_293e-3,
        -3.223_964_580_411_365e-1,
        -2.400_758_277_161_838,
        -2.549_732_539_343_734,
        4.374_664_141_464_968,
        2.938_163_982_698_783,
    ];
    const D: [f64; 4] = [7.784_695_709_041_462e-3, 3.224_671_290_700_398e-1, 2.445_134_137_142_996, 3.754_408_661_907_416];
    let p = p.clamp(1e-300, 1.0 - 1e-16);
    let tail = |q: f64| (((((C[0] * q + C[1]) * q + C[2]) * q + C[3]) * q + C[4]) * q + C[5]) / ((((D[0] * q + D[1]) * q + D[2]) * q + D[3]) * q + 1.0);
    if p < 0.02425 {
        tail((-2.0 * p.ln()).sqrt())
    } else if p > 1.0 - 0.02425 {
        -tail((-2.0 * (1.0 - p).ln()).sqrt())
    } else {
        let q = p - 0.5;
        let r = q * q;
        (((((A[0] * r + A[1]) * r + A[2]) * r + A[3]) * r + A[4]) * r + A[5]) * q / (((((B[0] * r + B[1]) * r + B[2]) * r + B[3]) * r + B[4]) * r + 1.0)
    }
}

/// Latin-hypercube samples: `n` parameter sets, each parameter's range cut
/// into n strata of equal probability with one sample in each, the strata
/// paired at random (M. D. McKay, R. J. Beckman and W. J. Conover,
/// Technometrics 21(2), 1979).
pub fn latin_hypercube(spreads: &[Spread], n: usize, seed: u64) -> Vec<Vec<f64>> {
    let mut rng = Rng::new(seed);
    let mut columns = Vec::new();
    for s in spreads {
        let mut strata: Vec<usize> = (0..n).collect();
        for i in (1..n).rev() {
            let j = rng.below(i + 1);
            strata.swap(i, j);
        }
        let column: Vec<f64> = strata
            .into_iter()
            .map(|k| {
                let u = (k as f64 + rng.unit()) / n as f64;
                match s.distribution {
                    Distribution::Uniform => s.nominal + s.half_width * (2.0 * u - 1.0),
                    Distribution::Normal => s.nominal + s.half_width / 3.0 * normal_quantile(u),
                }
            })
            .collect();
        columns.push(column);
    }
    (0..n).map(|i| columns.iter().map(|c| c[i]).collect()).collect()
}

/// The statistics an expectation on `statistic` is judged by: "worst" is
/// the end of the spread the bound faces (both ends for a range).
pub fn judged_statistics(statistic: Statistic, bound: &Bound) -> Vec<Statistic> {
    match statistic {
        Statistic::Worst => match bound {
            Bound::Min(_) => vec![Statistic::Min],
            Bound::Max(_) => vec![Statistic::Max],
            Bound::Between(..) | Bound::Near(..) => vec![Statistic::Min, Statistic::Max],
        },
        s => vec![s],
    }
}

impl Statistics {
    /// The figures an expectation on `statistic` is judged by: one
    /// percentile, or for "worst" the end (or both ends) of the spread that
    /// the bound faces.
    pub fn judged(&self, statistic: Statistic, bound: &Bound) -> Vec<f64> {
        judged_statistics(statistic, bound).iter().map(|&s| self.figure(s)).collect()
    }

    /// One statistic's figure.
    fn figure(&self, s: Statistic) -> f64 {
        match s {
            Statistic::Min => self.min,
            Statistic::P1 => self.p1,
            Statistic::P50 => self.p50,
            Statistic::P99 => self.p99,
            Statistic::Max | Statistic::Worst => self.max,
        }
    }

    /// Where one statistic may lie: its figure +- the numerical error, and
    /// for a Monte Carlo percentile its sampling interval widened by that
    /// error (an end the samples cannot bound is infinite).
    pub fn range(&self, s: Statistic) -> (f64, f64) {
        let e = self.error.unwrap_or(0.0);
        let interval = match (s, &self.intervals) {
            (Statistic::P1, Some(i)) => Some(i[0]),
            (Statistic::P50, Some(i)) => Some(i[1]),
            (Statistic::P99, Some(i)) => Some(i[2]),
            _ => None,
        };
        match interval {
            Some(i) => (i.low.map_or(f64::NEG_INFINITY, |l| l - e), i.high.map_or(f64::INFINITY, |h| h + e)),
            None => (self.figure(s) - e, self.figure(s) + e),
        }
    }

    /// The verdict on a bound of `statistic`: pass where every figure's
    /// range holds it, fail where one's range breaks it throughout,
    /// undecided otherwise (the bound lies within a figure's numerical
    /// error or, for a Monte Carlo percentile, within what the sampling
    /// leaves open: more samples would decide).
    pub fn verdict(&self, statistic: Statistic, bound: &Bound) -> Verdict {
        let verdicts: Vec<Verdict> = judged_statistics(statistic, bound)
            .into_iter()
            .map(|s| {
                let (low, high) = self.range(s);
                crate::estimate::verdict_within(bound, low, high)
            })
            .collect();
        if verdicts.contains(&Verdict::Fail) {
            Verdict::Fail
        } else if verdicts.contains(&Verdict::Undecided) {
            Verdict::Undecided
        } else {
            Verdict::Pass
        }
    }
}

/// Every corner of the tolerance box (2^k sets, each parameter at nominal
/// +- half width), then the nominal and the 2k face centres that test
/// whether the worst case lies at a corner.
pub fn corners(spreads: &[Spread]) -> (Vec<Vec<f64>>, Vec<Vec<f64>>) {
    let k = spreads.len();
    let corner = (0..1usize << k)
        .map(|m| {
            spreads
                .iter()
                .enumerate()
                .map(|(i, s)| {
                    if m >> i & 1 == 1 {
                        s.nominal + s.half_width
                    } else {
                        s.nominal - s.half_width
                    }
                })
                .collect()
        })
        .collect();
    let nominal: Vec<f64> = spreads.iter().map(|s| s.nominal).collect();
    let mut inside = vec![nominal.clone()];
    for i in 0..k {
        for sign in [-0.5, 0.5] {
            let mut p = nominal.clone();
            p[i] += sign * spreads[i].half_width;
            inside.push(p);
        }
    }
    (corner, inside)
}

/// The percentile `q` (0 to 1) of sorted values, interpolated linearly
/// between order statistics (the usual "type 7" definition: R. J. Hyndman
/// and Y. Fan, The American Statistician 50(4), 1996).
fn percentile(sorted: &[f64], q: f64) -> f64 {
    let h = q * (sorted.len() - 1) as f64;
    let (i, f) = (h.floor() as usize, h - h.floor());
    match sorted.get(i + 1) {
        Some(next) => sorted[i] + f * (next - sorted[i]),
        None => sorted[i],
    }
}

/// Statistics of a value over the samples, each given as (value, its
/// estimated error if any); with `sampled`, the percentiles' sampling
/// intervals too (Monte Carlo). None for no finite value.
pub fn statistics(samples: &[(f64, Option<f64>)], sampled: bool) -> Option<Statistics> {
    let finite: Vec<&(f64, Option<f64>)> = samples.iter().filter(|(x, _)| x.is_finite()).collect();
    let mut v: Vec<f64> = finite.iter().map(|(x, _)| *x).collect();
    if v.is_empty() {
        return None;
    }
    let error = finite
        .iter()
        .map(|(_, e)| e.filter(|e| e.is_finite()))
        .try_fold(0.0f64, |m, e| e.map(|e| m.max(e)));
    v.sort_by(f64::total_cmp);
    Some(Statistics {
        min: v[0],
        p1: percentile(&v, 0.01),
        p50: percentile(&v, 0.5),
        p99: percentile(&v, 0.99),
        max: v[v.len() - 1],
        error,
        intervals: sampled.then(|| [0.01, 0.5, 0.99].map(|q| quantile_interval(&v, q))),
        samples: v.len(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_normal_quantile_matches_tables() {
        // Abramowitz and Stegun, table 26.5: the 0.975 and 0.999 quantiles.
        assert!((normal_quantile(0.975) - 1.959_963_985).abs() < 1e-8);
        assert!((normal_quantile(0.999) - 3.090_232_306).abs() < 1e-8);
        assert!((normal_quantile(0.01) + 2.326_347_874).abs() < 1e-8);
        assert_eq!(normal_quantile(0.5), 0.0);
    }

    #[test]
    fn latin_hypercube_puts_one_sample_in_each_stratum() {
        let s = Spread {
            name: "k".into(),
            nominal: 1.0,
            half_width: 0.03,
            distribution: Distribution::Uniform,
        };
        let n = 50;
        let samples = latin_hypercube(std::slice::from_ref(&s), n, 7);
        let mut strata: Vec<usize> = samples.iter().map(|p| ((p[0] - 0.97) / 0.06 * n as f64) as usize).collect();
        strata.sort_unstable();
        assert_eq!(strata, (0..n).collect::<Vec<_>>());
    }

    #[test]
    fn corners_and_faces_cover_the_box() {
        let s = |n: &str| Spread {
            name: n.into(),
            nominal: 0.0,
            half_width: 1.0,
            distribution: Distribution::Uniform,
        };
        let (c, inside) = corners(&[s("a"), s("b")]);
        assert_eq!(c.len(), 4);
        assert!(c.contains(&vec![1.0, -1.0]) && c.contains(&vec![-1.0, -1.0]));
        assert_eq!(inside.len(), 5);
    }

    #[test]
    fn percentiles_interpolate_between_order_statistics() {
        let v: Vec<(f64, Option<f64>)> = (0..101).map(|i| (f64::from(i), Some(0.01 * f64::from(i % 7)))).collect();
        let s = statistics(&v, false).unwrap();
        assert_eq!((s.min, s.p1, s.p50, s.p99, s.max), (0.0, 1.0, 50.0, 99.0, 100.0));
        // The numerical error is the largest sample's, 0.06; one sample
        // without an estimate leaves it unknown.
        assert_eq!(s.error, Some(0.06));
        let mut w = v.clone();
        w[3].1 = None;
        assert_eq!(statistics(&w, false).unwrap().error, None);
    }
}
