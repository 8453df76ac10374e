//! Feasibility restored at the end of the search.
//!
//! COBYLA ends on its best point by its own merit, which may break a
//! constraint by a hair: on the cheapest holding magnet (cases/) its last
//! eleven evaluations all pulled 19.77 to 19.99 N against 20 N asked, and
//! the best point that met the bound was an earlier one 8 % dearer. Each
//! evaluation here is a study solved to its accuracy, so the margins carry
//! the remeshing's noise and a derivative-free search near the boundary
//! steps to and fro across it.
//!
//! From COBYLA's point, the margins' gradients are fitted by least squares
//! to the nearest evaluations, and the shortest step that makes every
//! broken margin as much positive as it was negative is taken (the
//! minimum-norm Gauss-Newton step on the linearized constraints). The
//! objective moves by its gradient times that step: little, as the step is
//! the size of the violation. Up to `RESTORE_STEPS` evaluations.

use super::problem::{best, Point, Search};

/// Evaluations kept for restoring feasibility after COBYLA.
pub const RESTORE_STEPS: usize = 3;

/// The longest restoring step, as a share of each parameter's range: a
/// longer one leaves the fitted linear model's neighbourhood.
const LONGEST_STEP: f64 = 0.1;

/// Restores feasibility from `from` (an evaluated point) while that point
/// is infeasible and cheaper than the best feasible one; appends each
/// evaluation to `log` and returns how many it made.
pub fn restore<E>(search: &Search, log: &mut Vec<Point>, from: &[f64], evaluate: &impl Fn(&[f64]) -> Result<Point, E>) -> Result<usize, E> {
    let ranges: Vec<f64> = search.bounds.iter().map(|b| b[1] - b[0]).collect();
    let Some(mut at) = log.iter().find(|p| p.x == from).cloned() else {
        return Ok(0);
    };
    for made in 0..RESTORE_STEPS {
        let cheaper = best(log).violation() > 0.0 || log.iter().filter(|p| p.violation() == 0.0).all(|p| at.objective < p.objective);
        if at.violation() == 0.0 || !cheaper {
            return Ok(made);
        }
        let Some(step) = restoring_step(log, &at, &ranges) else {
            return Ok(made);
        };
        let x: Vec<f64> =
            at.x.iter()
                .zip(&step)
                .zip(search.bounds.iter().zip(&ranges))
                .map(|((x, d), (b, r))| (x + d * r).clamp(b[0], b[1]))
                .collect();
        if log.iter().any(|p| p.x == x) {
            return Ok(made);
        }
        let p = evaluate(&x)?;
        log.push(p.clone());
        at = p;
    }
    Ok(RESTORE_STEPS)
}

/// The minimum-norm step, in shares of each range, that takes every broken
/// margin at `at` to minus its value on the margins' fitted gradients; none
/// where the fit is ill-posed or the step too long.
fn restoring_step(log: &[Point], at: &Point, ranges: &[f64]) -> Option<Vec<f64>> {
    let broken: Vec<usize> = (0..at.margins.len()).filter(|&k| at.margins[k] < 0.0).collect();
    let gradients: Vec<Vec<f64>> = broken.iter().map(|&k| fitted_gradient(log, at, k, ranges)).collect::<Option<_>>()?;
    // d = A^T (A A^T)^-1 r, with r_k = -2 m_k.
    let gram: Vec<Vec<f64>> = gradients.iter().map(|a| gradients.iter().map(|b| dot(a, b)).collect()).collect();
    let wanted: Vec<f64> = broken.iter().map(|&k| -2.0 * at.margins[k]).collect();
    let y = solve(gram, wanted)?;
    let step: Vec<f64> = (0..ranges.len()).map(|i| gradients.iter().zip(&y).map(|(a, y)| a[i] * y).sum()).collect();
    let longest = step.iter().fold(0.0f64, |m, d| m.max(d.abs()));
    (longest.is_finite() && longest <= LONGEST_STEP).then_some(step)
}

/// The gradient of margin `k` at `at` (per share of each range), fitted by
/// least squares through `at` to its nearest 2n + 1 evaluations with a
/// finite margin.
fn fitted_gradient(log: &[Point], at: &Point, k: usize, ranges: &[f64]) -> Option<Vec<f64>> {
    let n = ranges.len();
    let scaled = |p: &Point| -> Vec<f64> { p.x.iter().zip(&at.x).zip(ranges).map(|((x, x0), r)| (x - x0) / r).collect() };
    let mut near: Vec<(f64, Vec<f64>, f64)> = log
        .iter()
        .filter(|p| p.x != at.x && p.margins[k].is_finite())
        .map(|p| {
            let d = scaled(p);
            (dot(&d, &d), d, p.margins[k] - at.margins[k])
        })
        .collect();
    near.sort_by(|a, b| a.0.total_cmp(&b.0));
    near.truncate(2 * n + 1);
    if near.len() < n {
        return None;
    }
    let mut normal = vec![vec![0.0; n]; n];
    let mut rhs = vec![0.0; n];
    for (_, d, dm) in &near {
        for i in 0..n {
            rhs[i] += d[i] * dm;
            for j in 0..n {
                normal[i][j] += d[i] * d[j];
            }
        }
    }
    solve(normal, rhs)
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// Solves the small dense system `a x = b` by Gaussian elimination with
/// partial pivoting; none when a pivot falls below 1e-12 of the largest
/// diagonal entry (an ill-posed fit).
fn solve(mut a: Vec<Vec<f64>>, mut b: Vec<f64>) -> Option<Vec<f64>> {
    let n = b.len();
    let scale = (0..n).map(|i| a[i][i].abs()).fold(0.0, f64::max);
    for c in 0..n {
        let p = (c..n).max_by(|&i, &j| a[i][c].abs().total_cmp(&a[j][c].abs()))?;
        let pivot = a[p][c].abs();
        if pivot.is_nan() || pivot <= 1e-12 * scale {
            return None;
        }
        a.swap(c, p);
        b.swap(c, p);
        let (top, below) = a.split_at_mut(c + 1);
        let (b_top, b_below) = b.split_at_mut(c + 1);
        let pivot_row = &top[c];
        for (row, br) in below.iter_mut().zip(b_below.iter_mut()) {
            let f = row[c] / pivot_row[c];
            for (x, y) in row[c..].iter_mut().zip(&pivot_row[c..]) {
                *x -= f * y;
            }
            *br -= f * b_top[c];
        }
    }
    let mut x = vec![0.0; n];
    for r in (0..n).rev() {
        let s: f64 = (r + 1..n).map(|j| a[r][j] * x[j]).sum();
        x[r] = (b[r] - s) / a[r][r];
    }
    Some(x)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn small_systems_solve_and_singular_ones_refuse() {
        let x = solve(vec![vec![0.0, 2.0], vec![3.0, 1.0]], vec![4.0, 5.0]).unwrap();
        assert!((x[0] - 1.0).abs() < 1e-14 && (x[1] - 2.0).abs() < 1e-14, "{x:?}");
        assert_eq!(solve(vec![vec![1.0, 2.0], vec![2.0, 4.0]], vec![1.0, 2.0]), None);
    }

    /// A linear margin broken by 0.01 at the origin: one step lands on
    /// +0.01, along the gradient.
    #[test]
    fn one_step_restores_a_linear_margin() {
        let margin = |x: &[f64]| 2.0 * x[0] + x[1] - 0.01;
        let point = |x: Vec<f64>| Point {
            objective: x[0] + x[1],
            margins: vec![margin(&x)],
            reported: vec![],
            x,
        };
        let search = Search {
            bounds: vec![[-1.0, 1.0], [-1.0, 1.0]],
            start: vec![0.0, 0.0],
            constraints: 1,
            max_evaluations: 10,
            design_points: 0,
            x_tolerance: 0.01,
            seed: 1,
        };
        let mut log: Vec<Point> = [[0.0, 0.0], [0.02, 0.0], [0.0, 0.02], [-0.02, 0.01]]
            .iter()
            .map(|x| point(x.to_vec()))
            .collect();
        log.push(point(vec![0.5, 0.5]));
        assert_eq!(restore::<()>(&search, &mut log, &[0.0, 0.0], &|x| Ok(point(x.to_vec()))), Ok(1));
        assert_eq!(log.len(), 6);
        let last = log.last().unwrap();
        assert!((last.margins[0] - 0.01).abs() < 1e-12, "{last:?}");
        assert!((last.x[0] / last.x[1] - 2.0).abs() < 1e-9, "{last:?}");
    }
}
