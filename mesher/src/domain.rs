//! The meshed domain: the region around the parts that the outer boundary closes.

use crate::error::MeshError;
use crate::geometry::{bbox, dist, Symmetry};
use crate::spec::{BoxSides, MeshSpec, OuterBoundary, Refinement, SideKind, LEFT};

/// The closed outline of the physical domain, counter-clockwise.
#[derive(Clone, Debug)]
pub struct Domain {
    /// The outline, counter-clockwise, as points.
    pub outline: Vec<[f64; 2]>,
    /// Centre and radius of the disk for an open boundary.
    pub kelvin: Option<([f64; 2], f64)>,
    /// Largest element size anywhere in the domain.
    pub max_size: f64,
    /// The box of a flux-parallel study (lower left, upper right) and what its sides are.
    pub sides: Option<([f64; 2], [f64; 2], BoxSides)>,
    /// The open disk is cut on x = 0 (axisymmetric, or a planar symmetry
    /// plane): a half disk, the line x = 0 its diameter; Some(flux_normal)
    /// for a planar plane.
    pub cut: Option<Option<bool>>,
}

/// The default flux-parallel box's margin around the parts and probes, in
/// their extent: a wall holds the flux in, and at four extents a magnet's
/// pull on a plate is 0.1 % off open space (half an extent: 3.4 %, and a
/// probe above the plate 61 %; docs/measurement-log.md).
const DEFAULT_BOX_PAD: f64 = 4.0;

/// Number of chords of the open boundary's circle.
const RIM_SEGMENTS: usize = 64;

impl Domain {
    /// The domain around the parts: a disk for an open study, the given or a default box otherwise.
    pub fn enclosing(spec: &MeshSpec, polygons: &[Vec<[f64; 2]>]) -> Result<Domain, MeshError> {
        let part_points = polygons.iter().flatten().copied();
        let (lo, hi) = bbox(part_points.clone());
        let axisym = spec.symmetry == Symmetry::Axisymmetric;
        let half_plane = match spec.outer {
            OuterBoundary::OpenHalf { flux_normal } if !axisym => Some(flux_normal),
            _ => None,
        };
        match &spec.outer {
            OuterBoundary::Open | OuterBoundary::OpenHalf { .. } => {
                let cut = half_plane.is_some() || axisym;
                if half_plane.is_some() && (lo[0] < 0.0 || refinement_points(&spec.refinements).any(|p| p[0] < 0.0)) {
                    return Err(MeshError::Triangulation(
                        "with a symmetry plane on x = 0 the model is the half x >= 0: every part, probe and flux line must lie there".into(),
                    ));
                }
                let c = if cut {
                    [0.0, 0.5 * (lo[1] + hi[1])]
                } else {
                    [0.5 * (lo[0] + hi[0]), 0.5 * (lo[1] + hi[1])]
                };
                let r_parts = part_points.map(|p| dist(p, c)).fold(0.0, f64::max);
                let r_all = refinement_points(&spec.refinements).map(|p| dist(p, c)).fold(0.0, f64::max);
                let radius = (1.5 * r_parts).max(1.1 * r_all);
                let outline = circle_outline(c, radius, cut, f64::INFINITY);
                Ok(Domain {
                    outline,
                    kelvin: Some((c, radius)),
                    max_size: radius / 6.0,
                    sides: None,
                    cut: cut.then_some(half_plane),
                })
            }
            OuterBoundary::FluxParallel { from_to, sides } => {
                let (b0, b1) = match from_to {
                    Some((a, b)) => crate::spec::ordered_box(*a, *b),
                    None => {
                        let (rlo, rhi) = bbox(refinement_points(&spec.refinements).chain([lo, hi]));
                        let pad = (rhi[0] - rlo[0]).max(rhi[1] - rlo[1]) * DEFAULT_BOX_PAD;
                        let x0 = if axisym { 0.0 } else { rlo[0] - pad };
                        ([x0, rlo[1] - pad], [rhi[0] + pad, rhi[1] + pad])
                    }
                };
                if !(lo[0] >= b0[0] && lo[1] >= b0[1] && hi[0] <= b1[0] && hi[1] <= b1[1]) || (axisym && b0[0] != 0.0) {
                    return Err(MeshError::Triangulation(
                        "the flux-parallel box must contain every part (and start at r = 0 when axisymmetric)".into(),
                    ));
                }
                check_sides(sides, axisym)?;
                let outline = vec![b0, [b1[0], b0[1]], b1, [b0[0], b1[1]]];
                let (w, h) = (b1[0] - b0[0], b1[1] - b0[1]);
                // Across a periodic pair no triangle may reach from one side to
                // the other (its two nodes would be one unknown twice).
                let periodic = |k: usize| matches!(sides[k], SideKind::Periodic { .. });
                let across = [(periodic(LEFT), w), (periodic(crate::spec::BOTTOM), h)]
                    .iter()
                    .filter(|(p, _)| *p)
                    .map(|(_, d)| d / 4.0)
                    .fold(f64::INFINITY, f64::min);
                Ok(Domain {
                    outline,
                    kelvin: None,
                    max_size: (w.max(h) / 6.0).min(across),
                    sides: Some((b0, b1, *sides)),
                    cut: None,
                })
            }
        }
    }

    /// Area of the outline.
    pub fn area(&self) -> f64 {
        crate::geometry::signed_area(&self.outline).abs()
    }
}

/// Periodic sides come in opposite pairs of one kind; the axis of an
/// axisymmetric box (its left side) stays the axis.
fn check_sides(sides: &BoxSides, axisymmetric: bool) -> Result<(), MeshError> {
    for k in 0..2 {
        let (a, b) = (sides[k], sides[k + 2]);
        let pa = matches!(a, SideKind::Periodic { .. });
        let pb = matches!(b, SideKind::Periodic { .. });
        if (pa || pb) && a != b {
            return Err(MeshError::Triangulation(
                "periodic sides come in pairs: the opposite side must be periodic of the same kind".into(),
            ));
        }
    }
    if axisymmetric && sides[LEFT] != SideKind::Far {
        return Err(MeshError::Triangulation(
            "the left side of an axisymmetric box is the axis r = 0; it takes no other kind".into(),
        ));
    }
    Ok(())
}

fn refinement_points(refinements: &[Refinement]) -> impl Iterator<Item = [f64; 2]> + Clone + '_ {
    refinements.iter().flat_map(|r| match r {
        Refinement::Point { at, .. } | Refinement::Enclose { at } => vec![*at],
        Refinement::Line { from, to, .. } => vec![*from, *to],
    })
}

/// Circle (or its r >= 0 half, from the south pole to the north pole) as a
/// polygon with chords no longer than `max_chord` (and at least RIM_SEGMENTS of them).
pub fn circle_outline(c: [f64; 2], radius: f64, half: bool, max_chord: f64) -> Vec<[f64; 2]> {
    let by_size = (2.0 * std::f64::consts::PI * radius / max_chord).ceil();
    let full = if by_size.is_finite() {
        (by_size as usize).clamp(RIM_SEGMENTS, 1 << 16)
    } else {
        RIM_SEGMENTS
    };
    let full = full.div_ceil(2) * 2;
    if half {
        let n = full / 2;
        return (0..=n)
            .map(|k| {
                let t = -std::f64::consts::FRAC_PI_2 + std::f64::consts::PI * k as f64 / n as f64;
                let r = if k == 0 || k == n { 0.0 } else { radius * t.cos() };
                [r, c[1] + radius * t.sin()]
            })
            .collect();
    }
    (0..full)
        .map(|k| {
            let t = 2.0 * std::f64::consts::PI * k as f64 / full as f64;
            [c[0] + radius * t.cos(), c[1] + radius * t.sin()]
        })
        .collect()
}
