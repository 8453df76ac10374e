//! Newton-Raphson on the whole system with the exact tangent and a
//! backtracking line search on the residual norm.

use crate::assembly::{System, NONE};
use crate::linear_system::{CholeskySolver, LinearError};
use crate::problem::Problem;
use std::time::Instant;

/// What happened during a solve: the soft outcome and where the time went.
#[derive(Clone, Debug, Default)]
pub struct SolveReport {
    pub converged: bool,
    pub iterations: usize,
    /// |residual| / |residual at zero potential| after each iteration (first entry: 1).
    pub residual_history: Vec<f64>,
    pub update_history: Vec<f64>,
    pub n_dofs: usize,
    pub seconds_pattern: f64,
    pub seconds_assembly: f64,
    pub seconds_symbolic: f64,
    pub seconds_numeric: f64,
    pub seconds_solve: f64,
}

impl SolveReport {
    pub fn residual(&self) -> f64 {
        self.residual_history.last().copied().unwrap_or(0.0)
    }
}

/// Why the solver could not produce an answer at all.
#[derive(Clone, Debug, PartialEq)]
pub enum SolveError {
    Linear(LinearError),
    /// A NaN or infinity appeared in the iterate.
    NotFinite {
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
            SolveError::NotFinite { iteration } => write!(
                f,
                "a non-finite value appeared in Newton iteration {iteration}; check material data for zeros or extreme values"
            ),
        }
    }
}

impl std::error::Error for SolveError {}

fn norm(v: &[f64]) -> f64 {
    v.iter().map(|x| x * x).sum::<f64>().sqrt()
}

/// Solves the problem; returns the potential at every node (reduced field:
/// the applied field's potential is not included) and the report.
pub fn newton_solve(problem: &Problem, system: &mut System, progress: &dyn Fn(usize, f64)) -> Result<(Vec<f64>, SolveReport), SolveError> {
    let zero = vec![0.0; system.dof_of_node.len()];
    // Residuals are reported relative to the true problem's residual at zero potential.
    let r0 = norm(&system.residual(problem, &zero)).max(f64::MIN_POSITIVE);
    let Some(surrogate) = toe_free(problem) else {
        return newton_from(problem, system, zero, r0, &mut None, progress);
    };
    // Continuation over the low-field toe of the B-H curves: converge (loosely)
    // with each toe replaced by its chord from the origin, then go on with
    // the true curves from there.
    let mut loose = surrogate.clone();
    loose.newton.residual_tolerance = TOE_STAGE_TOLERANCE;
    loose.newton.update_tolerance = 1.0;
    let mut analysis = None;
    let (start, first) = newton_from(&loose, system, zero, r0, &mut analysis, progress)?;
    let (a, mut report) = newton_from(problem, system, start, r0, &mut analysis, &|it, r| progress(it + first.iterations, r))?;
    report.iterations += first.iterations;
    let mut history = first.residual_history.clone();
    history.extend(report.residual_history.iter().skip(1));
    report.residual_history = history;
    report.seconds_assembly += first.seconds_assembly;
    report.seconds_numeric += first.seconds_numeric;
    report.seconds_solve += first.seconds_solve;
    report.seconds_symbolic += first.seconds_symbolic;
    Ok((a, report))
}

/// Relative residual at which the toe-free stage hands over.
const TOE_STAGE_TOLERANCE: f64 = 1e-2;

/// The problem with every curve's low-field toe replaced by the chord from
/// the origin to the point of largest secant permeability; None when no
/// curve has a toe.
fn toe_free<'m>(problem: &Problem<'m>) -> Option<Problem<'m>> {
    let mut p = problem.clone();
    let mut changed = false;
    for law in &mut p.laws {
        if let crate::material::Law::Saturating(c) = law {
            if let Some(t) = c.without_toe() {
                *law = crate::material::Law::Saturating(std::sync::Arc::new(t));
                changed = true;
            }
        }
    }
    changed.then_some(p)
}

/// Newton-Raphson from the potential `a` (reduced, every node); residuals
/// are reported relative to `r0`. `analysis` keeps the symbolic
/// factorization for a later stage on the same pattern.
fn newton_from(
    problem: &Problem,
    system: &mut System,
    mut a: Vec<f64>,
    r0: f64,
    analysis: &mut Option<CholeskySolver>,
    progress: &dyn Fn(usize, f64),
) -> Result<(Vec<f64>, SolveReport), SolveError> {
    let mut report = SolveReport {
        n_dofs: system.n_dofs,
        ..Default::default()
    };
    let t = Instant::now();
    let mut residual = system.assemble(problem, &a);
    report.seconds_assembly += t.elapsed().as_secs_f64();
    report.residual_history.push(norm(&residual) / r0);
    if system.n_dofs == 0 || norm(&residual) == 0.0 {
        report.converged = true;
        return Ok((a, report));
    }
    let t = Instant::now();
    if analysis.is_none() {
        *analysis = Some(CholeskySolver::analyse(&system.matrix).map_err(SolveError::Linear)?);
    }
    let chol = analysis.as_ref().expect("analysed above");
    report.seconds_symbolic = t.elapsed().as_secs_f64();
    let linear = !problem.is_nonlinear();
    let settings = problem.newton;
    for it in 1..=settings.max_iterations {
        let t = Instant::now();
        let factor = chol.factorize(&system.matrix).map_err(SolveError::Linear)?;
        report.seconds_numeric += t.elapsed().as_secs_f64();
        let t = Instant::now();
        let mut step: Vec<f64> = residual.iter().map(|r| -r).collect();
        factor.solve(&mut step);
        report.seconds_solve += t.elapsed().as_secs_f64();
        if step.iter().any(|v| !v.is_finite()) {
            return Err(SolveError::NotFinite { iteration: it });
        }
        let (new_a, new_residual, seconds) = line_search(problem, system, &a, &step);
        report.seconds_assembly += seconds;
        let update = norm(&step) / norm_of_dofs(system, &new_a).max(f64::MIN_POSITIVE);
        a = new_a;
        residual = new_residual;
        let rel = norm(&residual) / r0;
        report.iterations = it;
        report.residual_history.push(rel);
        report.update_history.push(update);
        progress(it, rel);
        if !rel.is_finite() {
            return Err(SolveError::NotFinite { iteration: it });
        }
        if (linear && rel < 1e-6) || (rel < settings.residual_tolerance && update < settings.update_tolerance.max(1e-14)) || rel < 1e-14 {
            report.converged = true;
            break;
        }
    }
    Ok((a, report))
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
            trial[n] += alpha * step[d];
        }
    }
    trial
}

/// Line search on the field energy W(a + alpha step), whose derivative is
/// residual . step: the full Newton step when the energy still falls at
/// alpha = 1, else regula falsi for the zero of the derivative in (0, 1).
/// The energy is convex (H(B) is monotone), so the zero is unique.
/// Leaves the system assembled at the accepted point.
fn line_search(problem: &Problem, system: &mut System, a: &[f64], step: &[f64]) -> (Vec<f64>, Vec<f64>, f64) {
    let t = Instant::now();
    let full = shifted(system, a, step, 1.0);
    let residual = system.assemble(problem, &full);
    if !problem.is_nonlinear() {
        return (full, residual, t.elapsed().as_secs_f64());
    }
    let g1 = dot(&residual, step);
    if g1 <= 0.0 {
        return (full, residual, t.elapsed().as_secs_f64());
    }
    // The slope at alpha = 0: residual . step (negative for a descent step).
    let g0 = dot(&system.residual(problem, a), step);
    let (mut lo, mut glo) = (0.0, if g0 < 0.0 { g0 } else { -g1.abs().max(f64::MIN_POSITIVE) });
    let (mut hi, mut ghi) = (1.0, g1);
    let mut alpha = 1.0;
    for _ in 0..6 {
        alpha = (lo - glo * (hi - lo) / (ghi - glo)).clamp(lo + 0.05 * (hi - lo), hi - 0.05 * (hi - lo));
        let g = dot(&system.residual(problem, &shifted(system, a, step, alpha)), step);
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
    let trial = shifted(system, a, step, alpha);
    let residual = system.assemble(problem, &trial);
    (trial, residual, t.elapsed().as_secs_f64())
}
