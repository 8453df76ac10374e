//! `lodestone solve` on a case with `[seek]`: the goal seek's evaluations
//! (each a study solved to its accuracy, no files), then the case solved
//! in full at the parameter found, written with seek.json and seek.csv as
//! one set.

use crate::case::resolve::Seek;
use crate::output::folder::OutputFolder;
use crate::progress::Progress;
use crate::run::{self, Failure, Limits, Loaded, Variant};
use std::collections::BTreeMap;
use std::path::Path;
use study::seek::{Evaluation, Need, SeekError};

/// How much looser than the study's accuracy the scan's points are solved
/// (they need only their side of the target; one whose value lies within
/// its error of the target is solved again in full), and the loosest.
const SCAN_LOOSENESS: f64 = 10.0;
const SCAN_LOOSEST: f64 = 0.05;

/// One evaluation: the study at `x`, its value and estimated error.
fn evaluate(loaded: &Loaded, base: &Variant, spec: &Seek, x: f64, need: Need, limits: &Limits, progress: &Progress) -> Result<Evaluation, Failure> {
    let mut params = base.params.clone();
    params.insert(spec.vary.clone(), x);
    let mut resolved = run::resolve(loaded, &params, limits)?;
    let mut side_only = false;
    if let (Need::Side, Some(accuracy)) = (need, resolved.model.accuracy) {
        let loose = (SCAN_LOOSENESS * accuracy).min(SCAN_LOOSEST);
        if loose > accuracy {
            let scan = Limits {
                accuracy: Some(Some(loose)),
                ..*limits
            };
            resolved = run::resolve(loaded, &params, &scan)?;
            side_only = true;
        }
    }
    let model = resolved.model;
    let results = study::run::run(&model, &|_| {}).map_err(|e| match e.origin {
        Some(_) => loaded.study_error(&resolved.spans, &e),
        None => Failure::Input(format!("error: {}: {} = {x}: {e}\n", loaded.path.display(), spec.vary)),
    })?;
    if !results.solve.converged {
        return Err(Failure::Input(format!(
            "error: {}: the study did not converge at {} = {x}, so the seek cannot go on\n",
            loaded.path.display(),
            spec.vary
        )));
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

/// Runs the seek, then the full case at the answer; exit code as `solve`.
pub fn solve(loaded: &Loaded, spec: &Seek, base: &Variant, folder: &OutputFolder, limits: &Limits, progress: &Progress) -> Result<i32, Failure> {
    let found = study::seek::seek(spec.range[0], spec.range[1], spec.target, spec.tolerance, |x, need| {
        evaluate(loaded, base, spec, x, need, limits, progress)
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
    let mut at = base.clone();
    at.params.insert(spec.vary.clone(), found.x);
    let mut outcome = run::solve_variant(loaded, &at, limits, progress)?;
    progress.finish();
    let value = outcome.results.values.get(&spec.value).copied();
    let error = outcome.results.errors.get(&spec.value).copied();
    outcome.files.push(("seek.json".into(), seek_json(spec, &found, &at.params, value, error)?));
    outcome.files.push(("seek.csv".into(), seek_csv(spec, &found).into_bytes()));
    outcome.files.push(("seek.svg".into(), seek_chart(spec, &found).into_bytes()));
    let section = format!(
        "## Goal seek\n\n`{}` reaches {} at {} = {:.6} \u{b1} {:.2e} (the case's own units), found in {} evaluations by a scan (at a looser accuracy: it needs only the side of the target each point lies on) and Brent's method; the case above is solved there. Every evaluation is in seek.csv, the answer in seek.json.\n\n![goal seek](seek.svg)\n",
        spec.value,
        crate::output::engineering::eng(spec.target, spec.unit),
        spec.vary,
        found.x,
        found.uncertainty,
        found.evaluations.len()
    );
    crate::output::report::add_section(&mut outcome.files, &section);
    folder
        .commit(Path::new(""), &outcome.files)
        .map_err(|e| Failure::Input(format!("error: {e}\n")))?;
    print!("{}", crate::summary::summary(&outcome, folder.path()));
    println!(
        "  seek: {} = {:.6} ± {:.2e} gives {} = {} (target {}), {} evaluations",
        spec.vary,
        found.x,
        found.uncertainty,
        spec.value,
        value.map_or("-".into(), |v| crate::output::engineering::eng_pm(v, error, spec.unit)),
        crate::output::engineering::eng(spec.target, spec.unit),
        found.evaluations.len()
    );
    Ok(i32::from(!outcome.results.solve.converged) * 3)
}

fn seek_json(spec: &Seek, found: &study::seek::Found, params: &BTreeMap<String, f64>, value: Option<f64>, error: Option<f64>) -> Result<Vec<u8>, Failure> {
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
