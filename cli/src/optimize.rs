//! `lodestone solve` on a case with `[optimize]`: the search's evaluations
//! (each a study solved to the optimization's accuracy, no files), then
//! the case solved in full at the optimum, written with optimize.json,
//! optimize.csv, optimize.svg and optimum.toml as one set.

use crate::case::resolve::Optimize;
use crate::output::folder::OutputFolder;
use crate::output::svg::{chart, Chart};
use crate::progress::Progress;
use crate::run::{self, Failure, Limits, Loaded, Variant};
use std::collections::BTreeMap;
use std::path::Path;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Mutex;
use study::optimize::{Optimum, Point, Search};
use study::results::Verdict;

/// One evaluation: the study at `x` solved to the search's accuracy; the
/// objective (negated when maximized) and each constraint's margin.
/// What every evaluation shares: the evaluations' count (their numbers in
/// the progress lines) and the warnings they gave, by number.
struct Log {
    count: AtomicUsize,
    warned: Mutex<Vec<(usize, crate::many_warnings::Warned)>>,
}

fn evaluate(loaded: &Loaded, base: &Variant, spec: &Optimize, x: &[f64], limits: &Limits, progress: &Progress, log: &Log) -> Result<Point, Failure> {
    let mut params = base.params.clone();
    for ((name, _), v) in spec.vary.iter().zip(x) {
        params.insert(name.clone(), *v);
    }
    let at = || {
        spec.vary
            .iter()
            .zip(x)
            .map(|((n, _), v)| format!("{n} = {v:.6}"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    // Resolved at the search's accuracy, as if the case asked for it: the
    // default element order and first mesh follow it.
    let searched = Limits {
        accuracy: Some(Some(spec.accuracy)),
        ..*limits
    };
    let resolved = run::resolve(loaded, &params, &searched)?;
    let mut model = resolved.model;
    // The case's `[[expect]]` lines are judged at the optimum's own solve;
    // here they would refine every evaluation near their bound until it is
    // decided (which the search, sitting on its constraint by design, would
    // pay for at each of its last steps: 6 s each in cheapest-holding-magnet).
    // The constraints are met within the evaluation's error below.
    model.expects.clear();
    // Nor does an evaluation make the stray field's values unless the
    // search reads one (they refine nothing: the rest is the same).
    model.stray_field = spec
        .objective
        .names
        .iter()
        .chain(spec.constraints.iter().map(|c| &c.value))
        .any(|n| study::model::is_stray_value(n));
    let results = study::run::run(&model, &|_| {}).map_err(|e| match e.origin {
        Some(_) => loaded.study_error(&resolved.spans, &e),
        None => Failure::Input(format!("error: {}: at {}: {e}\n", loaded.path.display(), at())),
    })?;
    if !results.solve.converged {
        return Err(Failure::Input(format!(
            "error: {}: the study did not converge at {}, so the optimization cannot go on\n",
            loaded.path.display(),
            at()
        )));
    }
    let Some((objective, objective_error)) = spec.objective.evaluate(&results.values, &results.errors) else {
        return Err(Failure::Input(format!(
            "error: {}: the objective '{}' has no value at {}\n",
            loaded.path.display(),
            spec.objective.text,
            at()
        )));
    };
    // A constraint counts as met where it holds for every value within the
    // evaluation's estimated error, so the search does not settle on a
    // point whose constraint its own accuracy cannot confirm.
    let found: Vec<[f64; 2]> = spec
        .constraints
        .iter()
        .map(|c| {
            [
                results.values.get(&c.value).copied().unwrap_or(f64::NAN),
                results.errors.get(&c.value).copied().unwrap_or(0.0),
            ]
        })
        .collect();
    let margins = spec.constraints.iter().zip(&found).map(|(c, [v, e])| c.margin(*v) - e).collect::<Vec<_>>();
    let k = log.count.fetch_add(1, Ordering::Relaxed) + 1;
    // An evaluation's warnings (a design the search passed through with a
    // plate inside its magnet) are listed beside the optimum's own.
    if !results.warnings.is_empty() {
        let warned = crate::many_warnings::Warned {
            label: format!("evaluation #{k} ({})", at()),
            warnings: results.warnings.clone(),
        };
        log.warned.lock().unwrap_or_else(|e| e.into_inner()).push((k, warned));
    }
    let held: String = spec
        .constraints
        .iter()
        .zip(&found)
        .zip(&margins)
        .map(|((c, [v, e]), m)| {
            let unit = results.units.get(&c.value).copied().unwrap_or("");
            let status = constraint_status(c.margin(*v), *m);
            format!("; {} = {} ({status})", c.value, crate::output::engineering::eng_pm(*v, Some(*e), unit))
        })
        .collect();
    progress.note(&format!(
        "{}: optimize #{k}: {}: {} = {objective:.6e}{held}",
        loaded.stem(),
        at(),
        spec.objective.text
    ));
    Ok(Point {
        x: x.to_vec(),
        objective: if spec.objective.maximize { -objective } else { objective },
        margins: margins.into_iter().map(|m| if m.is_nan() { -f64::INFINITY } else { m }).collect(),
        // The log's columns: the objective's error, then each constrained
        // value and its error as solved (the margins above hold the error
        // back, so the value cannot be read off them).
        reported: std::iter::once(objective_error).chain(found.into_iter().flatten()).collect(),
    })
}

/// How an evaluation stands against a constraint, for its progress line:
/// `margin` as solved and `net` with the evaluation's error held back (what
/// the search counts as met).
fn constraint_status(margin: f64, net: f64) -> &'static str {
    if net >= 0.0 {
        "met"
    } else if margin >= 0.0 {
        "met, but not beyond its error"
    } else {
        "broken"
    }
}

/// Runs the optimization, then the full case at the optimum; exit code as
/// `solve`, and 1 when no candidate met every constraint.
pub fn solve(loaded: &Loaded, spec: &Optimize, base: &Variant, folder: &OutputFolder, limits: &Limits, progress: &Progress) -> Result<i32, Failure> {
    let search = Search {
        bounds: spec.vary.iter().map(|v| v.1).collect(),
        start: spec
            .vary
            .iter()
            .map(|(n, b)| base.params.get(n).copied().unwrap_or(0.5 * (b[0] + b[1])).clamp(b[0], b[1]))
            .collect(),
        constraints: spec.constraints.len(),
        max_evaluations: spec.max_evaluations,
        design_points: spec.design,
        x_tolerance: spec.tolerance,
        seed: spec.seed,
    };
    let log = Log {
        count: AtomicUsize::new(0),
        warned: Mutex::new(Vec::new()),
    };
    let optimum = study::optimize::optimize(&search, |x| evaluate(loaded, base, spec, x, limits, progress, &log))?;
    let mut warned = log.warned.into_inner().unwrap_or_else(|e| e.into_inner());
    warned.sort_by_key(|w| w.0);
    let warned: Vec<crate::many_warnings::Warned> = warned.into_iter().map(|w| w.1).collect();
    let mut at = base.clone();
    for ((name, _), v) in spec.vary.iter().zip(&optimum.best.x) {
        at.params.insert(name.clone(), *v);
    }
    let mut outcome = run::solve_variant(loaded, &at, limits, progress)?;
    progress.finish();
    let params: BTreeMap<String, f64> = spec.vary.iter().map(|(n, _)| (n.clone(), at.params[n])).collect();
    let asked: Vec<String> = spec.objective.names.iter().chain(spec.constraints.iter().map(|c| &c.value)).cloned().collect();
    let pick = |m: &BTreeMap<String, f64>| -> BTreeMap<String, f64> { asked.iter().filter_map(|n| m.get(n).map(|v| (n.clone(), *v))).collect() };
    let (values, errors) = (pick(&outcome.results.values), pick(&outcome.results.errors));
    let objective = spec.objective.evaluate(&outcome.results.values, &outcome.results.errors);
    let at_optimum = constraints_at_optimum(spec, &outcome.results);
    let json = serde_json::json!({
        "objective": spec.objective.text,
        "sense": if spec.objective.maximize { "maximize" } else { "minimize" },
        "objective_value": objective.map(|o| o.0),
        "objective_error": objective.map(|o| o.1),
        "feasible": optimum.feasible,
        "params": params,
        "values": values,
        "errors": errors,
        "subject_to": spec.constraints.iter().map(|c| c.text.clone()).collect::<Vec<_>>(),
        "constraints_at_optimum": at_optimum.iter().map(|c| serde_json::json!({ "constraint": c.text, "value": c.value, "error": c.error, "verdict": verdict_word(c.verdict) })).collect::<Vec<_>>(),
        "evaluations": optimum.evaluations.len(),
        "warnings": crate::many_warnings::json("evaluation", &warned),
        "stop": optimum.stop,
        "accuracy_of_evaluations": spec.accuracy,
        "note": "values and errors in SI; params in the case's own units. The optimum is the best evaluation found by COBYLA after a parallel Latin-hypercube start, then up to three steps of feasibility restoration where COBYLA's own best breaks a constraint by a hair; the search stops when its steps fall below the tolerance share of each range. Evaluations are solved to accuracy_of_evaluations, and a constraint counts as met there where it holds within the evaluation's estimated error; the case at the optimum is solved to the case's own accuracy, and constraints_at_optimum judges each constraint there within that solve's error."
    });
    let encoded = serde_json::to_vec_pretty(&json).map_err(|e| Failure::Input(format!("error: cannot encode optimize.json: {e}\n")))?;
    outcome.files.push(("optimize.json".into(), encoded));
    outcome.files.push(("optimize.csv".into(), evaluations_csv(spec, &optimum).into_bytes()));
    outcome.files.push(("optimize.svg".into(), history_chart(spec, &optimum).into_bytes()));
    outcome.files.push(("optimum.toml".into(), optimum_case(&loaded.text, &params).into_bytes()));
    let section =
        report_section(spec, &optimum, &params, objective, &at_optimum) + &crate::many_warnings::markdown("evaluations", optimum.evaluations.len(), &warned);
    crate::output::report::add_section(&mut outcome.files, &section);
    folder
        .commit(Path::new(""), &outcome.files)
        .map_err(|e| Failure::Input(format!("error: {e}\n")))?;
    print!("{}", crate::summary::summary(&outcome, folder.path()));
    let p: Vec<String> = params.iter().map(|(k, v)| format!("{k} = {v:.6}")).collect();
    println!(
        "  optimize: {} {} = {} at {} ({}), {} evaluations, stopped because {}; optimum.toml is the case at the optimum",
        if spec.objective.maximize { "largest" } else { "smallest" },
        spec.objective.text,
        objective.map_or("-".into(), |o| crate::output::engineering::eng_pm(o.0, Some(o.1), spec.objective.unit)),
        p.join(", "),
        constraints_state(optimum.feasible, &at_optimum),
        optimum.evaluations.len(),
        optimum.stop
    );
    for c in at_optimum.iter().filter(|c| c.verdict != Verdict::Pass) {
        // Only an undecided constraint is helped by a tighter accuracy; a
        // broken one needs the design space (the bounds of `vary`) or the
        // bound itself moved.
        let hint = match (c.verdict, optimum.feasible) {
            (Verdict::Undecided, _) => "a tighter [study] accuracy would decide it",
            (_, true) => "the search's evaluation met it and the optimum's own solve does not: tighten [optimize] accuracy",
            (_, false) => "no design the search reached within the bounds of `vary` meets it; widen them or relax the bound",
        };
        println!(
            "  constraint {}: {} at the optimum ({}); {hint}",
            c.text,
            verdict_word(c.verdict),
            c.value.map_or("no value".into(), |v| crate::output::engineering::eng_pm(v, c.error, c.unit))
        );
    }
    // One line: the search's designs are not the answer, and most of what
    // they warn of (a plate saturating at a corner of the box) is the design
    // space, not a mistake; the optimum's own warnings are above.
    if let Some(note) = crate::many_warnings::search_note(&warned, optimum.evaluations.len(), "optimize.json", "optimum") {
        println!("{note}");
    }
    if !optimum.feasible || at_optimum.iter().any(|c| c.verdict != Verdict::Pass) {
        return Ok(1);
    }
    Ok(i32::from(!outcome.results.solve.converged) * 3)
}

/// A constraint at the optimum's full solve (the case's own accuracy).
struct AtOptimum {
    text: String,
    value: Option<f64>,
    error: Option<f64>,
    unit: &'static str,
    /// Within the value's estimated error there, as an `[[expect]]` is judged.
    verdict: Verdict,
}

/// Each constraint judged at the optimum's full solve: the search's
/// evaluations were solved to the search's accuracy, the answer to the
/// case's, and its constraints must hold within that answer's error.
fn constraints_at_optimum(spec: &Optimize, results: &study::Results) -> Vec<AtOptimum> {
    spec.constraints
        .iter()
        .map(|c| {
            let value = results.values.get(&c.value).copied();
            let error = results.errors.get(&c.value).copied();
            AtOptimum {
                text: c.text.clone(),
                value,
                error,
                unit: results.units.get(&c.value).copied().unwrap_or(""),
                verdict: value.map_or(Verdict::Fail, |v| study::estimate::verdict(&c.as_bound(), v, error.unwrap_or(0.0))),
            }
        })
        .collect()
}

/// Whether the constraints hold, in words: the search found no feasible
/// evaluation, or each holds within its error at the optimum, or not.
fn constraints_state(feasible: bool, at_optimum: &[AtOptimum]) -> &'static str {
    if !feasible {
        "NO evaluation met every constraint"
    } else if at_optimum.iter().all(|c| c.verdict == Verdict::Pass) {
        "every constraint met at the optimum within its error"
    } else {
        "a constraint is NOT MET within its error at the optimum"
    }
}

/// A verdict as optimize.json writes it.
fn verdict_word(v: Verdict) -> &'static str {
    match v {
        Verdict::Pass => "pass",
        Verdict::Fail => "fail",
        Verdict::Undecided => "undecided",
    }
}

/// Natural-sign objective of a point.
fn natural(spec: &Optimize, p: &Point) -> f64 {
    if spec.objective.maximize {
        -p.objective
    } else {
        p.objective
    }
}

/// optimize.csv: every evaluation in order, parameters, objective, each
/// constrained value, each with its estimated error, and whether all
/// constraints held within those errors.
fn evaluations_csv(spec: &Optimize, o: &Optimum) -> String {
    let mut s = String::from("evaluation");
    for (n, _) in &spec.vary {
        s += &format!(",{n}");
    }
    let unit = if spec.objective.unit.is_empty() { "SI" } else { spec.objective.unit };
    s += &format!(",objective [{unit}],objective.error [{unit}]");
    for c in &spec.constraints {
        s += &format!(",{0},{0}.error", c.value);
    }
    s += ",feasible\n";
    for (i, p) in o.evaluations.iter().enumerate() {
        s += &format!("{}", i + 1);
        for v in &p.x {
            s += &format!(",{v}");
        }
        s += &format!(",{}", natural(spec, p));
        for v in &p.reported {
            s += &format!(",{v}");
        }
        s += &format!(",{}\n", p.violation() == 0.0);
    }
    s
}

/// optimize.svg: the objective of each evaluation, feasible ones as dots,
/// and the best so far as a line.
fn history_chart(spec: &Optimize, o: &Optimum) -> String {
    let mut best: Option<&Point> = None;
    let mut line = Vec::new();
    let mut dots = Vec::new();
    for (i, p) in o.evaluations.iter().enumerate() {
        let x = (i + 1) as f64;
        if p.violation() == 0.0 {
            if best.is_none_or(|b| p.objective < b.objective) {
                best = Some(p);
            }
            dots.push([x, natural(spec, p)]);
        }
        if let Some(b) = best {
            line.push([x, natural(spec, b)]);
        }
    }
    let title = format!("{}: {}", if spec.objective.maximize { "maximize" } else { "minimize" }, spec.objective.text);
    let y = if spec.objective.unit.is_empty() {
        "objective".to_string()
    } else {
        format!("objective ({})", spec.objective.unit)
    };
    chart(&Chart {
        title: &title,
        x_label: "evaluation",
        y_label: &y,
        series: vec![("best so far".into(), line)],
        scatter: vec![("feasible evaluations".into(), dots)],
        ..Default::default()
    })
}

/// The case text with each varied parameter set to its optimum in
/// `[params]` and the `[optimize]` table left out: solving it gives the
/// optimum's results directly.
fn optimum_case(text: &str, params: &BTreeMap<String, f64>) -> String {
    let mut out = String::from("# The case at the optimum found by its optimization (that table is left out).\n");
    let mut section = String::new();
    for line in text.lines() {
        let t = line.trim_start();
        if t.starts_with('[') {
            section = t.trim_end().to_string();
        }
        if section == "[optimize]" {
            continue;
        }
        let key = t.split('=').next().unwrap_or("").trim();
        match params.get(key) {
            Some(v) if section == "[params]" && t.contains('=') => out += &format!("{key} = {v}\n"),
            _ => {
                out += line;
                out.push('\n');
            }
        }
    }
    out
}

/// The report's section on the optimization.
fn report_section(spec: &Optimize, o: &Optimum, params: &BTreeMap<String, f64>, objective: Option<(f64, f64)>, at_optimum: &[AtOptimum]) -> String {
    let mut s = format!(
        "## Optimization\n\n{} `{}`{} over {}: {} evaluations ({} in the parallel start), each solved to {} %; the search stopped because {}; {}.\n\n| parameter | range | optimum |\n|---|---|---|\n",
        if spec.objective.maximize { "Maximize" } else { "Minimize" },
        spec.objective.text,
        if spec.constraints.is_empty() { String::new() } else { format!(" subject to {}", spec.constraints.iter().map(|c| format!("`{}`", c.text)).collect::<Vec<_>>().join(", ")) },
        spec.vary.iter().map(|v| v.0.as_str()).collect::<Vec<_>>().join(", "),
        o.evaluations.len(),
        spec.design + 1,
        100.0 * spec.accuracy,
        o.stop,
        constraints_state(o.feasible, at_optimum)
    );
    for (n, b) in &spec.vary {
        s += &format!("| {n} | {} .. {} | {:.6} |\n", b[0], b[1], params[n]);
    }
    if let Some((v, e)) = objective {
        s += &format!(
            "\nObjective at the optimum: {}. The history is optimize.svg, every evaluation optimize.csv, the case at the optimum optimum.toml.\n\n",
            crate::output::engineering::eng_pm(v, Some(e), spec.objective.unit)
        );
    }
    if !at_optimum.is_empty() {
        s += "| constraint | at the optimum | result |\n|---|---|---|\n";
        for c in at_optimum {
            let v = c.value.map_or("-".into(), |v| crate::output::engineering::eng_pm(v, c.error, c.unit));
            s += &format!("| {} | {v} | {} |\n", c.text, verdict_word(c.verdict));
        }
        s.push('\n');
    }
    s += "![optimization history](optimize.svg)\n";
    s
}
