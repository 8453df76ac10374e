//! Stage two of reading a case: check every table, resolve names, convert
//! units and build the [`Model`], with the span of each part, probe and
//! expectation kept beside it for messages. One file per table, each with
//! its allowed keys beside its reader.

mod boundary_table;
mod dxf_shape;
mod expects;
mod materials_table;
mod measures;
mod mesh_table;
mod names;
mod optimize_table;
mod outline_table;
mod params;
mod parts;
mod pattern;
mod seek_table;
mod study_table;
mod tolerance_table;

pub use mesh_table::DEFAULT_MAX_ELEMENTS;
pub use optimize_table::{Constraint, Objective, Optimize};
pub use params::{params, sweep};
pub use seek_table::Seek;
pub use tolerance_table::{Method, Tolerance};

use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Item, Value};
use crate::case::quantity::Context;
use crate::case::units::Kind;
use expects::{expects, output};
use materials_table::user_materials;
use measures::{fluxes, forces, probes};
use mesh_table::{mesh_settings, solver_settings};
use names::{check_unique_names, TOP};
use parts::parts_of;
use std::collections::BTreeMap;
use std::ops::Range;
use std::path::Path;
use study::model::Model;
use study::{Origin, StudyError};
use study_table::{applied_field, boundary, depth, geometry, length_unit, STUDY};

/// Most parts a case may have: each gets its own mesh of at least tens of
/// triangles, so 150 000 parts meant millions of triangles and minutes
/// before any output.
pub const MAX_PARTS: usize = 10_000;

/// Where each part, probe and expectation of a model was written: byte
/// ranges of the case text, by the model's indices.
#[derive(Clone, Debug, Default)]
pub struct Spans {
    /// The `[[part]]` tables.
    pub parts: Vec<Range<usize>>,
    /// The `[[probe]]` tables.
    pub probes: Vec<Range<usize>>,
    /// The `[[expect]]` tables.
    pub expects: Vec<Range<usize>>,
}

impl Spans {
    /// The span a study error points at: the first character of its item.
    pub fn of(&self, origin: Option<Origin>) -> Option<Range<usize>> {
        let span = match origin? {
            Origin::Part(i) => self.parts.get(i)?,
            Origin::Probe(i) => self.probes.get(i)?,
        };
        Some(span.start..span.start + 1)
    }

    /// A study error as a diagnostic at its item.
    pub fn diagnostic(&self, e: &StudyError) -> Diagnostic {
        Diagnostic::new(e.message.clone(), self.of(e.origin)).with_help(e.help.clone())
    }
}

/// Builds the model for one set of parameter values, with its spans.
pub fn resolve(doc: &Item, params: &BTreeMap<String, f64>, case_dir: &Path) -> Result<(Model, Spans), Diagnostic> {
    resolve_with(doc, params, case_dir, None)
}

/// `resolve` with an accuracy that replaces `[study] accuracy` (Some(None)
/// is "off"), as if the case had said it: the default element order and
/// first mesh follow it too. (Set on the model afterwards, an accuracy of
/// 0.01 % kept the quadratic elements and first mesh sized for 0.1 %.)
pub fn resolve_with(doc: &Item, params: &BTreeMap<String, f64>, case_dir: &Path, accuracy: Option<Option<f64>>) -> Result<(Model, Spans), Diagnostic> {
    let (model, spans, order_chosen) = resolve_at(doc, params, case_dir, accuracy, None)?;
    if order_chosen && model.mesh.order < mesh_table::ORDER_STEP_ORDER && study::run::order_step_is_trusted_unmeshed(&model) {
        let (model, spans, _) = resolve_at(doc, params, case_dir, accuracy, Some(mesh_table::ORDER_STEP_ORDER))?;
        return Ok((model, spans));
    }
    Ok((model, spans))
}

/// `resolve_with` at element order `order` when the case gives none
/// (None: `mesh_table::default_order`), and whether the order and the
/// first mesh were left to the study (accuracy on, neither `[mesh] order`
/// nor `size` given).
fn resolve_at(
    doc: &Item,
    params: &BTreeMap<String, f64>,
    case_dir: &Path,
    accuracy: Option<Option<f64>>,
    order: Option<u32>,
) -> Result<(Model, Spans, bool), Diagnostic> {
    let top = doc.table("the case file", TOP)?;
    let empty = Item {
        value: Value::Table(Vec::new()),
        span: 0..0,
    };
    let study = top.get("study").unwrap_or(&empty).table("[study]", STUDY)?;
    let (unit_name, unit) = length_unit(&study)?;
    let ctx = Context {
        params,
        length_unit: unit,
        case_dir: Some(case_dir),
    };
    let symmetry = geometry(&study)?;
    let user_materials = user_materials(&top, &ctx, case_dir)?;
    let temperature = match study.get("temperature") {
        Some(t) => ctx.quantity(t, Kind::Temperature, "study.temperature")?,
        None => 20.0,
    };
    let parts_items = match top.get("part") {
        Some(p) => p.tables("[[part]]")?,
        None => &[],
    };
    if parts_items.is_empty() {
        return Err(Diagnostic::new("the case has no [[part]]: a study needs at least one part", Some(0..1)));
    }
    if parts_items.len() > MAX_PARTS {
        return Err(Diagnostic::new(
            format!(
                "the case has {} [[part]] tables; at most {MAX_PARTS} (a 2D section of one assembly), split the study",
                parts_items.len()
            ),
            Some(parts_items[MAX_PARTS].span.start..parts_items[MAX_PARTS].span.start + 1),
        ));
    }
    let accuracy = match accuracy {
        Some(given) => given,
        None => study_table::accuracy(&study)?,
    };
    let mut mesh = mesh_settings(&top, &ctx)?;
    let mesh_key_given = |key: &str| {
        top.get("mesh")
            .and_then(|m| m.table("[mesh]", mesh_table::MESH).ok())
            .is_some_and(|m| m.get(key).is_some())
    };
    let size_given = mesh_key_given("size");
    let order_given = mesh_key_given("order");
    let order_chosen = accuracy.is_some() && !size_given && !order_given;
    if !order_given {
        mesh.order = order.unwrap_or_else(|| mesh_table::default_order(accuracy));
    }
    let grading_given = mesh_key_given("grading");
    if accuracy.is_some() && !grading_given {
        mesh.grading = mesh_table::adaptive_grading(mesh.order);
    }
    let mut parts = Vec::new();
    let mut spans = Spans::default();
    let mut size_defaulted = Vec::new();
    // Where each [[part]] table's parts start: an array's copies are one body.
    let mut body_starts = Vec::new();
    for item in parts_items {
        let own_size = matches!(&item.value, Value::Table(t) if t.iter().any(|(k, _)| k.name == "mesh_size"));
        body_starts.push(parts.len());
        for p in parts_of(item, &ctx, symmetry, &user_materials, &mesh, &parts)? {
            parts.push(p);
            spans.parts.push(item.span.clone());
            size_defaulted.push(!own_size);
        }
    }
    body_starts.push(parts.len());
    let bodies: Vec<&[study::model::Part]> = body_starts.windows(2).map(|w| &parts[w[0]..w[1]]).collect();
    let default = mesh_table::default_size(&bodies, ctx.length_unit);
    if let Some(target) = accuracy {
        // Quartic elements already start four times coarser (`order_scale`);
        // forces on them took a third mesh from twice that.
        let asked = match asked_values(&top) {
            mesh_table::Asked::Integrals if mesh.order > 3 => mesh_table::Asked::Points,
            a => a,
        };
        let default_first = default * mesh_table::first_mesh_scale(target, asked, mesh.order) * mesh_table::order_scale(mesh.order);
        if size_given {
            mesh.pilot_meshes = mesh_table::pilot_meshes(mesh.size, default_first);
        } else {
            mesh.size = default_first;
        }
    } else if !size_given {
        mesh.size = default;
    }
    // Parts without their own mesh_size take the study's, known only now;
    // a default one no coarser than the part itself (`mesh_table::part_size`).
    for (p, _) in parts.iter_mut().zip(&size_defaulted).filter(|(_, d)| **d) {
        p.mesh_size = if size_given { mesh.size } else { mesh_table::part_size(mesh.size, &p.shape) };
    }
    check_temperature(&study, temperature, &parts, "temperature")?;
    materials_table::check_coefficients_known(&top, &study, temperature, &parts, "temperature")?;
    let exposure = study_table::exposure(&study, &ctx, symmetry, temperature)?;
    if let Some(e) = &exposure {
        check_temperature(&study, e.temperature, &parts, "exposure")?;
        materials_table::check_coefficients_known(&top, &study, e.temperature, &parts, "exposure")?;
    }
    let mut model = Model {
        title: study
            .get("title")
            .map(|t| names::plain_text(t, "study.title"))
            .transpose()?
            .unwrap_or_else(|| "untitled study".into()),
        symmetry,
        length_unit: (unit_name, unit),
        depth: depth(&study, &ctx, symmetry)?,
        depth_given: study.get("depth").is_some(),
        temperature,
        boundary: boundary(&study, &ctx)?,
        applied_field: applied_field(&study, &ctx, symmetry)?,
        mesh,
        parts,
        probes: Vec::new(),
        forces: Vec::new(),
        fluxes: Vec::new(),
        expects: Vec::new(),
        output: output(&top, &ctx)?,
        newton: solver_settings(&top)?,
        reach_level: match study.get("reach_level") {
            Some(r) => ctx.positive(r, Kind::FluxDensity, "study.reach_level")?,
            None => study::checks::DEFAULT_REACH_LEVEL,
        },
        reach_from: study.get("reach_from").map(|p| ctx.point(p, "study.reach_from")).transpose()?,
        stray_field: true,
        params: params.clone(),
        allow: study_table::allowed(&study)?,
        accuracy,
        exposure,
        whole: None,
    };
    model.whole = boundary_table::boundaries(&top, &study, &ctx, symmetry, &mut model.boundary)?;
    boundary_table::refuse_floating_current(&top, &model)?;
    (model.probes, spans.probes) = probes(&top, &ctx)?.into_iter().unzip();
    model.forces = forces(&top, &ctx, &model)?;
    model.fluxes = fluxes(&top, &ctx, &model)?;
    check_unique_names(&top)?;
    (model.expects, spans.expects) = expects(&top, &ctx, &model)?.into_iter().unzip();
    Ok((model, spans, order_chosen))
}

/// What kind of values the case asks for, as the first mesh's size goes
/// (`mesh_table::first_mesh_scale`): integrals only (no probe and no
/// expectation), or also point probes, whose field is extracted from a ball
/// around them (`solver::post::extraction`; no line probe, whose peak is
/// read element by element, and expectations on point probes only), or
/// anything else. Expectations on forces keep the finest start: a force on
/// saturating steel converges more slowly (the plunger sweep's pull took a
/// third mesh in three of five variants from a coarser one, 4 s against
/// 8 s; docs/measurement-log.md).
fn asked_values(top: &crate::case::document::Fields) -> mesh_table::Asked {
    let items = |key: &str| -> Vec<&Item> {
        match top.get(key).map(|i| &i.value) {
            Some(Value::Array(a)) => a.iter().collect(),
            Some(_) => top.get(key).into_iter().collect(),
            None => Vec::new(),
        }
    };
    let field = |i: &Item, key: &str| -> Option<Value> {
        match &i.value {
            Value::Table(t) => t.iter().find(|(k, _)| k.name == key).map(|(_, v)| v.value.clone()),
            _ => None,
        }
    };
    let (probes, expects) = (items("probe"), items("expect"));
    let no_lines = probes.iter().all(|p| field(p, "line").is_none());
    let on_probes = expects
        .iter()
        .all(|e| matches!(field(e, "value"), Some(Value::Str(s)) if s.starts_with("probe.")));
    match (probes.is_empty() && expects.is_empty(), no_lines && on_probes) {
        (true, _) => mesh_table::Asked::Integrals,
        (false, true) => mesh_table::Asked::Extracted,
        _ => mesh_table::Asked::Points,
    }
}

/// Refuses a study temperature outside a magnet grade's temperature range.
fn check_temperature(study: &crate::case::document::Fields, temperature: f64, parts: &[study::model::Part], key: &str) -> Result<(), Diagnostic> {
    for p in parts {
        if let study::materials::Material::Magnet(g) = &p.material.material {
            let (lo, hi) = g.temperature_range();
            if !(lo..=hi).contains(&temperature) {
                let span = study.get(key).map(|t| t.span.clone());
                return Err(Diagnostic::new(
                    format!(
                        "study.{key} {temperature} degC is outside the range of magnet '{}' ({}): {lo} to {hi:.0} degC, where its temperature model holds",
                        p.name, p.material.name
                    ),
                    span,
                ));
            }
        }
    }
    Ok(())
}

/// Reads a design-question table of the case with the context of one
/// resolved model (its parameters and length unit).
fn with_model<T>(
    doc: &Item,
    params: &BTreeMap<String, f64>,
    model: &Model,
    read: impl FnOnce(&crate::case::document::Fields, &Context) -> Result<T, Diagnostic>,
) -> Result<T, Diagnostic> {
    let top = doc.table("the case file", TOP)?;
    let ctx = Context {
        params,
        length_unit: model.length_unit.1,
        case_dir: None,
    };
    read(&top, &ctx)
}

/// The case's `[seek]`, resolved against a model of the case (its value
/// name and target unit are checked there).
pub fn seek(doc: &Item, params: &BTreeMap<String, f64>, model: &Model) -> Result<Option<Seek>, Diagnostic> {
    with_model(doc, params, model, |top, ctx| seek_table::seek(top, ctx, model))
}

/// The case's `[tolerance]`, with nominal values from `params`.
pub fn tolerance(doc: &Item, params: &BTreeMap<String, f64>, model: &Model) -> Result<Option<Tolerance>, Diagnostic> {
    with_model(doc, params, model, tolerance_table::tolerance)
}

/// The case's `[optimize]`, resolved against a model of the case (value
/// names and bound units are checked there).
pub fn optimize(doc: &Item, params: &BTreeMap<String, f64>, model: &Model) -> Result<Option<Optimize>, Diagnostic> {
    with_model(doc, params, model, |top, ctx| optimize_table::optimize(top, ctx, model))
}
