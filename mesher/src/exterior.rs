//! The Kelvin-mapped exterior: a second disk whose points stand for the
//! space outside the domain's circle, infinity at its centre.
//!
//! A physical point x outside the circle of centre c and radius R maps to
//! x' = c + R^2 (x - c) / |x - c|^2 inside it. The planar Dirichlet integral
//! is invariant under this conformal map, so the exterior is meshed and
//! assembled like air. In axisymmetric studies the energy density picks up
//! the factor |x' - c|^2 / R^2 (Freeman and Lowther, IEEE Trans. Magn. 25(5),
//! 1989); the solver applies it. Rim nodes are shared with the domain; in
//! the exterior's own coordinates they sit on the exact circle (split points
//! on the domain's rim chords lie within a chord sagitta inside it, so the
//! map is the identity there to that order).

use crate::error::MeshError;
use spade::{DelaunayTriangulation, Point2, Triangulation};

/// The exterior disk, in its own (mapped) coordinates.
#[derive(Clone, Debug)]
pub struct ExteriorDisk {
    /// Centre of the domain circle and of the mapped disk.
    pub center: [f64; 2],
    /// Radius of both.
    pub radius: f64,
    /// Mapped coordinates of the disk's local nodes.
    pub mapped: Vec<[f64; 2]>,
    /// Global node id of each local node (rim nodes are domain nodes).
    pub global: Vec<usize>,
    /// Counter-clockwise local node triples.
    pub triangles: Vec<[usize; 3]>,
    /// Local index of the node at infinity (the disk's centre).
    pub infinity: usize,
}

/// Ratio by which ring spacing grows towards infinity.
const RING_GROWTH: f64 = 1.3;
/// Ring spacing as a share of the ring's radius near the centre of an
/// axisymmetric exterior (geometric grading towards infinity).
const CENTRE_GRADING: f64 = 0.3;
/// Radius, as a share of the disk's, where that grading stops.
const CENTRE_GRADING_END: f64 = 1e-4;

/// Builds the disk (half-disk when `half`) from the domain's rim nodes, given
/// as (global id, position on the circle).
pub fn build(center: [f64; 2], radius: f64, rim: &[(usize, [f64; 2])], half: bool, first_free_id: usize) -> Result<ExteriorDisk, MeshError> {
    let spacing = rim_spacing(rim, radius, half);
    // Rim points go onto the exact circle (same angle): split points of the
    // domain's rim chords lie a sagitta inside it, and nearly collinear hull
    // points would give the exterior zero-area slivers.
    let mut points: Vec<[f64; 2]> = rim.iter().map(|r| onto_circle(r.1, center, radius)).collect();
    let mut global: Vec<usize> = rim.iter().map(|r| r.0).collect();
    let (mut rho, mut delta) = (radius, spacing);
    // Axisymmetric: the potential of the mapped exterior tends to a
    // direction-dependent limit at infinity (a dipole's A' = c sin(theta)
    // there), which no element at the centre can follow; rings shrinking
    // towards the centre confine that misfit to a vanishing disk.
    let innermost = if half { radius * CENTRE_GRADING_END } else { 0.0 };
    loop {
        delta = (delta * RING_GROWTH).min(radius / 4.0);
        if half {
            delta = delta.min(CENTRE_GRADING * rho);
        }
        rho -= delta;
        if rho < 0.6 * delta || rho < innermost {
            break;
        }
        points.extend(ring(center, rho, delta, half));
    }
    let infinity = points.len();
    points.push(center);
    while global.len() < points.len() {
        global.push(first_free_id + global.len() - rim.len());
    }
    let mut dt: DelaunayTriangulation<Point2<f64>> = DelaunayTriangulation::new();
    for p in &points {
        dt.insert(Point2::new(p[0], p[1]))
            .map_err(|e| MeshError::Triangulation(format!("exterior disk: {e:?}")))?;
    }
    if dt.num_vertices() != points.len() {
        return Err(MeshError::Triangulation("exterior disk: coincident points".into()));
    }
    let triangles = dt.inner_faces().map(|f| f.vertices().map(|v| v.fix().index())).collect();
    Ok(ExteriorDisk {
        center,
        radius,
        mapped: points,
        global,
        triangles,
        infinity,
    })
}

/// The point at the same angle on the circle (r = 0 stays on the axis).
pub(crate) fn onto_circle(p: [f64; 2], c: [f64; 2], radius: f64) -> [f64; 2] {
    let d = (p[0] - c[0]).hypot(p[1] - c[1]);
    if d == 0.0 {
        return p;
    }
    let r = if p[0] == 0.0 { 0.0 } else { c[0] + (p[0] - c[0]) * radius / d };
    [r, c[1] + (p[1] - c[1]) * radius / d]
}

fn rim_spacing(rim: &[(usize, [f64; 2])], radius: f64, half: bool) -> f64 {
    let arc = if half { std::f64::consts::PI } else { 2.0 * std::f64::consts::PI } * radius;
    arc / (rim.len().max(2) - usize::from(half)) as f64
}

/// Points of one ring (for a half-disk, from pole to pole including both).
fn ring(c: [f64; 2], rho: f64, delta: f64, half: bool) -> Vec<[f64; 2]> {
    use std::f64::consts::{FRAC_PI_2, PI};
    if half {
        let n = ((PI * rho / delta).round() as usize).max(2);
        (0..=n)
            .map(|k| {
                let t = -FRAC_PI_2 + PI * k as f64 / n as f64;
                let r = if k == 0 || k == n { 0.0 } else { rho * t.cos() };
                [r, c[1] + rho * t.sin()]
            })
            .collect()
    } else {
        let n = ((2.0 * PI * rho / delta).round() as usize).max(3);
        (0..n)
            .map(|k| {
                let t = 2.0 * PI * (k as f64 + 0.5) / n as f64;
                [c[0] + rho * t.cos(), c[1] + rho * t.sin()]
            })
            .collect()
    }
}
