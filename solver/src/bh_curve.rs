//! Soft-magnetic B-H curves: validation, monotone cubic H(B) (Fritsch and
//! Carlson, SIAM J. Numer. Anal. 17(2), 1980), extension past the last point
//! with slope mu0, and the reluctivity with its Newton tangent.

use crate::MU0;

/// A validated, interpolated B-H curve.
#[derive(Clone, Debug)]
pub struct BhCurve {
    /// Flux density samples, T (strictly increasing, from 0).
    b: Vec<f64>,
    /// Field strength samples, A/m (strictly increasing, from 0).
    h: Vec<f64>,
    /// dH/dB at each sample (Fritsch-Carlson slopes).
    slope: Vec<f64>,
    /// Per segment k, H = c0 + c1 u + c2 u^2 + c3 u^3 with u = B - b[k]: the
    /// same cubic Hermite piece, expanded once so that evaluation (the
    /// innermost work of every saturating assembly) has no division.
    cubic: Vec<[f64; 4]>,
    /// Segment of the start of each of BUCKETS equal B intervals on [0, b_last].
    bucket_segment: Vec<u32>,
    /// The integral of H dB from 0 to each sample, J/m3.
    energy_at_sample: Vec<f64>,
}

/// Lookup buckets over the curve's B range.
const BUCKETS: usize = 256;

/// Why a B-H table was refused; `row` counts from 0 in the table given.
#[derive(Clone, Debug, PartialEq)]
pub enum CurveError {
    /// Fewer than the points a curve needs (the count given).
    TooFewPoints(usize),
    /// A value is NaN or infinite.
    NotFinite {
        /// the row
        row: usize,
    },
    /// The first row is not (0, 0).
    DoesNotStartAtOrigin,
    /// H or B does not rise from the previous row.
    NotIncreasing {
        /// the row
        row: usize,
    },
    /// The slope falls below mu0 (not a physical soft material).
    SlopeBelowMu0 {
        /// the row
        row: usize,
    },
    /// The polarization B - mu0 H passes what any bulk material reaches
    /// (from `check_polarization`, which a case's tables pass through; the
    /// curve itself takes any rising table, a test's straight line too).
    PolarizationBeyondAnyMaterial {
        /// the row
        row: usize,
        /// B - mu0 H there, T
        polarization: f64,
    },
}

/// Largest polarization B - mu0 H a soft material's table may reach, T.
/// The Slater-Pauling curve peaks at about 2.45 T for iron-cobalt near
/// Fe70Co30 (the highest saturation of any bulk ferromagnet: neomag.jp
/// glossary, "Slater-Pauling Curve"; R. M. Bozorth, Ferromagnetism, 1951,
/// from memory); pure iron saturates at about 2.15 T. A table past 2.6 T
/// is in other units (B in kilogauss reads ten times too high), not a
/// material.
pub const MAX_POLARIZATION: f64 = 2.6;

impl std::fmt::Display for CurveError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            CurveError::TooFewPoints(n) => write!(f, "a B-H table needs at least 3 points, found {n}"),
            CurveError::NotFinite { row } => write!(f, "row {row}: not a finite number"),
            CurveError::DoesNotStartAtOrigin => write!(f, "row 0: a B-H table must start at H = 0, B = 0"),
            CurveError::NotIncreasing { row } => write!(f, "row {row}: H and B must both increase strictly from the row before"),
            CurveError::SlopeBelowMu0 { row } => write!(
                f,
                "row {row}: the curve rises more slowly than mu0 (dB/dH below the permeability of free space), which no magnetic material does"
            ),
            CurveError::PolarizationBeyondAnyMaterial { row, polarization } => write!(
                f,
                "row {row}: the polarization B - mu0 H is {polarization:.3} T, past the {MAX_POLARIZATION} T no material reaches (iron-cobalt, the highest, saturates near 2.45 T; iron near 2.15 T): give B in tesla (1 T = 10 kG = 10 000 G) and H in A/m"
            ),
        }
    }
}

/// Refuses a table whose polarization passes `MAX_POLARIZATION`: a soft
/// material's data in kilogauss or gauss.
pub fn check_polarization(points: &[[f64; 2]]) -> Result<(), CurveError> {
    match points.iter().map(|p| p[1] - MU0 * p[0]).enumerate().find(|(_, j)| *j > MAX_POLARIZATION) {
        Some((row, polarization)) => Err(CurveError::PolarizationBeyondAnyMaterial { row, polarization }),
        None => Ok(()),
    }
}

impl BhCurve {
    /// Builds the curve from (H in A/m, B in T) pairs.
    pub fn new(points: &[[f64; 2]]) -> Result<BhCurve, CurveError> {
        if points.len() < 3 {
            return Err(CurveError::TooFewPoints(points.len()));
        }
        if let Some(row) = points.iter().position(|p| !p[0].is_finite() || !p[1].is_finite()) {
            return Err(CurveError::NotFinite { row });
        }
        if points[0] != [0.0, 0.0] {
            return Err(CurveError::DoesNotStartAtOrigin);
        }
        for row in 1..points.len() {
            let (p, q) = (points[row - 1], points[row]);
            if q[0] <= p[0] || q[1] <= p[1] {
                return Err(CurveError::NotIncreasing { row });
            }
            // Tables come rounded: allow a slope 0.01 % under mu0.
            if (q[1] - p[1]) / (q[0] - p[0]) < MU0 * (1.0 - 1e-4) {
                return Err(CurveError::SlopeBelowMu0 { row });
            }
        }
        let b: Vec<f64> = points.iter().map(|p| p[1]).collect();
        let h: Vec<f64> = points.iter().map(|p| p[0]).collect();
        let slope = fritsch_carlson_slopes(&b, &h);
        let cubic = (0..b.len() - 1)
            .map(|k| {
                let (d, dh) = (b[k + 1] - b[k], h[k + 1] - h[k]);
                let (m0, m1) = (slope[k], slope[k + 1]);
                [h[k], m0, (3.0 * dh / d - 2.0 * m0 - m1) / d, (m0 + m1 - 2.0 * dh / d) / (d * d)]
            })
            .collect();
        let b_last = b[b.len() - 1];
        let bucket_segment = (0..BUCKETS)
            .map(|i| {
                let x = b_last * i as f64 / BUCKETS as f64;
                (b.partition_point(|&v| v <= x).saturating_sub(1).min(b.len() - 2)) as u32
            })
            .collect();
        let mut curve = BhCurve {
            b,
            h,
            slope,
            cubic,
            bucket_segment,
            energy_at_sample: Vec::new(),
        };
        let mut w = vec![0.0; curve.b.len()];
        for k in 1..curve.b.len() {
            w[k] = w[k - 1] + simpson(|x| curve.h_of_b(x).0, curve.b[k - 1], curve.b[k]);
        }
        curve.energy_at_sample = w;
        Ok(curve)
    }

    /// Field strength and its derivative dH/dB at flux density `b` >= 0.
    pub fn h_of_b(&self, b: f64) -> (f64, f64) {
        let n = self.b.len();
        if b >= self.b[n - 1] {
            return (self.h[n - 1] + (b - self.b[n - 1]) / MU0, 1.0 / MU0);
        }
        let bucket = ((b / self.b[n - 1] * BUCKETS as f64) as usize).min(BUCKETS - 1);
        let mut k = self.bucket_segment[bucket] as usize;
        while k + 2 < n && self.b[k + 1] <= b {
            k += 1;
        }
        let [c0, c1, c2, c3] = self.cubic[k];
        let u = b - self.b[k];
        (c0 + u * (c1 + u * (c2 + u * c3)), c1 + u * (2.0 * c2 + 3.0 * u * c3))
    }

    /// Reluctivity nu = H/B and the tangent factor: dH/dB = nu I + (dh - nu) n n^T.
    pub fn reluctivity(&self, b: f64) -> (f64, f64) {
        if b <= 1e-12 {
            return (self.slope[0], self.slope[0]);
        }
        let (h, dh) = self.h_of_b(b);
        (h / b, dh)
    }

    /// Energy density, the integral of H dB from 0 to b (J/m3): the stored
    /// integral up to the sample below b, plus Simpson's rule on the rest of
    /// its piece (exact for a cubic).
    pub fn energy_density(&self, b: f64) -> f64 {
        let n = self.b.len();
        let b = b.max(0.0);
        if b >= self.b[n - 1] {
            let (hl, bl) = (self.h[n - 1], self.b[n - 1]);
            return self.energy_at_sample[n - 1] + hl * (b - bl) + 0.5 * (b - bl) * (b - bl) / MU0;
        }
        let k = self.b.partition_point(|&x| x <= b).saturating_sub(1).min(n - 2);
        self.energy_at_sample[k] + simpson(|x| self.h_of_b(x).0, self.b[k], b)
    }

    /// The knee: the point of the curve where the differential relative
    /// permeability has fallen to a tenth of its largest value past the peak.
    pub fn knee_b(&self) -> f64 {
        let mu: Vec<f64> = self.slope.iter().map(|s| 1.0 / (MU0 * s.max(1e-30))).collect();
        let (peak, mu_max) = mu.iter().enumerate().fold((0, 0.0), |acc, (i, &m)| if m > acc.1 { (i, m) } else { acc });
        (peak..mu.len()).find(|&i| mu[i] < 0.1 * mu_max).map_or(self.b[self.b.len() - 1], |i| self.b[i])
    }
}

fn simpson(f: impl Fn(f64) -> f64, a: f64, b: f64) -> f64 {
    (b - a) / 6.0 * (f(a) + 4.0 * f(0.5 * (a + b)) + f(b))
}

/// Slopes of a monotone piecewise cubic through (x, y) by Fritsch and Carlson (1980).
pub(crate) fn fritsch_carlson_slopes(x: &[f64], y: &[f64]) -> Vec<f64> {
    let n = x.len();
    let delta: Vec<f64> = (0..n - 1).map(|k| (y[k + 1] - y[k]) / (x[k + 1] - x[k])).collect();
    let mut m = vec![0.0; n];
    m[0] = delta[0];
    m[n - 1] = delta[n - 2];
    for k in 1..n - 1 {
        m[k] = if delta[k - 1] * delta[k] <= 0.0 {
            0.0
        } else {
            0.5 * (delta[k - 1] + delta[k])
        };
    }
    for k in 0..n - 1 {
        let a = m[k] / delta[k];
        let b = m[k + 1] / delta[k];
        let s = a * a + b * b;
        if s > 9.0 {
            let t = 3.0 / s.sqrt();
            m[k] = t * a * delta[k];
            m[k + 1] = t * b * delta[k];
        }
    }
    m
}

/// Cubic Hermite value and derivative on [x0, x1]: the textbook form, the
/// reference for the expanded coefficients.
#[cfg(test)]
fn hermite(x0: f64, x1: f64, y0: f64, y1: f64, m0: f64, m1: f64, x: f64) -> (f64, f64) {
    let h = x1 - x0;
    let t = (x - x0) / h;
    let (t2, t3) = (t * t, t * t * t);
    let v = (2.0 * t3 - 3.0 * t2 + 1.0) * y0 + (t3 - 2.0 * t2 + t) * h * m0 + (-2.0 * t3 + 3.0 * t2) * y1 + (t3 - t2) * h * m1;
    let d = ((6.0 * t2 - 6.0 * t) * y0 + (3.0 * t2 - 4.0 * t + 1.0) * h * m0 + (-6.0 * t2 + 6.0 * t) * y1 + (3.0 * t2 - 2.0 * t) * h * m1) / h;
    (v, d)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn straight_line_is_reproduced() {
        let mu = 1000.0 * MU0;
        let c = BhCurve::new(&[[0.0, 0.0], [100.0, 100.0 * mu], [300.0, 300.0 * mu]]).unwrap();
        let (h, dh) = c.h_of_b(150.0 * mu);
        assert!((h - 150.0).abs() < 1e-9 && (dh - 1.0 / mu).abs() < 1e-6 / mu);
    }

    /// A steel-like curve with a toe and a knee (points taken from the TEAM 13 table).
    const STEEL_LIKE: [[f64; 2]; 9] = [
        [0.0, 0.0],
        [16.0, 0.0025],
        [54.0, 0.0125],
        [143.0, 0.05],
        [210.0, 0.2],
        [342.0, 1.0],
        [933.0, 1.5],
        [4993.0, 1.7],
        [48866.0, 2.22],
    ];

    #[test]
    fn expanded_cubic_equals_the_hermite_form() {
        let c = BhCurve::new(&STEEL_LIKE).unwrap();
        for i in 0..=2000 {
            let b = 2.3 * i as f64 / 2000.0;
            let (h, dh) = c.h_of_b(b);
            let (h_ref, dh_ref) = if b >= c.b[c.b.len() - 1] {
                (c.h[c.h.len() - 1] + (b - c.b[c.b.len() - 1]) / MU0, 1.0 / MU0)
            } else {
                let k = c.b.partition_point(|&x| x <= b).saturating_sub(1).min(c.b.len() - 2);
                hermite(c.b[k], c.b[k + 1], c.h[k], c.h[k + 1], c.slope[k], c.slope[k + 1], b)
            };
            assert!((h - h_ref).abs() <= 1e-9 * h_ref.abs().max(1.0), "H at {b}: {h} vs {h_ref}");
            assert!((dh - dh_ref).abs() <= 1e-9 * dh_ref.abs().max(1.0), "dH/dB at {b}: {dh} vs {dh_ref}");
        }
    }

    #[test]
    fn energy_density_is_the_integral_of_h_db() {
        // Reference: the composite trapezoid rule on 200 000 steps (error O(h^2), far below the tolerance).
        let c = BhCurve::new(&STEEL_LIKE).unwrap();
        for b in [0.001, 0.2, 0.73, 1.5, 1.99, 2.22, 2.5] {
            let steps = 200_000;
            let dx = b / steps as f64;
            let trapezoid: f64 = (0..steps)
                .map(|i| 0.5 * dx * (c.h_of_b(i as f64 * dx).0 + c.h_of_b((i + 1) as f64 * dx).0))
                .sum();
            let w = c.energy_density(b);
            assert!((w - trapezoid).abs() <= 1e-6 * trapezoid, "W({b}) = {w} against {trapezoid}");
        }
    }

    #[test]
    fn rejects_a_curve_in_kilogauss() {
        // A mild steel's curve with B written in kilogauss: 15 kG at 2 kA/m.
        let kg = [[0.0, 0.0], [200.0, 8.0], [2000.0, 15.0], [10000.0, 18.0]];
        assert!(matches!(check_polarization(&kg), Err(CurveError::PolarizationBeyondAnyMaterial { row: 1, .. })));
        let tesla = kg.map(|[h, b]| [h, b / 10.0]);
        assert!(check_polarization(&tesla).is_ok());
        // Far into saturation B keeps rising with mu0: B = 2.2 T + mu0 H is no error.
        let deep = [[0.0, 0.0], [1e3, 1.5], [1e6, 2.2 + MU0 * 1e6]];
        assert!(check_polarization(&deep).is_ok());
    }

    #[test]
    fn rejects_non_monotone() {
        assert_eq!(
            BhCurve::new(&[[0.0, 0.0], [100.0, 1.0], [90.0, 1.2]]).unwrap_err(),
            CurveError::NotIncreasing { row: 2 }
        );
    }
}
