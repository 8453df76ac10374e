//! `[[boundary]]`: sides of the flux-parallel box named symmetry planes
//! (`flux-normal`, `flux-parallel`) or periodic pairs (`periodic`,
//! `anti-periodic`), and how the modelled section scales to the whole
//! assembly (`[study] scale_to_whole`).

use super::names::named_tables;
use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Item};
use crate::case::quantity::Context;
use mesher::{BoxSides, OuterBoundary, SideKind, Symmetry, LEFT};
use study::model::WholeAssembly;

/// Keys of a `[[boundary]]` table.
const BOUNDARY: &[&str] = &["kind", "line", "lines", "cells"];
/// Kinds a `[[boundary]]` takes.
const KINDS: [&str; 4] = ["flux-normal", "flux-parallel", "periodic", "anti-periodic"];
/// Names of the box's sides, in `BoxSides` order.
const SIDE_NAMES: [&str; 4] = ["bottom", "right", "top", "left"];

/// The named sides put into the box, and the whole-assembly scaling when
/// `[study] scale_to_whole = true`.
pub(super) fn boundaries(
    top: &Fields,
    study: &Fields,
    ctx: &Context,
    symmetry: Symmetry,
    outer: &mut OuterBoundary,
) -> Result<Option<WholeAssembly>, Diagnostic> {
    let items = named_tables(top, "boundary")?;
    let scale = match study.get("scale_to_whole") {
        Some(s) => Some((s.bool("study.scale_to_whole")?, s.span.clone())),
        None => None,
    };
    let Some(first) = items.first() else {
        return match scale {
            Some((true, span)) => Err(Diagnostic::new(
                "study.scale_to_whole: the case names no [[boundary]] symmetry plane or periodic pair, so it models the whole already",
                Some(span),
            )),
            _ => Ok(None),
        };
    };
    if *outer == OuterBoundary::Open {
        let flux_normal = open_cut(items, ctx, symmetry)?;
        *outer = OuterBoundary::OpenHalf { flux_normal };
        return Ok(match scale {
            Some((true, _)) => Some(WholeAssembly {
                factor: 2.0,
                mirrors: vec![(0, 0.0)],
            }),
            _ => None,
        });
    }
    let OuterBoundary::FluxParallel { from_to: Some((a, b)), sides } = outer else {
        return Err(Diagnostic::new(
            "[[boundary]] names sides of the box: with boundary = \"flux-parallel\" give box = { from = [..], to = [..] }",
            Some(first.span.start..first.span.start + 1),
        ));
    };
    let (lo, hi) = mesher::ordered_box(*a, *b);
    let mut cells = 1.0;
    for item in items {
        cells *= named_side(item, ctx, symmetry, (lo, hi), sides)?;
    }
    Ok(match scale {
        Some((true, _)) => Some(whole(sides, (lo, hi), cells)),
        _ => None,
    })
}

/// Refuses currents that do not sum to zero in a planar box with no wall
/// at zero potential (every side flux-normal or periodic): Ampere's law
/// around the box asks its sides for a field they hold at zero, so there
/// is no field (the solver ran 40 Newton steps and reported 2.3 mT +- 2.3
/// mT for a wire's 1 mT).
pub(super) fn refuse_floating_current(top: &Fields, model: &study::model::Model) -> Result<(), Diagnostic> {
    let study::net_current::Anchor::Floating { net } = study::net_current::anchor(model) else {
        return Ok(());
    };
    if net == 0.0 {
        return Ok(());
    }
    let span = named_tables(top, "boundary")?.first().map(|i| i.span.start..i.span.start + 1);
    Err(Diagnostic::new(
        format!(
            "every side of the box is flux-normal or periodic, and the currents sum to {net} A (ampere-turns out of the plane): their flux has no wall to close along, and no field satisfies both (Ampere's law around the box); make a side flux-parallel, or add the conductors that carry the current back"
        ),
        span,
    ))
}

/// The open boundary cut by one symmetry plane, which must be the line
/// x = 0 of a planar study (the model is the half x >= 0); its kind.
fn open_cut(items: &[Item], ctx: &Context, symmetry: Symmetry) -> Result<bool, Diagnostic> {
    let here = |i: &Item| Some(i.span.start..i.span.start + 1);
    let [item] = items else {
        return Err(Diagnostic::new(
            "the open boundary takes one [[boundary]], a symmetry plane on x = 0; for more, use boundary = \"flux-parallel\" with a box",
            here(&items[1]),
        ));
    };
    if symmetry == Symmetry::Axisymmetric {
        return Err(Diagnostic::new(
            "about the axis the open boundary is cut by the axis already; a plane z = const needs boundary = \"flux-parallel\" with a box",
            here(item),
        ));
    }
    let t = item.table("[[boundary]]", BOUNDARY)?;
    let kind_item = t.require("kind")?;
    let kind = kind_item.str("boundary.kind")?;
    if kind != "flux-normal" && kind != "flux-parallel" {
        return Err(Diagnostic::new(
            format!("boundary.kind: the open boundary is cut by a symmetry plane only (\"flux-normal\" or \"flux-parallel\"); '{kind}' needs boundary = \"flux-parallel\" with a box"),
            Some(kind_item.span.clone()),
        ));
    }
    let line = t.require("line")?;
    let l = line.table("boundary.line", &["from", "to"])?;
    let p = ctx.point(l.require("from")?, "boundary.line.from")?;
    let q = ctx.point(l.require("to")?, "boundary.line.to")?;
    if p[0] != 0.0 || q[0] != 0.0 || p[1] == q[1] {
        return Err(Diagnostic::new(
            "boundary.line: the open boundary is cut on the line x = 0 (give from = [0, y1], to = [0, y2]; the model is the half x >= 0)",
            Some(line.span.clone()),
        ));
    }
    Ok(kind == "flux-normal")
}

/// One `[[boundary]]` put into `sides`; returns its cell count (1 for a symmetry plane).
fn named_side(item: &Item, ctx: &Context, symmetry: Symmetry, bx: ([f64; 2], [f64; 2]), sides: &mut BoxSides) -> Result<f64, Diagnostic> {
    let t = item.table("[[boundary]]", BOUNDARY)?;
    let kind_item = t.require("kind")?;
    let kind = kind_item.str("boundary.kind")?;
    let mut set = |k: usize, to: SideKind, at: &Item| -> Result<(), Diagnostic> {
        if symmetry == Symmetry::Axisymmetric && k == LEFT {
            return Err(Diagnostic::new(
                "the box's left side is the axis r = 0 of an axisymmetric study; it takes no other kind",
                Some(at.span.clone()),
            ));
        }
        if sides[k] != SideKind::Far {
            return Err(Diagnostic::new(
                format!("the box's {} side is named by two [[boundary]] tables", SIDE_NAMES[k]),
                Some(at.span.clone()),
            ));
        }
        sides[k] = to;
        Ok(())
    };
    match kind {
        "flux-normal" | "flux-parallel" => {
            if let Some(l) = t.get("lines").or(t.get("cells")) {
                return Err(Diagnostic::new(
                    format!("a {kind} boundary is one `line`; `lines` and `cells` are for periodic pairs"),
                    Some(l.span.clone()),
                ));
            }
            let line = t.require("line")?;
            let k = side_of(line, ctx, bx, "boundary.line")?;
            set(
                k,
                SideKind::Mirror {
                    flux_normal: kind == "flux-normal",
                },
                line,
            )?;
            Ok(1.0)
        }
        "periodic" | "anti-periodic" => {
            if let Some(l) = t.get("line") {
                return Err(Diagnostic::new(
                    format!("a {kind} boundary is a pair: `lines = [{{ from, to }}, {{ from, to }}]`"),
                    Some(l.span.clone()),
                ));
            }
            let lines_item = t.require("lines")?;
            let lines = lines_item.array("boundary.lines")?;
            if lines.len() != 2 {
                return Err(Diagnostic::new(
                    format!("boundary.lines: a {kind} pair is two lines, found {}", lines.len()),
                    Some(lines_item.span.clone()),
                ));
            }
            let k0 = side_of(&lines[0], ctx, bx, "boundary.lines")?;
            let k1 = side_of(&lines[1], ctx, bx, "boundary.lines")?;
            if (k0 + 2) % 4 != k1 {
                return Err(Diagnostic::new(
                    format!(
                        "boundary.lines: a {kind} pair is two opposite sides of the box (left and right, or bottom and top), found {} and {}",
                        SIDE_NAMES[k0], SIDE_NAMES[k1]
                    ),
                    Some(lines_item.span.clone()),
                ));
            }
            let anti = kind == "anti-periodic";
            set(k0, SideKind::Periodic { anti }, &lines[0])?;
            set(k1, SideKind::Periodic { anti }, &lines[1])?;
            cells_of(&t)
        }
        other => Err(Diagnostic::new(
            format!("boundary.kind: unknown kind '{other}'; expected one of {}", KINDS.join(", ")),
            Some(kind_item.span.clone()),
        )
        .suggest(other, KINDS)),
    }
}

/// `cells`: how many copies of the modelled cell the whole assembly holds.
fn cells_of(t: &Fields) -> Result<f64, Diagnostic> {
    let Some(c) = t.get("cells") else { return Ok(1.0) };
    let n = c.number("boundary.cells")?;
    if n.fract() != 0.0 || !(1.0..=1e6).contains(&n) {
        return Err(Diagnostic::new(
            format!("boundary.cells: a whole number of cells from 1 to 1000000, got {n}"),
            Some(c.span.clone()),
        ));
    }
    Ok(n)
}

/// Which side of the box a `{ from, to }` line runs along (the whole side).
fn side_of(item: &Item, ctx: &Context, (lo, hi): ([f64; 2], [f64; 2]), what: &str) -> Result<usize, Diagnostic> {
    let t = item.table(what, &["from", "to"])?;
    let p = ctx.point(t.require("from")?, &format!("{what}.from"))?;
    let q = ctx.point(t.require("to")?, &format!("{what}.to"))?;
    let tol = 1e-9 * (hi[0] - lo[0]).max(hi[1] - lo[1]);
    let same = |u: [f64; 2], v: [f64; 2]| (u[0] - v[0]).abs() <= tol && (u[1] - v[1]).abs() <= tol;
    let corners = [lo, [hi[0], lo[1]], hi, [lo[0], hi[1]]];
    (0..4)
        .find(|&k| {
            let (c0, c1) = (corners[k], corners[(k + 1) % 4]);
            (same(p, c0) && same(q, c1)) || (same(p, c1) && same(q, c0))
        })
        .ok_or_else(|| {
            let u = ctx.length_unit;
            let side = |k: usize| {
                let (c0, c1) = (corners[k], corners[(k + 1) % 4]);
                format!("{} from [{}, {}] to [{}, {}]", SIDE_NAMES[k], c0[0] / u, c0[1] / u, c1[0] / u, c1[1] / u)
            };
            Diagnostic::new(format!("{what}: the line must run along a whole side of the box"), Some(item.span.clone()))
                .with_help(Some(format!("the box's sides are: {}", (0..4).map(side).collect::<Vec<_>>().join("; "))))
        })
}

/// The factor and the vanishing components that turn the section's forces
/// and energies into the whole assembly's.
fn whole(sides: &BoxSides, (lo, hi): ([f64; 2], [f64; 2]), cells: f64) -> WholeAssembly {
    let mut w = WholeAssembly {
        factor: cells,
        mirrors: Vec::new(),
    };
    // (side, axis normal to it, its coordinate)
    for (k, axis, at) in [(0, 1, lo[1]), (1, 0, hi[0]), (2, 1, hi[1]), (3, 0, lo[0])] {
        if matches!(sides[k], SideKind::Mirror { .. }) {
            w.factor *= 2.0;
            w.mirrors.push((axis, at));
        }
    }
    w
}
