//! A tolerance study's files: tolerance.csv, tolerance.json and the
//! report's section.

use super::judge::Judged;
use super::store::Sample;
use crate::case::resolve::{Method, Tolerance};
use crate::run::Failure;
use std::collections::BTreeMap;
use study::tolerance::Statistics;

/// tolerance.csv: each sample's parameters, how many warnings it gave,
/// then each value and its
/// estimated error (`NAME.error`, for values that have one), as sweep.csv.
pub(super) fn csv(tol: &Tolerance, sets: &[Vec<f64>], samples: &[Sample]) -> String {
    let names: Vec<String> = samples.first().map(|v| v.values.keys().cloned().collect()).unwrap_or_default();
    let mut s = String::from("sample");
    for sp in &tol.spreads {
        s += &format!(",{}", sp.name);
    }
    s += ",warnings";
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
        s += &format!(",{}", v.warnings.len());
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

pub(super) fn json(
    tol: &Tolerance,
    stats: &BTreeMap<String, Statistics>,
    off_corner: &[String],
    n: usize,
    judged: &[Judged],
    warned: &[crate::many_warnings::Warned],
) -> Result<Vec<u8>, Failure> {
    let warnings: Vec<_> = warned
        .iter()
        .map(|w| serde_json::json!({ "sample": w.label, "warnings": w.warnings }))
        .collect();
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
    let json = serde_json::json!({ "method": method, "samples": n, "spreads": spreads, "statistics": statistics, "expect": expect, "warnings": warnings, "note": "values in SI; percentiles interpolate between order statistics (Hyndman and Fan type 7); error: the samples' largest estimated numerical error, which bounds every statistic's; interval_95 (Monte Carlo): the distribution-free 95 % interval of each percentile between two order statistics (null: the samples cannot bound that end), before the numerical error; an expectation on a statistic is undecided where the bound lies within these; a normal spread's plus_minus is three standard deviations" });
    serde_json::to_vec_pretty(&json).map_err(|e| Failure::Input(format!("error: cannot encode tolerance.json: {e}\n")))
}

/// The percentiles' 95 % sampling intervals as read: "p1 unbounded ..
/// 49.4 mT, p50 ..., p99 ..."; None without sampling (corners).
pub(super) fn intervals_text(s: &Statistics, unit: &str) -> Option<String> {
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
pub(super) fn report_section(
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
        let figures: &[f64] = if corners {
            &[st.min, st.max]
        } else {
            &[st.min, st.p1, st.p50, st.p99, st.max]
        };
        let (v, err) = crate::output::engineering::eng_shared(figures, st.error, unit);
        let err = err.map_or("-".to_string(), |x| format!("\u{b1} {x}"));
        s += &if corners {
            format!("| {name} | {} | {err} |\n", v.join(" | "))
        } else {
            let intervals = intervals_text(st, unit).unwrap_or_default();
            format!("| {name} | {} | {err} | {intervals} |\n", v.join(" | "))
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
