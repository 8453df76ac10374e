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
use study::model::Statistic;
use study::results::Verdict;
use study::tolerance::{corners, judged_statistics, latin_hypercube, statistics, Statistics};

/// Figures by value name.
type Values = BTreeMap<String, f64>;

/// One solved sample: its values and their estimated errors.
#[derive(Clone, Debug, Default)]
pub struct Sample {
    /// Values by name, SI.
    pub values: Values,
    /// Estimated absolute errors by name, SI (not every value has one).
    pub errors: Values,
}

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
    })
}

/// How a tolerance run keeps its samples: each solved sample is committed
/// to `samples/KIND-NNNN/` of the output folder as it completes, so that
/// an interrupted run resumes where it stopped and shards (`--shard K/N`,
/// every N-th sample) can be gathered by `merge` and finished by a plain
/// `solve`.
#[derive(Clone, Copy, Debug, Default)]
pub struct Run {
    /// This shard's K and N.
    pub shard: Option<(usize, usize)>,
    /// Solve every sample again, ignoring kept ones.
    pub force: bool,
}

/// Where samples are kept, and how.
struct Store<'a> {
    folder: &'a OutputFolder,
    run: Run,
    /// Identifies the case (its text and its other parameters).
    case: u64,
}

impl Store<'_> {
    /// A sample's key: the case, and the sample's own parameter values.
    fn key(&self, at: &[f64]) -> String {
        let h = at.iter().fold(self.case, |h, x| crate::sweep::fnv1a(&x.to_bits().to_le_bytes(), h));
        format!("{h:016x}")
    }

    /// A kept sample's values and errors, when whole and of this case (a
    /// sample kept before errors were, without errors.json, is solved again).
    fn kept(&self, label: &str, key: &str) -> Option<Sample> {
        if self.run.force {
            return None;
        }
        let dir = self.folder.path().join("samples").join(label);
        if std::fs::read_to_string(dir.join("sample.hash")).ok()? != key {
            return None;
        }
        let read = |file: &str| -> Option<Values> {
            let bits: BTreeMap<String, u64> = serde_json::from_str(&std::fs::read_to_string(dir.join(file)).ok()?).ok()?;
            Some(bits.into_iter().map(|(k, b)| (k, f64::from_bits(b))).collect())
        };
        Some(Sample {
            values: read("values.json")?,
            errors: read("errors.json")?,
        })
    }

    /// Commits a solved sample (values and errors as exact bits).
    fn keep(&self, label: &str, key: &str, sample: &Sample) -> Result<(), Failure> {
        let encode = |m: &Values| {
            let bits: BTreeMap<&String, u64> = m.iter().map(|(k, v)| (k, v.to_bits())).collect();
            serde_json::to_vec(&bits).map_err(|e| Failure::Input(format!("error: cannot encode a sample: {e}\n")))
        };
        let files: crate::output::FileSet = vec![
            ("values.json".into(), encode(&sample.values)?),
            ("errors.json".into(), encode(&sample.errors)?),
            ("sample.hash".into(), key.as_bytes().to_vec()),
        ];
        self.folder
            .commit(&Path::new("samples").join(label), &files)
            .map_err(|e| Failure::Input(format!("error: {e}\n")))
    }

    /// Whether this run solves sample `i` (its shard's share).
    fn mine(&self, i: usize) -> bool {
        self.run.shard.is_none_or(|(k, n)| i % n == k)
    }
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
    let (sets, values, off_corner) = match tol.method {
        Method::MonteCarlo { samples, seed } => {
            let sets = latin_hypercube(&tol.spreads, samples, seed);
            let values = match whole(solve_all(&job, &sets, progress, "sample", store)?) {
                Ok(v) => v,
                Err(m) => return Ok(Err(m)),
            };
            (sets, values, Vec::new())
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
            (corner_sets, values, off)
        }
    };
    let stats = all_statistics(&values, matches!(tol.method, Method::MonteCarlo { .. }));
    Ok(Ok(Samples {
        sets,
        values,
        stats,
        off_corner,
    }))
}

/// Solves the samples of a tolerance study (no files), for `check`.
pub fn samples(loaded: &Loaded, tol: &Tolerance, base: &Variant, limits: &Limits, progress: &Progress) -> Result<Samples, Failure> {
    samples_kept(loaded, tol, base, limits, progress, None)?.map_err(|m| Failure::Input(format!("error: {m} tolerance samples were left unsolved\n")))
}

/// An expectation on a statistic, judged over the samples.
pub struct Judged {
    /// What was bounded, as "force.pull.z p99".
    pub name: String,
    /// The bound as written.
    pub bound: String,
    /// The figures judged (one, or both ends for "worst" on a range).
    pub figures: Vec<f64>,
    /// Where each figure may lie: +- the numerical error, and for a Monte
    /// Carlo percentile its 95 % sampling interval (an infinite end: the
    /// samples cannot bound it).
    pub ranges: Vec<(f64, f64)>,
    /// Unit symbol of the value.
    pub unit: &'static str,
    /// Pass, fail, or undecided where the bound lies within a range.
    pub verdict: Verdict,
    /// Why undecided, in words (empty otherwise).
    pub why: String,
}

/// Judges every `[[expect]]` that names a statistic.
pub fn judge(model: &study::model::Model, stats: &BTreeMap<String, Statistics>) -> Vec<Judged> {
    model
        .expects
        .iter()
        .filter_map(|x| {
            let s = x.statistic?;
            let name = format!("{} {}", x.value.name, format!("{s:?}").to_lowercase());
            let unit = x.value.unit.symbol();
            let Some(st) = stats.get(&x.value.name) else {
                return Some(Judged {
                    name,
                    bound: x.text.clone(),
                    figures: Vec::new(),
                    ranges: Vec::new(),
                    unit,
                    verdict: Verdict::Fail,
                    why: String::new(),
                });
            };
            let verdict = st.verdict(s, &x.bound);
            let statistics = judged_statistics(s, &x.bound);
            let why = if verdict == Verdict::Undecided {
                undecided_why(st, &statistics, unit)
            } else {
                String::new()
            };
            Some(Judged {
                name,
                bound: x.text.clone(),
                figures: st.judged(s, &x.bound),
                ranges: statistics.iter().map(|&k| st.range(k)).collect(),
                unit,
                verdict,
                why,
            })
        })
        .collect()
}

/// Why a verdict on a statistic is undecided: the sampling of a Monte
/// Carlo percentile (and how many samples would bound it), or the
/// samples' numerical error.
fn undecided_why(st: &Statistics, statistics: &[Statistic], unit: &str) -> String {
    let q = statistics.iter().find_map(|s| match s {
        Statistic::P1 => Some(0.01),
        Statistic::P50 => Some(0.5),
        Statistic::P99 => Some(0.99),
        _ => None,
    });
    match (q, st.intervals) {
        (Some(q), Some(_)) => format!(
            "the bound lies within the {:.0} % interval that {} samples leave for this percentile; more samples would decide (both ends need at least {})",
            100.0 * study::tolerance::CONFIDENCE,
            st.samples,
            study::tolerance::fewest_samples(q)
        ),
        _ => format!(
            "the bound lies within the samples' numerical error ({}); a tighter [study] accuracy would decide",
            crate::output::engineering::eng(st.error.unwrap_or(0.0), unit)
        ),
    }
}

impl Judged {
    /// The judged figures as people read them: "49.33 mT ± 0.001 mT", or
    /// both ends, with a percentile's 95 % interval where it is sampled.
    fn figures_text(&self) -> String {
        let eng = |v: f64| crate::output::engineering::eng(v, self.unit);
        let figs: Vec<String> = self
            .figures
            .iter()
            .zip(&self.ranges)
            .map(|(&v, &(lo, hi))| {
                let half = 0.5 * (hi - lo);
                if lo.is_finite() && hi.is_finite() && ((lo + hi) * 0.5 - v).abs() <= 1e-9 * v.abs().max(half) {
                    crate::output::engineering::eng_pm(v, Some(half), self.unit)
                } else {
                    let end = |x: f64, none: &str| if x.is_finite() { eng(x) } else { none.to_string() };
                    format!("{} (95 %: {} .. {})", eng(v), end(lo, "unbounded"), end(hi, "unbounded"))
                }
            })
            .collect();
        figs.join(" .. ")
    }

    /// The verdict as printed.
    pub fn verdict_text(&self) -> &'static str {
        match self.verdict {
            Verdict::Pass => "pass",
            Verdict::Fail => "FAIL",
            Verdict::Undecided => "UNDECIDED",
        }
    }

    /// Whether the bound holds (undecided does not).
    pub fn pass(&self) -> bool {
        self.verdict == Verdict::Pass
    }

    /// The line `solve` and `check` print.
    pub fn line(&self) -> String {
        let why = if self.why.is_empty() { String::new() } else { format!(": {}", self.why) };
        format!("{:<36} {:<24} {:>24}  {}{why}", self.name, self.bound, self.figures_text(), self.verdict_text())
    }
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
            let pm = error_text(s, unit);
            if corners_only {
                println!("    {name}: {} .. {}{pm}", e(s.min), e(s.max));
            } else {
                println!("    {name}: {}, {}, {}, {}, {}{pm}", e(s.min), e(s.p1), e(s.p50), e(s.p99), e(s.max));
                if let Some(text) = intervals_text(s, unit) {
                    println!("      95 % intervals: {text}");
                }
            }
        }
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

/// tolerance.csv: each sample's parameters, then each value and its
/// estimated error (`NAME.error`, for values that have one), as sweep.csv.
fn csv(tol: &Tolerance, sets: &[Vec<f64>], samples: &[Sample]) -> String {
    let names: Vec<String> = samples.first().map(|v| v.values.keys().cloned().collect()).unwrap_or_default();
    let mut s = String::from("sample");
    for sp in &tol.spreads {
        s += &format!(",{}", sp.name);
    }
    let with_error = |n: &String| samples.iter().any(|v| v.errors.contains_key(n));
    for n in &names {
        s += &format!(",{n}");
        if with_error(n) {
            s += &format!(",{n}.error");
        }
    }
    s.push('\n');
    for (i, (set, v)) in sets.iter().zip(samples).enumerate() {
        s += &i.to_string();
        for x in set {
            s += &format!(",{x}");
        }
        for n in &names {
            s += &format!(",{}", v.values.get(n).copied().unwrap_or(f64::NAN));
            if with_error(n) {
                s += &v.errors.get(n).map_or(",".to_string(), |e| format!(",{e}"));
            }
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
            (k.clone(), {
                let mut j = serde_json::json!({ "min": s.min, "p1": s.p1, "p50": s.p50, "p99": s.p99, "max": s.max, "error": s.error });
                if let Some(i) = &s.intervals {
                    j["interval_95"] = serde_json::json!({ "p1": [i[0].low, i[0].high], "p50": [i[1].low, i[1].high], "p99": [i[2].low, i[2].high] });
                }
                j
            })
        })
        .collect();
    let method = match tol.method {
        Method::MonteCarlo { seed, .. } => serde_json::json!({ "name": "monte-carlo", "sampling": "latin-hypercube", "seed": seed }),
        Method::Corners => serde_json::json!({ "name": "corners", "worst_case_not_at_a_corner": off_corner }),
    };
    let expect: Vec<_> = judged
        .iter()
        .map(|j| {
            let ranges: Vec<[Option<f64>; 2]> = j.ranges.iter().map(|&(lo, hi)| [lo.is_finite().then_some(lo), hi.is_finite().then_some(hi)]).collect();
            serde_json::json!({ "value": j.name, "bound": j.bound, "figures": j.figures, "ranges": ranges, "verdict": j.verdict_text().to_lowercase(), "why": j.why, "pass": j.pass() })
        })
        .collect();
    let json = serde_json::json!({ "method": method, "samples": n, "spreads": spreads, "statistics": statistics, "expect": expect, "note": "values in SI; percentiles interpolate between order statistics (Hyndman and Fan type 7); error: the samples' largest estimated numerical error, which bounds every statistic's; interval_95 (Monte Carlo): the distribution-free 95 % interval of each percentile between two order statistics (null: the samples cannot bound that end), before the numerical error; an expectation on a statistic is undecided where the bound lies within these; a normal spread's plus_minus is three standard deviations" });
    serde_json::to_vec_pretty(&json).map_err(|e| Failure::Input(format!("error: cannot encode tolerance.json: {e}\n")))
}

/// " (each +- E)" for a statistics' numerical error, empty where unknown.
fn error_text(s: &Statistics, unit: &str) -> String {
    s.error
        .map_or(String::new(), |e| format!(" (each \u{b1} {})", crate::output::engineering::eng(e, unit)))
}

/// The percentiles' 95 % sampling intervals as read: "p1 unbounded ..
/// 49.4 mT, p50 ..., p99 ..."; None without sampling (corners).
fn intervals_text(s: &Statistics, unit: &str) -> Option<String> {
    let end = |x: Option<f64>| x.map_or("unbounded".to_string(), |v| crate::output::engineering::eng(v, unit));
    let i = s.intervals?;
    Some(
        ["p1", "p50", "p99"]
            .iter()
            .zip(i)
            .map(|(k, i)| format!("{k} {} .. {}", end(i.low), end(i.high)))
            .collect::<Vec<_>>()
            .join(", "),
    )
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
        "| value | min | max | numerical error |\n|---|---|---|---|"
    } else {
        "| value | min | p1 | p50 | p99 | max | numerical error | 95 % intervals (sampling) |\n|---|---|---|---|---|---|---|---|"
    };
    let mut s = format!(
        "## Tolerances\n\n{n} {method}; {}. The tables above are the nominal design's; over the samples:\n\n{head}\n",
        spreads.join(", ")
    );
    for name in &results.asked {
        let Some(st) = stats.get(name) else { continue };
        let unit = results.units.get(name).copied().unwrap_or("");
        let e = |v: f64| crate::output::engineering::eng(v, unit);
        let err = st.error.map_or("-".to_string(), |x| format!("\u{b1} {}", e(x)));
        s += &if corners {
            format!("| {name} | {} | {} | {err} |\n", e(st.min), e(st.max))
        } else {
            let intervals = intervals_text(st, unit).unwrap_or_default();
            format!(
                "| {name} | {} | {} | {} | {} | {} | {err} | {intervals} |\n",
                e(st.min),
                e(st.p1),
                e(st.p50),
                e(st.p99),
                e(st.max)
            )
        };
    }
    for name in off_corner {
        s += &format!("\n{name}: its worst case is not at a corner (a face centre goes past the corners); use Monte Carlo.\n");
    }
    if !judged.is_empty() {
        s += "\n| expectation | bound | over the samples | result |\n|---|---|---|---|\n";
        for j in judged {
            s += &format!("| {} | {} | {} | {} |\n", j.name, j.bound, j.figures_text(), j.verdict_text());
        }
    }
    s + "\nEvery sample is in tolerance.csv, the statistics in tolerance.json.\n"
}

/// `merge` of tolerance shards: every kept sample of the folders, each a
/// whole set (values, errors and key), copied into `out/samples`; a sample found
/// twice must be the same. The number gathered.
pub fn gather(folders: &[std::path::PathBuf], out: &Path) -> Result<usize, String> {
    let folder = OutputFolder::open(out)?;
    let mut seen: BTreeMap<String, String> = BTreeMap::new();
    for f in folders {
        let Ok(entries) = std::fs::read_dir(f.join("samples")) else { continue };
        for e in entries.flatten() {
            let label = e.file_name().to_string_lossy().into_owned();
            let (Ok(key), Ok(values), Ok(errors)) = (
                std::fs::read_to_string(e.path().join("sample.hash")),
                std::fs::read(e.path().join("values.json")),
                std::fs::read(e.path().join("errors.json")),
            ) else {
                continue;
            };
            match seen.get(&label) {
                Some(k) if *k == key => continue,
                Some(_) => return Err(format!("{} holds sample {label} of another case or run than the other folders", f.display())),
                None => {}
            }
            let files: crate::output::FileSet = vec![
                ("values.json".into(), values),
                ("errors.json".into(), errors),
                ("sample.hash".into(), key.clone().into_bytes()),
            ];
            folder.commit(&Path::new("samples").join(&label), &files)?;
            seen.insert(label, key);
        }
    }
    if seen.is_empty() {
        return Err("no whole tolerance samples in these folders".into());
    }
    Ok(seen.len())
}
