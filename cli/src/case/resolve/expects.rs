//! `[[expect]]` and `[output]`: bounds on typed values, checked against the
//! model's value names as the case is read, and the output switches.

use super::names::named_tables;
use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Item, Value};
use crate::case::quantity::Context;
use crate::case::units::Kind;
use std::ops::Range;
use study::model::*;
use study::quantity::{Unit, ValueName};

/// Keys of `[[expect]]`.
const EXPECT: &[&str] = &["value", "min", "max", "between", "near", "tolerance", "statistic"];
/// Keys of `[output]`.
const OUTPUT: &[&str] = &["vtk", "plots", "report", "csv", "field_scale", "field_range", "chart_scale", "chart_range"];

/// The unit kind a bound on a value of this unit may be written in.
fn bound_kind(unit: Unit) -> Option<Kind> {
    match unit {
        Unit::Tesla => Some(Kind::FluxDensity),
        Unit::AmperePerMetre => Some(Kind::FieldStrength),
        Unit::Newton => Some(Kind::Force),
        Unit::Weber => Some(Kind::MagneticFlux),
        Unit::Henry => Some(Kind::Inductance),
        Unit::Joule => Some(Kind::Energy),
        Unit::Metre => Some(Kind::Length),
        Unit::AmpereSquareMetre => Some(Kind::Moment),
        Unit::Ratio => Some(Kind::Dimensionless),
        Unit::Ampere => Some(Kind::Current),
        Unit::AmperePerSquareMetre => Some(Kind::CurrentDensity),
        Unit::CubicMetre => Some(Kind::Volume),
        // No unit table entries for these yet: bounds are plain SI numbers.
        Unit::NewtonMetre | Unit::Ohm | Unit::Watt | Unit::Kelvin => None,
    }
}

/// A bare flux density bound from which the number was meant in mT (`value_quantity`), T.
const BARE_TESLA_LIMIT: f64 = 10.0;

/// A quantity compared with a value (a bound, a target) in SI, its unit
/// checked against the value's: a bare number is taken as SI.
pub(super) fn value_quantity(ctx: &Context, i: &Item, value: &ValueName, what: &str, role: &str) -> Result<f64, Diagnostic> {
    let (v, kind) = ctx.any_quantity_for(i, what, bound_kind(value.unit).unwrap_or(Kind::Dimensionless))?;
    // `max = 50` on a probe, meant as 50 mT, was read as 50 T and passed
    // every design: a bare flux density from 10 T up (past what permanent
    // magnets give, about 5 T in the strongest Halbach cylinders, from
    // memory), or any past the strongest steady field made, is refused.
    let bare_tesla = ctx.is_bare(i) && v.abs() >= BARE_TESLA_LIMIT;
    if value.unit == Unit::Tesla && (bare_tesla || v.abs() > study::checks::STRONGEST_APPLIED_FIELD) {
        let hint = match bare_tesla {
            true => format!("; a bare number is tesla: write the unit (\"{v} mT\")"),
            false => " (laboratories' steady fields reach about 45 T)".to_string(),
        };
        return Err(Diagnostic::new(
            format!("{what}: the {role} {v} T is past any field a magnet assembly gives, so no design meets or breaks it{hint}"),
            Some(i.span.clone()),
        ));
    }
    match (kind, bound_kind(value.unit)) {
        (None, _) => Ok(v),
        (Some(Kind::Percent), Some(Kind::Dimensionless)) => Ok(v / 100.0),
        (Some(k), Some(want)) if k == want => Ok(v),
        (Some(k), _) => Err(Diagnostic::new(
            format!(
                "{what}: the {role} is {} but '{}' is {} ({})",
                k.describe(),
                value.name,
                value.unit.quantity(),
                if value.unit.symbol().is_empty() {
                    "a plain number"
                } else {
                    value.unit.symbol()
                }
            ),
            Some(i.span.clone()),
        )),
    }
}

/// The value's typed name, or a located error listing the nearest names.
/// A local peak (a part's `b.max`, a magnet's `margin_local`) is refused:
/// it sits at a corner where the field grows with each refinement, so a
/// bound on it passed or failed with the mesh (`part.plate.b.max <= 2 T`
/// passed at 1.1 T on a plate whose corner reads more on a finer mesh).
pub(super) fn value_name(item: &Item, model: &Model) -> Result<ValueName, Diagnostic> {
    let written = item.str("value")?;
    if study::estimate::is_local(written) {
        let instead = match written.strip_suffix(".b.max") {
            Some(part) => format!("{part}.saturated_share (the share above its curve's knee) or {part}.b.mean"),
            None => {
                let magnet = written.trim_end_matches(".margin_local");
                format!("{magnet}.margin (over the worst 1 % of its volume) or {magnet}.share_past_knee")
            }
        };
        return Err(Diagnostic::new(
            format!("[[expect]] on '{written}': a peak at one point, a corner where the field grows with each refinement, so no bound on it holds; bound {instead} instead, which converge"),
            Some(item.span.clone()),
        ));
    }
    study::value_names::value_name(model, written).ok_or_else(|| {
        let names = study::value_names::value_names(model);
        let err = Diagnostic::new(format!("this study reports no value named '{written}'"), Some(item.span.clone()));
        // A component of the other geometry: y is z about the axis, x is r.
        let axisymmetric = model.symmetry == mesher::Symmetry::Axisymmetric;
        let swaps: &[(&str, &str)] = if axisymmetric {
            &[("y", "z"), ("x", "r"), ("by", "bz"), ("bx", "br")]
        } else {
            &[("z", "y"), ("r", "x"), ("bz", "by"), ("br", "bx")]
        };
        let mapped = written.rsplit_once('.').and_then(|(head, last)| {
            let to = swaps.iter().find(|(from, _)| *from == last)?.1;
            let name = format!("{head}.{to}");
            names.iter().any(|n| n.name == name).then_some(name)
        });
        if let (Some(why), "energy" | "coenergy") = (study::net_current::unbounded_energy_warning(model), written) {
            return err.with_help(Some(why));
        }
        if let Some(grade) = knee_less_grade(model, written) {
            return err.with_help(Some(format!(
                "the magnet's grade '{grade}' gives no intrinsic coercivity (hcj), so it has no knee to measure a margin, share or loss against; give hcj, or jh, from its data sheet"
            )));
        }
        match mapped {
            Some(m) => err.with_help(Some(format!(
                "components in {} study are {}; did you mean '{m}'?",
                if axisymmetric { "an axisymmetric" } else { "a planar" },
                if axisymmetric { "r and z" } else { "x and y" }
            ))),
            None => err.suggest(written, names.iter().map(|n| n.name.as_str())),
        }
    })
}

/// The grade of the magnet a knee value (`magnet.NAME.margin`, ...) names,
/// where that grade has no coercivity and so no such value.
fn knee_less_grade<'m>(model: &'m Model, written: &str) -> Option<&'m str> {
    let (name, value) = written.strip_prefix("magnet.")?.rsplit_once('.')?;
    if !["margin", "margin_local", "share_past_knee", "loss"].contains(&value) {
        return None;
    }
    let part = model.parts.iter().find(|p| p.name == name)?;
    match &part.material.material {
        study::materials::Material::Magnet(g) if !g.hcj.is_finite() => Some(&part.material.name),
        _ => None,
    }
}

/// `[[expect]]` tables with their spans, their values checked against the model.
pub(super) fn expects(top: &Fields, ctx: &Context, model: &Model) -> Result<Vec<(Expect, Range<usize>)>, Diagnostic> {
    let mut out = Vec::new();
    for item in named_tables(top, "expect")? {
        let t = item.table("[[expect]]", EXPECT)?;
        let value = value_name(t.require("value")?, model)?;
        let what = format!("expect '{}'", value.name);
        let q = |i: &Item| value_quantity(ctx, i, &value, &what, "bound");
        let text = |i: &Item| match &i.value {
            Value::Str(s) => s.clone(),
            Value::Num(n) => format!("{n}"),
            _ => String::new(),
        };
        let given = t.present(&["min", "max", "between", "near"]);
        let bound = match given.as_slice() {
            ["min"] => (Bound::Min(q(t.require("min")?)?), format!(">= {}", text(t.require("min")?))),
            ["max"] => (Bound::Max(q(t.require("max")?)?), format!("<= {}", text(t.require("max")?))),
            ["min", "max"] => (
                Bound::Between(q(t.require("min")?)?, q(t.require("max")?)?),
                format!("{} .. {}", text(t.require("min")?), text(t.require("max")?)),
            ),
            ["between"] => {
                let b = t.require("between")?;
                let a = b.array(&what)?;
                if a.len() != 2 {
                    return Err(Diagnostic::new(format!("{what}: between takes [low, high]"), Some(b.span.clone())));
                }
                (Bound::Between(q(&a[0])?, q(&a[1])?), format!("{} .. {}", text(&a[0]), text(&a[1])))
            }
            ["near"] => {
                let n = t.require("near")?;
                let target = q(n)?;
                let tol = t.require("tolerance")?;
                let abs = near_tolerance(ctx, tol, &value, target, &what)?;
                (Bound::Near(target, abs), format!("{} +- {}", text(n), text(tol)))
            }
            _ => {
                return Err(Diagnostic::new(
                    format!("{what} needs min, max, min and max, between, or near with tolerance"),
                    Some(item.span.start..item.span.start + 1),
                ))
            }
        };
        if let Bound::Between(lo, hi) = bound.0 {
            if lo > hi {
                return Err(Diagnostic::new(
                    format!("{what}: the low bound is above the high bound"),
                    Some(item.span.clone()),
                ));
            }
        }
        let statistic = statistic(&t, top, &what)?;
        out.push((
            Expect {
                value,
                bound: bound.0,
                text: bound.1,
                statistic,
            },
            item.span.clone(),
        ));
    }
    Ok(out)
}

/// A `near` bound's tolerance, absolute, in SI: a percentage of the target,
/// or a quantity of the value's own kind (checked as a bound is: it took
/// any unit, and `"5 N"` around a field passed as 5 T). One as large as
/// the target is refused: it passes values down to zero and of the other
/// sign, so the check cannot fail for a design that works at all
/// (`tolerance = 5` beside `near = "50 mT"`, read as 5 T where 5 % was
/// meant, passed 42 mT and would pass anything under 5 T).
fn near_tolerance(ctx: &Context, tol: &Item, value: &ValueName, target: f64, what: &str) -> Result<f64, Diagnostic> {
    let abs = match ctx.any_quantity(tol, what)? {
        (v, Some(Kind::Percent)) => v / 100.0 * target.abs(),
        _ => value_quantity(ctx, tol, value, what, "tolerance")?,
    }
    .abs();
    if target != 0.0 && abs >= target.abs() {
        let hint = match ctx.is_bare(tol) && !value.unit.symbol().is_empty() {
            true => format!(" (a bare number is in {}, SI; a percentage is written \"5 %\")", value.unit.symbol()),
            false => String::new(),
        };
        return Err(Diagnostic::new(
            format!("{what}: the tolerance is as large as the target itself{hint}, so the check passes values down to zero and of the other sign; give a tolerance smaller than the target"),
            Some(tol.span.clone()),
        ));
    }
    Ok(abs)
}

pub(super) fn output(top: &Fields, ctx: &Context) -> Result<OutputFlags, Diagnostic> {
    let empty = Item {
        value: Value::Table(Vec::new()),
        span: 0..0,
    };
    let o = top.get("output").unwrap_or(&empty).table("[output]", OUTPUT)?;
    let flag = |k: &str| o.get(k).map(|v| v.bool(&format!("output.{k}"))).transpose().map(|v| v.unwrap_or(true));
    Ok(OutputFlags {
        vtk: flag("vtk")?,
        plots: flag("plots")?,
        report: flag("report")?,
        csv: flag("csv")?,
        log_scale: scale(&o, "field_scale", &["linear", "log"])?.unwrap_or(false),
        field_range: flux_range(&o, "field_range", ctx)?,
        chart_log: scale(&o, "chart_scale", &["auto", "linear", "log"])?,
        chart_range: flux_range(&o, "chart_range", ctx)?,
    })
}

/// A scale key: Some(true) for "log", Some(false) for "linear", None for
/// "auto" or no key.
fn scale(o: &Fields, key: &str, allowed: &[&str]) -> Result<Option<bool>, Diagnostic> {
    let Some(v) = o.get(key) else { return Ok(None) };
    match v.str(&format!("output.{key}"))? {
        "linear" => Ok(Some(false)),
        "log" => Ok(Some(true)),
        "auto" if allowed.contains(&"auto") => Ok(None),
        other => Err(Diagnostic::new(
            format!(
                "output.{key}: '{other}' is not a scale; use {}",
                allowed.iter().map(|a| format!("\"{a}\"")).collect::<Vec<_>>().join(" or ")
            ),
            Some(v.span.clone()),
        )
        .suggest(other, allowed.iter().copied())),
    }
}

/// A flux-density range key, `[low, high]` with 0 < low < high.
fn flux_range(o: &Fields, key: &str, ctx: &Context) -> Result<Option<(f64, f64)>, Diagnostic> {
    let Some(r) = o.get(key) else { return Ok(None) };
    let a = r.array(&format!("output.{key}"))?;
    let bad = || {
        Diagnostic::new(
            format!("output.{key}: give [low, high] flux densities, low above 0 and below high, such as [\"0.5 mT\", \"1.5 T\"]"),
            Some(r.span.clone()),
        )
    };
    if a.len() != 2 {
        return Err(bad());
    }
    let name = format!("output.{key}");
    let (lo, hi) = (ctx.positive(&a[0], Kind::FluxDensity, &name)?, ctx.positive(&a[1], Kind::FluxDensity, &name)?);
    if lo >= hi {
        return Err(bad());
    }
    Ok(Some((lo, hi)))
}

/// `statistic = "p99"`: an expectation on a statistic over the case's
/// `[tolerance]` samples (refused without one; the percentiles need Monte
/// Carlo samples, so a corners study takes min, max and worst only).
fn statistic(t: &Fields, top: &Fields, what: &str) -> Result<Option<Statistic>, Diagnostic> {
    const WORDS: [&str; 6] = ["min", "p1", "p50", "p99", "max", "worst"];
    let Some(item) = t.get("statistic") else { return Ok(None) };
    let word = item.str(&format!("{what}: statistic"))?;
    let s = match word {
        "min" => Statistic::Min,
        "p1" => Statistic::P1,
        "p50" => Statistic::P50,
        "p99" => Statistic::P99,
        "max" => Statistic::Max,
        "worst" => Statistic::Worst,
        other => {
            return Err(Diagnostic::new(
                format!("{what}: '{other}' is not a statistic; use one of {}", WORDS.join(", ")),
                Some(item.span.clone()),
            )
            .suggest(other, WORDS))
        }
    };
    let Some(tol) = top.get("tolerance") else {
        return Err(Diagnostic::new(
            format!("{what}: a statistic is taken over the samples of a [tolerance] study, and this case has none; add one, or drop `statistic` to bound the nominal value"),
            Some(item.span.clone()),
        ));
    };
    let corners =
        matches!(&tol.value, Value::Table(entries) if entries.iter().any(|(k, v)| k.name == "method" && matches!(&v.value, Value::Str(m) if m == "corners")));
    if corners && matches!(s, Statistic::P1 | Statistic::P50 | Statistic::P99) {
        return Err(Diagnostic::new(
            format!("{what}: a percentile needs Monte Carlo samples; a corners study gives min, max and worst"),
            Some(item.span.clone()),
        ));
    }
    Ok(Some(s))
}
