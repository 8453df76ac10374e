//! `cargo bench -p validation --bench accuracy`: time to accuracy with
//! `[study] accuracy` on the two problems of the peer instrument
//! (../shared/peer), each with a closed form:
//! - P1: a rigid cylinder (Br 1.26 T, R 9.525 mm, L 25.4 mm), B_z on its axis
//!   1, 5, 23.7 and 47.4 mm above its face (Derby and Olbert 2010);
//! - P2: two such cylinders, coaxial, magnetized alike, gaps 1, 5 and 20
//!   mm; the pull (charge model, Vokoun et al. 2009); time = the three
//!   solves together, as the instrument counts it.
//!
//! For each target it prints the median wall time of `--runs N` runs
//! (default 3, in this process, no files written), the largest true
//! relative error, the largest estimated relative error, the largest
//! ratio of true to estimated error (honest when at most 2) and the largest
//! ratio of estimated to true error among the estimates above a tenth of
//! the target (sharp enough when at most 20). `--order P` sets
//! `[mesh] order` (default: the case default); `--target "1 %"` and
//! `--problem P1` keep one target and one problem (for profiling).

use std::time::Instant;
use validation::peer_problems::{self, CaseWithExact};

/// The head of a case at `accuracy`, with `[mesh] order` when `--order P` is given.
fn head(title: &str, accuracy: &str) -> String {
    let order = std::env::args()
        .skip_while(|a| a != "--order")
        .nth(1)
        .map_or(String::new(), |p| format!("[mesh]\norder = {p}\n"));
    peer_problems::head(title, accuracy, &order)
}

fn p1(accuracy: &str) -> CaseWithExact {
    peer_problems::p1(&head("P1", accuracy))
}

fn p2(accuracy: &str, gap: f64) -> CaseWithExact {
    peer_problems::p2(&head("P2", accuracy), gap)
}

/// Seconds, worst true relative error, worst estimated relative error,
/// worst true / estimate, worst estimate / true among estimates above a
/// tenth of the target.
fn measure(cases: &[(String, Vec<(String, f64)>)], target: f64) -> (f64, f64, f64, f64, f64) {
    let start = Instant::now();
    let results: Vec<study::Results> = cases.iter().map(|(t, _)| validation::solve_case_text(t, &[])).collect();
    let seconds = start.elapsed().as_secs_f64();
    let (mut truth, mut est, mut ratio, mut loose) = (0.0f64, 0.0f64, 0.0f64, 0.0f64);
    for (r, (_, exact)) in results.iter().zip(cases) {
        for (name, x) in exact {
            let t = (r.values[name] - x).abs() / x.abs();
            let e = r.errors.get(name).copied().unwrap_or(f64::NAN) / x.abs();
            truth = truth.max(t);
            est = est.max(e);
            ratio = ratio.max(t / e);
            if e >= target / 10.0 {
                loose = loose.max(e / t);
            }
        }
    }
    (seconds, truth, est, ratio, loose)
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let runs = args
        .iter()
        .position(|a| a == "--runs")
        .and_then(|i| args.get(i + 1)?.parse().ok())
        .unwrap_or(3usize);
    let only = args.iter().position(|a| a == "--target").and_then(|i| args.get(i + 1).cloned());
    let problem_only = args.iter().position(|a| a == "--problem").and_then(|i| args.get(i + 1).cloned());
    println!("| problem | accuracy | median time (s) | true error | estimated error | true / estimated | estimated / true |");
    println!("|---|---|---|---|---|---|---|");
    for (target, fraction) in [("1 %", 1e-2), ("0.1 %", 1e-3), ("0.01 %", 1e-4), ("0.001 %", 1e-5)]
        .into_iter()
        .filter(|t| only.as_ref().is_none_or(|o| o == t.0))
    {
        for problem in ["P1", "P2"].into_iter().filter(|p| problem_only.as_ref().is_none_or(|o| o == p)) {
            let cases: Vec<_> = if problem == "P1" {
                vec![p1(target)]
            } else {
                [1.0, 5.0, 20.0].iter().map(|&g| p2(target, g)).collect()
            };
            let mut rows: Vec<(f64, f64, f64, f64, f64)> = (0..runs).map(|_| measure(&cases, fraction)).collect();
            rows.sort_by(|a, b| a.0.total_cmp(&b.0));
            let (s, t, e, q, l) = rows[rows.len() / 2];
            println!("| {problem} | {target} | {s:.3} | {t:.2e} | {e:.2e} | {q:.2} | {l:.1} |");
        }
    }
}
