//! `[materials]`: user magnet grades, B-H tables and CSV curves, and the
//! lookup of a part's material in them and the built-in library.

use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Item, Value};
use crate::case::quantity::Context;
use crate::case::units::Kind;
use std::collections::BTreeMap;
use std::path::Path;
use study::materials::{self, Entry, MagnetGrade, Material};

/// Largest B-H table file read, bytes (a measured curve has hundreds of rows).
const MAX_CSV_BYTES: u64 = 4 << 20;

/// Keys of a `[materials.NAME]` table.
const MATERIAL: &[&str] = &[
    "bh",
    "bh_csv",
    "mur",
    "br",
    "hcb",
    "hcj",
    "br_coeff",
    "hcj_coeff",
    "squareness",
    "jh",
    "description",
];

pub(super) fn user_materials(top: &Fields, ctx: &Context, dir: &Path) -> Result<BTreeMap<String, (Entry, std::ops::Range<usize>)>, Diagnostic> {
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
        super::names::checked_name(&k.name, k.span.clone(), "[materials] name")?;
        let what = format!("[materials.{}]", k.name);
        let t = v.table(&what, MATERIAL)?;
        let material = user_material(&t, ctx, dir, &what)?;
        let source = t
            .get("description")
            .map(|d| super::names::plain_text(d, &what))
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

/// Refuses a linear `mur` below any material's
/// (`study::materials::implausible_relative_permeability`).
fn refuse_below_any_material(mur: f64, item: &Item, what: &str) -> Result<(), Diagnostic> {
    match study::materials::implausible_relative_permeability(mur) {
        Some(why) => Err(Diagnostic::new(format!("{what} mur: {why}"), Some(item.span.clone()))),
        None => Ok(()),
    }
}

fn user_material(t: &Fields, ctx: &Context, dir: &Path, what: &str) -> Result<Material, Diagnostic> {
    if let Some(jh) = t.get("jh") {
        return table_magnet(t, ctx, jh, what);
    }
    if let Some(br) = t.get("br") {
        let br_v = ctx.quantity(br, Kind::FluxDensity, &format!("{what} br"))?;
        within_any_material(br_v, br, &format!("{what} br: a remanence"))?;
        if let Some(why) = study::materials::implausible_remanence(br_v) {
            return Err(Diagnostic::new(format!("{what} br: {why}"), Some(br.span.clone())));
        }
        let mu = match (t.get("mur"), t.get("hcb")) {
            (Some(m), None) => positive_number(m, &format!("{what} mur"))?,
            (None, Some(h)) => MagnetGrade::recoil_permeability_from(br_v, ctx.positive(h, Kind::FieldStrength, &format!("{what} hcb"))?),
            (None, None) => MagnetGrade::DEFAULT_RECOIL_PERMEABILITY,
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
            Some(h) => {
                let hcj = ctx.positive(h, Kind::FieldStrength, &format!("{what} hcj"))?;
                if let Some(why) = study::materials::implausible_coercivity(hcj) {
                    return Err(Diagnostic::new(format!("{what} hcj: {why}"), Some(h.span.clone())));
                }
                hcj
            }
            None => f64::INFINITY,
        };
        let (br_coeff, hcj_coeff) = coefficients(t, ctx, what)?;
        let squareness = match t.get("squareness") {
            Some(q) => {
                let v = positive_number(q, &format!("{what} squareness"))?;
                if !(0.5..=0.999).contains(&v) {
                    return Err(Diagnostic::new(
                        format!("{what} squareness: Hk/HcJ = {v} lies outside 0.5 to 0.999 (sintered NdFeB is about 0.97)"),
                        Some(q.span.clone()),
                    ));
                }
                v
            }
            None => MagnetGrade::DEFAULT_SQUARENESS,
        };
        return checked_coefficients(
            t,
            what,
            MagnetGrade {
                br: br_v,
                squareness,
                recoil_permeability: mu,
                hcj,
                hcb: None,
                br_coeff,
                hcj_coeff,
                max_temperature: None,
                intrinsic: None,
            },
        );
    }
    let given = t.present(&["bh", "bh_csv", "mur"]);
    if given.len() != 1 {
        return Err(Diagnostic::new(
            format!("{what}: give exactly one of bh, bh_csv or mur (or br for a magnet)"),
            Some(t.span.start..t.span.start + 1),
        ));
    }
    match given[0] {
        "mur" => {
            let item = t.require("mur")?;
            let mur = positive_number(item, &format!("{what} mur"))?;
            refuse_below_any_material(mur, item, what)?;
            Ok(Material::Linear { relative_permeability: mur })
        }
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
            let text = crate::input_file::read_text(&path, "B-H table", MAX_CSV_BYTES)
                .map_err(|e| Diagnostic::new(format!("{what} bh_csv: {e}"), Some(item.span.clone())))?;
            let (pts, lines) = parse_bh_csv(&text)
                .map_err(|(line, msg)| Diagnostic::new(format!("{what} bh_csv: {}:{line}: {msg}", path.display()), Some(item.span.clone())))?;
            check_curve(&pts, item, what, Some((&path, &lines)))?;
            Ok(Material::Soft { curve: pts })
        }
    }
}

/// A magnet by its intrinsic curve: `jh = [[H A/m, J T], ...]` from the
/// data sheet's second quadrant, from J <= 0 (at or past HcJ) up to H = 0
/// (Br), with `mur` (recoil permeability, default 1.05) and the reversible
/// coefficients as for any magnet.
fn table_magnet(t: &Fields, ctx: &Context, jh: &Item, what: &str) -> Result<Material, Diagnostic> {
    if let Some(other) = t.get("br").or(t.get("hcj")).or(t.get("hcb")).or(t.get("squareness")) {
        return Err(Diagnostic::new(
            format!("{what}: jh gives the whole intrinsic curve (Br is J at H = 0, HcJ where J = 0); leave out br, hcb, hcj and squareness"),
            Some(other.span.clone()),
        ));
    }
    let mut pts = Vec::new();
    for row in jh.array(&format!("{what} jh"))? {
        let r = row.array(&format!("{what} jh row"))?;
        if r.len() != 2 {
            return Err(Diagnostic::new(format!("{what} jh: each row is [H in A/m, J in T]"), Some(row.span.clone())));
        }
        pts.push([r[0].number("H")?, r[1].number("J")?]);
    }
    for (row, p) in jh.array(&format!("{what} jh"))?.iter().zip(&pts) {
        within_any_material(p[1], row, &format!("{what} jh: a polarization"))?;
    }
    let mu = match t.get("mur") {
        Some(m) => positive_number(m, &format!("{what} mur"))?,
        None => MagnetGrade::DEFAULT_RECOIL_PERMEABILITY,
    };
    let (br_coeff, hcj_coeff) = coefficients(t, ctx, what)?;
    let grade =
        MagnetGrade::from_intrinsic_curve(&pts, mu, br_coeff, hcj_coeff).map_err(|msg| Diagnostic::new(format!("{what} jh: {msg}"), Some(jh.span.clone())))?;
    checked_coefficients(t, what, grade)
}

/// A magnet grade's reversible temperature coefficients (`br_coeff`,
/// `hcj_coeff`, %/K; 0 where not given).
fn coefficients(t: &Fields, ctx: &Context, what: &str) -> Result<(f64, f64), Diagnostic> {
    let coeff = |key: &str| {
        t.get(key)
            .map(|c| ctx.quantity(c, Kind::PercentPerKelvin, &format!("{what} {key}")))
            .transpose()
            .map(|c| c.unwrap_or(0.0))
    };
    Ok((coeff("br_coeff")?, coeff("hcj_coeff")?))
}

/// The grade, or a refusal at the coefficient no magnet family has
/// (`study::materials::implausible_coefficients`: a minus sign dropped).
fn checked_coefficients(t: &Fields, what: &str, g: MagnetGrade) -> Result<Material, Diagnostic> {
    match study::materials::implausible_coefficients(g.br, g.br_coeff, g.hcj_coeff) {
        Some((key, why)) => Err(Diagnostic::new(format!("{what} {key}: {why}"), t.get(key).map(|i| i.span.clone()))),
        None => Ok(Material::Magnet(g)),
    }
}

/// Refuses a remanence or polarization past what any material reaches
/// (`solver::bh_curve::MAX_POLARIZATION`): the strongest sintered NdFeB
/// grades give about 1.5 T, so 13 T is a figure in kilogauss.
fn within_any_material(tesla: f64, item: &Item, what: &str) -> Result<(), Diagnostic> {
    if tesla > solver::bh_curve::MAX_POLARIZATION {
        return Err(Diagnostic::new(
            format!(
                "{what} of {tesla} T is past the {} T no material reaches (the strongest magnets give about 1.5 T): give it in tesla, or with its unit (\"12.6 kG\")",
                solver::bh_curve::MAX_POLARIZATION
            ),
            Some(item.span.clone()),
        ));
    }
    Ok(())
}

pub(super) fn positive_number(item: &Item, what: &str) -> Result<f64, Diagnostic> {
    let v = item.number(what)?;
    if v > 0.0 {
        Ok(v)
    } else {
        Err(Diagnostic::new(format!("{what} must be greater than zero, got {v}"), Some(item.span.clone())))
    }
}

/// Validates a B-H table; `csv` maps rows to file lines for the message.
fn check_curve(pts: &[[f64; 2]], item: &Item, what: &str, csv: Option<(&Path, &[usize])>) -> Result<(), Diagnostic> {
    materials::check_table(pts).map_err(|e| {
        let row = match e {
            materials::CurveError::NotFinite { row }
            | materials::CurveError::NotIncreasing { row }
            | materials::CurveError::SlopeBelowMu0 { row }
            | materials::CurveError::PolarizationBeyondAnyMaterial { row, .. } => Some(row),
            materials::CurveError::DoesNotStartAtOrigin => Some(0),
            materials::CurveError::TooFewPoints(_) => None,
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

pub(super) fn lookup_material(item: &Item, user: &BTreeMap<String, (Entry, std::ops::Range<usize>)>) -> Result<Entry, Diagnostic> {
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
        .with_help(Some(crate::case::material_names::help(name, &names)))
    })
}

/// Refuses a temperature other than 20 degC for a magnet of a
/// `[materials]` grade that does not say how it changes with temperature:
/// a missing `br_coeff` (or `hcj_coeff`, where the grade has a coercivity)
/// would otherwise read as 0, and a hot magnet would silently keep its
/// 20 degC remanence and knee. Writing 0 states it.
pub(super) fn check_coefficients_known(top: &Fields, study: &Fields, temperature: f64, parts: &[study::model::Part], key: &str) -> Result<(), Diagnostic> {
    // 20 degC within the rounding of a unit conversion (kelvin).
    if (temperature - 20.0).abs() < 1e-9 {
        return Ok(());
    }
    for p in parts {
        let (Material::Magnet(grade), "user") = (&p.material.material, p.material.family.as_str()) else {
            continue;
        };
        let Some(Value::Table(entries)) = top.get("materials").map(|m| &m.value) else {
            continue;
        };
        let Some((_, table)) = entries.iter().find(|(k, _)| k.name == p.material.name) else {
            continue;
        };
        let given = |name: &str| matches!(&table.value, Value::Table(t) if t.iter().any(|(k, _)| k.name == name));
        let needed: Vec<&str> = ["br_coeff", "hcj_coeff"]
            .into_iter()
            .filter(|c| !given(c) && (*c == "br_coeff" || grade.hcj.is_finite()))
            .collect();
        if needed.is_empty() {
            continue;
        }
        return Err(Diagnostic::new(
            format!(
                "study.{key} {temperature} degC: magnet '{}' is of [materials.{}], which gives no {}, so how it changes from 20 degC is unknown",
                p.name,
                p.material.name,
                needed.join(" and no ")
            ),
            study.get(key).map(|t| t.span.clone()),
        )
        .with_help(Some(format!(
            "give its reversible temperature coefficients (%/K) from its data sheet in [materials.{}] (the built-in grades' are listed by `lodestone materials NAME`), or 0 to keep it as it is at 20 degC",
            p.material.name
        ))));
    }
    Ok(())
}
