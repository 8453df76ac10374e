//! The working point of a magnet: B and H along its magnetization at every
//! quadrature point, the margin to the knee, and the permeance coefficient.

use super::integrate::for_each_field_point;
use crate::solution::Solution;
use crate::space::ElementKind;
use crate::MU0;

/// What the magnet check reports for one part.
#[derive(Clone, Debug, PartialEq)]
pub struct WorkingPoint {
    /// Smallest margin over the magnet: 1 - H/H_knee along the magnetization
    /// (1 = no demagnetizing field, 0 = at the knee, negative = past it).
    pub margin: f64,
    /// Volume share of the magnet past the knee.
    pub share_past_knee: f64,
    /// Permeance coefficient -B/(mu0 H) from the volume means along the magnetization.
    pub permeance: f64,
    /// Volume means of B and H along the magnetization (T, A/m).
    pub mean_b: f64,
    /// Volume mean of H along the magnetization, A/m.
    pub mean_h: f64,
    /// The most demagnetizing H along the magnetization (A/m).
    pub worst_h: f64,
    /// (H, B) along the magnetization at each quadrature point, for plots.
    pub points: Vec<[f64; 2]>,
}

/// Working point of part `part`, magnetized along the unit vector `dir`,
/// against a knee at field strength `knee_h` (negative, A/m).
pub fn working_point(solution: &Solution, part: usize, dir: [f64; 2], knee_h: f64) -> WorkingPoint {
    let els = &solution.elements;
    let (mut vol, mut sb, mut sh, mut past) = (0.0, 0.0, 0.0, 0.0);
    let mut worst = f64::INFINITY;
    let mut points = Vec::new();
    for e in 0..els.n_physical {
        if els.kinds[e] != ElementKind::Part(part) {
            continue;
        }
        for_each_field_point(solution, e, |p| {
            let (b, h) = (p.b, p.h());
            let (bp, hp) = (b[0] * dir[0] + b[1] * dir[1], h[0] * dir[0] + h[1] * dir[1]);
            vol += p.weight;
            sb += bp * p.weight;
            sh += hp * p.weight;
            worst = worst.min(hp);
            if hp < knee_h {
                past += p.weight;
            }
            points.push([hp, bp]);
        });
    }
    let (mean_b, mean_h) = if vol > 0.0 { (sb / vol, sh / vol) } else { (0.0, 0.0) };
    let margin = if knee_h < 0.0 && worst.is_finite() {
        1.0 - worst / knee_h
    } else {
        f64::INFINITY
    };
    let permeance = if mean_h < 0.0 { -mean_b / (MU0 * mean_h) } else { f64::INFINITY };
    WorkingPoint {
        margin,
        share_past_knee: if vol > 0.0 { past / vol } else { 0.0 },
        permeance,
        mean_b,
        mean_h,
        worst_h: worst,
        points,
    }
}
