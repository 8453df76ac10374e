//! `check` on a case with expectations on statistics: the tolerance
//! samples solved and judged, their warnings shown, and a sample whose
//! magnet is demagnetized failed as the nominal design's would be.

use crate::progress::Progress;
use crate::run::{Failure, Limits, Loaded, Outcome, Variant};
use study::results::Verdict;

/// Expectations on a statistic (`statistic = "p99"`): `check` runs the
/// case's tolerance samples and judges them; 1 when one fails or when a
/// sample's magnet is demagnetized (unless the case allows it).
pub fn check(loaded: &Loaded, v: &Variant, o: &Outcome, limits: &Limits, progress: &Progress, suite: &mut crate::junit::Suite) -> Result<i32, Failure> {
    if !o.model.expects.iter().any(|x| x.statistic.is_some()) {
        return Ok(0);
    }
    let Some(tol) = crate::case::resolve::tolerance(&loaded.doc, &v.params, &o.model).map_err(|d| loaded.input(&d))? else {
        return Ok(0);
    };
    let samples = super::samples(loaded, &tol, v, limits, progress)?;
    progress.finish();
    println!("  over {} tolerance samples:", samples.sets.len());
    for line in crate::many_warnings::summary_lines("tolerance samples", samples.solves, &samples.warned, "`lodestone solve`'s tolerance.json") {
        println!("  {line}");
    }
    let mut code = 0;
    for j in super::judge(&o.model, &samples.stats) {
        println!("  {}", j.line());
        if !j.pass() {
            code = 1;
        }
        suite.cases.push(crate::junit::Case {
            name: j.name.clone(),
            message: match j.verdict {
                Verdict::Pass => None,
                Verdict::Fail => Some(format!("{} over the tolerance samples is outside {}", j.name, j.bound)),
                Verdict::Undecided => Some(format!("{} over the tolerance samples is undecided against {}: {}", j.name, j.bound, j.why)),
            },
        });
    }
    if !o.model.allow.iter().any(|a| a == "demagnetization") {
        for (name, (count, worst)) in demagnetized_samples(&samples.values, o.results.magnets.keys()) {
            code = 1;
            let why = format!("demagnetized in {count} of {} tolerance samples; the worst {worst}", samples.sets.len());
            println!("  magnet {name}: {why}  FAIL (demagnetization; allow = [\"demagnetization\"] in [study] if intended)");
            suite.cases.push(crate::junit::Case {
                name: format!("demagnetization of magnet {name} over the tolerance samples"),
                message: Some(format!("magnet '{name}': {why}")),
            });
        }
    }
    Ok(code)
}

/// Each magnet demagnetized in some samples: how many, and the words for
/// the sample that loses most (or lies furthest past its knee).
fn demagnetized_samples<'a>(samples: &[super::Sample], magnets: impl Iterator<Item = &'a String>) -> Vec<(String, (usize, String))> {
    let mut out = Vec::new();
    for name in magnets {
        let figures = |s: &super::Sample| {
            let get = |k: &str| s.values.get(&format!("magnet.{name}.{k}")).copied().unwrap_or(f64::NAN);
            (get("loss"), get("margin"), get("share_past_knee"))
        };
        let bad: Vec<(f64, f64, f64)> = samples
            .iter()
            .map(figures)
            .filter(|&(l, m, s)| study::checks::demagnetized(l, m, s).is_some())
            .collect();
        let worst = bad.iter().copied().max_by(|a, b| a.0.total_cmp(&b.0).then(b.1.total_cmp(&a.1)));
        if let Some((l, m, s)) = worst {
            out.push((name.clone(), (bad.len(), study::checks::demagnetized(l, m, s).unwrap_or_default())));
        }
    }
    out
}
