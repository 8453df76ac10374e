//! `lodestone solve` on a case with `[tolerance]`: every sample solved to
//! the case's accuracy (no files), the statistics of every value, then the
//! nominal case solved in full and written with tolerance.csv and
//! tolerance.json as one set.

use crate::case::resolve::{Method, Tolerance};
use crate::output::folder::OutputFolder;
use crate::progress::Progress;
use crate::run::{self, Failure, Limits, Loaded, Variant};
use std::collections::BTreeMap;
use std::path::Path;
use study::tolerance::{corners, latin_hypercube, statistics, Statistics};

/// The values of one sample, by name.
type Values = BTreeMap<String, f64>;

/// Solves the study at one parameter set.
fn sample(loaded: &Loaded, base: &Variant, tol: &Tolerance, at: &[f64], limits: &Limits) -> Result<Values, Failure> {
    let mut params = base.params.clone();
    for (s, v) in tol.spreads.iter().zip(at) {
        params.insert(s.name.clone(), *v);
    }
    let resolved = run::resolve(loaded, &params, limits)?;
    let results = study::run::run(&resolved.model, &|_| {}).map_err(|e| match e.origin {
        Some(_) => loaded.study_error(&resolved.spans, &e),
        None => Failure::Input(format!("error: {}: {e}\n", loaded.path.display())),
    })?;
    if !results.solve.converged {
        return Err(Failure::Input(format!(
            "error: {}: a tolerance sample did not converge at {params:?}\n",
            loaded.path.display()
        )));
    }
    Ok(results.values)
}

/// Solves every sample, several at a time on the cores, with progress.
fn solve_all(
    loaded: &Loaded,
    base: &Variant,
    tol: &Tolerance,
    sets: &[Vec<f64>],
    limits: &Limits,
    progress: &Progress,
    what: &str,
) -> Result<Vec<Values>, Failure> {
    use rayon::prelude::*;
    let done = std::sync::atomic::AtomicUsize::new(0);
    sets.par_iter()
        .map(|at| {
            let v = sample(loaded, base, tol, at, limits)?;
            let k = done.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1;
            progress.note(&format!("{}: tolerance {what} {k} of {}", loaded.stem(), sets.len()));
            Ok(v)
        })
        .collect()
}

/// Statistics of every value over the samples.
fn all_statistics(values: &[Values]) -> BTreeMap<String, Statistics> {
    let names: Vec<String> = values.first().map(|v| v.keys().cloned().collect()).unwrap_or_default();
    names
        .into_iter()
        .filter_map(|n| statistics(&values.iter().filter_map(|v| v.get(&n).copied()).collect::<Vec<_>>()).map(|s| (n, s)))
        .collect()
}

/// Values whose extremes over the face centres pass those over the corners:
/// there the worst case is not at a corner, and the corner method misses it.
fn not_at_corners(corner: &BTreeMap<String, Statistics>, inside: &[Values]) -> Vec<String> {
    corner
        .iter()
        .filter(|(n, s)| {
            let slack = 1e-9 * s.max.abs().max(s.min.abs());
            inside.iter().filter_map(|v| v.get(*n)).any(|&x| x > s.max + slack || x < s.min - slack)
        })
        .map(|(n, _)| n.clone())
        .collect()
}

/// A tolerance study's samples and what they give.
pub struct Samples {
    /// Each sample's parameter values, in the spreads' order.
    pub sets: Vec<Vec<f64>>,
    /// Each sample's values.
    pub values: Vec<Values>,
    /// Statistics of every value.
    pub stats: BTreeMap<String, Statistics>,
    /// Values whose worst case is not at a corner (corners method).
    pub off_corner: Vec<String>,
}

/// Solves the samples of a tolerance study (no files).
pub fn samples(loaded: &Loaded, tol: &Tolerance, base: &Variant, limits: &Limits, progress: &Progress) -> Result<Samples, Failure> {
    let (sets, values, off_corner) = match tol.method {
        Method::MonteCarlo { samples, seed } => {
            let sets = latin_hypercube(&tol.spreads, samples, seed);
            let values = solve_all(loaded, base, tol, &sets, limits, progress, "sample")?;
            (sets, values, Vec::new())
        }
        Method::Corners => {
            let (corner_sets, inside_sets) = corners(&tol.spreads);
            let values = solve_all(loaded, base, tol, &corner_sets, limits, progress, "corner")?;
            let inside = solve_all(loaded, base, tol, &inside_sets, limits, progress, "face centre")?;
            let off = not_at_corners(&all_statistics(&values), &inside);
            (corner_sets, values, off)
        }
    };
    let stats = all_statistics(&values);
    Ok(Samples {
        sets,
        values,
        stats,
        off_corner,
    })
}

/// An expectation on a statistic, judged over the samples.
pub struct Judged {
    /// What was bounded, as "force.pull.z p99".
    pub name: String,
    /// The bound as written.
    pub bound: String,
    /// The figures judged (one, or both ends for "worst" on a range).
    pub figures: Vec<f64>,
    /// Unit symbol of the value.
    pub unit: &'static str,
    /// Whether the bound holds for every figure.
    pub pass: bool,
}

/// Judges every `[[expect]]` that names a statistic.
pub fn judge(model: &study::model::Model, stats: &BTreeMap<String, Statistics>) -> Vec<Judged> {
    model
        .expects
        .iter()
        .filter_map(|x| {
            let s = x.statistic?;
            let figures = stats.get(&x.value.name).map_or_else(Vec::new, |st| st.judged(s, &x.bound));
            let pass = !figures.is_empty()
                && figures
                    .iter()
                    .all(|v| study::estimate::verdict(&x.bound, *v, 0.0) == study::results::Verdict::Pass);
            Some(Judged {
                name: format!("{} {}", x.value.name, format!("{s:?}").to_lowercase()),
                bound: x.text.clone(),
                figures,
                unit: x.value.unit.symbol(),
                pass,
            })
        })
        .collect()
}

impl Judged {
    /// The line `solve` and `check` print.
    pub fn line(&self) -> String {
        let figs: Vec<String> = self.figures.iter().map(|v| crate::output::engineering::eng(*v, self.unit)).collect();
        format!(
            "{:<36} {:<24} {:>24}  {}",
            self.name,
            self.bound,
            figs.join(" .. "),
            if self.pass { "pass" } else { "FAIL" }
        )
    }
}

/// Runs the tolerance study, then the nominal case; exit code as `solve`.
pub fn solve(loaded: &Loaded, tol: &Tolerance, base: &Variant, folder: &OutputFolder, limits: &Limits, progress: &Progress) -> Result<i32, Failure> {
    let Samples {
        sets,
        values,
        stats,
        off_corner,
    } = samples(loaded, tol, base, limits, progress)?;
    let mut outcome = run::solve_variant(loaded, base, limits, progress)?;
    progress.finish();
    outcome.files.push(("tolerance.csv".into(), csv(tol, &sets, &values).into_bytes()));
    let judged = judge(&outcome.model, &stats);
    crate::output::report::add_section(
        &mut outcome.files,
        &report_section(tol, &stats, &outcome.results, sets.len(), &off_corner, &judged),
    );
    outcome
        .files
        .push(("tolerance.json".into(), json(tol, &stats, &off_corner, sets.len(), &judged)?));
    folder
        .commit(Path::new(""), &outcome.files)
        .map_err(|e| Failure::Input(format!("error: {e}\n")))?;
    print!("{}", crate::summary::summary(&outcome, folder.path()));
    let method = match tol.method {
        Method::MonteCarlo { .. } => "Monte Carlo (Latin hypercube)",
        Method::Corners => "corners",
    };
    let corners_only = tol.method == Method::Corners;
    let heading = if corners_only {
        "smallest and largest over the corners"
    } else {
        "min, 1st, 50th, 99th percentile, max"
    };
    println!("  tolerance: {} samples by {method}; {heading}:", sets.len());
    for name in &outcome.results.asked {
        if let Some(s) = stats.get(name) {
            let unit = outcome.results.units.get(name).copied().unwrap_or("");
            let e = |v: f64| crate::output::engineering::eng(v, unit);
            if corners_only {
                println!("    {name}: {} .. {}", e(s.min), e(s.max));
            } else {
                println!("    {name}: {}, {}, {}, {}, {}", e(s.min), e(s.p1), e(s.p50), e(s.p99), e(s.max));
            }
        }
    }
    for name in &off_corner {
        println!("  WARNING: {name}: a face centre of the tolerance box goes past the corners' extremes, so its worst case is not at a corner; use method = \"monte-carlo\"");
    }
    for j in &judged {
        let figs: Vec<String> = j.figures.iter().map(|v| crate::output::engineering::eng(*v, j.unit)).collect();
        println!(
            "  expect {} {}: {} ({})",
            j.name,
            j.bound,
            figs.join(" .. "),
            if j.pass { "pass" } else { "FAIL" }
        );
    }
    Ok(if outcome.results.solve.converged {
        i32::from(outcome.results.expect.iter().any(|e| !e.pass) || judged.iter().any(|j| !j.pass))
    } else {
        3
    })
}

fn csv(tol: &Tolerance, sets: &[Vec<f64>], values: &[Values]) -> String {
    let names: Vec<String> = values.first().map(|v| v.keys().cloned().collect()).unwrap_or_default();
    let mut s = String::from("sample");
    for sp in &tol.spreads {
        s += &format!(",{}", sp.name);
    }
    for n in &names {
        s += &format!(",{n}");
    }
    s.push('\n');
    for (i, (set, v)) in sets.iter().zip(values).enumerate() {
        s += &i.to_string();
        for x in set {
            s += &format!(",{x}");
        }
        for n in &names {
            s += &format!(",{}", v.get(n).copied().unwrap_or(f64::NAN));
        }
        s.push('\n');
    }
    s
}

fn json(tol: &Tolerance, stats: &BTreeMap<String, Statistics>, off_corner: &[String], n: usize, judged: &[Judged]) -> Result<Vec<u8>, Failure> {
    let spreads: Vec<_> = tol
        .spreads
        .iter()
        .map(|s| serde_json::json!({ "name": s.name, "nominal": s.nominal, "plus_minus": s.half_width, "distribution": format!("{:?}", s.distribution).to_lowercase() }))
        .collect();
    let statistics: BTreeMap<_, _> = stats
        .iter()
        .map(|(k, s)| {
            (
                k.clone(),
                serde_json::json!({ "min": s.min, "p1": s.p1, "p50": s.p50, "p99": s.p99, "max": s.max }),
            )
        })
        .collect();
    let method = match tol.method {
        Method::MonteCarlo { seed, .. } => serde_json::json!({ "name": "monte-carlo", "sampling": "latin-hypercube", "seed": seed }),
        Method::Corners => serde_json::json!({ "name": "corners", "worst_case_not_at_a_corner": off_corner }),
    };
    let expect: Vec<_> = judged
        .iter()
        .map(|j| serde_json::json!({ "value": j.name, "bound": j.bound, "figures": j.figures, "pass": j.pass }))
        .collect();
    let json = serde_json::json!({ "method": method, "samples": n, "spreads": spreads, "statistics": statistics, "expect": expect, "note": "values in SI; percentiles interpolate between order statistics (Hyndman and Fan type 7); a normal spread's plus_minus is three standard deviations" });
    serde_json::to_vec_pretty(&json).map_err(|e| Failure::Input(format!("error: cannot encode tolerance.json: {e}\n")))
}

/// The report's section: the spreads, each asked value's statistics, and
/// the verdicts on statistics.
fn report_section(
    tol: &Tolerance,
    stats: &BTreeMap<String, Statistics>,
    results: &study::results::Results,
    n: usize,
    off_corner: &[String],
    judged: &[Judged],
) -> String {
    let method = match tol.method {
        Method::MonteCarlo { .. } => "Monte Carlo samples (Latin hypercube)",
        Method::Corners => "corners of the tolerance box",
    };
    let spreads: Vec<String> = tol
        .spreads
        .iter()
        .map(|s| format!("{} = {} \u{b1} {}", s.name, s.nominal, s.half_width))
        .collect();
    // Percentiles of a handful of corners mean nothing: corners give the range.
    let corners = tol.method == Method::Corners;
    let head = if corners {
        "| value | min | max |\n|---|---|---|"
    } else {
        "| value | min | p1 | p50 | p99 | max |\n|---|---|---|---|---|---|"
    };
    let mut s = format!(
        "## Tolerances\n\n{n} {method}; {}. The tables above are the nominal design's; over the samples:\n\n{head}\n",
        spreads.join(", ")
    );
    for name in &results.asked {
        let Some(st) = stats.get(name) else { continue };
        let unit = results.units.get(name).copied().unwrap_or("");
        let e = |v: f64| crate::output::engineering::eng(v, unit);
        s += &if corners {
            format!("| {name} | {} | {} |\n", e(st.min), e(st.max))
        } else {
            format!("| {name} | {} | {} | {} | {} | {} |\n", e(st.min), e(st.p1), e(st.p50), e(st.p99), e(st.max))
        };
    }
    for name in off_corner {
        s += &format!("\n{name}: its worst case is not at a corner (a face centre goes past the corners); use Monte Carlo.\n");
    }
    if !judged.is_empty() {
        s += "\n| expectation | bound | over the samples | result |\n|---|---|---|---|\n";
        for j in judged {
            let figs: Vec<String> = j.figures.iter().map(|v| crate::output::engineering::eng(*v, j.unit)).collect();
            s += &format!(
                "| {} | {} | {} | {} |\n",
                j.name,
                j.bound,
                figs.join(" .. "),
                if j.pass { "pass" } else { "FAIL" }
            );
        }
    }
    s + "\nEvery sample is in tolerance.csv, the statistics in tolerance.json.\n"
}
