//! The stray field far from the assembly: the dipole moment (axisymmetric)
//! and the distances at which |B| falls to a given level.

use crate::solution::Solution;
use crate::MU0;
use mesher::Symmetry;
use std::f64::consts::PI;

/// Magnetic dipole moment (A m2) of an axisymmetric assembly, by projecting
/// the reaction potential on a circle of radius `rho` about `center` (all
/// sources inside it) onto the dipole term of the exterior expansion
/// A_phi = sum c_n P_n^1(cos t) / rho^(n+1): the associated Legendre
/// functions are orthogonal on [0, pi] with weight sin t, so
/// m = (4 pi rho^2 / mu0) (3/4) integral of A sin^2 t dt exactly, whatever
/// the higher multipoles. None outside axisymmetric studies.
pub fn dipole_moment(solution: &Solution, center: [f64; 2], rho: f64) -> Option<f64> {
    if solution.symmetry() != Symmetry::Axisymmetric {
        return None;
    }
    let n = 400;
    let mut s = 0.0;
    for k in 0..n {
        let t = PI * (k as f64 + 0.5) / n as f64;
        let p = [rho * t.sin(), center[1] - rho * t.cos()];
        let (e, lam) = solution.element_at(p)?;
        let op = crate::element::point_op(
            &solution.elements.coords[e],
            solution.elements.order,
            Symmetry::Axisymmetric,
            solution.placement(e),
            lam,
            1.0,
        );
        let a = crate::element::potential(&op, &solution.elements.gather(e, &solution.reduced));
        s += a * t.sin().powi(2) * PI / n as f64;
    }
    Some(4.0 * PI * rho * rho / MU0 * 0.75 * s)
}

/// Distance from `origin` along the unit vector `dir` at which |B| last
/// exceeds `level`, from the solution up to `limit`, then (if still above)
/// by extrapolating with the far-field decay d^-power. Returns None when the
/// field never reaches the level at the origin side.
pub fn fall_distance(solution: &Solution, origin: [f64; 2], dir: [f64; 2], limit: f64, level: f64, power: f64) -> Option<f64> {
    let n = 800;
    let mut last: Option<(f64, f64)> = None;
    let mut crossing = None;
    for k in 1..=n {
        let d = limit * k as f64 / n as f64;
        let p = [origin[0] + d * dir[0], origin[1] + d * dir[1]];
        let Some(f) = solution.field_at(p) else { break };
        let b = f.b[0].hypot(f.b[1]);
        if b >= level {
            crossing = None;
        } else if crossing.is_none() {
            crossing = Some(interpolate(last, (d, b), level));
        }
        last = Some((d, b));
    }
    match (crossing, last) {
        (Some(c), _) => Some(c),
        (None, Some((d, b))) if b > 0.0 => Some(d * (b / level).powf(1.0 / power)),
        _ => None,
    }
}

fn interpolate(prev: Option<(f64, f64)>, cur: (f64, f64), level: f64) -> f64 {
    match prev {
        Some((d0, b0)) if b0 > level => d0 + (cur.0 - d0) * (b0 - level) / (b0 - cur.1),
        _ => cur.0,
    }
}

/// |H| (A/m) of a point dipole of moment m at distance d on its axis and in its equatorial plane.
pub fn dipole_h(m: f64, d: f64) -> (f64, f64) {
    let equator = m / (4.0 * PI * d.powi(3));
    (2.0 * equator, equator)
}
