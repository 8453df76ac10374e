//! Newton-Raphson on the whole system: a tangent kept no softer than the
//! secant far from the solution and exact near it, each step solved by a
//! fresh Cholesky factorization or by conjugate gradients preconditioned
//! with an earlier one (newton_step), then a line search on the field energy.

use crate::assembly::System;
use crate::linear_system::{CholeskySolver, LinearError};
use crate::material::Tangent;
use crate::newton_step::TangentSolver;
use crate::problem::Problem;
use crate::space::NONE;
use std::time::Instant;

/// What happened during a solve: the soft outcome and where the time went.
#[derive(Clone, Debug, Default)]
pub struct SolveReport {
    /// Whether the stopping rules were met.
    pub converged: bool,
    /// Newton-Raphson iterations taken.
    pub iterations: usize,
    /// |residual| / |residual at zero potential| after each iteration (first entry: 1).
    pub residual_history: Vec<f64>,
    /// Number of unknowns.
    pub n_dofs: usize,
    /// Seconds spent building the matrix pattern (on the other core during
    /// the previous mesh's solve when the structure was made ahead).
    pub seconds_pattern: f64,
    /// Seconds spent assembling.
    pub seconds_assembly: f64,
    /// Seconds spent in symbolic analysis.
    pub seconds_symbolic: f64,
    /// Seconds spent in numeric factorizations.
    pub seconds_numeric: f64,
    /// Seconds spent in triangular solves and conjugate gradients.
    pub seconds_solve: f64,
    /// Numeric factorizations done (the rest of the steps reused one as a preconditioner).
    pub factorizations: usize,
    /// Preconditioned conjugate-gradient iterations over all steps.
    pub cg_iterations: usize,
}

impl SolveReport {
    /// The last relative residual.
    pub fn residual(&self) -> f64 {
        self.residual_history.last().copied().unwrap_or(0.0)
    }
}

/// Why the solver could not produce an answer at all.
#[derive(Clone, Debug, PartialEq)]
pub enum SolveError {
    /// The linear solver failed.
    Linear(LinearError),
    /// The matrix is too large for this solver's indexing.
    TooLarge {
        /// Entries the matrix would have.
        entries: usize,
    },
    /// A NaN or infinity appeared in the iterate.
    NotFinite {
        /// The iteration where it appeared.
        iteration: usize,
    },
}

impl std::fmt::Display for SolveError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SolveError::Linear(LinearError::NotPositiveDefinite) => write!(
                f,
                "the system matrix is not positive definite: check for non-physical materials (permeability <= 0) or a region with no reference potential"
            ),
            SolveError::Linear(LinearError::OutOfMemory) => write!(f, "out of memory in the sparse factorization; coarsen the mesh"),
            SolveError::TooLarge { entries } => write!(
                f,
                "the system matrix would have {entries} entries, more than this solver addresses; coarsen the mesh"
            ),
            SolveError::NotFinite { iteration } => write!(
                f,
                "a non-finite value appeared in Newton iteration {iteration}; check material data for zeros or extreme values"
            ),
        }
    }
}

impl std::error::Error for SolveError {}

impl From<crate::pattern::SystemTooLarge> for SolveError {
    fn from(e: crate::pattern::SystemTooLarge) -> Self {
        SolveError::TooLarge { entries: e.entries }
    }
}

fn norm(v: &[f64]) -> f64 {
    v.iter().map(|x| x * x).sum::<f64>().sqrt()
}

/// Where a solve ended.
pub struct NewtonEnd {
    /// The potential at every node (reduced field: the applied field's
    /// potential is not included).
    pub a: Vec<f64>,
    /// How the solve went.
    pub report: SolveReport,
    /// The steps' solver with its last factor, for linear solves with the
    /// tangent at `a` (None when no step was taken).
    pub tangent: Option<TangentSolver>,
    /// Whether the system's matrix holds the exact tangent at `a` (the last
    /// line search assembled it there, of the kind its step asked).
    pub exact_at_a: bool,
}

/// Solves the problem from zero potential (or its first guess).
/// Residuals are reported relative to the one at zero potential.
pub fn newton_solve(problem: &Problem, system: &mut System, progress: &dyn Fn(usize, f64)) -> Result<NewtonEnd, SolveError> {
    let a = first_guess(problem, system);
    let warm = a.iter().any(|&v| v != 0.0);
    let mut report = SolveReport {
        n_dofs: system.n_dofs,
        ..Default::default()
    };
    let linear = !problem.is_nonlinear();
    // A warm start (the previous mesh's solution carried over) puts every
    // point near its working point already; what residual it has sits at the
    // singular corners that the finer mesh resolves anew (on a plunger's
    // second mesh twice the residual at zero, nearly all of it at the
    // corners of the plunger, its stop and the frame). The stiffened
    // tangent, which keeps steps from zero off a curve's toe, only slowed
    // the tail there: the exact one from the start took the plunger sweep
    // from 76 Newton steps to 71 and the baked thin disk from 27 to 23.
    let kind = |rel: f64| {
        if linear || warm || rel <= problem.newton.stiffen_tangent_above {
            Tangent::Exact
        } else {
            Tangent::NoSofterThanSecant
        }
    };
    report.residual_history.push(1.0);
    if system.n_dofs == 0 {
        report.converged = true;
        return Ok(NewtonEnd {
            a,
            report,
            tangent: None,
            exact_at_a: false,
        });
    }
    // The symbolic analysis needs only the pattern: it runs on one core
    // while the first assembly runs on the other (and, from a warm start,
    // the residual at zero: the symbolic analysis is the longer of the two).
    let pattern = system.matrix.pattern().clone();
    let elimination = system.elimination;
    let ((analysis, seconds_symbolic), (mut now, r0, seconds_assembly)) = rayon::join(
        || {
            let t = Instant::now();
            (CholeskySolver::analyse(&pattern, elimination), t.elapsed().as_secs_f64())
        },
        || {
            let t = Instant::now();
            let affine = system.affine_residual(problem, &a);
            let first = if warm { Tangent::Exact } else { Tangent::ColdStart };
            let residual = system.assemble_with(problem, &a, first, affine.clone());
            // Residuals stay relative to the one at zero potential, so a warm
            // start is held to the same tolerance as a cold one.
            let r0 = if warm {
                let zero = vec![0.0; system.dof_of_node.len()];
                norm(&system.residual(problem, &zero))
            } else {
                norm(&residual)
            };
            (Iterate { a, residual, affine }, r0.max(f64::MIN_POSITIVE), t.elapsed().as_secs_f64())
        },
    );
    drop(pattern);
    report.seconds_symbolic = seconds_symbolic;
    report.seconds_assembly += seconds_assembly;
    if warm {
        report.residual_history[0] = norm(&now.residual) / r0;
    }
    if norm(&now.residual) == 0.0 {
        report.converged = true;
        return Ok(NewtonEnd {
            a: now.a,
            report,
            tangent: None,
            exact_at_a: false,
        });
    }
    let settings = problem.newton;
    // Exact Newton (no reuse of factorizations) keeps every factor in double precision.
    let mut solver = TangentSolver::new(analysis.map_err(SolveError::Linear)?, settings.reuse_factorization);
    let mut forcing = Forcing::new(settings.residual_tolerance);
    let mut previous_update = None;
    // Magnets with a knee and no steel: the first step is exact. From zero
    // it solves the recoil-line problem; where no magnet point comes near
    // its knee that is the answer, and the residual says so at once. From a
    // warm start (the previous mesh's field) it lands there too, where an
    // inexact first step stopped at its forcing term (6e-9) and took a second.
    let knee_only = !linear && !problem.laws.iter().any(|l| matches!(l, crate::material::Law::Saturating(_)));
    let mut assembled = Tangent::ColdStart;
    for it in 1..=settings.max_iterations {
        let rel_now = report.residual_history.last().copied().unwrap_or(1.0);
        // Far from the solution the tangent moves too much between steps for an
        // old factor to precondition it (measured: most such attempts gave up),
        // so each step there has a factor of its own; it may still be inexact
        // (a single-precision factor and conjugate gradients to the forcing
        // term). Linear studies and exact Newton take exact steps.
        let eta = forcing.next(rel_now);
        let exact_first = knee_only && it == 1;
        let inexact = settings.reuse_factorization && !linear && !exact_first;
        let reuse = inexact && kind(rel_now) == Tangent::Exact;
        let eta = if inexact { eta } else { 0.0 };
        let (step, cost) = solver.step(&system.matrix, &now.residual, eta, reuse).map_err(SolveError::Linear)?;
        report.seconds_numeric += cost.seconds_numeric;
        report.seconds_solve += cost.seconds_solve;
        report.factorizations += cost.factorizations;
        report.cg_iterations += cost.cg_iterations;
        if step.iter().any(|v| !v.is_finite()) {
            return Err(SolveError::NotFinite { iteration: it });
        }
        assembled = kind(rel_now);
        let (next, alpha, seconds) = line_search(problem, system, &now, &step, assembled);
        report.seconds_assembly += seconds;
        let update = norm(&step) / norm_of_dofs(system, &next.a).max(f64::MIN_POSITIVE);
        let error = error_estimate(update, previous_update, alpha);
        previous_update = Some(update);
        now = next;
        let rel = norm(&now.residual) / r0;
        report.iterations = it;
        report.residual_history.push(rel);
        progress(it, rel);
        if !rel.is_finite() {
            return Err(SolveError::NotFinite { iteration: it });
        }
        // A residual a hundredth of the tolerance has converged whatever
        // the update monitor says: the cold recoil-line step of a magnet
        // far from its knee ends there, and so does any later step, since
        // Newton's next one would only square that residual (measured: a
        // bare knee magnet took a third step from 2.6e-13 to 1.9e-14).
        let tiny = rel < 1e-2 * settings.residual_tolerance || rel < 1e-14;
        if (linear && rel < 1e-6) || tiny || (rel < settings.residual_tolerance && error < settings.update_tolerance.max(1e-14)) {
            report.converged = true;
            break;
        }
    }
    Ok(NewtonEnd {
        a: now.a,
        report,
        tangent: Some(solver),
        exact_at_a: assembled == Tangent::Exact,
    })
}

/// Zero, or the problem's first guess for a saturating study (fixed nodes
/// kept at zero).
fn first_guess(problem: &Problem, system: &System) -> Vec<f64> {
    let n = system.dof_of_node.len();
    match &problem.initial {
        Some(guess) if guess.len() == n && problem.is_nonlinear() => (0..n)
            .map(|i| if system.dof_of_node[i] == crate::space::NONE { 0.0 } else { guess[i] })
            .collect(),
        _ => vec![0.0; n],
    }
}

/// The error of the new iterate relative to the potential, estimated from
/// the step `update` that made it (relative, full length) and the step
/// before it. The step measures the error of the iterate it started from;
/// a full step that contracted by theta = |d_k| / |d_k-1| <= 1/2 leaves at
/// most theta / (1 - theta) |d_k| to go while the contraction lasts (a
/// geometric series; near the solution Newton's contraction only improves).
/// This is the contraction monitor of P. Deuflhard (Newton Methods for
/// Nonlinear Problems, Springer, 2004, chapter 2). A damped step, or one that
/// did not contract, is its own estimate.
fn error_estimate(update: f64, previous: Option<f64>, alpha: f64) -> f64 {
    match previous {
        Some(before) if alpha == 1.0 && update <= 0.5 * before => {
            let theta = update / before;
            update * theta / (1.0 - theta)
        }
        _ => update,
    }
}

/// Forcing terms of the inexact Newton method: choice 2 of S. C. Eisenstat
/// and H. F. Walker (Choosing the forcing terms in an inexact Newton method,
/// SIAM J. Sci. Comput. 17(1), 1996), eta = 0.9 (|r_k| / |r_k-1|)^2 with
/// their safeguard, capped at 0.1 and kept above half the distance to the
/// stopping tolerance (C. T. Kelley, Iterative Methods for Linear and
/// Nonlinear Equations, SIAM, 1995, section 6.3), so the last linear solve
/// is not asked for more than the Newton stop needs.
struct Forcing {
    tolerance: f64,
    last: Option<(f64, f64)>,
}

const FORCING_MAX: f64 = 0.1;

impl Forcing {
    fn new(tolerance: f64) -> Forcing {
        Forcing { tolerance, last: None }
    }

    /// The forcing term for the step from relative residual `rel`.
    fn next(&mut self, rel: f64) -> f64 {
        let eta = match self.last {
            None => FORCING_MAX,
            Some((rel_before, eta_before)) => {
                let eta = 0.9 * (rel / rel_before).powi(2);
                let safeguard = 0.9 * eta_before * eta_before;
                if safeguard > 0.1 {
                    eta.max(safeguard)
                } else {
                    eta
                }
            }
        };
        // Once the residual test is met, a step is only taken to measure the
        // update, which a loose solve measures well enough.
        let floor = if rel > self.tolerance { 0.5 * self.tolerance / rel } else { FORCING_MAX };
        let eta = eta.max(floor).min(FORCING_MAX);
        self.last = Some((rel, eta));
        eta
    }
}

fn norm_of_dofs(system: &System, a: &[f64]) -> f64 {
    system
        .dof_of_node
        .iter()
        .zip(a)
        .filter(|(d, _)| **d != NONE)
        .map(|(_, v)| v * v)
        .sum::<f64>()
        .sqrt()
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

fn shifted(system: &System, a: &[f64], step: &[f64], alpha: f64) -> Vec<f64> {
    let mut trial = a.to_vec();
    for (n, &d) in system.dof_of_node.iter().enumerate() {
        if d != NONE {
            trial[n] += alpha * step[d] * system.sign_of_node.get(n).copied().unwrap_or(1.0);
        }
    }
    trial
}

/// Line search on the field energy W(a + alpha step), whose derivative is
/// residual . step: the full Newton step when the energy still falls at
/// alpha = 1, else regula falsi for the zero of the derivative in (0, 1).
/// The energy is convex (H(B) is monotone), so the zero is unique.
/// Leaves the system assembled at the accepted point.
/// The tangent assembled there is of kind `tangent`.
/// Returns the accepted point, its step length alpha and the seconds spent.
fn line_search(problem: &Problem, system: &mut System, at: &Iterate, step: &[f64], tangent: Tangent) -> (Iterate, f64, f64) {
    let t = Instant::now();
    // The affine residual is linear in the potential: r_aff(a + alpha s) = r_aff(a) + alpha K_aff s.
    let along = system.affine_product(step);
    let affine_at = |alpha: f64| -> Vec<f64> { at.affine.iter().zip(&along).map(|(r, k)| r + alpha * k).collect() };
    let accept = |system: &mut System, alpha: f64, affine: Vec<f64>| {
        let a = shifted(system, &at.a, step, alpha);
        let residual = system.assemble_with(problem, &a, tangent, affine.clone());
        Iterate { a, residual, affine }
    };
    let full = accept(system, 1.0, affine_at(1.0));
    if !problem.is_nonlinear() {
        return (full, 1.0, t.elapsed().as_secs_f64());
    }
    // The slopes at alpha = 0 and 1: residual . step (negative for a descent step).
    let g0 = dot(&at.residual, step);
    let g1 = dot(&full.residual, step);
    // The full step is kept when the energy still falls there, or when its
    // slope has dropped to a tenth of the start's (the strong Wolfe
    // curvature condition, Nocedal and Wright, Numerical Optimization, 2006,
    // eq. 3.7): near the solution a full Newton step overshoots the line's
    // minimum by O(|r|^2), and cutting it would spoil the quadratic rate.
    if g1 <= 0.1 * g0.abs() {
        return (full, 1.0, t.elapsed().as_secs_f64());
    }
    let (mut lo, mut glo) = (0.0, if g0 < 0.0 { g0 } else { -g1.abs().max(f64::MIN_POSITIVE) });
    let (mut hi, mut ghi) = (1.0, g1);
    let mut alpha = 1.0;
    for _ in 0..6 {
        alpha = (lo - glo * (hi - lo) / (ghi - glo)).clamp(lo + 0.05 * (hi - lo), hi - 0.05 * (hi - lo));
        let trial = shifted(system, &at.a, step, alpha);
        let g = dot(&system.residual_with(problem, &trial, affine_at(alpha)), step);
        if g.abs() <= 0.1 * g0.abs() {
            break;
        }
        if g > 0.0 {
            hi = alpha;
            ghi = g;
        } else {
            lo = alpha;
            glo = g;
        }
    }
    // One full assembly at the accepted point, for the next Newton step.
    let accepted = accept(system, alpha, affine_at(alpha));
    (accepted, alpha, t.elapsed().as_secs_f64())
}

/// A Newton iterate: nodal potentials, the residual there and its affine part.
struct Iterate {
    a: Vec<f64>,
    residual: Vec<f64>,
    affine: Vec<f64>,
}

#[cfg(test)]
mod tests {
    use super::error_estimate;

    #[test]
    fn a_contracting_full_step_estimates_the_error_left_by_the_geometric_series() {
        // theta = 1e-6 / 1e-4 = 0.01: the error left is 1e-6 * 0.01 / 0.99.
        assert!((error_estimate(1e-6, Some(1e-4), 1.0) - 1e-8 / 0.99).abs() < 1e-20);
        // theta = 1/2 is the largest contraction trusted: estimate = the step.
        assert_eq!(error_estimate(1e-6, Some(2e-6), 1.0), 1e-6);
    }

    #[test]
    fn a_first_damped_or_growing_step_is_its_own_estimate() {
        assert_eq!(error_estimate(1e-6, None, 1.0), 1e-6);
        assert_eq!(error_estimate(1e-6, Some(1e-4), 0.8), 1e-6);
        assert_eq!(error_estimate(1e-6, Some(1.5e-6), 1.0), 1e-6);
    }
}
