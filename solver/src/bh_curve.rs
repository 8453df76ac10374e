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
}

/// Why a B-H table was refused; `row` counts from 0 in the table given.
#[derive(Clone, Debug, PartialEq)]
pub enum CurveError {
    TooFewPoints(usize),
    NotFinite { row: usize },
    DoesNotStartAtOrigin,
    NotIncreasing { row: usize },
    SlopeBelowMu0 { row: usize },
}

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
        }
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
        Ok(BhCurve { b, h, slope })
    }

    /// Field strength and its derivative dH/dB at flux density `b` >= 0.
    pub fn h_of_b(&self, b: f64) -> (f64, f64) {
        let n = self.b.len();
        if b >= self.b[n - 1] {
            return (self.h[n - 1] + (b - self.b[n - 1]) / MU0, 1.0 / MU0);
        }
        let k = self.b.partition_point(|&x| x <= b).saturating_sub(1).min(n - 2);
        hermite(self.b[k], self.b[k + 1], self.h[k], self.h[k + 1], self.slope[k], self.slope[k + 1], b)
    }

    /// Reluctivity nu = H/B and the tangent factor: dH/dB = nu I + (dh - nu) n n^T.
    pub fn reluctivity(&self, b: f64) -> (f64, f64) {
        if b <= 1e-12 {
            return (self.slope[0], self.slope[0]);
        }
        let (h, dh) = self.h_of_b(b);
        (h / b, dh)
    }

    /// Energy density, the integral of H dB from 0 to b (J/m3), by Simpson's
    /// rule on each cubic piece (exact for a cubic).
    pub fn energy_density(&self, b: f64) -> f64 {
        let mut w = 0.0;
        let mut lo = 0.0;
        for k in 1..self.b.len() {
            let hi = self.b[k].min(b);
            if hi > lo {
                w += simpson(|x| self.h_of_b(x).0, lo, hi);
            }
            lo = self.b[k];
            if lo >= b {
                return w;
            }
        }
        let (hl, bl) = (self.h[self.h.len() - 1], self.b[self.b.len() - 1]);
        w + hl * (b - bl) + 0.5 * (b - bl) * (b - bl) / MU0
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
fn fritsch_carlson_slopes(x: &[f64], y: &[f64]) -> Vec<f64> {
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

/// Cubic Hermite value and derivative on [x0, x1].
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

    #[test]
    fn rejects_non_monotone() {
        assert_eq!(
            BhCurve::new(&[[0.0, 0.0], [100.0, 1.0], [90.0, 1.2]]).unwrap_err(),
            CurveError::NotIncreasing { row: 2 }
        );
    }
}
