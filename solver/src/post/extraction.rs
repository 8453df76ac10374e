//! The flux density at a point by extraction: the weighted mean of B over a
//! ball around the point instead of B's value in the one element that holds
//! it.
//!
//! Where no current flows and the material is vacuum, every Cartesian
//! component of B is a harmonic function (B = -mu0 grad psi with psi
//! harmonic), so it equals its mean over any ball centred on the point, and
//! its mean with any radial weight (the mean-value property; in the plane,
//! over disks). A finite-element B is exact only at the mesh's scale, but
//! its weighted mean is a smooth functional of the potential and converges
//! like an integral (I. Babuska, A. Miller, The post-processing approach in
//! the finite element method, part 1: calculation of displacements, stresses
//! and other higher derivatives of the displacements, IJNME 20, 1984): on
//! P1's axis probes, far faster than the point value (see
//! docs/measurement-log.md).
//!
//! The ball is the largest that stays in vacuum and inside the domain
//! (away from every part that is not vacuum, every coil, the box's sides
//! and the Kelvin rim; the axis of an axisymmetric study is no boundary,
//! the ball is a ball in space), at most `SPAN` widths of the element that
//! holds the point (its cost grows with the elements it covers). The
//! weight is w(s) = (1 - s^2/rho^2)^4: three continuous derivatives at the
//! ball's edge, so the elements it cuts are integrated to about 1e-7 on
//! sub-triangles an eighth of rho wide.
//!
//! About the axis the ball is the solid of revolution's, and B_r and B_z are
//! the x and z components of B at (r0, 0, z0); a ring at (r, z) meets the
//! ball over the angles where s(phi) < rho, and its weight is the integral of
//! w (times cos phi for B_r) over them (Gauss-Legendre in phi).

use crate::element::{flux_density, point_op, Placement};
use crate::quadrature::{edge_rule, rule_of_degree};
use crate::solution::Solution;
use mesher::geometry::point_segment_distance;
use mesher::{BoundaryTag, Symmetry};
use rayon::prelude::*;

/// The ball's radius is at most this many widths of the element that holds
/// the point.
const SPAN: f64 = 6.0;
/// The ball keeps this share of the distance to the nearest part or side.
const MARGIN: f64 = 0.9;
/// The power of the weight (1 - s^2/rho^2)^POWER.
const POWER: i32 = 4;
/// Sub-triangles wholly inside the ball are integrated once no wider than
/// this share of rho, those the ball's edge cuts once no wider than `CUT`.
const INSIDE: f64 = 0.5;
const CUT: f64 = 0.125;
/// The triangle rule's degree: measured on P1's probes at quartic order
/// (errors near 5e-9), degrees 8, 10 and 12 agree to 1e-9 and 6 does not.
const RULE_DEGREE: usize = 8;
/// Gauss-Legendre points along a ring's arc inside the ball.
const RING_POINTS: usize = 6;
/// Deepest subdivision of an element.
const DEPTH: u32 = 12;

/// B at a point by extraction.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Extracted {
    /// Flux density, T.
    pub b: [f64; 2],
    /// The ball's radius, m.
    pub radius: f64,
    /// The element that holds the point.
    pub element: usize,
}

/// B at `x0` by extraction; None where the point is not in current-free
/// vacuum (in a part, a coil, the exterior) or no ball fits.
pub fn extracted_b(sol: &Solution, x0: [f64; 2]) -> Option<Extracted> {
    let (e0, _) = sol.element_at(x0)?;
    if !sol.is_vacuum(e0) {
        return None;
    }
    let width = element_width(&sol.elements.coords[e0]);
    let rho = (MARGIN * clearance(sol, x0, SPAN * width / MARGIN)).min(SPAN * width);
    if rho.is_nan() || rho <= 1e-6 * width {
        return None;
    }
    let ball = Ball {
        x0,
        rho,
        symmetry: sol.symmetry(),
    };
    // Summed in element order, so the value is the same to the bit on every run.
    let near = sol.elements_near([x0[0] - rho, x0[1] - rho], [x0[0] + rho, x0[1] + rho]);
    let per_element: Vec<[f64; 3]> = near.into_par_iter().map(|e| element_sums(sol, &ball, e)).collect();
    let sums = per_element.iter().fold([0.0; 3], |a, b| [a[0] + b[0], a[1] + b[1], a[2] + b[2]]);
    (sums[2] > 0.0).then(|| Extracted {
        b: [sums[0] / sums[2], sums[1] / sums[2]],
        radius: rho,
        element: e0,
    })
}

/// The longest edge of a triangle.
fn element_width(x: &[[f64; 2]; 3]) -> f64 {
    (0..3).map(|i| dist2(x[i], x[(i + 1) % 3])).fold(0.0, f64::max).sqrt()
}

/// The squared distance of two points (no hypot: this runs for every
/// sub-triangle of every sample of a line probe).
fn dist2(a: [f64; 2], b: [f64; 2]) -> f64 {
    (a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2)
}

/// Distance from p to a straight triangle (zero inside).
fn triangle_distance(p: [f64; 2], x: &[[f64; 2]; 3]) -> f64 {
    let lam = crate::element::barycentric(x, p);
    if lam.iter().all(|&l| l >= 0.0) {
        return 0.0;
    }
    (0..3).map(|i| point_segment_distance(p, x[i], x[(i + 1) % 3])).fold(f64::INFINITY, f64::min)
}

/// How far x0 is from anything the field is not harmonic across: elements
/// that are not vacuum (less their arcs' bulge), and the domain's sides
/// and rim (not the axis); `reach` or more when nothing is nearer (only
/// the elements within `reach` are searched).
fn clearance(sol: &Solution, x0: [f64; 2], reach: f64) -> f64 {
    let els = &sol.elements;
    let near = sol.elements_near([x0[0] - reach, x0[1] - reach], [x0[0] + reach, x0[1] + reach]);
    let parts = near
        .into_par_iter()
        .filter(|&e| !sol.is_vacuum(e))
        .map(|e| (triangle_distance(x0, &els.coords[e]) - els.geometry(e).bulge()).max(0.0))
        .reduce(|| f64::INFINITY, f64::min);
    let mesh = sol.problem.mesh;
    let sides = mesh
        .boundary
        .iter()
        .filter(|(_, tag)| {
            matches!(
                tag,
                BoundaryTag::Outer | BoundaryTag::Rim | BoundaryTag::Mirror { .. } | BoundaryTag::Periodic { .. }
            )
        })
        .map(|([a, b], _)| point_segment_distance(x0, mesh.nodes[*a], mesh.nodes[*b]))
        .fold(f64::INFINITY, f64::min);
    parts.min(sides).min(reach)
}

/// The ball (a disk in the plane; about the axis, the ball in space whose
/// trace in the (r, z) half-plane is the disk) and its weight.
struct Ball {
    x0: [f64; 2],
    rho: f64,
    symmetry: Symmetry,
}

impl Ball {
    /// The weights of B's two components at x per unit of the element's
    /// integration weight (area in the plane; 2 pi r times area about the axis).
    fn weights(&self, x: [f64; 2]) -> [f64; 2] {
        let w = |s2: f64| {
            let t = 1.0 - s2 / (self.rho * self.rho);
            if t > 0.0 {
                t.powi(POWER)
            } else {
                0.0
            }
        };
        let dz = x[1] - self.x0[1];
        match self.symmetry {
            Symmetry::Planar => {
                let v = w((x[0] - self.x0[0]).powi(2) + dz * dz);
                [v, v]
            }
            Symmetry::Axisymmetric => self.ring_weights(x[0], dz, &w),
        }
    }

    /// About the axis: the mean over phi of w(s(phi)) and of w cos(phi) on
    /// the ring of radius r at height z0 + dz, where s^2 = (r - r0)^2 + dz^2
    /// + 4 r r0 sin^2(phi / 2) (no cancellation far from the axis).
    fn ring_weights(&self, r: f64, dz: f64, w: &dyn Fn(f64) -> f64) -> [f64; 2] {
        let r0 = self.x0[0];
        let near = (r - r0).powi(2) + dz * dz;
        let rho2 = self.rho * self.rho;
        if near >= rho2 {
            return [0.0, 0.0];
        }
        // On the axis every ring is whole and the same distance from the
        // point all round: its mean weight is w(near) and B_x's cancels.
        // The quadrature below gives the same to rounding, at six cosines a
        // point: an axis line probe of 2000 samples spent most of its
        // extraction on them.
        if r0 == 0.0 {
            return [0.0, w(near)];
        }
        let k = 4.0 * r * r0;
        // The ring leaves the ball where 4 r r0 sin^2(phi/2) = rho^2 - near.
        let end = if k <= rho2 - near {
            std::f64::consts::PI
        } else {
            2.0 * ((rho2 - near) / k).sqrt().asin()
        };
        let (mut m0, mut m1) = (0.0, 0.0);
        for &(t, wt) in edge_rule(RING_POINTS) {
            // sin^2(phi / 2) = (1 - cos phi) / 2: one cosine a point.
            let c = (t * end).cos();
            let v = w(near + 0.5 * k * (1.0 - c)) * wt;
            m0 += v;
            m1 += v * c;
        }
        // Over [-end, end] of the full turn 2 pi, as a mean. On the axis
        // every ring is whole and B_x's weight cancels exactly.
        let share = end / std::f64::consts::PI;
        let radial = if r0 > 0.0 { m1 * share } else { 0.0 };
        [radial, m0 * share]
    }
}

/// Element e's share of the weighted integrals of B's two components and of
/// the weight itself (zero for an element the ball does not reach).
fn element_sums(sol: &Solution, ball: &Ball, e: usize) -> [f64; 3] {
    let els = &sol.elements;
    let geom = els.geometry(e);
    let a = els.gather(e, &sol.reduced);
    let background = sol.background(e);
    let rule = rule_of_degree(RULE_DEGREE);
    let bulge = geom.bulge();
    let mut sums = [0.0; 3];
    let mut stack = vec![([[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]], 0u32)];
    while let Some((lams, depth)) = stack.pop() {
        let corners = lams.map(|l| geom.map(l).0);
        let width = element_width(&corners);
        let far2 = corners.iter().map(|&c| dist2(c, ball.x0)).fold(0.0, f64::max);
        if triangle_distance(ball.x0, &corners) > ball.rho + bulge {
            continue;
        }
        let inside = far2 <= ball.rho * ball.rho;
        let fine = if inside { INSIDE } else { CUT } * ball.rho;
        if width > fine && depth < DEPTH {
            stack.extend(split(lams).map(|l| (l, depth + 1)));
            continue;
        }
        let share = 0.25f64.powi(depth as i32);
        for (mu, wq) in rule.points.iter().zip(rule.weights) {
            let lam = [0, 1, 2].map(|k| mu[0] * lams[0][k] + mu[1] * lams[1][k] + mu[2] * lams[2][k]);
            let op = point_op(geom, els.order, sol.symmetry(), Placement::Physical, lam, wq * share);
            let wt = ball.weights(op.x);
            if wt == [0.0, 0.0] {
                continue;
            }
            let b = flux_density(&op, &a, background);
            let dw = op.weight.abs();
            sums[0] += wt[0] * b[0] * dw;
            sums[1] += wt[1] * b[1] * dw;
            sums[2] += wt[1] * dw;
        }
    }
    sums
}

/// The four halves-of-edges sub-triangles of a sub-triangle given by its
/// corners' barycentric coordinates in the element.
fn split(l: [[f64; 3]; 3]) -> [[[f64; 3]; 3]; 4] {
    let mid = |a: [f64; 3], b: [f64; 3]| [0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1]), 0.5 * (a[2] + b[2])];
    let (m01, m12, m20) = (mid(l[0], l[1]), mid(l[1], l[2]), mid(l[2], l[0]));
    [[l[0], m01, m20], [m01, l[1], m12], [m20, m12, l[2]], [m01, m12, m20]]
}
