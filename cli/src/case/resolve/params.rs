//! `[params]` and `[sweep]`: the parameter values of a case and the swept ranges.

use super::names::TOP;
use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Item, Value};
use std::collections::BTreeMap;

/// The parameter values of the case, with command-line overrides applied.
pub fn params(doc: &Item, overrides: &BTreeMap<String, f64>) -> Result<BTreeMap<String, f64>, Diagnostic> {
    let top = doc.table("the case file", TOP)?;
    let mut out = BTreeMap::new();
    if let Some(p) = top.get("params") {
        let Value::Table(entries) = &p.value else {
            return Err(Diagnostic::new("[params]: expected a table of named numbers", Some(p.span.clone())));
        };
        for (k, v) in entries {
            out.insert(k.name.clone(), v.number(&format!("params.{}", k.name))?);
        }
    }
    for (k, v) in overrides {
        if !out.contains_key(k) && !sweep_names(doc).contains(k) {
            let d = Diagnostic::new(format!("--set {k}: the case has no parameter '{k}'"), None).suggest(k, out.keys().map(String::as_str));
            return Err(d);
        }
        out.insert(k.clone(), *v);
    }
    Ok(out)
}

fn sweep_names(doc: &Item) -> Vec<String> {
    sweep(doc).map(|s| s.into_iter().map(|(k, _)| k).collect()).unwrap_or_default()
}

/// The swept parameters and their values, in the order written.
pub fn sweep(doc: &Item) -> Result<Vec<(String, Vec<f64>)>, Diagnostic> {
    let top = doc.table("the case file", TOP)?;
    let Some(s) = top.get("sweep") else {
        return Ok(Vec::new());
    };
    let Value::Table(entries) = &s.value else {
        return Err(Diagnostic::new(
            "[sweep]: expected a table of parameter = [values] or { from, to, steps }",
            Some(s.span.clone()),
        ));
    };
    let mut out = Vec::new();
    for (k, v) in entries {
        let what = format!("sweep.{}", k.name);
        let values = match &v.value {
            Value::Array(a) => a.iter().map(|x| x.number(&what)).collect::<Result<Vec<_>, _>>()?,
            Value::Table(_) => range(v, &what)?,
            _ => {
                return Err(Diagnostic::new(
                    format!("{what}: expected a list of numbers or {{ from, to, steps }}"),
                    Some(v.span.clone()),
                ))
            }
        };
        if values.is_empty() {
            return Err(Diagnostic::new(format!("{what}: the sweep has no values"), Some(v.span.clone())));
        }
        out.push((k.name.clone(), values));
    }
    Ok(out)
}

fn range(v: &Item, what: &str) -> Result<Vec<f64>, Diagnostic> {
    let t = v.table(what, &["from", "to", "steps", "spacing"])?;
    let from = t.require("from")?.number(what)?;
    let to = t.require("to")?.number(what)?;
    let steps_item = t.require("steps")?;
    let steps = steps_item.number(what)?;
    if steps < 1.0 || steps.fract() != 0.0 || steps > 10_000.0 {
        return Err(Diagnostic::new(
            format!("{what}: steps must be a whole number from 1 to 10000"),
            Some(steps_item.span.clone()),
        ));
    }
    let n = steps as usize;
    let log = match t.get("spacing") {
        None => false,
        Some(s) => match s.str(what)? {
            "linear" => false,
            "log" => true,
            other => return Err(Diagnostic::new(format!("{what}: unknown spacing '{other}'"), Some(s.span.clone())).suggest(other, ["linear", "log"])),
        },
    };
    if log && (from <= 0.0 || to <= 0.0) {
        return Err(Diagnostic::new(format!("{what}: log spacing needs positive from and to"), Some(v.span.clone())));
    }
    // Ends exact and every value rounded to 12 significant digits, so that
    // variants read "gap = 5", not "gap = 4.999999999999999".
    let round = |v: f64| format!("{v:.11e}").parse().unwrap_or(v);
    Ok((0..n)
        .map(|i| {
            let t = if n == 1 { 0.0 } else { i as f64 / (n - 1) as f64 };
            round(if log {
                (from.ln() * (1.0 - t) + t * to.ln()).exp()
            } else {
                from * (1.0 - t) + t * to
            })
        })
        .collect())
}
