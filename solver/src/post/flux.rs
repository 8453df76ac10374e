//! Flux across lines and flux linkage of windings.

use super::integrate::for_each_potential_point;
use crate::solution::Solution;
use crate::space::ElementKind;
use mesher::Symmetry;

/// Flux across the line from `a` to `b`: planar, A(b) - A(a) per metre of
/// depth (positive when B crosses with the line's clockwise normal);
/// axisymmetric, 2 pi (r_b A(b) - r_a A(a)) through the disk or annulus that
/// the line sweeps. None when an end lies outside the mesh.
pub fn line_flux(solution: &Solution, a: [f64; 2], b: [f64; 2]) -> Option<f64> {
    let (pa, pb) = (solution.potential_at(a)?, solution.potential_at(b)?);
    Some(match solution.symmetry() {
        Symmetry::Planar => pb - pa,
        Symmetry::Axisymmetric => 2.0 * std::f64::consts::PI * (b[0] * pb - a[0] * pa),
    })
}

/// Flux linkage of `turns` turns spread uniformly over the parts, each with
/// a sign (+1 where the turns run +phi or out of the plane, -1 for a return
/// side): turns times the signed mean of A (2 pi r A when axisymmetric).
/// Planar values are per metre of depth.
pub fn winding_linkage(solution: &Solution, parts: &[(usize, f64)], turns: f64) -> f64 {
    let els = &solution.elements;
    let mut linkage = 0.0;
    for &(part, sign) in parts {
        let (mut integral, mut area) = (0.0, 0.0);
        for e in 0..els.n_physical {
            if els.kinds[e] != ElementKind::Part(part) {
                continue;
            }
            for_each_potential_point(solution, e, |x, weight, a| {
                integral += weight * a;
                area += weight
                    * if solution.symmetry() == Symmetry::Axisymmetric {
                        1.0 / (2.0 * std::f64::consts::PI * x[0])
                    } else {
                        1.0
                    };
            });
        }
        if area > 0.0 {
            linkage += sign * turns * integral / area;
        }
    }
    linkage
}
