//! `[study]`: the length unit, geometry, depth, outer boundary and applied field.

use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Value};
use crate::case::quantity::Context;
use crate::case::units::Kind;
use mesher::{OuterBoundary, Symmetry};

/// Keys of `[study]`.
pub const STUDY: &[&str] = &[
    "title",
    "geometry",
    "unit",
    "depth",
    "temperature",
    "boundary",
    "applied_field",
    "box",
    "reach_level",
    "reach_from",
    "allow",
    "accuracy",
    "exposure",
    "scale_to_whole",
];

/// Keys of `[study] exposure = { ... }`.
const EXPOSURE: &[&str] = &["temperature", "applied_field"];

/// Default `[study] accuracy`: relative error every asked value is refined to.
pub const DEFAULT_ACCURACY: f64 = 1e-3;
/// Tightest accuracy accepted (relative): below it the floating-point
/// solution itself (condition number times 1e-16) is not trustworthy.
const FINEST_ACCURACY: f64 = 1e-7;

pub(super) fn length_unit(study: &Fields) -> Result<(String, f64), Diagnostic> {
    let Some(u) = study.get("unit") else {
        return Ok(("mm".into(), 1e-3));
    };
    let name = u.str("study.unit")?;
    match crate::case::units::unit(name) {
        Some((Kind::Length, f)) => Ok((name.into(), f)),
        _ => Err(Diagnostic::new(format!("study.unit: '{name}' is not a length unit"), Some(u.span.clone()))
            .with_help(Some(crate::case::units::suggestion(name, Kind::Length)))),
    }
}

pub(super) fn geometry(study: &Fields) -> Result<Symmetry, Diagnostic> {
    let Some(g) = study.get("geometry") else {
        return Ok(Symmetry::Axisymmetric);
    };
    match g.str("study.geometry")? {
        "axisymmetric" => Ok(Symmetry::Axisymmetric),
        "planar" => Ok(Symmetry::Planar),
        other => Err(Diagnostic::new(
            format!("study.geometry: unknown geometry '{other}'; expected \"axisymmetric\" or \"planar\""),
            Some(g.span.clone()),
        )
        .suggest(other, ["axisymmetric", "planar"])),
    }
}

pub(super) fn depth(study: &Fields, ctx: &Context, symmetry: Symmetry) -> Result<f64, Diagnostic> {
    match (study.get("depth"), symmetry) {
        (Some(d), Symmetry::Planar) => ctx.positive(d, Kind::Length, "study.depth"),
        (Some(d), Symmetry::Axisymmetric) => Err(Diagnostic::new("study.depth applies to planar studies only", Some(d.span.clone()))),
        (None, Symmetry::Planar) => Ok(1.0),
        (None, Symmetry::Axisymmetric) => Ok(1.0),
    }
}

pub(super) fn boundary(study: &Fields, ctx: &Context) -> Result<OuterBoundary, Diagnostic> {
    let kind = match study.get("boundary") {
        None => "open",
        Some(b) => b.str("study.boundary")?,
    };
    let box_item = study.get("box");
    match kind {
        "open" => {
            if let Some(b) = box_item {
                return Err(Diagnostic::new("study.box applies to boundary = \"flux-parallel\" only", Some(b.span.clone())));
            }
            Ok(OuterBoundary::Open)
        }
        "flux-parallel" => {
            let from_to = match box_item {
                None => None,
                Some(b) => {
                    let t = b.table("study.box", &["from", "to"])?;
                    Some((ctx.point(t.require("from")?, "study.box.from")?, ctx.point(t.require("to")?, "study.box.to")?))
                }
            };
            Ok(OuterBoundary::FluxParallel {
                from_to,
                sides: Default::default(),
            })
        }
        other => {
            let span = study.get("boundary").map(|b| b.span.clone());
            Err(Diagnostic::new(
                format!("study.boundary: unknown boundary '{other}'; expected \"open\" or \"flux-parallel\""),
                span,
            )
            .suggest(other, ["open", "flux-parallel"]))
        }
    }
}

pub(super) fn applied_field(study: &Fields, ctx: &Context, symmetry: Symmetry) -> Result<[f64; 2], Diagnostic> {
    field_of(study, ctx, symmetry, "study.applied_field")
}

/// A uniform field under `applied_field` in a table (`what` names it in messages).
fn field_of(table: &Fields, ctx: &Context, symmetry: Symmetry, what: &str) -> Result<[f64; 2], Diagnostic> {
    let Some(a) = table.get("applied_field") else {
        return Ok([0.0, 0.0]);
    };
    let field = field_components(a, ctx, symmetry, what)?;
    let magnitude = field[0].hypot(field[1]);
    if magnitude > study::checks::STRONGEST_APPLIED_FIELD {
        return Err(Diagnostic::new(
            format!(
                "{what}: {magnitude} T is past any steady field made (laboratories reach about 45 T); a bare number is tesla, so a field strength needs mu0 H in tesla, or a flux density its unit (\"500 mT\")"
            ),
            Some(a.span.clone()),
        ));
    }
    Ok(field)
}

/// The components of an `applied_field` item, T.
fn field_components(a: &crate::case::document::Item, ctx: &Context, symmetry: Symmetry, what: &str) -> Result<[f64; 2], Diagnostic> {
    match (&a.value, symmetry) {
        (Value::Array(v), Symmetry::Planar) if v.len() == 2 => {
            Ok([ctx.quantity(&v[0], Kind::FluxDensity, what)?, ctx.quantity(&v[1], Kind::FluxDensity, what)?])
        }
        (Value::Array(_), _) => Err(Diagnostic::new(
            format!("{what}: give [x, y] in a planar study, or one value along z in an axisymmetric study"),
            Some(a.span.clone()),
        )),
        (_, Symmetry::Axisymmetric) => Ok([0.0, ctx.quantity(a, Kind::FluxDensity, what)?]),
        (_, Symmetry::Planar) => Err(Diagnostic::new(
            format!("{what}: a planar study needs [x, y], for example [\"0 T\", \"0.1 T\"]"),
            Some(a.span.clone()),
        )),
    }
}

/// What `check` lets pass that it would otherwise fail: `allow =
/// ["demagnetization"]` for a design whose magnet is meant to run past its
/// knee (a study of the loss itself).
pub(super) fn allowed(study: &Fields) -> Result<Vec<String>, Diagnostic> {
    const ALLOWED: &[&str] = &["demagnetization"];
    let Some(a) = study.get("allow") else { return Ok(Vec::new()) };
    a.array("study.allow")?
        .iter()
        .map(|item| {
            let word = item.str("study.allow")?;
            if ALLOWED.contains(&word) {
                Ok(word.to_string())
            } else {
                Err(Diagnostic::new(
                    format!("study.allow: unknown '{word}'; allowed: {}", ALLOWED.join(", ")),
                    Some(item.span.clone()),
                )
                .suggest(word, ALLOWED.iter().copied()))
            }
        })
        .collect()
}

/// `accuracy = "0.1 %"` (a percentage, or a plain fraction such as 0.001),
/// or `"off"` to keep the mesh as given and report no error estimates.
pub(super) fn accuracy(study: &Fields) -> Result<Option<f64>, Diagnostic> {
    let Some(a) = study.get("accuracy") else { return Ok(Some(DEFAULT_ACCURACY)) };
    let bad = |what: String| {
        Diagnostic::new(what, Some(a.span.clone())).with_help(Some(
            "give a relative error such as \"0.1 %\" or 0.001, or \"off\" to keep the mesh as given".into(),
        ))
    };
    let x = match &a.value {
        Value::Str(s) if s.trim() == "off" => return Ok(None),
        Value::Str(s) => {
            let t = s.trim();
            let Some(number) = t.strip_suffix('%') else {
                return Err(bad(format!("study.accuracy: '{t}' is not a percentage (\"0.1 %\") or \"off\"")));
            };
            number
                .trim()
                .parse::<f64>()
                .map_err(|_| bad(format!("study.accuracy: '{t}' is not a percentage")))?
                / 100.0
        }
        _ => a.number("study.accuracy")?,
    };
    if !(FINEST_ACCURACY..=0.5).contains(&x) {
        // In percent, as the key is written, rounded past the binary noise of x * 100.
        let percent = |v: f64| (v * 100.0 * 1e12).round() / 1e12;
        return Err(bad(format!(
            "study.accuracy: {} % is out of range; it must lie between {} % and 50 %",
            percent(x),
            percent(FINEST_ACCURACY)
        )));
    }
    Ok(Some(x))
}

/// `exposure = { temperature = "150 degC", applied_field = ... }`: an
/// earlier state the magnets went through (heat, an opposing field); each
/// magnet element then recoils from the lowest point it reached there.
/// The temperature defaults to the study's, the field to none.
pub(super) fn exposure(study: &Fields, ctx: &Context, symmetry: Symmetry, temperature: f64) -> Result<Option<study::model::Exposure>, Diagnostic> {
    let Some(e) = study.get("exposure") else { return Ok(None) };
    let t = e.table("study.exposure", EXPOSURE)?;
    let temperature = match t.get("temperature") {
        Some(v) => ctx.quantity(v, Kind::Temperature, "study.exposure.temperature")?,
        None => temperature,
    };
    Ok(Some(study::model::Exposure {
        temperature,
        applied_field: field_of(&t, ctx, symmetry, "study.exposure.applied_field")?,
    }))
}
