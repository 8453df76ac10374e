//! `cargo bench -p validation --bench honesty`: are the example cases'
//! error estimates honest? Each example in cases/ (every variant of a
//! sweep; the base study of a seek or an optimization) is solved at its
//! own settings and again at a far tighter accuracy (`--reference`,
//! default 0.001 %). For every value with an estimate, the difference
//! from the reference, taken together with the reference's own estimate,
//! says whether the true error is at most twice the estimate:
//! - `honest`: |v - ref| + ref error <= 2 est, whatever the reference's
//!   error is;
//! - `DISHONEST`: |v - ref| - ref error > 2 est;
//! - `unresolved`: between the two (the reference is not accurate enough
//!   to tell).
//!
//! A value is also `loose` when its estimate passes 20 times the largest
//! true error the reference allows and a tenth of the study's target (an
//! estimate that loose asks for meshes no value needs). It prints one line
//! per value that is not plainly honest, and a count per case. This is a
//! self-convergence check against the same code's tighter solve, not
//! against exact answers (those are the accuracy bench and
//! tests/tests/error_estimates.rs); the reference's own estimate is only
//! as good as the code under audit, so a case is worth a second look
//! whenever its reference stops short.
//!
//! `--case NAME` keeps the cases whose file name contains NAME.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::time::Instant;

/// What the audit found for one value.
#[derive(Clone, Copy, PartialEq, Eq, Debug)]
enum Verdict {
    Honest,
    Unresolved,
    Dishonest,
}

/// The verdict on an estimate `est` for a value `diff` off a reference whose own error is `ref_err`.
fn judge(diff: f64, est: f64, ref_err: f64) -> Verdict {
    if diff + ref_err <= 2.0 * est {
        Verdict::Honest
    } else if diff - ref_err > 2.0 * est {
        Verdict::Dishonest
    } else {
        Verdict::Unresolved
    }
}

fn arg(name: &str) -> Option<String> {
    let args: Vec<String> = std::env::args().collect();
    args.iter().position(|a| a == name).and_then(|i| args.get(i + 1).cloned())
}

/// The example cases, by file name.
fn cases(filter: Option<&str>) -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let mut out: Vec<PathBuf> = std::fs::read_dir(&dir)
        .expect("cases/ is readable")
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .filter(|p| filter.is_none_or(|f| p.file_name().is_some_and(|n| n.to_string_lossy().contains(f))))
        .collect();
    out.sort();
    out
}

/// Solves one variant at `accuracy` (None: the case's own).
fn solve(loaded: &lodestone::run::Loaded, params: &BTreeMap<String, f64>, accuracy: Option<f64>) -> Result<study::Results, String> {
    let limits = lodestone::run::Limits {
        accuracy: accuracy.map(Some),
        ..Default::default()
    };
    let model = lodestone::run::resolve(loaded, params, &limits).map_err(|f| f.message().to_string())?.model;
    study::run::run(&model, &|_| {}).map_err(|e| e.message)
}

/// Counts of verdicts for one variant, and the lines worth printing.
fn audit(label: &str, own: &study::Results, reference: &study::Results, target: f64) -> [usize; 4] {
    let mut counts = [0usize; 4];
    for (name, &est) in &own.errors {
        let (Some(&v), Some(&r)) = (own.values.get(name), reference.values.get(name)) else {
            continue;
        };
        let ref_err = reference.errors.get(name).copied().unwrap_or(f64::INFINITY);
        let diff = (v - r).abs();
        let verdict = judge(diff, est, ref_err);
        let scale = study::estimate::scale(name, &own.values, &own.floors);
        let loose = est > 20.0 * (diff + ref_err) && est > 0.1 * target * scale;
        counts[verdict as usize] += 1;
        counts[3] += usize::from(loose);
        if verdict != Verdict::Honest || loose {
            let tag = match verdict {
                Verdict::Dishonest => "DISHONEST",
                Verdict::Unresolved => "unresolved",
                Verdict::Honest => "loose",
            };
            let rel = |x: f64| if scale > 0.0 { x / scale } else { f64::NAN };
            println!(
                "| {label} | {name} | {v:.9e} | {:.2e} | {:.2e} | {:.2e} | {:.2} | {tag} |",
                rel(est),
                rel(diff),
                rel(ref_err),
                diff / est
            );
        }
    }
    counts
}

fn main() {
    let reference = arg("--reference").map_or(1e-5, |r| {
        r.trim_end_matches('%').trim().parse::<f64>().expect("--reference \"0.001 %\"") / 100.0
    });
    let filter = arg("--case");
    println!("reference accuracy {} %; relative to each value's scale", 100.0 * reference);
    println!("| case | value | value | estimate | |v - ref| | ref estimate | |v - ref| / estimate | verdict |");
    println!("|---|---|---|---|---|---|---|---|");
    let mut total = [0usize; 4];
    let mut summary = Vec::new();
    for case in cases(filter.as_deref()) {
        let stem = case.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_default();
        let loaded = match lodestone::run::load(&case) {
            Ok(l) => l,
            Err(f) => {
                println!("{stem}: cannot load: {}", f.message());
                continue;
            }
        };
        let variants = lodestone::run::variants(&loaded, &BTreeMap::new()).unwrap_or_default();
        for (i, variant) in variants.iter().enumerate() {
            let label = if variants.len() > 1 { format!("{stem} #{i}") } else { stem.clone() };
            let start = Instant::now();
            let (own, tight) = match (solve(&loaded, &variant.params, None), solve(&loaded, &variant.params, Some(reference))) {
                (Ok(o), Ok(t)) => (o, t),
                (o, t) => {
                    println!("{label}: not solved: {:?} {:?}", o.err(), t.err());
                    continue;
                }
            };
            let target = own.adaptive.as_ref().map_or(1e-3, |a| a.target);
            let counts = audit(&label, &own, &tight, target);
            for k in 0..4 {
                total[k] += counts[k];
            }
            let reached = tight.adaptive.as_ref().is_some_and(|a| a.reached);
            summary.push(format!(
                "{label}: {} honest, {} unresolved, {} dishonest, {} loose; reference {} ({:.1} s)",
                counts[0],
                counts[1],
                counts[2],
                counts[3],
                if reached { "reached" } else { "NOT reached" },
                start.elapsed().as_secs_f64()
            ));
        }
    }
    println!();
    for s in summary {
        println!("{s}");
    }
    println!("all: {} honest, {} unresolved, {} dishonest, {} loose", total[0], total[1], total[2], total[3]);
}
