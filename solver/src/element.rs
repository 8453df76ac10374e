//! Lagrange triangles of order 1 to 4 (3, 6, 10 or 15 nodes): B = B_bg + G a
//! at each quadrature point, and the element residual and Newton tangent.
//!
//! Planar: B = (dA/dy, -dA/dx), weight = area (per metre of depth).
//! Axisymmetric: B = (-dA/dz, dA/dr + A/r), weight = 2 pi r area.
//! Kelvin exterior (axisymmetric only): the weight gains |x' - c|^2 / R^2.
//!
//! Node order: the three corners, then the p - 1 nodes of each edge 0-1,
//! 1-2, 2-0 (from the edge's first corner to its second), then the interior
//! nodes (`LATTICE`). Lagrange nodes rather than a hierarchical basis: a
//! nodal value is the potential at a place, so the constraints (by position
//! on the axis, the box and periodic sides), the transfer to a refined mesh
//! and the output need nothing but each node's position at every order.

use crate::element_map::ElementGeometry;
use crate::material::{Law, Tangent};
use crate::quadrature::{rule, Rule};
use crate::NU0;
use mesher::Symmetry;

pub use crate::element_map::barycentric;
pub use crate::element_order::{ElementOrder, EDGES, MAX_NODES};

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
    /// Number of nodes in use (3, 6, 10 or 15).
    pub len: usize,
    /// Position of the point.
    pub x: [f64; 2],
    /// Its barycentric coordinates in the reference triangle.
    pub lam: [f64; 3],
}

/// Calls `f` at every quadrature point of the element. Orders 3 and 4 read
/// their shape values and slopes from a table made once per rule
/// (evaluating the lattice products at every point of every element took a
/// fifth of an order-4 run); a straight element's barycentric gradients are
/// found once, a curved one's at each point through its map.
pub fn for_each_point(geom: ElementGeometry, order: ElementOrder, symmetry: Symmetry, placement: Placement, mut f: impl FnMut(&PointOp)) {
    let boosted = geom.is_curved() || boosted_rule(geom.corners, symmetry, placement);
    let rule: &Rule = rule(order, symmetry, boosted);
    let table = matches!(order, ElementOrder::Cubic | ElementOrder::Quartic).then(|| crate::lagrange::table(order, symmetry, boosted));
    let straight = (!geom.is_curved()).then(|| barycentric_gradients(geom.corners));
    // One operator filled in place at every point (returned by value it was
    // copied twice a point: 5 % of a saturating sweep's time in memmove).
    let mut op = PointOp::empty(order);
    let mut dn = [[0.0; 2]; MAX_NODES];
    for (i, (lam, w)) in rule.points.iter().zip(rule.weights).enumerate() {
        let (p, grad_lam, area) = match straight {
            Some((grad_lam, area)) => (affine_point(geom.corners, *lam), grad_lam, area),
            None => geom.gradients_at(*lam),
        };
        match table {
            Some(t) => {
                op.n = t.values[i];
                contract(&t.slopes[i], grad_lam, order.n_nodes(), &mut dn);
            }
            None => shape(order, *lam, grad_lam, &mut op.n, &mut dn),
        }
        op.complete(&dn, p, area, symmetry, placement, *lam, *w);
        f(&op);
    }
}

/// Whether a straight element takes the higher of its order's two rules
/// (see `quadrature::rule`; a curved one always does, its map not being
/// polynomial): the Kelvin-mapped exterior, and about the axis the elements
/// within one and a half of their own widths of it.
fn boosted_rule(x: &[[f64; 2]; 3], symmetry: Symmetry, placement: Placement) -> bool {
    if symmetry == Symmetry::Planar {
        return false;
    }
    let (lo, hi) = (x[0][0].min(x[1][0]).min(x[2][0]), x[0][0].max(x[1][0]).max(x[2][0]));
    matches!(placement, Placement::Exterior { .. }) || lo <= 1.5 * (hi - lo)
}

/// The point at barycentric `lam` of a straight triangle.
fn affine_point(x: &[[f64; 2]; 3], lam: [f64; 3]) -> [f64; 2] {
    [
        lam[0] * x[0][0] + lam[1] * x[1][0] + lam[2] * x[2][0],
        lam[0] * x[0][1] + lam[1] * x[1][1] + lam[2] * x[2][1],
    ]
}

/// The shape functions' values at `lam` alone (zero past the element's
/// nodes): they depend on the reference point only, whatever the element's
/// shape, so a table of them serves every element (`prolong`).
pub(crate) fn shape_values(order: ElementOrder, lam: [f64; 3]) -> [f64; MAX_NODES] {
    let (mut n, mut dn) = ([0.0; MAX_NODES], [[0.0; 2]; MAX_NODES]);
    shape(order, lam, [[0.0; 2]; 3], &mut n, &mut dn);
    n
}

/// Shape functions and their gradients at barycentric point `lam`, into
/// `n` and `dn` (written out without array maps: this runs at every
/// quadrature point of every assembly; entries past the order's nodes are
/// left as they are, zero).
fn shape(order: ElementOrder, lam: [f64; 3], grad_lam: [[f64; 2]; 3], n: &mut [f64; MAX_NODES], dn: &mut [[f64; 2]; MAX_NODES]) {
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
        ElementOrder::Cubic | ElementOrder::Quartic => {
            let (values, dl) = crate::lagrange::values_and_slopes(order, lam);
            *n = values;
            contract(&dl, grad_lam, order.n_nodes(), dn);
        }
    }
}

/// dN_j/dx = sum_c dN_j/dl_c grad l_c for the first `len` nodes.
fn contract(dl: &[[f64; 3]; MAX_NODES], grad_lam: [[f64; 2]; 3], len: usize, dn: &mut [[f64; 2]; MAX_NODES]) {
    for j in 0..len {
        let d = dl[j];
        dn[j] = [
            d[0] * grad_lam[0][0] + d[1] * grad_lam[1][0] + d[2] * grad_lam[2][0],
            d[0] * grad_lam[0][1] + d[1] * grad_lam[1][1] + d[2] * grad_lam[2][1],
        ];
    }
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
pub fn point_op(geom: ElementGeometry, order: ElementOrder, symmetry: Symmetry, placement: Placement, lam: [f64; 3], w: f64) -> PointOp {
    let (p, grad_lam, area) = match geom.is_curved() {
        false => {
            let (g, area) = barycentric_gradients(geom.corners);
            (affine_point(geom.corners, lam), g, area)
        }
        true => geom.gradients_at(lam),
    };
    let mut op = PointOp::empty(order);
    let mut dn = [[0.0; 2]; MAX_NODES];
    shape(order, lam, grad_lam, &mut op.n, &mut dn);
    op.complete(&dn, p, area, symmetry, placement, lam, w);
    op
}

impl PointOp {
    /// All zeros for an element of `order` (G and N stay zero past its nodes).
    fn empty(order: ElementOrder) -> PointOp {
        PointOp {
            weight: 0.0,
            g: [[0.0; MAX_NODES]; 2],
            n: [0.0; MAX_NODES],
            len: order.n_nodes(),
            x: [0.0; 2],
            lam: [0.0; 3],
        }
    }

    /// The rest of the operator once its shape values `n` are in place,
    /// from their gradients `dn`, the point, the area element and the weight.
    #[allow(clippy::too_many_arguments)]
    fn complete(&mut self, dn: &[[f64; 2]; MAX_NODES], p: [f64; 2], area: f64, symmetry: Symmetry, placement: Placement, lam: [f64; 3], w: f64) {
        let len = self.len;
        self.x = p;
        self.lam = lam;
        match symmetry {
            Symmetry::Planar => {
                for (i, d) in dn.iter().enumerate().take(len) {
                    self.g[0][i] = d[1];
                    self.g[1][i] = -d[0];
                }
                self.weight = w * area;
            }
            Symmetry::Axisymmetric => {
                let r = p[0];
                let kelvin = match placement {
                    Placement::Physical => 1.0,
                    Placement::Exterior { center, radius } => ((p[0] - center[0]).powi(2) + (p[1] - center[1]).powi(2)) / (radius * radius),
                };
                for (i, d) in dn.iter().enumerate().take(len) {
                    self.g[0][i] = -d[1];
                    // On the axis A vanishes, so A/r tends to dA/dr there.
                    self.g[1][i] = if r > 0.0 { d[0] + self.n[i] / r } else { 2.0 * d[0] };
                }
                self.weight = w * area * 2.0 * std::f64::consts::PI * r * kelvin;
            }
        }
    }
}

/// B at a point from the element's nodal potentials.
pub fn flux_density(op: &PointOp, a: &[f64; MAX_NODES], background: [f64; 2]) -> [f64; 2] {
    match op.len {
        3 => flux_density_n::<3>(op, a, background),
        6 => flux_density_n::<6>(op, a, background),
        10 => flux_density_n::<10>(op, a, background),
        _ => flux_density_n::<MAX_NODES>(op, a, background),
    }
}

/// `flux_density` for N nodes: fixed loop bounds, so the loops unroll
/// (G is zero past op.len, so a larger N gives the same sum).
#[allow(clippy::needless_range_loop)]
fn flux_density_n<const N: usize>(op: &PointOp, a: &[f64; MAX_NODES], background: [f64; 2]) -> [f64; 2] {
    let mut b = background;
    for i in 0..N {
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
fn point_field<const N: usize>(op: &PointOp, a: &[f64; MAX_NODES], load: &ElementLoad) -> ([f64; 2], crate::material::FieldResponse) {
    let b = flux_density_n::<N>(op, a, load.background);
    let resp = load.law.response_of(b, load.tangent, load.share);
    ([resp.h[0] - NU0 * load.background[0], resp.h[1] - NU0 * load.background[1]], resp)
}

/// Adds w (G^T h - N J) at one point to the element residual.
#[allow(clippy::needless_range_loop)]
fn add_residual<const N: usize>(r: &mut [f64; MAX_NODES], op: &PointOp, h: [f64; 2], load: &ElementLoad) {
    for i in 0..N {
        r[i] += op.weight * (op.g[0][i] * h[0] + op.g[1][i] * h[1] - op.n[i] * load.current_density);
    }
}

/// Element residual r_i = sum w (G^T (H - nu0 B_bg) - N_i J) and tangent K = sum w G^T dH/dB G.
pub fn element_system(
    x: ElementGeometry,
    a: &[f64; MAX_NODES],
    order: ElementOrder,
    symmetry: Symmetry,
    placement: Placement,
    load: ElementLoad,
) -> LocalSystem {
    match order {
        ElementOrder::Linear => system_n::<3>(x, a, order, symmetry, placement, load),
        ElementOrder::Quadratic => system_n::<6>(x, a, order, symmetry, placement, load),
        ElementOrder::Cubic => system_n::<10>(x, a, order, symmetry, placement, load),
        ElementOrder::Quartic => system_n::<15>(x, a, order, symmetry, placement, load),
    }
}

/// `element_system` for N nodes: the loops have fixed bounds, so they
/// unroll (this is the hot loop of every assembly).
#[allow(non_snake_case, clippy::needless_range_loop)]
fn system_n<const N: usize>(
    x: ElementGeometry,
    a: &[f64; MAX_NODES],
    order: ElementOrder,
    symmetry: Symmetry,
    placement: Placement,
    load: ElementLoad,
) -> LocalSystem {
    let mut K = [[0.0; MAX_NODES]; MAX_NODES];
    let mut r = [0.0; MAX_NODES];
    for_each_point(x, order, symmetry, placement, |op| {
        let (h, resp) = point_field::<N>(op, a, &load);
        add_residual::<N>(&mut r, op, h, &load);
        // K is symmetric (dH/dB is): accumulate the lower triangle, mirror once.
        for i in 0..N {
            let tg = [
                op.weight * (resp.dh_db[0][0] * op.g[0][i] + resp.dh_db[0][1] * op.g[1][i]),
                op.weight * (resp.dh_db[1][0] * op.g[0][i] + resp.dh_db[1][1] * op.g[1][i]),
            ];
            for j in 0..=i {
                K[i][j] += tg[0] * op.g[0][j] + tg[1] * op.g[1][j];
            }
        }
    });
    for i in 0..N {
        for j in 0..i {
            K[j][i] = K[i][j];
        }
    }
    (K, r)
}

/// The element residual alone (line-search trials need no tangent).
pub fn element_residual(
    x: ElementGeometry,
    a: &[f64; MAX_NODES],
    order: ElementOrder,
    symmetry: Symmetry,
    placement: Placement,
    load: ElementLoad,
) -> [f64; MAX_NODES] {
    let mut r = [0.0; MAX_NODES];
    for_each_point(x, order, symmetry, placement, |op| match order {
        ElementOrder::Linear => add_residual::<3>(&mut r, op, point_field::<3>(op, a, &load).0, &load),
        ElementOrder::Quadratic => add_residual::<6>(&mut r, op, point_field::<6>(op, a, &load).0, &load),
        ElementOrder::Cubic => add_residual::<10>(&mut r, op, point_field::<10>(op, a, &load).0, &load),
        ElementOrder::Quartic => add_residual::<15>(&mut r, op, point_field::<15>(op, a, &load).0, &load),
    });
    r
}
