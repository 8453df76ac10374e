//! Outlines with arcs, fillets, chamfers and holes: `polygon` points that
//! are tables (`{ at, bulge }`, `{ at, center, turn }`, `{ at, fillet }`,
//! `{ at, chamfer }`), a `rect`'s `fillet` or `chamfer` on all four corners,
//! and a part's `holes`. Plain shapes stay plain (`Shape::Rect`,
//! `Shape::Polygon`); anything with an arc or a hole becomes `Shape::Rings`.

use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Item, Value};
use crate::case::quantity::Context;
use crate::case::units::Kind;
use mesher::outline::{circle_ring, cut_corner, Corner, CornerError, Vertex, MAX_BULGE};
use mesher::Shape;

/// Keys of a point table in a polygon.
const POINT: &[&str] = &["at", "bulge", "center", "turn", "fillet", "chamfer"];
/// Keys of `rect`.
pub(super) const RECT: &[&str] = &["from", "to", "fillet", "chamfer"];
/// Most holes in one part (each is checked against every other).
const MOST_HOLES: usize = 200;
/// Shapes a hole takes.
const HOLE_SHAPES: &[&str] = &["rect", "circle", "polygon"];

/// One outline point as written, before its corner is cut.
struct Written {
    vertex: Vertex,
    corner: Option<Corner>,
    span: std::ops::Range<usize>,
}

/// A `polygon` (points or point tables) as a ring.
pub(super) fn polygon_ring(item: &Item, ctx: &Context, what: &str) -> Result<Vec<Vertex>, Diagnostic> {
    let pts = item.array(&format!("{what} polygon"))?;
    if pts.len() < 3 {
        return Err(Diagnostic::new(
            format!("{what}: a polygon needs at least 3 points, found {}", pts.len()),
            Some(item.span.clone()),
        ));
    }
    let mut written: Vec<Written> = pts.iter().map(|p| point(p, ctx, what)).collect::<Result<_, _>>()?;
    resolve_centres(&mut written, pts, ctx, what)?;
    cut_corners(&written, ctx, what)
}

/// A `rect` with rounded or cut corners as a ring.
pub(super) fn rect_ring(
    from: [f64; 2],
    to: [f64; 2],
    corner: Corner,
    span: std::ops::Range<usize>,
    ctx: &Context,
    what: &str,
) -> Result<Vec<Vertex>, Diagnostic> {
    let corners = [from, [to[0], from[1]], to, [from[0], to[1]]];
    let written: Vec<Written> = corners
        .iter()
        .map(|&at| Written {
            vertex: Vertex { at, bulge: 0.0 },
            corner: Some(corner),
            span: span.clone(),
        })
        .collect();
    cut_corners(&written, ctx, what)
}

/// A point: `[x, y]` or a table.
fn point(p: &Item, ctx: &Context, what: &str) -> Result<Written, Diagnostic> {
    let plain = |at| Written {
        vertex: Vertex { at, bulge: 0.0 },
        corner: None,
        span: p.span.clone(),
    };
    if !matches!(p.value, Value::Table(_)) {
        return Ok(plain(ctx.point(p, &format!("{what} polygon"))?));
    }
    let t = p.table(&format!("{what} polygon point"), POINT)?;
    let mut w = plain(ctx.point(t.require("at")?, &format!("{what} polygon point at"))?);
    let given = t.present(&["bulge", "center", "fillet", "chamfer"]);
    if given.len() > 1 {
        return Err(Diagnostic::new(
            format!("{what}: a point takes one of bulge, center, fillet or chamfer, found {}", given.join(" and ")),
            Some(p.span.clone()),
        ));
    }
    if let Some(turn) = t.get("turn").filter(|_| t.get("center").is_none()) {
        return Err(Diagnostic::new(format!("{what}: turn goes with center"), Some(turn.span.clone())));
    }
    match given.first() {
        Some(&"bulge") => {
            let b = t.require("bulge")?;
            let v = b.number(&format!("{what} bulge"))?;
            if v.abs() > MAX_BULGE {
                return Err(Diagnostic::new(
                    format!("{what}: bulge {v} is beyond an arc of 359 degrees; draw a full circle as two arcs of bulge 1"),
                    Some(b.span.clone()),
                ));
            }
            w.vertex.bulge = v;
        }
        Some(&"fillet") => w.corner = cut_size(t.require("fillet")?, ctx, &format!("{what} fillet"))?.map(Corner::Fillet),
        Some(&"chamfer") => w.corner = cut_size(t.require("chamfer")?, ctx, &format!("{what} chamfer"))?.map(Corner::Chamfer),
        _ => {}
    }
    Ok(w)
}

/// A fillet's radius or a chamfer's length: zero leaves the corner sharp
/// (so that a sweep can start from the plain corner), negative is refused.
pub(super) fn cut_size(item: &Item, ctx: &Context, what: &str) -> Result<Option<f64>, Diagnostic> {
    let v = ctx.quantity(item, Kind::Length, what)?;
    if v < 0.0 {
        return Err(Diagnostic::new(
            format!("{what} must be zero (a sharp corner) or more, got {v}"),
            Some(item.span.clone()),
        ));
    }
    Ok((v > 0.0).then_some(v))
}

/// Arcs given by a centre (`{ at, center, turn }`) as bulges, now that the next point is known.
fn resolve_centres(written: &mut [Written], pts: &[Item], ctx: &Context, what: &str) -> Result<(), Diagnostic> {
    let n = written.len();
    for i in 0..n {
        let Value::Table(_) = pts[i].value else { continue };
        let t = pts[i].table(&format!("{what} polygon point"), POINT)?;
        let Some(c_item) = t.get("center") else { continue };
        let c = ctx.point(c_item, &format!("{what} center"))?;
        let ccw = match t.get("turn") {
            None => true,
            Some(turn) => turn.either(&format!("{what} turn"), ["ccw", "cw"], "expected \"ccw\" (counter-clockwise) or \"cw\"")?,
        };
        let (a, b) = (written[i].vertex.at, written[(i + 1) % n].vertex.at);
        let (ra, rb) = ((a[0] - c[0]).hypot(a[1] - c[1]), (b[0] - c[0]).hypot(b[1] - c[1]));
        if ra == 0.0 || (ra - rb).abs() > 1e-6 * ra.max(rb) {
            let u = ctx.length_unit;
            return Err(Diagnostic::new(
                format!(
                    "{what}: the arc's ends lie {} and {} from its center; they must lie on one circle",
                    ra / u,
                    rb / u
                ),
                Some(pts[i].span.clone()),
            ));
        }
        let (a0, a1) = ((a[1] - c[1]).atan2(a[0] - c[0]), (b[1] - c[1]).atan2(b[0] - c[0]));
        let tau = std::f64::consts::TAU;
        let sweep = if ccw { (a1 - a0).rem_euclid(tau) } else { -(a0 - a1).rem_euclid(tau) };
        if sweep.abs() < 1e-9 {
            return Err(Diagnostic::new(
                format!("{what}: the arc starts and ends at one point; draw a full circle as two arcs"),
                Some(pts[i].span.clone()),
            ));
        }
        written[i].vertex.bulge = (sweep / 4.0).tan();
    }
    Ok(())
}

/// The ring with every asked corner cut, each cut checked to fit its edges.
fn cut_corners(written: &[Written], ctx: &Context, what: &str) -> Result<Vec<Vertex>, Diagnostic> {
    let ring: Vec<Vertex> = written.iter().map(|w| w.vertex).collect();
    let n = ring.len();
    let edge = |i: usize| mesher::geometry::dist(ring[i].at, ring[(i + 1) % n].at);
    // How far back along its edges each corner's cut reaches.
    let mut back = vec![0.0; n];
    let mut cuts = vec![None; n];
    for (i, w) in written.iter().enumerate() {
        let Some(how) = w.corner else { continue };
        let pts = cut_corner(&ring, i, how, [f64::INFINITY; 2]).map_err(|e| corner_error(e, w, ctx, what))?;
        back[i] = mesher::geometry::dist(pts[0].at, ring[i].at);
        cuts[i] = Some(pts);
    }
    let mut out = Vec::with_capacity(2 * n);
    for (i, w) in written.iter().enumerate() {
        let Some(how) = w.corner else {
            out.push(ring[i]);
            continue;
        };
        let room = [edge((i + n - 1) % n) - back[(i + n - 1) % n], edge(i) - back[(i + 1) % n]];
        out.extend(cut_corner(&ring, i, how, room).map_err(|e| corner_error(e, w, ctx, what))?);
    }
    Ok(out)
}

fn corner_error(e: CornerError, w: &Written, ctx: &Context, what: &str) -> Diagnostic {
    let u = ctx.length_unit;
    let msg = match e {
        CornerError::NotACorner => format!(
            "{what}: the point at [{}, {}] is not a corner between two straight edges, so it cannot be rounded or cut",
            w.vertex.at[0] / u,
            w.vertex.at[1] / u
        ),
        CornerError::TooLarge { needs, room } => format!(
            "{what}: the fillet or chamfer at this corner takes {:.4} along each edge (in the case's length unit), but only {:.4} of the shorter edge is free",
            needs / u,
            room.max(0.0) / u
        ),
    };
    Diagnostic::new(msg, Some(w.span.clone()))
}

/// `holes = [{ circle = .. }, { rect = .. }, { polygon = [..] }]`: the rings of the holes.
pub(super) fn holes(item: &Item, ctx: &Context, what: &str) -> Result<Vec<Vec<Vertex>>, Diagnostic> {
    let list = item.tables(&format!("{what} holes"))?;
    if list.len() > MOST_HOLES {
        return Err(Diagnostic::new(
            format!("{what}: {} holes; at most {MOST_HOLES} in one part", list.len()),
            Some(item.span.clone()),
        ));
    }
    let mut out = Vec::with_capacity(list.len());
    for h in list {
        let t = h.table(&format!("{what} hole"), HOLE_SHAPES)?;
        let shapes = t.present(HOLE_SHAPES);
        if shapes.len() != 1 {
            return Err(Diagnostic::new(
                format!("{what}: a hole is one of rect, circle or polygon"),
                Some(h.span.clone()),
            ));
        }
        let shape = shape(shapes[0], t.require(shapes[0])?, ctx, &format!("{what} hole"))?;
        out.push(ring_of(&shape));
    }
    Ok(out)
}

/// Any shape as one ring (a hole's outline, or a part's before its holes).
pub(super) fn ring_of(shape: &Shape) -> Vec<Vertex> {
    let straight = |pts: &[[f64; 2]]| pts.iter().map(|&at| Vertex { at, bulge: 0.0 }).collect();
    match shape {
        Shape::Rect { from, to } => straight(&[*from, [to[0], from[1]], *to, [from[0], to[1]]]),
        Shape::Polygon(p) => straight(p),
        Shape::Circle { center, radius } => circle_ring(*center, *radius),
        Shape::Rings(r) => r.first().cloned().unwrap_or_default(),
    }
}

/// A part's (or a hole's) shape from its `rect`, `circle`, `polygon` or `dxf` item.
pub(super) fn shape(kind: &str, item: &Item, ctx: &Context, what: &str) -> Result<Shape, Diagnostic> {
    match kind {
        "rect" => {
            let t = item.table(&format!("{what} rect"), RECT)?;
            let from = ctx.point(t.require("from")?, &format!("{what} rect.from"))?;
            let to = ctx.point(t.require("to")?, &format!("{what} rect.to"))?;
            if from[0] == to[0] || from[1] == to[1] {
                return Err(Diagnostic::new(format!("{what}: the rectangle has zero area"), Some(item.span.clone())));
            }
            use cut_size;
            use mesher::outline::Corner;
            let corner = match (t.get("fillet"), t.get("chamfer")) {
                (None, None) => None,
                (Some(f), None) => cut_size(f, ctx, &format!("{what} rect.fillet"))?.map(Corner::Fillet),
                (None, Some(c)) => cut_size(c, ctx, &format!("{what} rect.chamfer"))?.map(Corner::Chamfer),
                (Some(f), Some(_)) => {
                    return Err(Diagnostic::new(
                        format!("{what}: give the rectangle a fillet or a chamfer, not both"),
                        Some(f.span.clone()),
                    ))
                }
            };
            let Some(corner) = corner else { return Ok(Shape::Rect { from, to }) };
            let lo = [from[0].min(to[0]), from[1].min(to[1])];
            let hi = [from[0].max(to[0]), from[1].max(to[1])];
            Ok(Shape::Rings(vec![rect_ring(lo, hi, corner, item.span.clone(), ctx, what)?]))
        }
        "dxf" => super::dxf_shape::section(item, ctx, what),
        "circle" => {
            let t = item.table(&format!("{what} circle"), &["center", "radius"])?;
            Ok(Shape::Circle {
                center: ctx.point(t.require("center")?, &format!("{what} circle.center"))?,
                radius: ctx.positive(t.require("radius")?, Kind::Length, &format!("{what} circle.radius"))?,
            })
        }
        _ => {
            let ring = polygon_ring(item, ctx, what)?;
            if ring.iter().all(|v| v.bulge == 0.0) {
                return Ok(Shape::Polygon(ring.into_iter().map(|v| v.at).collect()));
            }
            Ok(Shape::Rings(vec![ring]))
        }
    }
}
