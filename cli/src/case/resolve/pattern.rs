//! Transforms and arrays of a part: `transform = { move, rotate, about,
//! mirror }` places one part; `array = { count, step }` (linear) or
//! `array = { count, about, angle }` (circular) repeats it, each copy's
//! magnetization turned by `turn` more than the one before, so that a
//! Halbach array or a coupling's ring of poles is one table.

use crate::case::diagnostic::Diagnostic;
use crate::case::document::{Fields, Item};
use crate::case::quantity::Context;
use crate::case::units::Kind;
use mesher::{Shape, Symmetry};
use study::model::{Part, Radial};

/// Keys of `transform`.
const TRANSFORM: &[&str] = &["move", "rotate", "about", "mirror"];
/// Keys of `array`.
const ARRAY: &[&str] = &["count", "step", "about", "angle", "turn"];
/// Where copy k of a part goes.
type Placement = Box<dyn Fn(&Part, f64) -> Part>;

/// Most copies one array makes.
const MOST_COPIES: f64 = 1000.0;

/// The part placed by its `transform` and repeated by its `array`: the part
/// itself, or its copies named NAME-1 ... NAME-N.
pub(super) fn copies(t: &Fields, ctx: &Context, symmetry: Symmetry, part: Part, what: &str) -> Result<Vec<Part>, Diagnostic> {
    let part = match t.get("transform") {
        Some(item) => tidied(&transform(item, ctx, symmetry, part, what)?, ctx.length_unit),
        None => part,
    };
    let Some(item) = t.get("array") else { return Ok(vec![part]) };
    let a = item.table(&format!("{what} array"), ARRAY)?;
    let count_item = a.require("count")?;
    let count = count_item.number(&format!("{what} array.count"))?;
    if count.fract() != 0.0 || !(1.0..=MOST_COPIES).contains(&count) {
        return Err(Diagnostic::new(
            format!("{what} array.count: a whole number from 1 to {MOST_COPIES}"),
            Some(count_item.span.clone()),
        ));
    }
    let turn = match a.get("turn") {
        Some(i) => Some((ctx.quantity(i, Kind::Angle, &format!("{what} array.turn"))?, i)),
        None => None,
    };
    let place: Placement = match (a.get("step"), a.get("angle")) {
        (Some(s), None) => {
            let step = ctx.point(s, &format!("{what} array.step"))?;
            if symmetry == Symmetry::Axisymmetric && step[0] != 0.0 {
                return Err(Diagnostic::new(
                    format!("{what} array.step: about the axis, copies repeat along z only ([0, dz])"),
                    Some(s.span.clone()),
                ));
            }
            Box::new(move |p, k| moved(p, [k * step[0], k * step[1]]))
        }
        (None, Some(g)) if symmetry == Symmetry::Planar => {
            let angle = ctx.quantity(g, Kind::Angle, &format!("{what} array.angle"))?;
            let about = a
                .get("about")
                .map(|i| ctx.point(i, &format!("{what} array.about")))
                .transpose()?
                .unwrap_or([0.0, 0.0]);
            Box::new(move |p, k| rotated(p, k * angle, about))
        }
        (None, Some(g)) => {
            return Err(Diagnostic::new(
                format!("{what} array.angle: a circular array needs a planar study"),
                Some(g.span.clone()),
            ))
        }
        _ => {
            return Err(Diagnostic::new(
                format!("{what} array: give step = [dx, dy] (a row) or angle with about (a circle), not both"),
                Some(item.span.clone()),
            ))
        }
    };
    let mut out = Vec::with_capacity(count as usize);
    for k in 0..count as usize {
        let mut copy = tidied(&place(&part, k as f64), ctx.length_unit);
        copy.name = format!("{}-{}", part.name, k + 1);
        if let (Some((_, i)), Some(_)) = (turn, copy.radial) {
            return Err(Diagnostic::new(
                format!("{what} array.turn: a radial magnetization turns with each copy already"),
                Some(i.span.clone()),
            ));
        }
        if let (Some((turn, i)), Some(m)) = (turn, copy.magnetization) {
            copy.magnetization = Some(turned(m, k as f64 * turn, symmetry).ok_or_else(|| {
                Diagnostic::new(
                    format!("{what} array.turn: about the axis a magnetization can only reverse (\"180 deg\")"),
                    Some(i.span.clone()),
                )
            })?);
        }
        out.push(copy);
    }
    Ok(out)
}

/// `transform = { move = [dx, dy], rotate = "30 deg", about = [x, y],
/// mirror = "x" | "y" }`: mirror (across the line through `about` along
/// that axis), then rotate about `about`, then move.
fn transform(item: &Item, ctx: &Context, symmetry: Symmetry, part: Part, what: &str) -> Result<Part, Diagnostic> {
    let t = item.table(&format!("{what} transform"), TRANSFORM)?;
    let about = t
        .get("about")
        .map(|i| ctx.point(i, &format!("{what} transform.about")))
        .transpose()?
        .unwrap_or([0.0, 0.0]);
    let mut part = part;
    if let Some(m) = t.get("mirror") {
        let across_x = m.either(
            &format!("{what} transform.mirror"),
            ["x", "y"],
            "it is not an axis; \"x\" mirrors across the line y = about.y, \"y\" across x = about.x",
        )?;
        if symmetry == Symmetry::Axisymmetric && !across_x {
            return Err(Diagnostic::new(
                format!("{what} transform.mirror: about the axis only \"x\" (across a plane z = about.z) keeps the part on its side of the axis"),
                Some(m.span.clone()),
            ));
        }
        part = mirrored(&part, across_x, about);
    }
    if let Some(r) = t.get("rotate") {
        let angle = ctx.quantity(r, Kind::Angle, &format!("{what} transform.rotate"))?;
        if symmetry == Symmetry::Axisymmetric {
            return Err(Diagnostic::new(
                format!("{what} transform.rotate: a part about the axis cannot rotate in its section"),
                Some(r.span.clone()),
            ));
        }
        part = rotated(&part, angle, about);
    }
    if let Some(m) = t.get("move") {
        let d = ctx.point(m, &format!("{what} transform.move"))?;
        if symmetry == Symmetry::Axisymmetric && d[0] != 0.0 {
            return Err(Diagnostic::new(
                format!("{what} transform.move: about the axis, parts move along z only ([0, dz]); write the radius into the shape"),
                Some(m.span.clone()),
            ));
        }
        part = moved(&part, d);
    }
    Ok(part)
}

/// The shape's points under a map; a rectangle becomes a polygon unless
/// `keep_rect`.
fn map_shape(shape: &Shape, f: &dyn Fn([f64; 2]) -> [f64; 2], keep_rect: bool, reverse: bool) -> Shape {
    match shape {
        Shape::Rect { from, to } if keep_rect => Shape::Rect { from: f(*from), to: f(*to) },
        Shape::Rect { from, to } => {
            let corners = [*from, [to[0], from[1]], *to, [from[0], to[1]]];
            Shape::Polygon(corners.iter().map(|p| f(*p)).collect())
        }
        Shape::Polygon(pts) => {
            let mut v: Vec<[f64; 2]> = pts.iter().map(|p| f(*p)).collect();
            if reverse {
                v.reverse();
            }
            Shape::Polygon(v)
        }
        Shape::Circle { center, radius } => Shape::Circle {
            center: f(*center),
            radius: *radius,
        },
        // A mirror turns every arc the other way.
        Shape::Rings(rings) => Shape::Rings(
            rings
                .iter()
                .map(|r| {
                    r.iter()
                        .map(|v| mesher::outline::Vertex {
                            at: f(v.at),
                            bulge: if reverse { -v.bulge } else { v.bulge },
                        })
                        .collect()
                })
                .collect(),
        ),
    }
}

fn moved(p: &Part, d: [f64; 2]) -> Part {
    Part {
        shape: map_shape(&p.shape, &|q| [q[0] + d[0], q[1] + d[1]], true, false),
        radial: p.radial.map(|r| Radial {
            center: [r.center[0] + d[0], r.center[1] + d[1]],
            ..r
        }),
        ..p.clone()
    }
}

/// Rotated about a point, its magnetization with it.
fn rotated(p: &Part, angle: f64, about: [f64; 2]) -> Part {
    let (s, c) = angle.sin_cos();
    let turn = |v: [f64; 2]| [c * v[0] - s * v[1], s * v[0] + c * v[1]];
    let f = |q: [f64; 2]| {
        let r = turn([q[0] - about[0], q[1] - about[1]]);
        [r[0] + about[0], r[1] + about[1]]
    };
    Part {
        shape: map_shape(&p.shape, &f, angle == 0.0, false),
        magnetization: p.magnetization.map(turn),
        radial: p.radial.map(|r| Radial { center: f(r.center), ..r }),
        ..p.clone()
    }
}

/// Mirrored across a line through `about`, its magnetization arrow
/// mirrored as drawn.
fn mirrored(p: &Part, across_x: bool, about: [f64; 2]) -> Part {
    let f = |q: [f64; 2]| {
        if across_x {
            [q[0], 2.0 * about[1] - q[1]]
        } else {
            [2.0 * about[0] - q[0], q[1]]
        }
    };
    let arrow = |v: [f64; 2]| if across_x { [v[0], -v[1]] } else { [-v[0], v[1]] };
    Part {
        shape: map_shape(&p.shape, &f, true, true),
        magnetization: p.magnetization.map(arrow),
        radial: p.radial.map(|r| Radial { center: f(r.center), ..r }),
        ..p.clone()
    }
}

/// The part with its placed coordinates rounded to 12 significant digits
/// of its size in the case's length unit: a block moved by k times 10 mm
/// lands where one typed at 10 k mm lies, to the bit (the metre
/// arithmetic differed in the last bits, and so did the meshes), and a
/// quarter turn leaves no 1e-17 behind.
fn tidied(p: &Part, unit: f64) -> Part {
    let (lo, hi) = p.shape.bounds();
    let size = (hi[0] - lo[0])
        .max(hi[1] - lo[1])
        .max(lo[0].abs().max(hi[0].abs()))
        .max(lo[1].abs().max(hi[1].abs()))
        / unit;
    let decimals = (11 - size.log10().floor() as i32).clamp(0, 17) as usize;
    let tidy = |x: f64| {
        let c: f64 = format!("{:.*}", decimals, x / unit).parse().unwrap_or(x / unit);
        // (+ 0.0: no -0.0 where the typed part has 0.)
        c * unit + 0.0
    };
    Part {
        shape: map_shape(&p.shape, &|q| q.map(tidy), true, false),
        radial: p.radial.map(|r| Radial {
            center: r.center.map(tidy),
            ..r
        }),
        ..p.clone()
    }
}

/// A magnetization turned by an angle; about the axis only reversals are
/// possible (None otherwise).
fn turned(m: [f64; 2], angle: f64, symmetry: Symmetry) -> Option<[f64; 2]> {
    let (s, c) = angle.sin_cos();
    let v = [c * m[0] - s * m[1], s * m[0] + c * m[1]];
    // Round off the last bits so that "90 deg" four times is +x again, exactly.
    let v = v.map(|x| if x.abs() < 1e-12 { 0.0 } else { x });
    match symmetry {
        Symmetry::Planar => Some(v),
        Symmetry::Axisymmetric => (s.abs() < 1e-12).then_some(v),
    }
}
