//! The map from the reference triangle to an element: affine for a straight
//! triangle; for a triangle with one edge on a circle (the Kelvin rim, the
//! outline of a round part or an arc of one), the affine map plus the edge's
//! bulge blended into the triangle, so the element follows the circle
//! exactly and its other two edges stay straight (conforming with straight
//! neighbours). Without it the polygon's sagitta caps the accuracy of every
//! element order at h^2: with straight chords on the Kelvin rim, P1's probe
//! at 47.4 mm stayed near 2.5e-4 at orders 3 and 4 however fine the mesh.
//!
//! The blend is the one-edge transfinite map (M. Zlamal, Curved elements in
//! the finite element method I, SIAM J. Numer. Anal. 10, 1973; W. J. Gordon,
//! C. A. Hall, Transfinite element methods, Numer. Math. 21, 1973):
//! x(l) = sum l_i x_i + s phi(t), s = l_a + l_b, t = l_b / s, where
//! phi(t) = gamma(t) - ((1 - t) x_a + t x_b) is the arc's offset from its
//! chord, zero at both corners.

use crate::element::EDGES;

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

    /// The point at fraction t along the arc, and its derivative in t.
    fn at(&self, t: f64) -> ([f64; 2], [f64; 2]) {
        let theta = self.angles[0] + t * (self.angles[1] - self.angles[0]);
        let r = self.radii[0] + t * (self.radii[1] - self.radii[0]);
        let (dtheta, dr) = (self.angles[1] - self.angles[0], self.radii[1] - self.radii[0]);
        let (s, c) = theta.sin_cos();
        (
            [self.center[0] + r * c, self.center[1] + r * s],
            [dr * c - r * dtheta * s, dr * s + r * dtheta * c],
        )
    }
}

/// The geometry of one element: its corners, and the edge that follows a circle if one does.
#[derive(Clone, Copy, Debug)]
pub struct ElementGeometry<'a> {
    /// Corner positions.
    pub corners: &'a [[f64; 2]; 3],
    /// The curved edge, if any.
    pub curve: Option<&'a CurvedEdge>,
}

impl ElementGeometry<'_> {
    /// A straight triangle.
    pub fn straight(corners: &[[f64; 2]; 3]) -> ElementGeometry<'_> {
        ElementGeometry { corners, curve: None }
    }

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
        if let Some(c) = self.curve {
            let [a, b] = EDGES[c.edge];
            let s = lam[a] + lam[b];
            if s > 1e-14 {
                let t = lam[b] / s;
                let (g, dg) = c.at(t);
                let phi = [g[0] - (1.0 - t) * x[a][0] - t * x[b][0], g[1] - (1.0 - t) * x[a][1] - t * x[b][1]];
                let dphi = [dg[0] - x[b][0] + x[a][0], dg[1] - x[b][1] + x[a][1]];
                for k in 0..2 {
                    p[k] += s * phi[k];
                    d[a][k] += phi[k] - t * dphi[k];
                    d[b][k] += phi[k] + (1.0 - t) * dphi[k];
                }
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

    /// Barycentric coordinates of the physical point p: exact for a
    /// straight triangle, by Newton's method on the map for a curved one
    /// (started from the straight triangle's answer).
    pub fn barycentric(&self, p: [f64; 2]) -> [f64; 3] {
        let mut lam = crate::element::barycentric(self.corners, p);
        if self.curve.is_none() {
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
        self.curve.map_or(0.0, |c| {
            let r = c.radii[0].max(c.radii[1]);
            r * (1.0 - (0.5 * (c.angles[1] - c.angles[0])).cos()) + (c.radii[0] - c.radii[1]).abs()
        })
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
        let curve = CurvedEdge::new(1, &x, [0.0, 0.0]);
        let g = ElementGeometry {
            corners: &x,
            curve: Some(&curve),
        };
        for t in [0.1, 0.37, 0.5, 0.9] {
            let (p, _) = g.map([0.0, 1.0 - t, t]);
            assert!((p[0].hypot(p[1]) - 1.0).abs() < 1e-14, "t {t}: radius {}", p[0].hypot(p[1]));
            let (q, _) = g.map([1.0 - t, t, 0.0]);
            assert!(q[1].abs() < 1e-15 && (q[0] - t).abs() < 1e-15);
        }
        let rule = crate::quadrature::rule(crate::element::ElementOrder::Quartic, mesher::Symmetry::Axisymmetric, false);
        let area: f64 = rule.points.iter().zip(rule.weights).map(|(l, w)| w * g.gradients_at(*l).2).sum();
        assert!((area - std::f64::consts::FRAC_PI_4).abs() < 1e-7, "area {area}");
        // The inverse map finds a point in the bulge outside the chord.
        let lam = g.barycentric([0.69, 0.69]);
        let (back, _) = g.map(lam);
        assert!((back[0] - 0.69).abs() < 1e-12 && (back[1] - 0.69).abs() < 1e-12);
        assert!(lam.iter().all(|&l| l >= 0.0) && crate::element::barycentric(&x, [0.69, 0.69])[0] < 0.0);
    }
}
