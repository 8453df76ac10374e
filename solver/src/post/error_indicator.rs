//! Where the discretization error lives: one indicator per element, from
//! the jump of the tangential field strength H_t across its edges.
//!
//! With no surface currents H_t is continuous across every edge of the
//! exact field (between air, steel and magnets alike), while the finite
//! element field jumps; the jump, weighted by the edge's length, bounds
//! the error in the energy norm from above and below up to constants (the
//! edge-residual estimator: D. W. Kelly, J. P. de S. R. Gago, O. C.
//! Zienkiewicz, I. Babuska, A posteriori error analysis and adaptive
//! processes in the finite element method, Int. J. Numer. Meth. Eng.
//! 19(11), 1983; R. Verfurth, A Posteriori Error Estimation Techniques for
//! Finite Element Methods, Oxford 2013, ch. 1). Inside each element the
//! residual curl H - J is left out: the edge jumps dominate it on the
//! meshes refinement sees, and the indicators only rank elements for
//! refinement; the values' errors are estimated from the change between
//! meshes (study::estimate), not from these.
//!
//! The jump is weighted by the edge's permeability 2 / (nu_1 + nu_2), so
//! that an edge inside steel counts by its energy (nu times the squared jump of B_t) rather than
//! by its small H, and by 2 pi r in an axisymmetric study. Edges on the
//! outer boundary, the axis and the Kelvin rim, and the mapped exterior,
//! carry no indicator (the exterior is refined with the rim only).

use crate::element::EDGES;
use crate::solution::Solution;
use crate::space::ElementKind;
use mesher::Symmetry;
use rayon::prelude::*;

/// Vacuum permeability, H/m.
const MU0: f64 = 4e-7 * std::f64::consts::PI;

/// The squared indicator of every element (physical, then exterior: 0),
/// in J (planar: per metre of depth).
pub fn element_indicators(sol: &Solution) -> Vec<f64> {
    let els = &sol.elements;
    let n = els.n_physical;
    // Each edge's two elements, found by sorting (element, edge) by the edge's
    // corner ids: a fixed order, so equal meshes give equal indicators.
    let mut sides: Vec<((usize, usize), usize, usize)> = (0..n)
        .flat_map(|e| {
            EDGES.iter().enumerate().map(move |(k, [i, j])| {
                let (a, b) = (els.nodes[e][*i], els.nodes[e][*j]);
                ((a.min(b), a.max(b)), e, k)
            })
        })
        .collect();
    sides.sort_unstable();
    let pairs: Vec<[(usize, usize); 2]> = sides
        .windows(2)
        .filter(|w| w[0].0 == w[1].0)
        .map(|w| [(w[0].1, w[0].2), (w[1].1, w[1].2)])
        .collect();
    let jumps: Vec<f64> = pairs.par_iter().map(|&[p, q]| edge_jump(sol, p, q)).collect();
    let mut eta = vec![0.0; els.len()];
    for ([(e1, _), (e2, _)], j) in pairs.iter().zip(jumps) {
        eta[*e1] += 0.5 * j;
        eta[*e2] += 0.5 * j;
    }
    eta
}

/// h_e mu_e times the integral of the squared jump of H_t (times 2 pi r) along the edge
/// that local edge k1 of element e1 and local edge k2 of e2 share.
fn edge_jump(sol: &Solution, (e1, k1): (usize, usize), (e2, k2): (usize, usize)) -> f64 {
    let els = &sol.elements;
    let [i1, j1] = EDGES[k1];
    let (a, b) = (els.coords[e1][i1], els.coords[e1][j1]);
    // The second element runs the edge the other way unless its corners match.
    let same_way = els.nodes[e2][EDGES[k2][0]] == els.nodes[e1][i1];
    let length = (b[0] - a[0]).hypot(b[1] - a[1]);
    if length == 0.0 {
        return 0.0;
    }
    let t = [(b[0] - a[0]) / length, (b[1] - a[1]) / length];
    let mut sum = 0.0;
    // Four points, exact to degree 7: enough for the square of a quartic
    // element's field along an edge to rank edges.
    for &(s, w) in crate::quadrature::edge_rule(4) {
        let lam1 = on_edge(k1, s);
        let lam2 = on_edge(k2, if same_way { s } else { 1.0 - s });
        let (h1, nu1) = strength(sol, e1, lam1);
        let (h2, nu2) = strength(sol, e2, lam2);
        let jump = (h1[0] - h2[0]) * t[0] + (h1[1] - h2[1]) * t[1];
        let r = match sol.symmetry() {
            Symmetry::Planar => 1.0,
            Symmetry::Axisymmetric => 2.0 * std::f64::consts::PI * (a[0] + s * (b[0] - a[0])).abs(),
        };
        sum += w * jump * jump * r * 2.0 / (nu1 + nu2);
    }
    length * length * sum
}

/// Barycentric coordinates of the point a share s along local edge k.
fn on_edge(k: usize, s: f64) -> [f64; 3] {
    let mut lam = [0.0; 3];
    lam[EDGES[k][0]] = 1.0 - s;
    lam[EDGES[k][1]] = s;
    lam
}

/// H and the reluctivity |H| / |B| (1 / mu0 mu_r of the law) in element e.
fn strength(sol: &Solution, e: usize, lam: [f64; 3]) -> ([f64; 2], f64) {
    let b = sol.element_b_at(e, lam);
    let h = sol.element_h(e, b);
    let mu_r = match sol.elements.kinds[e] {
        ElementKind::Exterior => 1.0,
        _ => sol.element_law(e).relative_permeability(b),
    };
    (h, 1.0 / (MU0 * mu_r.max(1e-6)))
}

/// Marks the fewest elements whose squared indicators sum to at least
/// `share` of the total (the bulk criterion: W. Dorfler, A convergent
/// adaptive algorithm for Poisson's equation, SIAM J. Numer. Anal. 33(3),
/// 1996), largest first; ties at the threshold are all marked.
pub fn bulk_marking(eta: &[f64], share: f64) -> Vec<bool> {
    let total: f64 = eta.iter().sum();
    let mut order: Vec<usize> = (0..eta.len()).collect();
    order.sort_unstable_by(|&a, &b| eta[b].total_cmp(&eta[a]));
    let mut marked = vec![false; eta.len()];
    let mut sum = 0.0;
    let mut last = f64::INFINITY;
    for i in order {
        if (sum >= share * total && eta[i] < last) || eta[i] <= 0.0 {
            break;
        }
        marked[i] = true;
        sum += eta[i];
        last = eta[i];
    }
    marked
}

#[cfg(test)]
mod tests {
    use super::bulk_marking;

    /// The bulk criterion takes the largest first until the share is met.
    #[test]
    fn bulk_marking_takes_the_largest_first() {
        let eta = [1.0, 8.0, 0.5, 4.0, 0.0];
        assert_eq!(bulk_marking(&eta, 0.5), vec![false, true, false, false, false]);
        assert_eq!(bulk_marking(&eta, 0.7), vec![false, true, false, true, false]);
        assert_eq!(bulk_marking(&eta, 0.9), vec![true, true, false, true, false]);
        assert_eq!(bulk_marking(&[0.0, 0.0], 0.5), vec![false, false]);
        assert_eq!(bulk_marking(&[2.0, 2.0, 1.0], 0.2), vec![true, true, false], "ties at the threshold");
    }
}
