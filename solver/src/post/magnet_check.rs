//! The working point of a magnet: B and H along its magnetization at every
//! quadrature point, the margin to the knee, and the permeance coefficient.

use super::integrate::{for_each_field_point, FieldPoint};
use crate::solution::Solution;
use crate::space::ElementKind;
use crate::MU0;

/// What the magnet check reports for one part.
#[derive(Clone, Debug, PartialEq)]
pub struct WorkingPoint {
    /// Margin of the most demagnetized WORST_SHARE of the volume:
    /// 1 - H/H_knee along the magnetization at that volume percentile (1 = no
    /// demagnetizing field, 0 = at the knee, negative = past it). Unlike the
    /// worst point it converges with the mesh: at a corner the field is
    /// singular, and halving the mesh twice moved the worst point's margin
    /// from -0.61 to -1.19 to -1.63 while the share past the knee stayed at
    /// 0.04 %.
    pub margin: f64,
    /// The margin at the single worst quadrature point: a local value that
    /// follows the mesh at corners.
    pub margin_local: f64,
    /// Volume share of the magnet past the knee.
    pub share_past_knee: f64,
    /// Permeance coefficient -B/(mu0 H) from the volume means along the magnetization.
    pub permeance: f64,
    /// Volume means of B and H along the magnetization (T, A/m).
    pub mean_b: f64,
    /// Volume mean of H along the magnetization, A/m.
    pub mean_h: f64,
    /// The most demagnetizing H along the magnetization (A/m), at one point.
    pub worst_h: f64,
    /// H along the magnetization at the most demagnetized WORST_SHARE of the volume (A/m).
    pub worst_share_h: f64,
    /// Irreversible loss: 1 - the volume mean of the share of Br each point
    /// keeps when it recoils from the lowest point it reached (on this
    /// solution's curve, after any earlier exposure). The flux lost for
    /// good once the magnet returns to its working point.
    pub loss: f64,
    /// (H, B) along the magnetization at each quadrature point, for plots.
    pub points: Vec<[f64; 2]>,
}

/// The volume share over which the margin is judged.
pub const WORST_SHARE: f64 = 0.01;

/// The H below which `share` of the volume lies: the weighted percentile of
/// (H, weight) pairs.
fn volume_percentile(mut samples: Vec<(f64, f64)>, share: f64) -> f64 {
    samples.sort_by(|a, b| a.0.total_cmp(&b.0));
    let total: f64 = samples.iter().map(|s| s.1).sum();
    let mut below = 0.0;
    for (h, w) in &samples {
        below += w;
        if below >= share * total {
            return *h;
        }
    }
    samples.last().map_or(f64::NAN, |s| s.0)
}

/// Working point of part `part`, magnetized along the unit vector `dir`,
/// against a knee at field strength `knee_h` (negative, A/m).
pub fn working_point(solution: &Solution, part: usize, dir: [f64; 2], knee_h: f64) -> WorkingPoint {
    let els = &solution.elements;
    let (mut vol, mut sb, mut sh, mut past) = (0.0, 0.0, 0.0, 0.0);
    let mut worst = f64::INFINITY;
    let mut points = Vec::new();
    let mut weighted = Vec::new();
    let mut kept = 0.0;
    for e in 0..els.n_physical {
        if els.kinds[e] != ElementKind::Part(part) {
            continue;
        }
        for_each_field_point(solution, e, |p| {
            kept += kept_share(p) * p.weight;
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
            weighted.push((hp, p.weight));
        });
    }
    let (mean_b, mean_h) = if vol > 0.0 { (sb / vol, sh / vol) } else { (0.0, 0.0) };
    let worst_share_h = volume_percentile(weighted, WORST_SHARE);
    let margin_at = |h: f64| if knee_h < 0.0 && h.is_finite() { 1.0 - h / knee_h } else { f64::INFINITY };
    let permeance = if mean_h < 0.0 { -mean_b / (MU0 * mean_h) } else { f64::INFINITY };
    WorkingPoint {
        margin: margin_at(worst_share_h),
        margin_local: margin_at(worst),
        share_past_knee: if vol > 0.0 { past / vol } else { 0.0 },
        loss: if vol > 0.0 { 1.0 - kept / vol } else { 0.0 },
        permeance,
        mean_b,
        mean_h,
        worst_h: worst,
        worst_share_h,
        points,
    }
}

/// The share of Br a magnet's point keeps: the element's share after an
/// exposure, or less where this solution drives it further down its curve.
fn kept_share(p: &FieldPoint) -> f64 {
    let Some((curve, axis)) = p.law.magnet_curve() else { return 1.0 };
    let h = p.h();
    p.share.min(curve.remaining_share(h[0] * axis[0] + h[1] * axis[1]))
}

/// Per physical element, the share of its remanence each magnet element
/// keeps after this solution (the volume mean over its points; 1 for every
/// other element): the state an exposure leaves behind.
pub fn remaining_shares(solution: &Solution) -> Vec<f64> {
    (0..solution.elements.n_physical)
        .map(|e| {
            let (mut kept, mut vol) = (0.0, 0.0);
            for_each_field_point(solution, e, |p| {
                kept += kept_share(p) * p.weight;
                vol += p.weight;
            });
            if vol > 0.0 {
                kept / vol
            } else {
                1.0
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::volume_percentile;

    #[test]
    fn the_percentile_is_weighted_by_volume() {
        // One tiny, very negative point (a corner) does not move the 1 % figure.
        let mut samples: Vec<(f64, f64)> = (0..100).map(|i| (i as f64, 1.0)).collect();
        samples.push((-1e6, 1e-3));
        assert_eq!(volume_percentile(samples.clone(), 0.01), 0.0);
        assert_eq!(volume_percentile(samples, 0.5), 49.0);
        // A heavy point counts with its weight.
        assert_eq!(volume_percentile(vec![(-5.0, 3.0), (1.0, 97.0)], 0.01), -5.0);
    }
}
