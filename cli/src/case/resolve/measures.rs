//! `[[probe]]`, `[[force]]` and `[[flux]]`: what the study measures.

use super::materials_table::positive_number;
use super::names::{named_tables, part_list};
use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Item};
use crate::case::quantity::Context;
use std::ops::Range;
use study::model::*;

const PROBE: &[&str] = &["name", "point", "line"];
const FORCE: &[&str] = &["name", "parts", "torque_about"];
const FLUX: &[&str] = &["name", "line", "winding", "turns"];

/// `[[probe]]` tables with their spans.
pub(super) fn probes(top: &Fields, ctx: &Context) -> Result<Vec<(Probe, Range<usize>)>, Diagnostic> {
    let mut out = Vec::new();
    for item in named_tables(top, "probe")? {
        let t = item.table("[[probe]]", PROBE)?;
        let name = super::names::name(t.require("name")?, "probe.name")?;
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
                let (from, to) = line_ends(&lt, l, ctx, &what, ", or use point = [x, y]")?;
                ProbeShape::Line { from, to, points }
            }
            _ => {
                return Err(Diagnostic::new(
                    format!("{what} needs exactly one of point or line"),
                    Some(item.span.start..item.span.start + 1),
                ))
            }
        };
        out.push((Probe { name, shape }, item.span.clone()));
    }
    Ok(out)
}

/// A probe's or flux line's two ends, which must differ: a line whose ends
/// coincide samples one point many times (a probe) or crosses nothing (a
/// flux, 0 Wb): its end was copied from its start and not edited.
fn line_ends(lt: &Fields, line: &Item, ctx: &Context, what: &str, hint: &str) -> Result<([f64; 2], [f64; 2]), Diagnostic> {
    let (from, to) = (ctx.point(lt.require("from")?, what)?, ctx.point(lt.require("to")?, what)?);
    if from == to {
        return Err(Diagnostic::new(
            format!("{what}: the line starts and ends at the same point; give two different ends{hint}"),
            Some(line.span.clone()),
        ));
    }
    Ok((from, to))
}

/// The turns a winding's flux linkage counts: the flux table's `turns`,
/// else the turns its parts give (`[[part]] turns`), else 1. Given in both
/// places they must agree: a coil of 500 turns whose `[[flux]]` said 50 had
/// its linkage counted for 50 and its inductance for a current ten times the
/// coil's own, beside a coil line with the right current.
fn linkage_turns(t: &Fields, model: &Model, parts: &[(usize, f64)], what: &str) -> Result<f64, Diagnostic> {
    let given: Vec<(&str, f64)> = parts
        .iter()
        .filter_map(|&(p, _)| model.parts[p].winding.as_ref().map(|w| (model.parts[p].name.as_str(), w.turns)))
        .collect();
    let own = given.first().map(|g| g.1);
    if let Some((other, n)) = given.iter().find(|g| Some(g.1) != own) {
        return Err(Diagnostic::new(
            format!(
                "{what}: its parts give different turns ('{}' {}, '{other}' {n}); one winding's sides carry the same turns",
                given[0].0, given[0].1
            ),
            Some(t.span.start..t.span.start + 1),
        ));
    }
    match (t.get("turns"), own) {
        (Some(item), Some(n)) => {
            let turns = positive_number(item, &format!("{what} turns"))?;
            if turns != n {
                return Err(Diagnostic::new(
                    format!("{what} turns: {turns}, but part '{}' is wound with {n}; the linkage counts the winding's own turns: leave turns out here, or make them agree", given[0].0),
                    Some(item.span.clone()),
                ));
            }
            Ok(turns)
        }
        (Some(item), None) => positive_number(item, &format!("{what} turns")),
        (None, own) => Ok(own.unwrap_or(1.0)),
    }
}

/// Refuses the linkage of a planar winding whose turns do not return
/// within it (one side of a coil, a single bus bar) where the potential has
/// no level to measure it from: open space with currents that do not sum
/// to zero (the flux between a straight conductor and infinity is
/// unbounded: a 100 A wire's linkage came out 164 uWb +- 250 uWb, "1.6 uH",
/// after refining to 239 000 triangles, and 141 uWb from a finer first
/// mesh, never converging) or a box with no flux-parallel wall (the
/// level is arbitrary there). `study::net_current` says why.
fn refuse_unreturned_winding(model: &Model, signed: &[(usize, f64)], w: &Item, what: &str) -> Result<(), Diagnostic> {
    let why = match study::net_current::anchor(model) {
        _ if study::net_current::turns_return(signed) => return Ok(()),
        study::net_current::Anchor::Held => return Ok(()),
        study::net_current::Anchor::OpenWithNetCurrent { net } => format!(
            "the study's currents sum to {net} A, so the flux between the winding and infinity, its linkage and inductance per depth, grow without bound"
        ),
        study::net_current::Anchor::Floating { .. } => {
            "no side of the box is flux-parallel, so the potential has no level to measure the linkage from".to_string()
        }
    };
    Err(Diagnostic::new(
        format!("{what}: the winding's turns do not return within it (its parts' currents all run one way), and {why}; add the conductors that carry the current back and list them in the winding"),
        Some(w.span.clone()),
    ))
}

/// Refuses, with `scale_to_whole`, a force whose parts do not reach a
/// symmetry plane: the whole's force counts their mirror image too, a
/// second set pulled the other way, so the component across the plane is
/// zero by construction (`study::boundary_warnings::plane_beyond_force_set`).
fn refuse_force_beyond_mirror(model: &Model, name: &str, parts: &[usize], span: Range<usize>) -> Result<(), Diagnostic> {
    let Some((axis, at)) = study::boundary_warnings::plane_beyond_force_set(model, parts) else {
        return Ok(());
    };
    let component = match (model.symmetry, axis) {
        (mesher::Symmetry::Planar, 0) => "x",
        (mesher::Symmetry::Planar, _) => "y",
        (_, 0) => "r",
        _ => "z",
    };
    Err(Diagnostic::new(
        format!(
            "force '{name}': with scale_to_whole a force is the whole assembly's, and its parts do not reach the symmetry plane {component} = {}: their mirror image beyond it is a second set pulled the opposite way, so the whole's {component} component is zero by symmetry (two magnets halved at their gap's middle would read 0 N); leave scale_to_whole out for the force on the modelled parts",
            model.length_text(at)
        ),
        Some(span),
    ))
}

/// Refuses an axisymmetric flux line with an end at r < 0, or lying on the
/// axis: it sweeps no surface about the axis, and its flux came out as 0 Wb
/// with no sign that nothing was measured.
fn refuse_axial_sweep(from: [f64; 2], to: [f64; 2], line: &Item, what: &str) -> Result<(), Diagnostic> {
    let problem = if from[0] < 0.0 || to[0] < 0.0 {
        "has an end at r < 0; axisymmetric points lie in r >= 0"
    } else if from[0] == 0.0 && to[0] == 0.0 {
        "lies on the axis, so the surface it sweeps about the axis has no area; the flux through a face is a line from the axis outwards, such as from [0, z] to [R, z]"
    } else {
        return Ok(());
    };
    Err(Diagnostic::new(format!("{what}: the line {problem}"), Some(line.span.clone())))
}

/// Refuses a flux line with an end outside the flux-parallel box, where
/// there is no field to read (as a probe there is refused).
fn refuse_outside_box(model: &Model, ends: [[f64; 2]; 2], line: &Item, what: &str) -> Result<(), Diagnostic> {
    match model.boundary.given_box() {
        Some(b) if ends.iter().any(|&p| mesher::outside_box(b, p)) => Err(Diagnostic::new(
            format!("{what}: the line ends outside the flux-parallel box"),
            Some(line.span.clone()),
        )),
        _ => Ok(()),
    }
}

pub(super) fn forces(top: &Fields, ctx: &Context, model: &Model) -> Result<Vec<ForceSpec>, Diagnostic> {
    let mut out = Vec::new();
    for item in named_tables(top, "force")? {
        let t = item.table("[[force]]", FORCE)?;
        let name = super::names::name(t.require("name")?, "force.name")?;
        let listed = t.require("parts")?;
        let parts = part_list(listed, model, &format!("force '{name}' parts"))?;
        refuse_vanishing_force(model, &name, &parts, listed.span.clone())?;
        refuse_force_beyond_mirror(model, &name, &parts, listed.span.clone())?;
        let torque_about = match t.get("torque_about") {
            // It used to be taken and ignored: no torque is reported about the axis.
            Some(p) if model.symmetry == mesher::Symmetry::Axisymmetric => {
                return Err(Diagnostic::new(
                    format!("force '{name}' torque_about: an axisymmetric study reports no torque (the forces on a body of revolution add up to a pull along the axis); torque_about is for planar studies"),
                    Some(p.span.clone()),
                ))
            }
            Some(p) => ctx.point(p, "force.torque_about")?,
            None => [0.0, 0.0],
        };
        out.push(ForceSpec { name, parts, torque_about });
    }
    Ok(out)
}

/// Refuses a force on parts that neither make nor guide flux (zero), and
/// a force on every part that makes or guides flux, in open space
/// and no applied field: the parts' forces on each other cancel (action and
/// reaction), so its net force and torque are zero, and the refinement,
/// asked for a relative accuracy of zero, ran to its element limit (a pot
/// magnet's cup, magnet and plate listed together: 220 000 triangles,
/// "11 352 %"). A box or a symmetry plane pushes back, and an applied
/// field turns a magnet: those keep a net torque or force.
fn refuse_vanishing_force(model: &Model, name: &str, parts: &[usize], span: Range<usize>) -> Result<(), Diagnostic> {
    // Parts that neither make nor guide flux feel no magnetic force: the
    // refinement chased 0.1 % of zero on a plastic spacer to 780 000
    // triangles ("758 %" not reached, 17 s).
    if parts.iter().all(|&i| model.parts[i].is_inert()) {
        let listed: Vec<String> = parts
            .iter()
            .map(|&i| format!("'{}' ({})", model.parts[i].name, model.parts[i].material.name))
            .collect();
        return Err(Diagnostic::new(
            format!(
                "force '{name}' acts only on parts that neither make nor guide flux ({}): with mu_r 1 and no current they feel no magnetic force; list a magnet, a winding or a permeable part",
                listed.join(", ")
            ),
            Some(span),
        ));
    }
    let open = matches!(model.boundary, mesher::OuterBoundary::Open) && model.applied_field == [0.0, 0.0];
    let outside_inert = model.parts.iter().enumerate().all(|(i, p)| parts.contains(&i) || p.is_inert());
    if !open || !outside_inert {
        return Ok(());
    }
    let active: Vec<String> = parts
        .iter()
        .filter(|&&i| !model.parts[i].is_inert())
        .map(|&i| format!("'{}'", model.parts[i].name))
        .collect();
    Err(Diagnostic::new(
        format!(
            "force '{name}' takes in every part that makes or guides flux ({}): in open space their forces on each other cancel (action and reaction), so its net force and torque are zero; list the parts on one side of the gap only, such as the plate a magnet pulls",
            active.join(", ")
        ),
        Some(span),
    ))
}

pub(super) fn fluxes(top: &Fields, ctx: &Context, model: &Model) -> Result<Vec<FluxSpec>, Diagnostic> {
    let mut out = Vec::new();
    for item in named_tables(top, "flux")? {
        let t = item.table("[[flux]]", FLUX)?;
        let name = super::names::name(t.require("name")?, "flux.name")?;
        let what = format!("flux '{name}'");
        match (t.get("line"), t.get("winding")) {
            (Some(l), None) => {
                let lt = l.table(&format!("{what} line"), &["from", "to"])?;
                let (from, to) = line_ends(&lt, l, ctx, &what, "")?;
                if model.symmetry == mesher::Symmetry::Axisymmetric {
                    refuse_axial_sweep(from, to, l, &what)?;
                }
                refuse_outside_box(model, [from, to], l, &what)?;
                out.push(FluxSpec::Line { name, from, to });
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
                let turns = linkage_turns(&t, model, &signed, &what)?;
                refuse_unreturned_winding(model, &signed, w, &what)?;
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
