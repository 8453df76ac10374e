//! The Newton step: solve J d = -r with the current tangent J, either by a
//! fresh Cholesky factorization of J or, once a factorization exists, by
//! conjugate gradients preconditioned with that earlier factorization.
//!
//! Near the solution the tangent changes little from one iteration to the
//! next, so an old factor is an almost exact preconditioner: a few
//! triangular solves (a tenth of a factorization each at 1e6 unknowns)
//! replace a new factorization. The linear solve is stopped at the forcing
//! tolerance of an inexact Newton method, |J d + r| <= eta |r|, which keeps
//! the outer convergence quadratic when eta falls like |r| (R. S. Dembo,
//! S. C. Eisenstat, T. Steihaug, Inexact Newton methods, SIAM J. Numer.
//! Anal. 19(2), 1982). When conjugate gradients would need too many
//! iterations, the tangent is factorized afresh.

use crate::linear_system::{symmetric_product, CholeskySolver, Factor, LinearError};
use nalgebra_sparse::CscMatrix;
use std::time::Instant;

/// Most preconditioned conjugate-gradient iterations before refactorizing,
/// for a system of n unknowns. Each costs a forward and a back substitution
/// and a product with J: measured on this project's machine, a fifth of a
/// factorization at 1e4 to 1e5 unknowns and a ninth at 1e6 (the
/// factorization grows faster than the factor's size), so the budget grows
/// with n and an attempt that fails costs at most about one factorization.
fn max_cg_iterations(n: usize) -> usize {
    (4 + n / 250_000).min(8)
}

/// Give up after the first iteration when it left more than this share of
/// the residual: the old factor no longer resembles the tangent.
const HOPELESS_FIRST_STEP: f64 = 0.9;

/// From the second iteration on, give up when the residual has fallen by
/// less than this factor per iteration and the rest would not fit.
const SLOW_RATE: f64 = 0.5;

/// How one step was solved, for the report.
#[derive(Clone, Copy, Debug, Default)]
pub struct StepCost {
    /// Seconds in numeric factorization.
    pub seconds_numeric: f64,
    /// Seconds in solving.
    pub seconds_solve: f64,
    /// Numeric factorizations made (two when a single-precision factor was made but its
    /// iterations stalled, so that the step fell back to double precision).
    pub factorizations: usize,
    /// Conjugate-gradient iterations.
    pub cg_iterations: usize,
}

/// A fresh factorization is made in single precision, and the step solved
/// by conjugate gradients in double precision preconditioned with it, for
/// every inexact step (forcing > 0: one or two iterations meet it) and for
/// exact steps from this many unknowns on. Measured on the cup magnet: the
/// single-precision factorization takes 0.45 to 0.8 of the double one, and
/// three or four iterations reach EXACT_STEP (each a rounded solve and a
/// product, 0.12 of a factorization at 1e6); below about 3e5 unknowns those
/// iterations cost what the factorization saved.
const SINGLE_PRECISION_FROM: usize = 300_000;

/// The residual share a step asked to be exact (forcing 0) is solved to
/// with a single-precision factor: about what a double-precision
/// factorization and its solve leave.
const EXACT_STEP: f64 = 1e-10;

/// The symbolic analysis of the tangent's pattern and the latest numeric factor.
pub struct TangentSolver {
    analysis: CholeskySolver,
    factor: Option<Factor>,
    /// Whether fresh factorizations of large systems may be single-precision preconditioners.
    single_precision: bool,
}

impl TangentSolver {
    /// `single_precision`: large systems are factorized in single precision
    /// and solved by preconditioned conjugate gradients (false: every
    /// factorization in double precision, for exact Newton steps).
    pub fn new(analysis: CholeskySolver, single_precision: bool) -> TangentSolver {
        TangentSolver {
            analysis,
            factor: None,
            single_precision,
        }
    }

    /// The step d with |J d + r| <= forcing |r|: by the kept factor and
    /// conjugate gradients when `reuse` allows and that converges within
    /// max_cg_iterations, else by a new factorization of J (a
    /// single-precision one with conjugate gradients to the forcing
    /// tolerance, or a double-precision one solved exactly). `forcing` 0
    /// asks for the exact step.
    pub fn step(&mut self, j: &CscMatrix<f64>, residual: &[f64], forcing: f64, reuse: bool) -> Result<(Vec<f64>, StepCost), LinearError> {
        let mut cost = StepCost::default();
        let rhs: Vec<f64> = residual.iter().map(|r| -r).collect();
        if let (Some(factor), true) = (&self.factor, reuse && forcing > 0.0) {
            let t = Instant::now();
            let analysis = &self.analysis;
            let mut rounded = Vec::new();
            let outcome = preconditioned_cg(j, &mut |z: &mut [f64]| analysis.solve_in(factor, z, &mut rounded), &rhs, forcing);
            cost.seconds_solve += t.elapsed().as_secs_f64();
            cost.cg_iterations = outcome.iterations;
            if let Some(d) = outcome.solution {
                return Ok((d, cost));
            }
        }
        if self.single_precision && (forcing > 0.0 || rhs.len() >= SINGLE_PRECISION_FROM) {
            if let Some(d) = self.single_precision_step(j, &rhs, forcing, &mut cost) {
                return Ok((d, cost));
            }
        }
        let t = Instant::now();
        let factor = self.analysis.factorize(j, self.factor.take())?;
        cost.seconds_numeric += t.elapsed().as_secs_f64();
        let t = Instant::now();
        let mut d = rhs;
        self.analysis.solve(&factor, &mut d);
        cost.seconds_solve += t.elapsed().as_secs_f64();
        cost.factorizations += 1;
        self.factor = Some(factor);
        Ok((d, cost))
    }
}

impl TangentSolver {
    /// A fresh single-precision factor of J and conjugate gradients with it
    /// to the forcing tolerance (EXACT_STEP when 0). None, and no factor
    /// kept, when the rounded matrix is not positive definite or the
    /// iterations do not converge: the caller then factorizes in double.
    fn single_precision_step(&mut self, j: &CscMatrix<f64>, rhs: &[f64], forcing: f64, cost: &mut StepCost) -> Option<Vec<f64>> {
        let t = Instant::now();
        let factor = self.analysis.factorize_single(j, self.factor.take());
        cost.seconds_numeric += t.elapsed().as_secs_f64();
        let factor = factor.ok()?;
        cost.factorizations += 1;
        let t = Instant::now();
        let analysis = &self.analysis;
        let mut rounded = Vec::new();
        let outcome = preconditioned_cg(
            j,
            &mut |z: &mut [f64]| analysis.solve_in(&factor, z, &mut rounded),
            rhs,
            if forcing > 0.0 { forcing } else { EXACT_STEP },
        );
        cost.seconds_solve += t.elapsed().as_secs_f64();
        cost.cg_iterations += outcome.iterations;
        let d = outcome.solution?;
        self.factor = Some(factor);
        Some(d)
    }
}

struct CgOutcome {
    solution: Option<Vec<f64>>,
    iterations: usize,
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// Conjugate gradients on J x = b from x = 0 with preconditioner M^-1 (the
/// factor's solve), to |b - J x| <= tolerance |b| (Y. Saad, Iterative
/// Methods for Sparse Linear Systems, 2nd ed., 2003, algorithm 9.1). Gives
/// up (None) at max_cg_iterations, or earlier when the rate so far shows the
/// tolerance is out of reach within them.
fn preconditioned_cg(j: &CscMatrix<f64>, precondition: &mut dyn FnMut(&mut [f64]), b: &[f64], tolerance: f64) -> CgOutcome {
    let target = tolerance * dot(b, b).sqrt();
    let mut x = vec![0.0; b.len()];
    let mut r = b.to_vec();
    let mut z = r.clone();
    precondition(&mut z);
    let mut p = z.clone();
    let mut rz = dot(&r, &z);
    let start = dot(&r, &r).sqrt();
    let most = max_cg_iterations(b.len());
    for it in 1..=most {
        let q = symmetric_product(j, j.values(), &p);
        let pq = dot(&p, &q);
        if pq.is_nan() || pq <= 0.0 || !rz.is_finite() {
            return CgOutcome {
                solution: None,
                iterations: it,
            };
        }
        let alpha = rz / pq;
        x.iter_mut().zip(&p).for_each(|(x, p)| *x += alpha * p);
        r.iter_mut().zip(&q).for_each(|(r, q)| *r -= alpha * q);
        let norm = dot(&r, &r).sqrt();
        if norm <= target {
            return CgOutcome {
                solution: Some(x),
                iterations: it,
            };
        }
        // Residual reduction per iteration so far: give up if the rest would not fit.
        let rate = (norm / start).powf(1.0 / it as f64);
        let needed = (target / norm).ln() / rate.ln();
        // The projection assumes a steady rate; conjugate gradients speeds up once the few
        // eigenvalues the tangent's change moved are resolved, so a fast start is let run.
        let slow = rate > SLOW_RATE && it as f64 + needed > most as f64 + 0.5;
        let hopeless = if it == 1 { norm > HOPELESS_FIRST_STEP * start } else { rate >= 1.0 || slow };
        if hopeless {
            return CgOutcome {
                solution: None,
                iterations: it,
            };
        }
        z.copy_from_slice(&r);
        precondition(&mut z);
        let rz_new = dot(&r, &z);
        let beta = rz_new / rz;
        rz = rz_new;
        p.iter_mut().zip(&z).for_each(|(p, z)| *p = z + beta * *p);
    }
    CgOutcome {
        solution: None,
        iterations: most,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra_sparse::{CooMatrix, CscMatrix};

    /// Lower triangle of the n x n matrix tridiag(-1, 2 + shift, -1), with
    /// `bumped` diagonal entries raised by a further 0.5.
    fn laplacian(n: usize, shift: f64, bumped: &[usize]) -> CscMatrix<f64> {
        let mut coo = CooMatrix::new(n, n);
        for i in 0..n {
            coo.push(i, i, 2.0 + shift + if bumped.contains(&i) { 0.5 } else { 0.0 });
            if i + 1 < n {
                coo.push(i + 1, i, -1.0);
            }
        }
        CscMatrix::from(&coo)
    }

    fn residual_share(j: &CscMatrix<f64>, x: &[f64], b: &[f64]) -> f64 {
        let jx = symmetric_product(j, j.values(), x);
        let r: f64 = jx.iter().zip(b).map(|(a, b)| (a - b) * (a - b)).sum::<f64>().sqrt();
        r / dot(b, b).sqrt()
    }

    #[test]
    fn an_old_factor_preconditions_a_nearby_tangent_to_the_forcing_tolerance() {
        // The tangent moved in three unknowns (as when a few elements saturate); the factor is of
        // the old one. Conjugate gradients then needs at most four iterations (a rank-3 change
        // leaves four distinct eigenvalues: Saad 2003, section 6.11).
        let (n, tolerance) = (200, 1e-6);
        let old = laplacian(n, 0.0, &[]);
        let new = laplacian(n, 0.0, &[20, 90, 150]);
        let mut solver = TangentSolver::new(
            CholeskySolver::analyse(old.pattern(), crate::linear_system::Elimination::MinimumDegree).unwrap(),
            true,
        );
        let b: Vec<f64> = (0..n).map(|i| ((i * 7919) % 13) as f64 - 6.0).collect();
        let (_, first) = solver.step(&old, &b, tolerance, true).unwrap();
        assert!(first.factorizations == 1, "the first step has no factor to reuse");
        let (d, cost) = solver.step(&new, &b, tolerance, true).unwrap();
        assert!(cost.factorizations == 0 && (1..=4).contains(&cost.cg_iterations), "{cost:?}");
        // d solves J d = -r: check |J d + r| <= tolerance |r| independently.
        let minus_b: Vec<f64> = b.iter().map(|v| -v).collect();
        assert!(residual_share(&new, &d, &minus_b) <= tolerance, "{}", residual_share(&new, &d, &minus_b));
    }

    #[test]
    fn an_inexact_step_is_solved_with_a_single_precision_factor_to_its_forcing() {
        let n = 2000;
        let j = laplacian(n, 1.0, &[7, 700]);
        let mut solver = TangentSolver::new(
            CholeskySolver::analyse(j.pattern(), crate::linear_system::Elimination::MinimumDegree).unwrap(),
            true,
        );
        let b: Vec<f64> = (0..n).map(|i| ((i * 31) % 17) as f64 - 8.0).collect();
        let (d, cost) = solver.step(&j, &b, 1e-3, false).unwrap();
        assert!(cost.factorizations == 1 && cost.cg_iterations >= 1, "{cost:?}");
        assert!(matches!(solver.factor, Some(Factor::Single(_))));
        let minus_b: Vec<f64> = b.iter().map(|v| -v).collect();
        assert!(residual_share(&j, &d, &minus_b) <= 1e-3);
    }

    #[test]
    fn a_large_exact_step_with_a_single_precision_factor_meets_the_exact_tolerance() {
        let n = SINGLE_PRECISION_FROM;
        let j = laplacian(n, 1.0, &[]);
        let b: Vec<f64> = (0..n).map(|i| (i % 11) as f64).collect();
        let minus_b: Vec<f64> = b.iter().map(|v| -v).collect();
        let mut single = TangentSolver::new(
            CholeskySolver::analyse(j.pattern(), crate::linear_system::Elimination::MinimumDegree).unwrap(),
            true,
        );
        let (d, cost) = single.step(&j, &b, 0.0, false).unwrap();
        assert!(cost.factorizations == 1 && cost.cg_iterations >= 1, "{cost:?}");
        assert!(residual_share(&j, &d, &minus_b) <= EXACT_STEP);
        // Without single precision the same step is one double-precision solve.
        let mut double = TangentSolver::new(
            CholeskySolver::analyse(j.pattern(), crate::linear_system::Elimination::MinimumDegree).unwrap(),
            false,
        );
        let (d, cost) = double.step(&j, &b, 0.0, false).unwrap();
        assert!(cost.factorizations == 1 && cost.cg_iterations == 0, "{cost:?}");
        assert!(residual_share(&j, &d, &minus_b) <= 1e-12);
    }

    #[test]
    fn a_matrix_that_rounding_makes_singular_falls_back_to_double_precision() {
        // [[1, 1 - 1e-9], [1 - 1e-9, 1]] is positive definite; rounded to single
        // precision its off-diagonal becomes 1 and the matrix singular.
        let mut coo = CooMatrix::new(2, 2);
        coo.push(0, 0, 1.0);
        coo.push(1, 0, 1.0 - 1e-9);
        coo.push(1, 1, 1.0);
        let j = CscMatrix::from(&coo);
        let mut solver = TangentSolver::new(
            CholeskySolver::analyse(j.pattern(), crate::linear_system::Elimination::MinimumDegree).unwrap(),
            true,
        );
        let b = [1.0, -1.0];
        let (d, cost) = solver.step(&j, &b, 1e-3, false).unwrap();
        // The failed single-precision attempt made no factor: one factorization, no iterations.
        assert!(cost.factorizations == 1 && cost.cg_iterations == 0, "{cost:?}");
        assert!(matches!(solver.factor, Some(Factor::Double(_))));
        assert!(residual_share(&j, &d, &[-1.0, 1.0]) <= 1e-6);
    }

    #[test]
    fn a_far_tangent_is_factorized_afresh_and_solved_exactly() {
        let n = 200;
        let mut solver = TangentSolver::new(
            CholeskySolver::analyse(laplacian(n, 0.0, &[]).pattern(), crate::linear_system::Elimination::MinimumDegree).unwrap(),
            true,
        );
        let b: Vec<f64> = (0..n).map(|i| (i % 5) as f64).collect();
        solver.step(&laplacian(n, 0.0, &[]), &b, 1e-8, true).unwrap();
        // A diagonal shift of 50 (against 2) everywhere leaves the old factor useless as a preconditioner.
        let far = laplacian(n, 50.0, &[]);
        let (d, cost) = solver.step(&far, &b, 1e-8, true).unwrap();
        assert!(cost.factorizations == 1, "{cost:?}");
        let minus_b: Vec<f64> = b.iter().map(|v| -v).collect();
        assert!(residual_share(&far, &d, &minus_b) <= 1e-12);
    }
}
