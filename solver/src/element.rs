//! The linear-triangle kernel: B = B_bg + G a at each quadrature point, and
//! the element residual and Newton tangent.
//!
//! Planar: B = (dA/dy, -dA/dx), weight = area (per metre of depth).
//! Axisymmetric: B = (-dA/dz, dA/dr + A/r), weight = 2 pi r area.
//! Kelvin exterior (axisymmetric only): the weight gains |x' - c|^2 / R^2.

use crate::material::Law;
use crate::quadrature::{Rule, CENTROID, DEGREE5};
use crate::NU0;
use mesher::Symmetry;

/// Where a triangle lives, which fixes its weight and background field.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Placement {
    Physical,
    /// Kelvin-mapped exterior of the circle (centre, radius).
    Exterior { center: [f64; 2], radius: f64 },
}

/// One quadrature point of one triangle.
#[derive(Clone, Copy, Debug)]
pub struct PointOp {
    /// Integration weight (area, times 2 pi r and the Kelvin factor where they apply).
    pub weight: f64,
    /// B = g * a (rows: first and second component of B).
    pub g: [[f64; 3]; 2],
    /// Shape function values.
    pub n: [f64; 3],
    pub x: [f64; 2],
}

/// Calls `f` at every quadrature point of the triangle `x`.
pub fn for_each_point(x: &[[f64; 2]; 3], symmetry: Symmetry, placement: Placement, mut f: impl FnMut(&PointOp)) {
    let rule: &Rule = match symmetry {
        Symmetry::Planar => &CENTROID,
        Symmetry::Axisymmetric => &DEGREE5,
    };
    for (lam, w) in rule.points.iter().zip(rule.weights) {
        f(&point_op(x, symmetry, placement, *lam, *w));
    }
}

/// The operator at barycentric point `lam`, with integration weight `w` (a
/// fraction of the area; pass 1 to get the density per unit area).
pub fn point_op(x: &[[f64; 2]; 3], symmetry: Symmetry, placement: Placement, lam: [f64; 3], w: f64) -> PointOp {
    let twice_area = (x[1][0] - x[0][0]) * (x[2][1] - x[0][1]) - (x[2][0] - x[0][0]) * (x[1][1] - x[0][1]);
    let b = [x[1][1] - x[2][1], x[2][1] - x[0][1], x[0][1] - x[1][1]].map(|v| v / twice_area);
    let c = [x[2][0] - x[1][0], x[0][0] - x[2][0], x[1][0] - x[0][0]].map(|v| v / twice_area);
    let area = 0.5 * twice_area;
    let p = [
        lam[0] * x[0][0] + lam[1] * x[1][0] + lam[2] * x[2][0],
        lam[0] * x[0][1] + lam[1] * x[1][1] + lam[2] * x[2][1],
    ];
    match symmetry {
        Symmetry::Planar => PointOp { weight: w * area, g: [c, b.map(|v| -v)], n: lam, x: p },
        Symmetry::Axisymmetric => {
            let r = p[0];
            let kelvin = match placement {
                Placement::Physical => 1.0,
                Placement::Exterior { center, radius } => ((p[0] - center[0]).powi(2) + (p[1] - center[1]).powi(2)) / (radius * radius),
            };
            // On the axis itself A = 0 at the axis nodes, so A/r tends to dA/dr.
            let gz = if r > 0.0 { [b[0] + lam[0] / r, b[1] + lam[1] / r, b[2] + lam[2] / r] } else { b.map(|v| 2.0 * v) };
            PointOp { weight: w * area * 2.0 * std::f64::consts::PI * r * kelvin, g: [c.map(|v| -v), gz], n: lam, x: p }
        }
    }
}

/// Barycentric coordinates of p in triangle x.
pub fn barycentric(x: &[[f64; 2]; 3], p: [f64; 2]) -> [f64; 3] {
    let d = (x[1][0] - x[0][0]) * (x[2][1] - x[0][1]) - (x[2][0] - x[0][0]) * (x[1][1] - x[0][1]);
    let l1 = ((p[0] - x[0][0]) * (x[2][1] - x[0][1]) - (x[2][0] - x[0][0]) * (p[1] - x[0][1])) / d;
    let l2 = ((x[1][0] - x[0][0]) * (p[1] - x[0][1]) - (p[0] - x[0][0]) * (x[1][1] - x[0][1])) / d;
    [1.0 - l1 - l2, l1, l2]
}

/// B at a point from the element's nodal potentials.
pub fn flux_density(op: &PointOp, a: &[f64; 3], background: [f64; 2]) -> [f64; 2] {
    [
        background[0] + op.g[0][0] * a[0] + op.g[0][1] * a[1] + op.g[0][2] * a[2],
        background[1] + op.g[1][0] * a[0] + op.g[1][1] * a[1] + op.g[1][2] * a[2],
    ]
}

/// The sources and law that act in one element.
#[derive(Clone, Copy, Debug)]
pub struct ElementLoad<'a> {
    pub law: &'a Law,
    /// Current density, A/m2 (out of the plane, or +phi).
    pub current_density: f64,
    /// Uniform applied field (zero in the exterior, where the potential is the reaction only).
    pub background: [f64; 2],
}

/// Element residual r_i = sum w (G^T (H - nu0 B_bg) - N_i J) and tangent K = sum w G^T dH/dB G.
#[allow(non_snake_case)]
pub fn element_system(x: &[[f64; 2]; 3], a: &[f64; 3], symmetry: Symmetry, placement: Placement, load: ElementLoad) -> ([[f64; 3]; 3], [f64; 3]) {
    let mut K = [[0.0; 3]; 3];
    let mut r = [0.0; 3];
    for_each_point(x, symmetry, placement, |op| {
        let B = flux_density(op, a, load.background);
        let resp = load.law.response(B);
        let hr = [resp.h[0] - NU0 * load.background[0], resp.h[1] - NU0 * load.background[1]];
        for i in 0..3 {
            r[i] += op.weight * (op.g[0][i] * hr[0] + op.g[1][i] * hr[1] - op.n[i] * load.current_density);
            let tg = [
                resp.dh_db[0][0] * op.g[0][i] + resp.dh_db[0][1] * op.g[1][i],
                resp.dh_db[1][0] * op.g[0][i] + resp.dh_db[1][1] * op.g[1][i],
            ];
            for j in 0..3 {
                K[i][j] += op.weight * (tg[0] * op.g[0][j] + tg[1] * op.g[1][j]);
            }
        }
    });
    (K, r)
}
