//! `[[part]]`: a part's outline, material, magnetization and current.

use super::materials_table::lookup_material;
use crate::case::diagnostic::Diagnostic;
use crate::case::document::Fields;
use crate::case::document::{Item, Value};
use crate::case::quantity::Context;
use crate::case::units::Kind;
use mesher::{Shape, Symmetry};
use std::collections::BTreeMap;
use study::materials::{Entry, Material};
use study::model::*;

const PART: &[&str] = &[
    "name",
    "material",
    "polygon",
    "rect",
    "circle",
    "dxf",
    "magnetization",
    "mesh_size",
    "current",
    "current_density",
    "turns",
    "wire",
    "fill_factor",
    "turn_length",
    "winding_temperature",
    "transform",
    "array",
    "holes",
];
const SHAPES: &[&str] = &["polygon", "rect", "circle", "dxf"];

/// A `[[part]]` table: the part, or its copies when it has an `array`
/// (placed by its `transform` first); names unique among all parts.
pub(super) fn parts_of(
    item: &Item,
    ctx: &Context,
    symmetry: Symmetry,
    user: &BTreeMap<String, (Entry, std::ops::Range<usize>)>,
    mesh: &MeshSettings,
    before: &[Part],
) -> Result<Vec<Part>, Diagnostic> {
    let t = item.table("[[part]]", PART)?;
    let one = part(&t, ctx, symmetry, user, mesh, before)?;
    let what = format!("part '{}'", one.name);
    let copies = super::pattern::copies(&t, ctx, symmetry, one, &what)?;
    if let Some(c) = copies.iter().find(|c| before.iter().any(|p| p.name == c.name)) {
        return Err(Diagnostic::new(
            format!("{what}: its copy '{}' has the name of a part before it; part names must be unique", c.name),
            t.get("array").map(|i| i.span.clone()),
        ));
    }
    Ok(copies)
}

/// One part from its table (an array's copies are made from it).
fn part(
    t: &Fields,
    ctx: &Context,
    symmetry: Symmetry,
    user: &BTreeMap<String, (Entry, std::ops::Range<usize>)>,
    mesh: &MeshSettings,
    before: &[Part],
) -> Result<Part, Diagnostic> {
    let name = super::names::name(t.require("name")?, "part.name")?;
    if before.iter().any(|p| p.name == name) {
        return Err(Diagnostic::new(
            format!("a part named '{name}' already exists; part names must be unique"),
            Some(t.require("name")?.span.clone()),
        ));
    }
    let what = format!("part '{name}'");
    let material = lookup_material(&picked_material(t.require("material")?, ctx)?, user)?;
    let shapes = t.present(SHAPES);
    if shapes.len() != 1 {
        let msg = if shapes.is_empty() {
            format!("{what} needs a shape: one of rect, polygon, circle or dxf")
        } else {
            format!("{what} has {} shapes ({}); give exactly one", shapes.len(), shapes.join(", "))
        };
        return Err(Diagnostic::new(msg, Some(t.span.start..t.span.start + 1)));
    }
    let mut shape = super::outline_table::shape(shapes[0], t.require(shapes[0])?, ctx, &what)?;
    if let Some(h) = t.get("holes") {
        let mut rings = vec![super::outline_table::ring_of(&shape)];
        rings.extend(super::outline_table::holes(h, ctx, &what)?);
        shape = Shape::Rings(rings);
    }
    let mesh_size = match t.get("mesh_size") {
        Some(m) => ctx.positive(m, Kind::Length, &format!("{what} mesh_size"))?,
        None => mesh.size,
    };
    let is_magnet = matches!(material.material, Material::Magnet(_));
    let radial = match t.get("magnetization") {
        Some(m @ Item { value: Value::Table(_), .. }) if is_magnet => Some(radial(m, ctx, symmetry, &shape, &what)?),
        _ => None,
    };
    let magnetization = match (t.get("magnetization"), is_magnet) {
        (Some(_), true) if radial.is_some() => radial.map(|r| r.direction_at(first_point(&shape))),
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
        (None, Some(j)) => Some(current_density(j, ctx, &what)? * shape.exact_area(symmetry)),
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
    let winding = winding(t, ctx, &what, current.is_some(), &shape, symmetry)?;
    Ok(Part {
        name,
        material,
        shape,
        mesh_size,
        magnetization,
        radial,
        current,
        winding,
    })
}

/// A bare current density below this (A/m2, SI) was meant in A/mm2: a
/// thousandth of an A/mm2, where windings carry about 1 to 10 A/mm2 in
/// copper (common practice).
const BARE_CURRENT_DENSITY_FLOOR: f64 = 1e3;

/// A part's current density, A/m2. A bare number is SI, and `5` meant as
/// 5 A/mm2 gave a coil's centre 35 nT where it has 35 mT, with no word:
/// a bare value below a thousandth of an A/mm2 is refused with the unit
/// rule; written with its unit, any value is taken.
fn current_density(j: &Item, ctx: &Context, what: &str) -> Result<f64, Diagnostic> {
    let v = ctx.quantity(j, Kind::CurrentDensity, &format!("{what} current_density"))?;
    if ctx.is_bare(j) && v != 0.0 && v.abs() < BARE_CURRENT_DENSITY_FLOOR {
        return Err(Diagnostic::new(
            format!(
                "{what} current_density: a bare number is A/m2 (SI), so {v} is {:e} A/mm2, far below a winding's (about 1 to 10 A/mm2 in copper); write the unit, \"{v} A/mm2\", or \"{v} A/m2\" if that is meant",
                v / 1e6
            ),
            Some(j.span.clone()),
        ));
    }
    Ok(v)
}

/// A winding's wire: `turns` with `wire` ("AWG 24", or a bare copper
/// diameter such as "0.5 mm") or `fill_factor` (copper share of the part's
/// area), `turn_length` (the mean turn, needed in a planar study) and
/// `winding_temperature` (default 20 degC).
fn winding(t: &Fields, ctx: &Context, what: &str, carries_current: bool, shape: &Shape, symmetry: Symmetry) -> Result<Option<Winding>, Diagnostic> {
    let area = shape.exact_area(symmetry);
    let keys = t.present(&["turns", "wire", "fill_factor", "turn_length", "winding_temperature"]);
    if keys.is_empty() {
        return Ok(None);
    }
    let first = t.get(keys[0]).map(|i| i.span.clone());
    if !carries_current {
        return Err(Diagnostic::new(
            format!("{what}: {} describes a winding, but the part carries no current", keys.join(", ")),
            first,
        ));
    }
    let turns_item = t
        .get("turns")
        .ok_or_else(|| Diagnostic::new(format!("{what}: a winding needs turns"), first.clone()))?;
    let turns = turns_item.number(&format!("{what} turns"))?;
    if !(1.0..=1e7).contains(&turns) {
        return Err(Diagnostic::new(format!("{what}: turns must be from 1 to 1e7"), Some(turns_item.span.clone())));
    }
    let wire_area = match (t.get("wire"), t.get("fill_factor")) {
        (Some(w), None) => {
            let one = wire_area(w, ctx, what)?;
            // The copper of every turn must fit the part's window.
            if turns * one > study::coil::MAX_FILL * area {
                return Err(Diagnostic::new(
                    format!(
                        "{what}: {turns} turns of this wire ({:.4} mm2 of copper each, {:.4} mm2 in all) do not fit the part's {:.4} mm2 (copper fills at most {} of it, round wires packed hexagonally): fewer turns, a finer wire or a larger part",
                        one * 1e6,
                        turns * one * 1e6,
                        area * 1e6,
                        study::coil::MAX_FILL
                    ),
                    Some(w.span.clone()),
                ));
            }
            one
        }
        (None, Some(f)) => {
            let share = f.number(&format!("{what} fill_factor"))?;
            if !(share > 0.0 && share <= study::coil::MAX_FILL) {
                return Err(Diagnostic::new(
                    format!("{what}: fill_factor is the copper share of the part's area, above 0 and at most 0.907 (round wires packed hexagonally)"),
                    Some(f.span.clone()),
                ));
            }
            share * area / turns
        }
        (Some(w), Some(_)) => return Err(Diagnostic::new(format!("{what}: give wire or fill_factor, not both"), Some(w.span.clone()))),
        (None, None) => {
            return Err(Diagnostic::new(
                format!("{what}: a winding needs wire (\"AWG 24\" or \"0.5 mm\") or fill_factor"),
                first,
            ))
        }
    };
    let turn_length = t
        .get("turn_length")
        .map(|l| ctx.positive(l, Kind::Length, &format!("{what} turn_length")))
        .transpose()?;
    if symmetry == Symmetry::Planar && turn_length.is_none() {
        return Err(Diagnostic::new(
            format!("{what}: a planar winding needs turn_length, the mean length of one turn (end turns included)"),
            first,
        ));
    }
    // About the axis the outline gives the turn: a given one overrode it, and
    // `turn_length = 5` (mm) on a coil of mean radius 15 mm made its
    // resistance 0.18 ohm where its 94 mm turns give 3.4 ohm.
    if let (Symmetry::Axisymmetric, Some(l)) = (symmetry, t.get("turn_length")) {
        return Err(Diagnostic::new(
            format!(
                "{what}: about the axis each turn of this part is {:.1} mm long (2 pi times its mean radius), which the study takes from its outline; leave turn_length out (it is for planar coil sides)",
                1e3 * study::coil::turn_about_axis(shape)
            ),
            Some(l.span.clone()),
        ));
    }
    let temperature = match t.get("winding_temperature") {
        Some(c) => ctx.quantity(c, Kind::Temperature, &format!("{what} winding_temperature"))?,
        None => 20.0,
    };
    Ok(Some(Winding {
        turns,
        wire_area,
        turn_length,
        temperature,
    }))
}

/// The copper area of `wire`: an AWG size or a bare diameter.
fn wire_area(item: &Item, ctx: &Context, what: &str) -> Result<f64, Diagnostic> {
    let diameter = match item.str(&format!("{what} wire")).ok().and_then(|s| s.trim().strip_prefix("AWG")) {
        Some(gauge) => {
            let n: f64 = gauge
                .trim()
                .parse()
                .map_err(|_| Diagnostic::new(format!("{what} wire: expected \"AWG n\" or a diameter"), Some(item.span.clone())))?;
            if !(0.0..=40.0).contains(&n) || n.fract() != 0.0 {
                return Err(Diagnostic::new(format!("{what} wire: AWG sizes from 0 to 40"), Some(item.span.clone())));
            }
            study::coil::awg_diameter(n)
        }
        None => ctx.positive(item, Kind::Length, &format!("{what} wire diameter"))?,
    };
    Ok(std::f64::consts::PI * diameter * diameter / 4.0)
}

/// `magnetization = { radial = "outward" | "inward", center = [x, y] }`
/// (planar): the centre defaults to a circle's, or to a ring's round outline's.
fn radial(item: &Item, ctx: &Context, symmetry: Symmetry, shape: &Shape, what: &str) -> Result<Radial, Diagnostic> {
    let t = item.table(&format!("{what} magnetization"), &["radial", "center"])?;
    if symmetry == Symmetry::Axisymmetric {
        return Err(Diagnostic::new(
            format!("{what}: about the axis a radial magnetization is \"+r\" (outward) or \"-r\" (inward)"),
            Some(item.span.clone()),
        ));
    }
    let way = t.require("radial")?;
    let outward = way.either(
        &format!("{what} magnetization.radial"),
        ["outward", "inward"],
        "expected \"outward\" or \"inward\"",
    )?;
    let center = match (t.get("center"), round_center(shape)) {
        (Some(c), _) => ctx.point(c, &format!("{what} magnetization.center"))?,
        (None, Some(c)) => c,
        (None, None) => {
            return Err(Diagnostic::new(
                format!("{what}: give the centre of the radial magnetization: center = [x, y]"),
                Some(item.span.clone()),
            ))
        }
    };
    Ok(Radial { center, outward })
}

/// The centre of a round part: a circle's, or that of a ring's outline drawn as a full circle.
fn round_center(shape: &Shape) -> Option<[f64; 2]> {
    match shape {
        Shape::Circle { center, .. } => Some(*center),
        Shape::Rings(rings) => match rings.first()?.as_slice() {
            [a, b] if a.bulge == b.bulge && a.bulge.abs() == 1.0 => Some([0.5 * (a.at[0] + b.at[0]), 0.5 * (a.at[1] + b.at[1])]),
            _ => None,
        },
        _ => None,
    }
}

/// A point of the part's outline (where a radial magnetization's summary direction is taken).
fn first_point(shape: &Shape) -> [f64; 2] {
    shape.corner_outlines().first().and_then(|o| o.first().copied()).unwrap_or_else(|| {
        let (lo, hi) = shape.bounds();
        [hi[0], 0.5 * (lo[1] + hi[1])]
    })
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

/// `material = { pick = "g", from = ["N35", "N42", "N52"] }`: the
/// parameter `g` (1 for the first) chooses the material, so that a sweep,
/// a seek or a tolerance study can run over grades. A plain name passes
/// through.
fn picked_material(item: &Item, ctx: &Context) -> Result<Item, Diagnostic> {
    let Value::Table(_) = &item.value else { return Ok(item.clone()) };
    let t = item.table("part.material", &["pick", "from"])?;
    let by = t.require("pick")?;
    let name = by.str("part.material.pick")?;
    let Some(&k) = ctx.params.get(name) else {
        return Err(Diagnostic::new(
            format!("part.material.pick: '{name}' is not a parameter; give it a value in [params]"),
            Some(by.span.clone()),
        )
        .suggest(name, ctx.params.keys().map(String::as_str)));
    };
    let from = t.require("from")?;
    let list = from.array("part.material.from")?;
    if list.is_empty() || k.fract() != 0.0 || k < 1.0 || k > list.len() as f64 {
        return Err(Diagnostic::new(
            format!(
                "part.material: {name} = {k} picks no material; it must be a whole number from 1 to {}",
                list.len()
            ),
            Some(item.span.clone()),
        ));
    }
    Ok(list[k as usize - 1].clone())
}
