//! The map from the reference triangle to an element: affine for a straight
//! triangle; for a triangle with edges on a circle (the Kelvin rim, the
//! outline of a round part or an arc of one), the affine map plus each such
//! edge's bulge blended into the triangle, so the element follows the circle
//! exactly and its straight edges stay straight (conforming with straight
//! neighbours). Each edge's blend vanishes on the other two edges, so the
//! blends of two or three curved edges add. Without it the polygon's sagitta caps the accuracy of every
//! element order at h^2: with straight chords on the Kelvin rim, P1's probe
//! at 47.4 mm stayed near 2.5e-4 at orders 3 and 4 however fine the mesh.
//!
//! The blend: x(l) = sum l_i x_i + l_a l_b psi((1 + l_b - l_a) / 2), where
//! psi(t) = phi(t) / (t (1 - t)) and phi(t) = gamma(t) - ((1 - t) x_a + t x_b)
//! is the arc's offset from its chord, zero at both corners (a smooth variant
//! of the transfinite blends of M. Zlamal, Curved elements in the finite
//! element method I, SIAM J. Numer. Anal. 10, 1973, and W. J. Gordon,
//! C. A. Hall, Transfinite element methods, Numer. Math. 21, 1973, whose
//! s phi(l_b / s) is not differentiable at the opposite corner).

use crate::element_order::EDGES;

/// An element edge that follows a circle.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CurvedEdge {
    /// Which edge (its index in `EDGES`).
    pub edge: usize,
    /// Centre of the circle.
    pub center: [f64; 2],
    /// Distances of the edge's first and second corner from the centre:
    /// equal when both lie on the circle; interpolated along the edge
    /// otherwise, so the curve always ends at the corners.
    pub radii: [f64; 2],
    /// Angles of the two corners about the centre, the second within pi of the first.
    pub angles: [f64; 2],
}

impl CurvedEdge {
    /// Edge k of a triangle with corners x, on the circle about `center`.
    pub fn new(edge: usize, x: &[[f64; 2]; 3], center: [f64; 2]) -> CurvedEdge {
        let [a, b] = EDGES[edge];
        let polar = |p: [f64; 2]| ((p[0] - center[0]).hypot(p[1] - center[1]), (p[1] - center[1]).atan2(p[0] - center[0]));
        let ((ra, ta), (rb, mut tb)) = (polar(x[a]), polar(x[b]));
        let pi = std::f64::consts::PI;
        if tb - ta > pi {
            tb -= 2.0 * pi;
        } else if ta - tb > pi {
            tb += 2.0 * pi;
        }
        CurvedEdge {
            edge,
            center,
            radii: [ra, rb],
            angles: [ta, tb],
        }
    }

    /// The k-th derivative in t of the arc's point r(t) e(theta(t)) about
    /// its centre (r and theta linear in t): r e^(k) + k r' e^(k-1), with
    /// e^(k) = theta'^k (cos(theta + k pi/2), sin(theta + k pi/2)).
    fn derivative(&self, t: f64, k: i32) -> [f64; 2] {
        let (dtheta, dr) = (self.angles[1] - self.angles[0], self.radii[1] - self.radii[0]);
        let theta = self.angles[0] + t * dtheta;
        let r = self.radii[0] + t * dr;
        let e = |j: i32| {
            if j < 0 {
                return [0.0, 0.0];
            }
            let (s, c) = (theta + f64::from(j) * std::f64::consts::FRAC_PI_2).sin_cos();
            let m = dtheta.powi(j);
            [m * c, m * s]
        };
        let (ek, ek1) = (e(k), e(k - 1));
        [r * ek[0] + f64::from(k) * dr * ek1[0], r * ek[1] + f64::from(k) * dr * ek1[1]]
    }

    /// psi(t) = phi(t) / (t (1 - t)) and its derivative, phi(t) the arc's
    /// offset from its chord at fraction t. phi vanishes at both ends, so
    /// psi is smooth; near an end, where the quotient loses its digits, it
    /// comes from phi's Taylor series there (four terms: the next is at
    /// most t^4 R theta'^5 / 120, under 1e-10 R for t < 0.01 and any arc up
    /// to a half circle).
    fn offset_quotient(&self, x_a: [f64; 2], x_b: [f64; 2], t: f64) -> ([f64; 2], [f64; 2]) {
        const NEAR_END: f64 = 0.01;
        let chord = [x_b[0] - x_a[0], x_b[1] - x_a[1]];
        if t > NEAR_END && t < 1.0 - NEAR_END {
            let g = self.derivative(t, 0);
            let dg = self.derivative(t, 1);
            let phi = [
                self.center[0] + g[0] - (1.0 - t) * x_a[0] - t * x_b[0],
                self.center[1] + g[1] - (1.0 - t) * x_a[1] - t * x_b[1],
            ];
            let dphi = [dg[0] - chord[0], dg[1] - chord[1]];
            let q = t * (1.0 - t);
            let dq = 1.0 - 2.0 * t;
            return (
                [phi[0] / q, phi[1] / q],
                [(dphi[0] * q - phi[0] * dq) / (q * q), (dphi[1] * q - phi[1] * dq) / (q * q)],
            );
        }
        // Series about the nearer end, in s = distance from it (s = t or 1 - t).
        let (end, s, sign): (f64, f64, f64) = if t <= NEAR_END { (0.0, t, 1.0) } else { (1.0, 1.0 - t, -1.0) };
        // d^k phi / ds^k at the end: sign^k times the t-derivatives (phi' less the chord).
        let mut c = [[0.0; 2]; 4];
        for (k, ck) in c.iter_mut().enumerate() {
            let mut d = self.derivative(end, k as i32 + 1);
            if k == 0 {
                d = [d[0] - chord[0], d[1] - chord[1]];
            }
            let f = sign.powi(k as i32 + 1) / [1.0, 2.0, 6.0, 24.0][k];
            *ck = [f * d[0], f * d[1]];
        }
        // phi = s (c0 + c1 s + c2 s^2 + c3 s^3) and t (1 - t) = s (1 - s).
        let mut psi = [0.0; 2];
        let mut dpsi_ds = [0.0; 2];
        for i in 0..2 {
            let num = c[0][i] + s * (c[1][i] + s * (c[2][i] + s * c[3][i]));
            let dnum = c[1][i] + s * (2.0 * c[2][i] + 3.0 * s * c[3][i]);
            psi[i] = num / (1.0 - s);
            dpsi_ds[i] = (dnum * (1.0 - s) + num) / ((1.0 - s) * (1.0 - s));
        }
        (psi, [sign * dpsi_ds[0], sign * dpsi_ds[1]])
    }
}

/// Barycentric coordinates of p in triangle x.
pub fn barycentric(x: &[[f64; 2]; 3], p: [f64; 2]) -> [f64; 3] {
    let d = (x[1][0] - x[0][0]) * (x[2][1] - x[0][1]) - (x[2][0] - x[0][0]) * (x[1][1] - x[0][1]);
    let l1 = ((p[0] - x[0][0]) * (x[2][1] - x[0][1]) - (x[2][0] - x[0][0]) * (p[1] - x[0][1])) / d;
    let l2 = ((x[1][0] - x[0][0]) * (p[1] - x[0][1]) - (p[0] - x[0][0]) * (x[1][1] - x[0][1])) / d;
    [1.0 - l1 - l2, l1, l2]
}

/// The geometry of one element: its corners, and the edge that follows a circle if one does.
#[derive(Clone, Copy, Debug)]
pub struct ElementGeometry<'a> {
    /// Corner positions.
    pub corners: &'a [[f64; 2]; 3],
    /// Its curved edges (none for a straight triangle).
    pub curves: &'a [CurvedEdge],
}

impl ElementGeometry<'_> {
    /// The position at barycentric point `lam` and the Jacobian's columns
    /// (dx/dxi1, dx/dxi2), xi = (l1, l2).
    pub fn map(&self, lam: [f64; 3]) -> ([f64; 2], [[f64; 2]; 2]) {
        let x = self.corners;
        let mut p = [
            lam[0] * x[0][0] + lam[1] * x[1][0] + lam[2] * x[2][0],
            lam[0] * x[0][1] + lam[1] * x[1][1] + lam[2] * x[2][1],
        ];
        // d x / d l_i, before the constraint sum l = 1 is applied.
        let mut d = *x;
        for c in self.curves {
            // Offset l_a l_b psi(u), u = (1 + l_b - l_a) / 2: on the edge
            // (l_a = 1 - t, l_b = t) it is the arc's offset phi(t), it
            // vanishes on the other two edges, and it is smooth everywhere
            // (Zlamal's s phi(l_b / s), s = l_a + l_b, has a kink at the
            // opposite corner, and Gauss rules then left a part's area with
            // an error falling only as h^2).
            let [a, b] = EDGES[c.edge];
            let u = 0.5 * (1.0 + lam[b] - lam[a]);
            let (psi, dpsi) = c.offset_quotient(x[a], x[b], u);
            let w = lam[a] * lam[b];
            for k in 0..2 {
                p[k] += w * psi[k];
                d[a][k] += lam[b] * psi[k] - 0.5 * w * dpsi[k];
                d[b][k] += lam[a] * psi[k] + 0.5 * w * dpsi[k];
            }
        }
        (p, [[d[1][0] - d[0][0], d[1][1] - d[0][1]], [d[2][0] - d[0][0], d[2][1] - d[0][1]]])
    }

    /// Gradients of the barycentric coordinates and the signed area
    /// element (half the Jacobian's determinant) at `lam`.
    pub fn gradients_at(&self, lam: [f64; 3]) -> ([f64; 2], [[f64; 2]; 3], f64) {
        let (p, j) = self.map(lam);
        let det = j[0][0] * j[1][1] - j[1][0] * j[0][1];
        let g1 = [j[1][1] / det, -j[1][0] / det];
        let g2 = [-j[0][1] / det, j[0][0] / det];
        (p, [[-g1[0] - g2[0], -g1[1] - g2[1]], g1, g2], 0.5 * det)
    }

    /// True when p lies beyond one of the element's straight edges by more
    /// than `margin` (in barycentric units of the straight triangle): then
    /// it is outside, whatever its curved edges do, since a straight edge
    /// is the element's own and an arc between two corners stays within
    /// the angle of the third (its turn is far below the smallest angle).
    /// Lets point location skip the Newton iteration of `barycentric` on
    /// curved elements that cannot hold the point (the stray field's 720
    /// samples near the Kelvin rim spent a fifth of a small run there).
    pub fn clearly_outside(&self, p: [f64; 2], margin: f64) -> bool {
        let lam = barycentric(self.corners, p);
        (0..3).any(|v| lam[v] < -margin && self.curves.iter().all(|c| EDGES[c.edge].contains(&v)))
    }

    /// Barycentric coordinates of the physical point p: exact for a
    /// straight triangle, by Newton's method on the map for a curved one
    /// (started from the straight triangle's answer).
    pub fn barycentric(&self, p: [f64; 2]) -> [f64; 3] {
        let mut lam = barycentric(self.corners, p);
        if self.curves.is_empty() {
            return lam;
        }
        for _ in 0..30 {
            let (q, g, _) = self.gradients_at(lam);
            let r = [p[0] - q[0], p[1] - q[1]];
            let step = [g[1][0] * r[0] + g[1][1] * r[1], g[2][0] * r[0] + g[2][1] * r[1]];
            if !step[0].is_finite() || !step[1].is_finite() {
                break;
            }
            lam = [1.0 - (lam[1] + step[0]) - (lam[2] + step[1]), lam[1] + step[0], lam[2] + step[1]];
            if step[0].abs() + step[1].abs() < 1e-15 {
                break;
            }
        }
        lam
    }

    /// How far the element reaches beyond its corners' box (the arc's bulge).
    pub fn bulge(&self) -> f64 {
        self.curves
            .iter()
            .map(|c| {
                let r = c.radii[0].max(c.radii[1]);
                r * (1.0 - (0.5 * (c.angles[1] - c.angles[0])).cos()) + (c.radii[0] - c.radii[1]).abs()
            })
            .fold(0.0, f64::max)
    }

    /// Whether any edge is curved.
    pub fn is_curved(&self) -> bool {
        !self.curves.is_empty()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A quarter disk as one curved triangle: the map puts the arc's points
    /// on the circle, keeps the straight edges straight, and its area (the
    /// quadrature of half the determinant) is the quarter disk's, pi / 4.
    #[test]
    fn a_curved_triangle_follows_its_circle() {
        let x = [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]];
        let curves = [CurvedEdge::new(1, &x, [0.0, 0.0])];
        let g = ElementGeometry { corners: &x, curves: &curves };
        for t in [0.1, 0.37, 0.5, 0.9] {
            let (p, _) = g.map([0.0, 1.0 - t, t]);
            assert!((p[0].hypot(p[1]) - 1.0).abs() < 1e-14, "t {t}: radius {}", p[0].hypot(p[1]));
            let (q, _) = g.map([1.0 - t, t, 0.0]);
            assert!(q[1].abs() < 1e-15 && (q[0] - t).abs() < 1e-15);
        }
        let rule = crate::quadrature::rule(crate::element_order::ElementOrder::Quartic, mesher::Symmetry::Axisymmetric, true);
        let area: f64 = rule.points.iter().zip(rule.weights).map(|(l, w)| w * g.gradients_at(*l).2).sum();
        assert!((area - std::f64::consts::FRAC_PI_4).abs() < 1e-7, "area {area}");
        // The inverse map finds a point in the bulge outside the chord.
        let lam = g.barycentric([0.69, 0.69]);
        let (back, _) = g.map(lam);
        assert!((back[0] - 0.69).abs() < 1e-12 && (back[1] - 0.69).abs() < 1e-12);
        assert!(lam.iter().all(|&l| l >= 0.0) && barycentric(&x, [0.69, 0.69])[0] < 0.0);
    }

    /// The quick rejection of point location: a point beyond a straight
    /// edge of the quarter disk is clearly outside, one in the arc's bulge
    /// beyond the chord is not (only the Newton inversion decides there),
    /// and on a grid around the element every point it rejects lies
    /// outside the quarter disk.
    #[test]
    fn only_points_beyond_a_straight_edge_are_clearly_outside() {
        let x = [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]];
        let curves = [CurvedEdge::new(1, &x, [0.0, 0.0])];
        let g = ElementGeometry { corners: &x, curves: &curves };
        assert!(g.clearly_outside([0.5, -0.1], 1e-2) && g.clearly_outside([-0.1, 0.5], 1e-2));
        assert!(!g.clearly_outside([0.69, 0.69], 1e-2) && !g.clearly_outside([0.3, 0.3], 1e-2));
        let mut rejected = 0;
        for i in -20..=30 {
            for j in -20..=30 {
                let p = [i as f64 * 0.05, j as f64 * 0.05];
                if g.clearly_outside(p, 1e-2) {
                    rejected += 1;
                    let inside = p[0] >= 0.0 && p[1] >= 0.0 && p[0].hypot(p[1]) <= 1.0;
                    assert!(!inside, "{p:?} is in the quarter disk but was rejected");
                }
            }
        }
        assert!(rejected > 1000, "only {rejected} of 2601 points rejected");
    }
}
#[cfg(test)]
mod area_tests {
    use super::*;

    /// A triangle with one edge on a circle of radius 2 mm spanning 0.08 rad,
    /// its third corner far (the centre) or close (a sliver): its area by
    /// each order's rule is the chord triangle's plus the circular
    /// segment's, R^2 (theta - sin theta) / 2, to 1e-9 of the segment, with
    /// the curved edge in each of the three places. (The kinked blend
    /// s phi(l_b / s) left the sliver 1.6 % of its segment off.)
    #[test]
    fn a_curved_sliver_has_the_area_of_its_circular_segment() {
        let (r, th): (f64, f64) = (0.002, 0.0795);
        let (a, b) = ([r, 0.0], [r * th.cos(), r * th.sin()]);
        let segment = 0.5 * r * r * (th - th.sin());
        for c in [[0.0018, 0.0001], [0.0, 0.0]] {
            for (k, x) in [(0usize, [a, b, c]), (1, [c, a, b]), (2, [b, c, a])] {
                let curves = [CurvedEdge::new(k, &x, [0.0, 0.0])];
                let g = ElementGeometry { corners: &x, curves: &curves };
                let chord_triangle = 0.5 * ((x[1][0] - x[0][0]) * (x[2][1] - x[0][1]) - (x[2][0] - x[0][0]) * (x[1][1] - x[0][1]));
                for order in [
                    crate::element_order::ElementOrder::Quadratic,
                    crate::element_order::ElementOrder::Cubic,
                    crate::element_order::ElementOrder::Quartic,
                ] {
                    let rule = crate::quadrature::rule(order, mesher::Symmetry::Planar, true);
                    let area: f64 = rule.points.iter().zip(rule.weights).map(|(l, w)| w * g.gradients_at(*l).2).sum();
                    let off = (area - chord_triangle - segment) / segment;
                    assert!(off.abs() < 1e-9, "third corner {c:?}, edge {k}, {order:?}: area off by {off:e} of the segment");
                }
            }
        }
    }
}
