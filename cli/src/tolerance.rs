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

    /// A kept sample's values, when whole and of this case.
    fn kept(&self, label: &str, key: &str) -> Option<Values> {
        if self.run.force {
            return None;
        }
        let dir = self.folder.path().join("samples").join(label);
        if std::fs::read_to_string(dir.join("sample.hash")).ok()? != key {
            return None;
        }
        let bits: BTreeMap<String, u64> = serde_json::from_str(&std::fs::read_to_string(dir.join("values.json")).ok()?).ok()?;
        Some(bits.into_iter().map(|(k, b)| (k, f64::from_bits(b))).collect())
    }

    /// Commits a solved sample (values as exact bits).
    fn keep(&self, label: &str, key: &str, values: &Values) -> Result<(), Failure> {
        let bits: BTreeMap<&String, u64> = values.iter().map(|(k, v)| (k, v.to_bits())).collect();
        let json = serde_json::to_vec(&bits).map_err(|e| Failure::Input(format!("error: cannot encode a sample: {e}\n")))?;
        let files: crate::output::FileSet = vec![("values.json".into(), json), ("sample.hash".into(), key.as_bytes().to_vec())];
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
fn solve_all(job: &Job, sets: &[Vec<f64>], progress: &Progress, what: &str, store: Option<&Store>) -> Result<Vec<Option<Values>>, Failure> {
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
    let whole = |v: Vec<Option<Values>>| -> Result<Vec<Values>, usize> {
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
            let off = not_at_corners(&all_statistics(&values), &inside);
            (corner_sets, values, off)
        }
    };
    let stats = all_statistics(&values);
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
    /// The judged figures as people read them ("49.33 mT", or both ends).
    fn figures_text(&self) -> String {
        let figs: Vec<String> = self.figures.iter().map(|v| crate::output::engineering::eng(*v, self.unit)).collect();
        figs.join(" .. ")
    }

    /// The line `solve` and `check` print.
    pub fn line(&self) -> String {
        format!(
            "{:<36} {:<24} {:>24}  {}",
            self.name,
            self.bound,
            self.figures_text(),
            if self.pass { "pass" } else { "FAIL" }
        )
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
        println!(
            "  expect {} {}: {} ({})",
            j.name,
            j.bound,
            j.figures_text(),
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
            s += &format!(
                "| {} | {} | {} | {} |\n",
                j.name,
                j.bound,
                j.figures_text(),
                if j.pass { "pass" } else { "FAIL" }
            );
        }
    }
    s + "\nEvery sample is in tolerance.csv, the statistics in tolerance.json.\n"
}

/// `merge` of tolerance shards: every kept sample of the folders, each a
/// whole set (values and key), copied into `out/samples`; a sample found
/// twice must be the same. The number gathered.
pub fn gather(folders: &[std::path::PathBuf], out: &Path) -> Result<usize, String> {
    let folder = OutputFolder::open(out)?;
    let mut seen: BTreeMap<String, String> = BTreeMap::new();
    for f in folders {
        let Ok(entries) = std::fs::read_dir(f.join("samples")) else { continue };
        for e in entries.flatten() {
            let label = e.file_name().to_string_lossy().into_owned();
            let (Ok(key), Ok(values)) = (
                std::fs::read_to_string(e.path().join("sample.hash")),
                std::fs::read(e.path().join("values.json")),
            ) else {
                continue;
            };
            match seen.get(&label) {
                Some(k) if *k == key => continue,
                Some(_) => return Err(format!("{} holds sample {label} of another case or run than the other folders", f.display())),
                None => {}
            }
            let files: crate::output::FileSet = vec![("values.json".into(), values), ("sample.hash".into(), key.clone().into_bytes())];
            folder.commit(&Path::new("samples").join(&label), &files)?;
            seen.insert(label, key);
        }
    }
    if seen.is_empty() {
        return Err("no whole tolerance samples in these folders".into());
    }
    Ok(seen.len())
}
