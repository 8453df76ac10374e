//! The fill-reducing ordering built from the mesh's corner graph against the
//! approximate minimum degree ordering of the assembled matrix (P. R.
//! Amestoy, T. A. Davis, I. S. Duff, An approximate minimum degree ordering
//! algorithm, SIAM J. Matrix Anal. Appl. 17(4), 1996, as implemented by the
//! faer library): for quadratic elements, a numbering of the unknowns whose
//! Cholesky factor is no larger. Also the matrix pattern those unknowns
//! give, against the element pairs it must hold.

use mesher::{OuterBoundary, Symmetry};
use solver::assembly::System;
use solver::element::ElementOrder;
use solver::linear_system::{CholeskySolver, Elimination};
use validation::{mesh, rect, spec};

/// Factor entries with the mesh ordering and with AMD of the matrix.
fn factor_sizes(symmetry: Symmetry, size: f64) -> (usize, usize) {
    let parts = vec![
        (rect(0.0, -5e-3, 20e-3, 0.0), size),
        (rect(0.0, 0.0, 15e-3, 10e-3), size),
        (rect(0.0, 11e-3, 40e-3, 17e-3), size),
    ];
    let m = mesh(&spec(symmetry, parts, vec![], OuterBoundary::Open));
    let system = System::new(&m, ElementOrder::Quadratic).expect("small system");
    assert_eq!(system.elimination, Elimination::AsNumbered);
    let mut dofs: Vec<usize> = system.dof_of_node.iter().copied().filter(|&d| d != usize::MAX).collect();
    dofs.sort_unstable();
    assert!(dofs.iter().enumerate().all(|(k, &d)| k == d), "the numbering is a permutation of the unknowns");
    let pattern = system.matrix.pattern();
    let with_mesh = CholeskySolver::analyse(pattern, Elimination::AsNumbered).expect("analysis").factor_entries();
    let with_amd = CholeskySolver::analyse(pattern, Elimination::MinimumDegree).expect("analysis").factor_entries();
    (with_mesh, with_amd)
}

#[test]
fn mesh_ordering_fills_no_more_than_amd_of_the_matrix() {
    for symmetry in [Symmetry::Axisymmetric, Symmetry::Planar] {
        for size in [2e-3, 0.7e-3, 0.3e-3] {
            let (with_mesh, with_amd) = factor_sizes(symmetry, size);
            eprintln!(
                "{symmetry:?} size {size}: mesh ordering {with_mesh}, AMD {with_amd}, ratio {:.3}",
                with_mesh as f64 / with_amd as f64
            );
            assert!(with_mesh <= with_amd, "{symmetry:?} {size}: {with_mesh} entries against {with_amd}");
        }
    }
}

#[test]
fn linear_elements_keep_amd_of_the_matrix() {
    let parts = vec![(rect(0.0, 0.0, 15e-3, 10e-3), 2e-3)];
    let m = mesh(&spec(Symmetry::Planar, parts, vec![], OuterBoundary::Open));
    assert_eq!(
        System::new(&m, ElementOrder::Linear).expect("small system").elimination,
        Elimination::MinimumDegree
    );
}

/// The matrix pattern holds exactly the pairs of free unknowns that share an
/// element (lower triangle, diagonal included), each column sorted: checked
/// against the pairs listed element by element.
#[test]
fn the_pattern_is_the_element_pairs() {
    use std::collections::BTreeSet;
    for order in [ElementOrder::Quadratic, ElementOrder::Linear] {
        let parts = vec![(rect(0.0, 0.0, 15e-3, 10e-3), 2e-3), (rect(0.0, 11e-3, 40e-3, 17e-3), 3e-3)];
        let m = mesh(&spec(Symmetry::Axisymmetric, parts, vec![], OuterBoundary::Open));
        let system = System::new(&m, order).expect("small system");
        let mut expected = BTreeSet::new();
        for e in 0..system.elements.len() {
            let dofs: Vec<usize> = system
                .elements
                .element_nodes(e)
                .iter()
                .map(|&n| system.dof_of_node[n])
                .filter(|&d| d != usize::MAX)
                .collect();
            for &i in &dofs {
                for &j in &dofs {
                    if i >= j {
                        expected.insert((j, i));
                    }
                }
            }
        }
        let pattern = system.matrix.pattern();
        let mut found = BTreeSet::new();
        for c in 0..pattern.major_dim() {
            let rows = pattern.lane(c);
            assert!(rows.windows(2).all(|w| w[0] < w[1]), "column {c} sorted and without repeats");
            found.extend(rows.iter().map(|&r| (c, r)));
        }
        assert_eq!(found, expected, "{order:?}");
    }
}
