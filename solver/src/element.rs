//! Triangle kernels of order 1 (3 nodes) and 2 (6 nodes): B = B_bg + G a at
//! each quadrature point, and the element residual and Newton tangent.
//!
//! Planar: B = (dA/dy, -dA/dx), weight = area (per metre of depth).
//! Axisymmetric: B = (-dA/dz, dA/dr + A/r), weight = 2 pi r area.
//! Kelvin exterior (axisymmetric only): the weight gains |x' - c|^2 / R^2.
//!
//! Node order: the three corners, then the midpoints of edges 0-1, 1-2, 2-0.

use crate::material::{Law, Tangent};
use crate::quadrature::{DEGREE2, DEGREE5};
use crate::NU0;
use mesher::Symmetry;

/// Most nodes an element has.
pub const MAX_NODES: usize = 6;

/// Polynomial order of the potential in each triangle.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ElementOrder {
    /// Three-node triangles, potential linear.
    Linear,
    /// Six-node triangles, potential quadratic.
    Quadratic,
}

impl ElementOrder {
    /// Nodes per element: 3 or 6.
    pub fn n_nodes(self) -> usize {
        match self {
            ElementOrder::Linear => 3,
            ElementOrder::Quadratic => 6,
        }
    }
}

/// Corner pairs of the three edges, in midpoint-node order.
pub const EDGES: [[usize; 2]; 3] = [[0, 1], [1, 2], [2, 0]];

/// Where a triangle lives, which fixes its weight and background field.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Placement {
    /// Inside the physical domain.
    Physical,
    /// Kelvin-mapped exterior of the circle (centre, radius).
    Exterior {
        /// Centre of the domain circle.
        center: [f64; 2],
        /// Radius of the domain circle.
        radius: f64,
    },
}

/// One quadrature point of one triangle.
#[derive(Clone, Copy, Debug)]
pub struct PointOp {
    /// Integration weight (area, times 2 pi r and the Kelvin factor where they apply).
    pub weight: f64,
    /// B = g * a (rows: first and second component of B).
    pub g: [[f64; MAX_NODES]; 2],
    /// Shape function values.
    pub n: [f64; MAX_NODES],
    /// Number of nodes in use (3 or 6).
    pub len: usize,
    /// Position of the point.
    pub x: [f64; 2],
}

/// Calls `f` at every quadrature point of the triangle with corners `x`.
pub fn for_each_point(x: &[[f64; 2]; 3], order: ElementOrder, symmetry: Symmetry, placement: Placement, mut f: impl FnMut(&PointOp)) {
    // Axisymmetric integrands carry 1/r and r and need the higher rule.
    let rule = match symmetry {
        Symmetry::Planar => &DEGREE2,
        Symmetry::Axisymmetric => &DEGREE5,
    };
    let geometry = barycentric_gradients(x);
    for (lam, w) in rule.points.iter().zip(rule.weights) {
        f(&point_op_in(x, geometry, order, symmetry, placement, *lam, *w));
    }
}

/// Shape functions and their gradients at barycentric point `lam`
/// (written out without array maps: this runs at every quadrature point of
/// every assembly).
fn shape(order: ElementOrder, lam: [f64; 3], grad_lam: [[f64; 2]; 3]) -> ([f64; MAX_NODES], [[f64; 2]; MAX_NODES]) {
    let mut n = [0.0; MAX_NODES];
    let mut dn = [[0.0; 2]; MAX_NODES];
    match order {
        ElementOrder::Linear => {
            n[..3].copy_from_slice(&lam);
            dn[..3].copy_from_slice(&grad_lam);
        }
        ElementOrder::Quadratic => {
            for i in 0..3 {
                let c = 4.0 * lam[i] - 1.0;
                n[i] = lam[i] * (2.0 * lam[i] - 1.0);
                dn[i] = [c * grad_lam[i][0], c * grad_lam[i][1]];
            }
            for (k, &[a, b]) in EDGES.iter().enumerate() {
                n[3 + k] = 4.0 * lam[a] * lam[b];
                dn[3 + k] = [
                    4.0 * (lam[a] * grad_lam[b][0] + lam[b] * grad_lam[a][0]),
                    4.0 * (lam[a] * grad_lam[b][1] + lam[b] * grad_lam[a][1]),
                ];
            }
        }
    }
    (n, dn)
}

/// Gradients of the barycentric coordinates and the (signed) area.
pub fn barycentric_gradients(x: &[[f64; 2]; 3]) -> ([[f64; 2]; 3], f64) {
    let d = (x[1][0] - x[0][0]) * (x[2][1] - x[0][1]) - (x[2][0] - x[0][0]) * (x[1][1] - x[0][1]);
    let g = [0, 1, 2].map(|i| {
        let (j, k) = ((i + 1) % 3, (i + 2) % 3);
        [(x[j][1] - x[k][1]) / d, (x[k][0] - x[j][0]) / d]
    });
    (g, 0.5 * d)
}

/// The operator at barycentric point `lam`, with integration weight `w` (a
/// fraction of the area; pass 1 to get the density per unit area).
pub fn point_op(x: &[[f64; 2]; 3], order: ElementOrder, symmetry: Symmetry, placement: Placement, lam: [f64; 3], w: f64) -> PointOp {
    point_op_in(x, barycentric_gradients(x), order, symmetry, placement, lam, w)
}

/// `point_op` with the element's barycentric gradients and area already known.
fn point_op_in(
    x: &[[f64; 2]; 3],
    (grad_lam, area): ([[f64; 2]; 3], f64),
    order: ElementOrder,
    symmetry: Symmetry,
    placement: Placement,
    lam: [f64; 3],
    w: f64,
) -> PointOp {
    let (n, dn) = shape(order, lam, grad_lam);
    let len = order.n_nodes();
    let p = [
        lam[0] * x[0][0] + lam[1] * x[1][0] + lam[2] * x[2][0],
        lam[0] * x[0][1] + lam[1] * x[1][1] + lam[2] * x[2][1],
    ];
    let mut g = [[0.0; MAX_NODES]; 2];
    match symmetry {
        Symmetry::Planar => {
            for i in 0..len {
                g[0][i] = dn[i][1];
                g[1][i] = -dn[i][0];
            }
            PointOp {
                weight: w * area,
                g,
                n,
                len,
                x: p,
            }
        }
        Symmetry::Axisymmetric => {
            let r = p[0];
            let kelvin = match placement {
                Placement::Physical => 1.0,
                Placement::Exterior { center, radius } => ((p[0] - center[0]).powi(2) + (p[1] - center[1]).powi(2)) / (radius * radius),
            };
            for i in 0..len {
                g[0][i] = -dn[i][1];
                // On the axis A vanishes, so A/r tends to dA/dr there.
                g[1][i] = if r > 0.0 { dn[i][0] + n[i] / r } else { 2.0 * dn[i][0] };
            }
            PointOp {
                weight: w * area * 2.0 * std::f64::consts::PI * r * kelvin,
                g,
                n,
                len,
                x: p,
            }
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
#[allow(clippy::needless_range_loop)]
pub fn flux_density(op: &PointOp, a: &[f64; MAX_NODES], background: [f64; 2]) -> [f64; 2] {
    let mut b = background;
    // Fixed bounds: G is zero past op.len.
    for i in 0..MAX_NODES {
        b[0] += op.g[0][i] * a[i];
        b[1] += op.g[1][i] * a[i];
    }
    b
}

/// Potential at a point from the element's nodal potentials.
pub fn potential(op: &PointOp, a: &[f64; MAX_NODES]) -> f64 {
    (0..op.len).map(|i| op.n[i] * a[i]).sum()
}

/// The sources and law that act in one element.
#[derive(Clone, Copy, Debug)]
pub struct ElementLoad<'a> {
    /// The law of the element's material.
    pub law: &'a Law,
    /// Current density, A/m2 (out of the plane, or +phi).
    pub current_density: f64,
    /// Uniform applied field (zero in the exterior, where the potential is the reaction only).
    pub background: [f64; 2],
    /// The linearization used for the tangent (the residual is always exact).
    pub tangent: Tangent,
    /// A magnet's share of its remanence left after an exposure (1 otherwise).
    pub share: f64,
}

/// Local tangent matrix and residual of one element.
pub type LocalSystem = ([[f64; MAX_NODES]; MAX_NODES], [f64; MAX_NODES]);

/// H at a quadrature point, less the background's nu0 B_bg, with the law's response.
fn point_field(op: &PointOp, a: &[f64; MAX_NODES], load: &ElementLoad) -> ([f64; 2], crate::material::FieldResponse) {
    let b = flux_density(op, a, load.background);
    let resp = load.law.response_of(b, load.tangent, load.share);
    ([resp.h[0] - NU0 * load.background[0], resp.h[1] - NU0 * load.background[1]], resp)
}

/// Adds w (G^T h - N J) at one point to the element residual.
#[allow(clippy::needless_range_loop)]
fn add_residual(r: &mut [f64; MAX_NODES], op: &PointOp, h: [f64; 2], load: &ElementLoad) {
    // Fixed bounds: G and N are zero past op.len.
    for i in 0..MAX_NODES {
        r[i] += op.weight * (op.g[0][i] * h[0] + op.g[1][i] * h[1] - op.n[i] * load.current_density);
    }
}

/// Element residual r_i = sum w (G^T (H - nu0 B_bg) - N_i J) and tangent K = sum w G^T dH/dB G.
#[allow(non_snake_case, clippy::needless_range_loop)]
pub fn element_system(
    x: &[[f64; 2]; 3],
    a: &[f64; MAX_NODES],
    order: ElementOrder,
    symmetry: Symmetry,
    placement: Placement,
    load: ElementLoad,
) -> LocalSystem {
    let mut K = [[0.0; MAX_NODES]; MAX_NODES];
    let mut r = [0.0; MAX_NODES];
    for_each_point(x, order, symmetry, placement, |op| {
        let (h, resp) = point_field(op, a, &load);
        add_residual(&mut r, op, h, &load);
        // K is symmetric (dH/dB is): accumulate the lower triangle, mirror once.
        // Fixed bounds (G is zero past op.len), so the loops unroll.
        for i in 0..MAX_NODES {
            let tg = [
                op.weight * (resp.dh_db[0][0] * op.g[0][i] + resp.dh_db[0][1] * op.g[1][i]),
                op.weight * (resp.dh_db[1][0] * op.g[0][i] + resp.dh_db[1][1] * op.g[1][i]),
            ];
            for j in 0..=i {
                K[i][j] += tg[0] * op.g[0][j] + tg[1] * op.g[1][j];
            }
        }
    });
    for i in 0..MAX_NODES {
        for j in 0..i {
            K[j][i] = K[i][j];
        }
    }
    (K, r)
}

/// The element residual alone (line-search trials need no tangent).
pub fn element_residual(
    x: &[[f64; 2]; 3],
    a: &[f64; MAX_NODES],
    order: ElementOrder,
    symmetry: Symmetry,
    placement: Placement,
    load: ElementLoad,
) -> [f64; MAX_NODES] {
    let mut r = [0.0; MAX_NODES];
    for_each_point(x, order, symmetry, placement, |op| add_residual(&mut r, op, point_field(op, a, &load).0, &load));
    r
}
