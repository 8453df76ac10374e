//! Total force on a set of parts by the Maxwell stress tensor in its
//! virtual-work form (J. L. Coulomb, IEEE Trans. Magn. 19(6), 1983):
//! F_i = - integral over air of T_ij dg/dx_j, with T = nu0 (B B^T - |B|^2 I / 2)
//! and g a weight that is 1 on the parts' nodes and falls to 0 across the
//! first layer of air elements around them.

use crate::assembly::ElementKind;
use crate::element::for_each_point;
use crate::solution::Solution;
use crate::NU0;
use mesher::Symmetry;

/// Force on a set of parts.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Force {
    /// Planar: [Fx, Fy] per metre of depth; axisymmetric: [0, Fz] in N.
    pub vector: [f64; 2],
    /// Planar only: torque about the given point, N m per metre of depth.
    pub torque: f64,
    /// True when the set touches another non-air part: the stress layer then
    /// cuts through material and the value is not reliable.
    pub contact: bool,
}

pub fn force_on(solution: &Solution, parts: &[usize], torque_center: [f64; 2]) -> Force {
    let els = &solution.elements;
    let n_nodes = solution.reduced.len();
    let corners = |e: usize| [els.nodes[e][0], els.nodes[e][1], els.nodes[e][2]];
    let in_set = |k: ElementKind| matches!(k, ElementKind::Part(i) if parts.contains(&i));
    let mut weight = vec![0.0; n_nodes];
    let mut other = vec![false; n_nodes];
    for e in 0..els.n_physical {
        let k = els.kinds[e];
        for n in corners(e) {
            if in_set(k) {
                weight[n] = 1.0;
            } else if k != ElementKind::Air {
                other[n] = true;
            }
        }
    }
    let contact = (0..n_nodes).any(|n| weight[n] > 0.0 && other[n]);
    let axisym = solution.symmetry() == Symmetry::Axisymmetric;
    let mut f = [0.0; 2];
    let mut torque = 0.0;
    for e in 0..els.n_physical {
        if els.kinds[e] != ElementKind::Air {
            continue;
        }
        let g = corners(e).map(|n| weight[n]);
        if g.iter().all(|&v| v == 0.0) {
            continue;
        }
        let (dn, _) = crate::element::barycentric_gradients(&els.coords[e]);
        let grad = [0, 1].map(|k| g[0] * dn[0][k] + g[1] * dn[1][k] + g[2] * dn[2][k]);
        let a = els.gather(e, &solution.reduced);
        for_each_point(
            &els.coords[e],
            els.order,
            solution.symmetry(),
            solution.placement(e),
            |op| {
                let b = crate::element::flux_density(op, &a, solution.problem.applied_field);
                let half = 0.5 * (b[0] * b[0] + b[1] * b[1]);
                let t = [
                    [b[0] * b[0] - half, b[0] * b[1]],
                    [b[0] * b[1], b[1] * b[1] - half],
                ];
                let tg = [0, 1].map(|i| -NU0 * (t[i][0] * grad[0] + t[i][1] * grad[1]) * op.weight);
                f[0] += tg[0];
                f[1] += tg[1];
                let arm = [op.x[0] - torque_center[0], op.x[1] - torque_center[1]];
                torque += arm[0] * tg[1] - arm[1] * tg[0];
            },
        );
    }
    if axisym {
        f[0] = 0.0;
        torque = 0.0;
    }
    Force {
        vector: f,
        torque,
        contact,
    }
}
