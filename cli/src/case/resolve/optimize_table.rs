//! `[optimize]`: the parameters within bounds that maximize or minimize a
//! value (or an expression of values, such as a cost from part volumes),
//! subject to bounds on other values.

use super::expects::{value_name, value_quantity};
use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Item, Value};
use crate::case::expr;
use crate::case::quantity::Context;
use std::collections::BTreeMap;
use study::model::Model;
use study::value_names::value_names;

/// Keys of `[optimize]`.
const OPTIMIZE: &[&str] = &[
    "maximize",
    "minimize",
    "vary",
    "subject_to",
    "max_evaluations",
    "design",
    "tolerance",
    "accuracy",
    "seed",
];

/// The objective: one value, or an arithmetic expression of values.
#[derive(Clone, Debug, PartialEq)]
pub struct Objective {
    /// As written in the case.
    pub text: String,
    /// True to maximize.
    pub maximize: bool,
    /// The expression with each value name replaced by `v0`, `v1`, ...
    expression: String,
    /// The value names, in the order of their placeholders.
    pub names: Vec<String>,
    /// The unit symbol when the objective is a single value ("" otherwise).
    pub unit: &'static str,
}

impl Objective {
    /// The objective's value and its estimated error (each value's error
    /// carried through by a one-sided difference), or None when a value is
    /// missing or the arithmetic fails.
    pub fn evaluate(&self, values: &BTreeMap<String, f64>, errors: &BTreeMap<String, f64>) -> Option<(f64, f64)> {
        let at = |shift: Option<usize>| -> Option<f64> {
            let mut p = BTreeMap::new();
            for (i, n) in self.names.iter().enumerate() {
                let e = if shift == Some(i) { errors.get(n).copied().unwrap_or(0.0) } else { 0.0 };
                p.insert(format!("v{i}"), values.get(n)? + e);
            }
            expr::parse(&self.expression, &p).ok().map(|x| x.value).filter(|v| v.is_finite())
        };
        let v = at(None)?;
        let e = (0..self.names.len()).map(|i| at(Some(i)).map_or(0.0, |s| (s - v).abs())).sum();
        Some((v, e))
    }
}

/// A constraint: a value at most or at least a bound.
#[derive(Clone, Debug, PartialEq)]
pub struct Constraint {
    /// As written.
    pub text: String,
    /// The value's name.
    pub value: String,
    /// True for `<=`, false for `>=`.
    pub at_most: bool,
    /// The bound, SI.
    pub bound: f64,
}

impl Constraint {
    /// The constraint as an expectation's bound.
    pub fn as_bound(&self) -> study::model::Bound {
        if self.at_most {
            study::model::Bound::Max(self.bound)
        } else {
            study::model::Bound::Min(self.bound)
        }
    }

    /// The margin (at least 0 where the constraint holds), in SI.
    pub fn margin(&self, v: f64) -> f64 {
        if self.at_most {
            self.bound - v
        } else {
            v - self.bound
        }
    }
}

/// An optimization, resolved against the case's first model.
#[derive(Clone, Debug, PartialEq)]
pub struct Optimize {
    pub objective: Objective,
    /// Parameters varied and their bounds, in the table's order.
    pub vary: Vec<(String, [f64; 2])>,
    pub constraints: Vec<Constraint>,
    /// Most studies solved in the search (the parallel design included).
    pub max_evaluations: usize,
    /// Candidates of the parallel design.
    pub design: usize,
    /// Stop when steps fall below this share of each range.
    pub tolerance: f64,
    /// Accuracy of each evaluation (relative error).
    pub accuracy: f64,
    pub seed: u64,
}

/// The `[optimize]` table, or None.
pub fn optimize(top: &Fields, ctx: &Context, model: &Model) -> Result<Option<Optimize>, Diagnostic> {
    let Some(item) = top.get("optimize") else { return Ok(None) };
    let t = item.table("[optimize]", OPTIMIZE)?;
    for other in ["sweep", "seek", "tolerance"] {
        if let Some(s) = top.get(other) {
            return Err(Diagnostic::new(
                format!("[optimize] and [{other}] together: an optimization varies its parameters itself; remove the [{other}]"),
                Some(s.span.clone()),
            ));
        }
    }
    let objective = match (t.get("maximize"), t.get("minimize")) {
        (Some(i), None) => objective(i, true, model)?,
        (None, Some(i)) => objective(i, false, model)?,
        _ => {
            return Err(Diagnostic::new(
                "[optimize]: give one of maximize = \"VALUE\" or minimize = \"VALUE\"",
                Some(item.span.clone()),
            ))
        }
    };
    let vary = vary(t.require("vary")?, ctx)?;
    let constraints = match t.get("subject_to") {
        None => Vec::new(),
        Some(i) => i
            .array("optimize.subject_to")?
            .iter()
            .map(|c| constraint(c, ctx, model))
            .collect::<Result<_, _>>()?,
    };
    let count = |key: &str, default: usize, most: usize| -> Result<usize, Diagnostic> {
        let Some(i) = t.get(key) else { return Ok(default) };
        let n = i.number(&format!("optimize.{key}"))?;
        if n.fract() != 0.0 || n < 0.0 || n > most as f64 {
            return Err(Diagnostic::new(
                format!("optimize.{key}: a whole number from 0 to {most}"),
                Some(i.span.clone()),
            ));
        }
        Ok(n as usize)
    };
    let n = vary.len();
    let max_evaluations = count("max_evaluations", 60, 10_000)?;
    let least = study::optimize::least_evaluations(n);
    if max_evaluations < least {
        let span = t.get("max_evaluations").map(|i| i.span.clone());
        return Err(Diagnostic::new(
            format!("optimize.max_evaluations: {max_evaluations} is below the {least} studies a search over {n} parameter(s) needs (the start, {} for COBYLA's first model and step, {} restoring steps)", n + 2, least - 1 - (n + 2)),
            span,
        ));
    }
    let design = count("design", 2 * n + 2, 1_000)?;
    let seed = count("seed", 1, usize::MAX)? as u64;
    let tolerance = fraction(t.get("tolerance"), ctx, "optimize.tolerance", 1e-3)?;
    // Each evaluation's error must stay below what a step of the search's
    // tolerance changes: a tenth of the case's accuracy by default.
    let accuracy = fraction(t.get("accuracy"), ctx, "optimize.accuracy", model.accuracy.unwrap_or(1e-3) / 10.0)?;
    Ok(Some(Optimize {
        objective,
        vary,
        constraints,
        max_evaluations,
        design,
        tolerance,
        accuracy,
        seed,
    }))
}

/// A share given as "0.1 %" or a plain fraction, from 1e-7 to 0.5.
fn fraction(item: Option<&Item>, ctx: &Context, what: &str, default: f64) -> Result<f64, Diagnostic> {
    let Some(i) = item else { return Ok(default) };
    let (v, kind) = ctx.any_quantity(i, what)?;
    let v = if kind == Some(crate::case::units::Kind::Percent) { v / 100.0 } else { v };
    if !(1e-7..=0.5).contains(&v) {
        return Err(Diagnostic::new(
            format!("{what}: give a share from 1e-7 to 0.5, such as \"0.1 %\""),
            Some(i.span.clone()),
        ));
    }
    Ok(v)
}

/// `vary = { name = [low, high], ... }`: parameters of the case.
fn vary(item: &Item, ctx: &Context) -> Result<Vec<(String, [f64; 2])>, Diagnostic> {
    let Value::Table(entries) = &item.value else {
        return Err(Diagnostic::new("optimize.vary: a table of parameter = [low, high]", Some(item.span.clone())));
    };
    if entries.is_empty() || entries.len() > 20 {
        return Err(Diagnostic::new("optimize.vary: give 1 to 20 parameters", Some(item.span.clone())));
    }
    let mut out = Vec::new();
    for (k, v) in entries {
        if !ctx.params.contains_key(&k.name) {
            return Err(Diagnostic::new(
                format!("optimize.vary: '{}' is not a parameter; give it a starting value in [params]", k.name),
                Some(k.span.clone()),
            )
            .suggest(&k.name, ctx.params.keys().map(String::as_str)));
        }
        let what = format!("optimize.vary.{}", k.name);
        let a = v.array(&what)?;
        let bad = || Diagnostic::new(format!("{what}: give [low, high] with low below high"), Some(v.span.clone()));
        if a.len() != 2 {
            return Err(bad());
        }
        let (lo, hi) = (a[0].number(&what)?, a[1].number(&what)?);
        if !(lo.is_finite() && hi.is_finite()) || lo >= hi {
            return Err(bad());
        }
        out.push((k.name.clone(), [lo, hi]));
    }
    Ok(out)
}

/// The objective: a value name, or an expression in which value names
/// stand for their values.
fn objective(item: &Item, maximize: bool, model: &Model) -> Result<Objective, Diagnostic> {
    let text = item.str("optimize objective")?.trim().to_string();
    let mut known: Vec<(String, &'static str)> = value_names(model).into_iter().map(|v| (v.name, v.unit.symbol())).collect();
    known.sort_by_key(|k| std::cmp::Reverse(k.0.len()));
    if let Some(k) = known.iter().find(|k| k.0 == text) {
        return Ok(Objective {
            expression: "v0".into(),
            names: vec![k.0.clone()],
            unit: k.1,
            text,
            maximize,
        });
    }
    let (expression, names) = placeholders(&text, &known);
    if names.is_empty() {
        let named = value_name(item, model).err();
        return Err(named.unwrap_or_else(|| Diagnostic::new(format!("optimize objective: '{text}' names no value"), Some(item.span.clone()))));
    }
    let probe: BTreeMap<String, f64> = (0..names.len()).map(|i| (format!("v{i}"), 1.0)).collect();
    if let Err(e) = expr::parse(&expression, &probe) {
        return Err(Diagnostic::new(
            format!("optimize objective: {} in '{text}'", e.message),
            Some(item.span.clone()),
        ));
    }
    Ok(Objective {
        text,
        maximize,
        expression,
        names,
        unit: "",
    })
}

/// Replaces each value name in `text` (longest first, whole names only)
/// by a placeholder `v0`, `v1`, ...: the names in placeholder order.
fn placeholders(text: &str, known: &[(String, &'static str)]) -> (String, Vec<String>) {
    let (mut out, mut names) = (String::new(), Vec::<String>::new());
    let name_char = |c: char| c.is_ascii_alphanumeric() || c == '_' || c == '.';
    let mut rest = text;
    while let Some(c) = rest.chars().next() {
        let before_ok = !out.chars().last().is_some_and(name_char);
        let hit = known
            .iter()
            .find(|k| before_ok && rest.starts_with(&k.0) && !rest[k.0.len()..].chars().next().is_some_and(name_char));
        if let Some(k) = hit {
            let i = names.iter().position(|n| *n == k.0).unwrap_or_else(|| {
                names.push(k.0.clone());
                names.len() - 1
            });
            out += &format!(" v{i} ");
            rest = &rest[k.0.len()..];
        } else {
            out.push(c);
            rest = &rest[c.len_utf8()..];
        }
    }
    (out, names)
}

/// `"VALUE <= BOUND"` or `"VALUE >= BOUND"`, the bound's unit checked
/// against the value's.
fn constraint(item: &Item, ctx: &Context, model: &Model) -> Result<Constraint, Diagnostic> {
    let text = item.str("optimize.subject_to")?;
    let (at_most, split) = match (text.find("<="), text.find(">=")) {
        (Some(i), None) => (true, i),
        (None, Some(i)) => (false, i),
        _ => {
            return Err(Diagnostic::new(
                format!("optimize.subject_to: '{text}' is not a bound; write \"VALUE <= BOUND\" or \"VALUE >= BOUND\", such as \"force.pull.z <= -50 N\""),
                Some(item.span.clone()),
            ))
        }
    };
    let name_item = Item {
        value: Value::Str(text[..split].trim().to_string()),
        span: item.span.clone(),
    };
    let bound_item = Item {
        value: Value::Str(text[split + 2..].trim().to_string()),
        span: item.span.clone(),
    };
    let value = value_name(&name_item, model)?;
    let bound = value_quantity(ctx, &bound_item, &value, "optimize.subject_to", "bound")?;
    Ok(Constraint {
        text: text.to_string(),
        value: value.name.clone(),
        at_most,
        bound,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn value_names_in_an_expression_become_placeholders() {
        let known = vec![("part.a.volume".to_string(), "m3"), ("part.ab.volume".to_string(), "m3")];
        let (e, n) = placeholders("120 * part.ab.volume + 8*part.a.volume - part.ab.volume", &known);
        assert_eq!(n, vec!["part.ab.volume", "part.a.volume"]);
        assert_eq!(e.split_whitespace().collect::<Vec<_>>().join(" "), "120 * v0 + 8* v1 - v0");
    }

    #[test]
    fn the_objective_carries_its_values_errors() {
        let o = Objective {
            text: String::new(),
            maximize: false,
            expression: "2 * v0 + v1".into(),
            names: vec!["a".into(), "b".into()],
            unit: "",
        };
        let values = BTreeMap::from([("a".to_string(), 1.0), ("b".to_string(), 3.0)]);
        let errors = BTreeMap::from([("a".to_string(), 0.1), ("b".to_string(), 0.2)]);
        let (v, e) = o.evaluate(&values, &errors).unwrap();
        assert!((v - 5.0).abs() < 1e-12 && (e - 0.4).abs() < 1e-12, "{v} {e}");
    }
}
