//! The map from nodes to unknowns: every node the constraints leave free
//! gets one unknown (renumbered later for elimination).

use crate::constraints::Constraints;
use crate::space::NONE;

/// The unknowns of a problem: each node's unknown (NONE where the
/// constraints fix it) and their count.
#[derive(Clone, Debug)]
pub struct DofMap {
    /// The unknown of every node, NONE for a fixed node.
    pub dof_of_node: Vec<usize>,
    /// Number of unknowns.
    pub n_dofs: usize,
}

impl DofMap {
    /// Numbers the free nodes in node order.
    pub fn new(constraints: &Constraints) -> DofMap {
        let mut dof_of_node = vec![NONE; constraints.fixed.len()];
        let mut n_dofs = 0;
        for (n, f) in constraints.fixed.iter().enumerate() {
            if !f {
                dof_of_node[n] = n_dofs;
                n_dofs += 1;
            }
        }
        DofMap { dof_of_node, n_dofs }
    }

    /// Values per unknown spread to every node (zero at fixed nodes).
    pub fn expand(&self, x: &[f64]) -> Vec<f64> {
        self.dof_of_node.iter().map(|&d| if d == NONE { 0.0 } else { x[d] }).collect()
    }
}
