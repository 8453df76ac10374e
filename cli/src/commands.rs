//! The commands: each returns the process exit code
//! (0 success, 1 an expectation failed, 2 bad input, 3 not converged).

use crate::case::suggest;
use crate::output;
use crate::output::folder::OutputFolder;
use crate::output::svg::ChartAxis;
use crate::progress::Progress;
use crate::run::{self, Failure, Limits, Loaded, Outcome, Variant};
use crate::sweep;
use crate::variants::{describe, design_questions, unused_sweep_parameter};
use rayon::prelude::*;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use study::materials;
use study::results::Verdict;

fn fail(f: &Failure) -> i32 {
    eprint!("{}", f.message());
    f.exit_code()
}

/// Parses `--set NAME=VALUE` pairs.
fn overrides(set: &[String]) -> Result<BTreeMap<String, f64>, Failure> {
    let mut out = BTreeMap::new();
    for s in set {
        let Some((k, v)) = s.split_once('=') else {
            return Err(Failure::Input(format!("error: --set {s}: expected NAME=VALUE, for example --set gap=2.5\n")));
        };
        let value: f64 = v.trim().parse().map_err(|_| {
            // "4mm": a number with a unit, which --set does not take.
            let number: String = v.trim().chars().take_while(|c| c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | 'e' | 'E')).collect();
            let hint = if !number.is_empty() && number.parse::<f64>().is_ok() {
                format!("\n      = help: --set takes a plain number, in the units the case uses for that parameter (its unit comes from where the case uses it): --set {k}={number}")
            } else {
                String::new()
            };
            Failure::Input(format!("error: --set {s}: '{v}' is not a number{hint}\n"))
        })?;
        if !value.is_finite() {
            return Err(Failure::Input(format!("error: --set {s}: the value must be finite\n")));
        }
        out.insert(k.trim().to_string(), value);
    }
    Ok(out)
}

fn default_output(loaded: &Loaded, output: Option<PathBuf>) -> PathBuf {
    output.unwrap_or_else(|| PathBuf::from(format!("{}-results", loaded.stem())))
}

fn parse_shard(s: &str) -> Result<(usize, usize), Failure> {
    let bad = || Failure::Input(format!("error: --shard {s}: expected K/N with 0 <= K < N, for example --shard 0/3\n"));
    let (k, n) = s.split_once('/').ok_or_else(bad)?;
    let (k, n): (usize, usize) = (k.trim().parse().map_err(|_| bad())?, n.trim().parse().map_err(|_| bad())?);
    if n == 0 || k >= n {
        return Err(bad());
    }
    Ok((k, n))
}

pub fn solve(case: &Path, output: Option<PathBuf>, set: &[String], max_elements: Option<usize>, shard: Option<&str>, force: bool, quiet: bool) -> i32 {
    match solve_inner(case, output, set, max_elements, shard, force, quiet) {
        Ok(code) => code,
        Err(f) => fail(&f),
    }
}

fn solve_inner(
    case: &Path,
    output: Option<PathBuf>,
    set: &[String],
    max_elements: Option<usize>,
    shard: Option<&str>,
    force: bool,
    quiet: bool,
) -> Result<i32, Failure> {
    let progress = Progress::new(quiet);
    let loaded = run::load(case)?;
    let limits = Limits {
        max_elements,
        ..Default::default()
    };
    solve_loaded(&loaded, output, &overrides(set)?, &limits, shard, force, &progress)
}

/// `solve` on a case already read (from a file, or the Python package's
/// text): a single study, a sweep, a seek, a tolerance study or an
/// optimization, into its output folder; the exit code.
pub fn solve_loaded(
    loaded: &Loaded,
    output: Option<PathBuf>,
    overrides: &BTreeMap<String, f64>,
    limits: &Limits,
    shard: Option<&str>,
    force: bool,
    progress: &Progress,
) -> Result<i32, Failure> {
    let mut variants = run::variants(loaded, overrides)?;
    // Input errors that every variant shares (a misspelled name, a bad unit)
    // are found before any folder is made or mesh built.
    let (seek, tolerance, optimize) = design_questions(loaded, &variants, limits)?;
    let shard = shard.map(|s| parse_shard(s).map(|kn| (s, kn))).transpose()?;
    if (seek.is_some() || optimize.is_some()) && shard.is_some() {
        return Err(Failure::Input(
            "error: --shard splits a sweep's variants or a tolerance study's samples; a [seek] or [optimize] runs its evaluations itself\n".into(),
        ));
    }
    if let (Some((s, (k, n))), None) = (shard, &tolerance) {
        if variants.len() == 1 && variants[0].label.is_empty() {
            return Err(Failure::Input(format!(
                "error: --shard {s}: {} has no [sweep] nor [tolerance]; shards split a sweep's variants or a tolerance study's samples\n",
                loaded.path.display()
            )));
        }
        let all = variants.len();
        variants.retain(|v| v.index % n == k);
        if variants.is_empty() {
            return Err(Failure::Input(format!(
                "error: --shard {s}: the sweep has {all} variants, so shard {k} of {n} has none\n"
            )));
        }
    }
    let out = default_output(loaded, output);
    let folder = OutputFolder::open(&out).map_err(|e| Failure::Input(format!("error: {e}\n")))?;
    if let Some(spec) = &seek {
        return crate::seek::solve(loaded, spec, &variants[0], &folder, limits, progress);
    }
    if let Some(tol) = &tolerance {
        let run = crate::tolerance::Run {
            shard: shard.map(|s| s.1),
            force,
        };
        return crate::tolerance::solve(loaded, tol, &variants[0], &folder, limits, progress, run);
    }
    if let Some(spec) = &optimize {
        return crate::optimize::solve(loaded, spec, &variants[0], &folder, limits, progress);
    }
    let swept = variants.first().is_some_and(|v| !v.label.is_empty());
    if !swept {
        let outcome = run::solve_variant(loaded, &variants[0], limits, progress)?;
        progress.finish();
        folder
            .commit(Path::new(""), &outcome.files)
            .map_err(|e| Failure::Input(format!("error: {e}\n")))?;
        print!("{}", crate::summary::summary(&outcome, &out));
        return Ok(if outcome.results.solve.converged {
            expectation_code(&outcome)
        } else {
            not_converged(&outcome, true)
        });
    }
    solve_sweep(loaded, &variants, &folder, limits, force, progress)
}

/// 1 when an expectation failed, else 0 (as `check` and the README have it).
fn expectation_code(o: &Outcome) -> i32 {
    i32::from(o.results.expect.iter().any(|e| !e.pass))
}

/// Solves a sweep's variants into their folders (skipping those already
/// whole for the same model), then writes the sweep table of exactly these
/// variants: a failed variant is named, and the others still get their table.
fn solve_sweep(loaded: &Loaded, variants: &[Variant], folder: &OutputFolder, limits: &Limits, force: bool, progress: &Progress) -> Result<i32, Failure> {
    let out = folder.path();
    let case = sweep::case_hash(&loaded.text);
    // Each variant's key from its resolved model; a variant that cannot be
    // resolved (a zero-size part at one value) fails alone.
    let keys: Vec<Result<String, Failure>> = variants
        .iter()
        .map(|v| run::resolve(loaded, &v.params, limits).map(|r| sweep::variant_key(case, v, &r.model)))
        .collect();
    unused_sweep_parameter(loaded, variants, &keys)?;
    let results: Vec<(usize, Result<Outcome, Failure>)> = variants
        .par_iter()
        .zip(&keys)
        .enumerate()
        .filter(|(_, (v, key))| force || !key.as_ref().is_ok_and(|k| sweep::is_whole(out, v, k)))
        .map(|(i, (v, key))| {
            let solved = match key {
                Err(f) => Err(Failure::Input(f.message().to_string())),
                Ok(key) => run::solve_variant(loaded, v, limits, progress).and_then(|o| {
                    let mut files = o.files.clone();
                    files.push(("variant.hash".into(), key.clone().into_bytes()));
                    folder
                        .commit(Path::new(&v.label), &files)
                        .map_err(|e| Failure::Input(format!("error: {e}\n")))?;
                    Ok(o)
                }),
            };
            (i, solved)
        })
        .collect();
    progress.finish();
    let mut code = 0;
    let mut failed = Vec::new();
    for (i, r) in &results {
        match r {
            Err(f) => {
                eprint!("error: variant {} ({}) failed:\n{}", variants[*i].label, describe(&variants[*i]), f.message());
                failed.push(f.exit_code());
            }
            Ok(o) if !o.results.solve.converged => code = code.max(not_converged(o, true)),
            Ok(o) => code = code.max(expectation_code(o)),
        }
    }
    let labels: Vec<(&str, &str)> = variants
        .iter()
        .zip(&keys)
        .filter_map(|(v, k)| k.as_ref().ok().map(|k| (v.label.as_str(), k.as_str())))
        .collect();
    let rows = sweep::rows_of_run(out, &labels).map_err(|e| Failure::Input(format!("error: {e}\n")))?;
    if !rows.is_empty() {
        // The charts follow the case's [output] chart keys (read from the first variant).
        let axis = variants
            .first()
            .and_then(|v| run::resolve(loaded, &v.params, limits).ok())
            .map_or_else(ChartAxis::default, |r| ChartAxis::of(&r.model.output));
        folder
            .commit(Path::new(""), &sweep::summary_files(&rows, &axis))
            .map_err(|e| Failure::Input(format!("error: {e}\n")))?;
    }
    println!(
        "{}: {} variants solved ({} already whole, {} failed), sweep table of {} in {}",
        loaded.path.display(),
        results.len() - failed.len(),
        variants.len() - results.len(),
        failed.len(),
        rows.len(),
        out.join("sweep.csv").display()
    );
    for line in crate::many_warnings::summary_lines("variants", rows.len(), &sweep::warned(&rows), "sweep-report.md") {
        println!("{line}");
    }
    Ok(failed.into_iter().fold(code, i32::max))
}

/// Reports a solve that did not converge; `written` says whether its last
/// iterate went to the output folder (`solve`) or nowhere (`check`).
fn not_converged(o: &Outcome, written: bool) -> i32 {
    let h: Vec<String> = o.results.solve.residual_history.iter().map(|r| format!("{r:.2e}")).collect();
    eprintln!(
        "error: {}: Newton-Raphson did not converge in {} iterations; residual history: {}",
        o.model.title,
        o.results.solve.iterations,
        h.join(" ")
    );
    let what = if written {
        "the last iterate was written and marked unconverged"
    } else {
        "nothing was written"
    };
    eprintln!("       {what}; try a finer mesh in saturated steel, or check the B-H data");
    3
}

pub fn check(cases: &[PathBuf], junit: Option<PathBuf>, set: &[String], max_elements: Option<usize>, quiet: bool) -> i32 {
    let progress = Progress::new(quiet);
    let limits = Limits {
        max_elements,
        ..Default::default()
    };
    let over = match overrides(set) {
        Ok(o) => o,
        Err(f) => return fail(&f),
    };
    let mut worst = 0;
    let mut suites = Vec::new();
    for case in cases {
        match check_case(case, &over, &limits, &progress) {
            Ok((code, suite)) => {
                worst = worst.max(code);
                suites.push(suite);
            }
            Err(f) => {
                worst = worst.max(fail(&f));
                // A case that cannot be read or solved is a failed test, not a missing one.
                suites.push(crate::junit::Suite {
                    name: case.display().to_string(),
                    cases: vec![crate::junit::Case {
                        name: "load and solve".into(),
                        message: Some(f.message().trim().to_string()),
                    }],
                });
            }
        }
    }
    progress.finish();
    if let Some(path) = junit {
        if let Err(e) = output::write_file(&path, crate::junit::report(&suites).into_bytes()) {
            eprintln!("error: {e}");
            return 2;
        }
    }
    // Input errors (2) and non-convergence (3) outrank failed expectations (1).
    worst
}

/// One case's expectations: the exit code and the JUnit suite.
fn check_case(case: &Path, over: &BTreeMap<String, f64>, limits: &Limits, progress: &Progress) -> Result<(i32, crate::junit::Suite), Failure> {
    let loaded = run::load(case)?;
    let variants = run::variants(&loaded, over)?;
    design_questions(&loaded, &variants, limits)?;
    let outcomes: Vec<Result<Outcome, Failure>> = variants.par_iter().map(|v| run::solve_variant(&loaded, v, limits, progress)).collect();
    progress.finish();
    let mut suite = crate::junit::Suite {
        name: loaded.path.display().to_string(),
        cases: Vec::new(),
    };
    let mut code = 0;
    for (v, o) in variants.iter().zip(outcomes) {
        let o = o?;
        for e in &o.results.expect {
            if e.actual.is_none() {
                let names: Vec<&str> = o.results.values.keys().map(String::as_str).collect();
                let help = suggest::closest(&e.value, names.iter().copied()).map_or_else(
                    || format!("the values this case produces: {}", names.join(", ")),
                    |c| format!("did you mean '{c}'?"),
                );
                return Err(Failure::Input(format!(
                    "error: {}: [[expect]] names the value '{}', which this case does not produce\n      = help: {help}\n",
                    loaded.path.display(),
                    e.value
                )));
            }
        }
        let converged = o.results.solve.converged;
        if !converged {
            code = code.max(not_converged(&o, false));
        }
        // Variants named by their parameters, not only by number.
        let tag = if v.label.is_empty() {
            String::new()
        } else {
            format!(" [{}: {}]", v.label, describe(v))
        };
        println!("{}{tag}", loaded.path.display());
        println!("  {:<36} {:<24} {:>24}  result", "value", "bound", "actual");
        for e in &o.results.expect {
            let unit = o.results.units.get(&e.value).copied().unwrap_or("");
            let actual = e.actual.map_or("-".into(), |a| crate::output::engineering::eng_pm(a, e.error, unit));
            // An expectation on an unconverged solution cannot pass: its value is not the answer.
            let pass = e.pass && converged;
            let verdict = match (e.verdict, converged) {
                (Verdict::Pass, true) => "pass",
                (Verdict::Pass, false) => "FAIL (not converged)",
                (Verdict::Undecided, _) => "UNDECIDED (counts as a failure)",
                (Verdict::Fail, _) => "FAIL",
            };
            println!("  {:<36} {:<24} {:>24}  {verdict}", e.value, e.bound, actual);
            if let Some(note) = &e.note {
                println!("    ({note})");
            }
            if !pass {
                code = code.max(1);
            }
            let message = match e.verdict {
                Verdict::Fail => Some(format!(
                    "{} = {} is outside {}{}",
                    e.value,
                    actual,
                    e.bound,
                    e.note.as_ref().map_or(String::new(), |n| format!(" ({n})"))
                )),
                Verdict::Undecided => Some(format!(
                    "{} = {}: the bound {} lies within the value's estimated error, and refinement stopped at max_elements; tighten [study] accuracy or raise [mesh] max_elements",
                    e.value, actual, e.bound
                )),
                Verdict::Pass => (!converged).then(|| format!("{} = {} holds, but the solution did not converge", e.value, actual)),
            };
            suite.cases.push(crate::junit::Case {
                name: format!("{}{tag}", e.value),
                message,
            });
        }
        // A magnet past its knee over more than 1 % of its volume, or that
        // loses more than 1 % of its flux irreversibly, fails `check`
        // unless the case allows it.
        if !o.model.allow.iter().any(|a| a == "demagnetization") {
            for (name, m) in &o.results.magnets {
                let Some(why) = demagnetization(m) else { continue };
                code = code.max(1);
                println!("  magnet {name}: {why}  FAIL (demagnetization; allow = [\"demagnetization\"] in [study] if intended)");
                suite.cases.push(crate::junit::Case {
                    name: format!("demagnetization of magnet {name}{tag}"),
                    message: Some(format!("magnet '{name}': {why}")),
                });
            }
        }
        if o.results.expect.is_empty() && !o.model.expects.iter().any(|x| x.statistic.is_some()) {
            println!("  (no [[expect]] in this case)");
        }
        // The design's warnings, as `solve` shows them (they fail nothing by themselves).
        for w in &o.results.warnings {
            println!("  warning: {w}");
        }
        code = code.max(crate::tolerance::check(&loaded, v, &o, limits, progress, &mut suite)?);
    }
    Ok((code, suite))
}

pub fn mesh(case: &Path, output: Option<PathBuf>, set: &[String], max_elements: Option<usize>, quiet: bool) -> i32 {
    let progress = Progress::new(quiet);
    let go = || -> Result<(), Failure> {
        let loaded = run::load(case)?;
        let variants = run::variants(&loaded, &overrides(set)?)?;
        let resolved = run::resolve(
            &loaded,
            &variants[0].params,
            &Limits {
                max_elements,
                ..Default::default()
            },
        )?;
        progress.note(&format!("{}: meshing", loaded.stem()));
        let mesh = run::mesh(&loaded, &resolved)?;
        let model = resolved.model;
        progress.finish();
        let out = default_output(&loaded, output.clone());
        let vtu = output::vtk::mesh_vtu(&model, &mesh).map_err(|e| Failure::Input(format!("error: {e}\n")))?;
        let svg = output::svg::mesh_svg(&model, &mesh).into_bytes();
        OutputFolder::open(&out)
            .and_then(|f| f.commit(Path::new(""), &vec![("mesh.vtu".into(), vtu), ("mesh.svg".into(), svg)]))
            .map_err(|e| Failure::Input(format!("error: {e}\n")))?;
        let q = mesh.quality();
        let (air, per) = mesh.triangles_per_part(model.parts.len());
        println!(
            "{}: {} nodes, {} triangles, minimum angle {:.1} deg",
            loaded.path.display(),
            mesh.n_physical,
            mesh.triangles.len(),
            q.min_angle_deg
        );
        println!("  {:<24} {:>10}", "air", air);
        for (p, n) in model.parts.iter().zip(per) {
            println!("  {:<24} {:>10}", p.name, n);
        }
        println!("wrote {} and {}", out.join("mesh.vtu").display(), out.join("mesh.svg").display());
        Ok(())
    };
    match go() {
        Ok(()) => 0,
        Err(f) => fail(&f),
    }
}

pub fn materials(name: Option<&str>, plot: Option<PathBuf>) -> i32 {
    let Some(name) = name else {
        print!("{}", crate::library_text::listing());
        return 0;
    };
    let Some(entry) = materials::lookup(name) else {
        let names = materials::names();
        let help = suggest::closest(name, names.iter().map(String::as_str)).map_or_else(String::new, |c| format!("\n      = help: did you mean '{c}'?"));
        eprintln!("error: no built-in material named '{name}'{help}");
        return 2;
    };
    print!("{}", crate::library_text::entry(&entry));
    if let Some(path) = plot {
        if let Err(e) = output::write_file(&path, crate::output::svg::material_plot(&entry).into_bytes()) {
            eprintln!("error: {e}");
            return 2;
        }
    }
    0
}

pub fn merge(folders: &[PathBuf], out: &Path) -> i32 {
    if folders.iter().any(|f| f.join("samples").is_dir()) {
        return match crate::tolerance::gather(folders, out) {
            Ok(n) => {
                println!(
                    "gathered {n} tolerance samples into {}; `lodestone solve CASE -o {}` finishes the study from them",
                    out.join("samples").display(),
                    out.display()
                );
                0
            }
            Err(e) => {
                eprintln!("error: {e}");
                2
            }
        };
    }
    match sweep::rows_from_folders(folders) {
        Ok(rows) => {
            let written = OutputFolder::open(out).and_then(|f| f.commit(Path::new(""), &sweep::summary_files(&rows, &ChartAxis::default())));
            if let Err(e) = written {
                eprintln!("error: {e}");
                return 2;
            }
            println!("merged {} variants into {}", rows.len(), out.join("sweep.csv").display());
            0
        }
        Err(e) => {
            eprintln!("error: {e}");
            2
        }
    }
}

/// Why a magnet fails `check` for demagnetization, or None.
fn demagnetization(m: &study::results::MagnetResult) -> Option<String> {
    study::checks::demagnetized(m.irreversible_loss, m.margin, m.share_past_knee)
}
