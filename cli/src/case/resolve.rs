//! Stage two of reading a case: check every table, resolve names, convert
//! units and build the [`Model`].

use super::diagnostic::Diagnostic;
use super::document::{Fields, Item, Value};
use super::model::*;
use super::quantity::Context;
use super::units::Kind;
use crate::materials::{self, Entry, MagnetGrade, Material};
use mesher::{OuterBoundary, Shape, Symmetry};
use std::collections::BTreeMap;
use std::path::Path;

const TOP: &[&str] = &[
    "study",
    "mesh",
    "params",
    "sweep",
    "materials",
    "part",
    "probe",
    "force",
    "flux",
    "expect",
    "output",
    "solver",
];
const SOLVER: &[&str] = &[
    "residual_tolerance",
    "update_tolerance",
    "max_iterations",
    "reuse_factorization",
    "stiffen_tangent_above",
];
const STUDY: &[&str] = &[
    "title",
    "geometry",
    "unit",
    "depth",
    "temperature",
    "boundary",
    "applied_field",
    "box",
    "reach_level",
];
const MESH: &[&str] = &["size", "min_angle", "grading", "max_elements", "order"];
const PART: &[&str] = &[
    "name",
    "material",
    "polygon",
    "rect",
    "circle",
    "magnetization",
    "mesh_size",
    "current",
    "current_density",
];
const SHAPES: &[&str] = &["polygon", "rect", "circle"];
const MATERIAL: &[&str] = &["bh", "bh_csv", "mur", "br", "hcb", "hcj", "br_coeff", "hcj_coeff", "description"];
const PROBE: &[&str] = &["name", "point", "line"];
const FORCE: &[&str] = &["name", "parts", "torque_about"];
const FLUX: &[&str] = &["name", "line", "winding", "turns"];
const EXPECT: &[&str] = &["value", "min", "max", "between", "near", "tolerance"];
const OUTPUT: &[&str] = &["vtk", "plots", "report", "csv"];

/// Default largest number of triangles before the mesher refuses.
pub const DEFAULT_MAX_ELEMENTS: usize = 3_000_000;

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
    Ok((0..n)
        .map(|i| {
            let t = if n == 1 { 0.0 } else { i as f64 / (n - 1) as f64 };
            if log {
                (from.ln() + t * (to.ln() - from.ln())).exp()
            } else {
                from + t * (to - from)
            }
        })
        .collect())
}

/// Builds the model for one set of parameter values.
pub fn resolve(doc: &Item, params: &BTreeMap<String, f64>, case_dir: &Path) -> Result<Model, Diagnostic> {
    let top = doc.table("the case file", TOP)?;
    let empty = Item {
        value: Value::Table(Vec::new()),
        span: 0..0,
    };
    let study = top.get("study").unwrap_or(&empty).table("[study]", STUDY)?;
    let (unit_name, unit) = length_unit(&study)?;
    let ctx = Context { params, length_unit: unit };
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
    let mesh = mesh_settings(&top, &ctx, parts_items)?;
    let mut parts = Vec::new();
    for item in parts_items {
        parts.push(part(item, &ctx, symmetry, &user_materials, &mesh, &parts)?);
    }
    let mut model = Model {
        title: study
            .get("title")
            .map(|t| t.str("study.title").map(str::to_string))
            .transpose()?
            .unwrap_or_else(|| "untitled study".into()),
        symmetry,
        length_unit: (unit_name, unit),
        depth: depth(&study, &ctx, symmetry)?,
        temperature,
        boundary: boundary(&study, &ctx)?,
        applied_field: applied_field(&study, &ctx, symmetry)?,
        mesh,
        parts,
        probes: Vec::new(),
        forces: Vec::new(),
        fluxes: Vec::new(),
        expects: Vec::new(),
        output: output(&top)?,
        newton: solver_settings(&top)?,
        reach_level: match study.get("reach_level") {
            Some(r) => ctx.positive(r, Kind::FluxDensity, "study.reach_level")?,
            None => 5e-3,
        },
        params: params.clone(),
    };
    model.probes = probes(&top, &ctx)?;
    model.forces = forces(&top, &ctx, &model)?;
    model.fluxes = fluxes(&top, &ctx, &model)?;
    model.expects = expects(&top, &ctx)?;
    check_unique_names(&top)?;
    Ok(model)
}

fn length_unit(study: &Fields) -> Result<(String, f64), Diagnostic> {
    let Some(u) = study.get("unit") else {
        return Ok(("mm".into(), 1e-3));
    };
    let name = u.str("study.unit")?;
    match super::units::unit(name) {
        Some((Kind::Length, f)) => Ok((name.into(), f)),
        _ => {
            Err(Diagnostic::new(format!("study.unit: '{name}' is not a length unit"), Some(u.span.clone()))
                .suggest(name, super::units::symbols_of(Kind::Length)))
        }
    }
}

fn geometry(study: &Fields) -> Result<Symmetry, Diagnostic> {
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

fn depth(study: &Fields, ctx: &Context, symmetry: Symmetry) -> Result<f64, Diagnostic> {
    match (study.get("depth"), symmetry) {
        (Some(d), Symmetry::Planar) => ctx.positive(d, Kind::Length, "study.depth"),
        (Some(d), Symmetry::Axisymmetric) => Err(Diagnostic::new("study.depth applies to planar studies only", Some(d.span.clone()))),
        (None, Symmetry::Planar) => Ok(1.0),
        (None, Symmetry::Axisymmetric) => Ok(1.0),
    }
}

fn boundary(study: &Fields, ctx: &Context) -> Result<OuterBoundary, Diagnostic> {
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
            Ok(OuterBoundary::FluxParallel { from_to })
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

fn applied_field(study: &Fields, ctx: &Context, symmetry: Symmetry) -> Result<[f64; 2], Diagnostic> {
    let Some(a) = study.get("applied_field") else {
        return Ok([0.0, 0.0]);
    };
    match (&a.value, symmetry) {
        (Value::Array(v), Symmetry::Planar) if v.len() == 2 => Ok([
            ctx.quantity(&v[0], Kind::FluxDensity, "study.applied_field")?,
            ctx.quantity(&v[1], Kind::FluxDensity, "study.applied_field")?,
        ]),
        (Value::Array(_), _) => Err(Diagnostic::new(
            "study.applied_field: give [x, y] in a planar study, or one value along z in an axisymmetric study",
            Some(a.span.clone()),
        )),
        (_, Symmetry::Axisymmetric) => Ok([0.0, ctx.quantity(a, Kind::FluxDensity, "study.applied_field")?]),
        (_, Symmetry::Planar) => Err(Diagnostic::new(
            "study.applied_field: a planar study needs [x, y], for example [\"0 T\", \"0.1 T\"]",
            Some(a.span.clone()),
        )),
    }
}

fn mesh_settings(top: &Fields, ctx: &Context, parts: &[Item]) -> Result<MeshSettings, Diagnostic> {
    let empty = Item {
        value: Value::Table(Vec::new()),
        span: 0..0,
    };
    let m = top.get("mesh").unwrap_or(&empty).table("[mesh]", MESH)?;
    let size = match m.get("size") {
        Some(s) => ctx.positive(s, Kind::Length, "mesh.size")?,
        None => default_size(parts, ctx),
    };
    let number = |key: &str, default: f64, lo: f64, hi: f64| bounded_number(&m, "mesh", key, default, lo, hi);
    Ok(MeshSettings {
        size,
        min_angle: number("min_angle", 28.0, 20.0, 33.0)?,
        grading: number("grading", 1.3, 1.05, 3.0)?,
        max_elements: number("max_elements", DEFAULT_MAX_ELEMENTS as f64, 100.0, 1e9)? as usize,
        order: number("order", 2.0, 1.0, 2.0)?.round() as u32,
    })
}

/// An optional number of a table, `default` when absent, else within [lo, hi].
fn bounded_number(table: &Fields, section: &str, key: &str, default: f64, lo: f64, hi: f64) -> Result<f64, Diagnostic> {
    let Some(v) = table.get(key) else { return Ok(default) };
    let x = v.number(&format!("{section}.{key}"))?;
    if !(lo..=hi).contains(&x) {
        return Err(Diagnostic::new(
            format!("{section}.{key} must lie between {lo} and {hi}, got {x}"),
            Some(v.span.clone()),
        ));
    }
    Ok(x)
}

/// The `[solver]` table: Newton-Raphson stopping rules and the step method.
fn solver_settings(top: &Fields) -> Result<solver::NewtonSettings, Diagnostic> {
    let empty = Item {
        value: Value::Table(Vec::new()),
        span: 0..0,
    };
    let t = top.get("solver").unwrap_or(&empty).table("[solver]", SOLVER)?;
    let d = solver::NewtonSettings::default();
    let number = |key: &str, default: f64, lo: f64, hi: f64| bounded_number(&t, "solver", key, default, lo, hi);
    Ok(solver::NewtonSettings {
        residual_tolerance: number("residual_tolerance", d.residual_tolerance, 1e-14, 1e-2)?,
        update_tolerance: number("update_tolerance", d.update_tolerance, 1e-14, 1.0)?,
        max_iterations: number("max_iterations", d.max_iterations as f64, 1.0, 1000.0)?.round() as usize,
        stiffen_tangent_above: number("stiffen_tangent_above", d.stiffen_tangent_above, 1e-12, 10.0)?,
        reuse_factorization: t
            .get("reuse_factorization")
            .map(|v| v.bool("solver.reuse_factorization"))
            .transpose()?
            .unwrap_or(d.reuse_factorization),
    })
}

/// A twentieth of the largest part extent when [mesh] size is not given.
fn default_size(parts: &[Item], ctx: &Context) -> f64 {
    let mut extent: f64 = 0.0;
    for p in parts {
        let Value::Table(entries) = &p.value else {
            continue;
        };
        for (k, v) in entries {
            let pts: Vec<[f64; 2]> = match (k.name.as_str(), &v.value) {
                ("rect", Value::Table(t)) => t.iter().filter_map(|(_, x)| ctx.point(x, "rect").ok()).collect(),
                ("polygon", Value::Array(a)) => a.iter().filter_map(|x| ctx.point(x, "polygon").ok()).collect(),
                ("circle", Value::Table(t)) => {
                    let r = t
                        .iter()
                        .find(|(k, _)| k.name == "radius")
                        .and_then(|(_, x)| ctx.quantity(x, Kind::Length, "radius").ok())
                        .unwrap_or(0.0);
                    extent = extent.max(2.0 * r);
                    Vec::new()
                }
                _ => Vec::new(),
            };
            let (lo, hi) = mesher::geometry::bbox(pts);
            if lo[0].is_finite() {
                extent = extent.max(hi[0] - lo[0]).max(hi[1] - lo[1]);
            }
        }
    }
    if extent > 0.0 {
        extent / 20.0
    } else {
        ctx.length_unit
    }
}

fn user_materials(top: &Fields, ctx: &Context, dir: &Path) -> Result<BTreeMap<String, (Entry, std::ops::Range<usize>)>, Diagnostic> {
    let mut out = BTreeMap::new();
    let Some(m) = top.get("materials") else {
        return Ok(out);
    };
    let Value::Table(entries) = &m.value else {
        return Err(Diagnostic::new(
            "[materials]: expected tables such as [materials.my-steel]",
            Some(m.span.clone()),
        ));
    };
    for (k, v) in entries {
        let what = format!("[materials.{}]", k.name);
        let t = v.table(&what, MATERIAL)?;
        let material = user_material(&t, ctx, dir, &what)?;
        let source = t
            .get("description")
            .map(|d| d.str(&what).map(str::to_string))
            .transpose()?
            .unwrap_or_else(|| "user data in the case file".into());
        out.insert(
            k.name.clone(),
            (
                Entry {
                    name: k.name.clone(),
                    family: "user".into(),
                    material,
                    source,
                },
                k.span.clone(),
            ),
        );
    }
    Ok(out)
}

fn user_material(t: &Fields, ctx: &Context, dir: &Path, what: &str) -> Result<Material, Diagnostic> {
    if let Some(br) = t.get("br") {
        let br_v = ctx.quantity(br, Kind::FluxDensity, &format!("{what} br"))?;
        let mu = match (t.get("mur"), t.get("hcb")) {
            (Some(m), None) => positive_number(m, &format!("{what} mur"))?,
            (None, Some(h)) => br_v / (solver::MU0 * ctx.positive(h, Kind::FieldStrength, &format!("{what} hcb"))?),
            (None, None) => 1.05,
            (Some(m), Some(_)) => {
                return Err(Diagnostic::new(
                    format!("{what}: give either mur or hcb for a magnet, not both"),
                    Some(m.span.clone()),
                ))
            }
        };
        if !(1.0..=10.0).contains(&mu) {
            let span = t.get("mur").or(t.get("hcb")).map(|i| i.span.clone());
            return Err(Diagnostic::new(
                format!("{what}: the recoil permeability {mu:.3} lies outside 1 to 10; check mur or hcb"),
                span,
            ));
        }
        let hcj = match t.get("hcj") {
            Some(h) => ctx.positive(h, Kind::FieldStrength, &format!("{what} hcj"))?,
            None => f64::INFINITY,
        };
        let coeff = |key: &str| {
            t.get(key)
                .map(|c| ctx.quantity(c, Kind::PercentPerKelvin, &format!("{what} {key}")))
                .transpose()
        };
        return Ok(Material::Magnet(MagnetGrade {
            br: br_v,
            recoil_permeability: mu,
            hcj,
            hcb: None,
            br_coeff: coeff("br_coeff")?.unwrap_or(0.0),
            hcj_coeff: coeff("hcj_coeff")?.unwrap_or(0.0),
            max_temperature: None,
        }));
    }
    let given = t.present(&["bh", "bh_csv", "mur"]);
    if given.len() != 1 {
        return Err(Diagnostic::new(
            format!("{what}: give exactly one of bh, bh_csv or mur (or br for a magnet)"),
            Some(t.span.start..t.span.start + 1),
        ));
    }
    match given[0] {
        "mur" => Ok(Material::Linear {
            relative_permeability: positive_number(t.require("mur")?, &format!("{what} mur"))?,
        }),
        "bh" => {
            let item = t.require("bh")?;
            let mut pts = Vec::new();
            for row in item.array(&format!("{what} bh"))? {
                let r = row.array(&format!("{what} bh row"))?;
                if r.len() != 2 {
                    return Err(Diagnostic::new(format!("{what} bh: each row is [H in A/m, B in T]"), Some(row.span.clone())));
                }
                pts.push([r[0].number("H")?, r[1].number("B")?]);
            }
            check_curve(&pts, item, what, None)?;
            Ok(Material::Soft { curve: pts })
        }
        _ => {
            let item = t.require("bh_csv")?;
            let rel = item.str(&format!("{what} bh_csv"))?;
            let path = dir.join(rel);
            let text = std::fs::read_to_string(&path)
                .map_err(|e| Diagnostic::new(format!("{what} bh_csv: cannot read {}: {e}", path.display()), Some(item.span.clone())))?;
            let (pts, lines) = parse_bh_csv(&text)
                .map_err(|(line, msg)| Diagnostic::new(format!("{what} bh_csv: {}:{line}: {msg}", path.display()), Some(item.span.clone())))?;
            check_curve(&pts, item, what, Some((&path, &lines)))?;
            Ok(Material::Soft { curve: pts })
        }
    }
}

fn positive_number(item: &Item, what: &str) -> Result<f64, Diagnostic> {
    let v = item.number(what)?;
    if v > 0.0 {
        Ok(v)
    } else {
        Err(Diagnostic::new(format!("{what} must be greater than zero, got {v}"), Some(item.span.clone())))
    }
}

/// Validates a B-H table; `csv` maps rows to file lines for the message.
fn check_curve(pts: &[[f64; 2]], item: &Item, what: &str, csv: Option<(&Path, &[usize])>) -> Result<(), Diagnostic> {
    solver::BhCurve::new(pts).map(|_| ()).map_err(|e| {
        let row = match e {
            solver::CurveError::NotFinite { row } | solver::CurveError::NotIncreasing { row } | solver::CurveError::SlopeBelowMu0 { row } => Some(row),
            solver::CurveError::DoesNotStartAtOrigin => Some(0),
            solver::CurveError::TooFewPoints(_) => None,
        };
        let place = match (csv, row) {
            (Some((path, lines)), Some(r)) => format!(" ({}:{})", path.display(), lines.get(r).copied().unwrap_or(0)),
            _ => String::new(),
        };
        let span = match (&item.value, row, csv) {
            (Value::Array(a), Some(r), None) => a.get(r).map_or(item.span.clone(), |x| x.span.clone()),
            _ => item.span.clone(),
        };
        Diagnostic::new(format!("{what} B-H table{place}: {e}"), Some(span))
    })
}

/// Curve points and the file line of each.
type CsvCurve = (Vec<[f64; 2]>, Vec<usize>);

/// Two columns H (A/m), B (T); a header line and # comments are skipped.
fn parse_bh_csv(text: &str) -> Result<CsvCurve, (usize, String)> {
    let mut pts = Vec::new();
    let mut lines = Vec::new();
    let mut header_allowed = true;
    for (i, line) in text.lines().enumerate() {
        let l = line.trim();
        if l.is_empty() || l.starts_with('#') {
            continue;
        }
        let cols: Vec<&str> = l.split([',', ';', '\t']).map(str::trim).collect();
        let nums: Result<Vec<f64>, _> = cols.iter().take(2).map(|c| c.parse::<f64>()).collect();
        match nums {
            Ok(n) if n.len() == 2 => {
                pts.push([n[0], n[1]]);
                lines.push(i + 1);
            }
            _ if header_allowed => {}
            _ => return Err((i + 1, format!("expected two numbers H, B; found '{l}'"))),
        }
        header_allowed = false;
    }
    Ok((pts, lines))
}

fn lookup_material(item: &Item, user: &BTreeMap<String, (Entry, std::ops::Range<usize>)>) -> Result<Entry, Diagnostic> {
    let name = item.str("part.material")?;
    if let Some((e, _)) = user.get(name) {
        return Ok(e.clone());
    }
    materials::lookup(name).ok_or_else(|| {
        let mut names = materials::names();
        names.extend(user.keys().cloned());
        Diagnostic::new(
            format!("unknown material '{name}' (not in the built-in library nor in [materials])"),
            Some(item.span.clone()),
        )
        .suggest(name, names.iter().map(String::as_str))
    })
}

fn part(
    item: &Item,
    ctx: &Context,
    symmetry: Symmetry,
    user: &BTreeMap<String, (Entry, std::ops::Range<usize>)>,
    mesh: &MeshSettings,
    before: &[Part],
) -> Result<Part, Diagnostic> {
    let t = item.table("[[part]]", PART)?;
    let name = t.require("name")?.str("part.name")?.to_string();
    if before.iter().any(|p| p.name == name) {
        return Err(Diagnostic::new(
            format!("a part named '{name}' already exists; part names must be unique"),
            Some(t.require("name")?.span.clone()),
        ));
    }
    let what = format!("part '{name}'");
    let material = lookup_material(t.require("material")?, user)?;
    let shapes = t.present(SHAPES);
    if shapes.len() != 1 {
        let msg = if shapes.is_empty() {
            format!("{what} needs a shape: one of rect, polygon or circle")
        } else {
            format!("{what} has {} shapes ({}); give exactly one", shapes.len(), shapes.join(", "))
        };
        return Err(Diagnostic::new(msg, Some(t.span.start..t.span.start + 1)));
    }
    let shape = shape(shapes[0], t.require(shapes[0])?, ctx, &what)?;
    let mesh_size = match t.get("mesh_size") {
        Some(m) => ctx.positive(m, Kind::Length, &format!("{what} mesh_size"))?,
        None => mesh.size,
    };
    let is_magnet = matches!(material.material, Material::Magnet(_));
    let magnetization = match (t.get("magnetization"), is_magnet) {
        (Some(m), true) => Some(direction(m, ctx, symmetry, &what)?),
        (None, true) => {
            return Err(Diagnostic::new(
                format!(
                    "{what} is a magnet ({}) and needs a magnetization direction, for example magnetization = \"+z\"",
                    material.name
                ),
                Some(t.span.start..t.span.start + 1),
            ))
        }
        (Some(m), false) => {
            return Err(Diagnostic::new(
                format!("{what}: magnetization applies to magnet materials only ('{}' is not one)", material.name),
                Some(m.span.clone()),
            ))
        }
        (None, false) => None,
    };
    let current = match (t.get("current"), t.get("current_density")) {
        (Some(c), None) => Some(ctx.quantity(c, Kind::Current, &format!("{what} current"))?),
        (None, Some(j)) => Some(ctx.quantity(j, Kind::CurrentDensity, &format!("{what} current_density"))? * shape.exact_area(symmetry)),
        (Some(c), Some(_)) => {
            return Err(Diagnostic::new(
                format!("{what}: give current or current_density, not both"),
                Some(c.span.clone()),
            ))
        }
        (None, None) => None,
    };
    if let (Some(_), true) = (current, is_magnet) {
        return Err(Diagnostic::new(
            format!("{what}: a magnet cannot carry a winding current here; model the winding as its own part"),
            t.get("current").or(t.get("current_density")).map(|i| i.span.clone()),
        ));
    }
    Ok(Part {
        name,
        material,
        shape,
        mesh_size,
        magnetization,
        current,
        span: item.span.clone(),
    })
}

fn shape(kind: &str, item: &Item, ctx: &Context, what: &str) -> Result<Shape, Diagnostic> {
    match kind {
        "rect" => {
            let t = item.table(&format!("{what} rect"), &["from", "to"])?;
            let from = ctx.point(t.require("from")?, &format!("{what} rect.from"))?;
            let to = ctx.point(t.require("to")?, &format!("{what} rect.to"))?;
            if from[0] == to[0] || from[1] == to[1] {
                return Err(Diagnostic::new(format!("{what}: the rectangle has zero area"), Some(item.span.clone())));
            }
            Ok(Shape::Rect { from, to })
        }
        "circle" => {
            let t = item.table(&format!("{what} circle"), &["center", "radius"])?;
            Ok(Shape::Circle {
                center: ctx.point(t.require("center")?, &format!("{what} circle.center"))?,
                radius: ctx.positive(t.require("radius")?, Kind::Length, &format!("{what} circle.radius"))?,
            })
        }
        _ => {
            let pts = item.array(&format!("{what} polygon"))?;
            if pts.len() < 3 {
                return Err(Diagnostic::new(
                    format!("{what}: a polygon needs at least 3 points, found {}", pts.len()),
                    Some(item.span.clone()),
                ));
            }
            Ok(Shape::Polygon(
                pts.iter().map(|p| ctx.point(p, &format!("{what} polygon"))).collect::<Result<_, _>>()?,
            ))
        }
    }
}

fn direction(item: &Item, ctx: &Context, symmetry: Symmetry, what: &str) -> Result<[f64; 2], Diagnostic> {
    let s = item.str(&format!("{what} magnetization"))?;
    let words: &[&str] = match symmetry {
        Symmetry::Axisymmetric => &["+z", "-z", "+r", "-r"],
        Symmetry::Planar => &["+x", "-x", "+y", "-y"],
    };
    let d = match s {
        "+z" | "+y" => Some([0.0, 1.0]),
        "-z" | "-y" => Some([0.0, -1.0]),
        "+r" | "+x" => Some([1.0, 0.0]),
        "-r" | "-x" => Some([-1.0, 0.0]),
        _ => None,
    };
    if let Some(d) = d {
        if words.contains(&s) {
            return Ok(d);
        }
        return Err(Diagnostic::new(
            format!("{what}: magnetization '{s}' does not fit this geometry; use one of {}", words.join(" ")),
            Some(item.span.clone()),
        ));
    }
    if symmetry == Symmetry::Planar {
        if let Ok(angle) = ctx.quantity(item, Kind::Angle, &format!("{what} magnetization")) {
            return Ok([angle.cos(), angle.sin()]);
        }
    }
    let extra = if symmetry == Symmetry::Planar {
        " or an angle such as \"30 deg\""
    } else {
        ""
    };
    Err(Diagnostic::new(
        format!("{what}: unknown magnetization '{s}'; use one of {}{extra}", words.join(" ")),
        Some(item.span.clone()),
    )
    .suggest(s, words.iter().copied()))
}

fn named_tables<'a>(top: &Fields<'a>, key: &str) -> Result<&'a [Item], Diagnostic> {
    match top.get(key) {
        Some(i) => i.tables(&format!("[[{key}]]")),
        None => Ok(&[]),
    }
}

fn probes(top: &Fields, ctx: &Context) -> Result<Vec<Probe>, Diagnostic> {
    let mut out = Vec::new();
    for item in named_tables(top, "probe")? {
        let t = item.table("[[probe]]", PROBE)?;
        let name = t.require("name")?.str("probe.name")?.to_string();
        let what = format!("probe '{name}'");
        let shape = match (t.get("point"), t.get("line")) {
            (Some(p), None) => ProbeShape::Point(ctx.point(p, &what)?),
            (None, Some(l)) => {
                let lt = l.table(&format!("{what} line"), &["from", "to", "points"])?;
                let points = match lt.get("points") {
                    None => 101,
                    Some(n) => {
                        let v = n.number("points")?;
                        if !(2.0..=100_000.0).contains(&v) || v.fract() != 0.0 {
                            return Err(Diagnostic::new(
                                format!("{what}: points must be a whole number from 2 to 100000"),
                                Some(n.span.clone()),
                            ));
                        }
                        v as usize
                    }
                };
                ProbeShape::Line {
                    from: ctx.point(lt.require("from")?, &what)?,
                    to: ctx.point(lt.require("to")?, &what)?,
                    points,
                }
            }
            _ => {
                return Err(Diagnostic::new(
                    format!("{what} needs exactly one of point or line"),
                    Some(item.span.start..item.span.start + 1),
                ))
            }
        };
        out.push(Probe {
            name,
            shape,
            span: item.span.clone(),
        });
    }
    Ok(out)
}

fn part_ref(item: &Item, model: &Model, what: &str) -> Result<usize, Diagnostic> {
    let name = item.str(what)?;
    model.part_index(name).ok_or_else(|| {
        Diagnostic::new(format!("{what}: no part named '{name}'"), Some(item.span.clone())).suggest(name, model.parts.iter().map(|p| p.name.as_str()))
    })
}

fn part_list(item: &Item, model: &Model, what: &str) -> Result<Vec<usize>, Diagnostic> {
    match &item.value {
        Value::Str(_) => Ok(vec![part_ref(item, model, what)?]),
        Value::Array(a) if !a.is_empty() => a.iter().map(|x| part_ref(x, model, what)).collect(),
        _ => Err(Diagnostic::new(
            format!("{what}: expected a part name or a list of part names"),
            Some(item.span.clone()),
        )),
    }
}

fn forces(top: &Fields, ctx: &Context, model: &Model) -> Result<Vec<ForceSpec>, Diagnostic> {
    let mut out = Vec::new();
    for item in named_tables(top, "force")? {
        let t = item.table("[[force]]", FORCE)?;
        let name = t.require("name")?.str("force.name")?.to_string();
        let parts = part_list(t.require("parts")?, model, &format!("force '{name}' parts"))?;
        let torque_about = match t.get("torque_about") {
            Some(p) => ctx.point(p, "force.torque_about")?,
            None => [0.0, 0.0],
        };
        out.push(ForceSpec { name, parts, torque_about });
    }
    Ok(out)
}

fn fluxes(top: &Fields, ctx: &Context, model: &Model) -> Result<Vec<FluxSpec>, Diagnostic> {
    let mut out = Vec::new();
    for item in named_tables(top, "flux")? {
        let t = item.table("[[flux]]", FLUX)?;
        let name = t.require("name")?.str("flux.name")?.to_string();
        let what = format!("flux '{name}'");
        match (t.get("line"), t.get("winding")) {
            (Some(l), None) => {
                let lt = l.table(&format!("{what} line"), &["from", "to"])?;
                out.push(FluxSpec::Line {
                    name,
                    from: ctx.point(lt.require("from")?, &what)?,
                    to: ctx.point(lt.require("to")?, &what)?,
                });
            }
            (None, Some(w)) => {
                let parts = part_list(w, model, &format!("{what} winding"))?;
                let mut signed = Vec::new();
                for p in parts {
                    let Some(i) = model.parts[p].current else {
                        return Err(Diagnostic::new(
                            format!("{what}: part '{}' carries no current, so it is not a winding", model.parts[p].name),
                            Some(w.span.clone()),
                        ));
                    };
                    signed.push((p, if i < 0.0 { -1.0 } else { 1.0 }));
                }
                let turns = match t.get("turns") {
                    Some(n) => positive_number(n, &format!("{what} turns"))?,
                    None => 1.0,
                };
                out.push(FluxSpec::Winding { name, parts: signed, turns });
            }
            _ => {
                return Err(Diagnostic::new(
                    format!("{what} needs exactly one of line or winding"),
                    Some(item.span.start..item.span.start + 1),
                ))
            }
        }
    }
    Ok(out)
}

fn expects(top: &Fields, ctx: &Context) -> Result<Vec<Expect>, Diagnostic> {
    let mut out = Vec::new();
    for item in named_tables(top, "expect")? {
        let t = item.table("[[expect]]", EXPECT)?;
        let value = t.require("value")?.str("expect.value")?.to_string();
        let what = format!("expect '{value}'");
        let q = |i: &Item| ctx.any_quantity(i, &what).map(|x| x.0);
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
                let abs = match ctx.any_quantity(tol, &what)? {
                    (v, Some(Kind::Percent)) => v / 100.0 * target.abs(),
                    (v, _) => v,
                };
                (Bound::Near(target, abs.abs()), format!("{} +- {}", text(n), text(tol)))
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
        out.push(Expect {
            value,
            bound: bound.0,
            text: bound.1,
            span: item.span.clone(),
        });
    }
    Ok(out)
}

fn output(top: &Fields) -> Result<OutputFlags, Diagnostic> {
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
    })
}

fn check_unique_names(top: &Fields) -> Result<(), Diagnostic> {
    for key in ["probe", "force", "flux"] {
        let mut seen = std::collections::HashSet::new();
        for item in named_tables(top, key)? {
            if let Value::Table(t) = &item.value {
                if let Some((_, n)) = t.iter().find(|(k, _)| k.name == "name") {
                    if let Value::Str(s) = &n.value {
                        if !seen.insert(s.clone()) {
                            return Err(Diagnostic::new(
                                format!("two [[{key}]] entries are named '{s}'; names must be unique"),
                                Some(n.span.clone()),
                            ));
                        }
                    }
                }
            }
        }
    }
    Ok(())
}
