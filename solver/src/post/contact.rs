//! The force across a contact: where a set of parts touches other material,
//! no surface in air closes around it, so the stress band is closed along
//! the interface itself, with the Maxwell stress of a vanishing air gap.
//!
//! Opening a gap of width s between the set and the part it touches gives,
//! as s -> 0, an air layer in which B_n (continuous across any interface)
//! and H_t (continuous where no surface current flows) are those of the
//! interface; the gap's flux density is B_n n + mu0 H_t t. The pull at
//! contact is the limit of the pull across a closing gap, so the force is
//! the air-side stress nu0 ((B.n) B - |B|^2 n / 2) integrated over the
//! interface, plus the band in air over the rest of the set's boundary.
//! Taking the stress of either material instead (what a band through the
//! material gives) misses the surface force of the magnetization jump:
//! inside steel of mu_r 1e4 the normal stress is 1e4 times too small.

use crate::element::EDGES;
use crate::solution::Solution;
use crate::space::ElementKind;
use crate::{MU0, NU0};
use mesher::Symmetry;

/// One edge between an element of the set and an element of another part.
struct Interface {
    inside: usize,
    outside: usize,
    ends: [[f64; 2]; 2],
}

/// The edges where the set's elements meet elements of other parts.
fn interfaces(solution: &Solution, in_set: &dyn Fn(ElementKind) -> bool) -> Vec<Interface> {
    let els = &solution.elements;
    let mut edges: Vec<((usize, usize), usize)> = Vec::new();
    for e in 0..els.n_physical {
        for [a, b] in EDGES {
            let (na, nb) = (els.nodes[e][a], els.nodes[e][b]);
            edges.push(((na.min(nb), na.max(nb)), e));
        }
    }
    edges.sort_unstable();
    let is_part = |k: ElementKind| matches!(k, ElementKind::Part(_));
    edges
        .windows(2)
        .filter(|w| w[0].0 == w[1].0)
        .filter_map(|w| {
            let (e1, e2) = (w[0].1, w[1].1);
            let (k1, k2) = (els.kinds[e1], els.kinds[e2]);
            let (inside, outside) = match (in_set(k1), in_set(k2)) {
                (true, false) if is_part(k2) => (e1, e2),
                (false, true) if is_part(k1) => (e2, e1),
                _ => return None,
            };
            let (na, nb) = w[0].0;
            Some(Interface {
                inside,
                outside,
                ends: [els.positions[na], els.positions[nb]],
            })
        })
        .collect()
}

/// A straight edge from `pa` to `pb` with its unit normal pointing away
/// from an element's centroid or towards it.
struct Edge {
    pa: [f64; 2],
    d: [f64; 2],
    length: f64,
    t: [f64; 2],
    n: [f64; 2],
}

impl Edge {
    /// The edge with its normal away from `element`'s centroid when `away`,
    /// towards it otherwise; None for a degenerate edge.
    fn new(solution: &Solution, pa: [f64; 2], pb: [f64; 2], element: usize, away: bool) -> Option<Edge> {
        let d = [pb[0] - pa[0], pb[1] - pa[1]];
        let length = d[0].hypot(d[1]);
        if length <= 0.0 {
            return None;
        }
        let t = [d[0] / length, d[1] / length];
        let c = solution.elements.coords[element];
        let centroid = [(c[0][0] + c[1][0] + c[2][0]) / 3.0, (c[0][1] + c[1][1] + c[2][1]) / 3.0];
        let mut n = [t[1], -t[0]];
        let towards = (centroid[0] - pa[0]) * n[0] + (centroid[1] - pa[1]) * n[1] > 0.0;
        if towards == away {
            n = [-n[0], -n[1]];
        }
        Some(Edge { pa, d, length, t, n })
    }

    /// Adds the air-side stress nu0 ((B.n) B - |B|^2 n / 2) over the edge to
    /// `sum` (force x, y and torque about `center`): three Gauss points (exact
    /// for degree 5, a quadratic element's stress times the radius),
    /// times 2 pi r when axisymmetric; `field(x, s)` gives B at the point x
    /// (at s along the edge) and a weight to scale the stress by.
    fn add_stress(&self, sum: &mut [f64; 3], axisym: bool, center: [f64; 2], field: impl Fn([f64; 2], f64) -> ([f64; 2], f64)) {
        let n = self.n;
        for &(s, q) in crate::quadrature::edge_rule(3) {
            let x = [self.pa[0] + s * self.d[0], self.pa[1] + s * self.d[1]];
            let (b, weight) = field(x, s);
            let half = 0.5 * (b[0] * b[0] + b[1] * b[1]);
            let bn = b[0] * n[0] + b[1] * n[1];
            let mut dl = q * self.length * weight;
            if axisym {
                dl *= 2.0 * std::f64::consts::PI * x[0];
            }
            let traction = [NU0 * (bn * b[0] - half * n[0]) * dl, NU0 * (bn * b[1] - half * n[1]) * dl];
            let arm = [x[0] - center[0], x[1] - center[1]];
            sum[0] += traction[0];
            sum[1] += traction[1];
            sum[2] += arm[0] * traction[1] - arm[1] * traction[0];
        }
    }
}

/// Force [Fx, Fy] (per metre of depth when planar) and torque about
/// `torque_center` from the air-gap stress on the set's contact interfaces;
/// None where the set touches no other part.
pub fn interface_force(solution: &Solution, in_set: &dyn Fn(ElementKind) -> bool, torque_center: [f64; 2]) -> Option<[f64; 3]> {
    let els = &solution.elements;
    let axisym = solution.symmetry() == Symmetry::Axisymmetric;
    let found = interfaces(solution, in_set);
    if found.is_empty() {
        return None;
    }
    let mut sum = [0.0; 3];
    for f in found {
        // The normal out of the set: away from the inside element's centroid.
        let Some(edge) = Edge::new(solution, f.ends[0], f.ends[1], f.inside, true) else {
            continue;
        };
        let (n, t) = (edge.n, edge.t);
        edge.add_stress(&mut sum, axisym, torque_center, |x, _| {
            let side = |e: usize| {
                let b = solution.element_b_at(e, els.geometry(e).barycentric(x));
                let h = solution.element_h(e, b);
                (b[0] * n[0] + b[1] * n[1], h[0] * t[0] + h[1] * t[1])
            };
            let ((bn1, ht1), (bn2, ht2)) = (side(f.inside), side(f.outside));
            let (bn, bt) = (0.5 * (bn1 + bn2), MU0 * 0.5 * (ht1 + ht2));
            ([bn * n[0] + bt * t[0], bn * n[1] + bt * t[1]], 1.0)
        });
    }
    Some(sum)
}

/// The stress the band's weight g picks up on other parts' faces towards
/// air, to be added back (force [x, y] and torque about `torque_center`).
///
/// The band gives F = -integral over air of T grad g = the set's air faces
/// minus the integral of g T n over the other parts' air faces (n out of
/// the air). g is 0 on other parts, but a node where the set touches one
/// is the set's (g = 1), so on the other part's face next to a contact g
/// falls from 1 to 0 across one edge. That edge's g T n is no force on the
/// set, and leaving it in made the pull of a magnet resting flat on steel
/// converge as h (estimates 0.60, 0.69, 0.31, 0.16 % on five nested meshes).
pub fn band_face_term(solution: &Solution, weight: &[f64], in_set: &dyn Fn(ElementKind) -> bool, torque_center: [f64; 2]) -> [f64; 3] {
    let els = &solution.elements;
    let axisym = solution.symmetry() == Symmetry::Axisymmetric;
    let is_other = |k: ElementKind| matches!(k, ElementKind::Part(_)) && !in_set(k);
    // Edges with a node of the set at an end (g = 1; the other part's own
    // nodes have g = 0, so only such edges of its faces carry g), each with
    // the elements on either side.
    let mut edges: Vec<((usize, usize), usize)> = Vec::new();
    for e in 0..els.n_physical {
        for [a, b] in EDGES {
            let (na, nb) = (els.nodes[e][a], els.nodes[e][b]);
            if weight[na] >= 1.0 || weight[nb] >= 1.0 {
                edges.push(((na.min(nb), na.max(nb)), e));
            }
        }
    }
    edges.sort_unstable();
    let mut sum = [0.0; 3];
    for w in edges.windows(2).filter(|w| w[0].0 == w[1].0) {
        let (e1, e2) = (w[0].1, w[1].1);
        let (air, wall) = match (els.kinds[e1], els.kinds[e2]) {
            (ElementKind::Air, k) if is_other(k) => (e1, e2),
            (k, ElementKind::Air) if is_other(k) => (e2, e1),
            _ => continue,
        };
        let (na, nb) = w[0].0;
        // n out of the air: towards the other part's element.
        let Some(edge) = Edge::new(solution, els.positions[na], els.positions[nb], wall, false) else {
            continue;
        };
        edge.add_stress(&mut sum, axisym, torque_center, |x, s| {
            let b = solution.element_b_at(air, els.geometry(air).barycentric(x));
            (b, weight[na] + s * (weight[nb] - weight[na]))
        });
    }
    sum
}
