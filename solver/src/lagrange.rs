//! Lagrange shape functions of orders 3 and 4 on the barycentric lattice
//! (P. Silvester, High-order polynomial triangular finite elements for
//! potential problems, Int. J. Eng. Sci. 7, 1969): node (i, j, k),
//! i + j + k = p, has N = P_i(l0) P_j(l1) P_k(l2) with
//! P_m(l) = prod_{s<m} (p l - s) / (s + 1), one at its own node and zero at
//! every other. Orders 1 and 2 are written out in `element.rs`.

use crate::element_order::{ElementOrder, MAX_NODES};
use mesher::Symmetry;
use std::sync::OnceLock;

/// Values N_j and slopes dN_j/dl_c (c = 0, 1, 2, the barycentrics taken
/// as independent) at `lam`.
pub fn values_and_slopes(order: ElementOrder, lam: [f64; 3]) -> ([f64; MAX_NODES], [[f64; 3]; MAX_NODES]) {
    let p = order.degree();
    // P_m(lam[c]) and its derivative in lam[c], m = 0 .. p.
    let mut values = [[1.0; 5]; 3];
    let mut slopes = [[0.0; 5]; 3];
    for c in 0..3 {
        for m in 1..=p {
            let s = (m - 1) as f64;
            let f = (p as f64 * lam[c] - s) / (s + 1.0);
            let df = p as f64 / (s + 1.0);
            slopes[c][m] = slopes[c][m - 1] * f + values[c][m - 1] * df;
            values[c][m] = values[c][m - 1] * f;
        }
    }
    let mut n = [0.0; MAX_NODES];
    let mut dl = [[0.0; 3]; MAX_NODES];
    for (j, idx) in order.lattice().iter().enumerate() {
        let [i0, i1, i2] = idx.map(usize::from);
        let v = [values[0][i0], values[1][i1], values[2][i2]];
        n[j] = v[0] * v[1] * v[2];
        dl[j] = [slopes[0][i0] * v[1] * v[2], v[0] * slopes[1][i1] * v[2], v[0] * v[1] * slopes[2][i2]];
    }
    (n, dl)
}

/// Values and slopes at every point of one quadrature rule.
pub struct ShapeTable {
    /// N_j at each point.
    pub values: Vec<[f64; MAX_NODES]>,
    /// dN_j/dl_c at each point.
    pub slopes: Vec<[[f64; 3]; MAX_NODES]>,
}

/// The table of an order (3 or 4) at the points of its rule (see
/// `quadrature::rule`), made once per rule.
pub fn table(order: ElementOrder, symmetry: Symmetry, boosted: bool) -> &'static ShapeTable {
    static TABLES: [OnceLock<ShapeTable>; 8] = [const { OnceLock::new() }; 8];
    let slot = 4 * usize::from(order == ElementOrder::Quartic) + 2 * usize::from(symmetry == Symmetry::Axisymmetric) + usize::from(boosted);
    TABLES[slot].get_or_init(|| {
        let rule = crate::quadrature::rule(order, symmetry, boosted);
        let (values, slopes) = rule.points.iter().map(|&lam| values_and_slopes(order, lam)).unzip();
        ShapeTable { values, slopes }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Each shape function is one at its own node and zero at the others,
    /// the functions sum to one and their slopes along any direction in the
    /// plane l0 + l1 + l2 = 1 sum to zero.
    #[test]
    fn shape_functions_are_a_nodal_partition_of_unity() {
        for order in [ElementOrder::Cubic, ElementOrder::Quartic] {
            for i in 0..order.n_nodes() {
                let (n, _) = values_and_slopes(order, order.node_point(i));
                for (j, v) in n[..order.n_nodes()].iter().enumerate() {
                    assert!((v - f64::from(u8::from(i == j))).abs() < 1e-13, "order {order:?} N_{j} at node {i}: {v}");
                }
            }
            let (n, dl) = values_and_slopes(order, [0.2, 0.3, 0.5]);
            assert!((n.iter().sum::<f64>() - 1.0).abs() < 1e-13);
            let along: f64 = dl.iter().map(|d| d[1] - d[0]).sum();
            assert!(along.abs() < 1e-12, "slopes along l1 - l0 sum to {along}");
        }
    }
}
