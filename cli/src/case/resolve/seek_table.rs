//! `[seek]`: goal seek, the parameter value at which a result meets a
//! target (the smallest magnet that gives 5 mT at 100 mm).

use super::expects::{value_name, value_quantity};
use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Item};
use crate::case::quantity::Context;
use study::model::Model;

/// Keys of `[seek]`.
const SEEK: &[&str] = &["vary", "range", "value", "target"];

/// A goal seek, resolved against the case's first model.
#[derive(Clone, Debug, PartialEq)]
pub struct Seek {
    /// The parameter varied (a `[params]` name).
    pub vary: String,
    /// Its range, low to high.
    pub range: [f64; 2],
    /// The value sought, by name.
    pub value: String,
    /// Its unit symbol, for messages.
    pub unit: &'static str,
    /// The target, SI.
    pub target: f64,
    /// How close to the target the value is sought, SI: the study's
    /// accuracy times the target (0 with accuracy off: as closely as the
    /// values' errors allow).
    pub tolerance: f64,
}

/// The `[seek]` table, or None. `params` are the case's parameter names.
pub fn seek(top: &Fields, ctx: &Context, model: &Model) -> Result<Option<Seek>, Diagnostic> {
    let Some(item) = top.get("seek") else { return Ok(None) };
    let t = item.table("[seek]", SEEK)?;
    if let Some(s) = top.get("sweep") {
        return Err(Diagnostic::new(
            "[seek] and [sweep] together: a seek varies one parameter itself; remove the [sweep]",
            Some(s.span.clone()),
        ));
    }
    let vary_item = t.require("vary")?;
    let vary = vary_item.str("seek.vary")?.to_string();
    if !ctx.params.contains_key(&vary) {
        return Err(Diagnostic::new(
            format!("seek.vary: '{vary}' is not a parameter; give it a starting value in [params]"),
            Some(vary_item.span.clone()),
        )
        .suggest(&vary, ctx.params.keys().map(String::as_str)));
    }
    let range = range(t.require("range")?)?;
    let value_item = t.require("value")?;
    let value = value_name(value_item, model)?;
    let target = value_quantity(ctx, t.require("target")?, &value, "seek.target", "target")?;
    Ok(Some(Seek {
        vary,
        range,
        value: value.name.clone(),
        unit: value.unit.symbol(),
        target,
        tolerance: model.accuracy.map_or(0.0, |a| a * target.abs()),
    }))
}

/// `range = [low, high]`: two finite numbers, low below high.
fn range(item: &Item) -> Result<[f64; 2], Diagnostic> {
    let a = item.array("seek.range")?;
    let bad = || Diagnostic::new("seek.range: give [low, high] with low below high", Some(item.span.clone()));
    if a.len() != 2 {
        return Err(bad());
    }
    let (lo, hi) = (a[0].number("seek.range")?, a[1].number("seek.range")?);
    if !(lo.is_finite() && hi.is_finite()) || lo >= hi {
        return Err(bad());
    }
    Ok([lo, hi])
}
