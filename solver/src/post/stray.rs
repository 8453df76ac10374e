//! The stray field far from the assembly: its exterior multipole series, the dipole moment
//! and the distances at which |B| falls to a given level.

use crate::solution::Solution;
use crate::MU0;
use mesher::Symmetry;
use rayon::prelude::*;
use std::f64::consts::PI;

/// Terms of the exterior multipole series fitted by `exterior_series`.
const TERMS: usize = 16;

/// Samples of the potential on the fitting circle.
const SAMPLES: usize = 720;

/// The field outside every source as its multipole series about a centre,
/// fitted to the reaction potential on a circle that holds every source.
/// Outside that circle the air is source-free, so the series is the exact
/// solution there and can be evaluated at any distance: walking the mesh
/// stops at the domain's rim, and extrapolating from the rim with the
/// dipole's decay put a bare magnet's 0.5 mT distance 6 % too close in its
/// mid-plane (the higher multipoles still count at the rim).
///
/// Axisymmetric: A_phi = sum over n >= 1 of c_n P_n^1(cos t) / rho^(n+1),
/// t from +z; the P_n^1 are orthogonal on [0, pi] with weight sin t and
/// norm 2 n (n + 1) / (2 n + 1). Planar: A_z = c_0 ln rho + sum over
/// n >= 1 of (a_n cos n t + b_n sin n t) / rho^n, with c_0 = -mu0 I / (2 pi)
/// from the net current I (the constant term carries no field).
#[derive(Clone, Debug)]
pub struct ExteriorSeries {
    center: [f64; 2],
    symmetry: Symmetry,
    /// Axisymmetric: [c_n, 0]; planar: [a_n, b_n]; index n - 1.
    terms: Vec<[f64; 2]>,
    log_term: f64,
}

/// The series from the potential on the circle of radius `rho` about
/// `center` (its half in r >= 0 when axisymmetric). None when a sample
/// falls outside the mesh.
pub fn exterior_series(solution: &Solution, center: [f64; 2], rho: f64) -> Option<ExteriorSeries> {
    let symmetry = solution.symmetry();
    let mut terms = vec![[0.0; 2]; TERMS];
    let mut log_term = 0.0;
    match symmetry {
        Symmetry::Axisymmetric => {
            for k in 0..SAMPLES {
                let t = PI * (k as f64 + 0.5) / SAMPLES as f64;
                let a = solution.reduced_potential_at([rho * t.sin(), center[1] + rho * t.cos()])?;
                for (n, p) in associated_legendre(t.cos()).iter().enumerate() {
                    terms[n][0] += a * p.1 * t.sin() * PI / SAMPLES as f64;
                }
            }
            for (n, c) in terms.iter_mut().enumerate() {
                let n = (n + 1) as f64;
                c[0] *= rho.powf(n + 1.0) * (2.0 * n + 1.0) / (2.0 * n * (n + 1.0));
            }
        }
        Symmetry::Planar => {
            let mirror = half_plane_sign(solution);
            for k in 0..SAMPLES {
                let t = 2.0 * PI * (k as f64 + 0.5) / SAMPLES as f64;
                let p = [center[0] + rho * t.cos(), center[1] + rho * t.sin()];
                let a = match mirror {
                    // The modelled half is x >= 0: the other half by the plane's symmetry.
                    Some(s) if p[0] < 0.0 => s * solution.reduced_potential_at([-p[0], p[1]])?,
                    _ => solution.reduced_potential_at(p)?,
                };
                for (n, c) in terms.iter_mut().enumerate() {
                    let m = (n + 1) as f64;
                    c[0] += a * (m * t).cos() * 2.0 / SAMPLES as f64;
                    c[1] += a * (m * t).sin() * 2.0 / SAMPLES as f64;
                }
            }
            for (n, c) in terms.iter_mut().enumerate() {
                let scale = rho.powi(n as i32 + 1);
                c[0] *= scale;
                c[1] *= scale;
            }
            log_term = -MU0 * net_current(solution) / (2.0 * PI);
        }
    }
    Some(ExteriorSeries {
        center,
        symmetry,
        terms,
        log_term,
    })
}

impl ExteriorSeries {
    /// Dipole moment, A m2 (axisymmetric, along +z; planar, per metre: |m|).
    pub fn dipole_moment(&self) -> f64 {
        match self.symmetry {
            Symmetry::Axisymmetric => 4.0 * PI * self.terms[0][0] / MU0,
            Symmetry::Planar => 2.0 * PI * self.terms[0][0].hypot(self.terms[0][1]) / MU0,
        }
    }

    /// B ([x, y] planar, [r, z] axisymmetric) at a point outside the fitting circle.
    pub fn b_at(&self, p: [f64; 2]) -> [f64; 2] {
        let (dx, dy) = (p[0] - self.center[0], p[1] - self.center[1]);
        let rho = dx.hypot(dy).max(f64::MIN_POSITIVE);
        match self.symmetry {
            Symmetry::Axisymmetric => {
                // t from +z: (sin t, cos t) = (r, z - zc) / rho.
                let (st, ct) = (dx / rho, dy / rho);
                let (mut b_rho, mut b_t) = (0.0, 0.0);
                // 1 / rho^(n + 2), one product a term (a power a term was
                // most of this function's time in the stray-field scans).
                let inverse = 1.0 / rho;
                let mut falloff = inverse * inverse;
                for (n, (pn, pn1)) in associated_legendre(ct).iter().enumerate() {
                    let m = (n + 1) as f64;
                    falloff *= inverse;
                    let c = self.terms[n][0] * falloff;
                    b_rho += c * m * (m + 1.0) * pn;
                    b_t += c * m * pn1;
                }
                // Unit vectors: rho = (sin t, cos t), t = (cos t, -sin t) in (r, z).
                [b_rho * st + b_t * ct, b_rho * ct - b_t * st]
            }
            Symmetry::Planar => {
                let t = dy.atan2(dx);
                // B_rho = (1/rho) dA/dt, B_t = -dA/drho.
                let (mut b_rho, mut b_t) = (0.0, -self.log_term / rho);
                let inverse = 1.0 / rho;
                let mut r = inverse;
                for (n, c) in self.terms.iter().enumerate() {
                    let m = (n + 1) as f64;
                    let (s, co) = (m * t).sin_cos();
                    r *= inverse;
                    b_rho += m * (-c[0] * s + c[1] * co) * r;
                    b_t += m * (c[0] * co + c[1] * s) * r;
                }
                let (s, co) = t.sin_cos();
                [b_rho * co - b_t * s, b_rho * s + b_t * co]
            }
        }
    }
}

/// (P_n(x), P_n^1(x)) for n = 1..=TERMS, P_n^1 without the Condon-Shortley
/// phase (P_1^1 = sqrt(1 - x^2)), by the three-term recurrences.
fn associated_legendre(x: f64) -> [(f64, f64); TERMS] {
    let s = (1.0 - x * x).max(0.0).sqrt();
    let mut out = [(0.0, 0.0); TERMS];
    let (mut p_prev, mut p) = (1.0, x);
    let (mut q_prev, mut q) = (0.0, s);
    out[0] = (p, q);
    for (k, slot) in out.iter_mut().enumerate().skip(1) {
        let n = (k + 1) as f64;
        let p_next = ((2.0 * n - 1.0) * x * p - (n - 1.0) * p_prev) / n;
        let q_next = ((2.0 * n - 1.0) * x * q - n * q_prev) / (n - 1.0);
        (p_prev, p, q_prev, q) = (p, p_next, q, q_next);
        *slot = (p, q);
    }
    out
}

/// Net current out of the plane (planar), A: each part's current density
/// times its meshed area (round outlines curved, as for the densities).
fn net_current(solution: &Solution) -> f64 {
    let densities = &solution.problem.current_density;
    let areas = solution.problem.mesh.part_areas_curved(densities.len());
    densities.iter().zip(&areas).map(|(j, a)| j * a).sum()
}

/// |B| sampled along a ray inside the mesh: one scan serves every level
/// asked of the same ray (the reach and the implant distances along the
/// axis from the same point were two scans of 800 point searches each).
pub struct RayProfile {
    origin: [f64; 2],
    dir: [f64; 2],
    /// (distance, |B|) up to the last sample inside the mesh.
    samples: Vec<(f64, f64)>,
}

impl RayProfile {
    /// The 800 samples out to `limit`, taken on every core (each is a point
    /// search and an element evaluation); the scan stops at the first
    /// sample outside the mesh.
    pub fn along(solution: &Solution, origin: [f64; 2], dir: [f64; 2], limit: f64) -> RayProfile {
        let n = 800;
        let at = |k: usize| limit * k as f64 / n as f64;
        let b: Vec<Option<f64>> = (1..=n)
            .into_par_iter()
            .map(|k| {
                let d = at(k);
                let f = solution.field_at([origin[0] + d * dir[0], origin[1] + d * dir[1]])?;
                Some(f.b[0].hypot(f.b[1]))
            })
            .collect();
        let samples = (1..=n).zip(b).map_while(|(k, b)| Some((at(k), b?))).collect();
        RayProfile { origin, dir, samples }
    }

    /// The distance from the origin at which |B| last exceeds `level`: from
    /// the samples, the crossing then sharpened on the extracted field
    /// (`crossing`); if still above at the last sample, from the exterior
    /// series `far` beyond it. None when the field never reaches the level
    /// at the origin side, or the series is missing.
    pub fn fall_distance(&self, solution: &Solution, level: f64, far: Option<&ExteriorSeries>) -> Option<f64> {
        let mut last: Option<(f64, f64)> = None;
        let mut bracket = None;
        for &(d, b) in &self.samples {
            if b >= level {
                bracket = None;
            } else if bracket.is_none() {
                bracket = Some((last, (d, b)));
            }
            last = Some((d, b));
        }
        match (bracket, last) {
            (Some((Some(above), below)), _) if above.1 > level => Some(self.crossing(solution, above, below, level)),
            (Some((_, below)), _) => Some(below.0),
            (None, Some((d, b))) if b > 0.0 => beyond(far?, self.origin, self.dir, d, level),
            _ => None,
        }
    }

    /// The crossing of `level` near a sample above it and the next one
    /// below (bracketed again on the extracted field, `bracket_outwards`),
    /// by the Illinois variant of regula falsi on |B| extracted from
    /// a ball (`extraction::extracted_b`; B in the element where no ball
    /// fits). The samples' own |B| is the element's at a point, whose error
    /// moves with the point's place in its element: a holding magnet's
    /// reach along its axis came out 7.2e-4 off while two meshes' values
    /// differed by 1.1e-4, and the straight line between samples added an
    /// error of its own that no mesh changes (docs/measurement-log.md,
    /// thirteenth session). The extracted field converges as an integral.
    fn crossing(&self, solution: &Solution, above: (f64, f64), below: (f64, f64), level: f64) -> f64 {
        let at = |d: f64| [self.origin[0] + d * self.dir[0], self.origin[1] + d * self.dir[1]];
        let excess = |d: f64| {
            let b = super::extraction::extracted_b(solution, at(d))
                .map(|e| e.b)
                .or_else(|| solution.field_at(at(d)).map(|f| f.b));
            b.map(|b| b[0].hypot(b[1]) - level)
        };
        let fallback = interpolate(Some(above), below, level);
        let Some(((mut a, mut fa), (mut b, mut fb))) = bracket_outwards(&excess, above.0, below.0) else {
            return fallback;
        };
        let mut side = 0;
        for _ in 0..CROSSING_STEPS {
            let c = if fa == fb { 0.5 * (a + b) } else { b - fb * (b - a) / (fb - fa) };
            let Some(fc) = excess(c) else { return fallback };
            if fc.abs() <= 1e-12 * level || (b - a).abs() <= 1e-12 * b.abs() {
                return c;
            }
            if fc > 0.0 {
                (a, fa) = (c, fc);
                if side == 1 {
                    fb *= 0.5;
                }
                side = 1;
            } else {
                (b, fb) = (c, fc);
                if side == -1 {
                    fa *= 0.5;
                }
                side = -1;
            }
        }
        if fa == fb {
            0.5 * (a + b)
        } else {
            b - fb * (b - a) / (fb - fa)
        }
    }
}

/// A bracket of the crossing on the extracted field, (distance, excess)
/// above and below the level, from the samples' bracket [a, b]: where the
/// extracted field does not bracket the level there, the bracket moves
/// inwards or outwards by steps that double from the samples' spacing.
/// The samples' element values err more than the extracted field on a
/// coarse mesh: a bare disk's 5 mT reach downwards, where no probe refines
/// the mesh, had its samples' bracket 0.3 % beyond the crossing (their
/// |B| 1.2 % high) while the extracted field below it was right to 4e-4;
/// the straight line between the samples gave a reach 0.4 % long, whose
/// change to the next mesh became a forty-times loose estimate
/// (docs/measurement-log.md, fourteenth session). None when no bracket
/// is found within `EXPANSIONS` steps or the field cannot be extracted.
fn bracket_outwards(excess: &dyn Fn(f64) -> Option<f64>, a: f64, b: f64) -> Option<((f64, f64), (f64, f64))> {
    let (mut a, mut fa, mut b, mut fb) = (a, excess(a)?, b, excess(b)?);
    let mut step = b - a;
    for _ in 0..EXPANSIONS {
        if fa >= 0.0 && fb <= 0.0 {
            return Some(((a, fa), (b, fb)));
        }
        if fa < 0.0 {
            // Below the level already at a: the crossing is nearer.
            (b, fb) = (a, fa);
            a = (a - step).max(0.5 * a);
            fa = excess(a)?;
        } else {
            (a, fa) = (b, fb);
            b += step;
            fb = excess(b)?;
        }
        step *= 2.0;
    }
    (fa >= 0.0 && fb <= 0.0).then_some(((a, fa), (b, fb)))
}

/// Most steps `bracket_outwards` takes: from a bracket a sample (a
/// 800th of the ray) wide, eight doublings reach a third of the ray.
const EXPANSIONS: usize = 8;

/// Most regula-falsi steps for a crossing: the Illinois variant converges
/// superlinearly (order about 1.44; M. Dowell, P. Jarratt, BIT 11, 1971),
/// so from a bracket a sample apart a dozen steps reach round-off.
const CROSSING_STEPS: usize = 12;

/// The last distance past `from` where the series' |B| along `dir` falls
/// to `level`: geometric steps out to where it is below the level for good
/// (a million times `from`), then bisection on the last step.
fn beyond(series: &ExteriorSeries, origin: [f64; 2], dir: [f64; 2], from: f64, level: f64) -> Option<f64> {
    let b = |d: f64| {
        let v = series.b_at([origin[0] + d * dir[0], origin[1] + d * dir[1]]);
        v[0].hypot(v[1])
    };
    let mut steps = Vec::new();
    let mut d = from;
    while d < 1e6 * from {
        steps.push(d);
        d *= 1.02;
    }
    let last_above = steps.into_par_iter().filter(|&d| b(d) >= level).max_by(f64::total_cmp);
    // Above at the rim by the mesh but below by the series: the crossing is at the rim.
    let Some(above) = last_above else { return Some(from) };
    let (mut lo, mut hi) = (above, above * 1.02);
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        if b(mid) >= level {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Some(0.5 * (lo + hi))
}

fn interpolate(prev: Option<(f64, f64)>, cur: (f64, f64), level: f64) -> f64 {
    match prev {
        Some((d0, b0)) if b0 > level => d0 + (cur.0 - d0) * (b0 - level) / (b0 - cur.1),
        _ => cur.0,
    }
}

/// For a planar open study cut by a symmetry plane on x = 0, A(-x, y) =
/// s A(x, y): s = 1 for a flux-normal plane (A even), -1 for a
/// flux-parallel one (A odd). None for a whole model.
fn half_plane_sign(solution: &Solution) -> Option<f64> {
    let mesh = solution.problem.mesh;
    mesh.exterior.as_ref()?;
    mesh.boundary.iter().find_map(|(_, t)| match t {
        mesher::BoundaryTag::Mirror { flux_normal } => Some(if *flux_normal { 1.0 } else { -1.0 }),
        _ => None,
    })
}

/// |H| (A/m) of a point dipole of moment m at distance d on its axis and in its equatorial plane.
pub fn dipole_h(m: f64, d: f64) -> (f64, f64) {
    let equator = m / (4.0 * PI * d.powi(3));
    (2.0 * equator, equator)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A dipole-like fall 1/d^3 through the level 1 at d = 2: a bracket
    /// on either wrong side of it (the samples' error) moves to hold it,
    /// a right one is kept, and a field that never falls gives None.
    #[test]
    fn a_bracket_on_the_wrong_side_moves_to_the_crossing() {
        let excess = |d: f64| Some(8.0 / (d * d * d) - 1.0);
        for (a, b) in [(2.1, 2.2), (1.7, 1.8), (1.95, 2.05)] {
            let ((lo, flo), (hi, fhi)) = bracket_outwards(&excess, a, b).unwrap();
            assert!(lo <= 2.0 && hi >= 2.0 && flo >= 0.0 && fhi <= 0.0, "{a} {b}: [{lo}, {hi}]");
            assert!(hi - lo <= 0.1 * 2f64.powi(EXPANSIONS as i32), "{a} {b}: [{lo}, {hi}]");
        }
        assert_eq!(bracket_outwards(&excess, 1.95, 2.05).map(|(a, b)| (a.0, b.0)), Some((1.95, 2.05)));
        assert!(bracket_outwards(&|_| Some(1.0), 1.0, 1.1).is_none());
    }
}
