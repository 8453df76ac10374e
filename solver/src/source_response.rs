//! The field's first-order response to a change of the winding currents
//! at a solved working point: one linear solve with the exact tangent.
//!
//! At the solution a* of R(a, J) = 0 the residual is affine in the current
//! density (its source term is -N J w), so a change dJ moves the solution
//! by da = -K_t^-1 (dR/dJ dJ), K_t the exact tangent dR/da at a*
//! (implicit function theorem). A value linear in the potential, such as a
//! winding's flux linkage, then changes by its own functional of da: its
//! derivative with respect to the current, to the solver's tolerance, with
//! no difference step to choose. A re-solve at a perturbed current (what
//! this replaced) cost a whole Newton solve from zero, six to ten
//! factorizations, and carried the step's truncation error.

use crate::assembly::{element_load, element_signs, System};
use crate::element::element_residual;
use crate::linear_system::CholeskySolver;
use crate::material::{Law, Tangent};
use crate::newton::{NewtonEnd, SolveError};
use crate::newton_step::TangentSolver;
use crate::problem::Problem;
use crate::space::{ElementKind, NONE};

/// How far the response's linear solve goes: its residual against the
/// load's (conjugate gradients preconditioned with the Newton steps' last
/// factor, which is of a tangent near this one).
const RESPONSE_TOLERANCE: f64 = 1e-10;

/// The responses to the problem's `current_changes` at the end of its
/// solve, in order; an empty one where the change is empty or its solve
/// failed (a caller then does without, or asks
/// `Solution::potential_after_current_change`).
pub(crate) fn responses(problem: &Problem, system: &mut System, end: &mut NewtonEnd) -> Vec<Vec<f64>> {
    let asked = problem.current_changes.iter().any(|c| !c.is_empty());
    let Some(tangent) = end.tangent.as_mut().filter(|_| asked && end.report.converged) else {
        return vec![Vec::new(); problem.current_changes.len()];
    };
    if !end.exact_at_a {
        let _ = system.assemble(problem, &end.a, Tangent::Exact);
    }
    // A saturating study's kept factor is of the tangent some Newton steps
    // back, which preconditions a solve to RESPONSE_TOLERANCE too poorly to
    // finish within conjugate gradients' budget: on a plunger's 67 000
    // unknowns the attempt gave up after four iterations (34 ms) before the
    // fresh factor (27 ms) and three iterations that the solve then needed.
    // The first response therefore factorizes afresh; a linear study's
    // tangent never moved, so its kept factor serves every response.
    let mut reuse = !problem.is_nonlinear();
    problem
        .current_changes
        .iter()
        .map(|change| match change.is_empty() {
            true => Vec::new(),
            false => {
                let delta = response(problem, system, tangent, &end.a, change, reuse).unwrap_or_default();
                reuse = true;
                delta
            }
        })
        .collect()
}

/// The first-order change of the nodal potentials `a`, a solution of
/// `problem`, for the current-density change `change` (per part), the
/// tangent assembled and factorized afresh: for a solution solved without
/// asking for it (`Solution::potential_after_current_change`).
pub(crate) fn response_afresh(problem: &Problem, a: &[f64], change: &[f64]) -> Result<Vec<f64>, SolveError> {
    let mut system = System::new(problem.mesh, problem.order)?;
    let _ = system.assemble(problem, a, Tangent::Exact);
    let analysis = CholeskySolver::analyse(system.matrix.pattern(), system.elimination).map_err(SolveError::Linear)?;
    let mut tangent = TangentSolver::new(analysis, problem.newton.reuse_factorization);
    response(problem, &system, &mut tangent, a, change, false)
}

/// The first-order change of the nodal potentials for the current-density
/// change `change` (per part), with the exact tangent at `a` in `system`;
/// `reuse`: the kept factor may precondition it (else a fresh one is made).
fn response(problem: &Problem, system: &System, tangent: &mut TangentSolver, a: &[f64], change: &[f64], reuse: bool) -> Result<Vec<f64>, SolveError> {
    let mut delta = vec![0.0; a.len()];
    let load = current_load_change(system, problem, change, a);
    if load.iter().all(|&r| r == 0.0) {
        return Ok(delta);
    }
    // A fresh factor when the kept one may not serve or does not precondition well enough.
    let (step, _) = tangent.step(&system.matrix, &load, RESPONSE_TOLERANCE, reuse).map_err(SolveError::Linear)?;
    if step.iter().any(|v| !v.is_finite()) {
        return Err(SolveError::NotFinite { iteration: 1 });
    }
    for (n, &d) in system.dof_of_node.iter().enumerate() {
        if d != NONE {
            delta[n] = step[d] * system.sign_of_node.get(n).copied().unwrap_or(1.0);
        }
    }
    Ok(delta)
}

/// R(a, J + change) - R(a, J) per unknown: the residual of the elements
/// whose current density changes, the only ones it moves (the rest of each
/// element's residual, H(B) against the test functions, cancels).
fn current_load_change(system: &System, problem: &Problem, change: &[f64], a: &[f64]) -> Vec<f64> {
    let els = &system.elements;
    let air = Law::air();
    let mut changed = problem.clone();
    changed.current_density.iter_mut().zip(change).for_each(|(j, c)| *j += c);
    let mut load = vec![0.0; system.n_dofs];
    for e in 0..els.n_physical {
        let ElementKind::Part(i) = els.kinds[e] else { continue };
        if change.get(i).is_none_or(|&c| c == 0.0) {
            continue;
        }
        let residual = |p: &Problem| {
            let load = element_load(e, els.kinds[e], p, &air);
            element_residual(els.geometry(e), &els.gather(e, a), els.order, p.mesh.symmetry, els.placement(e), load)
        };
        let (before, after) = (residual(problem), residual(&changed));
        let signs = element_signs(els, &system.sign_of_node, e);
        for (k, &n) in els.element_nodes(e).iter().enumerate() {
            let d = system.dof_of_node[n];
            if d != NONE {
                load[d] += signs.map_or(1.0, |s| s[k]) * (after[k] - before[k]);
            }
        }
    }
    load
}
