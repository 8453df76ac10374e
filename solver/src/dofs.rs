//! The map from nodes to unknowns: every node the constraints leave free
//! and untied gets one unknown (renumbered later for elimination); a tied
//! node shares the unknown of the node it repeats, with a sign.

use crate::constraints::Constraints;
use crate::space::NONE;

/// The unknowns of a problem: each node's unknown (NONE where the
/// constraints fix it), its sign, and their count.
#[derive(Clone, Debug)]
pub struct DofMap {
    /// The unknown of every node, NONE for a fixed node.
    pub dof_of_node: Vec<usize>,
    /// Number of unknowns.
    pub n_dofs: usize,
    /// The node's potential as a multiple of its unknown: -1 for a node tied
    /// across an anti-periodic pair; empty when every sign is +1.
    pub sign_of_node: Vec<f64>,
}

impl DofMap {
    /// Numbers the free, untied nodes in node order; tied nodes take their image's unknown.
    pub fn new(constraints: &Constraints) -> DofMap {
        let mut dof_of_node = vec![NONE; constraints.fixed.len()];
        let mut tied = vec![false; constraints.fixed.len()];
        for &(n, _, _) in &constraints.ties {
            tied[n] = true;
        }
        let mut n_dofs = 0;
        for (n, f) in constraints.fixed.iter().enumerate() {
            if !f && !tied[n] {
                dof_of_node[n] = n_dofs;
                n_dofs += 1;
            }
        }
        let mut sign_of_node = Vec::new();
        for &(n, image, s) in &constraints.ties {
            dof_of_node[n] = dof_of_node[image];
            if s < 0.0 {
                if sign_of_node.is_empty() {
                    sign_of_node = vec![1.0; dof_of_node.len()];
                }
                sign_of_node[n] = s;
            }
        }
        DofMap {
            dof_of_node,
            n_dofs,
            sign_of_node,
        }
    }

    /// Values per unknown spread to every node (zero at fixed nodes, signed at tied ones).
    pub fn expand(&self, x: &[f64]) -> Vec<f64> {
        self.dof_of_node
            .iter()
            .enumerate()
            .map(|(n, &d)| if d == NONE { 0.0 } else { x[d] * self.sign(n) })
            .collect()
    }

    /// The sign of node n's potential against its unknown.
    pub fn sign(&self, n: usize) -> f64 {
        self.sign_of_node.get(n).copied().unwrap_or(1.0)
    }
}
