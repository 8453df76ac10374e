//! `lodestone solve` on a case with `[seek]`: the goal seek's evaluations
//! (the scan's points two at a time, at a looser accuracy and without
//! files; the others the case solved in full, with files where the seek
//! may stop), then the case at the answer written with seek.json and
//! seek.csv as one set: the full evaluation it stopped at, else the case
//! solved there again.

use crate::case::resolve::Seek;
use crate::many_warnings::Warned;
use crate::output::folder::OutputFolder;
use crate::progress::Progress;
use crate::run::{self, Failure, Limits, Loaded, Variant};
use std::collections::BTreeMap;
use std::path::Path;
use std::sync::Mutex;
use study::seek::{Evaluation, Need, SeekError};

/// How much looser than the study's accuracy the scan's points are solved
/// (they need only their side of the target; one whose value lies within
/// its error of the target is solved again in full), and the loosest.
const SCAN_LOOSENESS: f64 = 10.0;
const SCAN_LOOSEST: f64 = 0.05;

/// The case solved in full at a point of the seek where it may stop, its
/// files made: the seek stops at a full evaluation within its tolerance of
/// the target (the error included), and that outcome is then the case at
/// the answer, not solved there again. Other points make no files (they
/// cost about what a solve does).
struct Kept {
    x: f64,
    outcome: run::Outcome,
}

/// What every evaluation of one seek shares.
#[derive(Clone, Copy)]
struct Context<'a> {
    loaded: &'a Loaded,
    base: &'a Variant,
    spec: &'a Seek,
    limits: &'a Limits,
    progress: &'a Progress,
    /// Each evaluation's warnings, by its parameter (listed beside the answer's own).
    warned: &'a Mutex<Vec<(f64, Warned)>>,
}

/// One evaluation: the study at `x`, its value and estimated error. A
/// scan's point is solved at a looser accuracy and makes no files; any
/// other is the case solved in full, kept in `kept` with its files when
/// the seek may stop there.
fn evaluate(ctx: &Context, x: f64, need: Need, kept: &Mutex<Option<Kept>>) -> Result<Evaluation, Failure> {
    let Context {
        loaded,
        base,
        spec,
        limits,
        progress,
        warned,
    } = *ctx;
    let mut at = base.clone();
    at.params.insert(spec.vary.clone(), x);
    at.swept = vec![(spec.vary.clone(), x)];
    let (results, side_only) = match scan_limits(need, loaded, &at, limits)? {
        Some(scan) => {
            let resolved = run::resolve(loaded, &at.params, &scan)?;
            // The scan reads one value: the stray field's only when it is that.
            let mut model = resolved.model.clone();
            model.stray_field = study::model::is_stray_value(&spec.value);
            let results = study::run::run(&model, &|_| {}).map_err(|e| match e.origin {
                Some(_) => loaded.study_error(&resolved.spans, &e),
                None => Failure::Input(format!("error: {}: at {} = {x}: {e}\n", loaded.path.display(), spec.vary)),
            })?;
            (results, true)
        }
        None => {
            // Files only for a point the seek may stop at (within its
            // tolerance of the target, the error included).
            let may_stop = |r: &study::Results| {
                let error = r.errors.get(&spec.value).copied().unwrap_or(0.0);
                r.values
                    .get(&spec.value)
                    .is_some_and(|&v| study::seek::stops_at(v, error, spec.target, spec.tolerance))
            };
            let outcome = run::solve_variant_files_when(loaded, &at, limits, progress, &may_stop)?;
            let results = outcome.results.clone();
            if !outcome.files.is_empty() {
                *kept.lock().unwrap_or_else(|e| e.into_inner()) = Some(Kept { x, outcome });
            }
            (results, false)
        }
    };
    if !results.solve.converged {
        return Err(Failure::Input(format!(
            "error: {}: the study did not converge at {} = {x}, so the seek cannot go on\n",
            loaded.path.display(),
            spec.vary
        )));
    }
    // A scan's point the seek passed through (a plate inside its magnet at
    // one end of the range) warned nowhere.
    if !results.warnings.is_empty() {
        let what = if side_only { "scan point" } else { "evaluation" };
        let w = Warned {
            label: crate::many_warnings::label(what, [(spec.vary.as_str(), x)]),
            warnings: results.warnings.clone(),
        };
        warned.lock().unwrap_or_else(|e| e.into_inner()).push((x, w));
    }
    let value = results.values.get(&spec.value).copied().unwrap_or(f64::NAN);
    let error = results.errors.get(&spec.value).copied().unwrap_or(0.0);
    progress.note(&format!(
        "{}: seek {} = {x:.6}: {} = {value:.6e} {} (target {:.6e}){}",
        loaded.stem(),
        spec.vary,
        spec.value,
        spec.unit,
        spec.target,
        if side_only { ", scan" } else { "" }
    ));
    Ok(Evaluation { x, value, error, side_only })
}

/// The limits a scan's point is solved to (only its side of the target is
/// needed): the study's accuracy loosened, or None when the point is to be
/// solved in full (a value asked, or an accuracy already that loose or off).
fn scan_limits(need: Need, loaded: &Loaded, at: &Variant, limits: &Limits) -> Result<Option<Limits>, Failure> {
    if need != Need::Side {
        return Ok(None);
    }
    let Some(accuracy) = run::resolve(loaded, &at.params, limits)?.model.accuracy else {
        return Ok(None);
    };
    let loose = (SCAN_LOOSENESS * accuracy).min(SCAN_LOOSEST);
    Ok((loose > accuracy).then_some(Limits {
        accuracy: Some(Some(loose)),
        ..*limits
    }))
}

/// Runs the seek, then the full case at the answer; exit code as `solve`.
pub fn solve(loaded: &Loaded, spec: &Seek, base: &Variant, folder: &OutputFolder, limits: &Limits, progress: &Progress) -> Result<i32, Failure> {
    let kept = Mutex::new(None);
    let warned = Mutex::new(Vec::new());
    let ctx = Context {
        loaded,
        base,
        spec,
        limits,
        progress,
        warned: &warned,
    };
    let found = study::seek::seek(spec.range[0], spec.range[1], spec.target, spec.tolerance, |x, need| {
        evaluate(&ctx, x, need, &kept)
    });
    let found = match found {
        Ok(f) => f,
        Err(SeekError::Evaluation(f)) => return Err(f),
        Err(SeekError::NotInRange { low, high }) => {
            progress.finish();
            eprintln!(
                "{}: {} does not reach {:.6e} {} anywhere in {} = {} .. {}: it ranges from {low:.6e} to {high:.6e} there; widen seek.range",
                loaded.path.display(),
                spec.value,
                spec.target,
                spec.unit,
                spec.vary,
                spec.range[0],
                spec.range[1]
            );
            return Ok(1);
        }
    };
    let mut warned = warned.into_inner().unwrap_or_else(|e| e.into_inner());
    warned.sort_by(|a, b| a.0.total_cmp(&b.0));
    let warned: Vec<Warned> = warned.into_iter().map(|w| w.1).collect();
    let mut at = base.clone();
    at.params.insert(spec.vary.clone(), found.x);
    let mut outcome = match kept.into_inner().unwrap_or_else(|e| e.into_inner()) {
        Some(k) if k.x == found.x => k.outcome,
        _ => run::solve_variant(loaded, &at, limits, progress)?,
    };
    progress.finish();
    let value = outcome.results.values.get(&spec.value).copied();
    let error = outcome.results.errors.get(&spec.value).copied();
    outcome
        .files
        .push(("seek.json".into(), seek_json(spec, &found, &at.params, [value, error], &warned)?));
    outcome.files.push(("seek.csv".into(), seek_csv(spec, &found).into_bytes()));
    outcome.files.push(("seek.svg".into(), seek_chart(spec, &found).into_bytes()));
    // The answer to its uncertainty's second digit, as every value with its error is shown.
    let answer = crate::output::engineering::plain_pm(found.x, Some(found.uncertainty), "");
    let section = format!(
        "## Goal seek\n\n`{}` reaches {} at {} = {} (the case's own units), found in {} evaluations by a scan (at a looser accuracy: it needs only the side of the target each point lies on) and Brent's method; the case above is solved there. Every evaluation is in seek.csv, the answer in seek.json.\n\n![goal seek](seek.svg)\n",
        spec.value,
        crate::output::engineering::eng(spec.target, spec.unit),
        spec.vary,
        answer,
        found.evaluations.len()
    ) + &crate::many_warnings::markdown("evaluations", found.evaluations.len(), &warned);
    crate::output::report::add_section(&mut outcome.files, &section);
    folder
        .commit(Path::new(""), &outcome.files)
        .map_err(|e| Failure::Input(format!("error: {e}\n")))?;
    print!("{}", crate::summary::summary(&outcome, folder.path()));
    println!(
        "  seek: {} = {} gives {} = {} (target {}), {} evaluations",
        spec.vary,
        answer,
        spec.value,
        value.map_or("-".into(), |v| crate::output::engineering::eng_pm(v, error, spec.unit)),
        crate::output::engineering::eng(spec.target, spec.unit),
        found.evaluations.len()
    );
    if let Some(note) = crate::many_warnings::search_note(&warned, found.evaluations.len(), "seek.json", "answer") {
        println!("{note}");
    }
    Ok(i32::from(!outcome.results.solve.converged) * 3)
}

fn seek_json(
    spec: &Seek,
    found: &study::seek::Found,
    params: &BTreeMap<String, f64>,
    [value, error]: [Option<f64>; 2],
    warned: &[Warned],
) -> Result<Vec<u8>, Failure> {
    let evaluations: Vec<_> = found
        .evaluations
        .iter()
        .map(|e| serde_json::json!({ "x": e.x, "value": e.value, "error": e.error, "scan": e.side_only }))
        .collect();
    let json = serde_json::json!({
        "vary": spec.vary,
        "found": found.x,
        "uncertainty": found.uncertainty,
        "value_name": spec.value,
        "target": spec.target,
        "value": value,
        "error": error,
        "params": params,
        "evaluations": evaluations,
        "warnings": crate::many_warnings::json("evaluation", warned),
        "note": "SI units for value, error and target; the parameter in the case's own units. The uncertainty is the value's estimated error over the slope, plus what is left of the final bracket; when the seek stopped at a point within the study's accuracy of the target, the value's distance from the target and its error over the slope. Evaluations marked scan were solved to a looser accuracy (ten times the study's, at most 5 %) only to find which side of the target they lie on; the answer is never one of them."
    });
    serde_json::to_vec_pretty(&json).map_err(|e| Failure::Input(format!("error: cannot encode seek.json: {e}\n")))
}

fn seek_csv(spec: &Seek, found: &study::seek::Found) -> String {
    let mut s = format!("{},{} [{}],{}.error [{}]\n", spec.vary, spec.value, spec.unit, spec.value, spec.unit);
    for e in &found.evaluations {
        s += &format!("{},{},{}\n", e.x, e.value, e.error);
    }
    s
}

/// seek.svg: the value at each evaluation against the parameter, in the
/// value's SI prefix, with the target as a line.
fn seek_chart(spec: &Seek, found: &study::seek::Found) -> String {
    use crate::output::svg::{chart, Chart};
    let top = found.evaluations.iter().map(|e| e.value.abs()).fold(spec.target.abs(), f64::max);
    let (exponent, prefix) = crate::output::engineering::prefix_of(top, spec.unit);
    let per = 10f64.powi(-exponent);
    let mut pts: Vec<[f64; 2]> = found.evaluations.iter().map(|e| [e.x, e.value * per]).collect();
    pts.sort_by(|a, b| a[0].total_cmp(&b[0]));
    let title = format!("goal seek: {} against {}", spec.value, spec.vary);
    let y = format!("{} ({prefix}{})", spec.value, spec.unit);
    chart(&Chart {
        title: &title,
        x_label: &spec.vary,
        y_label: &y,
        series: vec![("evaluations".into(), pts.clone())],
        scatter: vec![("evaluated".into(), pts)],
        marks: vec![(spec.target * per, format!("target {}", crate::output::engineering::eng(spec.target, spec.unit)))],
        ..Default::default()
    })
}
