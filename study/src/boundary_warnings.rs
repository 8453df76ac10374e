//! Boundaries that change the problem unseen: symmetry planes that mirror
//! a part into something else than its other half, and a flux-parallel
//! box's far walls standing close to the parts. A plane models the assembly's mirror image beyond it: a
//! flux-normal plane keeps the magnetization's component across it and
//! reverses the one along it (and keeps a winding's current), a
//! flux-parallel plane the other way round (and reverses the current). A
//! magnet halved through its middle must therefore be magnetized across a
//! flux-normal plane or along a flux-parallel one; a +y magnet halved at
//! x = 0 under a flux-normal plane became two opposite half-magnets (119 mT
//! at a probe where the whole magnet gives 187 mT), with no warning. A far
//! wall holds the flux in, and its truncation is not in the error
//! estimates (`near_far_walls`).

use crate::materials::Material;
use crate::model::Model;
use mesher::{OuterBoundary, SideKind};

/// A symmetry plane: the coordinate it fixes (0: x or r, 1: y or z), its
/// value there, and whether flux crosses it at right angles.
struct Plane {
    axis: usize,
    at: f64,
    flux_normal: bool,
}

/// The model's symmetry planes (the open half-space's x = 0, a box's
/// mirror sides).
fn planes(model: &Model) -> Vec<Plane> {
    match &model.boundary {
        OuterBoundary::OpenHalf { flux_normal } => vec![Plane {
            axis: 0,
            at: 0.0,
            flux_normal: *flux_normal,
        }],
        OuterBoundary::FluxParallel { from_to: Some((a, b)), sides } => {
            let (lo, hi) = mesher::ordered_box(*a, *b);
            // bottom, right, top, left
            let place = [(1, lo[1]), (0, hi[0]), (1, hi[1]), (0, lo[0])];
            sides
                .iter()
                .zip(place)
                .filter_map(|(s, (axis, at))| match s {
                    SideKind::Mirror { flux_normal } => Some(Plane {
                        axis,
                        at,
                        flux_normal: *flux_normal,
                    }),
                    _ => None,
                })
                .collect()
        }
        _ => Vec::new(),
    }
}

/// Whether an edge of the part's outline lies on the plane (not a point
/// touch): the part is halved there.
fn halved_by(shape: &mesher::Shape, plane: &Plane) -> bool {
    let (lo, hi) = shape.bounds();
    let tol = 1e-9 * (hi[0] - lo[0]).abs().max((hi[1] - lo[1]).abs()).max(plane.at.abs());
    let on = |p: &[f64; 2]| (p[plane.axis] - plane.at).abs() <= tol;
    shape.corner_outlines().iter().any(|ring| {
        (0..ring.len()).any(|k| {
            let (a, b) = (&ring[k], &ring[(k + 1) % ring.len()]);
            on(a) && on(b) && mesher::geometry::dist(*a, *b) > tol
        })
    })
}

/// Share of a unit magnetization that may lie in the wrong direction
/// unremarked (a direction given in whole degrees rounds to this).
const SLANT: f64 = 0.01;

/// The warnings: each magnet or winding halved by a plane that mirrors it
/// into something else.
pub(crate) fn mirrored_parts(model: &Model) -> Vec<String> {
    let mut out = Vec::new();
    let names = if model.symmetry == mesher::Symmetry::Planar { ["x", "y"] } else { ["r", "z"] };
    for plane in planes(model) {
        let (kind, other) = if plane.flux_normal {
            ("flux-normal", "flux-parallel")
        } else {
            ("flux-parallel", "flux-normal")
        };
        let line = format!("{kind} plane {} = {}", names[plane.axis], model.in_unit(plane.at));
        for p in model.parts.iter().filter(|p| halved_by(&p.shape, &plane)) {
            if let (Material::Magnet(_), Some(d), None) = (&p.material.material, p.magnetization, p.radial) {
                let (across, along) = (d[plane.axis].abs(), d[1 - plane.axis].abs());
                let reversed = if plane.flux_normal { along } else { across };
                if reversed > SLANT {
                    let kept = if plane.flux_normal { across } else { along };
                    let fix = if kept > SLANT {
                        "no symmetry plane halves a magnet magnetized at a slant to it: model it whole".to_string()
                    } else {
                        format!("a magnet halved through its middle needs a {other} plane here")
                    };
                    out.push(format!(
                        "magnet '{}' is halved by the {line}, which mirrors it with its magnetization {} the plane reversed: the model holds two half-magnets magnetized {}, not one magnet; {fix}",
                        p.name,
                        if plane.flux_normal { "along" } else { "across" },
                        if plane.flux_normal { "against each other along the plane" } else { "against each other across it" },
                    ));
                }
            }
            if p.current.is_some_and(|i| i != 0.0) && !plane.flux_normal {
                out.push(format!(
                    "winding '{}' is halved by the {line}, which mirrors it with its current reversed: the model holds a go-and-return pair, not one winding; a winding halved through its middle needs a flux-normal plane",
                    p.name
                ));
            }
        }
    }
    out
}

/// How many times the parts' extent a far wall of a flux-parallel box must
/// stand from them. A wall holds the flux in, and the box's truncation is
/// not in the error estimates. Measured on a 10 x 5 mm N42 disk under a
/// 16 x 2 mm DC01 plate (axisymmetric, walls k extents from the parts'
/// box, against the open boundary): the pull 1.9 % off at k = 1, 0.43 % at
/// 2, 0.10 % at 4, 0.014 % at 8; a probe 4 mm above the plate 56 %, 17 %,
/// 3.8 % and 0.65 % off. A box with a periodic pair is left out: across a
/// period the field dies away exponentially (the linear coupling's pull
/// moved by 2e-6 with its walls from 0.55 to 3.5 periods away).
const FAR_WALL_EXTENTS: f64 = 4.0;

/// The far walls of a flux-parallel box (`domain`: the meshed box) that
/// stand within FAR_WALL_EXTENTS of the parts, as a warning.
pub(crate) fn near_far_walls(model: &Model, domain: ([f64; 2], [f64; 2])) -> Option<String> {
    let OuterBoundary::FluxParallel { sides, .. } = &model.boundary else {
        return None;
    };
    if sides.iter().any(|s| matches!(s, SideKind::Periodic { .. })) || model.parts.is_empty() {
        return None;
    }
    let (lo, hi) = model.parts_box();
    let extent = (hi[0] - lo[0]).max(hi[1] - lo[1]);
    let (b0, b1) = domain;
    // bottom, right, top, left: the gap from the parts' box to each wall
    let gaps = [lo[1] - b0[1], b1[0] - hi[0], b1[1] - hi[1], lo[0] - b0[0]];
    let axisym = model.symmetry == mesher::Symmetry::Axisymmetric;
    let near: Vec<String> = ["bottom", "right", "top", "left"]
        .iter()
        .zip(gaps)
        .zip(sides)
        .enumerate()
        .filter(|(k, ((_, gap), side))| **side == SideKind::Far && !(axisym && *k == mesher::LEFT) && *gap < FAR_WALL_EXTENTS * extent)
        .map(|(_, ((name, gap), _))| format!("{name} {}", model.length_text(gap)))
        .collect();
    (!near.is_empty()).then(|| {
        format!(
            "the flux-parallel box's far walls stand close to the parts (from them: {}; their extent {}): a wall holds the flux in, and this truncation is not in the error estimates (a magnet under a plate: its pull 1.9 % off with the walls one extent away, 0.1 % at four; a probe between the parts and a wall far more). Move the walls out to {FAR_WALL_EXTENTS} extents, or use boundary = \"open\", which is exact; a wall that is a symmetry plane of the assembly is named so with [[boundary]]",
            near.join(", "),
            model.length_text(extent)
        )
    })
}

/// With `scale_to_whole` a force is the whole assembly's: the set and its
/// mirror images. The first symmetry plane the set does not reach, as
/// (axis normal to it, its coordinate): beyond it the set's image is a
/// second body pulled the other way, and the component across the plane
/// is zero by construction. Two magnets attracting across a flux-normal
/// plane at the gap's middle read "force pull: [0 N, 0 N]" where each
/// pulls with 62.4 N, and the refinement chased the remaining component,
/// zero by symmetry, to 825 000 triangles ("1574 %" not reached). A set
/// that reaches the plane (a plate cut by it) is one body with its image.
pub fn plane_beyond_force_set(model: &Model, parts: &[usize]) -> Option<(usize, f64)> {
    let whole = model.whole.as_ref()?;
    let (lo, hi) = mesher::geometry::bbox(parts.iter().flat_map(|&i| {
        let (a, b) = model.parts[i].shape.bounds();
        [a, b]
    }));
    let tol = 1e-9 * (hi[0] - lo[0]).max(hi[1] - lo[1]);
    whole
        .mirrors
        .iter()
        .find(|&&(axis, at)| (lo[axis] - at).abs() > tol && (hi[axis] - at).abs() > tol)
        .copied()
}
