//! A magnet's intrinsic curve J(H) from a user's table (a data sheet's
//! second-quadrant curve), for `magnet_law`: a monotone cubic through the
//! points (Fritsch and Carlson, SIAM J. Numer. Anal. 17(2), 1980: no
//! overshoot between points, and a continuous slope, which Newton-Raphson
//! needs), continued beyond both ends with the recoil slope.

use crate::bh_curve::fritsch_carlson_slopes;

/// J(H) through a table, with its running integral.
#[derive(Clone, Debug, PartialEq)]
pub struct IntrinsicTable {
    h: Vec<f64>,
    j: Vec<f64>,
    slope: Vec<f64>,
    /// The integral of J dH from the first point to h.k].
    running: Vec<f64>,
    /// chi mu0: the slope beyond the table, T/(A/m).
    recoil_slope: f64,
}

/// Why a table was refused.
pub type TableError = String;

/// Hermite basis integrals from 0 to t (of h00, h10, h01, h11).
fn basis_integrals(t: f64) -> [f64; 4] {
    let (t2, t3, t4) = (t * t, t * t * t, t * t * t * t);
    [t - t3 + 0.5 * t4, 0.5 * t2 - 2.0 * t3 / 3.0 + 0.25 * t4, t3 - 0.5 * t4, -t3 / 3.0 + 0.25 * t4]
}

impl IntrinsicTable {
    /// A table of [H (A/m), J (T)] points: at least two, H strictly rising
    /// and reaching 0 (so that Br = J(0) is inside it), J never falling.
    pub fn new(points: &[[f64; 2]], recoil_slope: f64) -> Result<IntrinsicTable, TableError> {
        if points.len() < 2 {
            return Err("an intrinsic curve needs at least two points".into());
        }
        if points.iter().flatten().any(|v| !v.is_finite()) {
            return Err("an intrinsic curve's points must be finite numbers".into());
        }
        for (k, w) in points.windows(2).enumerate() {
            if w[1][0] <= w[0][0] {
                return Err(format!("H must rise from point to point (points {} and {})", k + 1, k + 2));
            }
            if w[1][1] < w[0][1] {
                return Err(format!("J must not fall as H rises (points {} and {})", k + 1, k + 2));
            }
        }
        let last = points[points.len() - 1];
        if last[0] < 0.0 {
            return Err(format!("the curve must reach H = 0 (it ends at {} A/m), where J is the remanence", last[0]));
        }
        if !(recoil_slope.is_finite() && recoil_slope >= 0.0) {
            return Err("the recoil slope must be finite and not negative".into());
        }
        let h: Vec<f64> = points.iter().map(|p| p[0]).collect();
        let j: Vec<f64> = points.iter().map(|p| p[1]).collect();
        let slope = fritsch_carlson_slopes(&h, &j);
        let mut t = IntrinsicTable {
            h,
            j,
            slope,
            running: Vec::new(),
            recoil_slope,
        };
        t.running = (0..t.h.len())
            .scan(0.0, |acc, k| {
                if k > 0 {
                    *acc += t.segment_integral(k - 1, 1.0);
                }
                Some(*acc)
            })
            .collect();
        Ok(t)
    }

    /// The table at another temperature: H scaled by `h_scale`, J by `j_scale` (both positive).
    pub fn scaled(&self, h_scale: f64, j_scale: f64) -> IntrinsicTable {
        let points: Vec<[f64; 2]> = self.h.iter().zip(&self.j).map(|(h, j)| [h * h_scale, j * j_scale]).collect();
        IntrinsicTable::new(&points, self.recoil_slope * j_scale / h_scale).unwrap_or_else(|_| self.clone())
    }

    /// The integral of J over segment k from its start to the fraction t of it.
    fn segment_integral(&self, k: usize, t: f64) -> f64 {
        let d = self.h[k + 1] - self.h[k];
        let b = basis_integrals(t);
        d * (b[0] * self.j[k] + b[1] * d * self.slope[k] + b[2] * self.j[k + 1] + b[3] * d * self.slope[k + 1])
    }

    /// The segment holding h and the fraction of it, or None beyond the table.
    fn locate(&self, h: f64) -> Option<(usize, f64)> {
        let n = self.h.len();
        if h < self.h[0] || h > self.h[n - 1] {
            return None;
        }
        let k = self.h.partition_point(|&x| x <= h).clamp(1, n - 1) - 1;
        Some((k, (h - self.h[k]) / (self.h[k + 1] - self.h[k])))
    }

    /// J and dJ/dH at h.
    pub fn j(&self, h: f64) -> (f64, f64) {
        let n = self.h.len();
        match self.locate(h) {
            Some((k, t)) => {
                let d = self.h[k + 1] - self.h[k];
                let (t2, t3) = (t * t, t * t * t);
                let (y0, y1, m0, m1) = (self.j[k], self.j[k + 1], self.slope[k], self.slope[k + 1]);
                let v = (2.0 * t3 - 3.0 * t2 + 1.0) * y0 + (t3 - 2.0 * t2 + t) * d * m0 + (-2.0 * t3 + 3.0 * t2) * y1 + (t3 - t2) * d * m1;
                let dv = ((6.0 * t2 - 6.0 * t) * y0 + (3.0 * t2 - 4.0 * t + 1.0) * d * m0 + (-6.0 * t2 + 6.0 * t) * y1 + (3.0 * t2 - 2.0 * t) * d * m1) / d;
                (v, dv)
            }
            None if h < self.h[0] => (self.j[0] + self.recoil_slope * (h - self.h[0]), self.recoil_slope),
            None => (self.j[n - 1] + self.recoil_slope * (h - self.h[n - 1]), self.recoil_slope),
        }
    }

    /// The integral of J dH from the first point to h.
    pub fn integral(&self, h: f64) -> f64 {
        let n = self.h.len();
        let beyond = |h0: f64, j0: f64, base: f64| {
            let d = h - h0;
            base + j0 * d + 0.5 * self.recoil_slope * d * d
        };
        match self.locate(h) {
            Some((k, t)) => self.running[k] + self.segment_integral(k, t),
            None if h < self.h[0] => beyond(self.h[0], self.j[0], 0.0),
            None => beyond(self.h[n - 1], self.j[n - 1], self.running[n - 1]),
        }
    }

    /// The recoil slope chi mu0 beyond the table.
    pub fn recoil_slope(&self) -> f64 {
        self.recoil_slope
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn table() -> IntrinsicTable {
        let chi = 0.05 * crate::MU0;
        IntrinsicTable::new(
            &[[-1000e3, -0.5], [-960e3, 0.2], [-940e3, 1.0], [-900e3, 1.15], [-500e3, 1.195], [0.0, 1.22]],
            chi,
        )
        .unwrap()
    }

    #[test]
    fn the_curve_passes_its_points_and_its_integral_is_consistent() {
        let t = table();
        assert!((t.j(-940e3).0 - 1.0).abs() < 1e-12 && (t.j(0.0).0 - 1.22).abs() < 1e-12);
        for h in [-1.2e6, -990e3, -950e3, -700e3, -10e3, 50e3] {
            let d = 1.0;
            let fd = (t.integral(h + d) - t.integral(h - d)) / (2.0 * d);
            assert!((fd - t.j(h).0).abs() < 1e-6, "at {h}: {fd} vs {}", t.j(h).0);
            let fj = (t.j(h + d).0 - t.j(h - d).0) / (2.0 * d);
            assert!((fj - t.j(h).1).abs() < 1e-6 * t.j(h).1.abs().max(1e-7), "slope at {h}");
        }
    }

    #[test]
    fn bad_tables_are_refused() {
        assert!(IntrinsicTable::new(&[[0.0, 1.0]], 0.0).is_err());
        assert!(IntrinsicTable::new(&[[-10.0, 1.0], [-20.0, 1.1]], 0.0).is_err());
        assert!(IntrinsicTable::new(&[[-10.0, 1.0], [0.0, 0.9]], 0.0).is_err());
        assert!(IntrinsicTable::new(&[[-10.0, 0.0], [-1.0, 0.9]], 0.0).is_err());
    }
}
