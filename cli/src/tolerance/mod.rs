//! `lodestone solve` on a case with `[tolerance]`: every sample solved to
//! the case's accuracy (no files), the statistics of every value, then the
//! nominal case solved in full and written with tolerance.csv and
//! tolerance.json as one set.

mod check;
mod files;
mod judge;
mod store;

pub use check::check;
pub use judge::{judge, Judged};
pub use store::{gather, Run, Sample};

use crate::case::resolve::{Method, Tolerance};
use crate::many_warnings::{markdown, summary_lines, Warned};
use crate::output::engineering::eng_shared;
use crate::output::folder::OutputFolder;
use crate::progress::Progress;
use crate::run::{self, Failure, Limits, Loaded, Variant};
use files::{csv, intervals_text, json, report_section};

/// " (each +- E)" after a statistics' values, empty where the error is unknown.
fn each(error: Option<String>) -> String {
    error.map_or(String::new(), |e| format!(" (each \u{b1} {e})"))
}
use std::collections::BTreeMap;
use std::path::Path;
use store::Store;
use study::tolerance::{corners, latin_hypercube, statistics, Statistics};

/// Solves the study at one parameter set.
fn sample(loaded: &Loaded, base: &Variant, tol: &Tolerance, at: &[f64], limits: &Limits) -> Result<Sample, Failure> {
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
    Ok(Sample {
        values: results.values,
        errors: results.errors,
        warnings: results.warnings,
    })
}

/// What every sample of one study shares.
struct Job<'a> {
    loaded: &'a Loaded,
    base: &'a Variant,
    tol: &'a Tolerance,
    limits: &'a Limits,
}

/// Solves every sample, several at a time on the cores, with progress:
/// kept ones are read back, other shards' are left as None.
fn solve_all(job: &Job, sets: &[Vec<f64>], progress: &Progress, what: &str, store: Option<&Store>) -> Result<Vec<Option<Sample>>, Failure> {
    use rayon::prelude::*;
    let done = std::sync::atomic::AtomicUsize::new(0);
    sets.par_iter()
        .enumerate()
        .map(|(i, at)| {
            let label = format!("{what}-{i:04}").replace(' ', "-");
            if let Some(s) = store {
                let key = s.key(at);
                if let Some(v) = s.kept(&label, &key) {
                    return Ok(Some(v));
                }
                if !s.mine(i) {
                    return Ok(None);
                }
                let v = sample(job.loaded, job.base, job.tol, at, job.limits)?;
                s.keep(&label, &key, &v)?;
                note(progress, job.loaded, what, &done, sets.len());
                return Ok(Some(v));
            }
            let v = sample(job.loaded, job.base, job.tol, at, job.limits)?;
            note(progress, job.loaded, what, &done, sets.len());
            Ok(Some(v))
        })
        .collect()
}

fn note(progress: &Progress, loaded: &Loaded, what: &str, done: &std::sync::atomic::AtomicUsize, n: usize) {
    let k = done.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1;
    progress.note(&format!("{}: tolerance {what} {k} of {n}", loaded.stem()));
}

/// Statistics of every value over the samples (`sampled`: Monte Carlo,
/// with the percentiles' sampling intervals).
fn all_statistics(samples: &[Sample], sampled: bool) -> BTreeMap<String, Statistics> {
    let names: Vec<String> = samples.first().map(|v| v.values.keys().cloned().collect()).unwrap_or_default();
    names
        .into_iter()
        .filter_map(|n| {
            let pairs: Vec<(f64, Option<f64>)> = samples.iter().filter_map(|s| Some((*s.values.get(&n)?, s.errors.get(&n).copied()))).collect();
            statistics(&pairs, sampled).map(|s| (n, s))
        })
        .collect()
}

/// Values whose extremes over the face centres pass those over the corners:
/// there the worst case is not at a corner, and the corner method misses it.
fn not_at_corners(corner: &BTreeMap<String, Statistics>, inside: &[Sample]) -> Vec<String> {
    corner
        .iter()
        .filter(|(n, s)| {
            let slack = 1e-9 * s.max.abs().max(s.min.abs());
            inside.iter().filter_map(|v| v.values.get(*n)).any(|&x| x > s.max + slack || x < s.min - slack)
        })
        .map(|(n, _)| n.clone())
        .collect()
}

/// A tolerance study's samples and what they give.
pub struct Samples {
    /// Each sample's parameter values, in the spreads' order.
    pub sets: Vec<Vec<f64>>,
    /// Each sample's values and errors.
    pub values: Vec<Sample>,
    /// Statistics of every value.
    pub stats: BTreeMap<String, Statistics>,
    /// Values whose worst case is not at a corner (corners method).
    pub off_corner: Vec<String>,
    /// The samples (and face centres) that gave warnings.
    pub warned: Vec<Warned>,
    /// How many solves the samples took (corners and face centres).
    pub solves: usize,
}

/// The samples of one kind (`sample`, `corner`, `face centre`) that gave
/// warnings, each named with its parameters.
fn warned_of(tol: &Tolerance, what: &str, sets: &[Vec<f64>], samples: &[Sample]) -> Vec<Warned> {
    sets.iter()
        .zip(samples)
        .enumerate()
        .filter(|(_, (_, s))| !s.warnings.is_empty())
        .map(|(i, (set, s))| Warned {
            label: crate::many_warnings::label(&format!("{what} {i}"), tol.spreads.iter().map(|p| p.name.as_str()).zip(set.iter().copied())),
            warnings: s.warnings.clone(),
        })
        .collect()
}

/// Solves the samples of a tolerance study, or, with a store, keeps each
/// as it is solved and reads kept ones back. Ok(Err(missing)) when a shard
/// left samples to other shards: how many are still to be solved.
fn samples_kept(
    loaded: &Loaded,
    tol: &Tolerance,
    base: &Variant,
    limits: &Limits,
    progress: &Progress,
    store: Option<&Store>,
) -> Result<Result<Samples, usize>, Failure> {
    let job = Job { loaded, base, tol, limits };
    let whole = |v: Vec<Option<Sample>>| -> Result<Vec<Sample>, usize> {
        let missing = v.iter().filter(|x| x.is_none()).count();
        if missing > 0 {
            Err(missing)
        } else {
            Ok(v.into_iter().flatten().collect())
        }
    };
    let (sets, values, off_corner, warned, solves) = match tol.method {
        Method::MonteCarlo { samples, seed } => {
            let sets = latin_hypercube(&tol.spreads, samples, seed);
            let values = match whole(solve_all(&job, &sets, progress, "sample", store)?) {
                Ok(v) => v,
                Err(m) => return Ok(Err(m)),
            };
            let warned = warned_of(tol, "sample", &sets, &values);
            let solves = values.len();
            (sets, values, Vec::new(), warned, solves)
        }
        Method::Corners => {
            let (corner_sets, inside_sets) = corners(&tol.spreads);
            let values = whole(solve_all(&job, &corner_sets, progress, "corner", store)?);
            let inside = whole(solve_all(&job, &inside_sets, progress, "face centre", store)?);
            let (values, inside) = match (values, inside) {
                (Ok(v), Ok(i)) => (v, i),
                (a, b) => return Ok(Err(a.err().unwrap_or(0) + b.err().unwrap_or(0))),
            };
            let off = not_at_corners(&all_statistics(&values, false), &inside);
            let mut warned = warned_of(tol, "corner", &corner_sets, &values);
            warned.extend(warned_of(tol, "face centre", &inside_sets, &inside));
            let solves = values.len() + inside.len();
            (corner_sets, values, off, warned, solves)
        }
    };
    let stats = all_statistics(&values, matches!(tol.method, Method::MonteCarlo { .. }));
    Ok(Ok(Samples {
        sets,
        values,
        stats,
        off_corner,
        warned,
        solves,
    }))
}

/// Solves the samples of a tolerance study (no files), for `check`.
pub fn samples(loaded: &Loaded, tol: &Tolerance, base: &Variant, limits: &Limits, progress: &Progress) -> Result<Samples, Failure> {
    samples_kept(loaded, tol, base, limits, progress, None)?.map_err(|m| Failure::Input(format!("error: {m} tolerance samples were left unsolved\n")))
}

/// Runs the tolerance study, keeping each sample in the output folder,
/// then the nominal case; exit code as `solve`. A shard solves its share
/// of the samples and stops there.
pub fn solve(loaded: &Loaded, tol: &Tolerance, base: &Variant, folder: &OutputFolder, limits: &Limits, progress: &Progress, run: Run) -> Result<i32, Failure> {
    let others = base.params.iter().filter(|(k, _)| !tol.spreads.iter().any(|s| &s.name == *k));
    let case = others.fold(crate::sweep::case_hash(&loaded.text), |h, (k, v)| {
        crate::sweep::fnv1a(&v.to_bits().to_le_bytes(), crate::sweep::fnv1a(k.as_bytes(), h))
    });
    let store = Store { folder, run, case };
    let Samples {
        sets,
        values,
        stats,
        off_corner,
        warned,
        solves,
    } = match samples_kept(loaded, tol, base, limits, progress, Some(&store))? {
        Ok(s) => s,
        Err(missing) => {
            progress.finish();
            let (k, n) = run.shard.unwrap_or((0, 1));
            println!(
                "{}: shard {k}/{n} of the tolerance samples kept in {}; {missing} samples are other shards'. Gather the shard folders with `lodestone merge FOLDER... -o DIR`, then `lodestone solve {} -o DIR` finishes the study from them.",
                loaded.path.display(),
                folder.path().join("samples").display(),
                loaded.path.display()
            );
            return Ok(0);
        }
    };
    let mut outcome = run::solve_variant(loaded, base, limits, progress)?;
    progress.finish();
    outcome.files.push(("tolerance.csv".into(), csv(tol, &sets, &values).into_bytes()));
    let judged = judge(&outcome.model, &stats);
    crate::output::report::add_section(
        &mut outcome.files,
        &(report_section(tol, &stats, &outcome.results, sets.len(), &off_corner, &judged) + &markdown("tolerance samples", solves, &warned)),
    );
    outcome
        .files
        .push(("tolerance.json".into(), json(tol, &stats, &off_corner, sets.len(), &judged, &warned)?));
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
            if corners_only {
                let (v, e) = eng_shared(&[s.min, s.max], s.error, unit);
                println!("    {name}: {} .. {}{}", v[0], v[1], each(e));
            } else {
                let (v, e) = eng_shared(&[s.min, s.p1, s.p50, s.p99, s.max], s.error, unit);
                println!("    {name}: {}{}", v.join(", "), each(e));
                if let Some(text) = intervals_text(s, unit) {
                    println!("      95 % intervals: {text}");
                }
            }
        }
    }
    for line in summary_lines("tolerance samples", solves, &warned, "tolerance.json") {
        println!("{line}");
    }
    for name in &off_corner {
        println!("  WARNING: {name}: a face centre of the tolerance box goes past the corners' extremes, so its worst case is not at a corner; use method = \"monte-carlo\"");
    }
    for j in &judged {
        let why = if j.why.is_empty() { String::new() } else { format!(": {}", j.why) };
        println!("  expect {} {}: {} ({}){why}", j.name, j.bound, j.figures_text(), j.verdict_text());
    }
    Ok(if outcome.results.solve.converged {
        i32::from(outcome.results.expect.iter().any(|e| !e.pass) || judged.iter().any(|j| !j.pass()))
    } else {
        3
    })
}
