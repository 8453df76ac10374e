//! Optimization: the parameters within their bounds that minimize (or
//! maximize) a value, subject to bounds on other values.
//!
//! The search is COBYLA (M. J. D. Powell, "A direct search optimization
//! method that models the objective and constraint functions by linear
//! interpolation", Advances in Optimization and Numerical Analysis, 1994),
//! derivative-free and constrained, as the `cobyla` crate carries it. Each
//! evaluation is a study solved to its accuracy, so its value moves a
//! little with the remeshing of each geometry: the search stops once its
//! steps are below a fraction of each parameter's range (`x_tolerance`),
//! and the caller asks the evaluations for an accuracy well below the
//! change that such a step makes.
//!
//! Before the search, a Latin-hypercube design of candidates over the box
//! is evaluated in parallel; the best feasible one (or the least infeasible)
//! starts the search. This guards against a poor local start and uses the
//! cores while the search itself, one point after another, cannot.

mod problem;
mod restore;

pub use problem::{Point, Search};

use crate::tolerance::{latin_hypercube, Distribution, Spread};
use problem::best;
use rayon::prelude::*;
use std::cell::RefCell;
use std::collections::HashMap;

/// The result: the best feasible point (or the least infeasible one) and
/// every evaluation in order.
#[derive(Clone, Debug, PartialEq)]
pub struct Optimum {
    /// The best point found.
    pub best: Point,
    /// Whether every constraint holds there.
    pub feasible: bool,
    /// Every evaluation, in order (design first).
    pub evaluations: Vec<Point>,
    /// Why the search stopped, in words.
    pub stop: String,
}

/// Runs the design and the search. `evaluate` solves the study at a point;
/// it runs on several threads during the design. The first error stops the
/// search and is returned.
pub fn optimize<E: Send>(search: &Search, evaluate: impl Fn(&[f64]) -> Result<Point, E> + Sync) -> Result<Optimum, E> {
    let n = search.bounds.len();
    let mut design: Vec<Vec<f64>> = vec![search.start.clone()];
    if search.design_points > 0 {
        let box_: Vec<Spread> = search
            .bounds
            .iter()
            .map(|b| Spread {
                name: String::new(),
                nominal: 0.5 * (b[0] + b[1]),
                half_width: 0.5 * (b[1] - b[0]),
                distribution: Distribution::Uniform,
            })
            .collect();
        design.extend(latin_hypercube(&box_, search.design_points.min(design_room(search)), search.seed));
    }
    let evaluated: Vec<Result<Point, E>> = design.par_iter().map(|x| evaluate(x)).collect();
    let mut log = Vec::new();
    for p in evaluated {
        log.push(p?);
    }
    let start = best(&log).x.clone();
    let budget = search.max_evaluations.saturating_sub(log.len() + restore::RESTORE_STEPS).max(n + 2);
    let (mut log, mut stop, last) = cobyla_from(search, &start, budget, log, &evaluate)?;
    let restoring = restore::restore(search, &mut log, &last, &evaluate)?;
    if restoring > 0 {
        stop += &format!(", then {restoring} evaluation(s) stepped back across the constraints it broke by a hair");
    }
    let best = best(&log).clone();
    Ok(Optimum {
        feasible: best.violation() == 0.0,
        best,
        evaluations: log,
        stop,
    })
}

/// The fewest evaluations a search needs: the start, COBYLA's first
/// linear model (n + 1 points and one step) and the restoring steps.
pub fn least_evaluations(n: usize) -> usize {
    1 + (n + 2) + restore::RESTORE_STEPS
}

/// How many design candidates fit in `max_evaluations` beside the least
/// the search needs: `max_evaluations = 8` with a design of 6 had solved
/// ten studies (the search's minimum came on top).
fn design_room(search: &Search) -> usize {
    search.max_evaluations.saturating_sub(least_evaluations(search.bounds.len()))
}

/// Key of a point for the cache: its bits.
fn key(x: &[f64]) -> Vec<u64> {
    x.iter().map(|v| v.to_bits()).collect()
}

type Cached<E> = RefCell<(Vec<Point>, HashMap<Vec<u64>, usize>, Option<E>)>;

/// COBYLA from `start` with `budget` evaluations; appends to `log`. Also
/// returns why it stopped and its own best point.
fn cobyla_from<E>(
    search: &Search,
    start: &[f64],
    budget: usize,
    log: Vec<Point>,
    evaluate: &impl Fn(&[f64]) -> Result<Point, E>,
) -> Result<(Vec<Point>, String, Vec<f64>), E> {
    let index: HashMap<Vec<u64>, usize> = log.iter().enumerate().map(|(i, p)| (key(&p.x), i)).collect();
    let state: Cached<E> = RefCell::new((log, index, None));
    // One solve per point: the objective and each constraint read it from
    // the cache. After a failure every call returns at once.
    let at = |x: &[f64]| -> Option<Point> {
        let s = state.borrow_mut();
        if s.2.is_some() {
            return None;
        }
        if let Some(&i) = s.1.get(&key(x)) {
            return Some(s.0[i].clone());
        }
        drop(s);
        let result = evaluate(x);
        let mut s = state.borrow_mut();
        match result {
            Ok(p) => {
                let i = s.0.len();
                s.0.push(p.clone());
                s.1.insert(key(x), i);
                Some(p)
            }
            Err(e) => {
                s.2 = Some(e);
                None
            }
        }
    };
    let objective = |x: &[f64], _: &mut ()| at(x).map_or(f64::INFINITY, |p| p.objective);
    let margins: Vec<_> = (0..search.constraints)
        .map(|k| move |x: &[f64], _: &mut ()| at(x).map_or(-f64::INFINITY, |p| p.margins[k]))
        .collect();
    let cons: Vec<&dyn cobyla::Func<()>> = margins.iter().map(|c| c as &dyn cobyla::Func<()>).collect();
    let bounds: Vec<(f64, f64)> = search.bounds.iter().map(|b| (b[0], b[1])).collect();
    let ranges: Vec<f64> = search.bounds.iter().map(|b| b[1] - b[0]).collect();
    let tols = cobyla::StopTols {
        xtol_abs: ranges.iter().map(|r| r * search.x_tolerance).collect(),
        ..Default::default()
    };
    let rhobeg = cobyla::RhoBeg::Set(ranges.iter().map(|r| 0.25 * r).collect());
    let outcome = cobyla::minimize(objective, start, &bounds, &cons, (), budget, rhobeg, Some(tols));
    let stop = match &outcome {
        Ok((cobyla::SuccessStatus::XtolReached, _, _)) => "its steps fell below the tolerance".to_string(),
        Ok((cobyla::SuccessStatus::MaxEvalReached, _, _)) => "the evaluation budget was spent (max_evaluations)".to_string(),
        Ok((status, _, _)) => format!("it stopped ({status:?})"),
        Err((status, _, _)) => format!("it failed ({status:?})"),
    };
    let last = match outcome {
        Ok((_, x, _)) | Err((_, x, _)) => x,
    };
    let (log, _, error) = state.into_inner();
    match error {
        Some(e) => Err(e),
        None => Ok((log, stop, last)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn search(bounds: Vec<[f64; 2]>, start: Vec<f64>, constraints: usize) -> Search {
        Search {
            bounds,
            start,
            constraints,
            max_evaluations: 80,
            design_points: 6,
            x_tolerance: 1e-4,
            seed: 1,
        }
    }

    /// Rosenbrock's banana in a box, and a disk constraint that cuts off
    /// the free minimum: the constrained optimum of the paraboloid
    /// (x-2)^2 + (y-1)^2 within x^2 + y^2 <= 1 is the unit circle's point
    /// towards (2, 1), (2, 1)/sqrt(5) (Lagrange, by hand).
    #[test]
    fn finds_a_constrained_optimum() {
        let s = search(vec![[-2.0, 2.0], [-2.0, 2.0]], vec![0.0, 0.0], 1);
        let got = optimize::<()>(&s, |x| {
            Ok(Point {
                x: x.to_vec(),
                objective: (x[0] - 2.0).powi(2) + (x[1] - 1.0).powi(2),
                margins: vec![1.0 - x[0] * x[0] - x[1] * x[1]],
                reported: vec![],
            })
        })
        .unwrap();
        let want = [2.0 / 5f64.sqrt(), 1.0 / 5f64.sqrt()];
        assert!(got.feasible || got.best.violation() < 1e-6);
        assert!(
            (got.best.x[0] - want[0]).abs() < 1e-3 && (got.best.x[1] - want[1]).abs() < 1e-3,
            "{:?}",
            got.best.x
        );
        assert!(got.evaluations.len() <= 80, "{}", got.evaluations.len());
    }

    /// The search stays within `max_evaluations`, the design included,
    /// however tight the budget, from the least the search needs up: on a
    /// problem whose constraint no point of the box meets (the search runs
    /// until its budget is spent).
    #[test]
    fn the_budget_holds_the_design_and_the_restoring_steps() {
        for max_evaluations in [least_evaluations(2), least_evaluations(2) + 2, 12] {
            let s = Search {
                max_evaluations,
                ..search(vec![[-2.0, 2.0], [-2.0, 2.0]], vec![0.0, 0.0], 1)
            };
            let got = optimize::<()>(&s, |x| {
                Ok(Point {
                    x: x.to_vec(),
                    objective: x[0] + x[1],
                    margins: vec![x[0] * x[0] + x[1] * x[1] - 100.0],
                    reported: vec![],
                })
            })
            .unwrap();
            assert!(!got.feasible);
            assert!(got.evaluations.len() <= max_evaluations, "{} > {max_evaluations}", got.evaluations.len());
        }
    }

    /// A smooth one-parameter maximum, as the fixed-volume magnet: found
    /// to the tolerance in few evaluations; an evaluation's failure stops
    /// the search and comes back.
    #[test]
    fn one_parameter_and_failures() {
        let s = Search {
            max_evaluations: 40,
            ..search(vec![[1.0, 10.0]], vec![2.0], 0)
        };
        let got = optimize::<()>(&s, |x| {
            Ok(Point {
                x: x.to_vec(),
                objective: -(x[0] * (-x[0] / 4.0).exp()),
                margins: vec![],
                reported: vec![],
            })
        })
        .unwrap();
        assert!((got.best.x[0] - 4.0).abs() < 1e-2, "{:?}", got.best.x);
        assert!(got.evaluations.len() <= 40);
        let failed = optimize(&s, |x| {
            if x[0] > 5.0 {
                Err("no")
            } else {
                Ok(Point {
                    x: x.to_vec(),
                    objective: x[0],
                    margins: vec![],
                    reported: vec![],
                })
            }
        });
        assert_eq!(failed, Err("no"));
    }
}

#[cfg(test)]
mod holding_magnet_like {
    use super::*;

    /// A smooth stand-in for the cheapest holding magnet (cases/): the cost
    /// r^2 (t + 0.1), the pull 40 r^2 / (r^2 + 25) (1 - exp(-t / 2)) at
    /// least 20, with a remeshing-like wobble of 1e-4 on the pull.
    fn pull(x: &[f64]) -> f64 {
        let (r, t) = (x[0], x[1]);
        40.0 * r * r / (r * r + 25.0) * (1.0 - (-t / 2.0).exp()) * (1.0 + 1e-4 * (1000.0 * r + 777.0 * t).sin())
    }

    fn cost(x: &[f64]) -> f64 {
        x[0] * x[0] * (x[1] + 0.1)
    }

    /// The optimum along the constraint's boundary, by bisection on t for
    /// each r of a fine grid (the wobble left out).
    fn exact_optimum() -> f64 {
        let smooth = |r: f64, t: f64| 40.0 * r * r / (r * r + 25.0) * (1.0 - (-t / 2.0).exp());
        let mut best = f64::INFINITY;
        for i in 0..=12_000 {
            let r = 3.0 + 12.0 * f64::from(i) / 12_000.0;
            let (mut lo, mut hi) = (1.0, 8.0);
            if smooth(r, hi) < 20.0 {
                continue;
            }
            for _ in 0..60 {
                let mid = 0.5 * (lo + hi);
                if smooth(r, mid) < 20.0 {
                    lo = mid;
                } else {
                    hi = mid;
                }
            }
            best = best.min(cost(&[r, hi]));
        }
        best
    }

    #[test]
    fn the_reported_optimum_is_feasible_and_near_the_exact_one() {
        let s = Search {
            bounds: vec![[3.0, 15.0], [1.0, 8.0]],
            start: vec![8.0, 3.0],
            constraints: 1,
            max_evaluations: 30,
            design_points: 6,
            x_tolerance: 0.01,
            seed: 1,
        };
        let got = optimize::<()>(&s, |x| {
            Ok(Point {
                x: x.to_vec(),
                objective: cost(x),
                margins: vec![pull(x) - 20.0],
                reported: vec![],
            })
        })
        .unwrap();
        let exact = exact_optimum();
        assert!(got.feasible);
        assert!(
            got.best.objective < exact * 1.01,
            "{} against {exact}, {:?}",
            got.best.objective,
            got.evaluations
        );
    }
}
